"""Tenth new-user trial, finding 6: the shipped example map's start pulse is where the rotor
really starts turning (the motor model's spin-up, motor_model.command_start), not the thrust
curve's zero-thrust intercept (thrust_curve.command_min), which sits above it.

The sweep is INVENTED (tests/truth_rotor.py): an ESC on 1000..2000 us whose dead band ends at
a known command, so its true start pulse is known.
"""

import pytest

from estimator.bench.export import EXAMPLE_MAP, as_mapping, export_settings, load_map
from truth_study import run_one

# the truth's dead band: the ESC turns the rotor from 1070 us (the trial's invented ESC)
DEAD_BAND = 0.07
Z_95 = 1.959964  # two-sided 95 % quantile of the standard normal distribution (any statistics table)


def _known_start(truth):
    truth["e_lo"], truth["e_hi"], truth["dead"] = 0.0, 1.0, DEAD_BAND
    truth["command_unit"] = "us"


@pytest.mark.parametrize("seed", [61, 62])
def test_the_example_maps_start_pulse_is_the_real_spin_up(seed):
    r = run_one(seed, rows=500, tweak=_known_start, keep=True)
    assert "failed" not in r, r.get("failed")
    truth, params = r["truth"], r["params"]
    start_us = 1000.0 + 1000.0 * (truth["e_lo"] + truth["dead"] * (truth["e_hi"] - truth["e_lo"]))
    assert start_us == pytest.approx(1070.0)
    mapping = load_map(EXAMPLE_MAP)
    # that one setting (the invented truth's supply may lie beyond the example's other bounds)
    mapping["settings"] = [e for e in mapping["settings"] if e["name"] == "liftcurve.start_pulse_us"]
    pulse = as_mapping(export_settings(params, mapping))["liftcurve.start_pulse_us"]
    intercept_us = 1000.0 + 1000.0 * params["thrust_curve"]["command_min"]
    # within the fit's own 95 % band of the spin-up (1.96 standard errors, normal quantile) plus
    # the half microsecond of rounding, and nearer to the truth than the curve's intercept
    band_us = Z_95 * 1000.0 * params["motor_model"]["command_start_standard_error"] + 0.5
    assert abs(pulse - start_us) <= band_us, (pulse, start_us, band_us, intercept_us)
    assert abs(pulse - start_us) < abs(intercept_us - start_us)
    assert intercept_us - start_us > band_us  # the case the finding is about: the intercept is off


def test_the_example_map_says_what_the_start_pulse_is():
    entry = [e for e in load_map(EXAMPLE_MAP)["settings"] if e["name"] == "liftcurve.start_pulse_us"][0]
    assert entry["source"] == "motor_model.command_start"
    assert "starts turning" in entry["note"] and "not the thrust curve's zero-thrust intercept" in entry["note"]
    # no other setting of the example exports the intercept under a start name
    assert not [e for e in load_map(EXAMPLE_MAP)["settings"]
                if e["source"] == "thrust_curve.command_min" and "start" in e["name"]]
