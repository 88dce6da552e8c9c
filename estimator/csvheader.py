"""The header row of liftcal's CSV files: ``name[unit]`` cells matched to a column spec.

Used by estimator.csvtable (bench sweeps and flight logs alike). Every problem of a header
is collected and reported in ONE error (still one ``error:`` line), each named by its
column, so a header from another tool's export is fixed in one round trip. A cell whose
words name one of liftcal's columns in the trade's plain words (``Pulse width (us)``,
``Lift (gf)``, ``Shaft speed (RPM)``) gets liftcal's own cell as the hint
(``command[us]``, ``thrust[gf]``, ``rpm[rpm]``); the column is never renamed silently:
the person fixes the header. Unit spellings (``µs`` for ``us``) come from the one unit
table, estimator.units.
"""

import difflib
import re

from estimator.errors import InputError, shorten
from estimator.units import unit_spelling

# matched on the stripped cell; the name's words and the spaces between them cannot be taken two
# ways, so a cell of ten thousand spaces is read in one pass (it backtracked for hours: a hang)
_NAME = r"([A-Za-z_][A-Za-z0-9_]*(?: +[A-Za-z0-9_]+)*)"
_HEADER_CELL = re.compile(r"^" + _NAME + r"\s*(?:\[([^\]]*)\])?$")
# a spreadsheet-style cell: 'Lift (gf)', 'Pulse width (µs)'
_SPREADSHEET_CELL = re.compile(r"^" + _NAME + r"\s*\(([^)]*)\)$")

# the most problems one error line lists (a header of thousands of columns stays one short line)
MAX_LISTED = 12

# plain words of the trade for the quantities liftcal's columns hold (a stand or logger
# names its columns in these), mapped to liftcal's column name; used for hints only
COLUMN_WORDS = {
    "command": "command", "signal": "command", "throttle": "command", "thr": "command",
    "pwm": "command", "input": "command", "pulse": "command", "duty": "command", "cmd": "command",
    "voltage": "voltage", "volts": "voltage", "volt": "voltage", "vbat": "voltage",
    "current": "current", "amps": "current", "amp": "current", "ibat": "current",
    "thrust": "thrust", "load": "thrust", "force": "thrust", "lift": "thrust",
    "time": "time", "seconds": "time", "t": "time", "timestamp": "time", "elapsed": "time",
    "rpm": "rpm", "speed": "rpm", "revolutions": "rpm",
    "torque": "torque", "moment": "torque",
    "temperature": "temperature", "temp": "temperature",
}


def _words(name):
    return [w for w in re.split(r"[\s_]+", name.lower()) if w]


def column_for(name, known):
    """liftcal's column among ``known`` that the header name ``name`` (lower case) means, or
    None: the name itself, a trade word of it (the last one that names a column: 'motor
    speed' -> rpm, 'pulse width' -> command) or a close misspelling ('voltge')."""
    if name in known:
        return name
    for word in reversed(_words(name)):
        target = word if word in known else COLUMN_WORDS.get(word)
        if target in known:
            return target
    close = difflib.get_close_matches(name, list(known), 1, 0.75)
    return close[0] if close else None


# a mass unit on a force column: a load cell's display in kg shows the weight of that mass, so
# the numbers are in kgf (new-user trial 26: thrust[kg] was refused without a word why)
WEIGHT_OF_MASS = {"kg": "kgf", "lb": "lbf"}
# a time unit written out (time[sec], 'Time (seconds)'): liftcal's unit as a hint, never read as
# it (new-user trial 26: time[sec] got no hint)
UNIT_WORDS = {"sec": "s", "secs": "s", "second": "s", "seconds": "s",
              "msec": "ms", "msecs": "ms", "millisecond": "ms", "milliseconds": "ms"}


def _unit_for(unit, table):
    """The unit of ``table`` that ``unit`` (as written) means, or None: its spelling
    (units.unit_spelling), then the same letters in another case (RPM -> rpm), then the
    weight of a mass unit (kg -> kgf, WEIGHT_OF_MASS) or a unit written out (sec -> s, UNIT_WORDS)."""
    if unit is None:
        return None
    unit = unit_spelling(unit)
    if unit in table:
        return unit
    same = [u for u in table if u.lower() == unit.lower()]
    if len(same) == 1:
        return same[0]
    near = WEIGHT_OF_MASS.get(unit.lower()) or UNIT_WORDS.get(unit.lower())
    return near if near in table else None


def _cell_hint(target, unit, table):
    """'command[us]' (liftcal's cell for a column written another way), or 'thrust[N|g|...]
    (unit 'oz' is not one liftcal reads)' when the unit is not in the column's table."""
    ours = _unit_for(unit, table)
    if ours is not None:
        return "%s[%s]" % (target, ours)
    text = "%s[%s]" % (target, "|".join(table))
    if unit:
        text += " (unit %s is not one liftcal reads: convert the column)" % shorten(unit)
    return text


def parse_header(path, head, columns, optional=(), refuse=None):
    """Find the columns in the header; returns ({name: (index, unit)}, warnings).

    columns: {name: {unit: (scale, offset)}} of the required columns; optional: the
    optional columns, {name: units table} (their units are checked like the required ones)
    or names read past without a check; both kinds are in the result when present. refuse:
    optional callable(names) returning a message when the header shows the wrong kind of
    file (a bench sweep given as a flight log), else None. Other columns get a warning
    "column 'x' is not used". Units are matched after estimator.units.unit_spelling
    (``µs`` is ``us``); the unit returned is liftcal's spelling.

    Raises ONE InputError naming the header line and every problem by its column: a cell
    that is not name[unit] (hint: liftcal's cell for it), a cell naming a missing required
    column by another word or a misspelling (hint: liftcal's cell), a column without a unit,
    with a unit not in its table, or given twice, and a required column missing.
    """
    tables = dict(optional) if isinstance(optional, dict) else {}
    tables.update(columns)
    plain = () if isinstance(optional, dict) else tuple(optional)
    line = head.line
    cells = []  # (column number, cell, name or None, unit or None)
    for index, cell in enumerate(head.cells):
        m = _HEADER_CELL.match(cell.strip())
        cells.append((index + 1, cell, m.group(1).strip().lower() if m else None,
                      (m.group(2) if m else None)))
    present = {name for _, _, name, _ in cells if name is not None}
    found, warnings, problems, hinted, strangers = {}, [], [], set(), []
    for col, cell, name, unit in cells:
        where = "column %d %s" % (col, shorten(cell.strip()))
        if name is None:
            m = _SPREADSHEET_CELL.match(cell.strip())
            target = column_for(m.group(1).strip().lower(), tables) if m else None
            if target is None:
                strangers.append(where)
                continue
            hinted.add(target)
            problems.append("%s: write %s" % (where, _cell_hint(target, m.group(2).strip(), tables[target])))
            continue
        if name not in tables:
            target = column_for(name, tables)
            if target in columns and target not in present and target not in hinted:
                hinted.add(target)
                problems.append("%s: did you mean %s? (liftcal's name for the column)"
                                % (where, _cell_hint(target, unit, columns[target])))
            elif name not in plain:
                warnings.append("column %s is not used" % shorten(cell.strip())
                                + ("; liftcal reads it when named %s" % _cell_hint(target, unit, tables[target])
                                   if target is not None and target not in present else ""))
            continue
        if name in found:
            problems.append("%s: column %r appears twice (also column %d)" % (where, name, found[name][0] + 1))
            continue
        if unit is None:
            problems.append("%s: column %r has no unit; write %s[%s]" % (where, name, name, "|".join(tables[name])))
            found[name] = (col - 1, None)
            continue
        ours = unit_spelling(unit)
        if ours not in tables[name]:
            near = _unit_for(unit, tables[name])
            mass = " (%s is a mass: a reading in %s is its weight in %s, the same numbers)" % (ours, ours, near) \
                if near and near == WEIGHT_OF_MASS.get(ours.lower()) else ""
            problems.append("%s: unit %s of column %r is not one of %s%s"
                            % (where, shorten(unit.strip()), name, ", ".join("[%s]" % u for u in tables[name]),
                               "; did you mean %s[%s]?%s" % (name, near, mass) if near else ""))
        found[name] = (col - 1, ours)
    if refuse is not None:
        message = refuse([name for _, _, name, _ in cells if name is not None])
        if message:
            raise InputError("%s: line %d: %s" % (path, line, message))
    if strangers:  # grouped: a stand's export has many columns liftcal does not use
        shown = strangers if len(strangers) <= 3 else strangers[:2] + ["%d more" % (len(strangers) - 2)]
        problems.append("%s: not name[unit], not used by liftcal: delete %s or write name[unit]"
                        % (", ".join(shown[:-1]) + " and " + shown[-1] if len(shown) > 1 else shown[0],
                           "them" if len(strangers) > 1 else "it"))
    missing = [n for n in columns if n not in found and n not in hinted]
    if missing:
        problems.append("header lacks %s; need %s" % (
            ", ".join(missing), ", ".join("%s[%s]" % (n, "|".join(u)) for n, u in columns.items())))
    if problems:
        lead = "%d header problems" % len(problems) if len(problems) > 1 else "header problem"
        if len(problems) > MAX_LISTED:
            problems = problems[:MAX_LISTED - 1] + ["and %d more" % (len(problems) - MAX_LISTED + 1)]
        raise InputError("%s: line %d: %s (liftcal reads name[unit] cells, renames nothing): %s" % (
            path, line, lead, "; ".join(problems)))
    return found, warnings
