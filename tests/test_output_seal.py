"""A file liftcal wrote and a person then edited is never replaced (design notes sec. 4).

Parameter sets and settings files carry a content seal (estimator.seal): SHA-256 of the file's
own text with the seal digits zeroed. The seal is checked here against hashlib's SHA-256
(FIPS 180-4) recomputed in the test, and through the commands: a second `fit --out` or
`export --out` over an untouched file replaces it; over an edited one, or one without a seal,
it stops with one error line, exit 2, and the file's bytes are unchanged.
"""

import hashlib
import json
import os
import shutil

from click.testing import CliRunner

from estimator.cli import cli
from estimator.demo.ramp_sweep import ramp_sweep_rows, write_ramp_csv
from estimator.jsonread import load as load_strict_json
from estimator.seal import seal_state, seal_text

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
EXAMPLE = os.path.join(ROOT, "schemas", "examples", "valid", "params-demo-with-hover.json")


def run(*args):
    return CliRunner().invoke(cli, [str(a) for a in args], catch_exceptions=False)


def _sweep(tmp_path):
    path = tmp_path / "sweep.csv"
    write_ramp_csv(str(path), ramp_sweep_rows(3000, seed=5), "invented sweep for the seal test")
    return path


def test_seal_is_the_sha256_of_the_text_with_its_digits_zeroed():
    for text in ('{\n  "a": 1,\n  "b": [1, 2]\n}\n', "# liftcal settings x\nthrust  1.0 N\n"):
        sealed = seal_text(text)
        hexes = [w.strip('",') for w in sealed.split() if len(w.strip('",')) == 64]
        assert len(hexes) == 1
        zeroed = sealed.replace(hexes[0], "0" * 64)
        assert hexes[0] == hashlib.sha256(zeroed.encode("utf-8")).hexdigest()
        assert seal_state(sealed)[0] == "intact"
        assert seal_state(sealed.replace("1", "2", 1))[0] == "broken"
        assert seal_state(text)[0] is None
    assert json.loads(seal_text('{"a": 1}'))["a"] == 1


def test_fit_replaces_its_own_untouched_set_and_refuses_an_edited_one(tmp_path):
    sweep, out = _sweep(tmp_path), tmp_path / "p.json"
    first = run("fit", sweep, "--diameter", "10in", "--out", out)
    assert first.exit_code == 0, first.stderr
    doc = load_strict_json(str(out))
    assert len(doc["content_sha256"]) == 64
    assert run("check", out).exit_code == 0                       # the schema knows the seal
    again = run("fit", sweep, "--diameter", "10in", "--out", out)  # untouched: replaced
    assert again.exit_code == 0, again.stderr
    text = out.read_text()
    edited = text.replace('"thrust_max_N": ', '"thrust_max_N": 1', 1)  # a person's edit
    assert edited != text
    out.write_text(edited)
    res = run("fit", sweep, "--diameter", "10in", "--out", out)
    assert res.exit_code == 2
    assert res.stderr.startswith("error: ") and res.stderr.count("\n") == 1
    assert "changed since" in res.stderr
    assert out.read_text() == edited


def test_a_set_without_a_seal_is_not_replaced(tmp_path):
    sweep, out = _sweep(tmp_path), tmp_path / "p.json"
    shutil.copy(EXAMPLE, out)
    before = out.read_bytes()
    res = run("fit", sweep, "--diameter", "10in", "--out", out)
    assert res.exit_code == 2 and "no content seal" in res.stderr
    assert out.read_bytes() == before


def test_export_settings_lines_are_sealed_too(tmp_path):
    out = tmp_path / "settings.txt"
    first = run("export", EXAMPLE, "--out", out)
    assert first.exit_code == 0 and first.stdout.endswith("settings written to %s\n" % out)
    assert out.read_text().splitlines()[-1].startswith("# content sha256: ")
    assert run("export", EXAMPLE, "--out", out).exit_code == 0
    out.write_text(out.read_text().replace("\n", "\r\n"))       # an editor changed line endings
    before = out.read_bytes()
    res = run("export", EXAMPLE, "--out", out)
    assert res.exit_code == 2 and "changed since" in res.stderr
    assert out.read_bytes() == before


def _words(text):
    """The text with its line breaks undone: check wraps at 80 columns after the file's name,
    so where a phrase breaks depends on the length of the (temporary) folder's name."""
    return " ".join(text.split())


def test_check_says_whether_a_set_was_edited(tmp_path):
    sweep, out = _sweep(tmp_path), tmp_path / "p.json"
    assert run("fit", sweep, "--diameter", "10in", "--out", out).exit_code == 0
    assert json.loads(run("check", out, "--json").stdout)["content_seal"] == "intact"
    assert "unchanged since liftcal wrote it" in _words(run("check", out).stdout)
    out.write_text(out.read_text().replace('"thrust_max_N": ', '"thrust_max_N": 1', 1))
    res = run("check", out)
    assert res.exit_code == 0 and "EDITED since liftcal wrote it" in _words(res.stdout)
    assert json.loads(run("check", out, "--json").stdout)["content_seal"] == "broken"
    assert json.loads(run("check", EXAMPLE, "--json").stdout)["content_seal"] == "none"
    assert "no hover values" in _words(run("check", out).stdout)  # fitted without --vehicle


def test_lines_added_after_the_seal_line_count_as_an_edit(tmp_path):
    # new-user trial 3, item 14: a settings file with a line added after its seal was called
    # "no content seal (an older liftcal wrote it...)"; liftcal wrote it, a person edited it
    out = tmp_path / "settings.txt"
    assert run("export", EXAMPLE, "--out", out).exit_code == 0
    out.write_text(out.read_text() + "my.extra.setting 5\n")
    before = out.read_bytes()
    res = run("export", EXAMPLE, "--out", out)
    assert res.exit_code == 2 and "changed since" in res.stderr and "no content seal" not in res.stderr
    assert out.read_bytes() == before
    assert seal_state(before.decode())[0] == "broken"


def test_a_settings_file_given_where_json_is_read_is_named(tmp_path):
    out = tmp_path / "settings.txt"
    assert run("export", EXAMPLE, "--out", out).exit_code == 0
    for command in ("check", "hover"):
        res = run(command, out)
        lines = res.stderr.strip().splitlines()
        assert res.exit_code == 2 and res.stdout == "" and len(lines) == 1
        assert "is a settings file that liftcal export wrote" in lines[0] and "CSV" not in lines[0]


def test_hover_with_an_edited_parameter_set_says_so(tmp_path):
    # new-user trial 3, item 14: a hand-edited set gave a sheet with no note at all
    from estimator.demo.scenario import DEMO_VEHICLE

    sweep, out = _sweep(tmp_path), tmp_path / "p.json"
    vehicle = tmp_path / "v.json"
    vehicle.write_text(json.dumps(DEMO_VEHICLE))
    assert run("fit", sweep, "--diameter", "10in", "--vehicle", vehicle, "--out", out).exit_code == 0
    clean = run("hover", vehicle, "--params", out)
    assert clean.exit_code == 0 and "was edited since liftcal wrote it" not in clean.stdout
    out.write_text(out.read_text().replace('"thrust_max_N": ', '"thrust_max_N": 1', 1))
    edited = run("hover", vehicle, "--params", out)
    assert edited.exit_code == 0
    assert "%s was edited since liftcal wrote it" % out in " ".join(edited.stdout.split())
