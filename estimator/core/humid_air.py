"""Humid-air density from pressure, temperature and relative humidity (two-gas model).

Dry air and water vapour are treated as ideal gases sharing the total pressure:
rho = (p - e) / (R_d T) + e / (R_v T), with the vapour partial pressure
e = (RH / 100) * f(p) * e_s(T). Saturation vapour pressure e_s and the enhancement
factor f are from A. L. Buck, "New equations for computing vapor pressure and
enhancement factor", J. Appl. Meteorol. 20 (1981) 1527-1532 (equations 8 and 3a,
the "ew1/fw3" and "ei2/fi3" fits, from memory). Relative humidity is taken over
liquid water at or above 0 C and over ice below 0 C. SI units: Pa, K, kg/m^3.
"""

import math

from estimator.core.constants import (CELSIUS_ZERO_K, DRY_AIR_GAS_CONSTANT_J_KG_K,
                                      WATER_VAPOUR_GAS_CONSTANT_J_KG_K)

# Range of the Buck (1981) fits [C]: -80..+50 over water, -80..0 over ice.
BUCK_MIN_C = -80.0
BUCK_MAX_C = 50.0


def saturation_vapour_pressure_Pa(temperature_K):
    """Saturation vapour pressure of pure water vapour, Buck (1981).

    Over water (T >= 0 C): e_s = 611.21 exp(17.502 t / (240.97 + t)) [Pa];
    over ice (T < 0 C):   e_s = 611.15 exp(22.452 t / (272.55 + t)) [Pa], t in C.
    temperature_K: air temperature T [K], valid -80..50 C (raises ValueError outside).
    Returns e_s [Pa]. Source: Buck (1981), eq. 8 (from memory).
    """
    t_C = temperature_K - CELSIUS_ZERO_K
    if t_C < BUCK_MIN_C or t_C > BUCK_MAX_C:
        raise ValueError("temperature %.1f C is outside -80..50 C, the range of the Buck (1981) fit" % t_C)
    if t_C >= 0.0:
        return 611.21 * math.exp(17.502 * t_C / (240.97 + t_C))
    return 611.15 * math.exp(22.452 * t_C / (272.55 + t_C))


def enhancement_factor(pressure_Pa, temperature_K):
    """Enhancement factor f of water vapour in moist air, Buck (1981).

    f = 1.0007 + 3.46e-6 p_mb over water, f = 1.0003 + 4.18e-6 p_mb over ice [-].
    pressure_Pa: total pressure p [Pa]; temperature_K: T [K] (selects water or ice).
    Returns f [-] (about 1.004 at sea level). Source: Buck (1981), eq. 3a (from memory).
    """
    p_mb = pressure_Pa / 100.0
    if temperature_K >= CELSIUS_ZERO_K:
        return 1.0007 + 3.46e-6 * p_mb
    return 1.0003 + 4.18e-6 * p_mb


def vapour_pressure_Pa(pressure_Pa, temperature_K, humidity_pct):
    """Partial pressure of water vapour e = (RH / 100) f(p) e_s(T).

    pressure_Pa: total pressure p [Pa], > 0; temperature_K: T [K];
    humidity_pct: relative humidity RH [%], 0..100 (raises ValueError outside).
    Returns e [Pa]. Source: Buck (1981); definition of relative humidity (WMO).
    """
    if humidity_pct < 0.0 or humidity_pct > 100.0:
        raise ValueError("relative humidity %.1f %% is outside 0..100 %%" % humidity_pct)
    if humidity_pct == 0.0:
        return 0.0
    return humidity_pct / 100.0 * enhancement_factor(pressure_Pa, temperature_K) \
        * saturation_vapour_pressure_Pa(temperature_K)


def humid_air_density_kg_m3(pressure_Pa, temperature_K, humidity_pct):
    """Density of humid air by partial pressures, rho = (p - e)/(R_d T) + e/(R_v T).

    pressure_Pa: total (station) pressure p [Pa], > 0; temperature_K: T [K], > 0;
    humidity_pct: relative humidity RH [%], 0..100.
    Returns rho [kg/m^3]. R_d = 287.053 J/(kg K) (US Standard Atmosphere 1976),
    R_v = 461.5 J/(kg K). Source: ideal-gas mixture (Dalton), e.g. WMO-No. 8 annex 4.B
    (from memory); within about 0.1 % of a real-gas humid-air model near the ground.
    """
    if not pressure_Pa > 0.0 or not temperature_K > 0.0:
        raise ValueError("pressure [Pa] and temperature [K] must be above zero")
    e = vapour_pressure_Pa(pressure_Pa, temperature_K, humidity_pct)
    if e >= pressure_Pa:
        raise ValueError("vapour pressure %.0f Pa is not below total pressure %.0f Pa" % (e, pressure_Pa))
    return ((pressure_Pa - e) / (DRY_AIR_GAS_CONSTANT_J_KG_K * temperature_K)
            + e / (WATER_VAPOUR_GAS_CONSTANT_J_KG_K * temperature_K))
