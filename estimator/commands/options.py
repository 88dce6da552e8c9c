"""click parameter types that read quantities with unit suffixes (``850g``, ``10in``)."""

import click

from estimator.errors import InputError
from estimator.units import parse_quantity


class Quantity(click.ParamType):
    """A number with an optional unit suffix of one kind, converted to SI.

    ``positive=True`` refuses zero and negative values with the option's name.
    """

    def __init__(self, kind, positive=False):
        self.kind = kind
        self.positive = positive
        self.name = kind

    def convert(self, value, param, ctx):
        if isinstance(value, float):
            return value
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
            try:
                number = float(str(value).strip())
            except ValueError:
                self.fail("%s is not a number" % shorten(str(value)), param, ctx)
            if not math.isfinite(number):
                self.fail("%s is not a finite number (NaN and infinity are refused)" % shorten(str(value)),
                          param, ctx)
        if self.bounds is not None:
            lo, hi, source = self.bounds
            if not lo <= number <= hi:
                self.fail("%g is outside %g..%g (%s)" % (number, lo, hi, source), param, ctx)
        return number
