"""Error hints a new user met (new-user trial item 9), each failing before.

References: 1 in = 25.4 mm exactly (NIST SP 811); propellers of small multirotors run from
about 1 to 40 in (common practice), so a bare "254x114" is a size in millimetres.
"""

import json
import os

import pytest

from io_helpers import PARAMS, VEHICLE, refused, run


def _vehicle_with_size(tmp_path, size):
    doc = json.load(open(VEHICLE))
    prop = doc["propeller"]
    for key in ("diameter_m", "pitch_m", "size"):
        prop.pop(key, None)
    prop["size"] = size
    path = tmp_path / "v.json"
    path.write_text(json.dumps(doc))
    return path


def test_a_bare_size_in_millimetres_suggests_mm_not_inches(tmp_path):
    line = refused(["hover", _vehicle_with_size(tmp_path, "254x114")], "254x114mm", "0.254 m")
    assert "in instead of m" not in line
    # 10x4.5 without a unit stays inches, as the trade lists propellers
    code, out, err = run(["hover", _vehicle_with_size(tmp_path, "10x4.5")])
    assert code == 0, err


@pytest.mark.skipif(not os.path.isdir("/proc") or os.access("/proc", os.W_OK) and os.getuid() != 0,
                    reason="needs a /proc that takes no new files")
def test_a_system_folder_is_not_called_missing(tmp_path):
    from test_bench_air_inputs import _sweep
    line = refused(["fit", _sweep(tmp_path, "# density: 1.2\n"), "--out", "/proc/liftcal-p.json"],
                   "/proc/liftcal-p.json", "cannot write")
    assert "does not exist" not in line


def test_a_system_folder_is_not_called_missing_when_writing(tmp_path):
    from estimator.outputs import write_error
    import errno
    exc = OSError(errno.ENOENT, "No such file or directory")
    line = str(write_error(str(tmp_path / "p.json"), exc))  # the folder exists
    assert "does not exist" not in line and "takes no new files" in line
    line = str(write_error(str(tmp_path / "gone" / "p.json"), exc))
    assert "does not exist" in line


def test_a_percent_factor_names_the_plain_number():
    line = refused(["static", "--diameter", "10in", "--power", "100W", "--factor", "30%"], "--factor")
    assert "use one of  " not in line and "0.3" in line


def test_lag_in_ms_is_accepted_with_its_unit_and_other_units_are_explained(tmp_path):
    out = tmp_path / "fw"
    code, text, err = run(["firmware", PARAMS, "--out", out, "--lag-ms", "60ms", "--json"])
    assert code == 0, err
    assert json.loads(text)["lag_ms"] == 60
    refused(["firmware", PARAMS, "--out", tmp_path / "fw2", "--lag-ms", "0.06s"], "--lag-ms", "in ms")
