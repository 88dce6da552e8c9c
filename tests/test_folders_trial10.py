"""Tenth new-user trial, finding 7: a refused output folder names every file that keeps it the
user's (or the first five and how many more), not only the first; the next run should not
reveal one more."""

import pytest

from estimator.errors import InputError
from estimator.folders import check_folder, write_manifest


def _own_folder(tmp_path):
    folder = tmp_path / "liftcal-demo"
    folder.mkdir()
    (folder / "vehicle.json").write_text("{}\n")
    write_manifest(str(folder), "demo")
    assert check_folder(str(folder), "demo") == "own"
    return folder


def test_every_foreign_file_is_named(tmp_path):
    folder = _own_folder(tmp_path)
    (folder / "notes.md").write_text("x\n")
    (folder / "vehicle.json.bak").write_text("{}\n")
    (folder / "vehicle.json").write_text('{"edited": 1}\n')  # listed, changed since
    with pytest.raises(InputError) as info:
        check_folder(str(folder), "demo")
    # files liftcal never listed first, then the listed one that changed
    assert "changed since (notes.md, vehicle.json.bak, vehicle.json);" in str(info.value), str(info.value)


def test_many_foreign_files_are_counted(tmp_path):
    folder = _own_folder(tmp_path)
    for i in range(8):
        (folder / ("f%d.txt" % i)).write_text("x\n")
    with pytest.raises(InputError) as info:
        check_folder(str(folder), "demo")
    assert "(f0.txt, f1.txt, f2.txt, f3.txt, f4.txt and 3 more)" in str(info.value), str(info.value)


def test_a_folder_without_a_manifest_names_its_files(tmp_path):
    folder = tmp_path / "mine"
    folder.mkdir()
    (folder / "a.txt").write_text("x\n")
    (folder / "b.txt").write_text("x\n")
    with pytest.raises(InputError) as info:
        check_folder(str(folder), "bundle")
    assert "(a.txt, b.txt)" in str(info.value)
