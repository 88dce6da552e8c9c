"""The tests' command helpers have one home (tests/trial_helpers.py): a test module runs a
command through trial_helpers.ok/run/refused/report instead of writing its own `_ok(args)`
(nine near-identical copies were found in the trial-4..8 tests and test_output_paths by the
duplicates tool). Reference: tests/trial_helpers.py, "One copy" (its docstring)."""

import os
import re

HERE = os.path.dirname(os.path.abspath(__file__))


def test_no_test_module_writes_its_own_ok_helper():
    own = []
    for name in sorted(os.listdir(HERE)):
        if name.endswith(".py") and name != "trial_helpers.py":
            with open(os.path.join(HERE, name), encoding="utf-8") as fh:
                if re.search(r"^def _ok\(", fh.read(), re.M):
                    own.append(name)
    assert own == []


def test_demo_fit_params_hands_each_caller_its_own_copy():
    # an edit in one test (test_slips_trial11 sets motor_model.command_start) once reached the
    # replays of later tests on the same worker through the shared cached set
    from watch_helpers import demo_fit_params

    a = demo_fit_params()
    a["motor_model"]["command_start"] = 1.26587e-24
    assert demo_fit_params()["motor_model"]["command_start"] != 1.26587e-24
