"""replay's words of new-user trial 15, on the demo's simulated flights (an INVENTED vehicle,
estimator.demo.flight_sim, seed 1 as `liftcal demo` writes them) and the demo's fitted set:

- the text output ended with one caution (the watch's own) where --json lists four (props off,
  lithium packs, whose rules come first): a builder reading the text never saw the pack and
  propeller cautions. The sentences live in estimator.cautions only; the reference for what a
  board output must carry is that module's "board" context (design notes sec. 6);
- finding 4: milliseconds under time[s] from a logger between 25 and 500 Hz were replayed.
"""

import json

import pytest

from estimator.cautions import cautions
from estimator.demo.scenario import DEMO_VEHICLE
from estimator.params import write_params
from io_helpers import refused, run
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


def test_a_log_in_ms_labelled_s_at_37_hz_is_refused_as_milliseconds(tmp_path, sealed):
    # new-user trial 15, finding 4: a 37 Hz logger writing milliseconds under time[s] (steps of 27 "s",
    # between the watch's 2 s gap limit and the 40 s the check began at) was replayed with a hundred
    # "logging paused" lines and no verdict. The demo flight's 100 ms rows stand in for 27 ms ones.
    rows = flight_csv_once(dict(DEMO_VEHICLE), seed=1).splitlines()
    start = next(i for i, line in enumerate(rows) if line.startswith("time["))
    out = rows[:start] + [rows[start]]
    for line in rows[start + 1:]:
        t, rest = line.split(",", 1)
        out.append("%.0f,%s" % (float(t) * 270.0, rest))
    log = tmp_path / "ms.csv"
    log.write_text("\n".join(out) + "\n")
    assert rows[start].startswith("time[s],")
    refused(["replay", log, "--params", sealed], "ms.csv", "column time[s]", "median step between rows is 27 s",
            "likely milliseconds in a column labelled [s] (a 37 Hz log); label it time[ms]")
    # the same rows labelled time[ms] are a 37 Hz log the watch judges
    log.write_text("\n".join(out[:start] + [out[start].replace("time[s]", "time[ms]")] + out[start + 1:]) + "\n")
    code, text, err = run(["replay", log, "--params", sealed, "--json"])
    assert code == 0 and json.loads(text)["learned"] is True, err
