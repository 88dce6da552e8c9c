"""A full-charge cell voltage above a lithium cell's charge limit gets a caution (new-user trial
12, finding 4: "full_cell_V": 4.5 gave a normal sheet, no word). The limits: standard LiPo and
Li-ion cells charge to 4.20 V, high-voltage (LiHV) cells to 4.35 V (from memory; the pack maker's
own limit comes first). The sentences live in estimator.cautions.
"""

import json

import pytest

from io_helpers import VEHICLE, run


def _vehicle(tmp_path, full_cell_V):
    with open(VEHICLE) as fh:
        doc = json.load(fh)
    doc["battery"]["full_cell_V"] = full_cell_V
    path = tmp_path / ("v%g.json" % full_cell_V)
    path.write_text(json.dumps(doc))
    return path


@pytest.mark.parametrize("full_cell_V, needle", [
    (4.5, "above any lithium cell's charge limit"),     # above 4.35 V: no lithium cell takes it
    (4.3, "only high-voltage (LiHV) cells"),           # 4.20 < 4.3 <= 4.35 V: LiHV only
    (4.2, None),                                        # a standard LiPo's full charge: no caution
])
def test_the_sheet_cautions_a_full_charge_above_the_lithium_limit(tmp_path, full_cell_V, needle):
    path = _vehicle(tmp_path, full_cell_V)
    code, out, err = run(["hover", path, "--json"])
    assert code == 0, err
    report = json.loads(out)
    found = [w for w in report["warnings"] if w.startswith("full charge %.2f V per cell" % full_cell_V)]
    if needle is None:
        assert not found, found
        return
    assert len(found) == 1 and needle in found[0] and "pack maker's limit" in found[0], found
    assert "4.20 V" in found[0] and "4.35 V" in found[0]
    code, text, err = run(["hover", path])
    assert code == 0 and needle in " ".join(text.split()), err
    # compare names it under each row, and once in full below the table
    code, text, err = run(["compare", path, "--vary", "mass=1.9kg,2.05kg"])
    assert code == 0, err
    assert text.count("full charge %.2f V per cell: above" % full_cell_V) == 2, text
    assert needle in " ".join(text.split())


def test_the_sentences_live_in_cautions():
    from estimator import cautions

    assert cautions.LITHIUM_FULL_CELL_V == 4.20 and cautions.LITHIUM_HV_FULL_CELL_V == 4.35  # from memory
    assert "charge limit" in cautions.FULL_CELL_OVER and "LiHV" in cautions.FULL_CELL_HV
