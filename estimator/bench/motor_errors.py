"""Standard errors of what the fitted motor model implies beyond its parameters, by the delta
method on the fit's covariance (bench.motor_fit): the voltage and density exponents, and the
thrust at full command when the sweep stops short of it."""

import math

import numpy as np

from estimator.bench.rotor_model import motor_exponents, rotor_arrays, unpack

# how far a fixed-pitch propeller's thrust coefficient may drift as a power of its speed,
# CT ~ n^e (full_thrust_extrapolation; Brandt and Selig 2011, from memory) [-]
CT_SPEED_EXPONENT = 0.05


def exponent_errors(motor, v_ref):
    """Standard errors of the motor model's voltage and density exponents (motor_exponents)
    at v_ref [V] from the fit's covariance (with the duty prior where the sweep has one
    voltage) by the delta method (delta_errors) [-]. Returns (se_n, se_m)."""
    se = delta_errors(motor, lambda theta: np.array(motor_exponents(theta, v_ref)))
    return (1.0, 1.0) if se is None else (float(se[0]), float(se[1]))


def delta_errors(motor, values):
    """Standard errors of values(theta) (an array) from the fit's covariance by the delta
    method: var = grad C grad^T, the gradient by central differences in the packed parameters
    (steps of 1e-4, relative for the logarithms). None when the variance is not finite."""
    cov = motor["covariance"]
    x = np.asarray(motor["x"], dtype=float)
    grad = None
    for k in range(x.size):
        if cov[k, k] <= 0.0:
            continue
        step = 1e-4
        up, dn = x.copy(), x.copy()
        up[k] += step
        dn[k] -= step
        g = (values(unpack(up)) - values(unpack(dn))) / (2.0 * step)
        if grad is None:
            grad = np.zeros((g.size, x.size))
        grad[:, k] = g
    if grad is None:
        return np.zeros(values(unpack(x)).size)
    var = np.einsum("ij,jk,ik->i", grad, cov, grad)
    if not np.all(np.isfinite(var)):
        return None
    return np.sqrt(np.maximum(var, 0.0))


def full_thrust_extrapolation(motor, v_ref, swept_top):
    """The motor model's thrust at full command (its top end point u1) and v_ref [V] when the
    sweep stops at command swept_top [-] below it, with its standard error [N], two parts in
    quadrature:
      - the fit's covariance by the delta method (delta_errors): noise, the level misfit and,
        with one supply, the duty prior, carried out along the duty curve to u1;
      - the propeller's own drift: the model holds the thrust and torque coefficients
        constant, while a fixed-pitch propeller's CT changes with speed (Reynolds number) by
        up to CT_SPEED_EXPONENT as a power of speed (Brandt and Selig 2011 measured small
        propellers' CT rising a few percent per doubling of rpm; from memory): a relative
        error of CT_SPEED_EXPONENT ln(n_full / n_top), with speed n ~ sqrt(T) (T = CT rho n^2 D^4).
    Returns dict thrust_N [N], standard_error_N [N], thrust_top_N [N] (the model at the sweep's
    top), covariance_error_N [N], speed_ratio [-]."""
    theta = motor["theta"]
    u1 = float(theta[5])

    def thrusts(th):
        return rotor_arrays(th, np.array([u1, swept_top]), v_ref)[0]

    t_full, t_top = (float(x) for x in thrusts(theta))
    se = delta_errors(motor, lambda th: thrusts(th)[:1])
    se_cov = float(se[0]) if se is not None else math.inf
    ratio = math.sqrt(t_full / t_top) if t_top > 0.0 and t_full > t_top else 1.0
    se_drift = CT_SPEED_EXPONENT * math.log(ratio) * t_full
    return {"thrust_N": t_full, "standard_error_N": math.hypot(se_cov, se_drift), "thrust_top_N": t_top,
            "covariance_error_N": se_cov, "speed_ratio": ratio}
