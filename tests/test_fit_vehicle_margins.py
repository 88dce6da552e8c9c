"""`liftcal fit --vehicle` says what the hover sheet says about the vehicle's margins, and the
fit says why its full-command thrust can lie above every thrust measured (new-user trial 2,
items on `fit --vehicle` and 19). Truths: tests/truth_rotor.py (DC motor equivalent model and
propeller coefficients, Drela 2007, Brandt and Selig 2011, from memory; Thevenin pack).
"""

import json

import numpy as np
import pytest

from io_helpers import run
from truth_rotor import G0, THRUST_UNITS, at_supply, duty, random_truth, rotor_at, sweep_rows, vehicle_file, write_csv


def _full_command(truth, r_pack, cell="nominal_cell_V"):
    """The truth's bus voltage per cell [V] and motor current per rotor [A] at full command on
    its nominal (or, cell="full_cell_V", full) pack of resistance r_pack [ohm]."""
    vh = truth["vehicle"]
    _, v, i = at_supply(truth, np.array([1.0]), vh["cells"] * vh[cell], r_pack, truth["rho"],
                        vh["rotors"])
    i_motor = (i[0] / vh["rotors"] - truth["i_q"]) * truth["eta_esc"]  # bus I_q + d I_m / eta at d = 1
    return float(v[0]) / vh["cells"], i_motor


def _files(tmp_path, seed):
    rng = np.random.default_rng(seed)
    truth = random_truth(rng, rows=400)
    vh = truth["vehicle"]
    # a pack whose resistance pulls full command to about 3.0 V per cell (below the default
    # loaded cutoff of the vehicle file, 3.3 V for a 3.5 V empty cell), found by bisection
    lo, hi = vh["r_pack"], 50.0 * vh["r_pack"]
    for _ in range(40):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if _full_command(truth, mid)[0] > 3.0 else (lo, mid)
    vh["r_pack"] = 0.5 * (lo + hi)
    cell_V, motor_A = _full_command(truth, vh["r_pack"])
    vehicle = vehicle_file(truth)
    vehicle["motor"]["max_current_A"] = round(0.8 * motor_A, 3)
    # the bench measures ESC input current; the motor's own is the ESC efficiency times it
    vehicle["esc"] = {"efficiency": truth["eta_esc"]}
    csv, vfile = tmp_path / "sweep.csv", tmp_path / "vehicle.json"
    write_csv(truth, sweep_rows(truth, rng), str(csv))
    vfile.write_text(json.dumps(vehicle))
    return truth, csv, vfile, cell_V, _full_command(truth, vh["r_pack"], "full_cell_V")[1]


@pytest.mark.parametrize("seed", [62])
def test_fit_with_a_vehicle_prints_the_margin_warnings_of_the_sheet(tmp_path, seed):
    # finding: `fit --vehicle` printed only the warnings stored in the parameter set, never the
    # vehicle's margins (full-command pack sag below the cutoff, motor current above its limit)
    # motor_A: full command on a full pack, where the limits are judged (seventh trial, finding 1)
    truth, csv, vfile, cell_V, motor_A = _files(tmp_path, seed)
    code, text, err = run(["fit", csv, "--vehicle", vfile, "--out", tmp_path / "p.json"])
    assert code == 0, err
    code, js, err = run(["fit", csv, "--vehicle", vfile, "--out", tmp_path / "q.json", "--json"])
    assert code == 0, err
    warnings = json.loads(js)["warnings"]
    # the printed warnings, each joined back from its 80-column wrapping
    printed = [" ".join(w.split()) for w in ("\n" + text).split("\n! ")[1:]]
    for needle in ("full command sags the nominal pack to", "above the motor limit"):
        assert any(needle in w for w in printed), (needle, text)
        assert any(needle in w for w in warnings), (needle, warnings)
    # the sheet's numbers are the truth's within the study's bounds (3 % thrust side, 5 % current)
    sag = [w for w in warnings if "full command sags the nominal pack to" in w][0]
    assert abs(float(sag.split("sags the nominal pack to ")[1].split(" V")[0]) - cell_V) <= 0.03 * cell_V + 0.005
    limit = [w for w in warnings if "above the motor limit" in w][0]
    # (printed to 0.1 A: half a printed step besides the 5 %)
    assert abs(float(limit.split("draws ")[1].split(" A")[0]) - motor_A) <= 0.05 * motor_A + 0.05
    # the margins are about the vehicle: the parameter set does not store them
    stored = json.load(open(tmp_path / "p.json"))["warnings"]
    assert not any("above the motor limit" in w for w in stored)


def test_full_command_thrust_above_every_measured_thrust_is_explained(tmp_path):
    # finding: "full-command thrust 10.785 kgf" above any thrust measured (10.49 kgf), quoted at
    # the sweep's median voltage 47.90 V, not the 47.23 V the full-command rows ran at, no word
    rng = np.random.default_rng(7)
    truth = random_truth(rng, rows=300)
    truth["supplies"] = [truth["v_supply"]]
    # source resistance for a 10 % sag at full command: the truth's full current at its supply
    _, i_full = rotor_at(truth, np.array([1.0]), truth["v_supply"], truth["rho"])
    truth["r_source"] = 0.10 * truth["v_supply"] / float(i_full[0])
    csv = tmp_path / "sag.csv"
    write_csv(truth, sweep_rows(truth, rng), str(csv))
    code, js, err = run(["fit", csv, "--out", tmp_path / "p.json", "--json"])
    assert code == 0, err
    out = json.loads(js)
    note = [w for w in out["warnings"] if "is the curve at the reference voltage" in w]
    assert note, out["warnings"]
    # the voltage the note names for the full-command rows, and the thrust it gives there,
    # against the truth at that voltage (3 % of T_max, the study's curve bound)
    v_top = float(note[0].split("full-command rows ran at ")[1].split(" V")[0])
    t_top = float(rotor_at(truth, duty(truth, np.array([1.0])), v_top, truth["rho"])[0][0])
    there = note[0].split("where the curve gives ")[1].split(";")[0]
    value, unit = there.split()
    assert unit == truth["thrust_unit"]
    assert float(value) / THRUST_UNITS[unit] == pytest.approx(t_top, rel=0.03)
    assert t_top < out["thrust_max_N"]
