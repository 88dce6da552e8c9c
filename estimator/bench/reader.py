"""Reading a bench sweep CSV (design notes sec. 4) into SI numpy arrays, with row checks.

File layout: lines starting with ``#`` are comments (``# density: 1.19``, ``# altitude: 300m``,
``# temperature: 21C`` (these two with their unit, as the options need), ``# pressure: 97000``, ``# humidity: 40``, ``# diameter: 10in``);
then one header row of ``name[unit]`` cells; then comma-separated numbers. Required columns:
``command[-|%|permille|us]``, ``voltage[V|mV]``, ``current[A|mA]``, ``thrust[N|g|gf|kgf|lbf|mN]``.
Optional columns (OPTIONAL: ``time[s]``, ``rpm[rpm]``, ``torque[N*m]``, ``temperature[C]``)
are read and checked like the others (text refused with its line and column, an empty cell
drops the row, counted), but the fit does not use them (read_bench's ``columns`` and the
fit's summary say so); unknown columns are read past with a warning.

Rows that are merely bad (a NaN or empty cell, a negative current, a command outside 0..1)
are dropped and counted (estimator.bench.row_checks). Files that are broken (no header, a row
with the wrong number of cells, text where a number belongs) are refused with the row number
(estimator.bench.csv_numbers reads the numbers). Units that are very likely mislabelled
(voltage in mV labelled V, command in % labelled [-]) are refused (estimator.bench.
sensor_checks.check_units). The columns, their units and the value limits: estimator.bench.columns.
"""

import difflib
import io
import re

from estimator.errors import InputError
from estimator import csvtable
from estimator.bench.bench_air import bench_air
from estimator.bench.columns import EXAMPLE_HEADER, MEDIAN_ROWS, OPTIONAL, REQUIRED, UNITS
from estimator.core.constants import CELSIUS_ZERO_K
from estimator.units import parse_quantity
from estimator.unit_required import refuse_bare_comment

_COMMENT_KEYS = {"density": "density", "altitude": "altitude", "temperature": "temperature",
                 "pressure": "pressure", "humidity": "percent", "diameter": "length"}
# comment key -> estimator.vehicle.QUANTITIES name: the sensible bounds `liftcal air` applies
_COMMENT_BOUNDS = {"density": "density", "altitude": "altitude", "temperature": "temperature",
                   "pressure": "pressure", "humidity": "humidity", "diameter": "diameter"}
# an unknown comment key this close to a known one (difflib ratio) is taken for a typo [-]
TYPO_SIMILARITY = 0.75
# a comment value that reads as one number with an optional unit ("1.19", "35C", "300 m")
_QUANTITY_TEXT = re.compile(r"^\s*[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?\s*[A-Za-z%/^0-9]*\s*$")
# --diameter and '# diameter:' further apart than this are named (makers round sizes to 0.1 in,
# 1 % of a 10-inch propeller; the two ways of writing one size agree far closer) [-]
DIAMETER_AGREEMENT = 0.005


def _read_head(path, warnings=None, expected_diameter_m=None):
    """Return (comment dict, header cells, number of lines before the data).

    The comment dict maps each known key to (value in SI, where: 'FILE: line N: # key');
    values outside the sensible bounds `liftcal air` applies are refused (vehicle.
    check_quantity; a bare diameter's unit hint is the one nearest expected_diameter_m [m], the
    vehicle's, when given: new-user trial 11, finding 5), an unknown key close to a known one is
    refused as a typo, and any other unknown key whose value reads as a quantity is named in
    ``warnings``.
    """
    from estimator.vehicle import check_quantity

    head = csvtable.read_head(path, "a bench CSV", EXAMPLE_HEADER)
    comments, unread = {}, []
    known = ", ".join(sorted(_COMMENT_KEYS))
    for key, (value, line_no) in head.comments.items():
        where = "%s: line %d: # %s" % (path, line_no, key)
        if key in _COMMENT_KEYS:
            refuse_bare_comment(key, value, where)
            si = parse_quantity(value, _COMMENT_KEYS[key], where)
            check_quantity(_COMMENT_BOUNDS[key], si, value, where, expected_diameter_m if key == "diameter" else None)
            _one_value(path, key, si, value, line_no, head.earlier.get(key, ()))
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


def _one_value(path, key, si, value, line_no, earlier):
    """Refuse a bench comment key given again with another value (new-user trial 15, finding 5:
    '# diameter: 8m' above the sweep's own '# diameter: 8in' was read as the later one without a
    word). earlier: [(value text, line number)] before the last, value/si/line_no: the last."""
    for text, line in earlier:
        other = parse_quantity(text, _COMMENT_KEYS[key], "%s: line %d: # %s" % (path, line, key))
        if abs(other - si) > 1e-9 * max(abs(si), abs(other)):
            raise InputError("%s: lines %d and %d: '# %s' is given twice, as %s and as %s; keep the one that "
                             "describes this sweep and delete the other" % (path, line, line_no, key, text, value))


def _hot_motor(columns, extra, cols, extremes):
    """The hot-motor caution (estimator.cautions.HOT_MOTOR) when the sweep's temperature column
    (a thermocouple on the motor) reads above cautions.HOT_MOTOR_C, else None. columns: the
    header's {name: (index, unit)}; extra: the optional columns read, in order after REQUIRED;
    cols, extremes: load_numbers' arrays [C for temperature] and (min, max) pairs (or None)."""
    import numpy as np

    from estimator.cautions import HOT_MOTOR, HOT_MOTOR_C

    if "temperature" not in extra:
        return None
    k = len(REQUIRED) + extra.index("temperature")
    if extremes is not None:
        top = float(extremes[k][1])
    else:  # a missing reading somewhere: its row is dropped, the rest still count
        values = np.asarray(cols[k], dtype=float)
        values = values[np.isfinite(values)]
        top = float(np.max(values)) if values.size else float("nan")
    if not top > HOT_MOTOR_C:
        return None
    return HOT_MOTOR % ("temperature[%s]" % columns["temperature"][1], top, HOT_MOTOR_C)


# a temperature column labelled C whose every reading is above this is in kelvin: room
# temperature is about 293 K, and no motor sweeps with its coldest reading at 200 C (common
# practice: ordinary motors are rated to about 80..180 C) [C]
KELVIN_LOOKING_C = 200.0
# ... and a temperature column labelled K whose every reading is below this is in Celsius: the
# coldest air recorded on Earth is about -89 C, 184 K (WMO record, from memory), and a motor that
# turns warms above its air; Celsius readings of a sweep (about 0..150) all fall below it [K]
CELSIUS_LOOKING_K = 184.0


def _kelvin_as_celsius(path, columns, extra, cols, extremes):
    """Refuse a temperature[C] column whose lowest reading is above KELVIN_LOOKING_C: the
    readings are kelvin labelled C (the rotor at rest reads room temperature, about 293 K), and
    the hot-motor caution would be false; and the mirror slip, a temperature[K] column whose
    highest reading is below CELSIUS_LOOKING_K: Celsius labelled K (new-user trial 11, finding 3:
    85..126 'K' passed and the hot-motor caution was lost). cols, extremes: load_numbers' arrays
    [C] and (min, max) pairs (or None: then cols holds every column)."""
    import numpy as np

    if "temperature" not in extra or columns["temperature"][1] not in ("C", "K"):
        return
    k = len(REQUIRED) + extra.index("temperature")
    if extremes is not None:
        lowest, highest = (float(x) for x in extremes[k])
    else:  # a missing reading somewhere: the rest still count
        values = np.asarray(cols[k], dtype=float)
        values = values[np.isfinite(values)]
        if not values.size:
            return
        lowest, highest = float(np.min(values)), float(np.max(values))
    if columns["temperature"][1] == "K":
        if highest + CELSIUS_ZERO_K < CELSIUS_LOOKING_K:
            raise InputError("%s: column %d 'temperature[K]': even its highest reading, %.1f K (%.1f C; lowest "
                             "%.1f K), is below %.0f K, colder than any air on Earth, where a motor on the stand "
                             "warms above its air: Celsius labelled K? (room temperature is about 20 C, 293 K) "
                             "label the column temperature[C]"
                             % (path, columns["temperature"][0] + 1, highest + CELSIUS_ZERO_K, highest,
                                lowest + CELSIUS_ZERO_K, CELSIUS_LOOKING_K))
        return
    if not lowest > KELVIN_LOOKING_C:
        return
    raise InputError("%s: column %d 'temperature[C]': even its lowest reading, %.1f C (highest %.1f C), "
                     "is above %.0f C, where the rotor stands at room temperature: kelvin labelled C? "
                     "(room temperature is about 293 K) label the column temperature[K]"
                     % (path, columns["temperature"][0] + 1, lowest, highest, KELVIN_LOOKING_C))


def _time_back(path, header_line, time_s, unit):
    """A warning (str) naming the first row where the bench's time column goes back, in the
    flight-log reader's words (estimator.watch.log_checks.check_time), else None. The fit does
    not use time, so a sweep whose time runs backwards is fitted, but rows sorted or merged
    out of order may not be the sweep that was run. time_s: the column in SI [s]; unit: as
    written (s or ms)."""
    import numpy as np

    from estimator.csvtable import TIME_UNITS, data_line_numbers

    t = np.asarray(time_s, dtype=float)
    with np.errstate(invalid="ignore"):
        back = t[1:] < t[:-1]  # a missing reading (NaN) compares False: never counted
    n = int(np.count_nonzero(back))
    if not n:
        return None
    i = int(np.argmax(back)) + 1
    scale = TIME_UNITS[unit][0]
    line = data_line_numbers(path, header_line)[i]
    return ("%s: line %s: time %.6g %s goes back (after %.6g %s); %d row%s where time falls - rows "
            "sorted, merged or logged by a restarted clock? The fit does not use time, so it goes on; "
            "check that the rows are the sweep that was run"
            % (path, line, t[i] / scale, unit, t[i - 1] / scale, unit, n, "" if n == 1 else "s"))


def read_bench(path, diameter_m=None, density_kg_m3=None, altitude_m=None, temperature_C=None,
               pressure_Pa=None, humidity_pct=None, expected_diameter_m=None):
    """Read a bench CSV into SI arrays and apply the row checks.

    Options override the file's comment header; expected_diameter_m [m] (the vehicle's
    propeller) picks the unit hint of a bare '# diameter:' outside the bounds. Returns a dict: command, voltage_V,
    thrust_N, power_W (numpy arrays of the rows kept), voltage_span_V (their lowest and
    highest bus voltage [V]), rows_total, rows_rejected, rejected (reason -> count), bench_air
    {density_kg_m3, source}, diameter_m (or None), input_sha256, warnings (list of str),
    thrust_unit, command_unit, current_unit, columns {fitted, read_not_used: ["name[unit]"]}.
    Raises InputError on broken files and on units that are very likely mislabelled.
    """
    import numpy as np

    from estimator.bench.csv_numbers import load_numbers
    from estimator.bench.row_checks import dropped_share_warning, keep_rows
    from estimator.bench.sensor_checks import check_units

    comment_warnings = []
    comments, head, header_line = _read_head(path, comment_warnings, expected_diameter_m)
    columns, warnings = csvtable.parse_header(path, head, UNITS, OPTIONAL)  # name -> (index, unit)
    warnings = comment_warnings + list(warnings)
    ncols = len(head.cells)
    units = {name: columns[name][1] for name in REQUIRED}
    extra = [name for name in OPTIONAL if name in columns]  # read and checked, not used
    cols, extremes, digest = load_numbers(
        path, header_line, ncols, [columns[name][0] for name in REQUIRED + tuple(extra)],
        [UNITS[name][units[name]] for name in REQUIRED] + [OPTIONAL[n][columns[n][1]] for n in extra],
        kept=len(REQUIRED) + (1 if "time" in extra else 0))  # time is OPTIONAL's first
    data = {name: col for name, col in zip(REQUIRED, cols)}
    data["optional"] = cols[len(REQUIRED):]  # none when every value is finite: nothing to drop
    _kelvin_as_celsius(path, columns, extra, cols, extremes)
    hot = _hot_motor(columns, extra, cols, extremes)
    if hot:
        warnings.append(hot)
    if "time" in extra:
        back = _time_back(path, header_line, cols[len(REQUIRED)], columns["time"][1])
        if back:
            warnings.append(back)
    extremes = extremes[:len(REQUIRED)] if extremes is not None else None
    data.update({name + "_unit": units[name] for name in REQUIRED})
    del cols
    rows_total = data["command"].shape[0]
    if rows_total < 10:
        raise InputError("%s: only %d data row%s; a sweep needs at least 10 (the fit has 9 motor and "
                         "propeller parameters): log two readings at each step, or more steps from idle "
                         "to full command" % (path, rows_total, "" if rows_total == 1 else "s"))

    # one min and max per column decide the common case: every value finite and inside
    # every row check, so no row is dropped and no mask is needed (row_checks.keep_rows)
    clean = extremes is not None
    extremes = [x for pair in extremes for x in pair] if clean else None  # u, v, i, t: (min, max)
    v = data["voltage"]
    v_med = float(np.median(v[:: max(1, v.size // MEDIAN_ROWS)])) if clean else None
    check_units(path, data, v_med, extremes)
    u, v, t, power, v_span, rejected, n_keep = keep_rows(path, data, rows_total, extremes, v_med)
    del data
    warnings += [w for w in (dropped_share_warning(rows_total, n_keep, rejected),) if w]

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
