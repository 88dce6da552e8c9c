"""Reading a bench sweep CSV (design notes sec. 4) into SI numpy arrays, with row checks.

File layout: lines starting with ``#`` are comments (``# density: 1.19``, ``# altitude: 300``,
``# temperature: 21``, ``# pressure: 97000``, ``# humidity: 40``, ``# diameter: 10in``);
then one header row of ``name[unit]`` cells; then comma-separated numbers. Required columns:
``command[-|%|permille|us]``, ``voltage[V|mV]``, ``current[A|mA]``, ``thrust[N|g|gf|kgf|lbf|mN]``.
Optional columns (OPTIONAL: ``time[s]``, ``rpm[rpm]``, ``torque[N*m]``, ``temperature[C]``)
are read and checked like the others (text refused with its line and column, an empty cell
drops the row, counted), but the fit does not use them (read_bench's ``columns`` and the
fit's summary say so); unknown columns are read past with a warning.

Rows that are merely bad (a NaN or empty cell, a negative current, a command outside 0..1)
are dropped and counted. Files that are broken (no header, a row with the wrong number of
cells, text where a number belongs) are refused with the row number. Units that are very
likely mislabelled (voltage in mV labelled V, command in % labelled [-]) are refused.
"""

import difflib
import io
import math
import re

from estimator.errors import InputError
from estimator import csvtable
from estimator.bench.bench_air import bench_air
from estimator.units import STANDARD_GRAVITY_M_S2, parse_quantity

REQUIRED = ("command", "voltage", "current", "thrust")
# optional columns: name -> {unit as written: (scale, offset)} to SI (rpm -> rad/s,
# temperature in C as estimator.units takes it); checked as numbers, not used by the fit
OPTIONAL = {
    "time": {"s": (1.0, 0.0), "ms": (1e-3, 0.0)},
    "rpm": {"rpm": (2.0 * math.pi / 60.0, 0.0)},
    "torque": {"N*m": (1.0, 0.0), "mN*m": (1e-3, 0.0)},
    "temperature": {"C": (1.0, 0.0), "K": (1.0, -273.15)},
}
# column -> {unit as written: (scale, offset)} so that SI = value * scale + offset
UNITS = {
    "command": csvtable.COMMAND_UNITS,
    "voltage": {"V": (1.0, 0.0), "mV": (1e-3, 0.0)},
    "current": {"A": (1.0, 0.0), "mA": (1e-3, 0.0)},
    "thrust": {"N": (1.0, 0.0), "mN": (1e-3, 0.0), "g": (1e-3 * STANDARD_GRAVITY_M_S2, 0.0),
               "gf": (1e-3 * STANDARD_GRAVITY_M_S2, 0.0), "kgf": (STANDARD_GRAVITY_M_S2, 0.0),
               "lbf": (0.45359237 * STANDARD_GRAVITY_M_S2, 0.0)},
}
_COMMENT_KEYS = {"density": "density", "altitude": "altitude", "temperature": "temperature",
                 "pressure": "pressure", "humidity": "percent", "diameter": "length"}
# comment key -> estimator.vehicle.QUANTITIES name: the sensible bounds `liftcal air` applies
_COMMENT_BOUNDS = {"density": "density", "altitude": "altitude", "temperature": "temperature",
                   "pressure": "pressure", "humidity": "humidity", "diameter": "diameter"}
# an unknown comment key this close to a known one (difflib ratio) is taken for a typo [-]
TYPO_SIMILARITY = 0.75
# a comment value that reads as one number with an optional unit ("1.19", "35C", "300 m")
_QUANTITY_TEXT = re.compile(r"^\s*[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?\s*[A-Za-z%/^0-9]*\s*$")
# a bench bus outside these is almost surely a unit slip (mV labelled V, or V labelled mV);
# the top allows 40 lithium cells in series (4.35 V each, high-voltage cells) [V]
BUS_VOLTAGE_RANGE_V = (1.0, 200.0)
# idle current-sensor noise tolerated below zero: the larger of this and 1 % of the largest
# current [A] (common practice for hall-effect bench sensors, not a standard)
NEGATIVE_CURRENT_TOLERANCE_A = 0.25
# single rows beyond these are glitches, not data: a bus voltage off the sweep's median by
# more than a factor 2, a current above 1000 A, a thrust above 5000 N (far beyond any rotor
# of a small multirotor) [V, A, N]
MAX_CURRENT_A = 1000.0
MAX_THRUST_N = 5000.0
# share of rows allowed outside 0..1 before the command unit itself is suspect
COMMAND_OUTSIDE_SHARE = 0.05
# the medians of the range checks (bus voltage, current) are taken over a systematic subsample
# of at most about this many rows: they judge factors of 2 and 1000, far coarser than its
# sampling error [-]
MEDIAN_ROWS = 20000
# --diameter and '# diameter:' further apart than this are named (makers round sizes to 0.1 in,
# 1 % of a 10-inch propeller; the two ways of writing one size agree far closer) [-]
DIAMETER_AGREEMENT = 0.005


def _head_commas(path, skip):
    """Commas in the first ``skip`` lines of the file (comments and the header)."""
    with open(path, "rb") as fh:
        return sum(fh.readline().count(b",") for _ in range(skip))


EXAMPLE_HEADER = "command[-],voltage[V],current[A],thrust[N]"


def _read_head(path, warnings=None):
    """Return (comment dict, header cells, number of lines before the data).

    The comment dict maps each known key to (value in SI, where: 'FILE: line N: # key');
    values outside the sensible bounds `liftcal air` applies are refused (vehicle.
    check_quantity), an unknown key close to a known one is refused as a typo, and any
    other unknown key whose value reads as a quantity is named in ``warnings``.
    """
    from estimator.vehicle import check_quantity

    head = csvtable.read_head(path, "a bench CSV", EXAMPLE_HEADER)
    comments, unread = {}, []
    known = ", ".join(sorted(_COMMENT_KEYS))
    for key, (value, line_no) in head.comments.items():
        where = "%s: line %d: # %s" % (path, line_no, key)
        if key in _COMMENT_KEYS:
            si = parse_quantity(value, _COMMENT_KEYS[key], where)
            check_quantity(_COMMENT_BOUNDS[key], si, value, where)
            comments[key] = (si, where)
            continue
        typo = difflib.get_close_matches(key, list(_COMMENT_KEYS), n=1, cutoff=TYPO_SIMILARITY)
        if typo:
            raise InputError("%s: unknown comment key; did you mean '# %s'? (the keys a bench CSV's "
                             "comments may give: %s)" % (where, typo[0], known))
        if _QUANTITY_TEXT.match(value) and " " not in key:
            unread.append("'# %s' (line %d)" % (key, line_no))
    if unread and warnings is not None:
        warnings.append("%s: comment %s not read: the keys liftcal reads are %s"
                        % (path, ", ".join(unread), known))
    return comments, head, head.line


def _slow_parse(path, skip, ncols, wanted=None):
    """Line-by-line parse (estimator.csvtable) that names the first broken row; empty
    cells become NaN (rows dropped and counted later), NaN or infinity written in a cell
    is refused with its line. wanted: the column indices read as numbers (default all);
    the others (text, notes, a NaN in a column not used) are left NaN, as a flight log's."""
    import numpy as np

    wanted = list(range(ncols)) if wanted is None else list(wanted)
    cells = csvtable.read_head(path, "a bench CSV", EXAMPLE_HEADER).cells  # to name a column in errors
    head = csvtable.Head({}, cells if len(cells) == ncols else [""] * ncols, skip)
    columns = csvtable.read_columns(path, head, wanted, empty_ok=True, what="a bench CSV")
    rows = len(columns[0]) if columns else 0
    table = np.full((rows, ncols), np.nan)
    for index, column in zip(wanted, columns):
        table[:, index] = column
    return table


_LOADTXT = {"delimiter": ",", "comments": "#", "ndmin": 2, "dtype": float, "encoding": "utf-8"}


def _load_numbers(path, skip, ncols, wanted, to_si, kept=None):
    """(one contiguous array per column of ``wanted`` in SI, in that order (only the first
    ``kept`` when all are finite); the (min, max) of each if all are finite, else None; the
    file's SHA-256).

    to_si: (scale, offset) of each wanted column (UNITS). One numpy.loadtxt. When the file
    holds other columns too, it parses only ``wanted`` and the last column: a row short of a
    cell then lacks the last one and fails the read, so no row is narrower than the header,
    and the file's commas (counted while hashing) prove that none is wider either (a full
    read checks every row's width by itself). Each column is copied out once, in SI; its
    min and max (NaN or infinity makes one non-finite) decide finiteness and serve the row
    checks. On any trouble (a row of another width, text where a number belongs, NaN or
    infinity written in a cell) the slow parse, which names the broken row or turns empty
    cells into NaN.
    """
    import warnings

    import numpy as np
    from estimator.outputs import file_sha256, file_sha256_counting

    every = sorted(wanted) == list(range(ncols))  # one read hashes the file (and counts its commas)
    digest, commas = (file_sha256(path), None) if every else file_sha256_counting(path, ord(","))
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            read = None if every else list(wanted) + ([] if ncols - 1 in wanted else [ncols - 1])
            table = np.loadtxt(path, skiprows=skip, usecols=read, **_LOADTXT)
        if (table.shape[1] == (ncols if every else len(read))
                and (every or commas - _head_commas(path, skip) == table.shape[0] * (ncols - 1))):
            cols, extremes = _si_columns(table, wanted if every else range(len(wanted)), to_si, kept)
            del table
            if extremes is not None:
                return cols, extremes, digest
    except (ValueError, UserWarning, UnicodeDecodeError, OverflowError):
        pass
    cols, extremes = _si_columns(_slow_parse(path, skip, ncols, wanted), wanted, to_si)
    return cols, extremes, digest


def _si_columns(table, at, to_si, kept=None):
    """(the first ``kept`` (default all) of the table's columns ``at`` in SI, value * scale +
    offset, each a contiguous array; the (min, max) of every one of ``at``, or None when one
    is empty or holds a NaN or an infinity). One pass, BLOCK_ROWS rows at a time: while a
    block is in cache its columns are scaled and scanned (whole columns would read the
    table once per column and each column once per min and max); identical results."""
    import numpy as np
    from estimator.bench.row_sums import BLOCK_ROWS

    rows = table.shape[0]
    kept = len(at) if kept is None else kept
    out = [np.empty(rows) for _ in range(kept)]  # not one 2-D array: mapped afresh on every read
    scratch = np.empty(min(rows, BLOCK_ROWS))  # a block of a column only checked
    if not rows:
        return out, None
    starts = range(0, rows, BLOCK_ROWS)
    lows, highs = np.empty((len(starts), len(at))), np.empty((len(starts), len(at)))
    with np.errstate(invalid="ignore"):
        for b, start in enumerate(starts):
            part = table[start:start + BLOCK_ROWS]
            for j, (k, (scale, offset)) in enumerate(zip(at, to_si)):
                col = out[j][start:start + BLOCK_ROWS] if j < kept else scratch[:part.shape[0]]
                if scale != 1.0:
                    np.multiply(part[:, k], scale, out=col)
                else:
                    col[...] = part[:, k]
                if offset != 0.0:
                    col += offset
                lows[b, j], highs[b, j] = np.min(col), np.max(col)
        extremes = [(float(np.min(lo)), float(np.max(hi))) for lo, hi in zip(lows.T, highs.T)]
    return out, extremes if all(math.isfinite(x) for pair in extremes for x in pair) else None


def read_bench(path, diameter_m=None, density_kg_m3=None, altitude_m=None, temperature_C=None,
               pressure_Pa=None, humidity_pct=None):
    """Read a bench CSV into SI arrays and apply the row checks.

    Options override the file's comment header. Returns a dict: command, voltage_V,
    thrust_N, power_W (numpy arrays of the rows kept), voltage_span_V (their lowest and
    highest bus voltage [V]), rows_total, rows_rejected, rejected (reason -> count), bench_air
    {density_kg_m3, source}, diameter_m (or None), input_sha256, warnings (list of str),
    thrust_unit, command_unit, current_unit, columns {fitted, read_not_used: ["name[unit]"]}.
    Raises InputError on broken files and on units that are very likely mislabelled.
    """
    import numpy as np

    comment_warnings = []
    comments, head, header_line = _read_head(path, comment_warnings)
    columns, warnings = csvtable.parse_header(path, head, UNITS, OPTIONAL)  # name -> (index, unit)
    warnings = comment_warnings + list(warnings)
    ncols = len(head.cells)
    units = {name: columns[name][1] for name in REQUIRED}
    extra = [name for name in OPTIONAL if name in columns]  # read and checked, not used
    cols, extremes, digest = _load_numbers(
        path, header_line, ncols, [columns[name][0] for name in REQUIRED + tuple(extra)],
        [UNITS[name][units[name]] for name in REQUIRED] + [OPTIONAL[n][columns[n][1]] for n in extra],
        kept=len(REQUIRED))
    data = {name: col for name, col in zip(REQUIRED, cols)}
    data["optional"] = cols[len(REQUIRED):]  # none when every value is finite: nothing to drop
    extremes = extremes[:len(REQUIRED)] if extremes is not None else None
    data.update({name + "_unit": units[name] for name in REQUIRED})
    del cols
    rows_total = data["command"].shape[0]
    if rows_total < 10:
        raise InputError("%s: only %d data rows; a sweep needs at least 10 (the fit has 9 motor and "
                         "propeller parameters): log two readings at each step, or more steps from idle "
                         "to full command" % (path, rows_total))

    u, v, i, t = data["command"], data["voltage"], data["current"], data["thrust"]
    # one min and max per column decide the common case: every value finite and inside
    # every row check, so no row is dropped and no mask is needed
    clean = extremes is not None
    extremes = [x for pair in extremes for x in pair] if clean else None  # u, v, i, t: (min, max)
    v_med = float(np.median(v[:: max(1, v.size // MEDIAN_ROWS)])) if clean else None
    _check_units(path, data, v_med, extremes if clean else None)
    if clean:
        u_lo, u_hi, v_lo, v_hi, i_lo, i_hi, t_lo, t_hi = extremes
        tol_i = max(NEGATIVE_CURRENT_TOLERANCE_A, 0.01 * max(abs(i_lo), abs(i_hi)))
        clean = (u_lo >= 0.0 and u_hi <= 1.0 and v_lo > 0.0 and v_hi <= 2.0 * v_med
                 and v_lo >= 0.5 * v_med and i_lo >= -tol_i and i_hi <= MAX_CURRENT_A
                 and max(abs(t_lo), abs(t_hi)) <= MAX_THRUST_N)
    if clean:
        rejected, n_keep = {}, rows_total
        power = v * i  # electrical (bus) power [W]; the current column itself is not kept
        v_span = (v_lo, v_hi)
        del i, data
    else:
        u, v, t, power, rejected, n_keep = _row_checks(path, data, rows_total)
        v_span = (float(np.min(v)), float(np.max(v)))
        del data

    air = bench_air(path, comments, density_kg_m3, altitude_m, temperature_C, pressure_Pa,
                     humidity_pct, warnings)
    if diameter_m is None and "diameter" in comments:
        diameter_m = comments["diameter"][0]
    elif diameter_m is not None and "diameter" in comments and \
            abs(diameter_m / comments["diameter"][0] - 1.0) > DIAMETER_AGREEMENT:
        warnings.append("--diameter %.4g m is used, not the %.4g m of %s (k scales as D^-2/3): check which "
                        "propeller was on the stand" % (diameter_m, comments["diameter"][0], comments["diameter"][1]))
    if diameter_m is not None and not (0.01 <= diameter_m <= 3.0):
        raise InputError("%s: propeller diameter %.4g m is outside 0.01..3 m; give it as e.g. "
                         "'# diameter: 10in' or '--diameter 0.254'" % (path, diameter_m))
    return {
        "command": u, "voltage_V": v, "thrust_N": t, "power_W": power, "voltage_span_V": v_span,
        "thrust_unit": units["thrust"], "command_unit": units["command"], "current_unit": units["current"],
        "columns": {"fitted": ["%s[%s]" % (n, columns[n][1]) for n in REQUIRED],
                    "read_not_used": ["%s[%s]" % (n, columns[n][1]) for n in extra]},
        "rows_total": rows_total, "rows_rejected": rows_total - n_keep,
        "rejected": {k: c for k, c in rejected.items() if c},
        "bench_air": air, "diameter_m": diameter_m,
        "input_sha256": digest,
        "warnings": warnings,
    }


def _row_checks(path, data, rows_total):
    """Drop and count the merely bad rows (module docstring); returns u, v, t, power,
    rejected counts and the number of rows kept."""
    import numpy as np

    u, v, i, t = data["command"], data["voltage"], data["current"], data["thrust"]
    rejected = {}
    finite = np.isfinite(u) & np.isfinite(v) & np.isfinite(i) & np.isfinite(t)
    for column in data.get("optional", ()):  # an empty optional cell: the row goes, counted
        finite &= np.isfinite(column)
    rejected["not_a_number"] = int(rows_total - np.count_nonzero(finite))
    with np.errstate(invalid="ignore"):
        # current sensors read a little below zero at idle; only clearly negative rows are bad
        tol_i = max(NEGATIVE_CURRENT_TOLERANCE_A, 0.01 * float(np.nanmax(np.abs(i[finite])))
                    if np.any(finite) else 0.0)
        neg_i = finite & (i < -tol_i)
        bad_v = finite & (v <= 0.0)
        out_u = finite & ((u < 0.0) | (u > 1.0))
        step = max(1, rows_total // MEDIAN_ROWS)
        v_fin = v[::step][finite[::step]]
        v_med = float(np.median(v_fin)) if v_fin.size else float(np.median(v[finite]))
        odd_v = finite & ~bad_v & ((v > 2.0 * v_med) | (v < 0.5 * v_med))
        odd_i = finite & (i > MAX_CURRENT_A)
        odd_t = finite & (np.abs(t) > MAX_THRUST_N)
    from estimator.bench.sensor_checks import check_current_sign

    check_current_sign(path, int(np.count_nonzero(neg_i)), int(np.count_nonzero(finite)), i[finite])
    rejected["negative_current"] = int(np.count_nonzero(neg_i))
    rejected["voltage_not_positive"] = int(np.count_nonzero(bad_v))
    rejected["command_outside_0_1"] = int(np.count_nonzero(out_u))
    rejected["voltage_out_of_range"] = int(np.count_nonzero(odd_v))
    rejected["current_out_of_range"] = int(np.count_nonzero(odd_i))
    rejected["thrust_out_of_range"] = int(np.count_nonzero(odd_t))
    keep = finite & ~neg_i & ~bad_v & ~out_u & ~odd_v & ~odd_i & ~odd_t
    n_keep = int(np.count_nonzero(keep))
    if n_keep < 10:
        raise InputError("%s: only %d of %d rows are usable (NaN, negative current, command "
                         "outside 0..1, values out of range); a sweep needs at least 10"
                         % (path, n_keep, rows_total))
    with np.errstate(over="ignore", invalid="ignore"):
        power = v * i  # electrical (bus) power [W]; the current column itself is not kept
    if n_keep < rows_total:
        u, v, t, power = u[keep], v[keep], t[keep], power[keep]
    return u, v, t, power, {k: c for k, c in rejected.items() if c}, n_keep


def _check_units(path, data, v_med=None, extremes=None):
    """Refuse columns whose values do not fit their unit label.

    v_med, extremes: the subsample median of the voltage [V] and the (min, max) of command,
    voltage, current and thrust when every value is finite (read_bench's clean case); they
    spare passes over the columns and give the same answers.
    """
    import numpy as np

    from estimator.bench.sensor_checks import check_voltage_current_swapped

    check_voltage_current_swapped(path, data["command"], data["voltage"], data["current"])
    with np.errstate(invalid="ignore"):
        if v_med is None:
            v = data["voltage"]
            v = v[:: max(1, v.size // MEDIAN_ROWS)]
            v_med = float(np.nanmedian(v)) if np.any(np.isfinite(v)) else float("nan")
        if not np.isfinite(v_med):
            raise InputError("%s: column voltage holds no numbers" % path)
        if v_med > BUS_VOLTAGE_RANGE_V[1]:
            raise InputError("%s: voltage median %.4g V is above %g V for a small multirotor "
                             "bus; is the column in mV but labelled [V]?"
                             % (path, v_med, BUS_VOLTAGE_RANGE_V[1]))
        if v_med < BUS_VOLTAGE_RANGE_V[0]:
            raise InputError("%s: voltage median %.4g V is below %g V; is the column in V but "
                             "labelled [mV], or is the supply off?" % (path, v_med, BUS_VOLTAGE_RANGE_V[0]))
        u = data["command"]
        if extremes is not None:
            finite_u = u
            u_max = extremes[1]
            if extremes[0] >= -0.01 and u_max <= 1.01:
                outside = 0
            else:
                outside = np.count_nonzero((u < -0.01) | (u > 1.01))
        else:
            finite_u = u[np.isfinite(u)]
            if finite_u.size == 0:
                raise InputError("%s: column command holds no numbers" % path)
            outside = np.count_nonzero((finite_u < -0.01) | (finite_u > 1.01))
            u_max = float(np.max(finite_u))
        if outside > COMMAND_OUTSIDE_SHARE * finite_u.size:
            hint = {"-": "is it command[%] (0..100) or command[us] (1000..2000)?",
                    "%": "is it command[us] (1000..2000) or command[-] (0..1)?",
                    "permille": "is it command[us] (1000..2000)?",
                    "us": "is it command[%] or command[-]?"}[data["command_unit"]]
            raise InputError("%s: %d of %d command values fall outside 0..1 after converting "
                             "from [%s]; %s" % (path, outside, finite_u.size,
                                                data["command_unit"], hint))
        if data["command_unit"] in ("%", "permille") and u_max <= 1.01 * UNITS["command"][data["command_unit"]][0]:
            raise InputError("%s: command[%s] never exceeds 1 %s; is it command[-] (0..1)?"
                             % (path, data["command_unit"], data["command_unit"]))
        from estimator.bench.sensor_checks import check_permille_as_percent

        check_permille_as_percent(path, data["command_unit"], u_max)
        # the median can only exceed the limit when the largest value does (the clean case
        # knows it already: no pass over the column then)
        i_big = data["current_unit"] == "A" and (extremes is None or extremes[5] > MAX_CURRENT_A)
        i = data["current"][:: max(1, data["current"].size // MEDIAN_ROWS)] if i_big else None
        i_med = float(np.nanmedian(i)) if i_big and np.any(np.isfinite(i)) else float("nan")
        if i_med > MAX_CURRENT_A:
            raise InputError("%s: current median %.4g A is above %g A for one rotor's supply; is the "
                             "column in mA but labelled [A]? label it current[mA]"
                             % (path, i_med, MAX_CURRENT_A))


def read_bench_text(text, name="<text>", **options):
    """Parse CSV text (e.g. from the simulator) by writing it to a temporary file first."""
    import os
    import tempfile

    fd, tmp = tempfile.mkstemp(suffix=".csv")
    try:
        with io.open(fd, "w", encoding="utf-8") as fh:
            fh.write(text)
        out = read_bench(tmp, **options)
    finally:
        os.unlink(tmp)
    return out
