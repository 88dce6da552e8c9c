"""Second new-user trial, pre-flight margins: the pack's sag at full command against its cutoff,
printed numbers that never contradict their thresholds, motor against ESC input current.

External references: the Thevenin pack V = V_oc - I R (design notes sec. 3); the definition of
ESC efficiency eta = P_out / P_in (the ESC's idle draw apart), which at full duty, where the
motor sees the bus voltage, makes the motor current eta times the ESC input current; the
thrust-to-weight floor 2, hover-command ceiling 0.6 and flyable floors 1.3 / 0.8 (common
practice for multirotors).
"""

import json
import random
import re

import pytest

from estimator.bench.sweep import fit_bench_file
from estimator.demo.bench_sim import simulate_sweep
from estimator.demo.scenario import DEMO_VEHICLE
from estimator.preflight.report import format_sheet, hover_report
from estimator.preflight.warnings import margin_warnings, not_flyable_reasons
from estimator.vehicle import check_vehicle


def _vehicle(**battery):
    doc = json.loads(json.dumps(DEMO_VEHICLE))
    doc["battery"].update(battery)
    return check_vehicle(doc, "v.json")


@pytest.fixture(scope="module")
def params(tmp_path_factory):
    path = tmp_path_factory.mktemp("margins") / "sweep.csv"
    path.write_text(simulate_sweep(seed=31))
    return fit_bench_file(str(path))


@pytest.mark.parametrize("fitted", [False, True])
def test_full_command_sag_below_the_cutoff_is_said_with_numbers(params, fitted):
    # 0.12 ohm at 25 C on the 4S demo set: full command pulls the pack far below 3.3 V per cell
    weak = _vehicle(resistance_ohm=0.12, cutoff_cell_V=3.3)
    r = hover_report(weak, params if fitted else None)
    v_oc = 4 * DEMO_VEHICLE["battery"]["nominal_cell_V"]
    # Thevenin pack: the reported full-command bus voltage is V_oc - I R_pack
    assert r["full_bus_V"] == pytest.approx(v_oc - r["full_pack_current_A"] * r["pack_resistance_ohm"], rel=1e-6)
    per_cell = r["full_bus_V"] / 4
    assert per_cell < 3.3
    assert r["thrust_to_weight_reachable"] is False
    assert r["full_command_cell_V"] == pytest.approx(per_cell, rel=1e-12)
    sag = [w for w in r["warnings"] if "per cell" in w and "cutoff" in w]
    assert len(sag) == 1
    assert "%.2f V per cell" % per_cell in sag[0] and "3.30 V cutoff" in sag[0] and "not reachable" in sag[0]
    sheet = format_sheet(r)
    from estimator.units import plain_number  # three significant digits (trial 4, item 8)
    assert "NOT REACHABLE" in sheet and "full command sags the pack to %s V" % plain_number(r["full_bus_V"], 3, True) in sheet


@pytest.mark.parametrize("fitted", [False, True])
def test_a_stiff_pack_gets_no_sag_warning(params, fitted):
    r = hover_report(_vehicle(resistance_ohm=0.005), params if fitted else None)
    assert r["full_bus_V"] / 4 >= r["cutoff_cell_V"]
    assert r["thrust_to_weight_reachable"] is True
    assert not any("per cell" in w and "cutoff" in w for w in r["warnings"])
    assert "NOT REACHABLE" not in format_sheet(r)


def _number_after(pattern, text):
    match = re.search(pattern, text)
    assert match, (pattern, text)
    return float(match.group(1))


def test_printed_numbers_never_contradict_their_thresholds():
    rng = random.Random(7)
    values = [2.0 - 10.0 ** -rng.uniform(1.0, 6.0) for _ in range(300)] + [1.995, 1.9951, 1.99999]
    for tw in values:
        report = {"thrust_to_weight": tw, "hover_command": 0.5, "hover_command_full": 0.45,
                  "hover_command_empty": 0.55}
        below = [w for w in margin_warnings(report) if " is below 2" in w]
        assert len(below) == 1
        assert _number_after(r"thrust-to-weight ([0-9.]+) is below 2", below[0]) < 2.0
        # one hover command in this warning at most (the sheet says which one already)
        assert len(re.findall(r"command [0-9]", below[0])) == 0
        sheet_tw = format_sheet(dict(report, warnings=[], cautions=[], can_hover=True))
        assert _number_after(r"thrust-to-weight +([0-9.]+) ", sheet_tw) < 2.0
    for command in [0.6 + 10.0 ** -rng.uniform(2.5, 6.0) for _ in range(100)]:
        report = {"thrust_to_weight": 2.5, "hover_command": 0.5, "hover_command_empty": command}
        above = [w for w in margin_warnings(report) if "above 0.6" in w]
        assert _number_after(r"hover command ([0-9.]+) at empty", above[0]) > 0.6
    for tw in [1.3 - 10.0 ** -rng.uniform(2.5, 6.0) for _ in range(100)]:
        reasons = not_flyable_reasons({"thrust_to_weight": tw, "hover_command": 0.5, "hover_command_empty": 0.6})
        assert _number_after(r"thrust-to-weight ([0-9.]+) leaves", reasons[0]) < 1.3


@pytest.mark.parametrize("fitted", [False, True])
def test_motor_current_is_the_esc_output_in_both_routes(params, fitted):
    doc = json.loads(json.dumps(DEMO_VEHICLE))
    doc["esc"] = {"efficiency": 0.9}
    r = hover_report(check_vehicle(doc, "v.json"), params if fitted else None)
    idle = params["motor_model"]["esc_idle_current_A"] if fitted else 0.0
    # definition of ESC efficiency at full duty (motor at the bus voltage): I_motor = eta (I_in - I_idle)
    assert r["full_motor_current_A"] == pytest.approx(0.9 * (r["full_esc_input_current_A"] - idle), rel=1e-9)
    assert r["full_motor_current_A"] < r["full_esc_input_current_A"]
    # the limits are judged at full command on a full pack (seventh trial, finding 1): the same
    # relation holds there, the full pack's ESC input being its share of the pack current
    judged_in = r["pack_current_judged_A"] / r["rotor_count"]
    assert r["motor_current_judged_A"] == pytest.approx(0.9 * (judged_in - idle), rel=1e-9)
    # a motor limit between the two: the motor is within it, so no motor-limit warning
    doc["motor"]["max_current_A"] = 0.5 * (r["motor_current_judged_A"] + judged_in)
    r2 = hover_report(check_vehicle(doc, "v.json"), params if fitted else None)
    assert not any("motor limit" in w for w in r2["warnings"])
    doc["motor"]["max_current_A"] = 0.98 * r["motor_current_judged_A"]
    r3 = hover_report(check_vehicle(doc, "v.json"), params if fitted else None)
    assert any("%.1f A per motor" % r3["motor_current_judged_A"] in w for w in r3["warnings"])
