"""Hover values of a vehicle from a fitted parameter set (instead of the datasheet model).

The rotor is the set's fitted DC motor + propeller model (estimator.preflight.fitted_vehicle).
Each of N rotors holds T_r = m g / N on the vehicle's pack in the site's air (estimator.
preflight.pack). The motor's own current on the sheet is eta_esc I with the vehicle's ESC
efficiency (the fitted I is referred to the ESC input), the relation the datasheet route uses
(P_bus = Vm I_motor / eta_esc), so the motor-limit warning compares motor current with the
motor limit in both routes. The hover command's 95 % interval: estimator.preflight.
hover_interval. Beyond the sweep's voltage or command range the sheet says by how much it
extrapolates.
"""

from collections import namedtuple

from estimator.core.battery import endurance_min, max_pack_current_A, usable_capacity_Ah
from estimator.core.discharge import discharge_to_cutoff
from estimator.core.momentum import COAXIAL_INDUCED_POWER_FACTOR, disk_area_m2
from estimator.core.power_model import rotor_static_factor
from estimator.preflight.fitted_vehicle import hover_load, reachable_at_cutoff, vehicle_state
from estimator.preflight.hover_interval import FORM_INFLATION, INTERVAL_METHOD, INTERVAL_SCOPE, hover_interval
from estimator.preflight.range_warnings import about_the_vehicle, command_range_warnings, voltage_range_warning
from estimator.cautions import cautions
from estimator.preflight.pack import pack_in_the_air, pack_keys
from estimator.preflight.warnings import full_command_sag, judged_currents, margin_warnings
from estimator.units import COMMAND_SHOWN, commands_in_unit
from estimator.vehicle import NO_ESC_EFFICIENCY_WARNING, assumed_warnings, given_text, vehicle_air, vehicle_source

# a missing esc.efficiency on this route: the fit measured the ESC's input, so only the motor
# current the sheet shows depends on it (new-user trial 13, finding 12: fit printed the datasheet
# route's words, pack current low and endurance long)
NO_ESC_EFFICIENCY_BENCH = (
    "the vehicle file gives no esc.efficiency: the ESC is taken as lossless (efficiency 1); the bench fit "
    "measured the ESC's input, so the pack current and the endurance do not depend on it, only the motor "
    "current shown does; multirotor ESCs are about 0.9-0.95 efficient "
    "(common practice, from memory): add \"esc\": {\"efficiency\": 0.95} or the maker's figure")

# a parameter set's hover block for a vehicle (hover_block): values (the block, None when the
# vehicle cannot hover), warnings (those about the vehicle, which the set keeps), refusal (why
# it cannot hover, or None)
HoverBlock = namedtuple("HoverBlock", "values warnings refusal")
# the report's commands also given in the sweep's own unit (units.commands_in_unit)
COMMANDS = ("hover_command", "hover_command_full", "hover_command_empty", "hover_command_interval_95",
            "hover_command_start")


def hover_from_params(vehicle, params, command_unit="-"):
    """The ``liftcal hover --json`` report for a vehicle, from a fitted parameter set.

    vehicle: checked vehicle dict; params: validated parameter set; command_unit: the unit the
    warnings write commands in (the fit passes its sweep's: us, %, permille). Returns a dict with
    hover_command, hover_command_full, hover_command_empty [-] (None when it cannot hover),
    hover_command_interval_95 [-, -], interval_method, hover_thrust_fraction [-],
    thrust_to_weight [-], hover_current_A [A], hover_power_W [W], flight_time_min [min],
    warnings, and the keys the pre-flight sheet shows.
    """
    air = vehicle_air(vehicle)
    rho = air["density_kg_m3"]
    b, pack_temperature, pack_basis = pack_in_the_air(vehicle, air)
    raw_vehicle, vehicle = vehicle, dict(vehicle, battery=b)
    states = {name: vehicle_state(params, vehicle, rho, b["cells"] * b[name + "_cell_V"])
              for name in ("full", "nominal", "empty")}
    nom = states["nominal"]
    count = vehicle["rotors"]["count"]
    esc_eff = vehicle.get("esc", {}).get("efficiency", 1.0)
    interval, se = (None, None)
    if nom["command"] is not None:
        interval, se = hover_interval(params, nom)
    usable = usable_capacity_Ah(b["capacity_Ah"], b.get("usable_fraction", 0.8))
    hovering = nom["command"] is not None
    report = {
        "model": "liftcal.rotor/1 (fitted bench sweep)",
        "name": vehicle.get("name", "unnamed vehicle"),
        "can_hover": hovering,
        "hover_command": nom["command"],
        "hover_command_full": states["full"]["command"],
        "hover_command_empty": states["empty"]["command"],
        "hover_command_interval_95": interval,
        "hover_command_standard_error": se,
        "interval_method": INTERVAL_METHOD % FORM_INFLATION,
        "interval_scope": INTERVAL_SCOPE,
        "hover_command_start": params["motor_model"]["command_start"],
        "hover_thrust_fraction": nom["fraction"],
        "thrust_to_weight": nom["full_thrust_N"] / nom["weight_N"],
        "hover_current_A": nom["current_A"],
        "hover_power_W": nom["power_W"] if hovering else None,
        "flight_time_min": endurance_min(usable, nom["current_A"]) if hovering else None,
        "hover_limited_by": nom["limited_by"],
        "mass_kg": vehicle["mass_kg"], "mass_as_given": given_text(raw_vehicle, "$.mass_kg"),
        "propeller_diameter_m": params["rotor"]["diameter_m"], "propeller_source": "bench sweep",
        "weight_N": nom["weight_N"], "rotor_count": count,
        "layout": vehicle["rotors"].get("layout", "flat"),
        "thrust_per_rotor_N": nom["thrust_per_rotor_N"], "full_thrust_N": nom["full_thrust_N"],
        "hover_bus_V": nom["bus_V"] if hovering else None,
        "full_bus_V": nom["full_bus_V"], "full_pack_current_A": nom["full_pack_current_A"],
        # the fitted current is referred to the ESC input (module docstring): the motor's own
        # current is eta_esc times it, as in the datasheet route (P_bus = Vm I / eta_esc)
        "full_motor_current_A": esc_eff * nom["full_motor_current_A"],
        "full_esc_input_current_A": (nom["full_pack_current_A"] - nom["avionics_current_A"]) / count,
        "hover_motor_current_A": esc_eff * nom["motor_current_A"] if hovering else None,
        "hover_esc_input_current_A": (nom["current_A"] - nom["avionics_current_A"]) / count if hovering else None,
        "avionics_current_A": nom["avionics_current_A"],
        "esc_efficiency": esc_eff,
        "motor_current_limit_A": vehicle["motor"].get("max_current_A"),
        "pack_current_limit_A": max_pack_current_A(b["capacity_Ah"], b.get("max_discharge_C")),
        "esc_current_limit_A": vehicle.get("esc", {}).get("max_current_A"),
        "pack_voltage_V": {k: states[k]["open_circuit_V"] for k in states},
        "usable_Ah": usable, "density_kg_m3": rho, "density_ratio": air["density_ratio"],
        "density_altitude_m": air["density_altitude_m"], "temperature_K": air["temperature_K"],
        "pressure_Pa": air["pressure_Pa"], "site_altitude_m": vehicle.get("site", {}).get("altitude_m", 0.0),
        "static_factor": rotor_static_factor(params["power_model"], nom["thrust_per_rotor_N"],
                                             params["power_model"]["reference_density_kg_m3"],
                                             disk_area_m2(params["rotor"]["diameter_m"])),
        "per_rotor_bus_current_A": (nom["current_A"] - nom["avionics_current_A"]) / count if hovering else None,
        "flight_time_usable_share_min": endurance_min(usable, nom["current_A"]) if hovering else None,
        "flight_time_usable_share_basis": "usable share of the capacity at the nominal-pack hover current",
        "flight_time_basis": ("discharge from a full pack, hover current rising as the pack drains, "
                              "to the first of: loaded cutoff, landing reserve, loss of hover"),
        "flight_ended_by": None, "discharge": None,
    }
    unit = (params["provenance"].get("units") or {}).get("command", "-")  # the sweep's command unit
    if unit != "-" and unit in COMMAND_SHOWN:  # the commands in it too (hover_command_us ...), beside the 0..1 values
        report.update(commands_in_unit({k: report[k] for k in COMMANDS}, unit), command_unit=unit)
    report.update(pack_keys(raw_vehicle, b, pack_temperature, pack_basis))
    report.update(full_command_sag(report))
    peak = states["full"]  # the current limits' pack state (warnings.judged_currents)
    report.update(judged_currents({"bus_V": peak["full_bus_V"], "motor_current_A": esc_eff * peak["full_motor_current_A"],
                                   "esc_input_current_A": (peak["full_pack_current_A"] - peak["avionics_current_A"]) / count,
                                   "pack_current_A": peak["full_pack_current_A"]}, b["cells"], b["cutoff_cell_V"]))
    report.update(reachable_at_cutoff(nom, b, count))
    if hovering:
        d = discharge_to_cutoff(b["cells"], b["capacity_Ah"], b.get("usable_fraction", 0.8),
                                b["full_cell_V"], b["nominal_cell_V"], b["empty_cell_V"],
                                b["cutoff_cell_V"], hover_load(params, vehicle, rho))
        report.update({"flight_time_min": d["minutes"], "flight_ended_by": d["ended_by"], "discharge": d})
    warnings = [NO_ESC_EFFICIENCY_BENCH if w == NO_ESC_EFFICIENCY_WARNING else w for w in assumed_warnings(vehicle)]
    warnings += margin_warnings(report, command_unit)
    volts = [("hover bus, %s pack" % name if states[name]["command"] is not None
               else "open circuit, %s pack" % name,
              states[name]["bus_V"] if states[name]["command"] is not None else states[name]["open_circuit_V"])
             for name in ("full", "nominal", "empty")]
    # full command on both pack states: the nominal pack's (the sag check, the T/W) and the full
    # pack's (the current limits, warnings.judged_currents)
    volts += [("full command, nominal pack", nom["full_bus_V"]), ("full command, full pack", peak["full_bus_V"])]
    extrapolated = voltage_range_warning(params, volts)
    if extrapolated:
        warnings.append(extrapolated)
    warnings += command_range_warnings(params, states, command_unit)
    bench_rho = params["thrust_curve"]["reference_density_kg_m3"]
    if abs(rho / bench_rho - 1.0) > 0.15:
        warnings.append("the site air (%.3f kg/m^3) differs from the bench air (%.3f kg/m^3) by more "
                        "than 15 %%: the density exponent %.2f is extrapolated"
                        % (rho, bench_rho, params["thrust_curve"]["density_exponent"]))
    if report["layout"] == "coaxial":
        warnings.append("the sweep was made on an isolated rotor; for the coaxial pair the ideal induced "
                        "power is multiplied by %.2f (momentum theory, power basis), as in the datasheet "
                        "route; the lower rotor's own thrust loss is not modelled" % COAXIAL_INDUCED_POWER_FACTOR)
    # the set's own warnings, less those it stored about the vehicle it was fitted with (this
    # vehicle's are computed above); each warning once
    stored = [w for w in params.get("warnings", []) if not about_the_vehicle(w)]
    report["warnings"] = list(dict.fromkeys(warnings + stored))
    report["cautions"] = list(cautions("sheet"))
    return report


def hover_block(vehicle, params, report=None):
    """The ``hover`` block of a parameter set (DEVELOPERS.md layout) for a vehicle, from its
    hover report (hover_from_params(vehicle, params), computed here when not given): a
    HoverBlock (values, warnings about the vehicle, refusal). When the vehicle cannot hover on
    this rotor there is no hover command to store: values is None and refusal says why
    (params.complete_set raises it, after checking that the sweep fits the vehicle).
    """
    r = hover_from_params(vehicle, params) if report is None else report
    if r["hover_command"] is None:
        cause = [w for w in r["warnings"] if w.startswith("cannot hover: ")][:1]
        bench = (params.get("provenance") or {}).get("input_file")
        why = cause[0][len("cannot hover: "):] if cause else "no hover command"
        # the cause's own advice stands; the fit's alternative is added once
        advice = "" if "lighten it" in why else "lighten it or fit more thrust, "
        return HoverBlock(None, [], "%s: this vehicle cannot hover on the rotor fitted from %s at nominal pack: "
                                    "%s; %sor fit without --vehicle (the parameter set would have no hover values)"
                          % (vehicle_source(vehicle, "the vehicle"), bench or "the bench sweep", why, advice))
    return HoverBlock({
        "hover_command": r["hover_command"],
        "hover_command_interval_95": r["hover_command_interval_95"],
        "interval_method": r["interval_method"],
        "hover_command_standard_error": r["hover_command_standard_error"],
        "hover_command_start": r["hover_command_start"],
        "full_bus_V": r["full_bus_V"],
        "motor_current_A": r["hover_motor_current_A"],
        "hover_thrust_fraction": r["hover_thrust_fraction"],
        "thrust_per_rotor_N": r["thrust_per_rotor_N"],
        "power_W": r["hover_power_W"], "current_A": r["hover_current_A"],
        "voltage_V": r["hover_bus_V"],
        "hover_command_full": r["hover_command_full"],
        "hover_command_empty": r["hover_command_empty"],
        "thrust_to_weight": r["thrust_to_weight"],
        "flight_time_min": r["flight_time_min"],
    }, [w for w in r["warnings"] if about_the_vehicle(w)], None)
