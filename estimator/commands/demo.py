"""``liftcal demo``: the three flows end to end on the built-in demo scenario.

The scenario is INVENTED for this project (a 2.05 kg survey quad flown from a 1400 m
site, its bench sweep and its flights are all simulated); it is no record of any real
aircraft. Every file the flows read or write lands in --out so a builder can rerun
each step by hand with the commands printed beside it.
"""

import os
import shutil

import click

from estimator.commands.options import FILE_NAME
from estimator.names import shown
from estimator.units import command_text
from estimator.jsonio import dumps, write_atomic, write_json_atomic

FLIGHTS = (  # (file stem, fault injected by the flight simulator, what it stands for)
    ("flight-clean", None, "a normal flight"),
    ("flight-power-high", "power_high", "+15 % power from 120 s (a failing bearing or winding)"),
    ("flight-power-low", "power_low", "-15 % power from 120 s (a chipped or loose blade)"),
    ("flight-heavy", "heavy", "15 % heavier than planned from takeoff"),
)


def _rule(title):
    return "\n== %s %s" % (title, "=" * max(3, 66 - len(title)))


class _Text(list):
    """Collects the demo's text; with ``emit`` set, also prints each piece as soon as it exists."""

    def __init__(self, emit):
        super().__init__()
        self.emit = emit

    def append(self, item):
        super().append(item)
        if self.emit is not None:
            self.emit(item)

    def __iadd__(self, items):
        for item in items:
            self.append(item)
        return self


def run_demo(out_dir, seed=1, emit=None):
    """Run pre-flight, bench-to-settings and watch on the demo scenario; return (report dict, text).

    ``emit``, when given, is called with each piece of text as soon as its step is done.
    """
    from estimator.folders import check_folder, publish_folder, staging_folder

    # a new or empty folder, or one an earlier demo wrote and nobody changed (folders.py); the
    # files are made in a folder beside it and renamed into place at the end: never half a demo
    state = check_folder(out_dir, "demo")
    work = staging_folder(out_dir)
    try:
        report, text = _run(out_dir, work, seed, emit)
        kept = publish_folder(work, out_dir, "demo")
    except BaseException:
        shutil.rmtree(work, ignore_errors=True)
        raise
    # README: whenever liftcal replaces its own files it says so in one line; the files made in
    # the folder since the earlier demo (the tour's figures, settings, re-fits) are kept and named
    report["replaced"] = [replaced_words(out_dir, kept)] if state == "own" else []
    report["kept"] = kept
    for line in report["replaced"]:
        text += "\n" + line
        if emit is not None:
            emit(line)
    return report, text


def replaced_words(out_dir, kept):
    """The line a demo over an earlier one prints: what it replaced and which files it kept."""
    from estimator.folders import kept_words

    return "replaced %s: the files an earlier liftcal demo wrote there%s" % (shown(out_dir), kept_words(kept))


# the payloads and job time of the demo's payload table, as typed on its printed command line
DEMO_PAYLOAD = "0,0.25,0.5,0.75,1kg"
DEMO_JOB_MIN = 10.0


def _run(out_dir, work, seed, emit):
    """run_demo's steps, writing into ``work`` and naming the files as they will be in ``out_dir``."""
    from estimator.commands.bench import _fold_arrows, export_notes, fit_for_vehicle, settings_text, with_notes
    from estimator.demo.bench_sim import simulate_sweep
    from estimator.demo.scenario import DEMO_VEHICLE
    from estimator.bench.export import EXAMPLE_MAP, as_mapping, export_settings, load_map
    from estimator.watch.bundle import write_bundle
    from estimator.demo.flight_sim import simulate_flight
    from estimator.params import write_params
    from estimator.preflight.report import format_sheet, hover_report
    from estimator.watch.replay import replay_file
    from estimator.commands.watch import watch_options

    path = lambda name: os.path.join(work, name)  # noqa: E731  where it is written
    show = lambda name: shown(os.path.join(out_dir, name))  # noqa: E731  where the person finds it, as printed
    text = _Text(emit)
    # each sentence on its own line within 80 columns (trial 9, finding 15: the first wrapped
    # mid-sentence, 'site;' alone on a line)
    text += ["liftcal demo: an INVENTED 2.05 kg survey quad at a 1400 m, 28 C site.",
             "Its bench sweep and flights are simulated. Files go to %s" % out_dir]

    # 1. before the first flight: datasheet model
    vehicle = dict(DEMO_VEHICLE)
    write_json_atomic(path("vehicle.json"), vehicle)
    datasheet = hover_report(vehicle)
    text += [_rule("1. pre-flight estimate from the datasheet model"),
             "$ liftcal hover %s" % show("vehicle.json"), format_sheet(datasheet)]
    # 1b. choices: candidate propellers and motors, and how much it can carry
    from estimator.preflight.compare import compare_rows, format_table, parse_vary
    from estimator.preflight.payload import format_payload_table, parse_payloads, payload_table
    from estimator.vehicle import check_vehicle

    varies = ["propeller.size=10x4.5in,11x5in,12x5in", "motor.kv_rpm_per_V=680,880"]
    choices = compare_rows(vehicle, show("vehicle.json"), [parse_vary(v) for v in varies])
    payloads, _ = parse_payloads(DEMO_PAYLOAD)  # the parser of `hover --payload`: the rows match the command
    payload = payload_table(check_vehicle(vehicle, show("vehicle.json")), payloads, DEMO_JOB_MIN)
    text += [_rule("1b. choosing: candidate propellers and motors, and the payload"),
             "$ liftcal compare %s %s" % (show("vehicle.json"), " ".join("--vary " + v for v in varies)),
             format_table(choices, vehicle.get("name", "vehicle")),
             "$ liftcal hover %s --payload %s --job-time %gmin" % (show("vehicle.json"), DEMO_PAYLOAD, DEMO_JOB_MIN),
             format_payload_table(payload, "kg")]

    # 2. after a bench sweep: fit -> parameter set -> hover sheet -> export
    write_atomic(path("bench.csv"), simulate_sweep(seed=seed))
    params = fit_for_vehicle(path("bench.csv"), vehicle)
    write_params(path("params.json"), params)  # validates against the schema before writing
    fitted = hover_report(vehicle, params)
    map_file = EXAMPLE_MAP
    mapping = load_map(map_file)
    settings = export_settings(params, mapping, map_file)
    write_atomic(path("settings.txt"), with_notes(settings_text(settings, mapping, "params.json", map_file),
                                                  export_notes(settings, params)))
    c, k = params["thrust_curve"], params["static_factor"]
    unit = params["provenance"]["units"]["command"]   # the bench sweep's command unit
    text += [_rule("2. bench sweep -> parameter set -> settings"),
             "$ liftcal fit %s --vehicle %s --out %s" % (show("bench.csv"), show("vehicle.json"),
                                                         show("params.json")),
             # one line each, commands in the sweep's own unit as `fit` writes them (trial 14, finding 15)
             "fitted %d rows (%d dropped): full-command thrust %.2f N at %.2f V"
             % (params["fit_quality"]["rows_used"], params["fit_quality"]["rows_rejected"],
                c["thrust_max_N"], c["reference_voltage_V"]),
             "quadratic share %.3f, curve intercept %s (the rotor starts at %s)"
             % (c["quadratic_share"], command_text(c["command_min"], unit),
                command_text(params["motor_model"]["command_start"], unit)),
             "voltage exponent %.2f, static factor k %.3f" % (c["voltage_exponent"], k["value"]),
             "$ liftcal hover %s --params %s" % (show("vehicle.json"), show("params.json")),
             format_sheet(fitted),
             "$ liftcal export %s   (the shipped example map, invented setting names)" % show("params.json"),
             _fold_arrows(settings_text(settings, mapping, "params.json", map_file)).rstrip()]

    # 3. in the air: board bundle + replay of simulated flights
    options = watch_options(params, vehicle)   # the CONFIG liftcal firmware/replay --vehicle build
    bundle = write_bundle(params, path("board"), vehicle=vehicle, options=options, source=show("params.json"),
                          source_path=os.path.join(out_dir, "params.json"))
    text += [_rule("3. onboard power watch"),
             "$ liftcal firmware %s --vehicle %s --out %s" % (show("params.json"), show("vehicle.json"),
                                                              show("board")),
             "bundle: %d files, .mpy total %d bytes" % (len(bundle["files"]), bundle["mpy_bytes"])]
    flights = []
    for stem, fault, meaning in FLIGHTS:
        csv_path = path(stem + ".csv")
        # the command shows while its flight is simulated and replayed (several seconds each)
        text.append("$ liftcal replay %s --params %s" % (show(stem + ".csv"), show("params.json")))
        write_atomic(csv_path, simulate_flight(vehicle, fault=fault, seed=seed))
        result = replay_file(csv_path, params, vehicle=vehicle, options=options, progress=False)
        kinds = sorted({e["kind"] for e in result["events"]})
        first = result["events"][0]["t_s"] if result["events"] else None
        flights.append({"file": show(stem + ".csv"), "fault": fault, "samples": result["samples"],
                        "alarms": result["alarms"], "kinds": kinds, "first_event_t_s": first})
        text.append("  -> %s: %s (%d samples)" % (
            meaning, "no alarm" if not result["events"] else
            "%s first at %.1f s" % (", ".join(kinds), first), result["samples"]))
    from estimator.cautions import cautions

    text += [""] + ["- " + c for c in cautions("demo")]
    report = {
        "out_dir": out_dir,
        "preflight": datasheet,
        "compare": choices,
        "payload": payload,
        "fit": {key: c[key] for key in ("quadratic_share", "command_min", "thrust_max_N",
                                        "reference_voltage_V", "voltage_exponent", "density_exponent")},
        "static_factor": k["value"],
        "fitted_hover": fitted,
        "settings": as_mapping(settings),
        "bundle_files": bundle["files"],
        "flights": flights,
    }
    return report, "\n".join(text)


@click.command()
@click.option("--out", "out_dir", type=FILE_NAME, default="liftcal-demo", show_default=True, metavar="DIR",
              help="Folder for the demo's files (vehicle, bench sweep, parameter set, bundle, flights).")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
def demo(out_dir, as_json):
    """Run all three flows on the built-in demo scenario (invented; nothing to supply).

    Writes a vehicle file, a simulated bench sweep, its parameter set, exported settings,
    a board bundle and four simulated flights into DIR, and prints what each step found.
    """
    if as_json:
        report, _ = run_demo(out_dir)
        click.echo(dumps(report))
    else:
        from estimator.textwidth import fit_width
        run_demo(out_dir, emit=lambda text: click.echo(fit_width(text)))
