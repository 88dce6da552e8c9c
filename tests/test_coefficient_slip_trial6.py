"""Sixth new-user trial, item 7: measured propeller coefficients with a decimal slip (ct 0.0105 for
0.105) are named as a likely slip, not answered with "fit a larger propeller".

Reference: the figure of merit FM = sqrt(2/pi) CT^1.5 / CP (momentum theory in the propeller
convention, Leishman, Principles of Helicopter Aerodynamics, ch. 2; from memory), recomputed here;
measured rotors in hover reach about 0.3 (micro rotors, Kroo and Kunz 2001) to 0.8 (good rotors,
Leishman); from memory. The vehicle is the trial's invented 10-inch survey quad. Through the
command: io_helpers.run (exit code, stdout, stderr apart).
"""

import copy
import json
import math

from io_helpers import run

QUAD10 = {"name": "trial 10in survey quad", "mass": "1.9kg", "rotors": {"count": 4},
          "propeller": {"diameter": "10in", "ct": 0.105, "cp": 0.042},
          "motor": {"kv_rpm_per_V": 920, "resistance_ohm": 0.10, "no_load_current_A": 0.6, "max_current_A": 35},
          "battery": {"cells": 4, "capacity": "5000mAh", "resistance": "25mohm",
                      "full_cell_V": 4.2, "nominal_cell_V": 3.7, "empty_cell_V": 3.5},
          "esc": {"efficiency": 0.95}, "site": {"altitude": "600m", "temperature": "25C"}}


def _fm(ct, cp):
    return math.sqrt(2.0 / math.pi) * ct ** 1.5 / cp


def _hover(tmp_path, doc):
    path = tmp_path / "v.json"
    path.write_text(json.dumps(doc))
    code, out, err = run(["hover", path])
    assert code == 0 and err == "", err
    code, js, err = run(["hover", path, "--json"])
    assert code == 0 and err == ""
    return " ".join(out.split()), json.loads(js)


def test_a_decimal_slip_in_ct_is_named(tmp_path):
    doc = copy.deepcopy(QUAD10)
    doc["propeller"]["ct"] = 0.0105
    assert _fm(0.0105, 0.042) < 0.03 and 0.3 <= _fm(0.105, 0.042) <= 0.8   # the slip and the meant value
    sheet, report = _hover(tmp_path, doc)
    assert "$.propeller.ct" in report["suspect_keys"]
    assert "cannot hover with the values as read (first check $.propeller.ct" in sheet
    assert "figure of merit of %.3f" % _fm(0.0105, 0.042) in sheet
    assert "a decimal slip in ct or cp? ct 0.105 gives %.2f" % _fm(0.105, 0.042) in sheet


def test_a_decimal_slip_in_cp_is_named(tmp_path):
    doc = copy.deepcopy(QUAD10)
    doc["propeller"]["cp"] = 0.42
    sheet, report = _hover(tmp_path, doc)
    assert "$.propeller.cp" in report["suspect_keys"]
    assert "cp 0.042 gives %.2f" % _fm(0.105, 0.042) in sheet


def test_ordinary_coefficients_get_no_such_note(tmp_path):
    sheet, report = _hover(tmp_path, copy.deepcopy(QUAD10))
    assert "decimal slip in ct or cp" not in sheet and not report["suspect_keys"]
