"""A number written without its unit where liftcal requires one: an altitude (5000 m and
5000 ft are 30 % apart in air density) and an air temperature (30 C or 30 F), alike on the
command line (`air`, `static`, `hover`, `fit` options) and in a bench sweep's comments
(new-user trial 9, finding 8; trial 12, finding 1: '# altitude: 5280', meant in feet, was read
as 5280 m without a word)."""

from estimator.errors import InputError, shorten
from estimator.units import parse_quantity

# bench CSV comment key -> (estimator.vehicle.QUANTITIES name, estimator.units kind, the units
# the message offers): the comments a bare number is refused on, as on the command line
COMMENT_UNITS = {"altitude": ("altitude", "altitude", ("m", "ft")),
                 "temperature": ("temperature", "temperature", ("C", "F"))}


def is_bare(text):
    """True when ``text`` is a plain number without a unit ('5280', '-5', ' 21 ')."""
    try:
        float(str(text))
    except ValueError:
        return False
    return True


def refuse_bare_comment(key, text, where):
    """Refuse a bench CSV comment ``# key: text`` whose value has no unit, when ``key`` is in
    COMMENT_UNITS; else return. A number outside the sensible bounds gets its likely unit slip
    named first (estimator.vehicle.check_quantity), as on the command line. where: 'FILE: line
    N: # key'. Raises InputError."""
    from estimator.vehicle import check_quantity

    if key not in COMMENT_UNITS or not is_bare(text):
        return
    quantity, kind, units = COMMENT_UNITS[key]
    number = str(text).strip()
    value = float(number)
    if value - value != 0.0:  # nan, inf
        raise InputError("%s: %s is not a finite number" % (where, shorten(number)))
    check_quantity(quantity, parse_quantity(number, kind, where), number, where, unit_required=True)
    raise InputError("%s: %s has no unit; write it with one, e.g. %s (as the --%s option "
                     "and a vehicle file's site need)"
                     % (where, shorten(number), " or ".join("'# %s: %s%s'" % (key, number, u) for u in units), key))
