"""Hover endurance by discharging the pack to its cutoff, its landing reserve or the loss of hover.

A hovering vehicle draws a pack current I(q) that depends on how much charge q it has drawn:
the open-circuit voltage V_oc(q) falls as the pack drains, the bus voltage sags by the pack
resistance, and the motors need more current at a lower voltage to hold the same thrust. The
hover time is t = integral from 0 to q_end of dq / I(q) (from dq/dt = I), where the flight
ends at the first of:
- "cutoff":  the loaded (bus) voltage per cell falls to the cutoff V_cut;
- "reserve": the drawn charge reaches the usable share of the capacity (the rest is the
             landing reserve);
- "thrust":  the vehicle can no longer hover (full command or the pack's power is not enough).
The open-circuit curve is battery.cell_open_circuit_V over the usable charge: state of charge
s = 1 - q / C_use, so the curve passes full at q = 0, nominal at half and empty at C_use.

The caller supplies the hover load as a function of the pack's open-circuit voltage, so the
same integration serves the datasheet model (core.propulsion) and a fitted power model:
load(V_oc [V]) -> (pack current I [A], loaded bus voltage V_bus [V]), or None when the vehicle
cannot hover at that V_oc. The end point is found on a grid of the charge and refined by
bisection; the time integral is Simpson's rule on each linear piece of the open-circuit curve.
Pure math: runs on MicroPython. Units: A, V, Ah, min.
Source: definition of charge (dq/dt = I); Thevenin pack of design notes sec. 3.
"""

from estimator.core.battery import cell_open_circuit_V

GRID_STEPS = 64  # charge grid searched for the end of the flight [-]
BISECTION_STEPS = 50  # halvings of the grid cell holding the end [-]: 2^-50 of it
SIMPSON_INTERVALS = 32  # per linear piece of the open-circuit curve [-], even


def _open_circuit_V(q_Ah, pack):
    s = 1.0 - q_Ah / pack["usable_Ah"]
    return pack["cells"] * cell_open_circuit_V(s, pack["full_cell_V"], pack["nominal_cell_V"],
                                               pack["empty_cell_V"])


def _flying(q_Ah, pack, load):
    """(pack current [A], bus voltage [V]) at drawn charge q, or None when the flight has ended."""
    point = load(_open_circuit_V(q_Ah, pack))
    if point is None:
        return None
    current, bus_V = point
    if not current > 0.0 or bus_V < pack["cells"] * pack["cutoff_cell_V"]:
        return None
    return point


def _end_cause(q_Ah, pack, load):
    point = load(_open_circuit_V(q_Ah, pack))
    return "thrust" if point is None or not point[0] > 0.0 else "cutoff"


def _simpson_time_h(q0, q1, pack, load):
    """Integral of dq / I(q) from q0 to q1 [h] (Simpson's rule, SIMPSON_INTERVALS)."""
    if q1 <= q0:
        return 0.0
    n = SIMPSON_INTERVALS
    h = (q1 - q0) / n
    total = 0.0
    for i in range(n + 1):
        weight = 1.0 if i in (0, n) else (4.0 if i % 2 else 2.0)
        q = q0 + i * h
        point = load(_open_circuit_V(q, pack))
        if point is None or not point[0] > 0.0:  # only at the end point itself: hover just lost
            point = load(_open_circuit_V(q - 1e-9 * (q1 - q0), pack))
        total += weight / point[0]
    return total * h / 3.0


def discharge_to_cutoff(cells, capacity_Ah, usable_fraction, full_cell_V, nominal_cell_V,
                        empty_cell_V, cutoff_cell_V, load):
    """Hover time from a full pack to the cutoff, the landing reserve or the loss of hover.

    cells: cells in series [-]; capacity_Ah: rated capacity C [Ah]; usable_fraction: share a
    flight may use f_use [-] (C_use = f_use C, the rest is the landing reserve);
    full_cell_V, nominal_cell_V, empty_cell_V: open-circuit cell voltage at full, half and
    end of the usable charge [V]; cutoff_cell_V: loaded cell voltage that ends the flight [V];
    load: function V_oc [V] -> (pack current [A], bus voltage [V]) or None (module docstring).
    Returns a dict: minutes [min] (0 when it cannot start), ended_by ("cutoff", "reserve" or
    "thrust"), charge_used_Ah [Ah], usable_Ah [Ah], start_current_A / end_current_A [A] (None
    when it cannot start), mean_current_A [A], end_open_circuit_V [V], end_bus_V [V].
    Source: module docstring.
    """
    pack = {"cells": cells, "usable_Ah": capacity_Ah * usable_fraction, "full_cell_V": full_cell_V,
            "nominal_cell_V": nominal_cell_V, "empty_cell_V": empty_cell_V,
            "cutoff_cell_V": cutoff_cell_V}
    usable = pack["usable_Ah"]
    out = {"minutes": 0.0, "ended_by": None, "charge_used_Ah": 0.0, "usable_Ah": usable,
           "start_current_A": None, "end_current_A": None, "mean_current_A": None,
           "end_open_circuit_V": _open_circuit_V(0.0, pack), "end_bus_V": None}
    start = _flying(0.0, pack, load)
    if start is None:
        out["ended_by"] = _end_cause(0.0, pack, load)
        return out
    # the end of the flight: first grid point that does not fly, then bisection inside its cell
    q_end, ended_by = usable, "reserve"
    step = usable / GRID_STEPS
    for i in range(1, GRID_STEPS + 1):
        q = i * step
        if _flying(q, pack, load) is None:
            lo, hi = q - step, q
            for _ in range(BISECTION_STEPS):
                mid = 0.5 * (lo + hi)
                if _flying(mid, pack, load) is None:
                    hi = mid
                else:
                    lo = mid
            q_end, ended_by = lo, _end_cause(hi, pack, load)
            break
    half = 0.5 * usable  # the open-circuit curve bends at the nominal point
    hours = (_simpson_time_h(0.0, min(q_end, half), pack, load)
             + _simpson_time_h(half, q_end, pack, load))
    end = load(_open_circuit_V(q_end, pack))
    out.update({"minutes": 60.0 * hours, "ended_by": ended_by, "charge_used_Ah": q_end,
                "start_current_A": start[0], "end_current_A": end[0],
                "mean_current_A": q_end / hours if hours > 0.0 else start[0],
                "end_open_circuit_V": _open_circuit_V(q_end, pack), "end_bus_V": end[1]})
    return out
