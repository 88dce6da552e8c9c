"""A power step soon after the learning window, on a vehicle whose current leads its rotor.

The residual's slopes (on the block's thrust against the hover's, and on the lead: static less
lagged expected power, the current's jump before the rotor speeds up) were learned only from the
end of take-off, from zero lead slope. On a heavy octo logged at 100 Hz with 1 % collective jitter
and no current-sensor lag the lead moves the block residual by up to 30 %, so the learning window's
first blocks read it all as noise: the learned noise came out 2-3x the flight's (42-93 permille
against 12-31 settled), and k and h with it. The lead's slope is now learned from spin-up (take-off
blocks are still neither judged nor used for the baseline or the noise). The axial-flight slope is
not: learned from take-off (spin-up and climb-out, not the steady axial flight it describes) it read
0 where the prior gives 0.47, and a fault-free second-world hexa whose first 25 s near hover read
+12 % of implied mass (a climb) crossed the mass alarm at 43.5 s, 10 permille higher than with it.

Truth: the closed-loop simulator's injected steps (estimator/demo/flight_sim.py, seeds the
detection matrix does not use), +-10 % at 70-100 s of flight. Issue 7's goal is a 3 s median.
Before the change the median delay was 5.9-8.4 s on four other sets of eight flights, and 4.8 s on
these twelve; after it 2.4-3.2 s, and 2.0 s here.
"""

import statistics

import numpy as np

import watch_study as ws
from estimator.demo import flight_sim, sim_vehicles
from estimator.core.watch import Watch
from estimator.watch.config import ROTOR_LAG_S_PER_M, as_tuple, make_config
from watch_helpers import block_state_names, state_names

OCTO = "octo 12S"


def test_an_early_step_on_a_jittery_octo_is_caught_within_seconds():
    n = 12
    rng = np.random.default_rng(31)
    at = rng.uniform(70.0, 100.0, n)
    size = [0.10] * (n // 2) + [-0.10] * (n // 2)
    sim = flight_sim.simulate(OCTO, n, 31, 130.0, jitter=0.01, sensor_lag_s=0.0, fault_size=size,
                              fault_at_s=at, fault_ramp_s=[0.0] * n)
    d = sim_vehicles.spec(OCTO)["vehicle"]["propeller"]["diameter_m"]
    cfg = as_tuple(make_config(sim_vehicles.fitted_params(OCTO), sim_vehicles.checked_vehicle(OCTO),
                               {"lag_ms": 1000.0 * ROTOR_LAG_S_PER_M * d})[0])
    delays = []
    for k in range(n):
        want = 1 if size[k] > 0 else 2
        events = ws.replay(cfg, flight_sim.logged(sim, k, np.random.default_rng(k), 100))
        assert not [t for t, bits in events if bits & (3 - want) or (bits & want and t < at[k])], events
        hits = [t - at[k] for t, bits in events if bits & want and t >= at[k]]
        delays.append(hits[0] if hits else float("inf"))
    assert statistics.median(delays) <= 3.5, delays


def test_take_off_teaches_the_lead_slope_and_not_the_axial_one():
    # the same octo and log, 40 s: through take-off (20 s of flight, CONFIG takeoff_ms) the lead's
    # slope cd must move off 0 (the spin-up is where the lead is largest: the current rises before
    # the rotor does), and the axial slope cx and its moments must stay at their prior
    sim = flight_sim.simulate(OCTO, 1, 37, 40.0, jitter=0.01, sensor_lag_s=0.0, fault_size=[0.0],
                              fault_at_s=[1e9], fault_ramp_s=[0.0])
    d = sim_vehicles.spec(OCTO)["vehicle"]["propeller"]["diameter_m"]
    cfg = make_config(sim_vehicles.fitted_params(OCTO), sim_vehicles.checked_vehicle(OCTO),
                      {"lag_ms": 1000.0 * ROTOR_LAG_S_PER_M * d})[0]
    w = Watch(as_tuple(cfg))
    names = block_state_names()
    axial = [names.index(n) for n in ("sxx", "srx", "sxd", "cx")]
    prior = [w.data[i] for i in axial]
    at_ms = state_names().index("fl_ms")
    cd = names.index("cd")
    dts, u, mv, ma = ws.kernel_inputs(flight_sim.logged(sim, 0, np.random.default_rng(5), 100))
    cds = []
    for i in range(len(u)):
        w.update(dts[i], u[i], mv[i], ma[i])
        if w.state[at_ms] >= cfg["takeoff_ms"]:
            break
        assert [w.data[j] for j in axial] == prior
        cds.append(w.data[cd])
    assert prior[3] > 400                                   # the prior: momentum theory's 0.5 (ridge)
    assert cds[-1] > 16, cds[-20:]                          # Q6: above 0.25
