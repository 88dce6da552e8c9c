"""Run Python code inside the real MicroPython interpreter (WebAssembly port under Node.js).

The interpreter is the npm package pinned in tests/micropython/package.json, installed by
tests/run.sh. Without Node.js or without the package the helpers fail with a clear message:
the MicroPython checks are never skipped.
"""

import os
import shutil
import subprocess

HERE = os.path.dirname(os.path.abspath(__file__))
RUNNER = os.path.join(HERE, "micropython", "run_mpy.mjs")
PACKAGE = os.path.join(HERE, "micropython", "node_modules", "@micropython",
                       "micropython-webassembly-pyscript", "micropython.mjs")


class MicroPythonUnavailable(RuntimeError):
    """Node.js or the MicroPython WebAssembly package is missing."""


def node_path():
    node = shutil.which("node")
    if node is None:
        raise MicroPythonUnavailable("Node.js is not installed: the MicroPython checks need it "
                                     "(install Node.js 18+ and run bash tests/run.sh); not skipping")
    if not os.path.exists(PACKAGE):
        raise MicroPythonUnavailable("MicroPython WebAssembly package missing: run "
                                     "'npm ci --prefix tests/micropython' (bash tests/run.sh does)")
    return node


def run_micropython(script_text, modules=(), tmp_path=None, timeout=300, heap_bytes=None):
    """Run ``script_text`` in MicroPython with ``modules`` (file paths) in /lib; return stdout.

    Raises AssertionError with stderr when the script fails.
    """
    node = node_path()
    import tempfile
    folder = str(tmp_path) if tmp_path is not None else tempfile.mkdtemp(prefix="mpy-")
    script = os.path.join(folder, "_script.py")
    with open(script, "w", encoding="utf-8") as fh:
        fh.write(script_text)
    env = dict(os.environ)
    if heap_bytes:
        env["MPY_HEAP_BYTES"] = str(heap_bytes)
    proc = subprocess.run([node, RUNNER, script] + [str(m) for m in modules], capture_output=True,
                          text=True, timeout=timeout, cwd=os.path.dirname(RUNNER), env=env)
    if proc.returncode != 0:
        raise AssertionError("MicroPython script failed (exit %d):\n%s\n%s"
                             % (proc.returncode, proc.stdout[-2000:], proc.stderr[-4000:]))
    return proc.stdout


NEXT_CALL = "#@next-call"   # run_mpy.mjs runs each part of a script in its own runPython call


def heap_script(steps):
    """MicroPython script text: run each step (code text) and record the heap it keeps.

    Heap = gc.mem_alloc() after gc.collect(), taken two runPython calls after the step: the
    step's garbage (e.g. the module-level bytecode of an imported .mpy, freed once the import
    is done) is otherwise still reachable from dead slots of the calling frame's stack or the
    pending call, and a collection inside the same call would count it as kept. Prints
    "HEAP d1 d2 ..." (bytes kept by each step).
    """
    parts = ["import gc\nHEAP = [0] * %d\n" % (len(steps) + 1), "gc.collect()\n",
             "gc.collect()\nHEAP[0] = gc.mem_alloc()\n"]
    for i, step in enumerate(steps):
        parts += [step + "\n", "gc.collect()\n", "gc.collect()\nHEAP[%d] = gc.mem_alloc()\n" % (i + 1)]
    parts.append("print('HEAP', ' '.join(str(HEAP[i + 1] - HEAP[i]) for i in range(%d)))\n" % len(steps))
    return ("\n" + NEXT_CALL + "\n").join(parts)


def heap_kept(steps, modules=(), tmp_path=None):
    """Bytes of MicroPython heap kept by each step (list of code texts), see heap_script."""
    out = run_micropython(heap_script(steps), modules, tmp_path)
    return [int(x) for x in out.split("HEAP", 1)[1].split()]
