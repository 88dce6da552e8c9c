"""No user file is ever replaced, and every write failure is one clean refusal.

Design notes sec. 4: an output that is an input, a device, a file of another kind, a file
or a folder holding files liftcal did not write is refused with one error line (the user
can name another path); a failed write (permission, full disk, missing folder) is one error
line, exit 2, and leaves nothing behind.
"""

import json
import os
import resource
import shutil
import signal
import subprocess
import sys

import pytest

from estimator.demo.bench_sim import simulate_sweep
from estimator.folders import FOLDER_MANIFEST, check_folder, write_manifest
from estimator.outputs import file_kind
from io_helpers import PARAMS, ROOT, VEHICLE, refused, tree_digest
from trial_helpers import ok
from watch_helpers import flight_csv_once


@pytest.fixture(scope="module")
def bench_csv(tmp_path_factory):
    path = tmp_path_factory.mktemp("bench") / "bench.csv"
    path.write_text(simulate_sweep(seed=1))
    return str(path)


@pytest.fixture(scope="module")
def flight_csv(tmp_path_factory):
    path = tmp_path_factory.mktemp("flight") / "flight.csv"
    path.write_text(flight_csv_once(seed=2))
    return str(path)


# --- 1. no user file ever replaced -------------------------------------------------------------

def test_fit_over_its_own_input_is_refused(tmp_path, bench_csv):
    same = tmp_path / "same.csv"
    same.write_text(open(bench_csv).read())
    before = same.read_bytes()
    refused(["fit", same, "--out", same], "is also an input of this command", "name another path")
    link = tmp_path / "hard.json"
    os.link(same, link)  # the same file under another name
    refused(["fit", same, "--out", link], "is also an input")
    refused(["fit", same, "--vehicle", VEHICLE, "--out", tmp_path / "p.json", "--plot", same], "--plot")
    assert same.read_bytes() == before and not (tmp_path / "p.json").exists()


@pytest.mark.parametrize("device", ["/dev/null", "/dev/full", "/dev/zero"])
def test_devices_are_never_written(bench_csv, device):
    refused(["fit", bench_csv, "--out", device], device, "a device")
    refused(["export", PARAMS, "--out", device], device, "a device")


def test_a_pipe_or_a_link_is_never_written(tmp_path, bench_csv):
    fifo = tmp_path / "fifo"
    os.mkfifo(fifo)
    refused(["fit", bench_csv, "--out", fifo], "a pipe")
    mine = tmp_path / "mine.json"
    mine.write_text("{}")
    link = tmp_path / "link.json"
    os.symlink(mine, link)
    refused(["fit", bench_csv, "--out", link], "symbolic link")
    assert mine.read_text() == "{}"


def test_existing_files_liftcal_did_not_write_are_kept(tmp_path, bench_csv, flight_csv):
    user = tmp_path / "notes.json"
    user.write_text('{"model": "liftcal.map/1", "my": "notes"}')  # even one that looks like ours
    png = tmp_path / "holiday.png"
    png.write_bytes(b"\x89PNG\r\n\x1a\n" + b"\0" * 100)
    txt = tmp_path / "settings.txt"
    txt.write_text("MY_SETTING 1\n")
    before = tree_digest(tmp_path)
    refused(["fit", bench_csv, "--out", user], "a file liftcal did not write is already there", "name another path")
    refused(["fit", bench_csv, "--out", tmp_path / "p.json", "--plot", png], "--plot", "did not write")
    refused(["export", PARAMS, "--out", txt], "did not write")
    refused(["replay", flight_csv, "--params", PARAMS, "--plot", png], "did not write")
    assert tree_digest(tmp_path) == before


def test_liftcal_replaces_its_own_files_of_the_same_kind_only(tmp_path, bench_csv, flight_csv):
    p, png, s = tmp_path / "p.json", tmp_path / "fit.png", tmp_path / "s.txt"
    for _ in range(2):  # the second run replaces what the first wrote
        ok("fit", bench_csv, "--out", p, "--plot", png)
        ok("export", PARAMS, "--out", s)
    ok("replay", flight_csv, "--params", PARAMS, "--plot", png)
    assert (file_kind(str(p)), file_kind(str(png)), file_kind(str(s))) == ("params", "png", "settings")
    before = tree_digest(tmp_path)
    refused(["fit", bench_csv, "--out", png], "is a liftcal figure (PNG)", "a parameter set")
    refused(["export", PARAMS, "--out", p], "is a liftcal parameter set")
    refused(["fit", bench_csv, "--out", s], "is a liftcal settings file")
    assert tree_digest(tmp_path) == before


def test_plot_must_be_png_and_outputs_distinct(tmp_path, bench_csv, flight_csv):
    refused(["fit", bench_csv, "--out", tmp_path / "p.json", "--plot", tmp_path / "fit.txt"],
            "--plot", "PNG only", ".png")
    refused(["replay", flight_csv, "--params", PARAMS, "--plot", tmp_path / "r.pdf"], "PNG only")
    refused(["fit", bench_csv, "--out", tmp_path / "x.png", "--plot", tmp_path / "x.png"], "same path")
    assert os.listdir(tmp_path) == []


def test_demo_never_replaces_a_users_folder(tmp_path):
    mywork = tmp_path / "mywork"
    mywork.mkdir()
    (mywork / "vehicle.json").write_text('{"mine": true}')
    (mywork / "bench.csv").write_text("my raw sweep\n")
    before = tree_digest(tmp_path)
    refused(["demo", "--out", mywork], "holds files liftcal did not write", "name another folder")
    refused(["demo", "--out", mywork / "vehicle.json"], "is a file, not a folder")
    refused(["demo", "--out", tmp_path / "no" / "such"], "does not exist")
    assert tree_digest(tmp_path) == before


def test_demo_replaces_its_own_folder_unless_changed(tmp_path, bench_csv, demo_cli_run):
    # the folder `liftcal demo --out DIR --json` left (one run per session, tests/conftest.py):
    # it exited 0, said nothing on stderr and left no temporary folder beside DIR; a copy is edited
    done, made, beside = demo_cli_run
    assert done.returncode == 0 and done.stderr == "", (done.returncode, done.stderr)
    assert beside == ["demo"]  # no temporary folder left
    out = tmp_path / "demo"
    shutil.copytree(made, out, symlinks=True)
    assert os.path.exists(out / FOLDER_MANIFEST) and os.path.exists(out / "board" / FOLDER_MANIFEST)
    # rerunning a printed step rewrites liftcal's own files: the folder stays the demo's
    ok("fit", out / "bench.csv", "--vehicle", out / "vehicle.json", "--out", out / "params.json")
    ok("firmware", out / "params.json", "--out", out / "board")
    # (a second demo run would replace it: the guard says so; the run itself takes half a minute)
    assert check_folder(str(out), "demo") == "own"
    # a parameter set rewritten by fit and then edited by hand is the person's (its content
    # seal no longer matches, estimator/seal.py), though it still carries liftcal's mark
    kept = (out / "params.json").read_text()
    (out / "params.json").write_text(kept.replace('"thrust_max_N": ', '"thrust_max_N": 1', 1))
    refused(["demo", "--out", out], "params.json")
    (out / "params.json").write_text(kept)
    assert check_folder(str(out), "demo") == "own"
    # a file the person edited or added makes it theirs
    (out / "vehicle.json").write_text('{"edited": true}')
    refused(["demo", "--out", out], "vehicle.json")
    (out / "vehicle.json").unlink()
    (out / "board" / "my_sensor.py").write_text("# mine\n")
    refused(["demo", "--out", out], "board/my_sensor.py")
    refused(["firmware", PARAMS, "--out", out / "board"], "my_sensor.py")
    assert (out / "board" / "my_sensor.py").read_text() == "# mine\n"
    assert [n for n in os.listdir(tmp_path) if n != "demo"] == []  # no temporary folder left


def test_firmware_refuses_a_folder_holding_its_input_or_another_kind(tmp_path):
    folder = tmp_path / "work"
    folder.mkdir()
    params = folder / "params.json"
    params.write_text(open(PARAMS).read())
    refused(["firmware", params, "--out", folder], "holds an input of this command")
    demo = tmp_path / "demo"  # a demo folder as `liftcal demo` leaves it (its manifest)
    demo.mkdir()
    (demo / "bench.csv").write_text("x\n")
    write_manifest(str(demo), "demo")
    refused(["firmware", PARAMS, "--out", demo], "holds files liftcal did not write")
    refused(["firmware", PARAMS, "--out", "/dev/null"], "a device, not a folder")


# --- 3. write failures: one error line, nothing left behind ----------------------------------

@pytest.mark.parametrize("folder,why", [
    ("/sys", "permission denied"),           # refused even to root
    ("/proc", "cannot write"),
])
def test_unwritable_folders(folder, why, bench_csv, flight_csv):
    refused(["fit", bench_csv, "--out", folder + "/p.json"], folder, why, "nothing was written")
    refused(["export", PARAMS, "--out", folder + "/s.txt"], "nothing was written")
    refused(["replay", flight_csv, "--params", PARAMS, "--plot", folder + "/r.png"], "nothing was written")
    refused(["firmware", PARAMS, "--out", folder + "/board"], "cannot write")
    refused(["demo", "--out", folder + "/demo"], "cannot write")
    assert not [n for n in os.listdir(folder) if "liftcal" in n or n.startswith(".tmp")]


def test_missing_folder_or_a_file_in_the_path(tmp_path, bench_csv):
    afile = tmp_path / "afile"
    afile.write_text("x")
    for target, words in ((tmp_path / "missing" / "p.json", "does not exist"),
                          (afile / "p.json", "is a file, not a folder"),
                          (afile / "sub" / "p.json", "a part of the path is a file")):
        refused(["fit", bench_csv, "--out", target], "--out", words)
        refused(["firmware", PARAMS, "--out", target], "--out", words)
        refused(["export", PARAMS, "--out", target], "--out", words)
        refused(["demo", "--out", target], "--out", words)


def _full_disk_run(args, cwd, limit=2000):
    """Run liftcal where files cannot grow past ``limit`` bytes (RLIMIT_FSIZE): a write then
    fails with EFBIG as on a full disk, for root too."""
    def limit_files():
        signal.signal(signal.SIGXFSZ, signal.SIG_IGN)
        resource.setrlimit(resource.RLIMIT_FSIZE, (limit, limit))

    env = dict(os.environ, PYTHONDONTWRITEBYTECODE="1", MPLCONFIGDIR=str(cwd))
    return subprocess.run([sys.executable, "-m", "estimator"] + [str(a) for a in args], cwd=ROOT,
                          capture_output=True, text=True, preexec_fn=limit_files, env=env, timeout=300)


@pytest.mark.parametrize("command", ["fit", "fit-plot", "export", "replay-plot", "firmware", "demo"])
def test_full_disk_is_one_error_line_and_nothing_left(tmp_path, bench_csv, flight_csv, command):
    out = tmp_path / "out"
    out.mkdir()
    args = {"fit": ["fit", bench_csv, "--out", out / "p.json"],
            "fit-plot": ["fit", bench_csv, "--out", out / "p.json", "--plot", out / "fit.png"],
            "export": ["export", PARAMS, "--out", out / "s.json", "--json"],
            "replay-plot": ["replay", flight_csv, "--params", PARAMS, "--plot", out / "r.png"],
            "firmware": ["firmware", PARAMS, "--out", out / "board"],
            "demo": ["demo", "--out", out / "demo"]}[command]
    limit = 300 if command == "export" else 2000
    proc = _full_disk_run(args, tmp_path, limit)
    lines = proc.stderr.strip().splitlines()
    assert proc.returncode == 2 and len(lines) == 1 and lines[0].startswith("error: "), proc.stderr
    assert "Traceback" not in proc.stderr
    assert os.listdir(out) == [], os.listdir(out)
