"""Benchmark: the bench fit of a 1,000,000-row CSV against numpy.loadtxt of the same file.

Prints time ratios, each measured in this run on this machine, each side the best of several
rounds taken alternately (so a busy machine spoils both sides alike); wall time and process
CPU time (less sensitive to other programs) are read around the same calls.
  (a) HEADLINE: estimator.bench.sweep.fit_bench_file (one numpy.loadtxt of the four columns
      it needs and the optional ones it checks (time here), the row checks, the SHA-256 of
      the file, the command levels and every fit)
      over a plain numpy.loadtxt of the same file, both called in this interpreter, on the
      benchmark's own layout time[s],command[-],voltage[V],current[A],thrust[N].
  The same rows in other ordinary layouts, the same measure on each:
  (a') only the four columns the fit needs, so its read has no column to skip;
  (c)  seven columns, three of them read and checked but not used (time, rpm, temperature);
  (d)  the four columns in another order (thrust, current, voltage, command);
  (e)  the four columns in other units (command[us], current[mA], thrust[g]).
  Goal on every layout: at most 1.5 (the larger of the wall and CPU ratios is judged).
  Where the fit parses fewer columns than the file holds, the ratio to a numpy.loadtxt of
  only those columns is printed beside it (not the goal, which the issue sets against the
  plain read).
  (b) the whole `liftcal fit` command as a fresh subprocess over
      `python -c "import numpy; numpy.loadtxt(FILE, delimiter=',', skiprows=N)"`. This also
      pays fixed start-up costs that do not grow with the file: importing scipy.optimize alone
      takes about as long as reading the million rows (printed), plus click, jsonschema,
      the schema check and writing the parameter set. Printed for honesty; not the goal.
The file is read once by numpy.loadtxt and the fits run on the command levels
(estimator.bench.levels), so (a) is the read plus the work after it. Also printed: the
machine's load average over the run (other programs share its cores), peak memory of the
in-process fit traced by tracemalloc (numpy reports its buffers to it) and the `liftcal fit`
subprocess's peak resident set above that of an interpreter that only imports numpy,
scipy.optimize, click, jsonschema and the CLI, against the size of the numeric array
(rows x columns x 8 bytes; goal: below 4).
The sweep is the invented demo set: the simulator's noise-free physics on a command grid,
sampled at random commands with sensor noise and a few spikes (numpy, so it is quick).
Usage: .venv/bin/python benchmarks/fit_large.py [ROWS] [--rounds N] [--layouts-only]
"""

import math
import os
import subprocess
import sys
import tempfile
import time
import tracemalloc

import numpy as np

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, ROOT)

from estimator.demo.ramp_sweep import ramp_sweep_rows, write_ramp_csv  # noqa: E402

SKIP = 5  # four comment lines and the header
GRAM_N = 9.80665e-3  # one gram-force [N] (standard gravity, ISO 80000-3)
GOAL = 1.5

# the other ordinary layouts of the same rows: (label, header, columns made from the
# benchmark's table (time, command, voltage, current, thrust), number formats)
LAYOUTS = [
    ("(a') four columns, all read", "command[-],voltage[V],current[A],thrust[N]",
     lambda o: o[:, 1:5], ["%.5f", "%.4f", "%.4f", "%.4f"]),
    ("(c) seven columns, three not used",
     "time[s],command[-],voltage[V],current[A],thrust[N],rpm[rpm],temperature[C]",
     lambda o: np.column_stack([o, 3600.0 * np.sqrt(np.maximum(o[:, 4], 0.0)), 25.0 + 0.4 * o[:, 3]]),
     ["%.3f", "%.5f", "%.4f", "%.4f", "%.4f", "%.0f", "%.1f"]),
    ("(d) four columns, another order", "thrust[N],current[A],voltage[V],command[-]",
     lambda o: o[:, [4, 3, 2, 1]], ["%.4f", "%.4f", "%.4f", "%.5f"]),
    ("(e) four columns, other units", "command[us],voltage[V],current[mA],thrust[g]",
     lambda o: np.column_stack([1000.0 + 1000.0 * o[:, 1], o[:, 2], 1000.0 * o[:, 3], o[:, 4] / GRAM_N]),
     ["%.1f", "%.4f", "%.1f", "%.2f"]),
]


def write_big_csv(path, rows, seed=1):
    """The headline file; returns (its numeric array's size [bytes], the rows)."""
    out = ramp_sweep_rows(rows, seed=seed)
    return write_ramp_csv(path, out, "invented demo sweep for the benchmark"), out


def write_layout(path, out, header, columns, formats):
    """The rows ``out`` (ramp_sweep_rows) in another layout, with the demo's comments."""
    with open(path, "w") as fh:
        fh.write("# invented demo sweep for the benchmark, another layout (simulated, not measured)\n"
                 "# altitude: 300m\n# temperature: 21C\n# diameter: 10in\n" + header + "\n")
        np.savetxt(fh, columns(out), fmt=formats, delimiter=",")


def alternate_best(fns, rounds):
    """[(best wall time [s], best process CPU time [s])] of each callable over ``rounds``
    rounds, the callables taking turns within every round; both clocks read around the
    same calls."""
    best = [[math.inf, math.inf] for _ in fns]
    for _ in range(rounds):
        for k, fn in enumerate(fns):
            w0, c0 = time.perf_counter(), time.process_time()
            fn()
            wall, cpu = time.perf_counter() - w0, time.process_time() - c0
            best[k] = [min(best[k][0], wall), min(best[k][1], cpu)]
    return best


def columns_read(path):
    """The columns the fit's numpy.loadtxt parses (estimator.bench.csv_numbers.load_numbers):
    None when it reads every column, else the four it needs, the optional ones it checks
    and the last one."""
    from estimator import csvtable
    from estimator.bench.columns import OPTIONAL, REQUIRED, UNITS

    head = csvtable.read_head(path, "a bench CSV", "")
    found, _ = csvtable.parse_header(path, head, UNITS, OPTIONAL)
    names = list(REQUIRED) + [name for name in OPTIONAL if name in found]
    wanted, last = [found[name][0] for name in names], len(head.cells) - 1
    return None if sorted(wanted) == list(range(last + 1)) else wanted + ([] if last in wanted else [last])


def measure_layout(path, rounds):
    """(loadtxt (wall, CPU), fit_bench_file (wall, CPU), loadtxt of the columns the fit
    parses (wall, CPU), or None when that is every column) [s], best of alternating rounds."""
    from estimator.bench.sweep import fit_bench_file

    fit_bench_file(path)  # warm the page cache once
    read = columns_read(path)
    calls = [lambda: np.loadtxt(path, delimiter=",", skiprows=SKIP), lambda: fit_bench_file(path)]
    if read is not None:
        calls.append(lambda: np.loadtxt(path, delimiter=",", skiprows=SKIP, usecols=read))
    best = alternate_best(calls, rounds)
    return best[0], best[1], (best[2] if read is not None else None)


def ratio_line(label, load, fit, same=None):
    """Both sides and the ratios (wall, CPU) against the goal; with ``same`` (loadtxt of only
    the columns the fit parses) the ratios to that too, for comparison."""
    (w_l, c_l), (w_f, c_f) = load, fit
    met = max(w_f / w_l, c_f / c_l) <= GOAL
    line = ("%-36s numpy.loadtxt %.3f s (CPU %.3f), fit_bench_file %.3f s (CPU %.3f)   ratio %.2f wall, "
            "%.2f CPU  (goal <= %.1f: %s)" % (label, w_l, c_l, w_f, c_f, w_f / w_l, c_f / c_l, GOAL,
                                             "met" if met else "NOT met"))
    if same is not None:
        line += ("\n%-36s (numpy.loadtxt of only the columns the fit parses: %.3f s (CPU %.3f), "
                 "ratio %.2f wall, %.2f CPU)" % ("", same[0], same[1], w_f / same[0], c_f / same[1]))
    return line


RSS_PROBE = ("import sys\n"
             "def kib(key):\n"
             "    return int([l for l in open('/proc/self/status') if l.startswith(key)][0].split()[1])\n"
             "args = sys.argv[1:]\n"
             "if args:\n"
             "    from estimator.cli import main\n"
             "    try:\n"
             "        main(args)\n"
             "    except SystemExit:\n"
             "        pass\n"
             "else:\n"
             "    import numpy, scipy.optimize, click, jsonschema, estimator.cli\n"
             "sys.stderr.write('main %d\\n' % kib('VmHWM:'))\n")


def peak_rss_kib(args):
    """Peak resident set [KiB] (Linux VmHWM) of a fresh interpreter running ``liftcal args``."""
    done = subprocess.run([sys.executable, "-c", RSS_PROBE] + args, check=True, cwd=ROOT,
                          stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    lines = done.stderr.strip().splitlines()
    return int([l for l in lines if l.startswith("main ")][-1].split()[1])


def main():
    argv = sys.argv[1:]
    rounds = 5
    if "--rounds" in argv:
        k = argv.index("--rounds")
        rounds = int(argv[k + 1])
        del argv[k:k + 2]
    layouts_only = "--layouts-only" in argv
    args = [a for a in argv if not a.startswith("--")]
    rows = int(args[0]) if args else 1_000_000
    from estimator.bench.sweep import fit_bench_file

    load_before = os.getloadavg()[0]
    lines = []
    with tempfile.TemporaryDirectory() as folder:
        csv = os.path.join(folder, "big.csv")
        nbytes, table = write_big_csv(csv, rows)
        size_mb = os.path.getsize(csv) / 1e6
        paths = []
        for k, (label, header, columns, formats) in enumerate(LAYOUTS):
            paths.append(os.path.join(folder, "layout%d.csv" % k))
            write_layout(paths[-1], table, header, columns, formats)
        del table
        head = measure_layout(csv, rounds)
        lines.append("rows %d, headline file %.1f MB, numeric array %.1f MB; best of %d alternating rounds"
                     % (rows, size_mb, nbytes / 1e6, rounds))
        lines.append(ratio_line("(a) HEADLINE, in process", *head))
        for (label, _, _, _), path in zip(LAYOUTS, paths):
            lines.append(ratio_line(label, *measure_layout(path, rounds)))
        load_after = os.getloadavg()[0]
        lines.append("machine load average (1 min) %.2f at the start, %.2f after the layouts, on %d cores"
                     % (load_before, load_after, os.cpu_count() or 0))
        if not layouts_only:
            lines += whole_command(csv, folder, nbytes, rounds, fit_bench_file)
    print("\n".join(lines))


def whole_command(csv, folder, nbytes, rounds, fit_bench_file):
    """The lines of (b) and of memory."""
    out = os.path.join(folder, "p.json")
    script = os.path.join(os.path.dirname(sys.executable), "liftcal")
    cli = ([script] if os.path.exists(script) else [sys.executable, "-m", "estimator"])
    cli = cli + ["fit", csv, "--out", out, "--json"]
    load_cmd = [sys.executable, "-c", "import numpy; numpy.loadtxt(%r, delimiter=',', skiprows=%d)"
                % (csv, SKIP)]

    def run(argv):
        subprocess.run(argv, check=True, stdout=subprocess.DEVNULL, cwd=ROOT)

    (t_load_cmd, _), (t_cli, _) = alternate_best([lambda: run(load_cmd), lambda: run(cli)], rounds)
    t_py = alternate_best([lambda: run([sys.executable, "-c", "import numpy"])], rounds)[0][0]
    t_scipy = alternate_best([lambda: run([sys.executable, "-c", "import numpy, scipy.optimize"])], rounds)[0][0]
    tracemalloc.start()
    fit_bench_file(csv)
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    rss_base = peak_rss_kib([])
    rss_cli = peak_rss_kib(["fit", csv, "--out", out, "--json"])
    return [
        "(b) whole command, subprocesses: python -c 'import numpy; numpy.loadtxt(...)' %.3f s, "
        "liftcal fit %.3f s   ratio %.2f  (not the goal: fixed start-up below)" % (t_load_cmd, t_cli, t_cli / t_load_cmd),
        "    (interpreter + numpy start-up alone %.3f s, + scipy.optimize %.3f s, i.e. importing "
        "scipy.optimize costs %.2f x the whole numpy.loadtxt command; liftcal fit also imports "
        "click and jsonschema and validates and writes the parameter set)"
        % (t_py, t_scipy, (t_scipy - t_py) / t_load_cmd),
        "peak traced memory, in process  %.1f MB   ratio %.2f x numeric array  (goal < 4)" % (peak / 1e6, peak / nbytes),
        "peak RSS of liftcal fit %.1f MB, bare imports %.1f MB: %.1f MB above, ratio %.2f x numeric array"
        % (rss_cli * 1024 / 1e6, rss_base * 1024 / 1e6, (rss_cli - rss_base) * 1024 / 1e6,
           (rss_cli - rss_base) * 1024 / nbytes),
    ]


if __name__ == "__main__":
    main()
