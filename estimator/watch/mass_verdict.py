"""What a replay says of the implied all-up mass: the last completed window's value against the
plan and the alarm limit, the margin the kernel's alarm needs, and, when a power alarm came after
that window, that the mass was held there (the kernel judges no mass while a power fault is
suspected: new-user trial 14, finding 3). estimator.watch.replay.run_kernel gathers the figures.
"""

import math

from estimator.units import mass_text

# an implied mass this share or more below the plan is named as such [-] (a judgement: beyond the
# 10 % lighter flights the detection studies fly as ordinary, benchmarks/watch_detection.py)
FAR_BELOW_SHARE = 0.15


def mass_margin(last, run, cfg, first=False):
    """The implied-mass alarm threshold of the kernel's last verdict (new-user trial 9, finding 6: a
    replay said the mass was above the alarm limit beside "0 alarms", the margin unsaid). The
    kernel (estimator.core.watch) judges at the end of each window everything since the first (or
    its last restart) and raises mass_high when the mean excess ex over the limit share satisfies
    ex^2 n > var z^2 c (z standard errors, c blocks per independent stretch; CONFIG mass_z2_q8 =
    256 z^2 c) in mass_windows verdicts in a row; this repeats its integer test.

    last: (mean [permille], variance [permille^2], count [blocks]) of that verdict; run: the
    kernel's count of verdicts in a row above the threshold; cfg: CONFIG dict; first: it was the
    first window since take-off or a restart, which the kernel does not judge alone. Returns dict
    margin_permille (z sqrt(c var / n)), alarm_permille (the limit share plus that margin) and
    windows_above (run); for a first window margin_permille and alarm_permille are None."""
    if first:
        return {"margin_permille": None, "alarm_permille": None, "windows_above": run}
    mu, var, n = last
    # the kernel's integer variance can come out below zero (floored means): then any excess alarms
    margin = math.sqrt(max(0, (var >> 4) * cfg["mass_z2_q8"] >> 4) / n) if n else 0.0
    return {"margin_permille": margin, "alarm_permille": cfg["mass_limit_permille"] + margin,
            "windows_above": run}


def mass_verdict(mass_last, plan_kg, limit_kg, learned, cfg, events=()):
    """What became of the implied mass (new-user trial 8, finding 2: a replay without a mass alarm
    must not read as a clean bill when the mass was never judged): dict judged (bool), planned_kg,
    limit_kg [kg], and when judged implied_kg [kg], at_s [s from the log's first row], share [-]
    (implied over planned less 1) and above_limit (bool), and held_by ({kind, t_s}: the first power
    alarm after that window, from which on the kernel held the mass; absent when none came); when
    not judged, reason (text). mass_last: (the kernel's last implied mass [kg], the plan times 1 + its
    verdict's mean, the time it was set [s]) or None; events: run_kernel's events."""
    out = {"judged": mass_last is not None, "planned_kg": plan_kg, "limit_kg": round(limit_kg, 4)}
    if mass_last is not None:
        kg = mass_last[0]
        out.update(implied_kg=kg, at_s=round(mass_last[1], 3), share=round(kg / plan_kg - 1.0, 4),
                   above_limit=kg > limit_kg)
        held = [e for e in events if e["kind"] in ("power_high", "power_low") and e["t_s"] > out["at_s"]]
        if held:
            out["held_by"] = {"kind": held[0]["kind"], "t_s": held[0]["t_s"]}
    else:
        out["reason"] = ("no %.0f s window of flight near hover was completed (%s)"
                         % (cfg["mass_window_ms"] / 1000.0, "too little steady flight in this log" if not learned else
                            "climbs and descents beyond a quarter of the hover thrust, or a suspected power "
                            "fault, keep blocks out of it"))
    return out


def mass_words(mass):
    """The one line replay prints for mass_verdict's dict."""
    if not mass["judged"]:
        return "mass not judged: %s" % mass["reason"]
    plan = mass["planned_kg"]

    def m(kg):  # grams for a small vehicle, as firmware says them (units.mass_text)
        return mass_text(kg, plan)
    held = mass.get("held_by")
    # the kernel's verdict is the mean of all its windows since take-off (or its last restart)
    last = ("all windows to the last before the %s alarm at %.1f s; no mass is judged while a power alarm "
            "is up" % (held["kind"], held["t_s"]) if held else "all windows to the last")
    text = ("implied mass %s at %.1f s (%s): %+.1f %% against %s planned, %s the alarm "
            "limit %s" % (m(mass["implied_kg"]), mass["at_s"], last, 100.0 * mass["share"], m(plan),
                          "above" if mass["above_limit"] else "below", m(mass["limit_kg"])))
    if mass["share"] < -FAR_BELOW_SHARE:
        # new-user trial 24, finding 3: another vehicle's parameter set read -17 % beside "no event",
        # an all-clear; the watch has no flag below the plan, so the line says what it may mean
        return text + (": far below the plan; a lighter load than planned, or a parameter set made for "
                       "another vehicle (with --vehicle, replay checks the set against the vehicle file)")
    if not mass["above_limit"] or mass.get("mass_alarm", True) or "alarm_kg" not in mass:
        return text
    # above the limit without a mass alarm: say why (trial 9, finding 6)
    if mass["alarm_kg"] is None:
        # new-user trial 26: "...: the next one is" ended a replay whose log had no next window
        return text + (" but it is the first window since take-off or a suspected power fault, which is not "
                       "judged alone (the settling after take-off can read high), and the log has no second "
                       "window after it: fly longer near hover to have the mass judged")
    if mass["implied_kg"] <= mass["alarm_kg"]:
        return text + (" but within the estimate's margin (+-%s over gusty or short windows): no alarm below "
                       "%s, the limit plus that margin" % (m(mass["margin_kg"]), m(mass["alarm_kg"])))
    return text + (" and the limit plus the estimate's margin (%s) in %d window%s in a row: the alarm needs %d"
                   % (m(mass["alarm_kg"]), mass["windows_above"], "" if mass["windows_above"] == 1 else "s",
                      mass["windows_needed"]))
