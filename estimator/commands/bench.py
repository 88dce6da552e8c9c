"""The bench flow on the command line: ``liftcal fit``, ``liftcal check``, ``liftcal export``.

numpy, jsonschema and matplotlib are imported inside the commands, never at module top.
"""

import os

import click

from estimator.cautions import SHORT
from estimator.commands.options import FILE_NAME, Bounded, Number
from estimator.names import shown
from estimator.jsonio import dumps


def hover_thrust_N(vehicle):
    """The vehicle's weight per rotor [N] (mass_kg [kg] x standard gravity / rotor count): the
    hover thrust a load-cell offset is judged against (estimator.bench.load_cell.tare_offset)."""
    from estimator.core.constants import STANDARD_GRAVITY_M_S2

    return vehicle["mass_kg"] * STANDARD_GRAVITY_M_S2 / vehicle["rotors"]["count"]


def fit_for_vehicle(bench_file, vehicle, **fit_options):
    """Fit a bench CSV and add a vehicle's hover values (fit_sweep's options); the parameter
    set, complete and checked (params.complete_set)."""
    from estimator.bench.sweep import fit_bench_file
    from estimator.params import complete_set

    params = fit_bench_file(bench_file, default_diameter_m=vehicle["propeller"]["diameter_m"],
                            hover_thrust_N=hover_thrust_N(vehicle), **fit_options)
    return complete_set(params, bench_file, vehicle, vehicle_hover(params, vehicle)[1], bench_file)


def judged_words(report):
    """The thrust-to-weight as `hover --params` judges and marks it (preflight.warnings.
    judged_thrust_to_weight_text: one rule), with what it is: reachable before the pack's
    loaded cutoff, or full command on the nominal pack (new-user trial 7, finding 4: the fit
    said 5.91 where the sheet judged 5.11*)."""
    from estimator.preflight.warnings import (REACHABLE_MARK, judged_thrust_to_weight,
                                              judged_thrust_to_weight_text, thrust_to_weight_text)

    from estimator.units import command_text

    text = judged_thrust_to_weight_text(report)
    if judged_thrust_to_weight(report)[1]:
        # the command in the report's own unit, as its other commands (trial 8, item 9)
        unit = report.get("command_unit") or "-"
        command = ("%.2f" % report["reachable_command"] if unit == "-"
                   else command_text(report["reachable_command"], unit))
        return ("%s (%s: reachable at command %s, where a nominal pack reaches its loaded cutoff; full "
                "command would give %s but is NOT REACHABLE on a nominal pack)"
                % (text, REACHABLE_MARK, command,
                   thrust_to_weight_text(report.get("thrust_to_weight"))))
    return "%s (full command, nominal pack)" % text


def vehicle_hover(params, vehicle):
    """The pre-flight flow's answer for a parameter set fitted without a vehicle (this command
    chains the two flows; neither imports the other): (the vehicle's hover report from the set,
    its warnings are the vehicle's margins; the set's hover block from that report, a
    measured_rotor.HoverBlock that params.complete_set takes)."""
    from estimator.preflight.measured_rotor import hover_block, hover_from_params

    # the vehicle's warnings write commands in the sweep's unit, as the fit's own do
    report = hover_from_params(vehicle, params, params["provenance"]["units"]["command"])
    return report, hover_block(vehicle, params, report)


@click.command()
@click.argument("bench_file", type=FILE_NAME, metavar="BENCH.csv")
@click.option("--out", "out_file", type=FILE_NAME, required=True, metavar="PARAMS.json",
              help="Where to write the parameter set (written atomically).")
@click.option("--vehicle", "vehicle_file", type=FILE_NAME, default=None, metavar="VEHICLE.json",
              help="Add hover values and rotor count for this vehicle at its site.")
@click.option("--diameter", type=Bounded("length", "diameter", positive=True), default=None,
              help="Propeller diameter (e.g. 10in, 0.254); else '# diameter:' in the CSV or the vehicle.")
@click.option("--density", type=Bounded("density", "density", positive=True), default=None,
              help="Bench air density [kg/m^3]; overrides the CSV comments (not with --altitude etc.).")
# a bare number is refused, as by air and static: 5000 may mean metres or feet, 30 C or F (trial 9, finding 8)
@click.option("--altitude", type=Bounded("altitude", "altitude", unit_example="300m or 1000ft"), default=None,
              help="Bench altitude, with its unit (e.g. 300m, 1000ft).")
@click.option("--temperature", type=Bounded("temperature", "temperature", unit_example="21C or 70F"), default=None,
              help="Bench air temperature, with its unit (e.g. 21C, 70F).")
@click.option("--pressure", type=Bounded("pressure", "pressure", positive=True, unit_example="97000Pa or 970hPa"),
              default=None, help="Bench station pressure, with its unit (e.g. 1013hPa), not sea-level QNH.")
@click.option("--humidity", type=Bounded("percent", "humidity"), default=None,
              help="Bench relative humidity (e.g. 40%).")
@click.option("--voltage-exponent", type=Number((0.5, 3.0, "the parameter set's bounds, "
                                                 "schemas/params.schema.json")), default=None,
              help="Fix the voltage exponent n instead of fitting it.")
@click.option("--plot", "plot_file", type=FILE_NAME, default=None, metavar="PNG",
              help="Also draw the fit, its interval and residuals, and power against the ideal bound.")
@click.option("--replace", "replace", is_flag=True,
              help="Replace the parameter set at --out even when it was fitted from another bench "
                   "file or for another propeller (without it liftcal refuses; a re-fit of the same "
                   "file and rotor replaces it, and says so).")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
def fit(bench_file, out_file, vehicle_file, diameter, density, altitude, temperature, pressure,
        humidity, voltage_exponent, plot_file, replace, as_json):
    """Fit a bench sweep CSV into a validated parameter set.

    The CSV has a name[unit] header: {header}; '# altitude:', '# temperature:', '# pressure:', '# humidity:'
    or '# density:' comments give the bench air (altitude and temperature with their unit, e.g.
    300m, 21C) and '# diameter:' the propeller.
    """
    from estimator.bench.summary import fit_json, fit_text
    from estimator.bench.sweep import fit_sweep
    from estimator.outputs import check_outputs
    from estimator.params import complete_set, write_params

    check_outputs([(out_file, "params", "--out"), (plot_file, "png", "--plot")],
                  inputs=(bench_file, vehicle_file))
    vehicle = None
    if vehicle_file is not None:
        from estimator.vehicle import load_vehicle
        vehicle = load_vehicle(vehicle_file)
    fitted = fit_sweep(bench_file, diameter_m=diameter, density_kg_m3=density, altitude_m=altitude,
                       temperature_C=temperature, pressure_Pa=pressure, humidity_pct=humidity,
                       voltage_exponent=voltage_exponent,
                       default_diameter_m=vehicle and vehicle["propeller"]["diameter_m"],
                       hover_thrust_N=vehicle and hover_thrust_N(vehicle))
    report = hover = None
    if vehicle is not None:
        report, hover = vehicle_hover(fitted.params, vehicle)
    params = complete_set(fitted.params, out_file, vehicle, hover, bench_file)
    shown, tw_text = list(params["warnings"]), None
    if vehicle is not None:
        # the vehicle's margins (full-command pack sag, motor and pack current, thin air...) as
        # the hover sheet gives them from this parameter set: printed, not stored (they belong
        # to the vehicle, and `hover --params` computes them afresh for the vehicle asked about)
        shown, tw_text = list(dict.fromkeys(params["warnings"] + report["warnings"])), judged_words(report)
    from estimator.replacing import check_set_replacement, replaced_line

    replaced = [line for line in (check_set_replacement(out_file, params, replace),
                                  replaced_line(plot_file, "png") if plot_file else None) if line]
    plot_existed = plot_file is not None and os.path.lexists(plot_file)
    if plot_file is not None:
        from estimator.bench.plots import plot_fit
        plot_fit(plot_file, params, fitted.rows)
    try:
        write_params(out_file, params)
    except Exception:
        if plot_file is not None and not plot_existed:  # no half output: the new plot goes too
            os.unlink(plot_file)
        raise
    if as_json:
        out = fit_json(params, shown, fitted.columns, out_file, plot_file)
        out["replaced"] = replaced
        click.echo(dumps(out))
    else:
        click.echo(fit_text(params, out_file, shown, fitted.columns, tw_text))
        from estimator.textwidth import fit_width

        for line in replaced:
            click.echo(fit_width(line))
        if plot_file:
            click.echo("plot written to %s" % plot_file)


def _header_units():
    """The bench header's columns and units as the reader takes them (its UNITS and OPTIONAL
    tables: one source)."""
    from estimator.bench.columns import OPTIONAL, UNITS

    def cells(table):
        return ", ".join("%s[%s]" % (name, "|".join(units)) for name, units in table.items())

    return "%s; optional (read and checked, not used by the fit) %s" % (cells(UNITS), cells(OPTIONAL))


fit.help = fit.help.replace("{header}", _header_units())


@click.command()
@click.argument("params_file", type=FILE_NAME, metavar="PARAMS.json")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
def check(params_file, as_json):
    """Validate a parameter set against its schema (exit 0 when valid, 2 with the JSON path).

    Also says whether the set has hover values and whether it was edited after liftcal wrote
    it (its content seal). With --json, an invalid file also prints one JSON object
    ({"valid": false, "error": ...}) besides the error line on stderr.
    """
    from estimator.errors import InputError
    from estimator.params import load_params

    try:
        params = load_params(params_file)
    except InputError as exc:
        exc.details = {"valid": False, "file": params_file}  # cli.fail prints them under --json
        raise
    from estimator.outputs import seal_of

    seal = seal_of(params_file) or "none"
    seal_text = {"intact": "unchanged since liftcal wrote it",
                 "broken": "EDITED since liftcal wrote it (its content seal no longer matches): "
                           "liftcal reads the edited values",
                 "none": "no content seal (an older liftcal, or made by hand): liftcal cannot tell "
                         "whether it was edited"}[seal]
    if as_json:
        click.echo(dumps({"valid": True, "file": params_file, "model": params["model"],
                          "schema_version": params["schema_version"],
                          "has_hover": "hover" in params, "content_seal": seal}))
    else:
        from estimator.textwidth import fit_width

        click.echo(fit_width("%s: valid parameter set (%s, schema version %d), %s; %s"
                             % (params_file, params["model"], params["schema_version"],
                                "with hover values" if "hover" in params
                                else "no hover values (fit with --vehicle to add them; export needs them)",
                                seal_text)))


def settings_text(settings, mapping, params_name, map_name):
    """The settings file's text as ``liftcal export`` prints and writes it: the header naming the
    parameter set and the map (file names as shown), then the lines in each entry's decimals.
    The demo's settings.txt is the same text (new-user trial 11, finding 12: it said 15.2 V and
    'through the example map' where export says 15.20 V and 'through example-map.json (8)')."""
    from estimator.bench.export import format_lines

    # the count says what it counts (new-user trial 13, finding 12: a bare '(8)' was never explained)
    header = "liftcal settings from %s through %s (%d setting%s); %s" % (
        shown(os.path.basename(params_name)), shown(os.path.basename(map_name)), len(settings),
        "" if len(settings) == 1 else "s", SHORT)
    return format_lines(in_map_decimals(settings, mapping), header)


def settings_json_name(path):
    """True when an export --out name ends in .json: the file is then the JSON document, else the
    settings lines (the name says the format, as fit's .json parameter sets; new-user trial 13,
    finding 9)."""
    return os.fspath(path).lower().endswith(".json")


def export_notes(settings, params):
    """The notes export shows under the settings: a value lost to rounding, what the top-thrust values
    mean, then the fit's warnings ('fit: ...')."""
    from estimator.bench.export import lost_value_notes

    return (lost_value_notes(settings) + top_thrust_notes(settings, params)
            + ["fit: " + w for w in params.get("warnings", [])])


def with_notes(text, notes):
    """A settings file's text with the notes export shows as '# !' lines after the settings (the
    file kept beside the controller says what the screen said: new-user trial 12, finding 10)."""
    return text + "".join("# ! %s\n" % " ".join(n.splitlines()) for n in notes)


def in_map_decimals(settings, mapping):
    """The settings with each value as text in the decimals its map entry asks for (0.280 for
    3 decimals, not 0.28); an entry without ``decimals`` keeps the value as it is."""
    out = []
    for setting, entry in zip(settings, mapping["settings"]):
        decimals = entry.get("decimals")
        value = setting["value"]
        if decimals is not None and not isinstance(value, bool):
            value = "%d" % value if decimals == 0 else "%.*f" % (decimals, value)
        out.append(dict(setting, value=value))
    return out


def _fold_arrows(text):
    """Settings lines for an 80-column terminal: a line too long continues at its arrow
    (``<- source = ...``) on the next line, indented (estimator.textwidth for the rest)."""
    from estimator.textwidth import WIDTH, fit_width, wrap_line

    out = []
    for line in text.rstrip("\n").split("\n"):
        if len(line) > WIDTH and "  <- " in line:
            head, tail = line.split("  <- ", 1)
            out += [head.rstrip()] + wrap_line("    <- " + tail, indent=7)
        else:
            out.append(line)
    return fit_width("\n".join(out) + "\n")


def top_thrust_notes(settings, params):
    """A note for each exported setting taken from thrust_curve.thrust_max_N: it is the curve
    at the reference voltage, which a pack under full command does not hold, and above the
    thrust measured when the fit said so (new-user trial 7, finding 4: 'liftcurve.top_grams
    2842 gf' was read as the motor's top thrust; the sweep measured 2465 g at 23.0 V)."""
    ref = params["thrust_curve"]["reference_voltage_V"]
    where = next(("%s = %.2f V" % (s["name"], ref) for s in settings
                  if s["source"] == "thrust_curve.reference_voltage_V"),
                 "%.2f V (thrust_curve.reference_voltage_V)" % ref)
    c = params["thrust_curve"]
    above = (c.get("command_swept_max", c["command_max"]) < c["command_max"]  # extrapolated
             or any("above the highest thrust measured" in w for w in params.get("warnings", [])))
    return ["%s %s %s is the curve's full-command thrust at %s%s; on a pack, full command gives the thrust "
            "at the pack's own sagged voltage" % (
                s["name"], s["value"], s["unit"], where,
                ", ABOVE the highest thrust the sweep measured (see the fit's warning below)" if above else "")
            for s in settings if s["source"] == "thrust_curve.thrust_max_N"]


@click.command()
@click.argument("params_file", type=FILE_NAME, metavar="PARAMS.json")
@click.option("--map", "map_file", type=FILE_NAME, default=None, metavar="MAP.json",
              help="Your mapping of our keys to your controller's names (default: the shipped "
                   "example with invented names).")
@click.option("--out", "out_file", type=FILE_NAME, default=None, metavar="FILE",
              help="Also write the settings to FILE (atomically); its name says the format: FILE.json "
                   "a JSON document (model liftcal.settings/1) holding the settings, notes and the "
                   "fit's warnings, any other name the lines with the notes as '# !' lines (with or "
                   "without --json). Replaces only a settings file liftcal wrote.")
@click.option("--from-edited", "from_edited", is_flag=True,
              help="Export a parameter set edited since liftcal wrote it (its content seal broken); "
                   "without it liftcal refuses such a set.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object {name: value}.")
def export(params_file, map_file, out_file, from_edited, as_json):
    """Map a parameter set to your flight controller's setting names.

    Each setting is round(value * scale + offset, decimals); a value outside the map's
    bounds is refused, never clipped. Props off while you load settings into a controller.
    """
    from estimator.bench.export import EXAMPLE_MAP, as_mapping, export_settings, load_map
    from estimator.cautions import cautions
    from estimator.outputs import check_output, write_text
    from estimator.params import load_params

    from estimator.replacing import replaced_line

    replaced = None
    if out_file is not None:
        check_output(out_file, "settings", inputs=(params_file, map_file))
        replaced = replaced_line(out_file, "settings")
    params = load_params(params_file, from_edited)
    from estimator.params import edited_set_warning

    edited = edited_set_warning(params_file, from_edited, "the settings file", params)
    path = EXAMPLE_MAP if map_file is None else map_file
    mapping = load_map(path)
    settings = export_settings(params, mapping, shown(path) if map_file is not None else
                               "the shipped example-map.json", shown(params_file))
    notes = export_notes(settings, params)
    lines = settings_text(settings, mapping, params_file, path)
    if edited:  # under the header line
        head, rest = lines.split("\n", 1)
        lines = "%s\n# WARNING: %s\n%s" % (head, edited, rest)
    text = dumps(as_mapping(settings)) + "\n" if as_json else lines
    if out_file is not None:
        # a file carries its mark, so liftcal knows it as its own later (outputs.py): the
        # lines start with the '# liftcal settings' header, a JSON file names its model; the
        # JSON file is what a person loads into a controller, so it carries the cautions too
        # the notes (what the values mean, the fit's warnings) go into the text file too, as '#'
        # lines: the file kept beside the controller says what the screen said (new-user trial 12,
        # finding 10). The file's format follows its name, .json a JSON document, any other the
        # lines, whatever the screen shows (new-user trial 13, finding 9: 'fresh.json' held the lines)
        kept = with_notes(lines, notes) if not settings_json_name(out_file) else dumps({
            "schema_version": 1, "model": "liftcal.settings/1",
            "parameter_set": os.path.basename(params_file), "map": os.path.basename(path),
            "settings": as_mapping(settings), "warnings": ([edited] if edited else []) + notes,
            "cautions": cautions("settings")}) + "\n"
        write_text(out_file, kept, "settings")
    from estimator.textwidth import fit_width

    if edited:  # before the settings (on stderr under --json: stdout holds the settings only)
        click.echo("WARNING: " + edited if as_json else fit_width("WARNING: " + edited), err=as_json)
    click.echo(text if as_json else _fold_arrows(text), nl=False)
    for note in notes:  # what the values mean and what the fit warned about them
        click.echo("! " + note if as_json else fit_width("! " + note), err=as_json)
    if out_file is not None and not as_json:
        click.echo("settings written to %s%s" % (out_file, " (a JSON document, model liftcal.settings/1)"
                                                  if settings_json_name(out_file) else ""))
    if replaced:  # under --json stdout holds the settings object only
        click.echo(replaced if as_json else fit_width(replaced), err=as_json)
