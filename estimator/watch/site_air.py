"""The watch's expected thrust in the site's air: from the parameter set's fitted motor model
(estimator.core.fitted_rotor) at the hover, for the CONFIG tables (estimator.watch.config).

The controller curve's voltage and density exponents are full-command values; the motor's load
differs at a hover, and in thin air on a loaded motor they carried the bench's thrust 5-10 %
wrong (a fault-free flight at 2200 m, 30 C read -10 %: baseline_off). So the kernel's thrust
factor of each table voltage, its full-command thrust and its hover table come from the motor
model in the site's air at the hover command; the curve's shape in command stays (the kernel's
quadratic).
"""

from estimator.core import thrust_curve
from estimator.core.fitted_rotor import FittedRotor


def site_hover(params, v, rho, thrust_N):
    """The fitted motor model (core.fitted_rotor) in the site's air around the hover.

    At u_h, the command that holds thrust_N [N] per rotor on the nominal pack voltage: dict
    command u_h [-], factor(V) = T(u_h, V) / T(u_h, V_ref) [-] of a bus voltage V [V],
    thrust_top_N [N] the full-command thrust at V_ref that puts the controller curve's shape
    through (u_h, T(u_h, V_ref)), hover_command(V) [-] at a bus voltage V [V] (1 where it cannot
    hover). v: vehicle_facts; rho [kg/m^3]. None when the nominal pack cannot hover, the hover
    command lies at the curve's intercept, or the set has no motor model (the kernel's range
    tests build such sets by hand). Source: the DC motor model of the fit.
    """
    curve = params["thrust_curve"]
    if "motor_model" not in params:
        return None
    rotor = FittedRotor(params, rho, v.get("layout") == "coaxial")
    motor_V, _ = rotor.for_thrust(thrust_N)
    duty = motor_V / (v.get("nominal_voltage_V") or curve["reference_voltage_V"])
    u_min, u_max = curve["command_min"], curve.get("command_max", 1.0)
    u_h = rotor.command(duty) if duty < 1.0 else None
    if u_h is None or u_h <= u_min + 0.01 * (u_max - u_min):
        return None
    t_ref = rotor.at_motor_V(duty * curve["reference_voltage_V"])[0]
    shape = thrust_curve.curve_fraction(thrust_curve.command_to_x(u_h, u_min, u_max), curve["quadratic_share"])
    return {"command": u_h, "thrust_top_N": t_ref / shape,
            "factor": lambda bus_V: rotor.at_motor_V(duty * bus_V)[0] / t_ref,
            "hover_command": lambda bus_V: 1.0 if motor_V >= bus_V else min(1.0, rotor.command(motor_V / bus_V))}


def expected_thrust(params, v, rho, thrust_N, volts):
    """The kernel's expected-thrust tables: (factors [-] at volts [V], full-command thrust [N] at
    V_ref, hover commands [permille] at volts, a note saying how). thrust_N [N] per rotor at the
    hover; v: vehicle_facts; rho [kg/m^3]. From site_hover, or, where it gives None, from the
    controller curve's exponents (V / V_ref)^n and (rho / rho_ref)^m."""
    curve = params["thrust_curve"]
    v_ref = curve["reference_voltage_V"]
    site = site_hover(params, v, rho, thrust_N)
    if site is None:   # no hover on the nominal pack: the curve's exponents
        n_exp = curve["voltage_exponent"]
        factors = [(x / v_ref) ** n_exp for x in volts]
        t_site = curve["thrust_max_N"] * (rho / curve["reference_density_kg_m3"]) ** curve["density_exponent"]
        hov = []
        for x in volts:
            u, _ = thrust_curve.hover_command(thrust_N, x, rho, curve)
            hov.append(1000 if u is None else int(round(1000.0 * u)))
        how = "(V / %.3f V)^%.4f (the curve's voltage exponent: no hover on the nominal pack)" % (v_ref, n_exp)
    else:
        factors = [site["factor"](x) for x in volts]
        t_site = site["thrust_top_N"]
        hov = [int(round(1000.0 * site["hover_command"](x))) for x in volts]
        how = ("T(u_h, V) / T(u_h, %.3f V) of the motor model at rho %.4f kg/m^3, u_h = %.4f the hover command "
               "on the nominal pack" % (v_ref, rho, site["command"]))
    return factors, t_site, hov, how
