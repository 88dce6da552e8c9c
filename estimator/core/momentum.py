"""Static momentum (actuator-disk) theory for one rotor in hover.

Source for every formula here: W. Johnson, *Helicopter Theory* (1980), ch. 2, and
J. G. Leishman, *Principles of Helicopter Aerodynamics*, 2nd ed. (2006), ch. 2
(from memory). SI units throughout.
"""

import math

# Coaxial pair, lower rotor in the fully developed slipstream of the upper, equal
# thrust shared: the pair needs 1.2808 times the induced POWER of two isolated
# rotors at the same total thrust (power basis). Leishman (2006) sec. 6.x
# "coaxial rotor performance", from memory; exactly (1 + sqrt(17)) / 4 = 1.28078,
# derived again in tests/test_momentum.py from momentum conservation.
COAXIAL_INDUCED_POWER_FACTOR = (1.0 + math.sqrt(17.0)) / 4.0


def disk_area_m2(diameter_m):
    """Rotor disk area A = pi D^2 / 4.

    diameter_m: rotor diameter D [m], > 0. Returns A [m^2].
    Source: geometry.
    """
    return math.pi * diameter_m * diameter_m / 4.0


def ideal_thrust_N(power_W, density_kg_m3, area_m2):
    """Ideal static thrust from power, T = (2 rho A P^2)^(1/3).

    power_W: power delivered to the air P [W], >= 0; density_kg_m3: air density
    rho [kg/m^3], > 0; area_m2: disk area A [m^2], > 0. Returns T [N].
    Source: momentum theory, Johnson (1980) eq. 2.x / Leishman (2006) eq. 2.15 (from memory).
    """
    return (2.0 * density_kg_m3 * area_m2 * power_W * power_W) ** (1.0 / 3.0)


def ideal_power_W(thrust_N, density_kg_m3, area_m2):
    """Ideal static power for a thrust, P = T^(3/2) / sqrt(2 rho A).

    thrust_N: thrust T [N], >= 0; density_kg_m3: rho [kg/m^3], > 0; area_m2: A [m^2], > 0.
    Returns P [W]. Source: momentum theory, Leishman (2006) eq. 2.14 (from memory).
    """
    return thrust_N ** 1.5 / math.sqrt(2.0 * density_kg_m3 * area_m2)


def induced_velocity_m_s(thrust_N, density_kg_m3, area_m2):
    """Induced velocity at the disk in hover, v = sqrt(T / (2 rho A)); slipstream is 2 v.

    thrust_N: T [N], >= 0; density_kg_m3: rho [kg/m^3]; area_m2: A [m^2]. Returns v [m/s].
    Source: momentum theory, Leishman (2006) eq. 2.13 (from memory).
    """
    return math.sqrt(thrust_N / (2.0 * density_kg_m3 * area_m2))


def disk_loading_N_m2(thrust_N, area_m2):
    """Disk loading DL = T / A.

    thrust_N: T [N]; area_m2: A [m^2]. Returns DL [N/m^2]. Source: definition.
    """
    return thrust_N / area_m2


def figure_of_merit(ct, cp):
    """Figure of merit from propeller coefficients, FM = sqrt(2/pi) CT^(3/2) / CP.

    ct: thrust coefficient CT = T / (rho n^2 D^4) [-]; cp: power coefficient
    CP = P / (rho n^3 D^5) [-] (n in rev/s). Returns FM [-], 0..1 for a real rotor.
    Source: P_ideal / P with the propeller (n, D) convention; follows from
    ideal_power_W with A = pi D^2 / 4 (derivation in tests/test_momentum.py).
    """
    return math.sqrt(2.0 / math.pi) * ct ** 1.5 / cp


def static_factor(thrust_N, power_W, density_kg_m3, area_m2):
    """Static thrust factor k = T / (2 rho A P^2)^(1/3); equivalent efficiency eta = k^(3/2).

    thrust_N: measured thrust T [N]; power_W: input power P [W] (electrical for the
    whole chain), > 0; density_kg_m3: rho [kg/m^3]; area_m2: A [m^2]. Returns k [-].
    k > 1 is physically impossible. Source: momentum theory (as ideal_thrust_N).
    """
    return thrust_N / ideal_thrust_N(power_W, density_kg_m3, area_m2)


def thrust_from_power_N(power_W, factor, density_kg_m3, area_m2):
    """Thrust estimate T = k (2 rho A P^2)^(1/3).

    power_W: P [W]; factor: static thrust factor k [-], 0 < k <= 1; density_kg_m3: rho
    [kg/m^3]; area_m2: A [m^2]. Returns T [N]. Source: as ideal_thrust_N.
    """
    return factor * ideal_thrust_N(power_W, density_kg_m3, area_m2)


def power_from_thrust_W(thrust_N, factor, density_kg_m3, area_m2):
    """Power needed for a thrust with factor k: P = (T / k)^(3/2) / sqrt(2 rho A).

    thrust_N: T [N]; factor: k [-], 0 < k <= 1; density_kg_m3: rho [kg/m^3];
    area_m2: A [m^2]. Returns P [W]. Source: inverse of thrust_from_power_N.
    """
    return ideal_power_W(thrust_N / factor, density_kg_m3, area_m2)
