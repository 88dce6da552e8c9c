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
    labels = ax.get_legend_handles_labels()[1]  # wherever the legend is drawn
    assert labels == ["keeps every margin", "keeps the margins, but a value looks like a slip: left out"]
    # one point in each group: the slip row is not among the points drawn as keeping every margin
    assert [len(c.get_offsets()) for c in ax.collections] == [1, 1]


# --- a slip suggestion only when the corrected vehicle is an ordinary one ----------------------
# The trial's file carries "max_discharge_C": 15 (its pack's rating, invented). Hover power from
# momentum theory, P = T^1.5 / sqrt(2 rho A) per rotor at a figure of merit of 0.5 (from memory),
# sea-level standard air 1.225 kg/m^3 (US Standard Atmosphere 1976): 10 kg on six 22in rotors
# needs about 1023 W, and thrust-to-weight 2 needs 2^1.5 of it (P ~ T^1.5), about 65 A on 44.4 V.

def _warnings(tmp_path, capacity, **changes):
    doc = json.loads(json.dumps(HEXA))
    doc["battery"].update(capacity=capacity, max_discharge_C=15)
    doc.update(changes)
    return [w for w in json.loads(ok("hover", json_file(tmp_path, doc), "--json"))["warnings"]
            if w.startswith("$.battery.capacity: ")]  # the key as the file wrote it (trial 14, finding 10)


def test_a_decimal_slip_is_not_suggested_when_its_pack_could_not_lift_the_vehicle(tmp_path):
    # 40 Ah (1776 Wh, 89 % of the vehicle at 200 Wh/kg) is flagged; 4 Ah would fit the pack-share
    # band but at 15C gives 60 A, below the 65 A thrust-to-weight 2 needs: not an ordinary vehicle
    (warning,) = _warnings(tmp_path, "40Ah")
    assert "meant" not in warning and "no single unit or decimal slip gives an ordinary vehicle" in warning


def test_a_decimal_slip_is_not_suggested_when_its_pack_would_hover_only_minutes(tmp_path):
    # on 15in rotors the same 10 kg needs about 1500 W: 3.5 Ah (155 Wh) would hover at most about
    # 6 min even at this generous figure of merit, no ordinary 10 kg vehicle; 35 Ah is still flagged
    (warning,) = _warnings(tmp_path, "35Ah", propeller={"diameter": "15in", "ct": 0.100, "cp": 0.038})
    assert "meant" not in warning and "check the capacity and the mass" in warning


def test_a_slip_to_an_ordinary_pack_is_still_suggested(tmp_path):
    # 160 Ah for 16 Ah: about an hour of hover at 65 A of 240 A rated: ordinary, so named first
    (warning,) = _warnings(tmp_path, "160Ah")
    assert "16 Ah meant (a misplaced decimal point)?" in warning
