"""Checks of a flight log before the watch replays it (design notes sec. 4, Flight CSV).

- time must rise: rows that go back or repeat are named (file, row numbers) in one error, or,
  when the user asks to go on, dropped and counted;
- values implausible for the parameter set are refused with the likely unit slip: a 0..1
  command in a column labelled %, a command in another unit than its label (permille or us
  labelled %, percent labelled permille while the hover current flows: log_current), millivolts
  labelled V (or volts labelled mV), the voltage and current columns swapped, a current sensor
  reading negative or zero while the rotors turn, milliamps labelled A, a voltage or current in counts
  of 0.1 or 0.01 of its unit (log_decades);
- a log from another vehicle or pack than the parameter set's is refused before the watch
  runs (the watch would learn a power scale and read the difference as a propulsion fault):
  the bus voltage in flight against the set's pack, and the mass the log's power implies
  through the set's power model against the planned mass;
- a log with too little settled flight to learn the baseline says so (no verdict), so that
  silence is never read as health.

The limits come from the watch CONFIG (dict from estimator.watch.config.make_config) and the
pack's own voltages (sensor_range.pack_voltages; the CONFIG's v_max_mV stops at the sensor's
60 V, below a 13-cell pack's 1.2 x full, so it cannot stand for the full pack).
"""

from estimator.csvtable import data_line_numbers
from estimator.errors import InputError
from estimator.units import STANDARD_GRAVITY_M_S2, command_text, unit_factors
from estimator.watch.log_command import check_command_unit
from estimator.watch.log_decades import decade_into, refuse_current_decade, refuse_voltage_decade
from estimator.watch.log_current import check_percent_as_permille, hover_current_A, upper_median as _median
from estimator.watch.sensor_range import pack_voltages

SHOWN_ROWS = 5  # row numbers named in one error line

# Bounds of check_vehicle, for gross mismatches only (what the watch is not there to judge):
# - median bus voltage in flight above the full pack: under load a pack sits below its
#   full-charge voltage; 5 % covers high-voltage cells (4.35 V against 4.2 V a cell, +3.6 %,
#   common practice) and a voltage sensor's calibration (about 1 %, from memory). One cell
#   more on a 6-cell pack is +17 %; a 6-cell log on a 4-cell set about +45 %.
LOG_ABOVE_FULL = 1.05
# - ... below the empty pack: a flight ends at the empty (loaded) voltage, so most of it is
#   flown above; 10 % below covers a cold pack's extra sag and a cautious empty voltage in
#   the vehicle file (from memory). One cell fewer on a 4-cell pack is -25 %.
LOG_BELOW_EMPTY = 0.90
# - the mass implied by the log (thrust from its median bus power in flight through the set's
#   power model, over g) against the planned mass. Lighter: a payload left at home (a quarter
#   of the all-up mass, common practice for camera craft) times forward flight near the
#   best-endurance speed (about 65 % of the hover power, momentum theory for forward flight,
#   from memory; read as static power, 0.65^(2/3) = 0.75 of the thrust) gives 0.56: 0.5 is
#   below. Heavier: hard flying (median power 1.5 x hover reads as 1.5^(2/3) = 1.31 x the mass)
#   with a payload of half the plan (more drops a typical thrust-to-weight of 3 at plan below
#   the 2 a controllable multirotor needs, common practice) gives 1.97: 2.0. The watch's own
#   mass alarm (plan + 8 %) judges everything in between.
IMPLIED_MASS_RANGE = (0.5, 2.0)
# a log whose power, times the rotor count, implies a mass this near the plan carries one ESC's
# current, not the pack's (new-user trial 12, finding 8): the plan give or take about a tenth,
# far narrower than IMPLIED_MASS_RANGE so that a current merely low is not blamed on an ESC (a
# fifth of a quad's, x4, implies about 0.8 of the plan: another vehicle, as before; a tenth about
# half) (a judgement, common practice) [-]
ONE_ESC_MASS_RANGE = (0.9, 1.12)
# the implied mass is judged on at least this much flight above the spin command [s]
IMPLIED_MASS_MIN_FLIGHT_S = 10.0
# a current whose median over that flight is below this share of the hover current reads zero:
# an unplugged or unpowered sensor (an idle spin draws about a tenth of the hover current and
# less flies nothing; common practice) [-]
ZERO_CURRENT_SHARE = 0.05
# rows the voltage/current swap judgement samples (systematic), at most [-]
SWAP_SAMPLE_ROWS = 20000
# the watch is built and measured for logs at 5-100 Hz (benchmarks/watch_detection.py); a log
# whose median sample rate is below this gets a warning [Hz]
SLOW_LOG_HZ = 4.0


def check_time(path, flight, go_on=False):
    """Refuse (InputError) a log whose time goes back or repeats, naming the rows.

    flight: dict from replay.read_flight. With ``go_on`` the offending rows are dropped
    instead; returns the number dropped.
    """
    t = flight["time_s"]
    bad = []          # (index, time of the last good row before it)
    keep = []
    last = None
    for i, ti in enumerate(t):
        if last is not None and ti <= last:
            bad.append((i, last))
            continue
        keep.append(i)
        last = ti
    if not bad:
        return 0
    if not go_on:
        i, before = bad[0]
        lines = data_line_numbers(path, flight["header_line"])   # as the CSV reader counts them
        kept = flight.get("row_index")  # rows left after those with a missing reading were dropped
        line_of = lines if kept is None else [lines[j] for j in kept]
        rows = ", ".join(str(line_of[j]) for j, _ in bad[:SHOWN_ROWS])
        more = "" if len(bad) <= SHOWN_ROWS else " and %d more" % (len(bad) - SHOWN_ROWS)
        raise InputError("%s: line %d: time %.6g s %s (after %.6g s); %d row%s where time does not rise "
                         "(line%s %s%s) - a merged or restarted log? Fix the log, or pass --drop-bad-time "
                         "to drop %s" % (path, line_of[i], t[i],
                                         "repeats" if t[i] == before else "goes back", before,
                                         len(bad), "" if len(bad) == 1 else "s", "" if len(bad) == 1 else "s",
                                         rows, more, "that row" if len(bad) == 1 else "those rows"))
    for key in ("time_s", "command_permille", "bus_mV", "bus_mA"):
        flight[key] = [flight[key][j] for j in keep]
    return len(bad)


def check_plausible(path, flight, params, facts, cfg, units):
    """Refuse a log whose values cannot come from this vehicle, naming the likely unit slip.

    params: the parameter set; facts: estimator.watch.config.vehicle_facts (the pack's cells and
    full / empty voltage: the vehicle's own, not the CONFIG's voltage range, which stops at the
    sensor's 60 V); cfg: the watch CONFIG dict; units: dict column -> unit as written in the header.
    """
    u, mv, ma = flight["command_permille"], flight["bus_mV"], flight["bus_mA"]
    _check_time_unit(path, flight["time_s"], units.get("time"), cfg["dt_max_ms"] / 1000.0)
    full_V, empty_V = pack_voltages(facts, params["thrust_curve"])
    v_full, v_empty = 1000.0 * full_V, 1000.0 * empty_V   # [mV]
    med_v = _median(mv)
    _check_swapped(path, flight, units, full_V, empty_V)
    if med_v < 0:   # a reversed voltage sensor (new-user trial 14, finding 5: 'another vehicle' was blamed)
        as_pack = LOG_BELOW_EMPTY * v_empty <= -med_v <= LOG_ABOVE_FULL * v_full
        raise InputError("%s: column voltage[%s]: the voltage is negative in %.0f %% of the rows (median %.3g V)%s"
                         % (path, units["voltage"], 100.0 * sum(1 for x in mv if x < 0) / len(mv), med_v / 1000.0,
                            ", within this pack's range with its sign flipped: the voltage sensor reads reversed; "
                            "flip its sign" if as_pack else ": a bus voltage is never negative; is the column the "
                            "pack's bus voltage, and are the sensor's leads the right way round?"))
    lo_V, hi_V = LOG_BELOW_EMPTY * empty_V, LOG_ABOVE_FULL * full_V
    k = decade_into(med_v / 1000.0, lo_V, hi_V) if med_v > 1000.0 * hi_V else None
    if k:   # millivolts labelled [V], or counts of 0.1 or 0.01 of the unit (log_decades)
        refuse_voltage_decade(path, units["voltage"], med_v, k, empty_V, full_V)
    if med_v > 50.0 * v_full:
        raise InputError("%s: column voltage[%s]: median %.4g %s is %.0f times the full pack (%.1f V), and no "
                         "power of ten makes it this pack's voltage: is it the pack's bus voltage, and in which "
                         "unit does the logger write it?"
                         % (path, units["voltage"], med_v / (1000.0 if units["voltage"] == "V" else 1.0),
                            units["voltage"], med_v / v_full, v_full / 1000.0))
    if 0 < med_v < v_empty / 50.0:
        raise InputError("%s: column voltage[%s]: median %.4g %s is far below the empty pack (%.1f V): "
                         "likely volts in a column labelled [mV]; label it voltage[V]"
                         % (path, units["voltage"], med_v, units["voltage"], v_empty / 1000.0))
    cells = facts.get("cells") or int(round(v_full / 4200.0))  # full lithium cell about 4.2 V (common practice)
    if cells >= 2 and 0 < med_v < 0.6 * v_empty:
        per_cell = 0.8 * v_empty / cells <= med_v <= 1.2 * v_full / cells
        raise InputError("%s: column voltage[%s]: median %.3g V is far below the empty pack (%.1f V)%s"
                         % (path, units["voltage"], med_v / 1000.0, v_empty / 1000.0,
                            ": likely one cell's voltage on this %d-cell pack; log the pack (bus) voltage "
                            "(or is the log from another vehicle?)" % cells if per_cell else
                            "; is the column the pack's bus voltage, or the log from another vehicle?"))
    spin = cfg["spin_permille"]
    flying = [i for i in range(len(u)) if u[i] >= spin]
    one = {"%": 10, "permille": 1}.get(units["command"])     # 1 % or 1 permille, in permille
    if one is not None and max(u) <= one and max(ma) > 0 and _median(ma) > 0:
        # all commands in 0..1 (% or permille) while current flows: a 0..1 command mislabelled
        if _median([abs(x) for x in ma]) > 1000:
            raise InputError("%s: column command[%s]: every value is between 0 and 1 while %.1f A flows: "
                             "likely a 0..1 command labelled %s; label it command[-]"
                             % (path, units["command"], _median(ma) / 1000.0, units["command"]))
    if units["command"] == "permille":
        check_percent_as_permille(path, flight, params, facts, cfg)
    check_command_unit(path, flight, units["command"])
    if flying:
        cur = [ma[i] for i in flying]
        med_a = _median(cur)
        neg = sum(1 for x in cur if x < 0) / len(cur)
        if neg > 0.5 and med_a < -1000:
            raise InputError("%s: column current[%s]: the current is negative in %.0f %% of the rows where the "
                             "rotors turn (median %.2f A): the current sensor reads reversed; flip its sign"
                             % (path, units["current"], 100.0 * neg, med_a / 1000.0))
        if med_a > 20.0 * cfg["i_max_mA"]:
            # milliamps only when the values read as milliamps fit the sensor's range: 1e12 'A'
            # is still 1e9 A as milliamps (new-user trial 10, finding 5)
            as_mA = units["current"] == "A" and med_a / 1000.0 <= cfg["i_max_mA"]
            raise InputError("%s: column current[%s]: median %.4g A while flying is %.0f times the watch's "
                             "current-sensor range (%.0f A): %s" % (
                                 path, units["current"], med_a / 1000.0, med_a / cfg["i_max_mA"],
                                 cfg["i_max_mA"] / 1000.0,
                                 "likely milliamps in a column labelled [A]; label it current[mA]" if as_mA else
                                 "these values are not a current of this vehicle, neither as amps nor as milliamps; "
                                 "is it the current column, and does the logger write it in A or mA?"))


def _correlation(x, y):
    """Pearson correlation of two equal-length sequences (0 when either is constant)."""
    n = len(x)
    if n < 3:
        return 0.0
    mx, my = sum(x) / n, sum(y) / n
    sxy = sum((a - mx) * (b - my) for a, b in zip(x, y))
    sxx = sum((a - mx) ** 2 for a in x)
    syy = sum((b - my) ** 2 for b in y)
    return sxy / (sxx * syy) ** 0.5 if sxx > 0 and syy > 0 else 0.0


def _check_swapped(path, flight, units, full_V, empty_V):
    """Refuse a log whose voltage and current columns are swapped (new-user trial 9, finding 7:
    'another vehicle or pack' was blamed): the voltage column's median outside the pack's range
    (LOG_BELOW_EMPTY x empty .. LOG_ABOVE_FULL x full [V], as check_vehicle judges it), the current
    column's median, read in the voltage column's unit, inside it, and the voltage column rising
    with the command more than the current column does (a motor's current rises with the
    command, a pack's voltage sags under it: common practice on any log; the power, their
    product, is the same either way, so it cannot tell)."""
    u, mv, ma = flight["command_permille"], flight["bus_mV"], flight["bus_mA"]
    if len(u) < 3:
        return
    lo, hi = LOG_BELOW_EMPTY * empty_V, LOG_ABOVE_FULL * full_V
    v_col = _median(mv) / 1000.0
    v_unit, i_unit = units["voltage"], units["current"]
    v_scale = unit_factors("voltage", (v_unit,))[v_unit][0]
    i_scale = unit_factors("current", (i_unit,))[i_unit][0]
    written = _median(ma) / 1000.0 / i_scale           # the current column's median as written
    as_V = written * v_scale
    if lo <= v_col <= hi or not lo <= as_V <= hi:
        return
    step = max(1, len(u) // SWAP_SAMPLE_ROWS)
    us, vs, is_ = u[::step], mv[::step], ma[::step]
    rise_v, rise_i = _correlation(us, vs), _correlation(us, is_)
    if rise_v <= rise_i:
        return
    raise InputError("%s: columns voltage[%s] and current[%s]: the voltage column's median %.3g V is outside this "
                     "pack's %.1f..%.1f V and rises with the command (correlation %+.2f) as a current does, while "
                     "the current column's median %.4g %s would be %.3g V, within the pack's range (correlation "
                     "%+.2f): likely the voltage and current columns swapped; check the header's order against "
                     "the data" % (path, v_unit, i_unit, v_col, lo, hi, rise_v, written, i_unit, as_V, rise_i))


def _check_current_zero(path, flight, params, facts, units, cfg, bus_V, flown_s):
    """Refuse a log whose current reads zero (below ZERO_CURRENT_SHARE of the hover current, the
    set's power model at the planned mass over the median bus voltage bus_V [V]) over the flight
    above the spin command, flown_s [s] of it (new-user trial 9, finding 7: 'implied mass 0 kg ...
    another vehicle' was blamed): an unplugged or unpowered current sensor. Amps labelled [mA]
    (a current 1000 times too small, not zero) are left to check_vehicle, which names them."""
    spin = cfg["spin_permille"]
    u, ma = flight["command_permille"], flight["bus_mA"]
    flying = [i for i in range(len(u)) if u[i] >= spin]
    if not flying or bus_V <= 0:
        return
    med_mA = _median([abs(ma[i]) for i in flying])
    hover_A = hover_current_A(params, facts, bus_V)
    limit_mA = 1000.0 * ZERO_CURRENT_SHARE * hover_A
    if med_mA >= limit_mA or (units or {}).get("current") == "mA" and 1000.0 * med_mA >= limit_mA:
        return
    i_unit = (units or {}).get("current", "A")
    cmd = command_text(_median([u[i] for i in flying]) / 1000.0, (units or {}).get("command", "-"))
    raise InputError("%s: column current[%s]: median %.3g A over %.0f s above the spin command "
                     "(median command %s), where a hover draws about %.3g A: the current reads zero in flight; "
                     "is the current sensor connected and powered?"
                     % (path, i_unit, med_mA / 1000.0, flown_s, cmd, hover_A))


def _flight_medians(flight, cfg):
    """(bus voltage [mV], bus power [W], flight time [s]): time-weighted medians over the rows at
    or above the spin command (each row weighs its sample period, at most the gap limit), so
    that the logging rate changes nothing (design notes sec. 3, Watch)."""
    t, u, mv, ma = flight["time_s"], flight["command_permille"], flight["bus_mV"], flight["bus_mA"]
    spin, cap = cfg["spin_permille"], cfg["dt_max_ms"] / 1000.0
    rows = []
    for i in range(1, len(t)):
        w = min(t[i] - t[i - 1], cap)
        if u[i] >= spin and w > 0:
            rows.append((w, mv[i], mv[i] * max(ma[i], 0) / 1e6))
    total = sum(r[0] for r in rows)
    if not rows:
        return None, None, 0.0

    def median(k):
        acc = 0.0
        for r in sorted(rows, key=lambda r: r[k]):
            acc += r[0]
            if acc >= 0.5 * total:
                return r[k]
        return rows[-1][k]

    return median(1), median(2), total


def check_vehicle(path, flight, params, facts, cfg, units=None):
    """Refuse a log that looks like another vehicle or pack than the parameter set's (InputError
    with the figures): its median bus voltage in flight above LOG_ABOVE_FULL x the full pack or
    below LOG_BELOW_EMPTY x the empty pack, or the mass its median bus power in flight implies
    (through the vehicle's power model, estimator.watch.thrust_table.thrust_from_power_total_N, a
    coaxial pair's penalty included) outside IMPLIED_MASS_RANGE x the planned mass.

    facts: estimator.watch.config.vehicle_facts (mass_kg, rotor_count, site_density_kg_m3, cells,
    full_voltage_V, empty_voltage_V, name; without pack voltages, sensor_range.pack_voltages' stand-ins);
    cfg: the watch CONFIG; units: the header's units. A current that reads zero in flight is named
    as an unplugged sensor (_check_current_zero); a current labelled [mA] whose power implies a
    mass far below the plan, and within the range at 1000 times, as amps labelled [mA]; one whose
    power at rotor-count times implies the plan (ONE_ESC_MASS_RANGE) as one ESC's current.
    """
    from estimator.watch.thrust_table import avionics_power_W, thrust_from_power_total_N

    med_mV, med_W, flown_s = _flight_medians(flight, cfg)
    if med_mV is None:
        return
    v_full, v_empty = pack_voltages(facts, params["thrust_curve"])   # as make_config took them
    v = med_mV / 1000.0
    if flown_s >= IMPLIED_MASS_MIN_FLIGHT_S:
        _check_current_zero(path, flight, params, facts, units, cfg, v, flown_s)
    cells = facts.get("cells")
    pack = "%d cell%s" % (cells, "" if cells == 1 else "s") if cells else "its pack"
    found = []
    if v > LOG_ABOVE_FULL * v_full:
        found.append("median bus voltage in flight %.1f V, above its full pack (%.1f V on %s)" % (v, v_full, pack))
    elif v < LOG_BELOW_EMPTY * v_empty:
        found.append("median bus voltage in flight %.1f V, below its empty pack (%.1f V on %s)" % (v, v_empty, pack))
    if flown_s >= IMPLIED_MASS_MIN_FLIGHT_S:
        plan = float(facts["mass_kg"])
        mass = thrust_from_power_total_N(med_W, params, int(facts["rotor_count"]), float(facts["site_density_kg_m3"]),
                                         facts.get("layout", "flat"), avionics_power_W(facts, v)) / STANDARD_GRAVITY_M_S2
        off = not IMPLIED_MASS_RANGE[0] <= mass / plan <= IMPLIED_MASS_RANGE[1]
        if off and mass < plan and (units or {}).get("current") == "mA" and not found:
            as_A = thrust_from_power_total_N(1000.0 * med_W, params, int(facts["rotor_count"]),
                                             float(facts["site_density_kg_m3"]),
                                             facts.get("layout", "flat")) / STANDARD_GRAVITY_M_S2
            if IMPLIED_MASS_RANGE[0] <= as_A / plan <= IMPLIED_MASS_RANGE[1]:
                raise InputError("%s: column current[mA]: the power in flight (%.4g W) implies %.3g kg against "
                                 "%.3g kg planned; read as amps it implies %.3g kg: the current is 1000 times too "
                                 "small, likely amps in a column labelled [mA]; label it current[A]"
                                 % (path, med_W, mass, plan, as_A))
        n_rot = int(facts["rotor_count"])
        if off and mass < plan and n_rot > 1 and not found:
            # one ESC's current logged instead of the pack's: about 1/n of the bus total (new-user
            # trial 12, finding 8: a hex log at 1/6 was called another vehicle)
            as_bus = thrust_from_power_total_N(n_rot * med_W, params, n_rot, float(facts["site_density_kg_m3"]),
                                               facts.get("layout", "flat")) / STANDARD_GRAVITY_M_S2
            if ONE_ESC_MASS_RANGE[0] <= as_bus / plan <= ONE_ESC_MASS_RANGE[1]:
                raise InputError("%s: column current[%s]: the power in flight (%.4g W) implies %.3g kg against "
                                 "%.3g kg planned; %d times it (the rotor count) implies %.3g kg: the current is "
                                 "about 1/%d of the expected bus total, likely one ESC's current rather than the "
                                 "pack's; log the bus total (the pack's current sensor, or the sum over the ESCs)"
                                 % (path, (units or {}).get("current", "A"), med_W, mass, plan, n_rot, as_bus, n_rot))
        if off and mass > plan and not found:
            # counts of 0.1 or 0.01 A (log_decades): named only when the plan give or take a tenth results
            def mass_at(watts):
                return thrust_from_power_total_N(watts, params, n_rot, float(facts["site_density_kg_m3"]),
                                                 facts.get("layout", "flat"), avionics_power_W(facts, v)) \
                    / STANDARD_GRAVITY_M_S2
            refuse_current_decade(path, (units or {}).get("current", "A"), med_W, mass, plan, mass_at,
                                  ONE_ESC_MASS_RANGE)
        if off or found:
            found.append("implied mass %.3g kg (%.4g W in flight through its power model) against %.3g kg "
                         "planned%s" % (mass, med_W, plan, ", outside the %g..%g x a payload or the flying "
                                        "explains" % IMPLIED_MASS_RANGE if off else ""))
    if found:
        raise InputError("%s: this log looks like another vehicle or pack than the parameter set's: %s; replay it "
                         "with that vehicle's parameter set (or give --vehicle with the mass and pack it flew)"
                         % (path, "; ".join(found)))


def _check_time_unit(path, time_s, unit, gap_s):
    """Refuse a time column whose median step only makes sense in the other unit: steps far
    beyond the watch's sample gap limit gap_s [s] that would be ordinary logging periods in
    ms (milliseconds labelled [s]), or steps below 2 ms that would be ordinary in s."""
    step = _median_step(time_s)
    if step is None:
        return
    if unit == "s" and step > 20.0 * gap_s and step / 1000.0 <= gap_s:
        raise InputError("%s: column time[s]: the median step between rows is %.4g s, %.0f times the "
                         "watch's sample gap limit (%.1f s): likely milliseconds in a column labelled "
                         "[s]; label it time[ms]" % (path, step, step / gap_s, gap_s))
    if unit == "s" and step > gap_s and step / 1000.0 <= gap_s:
        # closer to the limit (a 25..500 Hz logger in ms): still every step a gap the watch judges
        # nothing across, whatever the unit (new-user trial 15, finding 4: a 37 Hz log was replayed)
        raise InputError("%s: column time[s]: the median step between rows is %.4g s, beyond the watch's "
                         "sample gap limit (%.1f s), so it could judge nothing: likely milliseconds in a "
                         "column labelled [s] (a %.0f Hz log); label it time[ms] (a log really this slow "
                         "is too coarse for the watch: log at least every %.1f s)"
                         % (path, step, gap_s, 1000.0 / step, gap_s))
    if unit == "ms" and step < 0.002 and step * 1000.0 <= gap_s:
        raise InputError("%s: column time[ms]: the median step between rows is %.3g ms, a logging rate "
                         "above 500 Hz: likely seconds in a column labelled [ms]; label it time[s]"
                         % (path, step * 1000.0))


def _median_step(time_s):
    """The median step between rows that rise [s], or None for fewer than 3 such steps."""
    steps = [b - a for a, b in zip(time_s, time_s[1:]) if b > a]
    return _median(steps) if len(steps) >= 3 else None


def slow_log_warning(time_s):
    """One sentence when the log's median sample period is longer than 1 / SLOW_LOG_HZ, else None:
    at such a rate a block of the watch holds one sample or none, its alarms come later and a
    short fault can fall between samples. time_s: the log's times [s]."""
    period = _median_step(time_s)
    if period is None or period * SLOW_LOG_HZ <= 1.0:
        return None
    return ("this log has a sample every %.2g s (median, %.2g Hz): the watch is built for logs at 5-100 Hz; "
            "at this rate its alarms come later and a short fault can pass between samples: log faster"
            % (period, 1.0 / period))
