"""liftcal replay: demo flights with and without faults, the CSV reader's refusals, plot, progress."""

import json

import pytest

from estimator.cli import main
from estimator.watch.replay import replay_file, replay_file_traced
from watch_helpers import demo_fit_params, flight_csv_once


def _flight(tmp_path, fault, seed=5):
    f = tmp_path / ("flight-%s.csv" % fault)
    f.write_text(flight_csv_once(fault=fault, seed=seed))
    return f


@pytest.mark.parametrize("fault,kind", [(None, None), ("power_high", "power_high"), ("power_low", "power_low"),
                                        ("heavy", "mass_high"), ("sensor", "sensor_fault")])
def test_replay_flags_injected_faults_and_not_clean_flights(tmp_path, fault, kind):
    out = replay_file(str(_flight(tmp_path, fault)), demo_fit_params())
    kinds = {e["kind"] for e in out["events"]}
    assert out["samples"] == 3000
    if kind is None:
        assert out["events"] == [] and out["alarms"] == 0
    else:
        assert kinds == {kind}, out["events"]
    if fault in ("power_high", "power_low"):
        first = out["events"][0]
        assert 120.0 <= first["t_s"] <= 122.0   # onset at 120 s
        assert (first["residual"] > 0.05) == (fault == "power_high")


def test_cli_replay_json_and_plot(tmp_path, params_file, capsys):
    f = _flight(tmp_path, "power_high")
    png = tmp_path / "replay.png"
    with pytest.raises(SystemExit) as exc:
        main(["replay", str(f), "--params", str(params_file), "--plot", str(png), "--json"])
    assert exc.value.code == 0
    captured = capsys.readouterr()
    out = json.loads(captured.out)
    assert set(out) >= {"samples", "alarms", "events"} and out["alarms"] == 1
    assert set(out["events"][0]) == {"t_s", "kind", "residual", "bus_V", "flight"}  # bus_V: the bus at the event; flight: its number in the log
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert captured.err == ""   # no progress bar when stderr is not a terminal


@pytest.mark.parametrize("text,needle", [
    ("time[s],command[-],voltage[V]\n0,0.5,15\n", "header lacks current"),
    ("time[s],command[-],voltage[V],current[kA]\n0,0.5,15,1\n", "unit 'kA' of column 'current'"),
    ("time[s],command[-],voltage[V],current[A]\n0,0.5,15,abc\n", "line 2 column 4: cannot read 'abc'"),
    ("time[s],command[-],voltage[V],current[A]\ninf,0.5,15,1\n", "line 2 column 1: 'inf' is not a finite"),
    # a missed reading drops its row (trial 8, finding 6), but not the whole log
    ("time[s],command[-],voltage[V],current[A]\nnan,0.5,15,1\n", "line 2: 1 of 1 data rows have an empty or 'nan'"),
    ("time[s],command[-],voltage[V],current[A]\n0,0.5,15\n", "line 2: 3 cells"),
    ("# only a comment\n", "no header row"),
    ("time[s],command[-],voltage[V],current[A]\n", "no data rows"),
])
def test_bad_flight_csv_is_one_error_line(tmp_path, params_file, capsys, text, needle):
    f = tmp_path / "bad.csv"
    f.write_text(text)
    with pytest.raises(SystemExit) as exc:
        main(["replay", str(f), "--params", str(params_file)])
    err = capsys.readouterr().err.strip().splitlines()
    assert exc.value.code == 2 and len(err) == 1 and err[0].startswith("error:"), err
    assert needle in err[0] and "bad.csv" in err[0]


def test_units_at_the_edge(tmp_path):
    # command in % and us, voltage in mV, current in mA give the same events as SI columns
    f = _flight(tmp_path, "power_low")
    base = replay_file(str(f), demo_fit_params())
    lines = f.read_text().splitlines()
    rows = [l for l in lines if l and not l.startswith("#")][1:]
    conv = ["time[s],command[us],voltage[mV],current[mA]"]
    for r in rows:
        t, u, v, a = r.split(",")
        conv.append("%s,%.1f,%.0f,%.0f" % (t, 1000 + 1000 * float(u), 1000 * float(v), 1000 * float(a)))
    g = tmp_path / "conv.csv"
    g.write_text("\n".join(conv) + "\n")
    assert replay_file(str(g), demo_fit_params())["events"] == base["events"]


def test_progress_bar_on_request(tmp_path, capsys):
    f = _flight(tmp_path, None)
    replay_file(str(f), demo_fit_params(), progress=True)
    assert "replay [" in capsys.readouterr().err


def test_a_bench_sweep_given_as_a_flight_log_is_refused(tmp_path, capsys):
    # a bench CSV carries thrust (design notes sec. 4) and no flight log does: replaying one
    # would give meaningless alarms, so it is one error line naming the likely mix-up
    from estimator.demo.bench_sim import simulate_sweep
    from estimator.cli import main
    bench = tmp_path / "bench.csv"
    bench.write_text(simulate_sweep(seed=2))
    params = tmp_path / "params.json"
    params.write_text(json.dumps(demo_fit_params()))
    with pytest.raises(SystemExit) as exc:
        main(["replay", str(bench), "--params", str(params)])
    assert exc.value.code == 2
    err = capsys.readouterr().err
    assert err.startswith("error:") and "bench sweep" in err and err.count("\n") == 1


def _rewrite_time(src, dst, fn, unit="s"):
    """Copy a flight CSV with its time column passed through fn and the time unit set."""
    out = []
    for line in src.read_text().splitlines():
        if line.startswith("#") or not line:
            out.append(line)
        elif line.startswith("time["):
            out.append(line.replace("time[s]", "time[%s]" % unit))
        else:
            cells = line.split(",")
            cells[0] = fn(float(cells[0]))
            out.append(",".join(cells))
    dst.write_text("\n".join(out) + "\n")
    return dst


def test_event_times_count_from_the_log_start_and_time_in_ms_is_read(tmp_path):
    # a logger whose clock counts Unix seconds, and one that logs milliseconds: the same events at
    # the same times from the log's first row as the plain log (the first row is at 0 s there)
    f = _flight(tmp_path, "power_high")
    plain = replay_file(str(f), demo_fit_params())["events"]
    epoch = _rewrite_time(f, tmp_path / "epoch.csv", lambda t: "%.3f" % (1733000000.0 + t))
    millis = _rewrite_time(f, tmp_path / "ms.csv", lambda t: "%d" % round(1000.0 * t), unit="ms")
    for g in (epoch, millis):
        events = replay_file(str(g), demo_fit_params())["events"]
        assert [e["kind"] for e in events] == [e["kind"] for e in plain]
        for a, b in zip(events, plain):
            assert abs(a["t_s"] - b["t_s"]) <= 0.01, (g, a, b)
        assert 100.0 < events[0]["t_s"] < 200.0


def test_mass_event_shows_implied_against_planned_mass(tmp_path, params_file, capsys):
    # a mass_high event says how heavy the vehicle seems against the plan and the alarm limit
    # (the planned mass is the parameter set's vehicle mass; the limit 8 % above it by default)
    f = _flight(tmp_path, "heavy")
    out = replay_file(str(f), demo_fit_params())
    ev = [e for e in out["events"] if e["kind"] == "mass_high"][0]
    plan = demo_fit_params()["vehicle"]["mass_kg"]
    assert ev["planned_kg"] == pytest.approx(plan, abs=1e-3)
    assert ev["limit_kg"] == pytest.approx(1.08 * plan, abs=2e-3)
    assert ev["mass_kg"] > ev["limit_kg"]          # the flown vehicle is 15 % heavier than planned
    assert ev["mass_kg"] < 1.3 * plan
    with pytest.raises(SystemExit):
        main(["replay", str(f), "--params", str(params_file)])
    text = capsys.readouterr().out
    assert "implied mass %.3f kg against %.3f kg planned" % (ev["mass_kg"], ev["planned_kg"]) in text, text
    assert "times in s from the log's first row" in text


def test_plot_title_counts_events_in_words_and_marks_learning(tmp_path):
    from estimator.watch.plots import plot_replay
    f = _flight(tmp_path, "power_high")
    out, arrays = replay_file_traced(str(f), demo_fit_params())
    assert "_arrays" not in out and replay_file(str(f), demo_fit_params()) == out   # no side channel
    assert arrays["learn_span"][0] is not None and arrays["learn_span"][1] > arrays["learn_span"][0]
    assert out["learned_at_s"] == pytest.approx(arrays["learn_span"][1], abs=1e-3)
    title = plot_replay(str(tmp_path / "one.png"), arrays, out["events"][:1], title="f.csv")
    assert title.startswith("f.csv: 1 event (")
    title = plot_replay(str(tmp_path / "two.png"), arrays, out["events"][:1] * 2, title="f.csv")
    assert title.startswith("f.csv: 2 events (")


def test_a_parameter_set_without_a_vehicle_is_named_by_its_file(tmp_path):
    # new-user trial 3, item 14: "error: parameter set: $.vehicle" did not say which file
    from click.testing import CliRunner

    from estimator.cli import cli
    from estimator.demo.ramp_sweep import ramp_sweep_rows, write_ramp_csv

    sweep = tmp_path / "sweep.csv"
    write_ramp_csv(str(sweep), ramp_sweep_rows(3000, seed=5), "invented sweep")
    params = tmp_path / "alone.json"
    fitted = CliRunner().invoke(cli, ["fit", str(sweep), "--diameter", "10in", "--out", str(params)])
    assert fitted.exit_code == 0, fitted.stderr
    log = tmp_path / "log.csv"
    log.write_text("time[s],command[-],voltage[V],current[A]\n0,0.5,15,20\n0.1,0.5,15,20\n")
    for args in (["firmware", str(params), "--out", str(tmp_path / "board")],
                 ["replay", str(log), "--params", str(params)]):
        res = CliRunner().invoke(cli, args)
        lines = res.stderr.strip().splitlines()
        assert res.exit_code == 2 and len(lines) == 1, (args, res.stderr)
        assert lines[0].startswith("error: %s: $.vehicle: missing" % params), lines[0]
    assert not (tmp_path / "board").exists()
