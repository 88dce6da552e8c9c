"""The vehicle file: schemas/vehicle.schema.json both ways, and estimator.vehicle's extra checks."""

import glob
import json
import os

import pytest

from estimator.demo_data import DEMO_VEHICLE
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
    "vehicle-mass-as-text.json": "$.mass_kg",
    "vehicle-cell-voltages-swapped.json": "$.battery",
    "vehicle-figure-of-merit-above-1.json": "$.propeller.cp",
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
