"""Tenth new-user trial, the small findings: a bare static --diameter (finding 10), the unit a
bare fit --diameter slip suggests, a payload row whose rounding showed a missed job time as met,
a mistyped command name and an empty JSON file (finding 14).

Commands run in this process (tests/trial_helpers). Sources are named beside each check.
"""

import json
import re

import pytest

from io_helpers import VEHICLE
from io_helpers import refused as refused_in_main
from trial_helpers import ok, refused

INCH_M = 0.0254  # NIST SP 811 (exact)


# --- finding 10: static --diameter with a bare number ---------------------------------------

@pytest.mark.parametrize("bare", ["1.22", "0.254", "3"])
def test_a_bare_static_diameter_is_refused_naming_the_units(bare):
    # '--diameter 1.22' was read as a 1.22 m rotor and the whole result printed; --altitude and
    # --temperature refuse a bare number the same way (trial 9, finding 8)
    # through main, as the console script runs it (click's own refusal of an option's value)
    refused_in_main(["static", "--diameter", bare, "--power", "2.6W"], "--diameter", "has no unit", "10in or 0.254m")


def test_the_same_diameter_with_its_unit_is_read_in_it():
    # 10 in = 0.254 m (NIST SP 811, exact)
    out = json.loads(ok("static", "--diameter", "10in", "--power", "70W", "--json"))
    assert out["diameter_m"] == pytest.approx(10 * INCH_M, rel=1e-12)
    out = json.loads(ok("static", "--diameter", "0.254m", "--power", "70W", "--json"))
    assert out["diameter_m"] == pytest.approx(0.254, rel=1e-12)


@pytest.mark.parametrize("command", [("static", "--power", "70W"), ("fit", "x.csv", "--out", "p.json")])
def test_a_bare_diameter_beyond_the_bounds_suggests_inches_first(command):
    # propellers are sized in inches (common practice): 22 is a 22in (0.559 m) propeller, which a
    # 0.01..3 m rotor diameter admits, as it does 22 cm; inches is the likelier intent
    line = refused(command[0], "--diameter", "22", *command[1:])
    assert "did you mean 22in?" in line and "22cm" not in line
    # 254 in is 6.5 m, beyond the bounds: millimetres remain the slip named
    assert "did you mean 254mm?" in refused(command[0], "--diameter", "254", *command[1:])


# --- finding 14: the payload table's rounding ------------------------------------------------

def test_a_missed_job_time_never_reads_as_met_in_the_payload_table():
    # a row whose endurance rounds up onto the job time (12.17 min shown as 12.2 against a
    # 12.2 min job) must not show the job time as reached: the table's own verdict says it is not
    rows = json.loads(ok("hover", VEHICLE, "--payload", "0..500g", "--json"))["payload"]["rows"]
    row = next(r for r in rows if round(r["flight_time_lead_min"], 1) > r["flight_time_lead_min"])
    job = "%.1fmin" % round(row["flight_time_lead_min"], 1)
    text = ok("hover", VEHICLE, "--payload", "0..500g", "--job-time", job)
    table = text[text.index("5. How much can it carry?"):]
    line = next(l for l in table.splitlines() if l.startswith("   %g g " % round(row["payload_kg"] * 1000)))
    shown = float(re.search(r"([0-9.]+) min \(", line).group(1))
    assert shown < float(job[:-3]), (line, job)
    assert line.rstrip().endswith("no")


# --- finding 14: a mistyped command, an empty JSON file -----------------------------------------

@pytest.mark.parametrize("typed, meant", [("hovr", "hover"), ("replya", "replay"), ("compar", "compare")])
def test_a_mistyped_command_names_the_nearest(typed, meant):
    line = refused_in_main([typed])
    assert "No such command %r" % typed in line and "did you mean %r?" % meant in line


def test_an_unlike_command_gets_no_guess():
    assert "did you mean" not in refused_in_main(["xyzzy"], "No such command 'xyzzy'")


@pytest.mark.parametrize("content", ["", "   \n\n", "\ufeff"])
def test_an_empty_json_file_is_named_empty(tmp_path, content):
    path = tmp_path / "vehicle.json"
    path.write_text(content, encoding="utf-8")
    line = refused("hover", path)
    assert "vehicle.json" in line and "the file is empty" in line and "malformed" not in line
