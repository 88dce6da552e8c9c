"""The pure math of benchmarks/watch_bound.py (the detection-delay bounds of the power watch),
checked against published results and independent computations (the study itself is a
benchmark, not a test)."""

import importlib.util
import math
import os

import numpy as np
import pytest
from scipy import integrate, stats

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def _load():
    spec = importlib.util.spec_from_file_location(
        "watch_bound_math", os.path.join(ROOT, "benchmarks", "watch_bound_math.py"))
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


wb = _load()


def test_the_tuned_cusum_approaches_lordens_bound_as_false_alarms_grow_rare():
    # Lorden (1971): the CUSUM with k = delta / 2 attains ln(gamma) / I asymptotically. Its delay by
    # Siegmund's approximation (Siegmund 1985, sec. X.2) exceeds the bound by an overshoot term that
    # shrinks relative to ln(gamma): ratio above 1, and falling towards 1 as gamma grows
    ratios = []
    for rate in (1e-2, 1e-6, 1e-12, 1e-30):
        bound = wb.lorden_delay_s(0.1, 0.05, 0.5, rate)
        cusum = wb.cusum_delay_s(0.1, 0.05, 0.5, rate)
        ratios.append(cusum / bound)
    assert all(r > 1.0 for r in ratios)
    assert ratios == sorted(ratios, reverse=True)
    assert ratios[-1] < 1.1


def test_lordens_bound_has_the_gaussian_kl_information():
    # I = delta^2 / (2 sigma^2) per block (Kullback-Leibler divergence of two normals with equal
    # variance, checked by numerical integration with scipy), gamma = blocks per hour / rate
    delta, sigma, block, rate = 0.1, 0.08, 0.5, 1e-6
    kl, _ = integrate.quad(lambda x: stats.norm.pdf(x, delta, sigma) * (stats.norm.logpdf(x, delta, sigma)
                                                                        - stats.norm.logpdf(x, 0.0, sigma)),
                           -1.0, 1.0)
    gamma = 3600.0 / block / rate
    assert wb.lorden_delay_s(delta, sigma, block, rate) == pytest.approx(block * math.log(gamma) / kl, rel=1e-6)


def test_the_ideal_delay_quantile_is_the_first_passage_of_a_gaussian_random_walk():
    # Monte Carlo (numpy, independent of scipy's inverse Gaussian): a walk with drift I and variance
    # 2 I per step, small steps so that the overshoot is small; its 95 % first-passage time
    delta, sigma, block, rate = 0.02, 0.1, 0.5, 1e-2          # I = 0.02 per block
    info = delta ** 2 / (2 * sigma ** 2)
    a = math.log(3600.0 / block / rate)
    rng = np.random.default_rng(7)
    walk = np.cumsum(info + math.sqrt(2 * info) * rng.standard_normal((2000, 5000)), axis=1)
    reached = (walk >= a).any(axis=1)
    assert reached.mean() > 0.99
    first = np.where(reached, np.argmax(walk >= a, axis=1) + 1, 10 ** 9)
    q95 = block * np.quantile(first, 0.95)
    # tolerance: Monte Carlo spread of a 95 % point from 2000 runs (about 3 %) plus the overshoot
    assert wb.ideal_delay_quantile_s(delta, sigma, block, rate, 0.95) == pytest.approx(q95, rel=0.06)


def test_long_run_factor_of_an_ar1_series_matches_the_bartlett_weighted_sum():
    # AR(1) with coefficient phi: rho_k = phi^k (textbook, e.g. Hamilton, Time Series Analysis 1994,
    # from memory); Bartlett weights 1 - k / (K + 1) (Newey & West 1987) give
    # 1 + 2 sum (1 - k / (K + 1)) phi^k; gaps (NaN) must not break the pairs
    phi, lags = 0.6, 20
    rng = np.random.default_rng(3)
    x = np.zeros((40, 5000))
    e = rng.standard_normal(x.shape)
    for j in range(1, x.shape[1]):
        x[:, j] = phi * x[:, j - 1] + e[:, j]
    x[:, 1000:1010] = np.nan
    expected = 1 + 2 * sum((1 - k / (lags + 1)) * phi ** k for k in range(1, lags + 1))
    assert wb.long_run_factor(x, lags) == pytest.approx(expected, rel=0.04)
    white = rng.standard_normal((40, 5000))
    assert wb.long_run_factor(white, lags) == pytest.approx(1.0, abs=0.06)


def test_student_t_information_matches_a_numerical_fisher_information():
    # J = E[(d/dmu ln f)^2] of a Student-t location by numerical integration (scipy.integrate.quad
    # of the analytic score), against the fitted sigma_J = J^-1/2 of a large t sample; and for
    # Gaussian data sigma_J is the standard deviation
    nu, s = 4.0, 0.05
    score = lambda x: (nu + 1) * x / (nu * s * s + x * x)     # d/dx of -ln f for t(nu, 0, s)
    j, _ = integrate.quad(lambda x: stats.t.pdf(x, nu, scale=s) * score(x) ** 2, -np.inf, np.inf)
    rng = np.random.default_rng(11)
    sample = stats.t.rvs(nu, scale=s, size=10000, random_state=rng)
    # tolerance: the maximum-likelihood fit's spread from 10000 points is about 1.5 %
    assert wb.t_fisher_sigma(sample) == pytest.approx(j ** -0.5, rel=0.05)
    gauss = 0.07 * rng.standard_normal(10000)
    assert wb.t_fisher_sigma(gauss) == pytest.approx(np.std(gauss), rel=0.05)


def test_ramp_share_is_where_the_accumulated_information_reaches_ln_gamma():
    # integral_0^t (b s)^2 / (2 sigma_LR^2) ds = ln(gamma), by scipy.integrate.quad at the returned t
    b, lr2, rate, block = 0.15 / 300.0, 0.004, 1e-6, 0.5
    share = wb.ramp_share_bound(b, lr2, rate, block)
    t = share / b
    info, _ = integrate.quad(lambda s: (b * s) ** 2 / (2 * lr2), 0.0, t)
    assert info == pytest.approx(math.log(3600.0 / block / rate), rel=1e-9)
