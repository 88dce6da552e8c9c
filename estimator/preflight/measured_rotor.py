"""Hover values of a vehicle from a fitted parameter set (instead of the datasheet model).

liftcal's own predictions come from the DC motor + propeller model fitted to the sweep (the
parameter set's motor_model block, estimator.bench.motor_fit), in back-EMF form:
T = a s^2, I = I0 + b s + c s^2, Vm = s + R I, duty d = Vm / V_bus, command
u = u0 + (u1 - u0) d^(1/g), bus current I_q + d I per rotor; a and c grow as the air
density. Each of N rotors holds T_r = m g / N; the pack sags as V_bus = V_oc - R_pack I_pack
(Thevenin pack, design notes sec. 3), solved in closed form for hover and by bisection at
full command. The bench measures the supply current, so the fitted I carries the ESC's loss
(it is the ESC input power over Vm); the motor's own current on the sheet is eta_esc I with the
vehicle's ESC efficiency, the relation the datasheet route uses (P_bus = Vm I_motor / eta_esc),
so the motor-limit warning compares motor current with the motor limit in both routes.
The command where the rotor starts turning is u0, reported separately; the
controller quadratic's intercept command_min is never used as a duty offset. Coaxial pairs:
the torque current is raised by power_model.coaxial_shaft_ratio, the same rule the datasheet
route applies to CP (only the ideal induced power is multiplied by the coaxial factor).

The 95 % interval of the hover command: +-1.96 standard errors, the standard error made of
the model-form error (the motor fit's robust thrust residual scale, times FORM_INFLATION,
through dT/du at hover), of the extrapolation beyond the sweep's top command (for a hover
above it: _beyond_sweep_se), of the extrapolation beyond the sweep's bus voltages (the share
of the voltage outside the sweep times EXTRAPOLATION_N_ERROR in the voltage exponent, or,
for an exponent not measured (one supply voltage), ln(V / V_ref) times its own standard
error, whichever is larger) and,
when the sweep stepped the command one way only, of the rotor's lag (ONE_WAY_LAG_SE).
Beyond the sweep's voltage or command range the sheet says by how much it extrapolates.
"""

import math

from estimator.core.constants import ONE_WAY_LAG_COMMAND_SE
from estimator.core.battery import endurance_min, max_pack_current_A, usable_capacity_Ah
from estimator.core.discharge import discharge_to_cutoff
from estimator.core.momentum import COAXIAL_INDUCED_POWER_FACTOR, disk_area_m2
from estimator.core.power_model import (coaxial_shaft_ratio, rotor_power_W,  # noqa: F401 (re-exported)
                                        rotor_static_factor)
from estimator.errors import InputError
from estimator.preflight.range_warnings import (about_the_vehicle, command_range_warnings,  # noqa: F401
                                                voltage_range_warning)
from estimator.cautions import cautions
from estimator.preflight.pack import pack_in_the_air, pack_keys
from estimator.preflight.warnings import full_command_sag, margin_warnings, vehicle_site_air
from estimator.units import COMMAND_SHOWN, STANDARD_GRAVITY_M_S2, commands_in_unit
from estimator.vehicle import assumed_warnings, given_text, vehicle_source

INTERVAL_METHOD = ("+-1.96 standard errors of the motor model's hover command: model-form error (robust "
                   "thrust residual scale of the command levels x %.1f, through dT/du at hover), voltage "
                   "and command extrapolation beyond the sweep and, for a one-way sweep, the rotor's lag, in "
                   "quadrature; clipped to 0..1")
INTERVAL_SCOPE = "bench-fit and model-form uncertainty; not site, pack or prop-to-prop spread"
# the report's commands also given in the sweep's own unit (units.commands_in_unit)
COMMANDS = ("hover_command", "hover_command_full", "hover_command_empty", "hover_command_interval_95",
            "hover_command_start")
# measured on independent truths (benchmarks/fit_study.py): level residuals of neighbouring
# commands are correlated, and the hover point sits between levels [-]
FORM_INFLATION = 2.0
# uncertainty of the voltage exponent when the hover voltage lies beyond the sweep's [-]
EXTRAPOLATION_N_ERROR = 0.15
# a sweep that steps the command one way only cannot tell the rotor's lag behind the command
# from the curve itself (core.constants); up-and-down sweeps cancel it
ONE_WAY_LAG_SE = ONE_WAY_LAG_COMMAND_SE
# smallest standard error of a hover command: a tenth of a percent step of the command [-]
MIN_COMMAND_SE = 0.002
Z_95 = 1.959964  # two-sided 95 % point of the standard normal [-]
BISECTION_STEPS = 60


def sagged_bus_V(open_circuit_V, resistance_ohm, power_W):
    """Bus voltage that delivers power P from a pack V_oc, R: V = (V_oc + sqrt(V_oc^2 - 4 R P)) / 2.

    open_circuit_V [V]; resistance_ohm [ohm]; power_W [W]. Returns V [V], or None when the
    pack cannot deliver that power at any voltage (V_oc^2 < 4 R P). Source: Thevenin pack.
    """
    disc = open_circuit_V * open_circuit_V - 4.0 * resistance_ohm * power_W
    if disc < 0.0:
        return None
    return 0.5 * (open_circuit_V + math.sqrt(disc))


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
        v_eff = open_circuit_V - pack_ohm * rotors * self.iq
        disc = v_eff * v_eff - 4.0 * pack_ohm * rotors * vm * i
        if disc < 0.0 or v_eff <= 0.0:
            return {"bus_V": None, "duty": None, "command": None, "pack_current_A": None,
                    "power_W": rotors * vm * i, "motor_current_A": i}
        v = 0.5 * (v_eff + math.sqrt(disc))
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


def _state(params, vehicle, rho, open_circuit_V):
    """Hover and full-command values at one pack voltage."""
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


def _beyond_sweep_se(params, thrust_at, u_h, u1):
    """Relative thrust error [-] at a hover command u_h above the highest command swept: the
    full-command thrust's relative standard error (which carries the motor model's
    extrapolation beyond the sweep, bench.motor_errors.full_thrust_extrapolation) times the share
    of that extrapolation reached at hover, ln(T(u_h) / T_top) / ln(T(u1) / T_top), the same
    measure (speed ratio, T ~ n^2) the extrapolation's error grows with. 0 inside the sweep.
    thrust_at(u): the model's thrust [N] at command u and the hover bus voltage."""
    top = params["thrust_curve"].get("command_swept_max")
    if top is None or not u_h > top or not u1 > top:
        return 0.0
    t_top, t_h, t_full = thrust_at(top), thrust_at(u_h), thrust_at(u1)
    if not (t_top > 0.0 and t_full > t_h > t_top):
        return 0.0
    rel = params["standard_errors"]["thrust_max_N"] / params["thrust_curve"]["thrust_max_N"]
    return rel * math.log(t_h / t_top) / math.log(t_full / t_top)


def hover_interval(params, state):
    """95 % interval [lo, hi] of the hover command [-] and its standard error (module docstring).

    state: a _state result with a hover command. Returns (interval, standard error [-]).
    """
    rotor, u_h, v_h = state["rotor"], state["command"], state["bus_V"]
    mm = params["motor_model"]
    # dT/du at hover from the model at the hover bus voltage (central difference of 0.01)
    def thrust_at(u):
        x = min(max((u - rotor.u0) / (rotor.u1 - rotor.u0), 0.0), 1.0)
        return rotor.at_motor_V(x ** rotor.g * v_h)[0]
    du = 0.01
    slope = (thrust_at(min(u_h + du, rotor.u1)) - thrust_at(max(u_h - du, rotor.u0))) / (
        min(u_h + du, rotor.u1) - max(u_h - du, rotor.u0))
    ratio = rotor.a / mm["thrust_per_V2_N"]  # site over bench density
    sigma_t = FORM_INFLATION * mm.get("thrust_residual_scale_N", 0.0) * ratio
    se_form = sigma_t / slope if slope > 0.0 else 0.0
    curve = params["thrust_curve"]
    lo_v, hi_v = curve.get("voltage_min_V", v_h), curve.get("voltage_max_V", v_h)
    beyond = max(0.0, math.log(lo_v / v_h), math.log(v_h / hi_v))
    t_h = state["thrust_per_rotor_N"]
    # a voltage exponent not measured (one supply) carries its own standard error over the
    # whole way from the reference voltage: d ln T = ln(V / V_ref) dn
    se_n = params.get("standard_errors", {}).get("voltage_exponent", 0.0)
    n_part = 0.0
    if curve.get("voltage_exponent_source") == "motor model":
        n_part = se_n * abs(math.log(v_h / curve.get("reference_voltage_V", v_h)))
    se_extra = max(EXTRAPOLATION_N_ERROR * beyond, n_part) * t_h / slope if slope > 0.0 else 0.0
    se_lag = 0.0 if mm.get("sweep_both_ways", True) else ONE_WAY_LAG_SE
    se_beyond = _beyond_sweep_se(params, thrust_at, u_h, rotor.u1) * t_h / slope if slope > 0.0 else 0.0
    se = math.sqrt(se_form ** 2 + se_extra ** 2 + se_lag ** 2 + se_beyond ** 2 + MIN_COMMAND_SE ** 2)
    return [max(0.0, u_h - Z_95 * se), min(1.0, u_h + Z_95 * se)], se


def hover_from_params(vehicle, params, command_unit="-"):
    """The ``liftcal hover --json`` report for a vehicle, from a fitted parameter set.

    vehicle: checked vehicle dict; params: validated parameter set; command_unit: the unit the
    warnings write commands in (the fit passes its sweep's: us, %, permille). Returns a dict with
    hover_command, hover_command_full, hover_command_empty [-] (None when it cannot hover),
    hover_command_interval_95 [-, -], interval_method, hover_thrust_fraction [-],
    thrust_to_weight [-], hover_current_A [A], hover_power_W [W], flight_time_min [min],
    warnings, and the keys the pre-flight sheet shows.
    """
    air = vehicle_site_air(vehicle)
    rho = air["density_kg_m3"]
    b, pack_temperature, pack_basis = pack_in_the_air(vehicle, air)
    raw_vehicle, vehicle = vehicle, dict(vehicle, battery=b)
    states = {name: _state(params, vehicle, rho, b["cells"] * b[name + "_cell_V"])
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
        "full_esc_input_current_A": nom["full_pack_current_A"] / count,
        "hover_motor_current_A": esc_eff * nom["motor_current_A"] if hovering else None,
        "hover_esc_input_current_A": nom["current_A"] / count if hovering else None,
        "esc_efficiency": esc_eff,
        "motor_current_limit_A": vehicle["motor"].get("max_current_A"),
        "pack_current_limit_A": max_pack_current_A(b["capacity_Ah"], b.get("max_discharge_C")),
        "pack_voltage_V": {k: states[k]["open_circuit_V"] for k in states},
        "usable_Ah": usable, "density_kg_m3": rho, "density_ratio": air["density_ratio"],
        "density_altitude_m": air["density_altitude_m"], "temperature_K": air["temperature_K"],
        "pressure_Pa": air["pressure_Pa"],
        "static_factor": rotor_static_factor(params["power_model"], nom["thrust_per_rotor_N"],
                                             params["power_model"]["reference_density_kg_m3"],
                                             disk_area_m2(params["rotor"]["diameter_m"])),
        "per_rotor_bus_current_A": (nom["current_A"] / count) if hovering else None,
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
    report.update(_reachable(nom, b, count))
    if hovering:
        d = discharge_to_cutoff(b["cells"], b["capacity_Ah"], b.get("usable_fraction", 0.8),
                                b["full_cell_V"], b["nominal_cell_V"], b["empty_cell_V"],
                                b["cutoff_cell_V"], _hover_load(params, vehicle, rho))
        report.update({"flight_time_min": d["minutes"], "flight_ended_by": d["ended_by"], "discharge": d})
    warnings = assumed_warnings(vehicle) + margin_warnings(report, command_unit)
    volts = [("hover bus, %s pack" % name if states[name]["command"] is not None
               else "open circuit, %s pack" % name,
              states[name]["bus_V"] if states[name]["command"] is not None else states[name]["open_circuit_V"])
             for name in ("full", "nominal", "empty")]
    volts.append(("full command, nominal pack", nom["full_bus_V"]))
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


def _reachable(state, battery, rotors):
    """reachable_command [-] and reachable_thrust_to_weight [-] on the nominal pack: the command
    that holds the bus at the loaded cutoff and the thrust-to-weight there (as the datasheet
    route's core.hover.reachable_at_cutoff); None when full command keeps the cutoff."""
    cutoff_V = battery["cells"] * battery["cutoff_cell_V"]
    if state["full_bus_V"] >= cutoff_V or state["open_circuit_V"] <= cutoff_V:
        return {"reachable_command": None, "reachable_thrust_to_weight": None}
    at = state["rotor"].at_bus_V(rotors, cutoff_V, battery["resistance_ohm"], state["open_circuit_V"])
    return {"reachable_command": at["command"],
            "reachable_thrust_to_weight": rotors * at["thrust_N"] / state["weight_N"]}


def hover_block(vehicle, params, report=None):
    """The ``hover`` block of a parameter set (DEVELOPERS.md layout) for a vehicle, from its
    hover report (hover_from_params(vehicle, params), computed here when not given).

    Raises InputError when the vehicle cannot hover on this rotor (there is no hover command
    to store).
    """
    r = hover_from_params(vehicle, params) if report is None else report
    if r["hover_command"] is None:
        cause = [w for w in r["warnings"] if w.startswith("cannot hover: ")][:1]
        bench = (params.get("provenance") or {}).get("input_file")
        why = cause[0][len("cannot hover: "):] if cause else "no hover command"
        # the cause's own advice stands; the fit's alternative is added once
        advice = "" if "lighten it" in why else "lighten it or fit more thrust, "
        raise InputError("%s: this vehicle cannot hover on the rotor fitted from %s at nominal pack: %s; "
                         "%sor fit without --vehicle (the parameter set would have no hover values)"
                         % (vehicle_source(vehicle, "the vehicle"), bench or "the bench sweep", why, advice))
    return {
        "_warnings": [w for w in r["warnings"] if about_the_vehicle(w)],
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
    }


def _hover_load(params, vehicle, rho):
    """The hover load of the fitted model as core.discharge.discharge_to_cutoff takes it.

    vehicle: checked vehicle whose battery is already the pack in the air (preflight.pack);
    params: validated parameter set; rho: site air density [kg/m^3]. Returns a function of the
    pack open-circuit voltage [V] giving (pack current [A], bus voltage [V]) at hover, or None
    where the vehicle cannot hover (same model as hover_from_params, one state per call).
    """
    def load(open_circuit_V):
        state = _state(params, vehicle, rho, open_circuit_V)
        if state["command"] is None:
            return None
        return state["current_A"], state["bus_V"]
    return load
