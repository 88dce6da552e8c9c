"""Bench-sweep inputs of new-user trial 15 (its findings 3 and 5), on test_bench_air_inputs'
INVENTED square-law sweep:

- 3: a sweep whose thrust column holds 'nan' in every row (a load cell that was not logged)
  printed numpy's "RuntimeWarning: Mean of empty slice" and its source line on stderr before
  the error line, which blamed the rows (NaN, negative current, ...) rather than the column;
- 5: a bench comment key given twice with different values ('# diameter: 8m' above the sweep's
  own '# diameter: 8in') was read as the later one without a word.

No physics value is checked here: the sweep is invented and only the refusals are tested.
"""

import subprocess
import sys

import pytest

from io_helpers import ROOT, refused
from test_bench_air_inputs import _sweep


def _liftcal(*args):
    return subprocess.run([sys.executable, "-m", "estimator"] + [str(a) for a in args], capture_output=True,
                          text=True, timeout=120, cwd=ROOT)


def _blank_column(csv, index):
    lines = open(csv).read().splitlines()
    out = []
    for line in lines:
        if line and not line.startswith("#") and "[" not in line:
            cells = line.split(",")
            cells[index] = "nan"
            line = ",".join(cells)
        out.append(line)
    open(csv, "w").write("\n".join(out) + "\n")
    return csv


def test_a_thrust_column_without_any_reading_gives_one_error_line_naming_the_column(tmp_path):
    csv = _blank_column(_sweep(tmp_path, ""), 3)
    done = _liftcal("fit", csv, "--out", tmp_path / "p.json")
    lines = done.stderr.strip().splitlines()
    assert done.returncode == 2 and len(lines) == 1 and lines[0].startswith("error: "), done.stderr
    assert "thrust[N]" in lines[0] and "no reading in any of the 42 rows" in lines[0], lines[0]
    assert not (tmp_path / "p.json").exists()


def test_two_columns_without_readings_are_both_named(tmp_path):
    csv = _blank_column(_blank_column(_sweep(tmp_path, ""), 2), 3)
    refused(["fit", csv, "--out", tmp_path / "p.json"], "columns current[A], thrust[N] hold no reading")


@pytest.mark.parametrize("comments, key", [
    ("# diameter: 8m\n", "diameter"),           # the sweep's own '# diameter: 10in' follows
    ("# altitude: 600m\n# altitude: 2000m\n", "altitude"),
])
def test_a_comment_key_given_twice_with_different_values_is_refused_naming_both_lines(tmp_path, comments, key):
    csv = _sweep(tmp_path, comments)
    refused(["fit", csv, "--out", tmp_path / "p.json"], csv, "'# %s'" % key, "lines 1 and 2", "twice")
    assert not (tmp_path / "p.json").exists()


def test_a_comment_repeated_with_the_same_value_is_read(tmp_path):
    code = _liftcal("fit", _sweep(tmp_path, "# altitude: 600m\n# altitude: 600 m\n"), "--out", tmp_path / "p.json")
    assert code.returncode == 0, code.stderr
