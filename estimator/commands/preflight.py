"""Pre-flight commands: ``liftcal air``, ``liftcal static`` and ``liftcal hover``.

Thin click layers over estimator.core (air, momentum theory) and estimator.preflight (the
hover sheet). Imports stay light: no numpy, no matplotlib.
"""

import click

from estimator.clitypes import Quantity
from estimator.errors import InputError
from estimator.jsonio import dumps

# common practice rule of thumb for small electric propeller sets (design notes sec. 3a):
# conservative, not a value to expect
DEFAULT_STATIC_FACTOR = 0.3


def _air(altitude_m, temperature_C, pressure_Pa, humidity_pct):
    from estimator.core.atmosphere import site_air

    if humidity_pct is not None and not 0.0 <= humidity_pct <= 100.0:
        raise InputError("--humidity: %g %% is outside 0..100 %%" % humidity_pct)
    try:
        return site_air(altitude_m, temperature_C, pressure_Pa, humidity_pct or 0.0)
    except ValueError as exc:
        raise InputError("--altitude/--temperature/--pressure: %s" % exc) from None


@click.command()
@click.option("--altitude", type=Quantity("altitude"), default="0m", show_default=True,
              help="Geometric altitude of the site above sea level (m, km, ft).")
@click.option("--temperature", type=Quantity("temperature"), default=None,
              help="Outside air temperature (C, K, F); default: standard atmosphere.")
@click.option("--pressure", type=Quantity("pressure", positive=True), default=None,
              help="Station pressure (Pa, hPa, kPa, mbar), not sea-level QNH; default: standard.")
@click.option("--humidity", type=Quantity("percent"), default="0%", show_default=True,
              help="Relative humidity (%).")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
def air(altitude, temperature, pressure, humidity, as_json):
    """Air at a site: density, temperature, pressure and density altitude.

    US Standard Atmosphere 1976 from geometric altitude; humidity by partial
    pressures with Buck (1981) saturation pressure.
    """
    altitude_m, temperature_C, pressure_Pa, humidity_pct = altitude, temperature, pressure, humidity
    res = _air(altitude_m, temperature_C, pressure_Pa, humidity_pct)
    out = dict(res)
    out["altitude_m"] = altitude_m
    out["humidity_pct"] = humidity_pct
    if as_json:
        click.echo(dumps(out))
        return
    click.echo("air at %.0f m: %.4f kg/m^3 (%.1f %% of sea-level standard)"
               % (altitude_m, res["density_kg_m3"], 100.0 * res["density_ratio"]))
    click.echo("  temperature      %.2f K (%.1f C)" % (res["temperature_K"], res["temperature_K"] - 273.15))
    click.echo("  pressure         %.0f Pa (%.1f hPa)" % (res["pressure_Pa"], res["pressure_Pa"] / 100.0))
    click.echo("  humidity         %.0f %% (vapour %.0f Pa)" % (humidity_pct, res["vapour_pressure_Pa"]))
    click.echo("  density altitude %.0f m" % res["density_altitude_m"])


@click.command()
@click.option("--diameter", type=Quantity("length", positive=True), required=True,
              help="Rotor diameter (m, cm, mm, in).")
@click.option("--power", type=Quantity("power", positive=True), default=None,
              help="Electrical input power of one rotor (W, kW): gives thrust.")
@click.option("--thrust", type=Quantity("force", positive=True), default=None,
              help="Thrust of one rotor (N, g, gf, kgf, lbf): gives power.")
@click.option("--factor", "factor", type=Quantity("ratio", positive=True), default=None,
              help="Static thrust factor k, 0 < k <= 1 (default 0.3, a conservative rule of thumb).")
@click.option("--density", type=Quantity("density", positive=True), default=None,
              help="Air density (kg/m3); default: from --altitude etc.")
@click.option("--altitude", type=Quantity("altitude"), default="0m", show_default=True,
              help="Site altitude when --density is not given.")
@click.option("--temperature", type=Quantity("temperature"), default=None,
              help="Outside air temperature when --density is not given.")
@click.option("--pressure", type=Quantity("pressure", positive=True), default=None,
              help="Station pressure when --density is not given.")
@click.option("--humidity", type=Quantity("percent"), default="0%",
              help="Relative humidity when --density is not given.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
def static(diameter, power, thrust, factor, density, altitude, temperature, pressure, humidity,
           as_json):
    """Momentum-theory static thrust from power, or power from thrust, for one rotor.

    T = k (2 rho A P^2)^(1/3) with k the static thrust factor (k = 1 is the ideal
    actuator disk; efficiency eta = k^1.5).
    """
    from estimator.core import momentum

    diameter_m, power_W, thrust_N, density_kg_m3 = diameter, power, thrust, density
    altitude_m, temperature_C, pressure_Pa, humidity_pct = altitude, temperature, pressure, humidity
    if (power_W is None) == (thrust_N is None):
        raise InputError("static: give exactly one of --power or --thrust")
    if factor is not None and factor > 1.0:
        raise InputError("--factor: %g is above 1, which momentum theory forbids (k <= 1 always)" % factor)
    density_given = density_kg_m3 is not None
    if density_given and (temperature_C is not None or pressure_Pa is not None or altitude_m != 0.0):
        raise InputError("--density: give either --density or --altitude/--temperature/--pressure, not both")
    if not density_given:
        density_kg_m3 = _air(altitude_m, temperature_C, pressure_Pa, humidity_pct)["density_kg_m3"]
    k = DEFAULT_STATIC_FACTOR if factor is None else factor
    area = momentum.disk_area_m2(diameter_m)
    out = {"diameter_m": diameter_m, "disk_area_m2": area, "density_kg_m3": density_kg_m3,
           "static_factor": k, "static_factor_source": "default rule of thumb (common practice)"
           if factor is None else "given", "efficiency": k ** 1.5}
    if power_W is not None:
        out["power_W"] = power_W
        out["ideal_thrust_N"] = momentum.ideal_thrust_N(power_W, density_kg_m3, area)
        out["thrust_N"] = momentum.thrust_from_power_N(power_W, k, density_kg_m3, area)
        thrust = out["thrust_N"]
    else:
        out["thrust_N"] = thrust_N
        out["ideal_power_W"] = momentum.ideal_power_W(thrust_N, density_kg_m3, area)
        out["power_W"] = momentum.power_from_thrust_W(thrust_N, k, density_kg_m3, area)
        thrust = thrust_N
    out["induced_velocity_m_s"] = momentum.induced_velocity_m_s(thrust, density_kg_m3, area)
    out["slipstream_velocity_m_s"] = 2.0 * out["induced_velocity_m_s"]
    out["disk_loading_N_m2"] = momentum.disk_loading_N_m2(thrust, area)
    if as_json:
        click.echo(dumps(out))
        return
    click.echo("one rotor, D = %.3f m (disk %.4f m^2), air %.3f kg/m^3, k = %.2f%s"
               % (diameter_m, area, density_kg_m3, k, " (rule of thumb)" if factor is None else ""))
    if power_W is not None:
        click.echo("  %.0f W in -> %.2f N of thrust (ideal actuator disk: %.2f N)"
                   % (power_W, out["thrust_N"], out["ideal_thrust_N"]))
    else:
        click.echo("  %.2f N of thrust needs %.0f W in (ideal actuator disk: %.0f W)"
                   % (thrust_N, out["power_W"], out["ideal_power_W"]))
    click.echo("  induced velocity %.1f m/s, slipstream %.1f m/s, disk loading %.0f N/m^2"
               % (out["induced_velocity_m_s"], out["slipstream_velocity_m_s"], out["disk_loading_N_m2"]))
    click.echo("  estimate only: confirm on a clamped, guarded stand, nobody in the plane of the rotor")


@click.command()
@click.argument("vehicle_file", metavar="VEHICLE.json")
@click.option("--params", "params_file", default=None, metavar="PARAMS.json",
              help="A fitted parameter set from `liftcal fit`: thrust and power from the bench.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of the sheet.")
def hover(vehicle_file, params_file, as_json):
    """Pre-flight sheet for a vehicle file: will it hover, margin, endurance.

    Hover command at full / nominal / empty pack, thrust-to-weight, hover current
    and power, endurance from the usable capacity, and warnings.
    """
    from estimator.preflight import format_sheet, hover_report
    from estimator.vehicle import load_vehicle

    vehicle = load_vehicle(vehicle_file)
    params = None
    if params_file is not None:
        from estimator.params import load_params  # the bench flow's loader
        params = load_params(params_file)
    report = hover_report(vehicle, params)
    if as_json:
        click.echo(dumps(report))
    else:
        click.echo(format_sheet(report), nl=False)
