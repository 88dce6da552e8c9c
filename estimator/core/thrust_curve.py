"""Thrust against command for the flight controller, and its inverse (hover command).

Model (design notes sec. 3): with x = (u - u_min) / (u_max - u_min) clipped to 0..1,
t(x) = (1 - a) x + a x^2 and T(u, V, rho) = T_max (V / V_ref)^n (rho / rho_ref)^m t(x).
a is the quadratic share [-]; u is the command [-] in 0..1. Source: the quadratic
thrust-curve form is common practice for ESC/propeller sets; the exponents follow
from the DC motor model (derived in DEVELOPERS.md, checked in tests).
"""

import math


def curve_fraction(x, quadratic_share):
    """Thrust fraction t(x) = (1 - a) x + a x^2 for normalised command x in 0..1.

    x: normalised command [-]; quadratic_share: a [-] in 0..1. Returns t [-].
    """
    return (1.0 - quadratic_share) * x + quadratic_share * x * x


def fraction_to_x(fraction, quadratic_share):
    """Invert t(x): x = (-(1 - a) + sqrt((1 - a)^2 + 4 a t)) / (2 a), x = t when a = 0.

    fraction: thrust fraction t [-] in 0..1; quadratic_share: a [-]. Returns x [-].
    Uses the cancellation-free form x = 2 t / ((1 - a) + sqrt((1 - a)^2 + 4 a t)).
    """
    b = 1.0 - quadratic_share
    root = math.sqrt(b * b + 4.0 * quadratic_share * fraction)
    den = b + root
    if den <= 0.0:
        return 0.0
    return 2.0 * fraction / den


def command_to_x(command, command_min, command_max=1.0):
    """Normalised command x = (u - u_min) / (u_max - u_min), clipped to 0..1.

    command: u [-]; command_min: u_min [-]; command_max: u_max [-]. Returns x [-].
    """
    x = (command - command_min) / (command_max - command_min)
    return 0.0 if x < 0.0 else (1.0 if x > 1.0 else x)


def scale_factor(voltage_V, reference_voltage_V, voltage_exponent,
                 density_kg_m3, reference_density_kg_m3, density_exponent):
    """Voltage and density scaling (V / V_ref)^n (rho / rho_ref)^m [-].

    voltage_V, reference_voltage_V: bus voltage now and at the fit [V];
    density_kg_m3, reference_density_kg_m3: air density now and at the fit [kg/m^3];
    voltage_exponent n [-], density_exponent m [-].
    """
    return ((voltage_V / reference_voltage_V) ** voltage_exponent
            * (density_kg_m3 / reference_density_kg_m3) ** density_exponent)


def thrust_N(command, voltage_V, density_kg_m3, curve):
    """Thrust T(u, V, rho) [N] from a curve dict (the ``thrust_curve`` block of a parameter set).

    command: u [-]; voltage_V: bus voltage [V]; density_kg_m3: rho [kg/m^3].
    curve: dict command_min [-], command_max [-], quadratic_share [-], thrust_max_N [N],
    reference_voltage_V [V], voltage_exponent [-], reference_density_kg_m3 [kg/m^3],
    density_exponent [-].
    """
    x = command_to_x(command, curve["command_min"], curve.get("command_max", 1.0))
    return (curve["thrust_max_N"] * curve_fraction(x, curve["quadratic_share"])
            * scale_factor(voltage_V, curve["reference_voltage_V"], curve["voltage_exponent"],
                           density_kg_m3, curve["reference_density_kg_m3"], curve["density_exponent"]))


def hover_command(thrust_needed_N, voltage_V, density_kg_m3, curve):
    """Command and thrust fraction that give ``thrust_needed_N`` per rotor.

    thrust_needed_N: thrust one rotor must make [N]; voltage_V: bus voltage [V];
    density_kg_m3: air density [kg/m^3]; curve: dict as in thrust_N [N, V, kg/m^3, -].
    Returns (command [-] or None when full command is not enough, thrust fraction [-]),
    where the fraction is T_needed / T_max at this voltage and density (may exceed 1).
    """
    t_max = curve["thrust_max_N"] * scale_factor(
        voltage_V, curve["reference_voltage_V"], curve["voltage_exponent"],
        density_kg_m3, curve["reference_density_kg_m3"], curve["density_exponent"])
    fraction = thrust_needed_N / t_max
    if fraction > 1.0:
        return None, fraction
    if fraction <= 0.0:
        return curve["command_min"], fraction
    x = fraction_to_x(fraction, curve["quadratic_share"])
    u_min = curve["command_min"]
    return u_min + x * (curve.get("command_max", 1.0) - u_min), fraction
