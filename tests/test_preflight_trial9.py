"""Ninth new-user trial, pre-flight items: a hot pack or site gets a caution (finding 4), the
site's --altitude and --temperature refuse a bare number (finding 8), an absurd --payload is
refused (finding 9).

Vehicles are the demo's INVENTED quad (estimator.demo.scenario) with the changes named in each
test. Commands run through click's CliRunner (trial_helpers).
"""

import json

import pytest

from estimator.demo.scenario import DEMO_VEHICLE
from trial_helpers import ok, refused, run

# lithium packs: above about 40 C keep them shaded, do not charge them hot, and stay below the
# maker's limit (common practice; makers' discharge limits are around 60 C, from memory)
HOT_ABOVE_C = 40.0


def _vehicle(tmp_path, site_C, pack_C=None):
    doc = json.loads(json.dumps(DEMO_VEHICLE))
    doc["site"]["temperature_C"] = site_C
    if pack_C is not None:
        doc["battery"]["temperature_C"] = pack_C
    path = tmp_path / ("v%s_%s.json" % (site_C, pack_C))
    path.write_text(json.dumps(doc))
    return path


def _sheet_text(path):
    return " ".join(ok("hover", path).split())  # the sheet wraps at 80 columns


@pytest.mark.parametrize("site_C, pack_C, word", [(48.0, None, "pack"), (45.0, 25.0, "site"), (20.0, 46.0, "pack")])
def test_a_hot_pack_or_site_gets_the_caution_in_the_sheet_and_in_compare(tmp_path, site_C, pack_C, word):
    path = _vehicle(tmp_path, site_C, pack_C)
    text = _sheet_text(path)
    hot = max(site_C, pack_C or site_C)
    section4 = text.split("4. What to watch out for")[1].split("Before you go")[0]
    assert "hot %s (%.0f C, above about %.0f C, common practice)" % (word, hot, HOT_ABOVE_C) in section4
    for needed in ("keep packs shaded", "do not charge a hot pack", "pack maker's temperature limit"):
        assert needed in section4, section4
    report = json.loads(ok("hover", path, "--json"))
    assert "hot_pack" in [c["kind"] for c in report["caveats"]]
    compare = " ".join(ok("compare", path, "--vary", "mass=1.9kg,2.0kg").split())
    assert compare.count("hot %s (%.0f C): keep packs shaded" % (word, hot)) == 2


@pytest.mark.parametrize("site_C", [25.0, 40.0])
def test_no_hot_caution_at_or_below_about_40_C(tmp_path, site_C):
    text = _sheet_text(_vehicle(tmp_path, site_C))
    assert "hot pack" not in text and "hot site" not in text


def test_the_hot_caution_lives_in_cautions():
    from estimator import cautions

    assert cautions.HOT_PACK_ABOVE_C == HOT_ABOVE_C
    assert "shaded" in cautions.HOT_PACK and "maker's temperature limit" in cautions.HOT_PACK


# --- finding 8: a bare --altitude or --temperature is refused, as in a vehicle file's site -----

@pytest.mark.parametrize("args, option, units", [
    (("air", "--altitude", "5000"), "--altitude", "5000m or 5000ft"),
    (("static", "--diameter", "10in", "--power", "70W", "--altitude", "5000"), "--altitude", "5000m or 5000ft"),
    (("air", "--temperature", "30"), "--temperature", "30C or 86F"),
    (("static", "--diameter", "10in", "--power", "70W", "--temperature", "-5"), "--temperature", "30C or 86F"),
])
def test_a_bare_site_quantity_is_refused_naming_the_units(args, option, units, capsys):
    # through main, as the console script runs it: one error line, exit 2, nothing on stdout
    from estimator.cli import main

    with pytest.raises(SystemExit) as exc:
        main(list(args))
    out, err = capsys.readouterr()
    assert exc.value.code == 2 and out == "" and err.count("\n") == 1 and err.startswith("error: "), err
    assert option in err and "has no unit" in err and units in err and "Traceback" not in err


def test_the_same_values_with_units_are_read_in_them():
    # US Standard Atmosphere 1976 (table, from memory): 1524 m (5000 ft, 1 ft = 0.3048 m exactly,
    # NIST SP 811) 1.0556 kg/m^3; 5000 m 0.7364 kg/m^3
    ft = json.loads(ok("air", "--altitude", "5000ft", "--json"))
    m = json.loads(ok("air", "--altitude", "5000m", "--json"))
    assert ft["density_kg_m3"] == pytest.approx(1.0556, rel=1e-3)
    assert m["density_kg_m3"] == pytest.approx(0.7364, rel=1e-3)
    hot = json.loads(ok("air", "--temperature", "86F", "--json"))
    assert hot["temperature_K"] == pytest.approx(303.15, abs=1e-9)  # 86 F = 30 C (definition)


def test_the_readme_and_help_use_units_for_the_site():
    import os
    import re

    from io_helpers import ROOT

    with open(os.path.join(ROOT, "README.md"), encoding="utf-8") as fh:
        readme = fh.read()
    assert not re.search(r"--(altitude|temperature)[ =]-?[0-9.]+(\s|$|`)", readme)
    for command in ("air", "static"):
        helptext = " ".join(ok(command, "--help").split())
        assert not re.search(r"--(altitude|temperature)[ =]-?[0-9.]+(\s|$)", helptext)


# --- finding 9: an absurd --payload is refused ---------------------------------------------------

# heavy-lift multirotors carry about their own mass at most (common practice, from memory): a
# payload above 3 times the vehicle's all-up mass is a slip
PAYLOAD_TIMES_MASS_MAX = 3.0


@pytest.mark.parametrize("payload, unit_kg, unit", [("0..1e9kg", 1.0, "kg"), ("0,1e9kg", 1.0, "kg"),
                                                    ("0..7kg", 1.0, "kg"),
                                                    ("0..1000lb", 0.45359237, "lb")])  # NIST SP 811, exact
def test_an_absurd_payload_is_refused_naming_the_rule(tmp_path, payload, unit_kg, unit):
    path = _vehicle(tmp_path, 20.0)
    plot = tmp_path / "payload.png"
    line = refused("hover", path, "--payload", payload, "--plot", plot)
    mass_kg = 2.05  # the demo vehicle's all-up mass (estimator.demo.scenario)
    assert DEMO_VEHICLE["mass_kg"] == mass_kg
    assert "more than 3 times the vehicle's all-up mass" in line and "common practice" in line
    assert "up to %.4g %s" % (PAYLOAD_TIMES_MASS_MAX * mass_kg / unit_kg, unit) in line
    assert not plot.exists()


def test_a_payload_up_to_three_times_the_mass_is_still_tabled(tmp_path):
    path = _vehicle(tmp_path, 20.0)
    table = ok("hover", path, "--payload", "0..6kg")  # 6 kg < 3 x 2.05 kg
    assert "\n   6.00 kg    8.05 kg " in table
