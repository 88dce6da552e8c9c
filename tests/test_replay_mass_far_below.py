"""A replay whose implied mass is far below the plan says what that may mean (new-user trial 24,
finding 3): a builder's 1.2 kg quad replayed with the demo's 2.05 kg parameter set printed "no
event" and an implied mass 17 % below the plan, and nothing else: it read as an all-clear, though
the set was another vehicle's. The watch has no flag below the plan (a lighter load is no fault),
so the mass line names the two readings. Reference: the closed-loop simulator's flights
(estimator.demo.flight_sim, invented) of the demo vehicle at its planned mass and at 1.6 kg, 22 %
below it, each replayed with the demo's fitted set; the simulator's truth, not the watch's estimate,
says which flight is light.
"""

import os

from estimator.demo.scenario import DEMO_VEHICLE
from trial_helpers import ok
from watch_helpers import flight_csv_once


def _replay(tmp_path, name, vehicle, params_file):
    path = os.path.join(tmp_path, name)
    with open(path, "w", encoding="utf-8") as fh:
        fh.write(flight_csv_once(vehicle, seed=1))
    return " ".join(ok("replay", path, "--params", params_file).split())


def test_a_mass_far_below_the_plan_is_named(params_file, tmp_path):
    light = _replay(tmp_path, "light.csv", dict(DEMO_VEHICLE, mass_kg=1.6), params_file)
    assert "0 alarms" in light
    assert "far below the plan" in light and "another vehicle" in light, light
    planned = _replay(tmp_path, "planned.csv", dict(DEMO_VEHICLE), params_file)
    assert "implied mass" in planned and "far below the plan" not in planned, planned
