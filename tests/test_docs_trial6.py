"""Sixth new-user trial, items 9 and 10: the README and --help say what the program does, and
`fit --diameter` against a CSV's own `# diameter:` says which one it used.

References: the program's own output and tables (the README shows "real runs"; --help must list
what the readers accept), and the trial's report. The demo vehicle is the invented one of
schemas/examples/valid. Through the command: io_helpers.run (exit code, stdout, stderr apart).
"""

import json
import os
import re

from estimator.demo.ramp_sweep import ramp_sweep_rows, write_ramp_csv
from io_helpers import ROOT, VEHICLE
from trial_helpers import ok


def _readme():
    with open(os.path.join(ROOT, "README.md"), encoding="utf-8") as fh:
        return fh.read()


def test_the_readme_sheet_is_the_sheet_the_program_prints():
    text = _readme()
    start = text.index("    $ liftcal hover vehicle.json\n") + len("    $ liftcal hover vehicle.json\n")
    end = text.index("\nA vehicle that cannot hover is not an error")
    shown = [line[4:] if line.strip() else "" for line in text[start:end].rstrip("\n").split("\n")]
    printed = ok("hover", VEHICLE).rstrip("\n").split("\n")
    assert shown == printed


def test_readme_commands_run_outside_a_checkout():
    text = _readme()
    commands = [line.strip() for line in text.splitlines() if line.strip().startswith(("$ liftcal", "python3 -m venv"))]
    assert commands
    for line in commands:
        assert " -e ." not in line, line                  # users install with `pip install .`
        assert not re.search(r"\sestimator/", line), line  # no path that exists only in a checkout


def test_payload_help_says_what_a_range_gives():
    report = json.loads(ok("hover", VEHICLE, "--payload", "0..1kg", "--json"))
    payloads = [round(row["payload_kg"], 6) for row in report["payload"]["rows"]]
    assert payloads == [round(0.1 * i, 6) for i in range(11)]
    help_text = " ".join(ok("hover", "--help").split())
    assert "0..1kg gives 0, 0.1, ..., 1 kg" in help_text and "(9 points)" not in help_text


def test_replay_help_lists_every_unit_its_reader_takes():
    from estimator.csvtable import COMMAND_UNITS
    from estimator.watch import replay

    help_text = " ".join(ok("replay", "--help").split())
    for name, table in (("time", replay._TIME_UNITS), ("voltage", replay._VOLT_UNITS),
                        ("current", replay._AMP_UNITS)):
        for unit in table:
            assert "%s[%s]" % (name, unit) in help_text, (name, unit)
    for unit in COMMAND_UNITS:
        assert "[%s]" % unit in help_text, unit


def test_fit_diameter_against_the_csv_comment_is_named(tmp_path):
    sweep = tmp_path / "sweep.csv"
    write_ramp_csv(str(sweep), ramp_sweep_rows(3000, seed=5), "invented sweep for the diameter test")
    assert "# diameter: 10in" in sweep.read_text()
    out = " ".join(ok("fit", sweep, "--diameter", "11in", "--out", tmp_path / "a.json").split())
    assert out.count("--diameter 0.2794 m is used, not the 0.254 m of") == 1
    doc = json.loads((tmp_path / "a.json").read_text())
    assert doc["rotor"]["diameter_m"] == 0.2794                      # 11 in = 0.2794 m (NIST SP 811)
    same = " ".join(ok("fit", sweep, "--diameter", "10in", "--out", tmp_path / "b.json").split())
    assert "is used, not the" not in same
