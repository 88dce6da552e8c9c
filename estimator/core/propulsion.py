"""All rotors on one pack: the shared operating point with pack sag, and coaxial layouts.

The rotors are identical and run at the same duty; they share the bus voltage
V_bus = V_oc - R_pack * N * I_bus,rotor(V_bus). I_bus,rotor grows with V_bus, so
f(V) = V + R_pack N I_bus(V) - V_oc is increasing with f(0) = -V_oc <= 0 and
f(V_oc) >= 0: one root, found by bisection with a fixed iteration count (never an
unbounded loop). Hover is solved in closed form from the thrust each rotor must make.
SI units. Sources: design notes sec. 3; motor.py; momentum.py.
"""

import math

from estimator.core.battery import sagged_bus_V
from estimator.core.momentum import COAXIAL_INDUCED_POWER_FACTOR
from estimator.core.motor import motor_input_for_thrust, rotor_operating_point
from estimator.core.power_model import coaxial_shaft_ratio

# 60 halvings of a bracket of at most a few hundred volts leave under 1e-15 V.
BISECTION_STEPS = 60


def coaxial_propeller(propeller, induced_power_factor=COAXIAL_INDUCED_POWER_FACTOR):
    """Propeller coefficients of one rotor of a coaxial pair (power basis).

    A coaxial pair at equal thrust needs kappa = 1.2808 times the ideal induced power of
    two isolated rotors at the same total thrust (momentum.COAXIAL_INDUCED_POWER_FACTOR).
    We add that extra ideal induced power to the isolated power coefficient and keep the
    thrust coefficient: CP_coax = CP + (kappa - 1) sqrt(2/pi) CT^(3/2), where
    sqrt(2/pi) CT^(3/2) is the ideal (FM = 1) power coefficient. Profile power is not
    penalised. The result is an average over the pair (the lower rotor works harder).
    propeller: dict diameter_m [m], ct [-], cp [-]; induced_power_factor: kappa [-], >= 1.
    Returns a new propeller dict. Source: momentum theory of a coaxial pair with the
    lower rotor in the fully developed slipstream of the upper, Leishman (2006) ch. 6
    (from memory; kappa = (1 + sqrt(17)) / 4, derived in tests/test_momentum.py).
    """
    out = dict(propeller)
    ideal_cp = math.sqrt(2.0 / math.pi) * propeller["ct"] ** 1.5
    # the one coaxial rule (power_model.coaxial_shaft_ratio): CP_coax = CP e
    out["cp"] = propeller["cp"] * coaxial_shaft_ratio(ideal_cp / propeller["cp"], induced_power_factor)
    return out


def shared_operating_point(duty, open_circuit_V, pack_resistance_ohm, rotor_count,
                           density_kg_m3, motor, propeller, esc_efficiency=1.0):
    """Operating point of N identical rotors at one duty on a sagging pack.

    Solves V_bus + R_pack N I_bus(d, V_bus) = V_oc by bisection on V_bus in [0, V_oc]
    (BISECTION_STEPS halvings, fixed), then evaluates motor.rotor_operating_point there.
    duty: d [-], 0..1; open_circuit_V: pack open-circuit voltage V_oc [V], > 0;
    pack_resistance_ohm: R_pack [ohm], >= 0; rotor_count: N [-]; density_kg_m3: rho
    [kg/m^3]; motor: dict kv_rpm_per_V [rpm/V], resistance_ohm [ohm], no_load_current_A [A];
    propeller: dict diameter_m [m], ct [-], cp [-]; esc_efficiency: eta_esc [-].
    Returns the rotor dict of rotor_operating_point plus bus_V [V],
    pack_current_A [A] (all rotors), total_thrust_N [N], total_power_W [W] (from the bus).
    Source: design notes sec. 3 (shared sag), bisection (bounded).
    """
    lo, hi = 0.0, open_circuit_V
    if pack_resistance_ohm > 0.0:
        for _ in range(BISECTION_STEPS):
            mid = 0.5 * (lo + hi)
            op = rotor_operating_point(duty, mid, density_kg_m3, motor, propeller, esc_efficiency)
            if mid + pack_resistance_ohm * rotor_count * op["bus_current_A"] - open_circuit_V > 0.0:
                hi = mid
            else:
                lo = mid
        bus_V = 0.5 * (lo + hi)
    else:
        bus_V = open_circuit_V
    op = rotor_operating_point(duty, bus_V, density_kg_m3, motor, propeller, esc_efficiency)
    op["bus_V"] = bus_V
    op["pack_current_A"] = rotor_count * op["bus_current_A"]
    op["total_thrust_N"] = rotor_count * op["thrust_N"]
    op["total_power_W"] = rotor_count * op["electrical_power_W"]
    return op


def shared_point_for_thrust(thrust_per_rotor_N, open_circuit_V, pack_resistance_ohm, rotor_count,
                            density_kg_m3, motor, propeller, esc_efficiency=1.0):
    """Duty and operating point at which each of N rotors makes a given thrust (closed form).

    The thrust fixes omega, the motor current I and voltage Vm (motor.motor_input_for_thrust);
    each rotor then draws P_bus = Vm I / eta_esc from the bus, and the pack gives
    V_bus (V_oc - V_bus) = R_pack N P_bus, whose upper (stable) root is
    V_bus = (V_oc + sqrt(V_oc^2 - 4 R_pack N P_bus)) / 2; duty d = Vm / V_bus.
    thrust_per_rotor_N: T [N], >= 0; open_circuit_V: V_oc [V]; pack_resistance_ohm:
    R_pack [ohm]; rotor_count: N [-]; density_kg_m3: rho [kg/m^3];
    motor: dict kv_rpm_per_V [rpm/V], resistance_ohm [ohm], no_load_current_A [A];
    propeller: dict diameter_m [m], ct [-], cp [-]; esc_efficiency: eta_esc [-].
    Returns a dict: duty [-] (may exceed 1: then full command is not enough), bus_V [V],
    omega_rad_s [rad/s], rpm [rpm], thrust_N [N], motor_voltage_V [V], motor_current_A [A],
    bus_current_A [A] (one rotor), pack_current_A [A], total_power_W [W], limited_by
    (None, "command" when d > 1, "pack" when the pack cannot deliver that power at any
    voltage: then duty and bus_V are None).
    Source: DC motor model and pack sag of design notes sec. 3, solved exactly.
    """
    motor_V, current, omega = motor_input_for_thrust(thrust_per_rotor_N, density_kg_m3, motor, propeller)
    p_bus = motor_V * current / esc_efficiency
    out = {
        "duty": None, "bus_V": None, "omega_rad_s": omega, "rpm": omega * 60.0 / (2.0 * math.pi),
        "thrust_N": thrust_per_rotor_N, "motor_voltage_V": motor_V, "motor_current_A": current,
        "bus_current_A": None, "pack_current_A": None, "total_power_W": rotor_count * p_bus,
        "limited_by": None,
    }
    bus_V = sagged_bus_V(open_circuit_V, pack_resistance_ohm, rotor_count * p_bus)
    if bus_V is None:
        out["limited_by"] = "pack"
        return out
    duty = motor_V / bus_V
    out["duty"] = duty
    out["bus_V"] = bus_V
    out["bus_current_A"] = p_bus / bus_V
    out["pack_current_A"] = rotor_count * p_bus / bus_V
    if duty > 1.0:
        out["limited_by"] = "command"
    return out
