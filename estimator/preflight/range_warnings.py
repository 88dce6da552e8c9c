"""Warnings of the fitted route when a vehicle takes the bench fit beyond what the sweep measured.

Bus voltages beyond the sweep's, hover commands above the highest command swept; and which
warnings are about a vehicle (hover_block stores them for the fit's vehicle, hover_from_params
computes them afresh for the vehicle asked about). Used by measured_rotor.
"""

VOLTAGE_RANGE_TOLERANCE = 0.02
REFERENCE_VOLTAGE_BAND = 0.12


def command_range_warnings(params, states, command_unit="-"):
    """Warnings, with numbers, when a hover command lies beyond the commands the sweep measured;
    commands in command_unit (warnings.command_words)."""
    from estimator.preflight.warnings import command_words

    def cmd(u):
        return command_words("%.3f" % u, command_unit)

    curve = params["thrust_curve"]
    top = curve.get("command_swept_max")
    out = []
    if top is None:
        return out
    for name in ("full", "nominal", "empty"):
        u = states[name]["command"]
        if u is not None and u > top + 0.005:
            out.append("hover command %s at %s pack lies above the highest command swept (%s): "
                       "extrapolated by the motor model" % (cmd(u), name, cmd(top)))
    mm = params["motor_model"]
    if top < mm["command_top"] - 0.02:
        out.append("full-command thrust and thrust-to-weight are extrapolated from command %s (the "
                   "sweep's top) to %s by the motor model" % (cmd(top), cmd(mm["command_top"])))
    return out


def voltage_range_warning(params, voltages):
    """A warning when bus voltages lie beyond the bench sweep's, or None.

    params: parameter set; voltages: list of (label, bus voltage [V]) where the model
    evaluates the thrust curve. Uses thrust_curve.voltage_min_V / voltage_max_V (the sweep's
    range) when the parameter set has them, else a band of +-REFERENCE_VOLTAGE_BAND around
    reference_voltage_V (module constants).
    """
    curve = params["thrust_curve"]
    v_ref = curve["reference_voltage_V"]
    lo, hi = curve.get("voltage_min_V"), curve.get("voltage_max_V")
    recorded = lo is not None and hi is not None
    if recorded:
        lo_ok, hi_ok = lo * (1.0 - VOLTAGE_RANGE_TOLERANCE), hi * (1.0 + VOLTAGE_RANGE_TOLERANCE)
    else:
        lo_ok, hi_ok = v_ref * (1.0 - REFERENCE_VOLTAGE_BAND), v_ref * (1.0 + REFERENCE_VOLTAGE_BAND)
    outside = ["%.1f V (%s)" % (v, label) for label, v in voltages
               if v is not None and not lo_ok <= v <= hi_ok]
    if not outside:
        return None
    if recorded:
        swept = "the bench sweep ran at %.1f..%.1f V" % (lo, hi)
    else:
        swept = ("against its reference voltage %.1f V; the parameter set does not record the "
                 "sweep's range" % v_ref)
    worst = max((max(lo_ok / v, v / hi_ok) for _, v in voltages if v is not None), default=1.0)
    return ("bus voltage beyond the bench sweep: %s, %s (up to %.0f %% beyond); thrust, current and "
            "margins there are extrapolated by the fitted motor model (voltage exponent %.2f at the "
            "reference): sweep the rotor at this pack's voltage to confirm"
            % (", ".join(outside), swept, 100.0 * (worst - 1.0), curve["voltage_exponent"]))


def about_the_vehicle(warning):
    """True for a warning hover_from_params derives from a vehicle (its pack voltages, site air or
    hover command beyond the sweep): hover_block stores these in the parameter set for the fit's
    vehicle, and hover_from_params leaves the stored ones out and computes them afresh."""
    return "beyond the bench sweep" in warning or "extrapolated" in warning
