"""A re-fit that replaces a set with hover values by one without says so (new-user trial 12,
finding 11: `fit SWEEP --out p.json` after `fit SWEEP --vehicle V --out p.json` printed only
'replaced p.json: the parameter set fitted from ...', and the next `firmware` failed on
$.vehicle). Common practice: a tool that replaces its own output names what is lost.
"""

import json

from io_helpers import VEHICLE, run
from test_bench_air_inputs import _sweep


def _fit(csv, out, *extra):
    code, text, err = run(["fit", csv, "--out", out, "--json"] + list(extra))
    assert code == 0, err
    return json.loads(text)


def test_the_replace_line_names_the_hover_values_the_new_set_lacks(tmp_path):
    # the INVENTED sweep of test_bench_air_inputs, on the demo quad's 10 in propeller
    csv, out = _sweep(tmp_path, "# altitude: 300m\n# temperature: 21C\n"), tmp_path / "p.json"
    _fit(csv, out, "--vehicle", VEHICLE)
    name = json.load(open(out))["vehicle"]["name"]
    replaced = " ".join(_fit(csv, out)["replaced"])
    assert "the old set had hover values for %s, this one has none" % name in replaced, replaced
    assert "--vehicle" in replaced
    # replacing a set without hover values, or keeping them: nothing of the kind
    assert "hover values" not in " ".join(_fit(csv, out)["replaced"])
    _fit(csv, out, "--vehicle", VEHICLE)
    assert "hover values" not in " ".join(_fit(csv, out, "--vehicle", VEHICLE)["replaced"])
