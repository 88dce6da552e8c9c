"""Vehicle-file refusals that say what to write (second new-user trial, item 19).

A key written without its unit (`motor.kv`), a resistance in milliohms written as a bare text
number (`"resistance": "90"`), a cell count written the way packs are labelled (`"cells": "6S"`).
Unit relation: 1 mohm = 1e-3 ohm (SI prefix milli, BIPM SI Brochure, 9th ed.). Vehicle invented:
a 7-inch long-range quad on 6S.
"""

import json

import pytest
from click.testing import CliRunner

from estimator.cli import cli

LONG_RANGE = {"name": "invented 7-inch long range", "mass": "1.05kg", "rotors": {"count": 4},
              "propeller": {"size": "7x3.5in", "blades": 2},
              "motor": {"kv_rpm_per_V": 1300, "resistance_ohm": 0.08, "no_load_current_A": 0.9},
              "battery": {"cells": 6, "capacity": "4000mAh", "resistance": "90mohm",
                          "full_cell_V": 4.2, "nominal_cell_V": 3.6, "empty_cell_V": 3.1},
              "site": {"altitude": "2100m", "temperature": "-5C"}}


def _refused(tmp_path, edit):
    doc = json.loads(json.dumps(LONG_RANGE))
    edit(doc)
    path = tmp_path / "lr7.json"
    path.write_text(json.dumps(doc))
    before = path.read_bytes()
    out = CliRunner().invoke(cli, ["hover", str(path)])
    assert out.exit_code == 2 and out.stdout == ""
    lines = out.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: ") and "Traceback" not in out.stderr
    assert path.read_bytes() == before  # the user's file is never touched
    return lines[0]


def test_a_key_without_its_unit_gets_did_you_mean(tmp_path):
    # trial 2: "motor.kv" got only "'kv_rpm_per_V' is a required property"
    def edit(doc):
        doc["motor"]["kv"] = doc["motor"].pop("kv_rpm_per_V")
    line = _refused(tmp_path, edit)
    assert "$.motor" in line and "the file has 'kv': did you mean 'kv_rpm_per_V'?" in line


def test_a_resistance_in_milliohms_without_its_unit_gets_the_unit_hint(tmp_path):
    # trial 2: "resistance": "90" got only "greater than the maximum of 5"
    def edit(doc):
        doc["battery"]["resistance"] = "90"
    line = _refused(tmp_path, edit)
    assert "$.battery.resistance" in line
    # trial 4: a text without a unit is refused like a bare number, its example in milliohm
    # (90 ohm is far above any pack's resistance; 90 mohm = 0.09 ohm, NIST SP 811)
    assert "has no unit" in line and '"90mohm"' in line


@pytest.mark.parametrize("cells, whole", [("12", 12), (" 8 ", 8)])
def test_a_cell_count_as_text_says_what_to_write(tmp_path, cells, whole):
    # trial 2: "cells": "6S" was refused without saying "write 6"; since trial 3 the trade's
    # "6S" is read as 6 (tests/test_preflight_wording_trial3.py), other text still says what to write
    def edit(doc):
        doc["battery"]["cells"] = cells
    line = _refused(tmp_path, edit)
    assert "$.battery.cells" in line and "write %d (a plain whole number, without quotes)" % whole in line
