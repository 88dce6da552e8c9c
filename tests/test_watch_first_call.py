"""The kernel's first call (new-user trial 14, finding 17): update() with dt = 0 raises
sensor_fault (a sample with no time since the last is not a valid sample), and the next good
sample clears it; the board README says that dt_ms must be at least 1 and how to get the first.
"""

import os

from estimator.core.watch import Watch
from estimator.watch.config import as_tuple, make_config
from io_helpers import ROOT
from watch_helpers import demo_fit_params


def test_a_first_call_with_dt_0_is_a_sensor_fault_that_the_next_good_sample_clears():
    cfg = make_config(demo_fit_params())[0]
    w = Watch(as_tuple(cfg))
    v = cfg["v_min_mV"] + 1000
    assert w.update(0, 500, v, 20000) & 4
    assert not w.update(100, 500, v, 20001) & 4


def test_the_board_readme_says_dt_must_be_at_least_1():
    with open(os.path.join(ROOT, "firmware_port", "README.md"), encoding="utf-8") as fh:
        text = " ".join(fh.read().split())
    assert "`dt_ms` must be at least 1: a call with 0" in text
    assert "read the clock once before the first call and pass the time since then" in text
