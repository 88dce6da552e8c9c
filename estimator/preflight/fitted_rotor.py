"""The fitted DC motor + propeller model of a parameter set at one air density (and layout):
thrust, current and command of one rotor (FittedRotor), and a vehicle's N rotors on its
sagging pack (vehicle_state at one pack voltage, reachable_at_cutoff, hover_load for the
discharge to the cutoff), from which estimator.preflight.measured_rotor writes the report.

liftcal's own predictions come from the DC motor + propeller model fitted to the sweep (the
parameter set's motor_model block, estimator.bench.motor_fit), in back-EMF form:
T = a s^2, I = I0 + b s + c s^2, Vm = s + R I, duty d = Vm / V_bus, command
u = u0 + (u1 - u0) d^(1/g), bus current I_q + d I per rotor; a and c grow as the air
density. The pack sags as V_bus = V_oc - R_pack I_pack (Thevenin pack, design notes sec. 3),
solved in closed form for hover and by bisection at full command. The bench measures the
supply current, so the fitted I carries the ESC's loss (it is the ESC input power over Vm).
The command where the rotor starts turning is u0; the controller quadratic's intercept
command_min is never used as a duty offset. Coaxial pairs: the torque current is raised by
power_model.coaxial_shaft_ratio, the same rule the datasheet route applies to CP (only the
ideal induced power is multiplied by the coaxial factor).
"""

import math

from estimator.core.battery import sagged_bus_V
from estimator.core.momentum import COAXIAL_INDUCED_POWER_FACTOR, disk_area_m2
from estimator.core.power_model import coaxial_shaft_ratio
from estimator.units import STANDARD_GRAVITY_M_S2

BISECTION_STEPS = 60


class FittedRotor:
    """The motor_model block at one air density (and layout): thrust, current, command."""

    def __init__(self, params, density_kg_m3, coaxial=False):
        mm = params["motor_model"]
        ratio = density_kg_m3 / mm["reference_density_kg_m3"]
        self.a = mm["thrust_per_V2_N"] * ratio
        self.c = mm["current_per_V2_A"] * ratio
        self.r, self.i0 = mm["resistance_ohm"], mm["no_load_current_A"]
        self.u0, self.u1, self.g = mm["command_start"], mm["command_top"], mm["duty_exponent"]
        self.iq = mm["esc_idle_current_A"]
        self.b = mm.get("speed_current_A_per_V", 0.0)
        if coaxial:
            area = disk_area_m2(params["rotor"]["diameter_m"])
            # shaft power c s^3 against ideal T^1.5 / sqrt(2 rho A) = a^1.5 s^3 / sqrt(2 rho A)
            ideal_over_shaft = self.a ** 1.5 / (math.sqrt(2.0 * density_kg_m3 * area) * self.c)
            self.c *= coaxial_shaft_ratio(ideal_over_shaft, COAXIAL_INDUCED_POWER_FACTOR)

    def for_thrust(self, thrust_N):
        """(motor voltage Vm [V], motor current I [A]) that hold thrust_N [N]."""
        s = math.sqrt(max(thrust_N, 0.0) / self.a)
        i = self.i0 + self.b * s + self.c * s * s
        return s + self.r * i, i

    def at_motor_V(self, motor_V):
        """(thrust [N], motor current [A]) at motor voltage Vm [V]."""
        drive = motor_V - self.r * self.i0
        if drive <= 0.0:
            return 0.0, motor_V / self.r if self.r > 0.0 else 0.0
        lin = 1.0 + self.r * self.b
        s = 2.0 * drive / (lin + math.sqrt(lin * lin + 4.0 * self.r * self.c * drive))
        return self.a * s * s, self.i0 + self.b * s + self.c * s * s

    def command(self, duty):
        """Command [-] that gives duty [-] (above the spin-up u0)."""
        return self.u0 + (self.u1 - self.u0) * max(duty, 0.0) ** (1.0 / self.g)

    def hover(self, thrust_N, rotors, open_circuit_V, pack_ohm):
        """Hover of N rotors on a pack: dict bus_V, duty, command, pack_current_A, power_W,
        motor_current_A; bus_V None when the pack cannot deliver the power."""
        vm, i = self.for_thrust(thrust_N)
        # the ESCs' idle draw sags the pack as a current, the motors' as a power
        v_eff = open_circuit_V - pack_ohm * rotors * self.iq
        v = sagged_bus_V(v_eff, pack_ohm, rotors * vm * i) if v_eff > 0.0 else None
        if v is None:
            return {"bus_V": None, "duty": None, "command": None, "pack_current_A": None,
                    "power_W": rotors * vm * i, "motor_current_A": i}
        duty = vm / v
        current = rotors * (self.iq + vm * i / v)
        return {"bus_V": v, "duty": duty, "command": self.command(duty) if duty <= 1.0 else None,
                "pack_current_A": current, "power_W": current * v, "motor_current_A": i}

    def full(self, rotors, open_circuit_V, pack_ohm):
        """Full duty of N rotors on a sagging pack (bisection on V_bus): dict bus_V,
        thrust_N (per rotor), pack_current_A, motor_current_A."""
        lo, hi = 0.0, open_circuit_V
        for _ in range(BISECTION_STEPS):
            mid = 0.5 * (lo + hi)
            _, i = self.at_motor_V(mid)
            if mid + pack_ohm * rotors * (self.iq + i) > open_circuit_V:
                hi = mid
            else:
                lo = mid
        v = 0.5 * (lo + hi)
        t, i = self.at_motor_V(v)
        return {"bus_V": v, "thrust_N": t, "pack_current_A": rotors * (self.iq + i), "motor_current_A": i}

    def at_bus_V(self, rotors, bus_V, pack_ohm, open_circuit_V):
        """The duty that holds the bus at bus_V [V] on a pack V_oc [V], R [ohm] with N rotors.

        The pack current is then (V_oc - V_bus) / R; each rotor draws I_q + d I(d V_bus), which
        rises with the duty d, so d is found by bisection on [0, 1]. Returns dict duty [-],
        command [-], thrust_N [N] per rotor. Source: Thevenin pack, the fitted motor model.
        """
        pack_A = (open_circuit_V - bus_V) / pack_ohm if pack_ohm > 0.0 else float("inf")
        lo, hi = 0.0, 1.0
        for _ in range(BISECTION_STEPS):
            mid = 0.5 * (lo + hi)
            if rotors * (self.iq + mid * self.at_motor_V(mid * bus_V)[1]) > pack_A:
                hi = mid
            else:
                lo = mid
        return {"duty": lo, "command": self.command(lo), "thrust_N": self.at_motor_V(lo * bus_V)[0]}


def vehicle_state(params, vehicle, rho, open_circuit_V):
    """Hover and full-command values of a vehicle's N fitted rotors at one pack voltage.

    params: validated parameter set; vehicle: checked vehicle whose battery is the pack in the
    air (preflight.pack); rho: site air density [kg/m^3]; open_circuit_V: pack V_oc [V]. Returns
    a dict: weight_N, thrust_per_rotor_N, power_W, bus_V, command, fraction, current_A,
    limited_by ("pack", "command" or None), duty, motor_current_A, the full_* values at full
    command, and the FittedRotor itself (rotor).
    """
    count = vehicle["rotors"]["count"]
    rotor = FittedRotor(params, rho, vehicle["rotors"].get("layout", "flat") == "coaxial")
    weight = vehicle["mass_kg"] * STANDARD_GRAVITY_M_S2
    t_r = weight / count
    r_pack = vehicle["battery"]["resistance_ohm"]
    h = rotor.hover(t_r, count, open_circuit_V, r_pack)
    f = rotor.full(count, open_circuit_V, r_pack)
    out = {"weight_N": weight, "thrust_per_rotor_N": t_r, "open_circuit_V": open_circuit_V,
           "power_W": h["power_W"], "bus_V": h["bus_V"], "command": h["command"], "fraction": None,
           "current_A": h["pack_current_A"], "limited_by": None, "duty": h["duty"],
           "motor_current_A": h["motor_current_A"],
           "full_thrust_N": count * f["thrust_N"], "full_power_W": f["pack_current_A"] * f["bus_V"],
           "full_bus_V": f["bus_V"], "full_pack_current_A": f["pack_current_A"],
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
    at = state["rotor"].at_bus_V(rotors, cutoff_V, battery["resistance_ohm"], state["open_circuit_V"])
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
