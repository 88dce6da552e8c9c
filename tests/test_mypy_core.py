"""mypy on firmware_port and estimator/core against the MicroPython stubs (micropython-stdlib-stubs
as the typeshed, plus the port stubs that carry math, gc, micropython, time and machine: micropython-rp2-rpi_pico-stubs).

How the stubs are used: the stdlib package's folder is the typeshed (--custom-typeshed-dir), the
port package's top-level .pyi files go on MYPYPATH, and --no-site-packages keeps CPython's own
packages out. Errors inside the stub files themselves are silenced (not ours to fix).
"""

import glob
import os
import subprocess
import sys
import sysconfig

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def test_mypy_against_micropython_stubs(tmp_path):
    site = sysconfig.get_paths()["purelib"]
    assert os.path.isdir(os.path.join(site, "stdlib")), "micropython-stdlib-stubs is not installed"
    stubs = tmp_path / "stubs"
    stubs.mkdir()
    names = []
    for path in glob.glob(os.path.join(site, "*.pyi")):   # top-level module stubs of the port package
        os.symlink(path, stubs / os.path.basename(path))
        names.append(os.path.basename(path)[:-4])
    os.symlink(os.path.join(site, "_mpy_shed"), stubs / "_mpy_shed")
    assert "math" in names and "micropython" in names, "MicroPython port stubs (math, micropython) missing"
    ini = tmp_path / "mypy.ini"
    # the stub files themselves are not ours to fix: their own errors are silenced
    ini.write_text("[mypy]\n[mypy-%s,_mpy_shed,_mpy_shed.*]\nignore_errors = True\n" % ",".join(sorted(names)))
    # board_loop and the loader import liftwatch, liftwatch_config, liftwatch_layout: check them against a generated bundle
    from estimator.watch.bundle import write_bundle
    from watch_helpers import demo_fit_params
    write_bundle(demo_fit_params(), str(tmp_path / "bundle"))
    bundle_mods = tmp_path / "bundle_mods"
    bundle_mods.mkdir()
    for name in ("liftwatch.py", "liftwatch_config.py", "liftwatch_layout.py", "liftwatch_load.py"):
        os.symlink(tmp_path / "bundle" / name, bundle_mods / name)
    env = dict(os.environ, MYPYPATH=os.pathsep.join([str(stubs), str(bundle_mods)]))
    proc = subprocess.run(
        [sys.executable, "-m", "mypy", "--config-file", str(ini), "--custom-typeshed-dir", site,
         "--no-site-packages", "--cache-dir", str(tmp_path / "cache"),
         os.path.join(ROOT, "estimator", "core"), os.path.join(ROOT, "firmware_port")],
        capture_output=True, text=True, env=env, cwd=str(tmp_path))
    assert proc.returncode == 0, proc.stdout + proc.stderr
    # negative control: the same set-up reports a type error (so the check above can fail)
    bad = tmp_path / "bad_board.py"
    bad.write_text("import math\nimport micropython\nx: int = math.sqrt(2.0)\n")
    proc = subprocess.run(
        [sys.executable, "-m", "mypy", "--config-file", str(ini), "--custom-typeshed-dir", site,
         "--no-site-packages", "--cache-dir", str(tmp_path / "cache"), str(bad)],
        capture_output=True, text=True, env=env, cwd=str(tmp_path))
    assert proc.returncode == 1 and "bad_board.py:3" in proc.stdout, proc.stdout + proc.stderr
