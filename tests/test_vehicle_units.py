"""Units written in vehicle files, and values inside the limits that usually mean a unit slip.

Conversion factors: NIST Special Publication 811 (2008), Appendix B, exact by definition
(1 in = 0.0254 m, 1 g = 1e-3 kg, 1 mAh = 1e-3 Ah). Issue 9 items 5 and 6.
"""

import copy
import json

import pytest

from estimator.demo.scenario import DEMO_VEHICLE
from estimator.errors import InputError
from estimator.preflight.report import format_sheet, hover_report
from estimator.preflight.unit_checks import params_propeller_warning, suspicious_values
from estimator.units import parse_propeller_size
from estimator.vehicle import check_vehicle


def doc(**changes):
    d = copy.deepcopy(DEMO_VEHICLE)
    for path, value in changes.items():
        node = d
        parts = path.split("__")
        for part in parts[:-1]:
            node = node[part]
        if value is None:
            del node[parts[-1]]
        else:
            node[parts[-1]] = value
    return d


def test_text_with_units_equals_the_bare_si_numbers():
    written = doc(mass_kg=None, battery__capacity_Ah=None, battery__resistance_ohm=None,
                  site__altitude_m=None, site__temperature_C=None)
    written["mass"] = "2050g"                     # 1 g = 1e-3 kg
    written["battery"]["capacity"] = "5000mAh"    # 1 mAh = 1e-3 Ah
    written["battery"]["resistance"] = "20mohm"
    written["site"]["altitude"] = "4593.176ft"    # 1 ft = 0.3048 m: 1400.0000 m
    written["site"]["temperature"] = "301.15K"    # 28 C + 273.15
    plain = check_vehicle(copy.deepcopy(DEMO_VEHICLE), "plain.json")
    units = check_vehicle(written, "units.json")
    for block, key in [("", "mass_kg"), ("battery", "capacity_Ah"), ("battery", "resistance_ohm"),
                       ("site", "altitude_m"), ("site", "temperature_C")]:
        a = plain[block][key] if block else plain[key]
        b = units[block][key] if block else units[key]
        assert b == pytest.approx(a, rel=1e-6), key
    assert units["checked"]["given"]["$.mass_kg"] == "2050g"
    # the same vehicle, the same sheet numbers
    assert hover_report(units)["hover_command"] == pytest.approx(hover_report(plain)["hover_command"], rel=1e-6)


def test_text_on_an_si_key_and_a_bare_number_keeping_its_unit():
    v = check_vehicle(doc(mass_kg="850g", propeller__diameter_m="10in"), "x.json")
    assert v["mass_kg"] == pytest.approx(0.85) and v["propeller"]["diameter_m"] == pytest.approx(0.254)
    assert check_vehicle(doc(mass_kg=0.85), "x.json")["mass_kg"] == 0.85  # bare: the key's unit


@pytest.mark.parametrize("text, diameter, pitch", [
    ("10x4.5in", 0.254, 0.1143),          # 1 in = 0.0254 m
    ("10x4.5", 0.254, 0.1143),            # the trade lists propellers in inches
    ("254x114mm", 0.254, 0.114),
    ("12 X 6 in", 0.3048, 0.1524),
])
def test_propeller_size(text, diameter, pitch):
    d, p = parse_propeller_size(text)
    assert d == pytest.approx(diameter, rel=1e-12) and p == pytest.approx(pitch, rel=1e-12)


def test_size_and_blades_replace_ct_and_cp():
    d = doc()
    d["propeller"] = {"size": "10x4.5in", "blades": 3}
    v = check_vehicle(d, "x.json")
    assert v["propeller"] == {"diameter_m": pytest.approx(0.254), "pitch_m": pytest.approx(0.1143), "blades": 3}
    r = hover_report(v)
    assert r["propeller_source"] == "estimated" and r["can_hover"]
    assert any("estimated from size and pitch" in w and "10-20 %" in w for w in r["warnings"])
    assert "estimated from size and pitch" in format_sheet(r)


@pytest.mark.parametrize("change, needles", [
    ({"mass": 2.05, "mass_kg": None}, ("$.mass", "has no unit", "'mass_kg'")),
    ({"mass_kg": "two kilos"}, ("$.mass_kg", "cannot read")),
    ({"mass_kg": "2furlong"}, ("$.mass_kg", "unknown unit 'furlong'")),
    ({"mass_kg": "1e999kg"}, ("$.mass_kg", "not a finite number")),
    ({"mass": "2kg"}, ("$.mass", "given twice", "$.mass_kg")),
    ({"propeller": {"size": "ten by four"}}, ("$.propeller.size", "DIAMETERxPITCH")),
    ({"propeller__size": "10x4.5in"}, ("$.propeller.size", "are both given; write the propeller one way")),
    ({"battery__capacity_Ah": "-5Ah"}, ("$.battery.capacity_Ah",)),
    ({"propeller__ct": None, "propeller__cp": None, "propeller__pitch_m": 2.5},
     ("$.propeller.pitch_m", "inches meant? (2.5 in = 0.0635 m)")),
])
def test_bad_quantities_name_the_key(change, needles):
    with pytest.raises(InputError) as info:
        check_vehicle(doc(**change), "v.json")
    message = str(info.value)
    assert message.startswith("v.json: ")
    for needle in needles:
        assert needle in message, (needle, message)


def _warned(vehicle_doc):
    return suspicious_values(check_vehicle(vehicle_doc, "v.json"))


def test_the_demo_and_the_design_notes_example_raise_no_suspicion():
    assert _warned(doc()) == []


@pytest.mark.parametrize("change, needles", [
    # issue 9: mass 150 meant in grams on the demo's four 10-inch propellers (1 g = 1e-3 kg)
    ({"mass_kg": 150}, ("$.mass_kg", "grams meant? (150 g = 0.15 kg)")),
    # issue 9: capacity 150 meant in mAh for a 0.65 kg racer (1 mAh = 1e-3 Ah)
    ({"mass_kg": 0.65, "battery__capacity_Ah": 150}, ("$.battery.capacity_Ah", "mAh meant? (150 mAh = 0.15 Ah)")),
    # issue 9: a 1.3 m propeller on a 0.65 kg quad
    ({"mass_kg": 0.65, "propeller__diameter_m": 1.3}, ("$.propeller.diameter_m", "far below")),
    # 2.5 meant in inches: 2.5 in = 0.0635 m, a 65 mm propeller
    ({"mass_kg": 0.12, "propeller__diameter_m": 2.5, "battery__cells": 1, "battery__capacity_Ah": 0.3},
     ("$.propeller.diameter_m", "inches meant? (2.5 in = 0.0635 m)")),
    # 4 ohm meant in milliohm for a 4-cell 5 Ah pack
    ({"battery__resistance_ohm": 4}, ("$.battery.resistance_ohm", "milliohm meant?")),
])
def test_suspicious_values_are_warned_with_the_key_and_the_unit(change, needles):
    warnings = _warned(doc(**change))
    assert len(warnings) == 1, warnings
    for needle in needles:
        assert needle in warnings[0], (needle, warnings[0])


def test_a_value_written_with_its_unit_gets_the_same_check():
    # third new-user trial item 3: "150kg" on the demo's four 10-inch propellers is the same
    # 150 kg the bare number is (1 g = 1e-3 kg, NIST SP 811); the warning names what was written
    warnings = _warned(doc(mass_kg="150kg"))
    assert len(warnings) == 1 and warnings[0].startswith("$.mass_kg: 150 kg (written \"150kg\")")
    assert "slip" in warnings[0]


def test_suspicion_reaches_the_sheet_and_the_json(tmp_path):
    from click.testing import CliRunner

    from estimator.cli import cli
    path = tmp_path / "v.json"
    path.write_text(json.dumps(doc(mass_kg=0.65, battery__capacity_Ah=150)))
    out = CliRunner().invoke(cli, ["hover", str(path), "--json"])
    assert out.exit_code == 0
    assert any("mAh meant?" in w for w in json.loads(out.output)["warnings"])
    out = CliRunner().invoke(cli, ["hover", str(path)])
    assert "mAh meant?" in out.output


def test_a_parameter_set_of_another_propeller_is_warned():
    v = check_vehicle(doc(), "v.json")
    assert params_propeller_warning(v, {"rotor": {"diameter_m": 0.254}}) is None
    assert params_propeller_warning(v, {"rotor": {"diameter_m": 0.2556}}) is None  # within 2 %
    text = params_propeller_warning(v, {"rotor": {"diameter_m": 0.2286}})  # a 9-inch propeller
    assert "0.229 m (9.0 in)" in text and "0.254 m (10.0 in)" in text
