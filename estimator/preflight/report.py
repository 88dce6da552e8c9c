"""The pre-flight estimate of a vehicle: the report dict (``liftcal hover --json``) and its sheet.

hover_report(vehicle) runs the core models (site air, DC motor + propeller + ESC + pack with
sag, hover at full / nominal / empty pack) on a checked vehicle dict (estimator.vehicle);
format_sheet(report) (estimator.preflight.sheet, importable here) lays the result out by the
questions a builder asks before a first flight.
"""

from estimator.core.battery import max_pack_current_A
from estimator.core.hover import hover_estimate, rotor_propeller
from estimator.core.momentum import (disk_area_m2, disk_loading_N_m2, figure_of_merit,
                                     induced_velocity_m_s, static_factor)
from estimator.preflight.caveats import caveats
from estimator.preflight.pack import pack_in_the_air, pack_keys
from estimator.preflight.low_reynolds import (endurance_lead, fallback_figure_of_merit,
                                              described_ducted, hover_warning as low_reynolds_warning)
from estimator.preflight.propeller_estimate import estimated_propeller, low_reynolds_propeller
from estimator.errors import InputError
from estimator.preflight.route_check import route_disagreement
from estimator.preflight.unit_checks import params_propeller_warning, slip_keys, suspicious_values
from estimator.vehicle import assumed_warnings, given_text, vehicle_air
from estimator.preflight.warnings import (HOVER_COMMAND_LIMIT,  # noqa: F401 (preflight.plots reads it here)
                                         full_command_sag, judged_currents, judged_thrust_to_weight,
                                         margin_warnings, not_flyable_reasons)

# the sheet of a report lives in its own module (preflight.sheet); its names stay importable here
from estimator.preflight.sheet import (CAUTIONS, DUTY_NOTE, MODEL, coaxial_text,  # noqa: F401,E402
                                       format_sheet)


def hover_report(vehicle, params=None):
    """The pre-flight report dict, with ``flyable``, ``not_flyable_because`` and the judged
    thrust-to-weight (``thrust_to_weight_judged`` [-], ``thrust_to_weight_judged_at``: "full command"
    or "loaded cutoff", warnings.judged_thrust_to_weight) (see _report)."""
    report = _report(vehicle, params)
    judged, marked = judged_thrust_to_weight(report)
    report["thrust_to_weight_judged"] = judged  # what the margins, warnings and tables judge
    report["thrust_to_weight_judged_at"] = "loaded cutoff" if marked else "full command"
    reasons = not_flyable_reasons(report) if report.get("can_hover") else ["it cannot hover"]
    report["flyable"] = not reasons
    report["not_flyable_because"] = reasons
    report["caveats"] = caveats(report)  # compare shows them under its rows (preflight.caveats)
    report.setdefault("flight_time_lead_min", report.get("flight_time_min"))  # a bench fit: measured
    report.setdefault("flight_time_lead_basis", "bench fit")
    return report


def _report(vehicle, params=None):
    """The pre-flight report dict for a checked vehicle (see estimator.vehicle.check_vehicle).

    With ``params`` (a fitted parameter set), the thrust and power come from the bench fit:
    delegated to estimator.preflight.measured_rotor.hover_from_params, which returns the same
    keys; the parameter set's propeller is checked against the vehicle's.
    """
    checks = suspicious_values(vehicle)
    if params is not None:
        return _fitted_report(vehicle, params, checks)

    site = vehicle.get("site", {})
    air = vehicle_air(vehicle)
    rho = air["density_kg_m3"]
    rotors = vehicle["rotors"]
    layout = rotors.get("layout", "flat")
    count = rotors["count"]
    esc_eff = vehicle.get("esc", {}).get("efficiency", 1.0)
    propeller, estimate = vehicle["propeller"], None
    if "ct" not in propeller or "cp" not in propeller:
        propeller, estimate = estimated_propeller(propeller, vehicle["mass_kg"], count, air)
    battery, pack_temperature, pack_basis = pack_in_the_air(vehicle, air)
    est = hover_estimate(vehicle["mass_kg"], count, layout, rho, vehicle["motor"],
                         propeller, battery, esc_eff, vehicle.get("avionics_current_A", 0.0))
    # a small estimated rotor: the sheet leads with the figure of merit measured rotors of its size
    # reach, so every hover number (command, currents, power, minutes, margins) is taken there too
    # and the generic blade's estimate becomes the secondary line (trial 8, item 3)
    low_re, lower, low = _low_reynolds_check(vehicle, propeller, estimate, est, count, layout, rho,
                                             battery, esc_eff)
    if low is not None and low["hover_command"] is not None:
        propeller, est = lower, low
    nominal = est["states"]["nominal"]
    hov, full = nominal["hover"], nominal["full"]
    area = disk_area_m2(propeller["diameter_m"])
    per_rotor = nominal["weight_N"] / count
    prop = rotor_propeller(propeller, layout)
    hovering = est["hover_command"] is not None
    per_rotor_power = est["hover_power_W"] / count if hovering else None
    discharge = est["discharge"]
    report = {
        "model": MODEL,
        "name": vehicle.get("name", "unnamed vehicle"),
        "can_hover": hovering,
        "hover_command": est["hover_command"],
        "hover_command_full": est["hover_command_full"],
        "hover_command_empty": est["hover_command_empty"],
        "hover_thrust_fraction": est["hover_thrust_fraction"],
        "thrust_to_weight": est["thrust_to_weight"],
        "reachable_command": est["reachable_command"],
        "reachable_thrust_to_weight": est["reachable_thrust_to_weight"],
        "hover_current_A": est["hover_current_A"],
        "hover_power_W": est["hover_power_W"],
        "flight_time_min": est["flight_time_min"],
        "flight_time_basis": ("discharge from a full pack, hover current rising as the pack drains, "
                              "to the first of: loaded cutoff, landing reserve, loss of hover"),
        "flight_ended_by": discharge["ended_by"] if hovering else None,
        "flight_time_usable_share_min": est["flight_time_usable_share_min"],
        "flight_time_usable_share_basis": "usable share of the capacity at the nominal-pack hover current",
        "discharge": discharge if hovering else None,
        "hover_limited_by": None if hovering else (hov["limited_by"] or "command"),
        "mass_kg": vehicle["mass_kg"],
        "mass_as_given": given_text(vehicle, "$.mass_kg"),
        "propeller_as_given": given_text(vehicle, "$.propeller.diameter_m"),
        "weight_N": nominal["weight_N"],
        "rotor_count": count,
        "layout": layout,
        "thrust_per_rotor_N": per_rotor,
        "full_thrust_N": full["total_thrust_N"],
        "hover_rpm": hov["rpm"] if hovering else None,
        "hover_bus_V": hov["bus_V"] if hovering else None,
        "hover_motor_current_A": hov["motor_current_A"] if hovering else None,
        "hover_esc_input_current_A": hov["bus_current_A"] if hovering else None,
        "full_motor_current_A": full["motor_current_A"],
        "full_esc_input_current_A": full["bus_current_A"],
        "full_pack_current_A": full["pack_current_A"],
        "full_bus_V": full["bus_V"],
        "motor_current_limit_A": vehicle["motor"].get("max_current_A"),
        "pack_current_limit_A": max_pack_current_A(vehicle["battery"]["capacity_Ah"],
                                                   vehicle["battery"].get("max_discharge_C")),
        "esc_current_limit_A": vehicle.get("esc", {}).get("max_current_A"),
        "pack_voltage_V": {k: est["states"][k]["open_circuit_V"] for k in ("full", "nominal", "empty")},
        "usable_Ah": est["usable_Ah"],
        "density_kg_m3": rho,
        "density_ratio": air["density_ratio"],
        "density_altitude_m": air["density_altitude_m"],
        "temperature_K": air["temperature_K"],
        "pressure_Pa": air["pressure_Pa"],
        "site_altitude_m": site.get("altitude_m", 0.0),
        "propeller_ct": propeller["ct"],
        "propeller_diameter_m": propeller["diameter_m"],
        "propeller_cp": propeller["cp"],
        "propeller_source": "estimated" if estimate else "given",
        "propeller_estimate": estimate,
        "figure_of_merit": figure_of_merit(prop["ct"], prop["cp"]),
        "static_factor": (static_factor(per_rotor, per_rotor_power, rho, area)
                          if per_rotor_power else None),
        "disk_loading_N_m2": disk_loading_N_m2(per_rotor, area),
        "induced_velocity_m_s": induced_velocity_m_s(per_rotor, rho, area),
        "coaxial_induced_power_factor": est["coaxial_induced_power_factor"],
        "coaxial_factor_basis": "power",
        "esc_efficiency": esc_eff,
        "avionics_current_A": vehicle.get("avionics_current_A", 0.0),
    }
    report.update(pack_keys(vehicle, battery, pack_temperature, pack_basis))
    report.update(full_command_sag(report))
    peak = est["states"]["full"]["full"]  # the current limits' pack state (warnings.judged_currents)
    report.update(judged_currents({"bus_V": peak["bus_V"], "motor_current_A": peak["motor_current_A"],
                                   "esc_input_current_A": peak["bus_current_A"],
                                   "pack_current_A": peak["pack_current_A"]},
                                  report.get("cells"), report.get("cutoff_cell_V")))
    report["low_reynolds_check"] = low_re
    report["described_ducted"] = described_ducted(vehicle)  # the duct note: by size and description
    lead = endurance_lead(report)
    report["flight_time_lead_min"] = lead["flight_time_min"]  # what the sheet and compare lead with
    report["flight_time_lead_basis"] = lead["basis"]
    report["suspect_keys"] = slip_keys(checks)
    report["warnings"] = (checks + assumed_warnings(vehicle) + ([estimate["note"]] if estimate else [])
                          + ([low_reynolds_warning(low_re, propeller["diameter_m"], report["described_ducted"])]
                             if low_re and low_re["estimate_hover_command"] is not None
                             else []) + margin_warnings(report))
    report["cautions"] = list(CAUTIONS)
    return report


def _low_reynolds_check(vehicle, propeller, estimate, est, count, layout, rho, battery, esc_eff):
    """The hover at the measured small-rotor figure of merit (low_reynolds.fallback_figure_of_merit)
    for an estimated propeller at a low Reynolds number (propeller_estimate.low_reynolds_propeller).

    Returns (check, lower propeller, its core.hover.hover_estimate result), or (None, None, None).
    check: reynolds_75 [-], figure_of_merit_estimated / _assumed [-], cp [-] (raised), hover_command
    [-], hover_power_W [W], hover_current_A [A], flight_time_min [min] (None when it cannot hover),
    thrust_to_weight [-] at the assumed figure of merit; the generic blade's estimate beside them
    (the sheet's secondary line): estimate_cp [-], estimate_hover_command [-],
    estimate_hover_power_W [W], estimate_hover_current_A [A] (pack), estimate_hover_motor_current_A
    [A], estimate_flight_time_min [min], estimate_flight_ended_by.
    """
    lower = low_reynolds_propeller(propeller, estimate)
    if lower is None:
        return None, None, None
    low = hover_estimate(vehicle["mass_kg"], count, layout, rho, vehicle["motor"], lower, battery, esc_eff,
                         vehicle.get("avionics_current_A", 0.0))
    hovering = est["hover_command"] is not None
    est_hover = est["states"]["nominal"]["hover"]
    check = {"reynolds_75": estimate["reynolds_75"], "figure_of_merit_estimated": estimate["figure_of_merit"],
             "figure_of_merit_assumed": fallback_figure_of_merit(estimate["reynolds_75"]), "cp": lower["cp"],
             "hover_command": low["hover_command"], "hover_power_W": low["hover_power_W"],
             "hover_current_A": low["hover_current_A"], "flight_time_min": low["flight_time_min"],
             "flight_ended_by": low["discharge"]["ended_by"] if low["hover_command"] is not None else None,
             "thrust_to_weight": low["thrust_to_weight"], "estimate_cp": propeller["cp"],
             "estimate_hover_command": est["hover_command"], "estimate_hover_power_W": est["hover_power_W"],
             "estimate_hover_current_A": est["hover_current_A"],
             "estimate_hover_motor_current_A": est_hover["motor_current_A"] if hovering else None,
             "estimate_flight_time_min": est["flight_time_min"],
             "estimate_flight_ended_by": est["discharge"]["ended_by"] if hovering else None}
    return check, lower, low


def _fitted_report(vehicle, params, checks):
    """hover_report for a fitted parameter set: the bench flow's report (the same
    measured_rotor.hover_from_params that makes the hover block of ``fit --vehicle``: pack in
    the air and discharge included), with the propeller check of the datasheet route added."""
    from estimator.preflight.measured_rotor import hover_from_params  # the bench flow

    report = hover_from_params(vehicle, params)
    report["suspect_keys"] = slip_keys(checks)
    try:
        own = _report(vehicle)                  # the file's own motor and propeller, for route_check
    except InputError:
        own = None
    other = [w for w in (params_propeller_warning(vehicle, params),
                         route_disagreement(own, report, vehicle["motor"]["kv_rpm_per_V"])) if w]
    report["warnings"] = checks + other + [
        w for w in report.get("warnings", []) if w not in checks]
    report.setdefault("cautions", list(CAUTIONS))
    return report
