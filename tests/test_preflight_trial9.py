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
