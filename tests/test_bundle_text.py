"""The board bundle's words agree with its own CONFIG and file list (trial 5, item 12), through
`liftcal firmware` (io_helpers.run: exit code, stdout and stderr apart).

The README's numbers (block length, take-off skip, learning window, lag) are the CONFIG's, not
prose; `firmware --help` names every file the bundle holds; the mass alarm limit is printed as
the kernel applies it (plan x (1 + mass_limit_permille / 1000), compared in permille: not floored
to whole grams).
"""

import json
import os

from estimator.watch.config import CONFIG_KEYS, SCALAR_AT
from io_helpers import PARAMS, VEHICLE, run


def _config(folder):
    """CONFIG of a written bundle as {scalar name: int}, read from its liftwatch_config.py."""
    scope = {}
    exec((folder / "liftwatch_config.py").read_text(), scope)
    return {name: scope["CONFIG"][SCALAR_AT + i] for i, name in enumerate(CONFIG_KEYS)}


def test_readme_numbers_come_from_the_bundles_config(tmp_path):
    code, out, err = run(["firmware", PARAMS, "--out", tmp_path / "board", "--lag-ms", "77", "--json"])
    assert code == 0, err
    cfg = _config(tmp_path / "board")
    readme = " ".join((tmp_path / "board" / "README.md").read_text().split())
    assert cfg["lag_ms"] == 77 and "77 ms in this bundle" in readme
    assert "(%d ms in this bundle, CONFIG `block_ms`)" % cfg["block_ms"] in readme
    assert "the first %g s after spin-up are not judged" % (cfg["takeoff_ms"] / 1000.0) in readme
    assert "then %g s of steady flight are learned" % (cfg["learn_ms"] / 1000.0) in readme
    assert "ending by %g s of flight time" % (cfg["learn_timeout_ms"] / 1000.0) in readme
    assert "{" not in readme  # every field filled
    assert "about 15 s" not in readme and "default 1 s" not in readme


def test_firmware_help_names_every_file_of_the_bundle(tmp_path):
    code, out, err = run(["firmware", PARAMS, "--out", tmp_path / "board", "--json"])
    assert code == 0, err
    files = json.loads(out)["files"]
    assert sorted(files) == sorted(os.path.relpath(os.path.join(base, f), tmp_path / "board")
                                   for base, _, names in os.walk(tmp_path / "board") for f in names
                                   if f != ".liftcal-folder.json")
    code, help_text, err = run(["firmware", "--help"])
    assert code == 0, err
    help_text = " ".join(help_text.split())
    for name in files:
        shown = "mpy/*.mpy" if name.startswith("mpy/") else name
        assert shown in help_text, name
    readme = (tmp_path / "board" / "README.md").read_text()
    for name in files:  # the README's table lists them too
        if not name.startswith("mpy/"):
            assert "| `%s` |" % name in readme, name


def test_mass_limit_is_not_floored(tmp_path):
    vehicle = json.loads(open(VEHICLE, encoding="utf-8").read())
    vehicle["mass_kg"] = 2.051  # plan 2051 g: +8 % is 2215.08 g, floored it read 2215
    path = tmp_path / "v.json"
    path.write_text(json.dumps(vehicle))
    code, out, err = run(["firmware", PARAMS, "--vehicle", path, "--out", tmp_path / "b1", "--json"])
    assert code == 0, err
    cfg = _config(tmp_path / "b1")
    exact = cfg["mass_plan_g"] * (1000 + cfg["mass_limit_permille"]) / 1000.0
    assert cfg["mass_plan_g"] == 2051 and json.loads(out)["mass_limit_g"] == round(exact, 1) == 2215.1
    code, out, err = run(["firmware", PARAMS, "--vehicle", path, "--out", tmp_path / "b2"])
    assert code == 0, err
    # in the vehicle's unit as replay writes it (units.mass_text: kilograms for a vehicle of 1 kg or
    # more; new-user trial 13, finding 12: firmware said 9720.0 g where replay said 9.720 kg)
    assert "mass alarm above 2.215 kg" in " ".join(out.split())
