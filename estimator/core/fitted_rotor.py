"""The fitted DC motor + propeller model of a parameter set, for one rotor, in scalar form.

The parameter set's motor_model block (fitted to a bench sweep by estimator.bench.motor_fit,
which holds the same model in vectorised form for the fit) in back-EMF form:
T = a s^2, I = I0 + b s + c s^2, Vm = s + R I, duty d = Vm / V_bus, command
u = u0 + (u1 - u0) d^(1/g), bus current I_q + d I per rotor; a and c grow as the air density
(thrust and torque at fixed speed scale as rho). The bench measures the supply current, so the
fitted I carries the ESC's loss (it is the ESC input power over Vm). The command where the
rotor starts turning is u0; the controller quadratic's intercept command_min is never used as
a duty offset. Coaxial pairs: the torque current is raised by power_model.coaxial_shaft_ratio,
the same rule the datasheet route applies to CP (only the ideal induced power is multiplied by
the coaxial factor). Used by the pre-flight sheet from a set (estimator.preflight.fitted_vehicle)
and the watch's CONFIG (estimator.watch.site_air.site_hover: the bench's thrust in the site's air;
coaxial_power_increment: a coaxial pair's extra power in the watch's power model).
Source: the DC motor model (Hughes, Electric Motors and Drives, ch. 3, from memory) with the
propeller's T ~ rho n^2, Q ~ rho n^2 at fixed coefficients.
"""

import math

from estimator.core.battery import sagged_bus_V
from estimator.core.momentum import COAXIAL_INDUCED_POWER_FACTOR, disk_area_m2
from estimator.core.power_model import AIR_KEYS, KEYS, coaxial_shaft_ratio, coefficients_from_motor

BISECTION_STEPS = 60


def coaxial_torque_ratio(params, density_kg_m3):
    """Torque (shaft-power) ratio e [-] of one rotor of a coaxial pair to the isolated rotor at
    equal thrust, from the parameter set's fitted motor model at air density rho [kg/m^3].

    The motor model's shaft power c s^3 against the ideal induced power T^1.5 / sqrt(2 rho A) =
    a^1.5 s^3 / sqrt(2 rho A) (a = T / s^2, c = torque current / s^2, both ~ rho; A the disk
    area) gives P_ideal / P_shaft, and e = power_model.coaxial_shaft_ratio(that, kappa) with
    kappa = momentum.COAXIAL_INDUCED_POWER_FACTOR = (1 + sqrt(17)) / 4 (power basis: only the
    ideal induced power is multiplied). The one coaxial penalty of a fitted set: FittedRotor
    (the pre-flight sheet) raises its torque current c by e, and the watch adds the watts that
    costs (coaxial_power_increment, through estimator.watch.thrust_table.flight_power_model).
    params: parameter-set dict with motor_model and rotor.diameter_m [-]; density_kg_m3: rho
    [kg/m^3]. Returns e [-]. Source: momentum
    theory of a coaxial pair, lower rotor in the upper's fully developed slipstream (Leishman,
    Principles of Helicopter Aerodynamics, 2006, ch. 6, coaxial rotors; from memory).
    """
    mm = params["motor_model"]
    ratio = density_kg_m3 / mm["reference_density_kg_m3"]
    a, c = mm["thrust_per_V2_N"] * ratio, mm["current_per_V2_A"] * ratio
    area = disk_area_m2(params["rotor"]["diameter_m"])
    ideal_over_shaft = a ** 1.5 / (math.sqrt(2.0 * density_kg_m3 * area) * c)
    return coaxial_shaft_ratio(ideal_over_shaft, COAXIAL_INDUCED_POWER_FACTOR)


def coaxial_power_increment(params):
    """The electrical power a coaxial pair adds to one rotor of the fitted motor model, as
    power-model coefficients (estimator.core.power_model form, at the motor model's reference
    density rho_ref [kg/m^3]; rotor_power_W carries them to any density).

    FittedRotor(coaxial=True) draws P = Vm I with the torque current c raised by e =
    coaxial_torque_ratio; expanded in thrust (power_model.coefficients_from_motor, the b s
    current included) the difference to the flat rotor is (e - 1) c (1 + 2 R b) / a^1.5 on
    T^1.5, (e - 1) 2 R I0 c / a on T and (e^2 - 1) R c^2 / a^2 on T^2; the no-load terms are
    unchanged (exactly 0 here). e does not depend on the density (a^1.5 / (sqrt(rho) c) with a, c
    ~ rho), and the terms scale with rho as the power model's do, so the flat power model plus
    these coefficients draws, at every thrust and density, exactly the extra power the
    pre-flight sheet's FittedRotor draws: the watch's expected power and implied mass take the
    same coaxial penalty (estimator.watch.thrust_table.flight_power_model). Returns a dict with
    power_model.KEYS [W, W/N^0.5, W/N, W/N^1.5, W/N^2]. params: parameter-set dict with
    motor_model and rotor.diameter_m [-]. Source: as coaxial_torque_ratio (Leishman 2006, ch. 6,
    coaxial rotors, from memory) and the DC motor model (power_model.coefficients_from_motor).
    """
    mm = params["motor_model"]
    e = coaxial_torque_ratio(params, mm["reference_density_kg_m3"])
    a, c = mm["thrust_per_V2_N"], mm["current_per_V2_A"]
    rest = (mm["resistance_ohm"], mm["no_load_current_A"], 0.0, mm.get("speed_current_A_per_V", 0.0))
    flat = coefficients_from_motor(a, c, *rest)
    coax = coefficients_from_motor(a, c * e, *rest)
    return {k: coax[k] - flat[k] for k in KEYS}


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
            self.c *= coaxial_torque_ratio(params, density_kg_m3)

    def for_thrust(self, thrust_N):
        """(motor voltage Vm [V], motor current I [A]) that hold thrust_N [N]."""
        s = math.sqrt(max(thrust_N, 0.0) / self.a)
        i = self.i0 + self.b * s + self.c * s * s
        return s + self.r * i, i

    def at_motor_V(self, motor_V):
        """(thrust [N], motor current [A]) at motor voltage Vm [V] (motor_point)."""
        return motor_point(self.a, self.c, self.r, self.i0, self.b, motor_V)

    def command(self, duty):
        """Command [-] that gives duty [-] (above the spin-up u0)."""
        return self.u0 + (self.u1 - self.u0) * max(duty, 0.0) ** (1.0 / self.g)

    def hover(self, thrust_N, rotors, open_circuit_V, pack_ohm):
        """Hover of N rotors on a pack: dict bus_V, duty, command, pack_current_A, power_W,
        motor_current_A; bus_V None when the pack cannot deliver the power."""
        vm, i = self.for_thrust(thrust_N)
        # the ESCs' idle draw sags the pack as a current, the motors' as a power
        v_eff = open_circuit_V - pack_ohm * rotors * self.iq
        v = sagged_bus_V(v_eff, pack_ohm, rotors * vm * i) if v_eff > 0.0 else None
        if v is None:
            return {"bus_V": None, "duty": None, "command": None, "pack_current_A": None,
                    "power_W": rotors * vm * i, "motor_current_A": i}
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


def motor_point(a, c, r, i0, b, motor_V, sqrt=math.sqrt):
    """Thrust T [N] and motor current I [A] of the back-EMF model at a motor voltage Vm [V].

    The speed term s (back-EMF [V]) solves R c s^2 + (1 + R b) s - (Vm - R I0) = 0, taken in the
    cancellation-free form s = 2 D / (L + sqrt(L^2 + 4 R c D)), D = Vm - R I0, L = 1 + R b;
    then T = a s^2 and I = I0 + b s + c s^2; below spin-up (D <= 0) s = 0 and I = Vm / R (0 for
    R = 0). a [N/V^2], c [A/V^2], r [ohm], i0 [A], b [A/V]; motor_V [V], a float or (the bench
    fit's rows) a numpy array with sqrt: numpy.sqrt (the square root [-] to use; math.sqrt for a
float): written with operators only. The one copy
    of the model's forward equations (the fit's Jacobian, estimator.bench.rotor_model,
    differentiates them). Source: the DC motor model (module docstring).
    """
    on = motor_V - r * i0 > 0.0
    drive = (motor_V - r * i0) * on
    lin = 1.0 + r * b
    s = 2.0 * drive / (lin + sqrt(lin * lin + 4.0 * r * c * drive))
    stalled = motor_V / r if r > 0.0 else 0.0 * motor_V
    return a * s * s, on * (i0 + b * s + c * s * s) + (1 - on) * stalled


def site_thrust_ratio(params, density_kg_m3, thrust_N, coaxial=False):
    """Thrust in other air over thrust at the bench, at the motor voltage that holds thrust_N there.

    T_site / T_bench at one command and bus voltage (one motor voltage Vm): the motor model at
    density_kg_m3 holds thrust_N [N] at Vm; at the bench's density the same Vm gives T_bench.
    A single power law (rho / rho_bench)^m cannot carry this: m = d ln T / d ln rho =
    (1 + R b) / (1 + R b + 2 R c s) falls with the load (about 1 near idle, 0.7-0.8 at full
    command on a loaded motor), so the ratio is taken where it is used. density_kg_m3
    [kg/m^3]; thrust_N [N] > 0 per rotor; params: parameter-set dict [-]; coaxial: bool [-].
    Returns the ratio [-]. Source: the DC motor model above, solved at both densities.
    """
    mm = params["motor_model"]
    site = FittedRotor(params, density_kg_m3, coaxial)
    bench = FittedRotor(params, mm["reference_density_kg_m3"], coaxial)
    motor_V, _ = site.for_thrust(thrust_N)
    bench_N, _ = bench.at_motor_V(motor_V)
    return thrust_N / bench_N if bench_N > 0.0 else 1.0


def site_power_model(power, params, density_kg_m3):
    """A power model (estimator.core.power_model form) of one rotor in the air at rho whose terms
    that scale with the air take their size from the fitted motor model, not from the bench
    power model's own split.

    The form scales the T^0.5 and T^1.5 terms by r = sqrt(rho_ref / rho) and leaves the T and
    T^2 terms (copper loss) alone. Fitted at one density, the four are nearly collinear, so the
    bench fit may put the shaft power in terms that do not scale (a 20 g whoop's T^1.5 term came
    out 0, and its hover power read 7 % low in air 25 % thinner than the bench's). The motor
    model holds the split from physics (thrust and current fitted apart), so the change from the
    bench's air is taken from its expansion (power_model.coefficients_from_motor: m_h, m_15 at
    its reference rho_m) on the same two terms:
        P(T, rho) = P_bench(T, rho_ref) + (r_m - r_m,ref) (m_h T^0.5 + m_15 T^1.5),
    r_m = sqrt(rho_m / rho), r_m,ref = sqrt(rho_m / rho_ref). Returned with reference density
    rho, so rotor_power_W and thrust_from_power_N at rho read it as is; a coefficient that would
    fall below 0 (air denser than the bench's) is held at 0, which keeps P(T) rising for the
    inversion. power: power-model dict [W, W/N^x, kg/m^3]; params: the parameter set [-];
    density_kg_m3: rho [kg/m^3]. Returns the dict (power itself when the set has no motor
    model). Source: the DC motor model with constant CT, CP (module docstring; power_model
    docstring for the expansion and the terms that scale).
    """
    mm = params.get("motor_model")
    if mm is None:
        return power
    rho_m = mm["reference_density_kg_m3"]
    m = coefficients_from_motor(mm["thrust_per_V2_N"], mm["current_per_V2_A"], mm["resistance_ohm"],
                                mm["no_load_current_A"], 0.0, mm.get("speed_current_A_per_V", 0.0))
    shift = math.sqrt(rho_m / density_kg_m3) - math.sqrt(rho_m / power["reference_density_kg_m3"])
    out = dict(power)
    out["reference_density_kg_m3"] = float(density_kg_m3)
    for key in AIR_KEYS:
        out[key] = max(0.0, power.get(key, 0.0) + shift * m[key])
    return out
