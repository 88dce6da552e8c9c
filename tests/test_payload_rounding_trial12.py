"""The payload table and its verdict (new-user trial 12, finding 6): the job time is echoed as
written (--job-time 16.6min read '17 min of hover'), and a row's endurance is shown one way with or
without a job time (14.774 min read 14.7 with --job-time 15min and 14.8 without): to one decimal,
rounded half up as everywhere else, with more decimals only where one would round a missed job
time onto it (the rule of the T/W and command columns, units.beside). Common practice: a printed
figure is the value rounded to its shown places.
"""

import json
import re

import pytest

from io_helpers import VEHICLE
from trial_helpers import ok


def _table(*args):
    text = ok("hover", VEHICLE, "--payload", "0..500g", *args)
    return text, text[text.index("5. How much can it carry?"):]


def _shown(table, payload_g):
    line = next(l for l in table.splitlines() if l.startswith("   %g g " % payload_g))
    return re.search(r"([0-9.]+) min \(", line).group(1)


@pytest.mark.parametrize("job", ["16.6min", "12.25min", "730s"])
def test_the_verdict_echoes_the_job_time_as_written(job):
    text, _ = _table("--job-time", job)
    minutes = float(job[:-3]) if job.endswith("min") else float(job[:-1]) / 60.0
    assert " and %.4g min of hover" % minutes in " ".join(text.split()), text


def test_one_endurance_reads_the_same_with_and_without_a_job_time():
    rows = json.loads(ok("hover", VEHICLE, "--payload", "0..500g", "--json"))["payload"]["rows"]
    _, plain = _table()
    # a job time just above every row's endurance: every row misses it, none rounds onto it
    job = "%.1fmin" % (max(r["flight_time_lead_min"] for r in rows) + 0.5)
    _, with_job = _table("--job-time", job)
    for r in rows:
        g = round(r["payload_kg"] * 1000)
        assert _shown(plain, g) == _shown(with_job, g) == "%.1f" % r["flight_time_lead_min"], g


def test_a_row_just_short_of_the_job_time_gets_more_decimals_not_a_rounded_down_figure():
    rows = json.loads(ok("hover", VEHICLE, "--payload", "0..500g", "--json"))["payload"]["rows"]
    row = next(r for r in rows if round(r["flight_time_lead_min"], 1) > r["flight_time_lead_min"])
    job = round(row["flight_time_lead_min"], 1)
    _, table = _table("--job-time", "%.1fmin" % job)
    shown = _shown(table, round(row["payload_kg"] * 1000))
    assert float(shown) < job and len(shown.split(".")[1]) >= 2, shown
    assert float(shown) == pytest.approx(row["flight_time_lead_min"], abs=0.006)


# the tester's INVENTED 5 kg 6S hexacopter at 2400 m, 38 C (trial 12 inputs, hex6s.json)
HEX = {"name": "invented hex 6S 15in", "mass": "5kg", "rotors": {"count": 6},
       "propeller": {"size": "15x5.5in", "blades": 2},
       "motor": {"kv_rpm_per_V": 400, "resistance_ohm": 0.105, "no_load_current_A": 0.5, "max_current_A": 28},
       "battery": {"cells": 6, "capacity": "10000mAh", "resistance": "15mohm", "full_cell_V": 4.2,
                   "nominal_cell_V": 3.7, "empty_cell_V": 3.5, "max_discharge_C": 25},
       "esc": {"efficiency": 0.95, "max_current_A": 40},
       "site": {"altitude": "2400m", "temperature": "38C", "humidity_pct": 20}}


def test_the_empty_column_says_why_one_value_has_more_decimals(tmp_path):
    # finding 14: '0.57  0.604' in one column read oddly without a note; the limit is 0.6 of full
    # command near empty (common practice, preflight.warnings.HOVER_COMMAND_LIMIT)
    path = tmp_path / "hex.json"
    path.write_text(json.dumps(HEX))
    rows = json.loads(ok("hover", path, "--payload", "0..1kg", "--json"))["payload"]["rows"]
    assert any(0.6 < r["hover_command_empty"] < 0.605 for r in rows), rows  # shown as 0.60x
    note = "empty: with more decimals where two would round it onto the 0.6 limit it breaks"
    assert note in " ".join(ok("hover", path, "--payload", "0..1kg").split())
    assert note not in " ".join(ok("hover", path, "--payload", "0..0.3kg").split())


def test_section_5_comes_before_the_closing_cautions(tmp_path):
    # finding 14: with --payload, section 5 was printed after 'Before you go to the field'
    text, _ = _table()
    assert text.index("4. What to watch out for") < text.index("5. How much can it carry?") \
        < text.index("Before you go to the field")
    assert text.rstrip().splitlines()[-1].startswith("     ") or "come first" in text.rstrip().splitlines()[-1]
