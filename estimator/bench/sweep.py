"""From a bench CSV to a parameter set (model ``liftcal.rotor/1``): the whole fit pipeline.

Top-down, each step entered once or twice, each fitter returning all it knows in one call:
read (estimator.bench.reader) -> load-cell and static-factor checks (k <= 1, unit slips) ->
command levels (estimator.bench.levels) -> DC motor + propeller model (estimator.bench.
motor_fit.fit_motor_model, liftcal's own predictions) -> the controller's quadratic
(estimator.bench.curve_fit.fit_curve) -> power model and k (estimator.bench.power_fit.
fit_power) -> the fit's warnings (estimator.bench.wording.fit_warnings) -> parameter set
(estimator.params.build_params, which takes k at the median thrust). The vehicle's hover values
are added afterwards by the command that chains the flows (estimator.commands.bench: the
pre-flight hover report and hover_block, then params.complete_set); the bench flow never
imports the pre-flight flow."""

import math
from collections import namedtuple

import numpy as np

from estimator.errors import InputError
from estimator.core.momentum import disk_area_m2
from estimator.bench.curve_fit import check_rising, fit_curve
from estimator.bench.levels import command_levels
from estimator.bench.load_cell import check_thrust_sign, tare_context, tare_note, tare_offset, tare_warning
from estimator.bench.motor_fit import DUTY_INDEX, fit_motor_model
from estimator.bench.power_fit import MAD_ROWS, check_static_factor, fit_power
from estimator.bench.sensor_checks import check_power_convex
from estimator.bench.wording import extrapolation_refusal, fit_warnings
from estimator.params import build_params


# the rows a fit read, in SI (command [-], voltage_V [V], thrust_N [N], power_W [W]), and
# which of them it used (False for a spike): what the plot step draws (estimator.bench.plots)
Rows = namedtuple("Rows", "command voltage_V thrust_N power_W used")
# what fit_sweep returns: the parameter set (not yet written), the rows, and the CSV's
# columns as the reader took them ({fitted, read_not_used: ["name[unit]", ...]})
SweepFit = namedtuple("SweepFit", "params rows columns")


def fit_sweep(path, diameter_m=None, default_diameter_m=None, density_kg_m3=None, altitude_m=None,
              temperature_C=None, pressure_Pa=None, humidity_pct=None, voltage_exponent=None,
              hover_thrust_N=None):
    """Fit a bench CSV: a SweepFit (the parameter-set dict, not yet written, see
    params.write_params; the rows for a plot; the columns read).

    path: bench CSV; diameter_m: propeller diameter [m] (else ``# diameter:``, else
    default_diameter_m, e.g. the vehicle's propeller); density_kg_m3 [kg/m^3] / altitude_m [m] /
    temperature_C [C] / pressure_Pa [Pa]
    / humidity_pct [%]: bench air overriding the file; voltage_exponent: fix n [-];
    hover_thrust_N: the vehicle's weight per rotor [N], what a load-cell offset is judged against
    (estimator.bench.load_cell.tare_offset; None: a share of the top thrust).
    Raises InputError on bad or impossible data.
    """
    from estimator.bench.reader import read_bench

    data = read_bench(path, diameter_m=diameter_m, density_kg_m3=density_kg_m3,
                      altitude_m=altitude_m, temperature_C=temperature_C,
                      pressure_Pa=pressure_Pa, humidity_pct=humidity_pct, expected_diameter_m=default_diameter_m)
    if data["diameter_m"] is None:
        data["diameter_m"] = default_diameter_m
    elif default_diameter_m is not None:
        _same_propeller(path, data["diameter_m"], default_diameter_m,
                        "--diameter" if diameter_m is not None else "its '# diameter:' comment")
    if data["diameter_m"] is None:
        raise InputError("%s: the propeller diameter is needed for the static thrust factor; "
                         "add '# diameter: 10in' to the CSV, or pass --diameter or --vehicle" % path)
    params, rows = _fit_or_refuse(data, path, voltage_exponent, hover_thrust_N)
    return SweepFit(params, rows, data["columns"])


def _same_propeller(path, swept_m, vehicle_m, given_by):
    """Refuse, before any fit, a sweep whose propeller diameter [m] (given_by: --diameter or the
    CSV's comment) is not the vehicle's [m]: beyond params.DIAMETER_MATCH_TOLERANCE it is another
    propeller, and a fit on the wrong diameter fails its static-factor check with a unit slip
    for a cause (k grows as D^(-2/3)), hiding the mismatch (params.check_vehicle_match, which
    judges the finished set, words it alike)."""
    from estimator.params import DIAMETER_MATCH_TOLERANCE
    from estimator.units import INCH_M

    apart = abs(vehicle_m / swept_m - 1.0)
    if apart > DIAMETER_MATCH_TOLERANCE:
        raise InputError(
            "%s: swept with a %.3g m (%.1f in) propeller (%s), but the vehicle (--vehicle) has %.3g m "
            "(%.1f in), %.0f %% apart; beyond %.0f %% it is another propeller (thrust at equal speed grows "
            "as D^4: 5 %% is 22 %%): give the diameter of the propeller that was on the stand, or the "
            "vehicle file of the vehicle it flies on"
            % (path, swept_m, swept_m / INCH_M, given_by, vehicle_m, vehicle_m / INCH_M, 100.0 * apart,
               100.0 * DIAMETER_MATCH_TOLERANCE))


def fit_bench_file(path, **options):
    """Fit a bench CSV and return the parameter-set dict (fit_sweep's options)."""
    return fit_sweep(path, **options).params


def fit_bench(data, source, voltage_exponent=None, hover_thrust_N=None):
    """Fit the arrays returned by estimator.bench.read_bench; the parameter-set dict."""
    return _fit_or_refuse(data, source, voltage_exponent, hover_thrust_N)[0]


def _fit_or_refuse(data, source, voltage_exponent, hover_thrust_N=None):
    """(parameter set, Rows). Floating-point trouble on pathological data (overflow, a
    singular system) becomes an InputError: the sweep cannot be fitted, and nothing is written.
    """
    try:
        with np.errstate(all="ignore"):
            params, rows = _fit_bench(data, source, voltage_exponent, hover_thrust_N)
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


def _fit_bench(data, source, voltage_exponent, hover_thrust_N=None):
    """The pipeline (module docstring): (parameter set, Rows)."""
    rho = data["bench_air"]["density_kg_m3"]
    area = disk_area_m2(data["diameter_m"])
    u, v, t, p = data["command"], data["voltage_V"], data["thrust_N"], data["power_W"]
    command_unit, thrust_unit = data.get("command_unit", "-"), data.get("thrust_unit", "N")
    warnings = list(data["warnings"])
    check_thrust_sign(source, t, p, thrust_unit)
    v_span = data.get("voltage_span_V") or (float(np.min(v)), float(np.max(v)))
    lv = command_levels(u, v, t, p, v_span)
    tare, offset_N = tare_offset(lv, t, hover_thrust_N), 0.0
    if tare is not None and tare[2]:
        # the rotor stood still at a flat offset: the cell's zero, taken off every row (new-user
        # trial 8, finding 1: kept as thrust it promised 20 % more endurance; trial 9, finding 2:
        # judged against the hover thrust and the cell's scatter, not the top thrust)
        offset_N = tare[0]
        context = tare_context(offset_N, tare[3], thrust_unit)
        t = t - offset_N
        lv = command_levels(u, v, t, p, v_span)
        warnings.append(tare_note(offset_N, thrust_unit, context))
    elif tare is not None:
        warnings.append(tare_warning(lv, thrust_unit, t, hover_thrust_N))
    check_power_convex(source, lv, thrust_unit)
    check_static_factor(source, t, p, rho, area, thrust_unit, data.get("current_unit", "A"), warnings)
    lv["current_A"] = lv["power_W"] / lv["voltage_V"]
    check_rising(lv, source)
    v_ref = float(round(float(np.median(v[:: max(1, v.size // MAD_ROWS)])), 2))
    motor = fit_motor_model(lv, (u, v, t, p), v_ref)
    both_ways = swept_both_ways(u)
    curve = fit_curve(lv, motor, v_ref, voltage_exponent, both_ways, rho, v_span)
    refusal = extrapolation_refusal(curve, source, command_unit, thrust_unit)
    if refusal:
        raise InputError(refusal)
    spikes = lv["thrust_spike"] | lv["power_spike"]
    power, sf = fit_power(lv, (u, v, p, ~spikes), curve, rho, area)
    rejected = dict(data["rejected"])
    counts = {"thrust_spike": int(np.count_nonzero(lv["thrust_spike"])),
              "power_spike": int(np.count_nonzero(lv["power_spike"] & ~lv["thrust_spike"]))}
    rejected.update({k: c for k, c in counts.items() if c})
    rows_used = int(u.size - np.count_nonzero(spikes))
    prior = motor["duty_prior"]
    motor_block = motor["block"]
    motor_block.update({"reference_density_kg_m3": rho, "rms_thrust_residual_N": motor["rms_thrust_N"],
                        "thrust_residual_scale_N": motor["scale_thrust_N"],
                        "current_residual_scale_A": motor["scale_current_A"],
                        "top_end_found": motor["top_found"], "sweep_both_ways": both_ways,
                        "duty_exponent_standard_error": math.sqrt(max(motor["covariance"][DUTY_INDEX, DUTY_INDEX], 0)),
                        "duty_exponent_source": "fitted" if prior is None else
                        "prior %.2f +- %.2f (one supply voltage cannot measure it)" % prior,
                        "command_start_standard_error": start_standard_error(motor, lv["command"], both_ways)})
    fit = {
        "curve": curve, "power": power, "static": sf, "rejected": rejected, "motor": motor_block,
        "rows_used": rows_used, "thrust_offset_N": offset_N, "rows_rejected": int(data["rows_total"] - rows_used),
        "warnings": warnings + curve["warnings"] + fit_warnings(curve, motor_block, lv, command_unit, thrust_unit),
    }
    return build_params(data, fit, source), Rows(u, v, t, p, ~spikes)
