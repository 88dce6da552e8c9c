"""Board-side loader for the liftcal power watch (MicroPython): check CONFIG, then make a Watch.

``watch = load()`` checks ``liftwatch_config.CONFIG`` with the same bounds the desktop applies
before it writes a bundle (liftwatch_layout.check, a copy of estimator/core/watch_layout.py)
and raises ConfigProblem with a sentence saying what is wrong and what to do - a CONFIG edited
by hand, copied from another vehicle's bundle or left over from an older liftcal version is
refused before the first flight, not in the air. Python ``assert`` is not used: compiled .mpy
files may drop it.

The layout module (names, bounds and messages: several KB of heap once imported) is needed
only for this one check, so load() imports it and lets it go again (sys.modules); so does this
module itself (about 0.5 KB: its code and messages) once it has made the Watch - import it
where you call load(), inside a function, as board_loop does, and it is freed at the next
collection. The watch itself keeps only the kernel, CONFIG and its own state
(benchmarks/watch_memory.py).
"""

import sys

from liftwatch import Watch


class ConfigProblem(Exception):
    """CONFIG cannot be used; the message names the value and the remedy."""


def load(config=None):
    """Check CONFIG (default: liftwatch_config.CONFIG) and return ``Watch(config)``.

    Raises ConfigProblem("liftwatch: ...") naming the index, the value and its bounds.
    """
    if config is None:
        from liftwatch_config import CONFIG
        config = CONFIG
    import liftwatch_layout
    try:
        problem = liftwatch_layout.check(config)
    except TypeError:
        problem = "CONFIG is not a tuple of integers"
    finally:
        del liftwatch_layout
        sys.modules.pop("liftwatch_layout", None)   # needed once: its heap is freed at the next collection
    if problem:
        raise ConfigProblem("liftwatch: " + problem + " (regenerate it with liftcal firmware)")
    sys.modules.pop("liftwatch_load", None)   # needed once too (a later import loads it again)
    return Watch(config)
