"""From a bench CSV to a parameter set (model ``liftcal.rotor/1``): the whole fit pipeline.

read (estimator.bench.reader) -> static-factor plausibility (k <= 1, unit slips) -> command
levels (estimator.bench.levels) -> DC motor + propeller model (estimator.bench.motor_fit,
liftcal's own predictions) -> the controller's quadratic (estimator.bench.curve_fit) ->
power model and k(T) (estimator.bench.power_fit) -> parameter set (estimator.params.build_params).
The vehicle's hover values are added afterwards by the command that chains the flows
(estimator.commands.bench.fit_for_vehicle: pre-flight hover_block, then params.add_vehicle); the
bench flow never imports the pre-flight flow.
"""

import math
from collections import namedtuple

import numpy as np

from estimator.errors import InputError
from estimator.core.momentum import disk_area_m2
from estimator.bench.curve_fit import (MIN_VOLTAGE_SPREAD, check_rising, fit_quadratic, thrust_model_N,
                                       voltage_spread)
from estimator.bench.levels import command_levels
from estimator.bench.load_cell import check_thrust_sign, tare_warning
from estimator.bench.wording import command_text, command_with_error, thrust_text
from estimator.bench.motor_fit import (DUTY_INDEX, DUTY_PRIOR, exponent_errors, fit_motor, motor_exponents,
                                       params_dict, rotor_arrays)
from estimator.bench.power_fit import (MAD_ROWS, check_static_factor, fit_power_model, fit_static_factor,
                                       power_model_W, watch_residual_rel_std)

# the sweep shows the ESC's top end point when the motor fit puts it this far below the
# highest command swept [-]
TOP_END_MARGIN = 0.01
# a sweep whose highest command is at least this reaches full command [-]
FULL_COMMAND_SWEPT = 0.98
# a spin-up command whose standard error exceeds this (a 95 % interval wider than +-0.05) is
# called poorly determined: the sweep cannot tell where the ESC's duty starts from the shape
# of its duty curve (the duty exponent) [-]
START_POORLY_DETERMINED = 0.025


# the rows a fit read, in SI (command [-], voltage_V [V], thrust_N [N], power_W [W]), and
# which of them it used (False for a spike): what the plot step draws (estimator.bench.plots)
Rows = namedtuple("Rows", "command voltage_V thrust_N power_W used")
# what fit_sweep returns: the parameter set (not yet written), the rows, and the CSV's
# columns as the reader took them ({fitted, read_not_used: ["name[unit]", ...]})
SweepFit = namedtuple("SweepFit", "params rows columns")


def fit_sweep(path, diameter_m=None, default_diameter_m=None, density_kg_m3=None, altitude_m=None,
              temperature_C=None, pressure_Pa=None, humidity_pct=None, voltage_exponent=None):
    """Fit a bench CSV: a SweepFit (the parameter-set dict, not yet written, see
    params.write_params; the rows for a plot; the columns read).

    path: bench CSV; diameter_m: propeller diameter [m] (else ``# diameter:``, else
    default_diameter_m, e.g. the vehicle's propeller); density_kg_m3 [kg/m^3] / altitude_m [m] /
    temperature_C [C] / pressure_Pa [Pa]
    / humidity_pct [%]: bench air overriding the file; voltage_exponent: fix n [-].
    Raises InputError on bad or impossible data.
    """
    from estimator.bench.reader import read_bench

    data = read_bench(path, diameter_m=diameter_m, density_kg_m3=density_kg_m3,
                      altitude_m=altitude_m, temperature_C=temperature_C,
                      pressure_Pa=pressure_Pa, humidity_pct=humidity_pct)
    if data["diameter_m"] is None:
        data["diameter_m"] = default_diameter_m
    if data["diameter_m"] is None:
        raise InputError("%s: the propeller diameter is needed for the static thrust factor; "
                         "add '# diameter: 10in' to the CSV, or pass --diameter or --vehicle" % path)
    params, rows = _fit_or_refuse(data, path, voltage_exponent)
    return SweepFit(params, rows, data["columns"])


def fit_bench_file(path, **options):
    """Fit a bench CSV and return the parameter-set dict (fit_sweep's options)."""
    return fit_sweep(path, **options).params


def fit_bench(data, source, voltage_exponent=None):
    """Fit the arrays returned by estimator.bench.read_bench; the parameter-set dict."""
    return _fit_or_refuse(data, source, voltage_exponent)[0]


def _fit_or_refuse(data, source, voltage_exponent):
    """(parameter set, Rows). Floating-point trouble on pathological data (overflow, a
    singular system) becomes an InputError: the sweep cannot be fitted, and nothing is written.
    """
    try:
        with np.errstate(all="ignore"):
            params, rows = _fit_bench(data, source, voltage_exponent)
    except (np.linalg.LinAlgError, FloatingPointError, OverflowError, ZeroDivisionError,
            ValueError) as exc:
        raise InputError("%s: the sweep cannot be fitted (%s); check that command, voltage, "
                         "current and thrust hold a real sweep from idle to full command"
                         % (source, exc)) from None
    _check_finite(params, source)
    return params, rows


def _check_finite(node, source, path="$"):
    """Refuse a parameter set with a NaN or infinite number (it would not be valid JSON)."""
    if isinstance(node, dict):
        for key, value in node.items():
            _check_finite(value, source, path + "." + key)
    elif isinstance(node, list):
        for i, value in enumerate(node):
            _check_finite(value, source, "%s[%d]" % (path, i))
    elif isinstance(node, float) and not np.isfinite(node):
        raise InputError("%s: the fit gave a non-finite %s; the sweep cannot be fitted" % (source, path))


def _model_spikes(lv, theta, u, v, t, p):
    """Rows of small levels (one or two rows, where levels.command_levels cannot judge) far
    from the fitted motor model. A row is a spike when its residual exceeds SPIKE_SIGMAS
    times the spread of the level residuals at its thrust (levels.noise_profile of the
    level residuals scaled to one row: load-cell noise grows with the load, and the model's
    own misfit is part of that spread). Spikes are marked in lv["thrust_spike"] (counted and
    left out of rows_used) and taken out of their levels' means; a level left empty is
    dropped. Returns True when a level changed (the fits must run again)."""
    from estimator.bench.levels import SPIKE_SIGMAS, noise_profile, robust_scale

    n = lv["count"]
    t_lv = np.abs(lv["thrust_N"])
    r_lv = rotor_arrays(theta, lv["command"], lv["voltage_V"])[0] - lv["thrust_N"]
    r_row = r_lv * np.sqrt(n)  # a level mean's residual scaled to one row's
    profile = noise_profile(t_lv, r_row)
    row_scale = np.interp(t_lv, *profile) if profile is not None else np.full(n.size, robust_scale(r_row))
    if not np.all(row_scale > 0.0):
        return False
    bad = (np.abs(r_row) > SPIKE_SIGMAS * row_scale) & (n <= 2)
    if not np.any(bad):
        return False
    rows = np.flatnonzero(np.take(bad[lv["key_level"]], lv["row_key"]))
    r_rows = rotor_arrays(theta, u[rows], v[rows])[0] - t[rows]
    rows = rows[np.abs(r_rows) > SPIKE_SIGMAS * row_scale[lv["key_level"][lv["row_key"][rows]]]]
    rows = rows[~lv["thrust_spike"][rows]]
    if rows.size == 0:
        return False
    lv["thrust_spike"][rows] = True
    k = lv["key_level"][lv["row_key"][rows]]
    count = n - np.bincount(k, minlength=n.size)
    for name, x in (("command", u), ("voltage_V", v), ("thrust_N", t), ("power_W", p)):
        lv[name] = (lv[name] * n - np.bincount(k, weights=x[rows], minlength=n.size)) / np.maximum(count, 1.0)
    keep = count > 0
    for name in ("command", "voltage_V", "thrust_N", "power_W"):
        lv[name] = lv[name][keep]
    lv["count"] = count[keep]
    lv["key_level"] = (np.cumsum(keep) - 1)[lv["key_level"]]
    lv["current_A"] = lv["power_W"] / lv["voltage_V"]
    return True


def _add_lag(curve):
    """Widen the curve's covariance for a one-way sweep by the rotor's unknown lag behind the
    command (core.constants.ONE_WAY_LAG_COMMAND_SE): on u_min and, through dT/du at full
    command, on T_max."""
    from estimator.core.constants import ONE_WAY_LAG_COMMAND_SE as ONE_WAY_LAG_SE

    m = np.array(curve["covariance"]["matrix"])
    slope = curve["thrust_max_N"] * (1.0 + curve["quadratic_share"]) / (curve["command_max"] - curve["command_min"])
    m[0, 0] += (slope * ONE_WAY_LAG_SE) ** 2
    m[2, 2] += ONE_WAY_LAG_SE ** 2
    curve["covariance"]["matrix"] = m.tolist()
    curve["standard_errors"]["thrust_max_N"] = float(np.sqrt(m[0, 0]))
    curve["standard_errors"]["command_min"] = float(np.sqrt(m[2, 2]))


def _add_form_gap(curve, motor_thrust_N):
    """Add the curve form's own error at full command to the variance of T_max: the gap
    between the quadratic's T_max and the fitted motor model's thrust at the same command
    and voltage (motor_thrust_N [N]), in quadrature.

    The level residuals measure the form's misfit on average, but the standard error made
    from them shrinks as levels are added (more supplies, both legs, more steps) while the
    quadratic's error at its end point does not; the motor model, which follows real motors
    and extrapolates by physics, shows that error directly. The difference between two
    fitted models at the point of interest as the model-form term is common practice
    (model discrepancy); on the randomised truths (benchmarks/fit_study.py) it raises the
    coverage of T_max +- 1.96 standard errors from 86 % to about 98 %.
    """
    m = np.array(curve["covariance"]["matrix"])
    m[0, 0] += (curve["thrust_max_N"] - motor_thrust_N) ** 2
    curve["covariance"]["matrix"] = m.tolist()
    curve["standard_errors"]["thrust_max_N"] = float(np.sqrt(m[0, 0]))


def swept_both_ways(command):
    """True when the rows step the command up and down alike (at least a quarter as many
    steps one way as the other, and three or more each way): then the rotor's lag behind the
    command cancels between the two legs; a one-way sweep carries it into the curve."""
    command = np.asarray(command, dtype=float)
    steps = np.diff(command[:: max(1, command.size // 50000)])  # every k-th row keeps the order
    up, down = int(np.count_nonzero(steps > 0.0)), int(np.count_nonzero(steps < 0.0))
    return bool(min(up, down) >= 3 and min(up, down) >= 0.25 * max(up, down))


def start_standard_error(motor, command, both_ways):
    """Standard error of the fitted spin-up command u0 [-], three parts in quadrature:
    - the motor fit's covariance (estimator.bench.motor_fit._covariance): noise and the
      residual misfit, through u0's trade-off with the duty exponent and the rest;
    - the sweep's command resolution: the rotor starts somewhere between two command steps,
      and where between them rests on the model's shape near idle, which real rotors do not
      follow exactly (thrust and torque coefficients drift at low speed): a rectangular
      distribution over one step h, standard uncertainty h / sqrt(12) (GUM, JCGM 100:2008
      sec. 4.3.7, from memory); h is the median step between the distinct command levels;
    - for a one-way sweep, the rotor's lag behind the command (core.constants).
    On the randomised truths (benchmarks/fit_study.py) u0 +- 1.96 of these holds the truth's
    start in about 99 % of cases; the covariance alone held it in 80 %.
    command: the level commands [-]; both_ways: the sweep stepped up and down."""
    from estimator.core.constants import ONE_WAY_LAG_COMMAND_SE

    var = float(motor["covariance"][4, 4])
    steps = np.unique(np.round(np.asarray(command, dtype=float), 4))
    h = float(np.median(np.diff(steps))) if steps.size > 1 else 1.0
    lag = 0.0 if both_ways else ONE_WAY_LAG_COMMAND_SE
    if not math.isfinite(var):
        return 1.0
    return math.sqrt(max(var, 0.0) + h * h / 12.0 + lag * lag)


def _fit_bench(data, source, voltage_exponent):
    from estimator.params import build_params, static_factor_at

    rho = data["bench_air"]["density_kg_m3"]
    area = disk_area_m2(data["diameter_m"])
    u, v, t, p = data["command"], data["voltage_V"], data["thrust_N"], data["power_W"]
    warnings = list(data["warnings"])
    check_thrust_sign(source, t, p, data.get("thrust_unit", "N"))
    check_static_factor(source, t, p, rho, area, data.get("thrust_unit", "N"),
                        data.get("current_unit", "A"), warnings)
    v_span = data.get("voltage_span_V") or (float(np.min(v)), float(np.max(v)))
    lv = command_levels(u, v, t, p, v_span)
    tare = tare_warning(lv, data.get("thrust_unit", "N"))
    if tare:
        warnings.append(tare)
    lv["current_A"] = lv["power_W"] / lv["voltage_V"]
    check_rising(lv, source)
    u_hi = float(np.max(lv["command"]))
    # one pass to see whether the sweep levels off below its highest command (the ESC's top
    # end point), then one more pass weighted by that pass's residual scales; one supply
    # voltage cannot tell the duty law from the resistive drop: a prior on it (motor_fit)
    prior = DUTY_PRIOR if voltage_spread(lv) < MIN_VOLTAGE_SPREAD else None
    motor = fit_motor(lv, top_end=True, passes=1, duty_prior=prior)
    top_found = motor["theta"][5] < u_hi - TOP_END_MARGIN

    def final_motor(start):
        if top_found:
            return fit_motor(lv, top_end=True, start=start, duty_prior=prior)
        # full command at 1, or at the sweep's top when it stops short (an ESC calibrated to
        # a narrower pulse range, or a sweep cut short): never extrapolated beyond it
        return fit_motor(lv, top_end=False, top=1.0 if u_hi >= FULL_COMMAND_SWEPT else u_hi, start=start,
                         duty_prior=prior)

    motor = final_motor(motor)
    if _model_spikes(lv, motor["theta"], u, v, t, p):
        motor = final_motor(motor)
    theta = motor["theta"]
    v_ref = float(round(float(np.median(v[:: max(1, v.size // MAD_ROWS)])), 2))
    n_motor, m_motor = motor_exponents(theta, v_ref)
    se_n, se_m = exponent_errors(motor, v_ref)
    grid = np.linspace(float(theta[4]), float(theta[5]), 161)
    curve = fit_quadratic(lv, v_ref, float(theta[5]), n_motor, voltage_exponent,
                          projection=(grid, rotor_arrays(theta, grid, v_ref)[0]), motor_n_se=se_n)
    curve["standard_errors"]["density_exponent"] = se_m
    both_ways = swept_both_ways(u)
    if not both_ways:
        _add_lag(curve)
    _add_form_gap(curve, float(rotor_arrays(theta, np.array([theta[5]]), v_ref)[0][0]))
    curve.update({"reference_voltage_V": v_ref, "reference_density_kg_m3": rho,
                  "voltage_min_V": v_span[0], "voltage_max_V": v_span[1],
                  "density_exponent": m_motor, "command_swept_max": u_hi,
                  "command_swept_min": float(np.min(lv["command"]))})
    if curve["voltage_exponent_source"] == "motor model":
        curve["warnings"].append(
            "the sweep's voltage spread at equal command is only %.1f %%: voltage exponent n = %.2f +- %.2f "
            "taken from the motor model fitted to thrust and current, with the ESC's duty held near linear in "
            "command (one voltage cannot tell the duty law from the motor's resistance); beyond %.1f..%.1f V "
            "thrust and power are extrapolated. Sweep at two or three supply voltages to measure it"
            % (100.0 * curve["voltage_spread"], n_motor, se_n, v_span[0], v_span[1]))
    power = fit_power_model(lv, rho)
    spikes = lv["thrust_spike"] | lv["power_spike"]
    step = max(1, u.size // MAD_ROWS)
    t_sub = thrust_model_N(curve, u[::step], v[::step])
    ok = ~spikes[::step]
    power["residual_rel_std"] = watch_residual_rel_std(p[::step][ok], power_model_W(power, t_sub[ok]),
                                                       t_sub[ok] / curve["thrust_max_N"])
    sf = fit_static_factor(lv, rho, area, curve["thrust_max_N"], power)
    rejected = dict(data["rejected"])
    counts = {"thrust_spike": int(np.count_nonzero(lv["thrust_spike"])),
              "power_spike": int(np.count_nonzero(lv["power_spike"] & ~lv["thrust_spike"]))}
    rejected.update({k: c for k, c in counts.items() if c})
    rows_used = int(u.size - np.count_nonzero(spikes))
    motor_block = params_dict(theta)
    motor_block.update({"reference_density_kg_m3": rho, "rms_thrust_residual_N": motor["rms_thrust_N"],
                        "thrust_residual_scale_N": motor["scale_thrust_N"],
                        "current_residual_scale_A": motor["scale_current_A"],
                        "top_end_found": bool(top_found), "sweep_both_ways": both_ways,
                        "duty_exponent_standard_error": math.sqrt(max(motor["covariance"][DUTY_INDEX, DUTY_INDEX], 0)),
                        "duty_exponent_source": "fitted" if prior is None else
                        "prior %.2f +- %.2f (one supply voltage cannot measure it)" % prior,
                        "command_start_standard_error": start_standard_error(motor, lv["command"], both_ways)})
    fit = {
        "curve": curve, "power": power, "static": sf, "rejected": rejected, "motor": motor_block,
        "rows_used": rows_used, "rows_rejected": int(data["rows_total"] - rows_used),
        "warnings": warnings + curve["warnings"] + _range_warnings(curve, theta, v_ref, top_found,
                                                                          data.get("command_unit", "-"))
        + _reference_warning(curve, lv, data.get("command_unit", "-"), data.get("thrust_unit", "N"))
        + _start_warning(motor_block, data.get("command_unit", "-")),
    }
    sf["value"], sf["value_se"] = static_factor_at(power, sf["median_thrust_N"], rho, area, sf["cov"], source,
                                                   "the median thrust")
    return build_params(data, fit, source), Rows(u, v, t, p, ~spikes)


def _range_warnings(curve, theta, v_ref, top_found, unit="-"):
    """Warnings with numbers when the parameter set's full command lies beyond the sweep."""
    out = []
    u_hi = curve["command_swept_max"]
    if top_found:
        out.append("thrust levels off above command %s: the ESC's top end point; thrust_max_N is the "
                   "thrust there (command_max), commands above it add nothing" % command_text(theta[5], unit))
    elif u_hi < FULL_COMMAND_SWEPT:
        out.append("the sweep stops at command %s: taken as full command (thrust_max_N and command_max "
                   "there); if the ESC runs on to %s, thrust-to-weight is higher than stated. "
                   "Sweep to full command, or set the ESC's end points to the swept range"
                   % (command_text(u_hi, unit), command_text(1.0, unit)))
    return out


def _reference_warning(curve, lv, command_unit="-", thrust_unit="N"):
    """A warning when the full-command thrust, quoted at the reference voltage (the sweep's
    median bus voltage), lies above every thrust level measured by more than its standard
    error: the rows at full command ran at a lower bus voltage (a supply sagging under load),
    and the curve there gives less. [] otherwise."""
    t_max, se = curve["thrust_max_N"], curve["standard_errors"]["thrust_max_N"]
    t_seen = float(np.max(lv["thrust_N"]))
    if not t_max > t_seen + se:
        return []
    top = lv["command"] >= curve["command_max"] - 0.005
    if not np.any(top):
        top = lv["command"] >= float(np.max(lv["command"])) - 0.005
    v_all = lv["voltage_V"][top]
    v_top = float(np.median(v_all))
    t_there = float(thrust_model_N(curve, np.array([curve["command_max"]]), np.array([v_top]))[0])
    ran = "%.2f V" % v_top
    if float(np.ptp(v_all)) > 0.01 * v_top:  # several supplies
        ran = "%.2f..%.2f V (median %.2f V)" % (float(np.min(v_all)), float(np.max(v_all)), v_top)
    return ["full-command thrust %s is the curve at the reference voltage %.2f V (the sweep's median bus "
            "voltage), above the highest thrust measured (%s): the full-command rows ran at %s, where "
            "the curve gives %s; on a pack, full command gives the thrust at the pack's own sagged voltage"
            % (thrust_text(t_max, thrust_unit), curve["reference_voltage_V"], thrust_text(t_seen, thrust_unit),
               ran, thrust_text(t_there, thrust_unit))]


def _start_warning(motor_block, unit="-"):
    """A warning when the spin-up command is poorly determined (standard error beyond
    START_POORLY_DETERMINED); [] otherwise."""
    se = motor_block["command_start_standard_error"]
    if not se > START_POORLY_DETERMINED:
        return []
    return ["the rotor's start command %s is poorly determined by this sweep: it trades off against the "
            "ESC's duty curve (duty exponent %.2f fitted); log more command steps just above idle to pin "
            "it. The hover command and current come from the fitted duty curve as a whole and do not "
            "rest on it" % (command_with_error(motor_block["command_start"], se, unit),
                            motor_block["duty_exponent"])]


def summary(params):
    """The ``liftcal fit --json`` keys (design notes sec. 4) from a parameter set."""
    c, q = params["thrust_curve"], params["fit_quality"]
    out = {k: c[k] for k in ("quadratic_share", "command_min", "thrust_max_N",
                             "reference_voltage_V", "voltage_exponent", "density_exponent")}
    out.update({"static_factor": params["static_factor"]["value"],
                "rows_used": q["rows_used"], "rows_rejected": q["rows_rejected"],
                "rms_residual_N": q["rms_residual_N"],
                "power_residual_rel_std": params["power_model"]["residual_rel_std"],
                "standard_errors": params["standard_errors"],
                "command_start": params["motor_model"]["command_start"],
                "command_start_standard_error": params["motor_model"].get("command_start_standard_error"),
                "warnings": params.get("warnings", [])})
    if "hover" in params:
        out["hover_command"] = params["hover"]["hover_command"]
        out["hover_command_interval_95"] = params["hover"]["hover_command_interval_95"]
    return out

