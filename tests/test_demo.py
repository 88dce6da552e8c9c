"""`liftcal demo` runs the three flows end to end on the invented demo scenario.

What is checked is what a builder reads off the demo: the simulated fault-free flight raises
no alarm and each injected fault raises its own kind (fault sizes of +-15 % and +15 %
mass are the issue's acceptance numbers); every file the demo writes is valid input for
the next command.
"""

import json
import os
import re

import pytest

from estimator.commands.demo import run_demo
from estimator.params import load_params
from estimator.vehicle import load_vehicle


@pytest.fixture(scope="module")
def demo_run(tmp_path_factory):
    out = str(tmp_path_factory.mktemp("demo"))
    report, text = run_demo(out)
    return out, report, text


def test_flights_flag_exactly_the_injected_faults(demo_run):
    _, report, _ = demo_run
    kinds = {f["fault"]: set(f["kinds"]) for f in report["flights"]}
    assert kinds[None] == set()
    assert "power_high" in kinds["power_high"] and "power_low" not in kinds["power_high"]
    assert "power_low" in kinds["power_low"] and "power_high" not in kinds["power_low"]
    assert "mass_high" in kinds["heavy"]


def test_demo_files_feed_the_next_commands(demo_run):
    out, report, _ = demo_run
    load_vehicle(os.path.join(out, "vehicle.json"))
    params = load_params(os.path.join(out, "params.json"))
    assert params["vehicle"]["rotor_count"] == 4
    for name in ("liftwatch_config.py", "package.json"):
        assert os.path.exists(os.path.join(out, "board", name))
    # the fitted hover sheet and the datasheet one describe the same simulated set:
    # the bench simulator uses the same DC motor model, so hover power must agree closely
    # (2 %: fit noise plus the simulator's ESC dead band)
    assert report["fitted_hover"]["hover_power_W"] == pytest.approx(
        report["preflight"]["hover_power_W"], rel=0.02)


def test_demo_cli_json_is_one_object(demo_cli_run):
    out, _, _ = demo_cli_run   # `python -m estimator demo --out DIR --json` (tests/conftest.py)
    assert out.returncode == 0, out.stderr
    doc = json.loads(out.stdout)
    assert {"preflight", "fit", "fitted_hover", "settings", "flights"} <= set(doc)


def test_demo_shows_the_choosing_step(demo_run):
    # issue 11: the demo shows compare and the payload question, each answered in one run
    _, report, text = demo_run
    assert len(report["compare"]["rows"]) == 6 and report["compare"]["best"] is not None
    assert report["payload"]["job_min"] == 10.0 and len(report["payload"]["rows"]) == 5
    # trial 4: the printed payload command gives the rows shown (the parser of `hover --payload`)
    from estimator.commands.demo import DEMO_PAYLOAD
    from estimator.preflight.payload import parse_payloads
    assert "liftcal compare" in text and "--payload %s " % DEMO_PAYLOAD in text
    assert parse_payloads(DEMO_PAYLOAD)[0] == [r["payload_kg"] for r in report["payload"]["rows"]]
    assert "longest hover that keeps every margin" in text and "largest payload" in text
    # the demo's own sheet shows the discharge endurance beside the usable-share one
    assert "from a full pack, ended by" in text and "the usable share alone" in text


def test_the_demo_command_fits_80_columns(monkeypatch, tmp_path):
    # the demo's text goes through estimator.textwidth like every other command (it printed
    # 20 lines wider than 80 columns); run_demo itself is replaced by one that emits long lines
    from click.testing import CliRunner

    import estimator.commands.demo as demo_module
    from estimator.cli import cli

    def fake_run_demo(out_dir, emit=None):
        emit("$ liftcal export %s/params.json --map /a/long/path/to/the/example-map.json   "
             "(example map, invented setting names)" % out_dir)
        emit("- Props off while wiring, flashing or configuring; bench runs on a clamped stand "
             "behind a guard, with nobody in the plane of the rotors.")
        return {}, ""
    monkeypatch.setattr(demo_module, "run_demo", fake_run_demo)
    # a relative folder: the lines must not depend on the length of the temporary folder's name
    # (a worker's folder under pytest-xdist is longer, and so is a longer user name)
    monkeypatch.chdir(tmp_path)
    res = CliRunner().invoke(cli, ["demo", "--out", "d"])
    assert res.exit_code == 0, res.output
    lines = res.stdout.splitlines()
    assert len(lines) > 2 and max(len(line) for line in lines) <= 80
    assert " ".join(res.stdout.split()).endswith("with nobody in the plane of the rotors.")


def test_the_demo_header_keeps_each_sentence_on_its_line(demo_run):
    # new-user trial 9, finding 15: the header wrapped mid-sentence at 80 columns ('...28 C' then
    # '  site;' alone); each sentence now has its own line within 80 columns
    from estimator.textwidth import fit_width

    lines = fit_width(demo_run[2]).split("\n")
    assert lines[0] == "liftcal demo: an INVENTED 2.05 kg survey quad at a 1400 m, 28 C site.", lines[0]
    assert lines[1].startswith("Its bench sweep and flights are simulated. Files go to")


def test_the_readme_names_the_files_the_demo_writes(demo_run):
    # README: 'The demo writes its files into liftcal-demo/ (vehicle.json, ...)': each exists
    from io_helpers import ROOT

    out = demo_run[0]
    with open(os.path.join(ROOT, "README.md"), encoding="utf-8") as fh:
        text = " ".join(fh.read().split())
    said = text[text.index("The demo writes its files into"):].split("cd liftcal-demo")[0]
    names = re.findall(r"`([^`]+)`", said)
    assert {"vehicle.json", "bench.csv", "params.json", "settings.txt", "board/"} <= set(names), names
    for name in names:
        if name.startswith("flight-"):
            assert [f for f in os.listdir(out) if f.startswith("flight-") and f.endswith(".csv")], name
        elif name != "liftcal-demo/":
            assert os.path.exists(os.path.join(out, name.rstrip("/"))), name


def test_the_demo_settings_file_is_what_export_writes(demo_run, tmp_path):
    # new-user trial 11, finding 12: settings.txt said 'supply.reference_volts 15.2 V' and
    # 'through the example map (invented names)' where export says 15.20 V and 'through
    # example-map.json (8)'; and the tour shows export's own output (header, folded arrows)
    from trial_helpers import ok

    out, _, text = demo_run
    exported = tmp_path / "s.txt"
    printed = ok("export", os.path.join(out, "params.json"), "--out", exported)
    sealed = [line for line in exported.read_text().splitlines() if not line.startswith("# content sha256:")]
    with open(os.path.join(out, "settings.txt"), encoding="utf-8") as fh:
        assert fh.read().splitlines() == sealed
    lines = printed.splitlines()
    settings = lines[:next(i for i, line in enumerate(lines) if line.startswith(("!", "-", "settings written")))]
    assert "\n".join(settings) in text


def test_the_demo_bundle_names_the_parameter_set_it_was_made_from(demo_run):
    # new-user trial 14, finding 12: the demo's board folder named no file ("from parameter set"),
    # so `firmware --out board` over it printed a cut-short "replaced" line
    out, _, _ = demo_run
    with open(os.path.join(out, "board", "liftwatch_config.py"), encoding="utf-8") as fh:
        first = fh.readline()
    assert re.search(r" from \S*params\.json - regenerate", first), first


def test_the_demo_fit_lines_write_commands_in_the_sweeps_unit_one_line_each(demo_run):
    # new-user trial 14, finding 15: the demo's fit line gave the intercept and the rotor start as
    # fractions (0.142, 0.062) where `fit` on the same microsecond sweep writes microseconds, and
    # wrapped after a comma ('quadratic share 0.659,' alone)
    from estimator.textwidth import fit_width
    from estimator.units import command_text

    out, report, text = demo_run
    params = load_params(os.path.join(out, "params.json"))
    assert params["provenance"]["units"]["command"] == "us"   # the demo's simulated sweep
    line = "quadratic share %.3f, curve intercept %s (the rotor starts at %s)" % (
        params["thrust_curve"]["quadratic_share"], command_text(params["thrust_curve"]["command_min"], "us"),
        command_text(params["motor_model"]["command_start"], "us"))
    assert line in text.splitlines() and " us (the rotor starts at " in line
    step = text.split("== 2. bench sweep")[1].split("$ liftcal hover")[0]
    assert not any(row.rstrip().endswith(",") for row in fit_width(step).splitlines())
