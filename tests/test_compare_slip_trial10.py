"""Tenth new-user trial, finding 4: `compare` named as its best build a row whose pack the same
output flags as a unit or decimal slip (a 1332 Wh pack on a 9 kg hexa: the pack alone weighs
most of the vehicle), and its plot drew that row as plainly keeping every margin.

The vehicle is the trial's invented 10 kg 12S hexa sprayer (not measured, not any product); 60 Ah
on 12 LiPo cells of 3.7 V nominal is 2664 Wh, which at even 200 Wh/kg (about the best LiPo packs,
from memory) weighs 13.3 kg, more than the whole vehicle: a slip by the pack-share check (packs
weigh about 3..70 % of a multirotor, common practice, from memory). 16 Ah is an ordinary pack.
"""

import json

import pytest

from trial_helpers import json_file, ok

HEXA = {"name": "invented 10 kg 12S hexa sprayer", "mass": "10kg", "rotors": {"count": 6},
        "propeller": {"diameter": "22in", "ct": 0.100, "cp": 0.038},
        "motor": {"kv_rpm_per_V": 110, "resistance_ohm": 0.10, "no_load_current_A": 0.6, "max_current_A": 35},
        "battery": {"cells": 12, "capacity": "16Ah", "resistance": "10mohm", "full_cell_V": 4.2,
                    "nominal_cell_V": 3.7, "empty_cell_V": 3.5},
        "esc": {"efficiency": 0.96, "max_current_A": 60},
        "site": {"altitude": "600m", "temperature": "10C", "humidity_pct": 70}}
VARY = ["--vary", "battery.capacity=16Ah,60Ah"]


@pytest.fixture(scope="module")
def hexa(tmp_path_factory):
    return json_file(tmp_path_factory.mktemp("hexa"), HEXA, "hexa.json")


def test_a_row_that_looks_like_a_slip_never_wins_the_verdict(hexa):
    result = json.loads(ok("compare", hexa, *VARY, "--json"))
    rows = {r["values"]["battery.capacity"]: r for r in result["rows"]}
    slip, plain = rows["60Ah"], rows["16Ah"]
    # the precondition: both keep every margin, the slip row hovers longer and is flagged
    assert slip["keeps_margins"] and plain["keeps_margins"]
    assert slip["flight_time_lead_min"] > plain["flight_time_lead_min"]
    assert any(c["kind"] == "unit_slip" and "capacity" in c["text"] for c in slip["caveats"])
    assert slip["looks_like_slip"] and not plain["looks_like_slip"]
    assert result["best"]["label"] == "battery.capacity=16Ah"
    assert [r["label"] for r in result["left_out"]] == ["battery.capacity=60Ah"]
    assert plain["rank"] < slip["rank"]


def test_the_table_says_the_slip_row_is_left_out_and_why(hexa):
    flat = " ".join(ok("compare", hexa, *VARY).split())
    assert "longest hover that keeps every margin: battery.capacity=16Ah" in flat
    assert "left out of that verdict: #2 (a value looks like a unit or decimal slip" in flat
    assert "keeps every margin, but left out of the verdict" in flat


def test_the_plot_draws_the_slip_row_apart_from_the_rows_that_keep_every_margin(hexa, monkeypatch):
    import estimator.preflight.plots as plots
    from estimator.preflight.compare import compare_rows, parse_vary

    drawn = []
    monkeypatch.setattr(plots, "save_figure", lambda fig, path: drawn.append(fig))
    result = compare_rows(json.loads(json.dumps(HEXA)), "hexa.json", [parse_vary("battery.capacity=16Ah,60Ah")])
    plots.plot_compare("unused.png", result, "hexa")
    ax = drawn[0].axes[0]
    labels = [t.get_text() for t in ax.get_legend().get_texts()]
    assert labels == ["keeps every margin", "keeps the margins, but a value looks like a slip: left out"]
    # one point in each group: the slip row is not among the points drawn as keeping every margin
    assert [len(c.get_offsets()) for c in ax.collections] == [1, 1]
