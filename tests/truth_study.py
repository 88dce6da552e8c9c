"""The randomised study of the bench fit against independent truths (tests/truth_rotor.py).

Each truth's sweep is written as a CSV in its own units and fitted by ``fit_for_vehicle``
with the truth's vehicle, exactly as ``liftcal fit BENCH.csv --vehicle VEHICLE.json`` does.
The checks, with the published model each truth value comes from:
  T_max            thrust at full command at V_ref: DC motor equivalent model + propeller
                   coefficients (Drela 2007; Brandt and Selig 2011; from memory)      bound 3 %
  curve            the exported quadratic against the truth over commands 0.25..1     3 % of T_max
  hover command    the truth's command that holds m g / N on the sagging Thevenin pack 0.02
  thrust-to-weight full-command thrust of N rotors on the sagging pack over m g       3 %
  hover current    pack current at hover (same models)                                5 %
  hover power      bus voltage x pack current at hover (same models)                  5 %
  endurance        60 C_usable / I_hover (definition of capacity)                      10 %
  coverage         share of the 95 % hover-command intervals holding the truth       >= 90 %
"""

import math
import os
import tempfile

import numpy as np

from truth_rotor import (G0, command_at_bus_V, random_truth, sweep_rows, truth_values, vehicle_file,
                         voltage_exponent, write_csv)

# a sagged pack: this far below the sweep's lowest bus voltage [-]
SAG_SHARE = 0.13

BOUNDS = {"thrust_max": 0.03, "curve": 0.03, "hover_command": 0.02, "thrust_to_weight": 0.03,
          "hover_current": 0.05, "hover_power": 0.05, "endurance": 0.10}
MODELS = {
    "thrust_max": "DC motor + propeller coefficients (Drela 2007; Brandt & Selig 2011)",
    "curve": "same truth over commands 0.25..1, share of T_max",
    "hover_command": "truth ESC + motor on the Thevenin pack (bisection)",
    "thrust_to_weight": "N rotors at full duty on the sagging pack",
    "hover_current": "pack current at hover, same models",
    "hover_power": "bus voltage x pack current at hover, same models",
    "endurance": "60 C_usable / I_hover (capacity definition)",
}


def run_one(seed, rows=None, folder=None, tweak=None, keep=False, cut=None):
    """Fit one truth; returns a dict of errors (or 'failed': message). tweak(truth) may change
    the drawn truth before its rows are made; keep=True adds the truth, params and truth values.
    cut: the sweep stops at this command [-] (a stand's current limit, heat, a small supply);
    its ESC then has its end points at idle and full command (0..1): a sweep that stops short
    cannot show an ESC calibrated to a narrower range (the fit's warning says so), so such a
    truth asks a question the data cannot answer. The truth's values stay at full command."""
    from estimator.bench.curve_fit import thrust_model_N
    from estimator.commands.bench import fit_for_vehicle
    from estimator.errors import InputError
    from estimator.vehicle import check_vehicle

    rng = np.random.default_rng(seed)
    truth = random_truth(rng, rows=rows)
    if tweak is not None:
        tweak(truth)
    if cut is not None:
        truth.update({"sweep_top": cut, "e_lo": 0.0, "e_hi": 1.0})
    table = sweep_rows(truth, rng)
    folder = folder or tempfile.mkdtemp()
    path = os.path.join(folder, "truth-%d.csv" % seed)
    write_csv(truth, table, path)
    vehicle = check_vehicle(vehicle_file(truth), "truth-%d.json" % seed)
    out = {"seed": seed, "rows": int(table.shape[0]), "diameter_m": truth["diameter_m"],
           "cells": truth["cells"], "thrust_unit": truth["thrust_unit"], "command_unit": truth["command_unit"]}
    try:
        params = fit_for_vehicle(path, vehicle)
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
        "hover_power": abs(h["power_W"] / tv["hover_power_W"] - 1.0),
        "endurance": abs(h["flight_time_min"] / tv["flight_time_min"] - 1.0),
        "covered": bool(lo <= tv["hover_command"] <= hi),
        "thrust_max_covered": bool(abs(c["thrust_max_N"] - tv["thrust_max_N"])
                                   <= 1.959964 * params["standard_errors"]["thrust_max_N"]),
        "thrust_max_se": params["standard_errors"]["thrust_max_N"] / tv["thrust_max_N"],
        "half_width": 0.5 * (hi - lo),
        "warnings": len(params.get("warnings", [])),
        "spin_up": params["motor_model"]["command_start"] - spin_up_command(truth),
        "spin_up_se": params["motor_model"].get("command_start_standard_error", 0.0),
        "supplies": len(truth["supplies"]),
    })
    out.update(sagged(truth, params))
    if keep:
        out.update({"truth": truth, "params": params, "truth_values": tv})
    return out


def sagged(truth, params):
    """Voltage exponent and hover command at a sagged bus (SAG_SHARE below the sweep's lowest
    bus voltage), fitted against the truth: n_error [-] and its standard error n_se [-]; the
    hover command of the exported curve (what the watch and the controller use) and of the
    motor model (the hover sheet), each minus the truth's command at that held bus voltage
    (DC motor equivalent model + propeller coefficients, tests/truth_rotor.py)."""
    from estimator.core.thrust_curve import hover_command
    from estimator.core.fitted_rotor import FittedRotor

    c = params["thrust_curve"]
    n_true = voltage_exponent(truth, c["reference_voltage_V"])
    out = {"n_error": c["voltage_exponent"] - n_true,
           "n_se": params["standard_errors"]["voltage_exponent"], "n_source": c["voltage_exponent_source"]}
    v_sag = (1.0 - SAG_SHARE) * c["voltage_min_V"]
    t_h = truth["vehicle"]["mass_kg"] * G0 / truth["vehicle"]["rotors"]
    u_true = command_at_bus_V(truth, t_h, v_sag)
    if u_true is None:
        return out
    u_curve, _ = hover_command(t_h, v_sag, truth["rho"], c)
    rotor = FittedRotor(params, truth["rho"])
    vm, _ = rotor.for_thrust(t_h)
    u_motor = rotor.command(vm / v_sag) if vm <= v_sag else None
    # a fit that says full command is not enough is as far off as the truth's command is from full
    out["sag_curve"] = abs(u_curve - u_true) if u_curve is not None else 1.0 - u_true
    out["sag_motor"] = abs(u_motor - u_true) if u_motor is not None else 1.0 - u_true
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
    for supplies, name in ((1, "one"), (3, "three")):
        group = [r for r in ok if r["supplies"] == supplies]
        summary[name + "_supply"] = sagged_summary(group)
    summary["median_half_width"] = float(np.median([r["half_width"] for r in ok])) if ok else math.nan
    return summary


def sagged_summary(group):
    """Worst voltage-exponent error, its coverage and worst hover-command errors at the sag."""
    if not group:
        return None
    worst_n = max(group, key=lambda r: abs(r["n_error"]))
    sag = [r for r in group if "sag_curve" in r]
    out = {"truths": len(group), "n_worst": worst_n["n_error"], "n_worst_seed": worst_n["seed"],
           "n_coverage": sum(abs(r["n_error"]) <= 1.959964 * r["n_se"] for r in group) / len(group),
           "n_median_se": float(np.median([r["n_se"] for r in group])), "sag_truths": len(sag)}
    for key in ("sag_curve", "sag_motor"):
        worst = max(sag, key=lambda r: r[key]) if sag else None
        out[key] = (worst[key], worst["seed"]) if worst else (math.nan, None)
        out[key + "_within"] = sum(r[key] <= BOUNDS["hover_command"] for r in sag) / max(len(sag), 1)
    return out


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
    for name in ("one", "three"):
        s = summary.get(name + "_supply")
        if not s:
            continue
        lines.append("  %s supply (%d truths): voltage exponent worst error %+.3f (seed %s), +-1.96 se holds "
                     "the truth in %.1f %% (median se %.3f)" % (name, s["truths"], s["n_worst"], s["n_worst_seed"],
                                                                100.0 * s["n_coverage"], s["n_median_se"]))
        lines.append("    hover command at %.0f %% below the sweep's lowest bus (%d truths): curve worst %.3f "
                     "(seed %s, within 0.02: %.1f %%), motor model worst %.3f (seed %s, within 0.02: %.1f %%)"
                     % (100.0 * SAG_SHARE, s["sag_truths"], s["sag_curve"][0], s["sag_curve"][1],
                        100.0 * s["sag_curve_within"], s["sag_motor"][0], s["sag_motor"][1],
                        100.0 * s["sag_motor_within"]))
    return lines


# a refusal of a short sweep is right only when it names the extrapolation to full command
SHORT_SWEEP_CAUSE = "stops at command"


def cut_summary(results):
    """Per cut-off: truths, fitted, refusals naming the short sweep (refused) and other
    failures (failed); worst T_max, hover command and hover power errors with their seeds;
    coverage of the 95 % hover-command interval and of T_max +- 1.96 standard errors."""
    ok = [r for r in results if "failed" not in r]
    refused = [r for r in results if "failed" in r and SHORT_SWEEP_CAUSE in r["failed"]]
    out = {"truths": len(results), "fitted": len(ok), "refused": refused,
           "failed": [r for r in results if "failed" in r and r not in refused]}
    for key in ("thrust_max", "hover_command", "hover_power"):
        worst = max(ok, key=lambda r: r[key]) if ok else None
        out[key] = (worst[key], worst["seed"]) if worst else (math.nan, None)
    out["coverage"] = sum(r["covered"] for r in ok) / max(len(ok), 1)
    out["thrust_max_coverage"] = sum(r["thrust_max_covered"] for r in ok) / max(len(ok), 1)
    out["thrust_max_median_se"] = float(np.median([r["thrust_max_se"] for r in ok])) if ok else math.nan
    return out


def cut_report_lines(cut, s):
    lines = ["sweep cut at %.2f: %d truths, %d fitted, %d refused naming the short sweep, %d failed"
             % (cut, s["truths"], s["fitted"], len(s["refused"]), len(s["failed"]))]
    for f in s["failed"]:
        lines.append("  FAILED seed %d: %s" % (f["seed"], f["failed"][:200]))
    for f in s["refused"]:
        lines.append("  refused seed %d (%.3f m, %d cells): %s" % (f["seed"], f["diameter_m"], f["cells"],
                                                                    f["failed"][:160]))
    lines.append("  worst: T_max %.2f %% (seed %s), hover command %.4f (seed %s), hover power %.2f %% (seed %s)"
                 % (100.0 * s["thrust_max"][0], s["thrust_max"][1], s["hover_command"][0], s["hover_command"][1],
                    100.0 * s["hover_power"][0], s["hover_power"][1]))
    lines.append("  coverage: hover-command 95 %% interval %.1f %%, T_max +-1.96 se %.1f %% (median se %.2f %% of T_max)"
                 % (100.0 * s["coverage"], 100.0 * s["thrust_max_coverage"], 100.0 * s["thrust_max_median_se"]))
    return lines
