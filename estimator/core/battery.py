"""Battery pack: open-circuit voltage, sag under load, usable capacity and endurance.

The pack is `cells` cells in series with an open-circuit voltage per cell that falls with
state of charge, minus the drop over the pack's internal resistance: V_bus = V_oc - I R_pack
(design notes sec. 3). SI units: V, A, ohm, Ah, min.
"""

import math


def pack_open_circuit_V(cells, cell_V):
    """Open-circuit voltage of a series pack, V_oc = N_s * V_cell.

    cells: cells in series N_s [-]; cell_V: open-circuit voltage of one cell [V].
    Returns V_oc [V]. Source: series connection.
    """
    return cells * cell_V


def rotor_source_V(open_circuit_V, resistance_ohm, avionics_current_A):
    """Open-circuit voltage of the pack as the rotors see it while a constant avionics current
    (flight controller, FPV transmitter, camera, gimbal) also flows from it.

    V_bus = V_oc - R_pack (I_rotors + I_av) = (V_oc - R_pack I_av) - R_pack I_rotors: the rotors
    see a pack of open-circuit voltage V_oc - R_pack I_av and the same resistance, and the pack
    current is I_rotors + I_av. open_circuit_V: V_oc [V]; resistance_ohm: R_pack [ohm];
    avionics_current_A: I_av [A], >= 0. Returns V_oc - R_pack I_av [V].
    Source: Thevenin equivalent of a cell stack (design notes sec. 3), superposition.
    """
    return open_circuit_V - resistance_ohm * avionics_current_A


def cell_open_circuit_V(state_of_charge, full_cell_V, nominal_cell_V, empty_cell_V):
    """Open-circuit cell voltage against state of charge, piecewise linear.

    Straight lines through (0, V_empty), (0.5, V_nominal) and (1, V_full): a coarse
    stand-in for a measured discharge curve (common practice for first estimates).
    state_of_charge: SoC [-], clipped to 0..1; full_cell_V, nominal_cell_V,
    empty_cell_V: cell voltages at full, half and usable-empty charge [V].
    Returns the cell's open-circuit voltage [V].
    """
    s = 0.0 if state_of_charge < 0.0 else (1.0 if state_of_charge > 1.0 else state_of_charge)
    if s <= 0.5:
        return empty_cell_V + (nominal_cell_V - empty_cell_V) * s / 0.5
    return nominal_cell_V + (full_cell_V - nominal_cell_V) * (s - 0.5) / 0.5


def sagged_bus_V(open_circuit_V, resistance_ohm, power_W):
    """Bus voltage at which a pack delivers power P: V_bus (V_oc - V_bus) = R_pack P, upper
    (stable) root V_bus = (V_oc + sqrt(V_oc^2 - 4 R_pack P)) / 2.

    open_circuit_V: V_oc [V]; resistance_ohm: R_pack [ohm]; power_W: P drawn from the bus [W].
    Returns V_bus [V], or None when the pack cannot deliver that power at any voltage
    (V_oc^2 < 4 R_pack P). Source: Thevenin equivalent of a cell stack (design notes sec. 3).
    """
    disc = open_circuit_V * open_circuit_V - 4.0 * resistance_ohm * power_W
    if disc < 0.0:
        return None
    return 0.5 * (open_circuit_V + math.sqrt(disc))


def usable_capacity_Ah(capacity_Ah, usable_fraction):
    """Charge the flight may use, C_use = f_use * C.

    capacity_Ah: rated capacity C [Ah]; usable_fraction: f_use [-], 0..1 (0.8 is
    common practice for lithium packs, keeping a reserve). Returns C_use [Ah].
    """
    return capacity_Ah * usable_fraction


def endurance_min(usable_Ah, current_A):
    """Time to draw the usable charge at a constant current, t = 60 C_use / I.

    usable_Ah: usable charge C_use [Ah]; current_A: mean pack current I [A], > 0.
    Returns t [min]; None when current_A <= 0. Source: definition of capacity
    (constant-current estimate; ignores the capacity loss at high C, so optimistic).
    """
    if not current_A > 0.0:
        return None
    return 60.0 * usable_Ah / current_A


def max_pack_current_A(capacity_Ah, max_discharge_C):
    """Continuous current limit from the maker's C-rating, I_max = C_rate * C.

    capacity_Ah: capacity C [Ah]; max_discharge_C: continuous C-rating [1/h] or None.
    Returns I_max [A], or None when no rating is given. Source: definition of C-rate.
    """
    if max_discharge_C is None:
        return None
    return max_discharge_C * capacity_Ah


# Growth of a lithium pack's internal resistance in the cold, R(T) = R_25 exp(k (25 C - T)) below
# 25 C: k = 0.03 per kelvin, so the resistance about doubles from 25 C to 0 C and roughly
# quadruples at -20 C (from memory of lithium-polymer and lithium-ion cell data; cells differ).
COLD_RESISTANCE_PER_K = 0.03
COLD_REFERENCE_C = 25.0


def cold_resistance_factor(temperature_C):
    """Factor on the pack resistance at a cell temperature, exp(0.03 (25 - T)) below 25 C, else 1.

    temperature_C: pack temperature T [C]. Returns R(T) / R(25 C) [-], >= 1 (a warm pack is
    not credited with a lower resistance). Source: from memory (COLD_RESISTANCE_PER_K).
    """
    if temperature_C >= COLD_REFERENCE_C:
        return 1.0
    return math.exp(COLD_RESISTANCE_PER_K * (COLD_REFERENCE_C - temperature_C))


# Share of the rated (room-temperature) capacity a lithium pack delivers at a cell temperature,
# at moderate discharge rates: (temperature [C], share [-]) points, straight lines between them,
# flat beyond the ends. From memory of makers' discharge-at-temperature curves for
# lithium-polymer and lithium-ion cells (about 95 % at 10 C, 85-90 % at 0 C, 75-80 % at -10 C,
# 60-70 % at -20 C against 25 C); cells differ, and a pack warmed by its own current recovers
# part of it.
COLD_CAPACITY_POINTS = ((-20.0, 0.65), (-10.0, 0.78), (0.0, 0.88), (10.0, 0.95), (20.0, 1.0))


def cold_capacity_factor(temperature_C):
    """Share of the rated capacity a lithium pack delivers at a cell temperature, <= 1.

    temperature_C: pack temperature T [C]. Returns C(T) / C_rated [-]: 1 at 20 C and above,
    linear between the COLD_CAPACITY_POINTS below, 0.65 at -20 C and colder (a warm pack is
    not credited with more than its rating). Source: from memory (COLD_CAPACITY_POINTS).
    """
    points = COLD_CAPACITY_POINTS
    if temperature_C >= points[-1][0]:
        return points[-1][1]
    if temperature_C <= points[0][0]:
        return points[0][1]
    for (t0, f0), (t1, f1) in zip(points, points[1:]):
        if temperature_C <= t1:
            return f0 + (f1 - f0) * (temperature_C - t0) / (t1 - t0)
    return points[-1][1]
