"""Extreme numbers inside valid JSON files: which values the checks let through to the models.

Each trial takes a valid vehicle file, parameter set or export map, puts extreme numbers
(0, -1, 1e-300, 5e-324, 1e300, 1e15, ...) at 1..3 random number places, and runs the command
reading it. Outcomes: accepted (exit 0), refused by a check (one error line, exit 2), caught
only by the command line's last net ("cannot compute with these inputs": a check is
missing), or a crash (traceback / exit 1). Prints the counts and, for each last-net hit or
crash, the place in the code, the command and the values put where, so the owner of that
model can add the check. Seeded: the same trials every run.

Usage: .venv/bin/python benchmarks/numeric_extremes.py [--trials N] [--seed S]
"""

import argparse
import collections
import importlib.util
import json
import os
import random
import re
import tempfile

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
_spec = importlib.util.spec_from_file_location("bad_inputs", os.path.join(ROOT, "benchmarks", "bad_inputs.py"))
BAD = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(BAD)

COMMANDS = [(["hover", "{f}", "--json"], "vehicle.json"), (["hover", "vehicle.json", "--params", "{f}"], "params.json"),
            (["export", "{f}"], "params.json"), (["firmware", "{f}", "--out", "board"], "params.json"),
            (["firmware", "params.json", "--vehicle", "{f}", "--out", "board"], "vehicle.json"),
            (["replay", "flight.csv", "--params", "{f}"], "params.json"),
            (["replay", "flight.csv", "--params", "params.json", "--vehicle", "{f}"], "vehicle.json"),
            (["fit", "bench.csv", "--vehicle", "{f}", "--out", "o.json"], "vehicle.json"),
            (["export", "params.json", "--map", "{f}"], "map.json")]
EXTREMES = [0, -1, 1e-300, 5e-324, 1e300, 1e-9, 1e9, 1e15, -1e-9, 1.0000001, 0.9999999]


def trial(rng, base):
    argv, name = rng.choice(COMMANDS)
    doc = json.loads(base[name])
    places = [p for p, v in BAD._walk(doc) if isinstance(v, (int, float)) and not isinstance(v, bool)]
    changed = []
    for _ in range(rng.randint(1, 3)):
        place = rng.choice(places)
        node = doc
        parts = place.split(".")
        for part in parts[:-1]:
            node = node[part]
        value = rng.choice(EXTREMES)
        if rng.random() < 0.5:
            value = value * node[parts[-1]]
        node[parts[-1]] = value
        changed.append("%s=%r" % (place, value))
    with tempfile.TemporaryDirectory() as folder:
        BAD._prepare(folder, base, {"in.json": json.dumps(doc).encode()})
        code, out, err = BAD.run_in_process([a.replace("{f}", "in.json") for a in argv], folder)
    lines = err.strip().splitlines()
    label = "%s (%s: %s)" % (" ".join(argv[:2]), name, ", ".join(changed))
    if code == 0:
        return "accepted", None, label
    if code == 2 and len(lines) == 1 and lines[0].startswith("error: "):
        if "cannot compute with these inputs" in lines[0]:
            where = re.search(r"in (estimator/\S+ line \d+)", lines[0])
            return "last net", where.group(1) if where else lines[0][:120], label
        return "refused", None, label
    return "crash", (lines[-1] if lines else "exit %d" % code)[:160], label


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--trials", type=int, default=600)
    parser.add_argument("--seed", type=int, default=1)
    args = parser.parse_args()
    rng = random.Random(args.seed)
    base = BAD._base_files()
    counts = collections.Counter()
    sites = collections.defaultdict(list)
    for _ in range(args.trials):
        outcome, where, label = trial(rng, base)
        counts[outcome] += 1
        if where is not None:
            sites[(outcome, where)].append(label)
    for (outcome, where), labels in sorted(sites.items(), key=lambda kv: -len(kv[1])):
        print("%-8s %3d x  %s\n          e.g. %s" % (outcome, len(labels), where, labels[0][:300]))
    print("trials %d: accepted %d, refused by a check %d, last net only %d, crash %d"
          % (args.trials, counts["accepted"], counts["refused"], counts["last net"], counts["crash"]))


if __name__ == "__main__":
    main()
