"""How much can it carry? Endurance and margins per payload, and the largest payload that keeps them.

The payload is added to the vehicle's all-up mass; each payload gets a full pre-flight report
(hover_report) and its margins (estimator.preflight.margins). A payload "keeps" when every
margin holds, the landing-reserve margin included (the flight ends on the reserve, not on the
cutoff or the loss of hover), and, with a job time, when the endurance reaches it. The largest
such payload is found between the last payload that keeps and the first that does not, by
bisection (BISECTION_STEPS halvings). The vehicle's own (datasheet) model or a fitted parameter
set (hover_report's bench route: the fitted motor model at the heavier mass) gives the rows.
A margin judged at full command (motor or pack current) does not change with the payload:
when it breaks, the verdict names it once and gives the largest payload on the other margins.
"""

import copy
import math
import re

from estimator.errors import InputError, shorten
from estimator.preflight.low_reynolds import endurance_lead, estimate_flight_time_min
from estimator.preflight.margins import PAYLOAD_BLIND, SAG_NOT_A_MARGIN_WHY, broken, margins
from estimator.preflight.report import hover_report
from estimator.preflight.warnings import (HOVER_COMMAND_LIMIT, REACHABLE_MARK, REACHABLE_MARK_NOTE, judged_thrust_to_weight,
                                         judged_thrust_to_weight_text)
from estimator.textwidth import wrap_line
from estimator.units import beside, parse_quantity

RANGE_POINTS = 9  # payloads in a range A..B, ends included [-]
BISECTION_STEPS = 30  # halvings between a payload that keeps and one that does not [-]
_RANGE = re.compile(r"^\s*([^.][^,]*?)\s*\.\.\s*([^,]+?)\s*$")
_UNIT = re.compile(r"[A-Za-z]+\s*$")
# A payload above this multiple of the vehicle's own all-up mass is beyond any multirotor:
# heavy-lift and agricultural machines carry about their own mass at most (common practice,
# from memory); a bare number that large was most likely meant in grams.
PAYLOAD_MASS_RATIO_MAX = 3.0


def parse_payloads(text):
    """``0..2kg`` (payload_grid: a round step, about RANGE_POINTS payloads, ends included) or ``0,500g,1.5kg`` -> (kg list, unit).

    A bare number takes the unit of the range's other end, else kilograms. unit: the unit the
    person typed (for the table and the plot). Raises InputError naming --payload.
    """
    text = str(text)
    m = _RANGE.match(text)
    parts = [m.group(1), m.group(2)] if m else [p.strip() for p in text.split(",")]
    if not parts or any(not p for p in parts):
        raise InputError("--payload %s: give a range such as 0..2kg or a list such as 0,0.5kg,1kg"
                         % shorten(text))
    units = [_UNIT.search(p).group(0).strip() for p in parts if _UNIT.search(p)]
    unit = units[-1] if units else "kg"
    def read(part, typed):
        return parse_quantity(typed, "mass", "--payload %s" % shorten(part))

    # the parts with their own unit first: a bad unit's error names what was typed, not '0abc'
    given = {i: read(part, part) for i, part in enumerate(parts) if _UNIT.search(part)}
    values = [given[i] if i in given else read(part, part + unit) for i, part in enumerate(parts)]
    if any(v < 0.0 for v in values):
        raise InputError("--payload %s: a payload cannot be negative" % shorten(text))
    if m:
        lo, hi = values
        if not hi > lo:
            raise InputError("--payload %s: the range must rise (A..B with B above A)" % shorten(text))
        scale = parse_quantity("1" + unit, "mass")
        values = [v * scale for v in payload_grid(lo / scale, hi / scale)]
    return sorted(set(values)), unit


def payload_grid(lo, hi):
    """The payloads of a range lo..hi (in the unit the person typed), ends included, on a round step.

    The step is the 1-2-2.5-5 x 10^k number nearest (on a log scale) to (hi - lo) / (RANGE_POINTS - 1),
    so 0..450 g gives 0, 50, ..., 450 g (not 56.25 g steps) and 0..2 kg 0.25 kg steps; every point is
    lo + i x step rounded to the step's decimals, and hi is added when the steps miss it. One grid
    for both routes (datasheet and bench fit): the rows differ only by the model.
    """
    raw = (hi - lo) / (RANGE_POINTS - 1)
    exponent = math.floor(math.log10(raw))
    steps = [f * 10.0 ** e for e in (exponent - 1, exponent, exponent + 1) for f in (1.0, 2.0, 2.5, 5.0)]
    step = min(steps, key=lambda c: abs(math.log(c / raw)))
    decimals = max(0, -math.floor(math.log10(step)) + 1)
    grid, i = [], 0
    while lo + i * step < hi - 1e-9 * step:
        grid.append(round(lo + i * step, decimals))
        i += 1
    return grid + [hi]


def _row(vehicle, payload_kg, job_min, params=None):
    v = copy.deepcopy(vehicle)
    v["mass_kg"] = vehicle["mass_kg"] + payload_kg
    report = hover_report(v, params)
    marks = margins(report)
    # the endurance the sheet leads with (the conservative one on a small estimated rotor)
    lead = report.get("flight_time_lead_min", report["flight_time_min"])
    if job_min is not None:
        marks["job_time"] = lead is not None and lead >= job_min
    row = {
        "payload_kg": payload_kg, "mass_kg": v["mass_kg"],
        "hover_command": report["hover_command"], "hover_command_empty": report["hover_command_empty"],
        "thrust_to_weight": report["thrust_to_weight"],
        "thrust_to_weight_reachable": report.get("thrust_to_weight_reachable"),
        "reachable_thrust_to_weight": report.get("reachable_thrust_to_weight"),
        "thrust_to_weight_judged": judged_thrust_to_weight(report)[0], "hover_pack_current_A": report["hover_current_A"],
        "hover_motor_current_A": report.get("hover_motor_current_A"),
        "flight_time_min": estimate_flight_time_min(report), "flight_time_lead_min": lead,
        "flight_time_lead_basis": report.get("flight_time_lead_basis", "estimate"),
        "flight_ended_by": endurance_lead(report)["flight_ended_by"],
        "current_judged_at": report.get("current_judged_at"),
        "motor_current_judged_A": report.get("motor_current_judged_A"),
        "esc_current_judged_A": report.get("esc_current_judged_A"),
        "pack_current_judged_A": report.get("pack_current_judged_A"),
        # a caution beside the row, not a margin (margins.TABLE_CAUTIONS)
        "full_command_sag": report.get("thrust_to_weight_reachable") is False,
        "caveats": [c for c in report.get("caveats") or [] if c["kind"] == "full_command_sag"],
        "margins": marks, "keeps": all(m is not False for m in marks.values()),
        "broken": broken(marks) + (["job_time"] if marks.get("job_time") is False else []),
    }
    if report.get("hover_command_interval_95") is not None:  # the fitted route's interval
        row["hover_command_interval_95"] = report["hover_command_interval_95"]
    return row


def _keeps(row, ignored):
    return all(v is not False for k, v in row["margins"].items() if k not in ignored)


def _largest(vehicle, params, job_min, rows, ignored):
    """(largest payload [kg] keeping every margin but ``ignored``, how, what breaks beyond it).

    how: "beyond_list" (every listed payload keeps: the limit lies beyond the last), "none"
    (the smallest listed payload already breaks) or "bisection" (between the last listed
    payload that keeps and the first that does not, BISECTION_STEPS halvings).
    """
    first_bad = next((i for i, r in enumerate(rows) if not _keeps(r, ignored)), None)
    if first_bad is None:
        return rows[-1]["payload_kg"], "beyond_list", []
    if first_bad == 0:
        return None, "none", [m for m in rows[0]["broken"] if m not in ignored]
    lo, hi = rows[first_bad - 1]["payload_kg"], rows[first_bad]["payload_kg"]
    beyond = rows[first_bad]
    for _ in range(BISECTION_STEPS):
        mid = 0.5 * (lo + hi)
        row = _row(vehicle, mid, job_min, params)
        if _keeps(row, ignored):
            lo = mid
        else:
            hi, beyond = mid, row
    return lo, "bisection", [m for m in beyond["broken"] if m not in ignored]


def payload_table(vehicle, payloads_kg, job_min=None, params=None):
    """Rows per payload and the largest payload that keeps every margin (module docstring).

    vehicle: checked vehicle dict; payloads_kg: payloads [kg], >= 0; job_min: required
    endurance [min] or None; params: a fitted parameter set (the bench route of hover_report)
    or None (the vehicle file's datasheet model). Returns a dict: rows (payload_kg [kg],
    mass_kg [kg], hover_command [-], hover_command_empty [-], thrust_to_weight [-] (full command),
    thrust_to_weight_reachable, reachable_thrust_to_weight [-], thrust_to_weight_judged [-] (the one
    the margin judges, warnings.judged_thrust_to_weight),
    hover_pack_current_A [A], hover_motor_current_A [A], flight_time_min [min] (the estimate's),
    flight_time_lead_min [min] and flight_time_lead_basis (what the table shows and job_time
    judges: low_reynolds.endurance_lead), flight_ended_by (of that flight), margins, keeps, broken, and with params hover_command_interval_95 [-]),
    max_payload_kg [kg] or None (none keeps), max_payload_found ("beyond_list", "bisection",
    "none"), broken_beyond (margins broken just beyond it), broken_at_every_payload (margins
    judged at full command, PAYLOAD_BLIND, that the smallest payload already breaks: no payload
    mends them), max_payload_kg_payload_margins [kg] or None (the largest payload keeping the
    margins a payload does affect, when broken_at_every_payload is not empty), max_payload_note
    (the verdict in words, masses in kg), job_min [min], route ("datasheet" or "bench fit").
    """
    rows = [_row(vehicle, p, job_min, params) for p in payloads_kg]
    best, how, beyond = _largest(vehicle, params, job_min, rows, ())
    blind = [m for m in PAYLOAD_BLIND if rows[0]["margins"].get(m) is False]
    result = {"rows": rows, "max_payload_kg": best, "max_payload_found": how, "broken_beyond": beyond,
              "broken_at_every_payload": blind, "max_payload_kg_payload_margins": None,
              "job_min": job_min, "route": "datasheet" if params is None else "bench fit"}
    if blind:
        other, other_how, other_beyond = _largest(vehicle, params, job_min, rows, blind)
        result.update(max_payload_kg_payload_margins=other, payload_margins_found=other_how,
                      payload_margins_broken_beyond=other_beyond)
    result["max_payload_note"] = "; ".join(verdict_lines(result, "kg"))
    return result


def _mass(value_kg, unit):
    return "%.3g %s" % (value_kg / parse_quantity("1" + unit, "mass"), unit)


def _how(best_kg, how, beyond, unit):
    if how == "beyond_list":
        return "every payload listed keeps them; the limit lies beyond %s" % _mass(best_kg, unit)
    return "found by bisection between the listed payloads; beyond it breaks: %s" % ", ".join(beyond)


def verdict_lines(result, unit="kg"):
    """The payload verdict in words, one idea per line, masses in ``unit`` (the table's)."""
    rows = result["rows"]
    # the job time as the person wrote it (16.6 min, not 17: new-user trial 12, finding 6)
    job = " and %.4g min of hover" % result["job_min"] if result["job_min"] is not None else ""
    blind = result.get("broken_at_every_payload") or []
    if result["max_payload_kg"] is not None:
        return ["largest payload that keeps the margins and the landing reserve%s: %s (%s)" % (
            job, _mass(result["max_payload_kg"], unit),
            _how(result["max_payload_kg"], result["max_payload_found"], result["broken_beyond"], unit))]
    if not blind:
        return ["no payload keeps the margins and the landing reserve%s: even the smallest payload (%s) "
                "breaks: %s" % (job, _mass(rows[0]["payload_kg"], unit), ", ".join(result["broken_beyond"]))]
    lines = ["no payload keeps every margin: %s breaks at every payload (judged at full command, where the "
             "current hardly depends on the payload; see the warnings above)" % ", ".join(blind)]
    other = result.get("max_payload_kg_payload_margins")
    if other is None:
        lines.append("on the margins a payload affects%s, even the smallest payload (%s) breaks: %s" % (
            job, _mass(rows[0]["payload_kg"], unit), ", ".join(result["payload_margins_broken_beyond"])))
    else:
        lines.append("on the margins a payload affects (hover, thrust-to-weight, hover command, landing "
                     "reserve%s): largest payload %s (%s)" % (
                         job, _mass(other, unit), _how(other, result["payload_margins_found"],
                                                        result["payload_margins_broken_beyond"], unit)))
    return lines


def _shared_decimals(values, most=3):
    """The fewest decimals (at most ``most``) that show every value of a column exactly, so that
    10.625 is not printed 10.62 beside 9.875 (trial 4, item 8); one count for the whole column."""
    for decimals in range(most + 1):
        if all(abs(round(v, decimals) - v) <= 1e-9 * max(1.0, abs(v)) for v in values):
            return decimals
    return most


def _shown_minutes(row, job_min=None):
    """A row's endurance [min] as text, to one decimal as everywhere else; with more decimals
    where one would round a missed job time onto it (units.beside, the rule of the T/W and
    command columns), so the table never shows a missed job time as met (3.96 min against 4 min
    is 3.96, not 4.0), nor one endurance two ways with and without a job time (new-user trial
    12, finding 6: 14.774 min read 14.7 with --job-time 15min, 14.8 without)."""
    minutes = row["flight_time_lead_min"]
    if row["margins"].get("job_time") is False and job_min is not None:
        return beside(minutes, job_min, below=True, digits=1)
    return "%.1f" % minutes


def format_payload_table(result, unit="kg"):
    """The payload table for the sheet, masses in the unit the person typed (g, kg, lb, oz);
    cmd is the hover command on a nominal pack, empty the one near empty; a payload that breaks a
    margin gets the names on a line under its row, so the table fits an 80-column terminal.
    The verdict is wrapped to that width too (estimator.textwidth)."""
    scale = parse_quantity("1" + unit, "mass") if unit else 1.0
    # the T/W column takes 6 characters: a value written with more digits so that it never rounds
    # onto the floor of 2 it is judged by (warnings.beside: '1.997*') keeps the columns aligned
    header = "   payload    all-up     cmd   empty  T/W    pack A  endurance           keeps"
    lines = ["5. How much can it carry?", header]
    shown = _shared_decimals([v / scale for r in result["rows"] for v in (r["payload_kg"], r["mass_kg"])])
    empties = []
    for r in result["rows"]:
        cmd = "%.2f" % r["hover_command"] if r["hover_command"] is not None else "none"
        # near empty is where the hover command limit is judged: never rounded onto it (0.602 breaks
        # 'at most 0.6', 0.60 would not; new-user trial 11, finding 10)
        empty = "none" if r["hover_command_empty"] is None else beside(
            r["hover_command_empty"], HOVER_COMMAND_LIMIT, below=False) \
            if r["hover_command_empty"] > HOVER_COMMAND_LIMIT else "%.2f" % r["hover_command_empty"]
        empties.append(empty)
        pack = "%.1f" % r["hover_pack_current_A"] if r["hover_pack_current_A"] is not None else "-"
        time = ("%s min (%s)" % (_shown_minutes(r, result["job_min"]), r["flight_ended_by"])
                if r["flight_time_lead_min"] is not None else "no hover")
        lines.append("   %-9s  %-9s  %-4s  %-5s  %-6s %-6s  %-18s  %s" % (
            "%.*f %s" % (shown, r["payload_kg"] / scale, unit), "%.*f %s" % (shown, r["mass_kg"] / scale, unit), cmd,
            empty, judged_thrust_to_weight_text(r), pack, time, "yes" if r["keeps"] else "no"))
        if not r["keeps"]:  # the margins it breaks, on a line of their own under the row
            lines += wrap_line("       breaks " + ", ".join(r["broken"]), indent=14)
    if any(len(e.partition(".")[2]) > 2 for e in empties):
        # the empty column's rule (units.beside), said once (new-user trial 12, finding 14)
        lines += wrap_line("   empty: with more decimals where two would round it onto the %.1f limit it breaks"
                           % HOVER_COMMAND_LIMIT, indent=5)
    if any(r["flight_time_lead_basis"] == "small rotor" for r in result["rows"]):
        lines += wrap_line("   endurance: SMALL ROTOR, at the figure of merit measured rotors of this size "
                           "reach, as in section 3", indent=5)
    if any(judged_thrust_to_weight(r)[1] for r in result["rows"]):
        lines += wrap_line("   T/W%s  %s" % (REACHABLE_MARK, REACHABLE_MARK_NOTE), indent=9)
    sagging = [r for r in result["rows"] if r.get("full_command_sag")]
    if sagging:  # a caution beside the table, not a margin: it decides no row's "keeps"
        shorts = [r["caveats"][0]["short"] for r in sagging if r.get("caveats")]
        if shorts:
            lines += wrap_line("   ! " + shorts[0] + " (%s)" % (
                "every payload" if len(sagging) == len(result["rows"]) else "payloads " + ", ".join(
                    _mass(r["payload_kg"], unit) for r in sagging)), indent=7)
        lines += wrap_line("     " + SAG_NOT_A_MARGIN_WHY, indent=7)
    for line in verdict_lines(result, unit):
        lines += wrap_line("   " + line, indent=5)
    return "\n".join(lines) + "\n"


def check_bare_payload(text, payloads_kg, vehicle_mass_kg):
    """Refuse a --payload written without a unit, as every quantity on the command line
    (README: "Quantities take unit suffixes"; --job-time 10 is refused the same way).

    text: the --payload text; payloads_kg: parse_payloads's values [kg] (a bare number read in
    kilograms); vehicle_mass_kg: the vehicle's all-up mass [kg]. Payloads of 0 alone need no
    unit. The refusal names the unit that makes the numbers plausible: kilograms when the largest
    is at most PAYLOAD_MASS_RATIO_MAX times the vehicle's mass (heavy-lift machines carry about
    their own mass at most, common practice, from memory), else grams when they fit (1 g = 1e-3 kg,
    NIST SP 811). Raises InputError.
    """
    text = str(text)
    if _UNIT.search(text.split("..")[-1]) or any(_UNIT.search(p) for p in text.split(",")):
        return
    top = max(payloads_kg) if payloads_kg else 0.0
    if top == 0.0:
        return
    if ".." in text:
        typed = text.strip()
    else:
        typed = ",".join(p.strip() for p in text.split(","))
    if top <= PAYLOAD_MASS_RATIO_MAX * vehicle_mass_kg:
        hint = "did you mean kilograms (%s)?" % _with_unit(typed, "kg")
    elif top * 1e-3 <= PAYLOAD_MASS_RATIO_MAX * vehicle_mass_kg:
        hint = ("did you mean grams (%s)? (%.4g kg would be more than %g times the vehicle's %.3g kg, which "
                "no multirotor carries)" % (_with_unit(typed, "g"), top, PAYLOAD_MASS_RATIO_MAX, vehicle_mass_kg))
    else:
        hint = "e.g. 0..2kg or 0,500g,1kg"
    raise InputError("--payload %s: a payload needs its unit, as every quantity on the command line; %s"
                     % (shorten(text), hint))


def _with_unit(typed, unit):
    """'0..1' -> '0..1kg', '0,0.5,1' -> '0kg,0.5kg,1kg': what to type."""
    if ".." in typed:
        return typed + unit
    return ",".join(p + unit for p in typed.split(","))


def check_payload_size(text, payloads_kg, vehicle_mass_kg, unit="kg"):
    """Refuse a --payload whose largest value is more than PAYLOAD_MASS_RATIO_MAX times the
    vehicle's all-up mass (new-user trial 9, finding 9: 0..1e9kg printed a table of 'no hover'
    rows pushed out of line): heavy-lift machines carry about their own mass at most (common
    practice, from memory), so such a payload is a slip, not a question the table can answer.

    text: the --payload text; payloads_kg: parse_payloads's values [kg]; vehicle_mass_kg: the
    vehicle's all-up mass [kg]; unit: the mass unit the person typed (parse_payloads), in which
    the line gives the masses. Raises InputError naming the largest payload allowed.
    """
    top = max(payloads_kg) if payloads_kg else 0.0
    limit = PAYLOAD_MASS_RATIO_MAX * vehicle_mass_kg
    if top > limit:
        scale = parse_quantity("1" + unit, "mass")
        raise InputError("--payload %s: the largest payload, %.4g %s, is more than %g times the vehicle's "
                         "all-up mass of %.4g %s, more than any multirotor lifts (heavy lifters carry about "
                         "their own mass, common practice): give payloads up to %.4g %s"
                         % (shorten(str(text)), top / scale, unit, PAYLOAD_MASS_RATIO_MAX, vehicle_mass_kg / scale,
                            unit, limit / scale, unit))
