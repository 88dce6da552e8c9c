"""click parameter types that read quantities with unit suffixes (``850g``, ``10in``)."""

import click

from estimator.errors import InputError
from estimator.names import FileName
from estimator.units import parse_quantity


class Quantity(click.ParamType):
    """A number with an optional unit suffix of one kind, converted to SI.

    ``positive=True`` refuses zero and negative values with the option's name;
    ``unit_example``: the unit is required (a bare number is refused, the example shown), for
    kinds where a bare number is easily meant in another unit (a job time in minutes).
    """

    def __init__(self, kind, positive=False, unit_example=None):
        self.kind = kind
        self.positive = positive
        self.unit_example = unit_example
        self.name = kind

    def convert(self, value, param, ctx):
        if isinstance(value, float):
            return value
        if self.unit_example is not None and _bare(value):
            self.fail_bare(value, param, ctx)
        # click's message already names the option: "Invalid value for '--diameter': ..."
        try:
            si = parse_quantity(value, self.kind, "")
        except InputError as exc:
            self.fail(str(exc).lstrip(": "), param, ctx)
        if si - si != 0.0:  # 1e999 reads as infinity
            self.fail("%r is not a finite number" % (value,), param, ctx)
        if self.positive and not si > 0:
            self.fail("must be above zero, got %r" % (value,), param, ctx)
        return si


    def fail_bare(self, value, param, ctx):
        """Refuse a bare number for a kind whose unit is required (unit_example)."""
        from estimator.errors import shorten

        self.fail("%s has no unit; write it with one, e.g. %s" % (shorten(str(value)), self.unit_example), param, ctx)


def _bare(value):
    """True when an option's text is a plain number without a unit ('5000', '-5')."""
    try:
        float(str(value))
    except ValueError:
        return False
    return True


class _FileNameType(click.ParamType):
    """A file or folder name: kept as given, printed through estimator.names.shown (one line,
    control characters escaped) wherever a message names it."""

    name = "file name"

    def convert(self, value, param, ctx):
        return value if isinstance(value, FileName) else FileName(value)


FILE_NAME = _FileNameType()


def _unit_in_name(param):
    """The unit an option's name ends with (--lag-ms -> 'ms'), or None."""
    opts = getattr(param, "opts", None) or []
    name = opts[0] if opts else ""
    tail = name.rsplit("-", 1)[-1] if name.count("-") > 2 else ""
    return tail if tail in ("ms", "s", "us", "V", "A", "W", "N", "m", "Hz") else None


class Number(click.ParamType):
    """A plain finite number, optionally within bounds; the error names the option.

    NaN, infinity and text are refused by click's "Invalid value for '--option'" line, so
    the person sees which option was wrong (not a later complaint about a file).
    ``bounds``: (low, high, where the bounds come from) or None.
    """

    name = "number"

    def __init__(self, bounds=None):
        self.bounds = bounds

    def convert(self, value, param, ctx):
        import math

        from estimator.errors import shorten

        if isinstance(value, float) and math.isfinite(value):
            number = value
        else:
            text = str(value).strip()
            unit = _unit_in_name(param)
            if unit and text.endswith(unit) and text[: -len(unit)].strip():
                text = text[: -len(unit)].strip()  # "60ms" for --lag-ms: the unit its name says
            try:
                number = float(text)
            except ValueError:
                self.fail("%s is not a number%s" % (shorten(str(value)),
                                                    "; this option takes a plain number in %s (its name "
                                                    "gives the unit)" % unit if unit else ""), param, ctx)
            if not math.isfinite(number):
                self.fail("%s is not a finite number (NaN and infinity are refused)" % shorten(str(value)),
                          param, ctx)
        if self.bounds is not None:
            lo, hi, source = self.bounds
            if not lo <= number <= hi:
                self.fail("%g is outside %g..%g (%s)" % (number, lo, hi, source), param, ctx)
        return number


class Bounded(Quantity):
    """A Quantity that also refuses values outside the sensible bounds of ``quantity``.

    The bounds live in schemas/vehicle.schema.json (estimator.vehicle.QUANTITIES); a bare
    number outside them gets the likely unit slip named ("10 m: did you mean 10in?");
    ``unit_example`` refuses a bare number altogether (Quantity).
    """

    def __init__(self, kind, quantity, positive=False, unit_example=None):
        Quantity.__init__(self, kind, positive, unit_example)
        self.quantity = quantity

    def convert(self, value, param, ctx):
        if self.unit_example is not None and not isinstance(value, float) and _bare(value):
            # a bare number outside the bounds gets its likely unit slip named first ("'12000' has
            # no unit: did you mean 12000ft?"), any other the units it needs
            from estimator.vehicle import check_quantity

            what = param.opts[0] if param is not None and param.opts else None
            si = float(str(value))
            if si - si != 0.0:  # nan, 1e999
                from estimator.errors import shorten

                self.fail("%s is not a finite number" % shorten(str(value)), param, ctx)
            check_quantity(self.quantity, parse_quantity(value, self.kind, ""), str(value), what, unit_required=True)
            self.fail_bare(value, param, ctx)
        si = Quantity.convert(self, value, param, ctx)
        if si is not None:
            from estimator.vehicle import check_quantity

            what = param.opts[0] if param is not None and param.opts else None
            typed = value if isinstance(value, str) else None
            check_quantity(self.quantity, si, typed, what)
            if ctx is not None:  # what was typed, for checks across options (disk loading)
                ctx.meta["liftcal.typed." + self.quantity] = typed
        return si
