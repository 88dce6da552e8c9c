"""Plots of a bench fit (``liftcal fit --plot PNG``); matplotlib is imported only in here.

Left: thrust against command, every row scaled to the reference voltage by (V_ref / V)^n,
with the fitted curve, its pointwise 95 % band (delta method on the thrust-curve
covariance) and the residuals below. Right: electrical power against thrust with the
fitted power model, momentum theory's ideal P = T^1.5 / sqrt(2 rho A) as the physical bound
(k = 1; no real rotor lies below it) and lines of constant static factor k, so the
efficiency is visible at a glance.
"""

import math
import os

import numpy as np

from estimator.cautions import SHORT
from estimator.core.fitted_rotor import site_thrust_ratio
from estimator.core.momentum import disk_area_m2
from estimator.errors import InputError
from estimator.jsonio import save_figure_atomic

K_LINES = (0.3, 0.5, 0.7)  # constant-k guides; 0.3 is the conservative rule of thumb (common practice)


def curve_band_N(curve, cov, command):
    """Fitted thrust [N] at V_ref and its 95 % half-width [N] at each command (array)."""
    u = np.asarray(command, dtype=float)
    t_max, a, u_min = curve["thrust_max_N"], curve["quadratic_share"], curve["command_min"]
    u_max = curve.get("command_max", 1.0)
    span = u_max - u_min
    x = np.clip((u - u_min) / span, 0.0, 1.0)
    active = ((u - u_min) > 0.0) & (u < u_max)
    t = (1.0 - a) * x + a * x * x
    g = np.column_stack([t, t_max * (x * x - x),
                         np.where(active, t_max * ((1.0 - a) + 2.0 * a * x) * (u - u_max) / (span * span), 0.0),
                         np.zeros_like(u)])
    c = np.asarray(cov, dtype=float)
    var = np.einsum("ij,jk,ik->i", g, c, g)
    return t_max * t, 1.959964 * np.sqrt(np.maximum(var, 0.0))


def user_units(params):
    """(thrust factor [unit per N], thrust unit, command function u -> shown, command label)
    in the units of the bench CSV (grams in, grams out; microseconds logged, shown)."""
    from estimator.bench.columns import UNITS

    units = params.get("provenance", {}).get("units", {})
    t_unit = units.get("thrust", "N")
    factor = 1.0 / UNITS["thrust"].get(t_unit, (1.0, 0.0))[0]
    c_unit = units.get("command", "-")
    shown = {"us": lambda u: 1000.0 + 1000.0 * np.asarray(u), "%": lambda u: 100.0 * np.asarray(u),
             "permille": lambda u: 1000.0 * np.asarray(u)}.get(c_unit, lambda u: np.asarray(u))
    return factor, t_unit, shown, {"us": "command [us]", "%": "command [%]",
                                   "permille": "command [permille]"}.get(c_unit, "command u [-]")


# the top of the legend band [figure fraction]: below the residual panel's tick labels and axis label
LEGEND_TOP = 0.2


def legend_below(fig, ax, handles_labels, top=LEGEND_TOP):
    """A legend for ``ax`` in the band below the panels (figure coordinates, left-aligned with
    ``ax``), outside every data area."""
    handles, labels = handles_labels
    return ax.legend(handles, labels, loc="upper left", fontsize=8, frameon=False,
                      bbox_to_anchor=(ax.get_position().x0, top), bbox_transform=fig.transFigure)


def plot_fit(path, params, rows):
    """Draw the two panels to ``path`` (PNG), written through a temporary file and a rename.

    params: the fitted parameter set; rows: the sweep's rows in SI and which the fit used
    (estimator.bench.sweep.Rows); the residuals are taken against the set's own curve."""
    from estimator.bench.curve_fit import thrust_model_N

    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    directory = os.path.dirname(os.path.abspath(path)) or "."
    if not os.path.isdir(directory):
        raise InputError("%s: folder %s does not exist" % (path, directory))
    curve, power = params["thrust_curve"], params["power_model"]
    rho = curve["reference_density_kg_m3"]
    area = disk_area_m2(params["rotor"]["diameter_m"])
    # few hundred thousand points are plenty for a picture of a million-row sweep
    sl = slice(None, None, max(1, rows.command.size // 200000))
    u, v, t, p, used = rows.command[sl], rows.voltage_V[sl], rows.thrust_N[sl], rows.power_W[sl], rows.used[sl]
    t_model = thrust_model_N(curve, u, v)
    to_ref = (curve["reference_voltage_V"] / v) ** curve["voltage_exponent"]
    tf, t_unit, cu, c_label = user_units(params)
    # a command value in the legend carries its unit, as the axis does (none for a 0..1 command)
    c_unit = {"us": " us", "%": " %", "permille": " permille"}.get(
        params.get("provenance", {}).get("units", {}).get("command", "-"), "")

    # the legends go in a band below the panels, never over the data (trial 9, finding 15: the
    # thrust panel's legend covered the curve between about 1650 and 1830 us)
    fig = plt.figure(figsize=(12, 8.6))
    grid = fig.add_gridspec(2, 2, height_ratios=[3, 1], hspace=0.08, wspace=0.22, top=0.93, bottom=0.3)
    ax = fig.add_subplot(grid[0, 0])
    axr = fig.add_subplot(grid[1, 0], sharex=ax)
    axp = fig.add_subplot(grid[:, 1])

    ax.plot(cu(u[used]), tf * t[used] * to_ref[used], ".", ms=3, color="0.45", label="rows used (scaled to V_ref)")
    if np.any(~used):
        # above the legend (zorder 5), so a dropped row under it still shows
        ax.plot(cu(u[~used]), tf * t[~used] * to_ref[~used], "x", ms=6, color="tab:red", label="rows dropped",
                zorder=6)
    grid_u = np.linspace(0.0, 1.0, 301)
    fit_t, half = curve_band_N(curve, params["thrust_curve_covariance"]["matrix"], grid_u)
    ax.fill_between(cu(grid_u), tf * (fit_t - half), tf * (fit_t + half), color="tab:blue", alpha=0.25, lw=0,
                    label="95 % band of the fit")
    ax.plot(cu(grid_u), tf * fit_t, "-", color="tab:blue", lw=1.8,
            label="controller curve: T_max %.4g %s, a %.3f, intercept %.4g%s, n %.2f" % (
                tf * curve["thrust_max_N"], t_unit, curve["quadratic_share"], float(cu(curve["command_min"])),
                c_unit, curve["voltage_exponent"]))
    h = params.get("hover")
    if h:
        # the curve at the hover bus voltage and the thrust each rotor needs in bench air (the
        # motor model's thrust ratio at the hover thrust): the hover command sits where they meet
        v_h = h["voltage_V"]
        at_v = (v_h / curve["reference_voltage_V"]) ** curve["voltage_exponent"]
        rho_site = params["vehicle"]["site_density_kg_m3"]
        need = h["thrust_per_rotor_N"] / site_thrust_ratio(params, rho_site, h["thrust_per_rotor_N"],
                                                           params["vehicle"].get("layout") == "coaxial")
        # three lines, three styles, each in the legend (new-user trial 8, finding 9: the
        # dotted line had no label and the hover command shared the curve's dashes)
        ax.plot(cu(grid_u), tf * fit_t * at_v, "--", color="tab:green", lw=1.2,
                label="curve at the hover bus voltage %.2f V" % v_h)
        ax.axhline(tf * need, color="tab:purple", lw=0.9, ls=":",
                   label="hover thrust per rotor moved to bench air: %.4g %s (%.4g %s in the site's air)"
                         % (tf * need, t_unit, tf * h["thrust_per_rotor_N"], t_unit))
        ax.axvline(float(cu(h["hover_command"])), color="tab:orange", lw=1.2, ls="-.",
                   label="hover command %.4g%s (%s)" % (float(cu(h["hover_command"])), c_unit,
                                                       params["vehicle"].get("name", "vehicle")))
    ax.set_ylabel("thrust at %.2f V [%s]" % (curve["reference_voltage_V"], t_unit))
    ax.set_title("Thrust curve (bench air %.3f kg/m^3)" % rho)
    legend_below(fig, ax, ax.get_legend_handles_labels())
    ax.grid(alpha=0.3)
    plt.setp(ax.get_xticklabels(), visible=False)
    axr.plot(cu(u[used]), tf * (t - t_model)[used], ".", ms=2, color="0.35")
    axr.axhline(0.0, color="tab:blue", lw=1)
    axr.set_xlabel(c_label)
    axr.set_ylabel("residual [%s]" % t_unit)
    axr.grid(alpha=0.3)

    t_grid = np.linspace(0.0, max(float(np.max(t[used])), 1e-3) * 1.05, 200)
    root = math.sqrt(2.0 * rho * area)
    axp.plot(tf * t[used], p[used], ".", ms=3, color="0.45", label="rows used")
    axp.plot(tf * t_grid, t_grid ** 1.5 / root, "-", color="k", lw=2,
             label="ideal, momentum theory (k = 1): physical bound")
    for k, colour in zip(K_LINES, ("tab:red", "tab:purple", "tab:green")):
        axp.plot(tf * t_grid, (t_grid / k) ** 1.5 / root, ":", lw=1.4, color=colour,
                 label="constant k = %.1f" % k)
    from estimator.bench.power_fit import power_model_W
    fitted = power_model_W(power, t_grid)  # the one power model (estimator.core.power_model)
    axp.plot(tf * t_grid, fitted, "-", color="tab:orange", lw=1.8,
             label="power model (rel. noise %.1f %%)" % (100.0 * power["residual_rel_std"]))
    axp.set_ylim(0.0, max(float(np.max(p[used])), 1.0) * 1.1)
    axp.set_xlabel("thrust T [%s]" % t_unit)
    axp.set_ylabel("electrical power P [W]")
    axp.set_title("Power against thrust; k = %.2f at %s" % (
        params["static_factor"]["value"], params["static_factor"].get("value_at", "median thrust")))
    legend_below(fig, axp, axp.get_legend_handles_labels())
    axp.grid(alpha=0.3)
    fig.suptitle("liftcal bench fit: %s (%s)" % (params["provenance"]["input_file"], SHORT), fontsize=9)

    try:
        save_figure_atomic(fig, path)
    finally:
        plt.close(fig)
