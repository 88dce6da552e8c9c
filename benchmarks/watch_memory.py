"""Goals: importing the bundle and making one Watch takes under 4 KB of MicroPython heap; all
.mpy files together under 12 KB. Heap by gc.mem_alloc() after gc.collect() in the same run."""

import os

from _watch_common import bundle_dir
from mpy_harness import run_micropython

SCRIPT = r'''
import gc
gc.collect()
a0 = gc.mem_alloc()
import liftwatch_config
gc.collect()
a1 = gc.mem_alloc()
import liftwatch
gc.collect()
a2 = gc.mem_alloc()
w = liftwatch.Watch(liftwatch_config.CONFIG)
gc.collect()
a3 = gc.mem_alloc()
print("RESULT", a1 - a0, a2 - a1, a3 - a2, a3 - a0)
'''


def main():
    d = bundle_dir()
    mpy = [os.path.join(d, "mpy", f) for f in sorted(os.listdir(os.path.join(d, "mpy")))]
    sizes = {os.path.basename(p): os.path.getsize(p) for p in mpy}
    total = sum(sizes.values())
    out = run_micropython(SCRIPT, [os.path.join(d, "mpy", "liftwatch.mpy"), os.path.join(d, "mpy", "liftwatch_config.mpy")])
    cfg, ker, watch, heap = (int(x) for x in out.split("RESULT", 1)[1].split())
    print("heap: config module %d B, kernel module %d B, one Watch %d B; total %d B" % (cfg, ker, watch, heap))
    print("heap / 4096 B = %.3f (goal < 1): %s" % (heap / 4096.0, "met" if heap < 4096 else "NOT met"))
    print(".mpy sizes: %s" % ", ".join("%s %d B" % kv for kv in sizes.items()))
    print(".mpy total / 12288 B = %.3f (goal < 1): %s" % (total / 12288.0, "met" if total < 12288 else "NOT met"))


if __name__ == "__main__":
    main()
