"""The README's tour says "All output below is from real runs on the demo scenario"; new-user
trial 14 (finding 14) found `static`, the payload table, `fit` and `firmware` printing other words
than the README shows (a changed rule-of-thumb sentence, a row written 0.602, 9017 bytes and the
folder record, the mass alarm in kg, the site paragraph). Each block here is run again in a folder
laid out as the demo writes it (its vehicle, its simulated bench sweep, seed 1: an INVENTED
scenario) and every stretch of the README's block between its '...' lines must be in what the
command prints, compared with the words' spacing flattened (the wrapping moves with the length of
the temporary folder's name) and the README's /tmp/tour standing for that folder. (The replay
blocks: tests/test_readme_replay.py.)
"""

import json
import os

import pytest

from estimator.demo.bench_sim import simulate_sweep
from estimator.demo.scenario import DEMO_VEHICLE
from io_helpers import ROOT, run


def _flat(text):
    return " ".join(text.split())


def _stretches(command):
    """The README's example output under ``$ COMMAND``, as the flattened stretches between its '...'
    lines (a line of only '...' at any indent; the block ends at a blank line or the next command)."""
    with open(os.path.join(ROOT, "README.md"), encoding="utf-8") as fh:
        text = fh.read()
    head = "    $ %s\n" % command
    assert text.count(head) == 1, command
    block = text[text.index(head) + len(head):].split("\n\n")[0].split("\n    $ ")[0]
    stretches, now = [], []
    for line in block.split("\n"):
        if line.strip() == "...":
            stretches.append(now)
            now = []
        else:
            now.append(line)
    stretches.append(now)
    return [_flat("\n".join(s)) for s in stretches if s]


@pytest.fixture(scope="module")
def tour(tmp_path_factory):
    folder = tmp_path_factory.mktemp("tour")
    (folder / "vehicle.json").write_text(json.dumps(DEMO_VEHICLE))
    (folder / "bench.csv").write_text(simulate_sweep(seed=1))
    return folder


def _printed(folder, command, monkeypatch):
    monkeypatch.chdir(folder)
    code, out, err = run(command.split()[1:])
    assert code == 0, err
    return _flat(out)


@pytest.mark.parametrize("command", [
    "liftcal static --diameter 10in --power 70W",
    "liftcal hover vehicle.json --payload 0..1kg --job-time 10min --plot payload.png",
    "liftcal fit bench.csv --vehicle vehicle.json --out params.json",
    "liftcal firmware params.json --out board",
])
def test_the_readme_tour_blocks_are_what_the_commands_print(tour, command, monkeypatch):
    printed = _printed(tour, command, monkeypatch)
    for stretch in _stretches(command):
        if command.startswith("liftcal firmware"):
            # the tour's board was the demo's, so the README's run replaced it; here it is new
            stretch = stretch.split(" replaced board:")[0].replace("/tmp/tour", str(tour))
        assert stretch in printed, (stretch, printed)
