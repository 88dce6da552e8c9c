"""Benchmark: the bench fit of a 1,000,000-row CSV against numpy.loadtxt of the same file.

Prints time ratios, each measured in this run on this machine, each side the best of several
rounds taken alternately (so a busy machine spoils both sides alike):
  (a) HEADLINE, the goal's measure: estimator.bench.sweep.fit_bench_file (one numpy.loadtxt
      of the four columns it needs, the row checks, the SHA-256 of the file, the command
      levels and every fit) over a plain numpy.loadtxt of the same file, both called in this interpreter. Goal: at
      most 1.5. Wall time, and beside it process CPU time (less sensitive to other programs).
  (a') as (a) on the same rows without the time column: the fit reads only the columns it
      needs, so (a) gains from the column it skips; (a') shows the ratio when every column
      is read.
  (b) the whole `liftcal fit` command as a fresh subprocess over
      `python -c "import numpy; numpy.loadtxt(FILE, delimiter=',', skiprows=N)"`. This also
      pays fixed start-up costs that do not grow with the file: importing scipy.optimize alone
      takes about as long as reading the million rows (printed), plus click, jsonschema,
      the schema check and writing the parameter set. Printed for honesty; not the goal.
The file is read once by numpy.loadtxt and the fits run on the command levels
(estimator.bench.levels), so (a) is the read plus the work after it. Also printed: peak
memory of the in-process fit traced by tracemalloc (numpy reports its buffers to it) and the
`liftcal fit` subprocess's peak resident set above that of an interpreter that only imports
numpy, scipy.optimize, click, jsonschema and the CLI, against the size of the numeric array
(rows x columns x 8 bytes; goal: below 4).
The sweep is the invented demo set: the simulator's noise-free physics on a command grid,
sampled at random commands with sensor noise and a few spikes (numpy, so it is quick).
Usage: .venv/bin/python benchmarks/fit_large.py [ROWS] [--rounds N]
"""

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


def write_big_csv(path, rows, seed=1):
    return write_ramp_csv(path, ramp_sweep_rows(rows, seed=seed), "invented demo sweep for the benchmark")


def alternate_best(fns, rounds, clock=time.perf_counter):
    """Best time [s] by ``clock`` of each callable over ``rounds`` rounds, the callables
    taking turns within every round."""
    best = [None] * len(fns)
    for _ in range(rounds):
        for k, fn in enumerate(fns):
            t0 = clock()
            fn()
            dt = clock() - t0
            best[k] = dt if best[k] is None or dt < best[k] else best[k]
    return best


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
    args = [a for a in argv if not a.startswith("--")]
    rows = int(args[0]) if args else 1_000_000
    from estimator.bench.sweep import fit_bench_file

    with tempfile.TemporaryDirectory() as folder:
        csv = os.path.join(folder, "big.csv")
        nbytes = write_big_csv(csv, rows)
        size_mb = os.path.getsize(csv) / 1e6
        skip = 5  # four comment lines and the header
        out = os.path.join(folder, "p.json")
        script = os.path.join(os.path.dirname(sys.executable), "liftcal")
        cli = ([script] if os.path.exists(script) else [sys.executable, "-m", "estimator"])
        cli = cli + ["fit", csv, "--out", out, "--json"]
        load_cmd = [sys.executable, "-c", "import numpy; numpy.loadtxt(%r, delimiter=',', skiprows=%d)"
                    % (csv, skip)]

        def run(argv):
            subprocess.run(argv, check=True, stdout=subprocess.DEVNULL, cwd=ROOT)

        fit_bench_file(csv)  # warm the page cache and the imports once
        in_process = [lambda: np.loadtxt(csv, delimiter=",", skiprows=skip), lambda: fit_bench_file(csv)]
        t_load, t_fit = alternate_best(in_process, rounds)
        c_load, c_fit = alternate_best(in_process, rounds, clock=time.process_time)
        t_load_cmd, t_cli = alternate_best([lambda: run(load_cmd), lambda: run(cli)], rounds)
        t_py = alternate_best([lambda: run([sys.executable, "-c", "import numpy"])], rounds)[0]

        # the same rows without the time column: every column is one the fit reads, so the
        # read cannot skip any (the headline's file has a time column the fit does not parse)
        csv4 = os.path.join(folder, "big4.csv")
        with open(csv) as src, open(csv4, "w") as dst:
            for line in src:
                dst.write(line if line.startswith("#") else line.split(",", 1)[1])
        four = [lambda: np.loadtxt(csv4, delimiter=",", skiprows=skip), lambda: fit_bench_file(csv4)]
        fit_bench_file(csv4)
        t4_load, t4_fit = alternate_best(four, rounds)
        c4_load, c4_fit = alternate_best(four, rounds, clock=time.process_time)

        tracemalloc.start()
        fit_bench_file(csv)
        _, peak = tracemalloc.get_traced_memory()
        tracemalloc.stop()
        rss_base = peak_rss_kib([])
        rss_cli = peak_rss_kib(["fit", csv, "--out", out, "--json"])
        t_scipy = alternate_best([lambda: run([sys.executable, "-c", "import numpy, scipy.optimize"])], rounds)[0]

    print("rows %d, file %.1f MB, numeric array %.1f MB; best of %d alternating rounds"
          % (rows, size_mb, nbytes / 1e6, rounds))
    print("(a) HEADLINE, in process: numpy.loadtxt %.3f s, fit_bench_file %.3f s   ratio %.2f  (goal <= 1.5)"
          % (t_load, t_fit, t_fit / t_load))
    print("    CPU time:               numpy.loadtxt %.3f s, fit_bench_file %.3f s   ratio %.2f"
          % (c_load, c_fit, c_fit / c_load))
    print("(a') the same rows, four columns (no time column to skip): numpy.loadtxt %.3f s, fit_bench_file "
          "%.3f s   ratio %.2f wall, %.2f CPU" % (t4_load, t4_fit, t4_fit / t4_load, c4_fit / c4_load))
    print("(b) whole command, subprocesses: python -c 'import numpy; numpy.loadtxt(...)' %.3f s, "
          "liftcal fit %.3f s   ratio %.2f  (not the goal: fixed start-up below)"
          % (t_load_cmd, t_cli, t_cli / t_load_cmd))
    print("    (interpreter + numpy start-up alone %.3f s, + scipy.optimize %.3f s, i.e. importing "
          "scipy.optimize costs %.2f x the whole numpy.loadtxt command; liftcal fit also imports "
          "click and jsonschema and validates and writes the parameter set)"
          % (t_py, t_scipy, (t_scipy - t_py) / t_load_cmd))
    print("peak traced memory, in process  %.1f MB   ratio %.2f x numeric array  (goal < 4)"
          % (peak / 1e6, peak / nbytes))
    print("peak RSS of liftcal fit %.1f MB, bare imports %.1f MB: %.1f MB above, ratio %.2f x numeric array"
          % (rss_cli * 1024 / 1e6, rss_base * 1024 / 1e6, (rss_cli - rss_base) * 1024 / 1e6,
             (rss_cli - rss_base) * 1024 / nbytes))


if __name__ == "__main__":
    main()
