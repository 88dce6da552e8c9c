"""A log too short to judge says so in the replay's headline (new-user trial 25, finding 3): a
one-row log led with "onerow.csv: 1 sample, 0 alarms, 0 events", which reads as all clear, and
the "no verdict" came only on the next line. The headline now leads with NOT JUDGED and the
reason's head in the replay's own words ("too short to learn", "no verdict"), in text and JSON.

Reference: the watch needs a take-off and about 20 s of steady flight to learn its power baseline
(estimator.watch.replay.learning_note, the design's learning window); one row has none (common
practice: no baseline, no verdict).
"""

from trial_helpers import ok, report
from watch_helpers import flight_csv_once

ONE_ROW = "time[s],command[-],voltage[V],current[A]\n0.0,0.0,16.4,0.3\n"


def test_a_one_row_log_is_headed_not_judged(tmp_path, params_file):
    log = tmp_path / "onerow.csv"
    log.write_text(ONE_ROW)
    first = " ".join(ok("replay", log, "--params", params_file).split()).split(" too short to learn: ")[0]
    # before: "onerow.csv: 1 sample, 0 alarms, 0 events" (the verdict only on the next line)
    assert "NOT JUDGED, too short to learn (no verdict): 1 sample, 0 alarms, 0 events" in first, first
    doc = report("replay", log, "--params", params_file)
    assert doc["judged"] is False and "NOT JUDGED, too short to learn (no verdict)" in doc["headline"], doc
    assert doc["note"].startswith("too short to learn:")  # the reason, as before (learning_note)


def test_a_judged_flight_keeps_its_plain_headline(tmp_path, params_file, monkeypatch):
    # a 300 s demo flight learns its baseline (README's replay examples): the counts alone, as before
    monkeypatch.chdir(tmp_path)  # a short name: the headline does not wrap with the folder's length
    (tmp_path / "flight.csv").write_text(flight_csv_once(seed=1))
    log = "flight.csv"
    out = ok("replay", log, "--params", params_file)
    assert out.startswith("flight.csv: 3000 samples, 0 alarms") and "NOT JUDGED" not in out, out
    doc = report("replay", log, "--params", params_file)
    assert doc["judged"] is True and doc["headline"] == out.split("\n")[0], doc["headline"]
