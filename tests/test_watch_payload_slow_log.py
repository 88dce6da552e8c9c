"""A payload 15 % over plan on a slow, jittery flight log: mass_high within a minute.

Issue 7's goal (the detection matrix of benchmarks/watch_detection.py): a +15 % payload raises
mass_high within 60 s of take-off. Before the implied-mass windows were set from the measured
correlation of the implied mass (estimator/watch/config.py DEFAULTS, mass_corr_s), the demo quad
logged at 5 Hz with 1 % collective jitter took 31.8-73.2 s on these six flights (two above 60 s),
and up to 104 s in the matrix; now 31.8-43.8 s. The truth here is the simulator's injected payload (closed-loop flights,
estimator/demo/flight_sim.py), not the kernel's own estimate.
"""

import statistics

import numpy as np

import watch_study as ws
from estimator.demo import flight_sim, sim_vehicles
from estimator.watch.config import ROTOR_LAG_S_PER_M, as_tuple, make_config

N_FLIGHTS = 6


def _mass_delays(payload):
    name = "demo quad"
    d = sim_vehicles.spec(name)["vehicle"]["propeller"]["diameter_m"]
    cfg = as_tuple(make_config(sim_vehicles.fitted_params(name), sim_vehicles.checked_vehicle(name),
                               {"lag_ms": 1000.0 * ROTOR_LAG_S_PER_M * d})[0])
    sim = flight_sim.simulate(name, N_FLIGHTS, 4242, 110.0, jitter=0.01, sensor_lag_s=0.0,
                              fault_size=[0.0] * N_FLIGHTS, fault_at_s=[1e9] * N_FLIGHTS,
                              fault_ramp_s=[0.0] * N_FLIGHTS, payload=[payload] * N_FLIGHTS)
    delays = []
    for k in range(N_FLIGHTS):
        events = ws.replay(cfg, flight_sim.logged(sim, k, np.random.default_rng(k), 5))
        hits = [t for t, bits in events if bits & 16]
        delays.append(hits[0] - ws.TAKEOFF_S if hits else float("inf"))
    return delays


def test_a_heavy_payload_on_a_5_hz_jittery_log_is_flagged_within_a_minute():
    delays = _mass_delays(0.15)
    assert max(delays) <= 60.0, delays                    # the goal, on every flight
    assert statistics.median(delays) <= 45.0, delays      # most within the take-off and two windows
