"""The board bundle as a builder reads it (new-user trial 13, findings 3, 7 and 11).

- 7a: the bundle README shows the lines a main.py needs, and they run: in the real MicroPython
  interpreter (tests/micropython), with a stand-in ``machine`` module for the board's ADC, Pin and
  Timer (MicroPython's own machine API names: docs.micropython.org, "class Timer", "class ADC");
- 7b: mip installs board_loop as its editable source, not only compiled;
- 7e: the README says which firmware loads the .mpy files (MicroPython documentation, "MicroPython
  .mpy files": a bytecode-only file loads on any release of its format's major version that reads
  sub-versions, from memory);
- 7f: the SensorAdapter docstring keeps telemetry reading out of the timer interrupt (MicroPython
  documentation, "Writing interrupt handlers": no heap allocation in an ISR);
- 3: baseline_off's advice starts with the site; 2: mass_high names both causes;
- 11: the config comments say what the numbers mean (1.5 x 240 A is 360 A, capped at 300 A; the
  voltage table's last knot lies just above the accepted range; capped knots are said).
"""

import json
import re

import pytest

from estimator.watch.bundle import write_bundle
from estimator.watch.sensor_range import current_range_mA
from mpy_harness import run_micropython
from watch_helpers import demo_fit_params


@pytest.fixture(scope="module")
def bundle(tmp_path_factory):
    out = tmp_path_factory.mktemp("b13") / "board"
    write_bundle(demo_fit_params(), str(out))
    return out


def test_the_readme_has_no_unfilled_field_and_says_which_firmware_loads_the_mpy(bundle):
    text = (bundle / "README.md").read_text()
    assert not re.search(r"\{[a-z_]+\}", text), re.findall(r"\{[a-z_]+\}", text)
    flat = " ".join(text.split())
    assert "format 6.3 (no native code): MicroPython 1.20 or later loads them" in flat
    assert (bundle / "mpy" / "liftwatch.mpy").read_bytes()[:2] == b"M\x06"   # what the README says


def test_mip_installs_the_board_loop_as_source_to_edit(bundle):
    doc = json.loads((bundle / "package.json").read_text())
    urls = dict(doc["urls"])
    assert urls["board_loop.py"] == "board_loop.py" and "board_loop.mpy" not in urls
    assert (bundle / "board_loop.py").is_file()


def test_the_flag_advice_starts_with_the_site_and_names_both_mass_causes(bundle):
    readme = " ".join((bundle / "README.md").read_text().split())
    row = next(line for line in readme.split("| 8 |")[1:2])
    assert row.index("another field") < row.index("refit"), row
    assert "a heavier payload, or a rotor or motor drawing more power than the bench fit since take-off" in readme
    loop = (bundle / "board_loop.py").read_text()
    baseline = next(line for line in loop.splitlines() if "baseline far" in line)
    assert baseline.index("another field") < baseline.index("refit")
    assert "rotor drawing extra power" in loop


def test_the_adapter_docstring_keeps_telemetry_out_of_the_interrupt(bundle):
    loop = (bundle / "board_loop.py").read_text()
    doc = loop[loop.index("class SensorAdapter"):loop.index("def __init__")]
    assert "runs inside the" in doc and "never read a UART" in doc, doc


def test_the_readme_main_py_runs_in_micropython(bundle, tmp_path):
    text = (bundle / "README.md").read_text()
    code = text[text.index("```python\n") + 10:text.index("```", text.index("```python\n") + 10)]
    assert "from board_loop import SensorAdapter, start" in code and "start(adapter)" in code
    # the board's own parts stand in: machine (ADC, Pin, Timer firing its callback) and the command source
    machine = tmp_path / "machine.py"
    machine.write_text('''
class Pin:
    def __init__(self, n):
        self.n = n
class ADC:
    def __init__(self, pin):
        self.v = 30000 + pin.n
    def read_u16(self):
        self.v = (self.v * 75 + 74) % 65536
        return self.v
class Timer:
    made = []
    PERIODIC = 1
    def __init__(self, i):
        Timer.made.append(self)
    def init(self, period, mode, callback):
        self.callback = callback
''')
    loop_part = code.index("while True:")
    script = ("def read_command_permille():\n    return 400\n" + code[:loop_part]
              + "import machine\nfor i in range(50):\n    command[0] = read_command_permille()\n"
              "    machine.Timer.made[0].callback(None)\n"
              "print('RAN', monitor.watch is not None, command[0])\n")
    mods = [bundle / "mpy" / (m + ".mpy") for m in ("liftwatch", "liftwatch_config", "liftwatch_layout",
                                                    "liftwatch_load")] + [bundle / "board_loop.py", machine]
    assert "RAN True 400" in run_micropython(script, mods, tmp_path)
    # the example's scale factors keep raw * num below 2^30 for a 16-bit reading (no big ints in the interrupt)
    nums = [int(x) for x in re.findall(r"\), (\d+), (\d+), (\d+), (\d+)\)", code)[0]]
    assert 65535 * max(nums[0], nums[2]) < 2 ** 30


def test_the_current_limit_note_says_the_cap():
    _, i_max_mA, notes, _ = current_range_mA(200.0, motors_max_A=240.0)
    assert i_max_mA == 300000
    assert "1.5 x the motors' limit 240.0 A = 360 A, capped at the watch's 300 A" in notes[1], notes[1]
    assert "capped" not in current_range_mA(50.0, motors_max_A=40.0)[2][1]


def test_the_voltage_table_notes_say_the_last_knot_and_the_capped_knots(bundle):
    config = (bundle / "liftwatch_config.py").read_text()
    step = next(line for line in config.splitlines() if "volt_step_mV:" in line)
    assert "lies just above v_max_mV" in step, step
    head = next(line for line in config.splitlines() if "] volt_q12 (13 knots)" in line)
    lines = config.splitlines()
    knots = [int(x) for x in " ".join(lines[lines.index(head) + 1:lines.index(head) + 3]).replace(",", " ").split()]
    assert len(knots) == 13
    assert ("capped at 6143" in head) == (knots[-1] == 6143), head
