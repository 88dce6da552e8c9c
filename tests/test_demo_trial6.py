"""Sixth new-user trial, items 9 and 12: the demo prints each `liftcal replay` command before its
flight is simulated (the several seconds each takes read as a hang), and its export command
needs no map path that exists only inside the installed package or a checkout.

Reference: the trial's report (30-35 s demo with 7-8 s silent pauses; the README's export path
failing after `pip install .`). The demo scenario is invented (estimator/demo/scenario.py).
"""

import pytest

from estimator.commands.demo import run_demo


class _Stop(Exception):
    pass


def test_the_replay_command_shows_before_its_flight_runs(monkeypatch, tmp_path):
    import estimator.demo.flight_sim as flight_sim

    emitted = []

    def first_flight(*args, **kwargs):
        raise _Stop(emitted[-1] if emitted else "")

    monkeypatch.setattr(flight_sim, "simulate_flight", first_flight)
    with pytest.raises(_Stop) as stop:
        run_demo(str(tmp_path / "d"), emit=emitted.append)
    assert str(stop.value).startswith("$ liftcal replay ") and "flight-clean.csv" in str(stop.value)
    export = [t for t in emitted if t.startswith("$ liftcal export ")]
    assert len(export) == 1 and "--map" not in export[0] and "example map" in export[0]
