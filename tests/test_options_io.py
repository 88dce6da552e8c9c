"""Options: non-finite numbers name the option; plots work after the README's install."""

import os
import tomllib

import pytest

from io_helpers import ROOT, refused


@pytest.mark.parametrize("value,words", [("nan", "not a finite number"), ("inf", "not a finite number"),
                                         ("-Infinity", "not a finite number"), ("1e999", "not a finite"),
                                         ("two", "not a number"), ("9", "outside 0.5..3")])
def test_voltage_exponent_names_the_option(tmp_path, value, words):
    bench = tmp_path / "b.csv"
    bench.write_text("command[-],voltage[V],current[A],thrust[N]\n" + "0.5,15,5,2\n" * 12)
    line = refused(["fit", bench, "--out", tmp_path / "p.json", "--voltage-exponent", value],
                   "--voltage-exponent", words)
    assert "b.csv" not in line  # the option is at fault, not the file


@pytest.mark.parametrize("args", [
    ["static", "--diameter", "1e999in", "--power", "100"],
    ["static", "--diameter", "0.25m", "--power", "1e999W"],
    ["air", "--altitude", "1e999m"],
    ["fit", "x.csv", "--out", "p.json", "--density", "1e999"],
])
def test_infinite_quantities_name_the_option(args):
    # the option that holds the infinity names the line, as liftcal's own refusals do (trial 14, finding 16)
    option = [a for a, v in zip(args, args[1:]) if a.startswith("--") and "1e999" in v][0]
    assert refused(args, "not a finite number").startswith("error: %s: " % option)


def test_matplotlib_is_a_runtime_dependency():
    # plots are part of what a builder expects from the first install (issue 9)
    with open(os.path.join(ROOT, "pyproject.toml"), "rb") as fh:
        project = tomllib.load(fh)["project"]
    assert any(dep.split(">")[0].split("=")[0].strip() == "matplotlib" for dep in project["dependencies"])
