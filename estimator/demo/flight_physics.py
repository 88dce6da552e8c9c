"""Float physics of the test flight simulator, written apart from the watch and its CONFIG.

Everything here is numpy over a batch of flights (arrays of shape (N,)), so that many flights
run at once. Published models (sources from memory unless a number is given):

- air: ICAO standard atmosphere troposphere, T = T0 - L h, p = p0 (T / T0)^(g / (L R)),
  rho = p / (R T), with the site temperature replacing T; humidity ignored (< 1.5 %).
- rotor: DC motor equivalent circuit (back-EMF omega / Kv, winding resistance R, no-load
  current I0) driving a propeller with static coefficients, T = CT rho n^2 D^4,
  Q = CP rho n^2 D^5 / (2 pi); the rotor speed follows its steady value through a first-order
  lag (the motor's mechanical time constant); the motor current comes from the circuit at the
  present speed, so spin-up draws more. Vertical air flow through the disk (climb, gusts)
  changes thrust by the heave damping rho A v_h (v - w) and shaft power by T (v - w) / 2
  (momentum theory in axial flight: P = T (v_h + V_c / 2) for small V_c; Leishman,
  Principles of Helicopter Aerodynamics, ch. 2; Padfield, Helicopter Flight Dynamics, ch. 4).
- ESC: duty = (u - dead band) / (1 - dead band); bus current = duty x motor current / efficiency
  (the simulator limits the motor current to the motor's rating, as ESCs do).
- pack: open-circuit voltage per cell against state of charge (a typical LiPo curve, common
  practice), series resistance and one RC polarisation branch (Thevenin model, e.g. Chen &
  Rincon-Mora, IEEE Trans. Energy Conv. 21 (2006)), coulomb counting.
- turbulence: Dryden vertical gust of MIL-F-8785C at low altitude, sigma_w = 0.1 W20,
  L_w = h, transfer function sigma_w sqrt(L/(pi V)) (1 + sqrt(3) L s / V) / (1 + L s / V)^2,
  frozen turbulence carried by the mean wind V; scaled to sigma_w exactly by the filter's
  stationary variance (discrete Lyapunov equation, scipy).
"""

import math

import numpy as np

G = 9.80665           # standard gravity [m/s^2]
R_AIR = 287.05        # specific gas constant of dry air [J/(kg K)]
LAPSE = 0.0065        # troposphere lapse rate [K/m]

# typical LiPo open-circuit voltage per cell against state of charge (common practice, from memory)
SOC_KNOTS = np.array([0.0, 0.05, 0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 1.0])
OCV_KNOTS = np.array([3.30, 3.55, 3.65, 3.71, 3.75, 3.79, 3.83, 3.87, 3.93, 4.00, 4.09, 4.20])


def air_density(altitude_m, temperature_C=None):
    """Air density [kg/m^3] at altitude_m [m] (standard troposphere pressure) and the site
    temperature temperature_C [C] (default: the standard one at that altitude)."""
    t_std = 288.15 - LAPSE * altitude_m
    p = 101325.0 * (t_std / 288.15) ** (G / (LAPSE * R_AIR))
    t = t_std if temperature_C is None else temperature_C + 273.15
    return p / (R_AIR * t)


def cell_ocv(soc):
    """Open-circuit cell voltage [V] at state of charge soc [-] (array), LiPo curve."""
    return np.interp(soc, SOC_KNOTS, OCV_KNOTS)


class Rotor:
    """One rotor type: motor (kv_rpm_per_V [rpm/V], resistance_ohm [ohm], no_load_current_A [A]),
    propeller (diameter_m [m], ct [-], cp [-]) and the rotor's time constant tau_s [s]."""

    def __init__(self, motor, propeller, tau_s, dead_band=0.05, esc_efficiency=0.95):
        self.kv = motor["kv_rpm_per_V"] * 2.0 * math.pi / 60.0       # [rad/s/V]
        self.r = motor["resistance_ohm"]
        self.i0 = motor["no_load_current_A"]
        d = propeller["diameter_m"]
        self.area = math.pi * d * d / 4.0
        self.kt_coef = propeller["ct"] * d ** 4 / (4.0 * math.pi ** 2)   # T = kt_coef rho omega^2
        self.kq_coef = propeller["cp"] * d ** 5 / (8.0 * math.pi ** 3)   # Q = kq_coef rho omega^2
        self.tau = tau_s
        self.dead_band = dead_band
        self.eff = esc_efficiency

    def duty(self, u):
        """ESC duty [-] from the command u [-] (arrays)."""
        return np.clip((u - self.dead_band) / (1.0 - self.dead_band), 0.0, 1.0)

    def omega_steady(self, duty, bus_V, rho, extra_torque=0.0):
        """Steady rotor speed [rad/s]: Kt (I - I0) = Q_prop + extra_torque with I = (d V - omega/Kv) / R."""
        a = self.kq_coef * rho
        b = 1.0 / (self.kv * self.kv * self.r)
        c = (duty * bus_V / self.r - self.i0) / self.kv - extra_torque
        c = np.maximum(c, 0.0)
        return (-b + np.sqrt(b * b + 4.0 * a * c)) / (2.0 * a)

    def motor_current(self, duty, bus_V, omega):
        """Motor current [A] at duty, bus_V [V] and speed omega [rad/s]; no regeneration."""
        return np.maximum((duty * bus_V - omega / self.kv) / self.r, 0.0)

    def thrust(self, omega, rho):
        """Static thrust [N] at speed omega [rad/s] and density rho [kg/m^3]."""
        return self.kt_coef * rho * omega * omega


class Pack:
    """Battery pack: cells [-], capacity_Ah [Ah], resistance_ohm [ohm] (series), and an RC
    polarisation branch r1_ohm [ohm], tau1_s [s]."""

    def __init__(self, cells, capacity_Ah, resistance_ohm, r1_ohm=None, tau1_s=30.0):
        self.cells = cells
        self.capacity_As = capacity_Ah * 3600.0
        self.r0 = resistance_ohm
        self.r1 = 0.5 * resistance_ohm if r1_ohm is None else r1_ohm
        self.tau1 = tau1_s

    def bus_voltage(self, soc, current_A, v1):
        """Loaded pack voltage [V] at state of charge soc [-], current [A], polarisation v1 [V]."""
        return self.cells * cell_ocv(soc) - current_A * self.r0 - v1


class Dryden:
    """Vertical gust w_g [m/s] of the Dryden model (MIL-F-8785C), a batch of independent streams.

    sigma_w [m/s] (array), scale length L_w [m], transport speed V [m/s]; step(dt) advances all.
    """

    def __init__(self, rng, sigma_w, length_m, speed_m_s, dt_s):
        from scipy.linalg import solve_discrete_lyapunov

        self.rng = rng
        tau = length_m / max(speed_m_s, 0.5)
        # H(s) = (1 + sqrt(3) tau s) / (1 + tau s)^2 in controllable form, x' = A x + B e, y = C x
        a = np.array([[0.0, 1.0], [-1.0 / tau ** 2, -2.0 / tau]])
        b = np.array([0.0, 1.0 / tau ** 2])
        c = np.array([1.0, math.sqrt(3.0) * tau])
        ad = np.eye(2) + a * dt_s + a @ a * dt_s ** 2 / 2.0          # second-order step (dt << tau)
        bd = b * dt_s
        p = solve_discrete_lyapunov(ad, np.outer(bd, bd))
        var = float(c @ p @ c)
        self.ad, self.bd, self.c = ad, bd, c
        self.gain = np.asarray(sigma_w) / math.sqrt(var)
        n = np.size(sigma_w)
        # start in the stationary distribution
        chol = np.linalg.cholesky(p + 1e-15 * np.eye(2))
        self.x = (chol @ rng.standard_normal((2, n))).T

    def step(self):
        """Advance one step; returns the gust [m/s] of every stream."""
        e = self.rng.standard_normal(self.x.shape[0])
        self.x = self.x @ self.ad.T + np.outer(e, self.bd)
        return self.gain * (self.x @ self.c)


def hover_duty(rotor, mass_kg, rotor_count, bus_V, rho):
    """Duty [-] at which the rotors hold mass_kg [kg] at bus_V [V], density rho [kg/m^3]
    (bisection on the steady rotor model; the controller's initial hover guess)."""
    lo, hi = 0.0, 1.0
    weight = mass_kg * G / rotor_count
    for _ in range(50):
        mid = 0.5 * (lo + hi)
        om = rotor.omega_steady(np.array([mid]), bus_V, rho)[0]
        if rotor.thrust(om, rho) < weight:
            lo = mid
        else:
            hi = mid
    return 0.5 * (lo + hi)
