"""The wheel carries every file the commands need: build it, install it (not editable) into a
fresh virtual environment and run ``liftcal demo`` there, away from the repository.

A file missing from the wheel (schemas, the example map, the board side in firmware_port)
makes the demo fail here instead of on a user's machine. The fresh environment borrows the
test environment's third-party packages through a path file, so nothing is downloaded, but
``estimator`` and ``firmware_port`` come only from the wheel (checked).
"""

import glob
import os
import shutil
import subprocess
import sys
import sysconfig
import venv

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def _run(args, cwd, env=None, timeout=600):
    res = subprocess.run(args, cwd=cwd, env=env, capture_output=True, text=True, timeout=timeout)
    assert res.returncode == 0, "%s\n%s\n%s" % (" ".join(args), res.stdout[-3000:], res.stderr[-3000:])
    return res


def test_wheel_installs_and_runs_the_demo(tmp_path):
    # build from a copy: a stale build/ folder in the checkout must not stand in for a missing file
    src = tmp_path / "src"
    shutil.copytree(ROOT, str(src), ignore=shutil.ignore_patterns(
        ".git", ".venv", "node_modules", "build", "*.egg-info", "__pycache__", ".hypothesis",
        ".pytest_cache", ".mypy_cache", "liftcal-demo"))
    wheels = tmp_path / "wheels"
    _run([sys.executable, "-m", "pip", "wheel", "--no-deps", "--no-build-isolation", "-q",
          "--disable-pip-version-check", "-w", str(wheels), str(src)], cwd=str(tmp_path))
    wheel = glob.glob(str(wheels / "liftcal-*.whl"))
    assert len(wheel) == 1, wheel

    env_dir = tmp_path / "fresh"
    venv.EnvBuilder(with_pip=False).create(str(env_dir))
    py = str(env_dir / "bin" / "python")
    site = subprocess.run([py, "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"],
                          capture_output=True, text=True, check=True).stdout.strip()
    # third-party packages from the test environment (numpy, click, jsonschema, ...), not liftcal
    ours = sysconfig.get_paths()["purelib"]
    with open(os.path.join(site, "borrowed-deps.pth"), "w", encoding="utf-8") as fh:
        fh.write(ours + "\n")
    # --ignore-installed: never uninstall the test environment's own (editable) liftcal
    _run([sys.executable, "-m", "pip", "install", "--no-deps", "--ignore-installed", "-q",
          "--disable-pip-version-check",
          "--prefix", str(env_dir), wheel[0]], cwd=str(tmp_path))

    work = tmp_path / "work"
    work.mkdir()
    env = dict(os.environ, PATH=str(env_dir / "bin") + os.pathsep + os.environ.get("PATH", ""))
    env.pop("PYTHONPATH", None)
    where = _run([py, "-c", "import estimator, firmware_port; print(estimator.__file__); "
                  "print(firmware_port.__file__)"], cwd=str(work), env=env).stdout.split()
    assert all(p.startswith(str(env_dir)) for p in where), where  # from the wheel, not the repo
    # the console script (its first line names the installing interpreter, so run it with ours)
    res = _run([py, str(env_dir / "bin" / "liftcal"), "demo", "--out", "demo", "--json"],
               cwd=str(work), env=env)
    assert res.stdout.strip().startswith("{")
    out = work / "demo"
    for name in ("vehicle.json", "bench.csv", "params.json"):
        assert (out / name).is_file(), sorted(os.listdir(out))
    bundle = [p for p in glob.glob(str(out / "**" / "liftwatch*.py"), recursive=True)]
    assert bundle, "no board bundle written"
