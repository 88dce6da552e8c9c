"""hover --params shows the site as read, like the datasheet route does (new-user trial 26: the bench-fit
route printed only "air 0.958 kg/m^3 ...", so a feet-for-metres slip in the site altitude was not
visible there; the datasheet sheet shows "2600 m, -5 C; air ..." since trial 24).

Outside reference for the air: ISA (ICAO Doc 7488, from memory) gives 0.957 kg/m^3 at 2600 m and -5 C
(pressure 74.0 kPa, ideal gas with R = 287.05 J/(kg K))."""

import json
import re

from estimator.cli import main
from watch_helpers import DEMO_VEHICLE, demo_fit_params


def test_the_bench_fit_route_shows_the_site_altitude_and_temperature(tmp_path, capsys):
    vehicle = json.loads(json.dumps(DEMO_VEHICLE))
    vehicle["site"] = {"altitude_m": 2600, "temperature_C": -5}
    (tmp_path / "v.json").write_text(json.dumps(vehicle))
    (tmp_path / "p.json").write_text(json.dumps(demo_fit_params()))
    for extra in ([], ["--json"]):
        try:
            main(["hover", str(tmp_path / "v.json"), "--params", str(tmp_path / "p.json")] + extra)
        except SystemExit as exc:
            assert exc.code == 0
        out, err = capsys.readouterr()
        if extra:
            report = json.loads(out)
            assert report["site_altitude_m"] == 2600
        else:
            text = " ".join(out.split())
            m = re.search(r"2600 m, -5 C; air ([\d.]+) kg/m\^3", text)
            assert m, text
            assert abs(float(m.group(1)) - 0.957) < 0.003
