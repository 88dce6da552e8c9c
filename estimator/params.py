"""The parameter set (model ``liftcal.rotor/1``): build it from a fit, validate, read, write.

Layout: DEVELOPERS.md "Parameter set" and ``schemas/params.schema.json`` (draft 2020-12).
Keys added beyond the DEVELOPERS.md layout (none renamed): thrust_curve_covariance,
warnings, bench_air.source text, fit_quality.residual_scale_N, fit_quality.fit_method,
provenance.bench_air, static_factor.value_at, hover.interval_method, power_model.
residual_basis, thrust_curve.quadratic_share_error, fit_quality.thrust_offset_removed_N.
"""

import datetime
import math
import os

from estimator import __version__
from estimator.errors import InputError
from estimator.core.momentum import disk_area_m2
from estimator.core.power_model import KEYS as POWER_KEYS, rotor_static_factor
from estimator.jsonio import load_json, validate, write_json_atomic
from estimator.units import INCH_M, beside
from estimator.edited_set import FIT_OR_EDIT, FROM_EDITED, edited_set_note, edited_set_warning  # noqa: F401 (old home)

MODEL = "liftcal.rotor/1"
POWER_FORM = "p0+p_h*T^0.5+p_1*T+p_15*T^1.5+p_2*T^2"
MOTOR_FORM = "dc-motor+propeller/back-emf"
SCHEMA = "params.schema.json"
# a full-command thrust whose standard error exceeds this share of it is no thrust curve (the
# fit itself refuses an extrapolated one above bench.sweep.EXTRAPOLATION_MAX_SE) [-]
CREDIBLE_THRUST_SE = 0.5
SHARE_HELD = ("held at %.3f for the standard errors: this sweep cannot tell the quadratic share from "
              "the intercept (at a = 1 both move the curve alike); its error is carried by command_min")
FIT_METHOD = ("rows averaged per command level and supply (rows beyond 6 robust sigmas of their level "
              "left out as spikes); DC motor + propeller model and thrust curve by scipy.optimize."
              "least_squares (trust region reflective, bounds, soft_l1 loss); power model by "
              "non-negative least squares (scipy.optimize.nnls)")


def _r(x, digits=6):
    """Round a float to ``digits`` significant digits for a readable file."""
    if x is None or x == 0 or not math.isfinite(x):
        return x
    return float("%.*g" % (digits, x))


def build_params(data, fit, source):
    """Assemble the parameter-set dict from estimator.bench.reader data and the fit results
    (no vehicle: complete_set adds one), k taken at the sweep's median thrust (static_factor_at:
    raises InputError when k > 1 there)."""
    curve, power, sf = fit["curve"], fit["power"], fit["static"]
    rho = data["bench_air"]["density_kg_m3"]
    k, k_se = static_factor_at(power, sf["median_thrust_N"], rho, disk_area_m2(data["diameter_m"]), sf["cov"],
                               source, "the median thrust")
    se = dict(curve["standard_errors"])
    se.update(power["standard_errors"])
    se.update({"k0": sf["standard_errors"]["k0"], "slope_per_N": sf["standard_errors"]["slope_per_N"]})
    se["static_factor"] = k_se
    if curve.get("quadratic_share_held"):
        share_note = {"quadratic_share_error": SHARE_HELD % curve["quadratic_share"]}
    else:
        share_note = {}
    created = datetime.datetime.now(datetime.timezone.utc).replace(microsecond=0)
    params = {
        "schema_version": 1,
        "model": MODEL,
        "rotor": {"diameter_m": _r(data["diameter_m"])},
        "bench_air": {"density_kg_m3": _r(rho), "source": data["bench_air"]["source"]},
        "thrust_curve": {
            "command_min": _r(curve["command_min"]), "command_max": _r(curve["command_max"]),
            "quadratic_share": _r(curve["quadratic_share"]), "thrust_max_N": _r(curve["thrust_max_N"]),
            "reference_voltage_V": _r(curve["reference_voltage_V"]),
            "voltage_min_V": _r(curve["voltage_min_V"]),
            "voltage_max_V": _r(curve["voltage_max_V"]),
            "voltage_exponent": _r(curve["voltage_exponent"]),
            "density_exponent": _r(curve["density_exponent"]),
            "reference_density_kg_m3": _r(rho),
            "voltage_exponent_source": curve["voltage_exponent_source"],
            "density_exponent_source": "motor model: d ln T / d ln rho at full command",
            "command_swept_min": _r(curve["command_swept_min"]),
            "command_swept_max": _r(curve["command_swept_max"]),
            **share_note,
        },
        "motor_model": motor_block(fit["motor"]),
        "power_model": {
            "form": POWER_FORM,
            **{k: _r(power[k]) for k in POWER_KEYS},
            "reference_density_kg_m3": _r(rho),
            "residual_rel_std": _r(power["residual_rel_std"]),
            "residual_basis": "command and voltage -> thrust curve -> power model, rows above 10 % of thrust_max_N",
        },
        "static_factor": {
            "value": _r(k),
            "k0": _r(sf["k0"]), "slope_per_N": _r(sf["slope_per_N"]),
            "value_at": "median thrust",
            "thrust_at_value_N": _r(sf["median_thrust_N"]),
            "line_covariance": [[_r(float(x), 8) for x in row] for row in sf["cov"]],
        },
        "standard_errors": {k: _r(v, 4) for k, v in se.items()},
        "thrust_curve_covariance": {
            "names": list(curve["covariance"]["names"]),
            "matrix": [[_r(x, 8) for x in row] for row in curve["covariance"]["matrix"]],
        },
        "fit_quality": {
            "rms_residual_N": _r(curve["rms_residual_N"]),
            "residual_scale_N": _r(curve["residual_scale_N"]),
            "power_rms_residual_W": _r(power["power_rms_residual_W"]),
            "rows_used": fit["rows_used"], "rows_rejected": fit["rows_rejected"],
            "rejected": dict(fit["rejected"]),
            "fit_method": FIT_METHOD,
        },
        "provenance": {
            "input_file": os.path.basename(source), "input_sha256": data["input_sha256"],
            "rows_used": fit["rows_used"], "rows_rejected": fit["rows_rejected"],
            "tool_version": __version__, "created_utc": created.strftime("%Y-%m-%dT%H:%M:%SZ"),
            "bench_air": {"density_kg_m3": _r(rho), "source": data["bench_air"]["source"]},
            "units": {"thrust": data.get("thrust_unit", "N"), "command": data.get("command_unit", "-")},
        },
        "warnings": list(fit["warnings"]),
    }
    if fit.get("thrust_offset_N"):
        # a load cell's zero offset the fit took off every row (bench.load_cell.tare_offset)
        params["fit_quality"]["thrust_offset_removed_N"] = _r(fit["thrust_offset_N"])
    return params


def static_factor_at(power, thrust_N, density_kg_m3, area_m2, line_covariance, source, where):
    """k [-] at thrust_N [N] and its standard error, refusing k > 1.

    k = T / (2 rho A P(T)^2)^(1/3) from the fitted power model itself
    (core.power_model.rotor_static_factor; the line k0 + slope T is only its summary over
    15..80 % of T_max and strays by several % where the idle terms bend k(T)); the error
    sqrt(g C g'), g = (1, T), from the line's covariance C [[var k0, cov], [cov, var slope]].
    power: power-model dict; density_kg_m3: bench rho [kg/m^3]; area_m2: disk area [m^2];
    source, where: the sweep's name and "hover" / "the median thrust" for the message.
    Raises InputError when k > 1 (impossible: momentum theory, design notes sec. 3).
    """
    k = rotor_static_factor(power, float(thrust_N), density_kg_m3, area_m2)
    if k > 1.0:
        raise InputError("%s: static thrust factor %.3g at %s is above 1, which is impossible; check the "
                         "thrust and current units and the load-cell calibration" % (source, k, where))
    c, t = line_covariance, float(thrust_N)
    variance = c[0][0] + 2.0 * t * c[0][1] + t * t * c[1][1]
    return k, math.sqrt(max(float(variance), 0.0))


def complete_set(params, source, vehicle=None, hover=None, bench_file=None):
    """The parameter set the fit writes, complete and checked: the fit command's one call before
    write_params.

    params: the set as fitted (bench.sweep, no vehicle). With a vehicle (checked vehicle dict),
    first refused when the sweep does not fit it (check_vehicle_match, naming bench_file) or when
    it cannot hover on this rotor (hover.refusal), then given the vehicle and hover blocks and k
    at hover (add_vehicle). Then validated against the schema and the cross-key rules
    (check_params, naming source). hover: the pre-flight flow's hover block for this set and
    vehicle (estimator.preflight.measured_rotor.hover_block: values, the warnings about the
    vehicle, refusal), which the command chaining the flows computes. Raises InputError;
    returns a new dict (params is not changed).
    """
    if vehicle is not None:
        check_vehicle_match(params, vehicle, bench_file, json_paths=False)
        if hover.refusal:
            raise InputError(hover.refusal)
        params = add_vehicle(params, vehicle, hover.values, hover.warnings)
    return check_params(params, source)


def add_vehicle(params, vehicle, hover, about_vehicle=()):
    """The parameter set for a vehicle: params (fitted without one) with the vehicle block, the
    hover block and k taken at the hover thrust per rotor instead of the sweep's median
    (static_factor_at).

    params: validated parameter set; vehicle: checked vehicle dict; hover: the hover block's
    values for this set and vehicle (estimator.preflight.measured_rotor.hover_block);
    about_vehicle: its warnings about the vehicle, kept in the set's warnings. Raises
    InputError when k > 1 there. Returns a new dict; params is not changed.
    """
    out = dict(params)
    bench_d, own_d = params["rotor"]["diameter_m"], vehicle["propeller"]["diameter_m"]
    warnings = list(params.get("warnings", []))
    if abs(bench_d / own_d - 1.0) > SAME_PROPELLER:
        warnings.insert(0, "the bench propeller (%.4g m) is not the vehicle's (%.4g m): the hover values "
                           "assume the bench propeller" % (bench_d, own_d))
    thrust = hover["thrust_per_rotor_N"]
    sf = dict(params["static_factor"])
    power = params["power_model"]
    value, value_se = static_factor_at(power, thrust, power["reference_density_kg_m3"], disk_area_m2(bench_d),
                                       sf["line_covariance"], params["provenance"]["input_file"], "hover")
    sf.update({"value": _r(value), "value_at": "hover", "thrust_at_value_N": _r(thrust)})
    out["static_factor"] = sf
    out["standard_errors"] = dict(params["standard_errors"], static_factor=_r(value_se, 4))
    out["warnings"] = list(dict.fromkeys(warnings + list(about_vehicle)))
    out["vehicle"] = vehicle_block(vehicle)
    out["hover"] = {k: (_r(v) if isinstance(v, float) else v) for k, v in hover.items()}
    return out


def motor_block(motor):
    """The ``motor_model`` block: the fitted DC motor + propeller model (bench.motor_fit)."""
    out = {k: (_r(v) if isinstance(v, float) else v) for k, v in motor.items()}
    out["form"] = MOTOR_FORM
    return out


def vehicle_block(vehicle):
    """The ``vehicle`` block: name, mass, rotors, site density and pack voltages."""
    from estimator.vehicle import vehicle_air

    air = vehicle_air(vehicle)
    b = vehicle["battery"]
    return {
        "name": vehicle.get("name", "unnamed vehicle"), "mass_kg": vehicle["mass_kg"],
        "rotor_count": vehicle["rotors"]["count"], "layout": vehicle["rotors"].get("layout", "flat"),
        "site_density_kg_m3": _r(air["density_kg_m3"]), "cells": b["cells"],
        "full_voltage_V": _r(b["cells"] * b["full_cell_V"]),
        "nominal_voltage_V": _r(b["cells"] * b["nominal_cell_V"]),
        "empty_voltage_V": _r(b["cells"] * b["empty_cell_V"]),
        **({"avionics_current_A": vehicle["avionics_current_A"]} if vehicle.get("avionics_current_A") else {}),
    }


# a bench propeller this far from the vehicle's is named in a warning (add_vehicle); makers'
# nominal sizes round to about 1 % [-]
SAME_PROPELLER = 0.01

# A parameter set is used on a vehicle only within these bounds (check_vehicle_match).
# Propeller diameter: makers' nominal sizes are rounded to about 1 % and the same model from
# two makers differs by a few percent; beyond 5 % it is another propeller: at equal speed
# thrust grows as D^4 and power as D^5 (T = CT rho n^2 D^4, P = CP rho n^3 D^5; propeller
# similarity, e.g. McCormick, Aerodynamics, Aeronautics and Flight Mechanics, from memory),
# so 5 % is already 22 % thrust and 28 % power, far beyond the fit's own error [-].
DIAMETER_MATCH_TOLERANCE = 0.05
# Pack voltage against the sweep's bus voltages: the fitted motor model extrapolates by
# physics, but a pack whose full voltage is 1.5 x the sweep's highest drives the rotor to
# about 1.5 x the highest speed measured (back-EMF ~ speed), 2.2 x the thrust and 3.4 x the
# power, where the fitted constants (thrust and torque coefficients, no-load current,
# resistance) were never measured (tip speed, iron losses, winding heat; a motor wound for
# that pack is another motor). A 3-cell sweep on 4 cells (1.33 x) or a 12 V bench supply on
# a full 4-cell pack (1.4 x) stay inside and are warned about by the hover sheet [-].
VOLTAGE_ABOVE_SWEEP_MAX = 1.5
# Below the sweep the operating points lie among the speeds measured (the model is on firm
# ground), but an empty pack below half the sweep's lowest voltage uses at most a quarter of
# the swept thrust: a pack of another vehicle, not a sagging one [-].
VOLTAGE_BELOW_SWEEP_MIN = 0.5


def check_vehicle_match(params, vehicle, params_source, vehicle_source=None, json_paths=True):
    """Refuse a parameter set used on a vehicle it was not fitted for (InputError, exit 2).

    params: validated parameter set (also one just fitted, before add_vehicle); vehicle: checked vehicle dict
    (estimator.vehicle.check_vehicle); params_source / vehicle_source: file names for the
    message; json_paths=False leaves the parameter set's JSON paths out (the fit names its CSV).
    Refused: a propeller diameter more than DIAMETER_MATCH_TOLERANCE from the fitted one,
    a full pack above VOLTAGE_ABOVE_SWEEP_MAX x the sweep's highest bus voltage, an empty
    pack below VOLTAGE_BELOW_SWEEP_MIN x its lowest (module constants say why). Smaller
    mismatches are left to the warnings of the hover sheet. Returns None.
    """
    vsrc = vehicle_source or (vehicle.get("checked") or {}).get("source") or "the vehicle file"
    fitted = (params.get("rotor") or {}).get("diameter_m")
    mine = vehicle["propeller"]["diameter_m"]
    if fitted and abs(mine / fitted - 1.0) > DIAMETER_MATCH_TOLERANCE:
        raise InputError(
            "%s%s: swept with a %.3g m (%.1f in) propeller, but %s has %.3g m "
            "(%.1f in), %.0f %% apart; beyond %.0f %% it is another propeller (thrust at equal speed "
            "grows as D^4: 5 %% is 22 %%), so this fit says nothing about it: sweep the vehicle's "
            "propeller, or use the parameter set fitted on it"
            % (params_source, json_paths and ": $.rotor.diameter_m" or "", fitted, fitted / INCH_M, vsrc, mine, mine / INCH_M,
               100.0 * abs(mine / fitted - 1.0), 100.0 * DIAMETER_MATCH_TOLERANCE))
    curve = params["thrust_curve"]
    lo = curve.get("voltage_min_V") or curve["reference_voltage_V"]
    hi = curve.get("voltage_max_V") or curve["reference_voltage_V"]
    b = vehicle["battery"]
    full, empty = b["cells"] * b["full_cell_V"], b["cells"] * b["empty_cell_V"]
    pack = "%s's %d-cell pack spans %.1f..%.1f V" % (vsrc, b["cells"], empty, full)
    if full > VOLTAGE_ABOVE_SWEEP_MAX * hi:
        raise InputError(
            "%s%s: the sweep ran at %.1f..%.1f V but %s, %s x the "
            "sweep's top; beyond %.1f x the rotor would turn faster than anything measured "
            "(1.5 x the speed is 2.2 x the thrust and 3.4 x the power), where the fitted motor "
            "and propeller constants no longer apply: sweep the rotor at this pack's voltage"
            % (params_source, json_paths and ": $.thrust_curve.voltage_max_V" or "", lo, hi, pack,
               beside(full / hi, VOLTAGE_ABOVE_SWEEP_MAX, below=False, digits=1), VOLTAGE_ABOVE_SWEEP_MAX))
    if empty < VOLTAGE_BELOW_SWEEP_MIN * lo:
        raise InputError(
            "%s%s: the sweep ran at %.1f..%.1f V but %s, %s x the "
            "sweep's lowest; below %.1f x the pack leaves under a quarter of the swept thrust: "
            "a parameter set of another vehicle? sweep the rotor at this pack's voltage"
            % (params_source, json_paths and ": $.thrust_curve.voltage_min_V" or "", lo, hi, pack,
               beside(empty / lo, VOLTAGE_BELOW_SWEEP_MIN), VOLTAGE_BELOW_SWEEP_MIN))


def check_params(document, source, edited_hover=False):
    """Validate against the schema, then the cross-key rules a schema cannot state.

    Raises InputError naming ``source`` and the JSON path; returns the document. edited_hover:
    a hover command outside its interval passes (a person's edit, taken with --from-edited).
    """
    validate(document, SCHEMA, source)
    c = document["thrust_curve"]
    if not c["command_min"] < c["command_max"]:
        raise InputError("%s: $.thrust_curve.command_min: %.4g is not below command_max %.4g"
                         % (source, c["command_min"], c["command_max"]))
    _check_curve_credible(document, source)
    p, q = document["provenance"], document["fit_quality"]
    for key in ("rows_used", "rows_rejected"):
        if p[key] != q[key]:
            raise InputError("%s: $.provenance.%s: %d differs from $.fit_quality.%s %d"
                             % (source, key, p[key], key, q[key]))
    h = document.get("hover")
    if h and h.get("hover_command") is not None and h.get("hover_command_interval_95") and not edited_hover:
        lo, hi = h["hover_command_interval_95"]
        if not lo <= h["hover_command"] <= hi:
            raise InputError("%s: $.hover.hover_command_interval_95: [%g, %g] does not contain "
                             "hover_command %g" % (source, lo, hi, h["hover_command"]))
    return document


def _check_curve_credible(document, source):
    """Refuse a set whose thrust curve or motor model has collapsed (a fit that broke down, or
    an edited file), each against what the bench measured (static_factor.thrust_at_value_N,
    the median thrust of the levels that carry k):
      - full-command thrust below that median thrust: the curve would give less at full command
        than the rotor made in the middle of its sweep;
      - full-command thrust with a standard error above CREDIBLE_THRUST_SE of it;
      - a motor model that cannot make the median thrust at the highest bus voltage swept:
        its back-EMF s stays below the bus voltage and T = a s^2 (design notes sec. 3), so
        a V_max^2 must reach it (reference density: a grows as the density, the median too).
    Raises InputError naming the JSON path."""
    c, sf = document["thrust_curve"], document["static_factor"]
    t_med = sf.get("thrust_at_value_N")
    t_max = c["thrust_max_N"]
    se = document["standard_errors"]["thrust_max_N"]
    end = FIT_OR_EDIT
    if t_med is not None and not t_max >= t_med:
        raise InputError("%s: $.thrust_curve.thrust_max_N: full-command thrust %.4g N is below the %.4g N the "
                         "bench measured mid-sweep ($.static_factor.thrust_at_value_N): %s" % (source, t_max, t_med, end))
    if not se <= CREDIBLE_THRUST_SE * t_max:
        raise InputError("%s: $.standard_errors.thrust_max_N: full-command thrust %.4g N +- %.4g N is not a "
                         "thrust curve (standard error above %.0f %% of it): %s"
                         % (source, t_max, se, 100.0 * CREDIBLE_THRUST_SE, end))
    v_max = c.get("voltage_max_V", c["reference_voltage_V"])
    a = document["motor_model"]["thrust_per_V2_N"]
    if t_med is not None and not a * v_max * v_max >= t_med:
        raise InputError("%s: $.motor_model.thrust_per_V2_N: %.4g N/V^2 cannot make the %.4g N the bench "
                         "measured mid-sweep even at a back-EMF of the full %.4g V bus (T = a s^2, s below the bus "
                         "voltage): %s" % (source, a, t_med, v_max, end))


def load_params(path, from_edited=None):
    """Read and validate a parameter-set file; returns the dict (without the file's content
    seal, estimator.seal: a property of the file, not of the set) or raises InputError.

    A set edited since liftcal wrote it (seal broken) that fails its checks is refused with the
    edit named first (estimator.edited_set.edited_refusal); from_edited: None for a command
    without --from-edited, else whether it was given: given, it takes a hover command edited
    outside the fit's interval (the one inconsistency that option takes, edited_set's docstring)."""
    from estimator.edited_set import HOVER_EDIT_PATH, edited_refusal, is_edited
    from estimator.seal import SEAL_KEY

    document = load_json(path)
    try:
        params = check_params(document, path)
    except InputError as exc:
        if not is_edited(path):
            raise
        if not (from_edited and str(exc).startswith("%s: %s" % (path, HOVER_EDIT_PATH))):
            raise edited_refusal(path, str(exc), from_edited) from None
        params = check_params(document, path, edited_hover=True)
    params.pop(SEAL_KEY, None)
    return params


def write_params(path, params):
    """Validate and write a parameter set atomically (never a partial file)."""
    check_params(params, path)
    write_json_atomic(path, params, "params")
    return params
