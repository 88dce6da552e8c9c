"""The onboard-watch flow on the command line: ``liftcal firmware`` and ``liftcal replay``.

numpy and matplotlib are imported inside the commands (replay --plot only), never at module top.
"""

import os

import click

from estimator.cautions import ALARM_ACTION, ALARM_ACTION_SHORT, cautions
from estimator.commands.options import FILE_NAME, Number
from estimator.names import shown
from estimator.jsonio import dumps
from estimator.textwidth import fit_width
from estimator.units import counted, mass_text

WATCH_CAUTIONS = cautions("board")
# --lag-ms: the rotor's spin-up and the current sensor's response of a small multirotor take
# tens of ms, about 0.3 s on the largest (40-inch) rotors liftcal takes (common practice, from
# memory); a lag of seconds is a unit slip (s for ms) or a mistake, and would smear every power
# change the watch judges
LAG_MS_BOUNDS = (0.0, 500.0, "a rotor's spin-up plus a current sensor's response: tens of ms on a small "
                             "multirotor, about 0.3 s on the largest rotors; common practice, from memory")


def _load(params_file, vehicle_file, from_edited=None):
    from estimator.params import check_vehicle_match, load_params

    params = load_params(params_file, from_edited)
    vehicle = None
    if vehicle_file is not None:
        from estimator.vehicle import load_vehicle
        vehicle = load_vehicle(vehicle_file)
        check_vehicle_match(params, vehicle, params_file, vehicle_file)
    return params, vehicle


def watch_options(params, vehicle=None, lag_ms=None, hover_needed_by=None):
    """watch CONFIG option overrides (estimator.watch.config.DEFAULTS) of firmware, replay and the
    demo alike, so that the board and the desktop run one CONFIG: --lag-ms, and with a vehicle file
    the pack current at full command on a full pack that the pre-flight sheet judges the current
    limits on (preflight.measured_rotor.hover_from_params, pack_current_judged_A: the set's motor
    model on the vehicle's sagging pack; the one calculation, not a second copy), which the watch's
    current range and its warning take instead of the power model's figure without sag (trial 9:
    463 A without sag against the sheet's 408 A on a 12S octo). hover_needed_by: (vehicle file,
    parameter-set file) when the vehicle must hover on the set (firmware): InputError with the
    pre-flight sheet's own verdict when it cannot (new-user trial 13, finding 5)."""
    out = {} if lag_ms is None else {"lag_ms": lag_ms}
    if vehicle is not None:
        from estimator.preflight.measured_rotor import hover_from_params

        report = hover_from_params(vehicle, params)
        if hover_needed_by and not report.get("can_hover"):
            verdict = next((w for w in report.get("warnings", []) if w.startswith("cannot hover")), "cannot hover")
            from estimator.errors import InputError
            vehicle_file, params_file = (shown(f) for f in hover_needed_by)
            raise InputError("%s: %s on %s (as `liftcal hover %s --params %s` says); the power watch needs a "
                             "vehicle that hovers: no bundle written"
                             % (vehicle_file, verdict, params_file, vehicle_file, params_file))
        amps = report.get("pack_current_judged_A")
        if amps is not None and amps > 0.0:
            out["full_command_current_A"] = amps
    return out


EVENT_MEANING = {
    "power_high": "more power than expected (bearing, winding, prop strike?)",
    "power_low": "less power than expected (chipped or loose blade?)",
    "sensor_fault": "reading out of range, stuck current or a bad sample gap",
    "baseline_off": ("power at flight start far from the bench fit (flown at another site or in other air than the "
                     "vehicle file's? give that site, and rebuild the bundle; else refit, check pack, props, units)"),
    "mass_high": ("implied all-up mass above plan (a heavier payload, or a rotor or motor drawing more power than the "
                  "bench fit since take-off? check both)"),
}
# a power_high this soon after a baseline_off of the same flight may share its cause [s] (the watch's
# take-off and learning windows, 20 s each by default: the rest of the flight's start)
POWER_AFTER_BASELINE_S = 60.0


def _baseline_before(events, e, within_s=None, high=False):
    """The first baseline_off of event e's flight (event key "flight") at or before e, within
    within_s [s] of it when given, with more power than the bench fit (residual > 0) when high;
    None when there is none. One lookup for the notes below: a baseline_off of an earlier flight
    in the log says nothing of this one (each flight is learned anew)."""
    return next((b for b in events if b["kind"] == "baseline_off" and b.get("flight") == e.get("flight")
                 and 0.0 <= e["t_s"] - b["t_s"] and (within_s is None or e["t_s"] - b["t_s"] <= within_s)
                 and (not high or b.get("residual", 0.0) > 0.0)), None)


def _add_note(e, note):
    e["note"] = e["note"] + "; " + note if e.get("note") else note


def _note_power_after_baseline(events):
    """Add a "note" to a power_high that comes within POWER_AFTER_BASELINE_S of a baseline_off in the
    same flight: a site, pack or propeller off the bench fit shows first as the one, then as the
    other (new-user trial 13, finding 3: a sea-level flight on a 2200 m bundle)."""
    for e in events:
        base = _baseline_before(events, e, POWER_AFTER_BASELINE_S) if e["kind"] == "power_high" else None
        if base is not None:
            _add_note(e, "%.1f s after the baseline_off of this flight: it may share its cause, another site or "
                         "air, the pack or the props; settle that first" % (e["t_s"] - base["t_s"]))


def _note_mass_after_baseline(events):
    """Add a "note" to a mass_high event that follows, in the same flight, a baseline_off with more
    power than the bench fit expects: a power fault present from the start (a dragging bearing, a
    damaged propeller) raises the implied mass just as a heavier payload does."""
    for e in events:
        base = _baseline_before(events, e, high=True) if e["kind"] == "mass_high" else None
        if base is not None:
            _add_note(e, "the power was already %+.1f %% off the bench fit at %.1f s: more power from the "
                         "start (a dragging bearing, a damaged propeller) reads as extra mass too; weigh the "
                         "aircraft, and if it is as planned look for a power fault"
                         % (100.0 * base["residual"], base["t_s"]))


def _exponent_warning(params, vehicle, source):
    """[one warning] when the parameter set's voltage exponent was not measured (one supply
    voltage, estimator.watch.model_hedge.exponent_not_measured), naming the sweep's voltages and
    the pack's; [] otherwise."""
    from estimator.watch.config import vehicle_facts
    from estimator.watch.model_hedge import exponent_not_measured

    if not exponent_not_measured(params):
        return []
    c = params["thrust_curve"]
    se = params.get("standard_errors", {}).get("voltage_exponent", 0.0)
    v = vehicle_facts(params, vehicle, source)
    pack = ""
    if v.get("full_voltage_V") and v.get("empty_voltage_V"):
        pack = " and the pack runs %.1f..%.1f V" % (v["empty_voltage_V"], v["full_voltage_V"])
    return ["%s: the voltage exponent n = %.2f +- %.2f was not measured (the sweep ran from one supply, "
            "%.1f..%.1f V)%s: outside the sweep's voltages the expected power is extrapolated, and a "
            "power_low or power_high there may be the model, not the rotor (replay names the bus voltage at "
            "each alarm). Sweep at two or three supply voltages and refit before trusting the watch on a "
            "sagging pack" % (source, c["voltage_exponent"], se, c.get("voltage_min_V", 0.0),
                              c.get("voltage_max_V", 0.0), pack)]


def _tare_warning(params, source):
    """[the fit's one line] when the set's sweep had a load-cell zero offset that the fit
    subtracted (fit_quality.thrust_offset_removed_N), in the sweep's thrust unit; [] otherwise."""
    from estimator.bench.load_cell import tare_note

    offset_N = params.get("fit_quality", {}).get("thrust_offset_removed_N")
    if not offset_N:
        return []
    unit = params.get("provenance", {}).get("units", {}).get("thrust", "N")
    return ["%s: %s" % (source, tare_note(offset_N, unit))]


def _bundle_source(out_dir):
    """' from SOURCE', the parameter set an earlier bundle at out_dir was made from (the first line
    of its liftwatch_config.py), or '' (new-user trial 12, finding 14: the replace line named no
    source, while fit's names its bench file). The path is the one its manifest records, as seen
    from here (folders.recorded_source; trial 25, finding 2: the first line's is relative to where
    that command ran); the first line's only for a bundle without that record."""
    import re

    from estimator.folders import recorded_source

    recorded = recorded_source(out_dir)
    if recorded is not None:
        return " from %s" % shown(recorded)
    try:
        with open(os.path.join(out_dir, "liftwatch_config.py"), encoding="utf-8") as fh:
            first = fh.readline()
    except (OSError, UnicodeDecodeError):
        return ""
    found = re.match(r"# liftwatch_config: generated by liftcal \S+ from (.*) - regenerate, do not edit\.$",
                     first.rstrip("\n"))
    # a bundle written without a file name (the library's default source) names none (trial 14, 12)
    return " from %s" % found.group(1) if found and found.group(1) != "parameter set" else ""


@click.command()
@click.argument("params_file", type=FILE_NAME, metavar="PARAMS.json")
@click.option("--out", "out_dir", type=FILE_NAME, required=True, metavar="DIR",
              help="Folder for the bundle (new, empty, or an earlier bundle; replaced atomically).")
@click.option("--vehicle", "vehicle_file", type=FILE_NAME, default=None, metavar="VEHICLE.json",
              help="Vehicle file (mass, rotors, pack, site); default: the parameter set's vehicle block.")
@click.option("--lag-ms", "lag_ms", type=Number(LAG_MS_BOUNDS), default=None, metavar="MS",
              help="Time constant of the rotor and current-sensor response the expected power is lagged by "
                   "(default: 0.25 s per metre of propeller diameter + 20 ms).")
@click.option("--from-edited", "from_edited", is_flag=True,
              help="Build from a parameter set edited since liftcal wrote it (its content seal broken); "
                   "without it liftcal refuses such a set.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
def firmware(params_file, out_dir, vehicle_file, lag_ms, from_edited, as_json):
    """Write the MicroPython power-watch bundle for a board.

    DIR gets {files} and mpy/*.mpy (the modules compiled). The board's current sensor reads the
    whole bus: give the avionics' steady current (flight controller, FPV transmitter, camera, gimbal) as
    avionics_current_A in the vehicle file, or a healthy flight reads as extra power. A vehicle that
    cannot hover (liftcal hover) gets no bundle.
    """
    from estimator.folders import FOLDER_MANIFEST
    from estimator.watch.bundle import write_bundle

    from estimator.folders import check_folder
    from estimator.params import edited_set_warning

    state = check_folder(out_dir, "bundle", inputs=(params_file, vehicle_file))
    old_source = _bundle_source(out_dir) if state == "own" else ""
    params, vehicle = _load(params_file, vehicle_file, from_edited)
    edited = edited_set_warning(params_file, from_edited, "the board bundle", params)
    options = watch_options(params, vehicle, lag_ms, hover_needed_by=(vehicle_file, params_file))
    out = write_bundle(params, out_dir, vehicle=vehicle, source=params_file, options=options,
                       edited=edited, source_path=params_file)
    cfg = out["config"]
    # the kernel's limit is plan x (1 + permille / 1000) exactly (it compares permille), not floored
    mass_limit_g = round(cfg["mass_plan_g"] * (1000 + cfg["mass_limit_permille"]) / 1000.0, 1)
    warnings = (([edited] if edited else []) + _tare_warning(params, params_file)
                + _exponent_warning(params, vehicle, params_file) + out["warnings"])
    # README: whenever liftcal replaces one of its own files it says so in one line
    from estimator.folders import kept_words
    replaced = (["replaced %s: a power-watch bundle liftcal wrote%s%s" % (out_dir, old_source, kept_words(out["kept"]))]
                if state == "own" else [])
    summary = {"out_dir": out["out_dir"], "files": out["files"], "mpy_bytes": out["mpy_bytes"],
               "cusum_k_sigma": cfg["cusum_k_q8"] / 256.0, "cusum_h_sigma": cfg["cusum_h_q8"] / 256.0,
               "noise_floor": cfg["noise_floor_permille"] / 1000.0, "lag_ms": cfg["lag_ms"],
               "mass_limit_g": mass_limit_g, "warnings": warnings, "cautions": list(WATCH_CAUTIONS),
               "replaced": replaced, "site": out["site"]}
    if as_json:
        click.echo(dumps(summary))
        return
    lines = ["WARNING: " + edited] if edited else []
    lines += ["wrote the power-watch bundle to %s (%d files, .mpy total %d bytes; and %s, liftcal's record "
              "of them)" % (shown(out["out_dir"]), len(out["files"]), out["mpy_bytes"], FOLDER_MANIFEST),
              "  CUSUM per %d ms block: reference %.2f, threshold %.2f x the block noise (learned in flight, "
              "at least %.1f %%); expected power lagged %d ms; mass alarm above %s"
              % (cfg["block_ms"], summary["cusum_k_sigma"], summary["cusum_h_sigma"],
                 100.0 * summary["noise_floor"], cfg["lag_ms"],
                 mass_text(mass_limit_g / 1000.0, cfg["mass_plan_g"] / 1000.0)),
              "  made for one site's air, %s, and a current sensor that reads as the bench's meter did: "
              "at another field a healthy flight reads baseline_off and false power alarms; rebuild for it: "
              "liftcal firmware %s --vehicle VEHICLE.json (with that field's site) --out DIR"
              % (out["site"]["words"], shown(params_file))]
    lines += replaced
    lines += ["! " + w for w in warnings if w != edited]
    lines += ["- " + c for c in WATCH_CAUTIONS]
    click.echo(fit_width("\n".join(lines)))


def _bundle_files():
    """The bundle's files as the firmware help lists them (estimator.watch.bundle_files: one source)."""
    from estimator.watch.bundle_files import FILES

    return ", ".join("%s (%s)" % pair for pair in FILES)


firmware.help = firmware.help.replace("{files}", _bundle_files())


def replay_headline(flight_file, out):
    """The replay's first line: the counts, led by NOT JUDGED when the watch never learned its
    baseline (new-user trial 25, finding 3: '1 sample, 0 alarms, 0 events' read as all clear), in
    the words of the reason's head (replay.learning_note: 'too short to learn', 'learning did not
    complete') and its 'no verdict'."""
    counts = "%s, %s, %s" % (counted(out["samples"], "sample"), counted(out["alarms"], "alarm"),
                             counted(len(out["events"]), "event"))
    if out["learned"]:
        return "%s: %s" % (flight_file, counts)
    return "%s: NOT JUDGED, %s (no verdict): %s" % (flight_file, out["note"].split(":", 1)[0], counts)


@click.command()
@click.argument("flight_file", type=FILE_NAME, metavar="FLIGHT.csv")
@click.option("--params", "params_file", type=FILE_NAME, required=True, metavar="PARAMS.json",
              help="The fitted parameter set.")
@click.option("--vehicle", "vehicle_file", type=FILE_NAME, default=None, metavar="VEHICLE.json",
              help="Vehicle file; default: the parameter set's vehicle block.")
@click.option("--plot", "plot_file", type=FILE_NAME, default=None, metavar="PNG",
              help="Draw measured against expected power with alarms shaded.")
@click.option("--lag-ms", "lag_ms", type=Number(LAG_MS_BOUNDS), default=None, metavar="MS",
              help="Time constant of the rotor and current-sensor response (default: 0.25 s per metre of "
                   "propeller diameter + 20 ms).")
@click.option("--drop-bad-time", is_flag=True,
              help="Drop rows whose time goes back or repeats (counted in dropped_rows) instead of refusing the log.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
def replay(flight_file, params_file, vehicle_file, plot_file, lag_ms, drop_bad_time, as_json):
    """Run a logged flight through the power watch and list its events.

    FLIGHT.csv has time[s] or time[ms], command[-] (or [%], [permille], [us]), voltage[V] or
    voltage[mV] and current[A] or current[mA] columns (bus totals). The same integer kernel as
    on the board runs on every row.
    """
    from estimator.watch.replay import replay_file_traced

    replaced = None
    if plot_file is not None:
        from estimator.outputs import check_output
        from estimator.replacing import replaced_line

        check_output(plot_file, "png", inputs=(flight_file, params_file, vehicle_file), option="--plot")
        replaced = replaced_line(plot_file, "png")  # README: a replaced liftcal file is named in one line
    params, vehicle = _load(params_file, vehicle_file)
    out, trace = replay_file_traced(flight_file, params, vehicle=vehicle, drop_bad_time=drop_bad_time,
                                    options=watch_options(params, vehicle, lag_ms), params_source=params_file,
                                    trace=plot_file is not None)
    from estimator.params import edited_set_note
    edited = edited_set_note(params_file, "this replay judges the log")
    out["warnings"] = ([edited] if edited else []) + out["warnings"]
    _note_mass_after_baseline(out["events"])
    _note_power_after_baseline(out["events"])
    if plot_file is not None:
        from estimator.watch.plots import plot_replay
        plot_replay(plot_file, trace, out["events"], title=flight_file)
        out["plot"] = plot_file
        out["replaced"] = [replaced] if replaced else []
    headline = replay_headline(flight_file, out)
    if as_json:
        # the action after an alarm beside, not among, the watch's cautions (those are the same for every log)
        click.echo(dumps(dict(dict(headline=headline, judged=out["learned"]), **out, cautions=list(WATCH_CAUTIONS),
                              **({"after_alarm": ALARM_ACTION} if out["alarms"] else {}))))
        return
    lines = [headline]
    if out.get("dropped_rows"):
        lines.append("  dropped %s whose time went back or repeated" % counted(out["dropped_rows"], "row"))
    if out.get("dropped_missing_rows"):
        lines.append("  dropped %s with an empty or 'nan' cell (a missed reading)"
                     % counted(out["dropped_missing_rows"], "row"))
    flights = out.get("flights_s") or []
    if len(flights) > 1:   # landings between them; the watch learns each flight anew
        lines.append("  %d flights (landings between them), %s above the spin command; each learned anew"
                     % (len(flights), ", ".join("%.1f s" % f for f in flights)))
    for p in out.get("ground_pauses", []):
        lines.append("  logging paused %.1f s at %.1f s with the rotors stopped: time on the ground, not a sensor fault"
                     % (p["gap_s"], p["t_s"]))
    if out.get("ground_current_note"):
        lines.append("  note: " + out["ground_current_note"])
    # before the events: a punch-out beyond the current-sensor range shows as a sensor_fault
    lines += ["  ! " + w for w in out.get("warnings", [])]
    if not out["learned"]:
        lines.append("  " + out["note"])
    elif not out["events"]:
        lines.append("  no event: power stayed within what the parameter set expects over the %.1f s of flight "
                     "judged after learning" % out["judged_s"])
    from estimator.textwidth import wrap_line
    from estimator.units import mass_text
    from estimator.watch.replay import mass_words
    lines.append("  " + mass_words(out["mass"]))
    if out["events"]:
        lines.append("  (times in s from the log's first row)")
    for e in out["events"]:
        if e["kind"] == "sensor_fault":
            what = e.get("detail") or EVENT_MEANING.get(e["kind"], "")
        elif e["kind"] == "mass_high":
            # one sentence that wraps cleanly: the numbers, then the likely cause
            what = ("implied mass %s against %s planned (alarm above %s plus the estimate's margin): a heavier "
                    "payload, or a rotor or motor drawing more power than the bench fit since take-off? check both; %s"
                    % (tuple(mass_text(e[k], e["planned_kg"]) for k in ("mass_kg", "planned_kg", "limit_kg"))
                       + (ALARM_ACTION_SHORT,)))
        else:
            what = "residual %+.1f %%  %s; %s" % (100.0 * e["residual"], EVENT_MEANING.get(e["kind"], ""),
                                                 ALARM_ACTION_SHORT)
        lines.append("  %9.1f s  %-13s %s" % (e["t_s"], e["kind"], what))
        if e.get("note"):  # under the event's own wrapped text, not deeper (new-user trial 12, finding 14)
            lines.extend(wrap_line("  %11s  (%s)" % ("", e["note"]), indent=16))
    if plot_file:
        lines.append("plot: %s" % plot_file)
        if replaced:
            lines.append(replaced)
    # every caution --json lists, in its order (new-user trial 15: the text gave only the first)
    lines += ["- " + c for c in WATCH_CAUTIONS]
    click.echo(fit_width("\n".join(lines)))
