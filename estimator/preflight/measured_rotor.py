"""Hover values of a vehicle from a fitted parameter set (instead of the datasheet model).

Per rotor the weight share T_r = m g / N must be held. The power model gives the bus power
P = N P_r(T_r, rho_site) (coaxial: induced term times the momentum-theory coaxial factor,
power basis); the pack sags as V_bus = V_oc - I R with I = P / V_bus, so
V_bus = (V_oc + sqrt(V_oc^2 - 4 R P)) / 2 (Thevenin pack, design notes sec. 3); the
thrust curve inverted at (V_bus, rho_site) gives the hover command.
The 95 % interval of the hover command is linearised propagation (delta method) of the
thrust-curve covariance, +-1.96 standard errors, clipped to the command range 0..1: it
holds the bench-fit uncertainty only, not the spread of sites, packs or propellers.

Motor current (per motor, against the maker's limit): with an ideal ESC (no loss) the motor
current is the rotor's bus current over the ESC duty, I_motor = I_bus,rotor / d (power
balance V_bus I_bus = d V_bus I_motor). The fitted curve does not know the duty itself; its
own variable x = (u - u_min) / (u_max - u_min), the command above the start-up dead band, is
taken as the duty (a real ESC with losses draws less motor current for the same bus current,
so this errs high). At full command d = 1 and the motor current equals the rotor's bus
current. Rotor bus current = pack current / N.

The bench sweep holds the curve only over its own bus voltages; a pack whose hover voltage
lies beyond them (e.g. a 6S vehicle on a 4S fit) is warned as an extrapolation.
"""

import math

from estimator.core.battery import endurance_min, max_pack_current_A, usable_capacity_Ah
from estimator.core.momentum import COAXIAL_INDUCED_POWER_FACTOR
from estimator.core.thrust_curve import hover_command, scale_factor
from estimator.errors import InputError
from estimator.units import STANDARD_GRAVITY_M_S2

INTERVAL_METHOD = ("linearised propagation (delta method) of the thrust-curve covariance, "
                   "+-1.96 standard errors, clipped to 0..1")
# what the interval holds, in words for the sheet
INTERVAL_SCOPE = "bench-fit uncertainty only; not site, pack or prop-to-prop spread"
# bus voltages this far beyond the sweep's range count as extrapolation [-]; within it the
# voltage exponent n ~ 1.8 moves thrust by under 4 %, about the fit's own power residual
VOLTAGE_RANGE_TOLERANCE = 0.02
# when the parameter set does not record the sweep's voltage range: a sweep on one pack type
# spans about 3.5..4.2 V per cell, i.e. +-9 % around its middle; beyond +-12 % of the
# reference voltage the pack is most likely another cell count [-]
REFERENCE_VOLTAGE_BAND = 0.12
Z_95 = 1.959964  # two-sided 95 % point of the standard normal [-]
_NAMES = ("thrust_max_N", "quadratic_share", "command_min", "voltage_exponent")


def rotor_power_W(power, thrust_N, density_kg_m3, coaxial=False):
    """P_r = P_idle + c_i T^1.5 sqrt(rho_ref / rho) f_coax + c_c T^2 [W] for one rotor.

    power: power_model block; thrust_N: T [N]; density_kg_m3: rho [kg/m^3];
    coaxial: multiply the induced term by 1.2808 (momentum theory, power basis,
    estimator.core.momentum). Source: DEVELOPERS.md power model.
    """
    t = max(thrust_N, 0.0)
    induced = power["induced_W_per_N1_5"] * t ** 1.5 * math.sqrt(power["reference_density_kg_m3"] / density_kg_m3)
    if coaxial:
        induced *= COAXIAL_INDUCED_POWER_FACTOR
    return power["idle_power_W"] + induced + power["copper_W_per_N2"] * t * t


def sagged_bus_V(open_circuit_V, resistance_ohm, power_W):
    """Bus voltage that delivers power P from a pack V_oc, R: V = (V_oc + sqrt(V_oc^2 - 4 R P)) / 2.

    open_circuit_V [V]; resistance_ohm [ohm]; power_W [W]. Returns V [V], or None when the
    pack cannot deliver that power at any voltage (V_oc^2 < 4 R P). Source: Thevenin pack.
    """
    disc = open_circuit_V * open_circuit_V - 4.0 * resistance_ohm * power_W
    if disc < 0.0:
        return None
    return 0.5 * (open_circuit_V + math.sqrt(disc))


def _state(params, vehicle, rho, open_circuit_V):
    """Hover and full-command values at one pack voltage."""
    curve, power = params["thrust_curve"], params["power_model"]
    count = vehicle["rotors"]["count"]
    coax = vehicle["rotors"].get("layout", "flat") == "coaxial"
    weight = vehicle["mass_kg"] * STANDARD_GRAVITY_M_S2
    t_r = weight / count
    r_pack = vehicle["battery"]["resistance_ohm"]
    p_total = count * rotor_power_W(power, t_r, rho, coax)
    v_bus = sagged_bus_V(open_circuit_V, r_pack, p_total)
    out = {"weight_N": weight, "thrust_per_rotor_N": t_r, "open_circuit_V": open_circuit_V,
           "power_W": p_total, "bus_V": v_bus, "command": None, "fraction": None,
           "current_A": None, "limited_by": None}
    # full command: thrust depends on the sagged voltage, power on the thrust (bounded iteration)
    v_full = open_circuit_V
    t_full = 0.0
    p_full = 0.0
    for _ in range(40):
        t_full = curve["thrust_max_N"] * scale_factor(
            v_full, curve["reference_voltage_V"], curve["voltage_exponent"], rho,
            curve["reference_density_kg_m3"], curve["density_exponent"])
        p_full = count * rotor_power_W(power, t_full, rho, coax)
        v_new = sagged_bus_V(open_circuit_V, r_pack, p_full)
        v_new = 0.5 * open_circuit_V if v_new is None else v_new
        if abs(v_new - v_full) < 1e-9:
            break
        v_full = 0.5 * (v_full + v_new)
    out.update({"full_thrust_N": count * t_full, "full_power_W": p_full, "full_bus_V": v_full,
                "full_pack_current_A": p_full / v_full})
    # full command: duty 1, so each motor carries its rotor's bus current (module docstring)
    out["full_motor_current_A"] = out["full_pack_current_A"] / count
    if v_bus is None:
        out["limited_by"] = "pack"
        return out
    cmd, fraction = hover_command(t_r, v_bus, rho, curve)
    out.update({"command": cmd, "fraction": fraction, "current_A": p_total / v_bus})
    if cmd is None:
        out["limited_by"] = "command"
    else:
        out["motor_current_A"] = motor_current_A(p_total / v_bus / count, cmd, curve)
    return out


def motor_current_A(rotor_bus_current_A, command, curve):
    """Motor current of one rotor from its bus current with an ideal ESC, I_m = I_bus / d.

    rotor_bus_current_A: the rotor's share of the pack current [A]; command: u [-];
    curve: thrust_curve block. The duty d is the command above the start-up dead band,
    x = (u - u_min) / (u_max - u_min) (module docstring; errs high for a lossy ESC).
    Returns I_m [A], or None at or below the dead band. Source: power balance of an ideal ESC.
    """
    duty = (command - curve["command_min"]) / (curve["command_max"] - curve["command_min"])
    if not duty > 0.0:
        return None
    return rotor_bus_current_A / min(duty, 1.0)


def hover_interval(params, thrust_N, voltage_V, density_kg_m3):
    """95 % interval [lo, hi] of the hover command [-] by the delta method (module docstring).

    Returns (interval, standard error [-]) or (None, None) when it cannot hover.
    """
    curve = dict(params["thrust_curve"])
    cov_block = params.get("thrust_curve_covariance")
    base, _ = hover_command(thrust_N, voltage_V, density_kg_m3, curve)
    if base is None:
        return None, None
    if not cov_block:
        return [base, base], 0.0
    cov = cov_block["matrix"]
    derived_m = str(curve.get("density_exponent_source", "")).startswith("derived")
    grad = []
    for i, name in enumerate(_NAMES):
        h = max(1e-6, 1e-3 * math.sqrt(max(cov[i][i], 0.0)))
        vals = []
        for sign in (1.0, -1.0):
            c = dict(curve)
            c[name] = curve[name] + sign * h
            if name == "voltage_exponent" and derived_m:
                c["density_exponent"] = c["voltage_exponent"] - 1.0
            u, _ = hover_command(thrust_N, voltage_V, density_kg_m3, c)
            vals.append(base if u is None else u)
        grad.append((vals[0] - vals[1]) / (2.0 * h))
    var = sum(grad[i] * cov[i][j] * grad[j] for i in range(4) for j in range(4))
    se = math.sqrt(max(var, 0.0))
    lo, hi = max(0.0, base - Z_95 * se), min(1.0, base + Z_95 * se)
    return [lo, hi], se


def _site(vehicle):
    from estimator.preflight.report import vehicle_site_air
    return vehicle_site_air(vehicle)


def voltage_range_warning(params, voltages):
    """A warning when bus voltages lie beyond the bench sweep's, or None.

    params: parameter set; voltages: list of (label, bus voltage [V]) where the model
    evaluates the thrust curve. Uses thrust_curve.voltage_min_V / voltage_max_V (the sweep's
    range) when the parameter set has them, else a band of +-REFERENCE_VOLTAGE_BAND around
    reference_voltage_V (module constants).
    """
    curve = params["thrust_curve"]
    v_ref = curve["reference_voltage_V"]
    lo, hi = curve.get("voltage_min_V"), curve.get("voltage_max_V")
    recorded = lo is not None and hi is not None
    if recorded:
        lo_ok, hi_ok = lo * (1.0 - VOLTAGE_RANGE_TOLERANCE), hi * (1.0 + VOLTAGE_RANGE_TOLERANCE)
    else:
        lo_ok, hi_ok = v_ref * (1.0 - REFERENCE_VOLTAGE_BAND), v_ref * (1.0 + REFERENCE_VOLTAGE_BAND)
    outside = ["%.1f V (%s)" % (v, label) for label, v in voltages
               if v is not None and not lo_ok <= v <= hi_ok]
    if not outside:
        return None
    if recorded:
        swept = "the bench sweep ran at %.1f..%.1f V" % (lo, hi)
    else:
        swept = ("against its reference voltage %.1f V; the parameter set does not record the "
                 "sweep's range" % v_ref)
    return ("pack voltage beyond the bench sweep: %s, %s; thrust and power are extrapolated with "
            "the voltage exponent %.2f, so hover command, currents and margins may be well off "
            "(another cell count?): sweep the rotor at this pack's voltage"
            % (", ".join(outside), swept, curve["voltage_exponent"]))


def hover_from_params(vehicle, params):
    """The ``liftcal hover --json`` report for a vehicle, from a fitted parameter set.

    vehicle: checked vehicle dict; params: validated parameter set. Returns a dict with
    hover_command, hover_command_full, hover_command_empty [-] (None when it cannot hover),
    hover_command_interval_95 [-, -], interval_method, hover_thrust_fraction [-],
    thrust_to_weight [-], hover_current_A [A], hover_power_W [W], flight_time_min [min],
    warnings, and the keys the pre-flight sheet shows.
    """
    from estimator.preflight.report import CAUTIONS, margin_warnings
    from estimator.vehicle import assumed_warnings

    air = _site(vehicle)
    rho = air["density_kg_m3"]
    b = vehicle["battery"]
    states = {name: _state(params, vehicle, rho, b["cells"] * b[name + "_cell_V"])
              for name in ("full", "nominal", "empty")}
    nom = states["nominal"]
    count = vehicle["rotors"]["count"]
    interval, se = (None, None)
    if nom["command"] is not None:
        interval, se = hover_interval(params, nom["thrust_per_rotor_N"], nom["bus_V"], rho)
    usable = usable_capacity_Ah(b["capacity_Ah"], b.get("usable_fraction", 0.8))
    hovering = nom["command"] is not None
    k_at = params["static_factor"]
    report = {
        "model": "liftcal.rotor/1 (fitted bench sweep)",
        "name": vehicle.get("name", "unnamed vehicle"),
        "can_hover": hovering,
        "hover_command": nom["command"],
        "hover_command_full": states["full"]["command"],
        "hover_command_empty": states["empty"]["command"],
        "hover_command_interval_95": interval,
        "hover_command_standard_error": se,
        "interval_method": INTERVAL_METHOD,
        "interval_scope": INTERVAL_SCOPE,
        "hover_thrust_fraction": nom["fraction"],
        "thrust_to_weight": nom["full_thrust_N"] / nom["weight_N"],
        "hover_current_A": nom["current_A"],
        "hover_power_W": nom["power_W"] if hovering else None,
        "flight_time_min": endurance_min(usable, nom["current_A"]) if hovering else None,
        "hover_limited_by": nom["limited_by"],
        "mass_kg": vehicle["mass_kg"], "weight_N": nom["weight_N"], "rotor_count": count,
        "layout": vehicle["rotors"].get("layout", "flat"),
        "thrust_per_rotor_N": nom["thrust_per_rotor_N"], "full_thrust_N": nom["full_thrust_N"],
        "hover_bus_V": nom["bus_V"] if hovering else None,
        "full_bus_V": nom["full_bus_V"], "full_pack_current_A": nom["full_pack_current_A"],
        "full_motor_current_A": nom["full_motor_current_A"],
        "hover_motor_current_A": nom.get("motor_current_A") if hovering else None,
        "motor_current_limit_A": vehicle["motor"].get("max_current_A"),
        "pack_current_limit_A": max_pack_current_A(b["capacity_Ah"], b.get("max_discharge_C")),
        "pack_voltage_V": {k: states[k]["open_circuit_V"] for k in states},
        "usable_Ah": usable, "density_kg_m3": rho, "density_ratio": air["density_ratio"],
        "density_altitude_m": air["density_altitude_m"], "temperature_K": air["temperature_K"],
        "pressure_Pa": air["pressure_Pa"],
        "static_factor": k_at["k0"] + k_at["slope_per_N"] * nom["thrust_per_rotor_N"],
        "per_rotor_bus_current_A": (nom["current_A"] / count) if hovering else None,
    }
    warnings = assumed_warnings(vehicle) + margin_warnings(report)
    volts = [("hover bus, %s pack" % name if states[name]["command"] is not None
               else "open circuit, %s pack" % name,
              states[name]["bus_V"] if states[name]["command"] is not None else states[name]["open_circuit_V"])
             for name in ("full", "nominal", "empty")]
    extrapolated = voltage_range_warning(params, volts)
    if extrapolated:
        warnings.append(extrapolated)
    bench_rho = params["thrust_curve"]["reference_density_kg_m3"]
    if abs(rho / bench_rho - 1.0) > 0.15:
        warnings.append("the site air (%.3f kg/m^3) differs from the bench air (%.3f kg/m^3) by more "
                        "than 15 %%: the density exponent %.2f is extrapolated"
                        % (rho, bench_rho, params["thrust_curve"]["density_exponent"]))
    if report["layout"] == "coaxial":
        warnings.append("the thrust curve was measured on an isolated rotor; lower rotors of a "
                        "coaxial pair make less thrust at the same command, so the hover command "
                        "is underestimated (power includes the 1.28 induced-power factor)")
    report["warnings"] = warnings + list(params.get("warnings", []))
    report["cautions"] = list(CAUTIONS)
    return report


def hover_block(vehicle, params):
    """The ``hover`` block of a parameter set (DEVELOPERS.md layout) for a vehicle.

    Raises InputError when the vehicle cannot hover on this rotor (there is no hover command
    to store).
    """
    from estimator.vehicle import vehicle_source

    r = hover_from_params(vehicle, params)
    if r["hover_command"] is None:
        cause = [w for w in r["warnings"] if w.startswith("cannot hover: ")][:1]
        bench = (params.get("provenance") or {}).get("input_file")
        raise InputError("%s: this vehicle cannot hover on the rotor fitted from %s at nominal pack: %s; "
                         "lighten it or fit more thrust, or fit without --vehicle (the parameter set "
                         "would have no hover values)"
                         % (vehicle_source(vehicle, "the vehicle"), bench or "the bench sweep",
                            cause[0][len("cannot hover: "):] if cause else "no hover command"))
    return {
        "hover_command": r["hover_command"],
        "hover_command_interval_95": r["hover_command_interval_95"],
        "interval_method": INTERVAL_METHOD,
        "hover_thrust_fraction": r["hover_thrust_fraction"],
        "thrust_per_rotor_N": r["thrust_per_rotor_N"],
        "power_W": r["hover_power_W"], "current_A": r["hover_current_A"],
        "voltage_V": r["hover_bus_V"],
        "hover_command_full": r["hover_command_full"],
        "hover_command_empty": r["hover_command_empty"],
        "thrust_to_weight": r["thrust_to_weight"],
        "flight_time_min": r["flight_time_min"],
    }
