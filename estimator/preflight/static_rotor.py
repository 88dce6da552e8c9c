"""One rotor in static air by momentum theory: thrust from power or power from thrust.

The numbers of ``liftcal static``: T = k (2 rho A P^2)^(1/3) (estimator.core.momentum) with a
static thrust factor k, shown beside what good small sets reach, plus the induced velocity,
slipstream and disk loading. The command only reads options and prints.
"""

from estimator.cautions import cautions
from estimator.core import momentum
from estimator.preflight.low_reynolds import k_text, static_note
from estimator.units import plain_number

# common practice rule of thumb for small electric propeller sets (design notes sec. 3a):
# conservative, not a value to expect, for rotors above the low-Reynolds range; for smaller ones
# it is typical or optimistic (estimator/preflight/low_reynolds.py says so, with the band)
DEFAULT_STATIC_FACTOR = 0.3
# what good small sets reach (design notes sec. 3a, common practice): shown beside the rule of thumb
GOOD_SET_FACTORS = (0.5, 0.7)


def factor_tag(k):
    """JSON key tag of a factor: 0.5 -> "0_5"."""
    return ("%g" % k).replace(".", "_")


def static_rotor(diameter_m, density_kg_m3, factor=None, power_W=None, thrust_N=None):
    """The ``liftcal static --json`` dict for one rotor; exactly one of power_W, thrust_N.

    diameter_m [m], density_kg_m3 [kg/m^3], factor k [-] (None: the rule of thumb 0.3),
    power_W [W] electrical input, thrust_N [N]. Momentum theory (Glauert; Leishman, Principles
    of Helicopter Aerodynamics ch. 2, from memory): T = k (2 rho A P^2)^(1/3), P = (T/k)^1.5 /
    sqrt(2 rho A), v_i = sqrt(T / (2 rho A)), slipstream 2 v_i, disk loading T / A.
    """
    k = DEFAULT_STATIC_FACTOR if factor is None else factor
    area = momentum.disk_area_m2(diameter_m)
    out = {"diameter_m": diameter_m, "disk_area_m2": area, "density_kg_m3": density_kg_m3,
           "static_factor": k, "static_factor_source": "default rule of thumb (common practice)"
           if factor is None else "given", "efficiency": k ** 1.5}
    if power_W is not None:
        out["power_W"] = power_W
        out["ideal_thrust_N"] = momentum.ideal_thrust_N(power_W, density_kg_m3, area)
        out["thrust_N"] = momentum.thrust_from_power_N(power_W, k, density_kg_m3, area)
        for good in GOOD_SET_FACTORS:
            out["thrust_N_at_k_" + factor_tag(good)] = momentum.thrust_from_power_N(
                power_W, good, density_kg_m3, area)
    else:
        out["thrust_N"] = thrust_N
        out["ideal_power_W"] = momentum.ideal_power_W(thrust_N, density_kg_m3, area)
        out["power_W"] = momentum.power_from_thrust_W(thrust_N, k, density_kg_m3, area)
        for good in GOOD_SET_FACTORS:
            out["power_W_at_k_" + factor_tag(good)] = momentum.power_from_thrust_W(
                thrust_N, good, density_kg_m3, area)
    thrust = out["thrust_N"]
    out["low_reynolds"] = static_note(thrust, diameter_m, density_kg_m3, k)
    out["induced_velocity_m_s"] = momentum.induced_velocity_m_s(thrust, density_kg_m3, area)
    out["slipstream_velocity_m_s"] = 2.0 * out["induced_velocity_m_s"]
    out["disk_loading_N_m2"] = momentum.disk_loading_N_m2(thrust, area)
    return out


def format_static(out, power_given, thrust_typed=None):
    """Text lines for ``liftcal static``; ranges always read low..high. thrust_typed: the
    --thrust as the person typed it (500g): the answer names it in that unit, the newtons beside."""
    default = out["static_factor_source"] != "given"
    lines = ["one rotor, D = %s m (disk %s m^2), air %.3f kg/m^3, k = %.2f%s"
             % (plain_number(out["diameter_m"], 3), plain_number(out["disk_area_m2"], 3),
                out["density_kg_m3"], out["static_factor"], " (rule of thumb)" if default else "")]
    lo, hi = GOOD_SET_FACTORS
    # three significant digits: a micro rotor's watts and a heavy lifter's newtons alike
    if power_given:
        lines.append("  %s W in -> %s N of thrust (ideal actuator disk: %s N)"
                     % tuple(plain_number(out[k], 3, trim=True) for k in ("power_W", "thrust_N", "ideal_thrust_N")))
        key, unit = "thrust_N_at_k_", "N"
    else:
        thrust, power, ideal = (plain_number(out[k], 3, trim=True) for k in ("thrust_N", "power_W", "ideal_power_W"))
        asked = "%s N" % thrust
        if thrust_typed and not str(thrust_typed).strip().rstrip("N").strip().replace(".", "", 1).isdigit():
            asked = "%s (%s N)" % (str(thrust_typed).strip(), thrust)  # in the unit the person asked in
        lines.append("  %s of thrust needs %s W in (ideal actuator disk: %s W)" % (asked, power, ideal))
        key, unit = "power_W_at_k_", "W"
    small = out.get("low_reynolds")
    if small:
        # a small rotor: the band measured small sets reach, with what it gives (low_reynolds.py)
        k_lo, k_hi = small["static_factor_band"]
        power = not power_given
        at = [momentum.power_from_thrust_W(out["thrust_N"], k, out["density_kg_m3"], out["disk_area_m2"]) if power
              else momentum.thrust_from_power_N(out["power_W"], k, out["density_kg_m3"], out["disk_area_m2"])
              for k in (k_lo, k_hi)]
        lines.append("  ! " + small["text"])
        k = out["static_factor"]
        lines.append("  across that band: %s %s at k %s .. %s %s at k %s; at the k %s used: %s %s" % (
            plain_number(at[0], 3, trim=True), unit, k_text(k_lo, k), plain_number(at[1], 3, trim=True), unit,
            k_text(k_hi, k), k_text(k, k_lo if "%.2f" % k == "%.2f" % k_lo else k_hi), plain_number(out["thrust_N"] if power_given else out["power_W"], 3, trim=True),
            unit))
    elif default:
        # low..high values, each with the k that gives it (power falls as k rises)
        (a, ka), (b, kb) = sorted((out[key + factor_tag(k)], k) for k in (lo, hi))
        lines.append("  good small sets reach k %.1f..%.1f: %s %s (k %.1f) .. %s %s (k %.1f); k = 0.3 "
                     "is a conservative rule of thumb above the low-Reynolds range, common practice"
                     % (lo, hi, plain_number(a, 3), unit, ka, plain_number(b, 3), unit, kb))
    lines.append("  induced velocity %s m/s, slipstream %s m/s, disk loading %s N/m^2"
                 % tuple(plain_number(out[k], 3) for k in ("induced_velocity_m_s", "slipstream_velocity_m_s",
                                                          "disk_loading_N_m2")))
    lines += ["  ! " + w for w in out.get("warnings") or []]
    lines += ["  " + c for c in cautions("rotor")]
    return lines
