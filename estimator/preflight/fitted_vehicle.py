"""A vehicle's N rotors of a parameter set's fitted model on its sagging pack: vehicle_state
at one pack voltage, reachable_at_cutoff, hover_load for the discharge to the cutoff, from
which estimator.preflight.measured_rotor writes the report. The rotor model itself (the
fitted DC motor + propeller, at any air density) is estimator.core.fitted_rotor.FittedRotor.
The pack sags as V_bus = V_oc - R_pack I_pack (Thevenin pack, design notes sec. 3).
"""

from estimator.core.battery import rotor_source_V
from estimator.core.fitted_rotor import FittedRotor
from estimator.units import STANDARD_GRAVITY_M_S2


def vehicle_state(params, vehicle, rho, open_circuit_V):
    """Hover and full-command values of a vehicle's N fitted rotors at one pack voltage.

    params: validated parameter set; vehicle: checked vehicle whose battery is the pack in the
    air (preflight.pack); rho: site air density [kg/m^3]; open_circuit_V: pack V_oc [V]. Returns
    a dict: weight_N, thrust_per_rotor_N, power_W, bus_V, command, fraction, current_A,
    limited_by ("pack", "command" or None), duty, motor_current_A, the full_* values at full
    command, and the FittedRotor itself (rotor). The vehicle's avionics_current_A [A] (default 0)
    flows from the pack too: the rotors see core.battery.rotor_source_V (source_V), and current_A
    and full_pack_current_A include it (avionics_current_A is given back beside them).
    """
    count = vehicle["rotors"]["count"]
    rotor = FittedRotor(params, rho, vehicle["rotors"].get("layout", "flat") == "coaxial")
    weight = vehicle["mass_kg"] * STANDARD_GRAVITY_M_S2
    t_r = weight / count
    r_pack = vehicle["battery"]["resistance_ohm"]
    av = vehicle.get("avionics_current_A", 0.0)
    source_V = rotor_source_V(open_circuit_V, r_pack, av)
    h = rotor.hover(t_r, count, source_V, r_pack)
    f = rotor.full(count, source_V, r_pack)
    out = {"weight_N": weight, "thrust_per_rotor_N": t_r, "open_circuit_V": open_circuit_V, "source_V": source_V,
           "avionics_current_A": av,
           "power_W": h["power_W"], "bus_V": h["bus_V"], "command": h["command"], "fraction": None,
           "current_A": None if h["pack_current_A"] is None else h["pack_current_A"] + av,
           "limited_by": None, "duty": h["duty"], "motor_current_A": h["motor_current_A"],
           "full_thrust_N": count * f["thrust_N"], "full_power_W": f["pack_current_A"] * f["bus_V"],
           "full_bus_V": f["bus_V"], "full_pack_current_A": f["pack_current_A"] + av,
           "full_motor_current_A": f["motor_current_A"], "rotor": rotor}
    if h["bus_V"] is None:
        out["limited_by"] = "pack"
        return out
    t_at_bus, _ = rotor.at_motor_V(h["bus_V"])
    out["fraction"] = t_r / t_at_bus if t_at_bus > 0.0 else None
    if h["command"] is None:
        out["limited_by"] = "command"
    return out


def reachable_at_cutoff(state, battery, rotors):
    """reachable_command [-] and reachable_thrust_to_weight [-] on the nominal pack: the command
    that holds the bus at the loaded cutoff and the thrust-to-weight there (as the datasheet
    route's core.hover.reachable_at_cutoff); None when full command keeps the cutoff."""
    cutoff_V = battery["cells"] * battery["cutoff_cell_V"]
    if state["full_bus_V"] >= cutoff_V or state["open_circuit_V"] <= cutoff_V:
        return {"reachable_command": None, "reachable_thrust_to_weight": None}
    at = state["rotor"].at_bus_V(rotors, cutoff_V, battery["resistance_ohm"], state["source_V"])
    return {"reachable_command": at["command"],
            "reachable_thrust_to_weight": rotors * at["thrust_N"] / state["weight_N"]}


def hover_load(params, vehicle, rho):
    """The hover load of the fitted model as core.discharge.discharge_to_cutoff takes it.

    vehicle: checked vehicle whose battery is already the pack in the air (preflight.pack);
    params: validated parameter set; rho: site air density [kg/m^3]. Returns a function of the
    pack open-circuit voltage [V] giving (pack current [A], bus voltage [V]) at hover, or None
    where the vehicle cannot hover (vehicle_state, one per call).
    """
    def load(open_circuit_V):
        state = vehicle_state(params, vehicle, rho, open_circuit_V)
        if state["command"] is None:
            return None
        return state["current_A"], state["bus_V"]
    return load
