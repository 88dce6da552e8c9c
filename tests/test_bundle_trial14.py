"""The board bundle's words, new-user trial 14 (findings 12 and 13).

- 12: `firmware --out DIR` over a bundle written without a parameter-set file name (the library's
  default source, as the demo wrote its board folder) printed "replaced board: a power-watch
  bundle liftcal wrote from parameter set", a sentence cut short; the demo now writes the file
  name, and a bundle without one is replaced without a dangling "from";
- 13: a vehicle without avionics_current_A gave the README "counts no current (avionics_current_A
  not given) for them (the vehicle file's `avionics_current_A`)": the slot's words fell into the
  middle of the sentence. Each case now reads as one sentence.
"""

import json

from estimator.watch.bundle import write_bundle
from io_helpers import PARAMS, run
from watch_helpers import demo_fit_params


def _readme(folder):
    return " ".join((folder / "README.md").read_text().split())


def test_the_readme_says_the_avionics_current_in_one_plain_sentence(tmp_path):
    params = demo_fit_params()
    params["vehicle"].pop("avionics_current_A", None)
    write_bundle(params, str(tmp_path / "none"))
    none = _readme(tmp_path / "none")
    assert ("This bundle's expected power counts no current for them: the vehicle file gives no "
            "`avionics_current_A`. If yours draw more") in none
    assert "not given) for them" not in none
    params["vehicle"]["avionics_current_A"] = 0.6
    write_bundle(params, str(tmp_path / "some"))
    some = _readme(tmp_path / "some")
    assert ("This bundle's expected power counts 0.6 A for them (the vehicle file's `avionics_current_A`). "
            "If yours draw more") in some


def test_replacing_a_bundle_written_without_a_file_name_says_a_whole_sentence(tmp_path):
    board = tmp_path / "board"
    write_bundle(demo_fit_params(), str(board))      # source: the default, no file name
    code, out, err = run(["firmware", PARAMS, "--out", board, "--json"])
    assert code == 0, err
    replaced = json.loads(out)["replaced"]
    assert replaced == ["replaced %s: a power-watch bundle liftcal wrote" % board], replaced
    # a bundle written from a file names it when replaced (trial 12, finding 14 kept)
    code, out, err = run(["firmware", PARAMS, "--out", board, "--json"])
    assert json.loads(out)["replaced"] == ["replaced %s: a power-watch bundle liftcal wrote from %s"
                                           % (board, PARAMS)]
