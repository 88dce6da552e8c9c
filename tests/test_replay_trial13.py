"""Replay and firmware words of new-user trial 13.

- finding 2: a mass_high names both causes, a heavier payload or a rotor drawing more power than
  the bench fit since take-off (by momentum theory hover power grows as mass^1.5, Leishman,
  Principles of Helicopter Aerodynamics, eq. 2.23: from power alone the two look alike);
- finding 3: baseline_off's advice starts with the site, and a power_high soon after a
  baseline_off of the same flight says it may share the cause;
- finding 4: a logging pause with the rotors stopped on both sides (a logger that logs only while
  armed: a pack swap) is time on the ground, not a sensor fault; the same gap in flight still is;
- finding 5: firmware refuses a vehicle that cannot hover, with the hover sheet's verdict;
- finding 13: a log of several flights says how many and how long.
Common practice: an event's advice names the likely causes in the order a builder checks them.
"""

import json

import pytest

from estimator.commands.watch import EVENT_MEANING
from estimator.demo.scenario import DEMO_VEHICLE
from estimator.watch import replay as replay_module
from estimator.watch.config import make_config
from estimator.watch.replay import run_kernel
from io_helpers import PARAMS, refused, run
from watch_helpers import motor_model_params


@pytest.fixture(scope="module")
def config():
    return make_config(motor_model_params())[0]


def _log(pieces):
    """A flight dict as run_kernel takes it from (seconds, command permille, mV, mA, rows at 10 Hz) pieces;
    a piece with command None is a logging pause of that many seconds; the current moves by a few
    readings' worth, as a real sensor's does (an identical current while spinning is the stuck check's)."""
    t, out = 0.0, {"time_s": [], "command_permille": [], "bus_mV": [], "bus_mA": []}
    for seconds, u, mv, ma in pieces:
        if u is None:
            t += seconds
            continue
        for _ in range(int(round(seconds * 10))):
            out["time_s"].append(round(t, 3))
            out["command_permille"].append(u)
            out["bus_mV"].append(mv)
            out["bus_mA"].append(ma + 10 * (len(out["bus_mA"]) % 5))   # never stuck
            t += 0.1
    return out


def _flying(config, seconds):
    u = config["spin_permille"] + 300
    return (seconds, u, 15500, 12000)


def test_a_pause_on_the_ground_between_flights_is_no_sensor_fault(config):
    fly = _flying(config, 30.0)
    log = _log([fly, (1.0, 0, 16000, 300), (10.0, None, None, None), (1.0, 0, 16300, 300), fly])
    out, _ = run_kernel(log, config)
    assert not [e for e in out["events"] if e["kind"] == "sensor_fault"], out["events"]
    assert len(out["flights_s"]) == 2                     # the landing rule still starts a new flight
    assert out["ground_pauses"] == [{"t_s": pytest.approx(30.9, abs=0.11), "gap_s": pytest.approx(10.1, abs=0.11)}]


def test_the_same_pause_in_flight_stays_a_sensor_fault(config):
    fly = _flying(config, 30.0)
    log = _log([fly, (10.0, None, None, None), fly])
    out, _ = run_kernel(log, config)
    faults = [e for e in out["events"] if e["kind"] == "sensor_fault"]
    assert faults and faults[0]["cause"] == "gap", out["events"]
    assert out["ground_pauses"] == []


def test_the_pause_on_one_side_only_in_flight_stays_a_sensor_fault(config):
    fly = _flying(config, 30.0)
    log = _log([fly, (10.0, None, None, None), (1.0, 0, 16300, 300)])   # logging resumes after landing
    out, _ = run_kernel(log, config)
    assert [e for e in out["events"] if e["kind"] == "sensor_fault"], out["events"]


@pytest.fixture
def canned(monkeypatch):
    out = {"samples": 5000, "alarms": 3, "learned": True, "warnings": [], "flights_s": [195.0, 200.1],
           "ground_pauses": [{"t_s": 240.0, "gap_s": 10.0}],
           "mass": {"judged": True, "implied_kg": 9.8, "at_s": 460.0, "share": 0.09, "planned_kg": 9.0,
                    "above_limit": True, "limit_kg": 9.72, "mass_alarm": True},
           "events": [{"t_s": 41.5, "kind": "baseline_off", "residual": 0.142, "flight": 1},
                      {"t_s": 45.5, "kind": "power_high", "residual": 0.053, "flight": 1},
                      {"t_s": 339.5, "kind": "mass_high", "residual": 0.0, "mass_kg": 9.846, "planned_kg": 9.0,
                       "limit_kg": 9.72, "flight": 2}]}
    monkeypatch.setattr(replay_module, "replay_file_traced", lambda *a, **k: (out, None))


def test_replay_text_names_flights_pause_both_mass_causes_and_the_shared_cause(canned, tmp_path):
    log = tmp_path / "log.csv"
    log.write_text("time[s],command[-],voltage[V],current[A]\n")
    code, text, err = run(["replay", log, "--params", PARAMS])
    assert code == 0, err
    flat = " ".join(text.split())
    assert "2 flights (landings between them), 195.0 s, 200.1 s above the spin command" in flat, text
    assert "logging paused 10.0 s at 240.0 s with the rotors stopped: time on the ground, not a sensor fault" in flat
    assert "a heavier payload, or a rotor or motor drawing more power than the bench fit since take-off? " \
           "check both" in flat
    assert "4.0 s after the baseline_off of this flight: it may share its cause" in flat
    # the site first in baseline_off's advice, then the bench
    meaning = EVENT_MEANING["baseline_off"]
    assert meaning.index("another site") < meaning.index("refit")


def test_a_power_high_in_another_flight_or_much_later_gets_no_shared_cause_note():
    from estimator.commands.watch import _note_power_after_baseline

    events = [{"t_s": 41.5, "kind": "baseline_off", "residual": 0.142, "flight": 1},
              {"t_s": 300.0, "kind": "power_high", "residual": 0.06, "flight": 1},
              {"t_s": 290.0, "kind": "power_high", "residual": 0.06, "flight": 2}]
    _note_power_after_baseline(events)
    assert all("note" not in e for e in events)


def test_firmware_refuses_a_vehicle_that_cannot_hover(tmp_path):
    heavy = tmp_path / "heavy.json"
    heavy.write_text(json.dumps(dict(DEMO_VEHICLE, mass_kg=12.0)))
    code, text, err = run(["hover", heavy, "--params", PARAMS, "--json"])
    assert code == 0 and json.loads(text)["can_hover"] is False, (text, err)   # the sheet's verdict
    out = tmp_path / "B"
    refused(["firmware", PARAMS, "--vehicle", heavy, "--out", out], "cannot hover", "no bundle written")
    assert not out.exists()
