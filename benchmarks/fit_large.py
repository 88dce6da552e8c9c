"""Benchmark: `liftcal fit` on a 1,000,000-row bench CSV against numpy.loadtxt on the same file.

Prints, measured in this run on this machine:
  - wall time of numpy.loadtxt alone (the baseline), of the in-process fit
    (estimator.fit_sweep.fit_bench_file) and of the `liftcal fit` command as a subprocess
    (which adds interpreter start-up and imports), and their ratios to the baseline
    (goal: at most 1.5);
  - peak memory of the in-process fit traced by tracemalloc (numpy reports its buffers to
    it) and the `liftcal fit` subprocess's peak resident set above that of an interpreter
    that only imports numpy, click, jsonschema and the CLI, each against the size of the
    numeric array (rows x columns x 8 bytes; goal: below 4).
The sweep is the invented demo set: the simulator's noise-free physics on a command grid,
sampled at random commands with sensor noise and a few spikes (numpy, so it is quick).
Usage: .venv/bin/python benchmarks/fit_large.py [ROWS]
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

from estimator.benchsim import SUPPLY_VOLTAGES_V, bench_density_kg_m3, true_point  # noqa: E402


def write_big_csv(path, rows, seed=1):
    rng = np.random.default_rng(seed)
    rho = bench_density_kg_m3()
    grid = np.linspace(0.0, 1.0, 201)
    tables = []
    for vs in SUPPLY_VOLTAGES_V:
        pts = [true_point(u, vs, rho) for u in grid]
        tables.append(np.array([[p["bus_V"], p["bus_current_A"], p["thrust_N"]] for p in pts]))
    u = rng.uniform(0.0, 1.0, rows)
    which = rng.integers(0, len(SUPPLY_VOLTAGES_V), rows)
    out = np.empty((rows, 5))
    out[:, 0] = np.arange(rows) * 0.001
    out[:, 1] = u
    for k, table in enumerate(tables):
        sel = which == k
        for col in range(3):
            out[sel, 2 + col] = np.interp(u[sel], grid, table[:, col])
    out[:, 2] += rng.normal(0.0, 0.005, rows)
    out[:, 3] += rng.normal(0.0, 0.03, rows) + 0.005 * out[:, 3] * rng.normal(0.0, 1.0, rows)
    out[:, 4] += rng.normal(0.0, 0.02, rows) + 0.004 * out[:, 4] * rng.normal(0.0, 1.0, rows)
    spikes = rng.integers(0, rows, rows // 10000)
    out[spikes, 4] += 3.0
    with open(path, "w") as fh:
        fh.write("# invented demo sweep for the benchmark (simulated, not measured)\n"
                 "# altitude: 300\n# temperature: 21\n# diameter: 10in\n"
                 "time[s],command[-],voltage[V],current[A],thrust[N]\n")
        np.savetxt(fh, out, fmt=["%.3f", "%.5f", "%.4f", "%.4f", "%.4f"], delimiter=",")
    return out.nbytes


def best_of(fn, repeat=3):
    best = None
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        dt = time.perf_counter() - t0
        best = dt if best is None or dt < best else best
    return best


RSS_PROBE = ("import sys\n"
             "args = sys.argv[1:]\n"
             "if args:\n"
             "    from estimator.cli import main\n"
             "    try:\n"
             "        main(args)\n"
             "    except SystemExit:\n"
             "        pass\n"
             "else:\n"
             "    import numpy, click, jsonschema, estimator.cli\n"
             "hwm = [l for l in open('/proc/self/status') if l.startswith('VmHWM:')][0]\n"
             "sys.stderr.write(hwm.split()[1] + '\\n')\n")


def peak_rss_kib(args):
    """Peak resident set [KiB] of a fresh interpreter running ``liftcal args``.

    Linux VmHWM of the child's own address space (ru_maxrss would inherit the parent's peak
    across fork + exec).
    """
    done = subprocess.run([sys.executable, "-c", RSS_PROBE] + args, check=True, cwd=ROOT,
                          stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    return int(done.stderr.strip().splitlines()[-1])


def main():
    rows = int(sys.argv[1]) if len(sys.argv) > 1 else 1_000_000
    from estimator.fit_sweep import fit_bench_file

    with tempfile.TemporaryDirectory() as folder:
        csv = os.path.join(folder, "big.csv")
        nbytes = write_big_csv(csv, rows)
        size_mb = os.path.getsize(csv) / 1e6
        t_load = best_of(lambda: np.loadtxt(csv, delimiter=",", skiprows=5))
        t_fit = best_of(lambda: fit_bench_file(csv))
        out = os.path.join(folder, "p.json")
        cli = [sys.executable, "-m", "estimator", "fit", csv, "--out", out, "--json"]
        env_cwd = {"cwd": ROOT}
        t_cli = best_of(lambda: subprocess.run(cli, check=True, stdout=subprocess.DEVNULL, **env_cwd))
        t_py = best_of(lambda: subprocess.run([sys.executable, "-c", "import numpy"], check=True))

        tracemalloc.start()
        fit_bench_file(csv)
        _, peak = tracemalloc.get_traced_memory()
        tracemalloc.stop()
        rss_base = peak_rss_kib([])
        rss_cli = peak_rss_kib(["fit", csv, "--out", out, "--json"])

    print("rows %d, file %.1f MB, numeric array %.1f MB" % (rows, size_mb, nbytes / 1e6))
    print("numpy.loadtxt alone          %.3f s" % t_load)
    print("fit, in process              %.3f s   ratio %.2f  (goal <= 1.5)" % (t_fit, t_fit / t_load))
    print("liftcal fit, subprocess      %.3f s   ratio %.2f  (includes %.2f s interpreter + numpy start-up)"
          % (t_cli, t_cli / t_load, t_py))
    print("peak traced memory, in process  %.1f MB   ratio %.2f x numeric array  (goal < 4)"
          % (peak / 1e6, peak / nbytes))
    print("peak RSS of liftcal fit %.1f MB, bare imports %.1f MB: %.1f MB above, ratio %.2f x numeric array"
          % (rss_cli * 1024 / 1e6, rss_base * 1024 / 1e6, (rss_cli - rss_base) * 1024 / 1e6,
             (rss_cli - rss_base) * 1024 / nbytes))


if __name__ == "__main__":
    main()
