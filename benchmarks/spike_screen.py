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

sys.path.insert(0, os.path.join(ROOT, "tests"))

from estimator.bench.levels import command_levels  # noqa: E402
from test_spike_screen import _sweep  # noqa: E402


def sweep(rng, spikes=0, reps=None):
    """(command, voltage, thrust, power, spike mask, clear-spike mask) of one invented sweep
    (tests/test_spike_screen.py makes it)."""
    u, v, noisy, power, bad, sigma, t = _sweep(rng, spikes, reps)
    step = np.unique(u, return_inverse=True)[1]
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
