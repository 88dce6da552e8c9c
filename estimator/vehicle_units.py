"""Vehicle-file quantities written with units: the short keys ("mass": "650g"), the propeller
size ("10x4.5in") and the pack's "6S", turned into the SI keys of schemas/vehicle.schema.json.

A number without a unit on a key that does not name one (``"mass": 320`` or ``"mass": "320"``)
is refused, never read in SI: a builder who meant 1500 ft or 60 milliohm would get a wrong
answer without a word. The refusal's example is written in the unit the number most likely
meant for this vehicle (320 on a 3-inch quad: grams), from the same typical ranges the
pre-flight unit checks use (estimator/preflight/unit_checks.py imports them from here).
"""

import re

from estimator.core.constants import STANDARD_GRAVITY_M_S2
from estimator.core.momentum import disk_area_m2
from estimator.errors import InputError

# Hover disk loading of small multirotor propellers [N/m^2]: about 20 to 1500 (the schema's
# disk_loading_N_m2 description; a 2 kg quad on 10-inch propellers is near 100). Common practice.
DISK_LOADING_TYPICAL_N_M2 = (20.0, 1500.0)
# Flight packs weigh about 10 to 50 % of a multirotor's all-up mass, endurance builds up to
# about 50..70 % (common practice, from memory). A pack is judged by the span of masses its energy
# can have (CHEMISTRIES: at the chemistry's typical and at its best pack specific energy): it looks
# like a slip only when even the lightest such pack weighs more than 70 % of the vehicle, or the
# heaviest less than 3 % (a little wider than the usual band). Trial 9: a 14 kg octo's 12S 32 Ah
# LiPo (1421 Wh) weighs 67.6 % at 150 Wh/kg, 50.7 % at 200 Wh/kg: an ordinary heavy lifter.
PACK_MASS_SHARE_USUAL = (0.03, 0.7)
# The lithium chemistries a flight pack is made of, told apart by the cell voltages the vehicle
# file gives, the first row that matches: (word, typical nominal cell voltage [V], typical pack
# specific energy [Wh/kg], best pack specific energy [Wh/kg], read when nominal_cell_V <= [V], and
# empty_cell_V <= [V] (None: any)). All common practice, from memory: LiFePO4 cells sit at
# 3.2..3.3 V nominal (drained to 2.5..2.8 V), packs about 90..120 Wh/kg, the best near 140;
# Li-ion cylindrical cells (18650, 21700) near 3.6 V nominal, drained to about 3.0 V, packs about
# 250 Wh/kg, the best cells near 260; LiPo (and LiHV) cells 3.7 V nominal (3.85 V), stopped near
# 3.5 V, packs about 150 Wh/kg, large packs up to about 200. The one table: the pre-flight
# pack-energy checks and the bare-capacity unit guess read it.
CHEMISTRIES = (
    ("LiFePO4", 3.2, 100.0, 140.0, 3.4, None),
    ("Li-ion", 3.6, 250.0, 260.0, 3.65, 3.2),
    ("LiPo", 3.7, 150.0, 200.0, None, None),
)


def pack_chemistry(nominal_cell_V, empty_cell_V):
    """(chemistry word, typical nominal cell voltage [V], typical pack specific energy [Wh/kg]) of
    the first CHEMISTRIES row whose voltage limits [V] the cells meet (a voltage not given, None,
    meets no limit); LiPo when nothing matches. Common practice, from memory (CHEMISTRIES)."""
    return _chemistry_row(nominal_cell_V, empty_cell_V)[:3]


def _chemistry_row(nominal_cell_V, empty_cell_V):
    for row in CHEMISTRIES:
        nominal_max, empty_max = row[4], row[5]
        if nominal_max is not None and not (isinstance(nominal_cell_V, (int, float))
                                            and nominal_cell_V <= nominal_max):
            continue
        if empty_max is not None and not (isinstance(empty_cell_V, (int, float)) and empty_cell_V <= empty_max):
            continue
        return row
    return CHEMISTRIES[-1]


def pack_share_span(energy_Wh, mass_kg, nominal_cell_V, empty_cell_V):
    """(least, most) share [-] of an all-up mass ``mass_kg`` [kg] that a pack of ``energy_Wh`` [Wh]
    weighs: its energy over the best and over the typical pack specific energy of the chemistry its
    cell voltages [V] tell (CHEMISTRIES; common practice, from memory)."""
    _, _, typical_Wh_kg, best_Wh_kg = _chemistry_row(nominal_cell_V, empty_cell_V)[:4]
    return energy_Wh / best_Wh_kg / mass_kg, energy_Wh / typical_Wh_kg / mass_kg


def pack_share_usual(energy_Wh, mass_kg, nominal_cell_V, empty_cell_V):
    """True when a pack of ``energy_Wh`` [Wh] can weigh an ordinary share of ``mass_kg`` [kg]:
    its span of masses (pack_share_span) meets PACK_MASS_SHARE_USUAL."""
    least, most = pack_share_span(energy_Wh, mass_kg, nominal_cell_V, empty_cell_V)
    return least <= PACK_MASS_SHARE_USUAL[1] and most >= PACK_MASS_SHARE_USUAL[0]


def pack_energy_range(battery):
    """(chemistry word, typical, best pack specific energy [Wh/kg]) of a checked vehicle's battery
    block, from its cell voltages (CHEMISTRIES, common practice, from memory)."""
    word, _, typical_Wh_kg, best_Wh_kg = _chemistry_row(battery.get("nominal_cell_V"),
                                                        battery.get("empty_cell_V"))[:4]
    return word, typical_Wh_kg, best_Wh_kg


def pack_specific_energy(battery):
    """(chemistry word, specific energy [Wh/kg]) of a checked vehicle's battery block, from its cell
    voltages (pack_chemistry: CHEMISTRIES, common practice, from memory)."""
    word, _, specific_Wh_kg = pack_chemistry(battery.get("nominal_cell_V"), battery.get("empty_cell_V"))
    return word, specific_Wh_kg


# the loaded cutoff per cell builders set, by chemistry [V] (common practice, from memory: LiPo
# 3.3..3.5 V, nominal 3.7 V; cylindrical Li-ion 2.8..3.2 V, nominal 3.6 V; LiFePO4 2.5..2.9 V, 3.2 V)
USUAL_CUTOFF_CELL_V = {"LiPo": (3.3, 3.5), "Li-ion": (2.8, 3.2), "LiFePO4": (2.5, 2.9)}


def cutoff_above_nominal(battery, source, below_empty_V):
    """The one-line refusal of a loaded cutoff at or above the nominal cell voltage: a loaded cell
    sits below its open-circuit voltage, so a nominal pack would be below its cutoff at rest.
    battery: cell voltages [V]; the chemistry (pack_chemistry) picks USUAL_CUTOFF_CELL_V; the
    default cutoff sits below_empty_V [V] below empty (vehicle.check_vehicle)."""
    word = pack_chemistry(battery["nominal_cell_V"], battery["empty_cell_V"])[0]
    lo, hi = USUAL_CUTOFF_CELL_V.get(word, USUAL_CUTOFF_CELL_V["LiPo"])
    cutoff, nominal, empty = battery["cutoff_cell_V"], battery["nominal_cell_V"], battery["empty_cell_V"]
    return ("%s: $.battery.cutoff_cell_V: the loaded cutoff %g V is at or above the nominal cell voltage "
            "%g V%s: a loaded cell sits below its open-circuit voltage, so a nominal pack would be below "
            "its cutoff at rest and nothing could fly: a typing slip? common practice for a %s pack is a "
            "loaded cutoff of about %.1f..%.1f V per cell (nominal %g V); leave the key out for %.2f V "
            "(empty_cell_V - %.1f V)"
            % (source, cutoff, nominal, " (and the empty %g V)" % empty if cutoff > empty else "",
               word, lo, hi, nominal, max(empty - below_empty_V, 0.8 * empty), below_empty_V))


# the units a bare number on a short key was most likely written in, default unit first:
# the ones builders write for each quantity (common practice)
_EXAMPLE_UNITS = {
    "mass": ("kg", "g"), "capacity": ("Ah", "mAh"), "resistance": ("ohm", "mohm"),
    "length": ("m", "mm", "in"), "altitude": ("m", "ft"), "temperature": ("C", "F"),
    "pressure": ("Pa", "hPa"), "current": ("A", "mA"), "voltage": ("V", "mV"), "percent": ("%",),
}

BARE_NUMBER = re.compile(r"^\s*[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?\s*$")

# where a key may be written without its unit, and the unit kind of every unit-bearing key:
# block -> {short key: (SI key, estimator.units kind)}; "" is the top level
UNIT_KEYS = {
    "": {"mass": ("mass_kg", "mass"), "avionics_current": ("avionics_current_A", "current")},
    "propeller": {"diameter": ("diameter_m", "length"), "pitch": ("pitch_m", "length")},
    "motor": {"resistance": ("resistance_ohm", "resistance"),
              "no_load_current": ("no_load_current_A", "current"),
              "max_current": ("max_current_A", "current")},
    "esc": {"max_current": ("max_current_A", "current")},
    "battery": {"capacity": ("capacity_Ah", "capacity"), "resistance": ("resistance_ohm", "resistance"),
                "full_cell": ("full_cell_V", "voltage"), "nominal_cell": ("nominal_cell_V", "voltage"),
                "empty_cell": ("empty_cell_V", "voltage"), "cutoff_cell": ("cutoff_cell_V", "voltage"),
                "usable": ("usable_fraction", "fraction"),
                "temperature": ("temperature_C", "temperature")},
    "site": {"altitude": ("altitude_m", "altitude"), "temperature": ("temperature_C", "temperature"),
             "pressure": ("pressure_Pa", "pressure"), "humidity": ("humidity_pct", "percent")},
}


def _json_path(block, key):
    return "$." + (block + "." if block else "") + key


_CELLS_WRITTEN = re.compile(r"\s*([0-9]{1,3})\s*[sS]\s*$")
# the two ways a vehicle file gives a propeller by its geometry (trial 5, item 7)
SIZE_EXAMPLE = '"size": "31x16mm" (or "10x4.5in")'
PARTS_EXAMPLE = '"diameter" and "pitch" with units, e.g. "31mm" and "16mm" (or ct and cp from a measurement)'
_ONE_LENGTH = re.compile(r"^\s*[0-9]*\.?[0-9]+\s*[A-Za-z]+\s*$")
_ONE_LENGTH_PARTS = re.compile(r"^\s*([0-9]*\.?[0-9]+)\s*([A-Za-z]+)\s*$")
_BARE_SIZE = re.compile(r"^[\s0-9.xX*]+$")


def _size_example(size, pitch):
    """'"size": "31x16mm"' from a diameter and a pitch written in one unit, else SIZE_EXAMPLE."""
    m_size = _ONE_LENGTH_PARTS.match(size) if isinstance(size, str) else None
    m_pitch = _ONE_LENGTH_PARTS.match(pitch) if isinstance(pitch, str) else None
    if m_size and m_pitch and m_size.group(2) == m_pitch.group(2):
        return '"size": "%sx%s%s"' % (m_size.group(1), m_pitch.group(1), m_size.group(2))
    if m_size:
        return '"size": "%sxPITCH%s" (e.g. "31x16mm", "10x4.5in")' % (m_size.group(1), m_size.group(2))
    return SIZE_EXAMPLE


def propeller_notes(document, given):
    """Notes on how the propeller keys of a vehicle file were read (for the sheet), [] when plain.

    document: the normalised vehicle (SI keys); given: normalise's {SI path: (path, text)}.
    A size without a unit is read in inches, as the trade lists propellers (7x4 = 7 in x 4 in,
    1 in = 0.0254 m, NIST SP 811); with ct and cp given they are used and the pitch is not (it
    only feeds the blade element estimate that measured coefficients replace).
    """
    prop = document.get("propeller") if isinstance(document, dict) else None
    if not isinstance(prop, dict):
        return []
    out = []
    written = given.get("$.propeller.diameter_m")
    if written and written[0] == "$.propeller.size" and isinstance(written[1], str) \
            and _BARE_SIZE.match(written[1]):
        out.append('$.propeller.size: "%s" has no unit: read as inches ("%sin"), as propellers are listed'
                   % (written[1].strip(), written[1].strip()))
    if "ct" in prop and "cp" in prop and "pitch_m" in prop:
        where = given.get("$.propeller.pitch_m", ("$.propeller.pitch_m",))[0]
        out.append("$.propeller: ct and cp are given, so they are used; the pitch from %s is not (it "
                   "only feeds the estimate that measured coefficients replace)" % where)
    return out


def normalise(document, source):
    """Turn quantities written with units into the schema's SI keys; return (document, given).

    document: the loaded JSON (left unchanged; a converted copy is returned). A string on an
    SI key ("mass_kg": "650g") or on its short key ("mass": "650g") is parsed by
    estimator.units.parse_quantity; a bare number on an SI key stays as it is (the key names
    its unit); a bare number on a short key is refused (no unit to read it in). The propeller
    "size" ("10x4.5in") gives diameter_m and pitch_m. given: {JSON path of the SI key:
    (JSON path as written, text as written)} for each converted value. Raises InputError
    naming the file and the JSON path.
    """
    from estimator.propeller_size import read_size
    from estimator.units import parse_quantity

    if not isinstance(document, dict):
        return document, {}
    out = dict(document)
    given = {}
    for block, table in UNIT_KEYS.items():
        node = out if block == "" else out.get(block)
        if not isinstance(node, dict):
            continue
        if block:
            node = out[block] = dict(node)
        cells = node.get("cells") if block == "battery" else None
        if isinstance(cells, str) and _CELLS_WRITTEN.match(cells):
            # the trade writes a pack's series cell count as "6S" (common practice)
            node["cells"] = int(_CELLS_WRITTEN.match(cells).group(1))
            given[_json_path(block, "cells")] = (_json_path(block, "cells"), cells)
        if block == "propeller" and "size" in node:
            path = _json_path(block, "size")
            for key in ("diameter_m", "pitch_m", "diameter", "pitch"):
                if key in node:
                    raise InputError("%s: %s: the size and %s are both given; write the propeller one "
                                     "way: %s (diameter x pitch, one unit), or %s" % (
                                         source, path, _json_path(block, key),
                                         _size_example(node["size"], node.get("pitch")), PARTS_EXAMPLE))
            text = node.pop("size")
            if isinstance(text, str) and _ONE_LENGTH.match(text):
                raise InputError("%s: %s: \"%s\" is only a diameter; a size needs the pitch too: %s, or %s"
                                 % (source, path, text.strip(), _size_example(text, node.get("pitch")),
                                    PARTS_EXAMPLE))
            diameter, pitch = read_size(text, "%s: %s" % (source, path))
            node["diameter_m"], node["pitch_m"] = diameter, pitch
            given[_json_path(block, "diameter_m")] = (path, text)
            given[_json_path(block, "pitch_m")] = (path, text)
        for short, (key, kind) in table.items():
            if short in node and key in node:
                raise InputError("%s: %s: given twice, also as %s: keep one"
                                 % (source, _json_path(block, short), _json_path(block, key)))
            name = short if short in node else key
            if name not in node:
                continue
            value = node[name]
            path = _json_path(block, name)
            number = isinstance(value, (int, float)) and not isinstance(value, bool)
            bare_text = isinstance(value, str) and BARE_NUMBER.match(value) is not None
            if name == short and (number or bare_text) and kind in _EXAMPLE_UNITS:
                shown = '"%s" (a text)' % value.strip() if bare_text else "%r" % value
                raise InputError("%s: %s: %s has no unit: write it as text with its unit (e.g. "
                                 "\"%s%s\"), or did you mean %r for %r? (that key names its unit)"
                                 % (source, path, shown, _plain(value),
                                    likely_unit(kind, float(value), block, key, document), key, short))
            if isinstance(value, str):
                node[key] = parse_quantity(value, kind, "%s: %s" % (source, path))
                given[_json_path(block, key)] = (path, value)
            elif name == short:
                node[key] = value  # the schema names the wrong type at the SI key's path
                given[_json_path(block, key)] = (path, value)
            if name == short:
                del node[short]
    return out, given


def _plain(value):
    """A number as the person wrote it (320, 0.06), without a trailing .0."""
    text = str(value).strip()
    return text if isinstance(value, str) else "%g" % value


def _si(document, block, short, key, kind):
    """The SI value of a quantity of ``document`` written with its unit or on its SI key, or None."""
    from estimator.units import parse_propeller_size, parse_quantity

    node = document if block == "" else document.get(block)
    if not isinstance(node, dict):
        return None
    try:
        if block == "propeller" and short == "diameter" and isinstance(node.get("size"), str):
            return parse_propeller_size(node["size"])[0]
        if isinstance(node.get(short), str) and not BARE_NUMBER.match(node[short]):
            return parse_quantity(node[short], kind)
        value = node.get(key)
        if isinstance(value, str):
            return parse_quantity(value, kind)
        return float(value) if isinstance(value, (int, float)) and not isinstance(value, bool) else None
    except (InputError, ValueError, TypeError):
        return None


def _in_schema(kind, value_si, block, key):
    from estimator.jsonio import load_schema, within

    node = load_schema("vehicle.schema.json")["properties"]
    node = node.get(key) if block == "" else node.get(block, {}).get("properties", {}).get(key)
    return node is None or within(value_si, node)


def in_vehicle_schema(path, value_si):
    """True when the vehicle schema accepts ``value_si`` at the JSON path ("$.motor.kv_rpm_per_V",
    "$.mass_kg"): a hint never suggests a value the schema would refuse (trial 8, item 5)."""
    parts = path.split(".")[1:]
    block, key = ("", parts[0]) if len(parts) == 1 else (parts[0], parts[1])
    return _in_schema(None, value_si, block, key)


def likely_unit(kind, value, block, key, document):
    """The unit a bare ``value`` on a short key most likely meant in this vehicle file.

    kind: estimator.units kind; block: the vehicle block ("" for the top level); key: the SI
    key (its schema bounds); document:
    the loaded vehicle file (for the sizes the guess needs). A mass is read in the unit that
    gives an ordinary hover disk loading on the file's propellers (DISK_LOADING_TYPICAL_N_M2),
    a capacity in the unit that gives a pack of an ordinary share of the all-up mass
    (pack_share_usual: PACK_MASS_SHARE_USUAL at the specific energies of its cells' chemistry); otherwise, and when the sizes are
    missing, the first of the quantity's usual units that puts the value inside the schema.
    """
    from estimator.units import parse_quantity

    units = _EXAMPLE_UNITS[kind]
    mass = _si(document, "", "mass", "mass_kg", "mass")
    for unit in units:
        si = parse_quantity("%r%s" % (value, unit), kind)
        if kind == "mass":
            diameter = _si(document, "propeller", "diameter", "diameter_m", "length")
            count = (document.get("rotors") or {}).get("count") if isinstance(document.get("rotors"), dict) else None
            if diameter and isinstance(count, int) and count > 0 and si > 0:
                loading = si * STANDARD_GRAVITY_M_S2 / (count * disk_area_m2(diameter))  # hover: T = m g
                if DISK_LOADING_TYPICAL_N_M2[0] <= loading <= DISK_LOADING_TYPICAL_N_M2[1]:
                    return unit
                continue
        if kind == "capacity" and block == "battery" and mass:
            cells = document["battery"].get("cells")
            cells = int(re.sub(r"[^0-9]", "", cells) or 0) if isinstance(cells, str) else cells
            if isinstance(cells, int) and cells > 0 and si > 0:
                # the file's own cells: their chemistry's specific energy, their nominal voltage
                # (the chemistry's typical one when the file gives none)
                nominal = _si(document, "battery", "nominal_cell", "nominal_cell_V", "voltage")
                empty = _si(document, "battery", "empty_cell", "empty_cell_V", "voltage")
                _, cell_V, _ = pack_chemistry(nominal, empty)
                if pack_share_usual(cells * (nominal or cell_V) * si, mass, nominal, empty):
                    return unit
                continue
        if _in_schema(kind, si, block, key):
            return unit
    return next((u for u in units if _in_schema(kind, parse_quantity("%r%s" % (value, u), kind), block, key)),
                units[0])


# a schema message's unit-slip hint (estimator.jsonio), made for a bare number in the key's unit
_SLIP_HINT = re.compile(r"; given in .+ instead of .+\? .*$")
# a value written with its unit: "178in", "178x89in" (a propeller size: the first number is the diameter)
_WRITTEN_WITH_UNIT = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)"
                                r"(\s*[xX*]\s*(?:\d+\.?\d*|\.\d+))?\s*([A-Za-z]+)\s*$")
_NUMBER_FIRST = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)")
_UNIT_WORDS = {"in": "inches", "mm": "millimetres", "cm": "centimetres", "m": "metres", "ft": "feet",
               "g": "grams", "kg": "kilograms", "lb": "pounds", "mAh": "mAh", "Ah": "Ah"}


def written_unit_slip(si_path, text, written, message):
    """The message with its unit-slip hint made for the unit the file wrote, or None to keep it.

    jsonio's hint reads the number in the key's SI unit as if written bare, so a value written
    with another unit ("size": "178x89in", 4.52 m) got a hint about its metre value in inches
    (trial 7, item 8). Here the written number is tried in the other units of its kind (the SI
    unit and the key's usual slips, not the unit written), inside the schema's bounds and nearest
    its typical value (jsonio.unit_slip): 178 in -> 178 mm = 0.178 m. The SI value is shown with
    4 significant digits. None when the text carries no unit other than the key's.
    """
    from estimator.jsonio import _KEY_UNITS, load_schema, unit_slip

    m = _WRITTEN_WITH_UNIT.match(text) if isinstance(text, str) else None
    leaf = si_path.rsplit(".", 1)[-1]
    si_unit = leaf.rsplit("_", 1)[-1] if "_" in leaf else ""
    if m is None or si_unit not in _KEY_UNITS or m.group(3) == si_unit:
        return None
    number, rest, unit = float(m.group(1)), m.group(2) or "", m.group(3)
    kind, slips = _KEY_UNITS[si_unit]
    if leaf.startswith("altitude"):
        kind, slips = "altitude", ("ft", "km")
    node = load_schema("vehicle.schema.json")
    for part in si_path[2:].split("."):
        node = (node.get("properties") or {}).get(part, {})
    head, _, tail = message.partition(written + ": ")
    value = _NUMBER_FIRST.match(tail)
    if value is None:
        return None
    head += written
    tail = _SLIP_HINT.sub("", tail[value.end():])
    shown = "%.4g" % float(value.group(1))
    what = "a diameter of " if rest and leaf == "diameter_m" else ""
    out = "%s: \"%s\" gives %s%s %s, which%s" % (head, text.strip(), what, shown, si_unit, tail)
    if not what:
        out = "%s: \"%s\" = %s %s%s" % (head, text.strip(), shown, si_unit, tail)
    slip = unit_slip(number, kind, tuple(u for u in (si_unit,) + tuple(slips) if u != unit), node)
    if slip is not None:
        meant = "%s%s%s" % (m.group(1), rest.replace(" ", ""), slip[0])
        out += "; written in %s: %s meant? \"%s\" = %.4g %s" % (
            _UNIT_WORDS.get(unit, unit), _UNIT_WORDS.get(slip[0], slip[0]), meant, slip[1], si_unit)
    return out
