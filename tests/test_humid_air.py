"""Humid-air density by partial pressures (estimator.core.humid_air, site_air)."""

import pytest

from estimator.core.atmosphere import site_air
from estimator.core.humid_air import humid_air_density_kg_m3, saturation_vapour_pressure_Pa

# Sites: hot and humid, high and dry, freezing and saturated, plus everyday ones.
SITES = [
    # altitude [m], temperature [C], relative humidity [%]
    (0.0, 35.0, 90.0),     # hot and humid coast
    (0.0, 45.0, 60.0),     # desert heat with some humidity
    (3000.0, 10.0, 10.0),  # high and dry plateau
    (500.0, -5.0, 100.0),  # freezing fog, saturated over ice
    (0.0, 0.5, 100.0),     # just above freezing, saturated over water
    (4000.0, -10.0, 80.0), # cold mountain site
    (1400.0, 28.0, 40.0),  # the demo site
]


def _coolprop_density(temperature_K, pressure_Pa, humidity_pct):
    hap = pytest.importorskip("CoolProp.HumidAirProp")
    # 'Vha' is the mixture volume per kg of humid air [m^3/kg]
    return 1.0 / hap.HAPropsSI("Vha", "T", temperature_K, "P", pressure_Pa, "R", humidity_pct / 100.0)


@pytest.mark.parametrize("h, t_C, rh", SITES)
def test_density_against_coolprop_humid_air(h, t_C, rh):
    # Source: CoolProp's HAPropsSI (Lemmon et al. real-gas dry air, IAPWS water, virial
    # mixing; PyPI package CoolProp). Our two-gas ideal formula ignores compressibility
    # (Z of air about 0.9995 near ambient, 0.999 when cold), so the absolute tolerance is
    # 0.12 %; design notes sec. 3a expect about 0.07 % at ordinary temperatures.
    s = site_air(h, t_C, None, rh)
    ref = _coolprop_density(s["temperature_K"], s["pressure_Pa"], rh)
    assert s["density_kg_m3"] == pytest.approx(ref, rel=1.2e-3)


@pytest.mark.parametrize("h, t_C, rh", SITES)
def test_humidity_effect_against_coolprop(h, t_C, rh):
    # The humidity effect alone (humid / dry at the same T and p) cancels the compressibility
    # of dry air, which CoolProp has and we do not: what is left compares the vapour model
    # (Buck 1981 saturation pressure and enhancement factor, ideal vapour). Water vapour near
    # saturation is itself non-ideal by about 0.3 % (Z_v ~ 0.997), which CoolProp includes,
    # so the gap grows with the vapour mole fraction e/p (measured: about 0.0033 e/p).
    # Tolerance: 0.5 % of e/p plus 2e-5 for Buck's fit (0.05 % of e_s, times ~0.4 e/p).
    s = site_air(h, t_C, None, rh)
    dry = site_air(h, t_C, None, 0.0)
    ratio = s["density_kg_m3"] / dry["density_kg_m3"]
    ref = (_coolprop_density(s["temperature_K"], s["pressure_Pa"], rh)
           / _coolprop_density(s["temperature_K"], s["pressure_Pa"], 0.0))
    assert ratio == pytest.approx(ref, rel=5e-3 * s["vapour_pressure_Pa"] / s["pressure_Pa"] + 2e-5)


def test_ignoring_humidity_on_a_hot_humid_day_overstates_density_about_1_to_3_percent():
    # Design notes sec. 3a: ignoring humidity overstates density by about 1.2 % on a hot,
    # humid day. At 30 C and 70 % RH the two-gas formula gives 1.1 %..1.4 %.
    humid = site_air(0.0, 30.0, None, 70.0)["density_kg_m3"]
    dry = site_air(0.0, 30.0, None, 0.0)["density_kg_m3"]
    assert 0.010 < dry / humid - 1.0 < 0.014


def test_saturation_pressure_handbook_points():
    # Saturation vapour pressure over water, CRC Handbook / IAPWS values (from memory):
    # 0.01 C 611.66 Pa, 20 C 2339.2 Pa, 40 C 7384.9 Pa. Buck (1981) claims 0.05 % over
    # -20..+50 C; tolerance 0.2 % to allow for our memory of the tables.
    assert saturation_vapour_pressure_Pa(273.16) == pytest.approx(611.66, rel=2e-3)
    assert saturation_vapour_pressure_Pa(293.15) == pytest.approx(2339.2, rel=2e-3)
    assert saturation_vapour_pressure_Pa(313.15) == pytest.approx(7384.9, rel=2e-3)
    # over ice at -10 C: 259.9 Pa (IAPWS sublimation, from memory); same tolerance
    assert saturation_vapour_pressure_Pa(263.15) == pytest.approx(259.9, rel=2e-3)


def test_dry_air_is_ideal_gas_with_1976_gas_constant():
    # rho = p / (R T) with R = 8314.32 / 28.9644 (US Standard Atmosphere 1976); exact algebra.
    assert humid_air_density_kg_m3(101325.0, 288.15, 0.0) == pytest.approx(1.2250, abs=5e-5)


def test_bad_humidity_and_range_are_refused():
    with pytest.raises(ValueError, match="0..100"):
        humid_air_density_kg_m3(101325.0, 293.15, 120.0)
    with pytest.raises(ValueError, match="Buck"):
        humid_air_density_kg_m3(101325.0, 353.15, 50.0)
