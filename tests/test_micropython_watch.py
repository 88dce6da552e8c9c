"""The watch kernel inside the real MicroPython interpreter (WebAssembly port, npm package
@micropython/micropython-webassembly-pyscript 1.27.0 under Node.js; design notes sec. 5).

Bit-identical results against CPython on a 100,000-sample stream, no heap allocation across
10,000 updates (gc.mem_alloc) and 10,000 updates under micropython.heap_lock() (inside a
function: at module level it hangs this port), the compiled .mpy bundle importing and running.
Without Node.js these tests fail with a clear message; they are never skipped.
"""


import pytest

from estimator.core.watch_layout import CONFIG_LENGTH
from estimator.watch.bundle import MODULES, write_bundle
from mpy_harness import run_micropython
from watch_helpers import demo_fit_params

# One stream generator, run unchanged in both interpreters: ZX81-style LCG (x * 75 + 74) mod
# 65537, every value below 2^23 so it allocates nothing on MicroPython either. The stream holds
# hover and manoeuvres, a slow pack drain, +15 % / -15 % power segments, landings, a stuck
# current sensor and garbage.
STREAM = r'''
def run_stream(w, n, seed, stats):
    x = seed
    u = 520
    h = 0
    c1 = 0
    c2 = 0
    c4 = 0
    c8 = 0
    c16 = 0
    spot = 0
    for i in range(n):
        x = (x * 75 + 74) % 65537
        dt = 100
        k = i % 20000
        if k < 60:
            u = 0
        elif k < 90:
            u = 520 * (k - 60) // 30
        else:
            u += (x % 9) - 4
            if x % 97 == 0:
                u += 60
            if x % 89 == 0:
                u -= 60
            if u < 380:
                u = 380
            elif u > 720:
                u = 720
        mv = 16600 - (i % 20000) * 2600 // 20000 - (x % 23)
        ma = u * u * 10 // 143 + (x % 401) - 200
        seg = i // 7000 % 5
        if seg == 2:
            ma = ma * 115 // 100
        elif seg == 4:
            ma = ma * 85 // 100
        if u < 60:
            ma = 120 + x % 7
        elif 10000 <= k < 10040:
            ma = 19000                 # a stuck current sensor in flight
        g = i % 997
        if g == 5:
            mv = 0
        elif g == 6:
            ma = -5000
        elif g == 7:
            u = 1200
        elif g == 8:
            dt = 100000
        elif g == 9:
            ma = 900000
        f = w.update(dt, u, mv, ma)
        d = w.data                     # outputs (watch_layout.OUTPUT_AT): [32] mass_g, [34] residual,
        r = d[34]                      # [35] thrust_mN, [36] hover_permille
        h = (h * 31 + f * 7 + r + 1000 + d[35] % 1000 + d[32] % 100 + d[36]) % 1000003
        c1 += f & 1
        c2 += (f >> 1) & 1
        c4 += (f >> 2) & 1
        c8 += (f >> 3) & 1
        c16 += (f >> 4) & 1
        if i % 12345 == 0:
            spot = (spot * 131 + r * 7 + f + d[35]) % 1000003
    stats[0] = h
    stats[1] = c1
    stats[2] = c2
    stats[3] = c4
    stats[4] = c8
    stats[5] = c16
    stats[6] = spot
    stats[7] = w.data[34]
'''


def firmware_modules():
    """Every module of the bundle (kernel, CONFIG, layout, loader, board loop)."""
    return MODULES


@pytest.fixture(scope="module")
def bundle(tmp_path_factory):
    out = tmp_path_factory.mktemp("bundle") / "liftwatch"
    write_bundle(demo_fit_params(), str(out))
    return out


def _cpython_stream(n, seed):
    from estimator.core.watch import Watch
    from estimator.watch.config import as_tuple, make_config

    ns = {}
    exec(STREAM, ns)
    stats = [0] * 8
    ns["run_stream"](Watch(as_tuple(make_config(demo_fit_params())[0])), n, seed, stats)
    return stats


def test_bit_identical_flags_and_residuals_on_100000_samples(bundle, tmp_path):
    # Same integer code, same inputs: every flag and residual must agree exactly (hash over all
    # 100,000 samples plus per-flag counts and spot values); the counts also show the stream
    # exercises every flag that it should.
    n, seed = 100000, 12345
    script = STREAM + r'''
from liftwatch import Watch
from liftwatch_config import CONFIG
stats = [0] * 8
run_stream(Watch(CONFIG), %d, %d, stats)
print("STATS", " ".join(str(s) for s in stats))
''' % (n, seed)
    out = run_micropython(script, [bundle / "liftwatch.py", bundle / "liftwatch_config.py"], tmp_path)
    mp = [int(x) for x in out.split("STATS", 1)[1].split()]
    cp = _cpython_stream(n, seed)
    assert mp == cp
    assert cp[1] > 0 and cp[2] > 0 and cp[3] > 0   # power_high, power_low and sensor_fault all seen


def test_no_heap_allocation_in_update(bundle, tmp_path):
    # gc.mem_alloc() unchanged across 10,000 updates (the stream includes garbage rows), and
    # 10,000 updates under heap_lock() raise no MemoryError (any allocation would).
    script = STREAM + r'''
import gc, micropython
from liftwatch import Watch
from liftwatch_config import CONFIG
w = Watch(CONFIG)
stats = [0] * 8
run_stream(w, 500, 7, stats)   # warm up: every attribute exists
gc.collect()
gc.disable()
a0 = gc.mem_alloc()
run_stream(w, 10000, 11, stats)
a1 = gc.mem_alloc()
gc.enable()
print("ALLOC", a1 - a0)

def locked():
    micropython.heap_lock()
    try:
        w.clear()   # a landing: the state list is cleared in place
        run_stream(w, 10000, 13, stats)
        err = "none"
    except MemoryError:
        err = "MemoryError"
    micropython.heap_unlock()
    return err

print("LOCKED", locked())
'''
    out = run_micropython(script, [bundle / "mpy" / "liftwatch.mpy", bundle / "mpy" / "liftwatch_config.mpy"], tmp_path)
    assert "ALLOC 0" in out, out
    assert "LOCKED none" in out, out


def test_learning_ends_without_raising_at_the_lowest_noise_floor(bundle, tmp_path):
    # "update never raises for int inputs" holds for every CONFIG the layout admits: with
    # noise_floor_permille at its lower bound (1) and a hover whose residual never varies, the
    # learned noise is 1 permille, the start of the two Newton steps for k's floor
    # 2 s / sqrt(n + 1) was 0 and the second step divided by it (ZeroDivisionError when the
    # learning window ended, in CPython and on the board; found replaying random in-bound CONFIGs).
    from estimator.core import watch_layout
    from estimator.core.watch import Watch
    from estimator.watch.config import as_tuple, make_config

    cfg = make_config(demo_fit_params(), options={"takeoff_s": 0.0, "lag_ms": 0.0, "stuck_s": 600.0})[0]
    cfg["noise_floor_permille"] = 1
    config = as_tuple(cfg)
    assert watch_layout.check(config) is None
    script = """
from liftwatch import Watch
w = Watch(%r)
for i in range(600):
    f = w.update(100, 520, 15000, 19000)
print("LEARNED", w.data[0], w.data[7])
""" % (config,)
    out = run_micropython(script, [bundle / "liftwatch.py"], tmp_path)
    w = Watch(config)
    for _ in range(600):                     # 60 s of the same sample: learning ends at 20 s
        w.update(100, 520, 15000, 19000)
    assert "LEARNED 0 %d" % w.data[7] in out, out    # learned (data[0] = 0), the same k on both


def test_heap_lock_really_catches_allocation(tmp_path):
    # The check above can fail: the same harness reports an allocation under heap_lock.
    script = r'''
import micropython
def locked():
    micropython.heap_lock()
    try:
        x = [1, 2, 3]
        err = "none"
    except MemoryError:
        err = "MemoryError"
    micropython.heap_unlock()
    return err
print("LOCKED", locked())
'''
    assert "LOCKED MemoryError" in run_micropython(script, [], tmp_path)


def test_compiled_bundle_and_board_loop_run(bundle, tmp_path):
    # The .mpy files from mpy-cross import in MicroPython 1.27, and the board loop's Monitor.tick
    # (the timer handler) runs with a fake adapter without allocating.
    mods = [bundle / "mpy" / (m + ".mpy") for m in firmware_modules()]
    script = r'''
import gc, micropython
import board_loop

class Src:
    def __init__(self):
        self.v = 0
    def read_u16(self):
        self.v = (self.v * 75 + 74) % 65537
        return 30000 + self.v % 50

def cmd():
    return 520

class Clock:            # a timer firing every 100 ms (the loop below runs faster than that)
    def __init__(self):
        self.t = 0
    def ticks_ms(self):
        self.t += 100
        return self.t
    def ticks_diff(self, a, b):
        return a - b

a = board_loop.SensorAdapter(cmd, Src(), Src(), 1, 2, 2, 3)
m = board_loop.Monitor(a, clock=Clock())
for i in range(200):
    m.tick(None)

def quiet(flags):
    pass

m.report_ref = quiet   # the example report() prints (allocates) outside the interrupt; measure tick alone

def ticks(n):
    for i in range(n):
        m.tick(None)

def locked():
    micropython.heap_lock()
    try:
        ticks(1000)
        err = "none"
    except MemoryError:
        err = "MemoryError"
    micropython.heap_unlock()
    return err

print("LOCKED", locked())
ticks(10)   # let the scheduled reports (they print, and may allocate) run first
gc.collect()
a0 = gc.mem_alloc()
ticks(1000)
print("TICK", gc.mem_alloc() - a0, m.watch.data[36] > 0)   # hover_permille (watch_layout.OUTPUT_AT)
'''
    out = run_micropython(script, mods, tmp_path)
    assert "LOCKED none" in out and "TICK 0 True" in out, out


def test_missing_node_fails_clearly(monkeypatch):
    # No Node.js: a clear failure, not a skip (design notes sec. 5).
    import mpy_harness

    monkeypatch.setattr(mpy_harness.shutil, "which", lambda name: None)
    with pytest.raises(mpy_harness.MicroPythonUnavailable, match="Node.js is not installed"):
        mpy_harness.run_micropython("print(1)")


def test_board_loop_takes_dt_from_ticks_diff(bundle, tmp_path):
    # The board loop measures dt with ticks_diff (wrap-safe) instead of assuming the timer period:
    # a tick 5 s late (the timer starved) must raise sensor_fault through the watch's gap check, and
    # regular ticks across the ticks_ms wrap must not. The clock counts from just before the wrap.
    mods = [bundle / "mpy" / (m + ".mpy") for m in firmware_modules()]
    script = r'''
import time
import board_loop

class Src:
    def __init__(self):
        self.v = 0
    def read_u16(self):
        self.v = (self.v * 75 + 74) % 65537
        return 30000 + self.v % 50

class Clock:
    def __init__(self):
        self.t = time.ticks_add(0, -3000)     # 3 s before ticks_ms wraps
    def ticks_ms(self):
        return self.t
    def ticks_diff(self, a, b):
        return time.ticks_diff(a, b)
    def step(self, ms):
        self.t = time.ticks_add(self.t, ms)

def cmd():
    return 520

def quiet(flags):
    pass

clk = Clock()
m = board_loop.Monitor(board_loop.SensorAdapter(cmd, Src(), Src(), 1, 2, 2, 3), clock=clk)
m.report_ref = quiet
worst = 0
for i in range(100):
    clk.step(100)
    m.tick(None)
    worst |= m.reported & 4
late = 0
clk.step(5000)
m.tick(None)
late = m.reported & 4
print("GAP", worst, late)
'''
    out = run_micropython(script, mods, tmp_path)
    assert "GAP 0 4" in out, out


def test_board_loader_checks_config_in_words(bundle, tmp_path):
    # firmware_port's loader applies watch_layout.check on the board: a CONFIG from another
    # version (wrong length), a value beyond its bound, a float and a wrong format number are each
    # refused with a ConfigProblem naming the value - not an assert, not a bare ValueError - and
    # the bundle's own CONFIG loads. The same refusals as the desktop's check_config (one function).
    mods = [bundle / "mpy" / (m + ".mpy") for m in ("liftwatch", "liftwatch_config", "liftwatch_layout",
                                                     "liftwatch_load")]
    script = r'''
import liftwatch_load
from liftwatch_config import CONFIG
from liftwatch_layout import INDEX, SCALAR_AT

def try_load(cfg):
    try:
        liftwatch_load.load(cfg)
        return "OK"
    except liftwatch_load.ConfigProblem as e:
        return "PROBLEM " + str(e)
    except Exception as e:
        return "OTHER %s %s" % (type(e).__name__, e)

w = liftwatch_load.load()
print("GOOD", w.update(100, 520, 15000, 19000) >= 0)
print("A", try_load(CONFIG[:-1]))
bad = list(CONFIG)
bad[INDEX["block_ms"]] = 5000
print("B", try_load(bad))
bad = list(CONFIG)
bad[3] = 1.5
print("C", try_load(bad))
bad = list(CONFIG)
bad[SCALAR_AT] = 2
print("D", try_load(bad))
'''
    out = run_micropython(script, mods, tmp_path)
    lines = dict(l.split(" ", 1) for l in out.strip().splitlines())
    assert lines["GOOD"] == "True", out
    assert lines["A"].startswith("PROBLEM liftwatch: CONFIG has %d values" % (CONFIG_LENGTH - 1)), out
    assert lines["B"].startswith("PROBLEM") and "block_ms is 5000, outside 100..1000" in lines["B"], out
    assert lines["C"].startswith("PROBLEM") and "CONFIG[3] is not an integer" in lines["C"], out
    assert lines["D"].startswith("PROBLEM") and "format 2" in lines["D"], out
    # the desktop refuses the same CONFIG with the same words
    from estimator.core import watch_layout
    from estimator.watch.config import as_tuple, make_config
    cfg = list(as_tuple(make_config(demo_fit_params())[0]))
    cfg[watch_layout.INDEX["block_ms"]] = 5000
    assert "block_ms is 5000, outside 100..1000" in watch_layout.check(cfg)


def test_heap_reading_counts_what_is_kept_not_garbage(tmp_path):
    # The heap reading (mpy_harness.heap_script) can fail both ways: a kept 2000-byte bytearray
    # is counted, a deleted one is not; the older reading (gc.collect() inside the same
    # interpreter call) still counts the deleted one - it also counted garbage.
    from mpy_harness import heap_kept

    kept = heap_kept(["B = 0", "B = bytearray(2000)", "B = 0"], (), tmp_path)
    assert 2000 <= kept[1] <= 2048 and kept[1] + kept[2] == 0, kept
    out = run_micropython("import gc\ngc.collect()\na = gc.mem_alloc()\nB = bytearray(2000)\ndel B\n"
                          "gc.collect()\nprint('OLD', gc.mem_alloc() - a)\n", (), tmp_path)
    assert int(out.split("OLD")[1]) >= 2000, out


def test_board_loader_lets_the_layout_and_itself_go(bundle, tmp_path):
    # load() needs liftwatch_layout once (the CONFIG check) and itself once: afterwards both are
    # out of sys.modules and their heap is freed (the layout's names, bounds and messages: about
    # 6 KB; the loader's code and messages: about 0.5 KB). What the board path (board_loop's way:
    # the loader imported inside a function) keeps beyond the kernel, CONFIG and the Watch is the
    # names the check interned (qstrs are never freed): measured +576 B (+1120 B while the loader
    # stayed in sys.modules, +7300 B while the layout stayed).
    from mpy_harness import heap_kept

    mods = [bundle / "mpy" / (m + ".mpy") for m in MODULES]
    out = run_micropython("import sys\ndef make():\n    from liftwatch_load import load\n    return load()\n"
                          "w = make()\nprint('LEFT', 'liftwatch_layout' in sys.modules, 'liftwatch_load' in sys.modules)\n",
                          mods, tmp_path)
    assert "LEFT False False" in out, out
    contract = sum(heap_kept(["import liftwatch_config", "import liftwatch",
                              "w = liftwatch.Watch(liftwatch_config.CONFIG)"], mods, tmp_path))
    layout = sum(heap_kept(["import liftwatch_layout"], mods, tmp_path))
    board = sum(heap_kept(["from liftwatch_load import load\nw = load()\ndel load"], mods, tmp_path))
    assert layout > 4000, layout                      # what is let go
    assert board < contract + 800, (board, contract)


def test_kernel_interns_only_its_public_names(bundle, tmp_path):
    # Every name the kernel interns stays on the heap as a qstr (about 7 B of table entry plus
    # the name; past the 20 names of the first pool a 304-B pool opens: DEVELOPERS.md, "Heap on
    # the board"). Its private names (the state lists, clear, the arguments of __init__ and
    # _block, update's four: dt, u, v, a) are ones the interpreter already holds and its outputs
    # live in its data list, so importing the kernel interns at most its file path, its class and
    # _block (23 names before 5a4f27a, the second pool opened; 13 with dt_ms, command_permille,
    # bus_mV and bus_mA as update's arguments, 9 with the six outputs as attributes).
    mods = [bundle / "mpy" / "liftwatch.mpy", bundle / "mpy" / "liftwatch_config.mpy"]
    out = run_micropython("import micropython\nimport liftwatch_config\nmicropython.qstr_info(1)\n"
                          "print('MARK')\nimport liftwatch\nmicropython.qstr_info(1)\n", mods, tmp_path)
    before, after = out.split("\nMARK\n")
    names = set(l[2:-1] for l in after.splitlines() if l.startswith("Q(")) - set(
        l[2:-1] for l in before.splitlines() if l.startswith("Q("))
    public = {"/lib/liftwatch.mpy", "Watch", "_block"}
    assert names <= public, sorted(names - public)
    assert "Watch" in names, names     # the reading sees them


def _contract_heap(bundle, tmp_path):
    from mpy_harness import heap_kept

    mods = [bundle / "mpy" / "liftwatch.mpy", bundle / "mpy" / "liftwatch_config.mpy"]
    return heap_kept(["import liftwatch_config", "import liftwatch",
                      "w = liftwatch.Watch(liftwatch_config.CONFIG)"], mods, tmp_path)


def test_config_module_keeps_only_its_values(bundle, tmp_path):
    # CONFIG's heap is its values (4 B each on a 32-bit port: one tuple of small ints, a constant
    # of the .mpy) plus the module object; the module-level code is freed after the import.
    cfg, kernel, watch = _contract_heap(bundle, tmp_path)
    assert cfg <= 4 * CONFIG_LENGTH + 128, cfg
    assert watch <= 400, watch   # the state lists (the outputs are in them)


def test_import_and_one_watch_under_4_kb(bundle, tmp_path):
    # Kernel contract (issue 7): importing the kernel and CONFIG from their .mpy files and making
    # one Watch keeps under 4096 B of heap (gc.mem_alloc after gc.collect, what is kept). The
    # kernel before this bound held kept 4768 B (CONFIG 704, kernel 3696, Watch 368); now 4064 B
    # (DEVELOPERS.md, "Heap on the board"; benchmarks/watch_memory.py says where each byte goes).
    cfg, kernel, watch = _contract_heap(bundle, tmp_path)
    assert cfg + kernel + watch < 4096, (cfg, kernel, watch)
