"""Quantities typed by a person (``850g``, ``10in``, ``1400m``) converted to SI.

Units are converted here, at the edge, and nowhere else. Conversion factors are
exact by definition (NIST SP 811, Appendix B) unless noted.
"""

import re

from estimator.errors import InputError

STANDARD_GRAVITY_M_S2 = 9.80665  # exact, CGPM 1901 / NIST SP 811

# kind -> {suffix: (scale, offset)} so that SI = value * scale + offset
_UNITS = {
    "mass": {"kg": (1.0, 0.0), "g": (1e-3, 0.0), "lb": (0.45359237, 0.0), "oz": (0.028349523125, 0.0)},
    "length": {"m": (1.0, 0.0), "cm": (1e-2, 0.0), "mm": (1e-3, 0.0), "in": (0.0254, 0.0), "ft": (0.3048, 0.0)},
    "altitude": {"m": (1.0, 0.0), "km": (1e3, 0.0), "ft": (0.3048, 0.0)},
    "force": {
        "N": (1.0, 0.0), "mN": (1e-3, 0.0), "gf": (1e-3 * STANDARD_GRAVITY_M_S2, 0.0),
        "g": (1e-3 * STANDARD_GRAVITY_M_S2, 0.0), "kgf": (STANDARD_GRAVITY_M_S2, 0.0),
        "lbf": (0.45359237 * STANDARD_GRAVITY_M_S2, 0.0),
    },
    "power": {"W": (1.0, 0.0), "kW": (1e3, 0.0), "mW": (1e-3, 0.0)},
    "temperature": {"C": (1.0, 0.0), "degC": (1.0, 0.0), "K": (1.0, -273.15), "F": (5.0 / 9.0, -32.0 * 5.0 / 9.0)},
    "pressure": {"Pa": (1.0, 0.0), "hPa": (100.0, 0.0), "kPa": (1e3, 0.0), "mbar": (100.0, 0.0), "bar": (1e5, 0.0)},
    "density": {"kg/m3": (1.0, 0.0), "kg/m^3": (1.0, 0.0)},
    "percent": {"%": (1.0, 0.0), "pct": (1.0, 0.0)},
    "voltage": {"V": (1.0, 0.0), "mV": (1e-3, 0.0)},
    "current": {"A": (1.0, 0.0), "mA": (1e-3, 0.0)},
    "capacity": {"Ah": (1.0, 0.0), "mAh": (1e-3, 0.0)},
    "ratio": {"": (1.0, 0.0)},
}
# the unit assumed when a person types a bare number
DEFAULT_UNIT = {
    "mass": "kg", "length": "m", "altitude": "m", "force": "N", "power": "W", "temperature": "C",
    "pressure": "Pa", "density": "kg/m3", "percent": "%", "voltage": "V", "current": "A",
    "capacity": "Ah", "ratio": "",
}
_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*([A-Za-z%/^0-9]*)\s*$")


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
        raise InputError("%s: cannot read %r as a number with a unit (e.g. 1%s)"
                         % (what, text, DEFAULT_UNIT[kind]))
    value, suffix = float(m.group(1)), m.group(2) or DEFAULT_UNIT[kind]
    if suffix not in table:
        raise InputError("%s: unknown unit %r in %r; use one of %s"
                         % (what, suffix, text, ", ".join(repr(u) for u in table if u)))
    scale, offset = table[suffix]
    return value * scale + offset


def unit_scale(kind, suffix):
    """Return the factor that converts ``suffix`` of ``kind`` to SI (no offset units)."""
    table = _UNITS[kind]
    if suffix not in table:
        raise KeyError(suffix)
    return table[suffix][0]
