"""Benchmark: honest bench rows dropped as spikes, and real spikes caught, by the level screen
(estimator.bench.levels.command_levels) on randomised sweeps invented here.

Each sweep (its own model, not the fit's): thrust T_max x^p above a dead zone (p 1.5..2.2,
T_max 0.3..300 N), power ~ T^1.5 (momentum theory), load-cell noise sigma = a + b T (a floor
of 0..0.4 % of T_max and 0.2..2 % of the load: common practice for strain-gauge cells, from
memory), power noise 0.2..2 %, 11..41 steps of 2..6 readings. Honest sweeps have no spike;
spiked sweeps have 2 rows moved by 8..30 % of T_max (3 readings per step). A spike is
"clear" when it is alone in its level and beyond 10 noise sigmas of the truth.
A Gaussian row beyond the screen's 6 robust sigmas has a probability of about 2e-9 (normal
table), so an honest sweep should lose no row.
Usage: .venv/bin/python benchmarks/spike_screen.py [SWEEPS]
"""

import os
import sys

import numpy as np

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, ROOT)

from estimator.bench.levels import command_levels  # noqa: E402


def sweep(rng, spikes=0, reps=None):
    """(command, voltage, thrust, power, spike mask, clear-spike mask) of one invented sweep."""
    steps = int(rng.integers(11, 42))
    reps = reps or int(rng.choice([2, 3, 3, 3, 4, 6]))
    t_max = float(np.exp(rng.uniform(np.log(0.3), np.log(300.0))))
    dead, p = rng.uniform(0.02, 0.12), rng.uniform(1.5, 2.2)
    u = np.repeat(np.linspace(0.0, 1.0, steps), reps)
    x = np.clip((u - dead) / (1.0 - dead), 0.0, 1.0)
    t = t_max * x ** p
    power = 0.5 + 4.0 * t_max * (t / t_max) ** 1.5
    sigma = rng.uniform(0.0, 0.004) * t_max + rng.uniform(0.002, 0.02) * t
    noisy = t + rng.normal(0.0, 1.0, u.size) * sigma
    power = power * (1.0 + rng.normal(0.0, rng.uniform(0.002, 0.02), u.size))
    v = 15.0 * (1.0 + rng.normal(0.0, 5e-4, u.size))
    bad = np.zeros(u.size, dtype=bool)
    if spikes:
        idx = rng.choice(np.flatnonzero(x > 0.2), size=spikes, replace=False)
        noisy[idx] += rng.choice([-1.0, 1.0], spikes) * rng.uniform(0.08, 0.3, spikes) * t_max
        bad[idx] = True
    step = np.repeat(np.arange(steps), reps)
    alone = np.array([np.count_nonzero(bad & (step == step[i])) == 1 for i in range(u.size)])
    clear = bad & alone & (np.abs(noisy - t) > 10.0 * sigma)
    return u, v, noisy, power, bad, clear


def main(argv):
    count = int(argv[0]) if argv else 300
    lost, worst, worst_seed, rows = 0, 0, None, 0
    for seed in range(count):
        u, v, t, p, _, _ = sweep(np.random.default_rng(seed))
        lv = command_levels(u, v, t, p)
        dropped = int(np.count_nonzero(lv["thrust_spike"] | lv["power_spike"]))
        lost += dropped > 0
        rows += dropped
        if dropped > worst:
            worst, worst_seed = dropped, seed
    print("honest sweeps: %d of %d lost rows as spikes (%.1f %%), %d rows in all, worst %d rows (seed %s)"
          % (lost, count, 100.0 * lost / count, rows, worst, worst_seed))
    caught = clear_n = honest_dropped = 0
    for seed in range(count):
        u, v, t, p, bad, clear = sweep(np.random.default_rng(10000 + seed), spikes=2, reps=3)
        lv = command_levels(u, v, t, p)
        flagged = lv["thrust_spike"] | lv["power_spike"]
        caught += int(np.count_nonzero(flagged & clear))
        clear_n += int(np.count_nonzero(clear))
        honest_dropped += int(np.count_nonzero(flagged & ~bad))
    print("spiked sweeps: %d of %d clear spikes caught (%.1f %%); %d honest rows dropped beside them"
          % (caught, clear_n, 100.0 * caught / max(clear_n, 1), honest_dropped))


if __name__ == "__main__":
    main(sys.argv[1:])
