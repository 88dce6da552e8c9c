"""fit's hover line names whose watts and whose amps it gives when the vehicle has avionics
(new-user trial 15, finding 2): the parameter set's hover.power_W is the rotors' electrical power
and hover.current_A the pack's, avionics included (schemas/params.schema.json), and the line
printed them side by side as '253.3 W, 12.7 A', which do not multiply to the bus voltage.

Reference: electrical power P = V I (common practice); the sweep is test_bench_air_inputs'
INVENTED square-law sweep on the demo quad's 10 in propeller (an invented vehicle).
"""

import json
import re

import pytest

from io_helpers import VEHICLE, run
from test_bench_air_inputs import _sweep


def _fit_text(tmp_path, avionics_A):
    vehicle = json.load(open(VEHICLE))
    if avionics_A:
        vehicle["avionics_current_A"] = avionics_A
    path = tmp_path / "v.json"
    path.write_text(json.dumps(vehicle))
    csv, out = _sweep(tmp_path, "# altitude: 300m\n# temperature: 21C\n"), tmp_path / "p.json"
    code, text, err = run(["fit", csv, "--vehicle", path, "--out", out])
    assert code == 0, err
    return " ".join(text.split()), json.load(open(out))["hover"]


def test_with_avionics_the_line_names_the_motors_watts_and_the_packs_amps_and_watts(tmp_path):
    flat, hover = _fit_text(tmp_path, 1.5)
    found = re.search(r"([\d.]+) W for all 4 motors; ([\d.]+) A, ([\d.]+) W from the pack with 1\.500 A avionics "
                      r"\(motor model at the sagged hover bus ([\d.]+) V", flat)
    assert found, flat
    motors_W, pack_A, pack_W, bus_V = (float(x) for x in found.groups())
    assert motors_W == pytest.approx(hover["power_W"], rel=1e-3)
    assert pack_A == pytest.approx(hover["current_A"], rel=5e-3)
    # P = V I: the pack's watts are its amps at the bus voltage, the motors' are those less the avionics'
    assert pack_W == pytest.approx(pack_A * bus_V, rel=5e-3)
    assert motors_W == pytest.approx(pack_W - 1.5 * bus_V, rel=5e-3)


def test_without_avionics_the_line_names_the_draw_of_all_rotors(tmp_path):
    # new-user trial, session 23: '877.2 W, 20 A' just below 'power per rotor' read as one rotor's
    flat, hover = _fit_text(tmp_path, 0)
    assert ("%.4g W, %.3g A for all 4 rotors (motor model at the sagged hover bus" % (hover["power_W"], hover["current_A"])
            in flat)
    assert "avionics" not in flat.split("hover for", 1)[1].split("thrust-to-weight")[0]
