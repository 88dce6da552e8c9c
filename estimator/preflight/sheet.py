"""The pre-flight sheet: a report dict of preflight.report.hover_report laid out by the questions a
builder asks before a first flight: will it hover, with what margin, for how long, what to watch
out for (lines wrapped to an 80-column terminal, estimator.textwidth).
"""

from estimator.cautions import cautions
from estimator.core.constants import CELSIUS_ZERO_K
from estimator.core.momentum import figure_of_merit
from estimator.preflight.low_reynolds import endurance_lead
from estimator.preflight.pack import pack_temperature_text
from estimator.preflight.warnings import (ENDED_BY_WORDS, GIVEN3, REACHABLE_MARK, SIG3, _num, beside,
                                         cannot_hover_cause, current_judged, judged_thrust_to_weight,
                                         judged_thrust_to_weight_text, not_flyable_reasons,
                                         resistance_text, slip_words, thrust_to_weight_text)
from estimator.textwidth import fit_width
from estimator.units import command_text, counted

MODEL = "liftcal.dc-motor-momentum/1"  # the datasheet route's report model
# the datasheet model takes command = ESC duty; a real ESC only starts the motor above a
# dead band, so a bench fit reports a higher hover command for the same set
DUTY_NOTE = "command = ESC duty; a real ESC's start-up dead band adds to it: fit a bench sweep"

CAUTIONS = cautions("sheet")


def coaxial_text(report):
    """The sheet's line on a coaxial layout's penalty: the factor, its basis and source, and the
    figure of merit with it and for an isolated rotor (when the report has the rotor's CT, CP)."""
    text = ("coaxial pairs: ideal induced power x%.4g, included above (power basis: momentum theory "
            "with the lower rotor in the upper's fully developed slipstream; Leishman 2006, coaxial "
            "rotors, from memory)" % report["coaxial_induced_power_factor"])
    if report.get("propeller_ct") and report.get("propeller_cp"):
        text += "; figure of merit %.2f for an isolated rotor" % figure_of_merit(report["propeller_ct"],
                                                                                report["propeller_cp"])
    return text


def _avionics(report):
    """' + 0.50 A avionics' when the vehicle gives a steady non-motor current (in the pack current), else ''."""
    return " + %s avionics" % _num(report["avionics_current_A"], SIG3, "A") if report.get("avionics_current_A") else ""


def _at_hover(current_A):
    return "" if current_A is None else "%s at hover, " % _num(current_A, SIG3, "A")


def _minutes(value):
    """An endurance as the sheet prints it: 13.4 min, 1113 min (no tenths where they mean nothing)."""
    if value is None:
        return _num(value, "%.1f")
    return _num(value, "%.1f" if value < 100.0 else "%.0f", "min")


def static_factor_text(report):
    """'static factor k 0.60 (...)': k is taken from the electrical power, so it counts the motor
    and ESC losses besides the rotor's (k^1.5 = eta = T^1.5 / (P_elec sqrt(2 rho A)), momentum
    theory), while the figure of merit is the rotor's alone: said beside it, with the motor and
    ESC share k^1.5 / FM when the sheet shows a figure of merit (trial 7, item 9)."""
    k, fm = report["static_factor"], report.get("figure_of_merit")
    if fm:
        return ("static factor k %.2f (from the electrical power, so it counts the motor and ESC losses: "
                "k^1.5 = figure of merit x motor and ESC efficiency = %.2f x %.2f)" % (k, fm, k ** 1.5 / fm))
    return "static factor k %.2f (from the electrical power: it counts the motor and ESC losses)" % k


def _at_full(report, judged_A, nominal_A):
    """'28.3 A at full command on a full pack (23.1 A on a nominal pack)': the value the current
    limits are judged on (warnings.judged_currents) and the nominal pack's; the nominal value
    alone for a report without the judged one."""
    if judged_A is None or report.get("current_judged_at") is None:
        return "%s at full command" % _num(nominal_A, SIG3, "A")
    return "%s at full command on a full pack (%s on a nominal pack)" % (
        _num(judged_A, SIG3, "A"), _num(nominal_A, SIG3, "A"))


def _cell_V(bus_V, cells, cutoff_cell_V, below):
    """A bus voltage per cell as the sag line prints it: 2 decimals, more where fewer would round
    a value below the cutoff onto it (warnings.beside)."""
    per_cell = bus_V / cells
    return (beside(per_cell, cutoff_cell_V) if below else "%.2f" % per_cell) + " V"


def sag_text(report):
    """The sheet's sag line, naming the pack state of each voltage (as the current lines do):
    'full command sags the pack to 19.3 V on a nominal pack (3.21 V per cell; loaded cutoff 3.30 V
    per cell) and to 21.6 V on a full pack (3.60 V per cell, where the current limits are judged)'.
    The nominal pack's is the one the sag check judges (warnings.full_command_sag); the full
    pack's is the state of warnings.judged_currents, shown when the report has it."""
    cells, cutoff = report["cells"], report["cutoff_cell_V"]
    text = "full command sags the pack to %s on a nominal pack (%s per cell; loaded cutoff %s per cell)" % (
        _num(report.get("full_bus_V"), SIG3, "V"),
        _cell_V(report["full_bus_V"], cells, cutoff, report.get("thrust_to_weight_reachable") is False),
        _num(cutoff, "%.2f", "V"))
    full_bus = report.get("current_judged_bus_V")
    if full_bus is not None and report.get("current_judged_at") is not None:
        text += " and to %s on a full pack (%s per cell, where the current limits are judged)" % (
            _num(full_bus, SIG3, "V"),
            _cell_V(full_bus, cells, cutoff, report.get("current_judged_full_command_reachable") is False))
    return text


def _esc_input_judged(report):
    """The ESC's input current [A] at full command on a full pack: its pack share (less the avionics)."""
    pack, count = report.get("pack_current_judged_A"), report.get("rotor_count")
    return (pack - (report.get("avionics_current_A") or 0.0)) / count if pack is not None and count else None


def _command(report, key, none="n/a"):
    """A command of the report as the fraction of full command, with the sweep's own unit
    beside it for a fitted set from a sweep in us, % or permille ('0.58 (1578 us)')."""
    value, unit = report.get(key), report.get("command_unit")
    return _num(value, "%.2f", none=none) + (" (%s)" % command_text(value, unit) if unit and value is not None else "")


def hover_below_cutoff(report):
    """The verdict's words when holding the weight sags a nominal pack below its loaded cutoff,
    else None. Then the thrust-to-weight reachable before the cutoff (warnings.judged_thrust_to_weight,
    marked) is below 1, and 'it holds its weight' would contradict it: the hover command is
    reached only past the cutoff. Reads hover_bus_V [V], cells [-], cutoff_cell_V [V] and the
    nominal open-circuit pack_voltage_V [V]; a cutoff within CUTOFF_NEAR_NOMINAL_V of the nominal
    cell voltage is named as the likely cause, else the pack's sag."""
    tw, marked = judged_thrust_to_weight(report)
    if not marked or tw is None or tw >= 1.0:
        return None
    cells, bus, cutoff = report.get("cells"), report.get("hover_bus_V"), report.get("cutoff_cell_V")
    nominal = (report.get("pack_voltage_V") or {}).get("nominal")
    known = cells and bus is not None and cutoff is not None
    text = ("holding its weight takes command %s on a nominal pack, %s: before the cutoff it reaches only "
            "thrust-to-weight %s (command %s), so it sinks on a nominal pack; "
            % (_command(report, "hover_command"),
               "which sags it to %s V per cell, below its %.2f V loaded cutoff" % (beside(bus / cells, cutoff), cutoff)
               if known else "which sags it below its loaded cutoff",
               judged_thrust_to_weight_text(report), _command(report, "reachable_command")))
    if known and nominal and nominal / cells - cutoff < CUTOFF_NEAR_NOMINAL_V:
        return text + ("check $.battery.cutoff_cell_V: %.2f V is only %.2f V below the nominal cell voltage "
                       "%.2f V" % (cutoff, nominal / cells - cutoff, nominal / cells))
    return text + "the pack sags too much at hover: a pack with less resistance or more cells, or a lighter vehicle"


# a loaded cutoff closer than this to the nominal cell voltage is the likely cause of a hover that
# sags a nominal pack below it (the default sits 0.4 V below a LiPo's nominal; common practice) [V]
CUTOFF_NEAR_NOMINAL_V = 0.2


def _pack_power(report):
    """(the hover power beside the pack current, words for the bracket after it): the motors'
    (hover_power_W), plus the avionics' current at the bus voltage when the vehicle gives one,
    the motors' share then named in the bracket (new-user trial 14, finding 8)."""
    motors_W, bus_V = report.get("hover_power_W"), report.get("hover_bus_V")
    if not report.get("avionics_current_A") or motors_W is None or bus_V is None:
        return _num(motors_W, SIG3, "W"), ""
    return (_num(motors_W + report["avionics_current_A"] * bus_V, SIG3, "W"),
            "the motors %s; " % _num(motors_W, SIG3, "W"))


def _small_rotor_leads(report):
    """True when the report's hover numbers are at the small-rotor figure of merit (preflight.report:
    a small estimated rotor that hovers there), the generic blade's estimate beside them."""
    check = report.get("low_reynolds_check")
    return bool(check) and check.get("hover_command") is not None and report.get("hover_command") is not None


def _small_rotor_line(report):
    """Section 1's label of a small rotor's hover numbers and the generic blade's beside them, or ''."""
    if not _small_rotor_leads(report):
        return ""
    low = report["low_reynolds_check"]
    return ("(hover command, currents, power and minutes at the figure of merit %.2f measured rotors of this "
            "size reach; the generic blade estimate, %.2f and likely optimistic, gives command %s, motor "
            "current %s, pack current %s, the motors %s)" % (
                low["figure_of_merit_assumed"], low["figure_of_merit_estimated"],
                _num(low.get("estimate_hover_command"), "%.2f"),
                _num(low.get("estimate_hover_motor_current_A"), SIG3, "A"),
                _num(low.get("estimate_hover_current_A"), SIG3, "A"),
                _num(low.get("estimate_hover_power_W"), SIG3, "W")))


def format_sheet(report, section5=None):
    """The human pre-flight sheet for a report dict, grouped by the builder's questions
    (lines wrapped to an 80-column terminal, estimator.textwidth); section5: the payload table's
    text (preflight.payload.format_payload_table) or None, placed before the closing cautions
    (new-user trial 12, finding 14: it came after them, so the cautions sat mid-sheet)."""
    lines = []
    title = "PRE-FLIGHT ESTIMATE: %s" % report.get("name", "vehicle")
    lines += [title, "=" * len(title)]
    # the site as read, in SI (new-user trial 24, finding 6: "altitude": "2000ft" showed only the
    # air it gave, so an ft/m slip was easy to miss; mass and propeller are echoed already)
    where = ""
    if report.get("site_altitude_m") is not None:
        where = "%.0f m%s; " % (report["site_altitude_m"], "" if report.get("temperature_K") is None
                                else ", %.0f C" % (report["temperature_K"] - CELSIUS_ZERO_K))
    air = where + "air %s (%s of standard, density altitude %s)" % (
        _num(report.get("density_kg_m3"), "%.3f", "kg/m^3"),
        _num(100.0 * report["density_ratio"] if report.get("density_ratio") else None, "%.0f", "%"),
        _num(report.get("density_altitude_m"), "%.0f", "m"))
    as_given = report.get("mass_as_given")
    size_given = report.get("propeller_as_given")
    diameter = report.get("propeller_diameter_m")
    setup = "%s%s, %s (%s)%s" % (
        _num(report.get("mass_kg"), GIVEN3, "kg"), " (%s as written)" % as_given if as_given else "",
        counted(report.get("rotor_count", 0), "rotor"), report.get("layout", "flat"),
        ", propeller%s %.3g m%s" % ("" if report.get("rotor_count") == 1 else "s", diameter, " (%s as written)" % size_given if size_given else
                                   " (bench rotor)" if report.get("propeller_source") == "bench sweep" else "")
        if diameter else "")
    lines += ["vehicle  " + setup, "site     " + air, ""]

    lines.append("1. Will it hover?")
    suspect = report.get("suspect_keys") or []
    if suspect and report.get("can_hover"):  # a likely unit slip: no plain YES on a file that is likely wrong
        lines.append("   CHECK THE FILE FIRST - %s %s like %s (see 4.); the answers below are for the values "
                     "as read" % (", ".join(suspect), "looks" if len(suspect) == 1 else "look", slip_words(suspect)))
    if report.get("can_hover"):
        why_not = not_flyable_reasons(report)
        below_cutoff = hover_below_cutoff(report)
        if below_cutoff:
            lines.append("   NOT ON A NOMINAL PACK - " + below_cutoff)
        elif why_not:
            lines.append("   ONLY JUST - it holds its weight at command %s on a nominal pack, but it is not "
                         "flyable: %s" % (_command(report, "hover_command"), "; ".join(why_not)))
        else:
            lines.append("   YES - command %s on a nominal pack" % _command(report, "hover_command"))
        lines.append("         %s on a full pack, %s near empty" % (
            _command(report, "hover_command_full"), _command(report, "hover_command_empty", none="cannot hover")))
        lines.append("         thrust fraction %s of full-command thrust at the hover bus voltage on a nominal "
                     "pack (not 1/(T/W): T/W is taken at full command, where the pack sags further)" %
                     _num(report.get("hover_thrust_fraction"), "%.2f"))
        interval = report.get("hover_command_interval_95")
        if interval:
            unit = report.get("command_unit")
            lines.append("         95 %% interval %.3f..%.3f%s (%s)"
                         % (interval[0], interval[1], " (%s..%s)" % (command_text(interval[0], unit),
                                                                     command_text(interval[1], unit)) if unit else "",
                            report.get("interval_scope", "bench-fit uncertainty only")))
        small = _small_rotor_line(report)
        if small:
            lines.append("         " + small)
        if report.get("model") == MODEL:
            lines.append("         " + DUTY_NOTE)
    else:
        cause = cannot_hover_cause(report)
        lines.append("   NO - it " + cause)
    lines.append("")

    lines.append("2. With what margin?")
    reachable = report.get("thrust_to_weight_reachable")
    if judged_thrust_to_weight(report)[1]:
        lines.append("   thrust-to-weight   %s  (judged: reachable at command %s, where a nominal pack "
                     "reaches its loaded cutoff; 2 is the usual floor)"
                     % (judged_thrust_to_weight_text(report), _command(report, "reachable_command")))
        lines.append("   %s marks the T/W reachable on a nominal pack; full command would give %s but sags "
                     "the nominal pack below its loaded cutoff: NOT REACHABLE"
                     % (REACHABLE_MARK, thrust_to_weight_text(report.get("thrust_to_weight"))))
    else:
        lines.append("   thrust-to-weight   %s   (full command, nominal pack; %s2 is the usual floor)"
                     % (thrust_to_weight_text(report.get("thrust_to_weight")),
                        "NOT REACHABLE on this pack, see below; " if reachable is False else ""))
    full_total, rotors = report.get("full_thrust_N"), report.get("rotor_count") or 0
    lines.append("   full-command thrust %s per rotor, %s total on a nominal pack (hover needs %s per rotor)" % (
        _num(full_total / rotors if full_total is not None and rotors else None, SIG3, "N"),
        _num(full_total, SIG3, "N"), _num(report.get("thrust_per_rotor_N"), SIG3, "N")))
    if report.get("full_command_cell_V") is not None:
        lines.append("   " + sag_text(report))
    count = report.get("rotor_count") or 0
    esc_hover = report.get("hover_esc_input_current_A", report.get("per_rotor_bus_current_A"))
    esc_full = report.get("full_esc_input_current_A")
    if esc_full is None and report.get("full_pack_current_A") is not None and count:
        esc_full = report["full_pack_current_A"] / count
    # the limits are judged at full command on a full pack (warnings.judged_currents): that value
    # first, the nominal pack's beside it
    if report.get("hover_motor_current_A") is not None or report.get("full_motor_current_A") is not None:
        lines.append("   motor current      %s%s, each motor (ESC output; motor limit %s)" % (
            _at_hover(report.get("hover_motor_current_A")),
            _at_full(report, current_judged(report, "motor"), report.get("full_motor_current_A")),
            _num(report.get("motor_current_limit_A"), GIVEN3, "A", none="not given")))
    esc_peak = report.get("esc_current_judged_A")
    lines.append("   ESC input current  %s%s, each ESC from the pack (what ESC telemetry reports; "
                 "ESC rating %s%s)" % (
                     _at_hover(esc_hover), _at_full(report, _esc_input_judged(report), esc_full),
                     _num(report.get("esc_current_limit_A"), GIVEN3, "A", none="not given"),
                     ", judged on %s, the larger of its input and output" % _num(esc_peak, SIG3, "A")
                     if report.get("esc_current_limit_A") is not None and esc_peak is not None else ""))
    lines.append("   pack current       %s%s, %s%s (rating %s)" % (
        _at_hover(report.get("hover_current_A")) if report.get("can_hover") else "",
        _at_full(report, current_judged(report, "pack"), report.get("full_pack_current_A")),
        ("all " if count != 1 else "") + counted(count, "motor"), _avionics(report),
        _num(report.get("pack_current_limit_A"), GIVEN3, "A", none="not given")))
    lines.append("")

    lines.append("3. For how long?")
    if report.get("can_hover"):
        ended = report.get("flight_ended_by")
        lead = endurance_lead(report)
        if ended and lead["basis"] == "small rotor":  # the conservative figure leads (low_reynolds)
            low = report["low_reynolds_check"]
            low_ended = low.get("flight_ended_by")
            if lead["flight_time_min"] is None:
                lines.append("   SMALL ROTOR: no hover at the figure of merit %.2f that measured rotors of "
                             "this size reach" % lead["figure_of_merit"])
            else:
                lines.append("   SMALL ROTOR: about %s at the figure of merit %.2f that measured rotors of "
                             "this size reach (hover from a full pack%s)" % (
                                 _num(lead["flight_time_min"], "%.1f", "min"), lead["figure_of_merit"],
                                 ", ended by %s" % ENDED_BY_WORDS.get(low_ended, low_ended) if low_ended else ""))
            other_ended = low.get("estimate_flight_ended_by", ended)
            lines.append("   the generic blade estimate (figure of merit %.2f) says about %s (ended by %s), "
                         "but %s; see below" % (
                             lead["other_figure_of_merit"], _num(lead["other_flight_time_min"], "%.1f", "min"),
                             ENDED_BY_WORDS.get(other_ended, other_ended), lead["reason"]))
        elif ended:
            lines.append("   about %s of hover from a full pack, ended by %s%s" % (
                _minutes(report.get("flight_time_min")), ENDED_BY_WORDS.get(ended, ended),
                " (as read: check %s first, see 4.)" % ", ".join(suspect) if suspect else ""))
        if ended:
            lines.append("   (%s usable share alone, %s at the nominal-pack hover current, gives %s)" % (
                "the estimate's" if lead["basis"] == "small rotor" and not _small_rotor_leads(report) else "the",
                _num(report.get("usable_Ah"), SIG3, "Ah"),
                _minutes(report.get("flight_time_usable_share_min"))))
        else:
            lines.append("   about %s of hover on %s usable (%s)" % (
                _num(report.get("flight_time_min"), "%.1f", "min"), _num(report.get("usable_Ah"), "%.2f", "Ah"),
                report.get("flight_time_basis", "usable share at the nominal-pack hover current")))
        if report.get("cutoff_cell_V") is not None:
            lines.append("   cutoff %.2f V per cell under load; pack resistance %s%s" % (
                report["cutoff_cell_V"], resistance_text(report.get("pack_resistance_ohm")),
                pack_temperature_text(report)))
        lines.append("   hover draws %s from the pack (%s%s), %s (%snominal pack, bus at %s)" % (
            (_num(report.get("hover_current_A"), SIG3, "A"),
             "the motor" if report.get("rotor_count") == 1 else "all motors", _avionics(report)) + _pack_power(report)
            + (_num(report.get("hover_bus_V"), "%.2f", "V"),)))
        extras = []
        if report.get("hover_rpm") is not None:
            extras.append("rotors at %.0f rpm" % report["hover_rpm"])
        coaxial = (report.get("coaxial_induced_power_factor") or 1.0) > 1.0
        if report.get("figure_of_merit") is not None:
            extras.append("figure of merit %.2f%s" % (report["figure_of_merit"],
                                                      " (with the coaxial penalty)" if coaxial else ""))
        if coaxial:
            lines.append("   " + coaxial_text(report))
        estimate = report.get("propeller_estimate")
        if estimate:
            lines.append("   propeller CT %.3f, CP %.4f ESTIMATED from %.3g m x %.3g m pitch, %d blades "
                         "(blade element momentum theory at %.0f rpm; typically 10-20 %% off%s)"
                         % (report["propeller_ct"], estimate.get("cp", report["propeller_cp"]),
                            report.get("propeller_diameter_m") or 0.0,
                            estimate["pitch_m"], estimate["blades"], estimate["rpm"],
                            "; likely optimistic at this small size, see below" if report.get("low_reynolds_check")
                            else ""))
        if _small_rotor_leads(report):
            low = report["low_reynolds_check"]
            lines.append("   CP raised from the estimate's %.4f to %.4f: the figure of merit %.2f measured rotors of "
                         "this size reach; every hover number above is at it" % (
                             low["estimate_cp"], low["cp"], low["figure_of_merit_assumed"]))
        if report.get("static_factor") is not None:
            extras.append(static_factor_text(report))
        if extras:
            lines.append("   " + "; ".join(extras))
    else:
        lines.append("   no hover, no endurance.")
    lines.append("")

    lines.append("4. What to watch out for")
    warnings = [w for w in dict.fromkeys(report.get("warnings") or [])
                if report.get("can_hover") or not w.startswith("cannot hover")]
    if warnings:
        for w in warnings:
            lines.append("   ! " + w)
    else:
        lines.append("   nothing flagged by the estimate")
    lines.append("")
    text = fit_width("\n".join(lines) + "\n") + (section5 + "\n\n" if section5 else "")
    cautions = ["Before you go to the field"] + ["   - " + c for c in report.get("cautions") or CAUTIONS]
    return text + fit_width("\n".join(cautions) + "\n")
