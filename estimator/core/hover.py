"""Hover of a whole vehicle at full, nominal and empty pack: command, margin, current, endurance.

Each of N rotors carries W / N with W = m g0. For each pack state (open-circuit voltage
from the cell voltage) the hover duty comes from propulsion.shared_point_for_thrust and the
full-command thrust from propulsion.shared_operating_point (d = 1, same pack state, with
sag). Endurance comes from discharging the pack (core.discharge: the hover current rises as
the pack drains, the flight ends at the loaded-voltage cutoff, the landing reserve or the loss
of hover); the usable charge over the nominal-pack hover current is given beside it. Coaxial layouts use propulsion.coaxial_propeller
(power basis, kappa = momentum.COAXIAL_INDUCED_POWER_FACTOR). SI units.
Sources: design notes sec. 3; the modules named above.
"""

from estimator.core.battery import endurance_min, pack_open_circuit_V, rotor_source_V, usable_capacity_Ah
from estimator.core.constants import STANDARD_GRAVITY_M_S2
from estimator.core.discharge import discharge_to_cutoff
from estimator.core.momentum import COAXIAL_INDUCED_POWER_FACTOR
from estimator.core.motor import rotor_operating_point
from estimator.core.propulsion import coaxial_propeller, shared_operating_point, shared_point_for_thrust

PACK_STATES = ("full", "nominal", "empty")


def rotor_propeller(propeller, layout):
    """Propeller coefficients to use for one rotor of a layout ("flat" or "coaxial").

    propeller: dict diameter_m [m], ct [-], cp [-]; layout: name [text], "flat" (every
    rotor in clean air) or "coaxial" (rotors in stacked pairs). Returns a propeller dict (coaxial: CP raised
    by the induced-power penalty, see propulsion.coaxial_propeller). Raises ValueError
    for another layout.
    """
    if layout == "flat":
        return propeller
    if layout == "coaxial":
        return coaxial_propeller(propeller)
    raise ValueError("layout must be 'flat' or 'coaxial', got %r" % layout)


def hover_at_pack(mass_kg, rotor_count, open_circuit_V, pack_resistance_ohm, density_kg_m3,
                  motor, propeller, esc_efficiency=1.0, avionics_current_A=0.0):
    """Hover and full-command points of N rotors at one pack open-circuit voltage.

    mass_kg: all-up mass m [kg]; rotor_count: N [-]; open_circuit_V: V_oc [V];
    pack_resistance_ohm: R_pack [ohm]; density_kg_m3: rho [kg/m^3];
    motor: dict kv_rpm_per_V [rpm/V], resistance_ohm [ohm], no_load_current_A [A];
    propeller: dict diameter_m [m], ct [-], cp [-] (already adjusted for the layout); esc_efficiency: eta_esc [-];
    avionics_current_A: constant current of everything else on the pack I_av [A] (the rotors see
    battery.rotor_source_V; the pack_current_A of hover and full include it).
    Returns a dict: hover (propulsion.shared_point_for_thrust result), full
    (propulsion.shared_operating_point at d = 1), command [-] or None when the vehicle
    cannot hover, thrust_to_weight [-] (full-command thrust / weight),
    thrust_fraction [-] (thrust needed / full-command thrust at the hover bus voltage, the
    definition the fitted thrust curve uses too; None when hover is out of reach), weight_N [N].
    Source: design notes sec. 3.
    """
    weight = mass_kg * STANDARD_GRAVITY_M_S2
    per_rotor = weight / rotor_count
    source_V = rotor_source_V(open_circuit_V, pack_resistance_ohm, avionics_current_A)
    hover = shared_point_for_thrust(per_rotor, source_V, pack_resistance_ohm, rotor_count,
                                    density_kg_m3, motor, propeller, esc_efficiency)
    full = shared_operating_point(1.0, source_V, pack_resistance_ohm, rotor_count,
                                  density_kg_m3, motor, propeller, esc_efficiency)
    for point in (hover, full):
        if point["pack_current_A"] is not None:
            point["pack_current_A"] += avionics_current_A
    can_hover = hover["limited_by"] is None and full["total_thrust_N"] >= weight
    fraction = None
    if hover["bus_V"] is not None:
        at_bus = rotor_operating_point(1.0, hover["bus_V"], density_kg_m3, motor, propeller, esc_efficiency)
        if at_bus["thrust_N"] > 0.0:
            fraction = per_rotor / at_bus["thrust_N"]
    return {
        "hover": hover,
        "full": full,
        "command": hover["duty"] if can_hover else None,
        "thrust_to_weight": full["total_thrust_N"] / weight,
        "thrust_fraction": fraction,
        "weight_N": weight,
    }


def hover_load(mass_kg, rotor_count, density_kg_m3, motor, propeller, pack_resistance_ohm,
               esc_efficiency=1.0, avionics_current_A=0.0):
    """The hover load of a vehicle as core.discharge wants it: V_oc -> (I_pack, V_bus) or None.

    mass_kg: all-up mass [kg]; rotor_count: N [-]; density_kg_m3: rho [kg/m^3];
    motor: dict kv_rpm_per_V [rpm/V], resistance_ohm [ohm], no_load_current_A [A];
    propeller: dict diameter_m [m], ct [-], cp [-] (already adjusted for the layout);
    pack_resistance_ohm: R_pack [ohm]; esc_efficiency: eta_esc [-]; avionics_current_A: I_av [A]
    (battery.rotor_source_V; included in the pack current). The returned
    function gives the pack current [A] and bus voltage [V] of the hover point at a pack
    open-circuit voltage [V], or None where the vehicle cannot hover (duty above 1, or the
    pack cannot deliver the power). Source: propulsion.shared_point_for_thrust.
    """
    per_rotor = mass_kg * STANDARD_GRAVITY_M_S2 / rotor_count

    def load(open_circuit_V):
        point = shared_point_for_thrust(per_rotor, rotor_source_V(open_circuit_V, pack_resistance_ohm, avionics_current_A),
                                        pack_resistance_ohm, rotor_count, density_kg_m3, motor, propeller, esc_efficiency)
        if point["limited_by"] is not None:
            return None
        return point["pack_current_A"] + avionics_current_A, point["bus_V"]
    return load


def hover_estimate(mass_kg, rotor_count, layout, density_kg_m3, motor, propeller, battery,
                   esc_efficiency=1.0, avionics_current_A=0.0):
    """Hover at full, nominal and empty pack and the endurance of a vehicle.

    mass_kg: all-up mass [kg]; rotor_count: total rotors N [-] (coaxial: 2 per arm);
    layout: name [text], "flat" or "coaxial"; density_kg_m3: site air density [kg/m^3];
    motor: dict kv_rpm_per_V [rpm/V], resistance_ohm [ohm], no_load_current_A [A];
    propeller: dict diameter_m [m], ct [-], cp [-]; battery: dict cells [-],
    capacity_Ah [Ah], resistance_ohm [ohm], full_cell_V / nominal_cell_V / empty_cell_V [V],
    usable_fraction [-], cutoff_cell_V [V] (loaded; default empty_cell_V - 0.2 V);
    esc_efficiency: eta_esc [-]; avionics_current_A: steady current of everything on the pack that
    is not a motor (flight controller, FPV transmitter, camera, gimbal) [A]: in the pack
    current, the sag and the endurance (battery.rotor_source_V); hover_power_W stays the rotors'.
    Returns a dict: states {full, nominal, empty} -> hover_at_pack result (plus
    open_circuit_V [V]); hover_command, hover_command_full, hover_command_empty [-] or None;
    thrust_to_weight [-] and hover_thrust_fraction [-] at nominal pack; hover_current_A [A]
    and hover_power_W [W] (whole vehicle, nominal pack) or None; flight_time_min [min] or
    None (by discharge to the cutoff, core.discharge); discharge (its result dict);
    flight_time_usable_share_min [min] or None (60 C_use / I_hover at nominal pack);
    usable_Ah [Ah]; coaxial_induced_power_factor [-] (1 for flat, power basis);
    reachable_command [-] and reachable_thrust_to_weight [-]: the highest command that keeps
    the nominal pack at its loaded cutoff and the thrust-to-weight there (reachable_at_cutoff;
    1 and thrust_to_weight when full command keeps it).
    Source: design notes sec. 3; core.discharge.
    """
    prop = rotor_propeller(propeller, layout)
    states = {}
    for name in PACK_STATES:
        v_oc = pack_open_circuit_V(battery["cells"], battery[name + "_cell_V"])
        st = hover_at_pack(mass_kg, rotor_count, v_oc, battery["resistance_ohm"], density_kg_m3,
                           motor, prop, esc_efficiency, avionics_current_A)
        st["open_circuit_V"] = v_oc
        states[name] = st
    nominal = states["nominal"]
    usable = usable_capacity_Ah(battery["capacity_Ah"], battery.get("usable_fraction", 0.8))
    hovering = nominal["command"] is not None
    current = nominal["hover"]["pack_current_A"] if hovering else None
    load = hover_load(mass_kg, rotor_count, density_kg_m3, motor, prop, battery["resistance_ohm"],
                      esc_efficiency, avionics_current_A)
    discharge = discharge_to_cutoff(battery["cells"], battery["capacity_Ah"],
                                    battery.get("usable_fraction", 0.8), battery["full_cell_V"],
                                    battery["nominal_cell_V"], battery["empty_cell_V"],
                                    battery.get("cutoff_cell_V", battery["empty_cell_V"] - 0.2), load)
    cutoff_cell_V = battery.get("cutoff_cell_V", battery["empty_cell_V"] - 0.2)
    reachable = reachable_at_cutoff(battery["cells"] * cutoff_cell_V,
                                    rotor_source_V(nominal["open_circuit_V"], battery["resistance_ohm"], avionics_current_A),
                                    battery["resistance_ohm"], rotor_count, density_kg_m3, motor, prop,
                                    esc_efficiency, nominal["weight_N"])
    return {
        "states": states,
        "reachable_command": reachable["command"],
        "reachable_thrust_to_weight": reachable["thrust_to_weight"],
        "hover_command": nominal["command"],
        "hover_command_full": states["full"]["command"],
        "hover_command_empty": states["empty"]["command"],
        "thrust_to_weight": nominal["thrust_to_weight"],
        "hover_thrust_fraction": nominal["thrust_fraction"],
        "hover_current_A": current,
        "hover_power_W": nominal["hover"]["total_power_W"] if hovering else None,
        "flight_time_min": discharge["minutes"] if hovering else None,
        "flight_time_usable_share_min": endurance_min(usable, current) if hovering else None,
        "discharge": discharge,
        "usable_Ah": usable,
        "coaxial_induced_power_factor": COAXIAL_INDUCED_POWER_FACTOR if layout == "coaxial" else 1.0,
    }


REACHABLE_BISECTION_STEPS = 30  # halvings of the duty range for the cutoff-limited duty [-]


def reachable_at_cutoff(cutoff_bus_V, open_circuit_V, pack_resistance_ohm, rotor_count, density_kg_m3,
                        motor, propeller, esc_efficiency, weight_N):
    """The highest command whose loaded bus voltage stays at the cutoff, and its thrust-to-weight.

    The bus voltage falls as the duty rises (more current through the pack resistance), so the
    duty where V_bus(d) = V_cut is found by bisection on d in [0, 1] (REACHABLE_BISECTION_STEPS
    halvings, bounded). cutoff_bus_V: loaded cutoff of the whole pack [V]; open_circuit_V:
    V_oc [V]; pack_resistance_ohm: R_pack [ohm]; rotor_count: N [-]; density_kg_m3: rho
    [kg/m^3]; motor: dict kv_rpm_per_V [rpm/V], resistance_ohm [ohm], no_load_current_A [A];
    propeller: dict diameter_m [m], ct [-], cp [-] (already adjusted for the layout);
    esc_efficiency: eta_esc [-]; weight_N: W [N].
    Returns {"command": d [-] (1 when full command keeps the cutoff), "thrust_to_weight": thrust
    at d over W [-]}; command 0 and thrust_to_weight 0 when even an idle pack is below the cutoff.
    Source: propulsion.shared_operating_point (shared sag), bisection.
    """
    def point(duty):
        return shared_operating_point(duty, open_circuit_V, pack_resistance_ohm, rotor_count,
                                      density_kg_m3, motor, propeller, esc_efficiency)
    full = point(1.0)
    if full["bus_V"] >= cutoff_bus_V:
        return {"command": 1.0, "thrust_to_weight": full["total_thrust_N"] / weight_N}
    if open_circuit_V < cutoff_bus_V:
        return {"command": 0.0, "thrust_to_weight": 0.0}
    lo, hi = 0.0, 1.0
    for _ in range(REACHABLE_BISECTION_STEPS):
        mid = 0.5 * (lo + hi)
        if point(mid)["bus_V"] >= cutoff_bus_V:
            lo = mid
        else:
            hi = mid
    return {"command": lo, "thrust_to_weight": point(lo)["total_thrust_N"] / weight_N}
