"""Closed-loop flight simulator for the watch's tests, benchmark and demo. INVENTED flights.

Not a record of any real flight, and not built from the watch: its physics are the float
models of estimator/demo/flight_physics.py (rotor speed lag, motor circuit, pack with sag and
polarisation, momentum-theory inflow effects, Dryden vertical gusts), flown by an
altitude-hold controller at its own loop rate (50 Hz) that makes the collective:

    v_ref = clip(Kz (z_ref - z_est)),  a_ref = Kv (v_ref - v_est) + integral,
    u = dead band + (1 - dead band) d_hover sqrt(1 + a_ref / g) + jitter, slewing <= 2 /s

(z_est carries a slow baro error, v_est white noise; the integral learns the real hover
collective). The mission: 2 s on the ground, climb to 8-15 m, hold with altitude moves of
1-5 m every 15-40 s, descend, land, 3 s on the ground. Physics run at 200 Hz for a batch of
flights at once (numpy arrays over flights).

Sensors: the current and voltage readings pass through a first-order lag (the sensor's
filter), then get white noise and are quantised to 12-bit ADC steps over the sensor's range;
logged at 5-100 Hz or at irregular intervals (10-150 ms), the collective as the controller
last set it. Faults act on what the watch must judge: the propulsion's electrical power at
the same command and voltage rises or falls by a share (a step or a linear ramp; a failing
bearing or winding, a damaged propeller) while thrust is unchanged; payloads change the
flown mass against the planned one.
"""

import math

import numpy as np

from estimator.demo import sim_vehicles
from estimator.demo.flight_physics import G, Dryden, Pack, cell_ocv, hover_duty

PHYSICS_DT = 0.005     # physics step [s]
CONTROL_DT = 0.02      # altitude-hold loop period [s]
FAULTS = (None, "power_high", "power_low", "heavy", "sensor")
FAULT_SHARE = 0.15     # size of the demo's power and mass faults [-]
SAMPLE_S = 0.1         # the demo's logging period [s]


def _mission(rng, n_ctrl, duration_s):
    """Altitude reference [m] at the controller's rate and the armed mask (one flight)."""
    t = np.arange(n_ctrl) * CONTROL_DT
    z = np.zeros(n_ctrl)
    armed = (t >= 2.0) & (t < duration_s - 3.0)
    hold = rng.uniform(8.0, 15.0)
    climb = rng.uniform(0.8, 1.5)
    t_up = 2.0 + hold / climb
    land_at = duration_s - 3.0 - (hold + 3.0) / 0.7 - 2.0
    z = np.clip((t - 2.0) * climb, 0.0, hold)
    level = hold
    tk = t_up + rng.uniform(5.0, 15.0)
    while tk < land_at - 10.0:
        target = float(np.clip(level + rng.choice([-1.0, 1.0]) * rng.uniform(1.0, 5.0), 4.0, 25.0))
        speed = rng.uniform(0.5, 2.0)
        dur = max(abs(target - level) / speed, 0.1)
        sel = t >= tk
        z[sel] = level + (target - level) * np.clip((t[sel] - tk) / dur, 0.0, 1.0)
        level = target
        tk += dur + rng.uniform(15.0, 40.0)
    sel = t >= land_at
    z[sel] = np.maximum(level - (t[sel] - land_at) * 0.7, -1.0)
    return z, armed


def simulate(name, n, seed, duration_s=600.0, jitter=0.0, sensor_lag_s=0.0, fault_size=None,
             fault_at_s=None, fault_ramp_s=None, payload=None, vehicle=None):
    """Fly ``n`` flights of vehicle ``name`` (sim_vehicles) at once; returns a dict of arrays.

    jitter: collective noise per controller step [-] (std); sensor_lag_s: current/voltage
    sensor time constant [s]; fault_size [-], fault_at_s [s], fault_ramp_s [s] (0: a step):
    arrays (n,) of the power fault share, its onset and its ramp time; payload [-]: array (n,)
    of flown mass / planned mass - 1. vehicle: a vehicle-file dict to fly instead (with the
    demo's extras). Returns t_s (steps,), and (n, steps) arrays command, bus_V and current_A
    (sensor readings after the lag, before noise), z_m, z_ref_m, plus mass_kg (n,) and the
    sensor's range ``sensor_range_A`` and full voltage ``full_V``.
    """
    rng = np.random.default_rng(seed)
    s = sim_vehicles.spec(name) if vehicle is None else dict(sim_vehicles.spec(sim_vehicles.DEMO), vehicle=vehicle)
    v = s["vehicle"]
    rotor = sim_vehicles.rotor_of(name) if vehicle is None else sim_vehicles.Rotor(
        v["motor"], v["propeller"], s["tau_s"], s["dead_band"], v.get("esc", {}).get("efficiency", 0.95))
    site = v.get("site", {})
    rho = sim_vehicles.air_density(site.get("altitude_m", 0.0), site.get("temperature_C"))
    b = v["battery"]
    pack = Pack(b["cells"], b["capacity_Ah"], b["resistance_ohm"])
    count = v["rotors"]["count"]
    zeros = np.zeros(n)
    fault_size = zeros if fault_size is None else np.asarray(fault_size, float)
    fault_at = np.full(n, 1e9) if fault_at_s is None else np.asarray(fault_at_s, float)
    ramp = zeros if fault_ramp_s is None else np.asarray(fault_ramp_s, float)
    mass = v["mass_kg"] * (1.0 + (zeros if payload is None else np.asarray(payload, float)))
    steps = int(round(duration_s / PHYSICS_DT))
    per_ctrl = int(round(CONTROL_DT / PHYSICS_DT))
    n_ctrl = steps // per_ctrl + 1
    zref = np.zeros((n, n_ctrl))
    armed = np.zeros((n, n_ctrl), bool)
    for k in range(n):
        zref[k], armed[k] = _mission(rng, n_ctrl, duration_s)
    soc = rng.uniform(0.9, 1.0, n)
    full_v = b["cells"] * b["full_cell_V"]
    d_hover = np.array([hover_duty(rotor, m, count, pack.cells * float(cell_ocv(0.95)) - 0.5, rho) for m in mass])
    d_guess = d_hover * rng.uniform(0.93, 1.07, n)            # the controller's hover guess
    wind = s["wind_m_s"] * rng.uniform(0.5, 1.5, n)
    gust = Dryden(rng, 0.1 * wind, 10.0, float(np.mean(wind)), PHYSICS_DT)
    # state
    z = zeros.copy()
    vz = zeros.copy()
    omega = zeros.copy()
    v1 = zeros.copy()
    amp = zeros.copy()
    integ = zeros.copy()
    baro = zeros.copy()
    u = zeros.copy()
    i_sens = zeros.copy()
    v_sens = pack.bus_voltage(soc, 0.0, 0.0)
    k_rot = 1.0 - math.exp(-PHYSICS_DT / rotor.tau)
    i_limit = float(v["motor"].get("max_current_A", 1e9))
    k_sens = 1.0 - math.exp(-PHYSICS_DT / sensor_lag_s) if sensor_lag_s > 0 else 1.0
    k_vsens = 1.0 - math.exp(-PHYSICS_DT / min(sensor_lag_s, 0.02)) if sensor_lag_s > 0 else 1.0
    k_baro = math.exp(-CONTROL_DT / 1.0)
    out_u = np.zeros((n, steps), np.float32)
    out_v = np.zeros((n, steps), np.float32)
    out_i = np.zeros((n, steps), np.float32)
    out_z = np.zeros((n, steps), np.float32)
    t_s = np.arange(steps) * PHYSICS_DT
    area = rotor.area
    for j in range(steps):
        t = j * PHYSICS_DT
        if j % per_ctrl == 0:
            c = j // per_ctrl
            baro = k_baro * baro + math.sqrt(1.0 - k_baro ** 2) * 0.05 * rng.standard_normal(n)
            z_est = z + baro
            v_est = vz + 0.02 * rng.standard_normal(n)
            v_ref = np.clip(1.0 * (zref[:, c] - z_est), -1.5, 2.0)
            e = v_ref - v_est
            arm = armed[:, c]
            integ = np.where(arm, np.clip(integ + 0.8 * e * CONTROL_DT, -0.5 * G, 0.5 * G), 0.0)
            a_ref = 2.5 * e + integ
            cmd = rotor.dead_band + (1.0 - rotor.dead_band) * d_guess * np.sqrt(np.maximum(1.0 + a_ref / G, 0.05))
            if jitter > 0.0:
                cmd = cmd + jitter * rng.standard_normal(n)
            # the collective slews at most 2 /s (arming ramps up instead of stepping)
            u = np.where(arm, np.clip(np.clip(cmd, u - 2.0 * CONTROL_DT, u + 2.0 * CONTROL_DT), 0.0, 1.0), 0.0)
        w_g = gust.step()
        bus = pack.bus_voltage(soc, amp, v1)
        duty = rotor.duty(u)
        inflow = vz - w_g
        thrust_s = rotor.thrust(omega, rho)
        extra_q = np.where(omega > 10.0, thrust_s * inflow / (2.0 * np.maximum(omega, 10.0)), 0.0)
        omega = omega + (rotor.omega_steady(duty, bus, rho, extra_q) - omega) * k_rot
        thrust_s = rotor.thrust(omega, rho)
        v_h = np.sqrt(thrust_s / (2.0 * rho * area))
        thrust = np.maximum(thrust_s - rho * area * v_h * inflow, 0.0)
        share = np.where(t >= fault_at, np.where(ramp > 0, np.clip((t - fault_at) / np.maximum(ramp, 1e-9), 0, 1), 1.0), 0.0)
        # the ESC limits the motor current to the motor's rating (spin-up and punches)
        i_m = np.minimum(rotor.motor_current(duty, bus, omega), i_limit)
        prop_a = count * duty * i_m / rotor.eff * (1.0 + fault_size * share)
        amp = prop_a + s["avionics_A"]
        soc = soc - amp * PHYSICS_DT / pack.capacity_As
        v1 = v1 + (amp * pack.r1 - v1) * PHYSICS_DT / pack.tau1
        acc = count * thrust / mass - G
        vz = vz + acc * PHYSICS_DT
        z = z + vz * PHYSICS_DT
        ground = z <= 0.0
        z = np.where(ground, 0.0, z)
        vz = np.where(ground, np.maximum(vz, 0.0), vz)
        i_sens = i_sens + (amp - i_sens) * k_sens
        v_sens = v_sens + (bus - v_sens) * k_vsens
        out_u[:, j] = u
        out_v[:, j] = v_sens
        out_i[:, j] = i_sens
        out_z[:, j] = z
    zr = np.repeat(zref, per_ctrl, axis=1)[:, :steps]
    return {"t_s": t_s, "command": out_u, "bus_V": out_v, "current_A": out_i, "z_m": out_z, "z_ref_m": zr,
            "mass_kg": mass, "sensor_range_A": s["sensor_range_A"], "full_V": full_v, "name": name}


def log_times(rng, duration_s, rate_hz):
    """Logging instants [s]: every 1/rate_hz, or at irregular intervals of 10-150 ms (rate_hz None)."""
    if rate_hz is None:
        gaps = rng.uniform(0.010, 0.150, int(duration_s / 0.010) + 10)
        t = np.cumsum(gaps)
        return t[t < duration_s - PHYSICS_DT]
    return np.arange(0.0, duration_s - PHYSICS_DT, 1.0 / rate_hz)


def logged(sim, k, rng, rate_hz=10.0):
    """Flight ``k`` of a simulate() batch as a logger records it: dict time_s, command,
    voltage_V, current_A (numpy arrays) at rate_hz [Hz] (None: irregular), with white noise
    and 12-bit ADC quantisation of current (over the sensor's range) and voltage (over 1.25 x
    the full pack); time logged to the millisecond."""
    t_all = sim["t_s"]
    t = np.round(log_times(rng, t_all[-1] + PHYSICS_DT, rate_hz), 3)
    idx = np.minimum((t / PHYSICS_DT + 1e-6).astype(int), len(t_all) - 1)
    q_i = sim["sensor_range_A"] / 4096.0
    q_v = 1.25 * sim["full_V"] / 4096.0
    cur = sim["current_A"][k, idx].astype(float)
    cur = cur + (1.5 * q_i + 0.005 * np.abs(cur)) * rng.standard_normal(len(idx))
    vol = sim["bus_V"][k, idx].astype(float) + 2.0 * q_v * rng.standard_normal(len(idx))
    return {"time_s": t, "command": np.round(sim["command"][k, idx].astype(float), 4),
            "voltage_V": np.round(vol / q_v) * q_v, "current_A": np.round(cur / q_i) * q_i}


def flight_arrays(vehicle=None, fault=None, seed=1, duration_s=300.0, fault_at_s=120.0, sample_s=SAMPLE_S,
                  name=sim_vehicles.DEMO, jitter=0.0, sensor_lag_s=0.03):
    """One simulated flight as a logger records it (the demo's and the tests' entry).

    vehicle: a vehicle-file dict to fly (default: the simulator's vehicle ``name``, the demo
    quad); fault: one of FAULTS ("power_high" / "power_low": a +-15 % power step at
    fault_at_s [s]; "heavy": 15 % over the planned mass from take-off; "sensor": the current
    reading sticks for 5 s at fault_at_s, then a zero-volt and an absurd-current reading);
    seed; duration_s [s]; sample_s: logging period [s]. Keys time_s, command, voltage_V,
    current_A, mass_kg (flown), fault, fault_at_s (None for none, 0 for heavy).
    """
    from estimator.errors import InputError
    if fault not in FAULTS:
        raise InputError("flight simulator: unknown fault %r (use one of %s)"
                         % (fault, ", ".join(str(f) for f in FAULTS[1:])))
    size = {"power_high": FAULT_SHARE, "power_low": -FAULT_SHARE}.get(fault, 0.0)
    sim = simulate(name, 1, seed, duration_s, jitter=jitter, sensor_lag_s=sensor_lag_s, fault_size=[size],
                   fault_at_s=[fault_at_s], payload=[FAULT_SHARE if fault == "heavy" else 0.0], vehicle=vehicle)
    out = logged(sim, 0, np.random.default_rng(seed + 7919), 1.0 / sample_s)
    if fault == "sensor":
        i = int(np.searchsorted(out["time_s"], fault_at_s))
        stuck = int(round(5.0 / sample_s))
        out["current_A"][i:i + stuck] = out["current_A"][i]
        out["voltage_V"][i + stuck + 10] = 0.0
        out["current_A"][i + stuck + 20] = 2000.0
    out.update(mass_kg=float(sim["mass_kg"][0]), fault=fault,
               fault_at_s=fault_at_s if fault in ("power_high", "power_low", "sensor") else (0.0 if fault else None))
    return out


def to_csv(flight):
    """Flight CSV text (header comments say the data is invented)."""
    lines = ["# liftcal simulated flight: INVENTED scenario (closed-loop simulator, not a real flight)",
             "# fault: %s" % (flight["fault"] or "none"),
             "time[s],command[-],voltage[V],current[A]"]
    for t, u, v, a in zip(flight["time_s"], flight["command"], flight["voltage_V"], flight["current_A"]):
        lines.append("%.3f,%.4f,%.3f,%.3f" % (t, u, v, a))
    return "\n".join(lines) + "\n"


def simulate_flight(vehicle=None, fault=None, seed=1, duration_s=300.0, fault_at_s=120.0):
    """Flight CSV text of one simulated flight (see flight_arrays for the arguments)."""
    return to_csv(flight_arrays(vehicle, fault=fault, seed=seed, duration_s=duration_s, fault_at_s=fault_at_s))
