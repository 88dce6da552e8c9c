"""Steady operating point of one DC motor (equivalent-circuit model) + propeller + ESC at a bus voltage.

DC motor equivalent model (design notes sec. 3): back-EMF E = omega / Kv (Kv in rad/s
per volt), torque constant Kt = 1 / Kv, motor current I = I0 + Q / Kt, terminal voltage
Vm = E + I Rm. Propeller: n = omega / (2 pi) [rev/s], thrust T = CT rho n^2 D^4,
torque Q = CP rho n^2 D^5 / (2 pi) (so shaft power P = Q omega = CP rho n^3 D^5).
Ideal ESC with an optional efficiency eta_esc: Vm = d V_bus, I_bus = d I / eta_esc.
Source: the DC motor equivalent circuit, e.g. M. Drela, "First-order DC electric motor
model" (MIT, 2007), and the propeller coefficient convention of e.g. J. B. Brandt and
M. S. Selig (2011) (both from memory). SI units.
"""

import math

from estimator.core.constants import RAD_S_PER_RPM

_TWO_PI = 2.0 * math.pi


def kv_rad_s_per_V(kv_rpm_per_V):
    """Motor velocity constant in SI, Kv [rad/(s V)] = Kv [rpm/V] * 2 pi / 60.

    kv_rpm_per_V: Kv as sold [rpm/V]. Returns Kv [rad/(s V)].
    Source: unit definition.
    """
    return kv_rpm_per_V * RAD_S_PER_RPM


def propeller_constants(density_kg_m3, propeller):
    """Thrust and torque constants of a propeller, T = c_T omega^2 and Q = c_Q omega^2.

    c_T = CT rho D^4 / (2 pi)^2 [N s^2], c_Q = CP rho D^5 / (2 pi)^3 [N m s^2]
    (from T = CT rho n^2 D^4, Q = CP rho n^2 D^5 / (2 pi), n = omega / (2 pi)).
    density_kg_m3: air density rho [kg/m^3]; propeller: dict with diameter_m D [m],
    ct CT [-], cp CP [-]. Returns (c_T [N s^2], c_Q [N m s^2]).
    Source: propeller coefficient definitions (Brandt and Selig 2011, from memory).
    """
    d = propeller["diameter_m"]
    c_t = propeller["ct"] * density_kg_m3 * d ** 4 / (_TWO_PI * _TWO_PI)
    c_q = propeller["cp"] * density_kg_m3 * d ** 5 / (_TWO_PI * _TWO_PI * _TWO_PI)
    return c_t, c_q


def speed_at_motor_voltage_rad_s(motor_V, density_kg_m3, motor, propeller):
    """Rotor speed at a motor terminal voltage: the positive root of the steady DC motor equation.

    Vm = omega / Kv + Rm (I0 + Kv c_Q omega^2) is a quadratic in omega:
    Rm Kv c_Q omega^2 + omega / Kv - (Vm - Rm I0) = 0, solved in the cancellation-free form
    omega = 2 (Vm - Rm I0) / (1/Kv + sqrt(1/Kv^2 + 4 Rm Kv c_Q (Vm - Rm I0))).
    motor_V: motor terminal voltage Vm [V], >= 0; density_kg_m3: rho [kg/m^3];
    motor: dict kv_rpm_per_V [rpm/V], resistance_ohm Rm [ohm], no_load_current_A I0 [A];
    propeller: dict diameter_m [m], ct [-], cp [-]. Returns omega [rad/s]; 0 when
    Vm <= Rm I0 (the motor does not turn). Source: DC motor equivalent model (Drela 2007).
    """
    kv = kv_rad_s_per_V(motor["kv_rpm_per_V"])
    r_m = motor["resistance_ohm"]
    drive_V = motor_V - r_m * motor["no_load_current_A"]
    if drive_V <= 0.0:
        return 0.0
    _, c_q = propeller_constants(density_kg_m3, propeller)
    inv_kv = 1.0 / kv
    return 2.0 * drive_V / (inv_kv + math.sqrt(inv_kv * inv_kv + 4.0 * r_m * kv * c_q * drive_V))


def rotor_operating_point(duty, bus_V, density_kg_m3, motor, propeller, esc_efficiency=1.0):
    """Steady operating point of one rotor at ESC duty d and a known bus voltage.

    Vm = d V_bus; omega from speed_at_motor_voltage_rad_s; T = c_T omega^2, Q = c_Q omega^2,
    I = I0 + Kv Q (I = Vm / Rm when the motor stalls below Vm = Rm I0), P_shaft = Q omega,
    I_bus = d I / eta_esc, P_elec = V_bus I_bus.
    duty: ESC duty (command) d [-], 0..1 (raises ValueError outside); bus_V: bus voltage
    V_bus [V], >= 0; density_kg_m3: air density rho [kg/m^3], > 0; motor: dict
    kv_rpm_per_V [rpm/V], resistance_ohm [ohm], no_load_current_A [A]; propeller: dict
    diameter_m [m], ct [-], cp [-]; esc_efficiency: eta_esc [-], 0 < eta <= 1.
    Returns a dict: omega_rad_s [rad/s], rpm [rpm], thrust_N [N], torque_N_m [N m],
    motor_voltage_V [V], motor_current_A [A], bus_current_A [A], shaft_power_W [W],
    electrical_power_W [W] (drawn from the bus by this rotor).
    Source: DC motor equivalent model (Drela 2007, from memory); ideal ESC.
    """
    if duty < 0.0 or duty > 1.0:
        raise ValueError("duty %.3f is outside 0..1" % duty)
    if not 0.0 < esc_efficiency <= 1.0:
        raise ValueError("ESC efficiency must be in (0, 1]")
    motor_V = duty * bus_V
    omega = speed_at_motor_voltage_rad_s(motor_V, density_kg_m3, motor, propeller)
    c_t, c_q = propeller_constants(density_kg_m3, propeller)
    torque = c_q * omega * omega
    if omega > 0.0:
        current = motor["no_load_current_A"] + kv_rad_s_per_V(motor["kv_rpm_per_V"]) * torque
    elif motor["resistance_ohm"] > 0.0:
        current = motor_V / motor["resistance_ohm"]
    else:
        current = 0.0
    bus_current = duty * current / esc_efficiency
    return {
        "omega_rad_s": omega,
        "rpm": omega / _TWO_PI * 60.0,
        "thrust_N": c_t * omega * omega,
        "torque_N_m": torque,
        "motor_voltage_V": motor_V,
        "motor_current_A": current,
        "bus_current_A": bus_current,
        "shaft_power_W": torque * omega,
        "electrical_power_W": bus_V * bus_current,
    }


def motor_input_for_thrust(thrust_N, density_kg_m3, motor, propeller):
    """Motor voltage and current that hold a given rotor thrust (the model run backwards).

    omega = sqrt(T / c_T), Q = c_Q omega^2, I = I0 + Kv Q, Vm = omega / Kv + I Rm.
    thrust_N: rotor thrust T [N], >= 0; density_kg_m3: rho [kg/m^3];
    motor: dict kv_rpm_per_V [rpm/V], resistance_ohm [ohm], no_load_current_A [A];
    propeller: dict diameter_m [m], ct [-], cp [-]. Returns (motor_V [V], motor_current_A [A],
    omega_rad_s [rad/s]). Source: DC motor equivalent model (Drela 2007, from memory).
    """
    c_t, c_q = propeller_constants(density_kg_m3, propeller)
    omega = math.sqrt(thrust_N / c_t) if thrust_N > 0.0 else 0.0
    kv = kv_rad_s_per_V(motor["kv_rpm_per_V"])
    current = motor["no_load_current_A"] + kv * c_q * omega * omega
    return omega / kv + current * motor["resistance_ohm"], current, omega
