"""Thrust from bus power for the watch's implied mass: the parameter set's power model inverted,
and the knots of the piecewise-linear table the kernel interpolates (estimator.core.watch)."""

import math

from estimator.core.power_model import AIR_KEYS, thrust_from_power_N


def flight_power_model(params, layout, density_kg_m3):
    """The power model of one rotor as the vehicle flies it: P(T, rho) coefficients (a dict as
    estimator.core.power_model.rotor_power_W takes) for the watch's expected power and implied mass,
    in the site's air at density_kg_m3: its change from the bench's air is the fitted motor
    model's (estimator.core.fitted_rotor.site_power_model; a set without a motor model keeps the
    power model's own sqrt(rho_ref / rho) terms). Read it at that density only.

    layout "flat" (or None): the parameter set's power model in the site's air (the bench rotor,
    in clean air; in the bench's own air the power model itself). "coaxial": that plus the power
    the pair's penalty adds in the pre-flight sheet's model,
    estimator.core.fitted_rotor.coaxial_power_increment (the fitted motor model's torque current
    raised by coaxial_torque_ratio, as FittedRotor does), so the watch and the sheet add the same
    watts at every thrust and air density; a set without a motor model (hand-built) takes the
    same rule on its own T^1.5 term (power_model.coaxial_coefficients). density_kg_m3: site rho
    [kg/m^3]. Source: momentum theory of a coaxial pair, induced-power factor (1 + sqrt(17)) / 4 =
    1.2808 on a power basis (Leishman, Principles of Helicopter
    Aerodynamics, 2006, ch. 6, coaxial rotors; from memory), through the DC motor model
    (estimator.core.power_model docstring).
    """
    from estimator.core.fitted_rotor import site_power_model

    power = params["power_model"]
    if layout != "coaxial":
        return site_power_model(power, params, density_kg_m3)
    if "motor_model" not in params:
        from estimator.core.momentum import COAXIAL_INDUCED_POWER_FACTOR, disk_area_m2
        from estimator.core.power_model import coaxial_coefficients
        return coaxial_coefficients(power, density_kg_m3, disk_area_m2(params["rotor"]["diameter_m"]),
                                    COAXIAL_INDUCED_POWER_FACTOR)
    from estimator.core.fitted_rotor import coaxial_power_increment
    # the flat rotor in the site's air (its reference density is rho), plus the pair's extra terms
    # carried from the motor model's air to rho as the form carries them (sqrt(rho_m / rho) on T^0.5, T^1.5)
    out = site_power_model(power, params, density_kg_m3)
    r = math.sqrt(params["motor_model"]["reference_density_kg_m3"] / density_kg_m3)
    for key, extra in coaxial_power_increment(params).items():
        out[key] = out.get(key, 0.0) + extra * (r if key in AIR_KEYS else 1.0)
    return out


def coaxial_note(params, layout, density_kg_m3, thrust_N, rotors):
    """Words on a coaxial pair's penalty for the watch's notes ('' for a flat layout): the watts
    flight_power_model adds at thrust_N [N] per rotor on all rotors [-] at rho density_kg_m3
    [kg/m^3], and kappa's source (Leishman 2006, coaxial rotors, from memory). params: set [-]."""
    if layout != "coaxial":
        return ""
    from estimator.core.momentum import COAXIAL_INDUCED_POWER_FACTOR
    from estimator.core.power_model import rotor_power_W
    extra_W = rotors * (rotor_power_W(flight_power_model(params, layout, density_kg_m3), thrust_N, density_kg_m3)
                        - rotor_power_W(flight_power_model(params, "flat", density_kg_m3), thrust_N, density_kg_m3))
    return (", coaxial pairs: +%.1f W at the hover, the pre-flight sheet's penalty: ideal induced power x %.4f, "
            "power basis, Leishman 2006, coaxial rotors, from memory" % (extra_W, COAXIAL_INDUCED_POWER_FACTOR))


def avionics_power_W(facts, bus_V=None):
    """The bus power of everything on the pack that is not a motor [W]: P_av = I_av V_bus, with
    I_av the vehicle's avionics_current_A [A] (facts: estimator.watch.config.vehicle_facts; 0 when
    not given) and V_bus [V] the bus voltage, by default the nominal pack voltage (else the middle
    of full and empty; the watch's tables take one value: over a flight the bus moves by about
    +-10 %, so +-10 % of P_av, 0.2 W for 0.5 A on a 2S pack). Source: P = V I."""
    current_A = float(facts.get("avionics_current_A") or 0.0)
    if bus_V is None:
        bus_V = facts.get("nominal_voltage_V") or 0.5 * ((facts.get("full_voltage_V") or 0.0)
                                                          + (facts.get("empty_voltage_V") or 0.0))
    return current_A * float(bus_V)


def thrust_from_power_total_N(power_W, params, rotor_count, density_kg_m3, layout="flat", avionics_W=0.0,
                              flight_power=None):
    """Total thrust [N] from total bus power [W]: the vehicle's power model inverted.

    Per rotor T = P^-1((P_total - P_av) / N) with P(T, rho) the one power model
    (estimator.core.power_model.thrust_from_power_N) of flight_power_model(params, layout, rho):
    the same P(T) the expected-power table uses, so the implied mass and the expected power
    never disagree, a coaxial pair's penalty included. power_W: total bus power [W]; rotor_count
    N [-]; density_kg_m3: site rho [kg/m^3]; layout: the vehicle's rotor layout ("flat",
    "coaxial"); avionics_W: P_av [W], the bus power that does not reach a rotor (avionics_power_W);
    flight_power: that flight_power_model when the caller holds it already (the CONFIG's table
    inverts it at 513 powers), else it is made here. Source: DC motor + momentum theory power model (estimator.core.power_model docstring; coaxial:
    flight_power_model).
    """
    power = flight_power if flight_power is not None else flight_power_model(params, layout, density_kg_m3)
    return rotor_count * thrust_from_power_N(power, max(power_W - avionics_W, 0.0) / rotor_count, density_kg_m3)


def thrust_knots_mN(thrust_N, step_W):
    """33 knots [mN] at P = 0, step_W, ..., 32 step_W [W] of the piecewise-linear table the kernel
    interpolates, chosen by least squares over 16 points per interval (numpy.linalg.lstsq on
    the hat functions of linear interpolation, through estimator.solvers: a thrust that is not
    finite raises solvers.NotFinite instead of reaching LAPACK), not as the values at the knots:
    T(P) is concave and steep just above the idle power, so knot values alone read low between
    knots (3 % at a 21 g whoop's hover). thrust_N(P [W]) -> T [N]. Knots kept within 0..1e6 mN.
    """
    import numpy as np  # imported when a CONFIG is made, not when the command table loads

    from estimator import solvers

    x = np.linspace(0.0, 32.0, 32 * 16 + 1)
    target = np.array([1000.0 * thrust_N(xi * step_W) for xi in x])
    hat = np.maximum(0.0, 1.0 - np.abs(x[:, None] - np.arange(33)[None, :]))
    knots = solvers.lstsq(hat, target, "watch's thrust-from-power table")[0]
    return [int(round(min(1e6, max(0.0, k)))) for k in knots]
