"""Goals: importing the bundle's watch modules (kernel and CONFIG, from their .mpy files) and
making one Watch keeps under 4 KB of MicroPython heap; all .mpy files together under 12 KB.

Heap = gc.mem_alloc() after gc.collect(), each step's reading taken two interpreter calls after
the step (tests/mpy_harness.heap_script): what the step keeps, not the garbage it leaves (the
module-level bytecode of an imported .mpy is garbage once the import is done). For comparison
the older reading, taken with gc.collect() inside the same interpreter call as the imports, is
printed too: it also counts that garbage, which dead stack slots of the measuring frame keep
reachable (shown by a 2000-byte bytearray that stays counted after ``del``).

Also printed: the board path (board_loop's way: ``liftwatch_load.load()`` checks CONFIG with the
layout module, lets the layout go and makes the Watch), and the qstrs each step interns.

``--by-statement [N]``: where the kernel's bytecode goes - the N statements of
estimator/core/watch.py (at any depth to 3) whose replacement by ``pass`` shrinks liftwatch.mpy
the most (bytes of .mpy, which is loaded to the heap; a nested statement is also inside its
parent's figure). mpy-cross only, no interpreter.
"""

import ast
import os
import sys
import tempfile

from _watch_common import bundle_dir
from mpy_harness import heap_kept, run_micropython

KERNEL_STEPS = ["import liftwatch_config", "import liftwatch", "w = liftwatch.Watch(liftwatch_config.CONFIG)"]
BOARD_STEPS = ["import liftwatch_load", "w = liftwatch_load.load()"]

OLD_SCRIPT = r'''
import gc
R = [0] * 4
gc.collect()
R[0] = gc.mem_alloc()
import liftwatch_config
gc.collect()
R[1] = gc.mem_alloc()
import liftwatch
gc.collect()
R[2] = gc.mem_alloc()
w = liftwatch.Watch(liftwatch_config.CONFIG)
gc.collect()
R[3] = gc.mem_alloc()
B = bytearray(2000)
del B
gc.collect()
print("RESULT", R[1] - R[0], R[2] - R[1], R[3] - R[2], gc.mem_alloc() - R[3])
'''

QSTR_SCRIPT = r'''
import micropython
micropython.qstr_info()
import liftwatch_config
micropython.qstr_info()
import liftwatch
micropython.qstr_info()
w = liftwatch.Watch(liftwatch_config.CONFIG)
micropython.qstr_info()
'''


def by_statement(top):
    """Print the ``top`` kernel statements whose removal shrinks the compiled kernel the most."""
    from estimator.watch.bundle import KERNEL_SOURCE, compile_mpy

    with open(KERNEL_SOURCE, "r", encoding="utf-8") as fh:
        src = fh.read()
    lines = src.splitlines(True)
    folder = tempfile.mkdtemp(prefix="liftwatch-stmt-")

    def size(text):
        py = os.path.join(folder, "liftwatch.py")
        with open(py, "w", encoding="utf-8") as fh:
            fh.write(text)
        compile_mpy(py, py[:-3] + ".mpy")
        return os.path.getsize(py[:-3] + ".mpy")

    base = size(src)
    rows = []

    def visit(fn, stmts, depth):
        for st in stmts:
            if isinstance(st, ast.Expr) and isinstance(st.value, ast.Constant):
                continue   # docstrings are not compiled into the .mpy
            out = list(lines)
            for i in range(st.lineno - 1, st.end_lineno):
                out[i] = ""
            out[st.lineno - 1] = " " * st.col_offset + "pass\n"
            rows.append((base - size("".join(out)), fn, st.lineno, lines[st.lineno - 1].strip()[:72]))
            for field in ("body", "orelse"):
                if getattr(st, field, None) and depth < 3:
                    visit(fn, getattr(st, field), depth + 1)

    for node in ast.walk(ast.parse(src)):
        if isinstance(node, ast.FunctionDef):
            visit(node.name, node.body, 0)
    print("liftwatch.mpy %d B; statements by .mpy bytes they cost (nested ones inside their parent's):" % base)
    for cost, fn, line, text in sorted(rows, reverse=True)[:top]:
        print("%5d B  %-9s line %4d  %s" % (cost, fn, line, text))


def main():
    if "--by-statement" in sys.argv:
        rest = sys.argv[sys.argv.index("--by-statement") + 1:]
        by_statement(int(rest[0]) if rest else 30)
        return
    d = bundle_dir()
    mpy = [os.path.join(d, "mpy", f) for f in sorted(os.listdir(os.path.join(d, "mpy")))]
    sizes = {os.path.basename(p): os.path.getsize(p) for p in mpy}
    total = sum(sizes.values())
    cfg, ker, watch = heap_kept(KERNEL_STEPS, mpy)
    heap = cfg + ker + watch
    print("heap kept: config module %d B, kernel module %d B, one Watch %d B; total %d B" % (cfg, ker, watch, heap))
    print("heap / 4096 B = %.3f (goal < 1): %s" % (heap / 4096.0, "met" if heap < 4096 else "NOT met"))
    loader, load = heap_kept(BOARD_STEPS, mpy)
    print("board path (liftwatch_load.load(): kernel, loader, CONFIG checked, layout let go, one Watch): "
          "import liftwatch_load %d B, load() %d B; total %d B" % (loader, load, loader + load))
    out = run_micropython(OLD_SCRIPT, mpy)
    o = [int(x) for x in out.split("RESULT", 1)[1].split()]
    print("older reading (collect inside the importing call): config %d B, kernel %d B, Watch %d B; total %d B;"
          " a deleted 2000-byte bytearray still counted: %d B" % (o[0], o[1], o[2], o[0] + o[1] + o[2], o[3]))
    q = [line.split("n_total_bytes=")[1] for line in run_micropython(QSTR_SCRIPT, mpy).splitlines() if "n_total_bytes" in line]
    q = [int(x) for x in q]
    print("qstr pool bytes added (inside the figures above): config %d B, kernel %d B, Watch %d B"
          % (q[1] - q[0], q[2] - q[1], q[3] - q[2]))
    print(".mpy sizes: %s" % ", ".join("%s %d B" % kv for kv in sizes.items()))
    print(".mpy total / 12288 B = %.3f (goal < 1): %s" % (total / 12288.0, "met" if total < 12288 else "NOT met"))


if __name__ == "__main__":
    main()
