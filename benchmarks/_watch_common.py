"""Shared set-up for the watch benchmarks: the fitted demo parameter set and a bundle."""

import os
import sys
import tempfile

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, ROOT)
sys.path.insert(0, os.path.join(ROOT, "tests"))

from watch_helpers import demo_fit_params  # noqa: E402


def bundle_dir():
    from estimator.watch.bundle import write_bundle

    out = os.path.join(tempfile.mkdtemp(prefix="liftwatch-bench-"), "bundle")
    write_bundle(demo_fit_params(), out)
    return out
