"""replay says how much flight the watch judged (new-user trial 26, watch flow): a 45 s hover log
learned its baseline at 43.7 s and read "no event: power stayed within what the parameter set
expects" on 1.3 s of judged flight, the same words as a 5-minute flight. Now the no-event line
names the judged flight time (--json: judged_s), and a log judged for less than the watch's own
learning window (CONFIG learn_ms) gets a warning that it is too little to count as a check.
The flight is the simulated clean demo flight (watch_helpers.demo_flight_rows), cut short."""

import json

from watch_helpers import demo_flight_rows, write_log_rows
from io_helpers import run

HEADER = "time[s],command[-],voltage[V],current[A]"


def _replay(path, params_file, *extra):
    code, out, err = run(["replay", str(path), "--params", str(params_file)] + list(extra))
    assert code == 0, err
    return out


def test_a_log_cut_just_after_learning_is_not_a_clean_bill(tmp_path, params_file):
    rows = demo_flight_rows(7)
    full = write_log_rows(tmp_path, HEADER, rows, lambda *r: r, "full.csv")
    doc = json.loads(_replay(full, params_file, "--json"))
    assert doc["learned"] and not doc["events"], doc["headline"]
    # the whole flight: judged for most of its flight time (the 300 s flight less take-off and
    # the learning window, set by the CONFIG: about 250 s on the demo), no short-span warning
    assert doc["judged_s"] > 200.0 and not any("judged only" in w for w in doc["warnings"]), doc
    t0, learned = rows[0][0], doc["learned_at_s"]
    cut = [r for r in rows if r[0] - t0 <= learned + 2.0]     # 2 s of flight after learning
    short = write_log_rows(tmp_path, HEADER, cut, lambda *r: r, "short.csv")
    text = _replay(short, params_file)
    assert "no event" in text and "judged after learning" in text, text
    assert "judged only" in text and "fly longer near hover" in text, text
    doc = json.loads(_replay(short, params_file, "--json"))
    assert doc["learned"] and doc["judged_s"] <= 2.5, doc
    assert any("judged only" in w for w in doc["warnings"]), doc["warnings"]
