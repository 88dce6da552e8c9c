"""Bad inputs across every command, tried as a new user would: how many are refused cleanly.

A clean refusal: exit code 2, exactly one line on stderr starting with ``error:``, no
traceback, and no file in the case's folder changed, removed or added (nothing half-written,
no user file replaced). Each case runs in a folder of its own holding valid example inputs
(vehicle.json, params.json, map.json, bench.csv, flight.csv) and the user's own files
(notes.txt, photo.png, mywork/ with a vehicle file and a sweep), plus whatever the case
adds. Prints each case that is not clean and the count; exit status 1 when any is not.

Usage: .venv/bin/python benchmarks/bad_inputs.py [--in-process] [--jobs N] [-k WORD]
(--in-process calls estimator.cli.main in this process: fast, as tests/test_bad_inputs.py
does; the default runs ``python -m estimator`` once per case, as a person would.)
"""

import argparse
import concurrent.futures
import contextlib
import hashlib
import io
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
EXAMPLES = os.path.join(ROOT, "schemas", "examples", "valid")


# --- the valid inputs every case starts from ----------------------------------------------

def _base_files():
    """{name: bytes} of the valid inputs and the user's own files in every case's folder."""
    sys.path.insert(0, ROOT)
    from estimator.demo.bench_sim import simulate_sweep
    from estimator.demo.flight_sim import simulate_flight

    def read(name):
        with open(os.path.join(EXAMPLES, name), "rb") as fh:
            return fh.read()

    return {
        "vehicle.json": read("vehicle-demo-quad.json"),
        "params.json": read("params-demo-with-hover.json"),
        "map.json": read("map-example.json"),
        "bench.csv": simulate_sweep(seed=1).encode(),
        "flight.csv": simulate_flight(seed=2).encode(),
        "notes.txt": b"my own notes\n",
        "photo.png": b"\x89PNG\r\n\x1a\n" + b"\0" * 64,
        "mywork/vehicle.json": b'{"mine": true}\n',
        "mywork/bench.csv": b"my raw sweep\n",
    }


# --- bad variants of a JSON file and of a CSV file ------------------------------------------

def _json_variants(doc_bytes):
    """(label, bytes or a special marker) of bad JSON built from a valid document."""
    text = doc_bytes.decode("utf-8")
    doc = json.loads(text)
    first_number_key = next(k for k, v in _walk(doc) if isinstance(v, (int, float)) and not isinstance(v, bool))
    first_object_key = next((k for k, v in _walk(doc) if isinstance(v, dict) and k), None)

    def with_value(key, raw):
        return _replace_value(text, key, raw).encode("utf-8")

    out = [
        ("empty file", b""),
        ("random bytes", bytes(range(256)) * 4),
        ("latin-1 text", text.replace('"', '"').encode("utf-8")[:20] + "caf\xe9".encode("latin-1") + b'"}'),
        ("truncated half", doc_bytes[: len(doc_bytes) // 2]),
        ("truncated by one byte", doc_bytes.rstrip()[:-1]),
        ("NaN in a number", with_value(first_number_key, "NaN")),
        ("Infinity in a number", with_value(first_number_key, "Infinity")),
        ("-Infinity in a number", with_value(first_number_key, "-Infinity")),
        ("1e999 in a number", with_value(first_number_key, "1e999")),
        ("huge integer", with_value(first_number_key, "1" + "0" * 30)),
        ("5000-digit integer", with_value(first_number_key, "1" + "0" * 5000)),
        ("number as text", with_value(first_number_key, '"abc"')),
        ("number as true", with_value(first_number_key, "true")),
        ("number as list", with_value(first_number_key, "[1, 2]")),
        ("5 MB string for a number", with_value(first_number_key, json.dumps("x" * (5 << 20)))),
        ("million-item list for a number", with_value(first_number_key, json.dumps(list(range(1000000))))),
        ("duplicate key", text.replace("{", '{"%s": 1, ' % first_number_key.split(".")[-1], 1).encode()),
        ("deep nesting 100000", b"[" * 100000 + b"]" * 100000),
        ("deep objects 200", b'{"a":' * 200 + b"1" + b"}" * 200),
        ("17 MB of spaces", b" " * (17 << 20) + b"{}"),
        ("top-level array", json.dumps(list(range(100000))).encode()),
        ("top-level null", b"null"),
        ("top-level string", b'"hello"'),
        ("top-level number", b"42"),
        ("unpaired surrogate", text.replace("{", '{"note": "\\ud800", ', 1).encode()),
        ("1 MB key", text.replace("{", '{"%s": 1, ' % ("k" * (1 << 20)), 1).encode()),
        ("trailing garbage", doc_bytes + b"\n}{ garbage"),
        ("comments", b"// my file\n" + doc_bytes),
        ("single quotes", text.replace('"', "'").encode()),
        ("utf-16 without mark", text.encode("utf-16-le")),
        ("an empty object", b"{}"),
    ]
    if first_object_key:
        out.append(("null for an object", with_value(first_object_key, "null")))
        out.append(("list for an object", with_value(first_object_key, "[]")))
    return out


def _walk(node, prefix=""):
    """(dotted key, value) of every entry of nested objects, depth first."""
    if isinstance(node, dict):
        for key, value in node.items():
            path = prefix + "." + key if prefix else key
            yield path, value
            yield from _walk(value, path)


def _replace_value(text, dotted, raw):
    doc = json.loads(text)
    marker = "__LIFTCAL_MARK__"
    node = doc
    parts = dotted.split(".")
    for part in parts[:-1]:
        node = node[part]
    node[parts[-1]] = marker
    return json.dumps(doc, indent=1).replace('"%s"' % marker, raw)


def _csv_variants(csv_bytes, flight):
    """(label, bytes) of bad CSV built from a valid sweep or flight log."""
    text = csv_bytes.decode("utf-8")
    lines = text.splitlines()
    head_at = next(i for i, l in enumerate(lines) if l and not l.startswith("#"))
    header, rows = lines[head_at], lines[head_at + 1:]
    pre = lines[:head_at]

    def build(h=None, r=None, sep="\n", p=None):
        return (sep.join((pre if p is None else p) + [header if h is None else h] + (rows if r is None else r)) + sep).encode()

    def cell(i, col, value):
        r = list(rows)
        cells = r[i].split(",")
        cells[col] = value
        r[i] = ",".join(cells)
        return build(r=r)

    out = [
        ("empty file", b""),
        ("random bytes", bytes(range(256)) * 8),
        ("latin-1 header", build(h=header + ",temp\xe9rature[C]").decode("utf-8").encode("latin-1")),
        ("utf-16 with mark", b"\xff\xfe" + text.encode("utf-16-le")),
        ("semicolons", build(h=header.replace(",", ";"), r=[x.replace(",", ";").replace(".", ",") for x in rows])),
        ("tabs", build(h=header.replace(",", "\t"), r=[x.replace(",", "\t") for x in rows])),
        ("CR line ends", build(sep="\r")),
        ("only comments", ("\n".join(pre) + "\n").encode()),
        ("header only", build(r=[])),
        ("no header", build(h=rows[0])),
        ("column missing", build(h=",".join(header.split(",")[:-1]), r=[",".join(x.split(",")[:-1]) for x in rows])),
        ("unknown unit", build(h=header.replace("voltage[V]", "voltage[kV]"))),
        ("unit missing", build(h=header.replace("voltage[V]", "voltage"))),
        ("column twice", build(h=header.replace("voltage[V]", "current[A]"))),
        ("inf cell", cell(5, 2, "inf")),
        ("1e999 cell", cell(5, 2, "1e999")),
        ("text cell", cell(5, 2, "twelve")),
        ("decimal comma", cell(5, 2, "12,5")),
        ("row too short", build(r=rows[:5] + [",".join(rows[5].split(",")[:-1])] + rows[6:])),
        ("5 MB line", build(r=rows[:5] + ["1" * (5 << 20)] + rows[6:])),
        ("5 MB cell", cell(5, 2, "9" * (5 << 20))),
        ("a sparse 600 MB file", "SPARSE"),
        ("spreadsheet-style header (a stand's export)",
         build(h=re.sub(r"([A-Za-z ]+)\[([^\]]*)\]", r"\1 (\2)", header).replace("(us)", "(\u00b5s)"))),
    ]
    if flight:
        out += [
            # a row with 'nan' or an empty cell (a missed reading) is dropped and counted, in a
            # bench sweep (new-user trial 7, finding 10) and in a flight log (trial 8, finding 6);
            # a log with such cells in more than 5 % of its rows is refused
            ("empty or NaN cells in 10 % of the rows",
             build(r=[_scale(x, 3, 0.0).rsplit(",", 1)[0] + "," + ("nan" if k % 20 else "")
                      if k % 10 == 0 else x for k, x in enumerate(rows)])),
            ("bench sweep given as a flight log", "BENCH"),
            ("time goes back", build(r=rows[:10] + [rows[5]] + rows[10:])),
            ("voltage in mV labelled V", build(r=[_scale(x, 2, 1000.0) for x in rows])),
            ("command in % labelled [-]", build(r=[_scale(x, 1, 100.0) for x in rows])),
            ("current in A labelled mA", build(h=header.replace("current[A]", "current[mA]"))),
        ]
    else:
        out += [
            ("flight log given as a bench sweep", "FLIGHT"),
            ("voltage in mV labelled V", build(r=[_scale(x, 2, 1000.0) for x in rows])),
            ("command in us labelled [-]", build(h=header.replace("command[us]", "command[-]"))),
            ("three rows", build(r=rows[:3])),
            ("voltage and current columns swapped", build(h=header.replace("voltage[V],current[A]",
                                                                           "current[A],voltage[V]"))),
            ("current sensor reversed", build(r=[_scale(x, 3, -1.0) for x in rows])),
            ("all rows the same", build(r=[rows[len(rows) // 2]] * 40)),
            ("bad comment value", build(p=pre + ["# altitude: high"])),
            ("density comment out of range", build(p=pre + ["# density: 12"])),
            ("diameter comment absurd", build(p=[l for l in pre if "diameter" not in l] + ["# diameter: 30m"])),
            ("text in an optional column", build(h=header + ",temperature[C]",
                                                 r=[x + (",warm" if k == 7 else ",21") for k, x in enumerate(rows)])),
        ]
    return out


def _scale(row, col, factor):
    cells = row.split(",")
    try:
        cells[col] = "%.6g" % (float(cells[col]) * factor)
    except ValueError:
        pass
    return ",".join(cells)


# --- the cases -----------------------------------------------------------------------------

def cases(base):
    """(label, argv, {file: bytes or marker} to add to the case folder) for every case."""
    out = []
    add = out.append
    # inputs that are no file at all, for every command reading a file
    readers = [("hover", ["hover", "{f}"]), ("hover --params", ["hover", "vehicle.json", "--params", "{f}"]),
               ("check", ["check", "{f}"]), ("check --json", ["check", "{f}", "--json"]),
               ("export", ["export", "{f}"]), ("export --map", ["export", "params.json", "--map", "{f}"]),
               ("fit", ["fit", "{f}", "--out", "p.json"]), ("fit --vehicle", ["fit", "bench.csv", "--vehicle", "{f}", "--out", "p.json"]),
               ("firmware", ["firmware", "{f}", "--out", "board"]),
               ("firmware --vehicle", ["firmware", "params.json", "--vehicle", "{f}", "--out", "board"]),
               ("replay", ["replay", "{f}", "--params", "params.json"]),
               ("replay --params", ["replay", "flight.csv", "--params", "{f}"]),
               ("replay --vehicle", ["replay", "flight.csv", "--params", "params.json", "--vehicle", "{f}"])]
    for label, argv in readers:
        for what, path, extra in (("missing file", "missing.json", {}), ("a folder", "mywork", {}),
                                  ("/dev/zero", "/dev/zero", {}), ("/dev/urandom", "/dev/urandom", {}),
                                  ("a pipe", "fifo", {"fifo": "FIFO"}), ("empty name", "", {})):
            add(("%s: %s" % (label, what), [a.replace("{f}", path) for a in argv], extra))
    # bad JSON documents where each kind of JSON file is read
    for label, argv, name, kinds in (
            ("hover", ["hover", "bad.json"], "vehicle.json", None),
            ("check", ["check", "bad.json"], "params.json", None),
            ("hover --params", ["hover", "vehicle.json", "--params", "bad.json"], "params.json", 12),
            ("export --map", ["export", "params.json", "--map", "bad.json"], "map.json", 14),
            ("firmware --vehicle", ["firmware", "params.json", "--vehicle", "bad.json", "--out", "board"], "vehicle.json", 10),
            ("replay --params", ["replay", "flight.csv", "--params", "bad.json"], "params.json", 8)):
        variants = _json_variants(base[name])
        for what, content in variants[:kinds] if kinds else variants:
            add(("%s: %s" % (label, what), argv, {"bad.json": content}))
    # bad CSV files
    for what, content in _csv_variants(base["bench.csv"], flight=False):
        add(("fit: %s" % what, ["fit", "bad.csv", "--out", "p.json"], {"bad.csv": content}))
    for what, content in _csv_variants(base["flight.csv"], flight=True):
        add(("replay: %s" % what, ["replay", "bad.csv", "--params", "params.json"], {"bad.csv": content}))
    # output paths
    outs = {"fit --out": ["fit", "bench.csv", "--out", "{o}"],
            "fit --plot": ["fit", "bench.csv", "--out", "p.json", "--plot", "{o}"],
            "export --out": ["export", "params.json", "--out", "{o}"],
            "replay --plot": ["replay", "flight.csv", "--params", "params.json", "--plot", "{o}"]}
    for label, argv in outs.items():
        png = "--plot" in label
        for what, path, extra in (
                ("an input", "bench.csv" if "fit" in label else ("flight.csv" if "replay" in label else "params.json"), {}),
                ("the user's text file", "notes.txt", {}), ("the user's picture", "photo.png", {}),
                ("/dev/null", "/dev/null", {}), ("/dev/full", "/dev/full", {}), ("a pipe", "fifo", {"fifo": "FIFO"}),
                ("a link to the user's file", "link.png" if png else "link.json", {"link.png" if png else "link.json": "LINK:notes.txt"}),
                ("a folder", "mywork", {}), ("a missing folder", "nowhere/x.png" if png else "nowhere/x.json", {}),
                ("under a file", "notes.txt/x.png" if png else "notes.txt/x.json", {}),
                ("/sys (permission denied even to root)", "/sys/x.png" if png else "/sys/x.json", {}),
                ("/proc", "/proc/x.png" if png else "/proc/x.json", {}),
                ("an empty path", "", {})):
            add(("%s: %s" % (label, what), [a.replace("{o}", path) for a in argv], extra))
    add(("fit --plot: not a .png", ["fit", "bench.csv", "--out", "p.json", "--plot", "fit.txt"], {}))
    add(("replay --plot: a .pdf", ["replay", "flight.csv", "--params", "params.json", "--plot", "r.pdf"], {}))
    add(("fit: --out and --plot the same", ["fit", "bench.csv", "--out", "x.png", "--plot", "x.png"], {}))
    add(("fit --out: a liftcal figure", ["fit", "bench.csv", "--out", "old.png"], {"old.png": "LIFTCAL_PNG"}))
    add(("export --out: a parameter set", ["export", "params.json", "--out", "params2.json"], {"params2.json": "COPY:params.json"}))
    for label, argv in (("firmware --out", ["firmware", "params.json", "--out", "{o}"]), ("demo --out", ["demo", "--out", "{o}"])):
        for what, path, extra in (("the user's folder", "mywork", {}), ("a file", "notes.txt", {}),
                                  ("the current folder", ".", {}), ("/dev/null", "/dev/null", {}),
                                  ("a missing parent", "no/such/dir", {}), ("under a file", "notes.txt/dir", {}),
                                  ("/sys", "/sys/liftcal-out", {}), ("/proc", "/proc/liftcal-out", {}),
                                  ("a link", "linkdir", {"linkdir": "LINK:mywork"}), ("an empty path", "", {})):
            add(("%s: %s" % (label, what), [a.replace("{o}", path) for a in argv], extra))
    add(("firmware --out: the folder of its input", ["firmware", "inside/params.json", "--out", "inside"],
         {"inside/params.json": "COPY:params.json"}))
    # a map whose scale misses its unit's conversion (1000 on a thrust in N labelled g: 1 N is 101.97 gf)
    add(("export --map: a thrust in N scaled as grams of mass", ["export", "params.json", "--map", "scaled.json"],
         {"scaled.json": json.dumps({"schema_version": 1, "model": "liftcal.map/1", "settings": [
             {"name": "my.thr", "unit": "g", "source": "thrust_curve.thrust_max_N", "scale": 1000}]}).encode()}))
    # a set liftcal wrote (sealed), its hover command then set by hand outside the fit's interval
    from estimator.seal import seal_text
    edited = json.loads(seal_text(base["params.json"].decode()))
    edited["hover"]["hover_command"] = 0.45
    for args in (["check", "edited.json"], ["export", "edited.json"], ["hover", "vehicle.json", "--params", "edited.json"]):
        add(("%s: an edited set at odds with itself" % args[0], args, {"edited.json": json.dumps(edited).encode()}))
    # compare and hover --payload: their own options and outputs
    for args in (["hover", "vehicle.json", "--payload", "nan"], ["hover", "vehicle.json", "--payload", "0..1e999kg"],
                 ["hover", "vehicle.json", "--payload", "-1..2kg"], ["hover", "vehicle.json", "--payload", "2..0kg"],
                 ["hover", "vehicle.json", "--payload", "abc"], ["hover", "vehicle.json", "--payload", ",,,"],
                 ["hover", "vehicle.json", "--payload", "0..2kg", "--job-time", "nan"],
                 ["hover", "vehicle.json", "--payload", "0..2kg", "--job-time", "-5min"],
                 ["hover", "vehicle.json", "--payload", "0..2kg", "--plot", "x.txt"],
                 ["hover", "vehicle.json", "--payload", "0..2kg", "--plot", "notes.txt"],
                 ["hover", "vehicle.json", "--payload", "0..2kg", "--plot", "photo.png"],
                 ["hover", "vehicle.json", "--payload", "0..2kg", "--plot", "vehicle.json"],
                 ["hover", "vehicle.json", "--payload", "0..2kg", "--plot", "/dev/null"],
                 ["hover", "vehicle.json", "--payload", "0..2kg", "--plot", "/sys/p.png"],
                 ["hover", "vehicle.json", "--payload", "0..2parsec"], ["hover", "vehicle.json", "--payload", "0..2kg", "--plot", ""],
                 ["hover", "vehicle.json", "--payload", "0..2kg..3kg"], ["hover", "vehicle.json", "--job-time", "5min"],
                 ["compare", "vehicle.json"], ["compare", "vehicle.json", "--vary", "nonsense"],
                 ["compare", "vehicle.json", "--vary", "battery.capacity=nan"],
                 ["compare", "vehicle.json", "--vary", "battery.capacity=1e999mAh"],
                 ["compare", "vehicle.json", "--vary", "battery.capacity="],
                 ["compare", "vehicle.json", "--vary", "no.such.key=1,2"],
                 ["compare", "vehicle.json", "--vary", "mass_kg=1,2", "--vary", "mass_kg=3"],
                 ["compare", "vehicle.json", "--vary", "mass_kg=-1,2"],
                 ["compare", "vehicle.json", "--vary", "mass_kg=1,2", "--plot", "fifo"],
                 ["compare", "vehicle.json", "--vary", "battery.cells=2.5"],
                 ["compare", "vehicle.json", "--vary", "mass_kg=1,2", "--plot", "notes.txt"],
                 ["compare", "vehicle.json", "--vary", "mass_kg=1,2", "--plot", "vehicle.json"],
                 ["compare", "vehicle.json", "--vary", "mass_kg=1,2", "--plot", "c.svg"],
                 ["compare", "vehicle.json", "--vary", "mass_kg=1,2", "--plot", "/proc/c.png"],
                 ["compare", "/dev/zero", "--vary", "mass_kg=1,2"], ["compare", "missing.json", "--vary", "mass_kg=1,2"]):
        add(("%s: %s" % (args[0] if args[0] == "compare" else "hover --payload",
                         " ".join(a if len(a) < 30 else a[:12] + "..." for a in args[2:])), args, {}))
    # options
    for args in (["air", "--altitude", "nan"], ["air", "--altitude", "1e999m"], ["air", "--altitude", "high"],
                 ["air", "--altitude", "99km"], ["air", "--temperature", "500C"], ["air", "--humidity", "140%"],
                 ["air", "--pressure", "-5"], ["air", "--altitude", "1400parsec"], ["air", "--altitude", ""],
                 ["air", "--altitude", "9" * 100000], ["air", "--bogus"], ["air", "extra"],
                 ["static", "--diameter", "10in"], ["static", "--power", "100"],
                 ["static", "--diameter", "10in", "--power", "100", "--thrust", "5"],
                 ["static", "--diameter", "nan", "--power", "100"], ["static", "--diameter", "10in", "--power", "inf"],
                 ["static", "--diameter", "10in", "--power", "-100"], ["static", "--diameter", "0", "--power", "100"],
                 ["static", "--diameter", "10", "--power", "100"], ["static", "--diameter", "10in", "--power", "100",
                                                                    "--factor", "1.5"],
                 ["static", "--diameter", "10in", "--power", "100", "--density", "1.2", "--altitude", "300"],
                 ["static", "--diameter", "10in", "--thrust", "500kgf"],
                 ["fit", "bench.csv", "--out", "p.json", "--voltage-exponent", "nan"],
                 ["fit", "bench.csv", "--out", "p.json", "--voltage-exponent", "40"],
                 ["fit", "bench.csv", "--out", "p.json", "--diameter", "-3in"],
                 ["fit", "bench.csv", "--out", "p.json", "--density", "inf"],
                 ["fit", "bench.csv"], ["fit"], ["export", "params.json", "--map"], ["nosuchcommand"],
                 ["hover"], ["replay", "flight.csv"],
                 ["firmware", "params.json", "--out", "board", "--lag-ms", "5000"],
                 ["replay", "flight.csv", "--params", "params.json", "--lag-ms", "5s"],
                 ["fit", "bench.csv", "--out", "p.json", "--voltage-exponent", "40", "--json"],
                 ["hover", "missing.json", "--json"]):
        add(("option: liftcal %s" % " ".join(a if len(a) < 30 else a[:12] + "..." for a in args), args, {}))
    return out


# --- running and judging a case ---------------------------------------------------------------

def _prepare(folder, base, extra):
    for name, content in list(base.items()) + list(extra.items()):
        path = os.path.join(folder, name)
        os.makedirs(os.path.dirname(path), exist_ok=True)
        if content == "FIFO":
            os.mkfifo(path)
        elif content == "SPARSE":
            with open(path, "wb") as fh:
                fh.truncate(600 << 20)
        elif content == "BENCH":
            shutil.copy(os.path.join(folder, "bench.csv"), path)
        elif content == "FLIGHT":
            shutil.copy(os.path.join(folder, "flight.csv"), path)
        elif isinstance(content, str) and content.startswith("LINK:"):
            os.symlink(content[5:], path)
        elif isinstance(content, str) and content.startswith("COPY:"):
            shutil.copy(os.path.join(folder, content[5:]), path)
        elif content == "LIFTCAL_PNG":
            with open(path, "wb") as fh:
                fh.write(_liftcal_png())
        else:
            with open(path, "wb") as fh:
                fh.write(content)


def _liftcal_png():
    import struct
    import zlib

    def chunk(kind, body):
        return struct.pack(">I", len(body)) + kind + body + struct.pack(">I", zlib.crc32(kind + body))

    from estimator.outputs import SOFTWARE
    return (b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", struct.pack(">IIBBBBB", 1, 1, 8, 0, 0, 0, 0))
            + chunk(b"tEXt", b"Software\0" + SOFTWARE.encode()) + chunk(b"IDAT", zlib.compress(b"\0\0"))
            + chunk(b"IEND", b""))


def _digest(folder):
    out = {}
    for base, dirs, files in os.walk(folder):
        for name in dirs + files:
            path = os.path.join(base, name)
            rel = os.path.relpath(path, folder)
            if os.path.islink(path) or not (os.path.isfile(path) or os.path.isdir(path)):
                out[rel] = "special:" + (os.readlink(path) if os.path.islink(path) else "")
            elif os.path.isdir(path):
                out[rel] = "dir"
            elif os.path.getsize(path) > (64 << 20):
                out[rel] = "size:%d" % os.path.getsize(path)
            else:
                with open(path, "rb") as fh:
                    out[rel] = hashlib.sha256(fh.read()).hexdigest()
    return out


def run_in_process(argv, folder):
    """(exit code, stdout, stderr) of estimator.cli.main(argv) with ``folder`` as the working folder."""
    from estimator.cli import main

    out, err = io.StringIO(), io.StringIO()
    here = os.getcwd()
    os.chdir(folder)
    code = 0
    try:
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            try:
                main(list(argv))
            except SystemExit as exc:
                code = exc.code if isinstance(exc.code, int) else 1
            except BaseException:  # a crash: what a person would see as a traceback
                import traceback
                traceback.print_exc()
                code = 1
    finally:
        os.chdir(here)
    return code, out.getvalue(), err.getvalue()


def run_subprocess(argv, folder):
    env = dict(os.environ, PYTHONPATH=ROOT)
    proc = subprocess.run([sys.executable, "-m", "estimator"] + list(argv), cwd=folder, capture_output=True,
                          text=True, env=env, timeout=300, stdin=subprocess.DEVNULL)
    return proc.returncode, proc.stdout, proc.stderr


def judge(case, base, runner, scratch, lines_seen=None):
    """None when the case is refused cleanly, else a short reason. lines_seen: an optional
    list that gets (label, the error line)."""
    label, argv, extra = case
    folder = tempfile.mkdtemp(prefix="case-", dir=scratch)
    try:
        _prepare(folder, base, extra)
        before = _digest(folder)
        code, out, err = runner(argv, folder)
        after = _digest(folder)
        lines = err.strip().splitlines()
        if lines_seen is not None:
            lines_seen.append((label, lines[0] if lines else "(nothing on stderr)"))
        if "Traceback" in err:
            return "traceback: %s" % (lines[-1] if lines else "")
        if code != 2:
            return "exit %s: %s" % (code, (lines or [out[:200]])[-1][:300])
        if len(lines) != 1 or not lines[0].startswith("error: "):
            return "stderr is not one error line: %r" % err[:300]
        if "cannot compute with these inputs" in lines[0]:
            return "only the last net caught it: %s" % lines[0][:300]
        if len(lines[0]) > 700:
            return "error line of %d characters" % len(lines[0])
        if "--json" in argv:  # stdout: one JSON object holding the same error
            try:
                if json.loads(out).get("error") != lines[0][len("error: "):]:
                    return "--json: the JSON object's error is not the error line"
            except ValueError:
                return "--json: stdout is not one JSON object: %r" % out[:200]
        if before != after:
            changed = sorted(set(before) ^ set(after) | {k for k in before if before.get(k) != after.get(k)})
            return "files changed: %s" % changed[:5]
        return None
    finally:
        shutil.rmtree(folder, ignore_errors=True)


def run_all(in_process=False, jobs=2, word=None, show=print, verbose=False):
    """Run every case; returns (number of cases, list of (label, reason) not clean)."""
    seen = [] if verbose else None
    base = _base_files()
    todo = [c for c in cases(base) if word is None or word in c[0]]
    runner = run_in_process if in_process else run_subprocess
    bad = []
    with tempfile.TemporaryDirectory(prefix="liftcal-bad-inputs-") as scratch:
        if in_process:
            results = [(case, judge(case, base, runner, scratch, seen)) for case in todo]
        else:
            with concurrent.futures.ThreadPoolExecutor(max_workers=jobs) as pool:
                results = list(zip(todo, pool.map(lambda c: judge(c, base, runner, scratch, seen), todo)))
    for label, line in sorted(seen or []):
        show("%-50s %s" % (label[:50], line[:250]))
    for case, reason in results:
        if reason is not None:
            bad.append((case[0], reason))
            show("NOT CLEAN  %s\n           %s" % (case[0], reason))
    return len(todo), bad


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--in-process", action="store_true", help="call main() here instead of a new process per case")
    parser.add_argument("--jobs", type=int, default=os.cpu_count() or 2, help="cases run at once (subprocess mode)")
    parser.add_argument("-k", dest="word", default=None, help="only the cases whose label holds WORD")
    parser.add_argument("-v", dest="verbose", action="store_true", help="print every case's error line")
    args = parser.parse_args()
    total, bad = run_all(args.in_process, args.jobs, args.word, verbose=args.verbose)
    commands = sorted({label.split(":")[0].split()[0] for label, _, _ in cases(_base_files())})
    print("bad inputs tried: %d across %s; refused cleanly: %d; not clean: %d"
          % (total, ", ".join(commands), total - len(bad), len(bad)))
    sys.exit(1 if bad else 0)


if __name__ == "__main__":
    main()
