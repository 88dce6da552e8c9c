"""Which margins a pre-flight report keeps: one definition for compare, payload and the sheet.

A margin is kept (True), broken (False), or cannot be judged (None: the file gives no limit).
The thresholds are the report's warning thresholds (estimator.preflight.report, common practice).
"""

from estimator.preflight.warnings import HOVER_COMMAND_LIMIT, THRUST_TO_WEIGHT_MIN, judged_thrust_to_weight

# margin -> what it means, for tables and the JSON
MARGINS = {
    "hovers": "hovers on a nominal pack",
    "thrust_to_weight": ("thrust-to-weight at least %g (common practice), as far as the pack reaches "
                         "before its loaded cutoff" % THRUST_TO_WEIGHT_MIN),
    "hover_command": "hover command at most %g of full, down to an empty pack (common practice)"
                     % HOVER_COMMAND_LIMIT,
    "motor_current": "full command within the motor's current limit (when given)",
    "pack_current": "full command within the pack's C-rating (when given)",
    "full_command_sag": "full command keeps the nominal pack above its loaded cutoff",
    "landing_reserve": "the flight ends on the landing reserve, not on the cutoff or the loss of hover",
}

# margins judged at full command: the full-command current (and the pack sag it causes) does not
# depend on the mass carried
# (only through an estimated propeller's Reynolds number at the hover speed, a fraction of a percent),
# so no payload (and no payload less) mends them
PAYLOAD_BLIND = ("motor_current", "pack_current", "full_command_sag")


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
        "pack_current": None,
        "landing_reserve": hovering and report.get("flight_ended_by") == "reserve",
        "full_command_sag": report.get("thrust_to_weight_reachable"),
    }
    limit, full_i = report.get("motor_current_limit_A"), report.get("full_motor_current_A")
    if limit is not None and full_i is not None:
        out["motor_current"] = full_i <= limit
    rating, full_pack = report.get("pack_current_limit_A"), report.get("full_pack_current_A")
    if rating is not None and full_pack is not None:
        out["pack_current"] = full_pack <= rating
    return out


def keeps_margins(marks):
    """True when no margin of ``margins()`` is broken (None counts as kept: no limit given)."""
    return all(value is not False for value in marks.values())


def broken(marks):
    """Names of the broken margins, in MARGINS order."""
    return [name for name in MARGINS if marks.get(name) is False]
