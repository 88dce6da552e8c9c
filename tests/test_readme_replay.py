"""The README's replay examples are what replay prints now (the README says its output is
from real runs on the demo scenario, invented data): since replay always names the implied
mass ("implied mass ..." or "mass not judged: ..."), the examples without that line no
longer matched. Reference: the program's own output on the demo's simulated flights
(estimator.demo.flight_sim, seed 1, as `liftcal demo` writes them) and the demo's fitted set.
"""

import os

import pytest

from estimator.demo.scenario import DEMO_VEHICLE
from io_helpers import ROOT
from trial_helpers import ok
from watch_helpers import flight_csv_once


def _readme_block(command):
    """The example output under ``$ COMMAND`` in the README, up to its '...' line, unindented."""
    with open(os.path.join(ROOT, "README.md"), encoding="utf-8") as fh:
        text = fh.read()
    head = "    $ %s\n" % command
    start = text.index(head) + len(head)
    end = text.index("    ...\n", start)
    return [line[4:] for line in text[start:end].rstrip("\n").split("\n")]


@pytest.mark.parametrize("stem, fault, plot", [("flight-power-low", "power_low", True),
                                               ("flight-heavy", "heavy", False)])
def test_the_readme_replay_examples_are_what_replay_prints(stem, fault, plot, params_file, tmp_path,
                                                           monkeypatch):
    monkeypatch.chdir(tmp_path)
    with open(stem + ".csv", "w", encoding="utf-8") as fh:
        fh.write(flight_csv_once(dict(DEMO_VEHICLE), fault=fault, seed=1))
    os.symlink(params_file, "params.json")
    command = ["replay", stem + ".csv", "--params", "params.json"] + (["--plot", "replay.png"] if plot else [])
    printed = ok(*command).rstrip("\n").split("\n")
    shown = _readme_block("liftcal " + " ".join(command))
    assert printed[:len(shown)] == shown
    assert printed[len(shown)].startswith("- ")  # the README leaves out only the cautions
