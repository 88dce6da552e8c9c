"""Hover power in the site's air against truths the project did not write (not a timed test).

Each truth is a propulsion set of the second world (benchmarks/watch_second_world.py: a DC motor
with back-EMF and winding resistance, an ESC with a dead zone and an efficiency, a propeller with
constant CT and CP), swept on its bench at three supply voltages in the bench's air, fitted by
`liftcal fit --vehicle` as a builder would, and asked for the electrical power of one rotor at the
vehicle's hover thrust in the site's air (another altitude and temperature). Printed per set: the
true ratio P_site / P_bench at that thrust, and the error of that ratio read from
  - the bench power model's own sqrt(rho_ref / rho) terms (the watch before: 'bench form'),
  - the watch's flight power model (estimator.watch.thrust_table.flight_power_model, the motor
    model's split of the terms that scale with the air: 'watch'),
and the watch's hover power at the site against the truth's (the bench fit's error included).
The implied mass reads about 2/3 of a hover-power error, the other way (T ~ P^(2/3)).

Usage: python benchmarks/site_power_study.py [SETS_PER_KIND] [--seed N]
"""

import json
import os
import random
import subprocess
import sys
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(HERE)
sys.path.insert(0, HERE)
sys.path.insert(0, ROOT)

import watch_second_world as world  # noqa: E402
from estimator.core.power_model import rotor_power_W  # noqa: E402
from estimator.watch.thrust_table import flight_power_model  # noqa: E402


def main(per_kind=6, seed=11):
    rng = random.Random(seed)
    tmp = tempfile.mkdtemp(prefix="site-power-")
    print("hover power in the site's air: invented truths of the second world, fitted by liftcal fit; folder %s" % tmp)
    print("%-6s %4s  rho bench -> site   true ratio | ratio error: bench form  watch | watch hover power error"
          % ("kind", "set"))
    worst = {"form": 0.0, "watch": 0.0, "power": 0.0}
    for k in range(per_kind):
        for kind in ("whoop", "racer", "hexa", "heavy"):
            truth = world.Truth(rng, kind)
            # the site: up to 3500 m, -5..35 C (the second world's own range ends at 2500 m)
            truth.alt, truth.temp = rng.uniform(0.0, 3500.0), rng.uniform(-5.0, 35.0)
            truth.rho = world.isa_density(truth.alt, truth.temp)
            stem = os.path.join(tmp, "%s-%d" % (kind, k))
            world.write_csv(stem + "-bench.csv", ["command[us]", "voltage[V]", "current[A]", "thrust[g]"],
                            world.bench_rows(truth, rng),
                            ["density: %.4f kg/m^3" % truth.rho_bench, "diameter: %.4f m" % truth.D])
            with open(stem + "-vehicle.json", "w") as f:
                json.dump(world.vehicle_json(truth), f)
            p = subprocess.run([sys.executable, "-m", "estimator", "fit", stem + "-bench.csv", "--vehicle",
                                stem + "-vehicle.json", "--out", stem + "-params.json"],
                               capture_output=True, text=True, cwd=ROOT)
            if p.returncode != 0:
                print("%-6s %4d  fit refused: %s" % (kind, k, p.stderr.strip()[:120]))
                continue
            with open(stem + "-params.json") as f:
                params = json.load(f)
            rho_b, rho_s = params["power_model"]["reference_density_kg_m3"], params["vehicle"]["site_density_kg_m3"]
            thrust = truth.mass * world.G / truth.rotors
            true_ratio = truth.hover_bus_power_W(thrust, rho_s) / truth.hover_bus_power_W(thrust, rho_b)
            form = rotor_power_W(params["power_model"], thrust, rho_s) / rotor_power_W(params["power_model"], thrust, rho_b)
            site_W = rotor_power_W(flight_power_model(params, "flat", rho_s), thrust, rho_s)
            watch = site_W / rotor_power_W(flight_power_model(params, "flat", rho_b), thrust, rho_b)
            power = site_W / truth.hover_bus_power_W(thrust, rho_s) - 1.0
            row = {"form": form / true_ratio - 1.0, "watch": watch / true_ratio - 1.0, "power": power}
            for key in worst:
                worst[key] = max(worst[key], abs(row[key]))
            print("%-6s %4d  %.3f -> %.3f   %.4f     | %+6.2f %%   %+6.2f %%  | %+6.2f %%" % (
                kind, k, rho_b, rho_s, true_ratio, 100 * row["form"], 100 * row["watch"], 100 * row["power"]))
            sys.stdout.flush()
    print("worst |ratio error|: bench form %.2f %%, watch %.2f %%; worst |watch hover power error| %.2f %%"
          % (100 * worst["form"], 100 * worst["watch"], 100 * worst["power"]))


if __name__ == "__main__":
    args = [a for a in sys.argv[1:] if a.isdigit()]
    seed = int(sys.argv[sys.argv.index("--seed") + 1]) if "--seed" in sys.argv else 11
    if "--seed" in sys.argv:
        args.remove(str(seed))
    main(int(args[0]) if args else 6, seed)
