"""A modest randomised study of the bench fit on independent truths (tests/truth_rotor.py);
benchmarks/fit_study.py runs the same on 200 and more. Bounds and the model behind each
check: tests/truth_study.py. The study is seeded (deterministic) and prints its worst cases.
"""

from truth_study import BOUNDS, report_lines, run_one, summarise

SEEDS = range(900, 924)


def test_every_ordinary_sweep_fits_within_the_bounds_and_the_interval_covers(capsys):
    results = [run_one(seed, rows=None if seed % 4 else 3000) for seed in SEEDS]
    summary = summarise(results)
    with capsys.disabled():
        print("\n" + "\n".join(report_lines(summary)))
    assert summary["fitted"] == summary["truths"], [f["failed"] for f in summary["failed"]]
    for key, bound in BOUNDS.items():
        assert summary[key]["worst"] <= bound, (key, summary[key])
    # the 95 % interval holds the truth's hover command in at least 90 % of the truths
    assert summary["coverage"] >= 0.9
    # and so do T_max +- 1.96 standard errors and the spin-up command +- 1.96 standard errors
    assert summary["thrust_max_coverage"] >= 0.9
    assert summary["spin_up_coverage"] >= 0.9
    # on a pack 13 % below the sweep's lowest bus voltage the hover command (of the exported
    # curve and of the motor model) keeps the hover-command bound, one supply or three; with
    # one supply the voltage exponent (not measured: the motor model's, the duty law held
    # near linear) stays within 0.25 of the truth's d ln T / d ln V (the 200-truth study's
    # worst is 0.23; it was 0.50 when the duty exponent was left free)
    for name in ("one_supply", "three_supply"):
        group = summary[name]
        assert group["sag_curve"][0] <= BOUNDS["hover_command"], (name, group)
        assert group["sag_motor"][0] <= BOUNDS["hover_command"], (name, group)
    assert abs(summary["one_supply"]["n_worst"]) <= 0.25, summary["one_supply"]
