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
        what = param.opts[0] if param is not None and param.opts else self.kind
        try:
            si = parse_quantity(value, self.kind, what)
        except InputError as exc:
            self.fail(str(exc), param, ctx)
        if self.positive and not si > 0:
            self.fail("%s must be above zero, got %r" % (what, value), param, ctx)
        return si
