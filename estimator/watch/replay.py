"""Desktop replay: run a logged flight through the same integer watch kernel as the board.

Flight CSV (design notes sec. 4): header ``time[s]`` (or ``time[ms]``), ``command[-]`` (also ``command[%]``,
``command[permille]`` or ``command[us]`` 1000..2000), ``voltage[V]`` (or ``[mV]``), ``current[A]`` (or ``[mA]``); more
columns are ignored; lines starting with ``#`` are comments. Each row becomes one
``Watch.update(dt_ms, command_permille, bus_mV, bus_mA)`` call with the values rounded to
integers; the first row's dt is the median sample period. Out-of-range values are passed to
the kernel, which flags them (sensor_fault) - a log with a glitch is still a log. Event times
are seconds from the log's first row (a logger's clock may count from 1970).
"""

import sys

from estimator.core.watch_layout import FLAG_BITS
from estimator.csvtable import COMMAND_UNITS
from estimator.errors import InputError
from estimator.watch.config import make_config, new_watch
from estimator.watch.log_checks import check_plausible, check_time, flying_ms

KINDS = FLAG_BITS
ALARM_BITS = 1 | 2 | 8 | 16
PROGRESS_ROWS = 100000  # logs longer than this get a progress bar (stderr, terminals only)

# unit -> (scale, offset): permille = (value + offset) * scale, from the one command unit
# table (estimator.csvtable.COMMAND_UNITS: command [-] = value * s + o); exact in floats
_COMMAND_UNITS = {unit: (1000.0 * s, o / s) for unit, (s, o) in COMMAND_UNITS.items()}
_VOLT_UNITS = {"V": 1000.0, "mV": 1.0}
_AMP_UNITS = {"A": 1000.0, "mA": 1.0}


EXAMPLE_HEADER = "time[s],command[-],voltage[V],current[A]"
_TIME_UNITS = {"s": 1.0, "ms": 0.001}
COLUMNS = {"time": {"s": (1.0, 0.0), "ms": (0.001, 0.0)}, "command": _COMMAND_UNITS, "voltage": _VOLT_UNITS,
           "current": _AMP_UNITS}


def _bench_sweep_given(names):
    """csvtable's refuse hook: a thrust column means a bench sweep, not a flight log."""
    if "thrust" in names:
        return ("this file has a thrust column, so it looks like a bench sweep, not a flight log; "
                "fit it with 'liftcal fit', replay flight logs (%s)" % EXAMPLE_HEADER)
    return None


def read_flight(path):
    """Read a flight CSV; returns dict time_s, command_permille, bus_mV, bus_mA (lists), units
    (column -> unit as written) and header_line (the header's line number).

    The header and rows are read by estimator.csvtable (the bench CSV's reader): extra
    columns are allowed, every row has the header's width, no empty cell, no NaN or infinity.
    """
    from estimator import csvtable

    table = csvtable.read_table(path, "a flight CSV", EXAMPLE_HEADER, COLUMNS,
                                refuse=_bench_sweep_given)
    if not table.rows:
        raise InputError("%s: no data rows after the header (line %d)" % (path, table.head.line))
    cs, co = _COMMAND_UNITS[table.columns["command"][1]]
    vs = _VOLT_UNITS[table.columns["voltage"][1]]
    as_ = _AMP_UNITS[table.columns["current"][1]]
    values = table.values
    ts = _TIME_UNITS[table.columns["time"][1]]
    return {"time_s": [x * ts for x in values["time"]] if ts != 1.0 else values["time"],
            "command_permille": [int(round((x + co) * cs)) for x in values["command"]],
            "bus_mV": [int(round(x * vs)) for x in values["voltage"]],
            "bus_mA": [int(round(x * as_)) for x in values["current"]],
            "units": {name: table.columns[name][1] for name in COLUMNS}, "header_line": table.head.line}


def run_kernel(flight, config, keep_arrays=False, progress=None):
    """Feed a flight (dict from read_flight) through Watch(config); returns the replay dict."""
    t = flight["time_s"]
    u, mv, ma = flight["command_permille"], flight["bus_mV"], flight["bus_mA"]
    n = len(t)
    gaps = sorted(t[i + 1] - t[i] for i in range(0, min(n - 1, 2000)))
    first_ms = int(round(1000.0 * gaps[len(gaps) // 2])) if gaps else 100
    w = new_watch(config)
    update = w.update
    events = []
    learned = False
    prev = 0
    t_prev = None
    t0 = t[0] if n else 0.0
    plan_kg = config["mass_plan_g"] / 1000.0
    limit_kg = plan_kg * (1000 + config["mass_limit_permille"]) / 1000.0
    learn_span = [None, None]      # flight time of the learning window: first spin-up .. learned
    arrays = {"time_s": [x - t0 for x in t], "power_W": [], "expected_W": [], "flags": [], "residual": [],
              "learn_span": learn_span} if keep_arrays else None
    step = max(1, n // 50)
    for i in range(n):
        ti = t[i]
        dt = first_ms if t_prev is None else int(round((ti - t_prev) * 1000.0))
        t_prev = ti
        flags = update(dt, u[i], mv[i], ma[i])
        if learn_span[0] is None and u[i] >= config["spin_permille"]:
            learn_span[0] = ti - t0
        if not learned and w.sigma_permille:
            learned = True
            learn_span[1] = ti - t0
        if flags != prev:
            new = flags & ~prev
            if new:
                for bit, kind in KINDS:
                    if new & bit:
                        e = {"t_s": round(ti - t0, 3), "kind": kind, "residual": w.residual_permille / 1000.0}
                        if bit == 16:    # the implied mass against the plan and the alarm limit
                            e.update(mass_kg=w.mass_g / 1000.0, planned_kg=plan_kg, limit_kg=round(limit_kg, 4))
                        events.append(e)
            prev = flags
        if keep_arrays:
            arrays["power_W"].append(mv[i] * max(ma[i], 0) / 1e6)
            arrays["expected_W"].append((w.st[2] >> 2) * w.scale / 10000.0)   # the kernel's lagged expected power
            arrays["flags"].append(flags)
            arrays["residual"].append(w.residual_permille / 1000.0)
        if progress is not None and i % step == 0:
            progress(i, n)
    if progress is not None:
        progress(n, n)
    out = {"learned": learned, "learned_at_s": None if learn_span[1] is None else round(learn_span[1], 3),
           "samples": n, "alarms": sum(1 for e in events if e["kind"] != "sensor_fault"), "events": events}
    if keep_arrays:
        out["_arrays"] = arrays
    return out


def _bar(i, n):
    width = 40
    done = int(width * i / max(n, 1))
    sys.stderr.write("\rreplay [%s%s] %3d%%" % ("#" * done, "." * (width - done), 100 * i // max(n, 1)))
    if i >= n:
        sys.stderr.write("\n")
    sys.stderr.flush()


def replay_file(path, params, vehicle=None, keep_arrays=False, options=None, progress=None, drop_bad_time=False):
    """Replay a flight CSV through the watch configured from ``params`` (+ ``vehicle``).

    Returns dict samples, alarms (events other than sensor_fault), events
    [{t_s, kind, residual}] (kinds power_high, power_low, sensor_fault, baseline_off,
    mass_high; t_s [s] from the log's first row; residual [-] = residual_permille / 1000 at the
    event; a mass_high event also has mass_kg, the implied all-up mass, planned_kg and
    limit_kg, the mass above which the alarm may fire once the estimate's margin is passed),
    learned_at_s (end of the learning window, None when it never ended). A progress bar goes
    to stderr on logs above PROGRESS_ROWS rows when stderr is a terminal (progress=None),
    always (True) or never (False). Raises InputError on a bad file: time that goes back or
    repeats (unless ``drop_bad_time``: those rows are dropped and counted in ``dropped_rows``),
    values implausible for the parameter set (the likely unit slip is named). A log with too
    little flight to learn the baseline gets ``learned`` False and a ``note``.
    """
    config, _ = make_config(params, vehicle, options)
    flight = read_flight(path)
    dropped = check_time(path, flight, go_on=drop_bad_time)
    check_plausible(path, flight, flight["units"], config)
    if progress is None:
        progress = len(flight["time_s"]) > PROGRESS_ROWS and sys.stderr.isatty()
    out = run_kernel(flight, config, keep_arrays=keep_arrays, progress=_bar if progress else None)
    if not out["learned"]:
        need_ms = config["takeoff_ms"] + config["learn_ms"]
        flown = flying_ms(flight, config)
        out["note"] = ("too short to learn: %.1f s of flight above the spin command; the watch needs about "
                       "%.0f s (take-off, then %.0f s of steady flight) to learn the power baseline - no verdict "
                       "on this log" % (flown / 1000.0, need_ms / 1000.0, config["learn_ms"] / 1000.0))
    if dropped:
        out["dropped_rows"] = dropped
    return out

