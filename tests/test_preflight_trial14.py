"""Pre-flight findings of new-user trial 14:
1. `compare` printed "no combination keeps every margin" right under the combination that keeps
   them all, and no verdict at all when no row kept them and a pack size was varied.
8. the sheet's hover current counted the avionics while the watts beside it were the motors' alone.
9. an unknown key's hint: 'frame' was said to repeat 'name'; "avionic_current": "600mA" was pointed
   at avionics_current_A, not at the key that takes text with a unit, and "for 'key'" repeated it.
10. a unit-slip caveat named $.mass_kg for a file that wrote "mass": "5kg" ($.battery.capacity_Ah
   for "capacity": "150Ah").
11. '1 rotors' and 'all 1 motors' on a one-rotor, one-cell vehicle.
16. small inconsistencies: a bad option value began 'liftcal air: Invalid value for '--altitude''
   where liftcal's own refusals begin '--altitude:'; `air` alone answered for sea level without
   saying so; 'a blade Reynolds number of 17329', 'hover needs about 37213 rpm'.
"""

import json
import re

import pytest

from io_helpers import VEHICLE, refused, run

NONE_KEEPS = "no combination keeps every margin"
BEST = "longest hover that keeps every margin:"


def _vehicle(tmp_path, name="v.json", **changes):
    doc = json.load(open(VEHICLE))
    doc.update(changes)
    path = tmp_path / name
    path.write_text(json.dumps(doc))
    return path


def _compare(*varies, vehicle=VEHICLE):
    args = ["compare", vehicle] + [a for v in varies for a in ("--vary", v)]
    code, out, err = run(args)
    assert code == 0, err
    code, js, err = run(args + ["--json"])
    assert code == 0, err
    return " ".join(out.split()), json.loads(js)


def test_compare_gives_one_verdict_when_a_row_keeps_every_margin():
    text, result = _compare("propeller.size=10x4.5in,11x5in,12x5in", "motor.kv_rpm_per_V=680,880")
    assert result.get("best"), result
    assert text.count(BEST) == 1 and NONE_KEEPS not in text, text


def test_compare_says_none_keeps_every_margin_also_with_a_pack_size_varied():
    # every row too heavy for the demo quad's motors: no best, and a pack size varied (the held note)
    text, result = _compare("battery.capacity=3Ah,5Ah", "mass=4.5kg,5kg")
    assert not result.get("best") and result["held"], result
    assert text.count(NONE_KEEPS) == 1 and BEST not in text, text
    assert text.index("! battery.capacity varied") > text.index(NONE_KEEPS)


def test_the_hover_watts_beside_the_pack_current_count_the_avionics_too(tmp_path):
    vehicle = _vehicle(tmp_path, avionics_current_A=0.6)
    code, out, err = run(["hover", vehicle])
    assert code == 0, err
    said = " ".join(out.split())
    found = re.search(r"hover draws ([\d.]+) A from the pack \(all motors \+ 0.600 A avionics\), ([\d.]+) W "
                      r"\(the motors ([\d.]+) W; nominal pack, bus at ([\d.]+) V\)", said)
    assert found, said
    amps, watts, motors, bus = (float(g) for g in found.groups())
    assert watts == pytest.approx(amps * bus, rel=0.005)
    assert motors == pytest.approx((amps - 0.6) * bus, rel=0.005)
    report = json.loads(run(["hover", vehicle, "--json"])[1])
    assert motors == pytest.approx(report["hover_power_W"], rel=0.005)


def test_a_free_key_is_pointed_to_notes_not_to_a_key_it_does_not_repeat(tmp_path):
    line = refused(["hover", _vehicle(tmp_path, frame="X")], "v.json", "$:", "unknown key 'frame'", '"notes"')
    assert "repeats" not in line and "'name'" not in line, line


def test_a_misspelt_key_with_a_unit_text_is_pointed_to_the_key_that_takes_text(tmp_path):
    line = refused(["hover", _vehicle(tmp_path, avionic_current="600mA")], "unknown key 'avionic_current'")
    assert line.endswith("did you mean 'avionics_current'?"), line
    line = refused(["hover", _vehicle(tmp_path, avionic_current_A=0.6)], "unknown key 'avionic_current_A'")
    assert line.endswith("did you mean 'avionics_current_A'?"), line


def test_a_key_written_twice_still_repeats(tmp_path):
    doc = json.load(open(VEHICLE))
    doc["motor"]["kv_rpm"] = 880
    path = tmp_path / "twice.json"
    path.write_text(json.dumps(doc))
    refused(["hover", path], "$.motor", "'kv_rpm' repeats 'kv_rpm_per_V', which is already given")


def _written_with_units(tmp_path, **changes):
    doc = json.load(open(VEHICLE))
    doc["mass"] = "%gkg" % doc.pop("mass_kg")
    doc["battery"]["capacity"] = "%gAh" % doc["battery"].pop("capacity_Ah")
    for key, value in changes.items():
        block, _, leaf = key.rpartition("__")
        (doc[block] if block else doc)[leaf] = value
    path = tmp_path / "written.json"
    path.write_text(json.dumps(doc))
    return path


@pytest.mark.parametrize("changes, written, si", [
    ({"mass": "20kg"}, "$.mass", "$.mass_kg"),                      # 20 kg on 10-inch props
    ({"battery__capacity": "150Ah"}, "$.battery.capacity", "$.battery.capacity_Ah"),
])
def test_a_slip_caveat_names_the_key_as_the_file_wrote_it(tmp_path, changes, written, si):
    vehicle = _written_with_units(tmp_path, **changes)
    code, out, err = run(["hover", vehicle])
    assert code == 0, err
    said = " ".join(out.split())
    assert ("! %s: " % written) in said and si not in said, said
    report = json.loads(run(["hover", vehicle, "--json"])[1])
    assert report["suspect_keys"] == [written]


def test_a_one_rotor_one_cell_vehicle_reads_in_the_singular(tmp_path):
    doc = json.load(open(VEHICLE))
    doc["rotors"]["count"] = 1
    doc["mass_kg"] = 0.3
    doc["battery"].update(cells=1, capacity_Ah=1.0)
    path = tmp_path / "mono.json"
    path.write_text(json.dumps(doc))
    code, out, err = run(["hover", path])
    assert code == 0, err
    said = " ".join(out.split())
    assert "1 rotor (flat), propeller 0.254 m" in said and ", 1 motor (rating" in said, said
    assert "hover draws" not in said or "(the motor)" in said
    for plural in ("1 rotors", "1 motors", "1 cells", "propellers 0.254"):
        assert plural not in said, plural
    # a slip warning counts its rotors and cells the same way: 60 Ah (222 Wh) on 1 cell of a 0.3 kg vehicle
    doc["battery"]["capacity"] = "60Ah"
    del doc["battery"]["capacity_Ah"]
    path.write_text(json.dumps(doc))
    warnings = json.loads(run(["hover", path, "--json"])[1])["warnings"]
    assert any("60 Ah (written \"60Ah\") on 1 cell is" in w and "Ah on 1 cell;" in w for w in warnings), warnings


@pytest.mark.parametrize("args, option", [
    (["air", "--altitude", "abc"], "--altitude"),
    (["air", "--humidity", "abc"], "--humidity"),
    (["static", "--diameter", "10in", "--power", "seventy"], "--power"),
])
def test_a_bad_option_value_is_named_like_liftcal_names_an_option(args, option):
    line = refused(args, "cannot read")
    assert line.startswith("error: %s: " % option) and "Invalid value" not in line, line


def test_air_without_a_site_says_it_is_sea_level():
    for args, words in ((["air"], "standard atmosphere (15 C, 1013.25 hPa)"), (["air", "--temperature", "30C"], "")):
        code, out, err = run(args)
        said = " ".join(out.split())
        assert code == 0 and "! no --altitude: sea level assumed" in said and words in said, said
        assert json.loads(run(args + ["--json"])[1])["warnings"][-1].startswith("no --altitude: sea level")
    for args in (["air", "--altitude", "0m"], ["air", "--pressure", "900hPa", "--temperature", "20C"]):
        assert "no --altitude: sea level" not in run(args)[1]


def test_large_counts_are_rounded_to_the_digits_they_hold(tmp_path):
    # a 5-inch rotor's blade Reynolds number and a too-slow motor's rpm: three significant digits
    doc = json.load(open(VEHICLE))
    doc.update(mass_kg=0.25, propeller={"size": "5x3.5in", "blades": 3})
    doc["motor"].update(kv_rpm_per_V=2450)
    small = tmp_path / "small.json"
    small.write_text(json.dumps(doc))
    said = " ".join(run(["hover", small])[1].split())
    found = re.findall(r"Reynolds number (?:of|about) (\d+)", said)
    assert found and all(len(n.rstrip("0")) <= 3 for n in found), found
    doc["motor"].update(kv_rpm_per_V=100)  # hover needs more rpm than 100 Kv gives
    doc["battery"].update(capacity_Ah=0.65)
    small.write_text(json.dumps(doc))
    said = " ".join(run(["hover", small])[1].split())
    rpm = re.findall(r"hover needs about (\d+) rpm", said)
    assert rpm and all(len(n.rstrip("0")) <= 3 for n in rpm), said


@pytest.mark.parametrize("key", ["c_rating", "C-rate", "discharge_C"])
def test_a_pack_rating_in_the_trades_words_is_pointed_to_its_key(tmp_path, key):
    # new-user trial, session 23: "c_rating": 75 in the battery got no hint (the README says
    # "C-rating"; the key is max_discharge_C, the maker's continuous discharge rating)
    doc = json.load(open(VEHICLE))
    doc["battery"].pop("max_discharge_C", None)
    doc["battery"][key] = 75
    path = tmp_path / "rated.json"
    path.write_text(json.dumps(doc))
    line = refused(["hover", path], "$.battery", "unknown key %r" % key)
    assert line.endswith("did you mean 'max_discharge_C'?"), line
