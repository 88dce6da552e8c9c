"""The compare table's columns line up whatever the vehicle's name and the size of its numbers
(new-user trials 7 and 8, leftovers): a 12S octo on 30 in propellers varied down to a 2 in
micro and 50 g puts T/W from 0.1 to over 700, currents from 0.2 to 50 A and endurance from
no hover to thousands of minutes in one table. Numbers stand right-aligned under their
headings, so the places line up (common practice in tables: figures aligned on the decimal
point, from memory), with two spaces between columns. The vehicle is INVENTED.
"""

import json

from trial_helpers import ok

OCTO = {"name": "INVENTED heavy-lift 12S coaxial octocopter with a name longer than one line of text",
        "mass": "25kg", "rotors": {"count": 8}, "propeller": {"size": "30x10in", "ct": 0.11, "cp": 0.045},
        "motor": {"kv_rpm_per_V": 120, "resistance_ohm": 0.05, "no_load_current_A": 1.5, "max_current_A": 90},
        "battery": {"cells": 12, "capacity": "32000mAh", "resistance": "20mohm", "full_cell_V": 4.2,
                    "nominal_cell_V": 3.7, "empty_cell_V": 3.5, "max_discharge_C": 10},
        "esc": {"efficiency": 0.95}}
NUMBERS = ("command", "T/W", "motor A", "pack A", "endurance")


def _table(tmp_path):
    path = tmp_path / "octo.json"
    path.write_text(json.dumps(OCTO))
    text = ok("compare", path, "--vary", "mass=0.05kg,25kg,2.5kg", "--vary", "propeller.size=2x1in,30x10in")
    lines = text.split("\n")
    at = [i for i, line in enumerate(lines) if line.lstrip().startswith("#  ")][0]
    header = lines[at]
    rows = [line for line in lines[at + 1:] if line[:3].strip().isdigit()]
    return header, rows


def _cells(line, header):
    """{heading: (start, end) of the cell under it}: runs of non-blank text split by 2+ spaces."""
    import re

    spans = [m.span() for m in re.finditer(r"\S+(?: \S+)*", line)]
    heads = [m.group(0) for m in re.finditer(r"\S+(?: \S+)*", header)]
    assert len(spans) == len(heads), (line, header)
    return dict(zip(heads, spans))


def test_numbers_stand_right_aligned_under_their_headings(tmp_path):
    header, rows = _table(tmp_path)
    assert len(rows) == 6
    heads = _cells(header, header)
    tw_cells = []
    for row in rows:
        cells = _cells(row, header)
        for name in NUMBERS:
            start, end = cells[name]
            if name == "T/W":
                tw_cells.append(row[start:end])
                # the reachable mark (*) stands in its own column after the figures
                end -= 1 if row[start:end].endswith("*") else 0
                assert end == heads[name][1], (name, row, header)
            else:
                # before: left-aligned ('1.6' under 'motor A', '6768.1 min' past 'endurance')
                assert end == heads[name][1], (name, row, header)
    # the magnitudes this table was built to hold (see the module docstring)
    assert any(float(c.rstrip("*")) > 100 for c in tw_cells) and any(float(c.rstrip("*")) < 1 for c in tw_cells)


def test_the_long_name_wraps_and_the_rule_stays_within_80_columns(tmp_path):
    path = tmp_path / "octo.json"
    path.write_text(json.dumps(OCTO))
    text = ok("compare", path, "--vary", "mass=25kg,2.5kg")
    head = text.split("\n=")[0]
    assert " ".join(head.split()) == "COMPARE: %s, 2 combinations" % OCTO["name"]
    assert all(len(line) <= 79 for line in text.split("\n")[:3])
