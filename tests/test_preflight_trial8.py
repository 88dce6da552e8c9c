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

import pytest

from io_helpers import run

G = 9.80665  # standard gravity [m/s^2] (CGPM 1901)

# an INVENTED 3in 4S ducted cinewhoop, warm air (no cold-pack factor), size only (BEMT estimate)
WHOOP3 = {"name": "INVENTED 3in 4S ducted cinewhoop", "mass": "320g", "rotors": {"count": 4},
          "propeller": {"size": "3x2in", "blades": 5},
          "motor": {"kv_rpm_per_V": 3800, "resistance_ohm": 0.2, "no_load_current_A": 0.5, "max_current_A": 25},
          "battery": {"cells": 4, "capacity": "650mAh", "resistance": "60mohm", "full_cell_V": 4.2,
                      "nominal_cell_V": 3.7, "empty_cell_V": 3.5, "max_discharge_C": 75},
          "esc": {"efficiency": 0.95, "max_current_A": 30},
          "site": {"altitude": "0m", "temperature": "20C", "humidity_pct": 40}}


def _ok(args):
    code, out, err = run(args)
    assert code == 0 and err == "", (code, err)
    return out


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
    report = json.loads(_ok(["hover", path, "--json"]))
    sheet = " ".join(_ok(["hover", path]).split())
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
