"""How much can it carry? Endurance and margins per payload, and the largest payload that keeps them.

The payload is added to the vehicle's all-up mass; each payload gets a full pre-flight report
(hover_report) and its margins (estimator.preflight.margins). A payload "keeps" when every
margin holds, the landing-reserve margin included (the flight ends on the reserve, not on the
cutoff or the loss of hover), and, with a job time, when the endurance reaches it. The largest
such payload is found between the last payload that keeps and the first that does not, by
bisection (BISECTION_STEPS halvings).
"""

import copy
import re

from estimator.errors import InputError, shorten
from estimator.preflight.margins import broken, margins
from estimator.preflight.report import hover_report
from estimator.units import parse_quantity

RANGE_POINTS = 9  # payloads in a range A..B, ends included [-]
BISECTION_STEPS = 30  # halvings between a payload that keeps and one that does not [-]
_RANGE = re.compile(r"^\s*([^.][^,]*?)\s*\.\.\s*([^,]+?)\s*$")
_UNIT = re.compile(r"[A-Za-z]+\s*$")


def parse_payloads(text):
    """``0..2kg`` (RANGE_POINTS evenly spaced, ends included) or ``0,500g,1.5kg`` -> (kg list, unit).

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
    values = []
    for part in parts:
        typed = part if _UNIT.search(part) else part + unit
        values.append(parse_quantity(typed, "mass", "--payload %s" % shorten(part)))
    if any(v < 0.0 for v in values):
        raise InputError("--payload %s: a payload cannot be negative" % shorten(text))
    if m:
        lo, hi = values
        if not hi > lo:
            raise InputError("--payload %s: the range must rise (A..B with B above A)" % shorten(text))
        values = [lo + (hi - lo) * i / (RANGE_POINTS - 1) for i in range(RANGE_POINTS)]
    return sorted(set(values)), unit


def _row(vehicle, payload_kg, job_min):
    v = copy.deepcopy(vehicle)
    v["mass_kg"] = vehicle["mass_kg"] + payload_kg
    report = hover_report(v)
    marks = margins(report)
    if job_min is not None:
        marks["job_time"] = report["flight_time_min"] is not None and report["flight_time_min"] >= job_min
    return {
        "payload_kg": payload_kg, "mass_kg": v["mass_kg"],
        "hover_command": report["hover_command"], "hover_command_empty": report["hover_command_empty"],
        "thrust_to_weight": report["thrust_to_weight"], "hover_pack_current_A": report["hover_current_A"],
        "hover_motor_current_A": report.get("hover_motor_current_A"),
        "flight_time_min": report["flight_time_min"], "flight_ended_by": report.get("flight_ended_by"),
        "margins": marks, "keeps": all(m is not False for m in marks.values()),
        "broken": broken(marks) + (["job_time"] if marks.get("job_time") is False else []),
    }


def payload_table(vehicle, payloads_kg, job_min=None):
    """Rows per payload and the largest payload that keeps every margin (module docstring).

    vehicle: checked vehicle dict; payloads_kg: payloads [kg], >= 0; job_min: required
    endurance [min] or None. Returns a dict: rows (payload_kg [kg], mass_kg [kg],
    hover_command [-], hover_command_empty [-], thrust_to_weight [-], hover_pack_current_A [A],
    hover_motor_current_A [A], flight_time_min [min], flight_ended_by, margins, keeps, broken),
    max_payload_kg [kg] or None (none keeps), max_payload_note (text: how it was found and
    what breaks beyond it), job_min.
    """
    rows = [_row(vehicle, p, job_min) for p in payloads_kg]
    best, note = None, None
    first_bad = next((i for i, r in enumerate(rows) if not r["keeps"]), None)
    if first_bad is None:
        best = rows[-1]["payload_kg"]
        note = "every payload listed keeps the margins; the limit lies beyond %.3g kg" % best
    elif first_bad == 0:
        note = ("even the smallest payload (%.3g kg) breaks: %s" % (rows[0]["payload_kg"],
                                                                   ", ".join(rows[0]["broken"])))
    else:
        lo, hi = rows[first_bad - 1]["payload_kg"], rows[first_bad]["payload_kg"]
        beyond = rows[first_bad]
        for _ in range(BISECTION_STEPS):
            mid = 0.5 * (lo + hi)
            row = _row(vehicle, mid, job_min)
            if row["keeps"]:
                lo = mid
            else:
                hi, beyond = mid, row
        best = lo
        note = "found by bisection between the listed payloads; beyond it breaks: %s" % ", ".join(beyond["broken"])
    return {"rows": rows, "max_payload_kg": best, "max_payload_note": note, "job_min": job_min}


def format_payload_table(result, unit="kg"):
    """The payload table for the sheet, masses in the unit the person typed (g, kg, lb, oz)."""
    scale = parse_quantity("1" + unit, "mass") if unit else 1.0
    lines = ["5. How much can it carry?",
             "   payload     all-up      command  cmd empty  T/W   pack A  endurance           keeps margins"]
    for r in result["rows"]:
        cmd = "%.2f" % r["hover_command"] if r["hover_command"] is not None else "none"
        empty = "%.2f" % r["hover_command_empty"] if r["hover_command_empty"] is not None else "none"
        pack = "%.1f" % r["hover_pack_current_A"] if r["hover_pack_current_A"] is not None else "-"
        time = ("%.1f min (%s)" % (r["flight_time_min"], r["flight_ended_by"])
                if r["flight_time_min"] is not None else "no hover")
        lines.append("   %-10s  %-10s  %-7s  %-9s  %-4.2f  %-6s  %-18s  %s" % (
            "%.4g %s" % (r["payload_kg"] / scale, unit), "%.4g %s" % (r["mass_kg"] / scale, unit), cmd,
            empty, r["thrust_to_weight"], pack, time,
            "yes" if r["keeps"] else "no: " + ", ".join(r["broken"])))
    best = result["max_payload_kg"]
    job = " and %.0f min of hover" % result["job_min"] if result["job_min"] is not None else ""
    if best is None:
        lines.append("   no payload keeps the margins and the landing reserve%s: %s" % (job, result["max_payload_note"]))
    else:
        lines.append("   largest payload that keeps the margins and the landing reserve%s: %.3g %s (%s)"
                     % (job, best / scale, unit, result["max_payload_note"]))
    return "\n".join(lines) + "\n"
