"""Replay's words (new-user trial 12): masses of a small vehicle in grams, as `firmware` and the
payload table say them (finding 13: 'implied mass 0.089 kg ... alarm limit 0.097 kg' beside
firmware's 'mass alarm above 97.2 g'); and a note under an event starts where the event's own
wrapped text does, not deeper (finding 14). Common practice: a small mass in grams, SI prefixes
(1 kg = 1000 g).
"""

import pytest

from estimator.units import mass_text
from estimator.watch import replay as replay_module
from estimator.watch.replay import mass_words
from io_helpers import PARAMS, run


def test_masses_below_a_kilogram_plan_are_grams():
    assert mass_text(0.0972, 0.090) == "97.2 g" and mass_text(5.4, 5.0) == "5.400 kg"
    words = mass_words({"judged": True, "implied_kg": 0.089, "at_s": 200.0, "share": -0.011, "planned_kg": 0.090,
                        "above_limit": False, "limit_kg": 0.0972})
    assert "implied mass 89.0 g" in words and "against 90.0 g planned" in words and "limit 97.2 g" in words


@pytest.fixture
def canned(monkeypatch):
    out = {"samples": 100, "alarms": 2, "learned": True, "warnings": [],
           "mass": {"judged": True, "implied_kg": 0.1, "at_s": 90.0, "share": 0.111, "planned_kg": 0.09,
                    "above_limit": True, "limit_kg": 0.0972, "mass_alarm": True},
           "events": [{"t_s": 40.0, "kind": "power_high", "residual": 0.128, "bus_V": 7.6,
                       "note": "bus 7.60 V at the alarm, a note long enough to wrap over two lines of an "
                               "80-column terminal at the least"},
                      {"t_s": 90.0, "kind": "mass_high", "residual": 0.0, "mass_kg": 0.1, "planned_kg": 0.09,
                       "limit_kg": 0.0972}]}
    monkeypatch.setattr(replay_module, "replay_file_traced", lambda *a, **k: (out, None))


def test_the_event_lines_use_grams_and_the_note_sits_under_the_event_text(canned, tmp_path):
    log = tmp_path / "log.csv"
    log.write_text("time[s],command[-],voltage[V],current[A]\n")
    code, text, err = run(["replay", log, "--params", PARAMS])
    assert code == 0, err
    assert "implied mass 100.0 g against 90.0 g planned (alarm above 97.2 g" in " ".join(text.split())
    lines = text.splitlines()
    event = next(i for i, line in enumerate(lines) if "power_high" in line)
    wrapped = lines[event + 1]            # the event's own text, wrapped under the kind
    note = next(line for line in lines[event + 1:] if line.lstrip().startswith("(bus 7.60 V"))
    indent = len(wrapped) - len(wrapped.lstrip())
    assert len(note) - len(note.lstrip()) == indent, (wrapped, note)
