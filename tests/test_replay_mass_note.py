"""A mass_high that follows a baseline_off with more power than the bench fit says that a
power fault present from the start reads as extra mass too (new-user trial 3 item 12: a +15 %
power fault from 20 s was reported only as "payload heavier than planned?"). By momentum
theory hover power grows as mass^1.5 (Leishman, Principles of Helicopter Aerodynamics,
eq. 2.23), so a watch that infers mass from power cannot tell the two apart on its own."""

import json

from click.testing import CliRunner

from estimator.cli import cli
from estimator.commands.watch import _note_mass_after_baseline
from watch_helpers import demo_fit_params, flight_csv_once


def test_mass_high_after_a_high_baseline_carries_the_note():
    events = [{"kind": "baseline_off", "t_s": 38.9, "residual": 0.108},
              {"kind": "mass_high", "t_s": 100.9, "mass_kg": 1.856, "planned_kg": 1.65, "limit_kg": 1.78}]
    _note_mass_after_baseline(events)
    assert "+10.8 % off the bench fit at 38.9 s" in events[1]["note"]
    assert "weigh the aircraft" in events[1]["note"]
    assert "note" not in events[0]


def test_no_note_without_a_high_baseline_first():
    low_first = [{"kind": "baseline_off", "t_s": 30.0, "residual": -0.12},
                 {"kind": "mass_high", "t_s": 90.0}]
    later = [{"kind": "mass_high", "t_s": 20.0}, {"kind": "baseline_off", "t_s": 40.0, "residual": 0.1}]
    for events in (low_first, later):
        _note_mass_after_baseline(events)
        assert not any("note" in e for e in events)


def test_a_high_baseline_of_an_earlier_flight_in_the_log_gives_no_note():
    # each flight is learned anew: flight 1's baseline_off says nothing of flight 2's mass (before:
    # the first baseline_off anywhere in the log annotated every later mass_high)
    events = [{"kind": "baseline_off", "t_s": 38.9, "residual": 0.108, "flight": 1},
              {"kind": "mass_high", "t_s": 400.0, "flight": 2}]
    _note_mass_after_baseline(events)
    assert "note" not in events[1]
    events[1]["flight"] = 1
    _note_mass_after_baseline(events)
    assert "+10.8 % off the bench fit at 38.9 s" in events[1]["note"]


def test_a_truly_heavy_demo_flight_gets_no_note_in_text_or_json(tmp_path):
    params = tmp_path / "p.json"
    params.write_text(json.dumps(demo_fit_params()))
    flight = tmp_path / "heavy.csv"
    flight.write_text(flight_csv_once(fault="heavy", seed=1))
    result = CliRunner().invoke(cli, ["replay", str(flight), "--params", str(params), "--json"])
    assert result.exit_code == 0, result.stderr
    events = json.loads(result.stdout)["events"]
    assert [e["kind"] for e in events] == ["mass_high"]
    assert "note" not in events[0]
