"""The randomised study of the bench fit against independent truths (tests/truth_rotor.py).

Each truth's sweep is written as a CSV in its own units and fitted by ``fit_bench_file``
with the truth's vehicle, exactly as ``liftcal fit BENCH.csv --vehicle VEHICLE.json`` does.
The checks, with the published model each truth value comes from:
  T_max            thrust at full command at V_ref: DC motor equivalent model + propeller
                   coefficients (Drela 2007; Brandt and Selig 2011; from memory)      bound 3 %
  curve            the exported quadratic against the truth over commands 0.25..1     3 % of T_max
  hover command    the truth's command that holds m g / N on the sagging Thevenin pack 0.02
  thrust-to-weight full-command thrust of N rotors on the sagging pack over m g       3 %
  hover current    pack current at hover (same models)                                5 %
  endurance        60 C_usable / I_hover (definition of capacity)                      10 %
  coverage         share of the 95 % hover-command intervals holding the truth       >= 90 %
"""

import math
import os
import tempfile

import numpy as np

from truth_rotor import random_truth, sweep_rows, truth_values, vehicle_file, write_csv

BOUNDS = {"thrust_max": 0.03, "curve": 0.03, "hover_command": 0.02, "thrust_to_weight": 0.03,
          "hover_current": 0.05, "endurance": 0.10}
MODELS = {
    "thrust_max": "DC motor + propeller coefficients (Drela 2007; Brandt & Selig 2011)",
    "curve": "same truth over commands 0.25..1, share of T_max",
    "hover_command": "truth ESC + motor on the Thevenin pack (bisection)",
    "thrust_to_weight": "N rotors at full duty on the sagging pack",
    "hover_current": "pack current at hover, same models",
    "endurance": "60 C_usable / I_hover (capacity definition)",
}


def run_one(seed, rows=None, folder=None, tweak=None, keep=False):
    """Fit one truth; returns a dict of errors (or 'failed': message). tweak(truth) may change
    the drawn truth before its rows are made; keep=True adds the truth, params and truth values."""
    from estimator.bench.curve_fit import thrust_model_N
    from estimator.bench.sweep import fit_bench_file
    from estimator.preflight.measured_rotor import hover_block
    from estimator.errors import InputError
    from estimator.vehicle import check_vehicle

    rng = np.random.default_rng(seed)
    truth = random_truth(rng, rows=rows)
    if tweak is not None:
        tweak(truth)
    table = sweep_rows(truth, rng)
    folder = folder or tempfile.mkdtemp()
    path = os.path.join(folder, "truth-%d.csv" % seed)
    write_csv(truth, table, path)
    vehicle = check_vehicle(vehicle_file(truth), "truth-%d.json" % seed)
    out = {"seed": seed, "rows": int(table.shape[0]), "diameter_m": truth["diameter_m"],
           "cells": truth["cells"], "thrust_unit": truth["thrust_unit"], "command_unit": truth["command_unit"]}
    try:
        params = fit_bench_file(path, vehicle=vehicle, hover_block=hover_block)
    except InputError as exc:
        out["failed"] = str(exc)
        return out
    finally:
        os.unlink(path)
    c, h = params["thrust_curve"], params["hover"]
    tv = truth_values(truth, c["reference_voltage_V"])
    u = np.linspace(0.25, 1.0, 61)
    model = thrust_model_N(c, u, np.full_like(u, c["reference_voltage_V"]))
    lo, hi = h["hover_command_interval_95"]
    out.update({
        "thrust_max": abs(c["thrust_max_N"] / tv["thrust_max_N"] - 1.0),
        "curve": float(np.max(np.abs(model - tv["curve"](u)))) / tv["thrust_max_N"],
        "hover_command": abs(h["hover_command"] - tv["hover_command"]),
        "thrust_to_weight": abs(h["thrust_to_weight"] / tv["thrust_to_weight"] - 1.0),
        "hover_current": abs(h["current_A"] / tv["hover_current_A"] - 1.0),
        "endurance": abs(h["flight_time_min"] / tv["flight_time_min"] - 1.0),
        "covered": bool(lo <= tv["hover_command"] <= hi),
        "thrust_max_covered": bool(abs(c["thrust_max_N"] - tv["thrust_max_N"])
                                   <= 1.959964 * params["standard_errors"]["thrust_max_N"]),
        "half_width": 0.5 * (hi - lo),
        "warnings": len(params.get("warnings", [])),
        "spin_up": params["motor_model"]["command_start"] - spin_up_command(truth),
        "spin_up_se": params["motor_model"].get("command_start_standard_error", 0.0),
    })
    if keep:
        out.update({"truth": truth, "params": params, "truth_values": tv})
    return out


def spin_up_command(truth):
    """The truth's command where its ESC's duty starts (the end of its dead zone) [-]."""
    return truth["e_lo"] + truth["dead"] * (truth["e_hi"] - truth["e_lo"])


def summarise(results):
    """Worst error, its seed and the share within bounds per check; coverage; failures."""
    ok = [r for r in results if "failed" not in r]
    summary = {"truths": len(results), "fitted": len(ok), "failed": [r for r in results if "failed" in r]}
    for key, bound in BOUNDS.items():
        values = [r[key] for r in ok]
        worst = max(ok, key=lambda r: r[key]) if ok else None
        summary[key] = {"worst": max(values) if values else math.nan,
                        "worst_seed": worst["seed"] if worst else None,
                        "within": sum(v <= bound for v in values) / max(len(values), 1), "bound": bound}
    summary["coverage"] = sum(r["covered"] for r in ok) / max(len(ok), 1)
    summary["thrust_max_coverage"] = sum(r["thrust_max_covered"] for r in ok) / max(len(ok), 1)
    spin = [r["spin_up"] for r in ok]
    summary["spin_up"] = {"worst": max(spin, key=abs) if spin else math.nan,
                          "worst_seed": max(ok, key=lambda r: abs(r["spin_up"]))["seed"] if ok else None}
    summary["spin_up_coverage"] = sum(abs(r["spin_up"]) <= 1.959964 * r["spin_up_se"] for r in ok) / max(len(ok), 1)
    summary["median_half_width"] = float(np.median([r["half_width"] for r in ok])) if ok else math.nan
    return summary


def report_lines(summary):
    lines = ["%d truths, %d fitted" % (summary["truths"], summary["fitted"])]
    for f in summary["failed"]:
        lines.append("  NOT FITTED seed %d: %s" % (f["seed"], f["failed"][:200]))
    for key, bound in BOUNDS.items():
        s = summary[key]
        unit = "" if key == "hover_command" else " %"
        scale = 1.0 if key == "hover_command" else 100.0
        lines.append("  %-16s worst %7.3f%s (seed %s), within %g%s: %5.1f %%   [%s]" % (
            key, scale * s["worst"], unit, s["worst_seed"], scale * bound, unit, 100.0 * s["within"], MODELS[key]))
    lines.append("  spin-up command  worst %+7.3f (seed %s)   [the truth's end of the ESC dead zone]"
                 % (summary["spin_up"]["worst"], summary["spin_up"]["worst_seed"]))
    lines.append("  spin-up +-1.96 standard errors holds the truth in %.1f %%" % (100.0 * summary["spin_up_coverage"]))
    lines.append("  95 %% hover-command interval coverage %.1f %% (median half-width %.4f)"
                 % (100.0 * summary["coverage"], summary["median_half_width"]))
    lines.append("  T_max +-1.96 standard errors (incl. curve-form error) holds the truth in %.1f %%"
                 % (100.0 * summary["thrust_max_coverage"]))
    return lines
