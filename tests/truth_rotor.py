"""Randomised bench truths written independently of estimator (it imports nothing from it).

Each truth is one motor + propeller + ESC on a thrust stand and a vehicle flying N of them.
Its physics is its own (numpy, vectorised bisection), deliberately richer than the fit's:
  propeller  T = CT(n) rho n^2 D^4, Q = CP(n) rho n^2 D^5 / (2 pi), CT and CP drifting with
             speed as a power of n (a Reynolds-number effect; McCormick, Aerodynamics of
             V/STOL Flight, from memory) [n in rev/s]
  motor      Vm = omega / Kv + I R, I = I0(omega) + Q Kv, iron loss I0 growing with speed
             (DC motor equivalent model, Drela 2007, from memory)
  ESC        end points e_lo..e_hi of the command (an ESC calibrated to 1100..1900 us has
             0.1..0.9), a dead zone, duty = ((x - dead) / (1 - dead))^gamma, bus current
             I_q + d I / eta_esc
  supply     one or several voltages with a source resistance: V_bus = V_s - R_s I_bus
  pack       Thevenin: V_bus = V_oc - R_pack I_pack, shared by the N rotors
Rows carry sensor noise and outliers and are written in any unit liftcal reads.
"""

import math

import numpy as np
from ambiance import Atmosphere

G0 = 9.80665  # standard gravity [m/s^2] (CGPM 1901)
THRUST_UNITS = {"N": 1.0, "mN": 1000.0, "g": 1000.0 / G0, "gf": 1000.0 / G0, "kgf": 1.0 / G0,
                "lbf": 1.0 / (0.45359237 * G0)}  # value in unit = newtons x factor (NIST SP 811)


def random_truth(rng, rows=None):
    """A random truth dict (module docstring) drawn with numpy Generator ``rng``."""
    d = math.exp(rng.uniform(math.log(0.03), math.log(0.762)))    # 30 mm .. 30 in
    area = math.pi * d * d / 4.0
    ct0 = rng.uniform(0.08, 0.14)
    fm = rng.uniform(0.45, 0.72)
    cp0 = math.sqrt(2.0 / math.pi) * ct0 ** 1.5 / fm
    altitude = rng.uniform(0.0, 2500.0)
    rho = float(Atmosphere(altitude).density[0])  # ICAO standard atmosphere via ambiance
    disk_loading = math.exp(rng.uniform(math.log(60.0), math.log(450.0)))  # at full thrust [N/m^2]
    t_full = disk_loading * area
    n_full = math.sqrt(t_full / (ct0 * rho * d ** 4))
    cells = int(rng.integers(1, 25))
    if d < 0.06:
        cells = int(rng.integers(1, 3))
    v_supply = cells * rng.uniform(3.7, 4.15)
    drop = rng.uniform(0.05, 0.22)          # resistive share of Vm at full duty
    omega_full = 2.0 * math.pi * n_full
    kv = omega_full / ((1.0 - drop) * v_supply)  # [rad/(s V)]
    q_full = cp0 * rho * n_full ** 2 * d ** 5 / (2.0 * math.pi)
    i_load = q_full * kv
    i0 = i_load * rng.uniform(0.02, 0.12)
    r_m = drop * v_supply / (i_load + i0)
    calibrated = rng.random() < 0.25
    e_lo, e_hi = (0.1, 0.9) if calibrated else (0.0, 1.0)
    truth = {
        "diameter_m": d, "ct0": ct0, "cp0": cp0, "n_ref": n_full,
        "ct_exp": rng.uniform(0.0, 0.08), "cp_exp": rng.uniform(-0.06, 0.03),
        "kv": kv, "r_m": r_m, "i0": i0, "i0_speed_share": rng.uniform(0.0, 0.6),
        "e_lo": e_lo, "e_hi": e_hi, "dead": rng.uniform(0.02, 0.12), "gamma": rng.uniform(0.85, 1.2),
        "eta_esc": rng.uniform(0.9, 0.98), "i_q": rng.uniform(0.0, 0.01) * (i_load + i0),
        "rho": rho, "altitude_m": altitude, "v_supply": v_supply, "cells": cells,
        "supplies": [v_supply] if rng.random() < 0.5 else [v_supply * f for f in (1.0, 0.93, 0.86)],
        "r_source": rng.uniform(0.0, 0.06) * v_supply / (i_load + i0),
        "rows": int(rows if rows is not None else math.exp(rng.uniform(math.log(20), math.log(100000)))),
        "steps": int(rng.integers(10, 41)), "both_legs": rng.random() < 0.5,
        "hysteresis": rng.uniform(0.0, 0.006),
        "thrust_noise": rng.uniform(0.001, 0.008), "current_noise": rng.uniform(0.001, 0.008),
        "outliers": rng.uniform(0.0, 0.02) if rng.random() < 0.6 else 0.0,
        "thrust_unit": str(rng.choice(list(THRUST_UNITS))),
        "command_unit": str(rng.choice(["-", "%", "us"])),
    }
    if calibrated:
        truth["command_unit"] = "us"
    # vehicle: N rotors hovering at 7..55 % of the full thrust on a pack of the bench's cells
    n_rot = int(rng.choice([4, 6, 8]))
    share = rng.uniform(0.07, 0.55) if rng.random() < 0.2 else rng.uniform(0.18, 0.55)
    t_h = share * t_full
    i_full = i_load + i0
    truth["vehicle"] = {
        "rotors": n_rot, "mass_kg": n_rot * t_h / G0, "cells": cells,
        "full_cell_V": 4.2, "nominal_cell_V": v_supply / cells, "empty_cell_V": 3.5,
        "capacity_Ah": min(max(0.1, n_rot * i_full * share ** 1.5 * rng.uniform(0.1, 0.4)), 150.0),
        "r_pack": min(rng.uniform(0.01, 0.08) * v_supply / (n_rot * i_full), 4.9),
    }
    return truth


def _coefficients(truth, n):
    r = np.maximum(n, 1e-9) / truth["n_ref"]
    return truth["ct0"] * r ** truth["ct_exp"], truth["cp0"] * r ** truth["cp_exp"]


def _omega_at_motor_V(truth, vm, rho):
    """Rotor speed [rad/s] at motor voltage vm [V] (array) by 60 bisections per point."""
    vm = np.asarray(vm, dtype=float)
    lo = np.zeros_like(vm)
    hi = np.full_like(vm, truth["kv"] * max(float(np.max(vm)), 1e-9) * 1.01 + 1.0)
    d = truth["diameter_m"]
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        n = mid / (2.0 * math.pi)
        _, cp = _coefficients(truth, n)
        q = cp * rho * n * n * d ** 5 / (2.0 * math.pi)
        i0 = truth["i0"] * (1.0 - truth["i0_speed_share"] + truth["i0_speed_share"] * n / truth["n_ref"])
        need = mid / truth["kv"] + (i0 + q * truth["kv"]) * truth["r_m"]
        up = need < vm
        lo = np.where(up, mid, lo)
        hi = np.where(up, hi, mid)
    return 0.5 * (lo + hi)


def duty(truth, command):
    """ESC duty [-] at normalised command [-] (module docstring)."""
    x = (np.asarray(command, dtype=float) - truth["e_lo"]) / (truth["e_hi"] - truth["e_lo"])
    x = np.clip((x - truth["dead"]) / (1.0 - truth["dead"]), 0.0, 1.0)
    return x ** truth["gamma"]


def command_for_duty(truth, d):
    """Normalised command [-] that gives duty d [-] (above the dead zone)."""
    x = truth["dead"] + (1.0 - truth["dead"]) * d ** (1.0 / truth["gamma"])
    return truth["e_lo"] + x * (truth["e_hi"] - truth["e_lo"])


def rotor_at(truth, d, bus_V, rho):
    """Thrust [N] and bus current [A] of one rotor at duty d [-] and bus voltage [V] (arrays)."""
    d = np.asarray(d, dtype=float)
    bus_V = np.broadcast_to(np.asarray(bus_V, dtype=float), d.shape)
    omega = _omega_at_motor_V(truth, d * bus_V, rho)
    n = omega / (2.0 * math.pi)
    ct, cp = _coefficients(truth, n)
    dd = truth["diameter_m"]
    thrust = ct * rho * n * n * dd ** 4
    q = cp * rho * n * n * dd ** 5 / (2.0 * math.pi)
    i0 = truth["i0"] * (1.0 - truth["i0_speed_share"] + truth["i0_speed_share"] * n / truth["n_ref"])
    i_m = np.where(omega > 0.0, i0 + q * truth["kv"], 0.0)
    return thrust, truth["i_q"] + d * i_m / truth["eta_esc"]


def at_supply(truth, d, supply_V, r_source, rho, rotors=1):
    """Thrust [N] per rotor, bus voltage [V] and total current [A] of ``rotors`` rotors at
    duty d on a source V_s, R_s: the rotor speed omega found by 60 bisections of
    omega / Kv + I_m R = d V_bus with V_bus = V_s - R_s N (I_q + d I_m / eta_esc) and
    I_m = I0(omega) + Q(omega) Kv (the left side rises with omega, the right side falls)."""
    d = np.asarray(d, dtype=float)
    lo = np.zeros_like(d)
    hi = np.full_like(d, truth["kv"] * max(float(supply_V), 1e-9) * 1.01 + 1.0)
    dd = truth["diameter_m"]
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        n = mid / (2.0 * math.pi)
        _, cp = _coefficients(truth, n)
        q = cp * rho * n * n * dd ** 5 / (2.0 * math.pi)
        i_m = truth["i0"] * (1.0 - truth["i0_speed_share"] + truth["i0_speed_share"] * n / truth["n_ref"]) \
            + q * truth["kv"]
        bus = supply_V - r_source * rotors * (truth["i_q"] + d * i_m / truth["eta_esc"])
        up = mid / truth["kv"] + i_m * truth["r_m"] < d * bus
        lo = np.where(up, mid, lo)
        hi = np.where(up, hi, mid)
    omega = 0.5 * (lo + hi)
    n = omega / (2.0 * math.pi)
    ct, cp = _coefficients(truth, n)
    thrust = ct * rho * n * n * dd ** 4
    q = cp * rho * n * n * dd ** 5 / (2.0 * math.pi)
    i0 = truth["i0"] * (1.0 - truth["i0_speed_share"] + truth["i0_speed_share"] * n / truth["n_ref"])
    i = truth["i_q"] + d * np.where(omega > 0.0, i0 + q * truth["kv"], 0.0) / truth["eta_esc"]
    return thrust, supply_V - r_source * rotors * i, rotors * i


def sweep_rows(truth, rng):
    """Bench rows (command [-], bus voltage [V], current [A], thrust [N]) with noise/outliers."""
    steps = truth["steps"]
    levels = np.linspace(0.0, truth.get("sweep_top", 1.0), steps + 1)
    seen = levels - truth.get("hysteresis", 0.0)  # the rotor lags on the way up ...
    if truth["both_legs"]:
        levels = np.concatenate([levels, levels[::-1][1:]])
        seen = np.concatenate([seen, levels[steps + 1:] + truth.get("hysteresis", 0.0)])  # ... leads down
    per = max(1, int(round(truth["rows"] / (levels.size * len(truth["supplies"])))))
    blocks = []
    for vs in truth["supplies"]:
        t, v, i = at_supply(truth, duty(truth, seen), vs, truth["r_source"], truth["rho"])
        blocks.append(np.column_stack([np.repeat(levels, per), np.repeat(v, per), np.repeat(i, per),
                                       np.repeat(t, per)]))
    rows = np.concatenate(blocks)
    n = rows.shape[0]
    t_top, i_top = float(np.max(rows[:, 3])), float(np.max(rows[:, 2]))
    rows[:, 3] += rng.normal(0.0, truth["thrust_noise"], n) * (0.5 * t_top + 0.5 * rows[:, 3])
    rows[:, 2] += rng.normal(0.0, truth["current_noise"], n) * (0.5 * i_top + 0.5 * rows[:, 2])
    rows[:, 1] *= 1.0 + rng.normal(0.0, truth.get("volt_noise", 0.0005), n)  # the voltmeter's noise [-]
    bad = rng.random(n) < truth["outliers"]
    rows[bad, 3] += rng.choice([-1.0, 1.0], int(np.count_nonzero(bad))) * rng.uniform(0.1, 0.3) * t_top
    return rows


def write_csv(truth, rows, path):
    """Write rows in the truth's units with a diameter and density comment."""
    tu, cu = truth["thrust_unit"], truth["command_unit"]
    cmd = {"-": rows[:, 0], "%": 100.0 * rows[:, 0], "us": 1000.0 + 1000.0 * rows[:, 0]}[cu]
    table = np.column_stack([cmd, rows[:, 1], rows[:, 2], rows[:, 3] * THRUST_UNITS[tu]])
    with open(path, "w") as fh:
        fh.write("# independent truth sweep (randomised test data)\n# density: %.5f\n# diameter: %.6f\n"
                 % (truth["rho"], truth["diameter_m"]))
        fh.write("command[%s],voltage[V],current[A],thrust[%s]\n" % (cu, tu))
        np.savetxt(fh, table, delimiter=",", fmt="%.7g")


def vehicle_file(truth):
    """The vehicle dict (liftcal's vehicle file layout) for the truth's vehicle at the bench air."""
    vh = truth["vehicle"]
    return {
        "name": "truth vehicle", "mass_kg": vh["mass_kg"],
        "rotors": {"count": vh["rotors"], "layout": "flat"},
        "propeller": {"diameter_m": truth["diameter_m"], "ct": truth["ct0"], "cp": truth["cp0"]},
        # the datasheet fields are not used by the fitted route; kept inside the vehicle schema's limits
        "motor": {"kv_rpm_per_V": min(truth["kv"] * 60.0 / (2.0 * math.pi), 20000.0),
                  "resistance_ohm": min(truth["r_m"], 9.9), "no_load_current_A": min(truth["i0"], 9.9)},
        "battery": {"cells": vh["cells"], "capacity_Ah": vh["capacity_Ah"], "resistance_ohm": vh["r_pack"],
                    "full_cell_V": vh["full_cell_V"], "nominal_cell_V": vh["nominal_cell_V"],
                    "empty_cell_V": vh["empty_cell_V"], "usable_fraction": 0.8,
                    # r_pack is the truth's resistance in flight: a pack at 25 C (no cold factor)
                    "temperature_C": 25.0},
        "site": {"altitude_m": truth["altitude_m"]},
    }


def truth_values(truth, v_ref):
    """True T_max at v_ref [N], thrust against command at v_ref (callable), and the vehicle's
    hover command, thrust-to-weight, hover pack current [A], pack power [W] (bus voltage times
    pack current) and endurance [min] at nominal pack."""
    vh = truth["vehicle"]
    rho = truth["rho"]
    t_max = float(rotor_at(truth, np.array([1.0]), v_ref, rho)[0][0])

    def curve(u):
        return rotor_at(truth, duty(truth, u), v_ref, rho)[0]

    v_oc = vh["cells"] * vh["nominal_cell_V"]
    n_rot = vh["rotors"]
    t_need = vh["mass_kg"] * G0 / n_rot
    lo, hi = 0.0, 1.0
    for _ in range(3):  # three vectorised grids of 257 duties narrow the root to 1e-7
        grid = np.linspace(lo, hi, 257)
        t, _, _ = at_supply(truth, grid, v_oc, vh["r_pack"], rho, n_rot)
        k = int(np.searchsorted(t, t_need))  # thrust rises with duty
        lo, hi = grid[max(k - 1, 0)], grid[min(k, grid.size - 1)]
    d_h = 0.5 * (lo + hi)
    _, v_h, i_h = at_supply(truth, np.array([d_h]), v_oc, vh["r_pack"], rho, n_rot)
    t_f, _, _ = at_supply(truth, np.array([1.0]), v_oc, vh["r_pack"], rho, n_rot)
    usable = 0.8 * vh["capacity_Ah"]
    return {"thrust_max_N": t_max, "curve": curve, "hover_command": float(command_for_duty(truth, d_h)),
            "thrust_to_weight": float(t_f[0]) * n_rot / (vh["mass_kg"] * G0),
            "hover_current_A": float(i_h[0]), "hover_power_W": float(v_h[0] * i_h[0]),
            "flight_time_min": 60.0 * usable / float(i_h[0])}


def voltage_exponent(truth, v_ref):
    """The truth's voltage exponent n = d ln T / d ln V at full duty and bus voltage v_ref [V]
    (central difference of +-1 %; DC motor equivalent model + propeller coefficients) [-]."""
    rho = truth["rho"]
    t_up = float(rotor_at(truth, np.array([1.0]), v_ref * 1.01, rho)[0][0])
    t_dn = float(rotor_at(truth, np.array([1.0]), v_ref * 0.99, rho)[0][0])
    return math.log(t_up / t_dn) / math.log(1.01 / 0.99)


def command_at_bus_V(truth, thrust_N, bus_V):
    """The truth's command [-] that makes thrust_N [N] on one rotor at a held bus voltage
    bus_V [V] (a sagged pack), or None when full duty is not enough: three vectorised grids
    of 257 duties (thrust rises with duty)."""
    rho = truth["rho"]
    lo, hi = 0.0, 1.0
    if float(rotor_at(truth, np.array([1.0]), bus_V, rho)[0][0]) < thrust_N:
        return None
    for _ in range(3):
        grid = np.linspace(lo, hi, 257)
        t, _ = rotor_at(truth, grid, np.full_like(grid, bus_V), rho)
        k = int(np.searchsorted(t, thrust_N))
        lo, hi = grid[max(k - 1, 0)], grid[min(k, grid.size - 1)]
    return float(command_for_duty(truth, 0.5 * (lo + hi)))
