"""Thrust from bus power for the watch's implied mass: the parameter set's power model inverted,
and the knots of the piecewise-linear table the kernel interpolates (estimator.core.watch)."""

from estimator.core.power_model import thrust_from_power_N


def thrust_from_power_total_N(power_W, params, rotor_count, density_kg_m3):
    """Total thrust [N] from total bus power [W]: the parameter set's power model inverted.

    Per rotor T = P^-1(P_total / N) with P(T, rho) the one power model
    (estimator.core.power_model.thrust_from_power_N: the same P(T) the expected-power table
    uses, so the implied mass and the expected power never disagree). power_W: total bus power
    [W]; rotor_count N [-]; density_kg_m3: site rho [kg/m^3].
    Source: DC motor + momentum theory power model (estimator.core.power_model docstring).
    """
    return rotor_count * thrust_from_power_N(params["power_model"], max(power_W, 0.0) / rotor_count,
                                             density_kg_m3)


def thrust_knots_mN(thrust_N, step_W):
    """33 knots [mN] at P = 0, step_W, ..., 32 step_W [W] of the piecewise-linear table the kernel
    interpolates, chosen by least squares over 16 points per interval (numpy.linalg.lstsq on
    the hat functions of linear interpolation, through estimator.solvers: a thrust that is not
    finite raises solvers.NotFinite instead of reaching LAPACK), not as the values at the knots:
    T(P) is concave and steep just above the idle power, so knot values alone read low between
    knots (3 % at a 21 g whoop's hover). thrust_N(P [W]) -> T [N]. Knots kept within 0..1e6 mN.
    """
    import numpy as np  # imported when a CONFIG is made, not when the command table loads

    from estimator import solvers

    x = np.linspace(0.0, 32.0, 32 * 16 + 1)
    target = np.array([1000.0 * thrust_N(xi * step_W) for xi in x])
    hat = np.maximum(0.0, 1.0 - np.abs(x[:, None] - np.arange(33)[None, :]))
    knots = solvers.lstsq(hat, target, "watch's thrust-from-power table")[0]
    return [int(round(min(1e6, max(0.0, k)))) for k in knots]
