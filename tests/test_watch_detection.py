"""The watch on flights it was not tuned to: a modest randomised version of the detection matrix
(benchmarks/watch_detection.py has the full one). Flights come from the closed-loop simulator
(estimator/demo/flight_sim.py: altitude-hold controller, Dryden gusts, rotor and sensor lag,
ADC steps, pack sag), the watch is configured from the project's bench fit of each vehicle.

The bounds are what the watch must keep (regressions fail here); they are looser than the
benchmark's goals where the watch does not meet those yet (see the issue notes).
"""

from concurrent.futures import ProcessPoolExecutor

import pytest

import watch_study as ws

# (vehicle, jitter, sensor lag, flight time [s]): the tiny quad's 0.65 Ah pack reaches its cutoff
# after about 290 s of hover (about 210 s with a +30 % power fault), where the study ends a flight
CELLS = [("demo quad", 0.0, 0.0, 420.0), ("tiny 3S quad", 0.004, 0.05, 300.0), ("hexa 6S", 0.01, 0.15, 420.0)]


@pytest.fixture(scope="module")
def study():
    jobs = [(name, jit, lag, 2, dur, 7000 + 13 * i, (10, None)) for i, (name, jit, lag, dur) in enumerate(CELLS)]
    with ProcessPoolExecutor(2) as ex:
        return list(ex.map(ws.run_cell, jobs))


def test_large_steps_are_caught_fast_everywhere(study):
    # +-30 % power steps: within 5 s at every rate on every vehicle; +-15 % within 8 s (a step
    # that comes during a climb or descent is judged there too, at half weight).
    for cell in study:
        for rate, r in cell["rates"].items():
            for key in ("step+30%", "step-30%"):
                assert max(r["delays"][key]) <= 5.0, (cell["vehicle"], rate, key, r["delays"][key])
            for key in ("step+15%", "step-15%"):
                assert max(r["delays"][key]) <= 8.0, (cell["vehicle"], rate, key, r["delays"][key])


def test_payloads_and_mass_flag(study):
    # a payload 30 % over plan raises mass_high within 60 s of take-off; the planned and the
    # lighter mass never raise it (false_mass counts those)
    for cell in study:
        for rate, r in cell["rates"].items():
            assert max(r["delays"]["payload+30%"]) <= 60.0, (cell["vehicle"], rate, r["delays"])
            assert r["false_mass"] == 0, (cell["vehicle"], rate)


def test_no_false_alarm_on_the_calm_demo_flights(study):
    # fault-free demo-quad flights without collective jitter or sensor lag: no event at all, and
    # no sensor fault on any of its flights
    cell = study[0]
    for rate, r in cell["rates"].items():
        assert r["false_clean"] == 0 and r["false_sensor"] == 0, (rate, r)


def test_the_judge_can_fail():
    # the study's judging counts an event of the wrong side and a missed step
    assert ws.judge("step", 0.10, 100.0, [(101.0, 2)]) == (1, float("inf"))
    assert ws.judge("clean", 0.0, None, [(50.0, 1)]) == (1, None)
    assert ws.judge("payload", -0.10, None, [(50.0, 16)]) == (1, None)
