"""A flight log written in tenths or hundredths of a volt or an amp (a logger's integer counts,
new-user trial 26, watch flow) is refused with that factor named. Before, 1534 in a column
voltage[V] (15.34 V in hundredths) was called "likely millivolts ... label it voltage[mV]", and
relabelled so it was refused again as 1.53 V; ten times the voltage (153 V on a 4-cell pack),
and ten or a hundred times the current, were blamed on another vehicle or pack. Millivolts
labelled [V] keep their own hint. The log is the simulated clean demo flight (4-cell pack,
watch_helpers.demo_flight_rows) with one column scaled: the factors are exact powers of ten,
so each scaled log reads, divided back, as the demo flight itself."""

import pytest

from watch_helpers import demo_flight_rows, write_log_rows
from io_helpers import refused

HEADER = "time[s],command[-],voltage[V],current[A]"


@pytest.mark.parametrize("fn,needles,absent", [
    (lambda t, u, v, a: (t, u, 100 * v, a), ("column voltage[V]", "100 times", "counts of 0.01 V",
                                             "divide the column by 100"), "millivolts"),
    (lambda t, u, v, a: (t, u, 10 * v, a), ("column voltage[V]", "10 times", "counts of 0.1 V",
                                            "divide the column by 10"), "another vehicle or pack than"),
    (lambda t, u, v, a: (t, u, v, 10 * a), ("column current[A]", "divided by 10", "counts of 0.1 A",
                                            "divide the column by 10"), "another vehicle or pack than"),
    (lambda t, u, v, a: (t, u, v, 100 * a), ("column current[A]", "divided by 100", "counts of 0.01 A",
                                             "divide the column by 100"), "another vehicle or pack than"),
    # millivolts labelled [V]: still their own hint
    (lambda t, u, v, a: (t, u, 1000 * v, a), ("likely millivolts in a column labelled [V]",
                                              "label it voltage[mV]"), "counts of"),
])
def test_a_column_in_tenths_or_hundredths_names_the_factor(tmp_path, params_file, fn, needles, absent):
    f = write_log_rows(tmp_path, HEADER, demo_flight_rows(7), fn)
    line = refused(["replay", str(f), "--params", str(params_file)], "log.csv", *needles)
    assert absent not in line, line
