"""Goal: Watch.update in MicroPython costs at most 20 times a bare call of a four-int-argument
function. Both are timed in the same MicroPython run (WebAssembly port under Node.js) in the
same kind of loop; the bare call gets constant arguments, update a slowly varying stream
(520 + (i & 7), 19000 + (i & 15)), so update is also charged those four small-int operations.
Each loop's best of 7 rounds (a noisy machine only ever adds time). With these inputs the watch
runs its full path in a power_high alarm (CUSUM sum at its cap, drift tracking frozen).
Two ratios are printed: gross (loop time with update / loop time with the bare call) and net
(each minus an empty loop's time, the stricter reading).

This port's ticks_us advances in whole milliseconds, so every loop runs long enough for that
step to be small: the empty and bare-call loops 10x the iterations of the update loop (each
loop at least ~50 ms), all compared per iteration."""

import os

from _watch_common import bundle_dir
from mpy_harness import run_micropython

N_UPDATE = 50000
N_CALL = 500000     # empty and bare-call loops

SCRIPT = r'''
import time
from liftwatch import Watch
from liftwatch_config import CONFIG
w = Watch(CONFIG)

def bare(a, b, c, d):
    return a

def rounds(n, m):
    up = w.update
    t0 = time.ticks_us()
    for i in range(m):
        pass
    t1 = time.ticks_us()
    for i in range(m):
        bare(100, 520, 15000, 19000)
    t2 = time.ticks_us()
    for i in range(n):
        up(100, 520 + (i & 7), 15000, 19000 + (i & 15))
    t3 = time.ticks_us()
    return time.ticks_diff(t1, t0), time.ticks_diff(t2, t1), time.ticks_diff(t3, t2)

E = B = U = None
for r in range(7):
    e, b, u = rounds(%d, %d)
    E = e if E is None or e < E else E
    B = b if B is None or b < B else B
    U = u if U is None or u < U else U
print("RESULT %%d %%d %%d" %% (E, B, U))
''' % (N_UPDATE, N_CALL)


def main():
    d = bundle_dir()
    mods = [os.path.join(d, "mpy", m + ".mpy") for m in ("liftwatch", "liftwatch_config")]
    out = run_micropython(SCRIPT, mods)
    empty, bare, upd = (int(x) for x in out.split("RESULT", 1)[1].split())
    e, b, u = empty / N_CALL, bare / N_CALL, upd / N_UPDATE     # us per iteration
    ratio, net = u / b, (u - e) / (b - e)
    print("MicroPython 1.27 (wasm): empty loop %.3f us, bare 4-arg call %.3f us (%d iterations), update %.2f us "
          "(%d iterations) per iteration; loop times %d / %d / %d ms" % (e, b, N_CALL, u, N_UPDATE,
                                                                     empty // 1000, bare // 1000, upd // 1000))
    print("update / bare call, gross = %.2f (goal <= 20): %s" % (ratio, "met" if ratio <= 20 else "NOT met"))
    print("update / bare call, net of loop overhead = %.2f (goal <= 20): %s" % (net, "met" if net <= 20 else "NOT met"))


if __name__ == "__main__":
    main()
