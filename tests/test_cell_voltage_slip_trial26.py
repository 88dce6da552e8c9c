"""A pack's voltage written where a cell's belongs (new-user trial 26).

"full_cell_V": 25.2 on a 6-cell pack is the whole pack's full voltage (6 x 4.2 V); the schema's
hint read it as millivolts, "25.2 mV = 0.0252 V", a voltage no cell has. Now the error names
the pack: 25.2 V / 6 cells = 4.2 V per cell. A lithium-polymer cell is 4.2 V full, about 3.7 V
nominal, 3.5 V usable-empty (common practice, from memory); the lowest cell voltage in use, a
nickel cell's end of discharge, is about 1.0 V (from memory), so a "mV" reading below it is no
cell's and its hint is left out; 4200 (mV for 4.2 V) keeps it. The vehicle is invented.
"""

import json

from io_helpers import run

VEHICLE = {"name": "invented hexa", "mass": "3.4kg", "rotors": {"count": 6},
           "propeller": {"size": "13x4.4in", "blades": 2},
           "motor": {"kv_rpm_per_V": 400, "resistance_ohm": 0.12, "no_load_current_A": 0.5},
           "battery": {"cells": 6, "capacity": "8000mAh", "resistance": "25mohm",
                       "full_cell_V": 4.2, "nominal_cell_V": 3.7, "empty_cell_V": 3.5},
           "site": {"altitude": "300m", "temperature": "15C"}}


def _error(tmp_path, battery_edit):
    vehicle = json.loads(json.dumps(VEHICLE))
    battery_edit(vehicle["battery"])
    path = tmp_path / "v.json"
    path.write_text(json.dumps(vehicle))
    code, out, err = run(["hover", path])
    lines = err.strip().splitlines()
    assert code == 2 and out == "" and len(lines) == 1 and lines[0].startswith("error: "), (code, out, err)
    assert "Traceback" not in err
    return lines[0]


def test_pack_full_voltage_in_the_cell_key_names_the_pack(tmp_path):
    line = _error(tmp_path, lambda b: b.update(full_cell_V=25.2))
    assert "$.battery.full_cell_V" in line, line
    assert "25.2 V / 6 cells = 4.2 V" in line, line
    assert "0.0252" not in line and "mV" not in line, line


def test_pack_nominal_voltage_written_with_its_unit(tmp_path):
    def edit(b):
        del b["nominal_cell_V"]
        b["nominal_cell"] = "22.2V"
    line = _error(tmp_path, edit)
    assert "22.2 V / 6 cells = 3.7 V" in line and "0.0222" not in line, line


def test_millivolts_still_get_their_hint(tmp_path):
    line = _error(tmp_path, lambda b: b.update(full_cell_V=4200))
    assert "4200 mV = 4.2 V" in line, line


def test_no_hint_to_a_voltage_no_cell_has(tmp_path):
    # 50 V is neither one cell's (mV: 0.05 V) nor this 6-cell pack's (8.3 V a cell)
    line = _error(tmp_path, lambda b: b.update(full_cell_V=50))
    assert "greater than the maximum of 5" in line and "0.05 V" not in line and "cells =" not in line, line
