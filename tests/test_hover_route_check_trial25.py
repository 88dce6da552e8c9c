"""hover --params names a vehicle file whose own motor disagrees with the bench fit (new-user trial 25,
finding C: a 1200 Kv motor written in the file of a vehicle whose 600 Kv motor was swept changed
nothing on the sheet, and nothing said the file's motor block was not used).

Outside reference: a DC motor turns at Kv times its back-EMF (the DC motor equivalent model, e.g.
Hughes, Electric Motors and Drives, from memory), so at the same rotor speed a motor with twice the
Kv needs about half the command: the file's own route then reads about 2x apart from the bench fit.
"""

import json
import re

from estimator.cli import main
from watch_helpers import DEMO_VEHICLE, demo_fit_params


def _sheet(tmp_path, capsys, vehicle, params, as_json=False):
    (tmp_path / "v.json").write_text(json.dumps(vehicle))
    (tmp_path / "p.json").write_text(json.dumps(params))
    try:
        main(["hover", str(tmp_path / "v.json"), "--params", str(tmp_path / "p.json")] + (["--json"] if as_json else []))
    except SystemExit as exc:
        assert exc.code == 0
    out, err = capsys.readouterr()
    assert err == ""
    return out


def test_a_file_motor_of_twice_the_kv_is_named_beside_the_bench_fit(tmp_path, capsys):
    params = demo_fit_params()
    own = _sheet(tmp_path, capsys, DEMO_VEHICLE, params)
    assert "own motor" not in own                      # the demo's file and its bench agree
    wrong = json.loads(json.dumps(DEMO_VEHICLE))
    kv = wrong["motor"]["kv_rpm_per_V"]
    wrong["motor"]["kv_rpm_per_V"] = 2 * kv
    text = " ".join(_sheet(tmp_path, capsys, wrong, params).split())
    m = re.search(r"own motor \(Kv (\d+) rpm/V\) and propeller put the hover command at ([\d.]+), the bench "
                  r"fit at ([\d.]+), ([\d.]+)x apart", text)
    assert m, text
    assert int(m.group(1)) == round(2 * kv)
    assert 1.5 <= float(m.group(4)) <= 2.2              # about 2x, less the ESC start offset of the command
    assert float(m.group(3)) == round(params["hover"]["hover_command"], 2)   # the sheet stays the bench fit's
    report = json.loads(_sheet(tmp_path, capsys, wrong, params, as_json=True))
    assert any("own motor (Kv %d" % round(2 * kv) in w for w in report["warnings"])
