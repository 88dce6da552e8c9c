"""Electrical power of one rotor against its thrust, P(T, rho), and thrust from power: the one copy.

Form (design notes sec. 3), per rotor, T in N:
    P = p0 + p_h T^0.5 r + p_1 T + p_15 T^1.5 r + p_2 T^2,   r = sqrt(rho_ref / rho)
every coefficient >= 0. Where the terms come from (DC motor model with constant CT, CP;
back-EMF s = omega / Kv, T = a s^2, Kv Q = c s^2, I = I0 + c s^2, Vm = s + R I):
    P = Vm I = R I0^2 + I0 T^0.5 / sqrt(a) + 2 R I0 (c / a) T + (c / a^1.5) T^1.5 + R (c / a)^2 T^2
so p0 is no-load copper loss (plus ESC idle draw), p_h no-load current times back-EMF,
p_1 and p_2 copper loss, p_15 T^1.5 the shaft power. a and c both grow as rho at fixed
speed, hence the sqrt(rho_ref / rho) on the T^0.5 and T^1.5 terms only.

Coaxial pairs: the pair needs kappa times the ideal induced power T^1.5 / sqrt(2 rho A) of
isolated rotors (momentum theory; kappa = momentum.COAXIAL_INDUCED_POWER_FACTOR, power
basis). The extra (kappa - 1) P_ideal is shaft power: it raises the propeller torque by the
ratio e = 1 + (kappa - 1) P_ideal / P_shaft and passes through the same motor, so the
torque-current terms follow it (c -> c e: p_15 e, p_1 e, p_2 e^2) while the no-load terms
stay. The datasheet route raises CP by the same ratio (coaxial_shaft_ratio), so both routes
add exactly the same power for the same rotor.
Sources: DC motor equivalent model (Drela 2007, from memory); momentum theory (Leishman,
Principles of Helicopter Aerodynamics, ch. 2 and 6, from memory).
"""

import math

# the coefficient keys of a power-model dict (the parameter set's power_model block)
KEYS = ("idle_power_W", "sqrt_W_per_N0_5", "linear_W_per_N", "induced_W_per_N1_5", "copper_W_per_N2")
# the keys whose terms the form scales with the air, by r = sqrt(rho_ref / rho) (module docstring)
AIR_KEYS = ("sqrt_W_per_N0_5", "induced_W_per_N1_5")
# bisection halvings for thrust_from_power_N: 80 halvings of a bracket leave < 1e-24 of it
BISECTION_STEPS = 80


def coefficients_from_motor(thrust_per_V2_N, current_per_V2_A, resistance_ohm, no_load_current_A,
                            idle_power_W=0.0, speed_current_A_per_V=0.0):
    """Power-model coefficients of a DC motor + propeller (the expansion in the module docstring).

    thrust_per_V2_N: a = T / s^2 [N/V^2] (s = back-EMF [V]); current_per_V2_A: c = Kv Q / s^2
    [A/V^2]; resistance_ohm: R [ohm]; no_load_current_A: I0 [A]; idle_power_W: extra draw
    at zero thrust [W] (ESC); speed_current_A_per_V: b [A/V], a current growing with speed,
    I = I0 + b s + c s^2 (the fitted motor model's, estimator.core.fitted_rotor), which adds
    (1 + 2 R b) to the T^0.5 and T^1.5 terms and b + R b^2 to the T term. Returns a dict with
    the KEYS [W, W/N^0.5, W/N, W/N^1.5, W/N^2].
    Source: DC motor equivalent model, Vm = s + R I, I = I0 + b s + c s^2 (Drela 2007, from memory).
    """
    a, c, r, i0, b = thrust_per_V2_N, current_per_V2_A, resistance_ohm, no_load_current_A, speed_current_A_per_V
    return {"idle_power_W": r * i0 * i0 + idle_power_W, "sqrt_W_per_N0_5": i0 * (1.0 + 2.0 * r * b) / math.sqrt(a),
            "linear_W_per_N": (b + r * b * b + 2.0 * r * i0 * c) / a,
            "induced_W_per_N1_5": c * (1.0 + 2.0 * r * b) / a ** 1.5, "copper_W_per_N2": r * c * c / (a * a)}


def coaxial_shaft_ratio(ideal_over_shaft, induced_power_factor):
    """Shaft-power (torque) ratio of a rotor of a coaxial pair to the isolated rotor at equal thrust.

    e = 1 + (kappa - 1) P_ideal / P_shaft: only the ideal induced power is multiplied by kappa.
    ideal_over_shaft: P_ideal / P_shaft of the isolated rotor [-] (its figure of merit);
    induced_power_factor: kappa [-], >= 1. Returns e [-]. Source: momentum theory of a coaxial
    pair, power basis (Leishman ch. 6, from memory).
    """
    return 1.0 + (induced_power_factor - 1.0) * ideal_over_shaft


def coaxial_coefficients(power, density_kg_m3, area_m2, induced_power_factor):
    """Power-model coefficients of one rotor of a coaxial pair (module docstring).

    power: dict with KEYS and reference_density_kg_m3 [kg/m^3]; density_kg_m3: rho
    [kg/m^3]; area_m2: disk area A [m^2]; induced_power_factor: kappa [-]. With
    P_ideal / P_shaft = 1 / (sqrt(2 rho A) p_15 r) and e = coaxial_shaft_ratio(...), returns a
    new dict with p_15 e, p_1 e, p_2 e^2 (others unchanged). An isolated rotor with p_15 = 0
    has no shaft-power term to scale: the ideal power is then added to p_15 directly.
    Source: as coaxial_shaft_ratio.
    """
    out = dict(power)
    r = math.sqrt(power["reference_density_kg_m3"] / density_kg_m3)
    ideal = 1.0 / math.sqrt(2.0 * density_kg_m3 * area_m2)  # P_ideal / T^1.5 [W/N^1.5]
    p15 = power["induced_W_per_N1_5"] * r
    if p15 <= 0.0:
        out["induced_W_per_N1_5"] = (induced_power_factor - 1.0) * ideal / r
        return out
    e = coaxial_shaft_ratio(ideal / p15, induced_power_factor)
    out["induced_W_per_N1_5"] = power["induced_W_per_N1_5"] * e
    out["linear_W_per_N"] = power.get("linear_W_per_N", 0.0) * e
    out["copper_W_per_N2"] = power["copper_W_per_N2"] * e * e
    return out


def rotor_power_W(power, thrust_N, density_kg_m3):
    """P(T, rho) [W] of one rotor (module docstring); T below 0 counts as 0.

    power: dict with KEYS ([W], [W/N^0.5], [W/N], [W/N^1.5], [W/N^2]; a missing T^0.5 or T
    key counts as 0) and reference_density_kg_m3 rho_ref [kg/m^3]; thrust_N: T [N];
    density_kg_m3: rho [kg/m^3]. Returns P [W]. Source: module docstring. Written with
    operators only on T, so T may also be a numpy array (the desktop fit passes its rows).
    """
    t = 0.5 * (thrust_N + abs(thrust_N))   # T, or 0 where T < 0
    r = math.sqrt(power["reference_density_kg_m3"] / density_kg_m3)
    root = t ** 0.5
    return (power["idle_power_W"] + power.get("sqrt_W_per_N0_5", 0.0) * root * r
            + power.get("linear_W_per_N", 0.0) * t + power["induced_W_per_N1_5"] * t * root * r
            + power["copper_W_per_N2"] * t * t)


def thrust_from_power_N(power, power_W, density_kg_m3):
    """Thrust [N] of one rotor drawing power_W [W] at rho [kg/m^3]: rotor_power_W inverted.

    With every coefficient >= 0 (and one of the thrust terms > 0), P(T) rises with T, so the
    root is bracketed and found by bisection (BISECTION_STEPS halvings, fixed). Returns 0 at
    or below the idle power. power: dict as in rotor_power_W [W, W/N^0.5, W/N, W/N^1.5,
    W/N^2, kg/m^3] (power: the coefficient dict [W/N^x]); power_W: P [W]; density_kg_m3: rho [kg/m^3]. Returns T [N].
    Source: module docstring.
    """
    if power_W <= rotor_power_W(power, 0.0, density_kg_m3):
        return 0.0
    hi = 1.0
    for _ in range(200):  # doubling up to 2^200 N: bounded
        if rotor_power_W(power, hi, density_kg_m3) >= power_W:
            break
        hi *= 2.0
    lo = 0.0
    for _ in range(BISECTION_STEPS):
        mid = 0.5 * (lo + hi)
        if rotor_power_W(power, mid, density_kg_m3) < power_W:
            lo = mid
        else:
            hi = mid
    return 0.5 * (lo + hi)


def rotor_static_factor(power, thrust_N, density_kg_m3, area_m2):
    """Static thrust factor k = T / (2 rho A P(T)^2)^(1/3) [-] of the rotor the power model
    describes, at thrust_N [N]: momentum theory's k with P from rotor_power_W (not from a line
    through k). power: dict as in rotor_power_W; density_kg_m3: rho [kg/m^3]; area_m2: disk
    area A [m^2]. Source: momentum theory (Leishman ch. 2, from memory), design notes sec. 3.
    """
    p_W = rotor_power_W(power, thrust_N, density_kg_m3)
    return thrust_N / (2.0 * density_kg_m3 * area_m2 * p_W * p_W) ** (1.0 / 3.0)
