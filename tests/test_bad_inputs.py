"""Every case of benchmarks/bad_inputs.py (over 300 bad inputs across all commands) is refused
cleanly: exit 2, one error line, no traceback, no file changed. Run here in this process (fast);
the script itself runs each case as a new process, as a person would."""

import importlib.util
import os

from io_helpers import ROOT


def _script():
    spec = importlib.util.spec_from_file_location("bad_inputs", os.path.join(ROOT, "benchmarks", "bad_inputs.py"))
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_every_bad_input_is_refused_cleanly():
    total, bad = _script().run_all(in_process=True, show=lambda text: None)
    assert total >= 300
    assert bad == [], "\n".join("%s: %s" % b for b in bad)
