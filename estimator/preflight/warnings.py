"""What a pre-flight report warns about: margins, the cause when it cannot hover, flyability.

Shared by the datasheet report (report.py) and the fitted route (measured_rotor.py), so
neither imports the other. Thresholds are common practice for multirotors, not a standard.
"""

import math

from estimator.units import beside, command_text, plain_number  # beside: also the sheet's (sheet.py)


# Warning thresholds (common practice for multirotors, not a standard):
HOVER_COMMAND_LIMIT = 0.6  # hover above 0.6 of full command leaves little for control
THRUST_TO_WEIGHT_MIN = 2.0  # T/W of 2 puts hover near 0.67 command (thrust ~ command^1.8)
# below these a vehicle that holds its weight is called not flyable on the sheet (our own floors,
# far below the margins above: no control authority left to climb, steer or reject a gust)
FLYABLE_THRUST_TO_WEIGHT = 1.3
FLYABLE_HOVER_COMMAND = 0.8
THIN_AIR_DENSITY_RATIO = 0.9  # below 90 % of 1.225 kg/m^3 thrust margins shrink noticeably


# a sag of more than this share of the open-circuit voltage at full command is named as a cause
SAG_CAUSE_SHARE = 0.2
ENDED_BY_WORDS = {"cutoff": "the loaded-voltage cutoff", "reserve": "the landing reserve",
                  "thrust": "the loss of hover (the drained pack can no longer hold it)"}


def command_words(text, unit="-", of_full=False):
    """A command as a warning writes it: given as the fraction of full command the warning
    rounds it to ('0.62'), in the sweep's command unit (us, %, permille: '1620 us', estimator.
    units.command_text) for a report on a set fitted from such a sweep; else the fraction
    itself, followed by 'of full command' where of_full (a threshold: 'above 0.6 of full
    command')."""
    if unit in ("us", "%", "permille"):
        return command_text(float(text), unit)
    return text + " of full command" if of_full else text


def thrust_to_weight_text(tw):
    """The thrust-to-weight as the sheet and its warnings print it (same digits everywhere)."""
    if tw is None:
        return "n/a"
    return beside(tw, THRUST_TO_WEIGHT_MIN) if tw < THRUST_TO_WEIGHT_MIN else "%.2f" % tw


# the mark of a thrust-to-weight judged at the pack's loaded cutoff instead of at full command
# (every table and sheet: compare, payload, hover, hover --params) and what it means
REACHABLE_MARK = "*"
REACHABLE_MARK_NOTE = ("full command sags the nominal pack below its loaded cutoff: the T/W shown and judged "
                       "is the one reachable at the cutoff (the full-command value is not reachable on a "
                       "nominal pack)")


def judged_thrust_to_weight(report):
    """The thrust-to-weight every margin, warning and table judges, and whether it is marked.

    Reads thrust_to_weight [-] (full command, nominal pack), thrust_to_weight_reachable (False
    when full command sags the pack below its loaded cutoff) and reachable_thrust_to_weight [-]
    (at the highest command that keeps the cutoff). Returns (T/W [-] or None, marked): the
    reachable value, marked True, when full command is not reachable; else the full-command one.
    One rule for the datasheet and the bench-fit routes, the sheet, compare and payload.
    """
    if report.get("thrust_to_weight_reachable") is False and report.get("reachable_thrust_to_weight") is not None:
        return report["reachable_thrust_to_weight"], True
    return report.get("thrust_to_weight"), False


def judged_thrust_to_weight_text(report):
    """The judged thrust-to-weight as printed: thrust_to_weight_text, REACHABLE_MARK when marked."""
    tw, marked = judged_thrust_to_weight(report)
    return thrust_to_weight_text(tw) + (REACHABLE_MARK if marked and tw is not None else "")


def full_command_sag(report):
    """The bus voltage per cell at full command on a nominal pack against the loaded cutoff.

    Reads full_bus_V [V], cells [-], cutoff_cell_V [V]. Returns the report keys
    full_command_cell_V [V] and thrust_to_weight_reachable (False when full command pulls the
    pack below its cutoff, so the thrust-to-weight there is not reachable; None when unknown).
    """
    cells, bus, cutoff = report.get("cells"), report.get("full_bus_V"), report.get("cutoff_cell_V")
    if not cells or bus is None or cutoff is None:
        return {"full_command_cell_V": None, "thrust_to_weight_reachable": None}
    return {"full_command_cell_V": bus / cells, "thrust_to_weight_reachable": bus / cells >= cutoff}


# where the current limits are judged (both routes, compare, payload): full command on a full pack
CURRENT_JUDGED_AT = "full command, full pack"


def judged_currents(full_pack_point, cells, cutoff_cell_V):
    """The currents the motor, ESC and pack limits are judged on: full command on a full pack.

    A motor at full duty draws more current the higher its bus voltage (DC motor equivalent
    model: I = I0 + Kv Q(omega), omega rising with V_bus; Drela 2007, from memory), and the
    sagged bus of a Thevenin pack V_bus = V_oc - R I_pack rises with V_oc, so of the pack states
    a freshly charged (full) pack draws the most; it is also the pack of every take-off and
    first punch-out. The sag check stays on the nominal pack (full_command_sag): the two
    checks look at opposite ends of the pack. A full pack whose full-command sag reaches below
    the loaded cutoff is still judged at full command (the current flows before any cutoff
    acts) and says so (full_command_reachable False).
    full_pack_point: dict bus_V [V], motor_current_A [A] (each motor, ESC output),
    esc_input_current_A [A] (each ESC, from the pack), pack_current_A [A] (all motors), at full
    command on the full pack; cells [-]; cutoff_cell_V [V] (loaded cutoff) or None.
    Returns the report keys current_judged_at (CURRENT_JUDGED_AT), current_judged_bus_V [V],
    current_judged_full_command_reachable (bool or None), motor_current_judged_A [A],
    esc_current_judged_A [A] (the larger of the ESC's input and output current: its rating is
    its continuous current, common practice), pack_current_judged_A [A].
    """
    bus = full_pack_point["bus_V"]
    motor, esc_in = full_pack_point["motor_current_A"], full_pack_point["esc_input_current_A"]
    reachable = None if not cells or cutoff_cell_V is None or bus is None else bus / cells >= cutoff_cell_V
    return {"current_judged_at": CURRENT_JUDGED_AT, "current_judged_bus_V": bus,
            "current_judged_full_command_reachable": reachable,
            "motor_current_judged_A": motor,
            "esc_current_judged_A": None if motor is None or esc_in is None else max(motor, esc_in),
            "pack_current_judged_A": full_pack_point["pack_current_A"]}


def current_judged(report, kind):
    """The current [A] a report judges against the ``kind`` limit ("motor", "esc", "pack"):
    full command on a full pack (judged_currents); a report without those keys (an older
    caller) falls back to its full-command value on the nominal pack."""
    value = report.get(kind + "_current_judged_A")
    if value is not None or kind == "esc":
        return value
    return report.get({"motor": "full_motor_current_A", "pack": "full_pack_current_A"}[kind])


def cannot_hover_cause(report, command_unit="-"):
    """One warning that names the real limiting factor of a vehicle that cannot hover.

    When the vehicle file holds values that look like a unit slip (report key suspect_keys,
    the JSON paths of preflight.unit_checks warnings), the cause names them first: the
    physics below is then that of the values as read.
    """
    text = _cannot_hover_cause(report, command_unit)
    keys = report.get("suspect_keys") or []
    if keys:
        text = text.replace("cannot hover", "cannot hover with the values as read (first check %s: %s "
                            "like %s, see below)"
                            % (", ".join(keys), "it looks" if len(keys) == 1 else "they look", slip_words(keys)), 1)
    return text


def slip_words(keys):
    """What the suspect keys (report key suspect_keys) look like: a cell count alone, a typing slip
    (preflight.slip_diagnosis.cells_slip: no unit or decimal point to slip); else a unit or decimal slip."""
    return "a typing slip" if list(keys) == ["$.battery.cells"] else "a unit or decimal slip"


def _cannot_hover_cause(report, command_unit="-"):
    weight = report.get("weight_N") or 0.0
    full = report.get("full_thrust_N")
    tw = report.get("thrust_to_weight")
    if full is not None and full < weight:
        text = ("cannot hover: full-command thrust %s is below the weight %s (thrust-to-weight "
                "%.2f)" % (_num(full, SIG3, "N"), _num(weight, SIG3, "N"), tw or 0.0))
        v_oc = (report.get("pack_voltage_V") or {}).get("nominal")
        bus, pack_i, rating = (report.get("full_bus_V"), report.get("full_pack_current_A"),
                               report.get("pack_current_limit_A"))
        if v_oc and bus is not None and 1.0 - bus / v_oc > SAG_CAUSE_SHARE:
            r_pack = report.get("pack_resistance_ohm")
            text += ("; the pack cannot deliver the power: a nominal pack sags from %s to %s at full "
                     "command%s, which costs much of the thrust: a pack with less resistance, or more "
                     "cells" % (_num(v_oc, SIG3, "V"), _num(bus, SIG3, "V"),
                                "" if r_pack is None else " (resistance %s)" % resistance_text(r_pack)))
        else:
            text += ": the propulsion is too weak for this mass, not the pack"
            if pack_i is not None and rating:
                text += " (full command draws %s, %.0f %% of the pack's %s rating)" % (
                    _num(pack_i, SIG3, "A"), 100.0 * pack_i / rating, _num(rating, SIG3, "A"))
            text += "; lighten it, or fit a larger or higher-pitch propeller, a higher Kv or more cells"
    elif report.get("hover_limited_by") == "pack":
        text = ("cannot hover: the pack cannot deliver the hover power through its resistance (%s) "
                "at any voltage: a pack with less resistance or more cells"
                % resistance_text(report.get("pack_resistance_ohm")))
    else:
        text = ("cannot hover at nominal pack: the command needed exceeds full command (thrust-to-weight "
                "%.2f)" % (tw or 0.0))
    if report.get("hover_command_full") is not None:
        text += ("; a freshly charged pack would just hold it (command %s at full pack): not flyable"
                 % command_words("%.2f" % report["hover_command_full"], command_unit))
    return text


def not_flyable_reasons(report):
    """Why a vehicle that holds its weight on a nominal pack is still not flyable ([] when it is).

    Floors (our own, well below the common-practice margins the warnings use): thrust-to-weight
    FLYABLE_THRUST_TO_WEIGHT, hover command FLYABLE_HOVER_COMMAND, and hover to the end of the pack.
    """
    out = []
    tw, marked = judged_thrust_to_weight(report)
    if tw is not None and tw < FLYABLE_THRUST_TO_WEIGHT:
        out.append("thrust-to-weight %s%s leaves almost nothing to climb or steer with (below %.1f)"
                   % (beside(tw, FLYABLE_THRUST_TO_WEIGHT), " (reachable before the pack's cutoff)" if marked else "",
                      FLYABLE_THRUST_TO_WEIGHT))
    command = report.get("hover_command")
    if command is not None and command > FLYABLE_HOVER_COMMAND:
        out.append("hover command %s is above %.1f of full command"
                   % (beside(command, FLYABLE_HOVER_COMMAND, below=False), FLYABLE_HOVER_COMMAND))
    if command is not None and report.get("hover_command_empty") is None:
        out.append("it cannot hover near the end of the pack")
    return out


def margin_warnings(report, command_unit="-"):
    """Warnings for a report dict with the keys of hover_report (also usable on fitted reports);
    commands in command_unit (command_words: the unit of the sweep a fitted set came from)."""
    out = []
    tw = report.get("thrust_to_weight")
    judged, marked = judged_thrust_to_weight(report)
    if report.get("hover_command") is None:
        out.append(cannot_hover_cause(report, command_unit))
    worst = None
    for key, label in (("hover_command_empty", "empty"), ("hover_command", "nominal"),
                       ("hover_command_full", "full")):
        value = report.get(key)
        if value is not None and value > HOVER_COMMAND_LIMIT:
            worst = (value, label)
            break
    if worst and report.get("hover_command") is not None:  # a vehicle that cannot hover got its cause
        out.append("hover command %s at %s pack is above %s: little left for control and gusts "
                   "(thrust-to-weight %s)"
                   % (command_words(beside(worst[0], HOVER_COMMAND_LIMIT, below=False), command_unit), worst[1],
                      command_words("%.1f" % HOVER_COMMAND_LIMIT, command_unit, of_full=True),
                      judged_thrust_to_weight_text(report)))
    if report.get("hover_command") is not None and report.get("hover_command_empty") is None:
        out.append("near the end of the pack it cannot hover (command would exceed full at %s V open "
                   "circuit): land well before the pack is empty"
                   % _num((report.get("pack_voltage_V") or {}).get("empty"), "%.1f"))
    if judged is not None and report.get("hover_command") is not None and judged < THRUST_TO_WEIGHT_MIN:
        out.append("thrust-to-weight %s is below %.0f: sluggish climbs and little control margin "
                   "(common practice: 2 or more, about 3 for brisk flying)%s"
                   % (judged_thrust_to_weight_text(report), THRUST_TO_WEIGHT_MIN,
                      "; %s marks the T/W reachable before the pack's loaded cutoff: %s at full command is "
                      "not reachable" % (REACHABLE_MARK, thrust_to_weight_text(tw)) if marked else ""))
    sag = sag_warning(report)
    if sag is not None:
        out.append(sag)
    out += current_limit_warnings(report)
    from estimator.preflight.pack import cold_pack_warning
    cold = cold_pack_warning(report)
    if cold is not None:
        out.append(cold)
    from estimator.preflight.pack import hot_pack_warning
    hot = hot_pack_warning(report)
    if hot is not None:
        out.append(hot)
    from estimator.preflight.pack import full_cell_warning
    full = full_cell_warning(report)
    if full is not None:
        out.append(full[0])
    ratio = report.get("density_ratio")
    if ratio is not None and ratio < THIN_AIR_DENSITY_RATIO:
        out.append("thin air: %.3f kg/m^3 is %.0f %% of sea-level standard (density altitude %.0f m): "
                   "less thrust at full command and a higher hover command"
                   % (report["density_kg_m3"], 100.0 * ratio, report.get("density_altitude_m", 0.0)))
    return out


def _cutoff_note(report):
    """'' or, when full command sags even a full pack below its loaded cutoff, the note that a
    punch-out still draws that current until a cutoff acts."""
    if report.get("current_judged_full_command_reachable") is False:
        return "; a punch-out draws it until a cutoff acts, though it sags even a full pack below the cutoff"
    return ""


def sag_warning(report):
    """The warning on full command sagging the nominal pack below its loaded cutoff, or None
    (the sheet's warning; compare and the payload table show it as a caveat, preflight.caveats)."""
    sag = full_command_sag(report)
    if sag["thrust_to_weight_reachable"] is not False:
        return None
    from estimator.cautions import SAG_BELOW_CUTOFF
    return ("full command sags the nominal pack to %s V per cell (%s on %d cell%s), below its %.2f V "
            "cutoff: %s; the thrust-to-weight %s at full command is not reachable on a nominal pack"
            % (beside(sag["full_command_cell_V"], report["cutoff_cell_V"]), _num(report["full_bus_V"], SIG3, "V"),
               report["cells"], "" if report["cells"] == 1 else "s", report["cutoff_cell_V"],
               SAG_BELOW_CUTOFF, thrust_to_weight_text(report.get("thrust_to_weight"))))


def current_limit_warnings(report):
    """Warnings for the motor, ESC and pack current limits, judged at full command on a full pack
    (judged_currents), each with the nominal-pack value beside it."""
    out = []
    limit = report.get("motor_current_limit_A")
    if limit is not None:
        full_i = current_judged(report, "motor")
        hov_i = report.get("hover_motor_current_A")
        if hov_i is not None and hov_i > limit:
            out.append("hover draws %s per motor, above the motor limit %s: it will overheat"
                       % (_num(hov_i, SIG3, "A"), _num(limit, GIVEN3, "A")))
        elif full_i is not None and full_i > limit:
            out.append("full command on a full pack draws %s per motor, above the motor limit %s (%s on a "
                       "nominal pack)%s: limit the command or use a smaller propeller"
                       % (_num(full_i, SIG3, "A"), _num(limit, GIVEN3, "A"),
                          _num(report.get("full_motor_current_A"), SIG3, "A"), _cutoff_note(report)))
    esc_limit = report.get("esc_current_limit_A")
    esc_i = current_judged(report, "esc")
    if esc_limit is not None and esc_i is not None and esc_i > esc_limit:
        out.append("full command on a full pack draws %s through each ESC (the larger of its input and "
                   "output), above its rating %s%s: limit the command, or use a larger ESC or a smaller "
                   "propeller" % (_num(esc_i, SIG3, "A"), _num(esc_limit, GIVEN3, "A"), _cutoff_note(report)))
    pack_limit = report.get("pack_current_limit_A")
    full_pack = current_judged(report, "pack")
    if pack_limit is not None and full_pack is not None and full_pack > pack_limit:
        from estimator.cautions import PACK_FAR_OVER_RATING, PACK_FAR_OVER_RATING_FACTOR, PACK_OVER_RATING
        ratio = full_pack / pack_limit
        out.append("full command on a full pack draws %s from the pack, above its rating of %s (C-rating x "
                   "capacity; %s on a nominal pack)%s: %s"
                   % (_num(full_pack, SIG3, "A"), _num(pack_limit, GIVEN3, "A"),
                      _num(report.get("full_pack_current_A"), SIG3, "A"), _cutoff_note(report),
                      PACK_FAR_OVER_RATING % ratio if ratio >= PACK_FAR_OVER_RATING_FACTOR else PACK_OVER_RATING))
    return out


def resistance_text(ohm):
    """A resistance as the sheet prints it: below 1 ohm in mohm, 3 significant digits, trailing
    zeros dropped (30 mohm, 29.5 mohm, 1.2 ohm): '0.03 ohm' hid the 29.5 mohm of a cold pack."""
    if ohm is None or (isinstance(ohm, float) and not math.isfinite(ohm)):
        return "n/a"
    if 0.0 < ohm < 1.0:
        return plain_number(1e3 * ohm, 3, trim=True) + " mohm"
    return plain_number(ohm, 3, trim=True) + " ohm"


# the format of _num for a value shown with three significant digits (0.448 N, 21.3 A, 0.021 kg):
# a total or a small craft's current is never rounded into another number (trial 4, item 8)
SIG3 = "sig3"
# a value as the vehicle file gave it (a motor limit, an ESC rating): 3 significant digits, trailing
# zeros dropped (12 A as written); computed values keep theirs (17.0 A beside 5.99 A: trial 8, item 9)
GIVEN3 = "given3"


def _num(value, fmt, unit="", none="n/a"):
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return none
    text = (plain_number(value, 3) if fmt == SIG3 else plain_number(value, 3, trim=True) if fmt == GIVEN3
            else fmt % value)
    return text + (" " + unit if unit else "")
