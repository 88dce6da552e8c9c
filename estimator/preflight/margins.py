"""Which margins a pre-flight report keeps: one definition for compare, payload and the sheet.

A margin is kept (True), broken (False), or cannot be judged (None: the file gives no limit).
The thresholds are the report's warning thresholds (estimator.preflight.report, common practice).
The current margins are judged at full command on a full pack, the pack state that draws the
most current (warnings.judged_currents). Full command sagging the nominal pack below its
cutoff is not a margin (TABLE_CAUTIONS): the T/W margin already judges what is reachable
before the cutoff; compare and the payload table show the sag beside the result.
"""

from estimator.preflight.warnings import (HOVER_COMMAND_LIMIT, THRUST_TO_WEIGHT_MIN, current_judged,
                                         judged_thrust_to_weight)

# margin -> what it means, for tables and the JSON
MARGINS = {
    "hovers": "hovers on a nominal pack",
    "thrust_to_weight": ("thrust-to-weight at least %g (common practice), as far as the pack reaches "
                         "before its loaded cutoff" % THRUST_TO_WEIGHT_MIN),
    "hover_command": "hover command at most %g of full, down to an empty pack (common practice)"
                     % HOVER_COMMAND_LIMIT,
    "motor_current": "full command on a full pack within the motor's current limit (when given)",
    "esc_current": "full command on a full pack within the ESC's current rating (when given)",
    "pack_current": "full command on a full pack within the pack's C-rating (when given)",
    "landing_reserve": "the flight ends on the landing reserve, not on the cutoff or the loss of hover",
}

# what is shown beside a result but does not decide whether it keeps its margins, and why
SAG_NOT_A_MARGIN_WHY = ("a caution, not a margin: the thrust-to-weight margin already judges the T/W "
                        "reachable before the cutoff (marked *), so the sag does not rank a row or break a payload")
TABLE_CAUTIONS = {
    "full_command_sag": ("full command sags the nominal pack below its loaded cutoff: a brownout risk on a "
                         "long punch-out; " + SAG_NOT_A_MARGIN_WHY),
}

# margins judged at full command on a full pack: that current does not depend on the mass
# carried (only through an estimated propeller's Reynolds number at the hover speed, a fraction
# of a percent), so no payload (and no payload less) mends them
PAYLOAD_BLIND = ("motor_current", "esc_current", "pack_current")


def margins(report):
    """{margin name: True | False | None} for a report dict of hover_report (see MARGINS)."""
    hovering = bool(report.get("can_hover"))
    tw = judged_thrust_to_weight(report)[0]  # what the pack reaches before its cutoff
    worst_cmd = report.get("hover_command_empty")
    if worst_cmd is None and hovering:
        worst_cmd = float("inf")  # cannot hover near empty: the command margin is broken
    out = {
        "hovers": hovering,
        "thrust_to_weight": tw is not None and tw >= THRUST_TO_WEIGHT_MIN,
        "hover_command": hovering and worst_cmd <= HOVER_COMMAND_LIMIT,
        "motor_current": None,
        "esc_current": None,
        "pack_current": None,
        "landing_reserve": hovering and report.get("flight_ended_by") == "reserve",
    }
    for kind, limit_key in (("motor", "motor_current_limit_A"), ("esc", "esc_current_limit_A"),
                            ("pack", "pack_current_limit_A")):
        limit, current = report.get(limit_key), current_judged(report, kind)
        if limit is not None and current is not None:
            out[kind + "_current"] = current <= limit
    return out


def keeps_margins(marks):
    """True when no margin of ``margins()`` is broken (None counts as kept: no limit given)."""
    return all(value is not False for value in marks.values())


def broken(marks):
    """Names of the broken margins, in MARGINS order."""
    return [name for name in MARGINS if marks.get(name) is False]
