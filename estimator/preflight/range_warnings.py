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
    """One warning naming each bus voltage beyond the bench sweep's, with its pack state and how
    far beyond, or None.

    params: parameter set; voltages: list of (state, bus voltage [V]) where the model evaluates
    the rotor (the hover at each pack state, full command on a nominal and on a full pack).
    A voltage is beyond when it lies outside thrust_curve.voltage_min_V .. voltage_max_V (the
    sweep's range) by more than VOLTAGE_RANGE_TOLERANCE, or, for a set without them, outside
    +-REFERENCE_VOLTAGE_BAND around reference_voltage_V (module constants); how far is the
    relative distance [%] to that range's nearer end (the sweep's lowest or highest voltage).
    """
    curve = params["thrust_curve"]
    v_ref = curve["reference_voltage_V"]
    lo, hi = curve.get("voltage_min_V"), curve.get("voltage_max_V")
    recorded = lo is not None and hi is not None
    if recorded:
        lo_ok, hi_ok = lo * (1.0 - VOLTAGE_RANGE_TOLERANCE), hi * (1.0 + VOLTAGE_RANGE_TOLERANCE)
    else:
        lo, hi = v_ref * (1.0 - REFERENCE_VOLTAGE_BAND), v_ref * (1.0 + REFERENCE_VOLTAGE_BAND)
        lo_ok, hi_ok = lo, hi
    outside = ["%.1f V (%s: %.0f %% %s)" % (v, state, 100.0 * abs(v / (lo if v < lo_ok else hi) - 1.0),
                                           "below" if v < lo_ok else "above")
               for state, v in voltages if v is not None and not lo_ok <= v <= hi_ok]
    if not outside:
        return None
    if recorded:
        swept = "the bench sweep ran at %.1f..%.1f V" % (lo, hi)
    else:
        swept = ("against its reference voltage %.1f V +-%.0f %%; the parameter set does not record the "
                 "sweep's range" % (v_ref, 100.0 * REFERENCE_VOLTAGE_BAND))
    return ("bus voltage beyond the bench sweep: %s; %s; thrust, current and margins there are "
            "extrapolated by the fitted motor model (voltage exponent %.2f at the reference): sweep the "
            "rotor at this pack's voltage to confirm"
            % (", ".join(outside), swept, curve["voltage_exponent"]))


def about_the_vehicle(warning):
    """True for a warning hover_from_params derives from a vehicle (its pack voltages, site air or
    hover command beyond the sweep): hover_block stores these in the parameter set for the fit's
    vehicle, and hover_from_params leaves the stored ones out and computes them afresh."""
    return "beyond the bench sweep" in warning or "extrapolated" in warning
