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
        if self.positive and not si > 0:
            self.fail("must be above zero, got %r" % (value,), param, ctx)
        return si
