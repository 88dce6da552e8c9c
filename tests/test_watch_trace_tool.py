"""The diagnosis aid benchmarks/watch_trace.py reads CONFIG by name, so a change of the layout cannot
break its header (it indexed CONFIG with numbers of an older layout, 131, 143, 144, and raised
IndexError before printing a row). Checked against the layout's own names (estimator/core/watch_layout.py)
and the values make_config writes; no physics value is checked here."""

import importlib.util
import os
import sys

from estimator.core.watch_layout import INDEX
from estimator.watch.config import as_tuple, make_config
from watch_helpers import demo_fit_params, demo_vehicle

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def _trace_module():
    sys.path.insert(0, os.path.join(ROOT, "benchmarks"))
    spec = importlib.util.spec_from_file_location("watch_trace", os.path.join(ROOT, "benchmarks", "watch_trace.py"))
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


def test_trace_header_reads_config_by_name():
    cfg = as_tuple(make_config(demo_fit_params(), demo_vehicle(), {"settle_s": 3.0, "block_s": 0.4})[0])
    line = _trace_module().config_line(cfg)
    assert "settle 3000 ms" in line and "block 400 ms" in line
    assert "floor %d permille" % cfg[INDEX["noise_floor_permille"]] in line
    assert "k_max %d permille" % cfg[INDEX["cusum_k_max_permille"]] in line
