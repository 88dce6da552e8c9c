"""The one reader of liftcal's CSV files: a ``name[unit]`` header, then rows of numbers.

Bench sweeps (estimator.bench.reader) and flight logs (estimator.watch.replay) both read
through here, passing their column spec, so both accept and refuse the same things with
the same words (design notes sec. 2, sec. 4).

Layout accepted: UTF-8 text with or without a byte-order mark, LF or CRLF line ends;
blank lines and lines starting with ``#`` anywhere (``# key: value`` comments before the
header are collected for the caller); one header row of comma-separated ``name[unit]``
cells (``command[-]``, ``Time [s]``, ``"thrust[g]"``: names case-insensitive, spaces and
double quotes around a cell allowed); then comma-separated numbers, as many cells as the
header has; a ``#`` after the cells starts a comment. Refused with the line (and column)
and the likely cause: a file separated by semicolons or tabs, lines ended by CR alone,
text that is not UTF-8, a cell that is not a number, NaN or infinity (a missing reading is
an empty cell, where the caller allows one), a row of the wrong width.

API: read_head(path, what, example) -> Head; parse_header(path, head, columns, optional,
refuse) -> ({name: (index, unit)}, warnings); read_columns(path, head, indices,
missing_ok) -> one list of floats per index; read_table(path, what, example, columns, ...)
-> Table (all three in one call). ``columns`` maps a required name to its units
{unit: (scale, offset)} (SI = value * scale + offset); the caller converts.
"""

import math
import re

from estimator.errors import InputError, shorten
from estimator.safepath import MiB, open_checked, size_text
from estimator.units import COMMAND_SHOWN

# the largest CSV read [bytes]: some ten million rows of a bench sweep or a flight log
MAX_BYTES = 512 * MiB
# the longest line before the header [bytes]: a header of some thousands of columns
MAX_HEAD_LINE = 1 * MiB
# lines before the header are comments or blank; a file without a header within these
# many lines is no liftcal CSV [lines]
MAX_HEAD_LINES = 10000

# the command column's units, one table for bench sweeps and flight logs: unit -> (scale,
# offset) so that the command [-] (0..1) = value * scale + offset. ``permille`` is the unit
# liftcal itself speaks on the board (Watch.update, the exported hover command). The inverse of
# units.COMMAND_SHOWN, the one table of command units (exact in floats: 1 / 1000 is 0.001).
COMMAND_UNITS = {unit: (1.0 / scale, -offset / scale) for unit, (scale, offset, _, _) in COMMAND_SHOWN.items()}
# a time column of a bench sweep or a flight log: unit -> (scale, offset) to seconds
TIME_UNITS = {"s": (1.0, 0.0), "ms": (1e-3, 0.0)}


class Head:
    """What precedes the data: ``comments`` {key: (value text, line number)} from
    ``# key: value`` lines (key lower case), the header ``cells`` (text as written, quotes
    removed) and ``line`` (the header's line number, counted from 1; data follow it). A key
    given on more than one line keeps its last value in ``comments``; ``earlier`` {key: [(value
    text, line number), ...]} holds the ones before it, for readers that must not pick one
    silently."""

    def __init__(self, comments, cells, line, earlier=None):
        self.comments, self.cells, self.line = comments, cells, line
        self.earlier = earlier or {}


def _decode(path, raw, line_no):
    if line_no == 1 and raw[:2] in (b"\xff\xfe", b"\xfe\xff"):
        raise InputError("%s: line 1: UTF-16 text (a spreadsheet's 'Unicode text'); save it as "
                         "'CSV UTF-8' (comma-separated)" % path)
    try:
        return raw.decode("utf-8-sig" if line_no == 1 else "utf-8")
    except UnicodeDecodeError:
        raise InputError("%s: line %d: not UTF-8 text; expected a CSV with a name[unit] header "
                         "(saved as UTF-8 or plain ASCII)" % (path, line_no)) from None


def _check_separator(path, line, line_no, example):
    if "," not in line and (";" in line or "\t" in line):
        raise InputError("%s: line %d: the header is separated by %s; liftcal reads comma-separated "
                         "files with a point as the decimal mark (%s)"
                         % (path, line_no, "semicolons" if ";" in line else "tabs", example))


def read_head(path, what, example):
    """Read the comment lines and the header row of a CSV; returns a Head.

    what: the kind of file for messages ("a bench CSV"); example: a header to show when
    none is found ("command[-],voltage[V],current[A],thrust[N]"). Raises InputError.
    """
    comments, earlier = {}, {}
    with open_checked(path, what, MAX_BYTES) as fh:
        line_no = 0
        while line_no < MAX_HEAD_LINES:
            raw = fh.readline(MAX_HEAD_LINE + 1)
            if not raw:
                break
            line_no += 1
            if len(raw) > MAX_HEAD_LINE:
                raise InputError("%s: line %d is longer than %s before any header; expected %s "
                                 "starting with a header such as %s"
                                 % (path, line_no, size_text(MAX_HEAD_LINE), what, example))
            line = _decode(path, raw, line_no).strip()
            if not line:
                continue
            if "\r" in line:
                raise InputError("%s: line %d: lines end with a carriage return alone (old Mac line "
                                 "ends); save the file with LF or CRLF line ends" % (path, line_no))
            if line.startswith("#"):
                body = line[1:].strip()
                if ":" in body:
                    key, _, value = body.partition(":")
                    key = key.strip().lower()
                    if key in comments:
                        earlier.setdefault(key, []).append(comments[key])
                    comments[key] = (value.strip(), line_no)
                continue
            if line.lstrip("\ufeff")[:1] in ("{", "["):
                raise InputError("%s: looks like a JSON file (a parameter set or a vehicle file?), not a "
                                 "CSV file; expected %s; is it the right file?" % (path, what))
            _check_separator(path, line, line_no, example)
            cells = [c.strip().strip('"').strip() for c in line.split("#", 1)[0].split(",")]
            return Head(comments, cells, line_no, earlier)
    raise InputError("%s: no header row found; expected %s with a header such as %s"
                     % (path, what, example))


def parse_header(path, head, columns, optional=(), refuse=None):
    """Find the columns in the header (estimator.csvheader.parse_header: every header
    problem in one error, each named by its column)."""
    from estimator.csvheader import parse_header as parse

    return parse(path, head, columns, optional, refuse)


def _number(path, line_no, col, cell, missing_ok, name=""):
    """One cell as a float: NaN for a missing reading (an empty cell, or 'nan' as loggers write
    for a missed sample) when allowed, else InputError (naming the column's header cell
    ``name`` when given); infinity is always refused."""
    where = " in %s" % shorten(name) if name else ""
    cell = cell.strip()
    if cell[:1] == '"':
        cell = cell.strip('"').strip()
    if not cell or (missing_ok and cell.lower().lstrip("+-") == "nan"):
        if missing_ok:
            return math.nan
        raise InputError("%s: line %d column %d: empty cell%s (a missing reading?); every cell of "
                         "these columns needs a number" % (path, line_no, col + 1, where))
    try:
        value = float(cell)
    except ValueError:
        raise InputError("%s: line %d column %d: cannot read %s as a number%s%s"
                         % (path, line_no, col + 1, shorten(cell), where,
                            "; leave a missing reading empty (that row is then counted and left "
                            "out)" if missing_ok else "")) from None
    if not math.isfinite(value):
        raise InputError("%s: line %d column %d: %s is not a finite number%s (NaN and infinity are "
                         "refused%s)" % (path, line_no, col + 1, shorten(cell), where,
                                         "; leave a missing reading empty" if missing_ok else ""))
    return value


# a header cell: a name with its unit in brackets ("thrust[kgf]", "command[-]")
_HEADER_CELL = re.compile(r"^\s*[A-Za-z_][\w ]*\[[^\]]*\]\s*$")


def _not_a_header_again(path, line_no, cells, header):
    """Refuse a data row that is a header row again (two files joined one after the other): the
    header's own cells, or name[unit] cells where numbers belong. One error naming the line;
    the advice to leave a missing reading empty would not fit it."""
    cells = [c.strip().strip('"').strip() for c in cells]
    if cells == [c.strip() for c in header]:
        raise InputError("%s: line %d repeats the header row (%s): two files joined? delete that line, "
                         "or split the file there and read each part on its own"
                         % (path, line_no, _first_cells(cells)))
    if sum(1 for c in cells if _HEADER_CELL.match(c.strip())) * 2 > len(cells):
        raise InputError("%s: line %d looks like another header row (%s), not readings: two files "
                         "joined? delete that line, or split the file there and read each part on its own"
                         % (path, line_no, _first_cells(cells)))


def _first_cells(cells, shown=2):
    """'command[us], voltage[mV], ...': a row's first cells, each shortened (errors.shorten's
    limit), to name a row without quoting it whole."""
    words = [shorten(c).strip("'") for c in cells[:shown]]
    return ", ".join(words) + (", ..." if len(cells) > shown else "")


def read_columns(path, head, indices, missing_ok=False, what="a CSV"):
    """The numbers of the data rows in the columns ``indices``: one list of floats each.

    Every data row must have as many cells as the header; only the cells at ``indices`` are
    read as numbers (others may hold text). missing_ok: an empty cell or 'nan' becomes NaN
    (the caller drops and counts the row) instead of an error. Raises InputError naming the line.
    """
    ncols = len(head.cells)
    out = [[] for _ in indices]
    pairs = list(zip(indices, out))
    names = list(head.cells) + [""] * (max(indices, default=0) + 1 - len(head.cells))
    previous = None
    with open_checked(path, what, MAX_BYTES) as fh:
        for line_no, text in _data_lines(path, fh, head.line):
            cells = text.split(",")
            if len(cells) != ncols:
                comma = _decimal_comma(cells, ncols, previous, names)
                raise InputError("%s: line %d: %d cells where the header has %d (%s)"
                                 % (path, line_no, len(cells), ncols, comma or "truncated or merged row?"))
            previous = cells
            for index, column in pairs:
                cell = cells[index]
                try:
                    value = float(cell)
                except ValueError:
                    _not_a_header_again(path, line_no, cells, head.cells)
                    value = _number(path, line_no, index, cell, missing_ok, names[index])
                else:
                    if value - value != 0.0:  # NaN or infinity, refused by _number
                        value = _number(path, line_no, index, cell, missing_ok, names[index])
                column.append(value)
    return out


_WHOLE = re.compile(r"^\s*[-+]?\d+\s*$")
_DIGITS = re.compile(r"^\d+\s*$")


def _decimal_comma(cells, ncols, previous, names):
    """The likely cause of a row one cell longer than the header when two neighbouring cells
    read as one number written with a decimal comma ('24,92' for 24.92: new-user trial 12, finding
    7), else None. Of several such pairs, the one whose joined row lies nearest the previous row
    (relative differences, cell by cell) is named; without a previous row, every pair is."""
    if len(cells) != ncols + 1:
        return None
    pairs = [i for i in range(len(cells) - 1) if _WHOLE.match(cells[i]) and _DIGITS.match(cells[i + 1])]
    if not pairs:
        return None

    def distance(i):
        joined = cells[:i] + [cells[i].strip() + "." + cells[i + 1].strip()] + cells[i + 2:]
        total = 0.0
        for new, old in zip(joined, previous):
            try:
                a, b = float(new), float(old)
            except ValueError:
                continue
            total += abs(a - b) / max(abs(a), abs(b), 1e-9)
        return total

    if previous is not None and len(previous) == ncols:
        pairs = [min(pairs, key=distance)]
    shown = " or ".join("'%s,%s' in column %s looks like a decimal comma: write %s.%s"
                        % (cells[i].strip(), cells[i + 1].strip(), names[i] or i + 1, cells[i].strip(),
                           cells[i + 1].strip()) for i in pairs[:3])
    return shown + "; liftcal reads a point as the decimal mark"


def _data_lines(path, fh, skip):
    """(line number, text) of the data lines after ``skip`` lines: comments cut, blank lines
    left out; a carriage return alone inside a line also ends a line (as numpy.loadtxt and
    text-mode reading take it), counted within the same line number."""
    for line_no, raw in enumerate(fh, start=1):
        if line_no <= skip:
            continue
        try:
            text = raw.decode("utf-8")
        except UnicodeDecodeError:
            raise InputError("%s: line %d: not UTF-8 text" % (path, line_no)) from None
        pieces = text.split("\r") if "\r" in text.rstrip("\r\n") else (text,)
        for piece in pieces:
            if "#" in piece:
                piece = piece.split("#", 1)[0]
            piece = piece.strip()
            if piece:
                yield line_no, piece


def data_line_numbers(path, skip):
    """The line numbers (from 1) of the data rows after ``skip`` lines, in order, counted as every
    reader here counts rows (_data_lines: comments and blank lines left out); the one row
    numbering of both flows' messages (a bench sweep's time warning, a flight log's time and
    missing-cell errors). Read only when a message needs to name a row."""
    with open(path, "rb") as fh:
        return [line_no for line_no, _ in _data_lines(path, fh, skip)]


class Table:
    """A CSV read by read_table: ``head`` (Head), ``columns`` {name: (index, unit)},
    ``values`` {name: list of floats as written, not converted}, ``rows`` (number of data
    rows) and ``warnings`` (list of str)."""

    def __init__(self, head, columns, values, warnings):
        self.head, self.columns, self.values, self.warnings = head, columns, values, warnings
        self.rows = len(next(iter(values.values()))) if values else 0


def read_table(path, what, example, columns, optional=(), refuse=None, missing_ok=False):
    """read_head, parse_header and read_columns of the required columns in one call."""
    head = read_head(path, what, example)
    found, warnings = parse_header(path, head, columns, optional, refuse)
    names = list(columns)
    lists = read_columns(path, head, [found[n][0] for n in names], missing_ok, what)
    return Table(head, found, dict(zip(names, lists)), warnings)
