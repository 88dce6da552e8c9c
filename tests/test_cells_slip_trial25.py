"""A cell-count slip is named as such (new-user trial 25, finding 2): a 350 g 3-inch quad with
"cells": 24 got "CHECK THE FILE FIRST - $.battery.capacity looks like a unit or decimal slip" and
"check the capacity and the mass"; the cell count was never named.

The vehicle is invented for this test (not measured, not any product), in the structure of
schemas/examples/valid/vehicle-demo-quad.json. References: 3-inch quads fly on 2S..6S packs and a
350 g one carries a pack of a few tens of watt-hours at most (common practice, from memory); 24
cells at 3.7 V are 88.8 V nominal, 57.7 Wh at 650 mAh, at least 82 % of the all-up mass even at
200 Wh/kg (LiPo, from memory), and 3800 Kv on 88.8 V turns about 337 000 rpm unloaded, about 12
times what this rotor needs to hover.
"""

import copy

from trial_helpers import json_file, ok, report

QUAD = {"name": "invented 3-inch quad", "mass": "350g", "rotors": {"count": 4},
        "propeller": {"size": "3x3in", "blades": 3},
        "motor": {"kv_rpm_per_V": 3800, "resistance_ohm": 0.12, "no_load_current_A": 0.5, "max_current_A": 25},
        "battery": {"cells": 4, "capacity": "650mAh", "resistance": "40mohm",
                    "full_cell_V": 4.2, "nominal_cell_V": 3.7, "empty_cell_V": 3.5},
        "esc": {"efficiency": 0.95},
        "site": {"altitude": "100m", "temperature": "18C"}}


def _quad(tmp_path, cells):
    doc = copy.deepcopy(QUAD)
    doc["battery"]["cells"] = cells
    return json_file(tmp_path, doc, "quad%d.json" % cells)


def test_24_cells_on_a_3_inch_quad_name_the_cell_count(tmp_path):
    path = _quad(tmp_path, 24)
    doc = report("hover", path)
    # before: suspect_keys ["$.battery.capacity"], "check the capacity and the mass"
    assert doc["suspect_keys"] == ["$.battery.cells"], doc["suspect_keys"]
    named = [w for w in doc["warnings"] if w.startswith("$.battery.cells: 24 cells (88.8 V nominal)")]
    assert len(named) == 1, doc["warnings"]  # 24 x 3.7 V = 88.8 V (arithmetic)
    # the pack voltage far above the need: about 12 times the hover speed unloaded (from the docstring)
    assert "far above what these rotors need" in named[0], named[0]
    # a 4S pack is among the counts that fit (3-inch quads fly 2S..6S, common practice)
    counts = named[0].split("with ", 1)[1].split(" cells in series")[0]
    low, high = (int(x) for x in counts.split(".."))
    assert low <= 4 <= high, named[0]
    assert not [w for w in doc["warnings"] if w.startswith("$.battery.capacity")], doc["warnings"]
    sheet = " ".join(ok("hover", path).split())
    assert "CHECK THE FILE FIRST - $.battery.cells looks like a typing slip" in sheet, sheet
    assert "check the capacity and the mass" not in sheet and "CHECK THE FILE FIRST - $.battery.capacity" not in sheet


def test_the_same_quad_on_4_cells_raises_no_slip(tmp_path):
    # the ordinary build (4S, common practice for a 3-inch quad): nothing to check
    doc = report("hover", _quad(tmp_path, 4))
    assert doc["suspect_keys"] == [], doc["warnings"]
