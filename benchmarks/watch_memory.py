"""Goals: importing the bundle's watch modules (kernel and CONFIG, from their .mpy files) and
making one Watch keeps under 4 KB of MicroPython heap; all .mpy files together under 12 KB.

Heap = gc.mem_alloc() after gc.collect(), each step's reading taken two interpreter calls after
the step (tests/mpy_harness.heap_script): what the step keeps, not the garbage it leaves (the
module-level bytecode of an imported .mpy is garbage once the import is done). For comparison
the older reading, taken with gc.collect() inside the same interpreter call as the imports, is
printed too: it also counts that garbage, which dead stack slots of the measuring frame keep
reachable (shown by a 2000-byte bytearray that stays counted after ``del``).

Also printed: where the kernel module's heap goes - the bytecode of each function (from the
.mpy file: an .mpy loaded from a file puts it on the heap, in 16-byte blocks), the qstrs it interns
(names and pool bytes, qstr_info), and the rest (function, class and module objects, constant
tables); the board path (board_loop's way: ``liftwatch_load`` imported inside a function,
``load()`` checks CONFIG with the layout module, lets the layout and the loader go and makes the
Watch), and the qstrs each step interns.

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
BOARD_STEPS = ["from liftwatch_load import load\nw = load()\ndel load"]   # board_loop: imported in a function

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

NAMES_SCRIPT = r'''
import micropython
import liftwatch_config
micropython.qstr_info(1)
print("MARK")
import liftwatch
micropython.qstr_info(1)
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


def _uint(b, p):
    """mpy variable-length unsigned int at b[p]: (value, next position)."""
    v = 0
    while True:
        c = b[p]
        p += 1
        v = (v << 7) | (c & 0x7F)
        if not c & 0x80:
            return v, p


def bytecode_sizes(mpy_path):
    """Bytes of bytecode (prelude included) of each raw code in an .mpy file (format 6), in file
    order: the module, then each class body and function in source order."""
    with open(mpy_path, "rb") as fh:
        b = fh.read()
    if b[:2] != b"M\x06":
        raise SystemExit("%s: not an .mpy of format 6" % mpy_path)
    n_qstr, p = _uint(b, 4)
    n_obj, p = _uint(b, p)
    for _ in range(n_qstr):
        v, p = _uint(b, p)
        if not v & 1:                      # not a static qstr: its text follows, null-terminated
            p += (v >> 1) + 1
    for _ in range(n_obj):
        kind = b[p]
        p += 1
        if kind >= 5:                      # str, bytes, int, float, complex: length and text
            n, p = _uint(b, p)
            p += n + (1 if kind in (5, 6) else 0)
    sizes = []

    def raw_code(p):
        head, p = _uint(b, p)
        sizes.append(head >> 3)
        p += head >> 3
        if head & 4:                       # has children
            n, p = _uint(b, p)
            for _ in range(n):
                p = raw_code(p)
        return p

    raw_code(p)
    return sizes


def kernel_breakdown(mpy_dir, kernel_heap):
    """Print where the kernel module's heap goes: bytecode per function, qstrs, the rest."""
    from estimator.watch.bundle import KERNEL_SOURCE

    with open(KERNEL_SOURCE, "r", encoding="utf-8") as fh:
        tree = ast.parse(fh.read())
    names = ["<module>"]
    for node in tree.body:
        if isinstance(node, ast.ClassDef):
            names.append("class " + node.name)
            names += [f.name for f in node.body if isinstance(f, ast.FunctionDef)]
    sizes = bytecode_sizes(os.path.join(mpy_dir, "liftwatch.mpy"))
    kept = [(n, s) for n, s in zip(names, sizes) if not n.startswith(("<module>", "class "))]
    blocks = sum((s + 15) // 16 * 16 for _, s in kept)
    print("kernel bytecode kept (module and class-body code are freed after the import): %s; "
          "%d B, %d B in 16-byte blocks" % (", ".join("%s %d B" % kv for kv in kept), sum(s for _, s in kept), blocks))
    mods = [os.path.join(mpy_dir, m + ".mpy") for m in ("liftwatch", "liftwatch_config")]
    out = run_micropython(NAMES_SCRIPT, mods).split("\nMARK\n")
    before = set(line for line in out[0].splitlines() if line.startswith("Q("))
    new = [line[2:-1] for line in out[1].splitlines() if line.startswith("Q(") and line not in before]
    pools = [line for line in out[1].splitlines() if line.startswith("qstr pool")]
    print("qstrs the kernel interns (names the interpreter does not hold yet): %d: %s; %s"
          % (len(new), " ".join(new), pools[0] if pools else ""))
    return blocks


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
    board = heap_kept(BOARD_STEPS, mpy)[0]
    print("board path (board_loop's way: liftwatch_load imported where load() is called; kernel, CONFIG "
          "checked, layout and loader let go, one Watch): %d B, %d B more than the above (the names the "
          "check interned)" % (board, board - heap))
    out = run_micropython(OLD_SCRIPT, mpy)
    o = [int(x) for x in out.split("RESULT", 1)[1].split()]
    print("older reading (collect inside the importing call): config %d B, kernel %d B, Watch %d B; total %d B;"
          " a deleted 2000-byte bytearray still counted: %d B" % (o[0], o[1], o[2], o[0] + o[1] + o[2], o[3]))
    q = [line.split("n_total_bytes=")[1] for line in run_micropython(QSTR_SCRIPT, mpy).splitlines() if "n_total_bytes" in line]
    q = [int(x) for x in q]
    print("qstr pool bytes added (inside the figures above): config %d B, kernel %d B, Watch %d B"
          % (q[1] - q[0], q[2] - q[1], q[3] - q[2]))
    blocks = kernel_breakdown(os.path.join(d, "mpy"), ker)
    print("kernel module %d B = bytecode %d B + qstrs %d B + function, class and module objects and "
          "constants %d B" % (ker, blocks, q[2] - q[1], ker - blocks - (q[2] - q[1])))
    print(".mpy sizes: %s" % ", ".join("%s %d B" % kv for kv in sizes.items()))
    print(".mpy total / 12288 B = %.3f (goal < 1): %s" % (total / 12288.0, "met" if total < 12288 else "NOT met"))


if __name__ == "__main__":
    main()
