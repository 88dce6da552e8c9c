"""Property-based test over every command (hypothesis): whatever the input, never a traceback,
never exit 1, never a changed user file.

For each example a fresh folder holds valid inputs (vehicle, parameter set, map, bench sweep,
flight log) and the user's own files; one input of one command is replaced by generated
bytes (random bytes, a truncated or mutated valid file, NaN/Infinity written anywhere, huge
and deep documents, a random JSON value at a random place), or an output path of one kind
(an input, the user's file, a device, a pipe, a link, a folder ...) is given. The command
must exit 0 (when what it was given was fine) or 2 with exactly one `error:` line (under
--json also exactly one JSON object {"error": ...} on stdout); when it exits 2, no file in the folder changed and none was added; when it exits 0, the files that
were there before are unchanged except liftcal's own outputs.
Derandomized under CI (tests/conftest.py); about 30 s.
"""

import json
import os
import re
import shutil
import tempfile

from hypothesis import HealthCheck, given, settings, strategies as st

from io_helpers import bad_inputs_module

BAD = bad_inputs_module()
BASE = BAD._base_files()
PROPERTY = settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow,
                                                                          HealthCheck.data_too_large])

# (command line with {f} for the generated file, which valid file it stands for)
READERS = [
    (["hover", "{f}", "--json"], "vehicle.json"),
    (["hover", "vehicle.json", "--params", "{f}"], "params.json"),
    (["check", "{f}"], "params.json"),
    (["check", "{f}", "--json"], "params.json"),
    (["export", "{f}"], "params.json"),
    (["export", "params.json", "--map", "{f}", "--json"], "map.json"),
    (["fit", "{f}", "--out", "out.json"], "bench.csv"),
    (["fit", "bench.csv", "--vehicle", "{f}", "--out", "out.json"], "vehicle.json"),
    (["firmware", "{f}", "--out", "board"], "params.json"),
    (["firmware", "params.json", "--vehicle", "{f}", "--out", "board"], "vehicle.json"),
    (["replay", "{f}", "--params", "params.json"], "flight.csv"),
    (["replay", "flight.csv", "--params", "{f}", "--json"], "params.json"),
    (["replay", "flight.csv", "--params", "params.json", "--vehicle", "{f}"], "vehicle.json"),
    (["hover", "{f}", "--payload", "0..1kg", "--json"], "vehicle.json"),
    (["compare", "{f}", "--vary", "mass_kg=1.9,2.1"], "vehicle.json"),
]
NUMBER = re.compile(rb"(?<![\w.])-?\d+(?:\.\d+)?(?:[eE][-+]?\d+)?")
NON_FINITE = [b"NaN", b"Infinity", b"-Infinity", b"1e999", b"-1e999", b"nan", b"inf", b"-inf"]


def _check(argv, extra, allowed_outputs):
    """Run argv in a fresh folder holding BASE + extra; assert the error contract."""
    with tempfile.TemporaryDirectory(prefix="liftcal-prop-") as folder:
        BAD._prepare(folder, BASE, extra)
        before = BAD._digest(folder)
        code, out, err = BAD.run_in_process(argv, folder)
        after = BAD._digest(folder)
    assert "Traceback" not in err, err[-2000:]
    assert code in (0, 2), (argv[:6], code, err[-1000:])
    if code == 2:
        lines = err.strip().splitlines()
        assert len(lines) == 1 and lines[0].startswith("error: "), err[:1000]
        assert "cannot compute with these inputs" not in lines[0], lines[0]  # a check, not the last net
        assert len(lines[0]) < 800, lines[0][:200]
        assert after == before, sorted(k for k in set(before) | set(after) if before.get(k) != after.get(k))[:5]
        if "--json" in argv:  # stdout is still one JSON object: the same error
            assert json.loads(out)["error"] == lines[0][len("error: "):], out[:500]
    else:
        changed = [k for k in before if before.get(k) != after.get(k) and k not in allowed_outputs]
        assert not changed, changed
        added = [k for k in after if k not in before and k.split(os.sep)[0] not in allowed_outputs]
        assert not added, added
        if "--json" in argv:
            json.loads(out)
    return code


@st.composite
def spoiled(draw, valid):
    """Bytes made from a valid file: random, truncated, mutated, non-finite numbers, huge, deep."""
    kind = draw(st.sampled_from(["random", "truncated", "mutated", "non_finite", "deep", "long",
                                 "json_value", "bom"]))
    if kind == "random":
        return draw(st.binary(max_size=3000))
    if kind == "truncated":
        return valid[:draw(st.integers(0, len(valid)))]
    if kind == "mutated":
        data = bytearray(valid)
        for _ in range(draw(st.integers(1, 8))):
            at = draw(st.integers(0, max(0, len(data) - 1)))
            op = draw(st.sampled_from(["flip", "insert", "delete"]))
            byte = draw(st.sampled_from(list(b'{}[]",:.-+eE0123456789 \n\r\t;#\x00\xff') + [draw(st.integers(0, 255))]))
            if op == "flip" and data:
                data[at] = byte
            elif op == "insert":
                data.insert(at, byte)
            elif data:
                del data[at]
        return bytes(data)
    if kind == "non_finite":
        spans = [m.span() for m in NUMBER.finditer(valid)]
        if not spans:
            return valid
        out = valid
        for _ in range(draw(st.integers(1, 3))):
            spans = [m.span() for m in NUMBER.finditer(out)]
            a, b = spans[draw(st.integers(0, len(spans) - 1))]
            out = out[:a] + draw(st.sampled_from(NON_FINITE)) + out[b:]
        return out
    if kind == "deep":
        n = draw(st.sampled_from([65, 200, 1000, 5000, 200000]))
        opener, closer = draw(st.sampled_from([(b"[", b"]"), (b'{"a":', b"}")]))
        return opener * n + (b"1" if opener != b"[" else b"") + closer * n
    if kind == "long":
        n = draw(st.sampled_from([10 ** 4, 10 ** 6, 3 * 10 ** 6]))
        filler = draw(st.sampled_from([b"x", b"9", b",", b"[1,", b" "]))
        at = draw(st.integers(0, len(valid)))
        return valid[:at] + filler * (n // len(filler)) + valid[at:]
    if kind == "bom":
        return draw(st.sampled_from([b"\xef\xbb\xbf", b"\xff\xfe", b"\xfe\xff"])) + valid
    # a random JSON value at a random place of a valid JSON document
    try:
        doc = json.loads(valid)
    except ValueError:
        return valid
    paths = list(BAD._walk(doc))
    if not paths:
        return valid
    path, _ = paths[draw(st.integers(0, len(paths) - 1))]
    value = draw(st.recursive(st.none() | st.booleans() | st.floats(allow_nan=False) | st.integers()
                              | st.text(max_size=20),
                              lambda inner: st.lists(inner, max_size=4) | st.dictionaries(st.text(max_size=8), inner, max_size=4),
                              max_leaves=10))
    node = doc
    parts = path.split(".")
    for part in parts[:-1]:
        node = node[part]
    node[parts[-1]] = value
    return json.dumps(doc).encode()


@PROPERTY
@given(st.data())
def test_any_input_file_to_any_command(data):
    argv, stands_for = data.draw(st.sampled_from(READERS))
    content = data.draw(spoiled(BASE[stands_for]))
    name = "input" + os.path.splitext(stands_for)[1]
    _check([a.replace("{f}", name) for a in argv], {name: content}, {"out.json", "board"})


OUTPUT_KINDS = {
    "an input": ("bench.csv", {}), "the user's file": ("notes.txt", {}), "the user's picture": ("photo.png", {}),
    "/dev/null": ("/dev/null", {}), "/dev/full": ("/dev/full", {}), "a pipe": ("fifo", {"fifo": "FIFO"}),
    "a link": ("link", {"link": "LINK:notes.txt"}), "a dangling link": ("dang", {"dang": "LINK:nowhere.json"}),
    "a folder": ("mywork", {}), "the current folder": (".", {}), "a missing folder": ("no/x.png", {}),
    "under a file": ("notes.txt/x.png", {}), "a liftcal figure": ("old.png", {"old.png": "LIFTCAL_PNG"}),
    "a parameter set": ("old.json", {"old.json": "COPY:params.json"}), "/sys": ("/sys/x.png", {}), "/proc": ("/proc/x.png", {}),
    "an empty path": ("", {}), "a new file": ("new.png", {}), "a new json file": ("new.json", {}),
    "a new folder": ("newdir", {}),
}
WRITERS = [
    ["fit", "bench.csv", "--out", "{o}"],
    ["fit", "bench.csv", "--out", "p.json", "--plot", "{o}"],
    ["export", "params.json", "--out", "{o}"],
    ["export", "params.json", "--json", "--out", "{o}"],
    ["replay", "flight.csv", "--params", "params.json", "--plot", "{o}"],
    ["firmware", "params.json", "--out", "{o}"],
    ["hover", "vehicle.json", "--payload", "0..1kg", "--plot", "{o}"],
    ["compare", "vehicle.json", "--vary", "mass_kg=1.9,2.1", "--plot", "{o}"],
]


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.sampled_from(WRITERS), st.sampled_from(sorted(OUTPUT_KINDS)))
def test_any_output_path_kind(argv, kind):
    path, extra = OUTPUT_KINDS[kind]
    # old.png and old.json are liftcal's own (a figure, a parameter set): replacing them is allowed
    outputs = {"p.json", "new.png", "new.json", "newdir", "old.png", "old.json"}
    _check([a.replace("{o}", path) for a in argv], extra, outputs)


def test_demo_output_path_kinds():
    # the demo takes seconds: every folder kind once, not drawn at random
    for kind in ("an input", "the user's file", "/dev/null", "a link", "a folder", "the current folder",
                 "a missing folder", "under a file", "/sys", "/proc", "an empty path"):
        path, extra = OUTPUT_KINDS[kind]
        assert _check(["demo", "--out", path], extra, set()) == 2, kind
