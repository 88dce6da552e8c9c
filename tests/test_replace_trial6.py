"""A parameter set is replaced only by a re-fit of the same bench file and rotor, or when asked,
and every replaced file is named in one line (new-user trial 6, item 3; design notes sec. 4:
no user file is ever replaced without the user asking).

The trial's case: `fit bench1.csv --out own.json` (a 10-inch set), then `fit racer_bench.csv
--out own.json` replaced the 10-inch set without a word. Checked here through the command
line: exit code, stdout and stderr apart, and the file's bytes (hashlib SHA-256, FIPS 180-4)
before and after.
"""

import hashlib
import json

from estimator.demo.ramp_sweep import ramp_sweep_rows, write_ramp_csv
from tests.io_helpers import PARAMS, refused, run


def _sweep(tmp_path, name, seed):
    path = tmp_path / name
    write_ramp_csv(str(path), ramp_sweep_rows(3000, seed=seed), "invented sweep for the replace test")
    return path


def _said(stdout):
    """The 'replaced ...' lines of a text output, each joined back from its 80-column wrap."""
    lines, out = stdout.splitlines(), []
    for i, line in enumerate(lines):
        if line.split(" ")[0] == "replaced":
            out.append(" ".join([line] + [x.strip() for x in lines[i + 1:i + 4] if x.startswith("  ")]))
    return out


def _sha(path):
    return hashlib.sha256(path.read_bytes()).hexdigest()


def test_a_set_from_another_bench_file_is_refused_unless_asked(tmp_path):
    first, other, out = _sweep(tmp_path, "bench1.csv", 5), _sweep(tmp_path, "racer.csv", 6), tmp_path / "own.json"
    code, stdout, stderr = run(["fit", first, "--diameter", "10in", "--out", out])
    assert code == 0 and stderr == "" and "replaced" not in stdout      # nothing was there
    before = _sha(out)
    line = refused(["fit", other, "--diameter", "10in", "--out", out],
                   "own.json", "bench1.csv", "0.254 m propeller", "racer.csv", "--replace")
    assert "another bench file" in line
    assert _sha(out) == before                                            # the 10-inch set kept
    # another propeller diameter on the same bench file: another rotor, refused too
    line = refused(["fit", first, "--diameter", "11in", "--out", out], "another propeller (0.2794 m)")
    assert "another bench file" not in line and _sha(out) == before
    # asked: replaced, and the line says what went
    code, stdout, stderr = run(["fit", other, "--diameter", "10in", "--out", out, "--replace"])
    assert code == 0 and stderr == "", stderr
    said = _said(stdout)
    assert len(said) == 1 and "bench1.csv" in said[0] and "0.254 m propeller" in said[0], stdout
    assert json.loads(out.read_text())["provenance"]["input_file"] == "racer.csv"


def test_a_refit_of_the_same_file_and_rotor_replaces_and_says_so(tmp_path):
    sweep, out = _sweep(tmp_path, "bench1.csv", 5), tmp_path / "p.json"
    assert run(["fit", sweep, "--diameter", "10in", "--out", out])[0] == 0
    created = json.loads(out.read_text())["provenance"]["created_utc"]
    code, stdout, stderr = run(["fit", sweep, "--diameter", "10in", "--out", out])
    assert code == 0 and stderr == ""
    said = _said(stdout)
    assert said == ["replaced %s: the parameter set fitted from bench1.csv (0.254 m propeller, %s %s UTC)"
                    % (out, created[:10], created[11:16])], stdout
    code, stdout, stderr = run(["fit", sweep, "--diameter", "10in", "--out", out, "--json"])
    doc = json.loads(stdout)                                              # still one JSON object
    assert code == 0 and stderr == "" and len(doc["replaced"]) == 1 and "bench1.csv" in doc["replaced"][0]


def test_export_names_the_settings_file_it_replaces(tmp_path):
    out = tmp_path / "settings.txt"
    code, stdout, stderr = run(["export", PARAMS, "--out", out])
    assert code == 0 and "replaced" not in stdout + stderr
    code, stdout, stderr = run(["export", PARAMS, "--out", out])
    assert code == 0 and stderr == "" and _said(stdout) == ["replaced %s: a settings file liftcal wrote" % out]
    code, stdout, stderr = run(["export", PARAMS, "--out", out, "--json"])
    # stdout holds the settings object only: the notes (lines starting '! ') and the replaced line go to stderr
    said = [line for line in stderr.splitlines() if not line.startswith("! ")]
    assert code == 0 and json.loads(stdout) and said == ["replaced %s: a settings file liftcal wrote" % out]
