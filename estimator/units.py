"""Quantities typed by a person (``850g``, ``10in``, ``1400m``) converted to SI.

Units are converted here, at the edge, and nowhere else. Conversion factors are
exact by definition (NIST SP 811, Appendix B) unless noted.
"""

import math
import re

from estimator.errors import InputError, shorten

from estimator.core.constants import CELSIUS_ZERO_K, STANDARD_GRAVITY_M_S2  # one home: the core

# exact by definition (NIST SP 811, appendix B): 1 in = 0.0254 m, 1 ft = 0.3048 m, 1 lb = 0.45359237 kg
INCH_M = 0.0254
FOOT_M = 0.3048
POUND_KG = 0.45359237

# kind -> {suffix: (scale, offset)} so that SI = value * scale + offset
_UNITS = {
    "mass": {"kg": (1.0, 0.0), "g": (1e-3, 0.0), "lb": (POUND_KG, 0.0), "oz": (POUND_KG / 16.0, 0.0)},
    "length": {"m": (1.0, 0.0), "cm": (1e-2, 0.0), "mm": (1e-3, 0.0), "in": (INCH_M, 0.0), "ft": (FOOT_M, 0.0)},
    "altitude": {"m": (1.0, 0.0), "km": (1e3, 0.0), "ft": (FOOT_M, 0.0)},
    "force": {
        "N": (1.0, 0.0), "mN": (1e-3, 0.0), "gf": (1e-3 * STANDARD_GRAVITY_M_S2, 0.0),
        "g": (1e-3 * STANDARD_GRAVITY_M_S2, 0.0), "kgf": (STANDARD_GRAVITY_M_S2, 0.0),
        "lbf": (POUND_KG * STANDARD_GRAVITY_M_S2, 0.0),
    },
    "power": {"W": (1.0, 0.0), "kW": (1e3, 0.0), "mW": (1e-3, 0.0)},
    "temperature": {"C": (1.0, 0.0), "degC": (1.0, 0.0), "K": (1.0, -CELSIUS_ZERO_K), "F": (5.0 / 9.0, -32.0 * 5.0 / 9.0)},
    "pressure": {"Pa": (1.0, 0.0), "hPa": (100.0, 0.0), "kPa": (1e3, 0.0), "mbar": (100.0, 0.0), "bar": (1e5, 0.0)},
    "density": {"kg/m3": (1.0, 0.0), "kg/m^3": (1.0, 0.0)},
    "percent": {"%": (1.0, 0.0), "pct": (1.0, 0.0)},
    "voltage": {"V": (1.0, 0.0), "mV": (1e-3, 0.0)},
    "current": {"A": (1.0, 0.0), "mA": (1e-3, 0.0)},
    "capacity": {"Ah": (1.0, 0.0), "mAh": (1e-3, 0.0)},
    "ratio": {"": (1.0, 0.0)},
    "fraction": {"": (1.0, 0.0), "%": (0.01, 0.0)},
    "resistance": {"ohm": (1.0, 0.0), "mohm": (1e-3, 0.0), "mOhm": (1e-3, 0.0)},
    "time": {"s": (1.0, 0.0), "min": (60.0, 0.0), "h": (3600.0, 0.0)},
}
# other spellings of units people write, -> the spelling of the tables here and of the CSV
# column tables: the micro sign (U+00B5) and the Greek small mu (U+03BC) both mean micro, the
# per-mille sign, degree signs, the ohm sign (U+2126) and capital omega (U+03A9), a product
# of units written with a middle dot, a space or nothing (torque in N*m)
UNIT_SPELLINGS = {
    "\u00b5s": "us", "\u03bcs": "us", "\u2030": "permille", "\u00b0C": "C", "\u2103": "C", "\u00b0F": "F",
    "\u2126": "ohm", "\u03a9": "ohm", "m\u2126": "mohm", "m\u03a9": "mohm",
    "N\u00b7m": "N*m", "N m": "N*m", "Nm": "N*m", "pct": "%",
}


def unit_spelling(text):
    """A unit as written (``µs``, ``°C``, ``N·m``) in the spelling liftcal's tables use
    (``us``, ``C``, ``N*m``); any other text comes back stripped, unchanged."""
    text = text.strip()
    return UNIT_SPELLINGS.get(text, text)


# the unit assumed when a person types a bare number
DEFAULT_UNIT = {
    "mass": "kg", "length": "m", "altitude": "m", "force": "N", "power": "W", "temperature": "C",
    "pressure": "Pa", "density": "kg/m3", "percent": "%", "voltage": "V", "current": "A",
    "capacity": "Ah", "ratio": "", "fraction": "", "resistance": "ohm", "time": "s",
}
_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*([A-Za-z%/^0-9\u00b5\u03bc\u00b0\u2030\u2103\u2126\u03a9]*)\s*$")


def parse_quantity(text, kind, what="value"):
    """Parse ``text`` such as ``850g`` as a quantity of ``kind`` and return it in SI.

    Temperature is returned in degrees Celsius (the SI-derived unit people type);
    callers convert to kelvin. Raises InputError naming ``what`` on an unknown
    suffix or an unreadable number.
    """
    if isinstance(text, (int, float)):
        return float(text)
    m = _NUMBER.match(str(text))
    table = _UNITS[kind]
    if not m:
        raise InputError("%s: cannot read %s as a number with a unit (e.g. 1%s)"
                         % (what, shorten(str(text)), DEFAULT_UNIT[kind]))
    value, suffix = float(m.group(1)), unit_spelling(m.group(2)) or DEFAULT_UNIT[kind]
    if suffix not in table and not any(table):  # a plain number (a ratio): no unit at all
        hint = " (%s%% is %g)" % (m.group(1), value / 100.0) if suffix in ("%", "pct") else ""
        raise InputError("%s: %s: takes a plain number without a unit%s"
                         % (what, shorten(str(text)), hint))
    if suffix not in table:
        # a mass unit where a force is read ('g' reads as gf): name its weight's unit (new-user
        # trial 11, finding 6: 850g was taken, 85kg refused without a word why)
        weight = "; %s is a mass: its weight is %s%sf" % (suffix, m.group(1), suffix) \
            if kind == "force" and suffix in ("kg", "lb") else ""
        # the same letters in another case ('mah' for 'mAh': new-user trial 12, finding 14)
        cased = [u for u in table if u and u.lower() == suffix.lower()]
        weight += "; units are case-sensitive: did you mean %s%s?" % (m.group(1), cased[0]) if len(cased) == 1 else ""
        raise InputError("%s: unknown unit %s in %s; use one of %s%s"
                         % (what, shorten(suffix), shorten(text), ", ".join(repr(u) for u in table if u), weight))
    scale, offset = table[suffix]
    if not math.isfinite(value):
        raise InputError("%s: %s is not a finite number" % (what, shorten(text)))
    return value * scale + offset



def unit_factors(kind, names):
    """{unit: (scale, offset)} for the named units of ``kind`` (SI = value * scale + offset),
    in the order named, from the one table here: a file's column takes these units
    (estimator.bench.columns)."""
    return {name: _UNITS[kind][name] for name in names}


def unit_conversion(kind, unit):
    """(scale, offset) taking a value in ``unit`` (any spelling unit_spelling knows) of ``kind``
    to SI (SI = value * scale + offset), or None for a unit the table of that kind lacks."""
    return _UNITS[kind].get(unit_spelling(unit)) if unit else None


_SIZE = re.compile(r"^\s*((?:\d+\.?\d*|\.\d+))\s*[xX*]\s*((?:\d+\.?\d*|\.\d+))\s*([A-Za-z]*)\s*$")
# a propeller size without a unit is in inches: the trade lists propellers that way (10x4.5)
SIZE_DEFAULT_UNIT = "in"
# a size without a unit above this many inches (1 m) is no multirotor propeller: most often
# millimetres (254x114 is a 10x4.5 in propeller in mm); the largest agricultural rotors are
# about 30-40 in (common practice)
SIZE_BARE_MAX_IN = 40.0


def parse_propeller_size(text, what="size"):
    """Parse a propeller size ``DIAMETERxPITCH[unit]`` (``10x4.5in``, ``254x114mm``) to metres.

    Returns (diameter [m], pitch [m]). Without a unit both numbers are inches, as propellers
    are listed in the trade. Raises InputError naming ``what`` on anything else.
    """
    m = _SIZE.match(str(text)) if isinstance(text, str) else None
    if not m:
        raise InputError("%s: cannot read %s as a propeller size DIAMETERxPITCH with a unit, e.g. "
                         "\"10x4.5in\" or \"254x114mm\"" % (what, shorten(str(text))))
    unit = m.group(3) or SIZE_DEFAULT_UNIT
    if not m.group(3) and float(m.group(1)) > SIZE_BARE_MAX_IN:
        mm = float(m.group(1)) * 1e-3
        raise InputError("%s: %s has no unit, so it reads as inches (%s in = %.3g m), larger than any "
                         "multirotor propeller; did you mean %smm (%.3g m)? write the unit: \"%smm\" "
                         "or \"%sin\"" % (what, shorten(str(text)), m.group(1), float(m.group(1)) * INCH_M,
                                          str(text).strip(), mm, str(text).strip(), str(text).strip()))
    if unit not in _UNITS["length"]:
        raise InputError("%s: unknown unit %s in %s; use one of %s"
                         % (what, shorten(unit), shorten(text), ", ".join(repr(u) for u in _UNITS["length"])))
    scale = _UNITS["length"][unit][0]
    return float(m.group(1)) * scale, float(m.group(2)) * scale


def size_parts(text):
    """The parts of a propeller size as written: (diameter, pitch, unit) as text ("22", "7.4",
    "m"; the unit "" when none is written), or None when ``text`` is no DIAMETERxPITCH."""
    m = _SIZE.match(str(text)) if isinstance(text, str) else None
    return m.groups() if m else None


def plain_number(x, digits=4, trim=False):
    """x with ``digits`` significant digits in plain decimal notation (15410, 7.076, 0.01241),
    never the exponent form a person misreads (1.541e+04); trim: drop trailing zeros after
    the decimal point (0.0210 -> 0.021, 9.50 -> 9.5, 3.00 -> 3)."""
    if x == 0 or not math.isfinite(x):
        return "%g" % x
    decimals = max(0, digits - 1 - int(math.floor(math.log10(abs(x)))))
    text = "%.*f" % (decimals, round(x, decimals))
    if decimals and trim:
        text = text.rstrip("0").rstrip(".")
    return text


def rounded(x, digits=3):
    """plain_number with its digits beyond ``digits`` significant ones rounded to zero: 'about
    37200 rpm', not 37213 (new-user trial 14, finding 16)."""
    return plain_number(float("%.*g" % (digits, x)), digits, trim=True) if math.isfinite(x) else "%g" % x


# below this mass a vehicle's masses are shown in grams, as the payload table and firmware do [kg]
GRAMS_BELOW_KG = 1.0


def mass_text(kg, plan_kg):
    """A mass [kg] as text in the unit of its vehicle's size: grams with one decimal ('97.2 g') for
    a vehicle planned below GRAMS_BELOW_KG, else kilograms with three ('5.400 kg') (new-user trial
    12, finding 13: replay said 0.089 kg where firmware said 97.2 g). plan_kg: the planned mass [kg]."""
    return "%.1f g" % (1000.0 * kg) if plan_kg < GRAMS_BELOW_KG else "%.3f kg" % kg


def beside(value, threshold, below=True, digits=2):
    """value written with `digits` decimals, or with more where fewer would round it onto or past
    the threshold it is compared with ("2.00 is below 2" is never printed): below=True for a value
    reported as below the threshold, False for one above it. One copy for every flow: the
    sheet's margins, the payload table, a pack beyond a sweep (new-user trial 11, finding 10)."""
    for places in range(digits, 10):
        text = "%.*f" % (places, value)
        if (float(text) < threshold) if below else (float(text) > threshold):
            return text
    return repr(value)


# the one table of command units: a command [-] (a fraction of full command) as a bench CSV or
# flight log writes it: unit -> (scale, offset, JSON key suffix, text format), shown = offset +
# scale * u (a 1000..2000 us pulse, %, permille; '-' is u itself). The readers' table
# (csvtable.COMMAND_UNITS, u = value * s + o) is its inverse.
COMMAND_SHOWN = {"-": (1.0, 0.0, None, "%.3f"), "%": (100.0, 0.0, "pct", "%.1f %%"),
                 "permille": (1000.0, 0.0, "permille", "%.0f permille"), "us": (1000.0, 1000.0, "us", "%.0f us")}


# a command column's unit in words, for the likely-label hints of both readers
COMMAND_UNIT_WORDS = {"-": "a 0..1 fraction", "%": "percent (0..100)", "permille": "permille (0..1000)",
                      "us": "microseconds (1000..2000)"}


def likely_command_unit(low, high, unit):
    """The command unit (COMMAND_SHOWN) other than ``unit`` in which a command column's values
    low..high (as written) lie within 0..1 of full command (1 % either side) with the highest at
    least a tenth of it (a sweep or a flight goes well above idle), the one that puts the highest
    value nearest full command; None when no other unit fits. The likely label of a
    column whose values do not fit its own: 0..1000 labelled % -> 'permille', 1000..2000
    labelled % -> 'us', 0..100 labelled - -> '%'."""
    best, top = None, -1.0
    for other, (scale, offset, _, _) in COMMAND_SHOWN.items():
        lo, hi = (low - offset) / scale, (high - offset) / scale
        if other != unit and lo >= -0.01 and 0.1 <= hi <= 1.01 and hi > top:
            best, top = other, hi
    return best


# a relative humidity above 0 and at most this is likelier a fraction of 1 written where percent
# is read (0.4 for 40 %) than real air: the driest desert air measures a few per cent (from
# memory) [%]
HUMIDITY_FRACTION_MAX_PCT = 1.0


def humidity_fraction_note(humidity_pct, what):
    """A warning (str) when a relative humidity [%] lies above 0 and at most HUMIDITY_FRACTION_MAX_PCT,
    a fraction of 1 likely meant (new-user trial 11, finding 8: 0.4 was read as 0.4 % and shown as
    '0 %'), else None. what: where it was given ('--humidity', a JSON path, a comment line)."""
    if humidity_pct is None or not 0.0 < humidity_pct <= HUMIDITY_FRACTION_MAX_PCT:
        return None
    return ("%s: %g %% is a relative humidity drier than the driest desert air (a few per cent, from memory): "
            "a fraction of 1 meant? %g is %g %%; write %g%% if so (the air is worked out with %g %% as given)"
            % (what, humidity_pct, humidity_pct, 100.0 * humidity_pct, 100.0 * humidity_pct, humidity_pct))


# a site altitude given as a bare number of metres above this may be feet: few flying sites lie
# higher, and a feet reading of 3000..9000 (the schema's top) lands at 914..2743 m, an ordinary
# site (common practice) [m]
ALTITUDE_FEET_ABOVE_M = 3000.0


def altitude_feet_note(altitude_m, what):
    """A hint (str) when a site altitude [m] written as a bare number lies above
    ALTITUDE_FEET_ABOVE_M, where feet are likely meant ("7200 ft = 2195 m?"; new-user trial 13,
    finding 14), else None: a hint, not a refusal (a few sites are that high). what: where it was
    given (a JSON path). 1 ft = 0.3048 m (NIST SP 811, exact)."""
    if altitude_m is None or altitude_m <= ALTITUDE_FEET_ABOVE_M:
        return None
    return ("%s: %g m is higher than almost any flying site: feet meant? %g ft = %.0f m; if so write "
            "\"altitude\": \"%gft\" (the air is worked out at %g m as given)"
            % (what, altitude_m, altitude_m, altitude_m * FOOT_M, altitude_m, altitude_m))


def counted(n, noun):
    """'1 rotor', '4 rotors': a whole number of things with the noun in agreement (new-user trial 14,
    finding 11: '1 rotors')."""
    return "%d %s%s" % (n, noun, "" if n == 1 else "s")


def command_text(u, unit, span=False):
    """A command [-] written in a command unit (COMMAND_SHOWN), as a bench CSV's command column
    has it ('-' as the fraction to three decimals); span=True for a difference of commands (no
    1000 us offset). Both flows write commands in a sweep's own unit with it (the fit, and the
    pre-flight warnings for a vehicle on a fitted set)."""
    scale, offset, _, form = COMMAND_SHOWN.get(unit, COMMAND_SHOWN["-"])
    return form % ((0.0 if span else offset) + scale * u)


def commands_in_unit(values, unit):
    """Commands in a sweep's command unit, as JSON keys with the unit in the name, beside the
    0..1 values they come from: {key: command [-], [low, high] or None} -> {key_us: 1000 +
    1000 u, ...} (key_pct for %, key_permille); {} for '-' (the values are already in it)."""
    if COMMAND_SHOWN.get(unit, COMMAND_SHOWN["-"])[2] is None:
        return {}
    scale, offset, suffix, _ = COMMAND_SHOWN[unit]

    def shown(u):  # 7 significant digits: a 0..1 value's 6 and no float tail (14.0857, not 14.085700000000001)
        if isinstance(u, (list, tuple)):
            return [shown(x) for x in u]
        return None if u is None else float("%.7g" % (offset + scale * u))

    return {"%s_%s" % (key, suffix): shown(u) for key, u in values.items()}
