"""The fits' analytic derivatives against scipy's numerical differentiation.

The motor + propeller model and the thrust curve give least_squares their own Jacobians
(estimator.bench.rotor_model.rotor_jacobian, estimator.bench.curve_fit.curve_jacobian). Each is
checked here against central differences (f(p + h) - f(p - h)) / 2h, error O(h^2) (the
textbook formula, e.g. Press et al., Numerical Recipes, 3rd ed., sec. 5.7) at random parameters, commands
on both sides of spin-up and the ESC's top end point, and supply voltages from 1 to 24 cells.
"""

import numpy as np
import pytest

from estimator.bench.curve_fit import curve_jacobian, curve_thrust
from estimator.bench.rotor_model import rotor_arrays, rotor_jacobian, unpack as _unpack


def approx_derivative(f, p, method="3-point"):
    """Central differences, one column per parameter, step 1e-6 (1 + |p|)."""
    cols = []
    for k in range(p.size):
        h = 1e-6 * (1.0 + abs(p[k]))
        up, dn = p.copy(), p.copy()
        up[k] += h
        dn[k] -= h
        cols.append((f(up) - f(dn)) / (2.0 * h))
    return np.column_stack(cols)


def _random_motor(rng):
    """Packed parameters (logs of the positive ones) over micro to large rotors."""
    return np.array([np.log(rng.uniform(1e-4, 2.0)), np.log(rng.uniform(1e-4, 2.0)),
                     np.log(rng.uniform(0.005, 1.0)), np.log(rng.uniform(0.05, 3.0)),
                     rng.uniform(0.0, 0.2), rng.uniform(0.8, 1.0), rng.uniform(0.7, 1.6),
                     np.log(rng.uniform(0.005, 0.3)), np.log(rng.uniform(1e-4, 0.1))])


def _kink_free(u, p):
    """Commands away from the model's kinks (spin-up, top end point, rotor start), where the
    numerical derivative straddles two branches."""
    u0, u1 = p[4], p[5]
    return (np.abs(u - u0) > 1e-3) & (np.abs(u - u1) > 1e-3)


@pytest.mark.parametrize("seed", range(8))
def test_motor_jacobian_matches_central_differences(seed):
    rng = np.random.default_rng(seed)
    p = _random_motor(rng)
    u = rng.uniform(0.0, 1.05, 60)
    v = 3.7 * rng.integers(1, 25, 60) * rng.uniform(0.85, 1.15, 60)
    keep = _kink_free(u, p)
    # rows where the drive is within reach of the resistive threshold are kinks too
    theta = _unpack(p)
    _, _, vm, _, _ = rotor_arrays(theta, u, v)
    keep &= np.abs(vm - theta[2] * theta[3]) > 1e-3 * np.maximum(vm, 1e-9)
    u, v = u[keep], v[keep]
    _, _, jt, ji = rotor_jacobian(p, u, v)
    num_t = approx_derivative(lambda q: rotor_arrays(_unpack(q), u, v)[0], p, method="3-point")
    num_i = approx_derivative(lambda q: rotor_arrays(_unpack(q), u, v)[1], p, method="3-point")
    assert np.allclose(jt, num_t, rtol=1e-5, atol=1e-7 * np.max(np.abs(num_t)))
    assert np.allclose(ji, num_i, rtol=1e-5, atol=1e-7 * np.max(np.abs(num_i)))


@pytest.mark.parametrize("seed", range(8))
def test_curve_jacobian_matches_central_differences(seed):
    rng = np.random.default_rng(100 + seed)
    theta = np.array([rng.uniform(0.3, 400.0), rng.uniform(0.0, 1.0), rng.uniform(0.0, 0.3), rng.uniform(0.6, 2.5)])
    u_max = rng.uniform(0.85, 1.0)
    u = rng.uniform(0.0, 1.0, 50)
    u = u[(np.abs(u - theta[2]) > 1e-3) & (np.abs(u - u_max) > 1e-3)]
    log_v = np.log(rng.uniform(0.8, 1.2, u.size))
    jac = curve_jacobian(theta, u, log_v, u_max)
    num = approx_derivative(lambda q: curve_thrust(q, u, log_v, u_max), theta, method="3-point")
    assert np.allclose(jac, num, rtol=1e-5, atol=1e-8 * theta[0])


def test_a_wrong_derivative_is_caught():
    """Negative control: the comparison above fails for a Jacobian with one column wrong."""
    rng = np.random.default_rng(7)
    theta = np.array([20.0, 0.6, 0.1, 1.5])
    u = np.linspace(0.15, 0.95, 30)
    log_v = np.log(rng.uniform(0.9, 1.1, u.size))
    jac = curve_jacobian(theta, u, log_v, 1.0)
    jac[:, 2] *= 1.01
    num = approx_derivative(lambda q: curve_thrust(q, u, log_v, 1.0), theta, method="3-point")
    assert not np.allclose(jac, num, rtol=1e-5, atol=1e-8 * theta[0])
