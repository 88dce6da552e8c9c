"""The watch's current-range warning takes the pre-flight sheet's full-command current when a
vehicle file is given, and replay repeats the warning before its events.

Before, `liftcal firmware` judged the range with the fitted power model at the full pack voltage
without the pack's sag (463 A on the trial-9 12S octo) while the pre-flight sheet, for the same
set and vehicle, gave 408 A (the set's motor model on the sagging pack); and `liftcal replay`
showed a punch-out beyond the range as a sensor_fault without saying why.

The current is judged against an invented truth written apart from the project's code
(tests/test_watch_site_air.Truth: a DC motor on a propeller of fixed coefficients; Hughes,
Electric Motors and Drives, ch. 3, from memory) on a Thevenin pack, V_bus = V_oc - R_pack I
(the pack model of the design notes; common practice), solved with scipy's brentq
(tests/test_watch_sensor_range.sagged_amps).
"""

import json
import random
import re

from io_helpers import run
from test_watch_sensor_range import _truths, _vehicle, sagged_amps
from test_watch_site_air import G0, bench_csv, isa_density


def _fitted(tmp_path, truth, rng, tag):
    rho = isa_density(100.0, 20.0)
    mass = 0.3 * 8 * truth.thrust_N(1.0, 3.8 * truth.cells, rho) / G0
    vehicle, bench, params = (tmp_path / ("v%s.json" % tag), tmp_path / ("b%s.csv" % tag),
                              tmp_path / ("p%s.json" % tag))
    vehicle.write_text(json.dumps(_vehicle(truth, 8, mass)))
    bench_csv(truth, bench, rng)
    code, out, err = run(["fit", str(bench), "--vehicle", str(vehicle), "--out", str(params)])
    assert code == 0, err
    return vehicle, params


def _warned_amps(text, upper):
    m = re.search(r"full command on a full pack draws %sabout (\d+) A, beyond the watch's current-sensor range"
                  % ("up to " if upper else ""), " ".join(text.split()))
    return None if m is None else float(m.group(1))


def test_firmware_with_a_vehicle_warns_with_the_pre_flight_sheets_current(tmp_path):
    rng = random.Random(921)
    rho = isa_density(100.0, 20.0)
    for i, (truth, stiff_amps) in enumerate(_truths(rng, True, 2)):
        vehicle, params = _fitted(tmp_path, truth, rng, str(i))
        code, out, err = run(["firmware", str(params), "--vehicle", str(vehicle), "--out", str(tmp_path / ("b%d" % i))])
        assert code == 0, err
        amps = _warned_amps(out + err, upper=False)
        assert amps is not None and "pre-flight sheet's figure" in " ".join(out.split()), out
        # the one calculation: the sheet's own figure for the same set and vehicle
        code, sheet, err = run(["hover", str(vehicle), "--params", str(params), "--json"])
        assert code == 0, err
        assert amps == round(json.loads(sheet)["pack_current_judged_A"]), (amps, sheet)
        # and the truth's on its sagging pack, within the fit's few per cent
        truth_amps = sagged_amps(truth, 8, rho)
        assert abs(amps / truth_amps - 1.0) < 0.08, (amps, truth_amps, stiff_amps)
        # without the vehicle file (the set's vehicle block has no pack resistance) the power
        # model's figure stays, said to be an upper one
        code, out, err = run(["firmware", str(params), "--out", str(tmp_path / ("n%d" % i))])
        assert code == 0, err
        upper = _warned_amps(out, upper=True)
        assert upper is not None and "is an upper figure" in " ".join(out.split()), out
        assert upper >= amps, (upper, amps)


def test_replay_repeats_the_range_warning_before_its_events(tmp_path):
    rng = random.Random(922)
    rho = isa_density(100.0, 20.0)
    bus = None
    while bus is None:            # a heavy vehicle hovering well inside the 300 A range
        truth, _ = _truths(rng, True, 1)[0]
        bus = 3.9 * truth.cells
        mass = 0.3 * 8 * truth.thrust_N(1.0, 3.8 * truth.cells, rho) / G0     # as _fitted makes it
        u_hover = truth.hover_command(mass * G0 / 8, bus, rho)
        hover_A = 8 * truth.current_in(u_hover, bus, rho)
        bus = bus if hover_A < 150.0 else None
    vehicle, params = _fitted(tmp_path, truth, rng, "r")
    rows = []
    for i in range(900):          # 180 s at 5 Hz: hover, and a 2 s full-command punch-out at 150 s
        t = 0.2 * i
        punch = 150.0 <= t < 152.0
        u = 1.0 if punch else u_hover
        amps = 8 * truth.current_in(1.0, bus, rho) if punch else hover_A * (1.0 + 0.01 * rng.gauss(0.0, 1.0))
        rows.append("%.1f,%.4f,%.3f,%.3f" % (t, u, bus, amps))
    log = tmp_path / "punch.csv"
    log.write_text("time[s],command[-],voltage[V],current[A]\n" + "\n".join(rows) + "\n")
    code, out, err = run(["replay", str(log), "--params", str(params), "--vehicle", str(vehicle)])
    assert code == 0, err
    text = out.splitlines()
    warn = next(i for i, line in enumerate(text) if line.startswith("  ! full command on a full pack draws"))
    fault = next(i for i, line in enumerate(text) if "sensor_fault" in line)
    assert warn < fault, out
    assert _warned_amps(out, upper=False) is not None, out
    code, out, err = run(["replay", str(log), "--params", str(params), "--vehicle", str(vehicle), "--json"])
    doc = json.loads(out)
    assert any("current-sensor range" in w for w in doc["warnings"]), doc["warnings"]
    assert any(e["kind"] == "sensor_fault" and e["t_s"] >= 150.0 for e in doc["events"]), doc["events"]
