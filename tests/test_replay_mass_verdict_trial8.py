"""`liftcal replay` always says what became of the implied mass (new-user trial 8, finding 2: a
25 % overweight vehicle in gusts raised no mass alarm, and "no event: power stayed within what
the parameter set expects" read as a clean bill): the last implied mass against the plan and
the alarm limit, or "mass not judged: <why>", in the text and in --json (key "mass").

Flights from the demo's closed-loop simulator (an INVENTED vehicle); the flown mass is the
simulator's own, and the implied mass is judged against it with the tolerance of the watch's
momentum-theory mass estimate (its calibrated static factor; the detection matrix reads a
heavy flight within a few per cent, benchmarks/watch_detection.py)."""

import json

import pytest
from click.testing import CliRunner

from estimator.cli import cli
from estimator.demo.flight_sim import flight_arrays, to_csv
from watch_helpers import demo_fit_params, flight_arrays_once


def _replay(tmp_path, flight, *extra):
    params = tmp_path / "p.json"
    params.write_text(json.dumps(demo_fit_params()))
    log = tmp_path / "f.csv"
    log.write_text(to_csv(flight))
    runs = [CliRunner().invoke(cli, ["replay", str(log), "--params", str(params)] + list(extra) + j)
            for j in ([], ["--json"])]
    for r in runs:
        assert r.exit_code == 0, r.output
    return runs[0].stdout, json.loads(runs[1].stdout)


@pytest.mark.parametrize("fault", [None, "heavy"])
def test_the_implied_mass_is_said_against_the_plan_and_the_limit(tmp_path, fault):
    flight = flight_arrays_once(fault=fault, seed=2)
    text, out = _replay(tmp_path, flight)
    mass = out["mass"]
    assert mass["judged"] is True
    # the simulator's flown mass; 6 % covers the momentum-theory estimate's error (module docstring)
    assert mass["implied_kg"] == pytest.approx(flight["mass_kg"], rel=0.06)
    assert mass["above_limit"] is (fault == "heavy")  # heavy flies 15 % over plan; the limit is +8 %
    assert mass["limit_kg"] > mass["planned_kg"]
    said = [line for line in text.splitlines() if "implied mass" in line and "windows to the last" in line]
    assert len(said) == 1, text
    assert ("above the alarm" if fault else "below the alarm") in text.replace("\n", " ").replace("  ", " ")


def test_a_log_too_short_to_learn_says_the_mass_was_not_judged(tmp_path):
    flight = flight_arrays(seed=3, duration_s=25.0)
    text, out = _replay(tmp_path, flight)
    assert out["learned"] is False
    assert out["mass"]["judged"] is False and "too little steady flight" in out["mass"]["reason"]
    assert "mass not judged: " in text and "implied_kg" not in out["mass"]
