"""Pre-flight commands: ``liftcal air``, ``liftcal static`` and ``liftcal hover``.

Thin click layers over estimator.core (air, momentum theory) and estimator.preflight.report (the
hover sheet). Imports stay light: no numpy, no matplotlib.
"""

import click

from estimator.commands.options import FILE_NAME, Bounded, Quantity
from estimator.errors import InputError, shorten
from estimator.unit_required import is_bare
from estimator.units import plain_number
from estimator.jsonio import dumps



class StationPressure(Bounded):
    """--pressure of a site: read with its unit; its bounds and a missing unit are judged by _air,
    which knows the altitude (check_station_pressure), so a bare number's unit-slip hint can name
    the station pressure instead of a sea-level one the next run refuses (trial 7, item 11)."""

    def convert(self, value, param, ctx):
        typed = value if isinstance(value, str) else None
        if ctx is not None:
            ctx.meta["liftcal.typed.pressure"] = typed
        if typed is not None and is_bare(typed):  # read as Pa here; refused by check_station_pressure
            si = float(typed)
            if si - si != 0.0:  # nan, 1e999
                self.fail("%s is not a finite number" % shorten(typed), param, ctx)
            return si
        return Quantity.convert(self, value, param, ctx)


def check_station_pressure(pressure_Pa, altitude_m):
    """The bounds check of a --pressure (estimator.vehicle.check_quantity) with an altitude-aware
    hint: when the unit slip it names (1013 -> 1013hPa) is itself a sea-level pressure (QNH) at
    this altitude (core.atmosphere.station_pressure_problem), the hint is the station pressure of
    the standard atmosphere there (US Standard Atmosphere 1976). Raises InputError."""
    from estimator.core.atmosphere import standard_atmosphere, station_pressure_problem
    from estimator.jsonio import unit_slip
    from estimator.vehicle import QUANTITIES, check_quantity, quantity_schema, range_text

    ctx = click.get_current_context(silent=True)
    typed = ctx.meta.get("liftcal.typed.pressure") if ctx is not None else None
    unitless = typed is not None and is_bare(typed)
    try:
        check_quantity("pressure", pressure_Pa, typed, "--pressure", unit_required=unitless)
    except InputError:
        slip = unit_slip(pressure_Pa, "pressure", QUANTITIES["pressure"][3], quantity_schema("pressure"))
        bare = typed is not None and str(typed).strip().replace(".", "", 1).isdigit()
        if slip is None or not bare or station_pressure_problem(altitude_m, slip[1]) is None:
            raise
        station = standard_atmosphere(altitude_m)[1]
        raise InputError("--pressure: '%s' has no unit, as Pa it is outside %s, and %s%s would be a sea-level "
                         "pressure (QNH, what weather reports give), not the pressure at %.0f m: give the station pressure there, "
                         "about %.0fhPa in the standard atmosphere (--pressure %.0fhPa), or leave --pressure out"
                         % (str(typed).strip(), range_text("pressure"), str(typed).strip(), slip[0], altitude_m,
                            station / 100.0, station / 100.0)) from None
    if unitless:  # a unit is required, as for --altitude and --temperature (new-user trial 13, finding 12)
        raise InputError("--pressure: '%s' has no unit; write it with one, e.g. %sPa or %shPa"
                         % (typed.strip(), typed.strip(), plain_number(pressure_Pa / 100.0, 6, trim=True)))
    return pressure_Pa


def _air(altitude_m, temperature_C, pressure_Pa, humidity_pct):
    from estimator.core.atmosphere import AirInputError, site_air

    if pressure_Pa is not None:
        check_station_pressure(pressure_Pa, altitude_m)
    try:
        return site_air(altitude_m, temperature_C, pressure_Pa, humidity_pct or 0.0)
    except AirInputError as exc:  # the core names the input at fault: name its option
        raise InputError("--%s: %s" % (exc.quantity, exc)) from None


def _pressure_warning(altitude_m, pressure_Pa):
    """A --pressure above what weather usually gives at the altitude, short of the refusal: the
    warning of core.atmosphere.station_pressure_warning (a sea-level QNH given for the site?) or None."""
    from estimator.core.atmosphere import station_pressure_warning

    warning = station_pressure_warning(altitude_m, pressure_Pa)
    return None if warning is None else "--pressure: " + warning


def site_options(note):
    """The four options that describe the air at a site, shared by ``air`` and ``static``."""
    options = [
        # a bare number is refused, as in a vehicle file's site: 5000 may mean metres or feet, 30 C or F
        click.option("--altitude", type=Bounded("altitude", "altitude", unit_example="5000m or 5000ft"),
                     default="0m", show_default=True,
                     help="Geometric altitude of the site above sea level, with its unit (m, km, ft)" + note + "."),
        click.option("--temperature", type=Bounded("temperature", "temperature", unit_example="30C or 86F"),
                     default=None,
                     help="Outside air temperature, with its unit (C, K, F); default: standard atmosphere"
                          + note + "."),
        click.option("--pressure", type=StationPressure("pressure", "pressure", positive=True), default=None,
                     help="Station pressure, with its unit (Pa, hPa, kPa, mbar), not sea-level QNH; "
                          "default: standard" + note + "."),
        click.option("--humidity", type=Bounded("percent", "humidity"), default="0%", show_default=True,
                     help="Relative humidity (%)" + note + "."),
    ]

    def apply(func):
        for option in reversed(options):
            func = option(func)
        return func
    return apply


@click.command()
@site_options("")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
def air(altitude, temperature, pressure, humidity, as_json):
    """Air at a site: density, temperature, pressure and density altitude.

    US Standard Atmosphere 1976 from geometric altitude; humidity by partial
    pressures with Buck (1981) saturation pressure. Values outside a flying site's
    sensible range are refused with the range (schemas/vehicle.schema.json, site).
    """
    altitude_m, temperature_C, pressure_Pa, humidity_pct = altitude, temperature, pressure, humidity
    res = _air(altitude_m, temperature_C, pressure_Pa, humidity_pct)
    out = dict(res)
    out["altitude_m"] = altitude_m
    out["humidity_pct"] = humidity_pct
    from estimator.core.atmosphere import pressure_altitude_m, standard_atmosphere
    from estimator.core.constants import CELSIUS_ZERO_K
    from estimator.units import humidity_fraction_note, plain_number
    from estimator.vehicle import site_temperature_warning

    # a station pressure without --altitude: the air is at that pressure, not at '0 m' (new-user
    # trial 11, finding 7); its pressure altitude says where the standard atmosphere has it
    at_pressure = pressure_Pa is not None and \
        click.get_current_context().get_parameter_source("altitude") == click.core.ParameterSource.DEFAULT
    if at_pressure:
        out["pressure_altitude_m"] = pressure_altitude_m(pressure_Pa)

    note = site_temperature_warning(altitude_m, temperature_C)
    humid = humidity_fraction_note(humidity_pct, "--humidity")
    out["warnings"] = [w for w in (note, _pressure_warning(altitude_m, pressure_Pa), humid) if w]
    if pressure_Pa is None and click.get_current_context().get_parameter_source("altitude") \
            == click.core.ParameterSource.DEFAULT:  # said, as hover says it of a vehicle file (trial 14)
        out["warnings"].append("no --altitude: sea level assumed%s; give --altitude for the field you will fly at"
                               % (", standard atmosphere (15 C, 1013.25 hPa)" if temperature_C is None else ""))
    if at_pressure and temperature_C is None:
        out["warnings"].append(
            "no --temperature and no --altitude: the standard atmosphere's sea-level temperature, 15 C, is "
            "taken with the %.2f hPa given%s; give --temperature (or --altitude) for the site"
            % (pressure_Pa / 100.0, " (the standard atmosphere has %.2f hPa at about %.0f m, at %.1f C)" % (
                pressure_Pa / 100.0, out["pressure_altitude_m"],
                standard_atmosphere(out["pressure_altitude_m"])[0] - CELSIUS_ZERO_K)))
    if as_json:
        click.echo(dumps(out))
        return
    where = "%.2f hPa" % (pressure_Pa / 100.0) if at_pressure else "%.0f m" % altitude_m
    click.echo("air at %s: %.4f kg/m^3 (%.1f %% of sea-level standard)"
               % (where, res["density_kg_m3"], 100.0 * res["density_ratio"]))
    click.echo("  temperature      %.2f K (%.1f C)" % (res["temperature_K"], res["temperature_K"] - CELSIUS_ZERO_K))
    # hPa to 0.01: 101325 Pa is 1013.25 hPa, the standard sea-level pressure as everyone writes it
    click.echo("  pressure         %.0f Pa (%.2f hPa)" % (res["pressure_Pa"], res["pressure_Pa"] / 100.0))
    # 0.4 % shown as such, not rounded to '0 %' (new-user trial 11, finding 8)
    click.echo("  humidity         %s %% (vapour %.0f Pa)" % (plain_number(humidity_pct, 3, trim=True),
                                                            res["vapour_pressure_Pa"]))
    click.echo("  density altitude %.0f m" % res["density_altitude_m"])
    if at_pressure:
        click.echo("  pressure alt.    %.0f m (standard atmosphere; no --altitude given)" % out["pressure_altitude_m"])
    for w in out["warnings"]:
        from estimator.textwidth import wrap_line
        for line in wrap_line("  ! " + w, indent=4):
            click.echo(line)


@click.command()
# a bare number is refused, as for --altitude and --temperature: 1.22 may mean metres or
# a slip for inches (new-user trial 10, finding 10)
@click.option("--diameter", type=Bounded("length", "diameter", positive=True, unit_example="10in or 0.254m"),
              required=True, help="Rotor diameter, with its unit (in, m, cm, mm).")
@click.option("--power", type=Bounded("power", "power", positive=True), default=None,
              help="Electrical input power of one rotor (W, kW): gives thrust.")
@click.option("--thrust", type=Bounded("force", "thrust", positive=True, unit_example="500g or 4.9N"), default=None,
              help="Thrust of one rotor (N, g, gf, kgf, lbf): gives power.")
@click.option("--factor", "factor", type=Bounded("ratio", "factor", positive=True), default=None,
              help="Static thrust factor k, 0 < k <= 1 (default 0.3, a conservative rule of thumb "
                   "except for small rotors, where the output gives the measured band; "
                   "good small sets reach 0.5..0.7).")
@click.option("--density", type=Bounded("density", "density", positive=True), default=None,
              help="Air density (kg/m3); default: from --altitude etc.")
@site_options(" (used when --density is not given)")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
def static(diameter, power, thrust, factor, density, altitude, temperature, pressure, humidity,
           as_json):
    """Momentum-theory static thrust from power, or power from thrust, for one rotor.

    T = k (2 rho A P^2)^(1/3) with k the static thrust factor (k = 1 is the ideal
    actuator disk; efficiency eta = k^1.5).
    """
    from estimator.core.momentum import disk_area_m2
    from estimator.preflight.static_rotor import format_static, static_rotor

    if (power is None) == (thrust is None):
        raise InputError("static: give exactly one of --power or --thrust")
    if density is not None and (temperature is not None or pressure is not None or altitude != 0.0):
        raise InputError("--density: give either --density or --altitude/--temperature/--pressure, not both")
    warning = None
    if density is None:
        density = _air(altitude, temperature, pressure, humidity)["density_kg_m3"]
        warning = _pressure_warning(altitude, pressure)
    if thrust is not None:
        _check_disk_loading(thrust, disk_area_m2(diameter), diameter)
    out = static_rotor(diameter, density, factor, power_W=power, thrust_N=thrust)
    out["warnings"] = [warning] if warning else []
    if as_json:
        click.echo(dumps(out))
    else:
        from estimator.textwidth import fit_width
        click.echo(fit_width("\n".join(format_static(out, power is not None,
                                                      click.get_current_context().meta.get("liftcal.typed.thrust")))))


def _check_disk_loading(thrust_N, area_m2, diameter_m):
    """Refuse a thrust no open propeller of this diameter makes (disk loading out of bounds)."""
    from estimator.jsonio import within
    from estimator.vehicle import quantity_schema

    sub = quantity_schema("disk_loading")
    if within(thrust_N / area_m2, sub):
        return
    # (a bare number never gets here: --thrust needs its unit, a bare 200 read as 200 N where a
    # builder meant grams: new-user trial 24, finding 2)
    hint = "the diameter too small?"
    raise InputError("--thrust: %g N on a %.3g m rotor is a disk loading of %.0f N/m^2, above the "
                     "sensible %g N/m^2 for an open propeller: %s"
                     % (thrust_N, diameter_m, thrust_N / area_m2, sub["maximum"], hint))


@click.command()
@click.argument("vehicle_file", type=FILE_NAME, metavar="VEHICLE.json")
@click.option("--params", "params_file", type=FILE_NAME, default=None, metavar="PARAMS.json",
              help="A fitted parameter set from `liftcal fit`: thrust and power from the bench.")
@click.option("--payload", "payload_text", default=None, metavar="RANGE|LIST",
              help="Payloads to add to the mass, with their unit: a range 0..2kg (a round step of 1, 2, "
                   "2.5 or 5 x 10^k near an eighth of the range, ends included: 7 to 13 payloads; 0..1kg "
                   "gives 0, 0.1, ..., 1 kg, 11 payloads, 0..3kg gives 0, 0.5, ..., 3 kg, 7) or a list "
                   "0,500g,1kg (a number without a unit takes the list's last unit: 0,0.25,0.5kg): "
                   "endurance and margins per payload and the largest payload that keeps them.")
@click.option("--job-time", "job_time", type=Quantity("time", positive=True, unit_example="15min or 900s"),
              default=None,
              help="With --payload: the hover time the job needs, with its unit (15min, 900s); "
                   "a payload must reach it.")
@click.option("--plot", "plot_file", type=FILE_NAME, default=None, metavar="PNG",
              help="With --payload: draw endurance and hover command against payload.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of the sheet.")
def hover(vehicle_file, params_file, payload_text, job_time, plot_file, as_json):
    """Pre-flight sheet for a vehicle file: will it hover, margin, endurance.

    Hover command at full / nominal / empty pack, thrust-to-weight, motor, ESC and
    pack currents, endurance by discharging the pack to its cutoff or landing reserve,
    and warnings. The propeller may be given by size and pitch (estimated) or by its
    coefficients. With --params the bench fit replaces the datasheet model. With
    --payload: a table of payloads and the largest that keeps the margins (from the bench
    fit when --params is given).
    """
    from estimator.preflight.report import format_sheet, hover_report
    from estimator.vehicle import load_vehicle

    if (job_time is not None or plot_file is not None) and payload_text is None:
        raise InputError("--%s: goes with --payload (e.g. --payload 0..2kg)"
                         % ("job-time" if job_time is not None else "plot"))
    replaced = None
    if plot_file is not None:
        from estimator.outputs import check_output
        from estimator.replacing import replaced_line
        check_output(plot_file, "png", inputs=(vehicle_file, params_file), option="--plot")
        replaced = replaced_line(plot_file, "png")  # README: a replaced liftcal file is named in one line
    vehicle = load_vehicle(vehicle_file)
    params = None
    if params_file is not None:
        from estimator.params import check_vehicle_match, load_params  # the bench flow's loader
        params = load_params(params_file)
        check_vehicle_match(params, vehicle, params_file, vehicle_file)
    report = hover_report(vehicle, params)
    if params_file is not None:
        from estimator.outputs import seal_of
        if seal_of(params_file) == "broken":
            report["warnings"].append(
                "%s was edited since liftcal wrote it (its content seal no longer matches): this sheet "
                "comes from its motor and power models, so an edit of its thrust_curve or hover "
                "values may not show here; fit the sweep again rather than editing the set" % params_file)
    payload, unit = None, "kg"
    if payload_text is not None:
        from estimator.preflight.payload import (check_bare_payload, check_payload_size, parse_payloads,
                                                 payload_table)
        payloads, unit = parse_payloads(payload_text)
        check_bare_payload(payload_text, payloads, vehicle["mass_kg"])
        check_payload_size(payload_text, payloads, vehicle["mass_kg"], unit)
        payload = payload_table(vehicle, payloads, None if job_time is None else job_time / 60.0, params)
        report["payload"] = payload
        report["payload_unit"] = unit
        if plot_file is not None:
            from estimator.preflight.plots import plot_payload
            plot_payload(plot_file, payload, report["name"], unit)
            report["plot"] = plot_file
            report["replaced"] = [replaced] if replaced else []
    if as_json:
        click.echo(dumps(report))
        return
    section5 = None
    if payload is not None:  # before the closing cautions (format_sheet)
        from estimator.preflight.payload import format_payload_table
        section5 = format_payload_table(payload, unit).rstrip("\n")
        if plot_file is not None:
            section5 += "\n   plot: %s" % plot_file + ("\n   " + replaced if replaced else "")
    click.echo(format_sheet(report, section5), nl=False)


@click.command()
@click.argument("vehicle_file", type=FILE_NAME, metavar="VEHICLE.json")
@click.option("--vary", "varies", multiple=True, required=True, metavar="KEY=V1,V2,...",
              help="A key of the vehicle file and the values to try, e.g. battery.capacity=4000mAh,5000mAh "
                   "or propeller.size=10x4.5in,11x5in; several --vary give every combination.")
@click.option("--plot", "plot_file", type=FILE_NAME, default=None, metavar="PNG",
              help="Draw endurance against hover command, one point per combination.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of the table.")
def compare(vehicle_file, varies, plot_file, as_json):
    """Compare candidate builds: every combination of the --vary values, ranked.

    One row per combination with hover command, thrust-to-weight, motor and pack
    current at hover, endurance and the margins it keeps; ranked by endurance among
    the combinations that keep every margin, then the rest.
    """
    import sys

    from estimator.jsonio import load_json
    from estimator.preflight.compare import compare_rows, format_table, parse_vary

    variations = [parse_vary(text) for text in varies]
    keys = [".".join(p) for p, _ in variations]
    for key in keys:
        if keys.count(key) > 1:
            raise InputError("--vary %s: the key is given twice; list all its values in one --vary" % key)
    replaced = None
    if plot_file is not None:
        from estimator.outputs import check_output
        from estimator.replacing import replaced_line
        check_output(plot_file, "png", inputs=(vehicle_file,), option="--plot")
        replaced = replaced_line(plot_file, "png")  # README: a replaced liftcal file is named in one line
    document = load_json(vehicle_file)
    from estimator.vehicle import check_vehicle
    name = check_vehicle(document, vehicle_file).get("name", "vehicle")
    progress = None
    if not as_json and sys.stderr.isatty():
        def progress(done, total):
            if total >= 20:
                sys.stderr.write("\rcompare: %d of %d combinations" % (done, total))
                if done == total:
                    sys.stderr.write("\r" + " " * 40 + "\r")
                sys.stderr.flush()
    result = compare_rows(document, vehicle_file, variations, progress)
    result["name"] = name
    if plot_file is not None:
        from estimator.preflight.plots import plot_compare
        plot_compare(plot_file, result, name)
        result["plot"] = plot_file
        result["replaced"] = [replaced] if replaced else []
    if as_json:
        from estimator.preflight.report import CAUTIONS
        result["cautions"] = list(CAUTIONS)
        click.echo(dumps(result))
        return
    click.echo(format_table(result, name), nl=False)
    if plot_file is not None:
        click.echo("plot: %s" % plot_file)
        if replaced:
            click.echo(replaced)
    from estimator.preflight.report import CAUTIONS
    from estimator.textwidth import wrap_line
    click.echo("")
    for caution in CAUTIONS:
        click.echo("\n".join(wrap_line("- " + caution)))
