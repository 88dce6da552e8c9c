"""New-user trial 25.

Finding 1: inside `liftcal-demo/` a builder re-fitted the demo's sweep over its params.json
(`fit bench.csv --out params.json --density 1.10`, allowed: liftcal wrote that set, same bench
file and rotor); a second `liftcal demo` then put the demo's own set back over it, while its
"replaced" line named only the new figures as kept. README promises the demo keeps the
parameter sets made there and names them. A file of the demo's that a liftcal command rewrote
since (its content no longer the SHA-256 the demo's manifest lists) is now the person's: kept
as it is, left out of the new manifest, and named; a bundle rebuilt there is kept whole.

Finding 2: `liftcal firmware params.json --out board` inside `liftcal-demo/` said the bundle it
replaced was made "from liftcal-demo/params.json": the path as given where the demo ran. The
bundle's manifest now records the set's absolute path, said from where the person is now.
"""

import json
import os
import shutil

import pytest

import estimator.commands.demo as demo_command
import estimator.demo.flight_sim as flight_sim
import estimator.watch.replay as replay
from estimator.folders import check_folder, kept_words, publish_folder, staging_folder, write_manifest
from io_helpers import MAP, PARAMS, run

LINE = "replaced liftcal-demo: the files an earlier liftcal demo wrote there"


@pytest.fixture
def quick_demo(tmp_path, monkeypatch):
    """The real demo steps without the flight simulations and replays (seconds each), run from
    tmp_path with the default relative folder name; returns a function running it again."""
    monkeypatch.setattr(flight_sim, "simulate_flight", lambda *a, **k: "time[s],power[W]\n0,1\n")
    monkeypatch.setattr(replay, "replay_file", lambda *a, **k: {"events": [], "samples": 1, "alarms": 0})
    monkeypatch.chdir(tmp_path)

    def again():
        monkeypatch.chdir(tmp_path)
        return demo_command.run_demo("liftcal-demo")

    again()
    return again


def _in_demo(tmp_path, monkeypatch, *args):
    monkeypatch.chdir(tmp_path / "liftcal-demo")
    code, out, err = run(list(args))
    assert code == 0, err
    return out


def _files(folder):
    return {os.path.relpath(os.path.join(base, name), folder): open(os.path.join(base, name), "rb").read()
            for base, _, names in os.walk(folder) for name in names}


def _listed(folder):
    return json.loads((folder / ".liftcal-folder.json").read_text())["files"]


def test_a_second_demo_keeps_a_parameter_set_refitted_there_and_names_it(quick_demo, tmp_path, monkeypatch):
    folder = tmp_path / "liftcal-demo"
    demo_set = (folder / "params.json").read_bytes()
    _in_demo(tmp_path, monkeypatch, "fit", "bench.csv", "--out", "params.json", "--density", "1.10")
    mine = (folder / "params.json").read_bytes()
    assert mine != demo_set   # the re-fit at another bench air (trial 25's steps)
    for _ in range(2):        # and the run after keeps it too: it stays the person's
        report, text = quick_demo()
        assert (folder / "params.json").read_bytes() == mine
        line = LINE + "; kept the 1 file changed there since, as they were: params.json"
        assert report["replaced"] == [line] and text.splitlines()[-1] == line
        assert report["kept"] == ["params.json"]
        assert "params.json" not in _listed(folder) and "settings.txt" in _listed(folder)
        assert check_folder("liftcal-demo", "demo") == "own"


def test_a_bundle_rebuilt_in_the_demo_folder_is_kept_whole(quick_demo, tmp_path, monkeypatch):
    folder = tmp_path / "liftcal-demo"
    _in_demo(tmp_path, monkeypatch, "fit", "bench.csv", "--vehicle", "vehicle.json", "--out", "params.json",
             "--density", "1.10")
    _in_demo(tmp_path, monkeypatch, "firmware", "params.json", "--vehicle", "vehicle.json", "--out", "board")
    board = _files(folder / "board")
    report, _ = quick_demo()
    assert _files(folder / "board") == board     # every file as the person's firmware wrote it
    assert report["replaced"] == [LINE + "; kept the 1 file and 1 folder changed there since, as they were: "
                                  "board/, params.json"]
    assert not any(rel.startswith("board/") for rel in _listed(folder))
    assert check_folder(str(folder / "board"), "bundle") == "own"
    assert check_folder("liftcal-demo", "demo") == "own"


def test_publishing_keeps_a_liftcal_file_rewritten_since_where_the_new_folder_writes_it(tmp_path):
    target = tmp_path / "liftcal-demo"
    target.mkdir()
    code, _, err = run(["export", PARAMS, "--map", MAP, "--out", target / "settings.txt"])
    assert code == 0, err
    write_manifest(str(target), "demo")      # an earlier demo's folder, settings.txt listed
    listed = (target / "settings.txt").read_bytes()
    other = shutil.copy(PARAMS, tmp_path / "another-name.json")   # the file it names differs
    code, _, err = run(["export", other, "--map", MAP, "--out", target / "settings.txt"])
    assert code == 0, err
    mine = (target / "settings.txt").read_bytes()
    assert mine != listed                    # rewritten by a liftcal command since
    assert check_folder(str(target), "demo") == "own"
    staged = staging_folder(str(target))
    for name, text in (("settings.txt", "# the new folder's own\n"), ("vehicle.json", "{}\n")):
        with open(os.path.join(staged, name), "w") as fh:
            fh.write(text)
    kept = publish_folder(staged, str(target), "demo")
    assert kept == ["settings.txt"] and list(kept.changed) == ["settings.txt"]
    assert kept_words(kept) == "; kept the 1 file changed there since, as they were: settings.txt"
    assert (target / "settings.txt").read_bytes() == mine
    assert sorted(json.loads((target / ".liftcal-folder.json").read_text())["files"]) == ["vehicle.json"]


def test_firmware_inside_the_demo_folder_names_the_set_from_there(quick_demo, tmp_path, monkeypatch):
    out = _in_demo(tmp_path, monkeypatch, "firmware", "params.json", "--vehicle", "vehicle.json", "--out", "board",
                   "--json")
    assert json.loads(out)["replaced"] == ["replaced board: a power-watch bundle liftcal wrote from params.json"]


def test_firmware_names_the_set_relative_to_where_it_runs_now(tmp_path, monkeypatch):
    (tmp_path / "proj").mkdir()
    (tmp_path / "elsewhere").mkdir()
    shutil.copy(PARAMS, tmp_path / "proj" / "params.json")
    monkeypatch.chdir(tmp_path)
    code, _, err = run(["firmware", "proj/params.json", "--out", "proj/board"])
    assert code == 0, err
    monkeypatch.chdir(tmp_path / "elsewhere")
    code, out, err = run(["firmware", "../proj/params.json", "--out", "../proj/board", "--json"])
    assert code == 0, err
    assert json.loads(out)["replaced"] == [
        "replaced ../proj/board: a power-watch bundle liftcal wrote from ../proj/params.json"]
    monkeypatch.chdir(tmp_path / "proj")
    code, out, err = run(["firmware", "params.json", "--out", "board", "--json"])
    assert json.loads(out)["replaced"] == ["replaced board: a power-watch bundle liftcal wrote from params.json"]
    # a set given by its absolute path is named so again
    code, out, err = run(["firmware", str(tmp_path / "proj" / "params.json"), "--out", "board", "--json"])
    code, out, err = run(["firmware", "params.json", "--out", "board", "--json"])
    assert json.loads(out)["replaced"] == ["replaced board: a power-watch bundle liftcal wrote from %s"
                                           % (tmp_path / "proj" / "params.json")]


@pytest.mark.parametrize("record", [5, "x", {"path": 5}, {"path": "relative/params.json"}, {}])
def test_a_garbled_source_record_falls_back_to_the_config_header(tmp_path, record):
    board = tmp_path / "board"
    code, _, err = run(["firmware", PARAMS, "--out", board])
    assert code == 0, err
    manifest = json.loads((board / ".liftcal-folder.json").read_text())
    manifest["source"] = record
    (board / ".liftcal-folder.json").write_text(json.dumps(manifest))
    code, out, err = run(["firmware", PARAMS, "--out", board, "--json"])
    assert code == 0 and "Traceback" not in err, err
    assert json.loads(out)["replaced"] == ["replaced %s: a power-watch bundle liftcal wrote from %s" % (board, PARAMS)]
