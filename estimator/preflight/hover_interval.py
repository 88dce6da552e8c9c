"""The 95 % interval of a fitted hover command (estimator.preflight.measured_rotor).

+-1.96 standard errors, the standard error made of the model-form error (the motor fit's
robust thrust residual scale, times FORM_INFLATION, through dT/du at hover), of the
extrapolation beyond the sweep's top command (for a hover above it: _beyond_sweep_se), of the
extrapolation beyond the sweep's bus voltages (the share of the voltage outside the sweep times
EXTRAPOLATION_N_ERROR in the voltage exponent, or, for an exponent not measured (one supply
voltage), ln(V / V_ref) times its own standard error, whichever is larger) and, when the sweep
stepped the command one way only, of the rotor's lag (ONE_WAY_LAG_SE).
"""

import math

from estimator.core.constants import ONE_WAY_LAG_COMMAND_SE

INTERVAL_METHOD = ("+-1.96 standard errors of the motor model's hover command: model-form error (robust "
                   "thrust residual scale of the command levels x %.1f, through dT/du at hover), voltage "
                   "and command extrapolation beyond the sweep and, for a one-way sweep, the rotor's lag, in "
                   "quadrature; clipped to 0..1")
INTERVAL_SCOPE = "bench-fit and model-form uncertainty; not site, pack or prop-to-prop spread"
# measured on independent truths (benchmarks/fit_study.py): level residuals of neighbouring
# commands are correlated, and the hover point sits between levels [-]
FORM_INFLATION = 2.0
# uncertainty of the voltage exponent when the hover voltage lies beyond the sweep's [-]
EXTRAPOLATION_N_ERROR = 0.15
# a sweep that steps the command one way only cannot tell the rotor's lag behind the command
# from the curve itself (core.constants); up-and-down sweeps cancel it
ONE_WAY_LAG_SE = ONE_WAY_LAG_COMMAND_SE
# smallest standard error of a hover command: a tenth of a percent step of the command [-]
MIN_COMMAND_SE = 0.002
Z_95 = 1.959964  # two-sided 95 % point of the standard normal [-]


def _beyond_sweep_se(params, thrust_at, u_h, u1):
    """Relative thrust error [-] at a hover command u_h above the highest command swept: the
    full-command thrust's relative standard error (which carries the motor model's
    extrapolation beyond the sweep, bench.motor_errors.full_thrust_extrapolation) times the share
    of that extrapolation reached at hover, ln(T(u_h) / T_top) / ln(T(u1) / T_top), the same
    measure (speed ratio, T ~ n^2) the extrapolation's error grows with. 0 inside the sweep.
    thrust_at(u): the model's thrust [N] at command u and the hover bus voltage."""
    top = params["thrust_curve"].get("command_swept_max")
    if top is None or not u_h > top or not u1 > top:
        return 0.0
    t_top, t_h, t_full = thrust_at(top), thrust_at(u_h), thrust_at(u1)
    if not (t_top > 0.0 and t_full > t_h > t_top):
        return 0.0
    rel = params["standard_errors"]["thrust_max_N"] / params["thrust_curve"]["thrust_max_N"]
    return rel * math.log(t_h / t_top) / math.log(t_full / t_top)


def hover_interval(params, state):
    """95 % interval [lo, hi] of the hover command [-] and its standard error (module docstring).

    state: a hover state of estimator.preflight.measured_rotor (its rotor, hover command, bus
    voltage and thrust per rotor) with a hover command. Returns (interval, standard error [-]).
    """
    rotor, u_h, v_h = state["rotor"], state["command"], state["bus_V"]
    mm = params["motor_model"]
    # dT/du at hover from the model at the hover bus voltage (central difference of 0.01)
    def thrust_at(u):
        x = min(max((u - rotor.u0) / (rotor.u1 - rotor.u0), 0.0), 1.0)
        return rotor.at_motor_V(x ** rotor.g * v_h)[0]
    du = 0.01
    slope = (thrust_at(min(u_h + du, rotor.u1)) - thrust_at(max(u_h - du, rotor.u0))) / (
        min(u_h + du, rotor.u1) - max(u_h - du, rotor.u0))
    ratio = rotor.a / mm["thrust_per_V2_N"]  # site over bench density
    sigma_t = FORM_INFLATION * mm.get("thrust_residual_scale_N", 0.0) * ratio
    se_form = sigma_t / slope if slope > 0.0 else 0.0
    curve = params["thrust_curve"]
    lo_v, hi_v = curve.get("voltage_min_V", v_h), curve.get("voltage_max_V", v_h)
    beyond = max(0.0, math.log(lo_v / v_h), math.log(v_h / hi_v))
    t_h = state["thrust_per_rotor_N"]
    # a voltage exponent not measured (one supply) carries its own standard error over the
    # whole way from the reference voltage: d ln T = ln(V / V_ref) dn
    se_n = params.get("standard_errors", {}).get("voltage_exponent", 0.0)
    n_part = 0.0
    if curve.get("voltage_exponent_source") == "motor model":
        n_part = se_n * abs(math.log(v_h / curve.get("reference_voltage_V", v_h)))
    se_extra = max(EXTRAPOLATION_N_ERROR * beyond, n_part) * t_h / slope if slope > 0.0 else 0.0
    se_lag = 0.0 if mm.get("sweep_both_ways", True) else ONE_WAY_LAG_SE
    se_beyond = _beyond_sweep_se(params, thrust_at, u_h, rotor.u1) * t_h / slope if slope > 0.0 else 0.0
    se = math.sqrt(se_form ** 2 + se_extra ** 2 + se_lag ** 2 + se_beyond ** 2 + MIN_COMMAND_SE ** 2)
    return [max(0.0, u_h - Z_95 * se), min(1.0, u_h + Z_95 * se)], se
