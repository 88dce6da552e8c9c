"""The pre-flight estimate of a vehicle: the report dict (``liftcal hover --json``) and its sheet.

hover_report(vehicle) runs the core models (site air, DC motor + propeller + ESC + pack with
sag, hover at full / nominal / empty pack) on a checked vehicle dict (estimator.vehicle);
format_sheet(report) lays the result out by the questions a builder asks before a first
flight: will it hover, with what margin, for how long, what to watch out for.
"""

import math

from estimator.core.atmosphere import site_air
from estimator.core.battery import cold_resistance_factor, max_pack_current_A
from estimator.core.discharge import discharge_to_cutoff
from estimator.core.hover import hover_estimate, rotor_propeller
from estimator.core.momentum import (disk_area_m2, disk_loading_N_m2, figure_of_merit,
                                     induced_velocity_m_s, static_factor)
from estimator.cautions import cautions
from estimator.errors import InputError
from estimator.preflight.propeller_estimate import estimated_propeller
from estimator.preflight.unit_checks import params_propeller_warning, suspicious_values
from estimator.vehicle import assumed_warnings, given_text, vehicle_source

# Warning thresholds (common practice for multirotors, not a standard):
HOVER_COMMAND_LIMIT = 0.6  # hover above 0.6 of full command leaves little for control
THRUST_TO_WEIGHT_MIN = 2.0  # T/W of 2 puts hover near 0.67 command (thrust ~ command^1.8)
# below these a vehicle that holds its weight is called not flyable on the sheet (our own floors,
# far below the margins above: no control authority left to climb, steer or reject a gust)
FLYABLE_THRUST_TO_WEIGHT = 1.3
FLYABLE_HOVER_COMMAND = 0.8
THIN_AIR_DENSITY_RATIO = 0.9  # below 90 % of 1.225 kg/m^3 thrust margins shrink noticeably

MODEL = "liftcal.dc-motor-momentum/1"
# the datasheet model takes command = ESC duty; a real ESC only starts the motor above a
# dead band, so a bench fit reports a higher hover command for the same set
DUTY_NOTE = "command = ESC duty; a real ESC's start-up dead band adds to it: fit a bench sweep"

CAUTIONS = cautions("sheet")


def hover_report(vehicle, params=None):
    """The pre-flight report dict, with ``flyable`` and ``not_flyable_because`` (see _report)."""
    report = _report(vehicle, params)
    reasons = not_flyable_reasons(report) if report.get("can_hover") else ["it cannot hover"]
    report["flyable"] = not reasons
    report["not_flyable_because"] = reasons
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
    air = vehicle_site_air(vehicle)
    rho = air["density_kg_m3"]
    rotors = vehicle["rotors"]
    layout = rotors.get("layout", "flat")
    count = rotors["count"]
    esc_eff = vehicle.get("esc", {}).get("efficiency", 1.0)
    propeller, estimate = vehicle["propeller"], None
    if "ct" not in propeller or "cp" not in propeller:
        propeller, estimate = estimated_propeller(propeller, vehicle["mass_kg"], count, air)
    battery, pack_temperature = pack_in_the_air(vehicle)
    est = hover_estimate(vehicle["mass_kg"], count, layout, rho, vehicle["motor"],
                         propeller, battery, esc_eff)
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
        "pack_voltage_V": {k: est["states"][k]["open_circuit_V"] for k in ("full", "nominal", "empty")},
        "pack_resistance_ohm": battery["resistance_ohm"],
        "pack_temperature_C": pack_temperature,
        "pack_cold_factor": battery["resistance_ohm"] / vehicle["battery"]["resistance_ohm"]
        if vehicle["battery"]["resistance_ohm"] > 0.0 else 1.0,
        "cutoff_cell_V": battery["cutoff_cell_V"],
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
    }
    report["warnings"] = (checks + assumed_warnings(vehicle) + ([estimate["note"]] if estimate else [])
                          + margin_warnings(report))
    report["cautions"] = list(CAUTIONS)
    return report


def _fitted_report(vehicle, params, checks):
    """hover_report for a fitted parameter set: the bench flow's report, with the cold pack,
    the discharge to the cutoff and the propeller check of the datasheet route added."""
    from estimator.preflight.measured_rotor import fitted_hover_load, hover_from_params  # the bench flow

    battery, pack_temperature = pack_in_the_air(vehicle)
    in_air = dict(vehicle, battery=battery)
    report = hover_from_params(in_air, params)
    other = params_propeller_warning(vehicle, params)
    report["warnings"] = checks + ([other] if other else []) + [
        w for w in report.get("warnings", []) if w not in checks]
    report.setdefault("cautions", list(CAUTIONS))
    report["flight_time_usable_share_min"] = report.get("flight_time_min")
    report["flight_time_usable_share_basis"] = "usable share of the capacity at the nominal-pack hover current"
    report.update({"pack_resistance_ohm": battery["resistance_ohm"], "pack_temperature_C": pack_temperature,
                   "pack_cold_factor": (battery["resistance_ohm"] / vehicle["battery"]["resistance_ohm"]
                                        if vehicle["battery"]["resistance_ohm"] > 0.0 else 1.0),
                   "cutoff_cell_V": battery["cutoff_cell_V"], "flight_ended_by": None, "discharge": None})
    if report.get("can_hover"):
        d = discharge_to_cutoff(battery["cells"], battery["capacity_Ah"], battery.get("usable_fraction", 0.8),
                                battery["full_cell_V"], battery["nominal_cell_V"], battery["empty_cell_V"],
                                battery["cutoff_cell_V"], fitted_hover_load(in_air, params))
        report.update({"flight_time_min": d["minutes"], "flight_ended_by": d["ended_by"], "discharge": d})
    report["flight_time_basis"] = ("discharge from a full pack, hover current rising as the pack drains, "
                                   "to the first of: loaded cutoff, landing reserve, loss of hover")
    return report


def pack_in_the_air(vehicle):
    """The vehicle's battery dict with the resistance of a cold pack, and the pack temperature.

    The pack is taken at battery.temperature_C, else at the site's temperature_C; when the file
    gives neither, at 25 C (no cold factor). Returns (battery dict [resistance_ohm raised by
    core.battery.cold_resistance_factor, cutoff_cell_V filled], temperature [C] or None).
    """
    battery = dict(vehicle["battery"])
    temperature = battery.get("temperature_C", (vehicle.get("site") or {}).get("temperature_C"))
    if temperature is not None:
        battery["resistance_ohm"] = battery["resistance_ohm"] * cold_resistance_factor(temperature)
    battery.setdefault("cutoff_cell_V", battery["empty_cell_V"] - 0.2)
    return battery, temperature


_SITE_KEYS = {"altitude": "altitude_m", "temperature": "temperature_C", "pressure": "pressure_Pa",
              "humidity": "humidity_pct"}


def vehicle_site_air(vehicle):
    """Site air of a vehicle (core.atmosphere.site_air); InputError naming file and JSON key."""
    from estimator.core.atmosphere import AirInputError

    site = vehicle.get("site", {})
    try:
        return site_air(site.get("altitude_m", 0.0), site.get("temperature_C"),
                        site.get("pressure_Pa"), site.get("humidity_pct", 0.0))
    except AirInputError as exc:
        raise InputError("%s: $.site.%s: %s" % (vehicle_source(vehicle), _SITE_KEYS[exc.quantity], exc)) from None


# a sag of more than this share of the open-circuit voltage at full command is named as a cause
SAG_CAUSE_SHARE = 0.2
ENDED_BY_WORDS = {"cutoff": "the loaded-voltage cutoff", "reserve": "the landing reserve",
                  "thrust": "the loss of hover (the drained pack can no longer hold it)"}


def cannot_hover_cause(report):
    """One warning that names the real limiting factor of a vehicle that cannot hover."""
    weight = report.get("weight_N") or 0.0
    full = report.get("full_thrust_N")
    tw = report.get("thrust_to_weight")
    if full is not None and full < weight:
        text = ("cannot hover: full-command thrust %.1f N is below the weight %.1f N (thrust-to-weight "
                "%.2f)" % (full, weight, tw or 0.0))
        v_oc = (report.get("pack_voltage_V") or {}).get("nominal")
        bus, pack_i, rating = (report.get("full_bus_V"), report.get("full_pack_current_A"),
                               report.get("pack_current_limit_A"))
        if v_oc and bus is not None and 1.0 - bus / v_oc > SAG_CAUSE_SHARE:
            r_pack = report.get("pack_resistance_ohm")
            text += ("; the pack cannot deliver the power: it sags from %.1f V to %.1f V at full "
                     "command%s, which costs much of the thrust: a pack with less resistance, or more "
                     "cells" % (v_oc, bus, "" if r_pack is None else " (resistance %.3g ohm)" % r_pack))
        else:
            text += ": the propulsion is too weak for this mass, not the pack"
            if pack_i is not None and rating:
                text += " (full command draws %.0f A, %.0f %% of the pack's %.0f A rating)" % (
                    pack_i, 100.0 * pack_i / rating, rating)
            text += "; lighten it, or fit a larger or higher-pitch propeller, a higher Kv or more cells"
    elif report.get("hover_limited_by") == "pack":
        text = ("cannot hover: the pack cannot deliver the hover power through its resistance (%s ohm) "
                "at any voltage: a pack with less resistance or more cells"
                % _num(report.get("pack_resistance_ohm"), "%.3g"))
    else:
        text = ("cannot hover at nominal pack: the command needed exceeds full command (thrust-to-weight "
                "%.2f)" % (tw or 0.0))
    if report.get("hover_command_full") is not None:
        text += ("; a freshly charged pack would just hold it (command %.2f at full pack): not flyable"
                 % report["hover_command_full"])
    return text


def not_flyable_reasons(report):
    """Why a vehicle that holds its weight on a nominal pack is still not flyable ([] when it is).

    Floors (our own, well below the common-practice margins the warnings use): thrust-to-weight
    FLYABLE_THRUST_TO_WEIGHT, hover command FLYABLE_HOVER_COMMAND, and hover to the end of the pack.
    """
    out = []
    tw = report.get("thrust_to_weight")
    if tw is not None and tw < FLYABLE_THRUST_TO_WEIGHT:
        out.append("thrust-to-weight %.2f leaves almost nothing to climb or steer with (below %.1f)"
                   % (tw, FLYABLE_THRUST_TO_WEIGHT))
    command = report.get("hover_command")
    if command is not None and command > FLYABLE_HOVER_COMMAND:
        out.append("hover command %.2f is above %.1f of full command" % (command, FLYABLE_HOVER_COMMAND))
    if command is not None and report.get("hover_command_empty") is None:
        out.append("it cannot hover near the end of the pack")
    return out


def margin_warnings(report):
    """Warnings for a report dict with the keys of hover_report (also usable on fitted reports)."""
    out = []
    tw = report.get("thrust_to_weight")
    if report.get("hover_command") is None:
        out.append(cannot_hover_cause(report))
    worst = None
    for key, label in (("hover_command_empty", "empty"), ("hover_command", "nominal"),
                       ("hover_command_full", "full")):
        value = report.get(key)
        if value is not None and value > HOVER_COMMAND_LIMIT:
            worst = (value, label)
            break
    if worst and report.get("hover_command") is not None:  # a vehicle that cannot hover got its cause
        out.append("hover command %.2f at %s pack is above %.1f of full command: little left for "
                   "control and gusts (thrust-to-weight %.2f)"
                   % (worst[0], worst[1], HOVER_COMMAND_LIMIT, tw or 0.0))
    if report.get("hover_command") is not None and report.get("hover_command_empty") is None:
        out.append("near the end of the pack it cannot hover (command would exceed full at %s V open "
                   "circuit): land well before the pack is empty"
                   % _num((report.get("pack_voltage_V") or {}).get("empty"), "%.1f"))
    if tw is not None and 1.0 <= tw < THRUST_TO_WEIGHT_MIN:
        out.append("thrust-to-weight %.2f is below %.0f (this set hovers at command %s on a nominal "
                   "pack): sluggish climbs and little control margin (common practice: 2 or more; where "
                   "thrust grows about as command^1.8 that puts hover near 0.67, and hovering near 0.5 "
                   "needs about 3)" % (tw, THRUST_TO_WEIGHT_MIN, _num(report.get("hover_command"), "%.2f")))
    limit = report.get("motor_current_limit_A")
    if limit is not None:
        full_i = report.get("full_motor_current_A")
        hov_i = report.get("hover_motor_current_A")
        if hov_i is not None and hov_i > limit:
            out.append("hover draws %.1f A per motor, above the motor limit %.0f A: it will overheat"
                       % (hov_i, limit))
        elif full_i is not None and full_i > limit:
            out.append("full command draws %.1f A per motor, above the motor limit %.0f A: limit the "
                       "command or use a smaller propeller" % (full_i, limit))
    pack_limit = report.get("pack_current_limit_A")
    if pack_limit is not None:
        full_pack = report.get("full_pack_current_A")
        if full_pack is not None and full_pack > pack_limit:
            out.append("full command draws %.0f A from the pack, above its rating of %.0f A "
                       "(C-rating x capacity): the pack will sag and heat" % (full_pack, pack_limit))
    ratio = report.get("density_ratio")
    if ratio is not None and ratio < THIN_AIR_DENSITY_RATIO:
        out.append("thin air: %.3f kg/m^3 is %.0f %% of sea-level standard (density altitude %.0f m): "
                   "less thrust at full command and a higher hover command"
                   % (report["density_kg_m3"], 100.0 * ratio, report.get("density_altitude_m", 0.0)))
    return out


def _num(value, fmt, unit="", none="n/a"):
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return none
    return (fmt % value) + (" " + unit if unit else "")


def _at_hover(current_A):
    return "" if current_A is None else "%.1f A at hover, " % current_A


def format_sheet(report):
    """The human pre-flight sheet for a report dict, grouped by the builder's questions."""
    lines = []
    title = "PRE-FLIGHT ESTIMATE: %s" % report.get("name", "vehicle")
    lines += [title, "=" * len(title)]
    air = "air %s (%s of standard, density altitude %s)" % (
        _num(report.get("density_kg_m3"), "%.3f", "kg/m^3"),
        _num(100.0 * report["density_ratio"] if report.get("density_ratio") else None, "%.0f", "%"),
        _num(report.get("density_altitude_m"), "%.0f", "m"))
    as_given = report.get("mass_as_given")
    setup = "%s%s, %d rotors (%s)" % (_num(report.get("mass_kg"), "%.2f", "kg"),
                                     " (%s as written)" % as_given if as_given else "",
                                   report.get("rotor_count", 0), report.get("layout", "flat"))
    lines += ["vehicle  " + setup, "site     " + air, ""]

    lines.append("1. Will it hover?")
    if report.get("can_hover"):
        why_not = not_flyable_reasons(report)
        if why_not:
            lines.append("   ONLY JUST - it holds its weight at command %s on a nominal pack, but it is not "
                         "flyable: %s" % (_num(report.get("hover_command"), "%.2f"), "; ".join(why_not)))
        else:
            lines.append("   YES - command %s on a nominal pack" % _num(report.get("hover_command"), "%.2f"))
        lines.append("         %s on a full pack, %s near empty" % (
            _num(report.get("hover_command_full"), "%.2f"),
            _num(report.get("hover_command_empty"), "%.2f", none="cannot hover")))
        lines.append("         thrust fraction %s of full-command thrust at the hover bus voltage "
                     "(not 1/(T/W): T/W is taken at full command, where the pack sags further)" %
                     _num(report.get("hover_thrust_fraction"), "%.2f"))
        interval = report.get("hover_command_interval_95")
        if interval:
            lines.append("         95 %% interval %.3f..%.3f (%s)"
                         % (interval[0], interval[1], report.get("interval_scope", "bench-fit uncertainty only")))
        if report.get("model") == MODEL:
            lines.append("         " + DUTY_NOTE)
    else:
        cause = cannot_hover_cause(report)
        lines.append("   NO - it " + cause)
    lines.append("")

    lines.append("2. With what margin?")
    lines.append("   thrust-to-weight   %s   (full command, nominal pack; 2 is the usual floor)"
                 % _num(report.get("thrust_to_weight"), "%.2f"))
    lines.append("   full-command thrust %s total, each rotor must make %s" % (
        _num(report.get("full_thrust_N"), "%.1f", "N"), _num(report.get("thrust_per_rotor_N"), "%.2f", "N")))
    count = report.get("rotor_count") or 0
    esc_hover = report.get("hover_esc_input_current_A", report.get("per_rotor_bus_current_A"))
    esc_full = report.get("full_esc_input_current_A")
    if esc_full is None and report.get("full_pack_current_A") is not None and count:
        esc_full = report["full_pack_current_A"] / count
    if report.get("hover_motor_current_A") is not None or report.get("full_motor_current_A") is not None:
        lines.append("   motor current      %s%s at full command, each motor (ESC output; "
                     "motor limit %s)" % (
                         _at_hover(report.get("hover_motor_current_A")),
                         _num(report.get("full_motor_current_A"), "%.1f", "A"),
                         _num(report.get("motor_current_limit_A"), "%.0f", "A", none="not given")))
    lines.append("   ESC input current  %s%s at full command, each ESC from the pack (what "
                 "ESC telemetry reports)" % (_at_hover(esc_hover), _num(esc_full, "%.1f", "A")))
    if report.get("can_hover"):
        lines.append("   pack current       %s at hover, %s at full command, all %d motors (rating %s)" % (
            _num(report.get("hover_current_A"), "%.1f", "A"),
            _num(report.get("full_pack_current_A"), "%.0f", "A"), count,
            _num(report.get("pack_current_limit_A"), "%.0f", "A", none="not given")))
    else:
        lines.append("   pack current       %s at full command, all %d motors (rating %s)" % (
            _num(report.get("full_pack_current_A"), "%.0f", "A"), count,
            _num(report.get("pack_current_limit_A"), "%.0f", "A", none="not given")))
    lines.append("")

    lines.append("3. For how long?")
    if report.get("can_hover"):
        ended = report.get("flight_ended_by")
        if ended:
            lines.append("   about %s of hover from a full pack, ended by %s" % (
                _num(report.get("flight_time_min"), "%.1f", "min"), ENDED_BY_WORDS.get(ended, ended)))
            lines.append("   (the usable share alone, %s at the nominal-pack hover current, gives %s)" % (
                _num(report.get("usable_Ah"), "%.2f", "Ah"),
                _num(report.get("flight_time_usable_share_min"), "%.1f", "min")))
        else:
            lines.append("   about %s of hover on %s usable (%s)" % (
                _num(report.get("flight_time_min"), "%.1f", "min"), _num(report.get("usable_Ah"), "%.2f", "Ah"),
                report.get("flight_time_basis", "usable share at the nominal-pack hover current")))
        if report.get("cutoff_cell_V") is not None:
            cold = report.get("pack_cold_factor") or 1.0
            lines.append("   cutoff %.2f V per cell under load; pack resistance %s%s" % (
                report["cutoff_cell_V"], _num(report.get("pack_resistance_ohm"), "%.3g", "ohm"),
                (" (x%.2f for a pack at %.0f C, cold factor from memory)"
                 % (cold, report.get("pack_temperature_C"))) if cold > 1.0 else ""))
        lines.append("   hover draws %s from the pack (all motors), %s (nominal pack, bus at %s)" % (
            _num(report.get("hover_current_A"), "%.1f", "A"), _num(report.get("hover_power_W"), "%.0f", "W"),
            _num(report.get("hover_bus_V"), "%.2f", "V")))
        extras = []
        if report.get("hover_rpm") is not None:
            extras.append("rotors at %.0f rpm" % report["hover_rpm"])
        if report.get("figure_of_merit") is not None:
            extras.append("figure of merit %.2f" % report["figure_of_merit"])
        estimate = report.get("propeller_estimate")
        if estimate:
            lines.append("   propeller CT %.3f, CP %.4f ESTIMATED from %.3g m x %.3g m pitch, %d blades "
                         "(blade element momentum theory at %.0f rpm; typically 10-20 %% off)"
                         % (report["propeller_ct"], report["propeller_cp"], report.get("propeller_diameter_m") or 0.0,
                            estimate["pitch_m"], estimate["blades"], estimate["rpm"]))
        if report.get("static_factor") is not None:
            extras.append("static factor k %.2f" % report["static_factor"])
        if extras:
            lines.append("   " + "; ".join(extras))
    else:
        lines.append("   no hover, no endurance.")
    lines.append("")

    lines.append("4. What to watch out for")
    warnings = [w for w in report.get("warnings") or []
                if report.get("can_hover") or not w.startswith("cannot hover")]
    if warnings:
        for w in warnings:
            lines.append("   ! " + w)
    else:
        lines.append("   nothing flagged by the estimate")
    lines.append("")
    lines.append("Before you go to the field")
    for c in report.get("cautions") or CAUTIONS:
        lines.append("   - " + c)
    return "\n".join(lines) + "\n"
