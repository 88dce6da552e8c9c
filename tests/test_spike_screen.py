"""Honest rows are not dropped as spikes; real spikes still are (new-user trial item 5).

Sweeps invented here, independently of the fit: thrust T_max x^p above a dead zone, power
~ T^1.5 (momentum theory), load-cell noise with a floor and a share growing with the load
(sigma = a + b T: common practice for strain-gauge load cells, from memory), current noise
relative, 2..6 readings per step. A Gaussian row beyond 6 robust sigmas of its level has a
probability of about 2e-9 (normal distribution table), so honest rows are almost never
dropped once the scale follows the noise at each thrust.
"""

import numpy as np

from estimator.bench.levels import command_levels


def _sweep(rng, spikes=0, reps=None):
    """(command [-], voltage [V], thrust [N], power [W], spike mask, thrust noise sigma [N],
    noiseless thrust [N]) of one invented sweep; also used by benchmarks/spike_screen.py."""
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
    return u, v, noisy, power, bad, sigma, t


def test_one_percent_noise_three_readings_drops_no_honest_row():
    # the trial's case: 1 % Gaussian thrust noise, 3 readings per step
    for seed in range(40):
        rng = np.random.default_rng(seed)
        u = np.repeat(np.linspace(0.0, 1.0, 21), 3)
        t = 12.0 * np.clip((u - 0.08) / 0.92, 0.0, 1.0) ** 2
        t = t * (1.0 + rng.normal(0.0, 0.01, u.size))
        p = (3.0 + 20.0 * t ** 1.5) * (1.0 + rng.normal(0.0, 0.01, u.size))
        lv = command_levels(u, np.full(u.size, 15.0), t, p)
        assert not (lv["thrust_spike"] | lv["power_spike"]).any(), seed


def test_randomised_honest_sweeps_lose_almost_no_rows_and_spikes_are_caught():
    honest_hit, clear, caught = 0, 0, 0
    for seed in range(200):
        rng = np.random.default_rng(seed)
        u, v, t, p, bad, _, _ = _sweep(rng)
        lv = command_levels(u, v, t, p)
        honest_hit += bool((lv["thrust_spike"] | lv["power_spike"]).any())
        rng = np.random.default_rng(10000 + seed)
        u, v, t, p, bad, sigma, truth = _sweep(rng, spikes=2, reps=3)
        lv = command_levels(u, v, t, p)
        flagged = lv["thrust_spike"] | lv["power_spike"]
        level = lv["row_level"]
        # a spike can be judged when it is alone in its level (two in a level of three
        # outvote the honest row) and 10 noise sigmas from the truth
        alone = np.array([np.count_nonzero(bad & (level == level[i])) == 1 for i in range(u.size)])
        judge = bad & alone & (np.abs(t - truth) > 10.0 * sigma)
        clear += int(np.count_nonzero(judge))
        caught += int(np.count_nonzero(flagged & judge))
    # before: 72 of 200 honest sweeps lost rows (worst 18 rows); goal: almost none
    assert honest_hit <= 4, honest_hit
    assert caught >= 0.95 * clear, (caught, clear)
