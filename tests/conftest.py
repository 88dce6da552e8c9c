"""Shared pytest set-up.

Property-based tests (hypothesis) run derandomized under CI (CI=true), so a submission's
verdict does not depend on the luck of the draw; locally they explore new examples each run.
Set HYPOTHESIS_PROFILE=explore to get random exploration under CI too.
"""

import json
import os

import pytest
from hypothesis import settings

settings.register_profile("ci", derandomize=True, print_blob=True)
settings.register_profile("explore")
if os.environ.get("CI") and os.environ.get("HYPOTHESIS_PROFILE") != "explore":
    settings.load_profile("ci")


@pytest.fixture(scope="session")
def params_file(tmp_path_factory):
    """The demo vehicle's fitted parameter set as a file (tests/watch_helpers.demo_fit_params),
    shared by the replay tests; a module may define its own params_file instead."""
    from watch_helpers import demo_fit_params

    p = tmp_path_factory.mktemp("params") / "params.json"
    p.write_text(json.dumps(demo_fit_params()))
    return p


@pytest.fixture(scope="session")
def demo_cli_run(tmp_path_factory):
    """One ``python -m estimator demo --out PARENT/demo --json`` run per test session (it takes
    40-70 s on a 2-core machine), shared read-only: (completed process, the demo folder, the
    names in PARENT right after the run). A test that writes into the folder copies it first."""
    import subprocess
    import sys

    parent = tmp_path_factory.mktemp("demo_cli")
    folder = parent / "demo"
    done = subprocess.run([sys.executable, "-m", "estimator", "demo", "--out", str(folder), "--json"],
                          capture_output=True, text=True, timeout=300)
    return done, folder, sorted(os.listdir(parent))
