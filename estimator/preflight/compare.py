"""Compare candidate builds: vary keys of a vehicle file, one pre-flight report per combination.

``--vary battery.capacity=4000mAh,5000mAh --vary propeller.size=10x4.5in,11x5in`` gives the
product of the variations (here 4 rows). Each combination is the vehicle file with those keys
replaced, checked as a file would be (units, schema, physics), then run through hover_report.
Rows are ranked by endurance among the combinations that keep every margin
(estimator.preflight.margins), then the others by endurance: the endurance the hover sheet leads
with (estimator.preflight.low_reynolds.endurance_lead). A row whose values look like a unit or
decimal slip (a unit_slip caveat: a pack weighing most of the vehicle) is ranked after the rows
that keep every margin with ordinary values and never named the best build: the verdict says it
was left out and why (new-user trial 10, finding 4: a 1332 Wh pack on a 9 kg hexa won it).
"""

import copy
import itertools

from estimator.errors import InputError, shorten
from estimator.preflight.low_reynolds import endurance_lead, estimate_flight_time_min
from estimator.preflight.margins import MARGINS, TABLE_CAUTIONS, broken, keeps_margins, margins
from estimator.preflight.report import hover_report
from estimator.preflight.warnings import (ENDED_BY_WORDS, REACHABLE_MARK, REACHABLE_MARK_NOTE,
                                         judged_thrust_to_weight_text)
from estimator.textwidth import WIDTH, fit_width, wrap_line
from estimator.vehicle import check_vehicle, vehicle_keys

# a row that keeps every margin while a value looks like a unit or decimal slip (the ! line under it)
SLIP_LEFT_OUT = "left out of the verdict: a value looks like a slip (the ! line)"
SLIP_WHY = ("a value looks like a unit or decimal slip, e.g. a pack weighing most of the vehicle: the ! line "
            "under each row; check it before trusting that row")
MAX_COMBINATIONS = 10000  # a product larger than this is refused (say so) [-]
# propeller keys that a new propeller description replaces
_PROPELLER_SETS = {"size": ("diameter_m", "pitch_m", "diameter", "pitch", "ct", "cp"),
                   "pitch_m": ("ct", "cp", "pitch"), "pitch": ("ct", "cp", "pitch_m"),
                   "ct": ("pitch_m", "pitch", "size", "blades"), "cp": ("pitch_m", "pitch", "size", "blades")}


def _shown(text, limit=80):
    """What the person typed, as typed when short, shortened (errors.shorten) when long."""
    return text if len(text) <= limit else shorten(text)


def parse_vary(text):
    """``KEY=V1,V2,...`` -> (key path tuple, [values]); values stay text (units allowed).

    Raises InputError naming the option, the key or the value at fault.
    """
    if "=" not in text:
        raise InputError("--vary %s: write KEY=V1,V2,... (e.g. battery.capacity=4000mAh,5000mAh)"
                         % _shown(text))
    key, _, values = text.partition("=")
    key = key.strip()
    path = tuple(part for part in key.split("."))
    if not key or any(not part for part in path):
        raise InputError("--vary %s: the key before '=' is empty or has an empty part" % _shown(text))
    known = vehicle_keys()
    if path not in known:
        import difflib
        near = difflib.get_close_matches(key, sorted(".".join(k) for k in known), 3, 0.6)
        raise InputError("--vary %s: %s is not a key of a vehicle file; %s" % (
            _shown(text), _shown(key), ("did you mean %s?" % " or ".join(near)) if near else
            "e.g. mass_kg, battery.capacity, motor.kv_rpm_per_V, propeller.size, site.temperature_C"))
    items = [v.strip() for v in values.split(",")]
    if not values.strip() or any(not v for v in items):
        raise InputError("--vary %s: give at least one value after '=', separated by commas, none empty"
                         % _shown(text))
    return path, [_typed(v) for v in items]


def _typed(text):
    """A bare number as a JSON number (the key's unit), anything else as text (with its unit)."""
    import math

    try:
        value = int(text)
    except ValueError:
        try:
            value = float(text)
        except ValueError:
            return text
        if not math.isfinite(value):
            return text  # the unit parser refuses it, naming the key
    return value


def _with(document, path, value):
    doc = copy.deepcopy(document)
    node = doc
    for part in path[:-1]:
        child = node.get(part)
        if not isinstance(child, dict):
            child = node[part] = {}
        node = child
    leaf = path[-1]
    for sibling in vehicle_keys_aliases(path):
        node.pop(sibling, None)
    if path[:1] == ("propeller",):
        for other in _PROPELLER_SETS.get(leaf, ()):
            node.pop(other, None)
    node[leaf] = value
    return doc


def vehicle_keys_aliases(path):
    """Keys that name the same quantity as ``path``'s leaf in its block (mass <-> mass_kg)."""
    from estimator.vehicle import unit_key_aliases
    return unit_key_aliases(path)


def combinations(variations):
    """Product of [(path, values)] as a list of [(path, value), ...]; refuses huge products."""
    total = 1
    for _, values in variations:
        total *= len(values)
    if total > MAX_COMBINATIONS:
        raise InputError("--vary: %d combinations is more than %d; vary fewer keys or values"
                         % (total, MAX_COMBINATIONS))
    paths = [p for p, _ in variations]
    return [list(zip(paths, combo)) for combo in itertools.product(*[v for _, v in variations])]


def compare_rows(document, source, variations, progress=None):
    """One row per combination of the variations, ranked (module docstring).

    document: the vehicle file as loaded (JSON); source: its name for messages; variations:
    [(path tuple, [values])] from parse_vary; progress: None or a function (done, total)
    called after each row. Returns a dict: rows (list of row dicts: rank, values {key: value
    as given}, hover_command, hover_command_empty, thrust_to_weight, hover_motor_current_A,
    thrust_to_weight_reachable (False when full command sags the pack below its cutoff),
    reachable_thrust_to_weight [-] (at the cutoff-limited command),
    hover_esc_input_current_A, hover_pack_current_A, full_pack_current_A [A] (nominal pack),
    current_judged_at, motor_current_judged_A, esc_current_judged_A, pack_current_judged_A [A]
    (what the current margins judge: full command on a full pack), full_command_sag (True when
    full command sags the nominal pack below its cutoff: a caveat under the row, not a margin),
    flight_time_min (the estimate's), flight_time_lead_min and flight_time_lead_basis (what the
    row shows and is ranked on: low_reynolds.endurance_lead, the conservative endurance for a
    small estimated rotor), endurance_lead (that dict), flight_ended_by (of the flight shown),
    caveats (preflight.caveats: unit slips, small rotor, cold pack, as the hover sheet has them),
    margins {name: bool|None}, keeps_margins, broken [names], looks_like_slip (a unit_slip
    caveat)), margins (MARGINS), not_margins (margins.TABLE_CAUTIONS: shown beside a row, never
    ranking it), best (the first row that keeps every margin and does not look like a slip, or
    None), left_out (the rows that keep every margin but look like a slip, by rank), held (the keys
    held as written while a pack-size key was varied: held_with_pack).
    Raises InputError naming the --vary value when a combination is not a valid vehicle.
    """
    combos = combinations(variations)
    rows = []
    for i, combo in enumerate(combos):
        doc = document
        for path, value in combo:
            doc = _with(doc, path, value)
        label = ", ".join("%s=%s" % (".".join(p), v) for p, v in combo)
        try:
            vehicle = check_vehicle(doc, source)
        except InputError as exc:
            raise InputError("--vary %s: %s" % (label, exc)) from None
        report = hover_report(vehicle)
        marks = margins(report)
        rows.append({
            "values": {".".join(p): v for p, v in combo},
            "label": label,
            "hover_command": report["hover_command"],
            "hover_command_empty": report["hover_command_empty"],
            "thrust_to_weight": report["thrust_to_weight"],
            "thrust_to_weight_reachable": report.get("thrust_to_weight_reachable"),
            "reachable_thrust_to_weight": report.get("reachable_thrust_to_weight"),
            "hover_motor_current_A": report.get("hover_motor_current_A"),
            "hover_esc_input_current_A": report.get("hover_esc_input_current_A"),
            "hover_pack_current_A": report["hover_current_A"],
            "full_pack_current_A": report.get("full_pack_current_A"),
            # what the current margins judge: full command on a full pack (warnings.judged_currents)
            "current_judged_at": report.get("current_judged_at"),
            "motor_current_judged_A": report.get("motor_current_judged_A"),
            "esc_current_judged_A": report.get("esc_current_judged_A"),
            "pack_current_judged_A": report.get("pack_current_judged_A"),
            # a caution shown under the row, not a margin (margins.TABLE_CAUTIONS)
            "full_command_sag": report.get("thrust_to_weight_reachable") is False,
            "mass_kg": report["mass_kg"],
            "flight_time_min": estimate_flight_time_min(report),  # the generic blade estimate's
            "flight_time_lead_min": report["flight_time_lead_min"],
            "flight_time_lead_basis": report["flight_time_lead_basis"],
            "endurance_lead": endurance_lead(report),
            "flight_ended_by": endurance_lead(report)["flight_ended_by"],  # of the flight the row shows
            "propeller_source": report.get("propeller_source"),
            "caveats": report["caveats"],
            "margins": marks,
            "keeps_margins": keeps_margins(marks),
            "broken": broken(marks),
            "looks_like_slip": any(c["kind"] == "unit_slip" for c in report["caveats"]),
        })
        if progress is not None:
            progress(i + 1, len(combos))
    # ranked on the endurance the sheet leads with (low_reynolds.endurance_lead: the conservative
    # one for a small estimated rotor)
    # (a row that looks like a slip after the ordinary ones that keep every margin)
    rows.sort(key=lambda r: (not r["keeps_margins"], r["keeps_margins"] and r["looks_like_slip"],
                             -(r["flight_time_lead_min"] or 0.0)))
    for rank, row in enumerate(rows, 1):
        row["rank"] = rank
    best = rows[0] if rows and rows[0]["keeps_margins"] and not rows[0]["looks_like_slip"] else None
    left_out = [r for r in rows if r["keeps_margins"] and r["looks_like_slip"]]
    return {"rows": rows, "margins": dict(MARGINS), "not_margins": dict(TABLE_CAUTIONS), "best": best,
            "left_out": left_out, "varied": [".".join(p) for p, _ in variations], "combinations": len(rows),
            "held": [k for k, _ in held_with_pack([".".join(p) for p, _ in variations])]}


# varied keys that change a pack's size, and the keys such a change moves with it: a larger pack
# weighs more, and more cells in parallel have less resistance (new-user trial 12, finding 3:
# --vary battery.capacity=10Ah,16Ah,22Ah kept 5 kg and ranked the 22 Ah pack first, while such a
# 6S pack alone weighs about 2.7 kg, without a word on screen)
PACK_SIZE_KEYS = ("battery.capacity", "battery.cells")
HELD_WITH_PACK = (("mass", "the all-up mass"), ("battery.resistance", "the pack resistance"))


def held_with_pack(varied):
    """[(key, words)] of HELD_WITH_PACK not varied while a pack-size key is; [] when none is varied.
    varied: the varied keys as written (a unit-suffixed key counts as its short one: _short_key)."""
    short = {_short_key(k) for k in varied}
    if not short & set(PACK_SIZE_KEYS):
        return []
    return [(k, words) for k, words in HELD_WITH_PACK if k not in short]


def _short_key(key):
    """A vehicle key as written on its short name: 'battery.capacity_Ah' -> 'battery.capacity',
    'mass_kg' -> 'mass' (estimator.vehicle_units.UNIT_KEYS, the one table of unit-bearing keys)."""
    from estimator.vehicle_units import UNIT_KEYS

    block, _, name = key.rpartition(".")
    for short, (si_key, _kind) in UNIT_KEYS.get(block, {}).items():
        if name == si_key:
            return (block + "." if block else "") + short
    return key


def held_note(result):
    """The ! line under the table when a pack-size key was varied with the mass or the pack
    resistance held as written, else None."""
    held = held_with_pack(result["varied"])
    if not held:
        return None
    size = " and ".join(k for k in result["varied"] if k.startswith(PACK_SIZE_KEYS))
    mass = " (%.3g kg)" % result["rows"][0]["mass_kg"] if held[0][0] == "mass" else ""
    return ("%s varied with %s held as written%s: another pack weighs more or less and has another "
            "resistance, so these rows compare packs of one %s; vary %s too"
            % (size, " and ".join(w for _, w in held), mass,
               " and ".join({"mass": "weight", "battery.resistance": "resistance"}[k] for k, _ in held),
               " and ".join(k for k, _ in held)))


def _tw_cell(row):
    """The T/W a row can reach: at full command, or (marked *) at the pack's loaded cutoff."""
    return judged_thrust_to_weight_text(row)


def format_table(result, name):
    """The text table of compare_rows: ranked rows (#: rank; what ended the flight and the
    margins each breaks on a line under the row), the best choice, then one line per margin;
    lines below the table wrapped to an 80-column terminal (estimator.textwidth). A row with
    many varied keys may be wider: it is never cut."""
    rows = result["rows"]
    head = fit_width("COMPARE: %s, %d combination%s" % (name, len(rows), "" if len(rows) == 1 else "s"))
    lines = [head, "=" * min(WIDTH, max(len(line) for line in head.split("\n")))]
    keys = result["varied"]
    # a column is headed by its key's last part (motor.kv_rpm_per_V -> kv_rpm_per_V) so that the
    # table fits 80 columns; the full keys are named under the table when that shortened them
    labels = [k.split(".")[-1] for k in keys]
    if len(set(labels)) < len(labels):
        labels = list(keys)
    widths = [max(len(lab), max(len(str(r["values"][k])) for r in rows)) for k, lab in zip(keys, labels)]
    rank_w = max(2, len(str(len(rows))))
    # the figures of each row; each column as wide as its heading or its widest cell, numbers
    # right-aligned so that their places line up whatever their size (a 50 g micro beside a
    # 25 kg octo), two spaces between columns. The T/W's reachable mark (*) stands in the first
    # space after its figures, so the column after it keeps one space more than its widest cell
    # (a value written with more digits so that it never rounds onto the floor of 2 it is
    # judged by, '1.997*', widens the column, warnings.beside)
    figures = [[("%.2f" % r["hover_command"]) if r["hover_command"] is not None else "none",
                _tw_cell(r).rstrip(REACHABLE_MARK),
                ("%.1f" % r["hover_motor_current_A"]) if r["hover_motor_current_A"] is not None else "-",
                ("%.1f" % r["hover_pack_current_A"]) if r["hover_pack_current_A"] is not None else "-",
                ("%.1f min" % r["flight_time_lead_min"]) if r["flight_time_lead_min"] is not None
                else "no hover"] for r in rows]
    headings = ["command", "T/W", "motor A", "pack A", "endurance"]
    fig_w = [max(len(h), max(len(f[i]) + (i == 2) for f in figures)) for i, h in enumerate(headings)]
    header = "#".rjust(rank_w) + "  " + "  ".join(lab.ljust(w) for lab, w in zip(labels, widths))
    header += "  " + "  ".join(h.rjust(w) for h, w in zip(headings, fig_w))
    lines.append(header)
    for r, fig in zip(rows, figures):
        cells = "  ".join(str(r["values"][k]).ljust(w) for k, w in zip(keys, widths))
        mark = REACHABLE_MARK if _tw_cell(r).endswith(REACHABLE_MARK) else " "
        lines.append("%*d  %s  %s  %s%s %s" % (
            rank_w, r["rank"], cells, fig[0].rjust(fig_w[0]), fig[1].rjust(fig_w[1]), mark,
            "  ".join(f.rjust(w) for f, w in zip(fig[2:], fig_w[2:]))))
        ended = ("ended by %s; " % ENDED_BY_WORDS.get(r["flight_ended_by"], r["flight_ended_by"])
                 if r.get("flight_ended_by") else "")
        marks = "keeps every margin" if r["keeps_margins"] else "breaks " + ", ".join(r["broken"])
        if r["keeps_margins"] and r["looks_like_slip"]:
            marks += ", but " + SLIP_LEFT_OUT
        lines += wrap_line(" " * (rank_w + 2) + ended + marks, indent=rank_w + 4)  # words under the row
        for caveat in r["caveats"]:  # the hover sheet's caveats, one line each (preflight.caveats)
            if caveat["kind"] == "cold_pack" and len(rows) > 1 and all(caveat in o["caveats"] for o in rows):
                continue  # the same pack caution for every row: once, below the table
            lines += wrap_line(" " * (rank_w + 2) + "! " + caveat["short"], indent=rank_w + 6)
    table, lines = lines, [""]
    left_out = result.get("left_out") or []
    held = held_note(result)
    if result["best"]:
        lines.append("longest hover that keeps every margin: %s (%.1f min)"
                     % (result["best"]["label"], result["best"]["flight_time_lead_min"]))
    else:  # one verdict line, the best choice or none
        lines.append("no combination keeps every margin" + (" with values that look ordinary" if left_out else ""))
    if held:
        lines.append("! " + held)
    if left_out:
        ranks = ", ".join("#%d" % r["rank"] for r in left_out[:5]) + (
            " and %d more" % (len(left_out) - 5) if len(left_out) > 5 else "")
        lines.append("left out of that verdict: %s (%s)" % (ranks, SLIP_WHY))
    if labels != list(keys):
        lines.append("columns: " + "; ".join("%s = %s" % (lab, k) for lab, k in zip(labels, keys) if lab != k))
    lines.append("margins:")
    width = max(len(k) for k in result["margins"])
    lines += ["  %s  %s" % (k.ljust(width), v) for k, v in result["margins"].items()]
    if any(r.get("full_command_sag") for r in rows):
        lines.append("not a margin (the ! line under a row; it does not rank the row):")
        lines += ["  %s  %s" % (k.ljust(width), v) for k, v in result["not_margins"].items()]
    lines.append("motor A  each motor's current at hover (ESC output)")
    lines.append("pack A   all motors from the pack")
    if any(r.get("thrust_to_weight_reachable") is False for r in rows):
        lines.append("T/W%s     %s" % (REACHABLE_MARK, REACHABLE_MARK_NOTE))
    kinds = [c for r in rows for c in r["caveats"]]
    if any(c["kind"] == "small_rotor" for c in kinds):
        from estimator.preflight.low_reynolds import TABLE_NOTE
        lines.append("! " + TABLE_NOTE)
    lines += ["! " + text for text in dict.fromkeys(c["text"] for c in kinds if c["kind"] in ("cold_pack", "full_charge"))]
    if any(r.get("propeller_source") == "estimated" for r in rows):
        from estimator.preflight.propeller_estimate import ESTIMATE_NOTE
        lines.append("- " + ESTIMATE_NOTE)
    return "\n".join(table) + "\n" + fit_width("\n".join(lines) + "\n")  # rows are never cut
