"""New-user trial 26: a bundle folder the builder edited (board_loop.py, as its README invites)
and added to (main.py) is refused on a rebuild, rightly; the refusal now says how to keep the
edits: write the new bundle to another folder and carry the named files over by hand. Still one
`error:` line, exit 2, nothing written."""

import os

from io_helpers import PARAMS, refused, run, tree_digest


def test_rebuild_into_an_edited_bundle_says_how_to_keep_the_edits(tmp_path):
    board = tmp_path / "board"
    code, _, err = run(["firmware", PARAMS, "--out", board])
    assert code == 0, err
    (board / "main.py").write_text("import board_loop\n")
    with open(board / "board_loop.py", "a", encoding="utf-8") as fh:
        fh.write("# my sensor pins\n")
    before = tree_digest(tmp_path)
    line = refused(["firmware", PARAMS, "--out", board], "changed since (main.py, board_loop.py)")
    assert "name another folder for the new board bundle, then carry your files over by hand " \
           "(main.py, board_loop.py)" in line, line
    assert tree_digest(tmp_path) == before


def test_a_folder_liftcal_never_wrote_gets_no_carry_over_words(tmp_path):
    mine = tmp_path / "mine"
    mine.mkdir()
    (mine / "notes.txt").write_text("mine\n")
    line = refused(["firmware", PARAMS, "--out", mine], "changed since (notes.txt);")
    assert "carry" not in line and line.endswith("name another folder"), line
    assert os.listdir(mine) == ["notes.txt"]
