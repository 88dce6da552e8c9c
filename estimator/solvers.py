"""The numerical solvers liftcal calls (the bench fits, the watch's thrust table), each behind a
check that what it is given is finite.

LAPACK (under numpy.linalg and scipy) writes its own complaint about a NaN or an infinity
straight to the process's standard output (' ** On entry to DLASCL parameter number 4 had an
illegal value') before numpy raises: Python cannot catch or redirect that text, and it broke
--json's one object on stdout (new-user trial 7, finding 3); where LAPACK stays silent, a NaN
comes back as a NaN solution (the watch's thrust table read it as a table of zeros). So nothing
non-finite may reach a solver: each wrapper here checks its arrays first and raises NotFinite
(a FloatingPointError, which bench.sweep turns into the fit's refusal and the command line's
last net into one error line) naming what was not finite. least_squares checks the start, the
residuals there and every Jacobian it is given (scipy's trust region steps already shrink away
from non-finite residuals). An edge module, so that every flow can use it; the modules of
estimator/ call only these (a test walks their source for direct calls).
"""

import numpy as np


class NotFinite(FloatingPointError):
    """A NaN or an infinity on its way into a solver."""


def finite(what, *arrays):
    """Raise NotFinite when any of the arrays holds a NaN or an infinity; what names them."""
    for x in arrays:
        if not np.all(np.isfinite(np.asarray(x, dtype=float))):
            raise NotFinite("a NaN or an infinity in the %s" % what)


def lstsq(design, target, what="least-squares system"):
    """numpy.linalg.lstsq(design, target, rcond=None) of finite arrays."""
    finite(what, design, target)
    return np.linalg.lstsq(design, target, rcond=None)


def pinv(matrix, what="matrix to invert"):
    """numpy.linalg.pinv of a finite matrix."""
    finite(what, matrix)
    return np.linalg.pinv(matrix)


def polyfit(x, y, degree, what="line to fit"):
    """numpy.polyfit(x, y, degree) of finite points."""
    finite(what, x, y)
    return np.polyfit(x, y, degree)


def nnls(design, target, what="non-negative least-squares system", **options):
    """scipy.optimize.nnls of finite arrays."""
    from scipy.optimize import nnls as scipy_nnls

    finite(what, design, target)
    return scipy_nnls(design, target, **options)


def least_squares(fun, x0, jac, what="model", **options):
    """scipy.optimize.least_squares(fun, x0, jac=jac, **options), refusing a start, its
    residuals or any Jacobian that is not finite (NotFinite)."""
    from scipy.optimize import least_squares as scipy_least_squares

    finite("start of the %s fit" % what, x0)
    finite("%s at the start of its fit" % what, fun(x0))

    def checked_jac(p, *args, **kwargs):
        j = jac(p, *args, **kwargs)
        finite("derivative of the %s" % what, j)
        return j

    return scipy_least_squares(fun, x0, jac=checked_jac, **options)
