"""Every file name liftcal prints is shown on one line, control characters escaped (new-user
trials 7 and 8, leftovers): a name holding a line break, an escape or a carriage return used to
reach the terminal raw, so `firmware`'s WARNING line broke in two.

The form: a name of printable characters as given; any other name as Python's repr (quoted,
"\\n", "\\x1b"), the one escaping every Python user knows (Python language reference, 2.4.1,
string literal escape sequences). One place formats it: estimator.names.shown.
"""

import json

from test_bench_outputs_trial7 import _edited, fitted  # noqa: F401  (the module's fixture)
from trial_helpers import json_file, ok, run


def _one_line_each(text):
    """No character of text is a control character other than the line ends between lines."""
    for line in text.split("\n"):
        assert line.isprintable(), repr(line)


def test_shown_keeps_a_plain_name_and_escapes_any_other():
    from estimator.names import shown

    assert shown("runs/quad 7in é.json") == "runs/quad 7in é.json"  # printable: as given
    assert shown("p_ed\nited.json") == "'p_ed\\nited.json'"  # repr: quoted, escaped
    assert shown("a\x1b[31mb\r.csv") == "'a\\x1b[31mb\\r.csv'"
    assert "\n" not in shown("x\u2028y") and shown("x\u2028y") != "x\u2028y"  # a Unicode line separator too


def test_firmware_warning_names_an_edited_set_with_a_line_break_on_one_line(fitted, tmp_path):  # noqa: F811
    edited = _edited(fitted, tmp_path)
    odd = tmp_path / "p_ed\nited.json"
    odd.write_text(edited.read_text())
    out = ok("firmware", odd, "--out", tmp_path / "board\x1b", "--from-edited")
    _one_line_each(out)
    # before: "WARNING: /tmp/.../p_ed" and "ited.json was EDITED ..." on two lines (the text
    # wraps at 80 columns, so the words are compared)
    assert " ".join(out.split()).startswith("WARNING: %r was EDITED since liftcal wrote it" % str(odd))
    assert "'%s\\x1b'" % (tmp_path / "board") in out  # the bundle folder it wrote, escaped too
    # the file names themselves still work: the bundle is there under its real name
    assert (tmp_path / "board\x1b" / "liftwatch_config.py").is_file()


def test_error_lines_escape_the_name_too(tmp_path):
    odd = tmp_path / "quad\x1b[2J.json"
    odd.write_text("{")
    code, out, err = run("hover", odd)
    assert code == 2 and out == ""
    _one_line_each(err.rstrip("\n"))
    assert "%r" % str(odd) in err


def test_json_output_keeps_the_real_name(fitted, tmp_path):  # noqa: F811
    d, _, _, params, _ = fitted
    odd = tmp_path / "p\tset.json"
    odd.write_text(params.read_text())
    code, out, _ = run("check", odd, "--json")
    assert code == 0 and json.loads(out)["file"] == str(odd)  # a script gets the name it gave
    _one_line_each(ok("check", odd))
    assert " ".join(ok("check", odd).split()).startswith("%r: valid parameter set" % str(odd))


def test_hover_plot_and_compare_lines_escape_the_name(tmp_path):
    from test_preflight_trial7 import QUAD

    vehicle = json_file(tmp_path, QUAD, "v\rq.json")
    plot = tmp_path / "p\nlot.png"
    out = ok("hover", vehicle, "--payload", "0,100g", "--plot", plot)
    _one_line_each(out)
    assert "plot: %r" % str(plot) in out


def test_an_odd_name_is_still_known_as_an_input_when_given_as_an_output(tmp_path):
    # the safety checks compare the real names (os.fspath), not the printed ones: an output
    # that is the command's input is refused whatever characters its name holds
    from test_preflight_trial7 import QUAD

    vehicle = json_file(tmp_path, QUAD, "v\nq.png")
    before = vehicle.read_text()
    code, out, err = run("hover", vehicle, "--payload", "0,100g", "--plot", vehicle)
    assert code == 2 and "is also an input of this command" in err and len(err.strip().splitlines()) == 1
    assert vehicle.read_text() == before  # never replaced
