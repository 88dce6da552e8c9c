"""What a bench sweep CSV holds: its columns, the units each may be written in, and the range
of values a real sweep of a small multirotor rotor stays within.

One home for the tables the reader (estimator.bench.reader), its row and unit checks
(estimator.bench.row_checks, estimator.bench.sensor_checks), the fit's words and plots
(thrust and command in the CSV's own units) and ``liftcal fit --help`` read.
"""

from estimator import csvtable
from estimator.core.constants import RAD_S_PER_RPM
from estimator.units import unit_factors

REQUIRED = ("command", "voltage", "current", "thrust")
# optional columns: name -> {unit as written: (scale, offset)} to SI (rpm -> rad/s,
# temperature in C as estimator.units takes it); checked as numbers, not used by the fit
OPTIONAL = {
    "time": csvtable.TIME_UNITS,
    "rpm": {"rpm": (RAD_S_PER_RPM, 0.0)},
    "torque": {"N*m": (1.0, 0.0), "mN*m": (1e-3, 0.0)},
    "temperature": unit_factors("temperature", ("C", "K")),
}
# column -> {unit as written: (scale, offset)} so that SI = value * scale + offset; the factors
# come from the one unit table (estimator.units), the command's from csvtable.COMMAND_UNITS
UNITS = {
    "command": csvtable.COMMAND_UNITS,
    "voltage": unit_factors("voltage", ("V", "mV")),
    "current": unit_factors("current", ("A", "mA")),
    "thrust": unit_factors("force", ("N", "mN", "g", "gf", "kgf", "lbf")),
}
EXAMPLE_HEADER = "command[-],voltage[V],current[A],thrust[N]"

# a bench bus outside these is almost surely a unit slip (mV labelled V, or V labelled mV);
# the top allows 40 lithium cells in series (4.35 V each, high-voltage cells) [V]
BUS_VOLTAGE_RANGE_V = (1.0, 200.0)
# idle current-sensor noise tolerated below zero: the larger of this and 1 % of the largest
# current [A] (common practice for hall-effect bench sensors, not a standard)
NEGATIVE_CURRENT_TOLERANCE_A = 0.25
# single rows beyond these are glitches, not data: a bus voltage off the sweep's median by
# more than a factor 2, a current above 1000 A, a thrust above 5000 N (far beyond any rotor
# of a small multirotor) [V, A, N]
MAX_CURRENT_A = 1000.0
MAX_THRUST_N = 5000.0
# share of rows allowed outside 0..1 before the command unit itself is suspect
COMMAND_OUTSIDE_SHARE = 0.05
# the medians of the range checks (bus voltage, current) are taken over a systematic subsample
# of at most about this many rows: they judge factors of 2 and 1000, far coarser than its
# sampling error [-]
MEDIAN_ROWS = 20000
