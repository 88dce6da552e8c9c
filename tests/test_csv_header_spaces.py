"""A header cell padded with thousands of spaces ('vol' + 10000 spaces + 'tage[V]', as a mutated
flight log of the property test had it) is read in one pass and refused in one error line: the
header cell pattern backtracked over the spaces for hours (a hang, not an error line)."""

import os
import subprocess
import sys

import pytest

from io_helpers import ROOT

HEADERS = {
    "replay": "time[s],command[-],vol%stage[V],current[A]",
    "fit": "command[-],voltage[V],cur%srent[A],thrust[N]",
}


@pytest.mark.parametrize("command", sorted(HEADERS))
def test_a_header_cell_of_many_spaces_is_refused_at_once(tmp_path, command):
    data = tmp_path / "log.csv"
    data.write_text(HEADERS[command] % (" " * 10000) + "\n" + "0.5,0.5,15,5\n" * 20)
    args = {"replay": ["replay", data, "--params", os.path.join(ROOT, "schemas", "examples", "valid",
                                                                 "params-demo-with-hover.json")],
            "fit": ["fit", data, "--out", tmp_path / "p.json"]}[command]
    try:  # a subprocess, so that a hang fails the test instead of stalling the suite
        done = subprocess.run([sys.executable, "-m", "estimator"] + [str(a) for a in args], capture_output=True,
                              text=True, cwd=ROOT, timeout=30)
    except subprocess.TimeoutExpired:
        pytest.fail("liftcal %s did not answer within 30 s" % command)
    lines = done.stderr.strip().splitlines()
    assert done.returncode == 2 and len(lines) == 1 and lines[0].startswith("error: "), done.stderr
    assert "log.csv: line 1: header" in lines[0], lines[0]
    assert "Traceback" not in done.stderr and not (tmp_path / "p.json").exists()
