"""Eighth new-user trial: the pre-flight sheet's findings (items 3, 4, 5 and 9).

Item 3: a small estimated rotor's sheet led with the endurance at the figure of merit measured
small rotors reach but gave the hover command and every current at the generic blade's. Checked
against a hand calculation: momentum theory P = T^1.5 / sqrt(2 rho A) / FM (Leishman, Principles
of Helicopter Aerodynamics, 2nd ed., ch. 2), rotor speed from T = CT rho n^2 D^4, the DC motor
I = Q Kv + I0, V = omega / Kv + I R (Drela 2007, from memory), ESC input V I / eta and the pack's
sag V_bus (V_oc - V_bus) = R_pack P_bus (Ohm's law).
All vehicles are INVENTED for these tests.
"""

import json
import math
import re
from pathlib import Path

import pytest

from trial_helpers import ok

G = 9.80665  # standard gravity [m/s^2] (CGPM 1901)

# an INVENTED 3in 4S ducted cinewhoop, warm air (no cold-pack factor), size only (BEMT estimate)
WHOOP3 = {"name": "INVENTED 3in 4S ducted cinewhoop", "mass": "320g", "rotors": {"count": 4},
          "propeller": {"size": "3x2in", "blades": 5},
          "motor": {"kv_rpm_per_V": 3800, "resistance_ohm": 0.2, "no_load_current_A": 0.5, "max_current_A": 25},
          "battery": {"cells": 4, "capacity": "650mAh", "resistance": "60mohm", "full_cell_V": 4.2,
                      "nominal_cell_V": 3.7, "empty_cell_V": 3.5, "max_discharge_C": 75},
          "esc": {"efficiency": 0.95, "max_current_A": 30},
          "site": {"altitude": "0m", "temperature": "20C", "humidity_pct": 40}}


def _file(tmp_path, doc, name="vehicle.json"):
    path = tmp_path / name
    path.write_text(json.dumps(doc))
    return str(path)


def _hand_hover(mass_kg, count, diameter_m, ct, fm, rho, kv_rpm, r_ohm, i0_A, eta, voc_V, r_pack_ohm):
    """Hover of N rotors by hand (module docstring): (duty, motor current [A], pack current [A],
    power from the pack [W])."""
    thrust = mass_kg * G / count
    area = math.pi * diameter_m ** 2 / 4.0
    shaft_W = thrust ** 1.5 / math.sqrt(2.0 * rho * area) / fm        # Leishman ch. 2
    omega = 2.0 * math.pi * math.sqrt(thrust / (ct * rho * diameter_m ** 4))
    kv = kv_rpm * 2.0 * math.pi / 60.0                                  # rad/s per V
    current = shaft_W / omega * kv + i0_A                               # I = Q Kv + I0
    motor_V = omega / kv + current * r_ohm
    bus_W = count * motor_V * current / eta
    bus_V = (voc_V + math.sqrt(voc_V ** 2 - 4.0 * r_pack_ohm * bus_W)) / 2.0
    return motor_V / bus_V, current, bus_W / bus_V, bus_W


def _number_after(text, label):
    i = text.index(label) + len(label)
    return float(text[i:].split()[0])


def test_a_small_rotor_sheet_gives_every_hover_number_at_the_headline_figure_of_merit(tmp_path):
    path = _file(tmp_path, WHOOP3)
    report = json.loads(ok("hover", path, "--json"))
    sheet = " ".join(ok("hover", path).split())
    check = report["low_reynolds_check"]
    fm, fm_est = check["figure_of_merit_assumed"], check["figure_of_merit_estimated"]
    assert fm < fm_est and report["flight_time_lead_basis"] == "small rotor"
    assert "SMALL ROTOR: about %.1f min at the figure of merit %.2f" % (report["flight_time_lead_min"], fm) in sheet
    hand = dict(count=4, diameter_m=3 * 0.0254, ct=report["propeller_ct"], rho=report["density_kg_m3"],
                kv_rpm=3800, r_ohm=0.2, i0_A=0.5, eta=0.95, voc_V=4 * 3.7, r_pack_ohm=0.060)
    duty, motor_A, pack_A, power_W = _hand_hover(0.320, fm=fm, **hand)
    # the hover command, the currents and the power the sheet states are those at the headline figure
    assert _number_after(sheet, "YES - command") == pytest.approx(duty, abs=0.006)
    margin = sheet[sheet.index("2. With what margin?"):]
    assert _number_after(margin, "motor current") == pytest.approx(motor_A, rel=0.01)
    assert _number_after(margin, "pack current") == pytest.approx(pack_A, rel=0.01)
    assert _number_after(sheet, "hover draws") == pytest.approx(pack_A, rel=0.01)
    assert report["hover_power_W"] == pytest.approx(power_W, rel=0.005)
    # the generic blade's numbers are the secondary line, labelled with their figure of merit
    duty_e, motor_e, pack_e, power_e = _hand_hover(0.320, fm=fm_est, **hand)
    secondary = ("the generic blade estimate, %.2f and likely optimistic, gives command %.2f, motor current "
                 % (fm_est, duty_e))
    assert secondary in sheet
    assert _number_after(sheet, secondary) == pytest.approx(motor_e, rel=0.01)
    assert check["estimate_hover_current_A"] == pytest.approx(pack_e, rel=0.005)
    assert check["estimate_hover_power_W"] == pytest.approx(power_e, rel=0.005)
    assert motor_A > 1.3 * motor_e  # the two differ by far more than the rounding


# an INVENTED 10in 6S long-range quad on a Li-ion pack (cells 4.2 / 3.6 / 3.0 V, cutoff 2.8 V)
LR10 = {"name": "INVENTED 10in 6S long-range quad", "mass_kg": 1.6, "rotors": {"count": 4, "layout": "flat"},
        "propeller": {"diameter_m": 0.254, "ct": 0.12, "cp": 0.05},
        "motor": {"kv_rpm_per_V": 750, "resistance_ohm": 0.08, "no_load_current_A": 0.8, "max_current_A": 35},
        "battery": {"cells": 6, "capacity_Ah": 8.0, "resistance_ohm": 0.06, "full_cell_V": 4.2,
                    "nominal_cell_V": 3.6, "empty_cell_V": 3.0, "cutoff_cell_V": 2.8, "usable_fraction": 0.85,
                    "max_discharge_C": 5},
        "esc": {"efficiency": 0.95, "max_current_A": 45},
        "site": {"altitude_m": 3000, "temperature_C": 35, "humidity_pct": 20}}


def test_a_li_ion_pack_is_judged_at_li_ion_specific_energy_not_called_a_slip(tmp_path):
    # hand: 6 x 3.6 V x 8 Ah = 172.8 Wh; Li-ion packs about 250 Wh/kg (common practice, from memory)
    # -> 0.69 kg = 43 % of 1.6 kg, inside the usual 3..70 % (at LiPo's best 200 Wh/kg it would be
    # 56 %; a 12 Ah pack on LiPo cells 83 %)
    assert 0.03 <= 6 * 3.6 * 8.0 / 250.0 / 1.6 <= 0.70 < 6 * 3.7 * 12.0 / 200.0 / 1.6
    report = json.loads(ok("hover", _file(tmp_path, LR10), "--json"))
    assert report["suspect_keys"] == [] and not any(w.startswith("$.battery") for w in report["warnings"])
    # a 12 Ah pack on LiPo cell voltages (3.7 / 3.5 V): 266.4 Wh weighs at least 1.33 kg at 200 Wh/kg
    # (large LiPo packs, from memory), 83 % of the vehicle: still questioned (trial 9 finding 5
    # moved the band's top from 60 % at the typical specific energy to 70 % at the best one: the
    # 8 Ah LiPo variant, 55 % at 200 Wh/kg, is an ordinary endurance build)
    lipo = dict(LR10, battery=dict(LR10["battery"], nominal_cell_V=3.7, empty_cell_V=3.5, cutoff_cell_V=3.3,
                                   capacity_Ah=12.0))
    report = json.loads(ok("hover", _file(tmp_path, lipo, "lipo.json"), "--json"))
    assert report["suspect_keys"] == ["$.battery.capacity_Ah"]
    # a real decimal slip on the Li-ion pack (80 Ah: 1728 Wh, 6.9 kg at 250 Wh/kg) is named, with
    # only the check the capacity enters as the reason (disk loading, motor power and speed do not)
    slip = dict(LR10, battery=dict(LR10["battery"], capacity_Ah=80.0))
    report = json.loads(ok("hover", _file(tmp_path, slip, "slip.json"), "--json"))
    text = [w for w in report["warnings"] if w.startswith("$.battery.capacity_Ah")][0]
    assert "8 Ah meant" in text and "at a typical 250 Wh/kg; Li-ion" in text
    assert "with it the pack energy falls in its ordinary range" in text
    assert "disk loading" not in text and "motor" not in text


def test_compare_does_not_repeat_a_refuted_pack_warning_or_offer_a_13_kg_quad(tmp_path):
    path = _file(tmp_path, LR10)
    result = json.loads(ok("compare", path, "--vary", "battery.capacity=4Ah,8Ah,12Ah",
                             "--vary", "mass_kg=1.3,1.6", "--json"))
    flagged = [r["label"] for r in result["rows"] if any(c["kind"] == "unit_slip" for c in r["caveats"])]
    # only 12 Ah on 1.3 kg: 259.2 Wh weighs at least 1.0 kg even at the best Li-ion 260 Wh/kg (from
    # memory) = 77 % of the vehicle, above the 70 % of endurance builds (common practice); on 1.6 kg
    # 62 %, not questioned
    assert flagged == ["battery.capacity=12Ah, mass_kg=1.3"], flagged
    table = " ".join(ok("compare", path, "--vary", "battery.capacity=4Ah,8Ah,12Ah",
                          "--vary", "mass_kg=1.3,1.6").split())
    # 13 kg on four 10in rotors would hover at 93 % of the motors' no-load speed (T = CT rho n^2 D^4,
    # CT 0.1: 250 rev/s vs 750 Kv x 21.6 V = 270 rev/s): not an ordinary vehicle to suggest
    assert "$.mass_kg 13 kg" not in table and "less likely" not in table


# an INVENTED 65 mm 1S whoop (31 mm 4-blade), 19000 Kv: the schema's own ordinary 1S value
TINY1S = {"name": "INVENTED 65mm 1S whoop", "mass": "32g", "rotors": {"count": 4},
          "propeller": {"diameter": "31mm", "pitch": "20mm", "blades": 4},
          "motor": {"kv_rpm_per_V": 19000, "resistance_ohm": 0.6, "no_load_current_A": 0.3},
          "battery": {"cells": 1, "capacity": "300mAh", "resistance": "80mohm", "full_cell_V": 4.35,
                      "nominal_cell_V": 3.8, "empty_cell_V": 3.5},
          "esc": {"efficiency": 0.95}, "site": {"altitude": "100m", "temperature": "20C"}}


def test_an_overweight_whoop_is_told_it_is_too_heavy_not_offered_190000_kv(tmp_path):
    heavy = dict(TINY1S, mass="70g")
    report = json.loads(ok("hover", _file(tmp_path, heavy), "--json"))
    schema = json.loads((Path(__file__).parent.parent / "schemas" / "vehicle.schema.json").read_text())
    kv_max = schema["properties"]["motor"]["properties"]["kv_rpm_per_V"]["maximum"]   # 60000
    assert kv_max == 60000
    assert report["suspect_keys"] == [] and not any("e+05" in w or "190000" in w for w in report["warnings"])
    # hand: hover thrust 0.070 x 9.807 / 4 = 0.172 N needs about 74000 rpm at CT 0.1 (T = CT rho n^2 D^4),
    # 19000 Kv x 3.8 V = 72200 rpm: too heavy for its rotors, the mass named first
    n = math.sqrt(0.070 * G / 4 / (0.1 * 1.225 * 0.031 ** 4)) * 60.0
    assert n > 19000 * 3.8
    first = report["warnings"][0]
    assert first.startswith("the vehicle looks too heavy for its rotors") and "check the mass first (70g)" in first
    sheet = " ".join(ok("hover", _file(tmp_path, heavy)).split())
    assert "first check $.motor.kv_rpm_per_V" not in sheet and "Kv meant" not in sheet
    # a real Kv slip (a digit short: 2000 for 20000) is still found, with a value inside the schema
    slip = dict(TINY1S, motor=dict(TINY1S["motor"], kv_rpm_per_V=2000))
    report = json.loads(ok("hover", _file(tmp_path, slip, "slip.json"), "--json"))
    assert report["suspect_keys"] == ["$.motor.kv_rpm_per_V"]
    assert "2e+04 Kv meant (a digit short)" in report["warnings"][0] or "20000 Kv meant" in report["warnings"][0]


# an INVENTED coaxial X8 12S heavy lifter
X8 = {"name": "INVENTED coaxial X8 12S heavy lifter", "mass_kg": 18.0, "rotors": {"count": 8, "layout": "coaxial"},
      "propeller": {"diameter": "22in", "ct": 0.10, "cp": 0.04},
      "motor": {"kv_rpm_per_V": 170, "resistance_ohm": 0.10, "no_load_current_A": 0.6, "max_current_A": 40},
      "battery": {"cells": 12, "capacity_Ah": 22, "resistance_ohm": 0.015, "full_cell_V": 4.2,
                  "nominal_cell_V": 3.7, "empty_cell_V": 3.5, "max_discharge_C": 15},
      "esc": {"efficiency": 0.96, "max_current_A": 60}, "site": {"altitude_m": 200, "temperature_C": 15}}


def _significant(text):
    """Significant digits of a number as printed ('17.0' -> 3, '7.00' -> 3, '0.0785' -> 3)."""
    return len(text.replace(".", "").lstrip("0"))


def test_computed_currents_keep_three_significant_digits(tmp_path):
    report = json.loads(ok("hover", _file(tmp_path, X8), "--json"))
    # the trial's case: 17.05 A per motor and 7.0 A per ESC at hover were printed '17 A' and '7 A'
    assert round(report["hover_motor_current_A"], 1) == 17.0 and round(report["hover_esc_input_current_A"], 2) == 7.0
    sheet = " ".join(ok("hover", _file(tmp_path, X8)).split())
    section = sheet[sheet.index("2. With what margin?"):sheet.index("3. For how long?")]
    printed = re.findall(r"(\d+(?:\.\d+)?) A (?:at hover|at full command|on a nominal pack)", section)
    assert len(printed) >= 8 and all(_significant(p) == 3 for p in printed), printed
    assert "motor current 17.0 A at hover" in section and "ESC input current 7.00 A at hover" in section
    assert "motor limit 40 A" in section  # a value the file gave stays as written


def test_the_duct_note_is_decided_by_size_and_by_the_description(tmp_path):
    # 3in ducted cinewhoop (0.076 m, above the whoop-size class) and a 31 mm whoop: both get it
    for doc in (WHOOP3, TINY1S):
        sheet = " ".join(ok("hover", _file(tmp_path, doc)).split())
        assert "SMALL ROTOR" in sheet and "liftcal models open rotors" in sheet, doc["name"]
    # the same 3in rotor on an open-frame build is not told about ducts; a 31 mm rotor always is
    open_frame = dict(WHOOP3, name="INVENTED 3in 4S open-frame micro quad")
    sheet = " ".join(ok("hover", _file(tmp_path, open_frame)).split())
    assert "SMALL ROTOR" in sheet and "liftcal models open rotors" not in sheet
    plain_tiny = dict(TINY1S, name="INVENTED 65mm 1S micro")
    sheet = " ".join(ok("hover", _file(tmp_path, plain_tiny)).split())
    assert "if the rotors run in ducts or guards (whoops): liftcal models open rotors" in sheet


def test_the_payload_plot_marks_the_largest_payload_the_text_gives(tmp_path, monkeypatch):
    import estimator.preflight.plots as plots
    from estimator.preflight.payload import payload_table
    from estimator.vehicle import check_vehicle

    captured = {}
    monkeypatch.setattr(plots, "save_figure", lambda fig, path: captured.setdefault("fig", fig))
    monkeypatch.setattr(plots._pyplot(), "close", lambda fig: None)
    result = payload_table(check_vehicle(json.loads(json.dumps(X8)), "x8"), [0.0, 2.5, 5.0, 7.5, 10.0])
    # the current margins break at every payload (judged at full command): the text gives the
    # largest payload on the margins a payload affects
    assert result["max_payload_kg"] is None and result["max_payload_kg_payload_margins"] is not None
    largest = result["max_payload_kg_payload_margins"]
    assert "largest payload %.3g kg" % largest in result["max_payload_note"]
    plots.plot_payload(str(tmp_path / "p.png"), result, "x8", "kg")
    marks = [line for ax in captured["fig"].axes for line in ax.get_lines()
             if "largest payload" in line.get_label()]
    assert len(marks) == 1 and list(marks[0].get_xdata()) == [largest, largest]
    assert "%.3g kg" % largest in marks[0].get_label()


def test_a_us_report_gives_the_reachable_command_in_microseconds(tmp_path):
    from test_bench_outputs_trial7 import VEHICLE
    from test_fit_glitch_trial7 import _trial_csv

    csv = _trial_csv(tmp_path / "bench.csv")       # the invented sweep in us (1000..2000 us)
    vehicle = _file(tmp_path, VEHICLE, "v7lr.json")
    fit_text = " ".join(ok("fit", str(csv), "--vehicle", vehicle, "--out", str(tmp_path / "p.json")).split())
    report = json.loads(ok("hover", vehicle, "--params", str(tmp_path / "p.json"), "--json"))
    assert report["command_unit"] == "us" and report["reachable_command"] is not None
    # a command u of 0..1 is 1000 + 1000 u us on this sweep's scale (the CSV's own unit)
    us = "%.0f us" % (1000.0 + 1000.0 * report["reachable_command"])
    assert "(*: reachable at command %s," % us in fit_text, fit_text
    sheet = " ".join(ok("hover", vehicle, "--params", str(tmp_path / "p.json")).split())
    assert "reachable at command %.2f (%s)," % (report["reachable_command"], us) in sheet
