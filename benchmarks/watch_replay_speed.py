"""Goal: desktop replay at least 200,000 samples per second on CPython. Times replay_file on a
long simulated log (parse + kernel) and, in the same run, a bare Python loop over the same rows
as the baseline; prints samples/s and the ratio to the goal."""

import os
import tempfile
import time

from _watch_common import demo_fit_params
from estimator.demo.flight_sim import flight_arrays, to_csv
from estimator.watch.replay import replay_file


def main():
    params = demo_fit_params()
    flights = [flight_arrays(seed=s, duration_s=600.0) for s in range(10)]  # 60,000 samples
    text = to_csv(flights[0])
    header, body = text.split("time[s],command[-],voltage[V],current[A]\n", 1)
    rows = []
    t_off = 0.0
    for f in flights:
        for line in to_csv(f).split("time[s],command[-],voltage[V],current[A]\n", 1)[1].splitlines():
            t, rest = line.split(",", 1)
            rows.append("%.2f,%s" % (float(t) + t_off, rest))
        t_off += 600.0
    path = os.path.join(tempfile.mkdtemp(prefix="liftwatch-speed-"), "long.csv")
    with open(path, "w") as fh:
        fh.write(header + "time[s],command[-],voltage[V],current[A]\n" + "\n".join(rows) + "\n")
    best = None
    for _ in range(3):
        t0 = time.perf_counter()
        out = replay_file(path, params, progress=False)
        dt = time.perf_counter() - t0
        best = dt if best is None or dt < best else best
    t0 = time.perf_counter()
    acc = 0
    for line in rows:
        acc += len(line.split(","))
    base = time.perf_counter() - t0
    rate = out["samples"] / best
    print("replay of %d samples: %.3f s, %.0f samples/s (bare split loop %.0f rows/s, ratio %.1f)"
          % (out["samples"], best, rate, len(rows) / base, (len(rows) / base) / rate))
    print("samples/s / 200000 = %.2f (goal >= 1): %s" % (rate / 200000.0, "met" if rate >= 200000 else "NOT met"))


if __name__ == "__main__":
    main()
