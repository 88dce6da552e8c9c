"""The very large sweep path of the fits agrees with the reference path that iterates on every row.

A sweep of more than twice ``work_rows`` rows is fitted on a working subsample and finished
by one full-data Newton step (estimator.bench.robust, Bickel 1975 "One-step Huber estimates in the
linear model", from memory: the one-step estimate from a consistent start is asymptotically
the fully iterated M-estimate). Here a 20,000-row sweep is fitted both ways: with
work_rows = 5000 (the large path, working set every 4th row) and with work_rows so large
that every fit iterates on all rows (the reference, the plain definition); the fast path
must land within a small fraction of the reference's standard errors.
The sweep is continuous (commands spread over 0..1): on a stepped sweep the reference
itself is not unique to that level, since the joint (estimate, MAD scale) iteration has
fixed points a few tenths of a standard error apart (the MAD of clustered residuals moves
in jumps), and which one it reaches depends on its start.
Also checked against plain definitions: the reader's clean-file shortcut (one min and max
per column) against its row-by-row mask path, the O(n) median against numpy.median, the
one-sort voltage spread against bin-by-bin selection, and the partition binning of the
static-factor check against a full sort.
"""

import numpy as np
import pytest

from estimator.bench.reader import _row_checks, read_bench
from estimator.demo.bench_sim import SUPPLY_VOLTAGES_V
from estimator.demo.scenario import DEMO_VEHICLE
from estimator.demo.ramp_sweep import ramp_sweep_rows, write_ramp_csv
from estimator.bench.curve_fit import exact_median, voltage_spread_at_equal_command
from estimator.bench.sweep import fit_bench
from estimator.vehicle import check_vehicle

FAST_WORK_ROWS = 5000      # 20,000 rows // 5000: the working set is every 4th row
REFERENCE_WORK_ROWS = 10 ** 9


def _ramp_sweep(path, rows=20000, seed=3):
    """A continuous sweep (commands spread evenly over 0..1, as a slow ramp logs them) at the
    simulator's three supply voltages: the simulator's noise-free physics interpolated on a
    fine grid, sensor noise and a few gross spikes."""
    out = ramp_sweep_rows(rows, seed=seed, sample_s=0.01, thrust_spikes=12, current_spikes=12)
    write_ramp_csv(path, out, "invented test sweep", time_format="%.2f")


@pytest.fixture(scope="module")
def both(tmp_path_factory):
    path = str(tmp_path_factory.mktemp("large") / "sweep.csv")
    _ramp_sweep(path)
    data = read_bench(path)
    vehicle = check_vehicle(DEMO_VEHICLE, "demo")
    fast = fit_bench(data, path, vehicle=vehicle, work_rows=FAST_WORK_ROWS)
    ref = fit_bench(data, path, vehicle=vehicle, work_rows=REFERENCE_WORK_ROWS)
    return data, fast, ref


ESTIMATES = [("thrust_curve", name) for name in
             ("thrust_max_N", "quadratic_share", "command_min", "voltage_exponent")] + \
            [("power_model", name) for name in
             ("idle_power_W", "induced_W_per_N1_5", "copper_W_per_N2")] + \
            [("static_factor", name) for name in ("k0", "slope_per_N")]


@pytest.mark.parametrize("block,name", ESTIMATES)
def test_estimates_agree_within_a_tenth_of_a_standard_error(both, block, name):
    _, fast, ref = both
    se = ref["standard_errors"][name]
    # reference: the same fit iterated to convergence on all 20,000 rows. 0.1 SE: the
    # one-step finish from a 5,000-row working set leaves a second-order difference (seen
    # up to 0.025 SE here); a real slip (a wrong row set, a wrong Jacobian) moves it by more
    assert se > 0.0
    assert abs(fast[block][name] - ref[block][name]) < 0.1 * se, (fast[block][name], ref[block][name], se)


@pytest.mark.parametrize("name", ["thrust_max_N", "quadratic_share", "command_min", "voltage_exponent",
                                  "idle_power_W", "induced_W_per_N1_5", "copper_W_per_N2",
                                  "k0", "slope_per_N", "static_factor"])
def test_standard_errors_agree_within_five_percent(both, name):
    _, fast, ref = both
    # the reference's cluster-robust sandwich at its converged estimate; the fast path
    # takes it at the working-set estimate: a few percent at most (seen up to 2.2 %); a
    # sandwich with a wrong bread or wrong clusters is off by far more
    assert fast["standard_errors"][name] == pytest.approx(ref["standard_errors"][name], rel=0.05)


def test_hover_command_and_its_interval_agree(both):
    _, fast, ref = both
    hf, hr = fast["hover"], ref["hover"]
    lo, hi = hr["hover_command_interval_95"]
    se = (hi - lo) / (2 * 1.959964)  # the reference's delta-method SE of the hover command
    assert se > 0.0
    # within a tenth of the reference's standard error, for the same reason as the estimates
    # (seen up to 0.04 SE)
    assert abs(hf["hover_command"] - hr["hover_command"]) < 0.1 * se
    for a, b in zip(hf["hover_command_interval_95"], hr["hover_command_interval_95"]):
        assert abs(a - b) < 0.1 * se


def test_rows_used_and_rejected_agree(both):
    data, fast, ref = both
    qf, qr = fast["fit_quality"], ref["fit_quality"]
    # the 12 gross load-cell spikes (+3 N, about 40 noise sigmas) are found by both paths
    assert qf["rejected"].get("thrust_spike") == qr["rejected"].get("thrust_spike")
    assert qr["rejected"].get("thrust_spike", 0) >= 10
    # the fast path places the spike edges at its working-set estimate, the reference at its
    # own: rows right at a 6-sigma edge may fall either way, two at most (equal here)
    assert abs(qf["rows_used"] - qr["rows_used"]) <= 2
    assert abs(qf["rms_residual_N"] / qr["rms_residual_N"] - 1.0) < 0.01
    assert fast["power_model"]["residual_rel_std"] == pytest.approx(ref["power_model"]["residual_rel_std"], rel=0.01)


def test_clean_file_shortcut_equals_the_row_by_row_checks(both):
    data, _, _ = both
    # a clean file skips the masks; the plain row-by-row checks must find nothing to drop
    # and return the very same arrays
    raw = {"command": data["command"], "voltage": data["voltage_V"],
           "current": data["power_W"] / data["voltage_V"], "thrust": data["thrust_N"]}
    u, v, t, p, rejected, n_keep = _row_checks("s.csv", raw, data["rows_total"])
    assert data["rejected"] == {} and rejected == {} and n_keep == data["rows_total"]
    assert np.array_equal(u, data["command"]) and np.array_equal(t, data["thrust_N"])
    assert np.allclose(p, data["power_W"], rtol=1e-14, atol=0.0)


@pytest.mark.parametrize("n", [1001, 1000, 20000, 20001])
def test_exact_median_equals_numpy_median(n):
    rng = np.random.default_rng(n)
    values = np.round(rng.normal(15.0, 0.5, n), 3)  # rounded: ties, as in a CSV
    # numpy.median is the definition; one selection gives the very same value
    assert exact_median(values) == float(np.median(values))


def test_voltage_spread_equals_bin_by_bin_selection():
    rng = np.random.default_rng(4)
    u = rng.uniform(0.0, 1.0, 50000)
    v = rng.choice(SUPPLY_VOLTAGES_V, u.size) - 0.3 * u + rng.normal(0.0, 0.01, u.size)
    # the plain definition (docstring of voltage_spread_at_equal_command), exactly
    index = np.minimum((u * 20).astype(np.intp), 19)
    spreads = []
    for b in range(20):
        vb = v[index == b]
        p10, p50, p90 = np.percentile(vb, [10.0, 50.0, 90.0])
        spreads.append((p90 - p10) / p50)
    assert voltage_spread_at_equal_command(u, v) == float(np.median(spreads))


def test_static_factor_bins_equal_a_full_sort(tmp_path):
    from estimator.bench.power_fit import K_MIN_THRUST_SHARE, check_static_factor, static_factors

    rng = np.random.default_rng(6)
    t = rng.uniform(0.0, 20.0, 3000)
    p = (t / 0.6) ** 1.5 * 4.0 * (1.0 + 0.05 * rng.normal(size=t.size))
    rho, area = 1.2, 0.05
    k_med = check_static_factor("s.csv", t, p, rho, area)
    # reference: bins from a full sort by thrust (np.argsort), as the check's docstring says
    top = float(np.percentile(t, 99.0))
    sel = t > K_MIN_THRUST_SHARE * top
    k = static_factors(t[sel], p[sel], rho, area)
    assert k_med == float(np.median(k))
    worst = max(float(np.median(b)) for b in np.array_split(k[np.argsort(t[sel])], 10))
    # k scales as area^(-1/3): an area that puts the sorted worst bin 0.1 % above 1 must be
    # refused, 0.1 % below accepted (continuous thrusts: no ties, so the bins are the same sets)
    from estimator.errors import InputError
    with pytest.raises(InputError, match="above 1"):
        check_static_factor("s.csv", t, p, rho, area * (worst / 1.001) ** 3)
    check_static_factor("s.csv", t, p, rho, area * (worst / 0.999) ** 3)


@pytest.mark.parametrize("share", [0.0, 0.001, 0.05, 0.5])
def test_working_rows_are_every_kth_kept_row(share):
    from estimator.bench.robust import working_rows

    rng = np.random.default_rng(7)
    exclude = rng.uniform(size=123457) < share
    exclude[-2:] = True
    # the plain definition: list the kept rows, take every k-th (k = kept // work_rows)
    kept = np.flatnonzero(~exclude)
    assert np.array_equal(working_rows(exclude.size, 37, exclude), kept[:: kept.size // 37])
