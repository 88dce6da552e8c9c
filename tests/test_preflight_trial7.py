"""Seventh new-user trial, pre-flight items 1, 5 and 7: the current limits judged at full
command on a full pack (both routes, compare, payload; an optional ESC rating), the full-command
sag as a caution beside the result instead of a margin, and an ESC left out of the file.

Every command runs through click's CliRunner in tmp_path (exit code, stdout and stderr apart).
The vehicle is the trial's INVENTED 7-inch long-range quad (not any product), with the propeller
coefficients the trial's hand calculation used (CT 0.110, CP 0.0433, n in rev/s).

The reference is an independent solve written here from first principles with scipy:
  DC motor equivalent circuit  Vm = omega / Kv + I R, I = I0 + Kv Q (Kv in rad/(s V)),
                               Q = CP rho n^2 D^5 / (2 pi), T = CT rho n^2 D^4
                               (M. Drela, "First-order DC electric motor model", MIT 2007;
                               propeller coefficients as in Brandt and Selig 2011; from memory)
  ESC of efficiency eta        I_bus = d I / eta
  Thevenin pack                V_bus = V_oc - R_pack I_pack, I_pack = N I_bus
  air                          rho = p / (R_d T), dry air, R_d = 287.05 J/(kg K) (ICAO Doc 7488
                               / ISO 2533), p = the standard atmosphere's at 2200 m via ambiance
The C-rating current is C x capacity (definition of the C-rate). The trial's own hand solve
(independent of liftcal) gave 28.3 A per motor and 119.1 A from the pack at full command on a
full pack (4.2 V per cell), against 23.1 A and 97.1 A on the nominal pack liftcal judged.
"""

import copy
import math

import ambiance
import numpy as np
import pytest
from scipy.optimize import brentq

from trial_helpers import json_file as _file, report as _json, run, words as _text

R_DRY_AIR = 287.05287  # J/(kg K), ICAO Doc 7488 / ISO 2533
SITE_PRESSURE_PA = float(ambiance.Atmosphere(2200.0).pressure[0])  # ICAO standard atmosphere

QUAD = {
    "name": "INVENTED 7in long-range quad 6S (trial 7)", "mass": "950g", "rotors": {"count": 4},
    "propeller": {"diameter": "7in", "ct": 0.110, "cp": 0.0433},
    "motor": {"kv_rpm_per_V": 1300, "resistance_ohm": 0.065, "no_load_current_A": 1.1, "max_current_A": 25},
    "battery": {"cells": 6, "capacity": "1800mAh", "resistance": "30mohm", "full_cell_V": 4.2,
                "nominal_cell_V": 3.7, "empty_cell_V": 3.5, "max_discharge_C": 60, "temperature_C": 25},
    "esc": {"efficiency": 0.95},
    "site": {"altitude_m": 2200, "temperature_C": 30, "pressure_Pa": SITE_PRESSURE_PA},
}


def hand_full_command(cell_V, doc=QUAD):
    """Independent solve (module docstring): full command (d = 1) of N rotors on a pack at
    cell_V [V] open circuit. Returns motor current per motor [A], ESC input per ESC [A], pack
    current [A], bus voltage [V]."""
    kv = doc["motor"]["kv_rpm_per_V"] * 2.0 * math.pi / 60.0
    r_m, i0 = doc["motor"]["resistance_ohm"], doc["motor"]["no_load_current_A"]
    rho = SITE_PRESSURE_PA / (R_DRY_AIR * (doc["site"]["temperature_C"] + 273.15))
    d = 7 * 0.0254  # 7 in (NIST SP 811: 1 in = 0.0254 m)
    cp = doc["propeller"]["cp"]
    n_rot, eta, r_pack = doc["rotors"]["count"], doc["esc"]["efficiency"], 0.030
    v_oc = doc["battery"]["cells"] * cell_V

    def motor_current(vm):
        def torque_balance(omega):
            n = omega / (2.0 * math.pi)
            q = cp * rho * n * n * d ** 5 / (2.0 * math.pi)
            return (vm - omega / kv) / r_m - (i0 + kv * q)
        omega = brentq(torque_balance, 1e-6, vm * kv, xtol=1e-12)
        return (vm - omega / kv) / r_m

    def pack_balance(i_pack):
        v_bus = v_oc - r_pack * i_pack
        return n_rot * motor_current(v_bus) / eta - i_pack
    i_pack = brentq(pack_balance, 1e-3, 0.49 * v_oc / r_pack, xtol=1e-12)
    v_bus = v_oc - r_pack * i_pack
    return motor_current(v_bus), i_pack / n_rot, i_pack, v_bus


def test_hand_solve_reproduces_the_trials_numbers():
    # the trial's own solve: 28.3 A / 119.1 A on a full pack, 23.1 A / 97.1 A on a nominal one; its
    # air held 20 % humidity (0.887 kg/m^3), this dry air 0.891 kg/m^3: within 0.5 %
    motor, _, pack, bus = hand_full_command(4.2)
    assert motor == pytest.approx(28.3, rel=0.005) and pack == pytest.approx(119.1, rel=0.005)
    assert bus / 6 > 3.30  # full command still reachable on a full pack (above the loaded cutoff)
    motor, _, pack, _ = hand_full_command(3.7)
    assert motor == pytest.approx(23.1, rel=0.005) and pack == pytest.approx(97.1, rel=0.005)


def test_datasheet_sheet_judges_the_current_limits_on_a_full_pack(tmp_path):
    path = _file(tmp_path, QUAD)
    report = _json("hover", path)
    motor, esc_in, pack, bus = hand_full_command(4.2)
    nominal_motor, _, nominal_pack, _ = hand_full_command(3.7)
    # the nominal values stay as they were, the judged ones are the full pack's (independent solve)
    assert report["full_motor_current_A"] == pytest.approx(nominal_motor, rel=1e-4)
    assert report["full_pack_current_A"] == pytest.approx(nominal_pack, rel=1e-4)
    assert report["motor_current_judged_A"] == pytest.approx(motor, rel=1e-4)
    assert report["pack_current_judged_A"] == pytest.approx(pack, rel=1e-4)
    assert report["esc_current_judged_A"] == pytest.approx(max(motor, esc_in), rel=1e-4)
    assert report["current_judged_bus_V"] == pytest.approx(bus, rel=1e-4)
    assert report["current_judged_at"] == "full command, full pack"
    assert report["current_judged_full_command_reachable"] is True
    # 25 A motor limit, 60 C x 1.8 Ah = 108 A: both exceeded on a full pack (before: no warning)
    text = _text("hover", path)
    assert ("full command on a full pack draws %.1f A per motor, above the motor limit 25 A (%.1f A on a "
            "nominal pack)" % (motor, nominal_motor)) in text
    assert ("full command on a full pack draws %.0f A from the pack, above its rating of 108 A"
            % pack) in text
    # section 2 says which pack state each number is for
    assert ("%.1f A at full command on a full pack (%.1f A on a nominal pack), each motor"
            % (motor, nominal_motor)) in text


def _truth_files(tmp_path):
    """A bench sweep of an independent truth rotor (tests/truth_rotor.py: DC motor equivalent
    model, ESC, supply with source resistance; close to the trial's 7-inch rotor) and a quad of
    four of them at the bench's air, fitted by `liftcal fit`."""
    from truth_rotor import at_supply, random_truth, sweep_rows, vehicle_file, write_csv

    rng = np.random.default_rng(7)
    truth = random_truth(rng, rows=600)
    truth.update({"diameter_m": 7 * 0.0254, "ct0": 0.105, "cp0": 0.046, "ct_exp": 0.0, "cp_exp": 0.0,
                  "kv": 1300 * 2.0 * math.pi / 60.0, "r_m": 0.065, "i0": 1.1, "i0_speed_share": 0.0,
                  "e_lo": 0.0, "e_hi": 1.0, "dead": 0.04, "gamma": 1.0, "eta_esc": 0.96, "i_q": 0.0,
                  "supplies": [25.2, 23.4, 21.6], "r_source": 0.05, "steps": 20, "both_legs": True,
                  "hysteresis": 0.0, "thrust_noise": 0.002, "current_noise": 0.002, "outliers": 0.0,
                  "thrust_unit": "g", "command_unit": "-", "cells": 6, "v_supply": 25.2})
    truth["n_ref"] = 150.0
    truth["vehicle"].update({"rotors": 4, "mass_kg": 0.95, "cells": 6, "full_cell_V": 4.2,
                             "nominal_cell_V": 3.7, "empty_cell_V": 3.5, "capacity_Ah": 1.8, "r_pack": 0.03})
    rho = truth["rho"]

    def motor_A(cell_V):
        _, _, i = at_supply(truth, np.array([1.0]), 6 * cell_V, 0.03, rho, 4)
        return float(i[0]) / 4 * truth["eta_esc"]  # I_bus = d I / eta at d = 1, no idle draw
    csv = tmp_path / "sweep.csv"
    write_csv(truth, sweep_rows(truth, rng), str(csv))
    vehicle = vehicle_file(truth)
    vehicle["esc"] = {"efficiency": truth["eta_esc"]}
    full_A, nominal_A = motor_A(4.2), motor_A(3.7)
    # a motor limit half-way between the nominal and the full pack's current
    vehicle["motor"]["max_current_A"] = round(0.5 * (full_A + nominal_A), 2)
    vfile = _file(tmp_path, vehicle, "truth_quad.json")
    code, out, err = run("fit", csv, "--out", tmp_path / "p.json")
    assert code == 0, (out, err)
    return vfile, tmp_path / "p.json", full_A, nominal_A


def test_fitted_sheet_judges_the_current_limits_on_a_full_pack(tmp_path):
    vfile, params, full_A, nominal_A = _truth_files(tmp_path)
    assert full_A > 1.15 * nominal_A  # the gap is far wider than the fit's 5 % current bound
    report = _json("hover", vfile, "--params", params)
    # fitted currents against the truth within the fit study's 5 % on currents
    assert report["full_motor_current_A"] == pytest.approx(nominal_A, rel=0.05)
    assert report["motor_current_judged_A"] == pytest.approx(full_A, rel=0.05)
    assert report["current_judged_at"] == "full command, full pack"
    limit = report["motor_current_limit_A"]
    assert any(w.startswith("full command on a full pack draws %.1f A per motor, above the motor limit"
                            % report["motor_current_judged_A"]) for w in report["warnings"])
    assert report["full_motor_current_A"] < limit < report["motor_current_judged_A"]
    payload = _json("hover", vfile, "--params", params, "--payload", "0..100g")["payload"]
    assert "motor_current" in payload["broken_at_every_payload"]


def test_compare_and_payload_break_the_current_margins_of_a_full_pack(tmp_path):
    path = _file(tmp_path, QUAD)
    motor, _, pack, _ = hand_full_command(4.2)
    row = _json("compare", path, "--vary", "mass=950g")["rows"][0]
    assert row["margins"]["motor_current"] is False and row["margins"]["pack_current"] is False
    assert row["motor_current_judged_A"] == pytest.approx(motor, rel=1e-4)
    assert row["pack_current_judged_A"] == pytest.approx(pack, rel=1e-4)
    assert row["current_judged_at"] == "full command, full pack"
    text = _text("compare", path, "--vary", "mass=950g")
    assert "breaks motor_current, pack_current" in text
    assert "motor_current full command on a full pack within the motor's current limit" in text
    payload = _json("hover", path, "--payload", "0..200g")["payload"]
    assert payload["broken_at_every_payload"] == ["motor_current", "pack_current"]
    assert "no payload keeps every margin: motor_current, pack_current breaks at every payload" in _text(
        "hover", path, "--payload", "0..200g")


@pytest.mark.parametrize("key, rating, broken", [("max_current", "29A", True), ("max_current_A", 31, False)])
def test_an_esc_rating_is_judged_on_a_full_pack(tmp_path, key, rating, broken):
    motor, esc_in, _, _ = hand_full_command(4.2)
    assert 29.0 < max(motor, esc_in) < 31.0  # ESC input 29.9 A (I_pack / N) above the motor's 28.4 A
    doc = copy.deepcopy(QUAD)
    doc["esc"][key] = rating  # with a unit, or in A under the key that names it
    path = _file(tmp_path, doc)
    report = _json("hover", path)
    limit = float(str(rating).rstrip("A"))
    assert report["esc_current_limit_A"] == pytest.approx(limit)
    warned = [w for w in report["warnings"] if "through each ESC" in w]
    assert bool(warned) is broken
    if broken:
        assert warned[0].startswith("full command on a full pack draws %.1f A through each ESC" % max(motor, esc_in))
    row = _json("compare", path, "--vary", "mass=950g")["rows"][0]
    assert row["margins"]["esc_current"] is (not broken)
    assert "ESC rating %g A, judged on %.1f A" % (limit, max(motor, esc_in)) in _text("hover", path)


# --- finding 5: the full-command sag is a caution beside the result, not a margin ---------------

def _sagging_and_not(tmp_path):
    """The trial's quad without current limits: a 7x4 on 3000 mAh sags the nominal pack below its
    cutoff at full command (T/W reachable before the cutoff above 5), a 6x4 does not."""
    doc = copy.deepcopy(QUAD)
    del doc["motor"]["max_current_A"], doc["battery"]["max_discharge_C"]
    doc["propeller"] = {"size": "7x4in", "blades": 2}
    return _file(tmp_path, doc)


def test_compare_ranks_a_sagging_build_by_endurance_and_shows_the_caution(tmp_path):
    path = _sagging_and_not(tmp_path)
    vary = ["--vary", "propeller.size=7x4in,6x4in", "--vary", "battery.capacity=3000mAh"]
    result = _json("compare", path, *vary)
    sag = next(r for r in result["rows"] if r["values"]["propeller.size"] == "7x4in")
    other = next(r for r in result["rows"] if r["values"]["propeller.size"] == "6x4in")
    # preconditions: the 7x4 sags below the cutoff, its reachable T/W is far above the floor of 2
    # (common practice), and it hovers longer
    assert sag["full_command_sag"] is True and other["full_command_sag"] is False
    assert sag["reachable_thrust_to_weight"] > 2.0
    assert sag["flight_time_lead_min"] > other["flight_time_lead_min"]
    # before: broke full_command_sag and ranked below the shorter 6x4
    assert sag["keeps_margins"] is True and "full_command_sag" not in sag["margins"]
    assert sag["rank"] == 1 and result["best"]["label"] == sag["label"]
    assert "full_command_sag" in [c["kind"] for c in sag["caveats"]]
    assert "full_command_sag" in result["not_margins"]
    text = _text("compare", path, *vary)
    assert "keeps every margin ! brownout risk: full command sags the nominal pack to" in text
    assert "not a margin (the ! line under a row; it does not rank the row):" in text
    assert "the thrust-to-weight margin already judges the T/W reachable before the cutoff" in text


def test_payload_table_keeps_a_sagging_vehicle_and_says_why(tmp_path):
    path = _sagging_and_not(tmp_path)
    payload = _json("hover", path, "--payload", "0,200g")["payload"]
    first = payload["rows"][0]
    assert first["full_command_sag"] is True
    assert first["keeps"] is True and "full_command_sag" not in first["broken"]  # before: "no payload keeps"
    assert payload["max_payload_kg"] is not None
    text = _text("hover", path, "--payload", "0,200g")
    table = text.split("5. How much can it carry?")[1]
    assert "! brownout risk: full command sags the nominal pack to" in table
    assert "a caution, not a margin: the thrust-to-weight margin already judges the T/W reachable" in table


# --- finding 7: an ESC left out of the file is said to be taken as lossless -------------------------

def test_a_missing_esc_efficiency_is_said(tmp_path):
    doc = copy.deepcopy(QUAD)
    del doc["esc"]
    path = _file(tmp_path, doc)
    report = _json("hover", path)
    assert report["esc_efficiency"] == 1.0
    said = [w for w in report["warnings"] if "no esc.efficiency" in w]
    assert len(said) == 1 and "lossless" in said[0] and "common practice" in said[0]
    assert "the vehicle file gives no esc.efficiency: the ESC is taken as lossless" in _text("hover", path)
    given = _json("hover", _file(tmp_path, QUAD, "given.json"))
    assert not any("esc.efficiency" in w for w in given["warnings"])


# --- left from finding 1: each sag and voltage line of the sheet names its pack state -------------

def test_every_sag_line_of_the_sheet_names_its_pack_state(tmp_path):
    # the sheet showed both pack states for the currents, but its sag line said "full command sags
    # the pack to 19.3 V" for a number that is the nominal pack's; now each voltage line says which
    # pack it is for, the full pack's full-command bus (where the currents are judged) beside it
    path = _file(tmp_path, QUAD)
    report = _json("hover", path)
    *_, full_bus = hand_full_command(4.2)     # independent solve (module docstring)
    *_, nominal_bus = hand_full_command(3.7)
    assert report["full_bus_V"] == pytest.approx(nominal_bus, rel=1e-4)
    assert report["current_judged_bus_V"] == pytest.approx(full_bus, rel=1e-4)
    text = _text("hover", path)
    # 3.30 V per cell: the loaded cutoff, liftcal's default empty_cell_V - 0.2 V (DEVELOPERS.md glossary)
    assert ("full command sags the pack to %.1f V on a nominal pack (%.2f V per cell; loaded cutoff 3.30 V per "
            "cell) and to %.1f V on a full pack (%.2f V per cell, where the current limits are judged)"
            % (nominal_bus, nominal_bus / 6, full_bus, full_bus / 6)) in text
    # the T/W lines and the warning on the same sag, and the thrust beside it: the nominal pack's
    assert "where a nominal pack reaches its loaded cutoff" in text
    assert "* marks the T/W reachable on a nominal pack; full command would give" in text
    assert "but sags the nominal pack below its loaded cutoff: NOT REACHABLE" in text
    assert "N total on a nominal pack (hover needs" in text
    assert "thrust fraction %.2f of full-command thrust at the hover bus voltage on a nominal pack" % (
        report["hover_thrust_fraction"]) in text
    assert ("! full command sags the nominal pack to %.2f V per cell (%.1f V on 6 cells), below its 3.30 V cutoff"
            % (nominal_bus / 6, nominal_bus)) in text
    assert "is not reachable on a nominal pack" in text
    # no voltage line left without its pack state
    assert "sags the pack below" not in text and "on this pack" not in text
