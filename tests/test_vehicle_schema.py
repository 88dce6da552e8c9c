"""The vehicle file: schemas/vehicle.schema.json both ways, and estimator.vehicle's extra checks."""

import glob
import json
import os

import pytest

from estimator.demo.scenario import DEMO_VEHICLE
from estimator.errors import InputError
from estimator.vehicle import check_vehicle, load_vehicle

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
SCHEMA_PATH = os.path.join(ROOT, "schemas", "vehicle.schema.json")
VALID = sorted(glob.glob(os.path.join(ROOT, "schemas", "examples", "valid", "vehicle-*.json")))
INVALID = sorted(glob.glob(os.path.join(ROOT, "schemas", "examples", "invalid", "vehicle-*.json")))

# invalid example -> the JSON path the error must name
EXPECTED_PATH = {
    "vehicle-negative-mass.json": "$.mass_kg",
    "vehicle-zero-mass.json": "$.mass_kg",
    "vehicle-zero-diameter.json": "$.propeller.diameter_m",
    "vehicle-zero-capacity.json": "$.battery.capacity_Ah",
    "vehicle-coaxial-odd-count.json": "$.rotors.count",
    "vehicle-unknown-layout.json": "$.rotors.layout",
    "vehicle-missing-battery.json": "$",
    "vehicle-typo-key.json": "$.motor",
    "vehicle-humidity-over-100.json": "$.site.humidity_pct",
    "vehicle-cells-not-integer.json": "$.battery.cells",
    "vehicle-mass-not-a-quantity.json": "$.mass_kg",
    "vehicle-cell-voltages-swapped.json": "$.battery",
    "vehicle-figure-of-merit-above-1.json": "$.propeller.cp",
    "vehicle-mass-in-grams.json": "$.mass_kg",
    "vehicle-site-key-without-unit.json": "$.site.altitude",
}
# invalid example -> words of the likely cause the message must carry
EXPECTED_CAUSE = {
    "vehicle-mass-in-grams.json": "given in g instead of kg? 2050 g = 2.05 kg",  # 1 g = 1e-3 kg
    "vehicle-site-key-without-unit.json": "has no unit: write it as text with its unit (e.g. \"1400m\"), or did you mean 'altitude_m' for 'altitude'?",
    "vehicle-mass-not-a-quantity.json": "cannot read 'heavy' as a number with a unit",
    "vehicle-typo-key.json": "'kv_rpm' repeats 'kv_rpm_per_V', which is already given",
}

# The example of design notes sec. 4, copied verbatim: it must be accepted as is.
DESIGN_NOTES_EXAMPLE = """
{
  "name": "demo survey quad",
  "mass_kg": 2.05,
  "rotors": {"count": 4, "layout": "flat"},
  "propeller": {"diameter_m": 0.254, "ct": 0.110, "cp": 0.045},
  "motor": {"kv_rpm_per_V": 880, "resistance_ohm": 0.09, "no_load_current_A": 0.7,
            "max_current_A": 30},
  "battery": {"cells": 4, "capacity_Ah": 5.0, "resistance_ohm": 0.02,
              "full_cell_V": 4.2, "nominal_cell_V": 3.7, "empty_cell_V": 3.5,
              "usable_fraction": 0.8},
  "esc": {"efficiency": 0.95},
  "site": {"altitude_m": 1400, "temperature_C": 28, "humidity_pct": 40}
}
"""


def test_schema_is_valid_draft_2020_12():
    jsonschema = pytest.importorskip("jsonschema")
    with open(SCHEMA_PATH, encoding="utf-8") as fh:
        schema = json.load(fh)
    assert schema["$schema"] == "https://json-schema.org/draft/2020-12/schema"
    jsonschema.Draft202012Validator.check_schema(schema)


def _leaves(node, path="$"):
    for key, sub in node.get("properties", {}).items():
        if sub.get("type") == "object":
            yield from _leaves(sub, path + "." + key)
        else:
            yield path + "." + key, sub


def test_every_number_documents_its_unit_and_has_bounds():
    with open(SCHEMA_PATH, encoding="utf-8") as fh:
        schema = json.load(fh)
    for path, sub in _leaves(schema):
        assert "[" in sub.get("description", "") and "]" in sub["description"], path
        if sub.get("type") in ("number", "integer"):
            assert "minimum" in sub or "exclusiveMinimum" in sub, path
            assert "maximum" in sub, path


def test_design_notes_example_is_accepted_as_is_and_is_the_demo():
    doc = json.loads(DESIGN_NOTES_EXAMPLE)
    assert doc == DEMO_VEHICLE
    vehicle = check_vehicle(doc, "design-notes example")
    assert vehicle["mass_kg"] == 2.05 and vehicle["rotors"]["layout"] == "flat"


@pytest.mark.parametrize("path", VALID, ids=os.path.basename)
def test_valid_examples_load(path):
    vehicle = load_vehicle(path)
    # defaults are filled so the core never guesses
    assert vehicle["rotors"]["layout"] in ("flat", "coaxial")
    assert 0.0 < vehicle["battery"]["usable_fraction"] <= 1.0
    assert 0.0 < vehicle["esc"]["efficiency"] <= 1.0
    assert "altitude_m" in vehicle["site"]


def test_every_invalid_example_has_an_expected_path():
    assert sorted(os.path.basename(p) for p in INVALID) == sorted(EXPECTED_PATH)


@pytest.mark.parametrize("path", INVALID, ids=os.path.basename)
def test_invalid_examples_are_refused_with_the_json_path(path):
    with pytest.raises(InputError) as info:
        load_vehicle(path)
    message = str(info.value)
    assert message.startswith(path + ": ")
    assert message.split(": ")[1] == EXPECTED_PATH[os.path.basename(path)]
    assert EXPECTED_CAUSE.get(os.path.basename(path), "") in message


def test_impossible_propeller_is_refused_with_the_reason():
    doc = json.loads(DESIGN_NOTES_EXAMPLE)
    doc["propeller"]["cp"] = 0.015
    with pytest.raises(InputError, match="figure of merit"):
        check_vehicle(doc, "x.json")


def test_check_does_not_modify_the_input():
    doc = json.loads(DESIGN_NOTES_EXAMPLE)
    del doc["site"]
    check_vehicle(doc, "x.json")
    assert "site" not in doc


def _refusal(doc):
    with pytest.raises(InputError) as info:
        check_vehicle(doc, "v.json")
    return str(info.value)


@pytest.mark.parametrize("block, key, value, needles", [
    # unit slips by a factor near 1000 (or 100 for hPa); conversions exact by definition
    # (NIST SP 811): 1 mAh = 1e-3 Ah, 1 mm = 1e-3 m, 1 hPa = 100 Pa, 300 K = 26.85 C,
    # 25000 ft = 7620 m (30000 ft would be 9144 m, itself above the 9000 m bound: no guess)
    ("battery", "capacity_Ah", 5000, ("$.battery.capacity_Ah", "given in mAh instead of Ah", "5 Ah")),
    ("propeller", "diameter_m", 254, ("$.propeller.diameter_m", "given in mm instead of m", "0.254 m")),
    ("site", "pressure_Pa", 1013, ("$.site.pressure_Pa", "given in hPa instead of Pa", "1.013e+05 Pa")),
    ("site", "temperature_C", 300, ("$.site.temperature_C", "given in K instead of C", "26.85 C")),
    ("site", "altitude_m", 25000, ("$.site.altitude_m", "given in ft instead of m", "7620 m")),  # 1 ft = 0.3048 m
])
def test_bound_violations_name_the_likely_unit(block, key, value, needles):
    doc = json.loads(DESIGN_NOTES_EXAMPLE)
    doc[block][key] = value
    message = _refusal(doc)
    for needle in needles:
        assert needle in message, (needle, message)


def test_out_of_bounds_without_a_plausible_slip_gets_no_guess():
    doc = json.loads(DESIGN_NOTES_EXAMPLE)
    doc["site"]["humidity_pct"] = 130  # a percentage has no unit to slip
    assert "instead of" not in _refusal(doc)
    doc = json.loads(DESIGN_NOTES_EXAMPLE)
    doc["mass_kg"] = 1e9  # no unit brings a billion into 0..200 kg
    assert "instead of" not in _refusal(doc)


def test_missing_key_names_the_misspelt_key_beside_it():
    doc = json.loads(DESIGN_NOTES_EXAMPLE)
    doc["battery"]["capacty_Ah"] = doc["battery"].pop("capacity_Ah")
    message = _refusal(doc)
    assert "$.battery" in message and "'capacty_Ah'" in message and "'capacity_Ah'" in message
    doc = json.loads(DESIGN_NOTES_EXAMPLE)
    del doc["battery"]  # nothing like it in the file: the plain message, no guess
    assert "typo" not in _refusal(doc)


def test_a_parameter_set_or_map_is_not_taken_for_a_vehicle():
    with open(os.path.join(ROOT, "schemas", "examples", "valid", "params-demo-with-hover.json")) as fh:
        params = json.load(fh)
    message = _refusal(params)
    assert "parameter set" in message and "liftcal.rotor/1" in message and "--params" in message
    with open(os.path.join(ROOT, "schemas", "examples", "valid", "map-example.json")) as fh:
        assert "export map" in _refusal(json.load(fh))


def test_checked_vehicle_records_its_source_and_the_sea_level_assumption():
    doc = json.loads(DESIGN_NOTES_EXAMPLE)
    assert check_vehicle(doc, "x.json")["checked"] == {"source": "x.json", "assumed": [], "given": {},
                                                          "written": {}}
    del doc["site"]
    assumed = check_vehicle(doc, "x.json")["checked"]["assumed"]
    assert len(assumed) == 1 and "no site" in assumed[0] and "sea level" in assumed[0]
    doc["site"] = {"temperature_C": 30}
    assumed = check_vehicle(doc, "x.json")["checked"]["assumed"]
    assert len(assumed) == 1 and "no altitude_m" in assumed[0]
