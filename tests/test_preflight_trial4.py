"""Fourth new-user trial, pre-flight and input items: a 1S whoop's Kv, numbers written as text
without a unit, error hints that point the right way.

Every command runs in this process (tests/io_helpers.run): exit code, stdout and stderr apart.
The sources of the values the checks rest on are named beside each check.
"""

import copy
import json

import pytest

from io_helpers import refused, run
from invented_vehicles import WHOOP

# an invented 65 mm 1S whoop (no product): Kv 26000 rpm/V, inside the 19000-30000 rpm/V that
# motors of 65-75 mm 1S whoops are sold with (from memory)
WHOOP_1S = {"name": "invented 65 mm 1S whoop", "mass": "21g", "rotors": {"count": 4},
            "propeller": {"size": "31x15mm", "blades": 3},
            "motor": {"kv_rpm_per_V": 26000, "resistance_ohm": 0.9, "no_load_current_A": 0.25,
                      "max_current_A": 4},
            "battery": {"cells": 1, "capacity": "300mAh", "resistance": "120mohm",
                        "full_cell_V": 4.2, "nominal_cell_V": 3.7, "empty_cell_V": 3.5},
            "site": {"altitude": "0m", "temperature": "20C"}}


def _write(tmp_path, doc, name="v.json"):
    path = tmp_path / name
    path.write_text(json.dumps(doc))
    return path


def _edited(base, block, key, value):
    doc = copy.deepcopy(base)
    (doc if block == "" else doc[block])[key] = value
    return doc


# --- item 1: Kv of 1S whoop motors --------------------------------------------------------------

@pytest.mark.parametrize("kv", [19000, 26000, 30000])
def test_whoop_kv_up_to_30000_is_accepted(tmp_path, kv):
    # 1S whoop motors: about 19000-30000 rpm/V (from memory)
    code, out, err = run(["hover", _write(tmp_path, _edited(WHOOP_1S, "motor", "kv_rpm_per_V", kv))])
    assert code == 0, err
    assert "Will it hover?" in out


def test_kv_above_the_cap_gets_no_millivolt_hint(tmp_path):
    # rpm/V has no mV slip: "61000 mV = 61 V" would say nothing about a motor constant
    line = refused(["hover", _write(tmp_path, _edited(WHOOP_1S, "motor", "kv_rpm_per_V", 61000))],
                   "$.motor.kv_rpm_per_V", "60000")
    assert "mV" not in line and " V?" not in line


# --- item 5: a quoted number without a unit -----------------------------------------------------

@pytest.mark.parametrize("block,key,text,unit", [
    ("site", "altitude", "1500", "m"),          # 1500 m is a site altitude the schema takes
    ("battery", "resistance", "60", "mohm"),    # 60 ohm is above any pack: milliohm meant
    ("battery", "resistance", "0.06", "ohm"),
    ("", "mass", "320", "g"),                   # 320 kg on 3-inch propellers: grams meant
    ("site", "temperature", "15", "C"),
])
def test_a_quoted_number_without_unit_is_refused_like_a_bare_one(tmp_path, block, key, text, unit):
    from invented_vehicles import WHOOP as base
    cw3 = copy.deepcopy(base)
    cw3["mass"], cw3["propeller"] = "320g", {"size": "3x3in", "blades": 5}
    cw3["battery"]["cells"], cw3["battery"]["capacity"] = 4, "650mAh"
    line = refused(["hover", _write(tmp_path, _edited(cw3, block, key, text))],
                   "has no unit", '"%s%s"' % (text, unit))
    bare = refused(["hover", _write(tmp_path, _edited(cw3, block, key, float(text)), "b.json")],
                   "has no unit", '"%g%s"' % (float(text), unit))
    assert line.split(": ")[2] == bare.split(": ")[2]   # the same JSON path


def test_a_quoted_number_on_a_key_naming_its_unit_is_read_in_that_unit(tmp_path):
    # "altitude_m": "1500" names its unit in the key: 1500 m, a valid site
    doc = _edited(WHOOP_1S, "site", "altitude_m", "1500")
    del doc["site"]["altitude"]
    code, out, err = run(["hover", _write(tmp_path, doc)])
    assert code == 0, err


# --- item 10: error hints ------------------------------------------------------------------------

def test_no_unit_example_is_in_the_vehicles_likely_unit(tmp_path):
    # 320 on a 3-inch 4S quad: 320 g gives about 170 N/m^2 of disk loading (20..1500 is the range
    # of small multirotors, common practice); 650 on a 4S pack of a 0.32 kg quad: 650 mAh is
    # 9.6 Wh, about 20 % of the mass at 150 Wh/kg (common practice, from memory)
    cw3 = copy.deepcopy(WHOOP)
    cw3["mass"], cw3["propeller"] = 320, {"size": "3x3in", "blades": 5}
    cw3["battery"]["cells"], cw3["battery"]["capacity"] = 4, "650mAh"
    line = refused(["hover", _write(tmp_path, cw3)], '"320g"')
    assert "320kg" not in line
    cw3["mass"], cw3["battery"]["capacity"] = "320g", 650
    line = refused(["hover", _write(tmp_path, cw3)], '"650mAh"')
    assert "650Ah" not in line
    # the same bare 5 on a 15-inch hexa is kilograms (about 46 N/m^2 on six 15-inch disks)
    from invented_vehicles import HEXA
    hexa = _edited(HEXA, "", "mass", 5)
    refused(["hover", _write(tmp_path, hexa)], '"5kg"')


def test_decimal_comma_keeps_its_decimals(tmp_path):
    line = refused(["hover", _write(tmp_path, _edited(WHOOP_1S, "motor", "kv_rpm_per_V", "3800,5"))])
    assert "3800.5" in line and "write 3800," not in line


def test_trailing_comma_is_named(tmp_path):
    path = tmp_path / "tc.json"
    path.write_text('{"name": "x", "mass": "320g", "rotors": {"count": 4,},\n "propeller": {}}')
    refused(["hover", path], "trailing comma", "line 1")


@pytest.mark.parametrize("command", [["check"], ["export"]])
def test_a_json_that_is_no_parameter_set_is_named_so(tmp_path, command):
    path = _write(tmp_path, {"mine": True}, "my_notes.json")
    line = refused(command + [path], "not a liftcal parameter set", "liftcal.rotor/1")
    assert "required property" not in line


def test_negative_mass_keeps_the_unit_written(tmp_path):
    line = refused(["hover", _write(tmp_path, _edited(WHOOP_1S, "", "mass", "-320g"))], "$.mass")
    assert '"-320g"' in line and "-0.32 kg" in line   # 1 g = 1e-3 kg (NIST SP 811)
