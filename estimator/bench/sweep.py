"""From a bench CSV to a parameter set (model ``liftcal.rotor/1``): the whole fit pipeline.

read (estimator.bench.reader) -> static-factor plausibility (k <= 1) -> thrust curve
(estimator.bench.curve_fit) -> power model and k(T) (estimator.bench.power_fit) -> optional hover
values for a vehicle (estimator.preflight.measured_rotor) -> parameter set (estimator.params.build).
"""

import os

import numpy as np

from estimator.errors import InputError
from estimator.core.momentum import disk_area_m2
from estimator.bench.curve_fit import command_groups, fit_thrust_curve, thrust_model_N
from estimator.bench.power_fit import (MAD_ROWS, check_static_factor, fit_power_model, fit_static_factor,
                                 power_model_W, static_factor_at, watch_residual_rel_std)
from estimator.bench.robust import WORK_ROWS


def fit_bench_file(path, diameter_m=None, vehicle=None, density_kg_m3=None, altitude_m=None,
                   temperature_C=None, pressure_Pa=None, humidity_pct=None,
                   voltage_exponent=None, keep_arrays=False, work_rows=WORK_ROWS, beside=None):
    """Fit a bench CSV and return the parameter-set dict (not yet written; see params.write_params).

    path: bench CSV; diameter_m: propeller diameter [m] (else ``# diameter:`` or the
    vehicle's propeller); vehicle: validated vehicle dict (adds the vehicle and hover
    blocks); density_kg_m3 [kg/m^3] / altitude_m [m] / temperature_C [C] / pressure_Pa [Pa]
    / humidity_pct [%]: bench air overriding the file; voltage_exponent: fix n [-].
    keep_arrays=True adds a private ``_arrays`` entry (rows and fits) for plots; it is
    removed by params.write_params. work_rows: sweeps of more than twice this many rows
    take the very large path of the fits (estimator.robust.huber_fit); a huge value forces
    every fit to iterate on all rows (the reference path). beside: optional callable run
    once while the file is parsed (estimator.bench.read_bench). Raises InputError on bad or
    impossible data.
    """
    from estimator.bench.reader import read_bench

    data = read_bench(path, diameter_m=diameter_m, density_kg_m3=density_kg_m3,
                      altitude_m=altitude_m, temperature_C=temperature_C,
                      pressure_Pa=pressure_Pa, humidity_pct=humidity_pct,
                      hash_in_background=True,  # the hash runs beside the fit
                      beside=beside)
    if vehicle is not None:
        d_vehicle = vehicle["propeller"]["diameter_m"]
        if data["diameter_m"] is None:
            data["diameter_m"] = d_vehicle
        elif abs(data["diameter_m"] / d_vehicle - 1.0) > 0.01:
            data["warnings"].append("the bench propeller (%.4g m) is not the vehicle's (%.4g m): the "
                                    "hover values assume the bench propeller" % (data["diameter_m"], d_vehicle))
    if data["diameter_m"] is None:
        raise InputError("%s: the propeller diameter is needed for the static thrust factor; "
                         "add '# diameter: 10in' to the CSV, or pass --diameter or --vehicle" % path)
    return fit_bench(data, path, vehicle=vehicle, voltage_exponent=voltage_exponent,
                     keep_arrays=keep_arrays, work_rows=work_rows)


def fit_bench(data, source, vehicle=None, voltage_exponent=None, keep_arrays=False,
              work_rows=WORK_ROWS):
    """Fit the arrays returned by estimator.bench.read_bench; see fit_bench_file.

    Floating-point trouble on pathological data (overflow, a singular system) becomes an
    InputError: the sweep cannot be fitted, and nothing is written.
    """
    try:
        with np.errstate(all="ignore"):
            params = _fit_bench(data, source, vehicle, voltage_exponent, keep_arrays, work_rows)
    except (np.linalg.LinAlgError, FloatingPointError, OverflowError, ZeroDivisionError,
            ValueError) as exc:
        raise InputError("%s: the sweep cannot be fitted (%s); check that command, voltage, "
                         "current and thrust hold a real sweep from idle to full command"
                         % (source, exc)) from None
    _check_finite(params, source)
    return params


def _check_finite(node, source, path="$"):
    """Refuse a parameter set with a NaN or infinite number (it would not be valid JSON)."""
    if isinstance(node, dict):
        for key, value in node.items():
            if not key.startswith("_"):
                _check_finite(value, source, path + "." + key)
    elif isinstance(node, list):
        for i, value in enumerate(node):
            _check_finite(value, source, "%s[%d]" % (path, i))
    elif isinstance(node, float) and not np.isfinite(node):
        raise InputError("%s: the fit gave a non-finite %s; the sweep cannot be fitted" % (source, path))


def _fit_bench(data, source, vehicle, voltage_exponent, keep_arrays, work_rows=WORK_ROWS):
    from estimator.bench.reader import bench_digest
    from estimator.params import build_params

    rho = data["bench_air"]["density_kg_m3"]
    area = disk_area_m2(data["diameter_m"])
    u, v, t, p = data["command"], data["voltage_V"], data["thrust_N"], data["power_W"]
    check_static_factor(source, t, p, rho, area, data.get("thrust_unit", "N"),
                        data.get("current_unit", "A"))
    groups = command_groups(u)
    try:
        curve = fit_thrust_curve(u, v, t, voltage_exponent=voltage_exponent, groups=groups,
                                 work_rows=work_rows, keep_residuals=False)
    except InputError as exc:
        raise InputError("%s: %s" % (source, exc)) from None
    curve["reference_density_kg_m3"] = rho
    spikes_t = curve["spikes"]
    n_spike_t = int(np.count_nonzero(spikes_t))
    power = fit_power_model(t, p, groups, exclude=spikes_t if n_spike_t else None, work_rows=work_rows)
    power["reference_density_kg_m3"] = rho
    spikes_p = power["spikes"]
    used = ~spikes_t
    used &= ~spikes_p
    step = max(1, u.size // MAD_ROWS)  # a systematic subsample is plenty for a median
    # the fitted curve at the subsample's command and voltage
    t_sub, used_sub = thrust_model_N(curve, u[::step], v[::step]), used[::step]
    expected = power_model_W(power, t_sub[used_sub])
    power["residual_rel_std"] = watch_residual_rel_std(p[::step][used_sub], expected,
                                                       t_sub[used_sub] / curve["thrust_max_N"])
    sf = fit_static_factor(t, p, rho, area, curve["thrust_max_N"], groups, exclude=~used,
                           work_rows=work_rows)
    rejected = dict(data["rejected"])
    n_spike_p = int(np.count_nonzero(spikes_p))
    if n_spike_t:
        rejected["thrust_spike"] = n_spike_t
    if n_spike_p:
        rejected["power_spike"] = n_spike_p
    rows_used = int(np.count_nonzero(used))
    fit = {
        "curve": curve, "power": power, "static": sf, "rejected": rejected,
        "rows_used": rows_used, "rows_rejected": int(data["rows_total"] - rows_used),
        "warnings": list(data["warnings"]) + curve["warnings"],
    }
    bench_digest(data)  # the file's SHA-256 (provenance), hashed while the fits ran
    hover = None
    if vehicle is not None:
        from estimator.preflight.measured_rotor import hover_block
        params_draft = build_params(data, fit, source, None, None)
        hover = hover_block(vehicle, params_draft)
        value, value_se = static_factor_at(sf, hover["thrust_per_rotor_N"])
    else:
        value, value_se = static_factor_at(sf, sf["median_thrust_N"])
    sf["value"], sf["value_se"] = float(value), value_se
    if value > 1.0:
        raise InputError("%s: static thrust factor %.3g at %s is above 1, which is impossible; "
                         "check the thrust and current units and the load-cell calibration"
                         % (source, value, "hover" if vehicle else "the median thrust"))
    params = build_params(data, fit, source, vehicle, hover)
    if keep_arrays:
        params["_arrays"] = {"command": u, "voltage_V": v, "thrust_N": t, "power_W": p,
                             "used": used, "thrust_model_N": thrust_model_N(curve, u, v)}
    return params


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
                "warnings": params.get("warnings", [])})
    if "hover" in params:
        out["hover_command"] = params["hover"]["hover_command"]
        out["hover_command_interval_95"] = params["hover"]["hover_command_interval_95"]
    return out


def source_name(path):
    """The file name recorded in provenance (no folders: parameter sets travel)."""
    return os.path.basename(path)
