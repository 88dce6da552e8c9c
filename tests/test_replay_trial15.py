"""replay's words of new-user trial 15, on the demo's simulated flights (an INVENTED vehicle,
estimator.demo.flight_sim, seed 1 as `liftcal demo` writes them) and the demo's fitted set:

- the text output ended with one caution (the watch's own) where --json lists four (props off,
  lithium packs, whose rules come first): a builder reading the text never saw the pack and
  propeller cautions. The sentences live in estimator.cautions only; the reference for what a
  board output must carry is that module's "board" context (design notes sec. 6).
"""

import json

import pytest

from estimator.cautions import cautions
from estimator.demo.scenario import DEMO_VEHICLE
from estimator.params import write_params
from io_helpers import run
from watch_helpers import demo_fit_params, flight_csv_once


@pytest.fixture(scope="module")
def sealed(tmp_path_factory):
    path = tmp_path_factory.mktemp("r15") / "params.json"
    write_params(str(path), demo_fit_params())
    return path


@pytest.mark.parametrize("fault", [None, "power_low"])
def test_the_text_ends_with_every_caution_the_json_lists(tmp_path, sealed, fault):
    log = tmp_path / "f.csv"
    log.write_text(flight_csv_once(dict(DEMO_VEHICLE), fault=fault, seed=1))
    code, out, err = run(["replay", log, "--params", sealed, "--json"])
    assert code == 0, err
    listed = json.loads(out)["cautions"]
    assert listed == cautions("board") and len(listed) == 4
    code, text, err = run(["replay", log, "--params", sealed])
    assert code == 0, err
    # each caution begins a "- " item; wrapped lines continue it with two spaces
    items = " ".join(text.split("\n- ", 1)[1].split()).split(" - ")
    assert items == listed, items
