// Run a Python script inside the real MicroPython interpreter (WebAssembly port, npm
// package @micropython/micropython-webassembly-pyscript, pinned in package.json).
//
// Usage: node run_mpy.mjs SCRIPT.py [MODULE_FILE ...]
// Every MODULE_FILE (.py or .mpy) is written into the interpreter's file system under
// /lib with FS.writeFile, so the script can import it; then the script runs with
// runPython and its output goes to stdout. Exit code 1 when the script raises.
// A line "#@next-call" splits the script: each part runs in its own runPython call, so
// objects the previous part left on the interpreter's stack are no longer roots for the
// next part's gc.collect() (within one call the top-level frame's dead stack slots and the
// pending call's C stack keep garbage alive; benchmarks/watch_memory.py measures heap this way).
// Note: micropython.heap_lock() must be called inside a function in the script; at
// module level it hangs this port.
import { readFileSync } from "node:fs";
import { basename } from "node:path";
import { loadMicroPython } from "@micropython/micropython-webassembly-pyscript";

const [script, ...modules] = process.argv.slice(2);
if (!script) {
  console.error("usage: node run_mpy.mjs SCRIPT.py [MODULE_FILE ...]");
  process.exit(2);
}
const heapsize = Number(process.env.MPY_HEAP_BYTES || 1024 * 1024);
let errors = "";
const mp = await loadMicroPython({
  heapsize,
  stdout: (line) => process.stdout.write(line + "\n"),
  stderr: (line) => { errors += line + "\n"; process.stderr.write(line + "\n"); },
});
try { mp.FS.mkdir("/lib"); } catch (e) { /* exists */ }
for (const path of modules) {
  mp.FS.writeFile("/lib/" + basename(path), readFileSync(path));
}
try {
  mp.runPython("import sys\nif '/lib' not in sys.path: sys.path.append('/lib')\n");
  for (const part of readFileSync(script, "utf8").split(/^#@next-call$/m)) {
    mp.runPython(part);
  }
} catch (e) {
  process.stderr.write(String(e && e.message ? e.message : e) + "\n");
  process.exit(1);
}
