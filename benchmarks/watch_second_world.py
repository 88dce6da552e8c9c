"""The watch on a second world, written apart from the kernel and from estimator/demo (not a timed test).

Everything here is simulated by this file alone (it imports nothing from estimator/): a truth
propulsion set (DC motor equivalent model: back-EMF omega / Kv, I = I0 + Q Kv, Vm = E + I Rm; an
ESC with a dead zone and Vm = d V_bus, I_bus = d I / eta; constant CT, CP with T = CT rho n^2 D^4,
Q = CP rho n^2 D^5 / (2 pi)) on a pack (open-circuit voltage against state of charge, internal
resistance), a bench sweep of it at three supply voltages written as a test stand would (us, V,
A, g), and closed-loop vertical flights of a vehicle carrying it: an altitude controller (PI on
climb rate from a P on height) at its own loop rate, a vertical gust as an Ornstein-Uhlenbeck
process, inflow loss of thrust in climb (momentum theory: T = T_static (1 - v_rel / (2 v_h)),
a first-order approximation), a first-order rotor lag, a current sensor with its own lag,
noise and quantisation, and logging at 5..100 Hz or at irregular intervals.
The project's own commands do the rest (liftcal fit --vehicle, liftcal replay --json): the
parameter set is fitted from this world's bench sweep, as a builder would.

Printed per vehicle and logging rate: false events per fault-free flight hour, delay of +10 %
and -10 % power steps, of a 0 -> 15 % ramp over 5 min (the share reached at the alarm), and of
mass_high for a +15 % payload.

Usage: python benchmarks/watch_second_world.py [FLIGHTS_PER_RATE] [--seed N]
"""

import csv
import json
import math
import os
import random
import subprocess
import sys
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))
LIFTCAL = [sys.executable, "-m", "estimator"]
G = 9.80665                      # standard gravity [m/s^2] (CGPM 1901)
RPM_TO_RAD = math.pi / 30.0


def isa_density(alt_m, temp_C):
    """Dry-air density [kg/m^3]: ISA pressure at geometric altitude alt_m (troposphere), ideal gas."""
    h = 6356766.0 * alt_m / (6356766.0 + alt_m)
    p = 101325.0 * (1.0 - 2.25577e-5 * h) ** 5.25588
    return p / (287.05 * (temp_C + 273.15))


class Truth:
    """One propulsion set and vehicle (all SI)."""

    def __init__(self, rng, kind):
        if kind == "whoop":          # 35 mm 1S
            self.D, self.kv, self.Rm, self.I0 = 0.035, 25000 * RPM_TO_RAD, 1.0, 0.25
            self.ct, self.cp, self.cells, self.cap_Ah, self.Rp = 0.09, 0.05, 1, 0.3, 0.08
            self.mass, self.rotors = 0.020, 4
        elif kind == "racer":        # 5 in 6S
            self.D, self.kv, self.Rm, self.I0 = 0.127, 1900 * RPM_TO_RAD, 0.065, 1.2
            self.ct, self.cp, self.cells, self.cap_Ah, self.Rp = 0.12, 0.06, 6, 1.3, 0.05
            self.mass, self.rotors = 0.68, 4
        elif kind == "hexa":         # 13 in 6S
            self.D, self.kv, self.Rm, self.I0 = 0.33, 380 * RPM_TO_RAD, 0.12, 0.5
            self.ct, self.cp, self.cells, self.cap_Ah, self.Rp = 0.10, 0.040, 6, 10.0, 0.012
            self.mass, self.rotors = 4.6, 6
        else:                        # 18 in 12S quad
            self.D, self.kv, self.Rm, self.I0 = 0.457, 150 * RPM_TO_RAD, 0.11, 0.6
            self.ct, self.cp, self.cells, self.cap_Ah, self.Rp = 0.105, 0.042, 12, 16.0, 0.02
            self.mass, self.rotors = 9.0, 4
        j = lambda x, s: x * (1.0 + rng.uniform(-s, s))  # noqa: E731
        self.ct, self.cp, self.Rm, self.I0 = j(self.ct, 0.1), j(self.cp, 0.1), j(self.Rm, 0.2), j(self.I0, 0.2)
        self.dead = rng.uniform(0.03, 0.08)              # ESC dead zone (share of command)
        self.eta = rng.uniform(0.92, 0.97)               # ESC efficiency
        self.kind = kind
        self.rho_bench = isa_density(rng.uniform(0, 500), rng.uniform(15, 28))
        self.alt, self.temp = rng.uniform(0, 2500), rng.uniform(-5, 35)
        self.rho = isa_density(self.alt, self.temp)

    def duty(self, u):
        return 0.0 if u <= self.dead else min(1.0, (u - self.dead) / (1.0 - self.dead))

    def omega_steady(self, d, v_bus, rho):
        """Steady rotor speed [rad/s] at duty d on bus voltage v_bus (quadratic of the DC model)."""
        vm = d * v_bus
        cq = self.cp * rho * self.D ** 5 / (8 * math.pi ** 3)
        a, b, c = self.Rm * self.kv * cq, 1.0 / self.kv, self.Rm * self.I0 - vm
        if c >= 0:
            return 0.0
        return (-b + math.sqrt(b * b - 4 * a * c)) / (2 * a)

    def thrust(self, omega, rho):
        return self.ct * rho * self.D ** 4 * omega ** 2 / (4 * math.pi ** 2)

    def bus_current(self, omega, d, rho):
        if d <= 0.0 or omega <= 0.0:
            return 0.0
        q = self.cp * rho * self.D ** 5 * omega ** 2 / (8 * math.pi ** 3)
        return d * (self.I0 + q * self.kv) / self.eta

    def hover_bus_power_W(self, thrust_N, rho):
        """Bus power [W] of one rotor holding thrust_N [N] steadily in air rho [kg/m^3]: Vm I / eta."""
        omega = math.sqrt(thrust_N * 4 * math.pi ** 2 / (self.ct * rho * self.D ** 4))
        current_A = self.I0 + self.cp * rho * self.D ** 5 * omega ** 2 / (8 * math.pi ** 3) * self.kv
        return (omega / self.kv + self.Rm * current_A) * current_A / self.eta

    def ocv(self, soc):
        """Open-circuit cell voltage [V] against state of charge (a smooth LiPo-like curve)."""
        return 3.45 + 0.55 * soc + 0.18 * math.tanh((soc - 0.9) * 12) * 0.5 + 0.15 * (1 - math.exp(-soc * 15)) - 0.15


def bench_rows(truth, rng):
    """A stand sweep at three supply voltages: command[us], voltage[V], current[A], thrust[g]."""
    rows = []
    for v_set in (truth.cells * 4.1, truth.cells * 3.85, truth.cells * 3.6):
        for k in range(60):
            u = 0.0 + k / 59.0
            d = truth.duty(u)
            v = v_set
            for _ in range(4):                          # bench supply sag 30 mohm x cells/4
                om = truth.omega_steady(d, v, truth.rho_bench)
                i = truth.bus_current(om, d, truth.rho_bench)
                v = v_set - 0.0075 * truth.cells * i
            t = truth.thrust(om, truth.rho_bench)
            t_g = t / G * 1000 * (1 + rng.gauss(0, 0.005)) + rng.gauss(0, 0.3 + truth.D * 10)
            i_m = i * (1 + rng.gauss(0, 0.01)) + rng.gauss(0, 0.02)
            rows.append((1000 + 1000 * u, v + rng.gauss(0, 0.01), max(i_m, 0.0), t_g))
    return rows


def vehicle_json(truth, payload=1.0):
    return {"name": "second-world %s (invented)" % truth.kind, "mass_kg": truth.mass,
            "rotors": {"count": truth.rotors},
            "propeller": {"diameter_m": truth.D, "ct": truth.ct, "cp": truth.cp},
            "motor": {"kv_rpm_per_V": truth.kv / RPM_TO_RAD, "resistance_ohm": truth.Rm,
                      "no_load_current_A": truth.I0},
            "battery": {"cells": truth.cells, "capacity_Ah": truth.cap_Ah, "resistance_ohm": truth.Rp,
                        "full_cell_V": 4.2, "nominal_cell_V": 3.7, "empty_cell_V": 3.5},
            "site": {"altitude_m": round(truth.alt, 1), "temperature_C": round(truth.temp, 1)}}


def fly(truth, rng, rate_hz, duration_s, fault=None, payload=1.0, lag_s=None, jitter=None):
    """One closed-loop vertical flight; returns log rows (t, u, V, I) and the fault's start time.

    fault: None, ("step", f) (measured bus current times 1 + f from t_f on) or ("ramp", 0.15)
    (1 + 0.15 (t - t_f) / 300 s)."""
    dt = 0.002
    lag_s = rng.choice((0.0, 0.05, 0.15)) if lag_s is None else lag_s       # current-sensor lag [s]
    jitter = rng.choice((0.0, 0.004, 0.01)) if jitter is None else jitter  # collective jitter per loop step
    m = truth.mass * payload
    rho = truth.rho
    A = math.pi * truth.D ** 2 / 4
    tau_rotor = 0.02 + 0.12 * truth.D                  # rotor response [s]
    soc, cap_As = 1.0, truth.cap_Ah * 3600
    z = v = w = 0.0
    z_set, z_goal = 0.0, 2.0
    integ = 0.45                                         # controller's integrator: a hover guess
    u = 0.0
    omega = 0.0
    i_sensed = 0.0
    v_bus = truth.cells * 4.2
    t_f = rng.uniform(90, 240) if fault else None
    t = 0.0
    next_log = 0.0
    next_ctrl = 0.0
    next_goal = rng.uniform(20, 50)
    rows = []
    sigma_w, tau_w = rng.uniform(0.2, 1.2) * (0.5 + truth.D), rng.uniform(1.0, 4.0)
    while t < duration_s:
        if t >= next_goal:                               # altitude changes now and then
            z_goal = 2.0 + rng.uniform(0, 8.0)
            next_goal = t + rng.uniform(20, 60)
        z_set += max(-1.0 * dt, min(1.0 * dt, z_goal - z_set))
        if t >= next_ctrl:                               # 100 Hz altitude loop
            v_set = max(-1.5, min(1.5, 1.2 * (z_set - z)))
            err = v_set - v
            u = integ + 0.18 * err
            if 0.7 * integ < u < 1.0:                    # anti-windup: integrate only when not limited
                integ = max(0.0, min(1.0, integ + 0.25 * err * 0.01))
            u = min(1.0, max(0.7 * integ, u)) + rng.gauss(0, jitter)   # 70 % of its hover estimate at least
            u = max(0.0, min(1.0, u))
            next_ctrl += 0.01
        w += (-w / tau_w) * dt + sigma_w * math.sqrt(2 * dt / tau_w) * rng.gauss(0, 1)
        d = truth.duty(u)
        om_ss = truth.omega_steady(d, v_bus, rho)
        omega += (om_ss - omega) * dt / (tau_rotor + dt)
        t_st = truth.thrust(omega, rho)
        v_h = math.sqrt(max(t_st, 1e-6) / (2 * rho * A))
        v_rel = v - w
        thrust = truth.rotors * t_st * max(0.3, min(1.5, 1 - v_rel / (2 * v_h)))
        i_bus = truth.rotors * truth.bus_current(omega, d, rho)
        v_bus = truth.cells * truth.ocv(soc) - i_bus * truth.Rp
        soc -= i_bus * dt / cap_As
        acc = thrust / m - G - 0.3 * v * abs(v) / m
        if z <= 0.0 and acc < 0:
            acc, v = 0.0, 0.0
        v += acc * dt
        z = max(0.0, z + v * dt)
        k = 1.0
        if fault and t >= t_f:
            k = 1 + (fault[1] if fault[0] == "step" else fault[1] * min(1.0, (t - t_f) / 300.0))
        i_sensed += (i_bus * k - i_sensed) * dt / (lag_s + dt)
        if t >= next_log:
            i_m = round((i_sensed * (1 + rng.gauss(0, 0.003)) + rng.gauss(0, 0.01 * truth.rotors)) / 0.01) * 0.01
            rows.append((round(t, 4), round(u, 4), round(v_bus / 0.01) * 0.01, max(0.0, i_m)))
            next_log += (1.0 / rate_hz) if rate_hz else rng.uniform(0.01, 0.15)
        if v_bus < truth.cells * 3.3:
            break
        t += dt
    return rows, t_f


def run(args):
    p = subprocess.run(LIFTCAL + args, capture_output=True, text=True, cwd=os.path.dirname(HERE))
    return p.returncode, p.stdout, p.stderr


def write_csv(path, header, rows, comments=()):
    with open(path, "w", newline="") as f:
        for c in comments:
            f.write("# %s\n" % c)
        wr = csv.writer(f)
        wr.writerow(header)
        wr.writerows(rows)


def main(n_flights=2, seed=1):
    rng = random.Random(seed)
    tmp = tempfile.mkdtemp(prefix="second-world-")
    print("second world: every flight and bench row simulated by this file (invented vehicles); folder %s" % tmp)
    totals = {"false": 0, "hours": 0.0, "step": [], "ramp": [], "mass": []}
    kinds = [a for a in ("whoop", "racer", "hexa", "heavy") if a in sys.argv] or ("whoop", "racer", "hexa", "heavy")
    for kind in kinds:
        truth = Truth(rng, kind)
        bench = os.path.join(tmp, kind + "-bench.csv")
        write_csv(bench, ["command[us]", "voltage[V]", "current[A]", "thrust[g]"], bench_rows(truth, rng),
                  ["density: %.4f kg/m^3" % truth.rho_bench, "diameter: %.4f m" % truth.D])
        veh = os.path.join(tmp, kind + "-vehicle.json")
        with open(veh, "w") as f:
            json.dump(vehicle_json(truth), f)
        params = os.path.join(tmp, kind + "-params.json")
        code, out, err = run(["fit", bench, "--vehicle", veh, "--out", params])
        if code != 0:
            print("%s: fit refused: %s" % (kind, err.strip()))
            continue
        for rate in (5, 10, 25, 50, 100, None):
            cells = {"false": 0, "h": 0.0, "step": [], "ramp": [], "mass": [], "unjudged": 0}
            cases = [(None, 1.0)] * n_flights + [(("step", 0.10), 1.0), (("step", -0.10), 1.0),
                                                  (("ramp", 0.15), 1.0), (None, 1.15)]
            for i, (fault, payload) in enumerate(cases):
                rows, t_f = fly(truth, rng, rate, 600.0, fault, payload)
                log = os.path.join(tmp, "%s-%s-%d.csv" % (kind, rate, i))
                write_csv(log, ["time[s]", "command[-]", "voltage[V]", "current[A]"], rows)
                code, out, err = run(["replay", log, "--params", params, "--json"])
                if code != 0:
                    print("  %s %s flight %d: replay refused: %s" % (kind, rate, i, err.strip()[:200]))
                    continue
                res = json.loads(out)
                events = res["events"]
                dur_h = rows[-1][0] / 3600.0
                if fault is None and payload == 1.0:
                    cells["false"] += len(events)
                    cells["h"] += dur_h
                    for e in events:
                        print("  FALSE %s %s flight %d: %.1f s %s" % (kind, rate, i, e["t_s"], e["kind"]))
                elif fault is None:
                    hits = [e["t_s"] for e in events if e["kind"] == "mass_high"]
                    cells["mass"].append(hits[0] if hits else math.inf)
                else:
                    want = "power_high" if fault[1] > 0 else "power_low"
                    early = [e for e in events if e["t_s"] < t_f]
                    for e in early:
                        print("  FALSE %s %s flight %d (before the fault): %.1f s %s" % (kind, rate, i, e["t_s"], e["kind"]))
                    cells["false"] += len(early)
                    hits = [e["t_s"] - t_f for e in events if e["kind"] == want and e["t_s"] >= t_f]
                    d = hits[0] if hits else math.inf
                    left_s = rows[-1][0] - t_f             # flight left after the onset (the pack's cutoff)
                    if fault[0] == "ramp":
                        if d != math.inf or 0.15 * min(1.0, left_s / 300.0) >= 0.08:
                            cells["ramp"].append(0.15 * min(1.0, d / 300.0) if d != math.inf else math.inf)
                        else:                              # landed before the ramp reached 8 %: not judged
                            cells["unjudged"] += 1
                    elif d != math.inf or left_s >= 30.0:
                        cells["step"].append(d)
                    else:
                        cells["unjudged"] += 1
            print("%-6s %5s Hz  false %d in %.2f h  step +-10%% %s  ramp share %s  +15%% payload %s%s" % (
                kind, rate or "irr", cells["false"], cells["h"],
                " ".join("%.1f" % x for x in cells["step"]), " ".join("%.3f" % x for x in cells["ramp"]),
                " ".join("%.1f" % x for x in cells["mass"]),
                "  (%d fault flights landed too soon to judge)" % cells["unjudged"] if cells["unjudged"] else ""))
            sys.stdout.flush()
            totals["false"] += cells["false"]
            totals["hours"] += cells["h"]
            for k in ("step", "ramp", "mass"):
                totals[k] += cells[k]
    print("in all: %d false events in %.1f fault-free h; worst +-10 %% step %.1f s; worst ramp share %.3f; "
          "worst +15 %% payload %.1f s" % (totals["false"], totals["hours"], max(totals["step"] or [0]),
                                          max(totals["ramp"] or [0]), max(totals["mass"] or [0])))


if __name__ == "__main__":
    args = [a for a in sys.argv[1:] if not a.startswith("--") and a.isdigit()]
    seed = int(sys.argv[sys.argv.index("--seed") + 1]) if "--seed" in sys.argv else 1
    if "--seed" in sys.argv:
        args.remove(str(seed))
    main(int(args[0]) if args else 2, seed)
