"""Benchmark: the bench fit on at least 200 independent randomised truths (tests/truth_rotor.py).

Motors and propellers from 30 mm to 30 in, 1..24 cells, dead zones 0.02..0.12, ESCs with
end points 1000..2000 or 1100..1900 us, duty exponents 0.85..1.2, one or three supplies,
20..100,000 rows, noise and outliers, thrust in N, mN, g, gf, kgf, lbf and command in -, %,
us. Prints the worst error and the share within bounds of every check (tests/truth_study.py
names the model behind each) and the coverage of the 95 % hover-command interval.
--volt-noise X: the bench voltmeter's relative noise per row (default 0.0005; a hobby logger
reads to about 0.002, from memory): with one supply those readings are nearly all the voltage
change the sweep shows, the case that once biased the voltage exponent.
--cuts 0.5,0.6,...: also fit each truth's sweep stopped at these commands (the ESC's end
points at idle and full command; tests/truth_study.py run_one) and report by cut-off.
Usage: .venv/bin/python benchmarks/fit_study.py [TRUTHS] [--first SEED] [--volt-noise X] [--cuts LIST]
"""

import os
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, ROOT)
sys.path.insert(0, os.path.join(ROOT, "tests"))

from truth_study import cut_report_lines, cut_summary, report_lines, run_one, summarise  # noqa: E402


def main(argv):
    count = int(argv[0]) if argv and not argv[0].startswith("-") else 200
    first = int(argv[argv.index("--first") + 1]) if "--first" in argv else 10000
    folder = tempfile.mkdtemp()
    t0 = time.perf_counter()
    noise = float(argv[argv.index("--volt-noise") + 1]) if "--volt-noise" in argv else None

    def tweak(truth):
        if noise is not None:
            truth["volt_noise"] = noise

    cuts = [float(x) for x in argv[argv.index("--cuts") + 1].split(",")] if "--cuts" in argv else []
    if "--only-cuts" not in argv:
        results = [run_one(seed, folder=folder, tweak=tweak) for seed in range(first, first + count)]
        for line in report_lines(summarise(results)):
            print(line)
    for cut in cuts:
        results = [run_one(seed, folder=folder, tweak=tweak, cut=cut) for seed in range(first, first + count)]
        for line in cut_report_lines(cut, cut_summary(results)):
            print(line, flush=True)
    print("  %.1f s for %d truths" % (time.perf_counter() - t0, count))


if __name__ == "__main__":
    main(sys.argv[1:])
