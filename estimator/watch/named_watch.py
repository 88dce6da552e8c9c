"""The kernel's Watch with its outputs readable by name (desktop only).

The kernel (estimator/core/watch.py) keeps its outputs in its block state list, ``w.data`` at
the indices of watch_layout.OUTPUT_AT: on the board a name per output would be one more qstr on
the heap (DEVELOPERS.md, "Heap on the board"). Desktop code reads them by name through this
subclass, which adds nothing but the names.
"""

from estimator.core import watch_layout as layout
from estimator.core.watch import Watch

_OUT = dict(layout.OUTPUT_AT)


class NamedWatch(Watch):
    """Watch (CONFIG tuple) with its outputs as read-only properties: mass_g [g], sigma_permille
    [1/1000], residual_permille [1/1000], thrust_mN [mN], hover_permille [1/1000], scale [1/1000]."""

    mass_g = property(lambda w: w.data[_OUT["mass_g"]])
    sigma_permille = property(lambda w: w.data[_OUT["sigma_permille"]])
    residual_permille = property(lambda w: w.data[_OUT["residual_permille"]])
    thrust_mN = property(lambda w: w.data[_OUT["thrust_mN"]])
    hover_permille = property(lambda w: w.data[_OUT["hover_permille"]])
    scale = property(lambda w: w.data[_OUT["scale"]])
