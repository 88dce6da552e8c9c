"""Tenth new-user trial, bench items (finding 7): a temperature column in kelvin labelled C is
refused with a unit hint instead of a hot-motor caution. The sweep is the INVENTED 10-inch
rotor of test_fit_tare_trial8 (its own DC motor model)."""

import pytest

from test_fit_tare_trial8 import _sweep
from trial_helpers import ok, refused

# room temperature about 20 C is about 293 K (0 C = 273.15 K, SI brochure); no motor sweeps with
# its coldest reading above 200 C (common practice)
ROOM_K = 293.15


def _with_temperature(text, start, top, unit="C", blank_row=None):
    """The sweep with a temperature[unit] column rising from start to top over the rows (one
    cell left empty at blank_row)."""
    lines = text.splitlines()
    head = next(i for i, line in enumerate(lines) if line.startswith("command"))
    rows = len(lines) - head - 1
    out = lines[:head] + [lines[head] + ",temperature[%s]" % unit]
    for k, line in enumerate(lines[head + 1:]):
        out.append("%s,%s" % (line, "" if k == blank_row else "%.1f" % (start + (top - start) * k / (rows - 1))))
    return "\n".join(out) + "\n"


@pytest.mark.parametrize("blank_row", [None, 7])
def test_kelvin_labelled_celsius_is_refused_with_a_unit_hint(tmp_path, blank_row):
    csv = tmp_path / "k.csv"
    csv.write_text(_with_temperature(_sweep(0.0), ROOM_K, ROOM_K + 20.0, blank_row=blank_row))
    out = tmp_path / "p.json"
    line = refused("fit", csv, "--out", out)
    assert "k.csv: column 5 'temperature[C]': even its lowest reading, 293.1 C" in line, line
    assert "kelvin labelled C?" in line and "label the column temperature[K]" in line
    assert "got hot" not in line and not out.exists()


def test_the_same_readings_labelled_kelvin_give_no_hot_motor_caution(tmp_path):
    csv = tmp_path / "k.csv"
    csv.write_text(_with_temperature(_sweep(0.0), ROOM_K, ROOM_K + 20.0, unit="K"))
    text = " ".join(ok("fit", csv, "--out", tmp_path / "p.json").split())
    assert "got hot" not in text and "kelvin" not in text


def test_a_motor_that_really_got_hot_still_gets_the_caution(tmp_path):
    # from 20 C at rest to 250 C: a burning motor, not kelvin (its coldest reading is room air)
    csv = tmp_path / "hot.csv"
    csv.write_text(_with_temperature(_sweep(0.0), 20.0, 250.0))
    text = " ".join(ok("fit", csv, "--out", tmp_path / "p.json").split())
    assert "temperature[C] read up to 250 C, above about 80 C" in text


def test_a_diameter_that_is_not_the_vehicles_is_named_before_the_static_factor_check(tmp_path):
    # trial 10: --diameter 11in against a 22in vehicle was blamed on "thrust in lbf labelled as
    # kgf" by the k <= 1 check (k grows as D^(-2/3): half the diameter is 1.59 x k, above 1 from
    # the sweep's k of about 0.7); the mismatch itself is the cause
    import json

    from test_fit_tare_trial8 import VEHICLE

    csv, vehicle = tmp_path / "s.csv", tmp_path / "v.json"
    csv.write_text(_sweep(0.0))
    vehicle.write_text(json.dumps(VEHICLE))
    inch = 0.0254  # m, exact by definition (international inch, 1959)
    half = VEHICLE["propeller"]["diameter_m"] / 2.0 / inch
    line = refused("fit", csv, "--vehicle", vehicle, "--diameter", "%.1fin" % half, "--out", tmp_path / "p.json")
    assert "s.csv: swept with a %.3g m (%.1f in) propeller (--diameter), but the vehicle (--vehicle) has %.3g m" \
        % (half * inch, half, VEHICLE["propeller"]["diameter_m"]) in line, line
    assert "lbf" not in line and "static thrust factor" not in line
    assert not (tmp_path / "p.json").exists()


def test_a_header_repeated_mid_file_is_named_as_such(tmp_path):
    # trial 10: two sweeps joined into one file got "leave a missing reading empty"
    text = _sweep(0.0)
    lines = text.splitlines()
    head = next(i for i, line in enumerate(lines) if line.startswith("command"))
    rows = lines[head + 1:]
    joined = lines[:head + 1] + rows[:40] + [lines[head]] + rows[40:]
    csv = tmp_path / "joined.csv"
    csv.write_text("\n".join(joined) + "\n")
    line = refused("fit", csv, "--out", tmp_path / "p.json")
    assert "joined.csv: line %d repeats the header row (command[" % (head + 1 + 40 + 1) in line, line
    assert "two files joined? delete that line" in line and "missing reading" not in line


def test_a_flight_logs_second_header_is_named_too(tmp_path):
    # the one CSV reader of sweeps and flight logs (estimator.csvtable); a second log's header
    # with other units after the first log's rows
    from estimator import csvtable
    from estimator.errors import InputError

    path = tmp_path / "log.csv"
    path.write_text("time[s],current[A]\n0.0,1.5\n0.1,1.6\ntime[ms],current[mA]\n0,1500\n")
    with pytest.raises(InputError) as info:
        csvtable.read_table(str(path), "a flight CSV", "time[s],current[A]",
                            {"time": csvtable.TIME_UNITS, "current": {"A": (1.0, 0.0)}}, missing_ok=True)
    assert "log.csv: line 4 looks like another header row (time[ms], current[mA])" in str(info.value)
    assert "missing reading" not in str(info.value)
