"""Flight simulator for the INVENTED demo scenario: logged flights with and without faults.

Not a record of any real flight. Physics is the project's own: the DC motor model of
estimator.core.propulsion (shared pack sag over all rotors, estimator.core.motor inside) with
the bench simulator's ESC mapping (estimator.benchsim.duty_from_command) - no second motor
model here. To make long runs cheap, the model is evaluated once on a grid of duty x pack
open-circuit voltage and interpolated (bilinear) per sample.

Profile: idle on the ground, spin-up to hover, hover holds with altitude-hold jitter,
short manoeuvres (a push of the collective, a cruise near hover, a pull), landing, idle.
The pack drains by coulomb counting (open-circuit voltage from estimator.core.battery).

Faults (``fault``): "power_high" / "power_low" scale the drawn current by 1 +- 0.15 from
``fault_at_s`` (a failing bearing or winding, a chipped blade); "heavy" flies 15 % over the
planned mass from takeoff (power normal for the command); "sensor" spoils readings from
``fault_at_s`` (current stuck for 5 s, then a zero-volt reading and an absurd current).
Output: flight CSV text with ``time[s]``, ``command[-]``, ``voltage[V]``, ``current[A]``.
"""

import math

import numpy as np

from estimator.demo.bench_sim import DEAD_BAND, duty_from_command
from estimator.core.atmosphere import site_air
from estimator.core.battery import cell_open_circuit_V
from estimator.core.constants import STANDARD_GRAVITY_M_S2
from estimator.core.propulsion import shared_operating_point, shared_point_for_thrust
from estimator.errors import InputError

FAULTS = (None, "power_high", "power_low", "heavy", "sensor")
FAULT_SHARE = 0.15          # size of the power and mass faults [-]
SAMPLE_S = 0.1              # logging period [s]
JITTER = 0.004              # altitude-hold command jitter, AR(1) std [-]
JITTER_RHO = 0.9            # AR(1) coefficient per sample [-]
CURRENT_NOISE = (0.05, 0.02)  # current sensor noise sigma (absolute [A], relative [-])
VOLTAGE_NOISE_V = 0.01      # voltage sensor noise sigma [V]
_GRID_DUTY = 81
CHUNK_S = 5.0               # pack state updated every CHUNK_S [s] (drain is slow)
_GRID_VOLT = 9
_cache = {}


def _vehicle(vehicle):
    if vehicle is None:
        from estimator.demo.scenario import DEMO_VEHICLE
        from estimator.vehicle import check_vehicle
        return check_vehicle(DEMO_VEHICLE, "demo")
    return vehicle


def site_density(vehicle):
    """Air density at the vehicle's site [kg/m^3] (estimator.core.atmosphere.site_air)."""
    s = vehicle.get("site", {})
    return site_air(s.get("altitude_m", 0.0), s.get("temperature_C"), s.get("pressure_Pa"),
                    s.get("humidity_pct", 0.0))["density_kg_m3"]


def operating_table(vehicle):
    """Grid of the shared operating point: duty x open-circuit voltage -> bus V, pack A, thrust.

    Returns dict duty [-] (1-D), voc_V [V] (1-D), bus_V, pack_A [A], thrust_N (total) (2-D).
    """
    key = id(vehicle)
    if key in _cache and _cache[key][0] is vehicle:
        return _cache[key][1]
    b = vehicle["battery"]
    rho = site_density(vehicle)
    n = vehicle["rotors"]["count"]
    eff = vehicle.get("esc", {}).get("efficiency", 1.0)
    duty = np.linspace(0.0, 1.0, _GRID_DUTY)
    voc = np.linspace(b["cells"] * b["empty_cell_V"] * 0.97, b["cells"] * b["full_cell_V"] * 1.01, _GRID_VOLT)
    bus = np.zeros((_GRID_DUTY, _GRID_VOLT))
    amp = np.zeros_like(bus)
    thr = np.zeros_like(bus)
    for i, d in enumerate(duty):
        for j, v in enumerate(voc):
            op = shared_operating_point(float(d), float(v), b["resistance_ohm"], n, rho,
                                        vehicle["motor"], vehicle["propeller"], eff)
            bus[i, j], amp[i, j], thr[i, j] = op["bus_V"], op["pack_current_A"], op["total_thrust_N"]
    table = {"duty": duty, "voc_V": voc, "bus_V": bus, "pack_A": amp, "thrust_N": thr, "density_kg_m3": rho}
    _cache[key] = (vehicle, table)
    return table


def _bilinear(table, name, duty, voc):
    d, v = table["duty"], table["voc_V"]
    fi = np.clip((duty - d[0]) / (d[1] - d[0]), 0, len(d) - 1 - 1e-9)
    fj = np.clip((voc - v[0]) / (v[1] - v[0]), 0, len(v) - 1 - 1e-9)
    i, j = fi.astype(int), fj.astype(int)
    a, b = fi - i, fj - j
    z = table[name]
    return ((1 - a) * (1 - b) * z[i, j] + a * (1 - b) * z[i + 1, j]
            + (1 - a) * b * z[i, j + 1] + a * b * z[i + 1, j + 1])


def hover_command(vehicle, mass_kg, voc_V):
    """Command [-] at which the rotors hold mass_kg at pack open-circuit voltage voc_V [V]."""
    b = vehicle["battery"]
    n = vehicle["rotors"]["count"]
    op = shared_point_for_thrust(mass_kg * STANDARD_GRAVITY_M_S2 / n, voc_V, b["resistance_ohm"], n,
                                 site_density(vehicle), vehicle["motor"], vehicle["propeller"],
                                 vehicle.get("esc", {}).get("efficiency", 1.0))
    if op["duty"] is None or op["duty"] > 1.0:
        raise InputError("flight simulator: the vehicle cannot hover %.2f kg" % mass_kg)
    return DEAD_BAND + op["duty"] * (1.0 - DEAD_BAND)


def _profile(rng, duration_s, dt):
    """Collective offset from hover [-] and a phase code per sample (0 ground, 1 air, 2 ramp)."""
    n = int(round(duration_s / dt))
    offset = np.zeros(n)
    phase = np.zeros(n, dtype=int)
    t0, t1 = int(3.0 / dt), n - int(6.0 / dt)
    phase[t0:t1] = 1
    i = t0 + int(3.0 / dt)
    while i < t1 - int(12.0 / dt):
        i += int(rng.uniform(8.0, 20.0) / dt)              # a hover hold
        if i >= t1 - int(12.0 / dt):
            break
        delta = rng.uniform(0.05, 0.12) * (1 if rng.random() < 0.5 else -1)
        push, cruise = int(1.0 / dt), int(rng.uniform(2.0, 5.0) / dt)
        offset[i:i + push] = delta                         # accelerate
        offset[i + push:i + push + cruise] = 0.01 * np.sign(delta)  # cruise near hover
        offset[i + push + cruise:i + 2 * push + cruise] = -delta    # decelerate
        i += 2 * push + cruise
    return offset, phase, t0, t1


def flight_arrays(vehicle=None, fault=None, seed=1, duration_s=300.0, fault_at_s=120.0, sample_s=SAMPLE_S,
                  current_noise=CURRENT_NOISE, jitter=JITTER):
    """Simulate one flight; returns dict of numpy arrays and the truth.

    vehicle: checked vehicle dict (default: the invented demo vehicle); fault: one of FAULTS;
    seed: random seed; duration_s [s]; fault_at_s: fault onset [s]; sample_s: period [s];
    current_noise: (absolute [A], relative [-]) sigma; jitter: command jitter std [-].
    Keys: time_s, command, voltage_V, current_A (what a logger records), thrust_N (true
    total thrust), hover (bool: hover hold, calm), mass_kg (flown mass), fault, fault_at_s.
    """
    if fault not in FAULTS:
        raise InputError("flight simulator: unknown fault %r (use one of %s)"
                         % (fault, ", ".join(str(f) for f in FAULTS[1:])))
    vehicle = _vehicle(vehicle)
    rng = np.random.default_rng(seed)
    table = operating_table(vehicle)
    b = vehicle["battery"]
    mass = vehicle["mass_kg"] * (1.0 + FAULT_SHARE if fault == "heavy" else 1.0)
    offset, phase, t0, t1 = _profile(rng, duration_s, sample_s)
    n = offset.size
    t = np.arange(n) * sample_s
    u_cal = np.linspace(b["empty_cell_V"], b["full_cell_V"], 7) * b["cells"]
    u_hov = np.array([hover_command(vehicle, mass, v) for v in u_cal])
    usable_Ah = b["capacity_Ah"] * b.get("usable_fraction", 0.8)
    noise = rng.standard_normal(n)
    jit = np.zeros(n)
    for i in range(1, n):
        jit[i] = JITTER_RHO * jit[i - 1] + math.sqrt(1 - JITTER_RHO ** 2) * jitter * noise[i]
    command = np.zeros(n)
    volt = np.zeros(n)
    amp = np.zeros(n)
    thrust = np.zeros(n)
    used_Ah = 0.0
    ramp = int(2.0 / sample_s)
    idx = np.arange(n)
    scale = np.clip(np.minimum((idx - t0 + 1) / ramp, (t1 - idx) / ramp), 0.0, 1.0) * (phase > 0)
    duty_of = np.vectorize(duty_from_command, otypes=[float])
    chunk = max(1, int(round(CHUNK_S / sample_s)))
    for c0 in range(0, n, chunk):
        sl = slice(c0, min(n, c0 + chunk))
        soc = 1.0 - used_Ah / b["capacity_Ah"]
        voc = b["cells"] * cell_open_circuit_V(soc, b["full_cell_V"], b["nominal_cell_V"], b["empty_cell_V"])
        uh = float(np.interp(voc, u_cal, u_hov))
        u = (uh * scale[sl] + offset[sl] + jit[sl] * (scale[sl] >= 1.0)) * (phase[sl] > 0)
        u = np.clip(u, 0.0, 1.0)
        d = duty_of(u)
        vv = np.full(d.size, voc)
        command[sl] = u
        volt[sl] = _bilinear(table, "bus_V", d, vv)
        amp[sl] = _bilinear(table, "pack_A", d, vv)
        thrust[sl] = _bilinear(table, "thrust_N", d, vv)
        used_Ah = min(usable_Ah, used_Ah + float(amp[sl].sum()) * sample_s / 3600.0)
    onset = int(round(fault_at_s / sample_s))
    if fault in ("power_high", "power_low"):
        amp[onset:] *= 1.0 + (FAULT_SHARE if fault == "power_high" else -FAULT_SHARE)
    meas_a = amp + current_noise[0] * rng.standard_normal(n) + current_noise[1] * amp * rng.standard_normal(n)
    meas_v = volt + VOLTAGE_NOISE_V * rng.standard_normal(n)
    ground = command <= DEAD_BAND
    meas_a[ground] = 0.12 + 0.01 * rng.standard_normal(int(ground.sum()))  # avionics idle draw [A]
    if fault == "sensor":
        stuck = int(5.0 / sample_s)
        meas_a[onset:onset + stuck] = round(meas_a[onset], 3)
        meas_v[onset + stuck + 10] = 0.0
        meas_a[onset + stuck + 20] = 2000.0
    hover = (phase == 1) & (offset == 0.0) & (scale >= 1.0)
    return {"time_s": t, "command": command, "voltage_V": meas_v, "current_A": meas_a,
            "thrust_N": thrust, "hover": hover, "mass_kg": mass, "fault": fault,
            "fault_at_s": fault_at_s if fault in ("power_high", "power_low", "sensor") else (0.0 if fault else None)}


def to_csv(flight):
    """Flight CSV text (header comments say the data is invented)."""
    lines = ["# liftcal demo flight: INVENTED scenario, simulated with the DC motor model",
             "# fault: %s" % (flight["fault"] or "none"),
             "time[s],command[-],voltage[V],current[A]"]
    for t, u, v, a in zip(flight["time_s"], flight["command"], flight["voltage_V"], flight["current_A"]):
        lines.append("%.2f,%.4f,%.3f,%.3f" % (t, u, v, a))
    return "\n".join(lines) + "\n"


def simulate_flight(vehicle=None, fault=None, seed=1, duration_s=300.0, fault_at_s=120.0):
    """Flight CSV text of one simulated flight (see flight_arrays for the arguments)."""
    return to_csv(flight_arrays(vehicle, fault=fault, seed=seed, duration_s=duration_s, fault_at_s=fault_at_s))
