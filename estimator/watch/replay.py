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

from estimator.core.watch_layout import FLAG_BITS, OUTPUT_AT
from estimator.csvtable import COMMAND_UNITS, TIME_UNITS, data_line_numbers
from estimator.errors import InputError
from estimator.units import unit_factors
from estimator.watch.model_hedge import POWER_KINDS, exponent_not_measured, exponent_note  # noqa: F401 (API)
from estimator.watch.config import make_config, new_watch, vehicle_facts
from estimator.watch.fault_causes import StuckTimer, fault_cause, in_range
from estimator.watch.log_checks import check_plausible, check_time, check_vehicle, slow_log_warning
from estimator.watch.log_current import ground_current_note
from estimator.watch.mass_verdict import mass_margin, mass_verdict, mass_words  # noqa: F401 (API)

KINDS = FLAG_BITS
_SIGMA_AT = dict(OUTPUT_AT)["sigma_permille"]   # 0 while this flight's learning window runs
PROGRESS_ROWS = 100000  # logs longer than this get a progress bar (stderr, terminals only)
# a flight log with more rows than this share holding an empty or 'nan' cell is refused; fewer
# are dropped and counted (a logger that misses a field now and then) [-]
MISSING_SHARE = 0.05

# unit -> (scale, offset): permille = (value + offset) * scale, from the one command unit
# table (estimator.csvtable.COMMAND_UNITS: command [-] = value * s + o); exact in floats
_COMMAND_UNITS = {unit: (1000.0 * s, o / s) for unit, (s, o) in COMMAND_UNITS.items()}
# unit -> factor to mV, mA and s, from the one unit tables (estimator.units, csvtable.TIME_UNITS)
_VOLT_UNITS = {u: 1000.0 * s for u, (s, _) in unit_factors("voltage", ("V", "mV")).items()}
_AMP_UNITS = {u: 1000.0 * s for u, (s, _) in unit_factors("current", ("A", "mA")).items()}
_TIME_UNITS = {u: s for u, (s, _) in TIME_UNITS.items()}


EXAMPLE_HEADER = "time[s],command[-],voltage[V],current[A]"
COLUMNS = {"time": TIME_UNITS, "command": _COMMAND_UNITS, "voltage": _VOLT_UNITS,
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
    columns are allowed, every row has the header's width, no infinity; a row with an empty or
    'nan' cell is dropped and counted in missing_rows (_drop_missing).
    """
    from estimator import csvtable

    table = csvtable.read_table(path, "a flight CSV", EXAMPLE_HEADER, COLUMNS,
                                refuse=_bench_sweep_given, missing_ok=True)
    if not table.rows:
        raise InputError("%s: no data rows after the header (line %d)" % (path, table.head.line))
    kept = _drop_missing(path, table)
    cs, co = _COMMAND_UNITS[table.columns["command"][1]]
    vs = _VOLT_UNITS[table.columns["voltage"][1]]
    as_ = _AMP_UNITS[table.columns["current"][1]]
    values = table.values
    ts = _TIME_UNITS[table.columns["time"][1]]
    return {"time_s": [x * ts for x in values["time"]] if ts != 1.0 else values["time"],
            "command_permille": [int(round((x + co) * cs)) for x in values["command"]],
            "command_written": (min(values["command"]), max(values["command"])),   # log_command's hints
            "bus_mV": [int(round(x * vs)) for x in values["voltage"]],
            "bus_mA": [int(round(x * as_)) for x in values["current"]],
            "units": {name: table.columns[name][1] for name in COLUMNS}, "header_line": table.head.line,
            "missing_rows": 0 if kept is None else table.rows - len(kept), "row_index": kept}


def _drop_missing(path, table):
    """Drop the rows with an empty or 'nan' cell (a dropped telemetry field, read as NaN by
    csvtable) from table.values in place, as the bench reader does (new-user trial 8, finding 6);
    the kernel then sees a longer dt across them, which its gap check judges. Returns the kept
    rows' indices among the data rows, or None when none was dropped; raises InputError when
    more than MISSING_SHARE of the rows have one (a log that broken is not judged). Infinity is
    refused by csvtable before this."""
    cols = [table.values[name] for name in COLUMNS]
    kept = [i for i in range(table.rows) if all(c[i] == c[i] for c in cols)]
    dropped = table.rows - len(kept)
    if not dropped:
        return None
    if dropped > MISSING_SHARE * table.rows:
        first = next(i for i in range(table.rows) if any(c[i] != c[i] for c in cols))
        names = [table.head.cells[table.columns[n][0]] for n in COLUMNS
                 if any(x != x for x in table.values[n])]
        raise InputError("%s: line %d: %d of %d data rows have an empty or 'nan' cell (in %s): more than "
                         "%.0f %% of the log is missing, too much to judge; check the logger's fields"
                         % (path, data_line_numbers(path, table.head.line)[first], dropped, table.rows,
                            ", ".join(names), 100.0 * MISSING_SHARE))
    for name in COLUMNS:
        values = table.values[name]
        table.values[name] = [values[i] for i in kept]
    return kept


def run_kernel(flight, config, trace=False, progress=None):
    """Feed a flight (dict from read_flight) through Watch(config); returns (the replay dict, the
    trace for the plot: time_s, power_W, expected_W, flags, residual per sample and learn_span,
    or None unless ``trace``)."""
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

    def implied_kg(sb):
        # the plan times 1 + the kernel's verdict mean [permille] (sb[21]), not its output mass_g:
        # whole grams are 5 % steps on a 20 g whoop (a second-world whoop read +10.0 % at +8.x %)
        return round(plan_kg * (1000 + sb[21]) / 1000.0, 6)
    limit_kg = plan_kg * (1000 + config["mass_limit_permille"]) / 1000.0
    learn_span = [None, None]      # flight time of the learning window: first spin-up .. learned
    mass_last = None               # (the kernel's last implied mass [kg], its time [s]) once judged
    sb = w.data                    # the kernel's outputs and sums (estimator.core.watch)
    window = None                  # the kernel's last mass verdict's (mean, variance, count)
    mass_check = None              # mass_check's dict for the last completed window
    arrays = {"time_s": [x - t0 for x in t], "power_W": [], "expected_W": [], "flags": [], "residual": [],
              "learn_span": learn_span} if trace else None
    step = max(1, n // 50)
    spin = config["spin_permille"]
    stuck = StuckTimer(config)
    stuck_event = None             # the open stuck-current event: its detail gets the whole stuck time
    # flight time as the kernel counts it: samples that pass the sensor checks, above spin; a
    # landing (landed_ms below spin) starts a new flight [ms]
    flights, flight_ms, quiet_ms, fault_ms = [], 0, 0, 0
    judged_ms = 0   # flight time the watch judged: above spin, no sensor fault, its flight's baseline learned
    pauses, dt_max = [], config["dt_max_ms"]   # logging pauses with the rotors stopped on both sides
    for i in range(n):
        ti = t[i]
        dt = first_ms if t_prev is None else int(round((ti - t_prev) * 1000.0))
        if i and dt > dt_max and u[i] < spin and u[i - 1] < spin:
            # a logger that logs only while armed (a pack swap between flights): time on the ground, not
            # a sensor fault; fed in steps the watch takes, up to its landing time (a new flight next)
            pauses.append({"t_s": round(t_prev - t0, 3), "gap_s": round(dt / 1000.0, 3)})
            ground = min(dt, config["landed_ms"] + dt_max)
            while ground > dt_max:
                update(dt_max, u[i], mv[i], ma[i])
                quiet_ms += dt_max
                ground -= dt_max
            dt = ground
        t_prev = ti
        flags = update(dt, u[i], mv[i], ma[i])
        stuck.step(dt, u[i], ma[i], in_range(dt, u[i], mv[i], ma[i], config))
        if flags & 4:
            fault_ms += dt if u[i] >= spin else 0
            if stuck_event is not None:
                stuck_event["detail"] = fault_cause(dt, u[i], mv[i], ma[i], stuck.ms, config)[1]
        elif u[i] >= spin:
            flight_ms += dt
            quiet_ms = 0
            if sb[_SIGMA_AT]:
                judged_ms += dt
        else:
            quiet_ms += dt
            if quiet_ms >= config["landed_ms"] and flight_ms:
                flights.append(flight_ms)
                flight_ms = 0
        if not flags & 4:
            stuck_event = None
        if learn_span[0] is None and u[i] >= spin:
            learn_span[0] = ti - t0
        seen = (sb[21], sb[22], sb[23])
        completed = seen != window and seen[2]
        if seen != window:
            if completed:   # a window completed: the kernel judged everything since its first, from its second on
                mass_check = mass_margin(seen, sb[17], config, first=not (window and window[2]))
            window = seen
        if w.mass_g and (completed or mass_last is None):
            # when the kernel last set the implied mass (with a verdict, which changes seen): it
            # holds it while a power fault is suspected
            mass_last = (implied_kg(sb), ti - t0)
        if not learned and w.sigma_permille:
            learned = True
            learn_span[1] = ti - t0
        if flags != prev:
            new = flags & ~prev
            if new:
                for bit, kind in KINDS:
                    if new & bit:
                        e = {"t_s": round(ti - t0, 3), "kind": kind, "residual": w.residual_permille / 1000.0,
                             "bus_V": mv[i] / 1000.0, "flight": len(flights) + 1}
                        if bit == 16:    # the implied mass against the plan and the alarm limit
                            e.update(mass_kg=implied_kg(sb), planned_kg=plan_kg, limit_kg=round(limit_kg, 4))
                        if bit == 4:     # which sensor check it was, with the value and the limit
                            e["cause"], e["detail"] = fault_cause(dt, u[i], mv[i], ma[i], stuck.ms, config)
                            stuck_event = e if e["cause"] == "stuck_current" else None
                        events.append(e)
            prev = flags
        if trace:
            arrays["power_W"].append(mv[i] * max(ma[i], 0) / 1e6)
            # the kernel's lagged expected power; none below the spin command (rotors stopped: the
            # watch expects and judges nothing there, and the idle terms of all rotors drew a false gap
            # on the ground in the plot, new-user trial, session 23)
            arrays["expected_W"].append((w.state[2] >> 2) * w.scale / 10000.0 if u[i] >= spin else float("nan"))
            arrays["flags"].append(flags)
            arrays["residual"].append(w.residual_permille / 1000.0)
        if progress is not None and i % step == 0:
            progress(i, n)
    if progress is not None:
        progress(n, n)
    if flight_ms:
        flights.append(flight_ms)
    out = {"learned": learned, "learned_at_s": None if learn_span[1] is None else round(learn_span[1], 3),
           "samples": n, "alarms": sum(1 for e in events if e["kind"] != "sensor_fault"), "events": events,
           "flights_s": [round(x / 1000.0, 3) for x in flights], "sensor_fault_s": round(fault_ms / 1000.0, 3),
           "judged_s": round(judged_ms / 1000.0, 3),
           "ground_pauses": pauses}
    out["mass"] = mass_verdict(mass_last, plan_kg, limit_kg, learned, config, events)
    if out["mass"]["judged"] and mass_check is not None:
        alarm, margin = mass_check["alarm_permille"], mass_check["margin_permille"]   # None: a first window
        out["mass"].update(alarm_kg=None if alarm is None else round(plan_kg * (1.0 + alarm / 1000.0), 4),
                           margin_kg=None if margin is None else round(plan_kg * margin / 1000.0, 4),
                           windows_above=mass_check["windows_above"], windows_needed=config["mass_windows"],
                           mass_alarm=any(e["kind"] == "mass_high" for e in events))
    return out, arrays


def _bar(i, n):
    width = 40
    done = int(width * i / max(n, 1))
    sys.stderr.write("\rreplay [%s%s] %3d%%" % ("#" * done, "." * (width - done), 100 * i // max(n, 1)))
    if i >= n:
        sys.stderr.write("\n")
    sys.stderr.flush()


def replay_file(path, params, vehicle=None, options=None, progress=None, drop_bad_time=False,
                params_source="parameter set"):
    """Replay a flight CSV through the watch configured from ``params`` (+ ``vehicle``);
    params_source names the parameter set (its file) in error messages.

    Returns dict samples, alarms (events other than sensor_fault), events
    [{t_s, kind, residual}] (kinds power_high, power_low, sensor_fault, baseline_off,
    mass_high; t_s [s] from the log's first row; residual [-] = residual_permille / 1000 at the
    event; a mass_high event also has mass_kg, the implied all-up mass, planned_kg and
    limit_kg, the mass above which the alarm may fire once the estimate's margin is passed; a
    sensor_fault event has cause (gap, time, voltage, command, current or stuck_current) and
    detail, a text with the value and the watch's limit), learned_at_s (end of the learning
    window, None when it never ended), flights_s (flight time above the spin command of each
    flight between landings, as the kernel counts it [s]) and sensor_fault_s (flight time of
    the samples set aside as sensor faults [s]), judged_s (flight time the watch judged: above the spin
    command, no sensor fault, after its flight's learning window [s]), ground_pauses ([{t_s, gap_s}]: logging pauses above
    the watch's gap limit with the command below spin on both sides, taken as time on the ground,
    not as sensor faults). Every event has bus_V, the bus voltage at its sample [V], and flight,
    the number of its flight in the log (1, 2, ...); a power event outside the sweep's voltages on a set whose voltage exponent
    was not measured has a note saying so (exponent_note). A progress bar goes
    to stderr on logs above PROGRESS_ROWS rows when stderr is a terminal (progress=None),
    always (True) or never (False). Raises InputError on a bad file: time that goes back or
    repeats (unless ``drop_bad_time``: those rows are dropped and counted in ``dropped_rows``),
    values implausible for the parameter set (the likely unit slip is named), a log from another
    vehicle or pack (log_checks.check_vehicle). warnings: the CONFIG's range warning (the vehicle's
    full command beyond the current-sensor range), as firmware gives it, and a log below 4 Hz
    (log_checks.slow_log_warning). A log on which the watch did not finish learning
    the baseline gets ``learned`` False and a ``note`` saying why (learning_note).
    """
    return replay_file_traced(path, params, vehicle, options, progress, drop_bad_time, params_source, False)[0]


def replay_file_traced(path, params, vehicle=None, options=None, progress=None, drop_bad_time=False,
                       params_source="parameter set", trace=True):
    """replay_file's dict and, when ``trace``, run_kernel's per-sample trace for the plot (else None)."""
    config, notes = make_config(params, vehicle, options, params_source)
    flight = read_flight(path)
    dropped = check_time(path, flight, go_on=drop_bad_time)
    facts = vehicle_facts(params, vehicle, params_source)
    check_plausible(path, flight, params, facts, config, flight["units"])
    check_vehicle(path, flight, params, facts, config, flight["units"])
    if progress is None:
        progress = len(flight["time_s"]) > PROGRESS_ROWS and sys.stderr.isatty()
    out, samples = run_kernel(flight, config, trace=trace, progress=_bar if progress else None)
    ground = ground_current_note(flight, params, facts, config)
    if ground:
        out["ground_current_note"] = ground
    for e in out["events"]:
        note = exponent_note(e, params)
        if note:
            e["note"] = note
    if not out["learned"]:
        out["note"] = learning_note(out, config)
    # the range warning firmware gives, repeated: a punch-out beyond the range is a sensor_fault
    out["warnings"] = [notes["range_warning"]] if "range_warning" in notes else []
    slow = slow_log_warning(flight["time_s"])
    if slow:
        out["warnings"].append(slow)
    if out["learned"] and out["judged_s"] < config["learn_ms"] / 1000.0:
        out["warnings"].append(short_judged_warning(out, config))
    if dropped:
        out["dropped_rows"] = dropped
    if flight["missing_rows"]:
        out["dropped_missing_rows"] = flight["missing_rows"]
    return out, samples


def short_judged_warning(out, cfg):
    """One sentence for a log the watch learned on but then judged for less flight time than its
    learning window (CONFIG learn_ms): a 45 s hover read "no event" on 1.3 s of judged flight
    (new-user trial 26). out: run_kernel's dict, learned True."""
    return ("the watch judged only %.1f s of flight after it learned its baseline at %.1f s, less than its "
            "%.0f s learning window: too little to count as a check of the propulsion; fly longer near hover"
            % (out["judged_s"], out["learned_at_s"], cfg["learn_ms"] / 1000.0))


def learning_note(out, cfg):
    """Why the watch gave no verdict (out: run_kernel's dict, learned False): most of the flight
    set aside as sensor faults, no flight long enough for the learning window, or too little
    steady flight in a long enough one. Never "too short" for a long flight."""
    flights, fault_s = out["flights_s"], out["sensor_fault_s"]
    flown, longest = sum(flights), max(flights, default=0.0)
    need_s, learn_s = (cfg["takeoff_ms"] + cfg["learn_ms"]) / 1000.0, cfg["learn_ms"] / 1000.0
    tail = " - no verdict on this log"
    if fault_s > flown:
        first = next((e for e in out["events"] if e["kind"] == "sensor_fault"), None)
        return ("learning did not complete: %.1f s of the %.1f s above the spin command were sensor faults the "
                "watch set aside (first at %.1f s: %s)%s" % (fault_s, fault_s + flown, first["t_s"] if first else 0.0,
                                                             first["detail"] if first else "no event", tail))
    if longest < need_s:
        return ("too short to learn: %s %.1f s of flight above the spin command; the watch needs about %.0f s in "
                "one flight (take-off, then %.0f s of steady flight) to learn the power baseline%s"
                % ("the longest of %d flights (landings between them) had" % len(flights) if len(flights) > 1
                   else "the log has", longest, need_s, learn_s, tail))
    return ("learning did not complete: the longest flight had %.1f s above the spin command, but too little "
            "steady flight near hover in it for the %.0f s learning window%s" % (longest, learn_s, tail))

