"""New-user trial 14, finding 2: re-running `liftcal demo` deleted, without a word, the files the
README tour makes inside `liftcal-demo/` (a payload figure, a replay figure, an exported settings
file, a second parameter set), although README promises that a replaced liftcal file is named in
one line and that a parameter set is replaced only by a re-fit or with --replace.

The least surprising behaviour: a folder liftcal rewrites (the demo's, a board bundle) keeps, as
they were, the files made in it since liftcal wrote it, and its "replaced" line names them; the
files it writes itself are replaced; a file liftcal did not write still stops it (trial 10).
"""

import json
import os

import estimator.commands.demo as demo_command
from estimator.folders import check_folder, publish_folder, staging_folder, write_manifest
from io_helpers import MAP, PARAMS, run


def _bytes(folder):
    return {name: (folder / name).read_bytes() for name in sorted(os.listdir(folder)) if (folder / name).is_file()}


def _export_into(folder, name):
    code, out, err = run(["export", PARAMS, "--map", MAP, "--out", folder / name])
    assert code == 0, err
    return (folder / name).read_bytes()


def test_publishing_over_an_own_folder_keeps_the_files_made_there_since(tmp_path):
    target = tmp_path / "liftcal-demo"
    target.mkdir()
    (target / "vehicle.json").write_text("{}\n")
    (target / "old-only.txt").write_text("an earlier demo's file\n")
    write_manifest(str(target), "demo")
    mine = _export_into(target, "my-settings.txt")         # a liftcal command wrote it there since
    assert check_folder(str(target), "demo") == "own"
    staged = staging_folder(str(target))
    with open(os.path.join(staged, "vehicle.json"), "w") as fh:
        fh.write('{"new": 1}\n')
    kept = publish_folder(staged, str(target), "demo")
    assert kept == ["my-settings.txt"]
    assert (target / "my-settings.txt").read_bytes() == mine
    assert (target / "vehicle.json").read_text() == '{"new": 1}\n'   # its own file, replaced
    assert not (target / "old-only.txt").exists()                    # the earlier run's own file
    listed = json.loads((target / ".liftcal-folder.json").read_text())["files"]
    assert sorted(listed) == ["vehicle.json"]                        # the kept file stays the person's
    assert check_folder(str(target), "demo") == "own"                # and the next run is not refused


def _quick_run(out_dir, work, seed, emit):
    """demo._run without the simulations: the demo writes one file."""
    with open(os.path.join(work, "vehicle.json"), "w") as fh:
        fh.write("{}\n")
    return {}, "liftcal demo (stand-in)"


def test_a_second_demo_keeps_the_tour_files_and_says_so(tmp_path, monkeypatch):
    monkeypatch.setattr(demo_command, "_run", _quick_run)
    folder = tmp_path / "liftcal-demo"
    report, text = demo_command.run_demo(str(folder))
    assert report["replaced"] == [] and report["kept"] == [] and "replaced" not in text
    mine = _export_into(folder, "my-settings.txt")
    printed = []
    report, text = demo_command.run_demo(str(folder), emit=printed.append)
    assert (folder / "my-settings.txt").read_bytes() == mine
    line = ("replaced %s: the files an earlier liftcal demo wrote there; kept the 1 file made there since, "
            "as they were: my-settings.txt" % folder)
    assert report["replaced"] == [line] and report["kept"] == ["my-settings.txt"]
    assert text.splitlines()[-1] == line and printed[-1] == line


def test_firmware_over_its_bundle_keeps_a_file_made_in_it_and_names_it(tmp_path):
    board = tmp_path / "board"
    code, out, err = run(["firmware", PARAMS, "--out", board, "--json"])
    assert code == 0, err
    mine = _export_into(board, "my-settings.txt")
    code, out, err = run(["firmware", PARAMS, "--out", board, "--json"])
    assert code == 0, err
    assert (board / "my-settings.txt").read_bytes() == mine
    assert json.loads(out)["replaced"] == [
        "replaced %s: a power-watch bundle liftcal wrote from %s; kept the 1 file made there since, as they "
        "were: my-settings.txt" % (board, PARAMS)]
