"""Which single key, corrected by a common slip, makes a whole vehicle plausible.

A unit or decimal slip in one key (22 kg for 22 g, 2.6 kg for 0.26 kg, 31 in for 31 mm,
6500 mAh for 650 mAh) shows up in several checks at once, and a check that compares two keys
cannot say which of the two is wrong. So the vehicle is judged as a whole: four checks, each a
band of ordinary values, and each candidate key is corrected by each common slip (1000 for the
unit prefix, 10 for the decimal point, another length unit for a diameter) and judged again.
The key whose correction brings every check into its band is named first; when several do,
the one whose corrected vehicle sits nearest the middle of the bands. Nothing is said when the
vehicle as read is ordinary, or when no single correction makes it so.

The checks (sea-level standard air, 1.225 kg/m^3: the slips are factors of 10 and more):
- disk loading m g / (N A) within DISK_LOADING_TYPICAL_N_M2 (common practice);
- pack energy: its mass at the chemistry's typical to best pack specific energy
  (vehicle_units.pack_energy_range: LiFePO4 about 100..140 Wh/kg, Li-ion 250..260, LiPo 150..200,
  told apart by the cell voltages) meets PACK_MASS_SHARE_USUAL of the all-up mass, 3..70 % (common
  practice, from memory; endurance builds carry packs of up to about 70 %);
- motor power: the ideal hover power per rotor, T^1.5 / sqrt(2 rho A) (momentum theory,
  design notes sec. 3), at a figure of merit of FIGURE_OF_MERIT, at most the most a DC motor of
  winding resistance R gives on the nominal pack voltage V, V^2 / (4 R) (back-EMF V / 2, the
  maximum power transfer theorem);
- motor speed: the hover speed at a typical static CT (T = CT rho n^2 D^4) at most the motor's
  no-load speed Kv V.
"""

import math
import re

from estimator.core.constants import SEA_LEVEL_DENSITY_KG_M3, STANDARD_GRAVITY_M_S2
from estimator.core.momentum import disk_area_m2
from estimator.units import INCH_M, rounded
from estimator.vehicle import given_text
from estimator.vehicle_units import (DISK_LOADING_TYPICAL_N_M2, PACK_MASS_SHARE_USUAL, in_vehicle_schema,
                                    pack_energy_range)

RHO = SEA_LEVEL_DENSITY_KG_M3  # sea-level standard density [kg/m^3], US Standard Atmosphere 1976
FIGURE_OF_MERIT = 0.5  # a small rotor's hover figure of merit, generous for this check [-] (from memory)
TYPICAL_CT = 0.1  # a small propeller's static CT, n in rev/s (from memory)
# A corrected vehicle must be ordinary, not just possible, before a key is blamed (trial 8, items
# 4, 5): thrust-to-weight at least 2 (common practice) at the motor's no-load speed needs hover at
# most 1/sqrt(2) of it (T ~ n^2), and at the motor's most power (P ~ T^1.5) hover at most 2^-1.5 of it.
ORDINARY_SPEED_SHARE = 2.0 ** -0.5
ORDINARY_POWER_SHARE = 2.0 ** -1.5
# ... and its pack ordinary too (trial 10, finding 4: '2.2 Ah meant?' for a 10 kg 12S hexa, which
# would hover about 5 min at 10C): the corrected vehicle hovers at least ORDINARY_HOVER_MIN on the
# whole pack at the generous FIGURE_OF_MERIT with no motor or ESC loss (an upper bound: a 5-inch
# racer that flies 4..5 min reads about 11 here, a real hover is about half of it), and the pack's
# rating (max_discharge_C, when given) delivers thrust-to-weight 2 (2^1.5 the hover power, P ~ T^1.5).
ORDINARY_HOVER_MIN = 8.0
# A pack whose voltage turns the motors unloaded more than 1 / CELLS_SPEED_SHARE_MIN times the hover
# speed (at TYPICAL_CT) is far above what the rotors need: thrust-to-weight about 44 at the no-load
# speed (T ~ n^2), where the hottest racing quads reach about 10..15 (common practice, from memory);
# generous, as TYPICAL_CT may be off by half. Points at the cell count (cells_slip).
CELLS_SPEED_SHARE_MIN = 0.15
# slips per key: (factor applied to the value as read, words); 1 g = 1e-3 kg, 1 mAh = 1e-3 Ah
_SLIPS = {
    "$.mass_kg": ((1e-3, "the unit prefix: g, not kg"), (1e3, "the unit prefix: kg, not g"),
                  (0.1, "a misplaced decimal point"), (10.0, "a misplaced decimal point")),
    "$.battery.capacity_Ah": ((1e-3, "the unit prefix: mAh, not Ah"), (1e3, "the unit prefix: Ah, not mAh"),
                              (0.1, "a misplaced decimal point"), (10.0, "a misplaced decimal point")),
    "$.motor.kv_rpm_per_V": ((0.1, "a digit too many"), (10.0, "a digit short")),
}
# 1 in = units.INCH_M, 1 cm = 0.01 m, 1 mm = 0.001 m (NIST SP 811, exact)
_LENGTH_UNITS = (("in", INCH_M), ("cm", 0.01), ("mm", 0.001), ("m", 1.0))
# the diameter and the unit of a written size or diameter ("5.1x4.6cm", "31mm", "7x4")
_WRITTEN_LENGTH = re.compile(r"^\s*([0-9]*\.?[0-9]+)\s*(?:[xX*]\s*[0-9]*\.?[0-9]+)?\s*([A-Za-z]*)\s*$")


def _n(x):
    return rounded(x, 3)


# the checks each key enters: a corrected key is credited only with these (trial 8, item 4)
DEPENDS_ON = {"$.mass_kg": ("disk loading", "pack energy", "motor power", "motor speed"),
              "$.battery.capacity_Ah": ("pack energy",),
              "$.motor.kv_rpm_per_V": ("motor speed",),
              "$.propeller.diameter_m": ("disk loading", "motor power", "motor speed")}


def _facts(mass, count, diameter, bat, motor):
    """The vehicle's numbers the checks read: {check: (value, band lo, band hi, text)}."""
    thrust = mass * STANDARD_GRAVITY_M_S2 / count
    area = disk_area_m2(diameter)
    volts = bat["cells"] * bat["nominal_cell_V"]
    energy_Wh = volts * bat["capacity_Ah"]
    ideal_W = thrust ** 1.5 / math.sqrt(2.0 * RHO * area)
    hover_rpm = 60.0 * math.sqrt(thrust / (TYPICAL_CT * RHO * diameter ** 4))
    top_rpm = motor["kv_rpm_per_V"] * volts
    lo, hi = DISK_LOADING_TYPICAL_N_M2
    chemistry, specific_Wh_kg, best_Wh_kg = pack_energy_range(bat)
    least_share, most_share = energy_Wh / best_Wh_kg / mass, energy_Wh / specific_Wh_kg / mass
    share_lo, share_hi = PACK_MASS_SHARE_USUAL
    if most_share < share_lo:   # too light even at the typical specific energy
        weighs = "at most %s %% of it (at a typical %.0f Wh/kg" % (_n(100.0 * most_share), specific_Wh_kg)
    else:                       # judged by the least it can weigh, at the best specific energy
        weighs = "at least %s %% of it (at the best %.0f Wh/kg; %s %% at a typical %.0f Wh/kg" % (
            _n(100.0 * least_share), best_Wh_kg, _n(100.0 * most_share), specific_Wh_kg)
    pack_text = ("a %s Wh pack weighs %s; %s, told by its cell voltages; packs weigh %g..%g %% of a "
                 "multirotor, common practice, from memory)" % (_n(energy_Wh), weighs, chemistry,
                                                                100 * share_lo, 100 * share_hi))
    facts = {
        "disk loading": (thrust / area, lo, hi, "disk loading %s N/m^2 (small multirotors: %g..%g)"
                         % (_n(thrust / area), lo, hi)),
        # the share at the typical specific energy, against a band whose top is the most a pack
        # of the best specific energy may weigh (vehicle_units.pack_share_usual, one rule)
        "pack energy": (most_share, share_lo, share_hi * best_Wh_kg / specific_Wh_kg, pack_text),
        "motor speed": (hover_rpm / top_rpm, 0.0, 1.0, "hover needs about %s rpm, %g Kv on %s V "
                        "turns at most %s rpm" % (_n(hover_rpm), motor["kv_rpm_per_V"], _n(volts), _n(top_rpm))),
    }
    if motor["resistance_ohm"] > 0.0:     # an ideal (0 ohm) motor has no resistive power limit to judge
        most_W = volts ** 2 / (4.0 * motor["resistance_ohm"])
        facts["motor power"] = (ideal_W / FIGURE_OF_MERIT / most_W, 0.0, 1.0,
                                "hover needs about %s W per motor, a %g ohm motor on %s V gives at most %s W"
                                % (_n(ideal_W / FIGURE_OF_MERIT), motor["resistance_ohm"], _n(volts), _n(most_W)))
    return facts


def _ordinary(facts):
    """The facts with the motor bands narrowed to an ordinary vehicle's (ORDINARY_*_SHARE)."""
    out = dict(facts)
    for name, share in (("motor speed", ORDINARY_SPEED_SHARE), ("motor power", ORDINARY_POWER_SHARE)):
        if name in out:
            value, lo, _, text = out[name]
            out[name] = (value, lo, share, text)
    return out


def ordinary_pack(vehicle, key, value):
    """True when the vehicle with ``key`` corrected to ``value`` has an ordinary pack for its hover
    (ORDINARY_HOVER_MIN, the rating at thrust-to-weight 2); sea-level standard air as the checks."""
    mass = value if key == "$.mass_kg" else vehicle["mass_kg"]
    diameter = value if key == "$.propeller.diameter_m" else vehicle["propeller"]["diameter_m"]
    bat = vehicle["battery"]
    capacity_Ah = value if key == "$.battery.capacity_Ah" else bat["capacity_Ah"]
    count = vehicle["rotors"]["count"]
    thrust = mass * STANDARD_GRAVITY_M_S2 / count
    hover_W = count * thrust ** 1.5 / math.sqrt(2.0 * RHO * disk_area_m2(diameter)) / FIGURE_OF_MERIT
    volts = (value if key == "$.battery.cells" else bat["cells"]) * bat["nominal_cell_V"]
    if 60.0 * capacity_Ah * volts / hover_W < ORDINARY_HOVER_MIN:
        return False
    return "max_discharge_C" not in bat or 2.0 ** 1.5 * hover_W / volts <= capacity_Ah * bat["max_discharge_C"]


def _penalty(facts):
    """Sum of log10 distances outside each band (0 when every check is in its band)."""
    out = 0.0
    for value, lo, hi, _ in facts.values():
        if value > hi:
            out += math.log10(value / hi)
        elif lo > 0.0 and value < lo:
            out += math.log10(lo / value)
    return out


def _off_centre(facts):
    """How far the two two-sided bands' values sit from their middles (log10): tie-break."""
    out = 0.0
    for name in ("disk loading", "pack energy"):
        value, lo, hi, _ = facts[name]
        out += abs(math.log10(value / math.sqrt(lo * hi)))
    return out


def _candidates(vehicle):
    """(path as written, SI key path, corrected value, shown text, why) for each slip to try."""
    out = []
    values = {"$.mass_kg": vehicle["mass_kg"], "$.battery.capacity_Ah": vehicle["battery"]["capacity_Ah"],
              "$.motor.kv_rpm_per_V": vehicle["motor"]["kv_rpm_per_V"]}
    units = {"$.mass_kg": "kg", "$.battery.capacity_Ah": "Ah", "$.motor.kv_rpm_per_V": "Kv"}
    for path, slips in _SLIPS.items():
        for factor, why in slips:
            value = values[path] * factor
            out.append((path, path, value, "%.4g %s" % (value, units[path]), why))
    diameter = vehicle["propeller"]["diameter_m"]
    written = given_text(vehicle, "$.propeller.diameter_m")
    shown_path = "$.propeller.size" if isinstance(written, str) and "x" in written.lower() else "$.propeller.diameter_m"
    number, written_unit = diameter, "m"  # a bare number on diameter_m is metres
    m = _WRITTEN_LENGTH.match(written) if isinstance(written, str) else None
    if m:
        number, written_unit = float(m.group(1)), (m.group(2) or "in")  # a bare size is inches
    for unit, scale in _LENGTH_UNITS:
        if unit != written_unit:
            out.append((shown_path, "$.propeller.diameter_m", number * scale,
                        "%s m (%g %s)" % (_n(number * scale), number, unit), "%s, not %s" % (unit, written_unit)))
    for factor in (0.1, 10.0):
        out.append((shown_path, "$.propeller.diameter_m", diameter * factor, "%s m" % _n(diameter * factor),
                    "a misplaced decimal point"))
    return out


def _judge(vehicle, key=None, value=None):
    mass = value if key == "$.mass_kg" else vehicle["mass_kg"]
    diameter = value if key == "$.propeller.diameter_m" else vehicle["propeller"]["diameter_m"]
    bat = dict(vehicle["battery"])
    motor = dict(vehicle["motor"])
    if key in ("$.battery.capacity_Ah", "$.battery.cells"):
        bat[key.rsplit(".", 1)[1]] = value
    if key == "$.motor.kv_rpm_per_V":
        motor["kv_rpm_per_V"] = value
    return _facts(mass, vehicle["rotors"]["count"], diameter, bat, motor)


def whole_vehicle_slip(vehicle):
    """The key whose slip correction makes the whole vehicle plausible, or None (module docstring).

    vehicle: checked vehicle dict (SI keys). Returns a dict: path (as the file wrote it), key
    (SI JSON path), value (corrected, SI), shown (text), why (the slip), failing ([text] of the
    checks the vehicle as read fails), others ([(path, shown)] other corrections that also make
    it plausible, less typical).
    """
    facts = _judge(vehicle)
    if _penalty(facts) == 0.0:
        return None
    fits = []
    for path, key, value, shown, why in _candidates(vehicle):
        if value <= 0.0 or not in_vehicle_schema(key, value):  # never a value the schema refuses
            continue
        corrected = _ordinary(_judge(vehicle, key, value))
        if _penalty(corrected) == 0.0 and ordinary_pack(vehicle, key, value):
            fits.append((_off_centre(corrected), path, key, value, shown, why))
    if not fits:
        return None
    fits.sort(key=lambda f: f[0])
    _, path, key, value, shown, why = fits[0]
    failing = [text for value_, lo, hi, text in facts.values() if value_ > hi or (lo > 0.0 and value_ < lo)]
    others = []
    for f in fits[1:]:
        if f[1] != path and (f[1], f[4]) not in others:
            others.append((f[1], f[4]))
    return {"path": path, "key": key, "value": value, "shown": shown, "why": why,
            "failing": failing, "others": others}


def whole_vehicle_warning(vehicle, found):
    """The sheet's words for whole_vehicle_slip's result (starts with the JSON path)."""
    written = given_text(vehicle, found["key"])
    as_read = {"$.mass_kg": "%g kg" % vehicle["mass_kg"],
               "$.battery.capacity_Ah": "%g Ah" % vehicle["battery"]["capacity_Ah"],
               "$.motor.kv_rpm_per_V": "%g Kv" % vehicle["motor"]["kv_rpm_per_V"],
               "$.propeller.diameter_m": "%.3g m" % vehicle["propeller"]["diameter_m"]}[found["key"]]
    checks = [c for c in DEPENDS_ON[found["key"]]]
    named = checks[0] if len(checks) == 1 else ", ".join(checks[:-1]) + " and " + checks[-1]
    text = ("%s: %s%s does not fit the rest of the vehicle (%s): %s meant (%s)? with it the %s %s in "
            "%s: check this key first" % (found["path"], as_read, ' (written "%s")' % written if written else "",
                                          "; ".join(found["failing"]), found["shown"], found["why"], named,
                                          "falls" if len(checks) == 1 else "all fall",
                                          "its ordinary range" if len(checks) == 1 else "ordinary ranges"))
    if found["others"]:
        text += "; less likely: " + ", ".join("%s %s" % o for o in found["others"][:2])
    return text


def cells_slip(vehicle):
    """The smaller cell counts that make the whole vehicle ordinary when its pack has too many cells,
    or None (new-user trial 25, finding 2: 24 cells on a 350 g 3-inch quad were blamed on the
    capacity, and the cell count was never named).

    Judged only when the pack voltage is far above what the rotors need (the motor's no-load speed
    Kv V more than 1 / CELLS_SPEED_SHARE_MIN times the hover speed at TYPICAL_CT), which no capacity
    or mass explains, and the vehicle as read fails only checks the cell count enters (pack energy,
    motor speed, motor power), with no single slip of another key explaining it (whole_vehicle_slip;
    a capacity slip found there gives way: the voltage points at the cells). Every smaller cell count
    the schema takes is tried; those that bring every check into its ordinary band with an ordinary
    pack (_ordinary, ordinary_pack) and hover at least CELLS_SPEED_SHARE_MIN of the no-load speed are
    kept. Returns a dict: counts ([int], ascending), failing ([text] of the checks the vehicle as read
    fails), speed_share (hover speed over the no-load speed as read [-]), or None.
    """
    facts = _judge(vehicle)
    speed_share = facts["motor speed"][0]
    failing = {name: f for name, f in facts.items() if f[0] > f[2] or (f[1] > 0.0 and f[0] < f[1])}
    if speed_share >= CELLS_SPEED_SHARE_MIN or not failing or set(failing) - {"pack energy", "motor speed", "motor power"}:
        return None
    other = whole_vehicle_slip(vehicle)
    if other is not None and other["key"] != "$.battery.capacity_Ah":
        return None
    counts = [n for n in range(1, vehicle["battery"]["cells"]) if in_vehicle_schema("$.battery.cells", n)
              and _penalty(_ordinary(_judge(vehicle, "$.battery.cells", n))) == 0.0
              and _judge(vehicle, "$.battery.cells", n)["motor speed"][0] >= CELLS_SPEED_SHARE_MIN
              and ordinary_pack(vehicle, "$.battery.cells", n)]
    if not counts:
        return None
    return {"counts": counts, "failing": [f[3] for f in failing.values()], "speed_share": speed_share}


def cells_warning(vehicle, found):
    """The sheet's words for cells_slip's result (starts with the JSON path $.battery.cells)."""
    bat, motor = vehicle["battery"], vehicle["motor"]
    volts = bat["cells"] * bat["nominal_cell_V"]
    fast = ("%g Kv on %s V turns about %s times the hover speed unloaded, a pack voltage far above what these "
            "rotors need (ordinary vehicles: at most about %s times)"
            % (motor["kv_rpm_per_V"], _n(volts), _n(1.0 / found["speed_share"]), _n(1.0 / CELLS_SPEED_SHARE_MIN)))
    counts = found["counts"]
    shown = "%d" % counts[0] if len(counts) == 1 else "%d..%d" % (counts[0], counts[-1])
    return ("$.battery.cells: %d cells (%s V nominal) do not fit the rest of the vehicle (%s): with %s cells in "
            "series, and the capacity and the rest as read, the pack energy, motor speed and motor power all fall "
            "in their ordinary ranges: check the cell count first (the cells in series, the S of the pack: 4 for "
            "a 4S pack)" % (bat["cells"], _n(volts), "; ".join(found["failing"] + [fast]), shown))


def pack_share_warning(vehicle):
    """When the pack energy check fails and no single slip gives an ordinary vehicle
    (whole_vehicle_slip is None; e.g. the only correction that fits the bands would hover a 10 kg
    hexa about 5 min at 10C): the words that the pack does not fit, with no suggestion; else None.
    Starts with the JSON path (a unit_slip caveat: compare leaves such a row out of its verdict)."""
    value, lo, hi, text = _judge(vehicle)["pack energy"]
    if lo <= value <= hi or whole_vehicle_slip(vehicle) is not None:
        return None
    written = given_text(vehicle, "$.battery.capacity_Ah")
    return ("$.battery.capacity_Ah: %g Ah%s does not fit the rest of the vehicle (%s); no single unit or decimal "
            "slip gives an ordinary vehicle: check the capacity and the mass"
            % (vehicle["battery"]["capacity_Ah"], ' (written "%s")' % written if written else "", text))


def too_heavy_warning(vehicle):
    """When the vehicle as read fails only checks its mass enters and no single slip explains it
    (whole_vehicle_slip is None): the words that it is too heavy for its rotors, mass first; else
    None. Not a slip warning (it does not start with a JSON path)."""
    facts = _judge(vehicle)
    failing = [(name, f) for name, f in facts.items() if f[0] > f[2] or (f[1] > 0.0 and f[0] < f[1])]
    heavy = [name for name, f in failing if f[0] > f[2] and name in ("disk loading", "motor power", "motor speed")]
    if not failing or len(heavy) != len(failing) or whole_vehicle_slip(vehicle) is not None:
        return None
    return ("the vehicle looks too heavy for its rotors (%s) and no single unit or decimal slip explains it: "
            "check the mass first (%s), then the propeller size and the motor's Kv and winding "
            "resistance" % ("; ".join(f[3] for _, f in failing), given_text(vehicle, "$.mass_kg")
                            or "%s kg" % _n(vehicle["mass_kg"])))
