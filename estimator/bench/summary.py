"""What the fit says when it is done: the ``liftcal fit`` text and its ``--json`` object,
from the parameter set (commands and thrusts in the CSV's own units, values with matching
error digits: estimator.bench.wording)."""

from estimator.cautions import cautions
from estimator.bench.columns import OPTIONAL
from estimator.bench.wording import START_POORLY_DETERMINED, command_with_error, thrust_text, value_and_error
from estimator.units import command_text, commands_in_unit, plain_number

# the commands of the --json object that are also given in the sweep's own unit
COMMAND_KEYS = ("command_min", "command_start", "hover_command", "hover_command_interval_95")
# where a voltage exponent comes from, by its source (thrust_curve.voltage_exponent_source)
VOLTAGE_EXPONENT_WHY = {
    "fitted": "fitted to the sweep's supply voltages",
    "motor model": "NOT MEASURED: one supply voltage cannot measure it; from the fitted motor model, "
                   "d ln T / d ln V at full command, with the ESC's duty held near linear",
    "given": "given with --voltage-exponent, not fitted",
    "default": "a default, not fitted",
}


def fit_json(params, warnings, columns, out_file, plot_file=None):
    """The ``liftcal fit --json`` object (design notes sec. 4) from a parameter set: its main
    values and errors, the warnings shown, where it was written, the columns used, the plot,
    the cautions. warnings: those shown (the set's, and the vehicle's margins); columns: the
    reader's {fitted, read_not_used}."""
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
                "warnings": warnings})
    if "hover" in params:
        out["hover_command"] = params["hover"]["hover_command"]
        out["hover_command_interval_95"] = params["hover"]["hover_command_interval_95"]
    # the same commands in the sweep's own unit (hover_command_us, ...), beside the 0..1 values
    out.update(commands_in_unit({k: out[k] for k in COMMAND_KEYS if k in out},
                                params["provenance"].get("units", {}).get("command", "-")))
    out.update({"out": out_file, "columns": dict(columns, why_not_used=OPTIONAL_WHY)})
    if plot_file:
        out["plot"] = plot_file
    out["cautions"] = list(cautions("settings"))
    return out


def fit_text(params, out_file, warnings, columns, thrust_to_weight_words=None):
    """The fit's text summary for an 80-column terminal: rows, columns, the curve and its
    errors, the power model, k, the vehicle's hover (thrust_to_weight_words: the thrust-to-weight
    as the hover sheet judges and marks it, with what it means, passed by the command that
    chains the flows), the warnings and the cautions; commands and thrusts in the CSV's units
    (provenance.units)."""
    from estimator.textwidth import fit_width  # an 80-column terminal

    c, p, k, q = (params["thrust_curve"], params["power_model"], params["static_factor"],
                  params["fit_quality"])
    se = params["standard_errors"]
    units = params["provenance"].get("units", {})
    tu, cu = units.get("thrust", "N"), units.get("command", "-")
    cmd = lambda u, span=False: command_text(u, cu, span)  # noqa: E731
    thr = lambda t_N: thrust_text(t_N, tu)  # noqa: E731
    lines = [
        "fitted %d rows (%d dropped: %s) -> %s" % (
            q["rows_used"], q["rows_rejected"],
            ", ".join("%s %d" % kv for kv in sorted(q["rejected"].items())) or "none", out_file),
        columns_note(columns),
        "thrust curve for the controller (at %.2f V, %.3f kg/m^3; +- one standard error incl. curve-form error)" % (
            c["reference_voltage_V"], c["reference_density_kg_m3"]),
        "  full-command thrust  %s%s" % (thrust_text(c["thrust_max_N"], tu, se["thrust_max_N"]),
                                         "" if tu == "N" else " (%s N)" % plain_number(c["thrust_max_N"])),
        "  quadratic share      %s" % _pm(c["quadratic_share"], se["quadratic_share"],
                                          "not fitted" if "quadratic_share_error" not in c else
                                          "not separable from the intercept on this sweep (at a = 1 both "
                                          "shift the curve alike): no error bar of its own, the "
                                          "intercept's carries it"),
        "  curve intercept      %s (command_min: the quadratic's zero, not a duty offset)" % (
            command_with_error(c["command_min"], se["command_min"], cu)),
        "  rotor starts at      %s%s" % (_start_text(params["motor_model"], cu),
                                        "; full command at %s" % cmd(c["command_max"]) if c["command_max"] < 1.0 else ""),
        "  voltage exponent     %s" % _exponent_text(c["voltage_exponent"], se["voltage_exponent"],
                                                     VOLTAGE_EXPONENT_WHY.get(c.get("voltage_exponent_source"),
                                                                              "not fitted")),
        "  density exponent     %s" % _exponent_text(c["density_exponent"], se.get("density_exponent", 0.0),
                                                     "from the fitted motor model, d ln T / d ln rho at "
                                                     "full command"),
        "  thrust residual      %s rms" % thr(q["rms_residual_N"]),
        "power per rotor  P = %.4g W + %.4g W/N^0.5 T^0.5 + %.4g W/N T + %.4g W/N^1.5 T^1.5 + %.4g W/N^2 T^2 "
        "(all >= 0; rms %.3g W)" % (
            p["idle_power_W"], p["sqrt_W_per_N0_5"], p["linear_W_per_N"], p["induced_W_per_N1_5"],
            p["copper_W_per_N2"], q["power_rms_residual_W"]),
        "  power noise for the watch  %.1f %% (robust, through the thrust curve)" % (100.0 * p["residual_rel_std"]),
        "static thrust factor k = %.3f at %s (%s); efficiency k^1.5 = %.0f %% of ideal" % (
            k["value"], k.get("value_at", "median thrust"), thr(k.get("thrust_at_value_N", 0.0)),
            100.0 * k["value"] ** 1.5),
    ]
    h = params.get("hover")
    if h:
        tw_words = thrust_to_weight_words or "%.2f (full command, nominal pack)" % h.get("thrust_to_weight", 0.0)
        lo, hi = h["hover_command_interval_95"]
        avionics_A = params["vehicle"].get("avionics_current_A") or 0.0
        # power_W is the rotors' and current_A the pack's: with avionics on the bus the two differ by
        # their share, so each is named (new-user trial 15, finding 2: '253.3 W, 12.7 A' side by side)
        # (new-user trial, session 23: the line below 'power per rotor' read as one rotor's draw)
        n_rot = params["vehicle"].get("rotor_count")
        draw = ("%.4g W, %.3g A for all %s rotors" % (h["power_W"], h["current_A"], n_rot) if not avionics_A else
                "%.4g W for all %s motors; %.3g A, %.4g W from the pack with %.3f A avionics"
                % (h["power_W"], n_rot, h["current_A"], h["current_A"] * h["voltage_V"], avionics_A))
        lines += ["hover for %s: command %s (95 %% interval %s..%s), thrust fraction %.3f, "
                  "%s (motor model at the sagged hover bus %.2f V, nominal pack); thrust-to-weight %s" % (
                      params["vehicle"].get("name", "vehicle"), cmd(h["hover_command"]), cmd(lo), cmd(hi),
                      h["hover_thrust_fraction"], draw, h["voltage_V"], tw_words)]
    lines += ["! " + w for w in warnings]
    lines += ["- " + c for c in cautions("settings")]
    return fit_width("\n".join(lines))


# a value with its error is shown to at most this many significant digits: an error far below it
# ('2.000000000 +- 0.000000035', new-user trial 9, finding 3) is then quoted as a bound [-]
MAX_DIGITS = 4


def _pm(value, se, why_none):
    """'value +- error' with matching digits, or 'value (why_none)' for a value without a
    fitted error (held, taken from the motor model, or given): never a false '+- 0'."""
    text, error = value_and_error(value, se, 3, MAX_DIGITS)
    if error:
        return "%s +- %s" % (text, error)
    return "%.3f (%s)" % (value, why_none)


def _exponent_text(value, se, why):
    """'value +- error (why)', or 'value (why; no error bar)' when there is none."""
    text, error = value_and_error(value, se, 3, MAX_DIGITS)
    return "%s +- %s (%s)" % (text, error, why) if error else "%.3f (%s; no error bar)" % (value, why)


def _start_text(mm, unit):
    """The spin-up command with its standard error, and a word when the sweep cannot tell it."""
    se = mm.get("command_start_standard_error")
    text = command_with_error(mm["command_start"], se or 0.0, unit) + " (motor model: where the ESC's duty starts)"
    if se is not None and se > START_POORLY_DETERMINED:
        text += "; poorly determined by this sweep"
    return text


# why the optional columns of a sweep are read (checked as numbers) but not used
OPTIONAL_WHY = ("the fit takes each row's command, voltage, current and thrust; its motor model "
                "needs neither rotor speed nor torque, and it does not correct for time or temperature")


def columns_note(columns):
    """The summary's line on the columns, from the reader's ``columns`` {fitted, read_not_used}:
    the optional ones (estimator.bench.columns.OPTIONAL) are read and checked, not used."""
    fitted = ", ".join(columns["fitted"])
    if not columns["read_not_used"]:
        return "columns fitted: %s; no optional column (%s: read and checked, not used)" % (
            fitted, ", ".join("%s[%s]" % (n, next(iter(u))) for n, u in OPTIONAL.items()))
    return "columns fitted: %s; read and checked, not used: %s (%s)" % (
        fitted, ", ".join(columns["read_not_used"]), OPTIONAL_WHY)
