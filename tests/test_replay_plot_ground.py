"""The replay plot draws no expected power while the rotors stand (new-user trial, session 23: on
a hexa's log the expected line sat at about 120 W on the ground, the idle terms of six stopped
rotors, against 15 W measured: a healthy ground segment looked like a large gap). Below the spin
command the watch expects and judges nothing (DEVELOPERS.md, the kernel's flight time), so the
trace holds no value there. The log is the demo's INVENTED fault-free flight (closed-loop simulator),
which starts on the ground; nothing here is physics.
"""

import math

from estimator.demo.scenario import DEMO_VEHICLE
from estimator.watch.config import make_config
from estimator.watch.replay import read_flight, run_kernel
from watch_helpers import demo_fit_params, flight_csv_once


def test_no_expected_power_below_the_spin_command(tmp_path):
    path = tmp_path / "log.csv"
    path.write_text(flight_csv_once(dict(DEMO_VEHICLE), fault=None, seed=1))
    config = make_config(demo_fit_params())[0]
    flight = read_flight(str(path))
    _, arrays = run_kernel(flight, config, trace=True)
    spin = config["spin_permille"]
    pairs = list(zip(flight["command_permille"], arrays["expected_W"]))
    below = [e for u, e in pairs if u < spin]
    above = [e for u, e in pairs if u >= spin]
    assert len(below) >= 5 and all(math.isnan(e) for e in below), below[:5]
    assert len(above) > 1000 and all(math.isfinite(e) and e > 0.0 for e in above)
