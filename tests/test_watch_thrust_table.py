"""The watch's thrust-from-power table on a tiny vehicle (new-user trial 4 item 4: a 21 g whoop's
mass read about 10 % low).

The kernel interpolates thrust linearly between 33 knots of power. T(P) is concave and steep
just above the idle power, so knots holding the exact values read low between them. Checked
here: the interpolated table against the power model inverted by scipy's brentq (a reference
independent of the project's own bisection), on the trial's whoop power model (idle 1.0 W,
97.5 W/N^1.5 per rotor, 4 rotors, 21 g) and on a heavier rotor.
Momentum theory form of the power model: Leishman, Principles of Helicopter Aerodynamics, ch. 2.
"""

import numpy as np
import pytest
from scipy.optimize import brentq

from estimator.watch.thrust_table import thrust_knots_mN

G0 = 9.80665  # standard gravity [m/s^2] (CGPM 1901)


def _inverse_total_N(idle_W, induced, copper, rotors):
    def thrust(total_W):
        p = total_W / rotors
        if p <= idle_W:
            return 0.0
        f = lambda t: idle_W + induced * t ** 1.5 + copper * t * t - p  # noqa: E731
        return rotors * brentq(f, 0.0, 1e4, xtol=1e-12)
    return thrust


@pytest.mark.parametrize("idle_W, induced, copper, rotors, mass_kg, step_W", [
    (1.0, 97.5, 0.0, 4, 0.021, 3.2),      # the trial's 65 mm 1S whoop (invented)
    (4.0, 9.0, 0.05, 4, 1.45, 51.2),      # a 10-inch quad (invented)
])
def test_the_table_reads_hover_thrust_within_1_5_percent(idle_W, induced, copper, rotors, mass_kg, step_W):
    thrust = _inverse_total_N(idle_W, induced, copper, rotors)
    knots = np.array(thrust_knots_mN(thrust, step_W), dtype=float)
    weight_N = mass_kg * G0
    # powers from 0.7x to 1.5x the hover power: hover, light and heavy payloads
    hover_W = rotors * (idle_W + induced * (weight_N / rotors) ** 1.5 + copper * (weight_N / rotors) ** 2)
    worst = 0.0
    for p_W in np.linspace(0.7, 1.5, 41) * hover_W:
        table_mN = np.interp(p_W / step_W, np.arange(33), knots)
        worst = max(worst, abs(table_mN / (1000.0 * thrust(p_W)) - 1.0))
    # measured: whoop 1.02 % (knots at the exact values: 1.96 %), 10-inch quad below 0.1 %; the
    # whoop hovers at 8 % of the table's power range, where its 33 knots are 3.2 W apart
    assert worst < 0.015, worst
