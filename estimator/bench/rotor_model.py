"""The DC motor + propeller model of a bench sweep in back-EMF form (the model bench.motor_fit
fits; its equations and sources: that module's docstring) over a sweep's rows: thrust and bus
current per row (the forward equations: core.fitted_rotor.motor_point, with the command's duty
here), their derivatives in the packed fit parameters, and the voltage and density exponents it
implies."""

import math

import numpy as np

from estimator.core.fitted_rotor import motor_point

NAMES = ("thrust_per_V2_N", "current_per_V2_A", "resistance_ohm", "no_load_current_A",
         "command_start", "command_top", "duty_exponent", "esc_idle_current_A", "speed_current_A_per_V")


def rotor_arrays(theta, command, voltage_V, density_ratio=1.0):
    """Thrust [N], bus current [A], motor voltage [V], motor current [A] and duty [-] per row.

    theta: the nine parameters in NAMES order (linear values); command: u [-]; voltage_V:
    bus voltage [V]; density_ratio: rho / rho_ref [-] (a and c scale with it).
    """
    a, c, r, i0, u0, u1, g, iq, b = theta
    a, c = a * density_ratio, c * density_ratio
    x = np.clip((np.asarray(command, dtype=float) - u0) / max(u1 - u0, 1e-6), 0.0, 1.0)
    d = x ** g
    vm = d * voltage_V
    t, im = motor_point(a, c, r, i0, b, vm, np.sqrt)
    return t, iq + d * im, vm, im, d


def rotor_jacobian(p, command, voltage_V):
    """Thrust [N], bus current [A] and their derivatives with respect to the packed fit
    parameters p (NAMES order; logarithms of the positive ones, as fit_motor varies them).

    Returns (T, I_bus, dT/dp, dI_bus/dp), the derivative arrays rows x 9. Implicit
    differentiation of the speed equation F(s) = R c s^2 + (1 + R b) s - (Vm - R I0) = 0:
    ds/dq = -(dF/dq) / (2 R c s + 1 + R b), the denominator being the square root of
    rotor_arrays; below spin-up (Vm <= R I0) s = 0 and the motor current is Vm / R.
    """
    theta = unpack(p)
    a, c, r, i0, u0, u1, g, iq, b = theta
    u = np.asarray(command, dtype=float)
    t, i_bus, vm, im, d = rotor_arrays(theta, u, voltage_V)
    span = max(u1 - u0, 1e-6)
    x = (u - u0) / span
    inside = (x > 0.0) & (x < 1.0)
    x = np.clip(x, 0.0, 1.0)
    safe_x = np.where(x > 0.0, x, 1.0)
    dd_dx = np.where(inside, g * d / safe_x, 0.0)
    dd = {4: dd_dx * (x - 1.0) / span, 5: -dd_dx * x / span,
          6: np.where(x > 0.0, d * np.log(safe_x), 0.0)}
    on = vm - r * i0 > 0.0
    s = np.where(on, np.sqrt(np.maximum(t, 0.0) / a), 0.0)
    root = 2.0 * r * c * s + 1.0 + r * b
    q = b + 2.0 * c * s                       # d im / d s on the running branch
    # d s / d q and the explicit d im / d q (running branch), for the motor's own parameters
    ds = {1: -r * s * s / root, 2: -(c * s * s + b * s + i0) / root, 3: -r / root, 8: -r * s / root}
    dim = {1: s * s + q * ds[1], 2: np.where(on, q * ds[2], -vm / (r * r)), 3: np.where(on, 1.0 + q * ds[3], 0.0),
           8: s + q * ds[8]}
    jt, ji = np.zeros((u.size, 9)), np.zeros((u.size, 9))
    jt[:, 0] = t
    for k, scale in ((1, c), (2, r), (3, i0), (8, b)):
        jt[:, k] = 2.0 * a * s * ds[k] * scale
        ji[:, k] = d * dim[k] * scale
    for k, dd_k in dd.items():
        dvm = dd_k * voltage_V
        ds_k = np.where(on, dvm / root, 0.0)
        jt[:, k] = 2.0 * a * s * ds_k
        ji[:, k] = im * dd_k + d * np.where(on, q * ds_k, dvm / r)
    ji[:, 7] = iq
    return t, i_bus, jt, ji


def unpack(p):
    """Linear parameters (NAMES order) from the packed ones fit_motor varies (logarithms of the
    positive ones)."""
    a, c, r, i0, u0, u1, g, iq, b = p
    return (math.exp(a), math.exp(c), math.exp(r), math.exp(i0), u0, u1, g, math.exp(iq), math.exp(b))


def motor_exponents(theta, v_ref):
    """Voltage and density exponents of the fitted motor model at full command and v_ref [V]:
    n = d ln T / d ln V, m = d ln T / d ln rho by central differences of +-1 % [-]."""
    h = 0.01
    one = np.array([1.0])
    t_up = rotor_arrays(theta, one, v_ref * (1.0 + h))[0][0]
    t_dn = rotor_arrays(theta, one, v_ref * (1.0 - h))[0][0]
    r_up = rotor_arrays(theta, one, v_ref, 1.0 + h)[0][0]
    r_dn = rotor_arrays(theta, one, v_ref, 1.0 - h)[0][0]
    scale = math.log((1.0 + h) / (1.0 - h))
    return math.log(t_up / t_dn) / scale, math.log(r_up / r_dn) / scale
