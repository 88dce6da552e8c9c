"""Physical constants and validity limits of the core, each with its unit and source.

One place for every constant the portable core uses. Values are exact by definition
or copied from the named standard.
"""

# Standard acceleration of gravity g0 [m/s^2]; exact by definition (CGPM 1901),
# also the value of the US Standard Atmosphere 1976.
STANDARD_GRAVITY_M_S2 = 9.80665

# US Standard Atmosphere 1976 (NOAA/NASA/USAF, 1976), table 2 and sec. 1.2:
# universal gas constant R* = 8314.32 J/(kmol K) and mean molar mass of sea-level
# air M0 = 28.9644 kg/kmol; the specific gas constant of dry air R = R* / M0.
UNIVERSAL_GAS_CONSTANT_J_KMOL_K = 8314.32
AIR_MOLAR_MASS_KG_KMOL = 28.9644
DRY_AIR_GAS_CONSTANT_J_KG_K = UNIVERSAL_GAS_CONSTANT_J_KMOL_K / AIR_MOLAR_MASS_KG_KMOL  # 287.0529

# Specific gas constant of water vapour R_v [J/(kg K)] (design notes sec. 3; 8314.32 / 18.015).
WATER_VAPOUR_GAS_CONSTANT_J_KG_K = 461.5

# Effective earth radius r0 used by the 1976 standard to convert geometric to
# geopotential height [m] (US Standard Atmosphere 1976, eq. 18).
EARTH_RADIUS_M = 6356766.0

# Sea-level standard values (ICAO Doc 7488 / US Standard Atmosphere 1976).
SEA_LEVEL_TEMPERATURE_K = 288.15
SEA_LEVEL_PRESSURE_PA = 101325.0
SEA_LEVEL_DENSITY_KG_M3 = 1.225  # rounded table value; P0 / (R T0) = 1.22500

# Troposphere lapse rate [K/m] per geopotential metre, up to the tropopause.
TROPOSPHERE_LAPSE_K_M = 0.0065
TROPOPAUSE_GEOPOTENTIAL_M = 11000.0
# Top of the isothermal layer (start of the 1 K/km layer) [m geopotential].
ISOTHERMAL_TOP_GEOPOTENTIAL_M = 20000.0
# Lowest tabulated altitude of the 1976 standard [m geopotential].
ATMOSPHERE_BOTTOM_GEOPOTENTIAL_M = -5000.0

# Largest share by which a station pressure may exceed the standard atmosphere's pressure at the
# site's altitude [-]. Weather moves sea-level pressure within about 970..1050 hPa outside
# tropical cyclones (records 870 and 1084 hPa), i.e. up to about +3.5 % of 1013.25 hPa, and a
# hot air column raises the station pressure at 2-4 km by another 2-4 % (hypsometric equation):
# 8 % covers both (common practice, from memory). A sea-level pressure (QNH) entered at 1000 m
# is 13 % above the standard station pressure there, at 2000 m 27 %.
STATION_PRESSURE_ABOVE_STANDARD_MAX = 0.08
# Share above that standard pressure within which weather usually keeps a station pressure [-]:
# about +-3 % (from memory; record highs near +7 %). Between this and the refusal above a pressure
# is taken as given, with a warning: at a low site (200..700 m) it is most often a sea-level
# pressure (QNH) entered as the station pressure, 2..8 % too high, and the density with it.
STATION_PRESSURE_ABOVE_STANDARD_TYPICAL = 0.03
# Sea-level pressures (QNH) weather reports give [Pa]: the range above, widened (from memory).
QNH_RANGE_PA = (94000.0, 106000.0)

# Zero of the Celsius scale [K], exact by definition.
CELSIUS_ZERO_K = 273.15

# Angular speed of one rpm [rad/s]: 2 pi / 60.
RAD_S_PER_RPM = 0.10471975511965977

# Standard error of a fitted command from the rotor's lag behind the command on a sweep that
# steps one way only [-]: a stepped sweep of about a second per step lags a few thousandths
# of the command range (common practice, from memory); up-and-down sweeps cancel it.
ONE_WAY_LAG_COMMAND_SE = 0.003
