"""Fifth new-user trial, vehicle-file items: propeller key messages (item 7), a site temperature
implausible for its altitude (item 8), a fraction written in percent and a required key named
in the unit-text style (item 9).

Through the command (tests/io_helpers.run: exit code, stdout and stderr apart). External
references: the standard atmosphere's temperature at altitude from the `ambiance` package
(PyPI; ICAO Doc 7488 / ISO 2533 / US Standard Atmosphere 1976), test-only; 1 in = 0.0254 m
(NIST SP 811, exact); the surface-temperature records behind the warning band (about 42 K above
and 82 K below the standard atmosphere) are from memory.
"""

import copy
import json

import pytest

from invented_vehicles import WHOOP
from io_helpers import refused
from trial_helpers import ok


def _file(tmp_path, doc, name="v.json"):
    path = tmp_path / name
    path.write_text(json.dumps(doc))
    return str(path)


# --- item 7: the propeller keys -------------------------------------------------------------------

def test_size_with_pitch_says_what_works(tmp_path):
    doc = copy.deepcopy(WHOOP)
    doc["propeller"] = {"size": "76mm", "pitch": "46mm", "blades": 3}
    line = refused(["hover", _file(tmp_path, doc)], "$.propeller.size", '"size": "76x46mm"',
                   '"diameter" and "pitch"')
    assert "either the size or" not in line  # the old message read as if one of them would do


def test_a_size_without_pitch_says_the_pitch_is_missing(tmp_path):
    doc = copy.deepcopy(WHOOP)
    doc["propeller"] = {"size": "76mm", "blades": 3}
    refused(["hover", _file(tmp_path, doc)], '"76mm" is only a diameter', '"size": "76xPITCHmm"',
            '"diameter" and "pitch"')


def test_size_and_measured_coefficients_say_which_wins(tmp_path):
    doc = copy.deepcopy(WHOOP)
    doc["propeller"] = {"size": "3x1.8in", "ct": 0.1, "cp": 0.045}
    report = json.loads(ok("hover", _file(tmp_path, doc), "--json"))
    assert report["propeller_source"] == "given" and report["propeller_ct"] == 0.1
    note = [w for w in report["warnings"] if w.startswith("$.propeller: ct and cp are given")]
    assert note and "pitch from $.propeller.size is not" in note[0]


def test_a_bare_size_is_inches_with_a_note(tmp_path):
    doc = copy.deepcopy(WHOOP)
    doc["propeller"] = {"size": "3x1.8", "blades": 3}
    report = json.loads(ok("hover", _file(tmp_path, doc), "--json"))
    assert report["propeller_diameter_m"] == pytest.approx(3 * 0.0254, rel=1e-12)  # NIST SP 811
    sheet = ok("hover", _file(tmp_path, doc))
    assert '$.propeller.size: "3x1.8" has no unit: read as inches ("3x1.8in")' in " ".join(sheet.split())
    doc["propeller"]["size"] = "3x1.8in"  # with its unit: no note
    assert "has no unit" not in ok("hover", _file(tmp_path, doc, "w.json"))


# --- item 8: site temperature against the standard atmosphere -------------------------------------

@pytest.mark.parametrize("altitude_m", [1500.0, 4000.0, 6000.0, 9000.0])
def test_air_warns_on_a_temperature_far_from_the_standard_atmosphere(altitude_m):
    ambiance = pytest.importorskip("ambiance")
    t_std = float(ambiance.Atmosphere(altitude_m).temperature_in_celsius[0])  # ICAO / ISO 2533
    for offset, warned in ((40.0, False), (50.0, True), (-80.0, False), (-90.0, True)):
        temperature = t_std + offset
        if temperature < -60.0 or temperature > 50.0:
            continue  # beyond the air command's own bounds, -60..50 C (schemas/vehicle.schema.json, site)
        out = json.loads(ok("air", "--altitude", "%gm" % altitude_m, "--temperature", "%.3fC" % temperature,
                              "--json"))
        assert bool(out["warnings"]) == warned, (altitude_m, temperature, out["warnings"])
        if warned:
            assert "%.0f K %s the standard atmosphere" % (abs(offset), "above" if offset > 0 else "below") \
                in out["warnings"][0]


def test_the_trial_site_30_C_at_9000_m_is_flagged_on_the_sheet(tmp_path):
    doc = copy.deepcopy(WHOOP)
    doc["site"] = {"altitude": "9000m", "temperature": "30C"}
    sheet = " ".join(ok("hover", _file(tmp_path, doc)).split())
    # standard atmosphere at 9000 m: -43.4 C (ambiance, ICAO), so 30 C is 73 K above it
    assert "! site temperature 30.0 C at 9000 m is 73 K above the standard atmosphere's -43.4 C" in sheet
    text = ok("air", "--altitude", "9000m", "--temperature", "30C")
    assert "! site temperature 30.0 C at 9000 m" in " ".join(text.split())


# --- item 9: hints ---------------------------------------------------------------------------------

@pytest.mark.parametrize("block, key, value, fraction", [("esc", "efficiency", 95, "0.95"),
                                                         ("battery", "usable_fraction", 85, "0.85")])
def test_a_fraction_written_in_percent_gets_the_hint(tmp_path, block, key, value, fraction):
    doc = copy.deepcopy(WHOOP)
    doc.setdefault(block, {})[key] = value
    refused(["hover", _file(tmp_path, doc)], "$.%s.%s" % (block, key), "percent meant?",
            "is %s (a fraction of 1)" % fraction)


def test_a_missing_capacity_names_the_unit_text_key(tmp_path):
    doc = copy.deepcopy(WHOOP)
    del doc["battery"]["capacity"]
    refused(["hover", _file(tmp_path, doc)], "'capacity_Ah' is a required property",
            '(or "capacity": "4200mAh"')
