"""A propeller size from a vehicle file ("size": "10x4.5in"), read and judged as a whole.

estimator.units reads the size; here a size written with a unit whose diameter no propeller has
(outside the vehicle schema's propeller.diameter_m) is refused with the unit that makes the whole
size a propeller, the trade's inches first (common practice: sizes are listed in inches).
"""

from estimator.errors import InputError
from estimator.jsonio import load_schema, within
from estimator.units import parse_propeller_size, parse_quantity, size_parts

# the units a size whose diameter is no propeller's is tried in, the trade's inches first
SIZE_SLIP_UNITS = ("in", "mm", "cm", "m")
_LENGTH_WORDS = {"in": "inches", "mm": "millimetres", "cm": "centimetres", "m": "metres", "ft": "feet"}


def read_size(text, what):
    """(diameter [m], pitch [m]) of a size (units.parse_propeller_size), refused when written with
    a unit and its diameter is outside the vehicle schema's propeller.diameter_m, naming the first
    unit of SIZE_SLIP_UNITS that puts diameter and pitch inside the schema: "22x7.4m" -> "22x7.4in"
    (new-user trial 13, finding 10: the schema's check blamed the pitch, 7.4 m, with a cm hint).
    what: where the size was given, for the message. Raises InputError."""
    diameter_m, pitch_m = parse_propeller_size(text, what)
    d, p, unit = size_parts(text)
    props = load_schema("vehicle.schema.json")["properties"]["propeller"]["properties"]
    if not unit or within(diameter_m, props["diameter_m"]):
        return diameter_m, pitch_m
    hint = ": check the size and its unit"
    for other in SIZE_SLIP_UNITS:
        d_m, p_m = parse_quantity(d + other, "length"), parse_quantity(p + other, "length")
        if other != unit and within(d_m, props["diameter_m"]) and within(p_m, props["pitch_m"]):
            hint = "; written in %s: %s meant? \"%sx%s%s\" = %.4g m x %.4g m" % (
                _LENGTH_WORDS.get(unit, unit), _LENGTH_WORDS[other], d, p, other, d_m, p_m)
            break
    raise InputError("%s: \"%s\" gives a diameter of %.4g m, outside the %g..%g m of a propeller%s"
                     % (what, str(text).strip(), diameter_m, props["diameter_m"]["minimum"],
                        props["diameter_m"]["maximum"], hint))
