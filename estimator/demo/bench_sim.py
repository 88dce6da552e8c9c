"""Bench-sweep simulator for the INVENTED demo scenario (not a measurement of any real set).

One motor + propeller of the demo vehicle (estimator.demo_data.DEMO_VEHICLE: 880 Kv,
10 in propeller, 4S) on a thrust stand. Physics: the DC motor model of
estimator.core.motor.rotor_operating_point (no second copy here); the ESC maps command u
to duty d = (u - u_dead) / (1 - u_dead) above a start-up dead band; the supply sags as
V_bus = V_supply - I_bus R_source (solved by a bounded fixed-point iteration). The sweep
steps the command up and then down at each of three supply voltages; on the up leg the
rotor lags (it sees u - h), on the down leg it leads (u + h): hysteresis. Sensors add
Gaussian noise; a few rows are spoiled on purpose (load-cell knocks, a dropped sample, a
current glitch) so the reader's row checks and the robust fit have something to do.
"""

import math
import random

from estimator.core.atmosphere import site_air
from estimator.core.motor import rotor_operating_point
from estimator.units import INCH_M, POUND_KG, STANDARD_GRAVITY_M_S2

# INVENTED bench scenario (all values made up for the demo)
BENCH_ALTITUDE_M = 300.0
BENCH_TEMPERATURE_C = 21.0
SUPPLY_VOLTAGES_V = (16.4, 15.4, 14.4)   # a 4S pack near full, half and low charge [V]
SOURCE_RESISTANCE_OHM = 0.045            # pack + leads + shunt [ohm]
DEAD_BAND = 0.06                         # ESC start-up dead band of the command [-]
HYSTERESIS = 0.006                       # command lag on the up leg, lead on the down leg [-]
ESC_EFFICIENCY = 0.95                    # [-]
STEP = 0.025                             # command step [-]
SAMPLES_PER_STEP = 4                     # rows logged per step [-]
SAMPLE_PERIOD_S = 0.25                   # [s]
THRUST_NOISE_N = (0.02, 0.004)           # (absolute [N], relative [-]) sigma
CURRENT_NOISE_A = (0.03, 0.005)          # (absolute [A], relative [-]) sigma
VOLTAGE_NOISE_V = 0.005                  # [V] sigma
THRUST_SCALE = {"N": 1.0, "g": 1000.0 / STANDARD_GRAVITY_M_S2, "gf": 1000.0 / STANDARD_GRAVITY_M_S2,
                "kgf": 1.0 / STANDARD_GRAVITY_M_S2, "lbf": 1.0 / (POUND_KG * STANDARD_GRAVITY_M_S2)}


def demo_rotor():
    """Motor and propeller dicts of the demo vehicle."""
    from estimator.demo.scenario import DEMO_VEHICLE

    return DEMO_VEHICLE["motor"], DEMO_VEHICLE["propeller"]


def bench_density_kg_m3():
    """Air density of the invented bench (300 m, 21 C, dry) [kg/m^3] from estimator.core.atmosphere."""
    return site_air(BENCH_ALTITUDE_M, BENCH_TEMPERATURE_C)["density_kg_m3"]


def duty_from_command(command):
    """ESC duty d [-] for command u [-]: 0 in the dead band, else (u - u_dead) / (1 - u_dead)."""
    if command <= DEAD_BAND:
        return 0.0
    return min(1.0, (command - DEAD_BAND) / (1.0 - DEAD_BAND))


def true_point(command, supply_V, density_kg_m3, motor=None, propeller=None,
               source_resistance_ohm=SOURCE_RESISTANCE_OHM):
    """Noise-free stand reading at command u [-], supply voltage [V] and rho [kg/m^3].

    Returns dict: thrust_N [N], bus_V [V] (after sag), bus_current_A [A], power_W [W].
    Sag: V_bus = V_supply - I_bus R, fixed point, at most 60 iterations.
    """
    if motor is None:
        motor, propeller = demo_rotor()
    d = max(0.0, min(1.0, duty_from_command(command)))
    v = supply_V
    op = None
    for _ in range(60):
        op = rotor_operating_point(d, v, density_kg_m3, motor, propeller, ESC_EFFICIENCY)
        v_new = supply_V - op["bus_current_A"] * source_resistance_ohm
        if abs(v_new - v) < 1e-10:
            v = v_new
            break
        v = v_new
    op = rotor_operating_point(d, v, density_kg_m3, motor, propeller, ESC_EFFICIENCY)
    return {"thrust_N": op["thrust_N"], "bus_V": v, "bus_current_A": op["bus_current_A"],
            "power_W": v * op["bus_current_A"]}


def sweep_commands():
    """Commands of one up/down leg pair with the sweep direction (+1 up, -1 down)."""
    n = int(round(1.0 / STEP))
    up = [(i * STEP, 1) for i in range(n + 1)]
    down = [((n - i) * STEP, -1) for i in range(1, n + 1)]
    return up + down


def simulate_sweep(seed=1, thrust_unit="g", command_unit="us", supply_voltages_V=SUPPLY_VOLTAGES_V,
                   noise=True, outliers=True, hysteresis=HYSTERESIS, samples_per_step=SAMPLES_PER_STEP,
                   diameter_comment=True, air_comment=True):
    """Simulated bench CSV text for the invented demo scenario.

    seed: random seed [-]; thrust_unit: one of N, g, gf, kgf, lbf; command_unit: -, % or us;
    supply_voltages_V: supply voltages of the sweeps [V]; noise/outliers: add sensor noise
    and the spoiled rows; hysteresis: command lag/lead of the legs [-].
    Returns the CSV text (header comments state that the data is invented).
    """
    rng = random.Random(seed)
    rho = bench_density_kg_m3()
    motor, propeller = demo_rotor()
    lines = ["# liftcal demo bench sweep: INVENTED scenario, simulated with the DC motor model,",
             "# not a measurement of any real motor or propeller",
             "# set: 880 Kv motor, 10 in propeller, bench supply at %s V"
             % "/".join("%.1f" % v for v in supply_voltages_V)]
    if air_comment:
        lines += ["# altitude: %gm" % BENCH_ALTITUDE_M, "# temperature: %gC" % BENCH_TEMPERATURE_C]
    if diameter_comment:
        lines.append("# diameter: %gin" % round(propeller["diameter_m"] / INCH_M, 3))
    lines.append("time[s],command[%s],voltage[V],current[A],thrust[%s]" % (command_unit, thrust_unit))
    rows = []
    time_s = 0.0
    for supply in supply_voltages_V:
        for command, direction in sweep_commands():
            effective = min(1.0, max(0.0, command - direction * hysteresis))
            pt = true_point(effective, supply, rho, motor, propeller)
            for _ in range(samples_per_step):
                t, i, v = pt["thrust_N"], pt["bus_current_A"], pt["bus_V"]
                if noise:
                    t += rng.gauss(0.0, THRUST_NOISE_N[0] + THRUST_NOISE_N[1] * t)
                    i += rng.gauss(0.0, CURRENT_NOISE_A[0] + CURRENT_NOISE_A[1] * i)
                    v += rng.gauss(0.0, VOLTAGE_NOISE_V)
                rows.append([time_s, command, v, i, t])
                time_s += SAMPLE_PERIOD_S
    if outliers:
        n = len(rows)
        for k in range(4):                       # load-cell knocks
            rows[rng.randrange(n // 4, n)][4] += rng.choice((-1.0, 1.0)) * rng.uniform(2.0, 4.0)
        rows[rng.randrange(n)][4] = float("nan")  # a dropped sample (an empty cell)
        rows[rng.randrange(n)][3] = -5.0          # a current-sensor glitch
    for row in rows:
        lines.append(_format_row(row, thrust_unit, command_unit))
    return "\n".join(lines) + "\n"


def _format_row(row, thrust_unit, command_unit):
    time_s, command, v, i, t = row
    if command_unit == "us":
        cmd = "%.1f" % (1000.0 + 1000.0 * command)
    elif command_unit == "%":
        cmd = "%.2f" % (100.0 * command)
    else:
        cmd = "%.4f" % command
    thrust = t * THRUST_SCALE[thrust_unit]
    tx = "" if math.isnan(thrust) else "%.7g" % thrust
    return "%.2f,%s,%.4f,%.4f,%s" % (time_s, cmd, v, i, tx)
