"""estimator.jsonio.validate: the likely cause beside a schema error, for every schema.

The expected causes are read off the documents themselves (a key spelt like another, a file
of another kind, a number that a unit slip puts inside its bounds); unit factors are exact
by definition (NIST SP 811).
"""

import json
import os
import subprocess
import sys

import pytest

from estimator.errors import InputError
from estimator.jsonio import unit_slip, validate

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
VALID = os.path.join(ROOT, "schemas", "examples", "valid")


def _load(name):
    with open(os.path.join(VALID, name), encoding="utf-8") as fh:
        return json.load(fh)


def _message(document, schema):
    with pytest.raises(InputError) as info:
        validate(document, schema, "f.json")
    return str(info.value)


@pytest.mark.parametrize("name, schema, is_a, not_a", [
    ("vehicle-demo-quad.json", "params.schema.json", "a vehicle description", "not a parameter set"),
    ("map-example.json", "params.schema.json", "an export mapping", "not a parameter set"),
    ("vehicle-demo-quad.json", "map.schema.json", "a vehicle description", "not an export mapping"),
    ("params-demo-with-hover.json", "map.schema.json", "a parameter set", "not an export mapping"),
])
def test_a_file_of_another_kind_is_named_as_such(name, schema, is_a, not_a):
    message = _message(_load(name), schema)
    assert message.startswith("f.json: $: this is " + is_a) and not_a in message
    assert "typo" not in message  # no key-by-key guesses on a file of another kind


def test_cli_check_on_a_vehicle_file_gives_one_error_line():
    out = subprocess.run([sys.executable, "-m", "estimator", "check", os.path.join(VALID, "vehicle-demo-quad.json")],
                         capture_output=True, text=True, cwd=ROOT)
    lines = out.stderr.strip().splitlines()
    assert out.returncode == 2 and len(lines) == 1 and lines[0].startswith("error:")
    assert "vehicle description" in lines[0] and "Traceback" not in out.stderr


def test_a_misspelt_key_in_a_parameter_set_is_named():
    doc = _load("params-demo-with-hover.json")
    doc["thrust_curve"]["quadratic_shar"] = doc["thrust_curve"].pop("quadratic_share")
    message = _message(doc, "params.schema.json")
    assert "$.thrust_curve" in message and "'quadratic_shar'" in message and "'quadratic_share'" in message


@pytest.mark.parametrize("value, kind, slips, schema, expected", [
    # 10 in = 0.254 m exactly; inches beat cm (0.1 m) and mm (0.01 m) by closeness to the
    # typical 0.254 m of the schema's "examples"
    (10, "length", ("in", "cm", "mm"), {"minimum": 0.01, "maximum": 3, "examples": [0.254]}, ("in", 0.254)),
    # 254 mm = 0.254 m; 254 in = 6.45 m and 254 cm = 2.54 m lie further from 0.254 m
    (254, "length", ("in", "cm", "mm"), {"minimum": 0.01, "maximum": 3, "examples": [0.254]}, ("mm", 0.254)),
    # 1013 hPa = 101300 Pa; 1013 kPa and 1013 bar lie above 110000 Pa
    (1013, "pressure", ("hPa", "kPa", "bar"), {"minimum": 30000, "maximum": 110000}, ("hPa", 101300.0)),
    # no typical value: the geometric middle of the bounds decides; 2050 g = 2.05 kg, 2050 lb = 930 kg is out
    (2050, "mass", ("g", "lb"), {"exclusiveMinimum": 0, "maximum": 200}, ("g", 2.05)),
    # nothing brings 1e9 inside 0..200 kg
    (1e9, "mass", ("g", "lb"), {"exclusiveMinimum": 0, "maximum": 200}, None),
])
def test_unit_slip_picks_the_slip_that_lands_inside(value, kind, slips, schema, expected):
    got = unit_slip(value, kind, slips, schema)
    if expected is None:
        assert got is None
    else:
        assert got[0] == expected[0] and got[1] == pytest.approx(expected[1], rel=1e-12)  # exact factors


@pytest.mark.parametrize("key_path, text, expected", [
    # NIST SP 811 factors: 850 g = 0.85 kg; 10 in = 0.254 m exactly; 5000 mAh = 5 Ah
    (("mass_kg",), "850g", "write 0.85"),
    (("propeller", "diameter_m"), "10in", "write 0.254"),
    (("battery", "capacity_Ah"), "5000mAh", "write 5"),
    # a compound unit in the key (new-user trial 3 item 14: "write a plain number in V" for Kv)
    (("motor", "kv_rpm_per_V"), "120kv", "write 120, a plain number in rpm/V"),
])
def test_a_number_written_as_text_with_a_unit_gets_the_plain_number(key_path, text, expected):
    doc = _load("vehicle-demo-quad.json")
    node = doc
    for key in key_path[:-1]:
        node = node[key]
    node[key_path[-1]] = text
    msg = _message(doc, "vehicle.schema.json")
    assert "is a text, expected a number" in msg and expected in msg


def test_a_vehicle_file_in_text_units_is_still_named_a_vehicle_file():
    # vehicle files may give "mass": "1050g" (read by estimator.vehicle); given where a
    # parameter set or a map belongs it is named as what it is, not as a key typo
    vehicle = {"name": "x", "mass": "1050g", "rotors": {"count": 4}, "propeller": {"size": "7x3.5in"},
               "motor": {"kv_rpm_per_V": 1300}, "battery": {"cells": 6, "capacity": "4000mAh"},
               "site": {"altitude": "2100m"}}
    for schema, not_a in (("params.schema.json", "not a parameter set"), ("map.schema.json", "not an export mapping")):
        message = _message(vehicle, schema)
        assert message.startswith("f.json: $: this is a vehicle description") and not_a in message
    # a parameter set with a misspelt top-level key is still told the typo
    params = _load("params-demo-with-hover.json")
    params["thrust_curv"] = params.pop("thrust_curve")
    assert "typo" in _message(params, "params.schema.json")
