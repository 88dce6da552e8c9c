"""Static thrust and power coefficients of a propeller from its size, pitch and blade count.

Blade element momentum theory (BEMT) in hover: Glauert's combined blade-element and momentum
analysis with Prandtl's tip-loss factor, as in J. G. Leishman, *Principles of Helicopter
Aerodynamics*, 2nd ed. (2006), ch. 3 (from memory). Each annulus at x = r / R balances
  momentum:       dCT = 4 F lambda^2 x dx
  blade element:  dCT = (sigma / 2) U^2 (cl cos(phi) - cd sin(phi)) dx
  torque (power): dCP = (sigma / 2) U^2 (cl sin(phi) + cd cos(phi)) x dx
with lambda = v / (Omega R) the induced inflow, phi = atan(lambda / x), U^2 = x^2 + lambda^2,
local solidity sigma = N_b c / (pi R), and F = (2 / pi) acos(exp(-f)),
f = N_b (1 - x) / (2 x sin(phi)) (Prandtl, in Glauert's form). CT and CP here are rotor
coefficients (T / (rho pi R^2 (Omega R)^2)); propeller_coefficients converts them to the
propeller convention (n in rev/s): CT_prop = CT pi^3 / 4, CP_prop = CP pi^4 / 4.

THE GENERIC BLADE (an assumption: a real propeller differs; typical error 10-20 %):
- hub cut-out at x = 0.15; chord c / R = 0.18 - 0.06 x (0.135 at 75 % radius), the same for
  every blade count (a 3-blade propeller has 1.5 times the solidity of a 2-blade one);
  from memory of small multirotor propellers;
- helical twist of constant geometric pitch, theta(x) = atan(p / (pi D x)), which gives the
  nominal pitch p at 75 % radius (and everywhere else), measured from the chord line;
- a cambered section (4 % camber at 40 % chord, 12 % thick, i.e. the NACA 4412 shape):
  thin-airfoil lift slope a0 = 2 pi per radian from the zero-lift angle
  alpha_0 = -4.15 deg (thin-airfoil theory for that camber line, Abbott and von Doenhoff
  1959, from memory), lift held at cl_max = 1.2 and cl_min = -0.6 beyond stall (low-Reynolds
  values, from memory);
- profile drag cd = cd_min (Re / 1e5)^(-1/2) + k (cl - cl_dm)^2 with cd_min = 0.018,
  k = 0.02, cl_dm = 0.5 (a laminar-type Reynolds scaling of a low-Reynolds section polar, from
  memory), plus 2 sin^2 of the angle beyond stall (flat-plate growth of drag past stall).
No compressibility (tip Mach below about 0.5 on small propellers). Pure math: runs on
MicroPython. SI units.
"""

import math

HUB_CUTOUT = 0.15  # x = r / R where the blade starts [-]
CHORD_ROOT, CHORD_SLOPE = 0.18, -0.06  # c / R = CHORD_ROOT + CHORD_SLOPE x [-]
LIFT_SLOPE_PER_RAD = 2.0 * math.pi  # thin-airfoil theory [1/rad]
ZERO_LIFT_ANGLE_RAD = math.radians(-4.15)  # NACA 4412 mean line, thin-airfoil theory [rad]
CL_MAX, CL_MIN = 1.3, -0.6  # stall limits [-]
CD_MIN, CD_REYNOLDS_REF, CD_REYNOLDS_EXPONENT = 0.02, 1e5, -0.5
CD_LIFT_FACTOR, CL_MIN_DRAG = 0.03, 0.5
STATIONS = 40  # annuli (midpoint rule) [-]
BISECTION_STEPS = 40  # halvings of the inflow bracket [-]: below 1e-12 of it
BLADES_MIN, BLADES_MAX = 2, 6


def chord_ratio(x):
    """Chord over tip radius of the generic blade, c / R = 0.18 - 0.06 x.

    x: radial station r / R [-], HUB_CUTOUT..1. Returns c / R [-]. Source: module docstring.
    """
    return CHORD_ROOT + CHORD_SLOPE * x


def pitch_angle_rad(x, pitch_ratio):
    """Blade pitch angle of constant geometric pitch, theta = atan((p / D) / (pi x)).

    x: r / R [-], > 0; pitch_ratio: p / D [-]. Returns theta [rad]; at x = 0.75 the blade
    advances exactly p per turn. Source: helix geometry.
    """
    return math.atan(pitch_ratio / (math.pi * x))


def generic_section(alpha_rad, reynolds):
    """Lift and drag coefficients of the generic blade section (module docstring).

    alpha_rad: angle of attack [rad]; reynolds: chord Reynolds number Re [-], > 0.
    Returns (cl [-], cd [-]). Source: thin-airfoil theory (lift), from-memory polar (drag).
    """
    cl_lin = LIFT_SLOPE_PER_RAD * (alpha_rad - ZERO_LIFT_ANGLE_RAD)
    cl = CL_MAX if cl_lin > CL_MAX else (CL_MIN if cl_lin < CL_MIN else cl_lin)
    cd = (CD_MIN * (reynolds / CD_REYNOLDS_REF) ** CD_REYNOLDS_EXPONENT
          + CD_LIFT_FACTOR * (cl - CL_MIN_DRAG) ** 2)
    if cl_lin != cl:  # beyond stall: drag of a flat plate grows as 2 sin^2 of the excess angle
        excess = (cl_lin - cl) / LIFT_SLOPE_PER_RAD
        cd += 2.0 * math.sin(excess) ** 2
    return cl, cd


def tip_loss(x, phi_rad, blades):
    """Prandtl's tip-loss factor F = (2 / pi) acos(exp(-f)), f = N_b (1 - x) / (2 x sin(phi)).

    x: r / R [-], 0 < x <= 1; phi_rad: inflow angle phi [rad], >= 0; blades: N_b [-].
    Returns F [-], 0..1 (1 where phi -> 0). Source: Leishman (2006) sec. 3.x (from memory).
    """
    s = math.sin(phi_rad)
    if s <= 0.0:
        return 1.0
    out = 1.0
    for gap in (1.0 - x, x - HUB_CUTOUT):
        f = 0.5 * blades * gap / (x * s)
        if f < 50.0:
            out *= 2.0 / math.pi * math.acos(math.exp(-f))
    return out


def annulus_residual(inflow, x, theta_rad, solidity, blades, tip_speed_m_s, chord_m,
                     kinematic_viscosity_m2_s, section=generic_section):
    """Momentum minus blade-element thrust of one annulus, g(lambda) (module docstring).

    inflow: lambda = v / (Omega R) [-]; x: r / R [-]; theta_rad: blade pitch angle [rad];
    solidity: local sigma = N_b c / (pi R) [-]; blades: N_b [-]; tip_speed_m_s: Omega R [m/s];
    chord_m: c [m]; kinematic_viscosity_m2_s: nu = mu / rho [m^2/s]; section: function
    (alpha [rad], Re [-]) -> (cl, cd). Returns (g [-], cl, cd, phi [rad], U^2 [-]) with
    g = 4 F lambda^2 x - (sigma / 2) U^2 (cl cos(phi) - cd sin(phi)).
    """
    phi = math.atan2(inflow, x)
    u2 = x * x + inflow * inflow
    reynolds = math.sqrt(u2) * tip_speed_m_s * chord_m / kinematic_viscosity_m2_s
    cl, cd = section(theta_rad - phi, max(reynolds, 1.0))
    g = (4.0 * tip_loss(x, phi, blades) * inflow * inflow * x
         - 0.5 * solidity * u2 * (cl * math.cos(phi) - cd * math.sin(phi)))
    return g, cl, cd, phi, u2


def annulus_inflow(x, theta_rad, solidity, blades, tip_speed_m_s, chord_m,
                   kinematic_viscosity_m2_s, section=generic_section):
    """Induced inflow lambda of one annulus: the root of annulus_residual, by bisection.

    Bracket: lambda -> 0 (g < 0 while the section lifts) to the inflow at which the section
    is at its zero-lift angle, lambda = x tan(theta - alpha_0), capped at phi = 89 deg
    (g > 0 there: no lift, only momentum and drag); BISECTION_STEPS fixed halvings.
    x: r / R [-]; theta_rad: blade pitch angle [rad]; solidity: local sigma [-]; blades:
    N_b [-]; tip_speed_m_s: Omega R [m/s]; chord_m: c [m]; kinematic_viscosity_m2_s: nu
    [m^2/s]; section: function (alpha [rad], Re [-]) -> (cl [-], cd [-]).
    Returns lambda [-] (0 when the section makes no lift at zero inflow).
    """
    g0 = annulus_residual(0.0, x, theta_rad, solidity, blades, tip_speed_m_s, chord_m,
                          kinematic_viscosity_m2_s, section)[0]
    if g0 >= 0.0:
        return 0.0
    phi_hi = min(theta_rad - ZERO_LIFT_ANGLE_RAD, math.radians(89.0))
    lo, hi = 0.0, x * math.tan(phi_hi)
    for _ in range(8):  # a section other than the generic one may still lift there: widen
        if annulus_residual(hi, x, theta_rad, solidity, blades, tip_speed_m_s, chord_m,
                            kinematic_viscosity_m2_s, section)[0] > 0.0:
            break
        lo, hi = hi, 2.0 * hi
    for _ in range(BISECTION_STEPS):
        mid = 0.5 * (lo + hi)
        g = annulus_residual(mid, x, theta_rad, solidity, blades, tip_speed_m_s, chord_m,
                             kinematic_viscosity_m2_s, section)[0]
        if g > 0.0:
            hi = mid
        else:
            lo = mid
    return 0.5 * (lo + hi)


def rotor_coefficients(pitch_ratio, blades, tip_speed_m_s, radius_m, kinematic_viscosity_m2_s,
                       section=generic_section, stations=STATIONS):
    """Static rotor CT and CP (rotor convention) of the generic blade by BEMT with tip loss.

    pitch_ratio: p / D [-], > 0; blades: N_b [-], 2..6; tip_speed_m_s: Omega R [m/s], > 0;
    radius_m: R [m], > 0; kinematic_viscosity_m2_s: nu [m^2/s]; section: function
    (alpha [rad], Re [-]) -> (cl [-], cd [-]); stations: annuli [-] (midpoint rule from
    HUB_CUTOUT to the tip).
    Returns a dict ct [-], cp [-] (CT = T / (rho pi R^2 (Omega R)^2), CP = P / (rho pi R^2
    (Omega R)^3)), figure_of_merit [-] = CT^1.5 / (sqrt(2) CP), stalled_share [-] (share of
    the blade span beyond stall). Raises ValueError for blades outside 2..6.
    Source: Leishman (2006) ch. 3 (from memory); module docstring.
    """
    if not BLADES_MIN <= blades <= BLADES_MAX:
        raise ValueError("blades must be %d..%d, got %r" % (BLADES_MIN, BLADES_MAX, blades))
    dx = (1.0 - HUB_CUTOUT) / stations
    ct = cp = stalled = 0.0
    for i in range(stations):
        x = HUB_CUTOUT + (i + 0.5) * dx
        c_r = chord_ratio(x)
        sigma = blades * c_r / math.pi
        theta = pitch_angle_rad(x, pitch_ratio)
        chord = c_r * radius_m
        lam = annulus_inflow(x, theta, sigma, blades, tip_speed_m_s, chord, kinematic_viscosity_m2_s, section)
        _, cl, cd, phi, u2 = annulus_residual(lam, x, theta, sigma, blades, tip_speed_m_s, chord,
                                              kinematic_viscosity_m2_s, section)
        ct += 0.5 * sigma * u2 * (cl * math.cos(phi) - cd * math.sin(phi)) * dx
        cp += 0.5 * sigma * u2 * (cl * math.sin(phi) + cd * math.cos(phi)) * x * dx
        if LIFT_SLOPE_PER_RAD * (theta - phi - ZERO_LIFT_ANGLE_RAD) > CL_MAX:
            stalled += dx
    fm = ct ** 1.5 / (math.sqrt(2.0) * cp) if ct > 0.0 and cp > 0.0 else 0.0
    return {"ct": ct, "cp": cp, "figure_of_merit": fm, "stalled_share": stalled / (1.0 - HUB_CUTOUT)}


def propeller_coefficients(diameter_m, pitch_m, blades, rpm, density_kg_m3, viscosity_Pa_s,
                           section=generic_section, stations=STATIONS):
    """Static CT and CP in the propeller convention (n in rev/s) of the generic blade.

    diameter_m: D [m]; pitch_m: nominal pitch at 75 % radius p [m]; blades: N_b [-], 2..6;
    rpm: rotor speed [rpm] (sets the Reynolds number); density_kg_m3: rho [kg/m^3];
    viscosity_Pa_s: dynamic viscosity mu [Pa s]; section: function (alpha [rad], Re [-]) ->
    (cl [-], cd [-]); stations: annuli [-].
    Returns a dict ct, cp [-] with T = ct rho n^2 D^4 and P = cp rho n^3 D^5, figure_of_merit
    [-] (= sqrt(2 / pi) ct^1.5 / cp), reynolds_75 [-] (chord Reynolds number at 75 % radius,
    blade speed only), stalled_share [-]. CT_prop = CT pi^3 / 4, CP_prop = CP pi^4 / 4
    (from rho pi R^2 (Omega R)^2 = rho n^2 D^4 pi^3 / 4 with Omega = 2 pi n, R = D / 2).
    """
    radius = 0.5 * diameter_m
    tip_speed = rpm * math.pi / 30.0 * radius
    nu = viscosity_Pa_s / density_kg_m3
    rotor = rotor_coefficients(pitch_m / diameter_m, blades, tip_speed, radius, nu, section, stations)
    return {
        "ct": rotor["ct"] * math.pi ** 3 / 4.0,
        "cp": rotor["cp"] * math.pi ** 4 / 4.0,
        "figure_of_merit": rotor["figure_of_merit"],
        "reynolds_75": 0.75 * tip_speed * chord_ratio(0.75) * radius / nu,
        "stalled_share": rotor["stalled_share"],
    }
