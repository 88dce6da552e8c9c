"""Static CT and CP from size and pitch (estimator.core.propeller_bemt) against outside references.

Sources beside each check:
- momentum theory (Leishman, Principles of Helicopter Aerodynamics, 2nd ed., ch. 2, from
  memory): ideal power P = T^1.5 / sqrt(2 rho A), so the figure of merit is below 1;
- the annulus equations of Leishman ch. 3 (from memory), written again here and solved with
  scipy.optimize.brentq, an independent root finder;
- airfoil polars of NeuralFoil (PyPI package ``neuralfoil`` 0.3, a general-purpose airfoil
  analysis library, tests only; NACA 4412 coordinates from its companion ``aerosandbox``),
  the "large" model: sections at chord Reynolds numbers 1e5, 2e5 and 4e5, whole propellers at
  75 %-radius Reynolds numbers 1.0e5..1.6e5;
- thin-airfoil theory (Abbott and von Doenhoff, Theory of Wing Sections, 1959, ch. 4; from
  memory): zero-lift angle alpha_0 = -(1/pi) int_0^pi dz/dx (cos t - 1) dt for the NACA 4-digit
  mean line, integrated here with scipy.integrate.quad;
- the usual static coefficients of small two-blade propellers (from memory of published static
  tests of 5-15 inch propellers): CT 0.05..0.16, CP 0.015..0.08 for pitch/diameter 0.3..0.8.
"""

import math

import pytest

from estimator.core import propeller_bemt as bemt
from estimator.core.atmosphere import dynamic_viscosity_Pa_s
from airfoil_reference import naca4412_section

RHO, MU = 1.225, 1.7894e-5  # sea-level standard air (US Standard Atmosphere 1976)
# typical hover conditions of small propellers: (diameter [m], rpm)
HOVERS = [(0.127, 22000.0), (0.254, 5000.0), (0.254, 8000.0), (0.3048, 6000.0), (0.381, 4500.0)]
RATIOS = [0.3, 0.4, 0.5, 0.6, 0.7, 0.8]


def test_viscosity_is_the_1976_standard():
    ambiance = pytest.importorskip("ambiance")
    for h in (0.0, 1500.0, 5000.0, 10000.0):
        atm = ambiance.Atmosphere(h)
        # same Sutherland law and constants (US Standard Atmosphere 1976, eq. 51)
        assert dynamic_viscosity_Pa_s(float(atm.temperature[0])) == pytest.approx(float(atm.dynamic_viscosity[0]), rel=1e-6)


def test_two_blade_coefficients_sit_in_the_usual_static_ranges():
    for d, rpm in HOVERS:
        for ratio in RATIOS:
            r = bemt.propeller_coefficients(d, ratio * d, 2, rpm, RHO, MU)
            assert 0.05 <= r["ct"] <= 0.16, (d, rpm, ratio, r)  # from memory (module docstring)
            assert 0.015 <= r["cp"] <= 0.08, (d, rpm, ratio, r)
            assert 0.4 <= r["figure_of_merit"] <= 0.75, (d, rpm, ratio, r)  # issue 11 goal


def test_figure_of_merit_is_below_one_for_every_blade_count():
    # momentum theory: no rotor needs less than the ideal power T^1.5 / sqrt(2 rho A)
    for blades in range(2, 7):
        for ratio in RATIOS:
            r = bemt.propeller_coefficients(0.254, ratio * 0.254, blades, 6000.0, RHO, MU)
            ideal_cp = math.sqrt(2.0 / math.pi) * r["ct"] ** 1.5  # FM = 1, propeller convention
            assert r["cp"] > ideal_cp and r["figure_of_merit"] < 1.0


def test_without_profile_drag_the_power_is_momentum_theory_plus_tip_loss():
    # a drag-free section leaves induced power only: at least the ideal power (momentum theory)
    # and, with Prandtl's tip loss and a hub cut-out, no more than about 25 % above it
    def no_drag(alpha, reynolds):
        return bemt.generic_section(alpha, reynolds)[0], 0.0
    for blades in (2, 4):
        for ratio in (0.3, 0.5, 0.8):
            r = bemt.rotor_coefficients(ratio, blades, 100.0, 0.127, MU / RHO, section=no_drag)
            ideal = r["ct"] ** 1.5 / math.sqrt(2.0)  # rotor convention, Leishman eq. 2.x
            assert ideal < r["cp"] < 1.25 * ideal, (blades, ratio, r["cp"] / ideal)


def _independent_residual(lam, x, theta, sigma, blades, tip_speed, chord, nu):
    # Leishman ch. 3 (from memory), written again: momentum 4 F lam^2 x against the blade
    # element (sigma/2) U^2 (cl cos phi - cd sin phi); F = Prandtl tip x hub factors
    phi = math.atan(lam / x)
    u = math.hypot(x, lam)
    f_tip = blades * (1.0 - x) / (2.0 * x * math.sin(phi))
    f_hub = blades * (x - bemt.HUB_CUTOUT) / (2.0 * x * math.sin(phi))
    big_f = (2.0 / math.pi) ** 2 * math.acos(math.exp(-f_tip)) * math.acos(math.exp(-f_hub))
    cl, cd = bemt.generic_section(theta - phi, u * tip_speed * chord / nu)
    return 4.0 * big_f * lam * lam * x - 0.5 * sigma * u * u * (cl * math.cos(phi) - cd * math.sin(phi))


def test_annulus_solve_equals_scipy_brentq():
    brentq = pytest.importorskip("scipy.optimize").brentq
    worst = 0.0
    for blades in (2, 3, 6):
        for ratio in (0.3, 0.55, 0.8):
            for x in (0.2, 0.45, 0.75, 0.9, 0.98):
                radius, tip_speed, nu = 0.127, 90.0, MU / RHO
                c = bemt.chord_ratio(x) * radius
                sigma = blades * bemt.chord_ratio(x) / math.pi
                theta = bemt.pitch_angle_rad(x, ratio)
                ours = bemt.annulus_inflow(x, theta, sigma, blades, tip_speed, c, nu)
                args = (x, theta, sigma, blades, tip_speed, c, nu)
                hi = x * math.tan(min(theta - bemt.ZERO_LIFT_ANGLE_RAD, math.radians(89.0)))
                ref = brentq(_independent_residual, 1e-9, hi, args=args, xtol=1e-15, rtol=1e-14)
                worst = max(worst, abs(ours - ref) / ref)
    assert worst < 1e-6, worst  # issue 11 goal


def test_pitch_angle_gives_the_nominal_pitch_at_75_percent_radius():
    # helix: a section at radius r advances 2 pi r tan(theta) per turn
    d, p = 0.254, 0.1143
    theta = bemt.pitch_angle_rad(0.75, p / d)
    assert 2.0 * math.pi * 0.75 * (d / 2.0) * math.tan(theta) == pytest.approx(p, rel=1e-12)


def test_zero_lift_angle_is_thin_airfoil_theory_of_the_naca_4412_mean_line():
    quad = pytest.importorskip("scipy.integrate").quad
    m, p = 0.04, 0.4  # NACA 4412: 4 % camber at 40 % chord (Abbott and von Doenhoff 1959)

    def slope(t):
        xc = 0.5 * (1.0 - math.cos(t))
        return 2.0 * m / p ** 2 * (p - xc) if xc < p else 2.0 * m / (1.0 - p) ** 2 * (p - xc)
    alpha0 = -quad(lambda t: slope(t) * (math.cos(t) - 1.0), 0.0, math.pi, points=[math.acos(1 - 2 * p)])[0] / math.pi
    assert bemt.ZERO_LIFT_ANGLE_RAD == pytest.approx(alpha0, abs=math.radians(0.05))


def test_trends_with_pitch_and_blades():
    last = None
    for ratio in RATIOS:
        r = bemt.propeller_coefficients(0.254, ratio * 0.254, 2, 6000.0, RHO, MU)
        if last:
            assert r["ct"] > last["ct"] and r["cp"] > last["cp"]
        last = r
    two = bemt.propeller_coefficients(0.254, 0.1143, 2, 6000.0, RHO, MU)
    three = bemt.propeller_coefficients(0.254, 0.1143, 3, 6000.0, RHO, MU)
    assert three["ct"] > two["ct"] and three["cp"] > two["cp"]
    with pytest.raises(ValueError):
        bemt.propeller_coefficients(0.254, 0.1143, 7, 6000.0, RHO, MU)


@pytest.fixture(scope="module")
def reference_section():
    """NeuralFoil's NACA 4412 polars on a grid, interpolated (alpha in degrees, log Re)."""
    return naca4412_section(3e4)


@pytest.mark.parametrize("reynolds", [1e5, 2e5, 4e5])
def test_section_against_neuralfoil_polars(reference_section, reynolds):
    # attached flow, alpha -2..6 deg: lift within 0.2 of the reference (thin-airfoil theory
    # ignores thickness and the laminar bubble, which shift cl by about 0.1-0.2 at these
    # Reynolds numbers); minimum drag within 40 % (a from-memory polar against a computed one)
    for deg in (-2.0, 0.0, 2.0, 4.0, 6.0):
        ours = bemt.generic_section(math.radians(deg), reynolds)
        ref = reference_section(math.radians(deg), reynolds)
        assert abs(ours[0] - ref[0]) < 0.2, (deg, ours, ref)
    ours_min = min(bemt.generic_section(math.radians(d), reynolds)[1] for d in range(-4, 9))
    ref_min = min(reference_section(math.radians(d), reynolds)[1] for d in range(-4, 9))
    assert abs(ours_min / ref_min - 1.0) < 0.4, (ours_min, ref_min)


def test_coefficients_against_the_same_calculation_on_neuralfoil_polars(reference_section):
    # issue 11 goal: CT and CP within 10 % of the BEMT run on the reference polars, two blades,
    # pitch/diameter 0.3..0.8, at 75 %-radius Reynolds numbers of 1.0e5..1.6e5 (10-15 inch
    # propellers at hover speeds). Below about 8e4 the reference polars lose lift to laminar
    # separation, which thin-airfoil theory does not model (see the report).
    worst = 0.0
    for d, rpm in ((0.254, 9000.0), (0.3048, 7000.0), (0.381, 6000.0)):
        for ratio in RATIOS:
            ours = bemt.propeller_coefficients(d, ratio * d, 2, rpm, RHO, MU)
            ref = bemt.propeller_coefficients(d, ratio * d, 2, rpm, RHO, MU, section=reference_section)
            assert 9e4 < ours["reynolds_75"] < 1.7e5
            for key in ("ct", "cp"):
                worst = max(worst, abs(ours[key] / ref[key] - 1.0))
    assert worst < 0.10, worst
