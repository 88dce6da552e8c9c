"""ICAO / US Standard Atmosphere 1976 below 20 km, site air, density and pressure altitude.

Troposphere (lapse 6.5 K per geopotential km) up to 11 km and the isothermal layer from
11 to 20 km, both in geopotential height; inputs are geometric altitudes (maps, GNSS)
converted with H = r0 h / (r0 + h). Source: U.S. Standard Atmosphere, 1976
(NOAA-S/T 76-1562), eqs. 18, 23 and 33a/33b; ICAO Doc 7488 uses the same model below 32 km.
SI units: m, K, Pa, kg/m^3.
"""

import math

from estimator.core.constants import (ATMOSPHERE_BOTTOM_GEOPOTENTIAL_M, CELSIUS_ZERO_K,
                                      DRY_AIR_GAS_CONSTANT_J_KG_K, EARTH_RADIUS_M,
                                      ISOTHERMAL_TOP_GEOPOTENTIAL_M, SEA_LEVEL_DENSITY_KG_M3,
                                      SEA_LEVEL_PRESSURE_PA, QNH_RANGE_PA,
                                      STATION_PRESSURE_ABOVE_STANDARD_MAX,
                                      STATION_PRESSURE_ABOVE_STANDARD_TYPICAL,
                                      SEA_LEVEL_TEMPERATURE_K, STANDARD_GRAVITY_M_S2,
                                      TROPOPAUSE_GEOPOTENTIAL_M, TROPOSPHERE_LAPSE_K_M)
from estimator.core.humid_air import humid_air_density_kg_m3, vapour_pressure_Pa

# exponent g0 / (R L) of the troposphere pressure law [-] (about 5.2559)
_EXPONENT = STANDARD_GRAVITY_M_S2 / (DRY_AIR_GAS_CONSTANT_J_KG_K * TROPOSPHERE_LAPSE_K_M)
_T11 = SEA_LEVEL_TEMPERATURE_K - TROPOSPHERE_LAPSE_K_M * TROPOPAUSE_GEOPOTENTIAL_M  # 216.65 K
_P11 = SEA_LEVEL_PRESSURE_PA * (_T11 / SEA_LEVEL_TEMPERATURE_K) ** _EXPONENT  # 22632 Pa
_RHO11 = _P11 / (DRY_AIR_GAS_CONSTANT_J_KG_K * _T11)
_RHO0 = SEA_LEVEL_PRESSURE_PA / (DRY_AIR_GAS_CONSTANT_J_KG_K * SEA_LEVEL_TEMPERATURE_K)


class AirInputError(ValueError):
    """A site-air input outside the models' range.

    ``quantity`` names the input at fault: "altitude", "temperature", "pressure" or
    "humidity", so that a caller can name its own option or JSON key; the message names
    the limit. A ValueError, so callers that catch ValueError keep working.
    """

    def __init__(self, quantity, message):
        super().__init__(message)
        self.quantity = quantity


def geopotential_m(altitude_m):
    """Geopotential height from geometric altitude, H = r0 h / (r0 + h).

    altitude_m: geometric altitude h [m]. Returns H [m]. r0 = 6 356 766 m.
    Source: US Standard Atmosphere 1976, eq. 18.
    """
    return EARTH_RADIUS_M * altitude_m / (EARTH_RADIUS_M + altitude_m)


def geometric_m(geopotential_height_m):
    """Geometric altitude from geopotential height, h = r0 H / (r0 - H).

    geopotential_height_m: H [m]. Returns h [m]. Inverse of geopotential_m.
    Source: US Standard Atmosphere 1976, eq. 18 solved for h.
    """
    return EARTH_RADIUS_M * geopotential_height_m / (EARTH_RADIUS_M - geopotential_height_m)


def standard_atmosphere(altitude_m):
    """Standard temperature, pressure and density at a geometric altitude.

    Troposphere (H <= 11 km): T = T0 - L H, p = p0 (T / T0)^(g0 / (R L));
    isothermal layer (11 < H <= 20 km): T = 216.65 K, p = p11 exp(-g0 (H - 11000) / (R T));
    rho = p / (R T). altitude_m: geometric altitude h [m], valid from -5 km to 20 km
    geopotential (raises ValueError outside, naming the limit).
    Returns (temperature_K [K], pressure_Pa [Pa], density_kg_m3 [kg/m^3]).
    Source: US Standard Atmosphere 1976, eqs. 23, 33a, 33b, 42.
    """
    h_geo = geopotential_m(altitude_m)
    if h_geo < ATMOSPHERE_BOTTOM_GEOPOTENTIAL_M or h_geo > ISOTHERMAL_TOP_GEOPOTENTIAL_M:
        raise ValueError("altitude %.0f m is outside the model's range, -5000 m to 20000 m geopotential"
                         % altitude_m)
    if h_geo <= TROPOPAUSE_GEOPOTENTIAL_M:
        t = SEA_LEVEL_TEMPERATURE_K - TROPOSPHERE_LAPSE_K_M * h_geo
        p = SEA_LEVEL_PRESSURE_PA * (t / SEA_LEVEL_TEMPERATURE_K) ** _EXPONENT
    else:
        t = _T11
        p = _P11 * math.exp(-STANDARD_GRAVITY_M_S2 * (h_geo - TROPOPAUSE_GEOPOTENTIAL_M)
                            / (DRY_AIR_GAS_CONSTANT_J_KG_K * t))
    return t, p, p / (DRY_AIR_GAS_CONSTANT_J_KG_K * t)


def density_altitude_m(density_kg_m3):
    """Geometric altitude at which the standard atmosphere has this density.

    Troposphere: T = T0 (rho / rho0)^(1 / (g0/(R L) - 1)), H = (T0 - T) / L;
    isothermal layer: H = 11000 + R T11 ln(rho11 / rho) / g0; then h = r0 H / (r0 - H).
    density_kg_m3: air density rho [kg/m^3], > 0. Returns the density altitude [m,
    geometric, so that it round-trips with standard_atmosphere]. Densities beyond
    the model's range (-5 km .. 20 km) are extrapolated with the nearer layer's law.
    Source: inverse of US Standard Atmosphere 1976 eqs. 33a/33b with rho = p / (R T).
    """
    if not density_kg_m3 > 0.0:
        raise ValueError("density must be above zero [kg/m^3]")
    if density_kg_m3 >= _RHO11:
        t = SEA_LEVEL_TEMPERATURE_K * (density_kg_m3 / _RHO0) ** (1.0 / (_EXPONENT - 1.0))
        h_geo = (SEA_LEVEL_TEMPERATURE_K - t) / TROPOSPHERE_LAPSE_K_M
    else:
        h_geo = TROPOPAUSE_GEOPOTENTIAL_M + (DRY_AIR_GAS_CONSTANT_J_KG_K * _T11
                                             * math.log(_RHO11 / density_kg_m3) / STANDARD_GRAVITY_M_S2)
    return geometric_m(h_geo)


def pressure_altitude_m(pressure_Pa):
    """Geometric altitude at which the standard atmosphere has this pressure (pressure altitude).

    Troposphere: T = T0 (p / p0)^(R L / g0), H = (T0 - T) / L; isothermal layer:
    H = 11000 + R T11 ln(p11 / p) / g0; then h = r0 H / (r0 - H). pressure_Pa: station
    pressure p [Pa], > 0. Returns the pressure altitude [m, geometric, so that it round-trips
    with standard_atmosphere]; pressures beyond the model's range (-5 km .. 20 km) are
    extrapolated with the nearer layer's law.
    Source: inverse of US Standard Atmosphere 1976 eqs. 33a/33b.
    """
    if not pressure_Pa > 0.0:
        raise ValueError("pressure must be above zero [Pa]")
    if pressure_Pa >= _P11:
        t = SEA_LEVEL_TEMPERATURE_K * (pressure_Pa / SEA_LEVEL_PRESSURE_PA) ** (1.0 / _EXPONENT)
        h_geo = (SEA_LEVEL_TEMPERATURE_K - t) / TROPOSPHERE_LAPSE_K_M
    else:
        h_geo = TROPOPAUSE_GEOPOTENTIAL_M + (DRY_AIR_GAS_CONSTANT_J_KG_K * _T11
                                             * math.log(_P11 / pressure_Pa) / STANDARD_GRAVITY_M_S2)
    return geometric_m(h_geo)


# Sutherland's law constants of the 1976 standard (eq. 51): beta [kg/(s m K^0.5)], S [K]
SUTHERLAND_BETA = 1.458e-6
SUTHERLAND_S_K = 110.4


def dynamic_viscosity_Pa_s(temperature_K):
    """Dynamic viscosity of air, Sutherland's law mu = beta T^1.5 / (T + S).

    temperature_K: air temperature T [K], > 0. Returns mu [Pa s] (1.7894e-5 at 288.15 K).
    Source: US Standard Atmosphere 1976, eq. 51 (humidity neglected: under 1 % change).
    """
    return SUTHERLAND_BETA * temperature_K ** 1.5 / (temperature_K + SUTHERLAND_S_K)


def station_pressure_problem(altitude_m, pressure_Pa):
    """Why a station pressure cannot be right at this altitude, or None when it can be.

    A station pressure more than STATION_PRESSURE_ABOVE_STANDARD_MAX (8 %, weather and a hot
    air column; see core.constants) above the standard atmosphere's pressure at the geometric
    altitude is refused; the usual slip is the sea-level pressure (QNH) of a weather report.
    A pressure below the standard errs on the safe side (thinner air) and is also what a site
    with a measured pressure but no altitude gives, so it is not questioned.
    altitude_m: geometric altitude h [m]; pressure_Pa: the station pressure given [Pa].
    Returns a message (str) or None. Source: US Standard Atmosphere 1976 (standard_atmosphere).
    """
    p_std = standard_atmosphere(altitude_m)[1]
    excess = pressure_Pa / p_std - 1.0
    if excess <= STATION_PRESSURE_ABOVE_STANDARD_MAX:
        return None
    head = ("%.1f hPa at %.0f m is %.0f %% above the standard atmosphere's %.0f hPa there, more "
            "than weather gives (about %.0f %%)" % (pressure_Pa / 100.0, altitude_m, 100.0 * excess,
                                                   p_std / 100.0, 100.0 * STATION_PRESSURE_ABOVE_STANDARD_MAX))
    if QNH_RANGE_PA[0] <= pressure_Pa <= QNH_RANGE_PA[1]:
        return (head + ": that looks like sea-level pressure (QNH, what weather reports give); give the "
                "station pressure, about %.0f hPa at this altitude, or leave the pressure out to use "
                "the standard atmosphere" % (p_std / 100.0))
    return (head + ": check the altitude and the pressure (the station pressure at the site, about "
            "%.0f hPa in the standard atmosphere), or leave the pressure out" % (p_std / 100.0))


def station_pressure_warning(altitude_m, pressure_Pa):
    """A warning for a station pressure above what weather usually gives at this altitude, but not
    so far above that station_pressure_problem refuses it; else None.

    Warned when the pressure exceeds the standard atmosphere's pressure at the geometric altitude
    by more than STATION_PRESSURE_ABOVE_STANDARD_TYPICAL (3 %, weather's usual range, from memory)
    and at most STATION_PRESSURE_ABOVE_STANDARD_MAX (8 %). When the pressure is also within that
    usual range of the standard sea-level pressure, the likely slip is named: a sea-level pressure
    (QNH, what weather reports give) entered for the site. The air is computed with the pressure as
    given (a strong high can reach it); the warning says how much denser that makes it.
    altitude_m: geometric altitude h [m]; pressure_Pa: the station pressure given [Pa], or None
    when none was given. Returns a message (str) or None. Source: the ISO 2533 / ICAO Doc 7488
    standard atmosphere (US Standard Atmosphere 1976 below 32 km; standard_atmosphere).
    """
    if pressure_Pa is None:
        return None
    try:
        p_std = standard_atmosphere(altitude_m)[1]
    except ValueError:
        return None  # site_air refuses the altitude itself, naming it
    excess = pressure_Pa / p_std - 1.0
    if not STATION_PRESSURE_ABOVE_STANDARD_TYPICAL < excess <= STATION_PRESSURE_ABOVE_STANDARD_MAX:
        return None
    head = ("station pressure %.1f hPa at %.0f m is %.1f %% above the standard atmosphere's %.0f hPa there "
            "(ISO 2533 / ICAO), more than weather usually gives (about %.0f %%)"
            % (pressure_Pa / 100.0, altitude_m, 100.0 * excess, p_std / 100.0,
               100.0 * STATION_PRESSURE_ABOVE_STANDARD_TYPICAL))
    if abs(pressure_Pa / SEA_LEVEL_PRESSURE_PA - 1.0) <= STATION_PRESSURE_ABOVE_STANDARD_TYPICAL:
        head += ": a sea-level pressure (QNH, what weather reports give) given for the site?"
    else:
        head += ": is it the station pressure at the site, and is the altitude right?"
    return (head + " the air is computed with it as given, %.0f %% denser than at %.0f hPa: give the "
            "station pressure, or leave the pressure out to use the standard atmosphere"
            % (100.0 * excess, p_std / 100.0))


def site_air(altitude_m, temperature_C=None, pressure_Pa=None, humidity_pct=0.0):
    """Air at a flying site: density, temperature, pressure and density altitude.

    Temperature and station pressure default to the standard atmosphere at the
    geometric altitude; a given temperature does not change the default pressure
    (the standard pressure at that height is the usual estimate of station pressure).
    Density by partial pressures, rho = (p - e)/(R_d T) + e/(R_v T) (see humid_air).
    altitude_m: geometric altitude of the site h [m]; temperature_C: outside air
    temperature [C] or None; pressure_Pa: station pressure (not sea-level QNH) [Pa]
    or None; humidity_pct: relative humidity [%], 0..100.
    Returns a dict: density_kg_m3 [kg/m^3], temperature_K [K], pressure_Pa [Pa],
    density_altitude_m [m], vapour_pressure_Pa [Pa], density_ratio [-] (rho / 1.225),
    viscosity_Pa_s [Pa s] (dynamic_viscosity_Pa_s).
    Raises AirInputError (a ValueError naming the input at fault in ``quantity``) for
    values outside the models' ranges, and for a station pressure far above the standard
    pressure at the altitude (station_pressure_problem: sea-level QNH given by mistake).
    Source: US Standard Atmosphere 1976; Buck (1981).
    """
    try:
        t_std, p_std, _ = standard_atmosphere(altitude_m)
    except ValueError as exc:
        raise AirInputError("altitude", str(exc))
    t = t_std if temperature_C is None else temperature_C + CELSIUS_ZERO_K
    p = p_std if pressure_Pa is None else pressure_Pa
    if not t > 0.0:
        raise AirInputError("temperature", "temperature %.2f C is below absolute zero (-273.15 C)"
                            % (t - CELSIUS_ZERO_K))
    if not p > 0.0:
        raise AirInputError("pressure", "pressure must be above zero [Pa]")
    if pressure_Pa is not None:
        problem = station_pressure_problem(altitude_m, pressure_Pa)
        if problem is not None:
            raise AirInputError("pressure", problem)
    if not 0.0 <= humidity_pct <= 100.0:
        raise AirInputError("humidity", "relative humidity %.1f %% is outside 0..100 %%" % humidity_pct)
    try:
        e = vapour_pressure_Pa(p, t, humidity_pct)
    except ValueError as exc:  # only the Buck (1981) fit's temperature range is left to fail
        raise AirInputError("temperature", str(exc))
    if e >= p:
        raise AirInputError("humidity", "vapour pressure %.0f Pa at %.0f %% humidity is not below the "
                            "total pressure %.0f Pa" % (e, humidity_pct, p))
    rho = humid_air_density_kg_m3(p, t, humidity_pct)
    return {
        "density_kg_m3": rho,
        "temperature_K": t,
        "pressure_Pa": p,
        "density_altitude_m": density_altitude_m(rho),
        "vapour_pressure_Pa": e,
        "density_ratio": rho / SEA_LEVEL_DENSITY_KG_M3,
        "viscosity_Pa_s": dynamic_viscosity_Pa_s(t),
    }
