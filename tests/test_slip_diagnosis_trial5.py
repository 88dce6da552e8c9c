"""Fifth new-user trial, item 4: a unit or decimal slip is named by the key whose correction makes
the whole vehicle plausible (estimator/preflight/slip_diagnosis.py), not by the first pairwise check.

Through the command for the trial's craft (a whoop with "22kg", a 3-inch with "2.6kg", a 3-inch with
"6500mAh"), and a randomised study over invented craft from 30 mm to 30 in written independently of
the checks: their own scaling (disk loading 40..600 N/m^2, pack 15..40 % of the mass at 140..200
Wh/kg, hover at 35..60 % of the no-load speed with a static CT of 0.08..0.14, hover power 3..15 % of
the motor's V^2 / 4R; common practice, from memory). Slips: 1 g = 1e-3 kg, 1 mAh = 1e-3 Ah,
1 in = 0.0254 m, 1 mm = 0.001 m (NIST SP 811, exact). The study reports its worst rates.
"""

import copy
import json
import math
import random

import pytest

from invented_vehicles import HEXA, WHOOP
from io_helpers import run
from estimator.preflight.slip_diagnosis import whole_vehicle_slip
from estimator.vehicle import check_vehicle

G0 = 9.80665  # standard gravity [m/s^2], 3rd CGPM (1901)
RHO = 1.225  # sea-level standard density [kg/m^3], US Standard Atmosphere 1976

TINY = {"name": "invented 65 mm whoop", "mass": "22g", "rotors": {"count": 4},
        "propeller": {"size": "31x16mm", "blades": 4},
        "motor": {"kv_rpm_per_V": 25000, "resistance_ohm": 1.6, "no_load_current_A": 0.3},
        "battery": {"cells": 1, "capacity": "300mAh", "resistance": "90mohm",
                    "full_cell_V": 4.35, "nominal_cell_V": 3.8, "empty_cell_V": 3.5}}
THREE = {"name": "invented 3-inch", "mass": "260g", "rotors": {"count": 4},
         "propeller": {"size": "3x3in", "blades": 3},
         "motor": {"kv_rpm_per_V": 3800, "resistance_ohm": 0.15, "no_load_current_A": 0.6},
         "battery": {"cells": 4, "capacity": "650mAh", "resistance": "80mohm",
                     "full_cell_V": 4.2, "nominal_cell_V": 3.7, "empty_cell_V": 3.5}}


def _sheet(tmp_path, doc, name="v.json"):
    path = tmp_path / name
    path.write_text(json.dumps(doc))
    code, out, err = run(["hover", str(path), "--json"])
    assert code == 0 and err == "", (code, err)
    return json.loads(out)


@pytest.mark.parametrize("base, key, value, first", [
    # each key as the file wrote it ("mass", not mass_kg: new-user trial 14, finding 10)
    (TINY, "mass", "22kg", "$.mass"),                          # was blamed on $.propeller.size
    (THREE, "mass", "2.6kg", "$.mass"),                        # had no slip note at all
    (THREE, ("battery", "capacity"), "6500mAh", "$.battery.capacity"),
    (HEXA, ("propeller", "size"), "15x5.5mm", "$.propeller.size"),
    (WHOOP, ("motor", "kv_rpm_per_V"), 450, "$.motor.kv_rpm_per_V"),
])
def test_the_slipped_key_is_named_first(tmp_path, base, key, value, first):
    doc = copy.deepcopy(base)
    if isinstance(key, tuple):
        doc[key[0]][key[1]] = value
    else:
        doc[key] = value
    report = _sheet(tmp_path, doc)
    assert report["suspect_keys"][:1] == [first], report["suspect_keys"]
    assert report["warnings"][0].startswith(first + ":")
    if not report["can_hover"]:
        code, out, _ = run(["hover", str(tmp_path / "v.json")])
        no_line = " ".join(out.split()).split("1. Will it hover?")[1].split("2. With")[0]
        assert "first check %s:" % first in no_line


@pytest.mark.parametrize("base", [TINY, THREE, WHOOP, HEXA])
def test_ordinary_craft_get_no_slip_note(tmp_path, base):
    assert _sheet(tmp_path, copy.deepcopy(base))["suspect_keys"] == []


def test_an_ideal_motor_of_zero_resistance_is_computed_not_refused(tmp_path):
    # the vehicle schema allows resistance_ohm 0 (an ideal motor); the slip check's resistive power
    # limit V^2 / (4 R) is then unbounded, and the sheet must still be made (a property test found
    # "cannot compute with these inputs (ZeroDivisionError ...)")
    vehicle = copy.deepcopy(HEXA)
    vehicle["motor"]["resistance_ohm"] = 0
    path = tmp_path / "v.json"
    path.write_text(json.dumps(vehicle))
    code, out, err = run(["hover", str(path), "--json"])
    assert code == 0 and err == "", err
    assert json.loads(out)["suspect_keys"] == []


def _invented(rng):
    """An ordinary multirotor from its own scaling (module docstring), SI keys."""
    d = math.exp(rng.uniform(math.log(0.03), math.log(0.76)))
    count = rng.choice((4, 6, 8))
    area = math.pi * d * d / 4
    mass = rng.uniform(40, 600) * count * area / G0
    cells = max(1, min(14, int(round(d / 0.0254 * rng.uniform(0.4, 0.8)))))
    volts = 3.7 * cells
    capacity = rng.uniform(0.15, 0.4) * mass * rng.uniform(140, 200) / volts
    thrust = mass * G0 / count
    hover_rpm = 60 * math.sqrt(thrust / (rng.uniform(0.08, 0.14) * RHO * d ** 4))
    kv = hover_rpm / rng.uniform(0.35, 0.6) / volts
    hover_W = thrust ** 1.5 / math.sqrt(2 * RHO * area) / 0.6
    resistance = volts ** 2 / (4 * hover_W / rng.uniform(0.03, 0.15))
    return {"mass_kg": mass, "rotors": {"count": count},
            "propeller": {"diameter_m": d, "ct": 0.11, "cp": 0.045},
            "motor": {"kv_rpm_per_V": kv, "resistance_ohm": resistance, "no_load_current_A": 0.05},
            "battery": {"cells": cells, "capacity_Ah": capacity, "resistance_ohm": 0.02 * cells,
                        "full_cell_V": 4.2, "nominal_cell_V": 3.7, "empty_cell_V": 3.5}}


SLIPS = [("$.mass_kg", ("mass_kg",), 1e3), ("$.mass_kg", ("mass_kg",), 10.0), ("$.mass_kg", ("mass_kg",), 0.1),
         ("$.battery.capacity_Ah", ("battery", "capacity_Ah"), 1e3),
         ("$.battery.capacity_Ah", ("battery", "capacity_Ah"), 1e-3),
         ("$.propeller.diameter_m", ("propeller", "diameter_m"), 1 / 0.0254),   # inches read as metres
         ("$.motor.kv_rpm_per_V", ("motor", "kv_rpm_per_V"), 0.1)]


def test_randomised_craft_name_the_slipped_key():
    rng = random.Random(20261202)
    false_alarms, named, wrong, silent, craft = 0, 0, [], 0, 0
    while craft < 150:
        truth = _invented(rng)
        try:
            vehicle = check_vehicle(copy.deepcopy(truth), "t.json")
        except Exception:
            continue  # an invented craft beyond the schema's bounds (a 65000 Kv motor): draw again
        craft += 1
        if whole_vehicle_slip(vehicle) is not None:
            false_alarms += 1
        for path, keys, factor in SLIPS:
            doc = copy.deepcopy(truth)
            node = doc
            for k in keys[:-1]:
                node = node[k]
            node[keys[-1]] *= factor
            try:
                vehicle = check_vehicle(doc, "s.json")
            except Exception:
                continue  # beyond the schema's own bounds: refused, with its own message
            found = whole_vehicle_slip(vehicle)
            if found is None:
                silent += 1
            elif found["key"] == path:
                named += 1
            else:
                wrong.append((path, factor, found["key"]))
    print("false alarms %d / 150; slips named right %d, wrong %d, not named %d"
          % (false_alarms, named, len(wrong), silent))
    assert false_alarms == 0
    # worst case over the study: of the slips it names, at least 90 % name the slipped key
    assert len(wrong) <= 0.1 * (named + len(wrong)), wrong[:10]
