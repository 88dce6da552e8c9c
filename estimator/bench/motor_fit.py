"""The DC motor + propeller model fitted to a bench sweep: liftcal's own predictions.

Model (design notes sec. 3, the equations of estimator.core.motor written for arrays; a
test checks that the two agree). Only combinations of Kv, CT and CP show without a speed
sensor, so the model is written in the back-EMF s = omega / Kv [V]:
  ESC:       x = clip((u - u0) / (u1 - u0), 0, 1), duty d = x^g, Vm = d V_bus
  motor:     Vm = s + R I,  I = I0 + b s + c s^2   (c s^2 = Kv Q, the torque current; b s the
             current of losses that grow with speed: iron and bearing losses)
  propeller: T = a s^2
  bus:       I_bus = I_q + d I   (I_q: the ESC's own draw)
s is the positive root R c s^2 + (1 + R b) s - (Vm - R I0) = 0 (0 when Vm <= R I0). Nine
parameters: a [N/V^2], c [A/V^2], R [ohm], I0 [A], u0 (where the rotor starts [-]), u1 (the
ESC's top end point [-]), g (duty exponent [-], 1 for a linear ESC), I_q [A], b [A/V]. a and c grow as the air
density at fixed speed. The fit is scipy.optimize.least_squares (trust region reflective,
bounds, soft_l1 loss) on the command levels (estimator.bench.levels), thrust and bus
current residuals each scaled by its own robust residual scale, from a start read off
the levels; a second pass takes the scales from the first.

One supply voltage cannot tell the duty exponent g from the motor's resistance and loss
terms: at one bus voltage a steeper duty law (g > 1) and a larger resistive drop bend the
thrust and current against command alike (the cost changes by well under 0.1 % between
g = 0.9 and 1.3 on such a sweep), yet they predict different thrust at another voltage
(n = d ln T / d ln V falls from about 2 at R = 0 towards 1 as the resistive drop grows,
design notes sec. 3). Left to itself, g drifts: the only voltage changes such a sweep shows
are the supply's sag and the voltmeter's noise, and a fit that takes each level's noisy
voltage as exact lowers n to match (the attenuation of errors in variables, e.g. Fuller,
Measurement Error Models, 1987, from memory), which it can do at no cost by raising g and the
resistive drop together (g 1.32 and n 1.34 for a rotor whose two-voltage sweep gives g 1.00
and n 1.81). A sweep without a voltage spread (the caller decides: curve_fit.voltage_spread)
is therefore fitted
  - on the supply's own line V = V_s - R_s I_bus through the levels (supply_line_V), not on
    the voltmeter's noise, and
  - with a prior on g, DUTY_PRIOR = 1 +- 0.1: duty linear in command, the usual ESC throttle
    mapping (common practice), with a spread for ESCs that bend it (from memory). The prior
    is one more residual, and its precision is added to the covariance's information, so the
    voltage exponent's standard error carries what one voltage cannot measure.
With several supplies g is fitted from the data alone.
Sources: DC motor equivalent model (Drela 2007, from memory); scipy.optimize.least_squares;
a Gaussian prior's precision added to the data's information (e.g. Tarantola, Inverse Problem
Theory, ch. 3, from memory).
"""

import math

import numpy as np

from estimator import solvers
from estimator.bench.levels import confirmed_top as _confirmed_top
from estimator.bench.motor_errors import exponent_errors, full_thrust_extrapolation
from estimator.bench.rotor_model import NAMES, motor_exponents, rotor_arrays, rotor_jacobian, unpack

# residuals beyond this many robust scales count less and less (soft_l1's f_scale) [-]
LOSS_SCALE = 2.5
# the duty exponent where one supply voltage cannot measure it: (mean, standard deviation);
# duty linear in command is the usual ESC throttle mapping (common practice), the spread covers
# ESCs that bend it (from memory) [-]
DUTY_PRIOR = (1.0, 0.1)
DUTY_INDEX = 6
# a one-supply sweep's voltages further than this (rms, share of the median) from the
# supply's line are real changes (a pack drifting as it discharges), not voltmeter noise [-]
SUPPLY_LINE_MAX_RMS = 0.005
# the sweep shows the ESC's top end point when the fit puts it this far below the highest
# command swept [-]
TOP_END_MARGIN = 0.01


def _start(lv):
    """Start values from the levels: spin-up from a line through sqrt(T), I0 and c from a
    line of motor current against T, R from a 15 % resistive drop at the top. Levels above
    the confirmed top thrust or current (_confirmed_top) are left out when four or more
    remain: a glitch in a level of its own (screened only after this fit) set the start's
    scale 60 times too high and the fit ended in a corner it never left."""
    u, v, t, i = lv["command"], lv["voltage_V"], lv["thrust_N"], lv["current_A"]
    below = (t <= _confirmed_top(t)) & (i <= _confirmed_top(i))
    if np.count_nonzero(below) >= 4:
        u, v, t, i = u[below], v[below], t[below], i[below]
    t_top = float(np.max(t))
    mid = (t > 0.05 * t_top) & (t < 0.7 * t_top)
    if np.count_nonzero(mid) >= 2 and np.ptp(u[mid]) > 0:
        slope, icpt = solvers.polyfit(u[mid], np.sqrt(np.maximum(t[mid], 0.0)), 1, "spin-up line")
        u0 = -icpt / slope if slope > 0 else 0.05
    else:
        u0 = float(np.min(u[t > 0.05 * t_top])) - 0.02
    u0 = min(max(u0, 0.0), 0.45)
    u1 = 1.0
    d = np.clip((u - u0) / (u1 - u0), 0.0, 1.0)
    off = d <= 0.0
    iq = float(np.median(i[off])) if np.any(off) else 0.01 * float(np.max(i))
    iq = max(iq, 1e-4 * float(np.max(i)))
    on = d > 0.3
    if np.count_nonzero(on) < 2:
        on = d > 0.0
    im = np.maximum(i[on] - iq, 1e-6) / d[on]
    top = int(np.argmax(t))
    v_top = float(d[top] * v[top]) or float(np.max(v))
    s_top = 0.85 * v_top
    a = t_top / (s_top * s_top)
    if np.count_nonzero(on) >= 2 and np.ptp(t[on]) > 0:
        k, i0 = solvers.polyfit(t[on], im, 1, "current-thrust line")
    else:
        k, i0 = float(np.max(im)) / t_top, 0.0
    k = max(k, 0.2 * float(np.max(im)) / t_top)
    i0 = min(max(i0, 0.01 * float(np.max(im))), 0.5 * float(np.max(im)))
    c = k * a
    r = max(0.15 * v_top / float(np.max(im)), 1e-4)
    b = 0.1 * i0 / s_top
    return np.array([math.log(a), math.log(c), math.log(r), math.log(i0), u0, u1, 1.0, math.log(iq), math.log(b)])


def _bounds(lv):
    """Bounds of the packed parameters, from what any motor on this sweep must satisfy (each
    with a wide margin, so that they shape no ordinary fit but keep a fit out of the corners
    where the model degenerates: a thrust and torque current of 1e-22 at an absurd speed):
      - the back-EMF is below the bus voltage, s <= V_max, so the top level's thrust needs
        a = T / s^2 >= T_top / V_max^2 (half of it: noise on the top level);
      - it is above 1 % of V_max at the top level, a <= T_top / (0.01 V_max)^2;
      - the torque current c s^2 is at least 1 % of the top level's bus current there (the
        propeller is the motor's main load at the top of any sweep), c >= 0.01 I_top / V_max^2,
        and c <= I_top / (0.01 V_max)^2 / 0.01 (duty down to 1 %);
      - the resistive drop R I cannot exceed the motor voltage: R <= V_max / I_top (twice it),
        and R >= 1e-6 V_max / I_top (a drop of a millionth);
      - I0 and the ESC's own draw below the top bus current (twice it), the speed current b s
        below twice it at the top.
    A bound that tightens as the top thrust or current grows (a, c and I0, I_q, b from below,
    R from above) takes the top that a glitch cannot make: the third largest level
    (_confirmed_top). Levels of one or two rows are screened only after this fit
    (levels.drop_model_spikes), so one load-cell glitch of 9999 g in a level of its own was
    the top: a >= 0.5 T_glitch / V_max^2 held the model above every real level, the fit
    walked to the degenerate corner the bounds exist to prevent, and a spike of 8000..11000 g
    on a 2.5 kg rotor refused the sweep instead of being dropped (new-user trial 7, finding 3).
    A bound loosened by that choice is still far from any real motor: the third level of a
    rising sweep is within a few steps of its top, and the margins are wide.
    Source: the DC motor equivalent model (module docstring) at the top level."""
    v_top = float(np.max(lv["voltage_V"]))
    i_max, t_max = float(np.max(lv["current_A"])), max(float(np.max(lv["thrust_N"])), 1e-300)
    i_top = min(max(_confirmed_top(lv["current_A"]), 1e-12 * i_max), i_max)
    t_top = min(max(_confirmed_top(lv["thrust_N"]), 1e-12 * t_max), t_max)
    va = v_top * v_top
    lo = [math.log(0.5 * t_top / va), math.log(0.01 * i_top / va), math.log(1e-6 * v_top / i_max),
          math.log(1e-6 * i_top), 0.0, 0.5, 0.5, math.log(1e-7 * i_top + 1e-12), math.log(1e-6 * i_top / v_top)]
    hi = [math.log(1e4 * t_max / va), math.log(1e6 * i_max / va), math.log(2.0 * v_top / i_top),
          math.log(2.0 * i_max), 0.5, 1.0, 2.5, math.log(0.5 * i_max + 1e-12), math.log(2.0 * i_max / v_top)]
    return np.array(lo), np.array(hi)


def fit_motor_model(lv, rows, v_ref):
    """The motor model fitted to a sweep's levels, with all the fit says: one call.

    One pass sees whether the sweep levels off below its highest command (the ESC's top end
    point); the final passes fit u1 there, or hold full command at 1: a sweep that stops short
    (a stand's current limit, heat, a small supply) is extrapolated from its top to full
    command by the model (full_thrust_extrapolation says how far and how well; pinning full
    duty at the sweep's top instead bent the motor to a resistance and losses it does not
    have, and cannot be told from the data either: _move_top). A sweep without a voltage spread
    (curve_fit.voltage_spread) gets the duty prior (module docstring). Rows of small levels
    far from the fitted model are dropped as spikes (levels.drop_model_spikes; lv changes) and
    the model fitted again. lv: levels (fit_motor); rows: (command [-], voltage [V], thrust
    [N], power [W]) arrays of the rows; v_ref: reference voltage [V].
    Returns fit_motor's dict plus: top_found (bool), command_swept_max [-] (highest level
    command before the spike screen), voltage_exponent, density_exponent [-] at full command
    and v_ref (motor_exponents) and their standard errors voltage_exponent_se,
    density_exponent_se (exponent_errors), projection (command grid [-] from u0 to u1, thrust
    [N] there at v_ref: what the controller's quadratic is fitted to), thrust_top_N [N] at u1
    and v_ref, block (params_dict of theta), extrapolation (full_thrust_extrapolation's dict
    when the sweep stops curve_fit.SHORT_OF_TOP below u1, else None).
    """
    from estimator.bench.curve_fit import MIN_VOLTAGE_SPREAD, SHORT_OF_TOP, voltage_spread
    from estimator.bench.levels import drop_model_spikes

    u_hi = float(np.max(lv["command"]))
    prior = DUTY_PRIOR if voltage_spread(lv) < MIN_VOLTAGE_SPREAD else None
    motor = fit_motor(lv, top_end=True, passes=1, duty_prior=prior)
    top_found = motor["theta"][5] < u_hi - TOP_END_MARGIN

    def final_motor(start):
        if top_found:
            return fit_motor(lv, top_end=True, start=start, duty_prior=prior)
        return fit_motor(lv, top_end=False, top=1.0, start=start, duty_prior=prior)

    motor = final_motor(motor)
    if drop_model_spikes(lv, lambda c, v, theta=motor["theta"]: rotor_arrays(theta, c, v)[0], *rows):
        motor = final_motor(motor)
    theta = motor["theta"]
    n, m = motor_exponents(theta, v_ref)
    se_n, se_m = exponent_errors(motor, v_ref)
    grid = np.linspace(float(theta[4]), float(theta[5]), 161)
    motor.update({"top_found": bool(top_found), "command_swept_max": u_hi,
                  "voltage_exponent": n, "density_exponent": m, "voltage_exponent_se": se_n,
                  "density_exponent_se": se_m, "projection": (grid, rotor_arrays(theta, grid, v_ref)[0]),
                  "thrust_top_N": float(rotor_arrays(theta, np.array([theta[5]]), v_ref)[0][0]),
                  "block": params_dict(theta)})
    short = not top_found and u_hi < float(theta[5]) - SHORT_OF_TOP
    motor["extrapolation"] = full_thrust_extrapolation(motor, v_ref, u_hi) if short else None
    return motor


def fit_motor(lv, top_end=False, top=1.0, start=None, passes=None, duty_prior=None):
    """Fit the model (module docstring) to levels: dict command [-], voltage_V [V],
    thrust_N [N], current_A [A] (bus), count [-].

    top_end: fit the ESC's top end point u1 (the sweep shows thrust levelling off below its
    highest command); else u1 = top [-]. start: a previous fit's result to start from (and
    its residual scales). passes: least-squares passes, each weighting the residuals by the
    robust scales of the previous one (default 2 from the start values, 1 from a previous fit).
    duty_prior: (mean, standard deviation) of the duty exponent g [-] for a one-supply sweep
    that cannot measure it (module docstring; DUTY_PRIOR): the prior, and the supply's line
    for the bus voltage; else None (g fitted from the data alone, the levels' voltages).
    Returns dict: theta (NAMES order, linear), scale_thrust_N, scale_current_A (robust
    residual scales of the levels after the last pass), rms_thrust_N, success (bool), message.
    """
    u, v, t, i = lv["command"], lv["voltage_V"], lv["thrust_N"], lv["current_A"]
    x0 = _start(lv) if start is None else np.array(start["x"], dtype=float)
    lo, hi = _bounds(lv)
    if not top_end:
        x0 = _move_top(x0, top - 5e-10)
        lo[5], hi[5] = top - 1e-9, top
    x0 = np.clip(x0, lo + 1e-9 * (hi - lo), hi - 1e-9 * (hi - lo))
    if duty_prior is not None:  # one supply: its line, not the voltmeter's noise (module docstring)
        v = supply_line_V(lv)
    s_t = 0.01 * float(np.max(np.abs(t))) if start is None else start["scale_thrust_N"]
    s_i = 0.01 * float(np.max(np.abs(i))) if start is None else start["scale_current_A"]
    res = None
    for _ in range(passes or (2 if start is None else 1)):
        def residuals(p, s_t=s_t, s_i=s_i):
            tm, im, _, _, _ = rotor_arrays(unpack(p), u, v)
            return np.concatenate([(tm - t) / s_t, (im - i) / s_i, _prior_residual(p, duty_prior)])

        def jacobian(p, s_t=s_t, s_i=s_i):
            _, _, jt, ji = rotor_jacobian(p, u, v)
            return np.concatenate([jt / s_t, ji / s_i, _prior_jacobian(duty_prior)])

        res = solvers.least_squares(residuals, x0, jacobian, "motor model", bounds=(lo, hi), loss="soft_l1",
                                    f_scale=LOSS_SCALE, x_scale="jac", max_nfev=400, method="trf",
                                    ftol=1e-7, xtol=1e-7)
        x0 = np.clip(res.x, lo + 1e-12, hi - 1e-12)
        tm, im, _, _, _ = rotor_arrays(unpack(res.x), u, v)
        floor_t, floor_i = 1e-4 * float(np.max(np.abs(t))), 1e-4 * float(np.max(np.abs(i)))
        s_t = max(_scale(tm - t), floor_t)
        s_i = max(_scale(im - i), floor_i)
    theta = np.array(unpack(res.x))
    tm, _, _, _, _ = rotor_arrays(theta, u, v)
    held = [k for k in range(9) if res.active_mask[k] != 0 and k not in (4, DUTY_INDEX if duty_prior else -1)]
    held += [] if top_end else [5]
    return {"theta": theta, "x": res.x, "jac": res.jac, "scale_thrust_N": s_t, "scale_current_A": s_i,
            "rms_thrust_N": float(np.sqrt(np.mean((tm - t) ** 2))), "success": bool(res.success),
            "message": res.message, "active": res.active_mask.copy(), "duty_prior": duty_prior,
            "covariance": _covariance(res.jac[:2 * u.size], res.fun[:2 * u.size], held, duty_prior)}


def _move_top(x, top):
    """Packed parameters x with the ESC's top end point moved to top [-] and the motor rescaled so
    that the sweep's levels look the same: below the top end the duty is only known up to a
    scale k (the ESC passes power, Vm I = d V_bus I, so bus current and thrust cannot tell
    d from k d), and the model is unchanged under d -> k d with s -> k s, a -> a / k^2,
    R -> k^2 R, I0 -> I0 / k, b -> b / k^2, c -> c / k^3 (each term of Vm = s + R I and of
    I = I0 + b s + c s^2 scales alike). Moving u1 alone (the old start) left a model that
    missed every level by the factor k and walked to a degenerate corner."""
    x = np.array(x, dtype=float)
    u0, u1, g = x[4], x[5], x[6]
    if not (top > u0 and u1 > u0):
        x[5] = top
        return x
    ln_k = g * math.log((u1 - u0) / (top - u0))  # the duty at a command is k times the old one
    x[0] -= 2.0 * ln_k
    x[1] -= 3.0 * ln_k
    x[2] += 2.0 * ln_k
    x[3] -= ln_k
    x[8] -= 2.0 * ln_k
    x[5] = top
    return x


def _prior_residual(p, duty_prior):
    """The prior's residual FORM_INFLATION (g - mean) / sd, or none. The data residuals are in
    robust scales, and the covariance counts them FORM_INFLATION^2 times less (their form
    error is correlated between neighbouring levels): so the prior weighs alike in both."""
    from estimator.bench.curve_fit import FORM_INFLATION

    if duty_prior is None:
        return np.zeros(0)
    return np.array([FORM_INFLATION * (p[DUTY_INDEX] - duty_prior[0]) / duty_prior[1]])


def _prior_jacobian(duty_prior):
    """The prior residual's derivative by the packed parameters (one row, or none)."""
    from estimator.bench.curve_fit import FORM_INFLATION

    row = np.zeros((0 if duty_prior is None else 1, 9))
    if duty_prior is not None:
        row[0, DUTY_INDEX] = FORM_INFLATION / duty_prior[1]
    return row


def supply_line_V(lv):
    """The bus voltage of a one-supply sweep as the supply's own line, V = V_s - R_s I_bus
    (a Thevenin source: a bench supply or a pack over the few minutes of a sweep), fitted to
    the levels by least squares weighted by their row counts [V per level]; the levels' own
    voltages when the line leaves more than SUPPLY_LINE_MAX_RMS of them unexplained (a pack
    drifting as it discharges, a supply in current limit: then the voltage changes are real).
    lv: levels with voltage_V [V], current_A [A], count [-]."""
    v, i, n = lv["voltage_V"], lv["current_A"], lv["count"]
    if v.size < 3 or float(np.ptp(i)) <= 0.0:
        return v
    design = np.column_stack([np.ones_like(i), i]) * np.sqrt(n)[:, None]
    coef, *_ = solvers.lstsq(design, v * np.sqrt(n), "supply line")
    line = coef[0] + coef[1] * i
    rms = math.sqrt(float(np.sum(n * (v - line) ** 2)) / float(np.sum(n)))
    return line if rms <= SUPPLY_LINE_MAX_RMS * float(np.median(v)) else v


def _covariance(jac, scaled_residuals, held, duty_prior=None):
    """Covariance of the packed parameters (NAMES order; logarithms of the positive ones, u0,
    u1 and g linear): (J^T J / (s^2 FORM_INFLATION^2) + P)^-1 over the parameters not held
    (held: indices at an active bound or fixed; their rows and columns are 0). J is
    least_squares' Jacobian of the data residuals scaled by their robust scales (modified by
    the soft_l1 loss, so outliers weigh little), s^2 their mean square clipped at 4 scales,
    FORM_INFLATION the curve fit's allowance for the curve form's error being correlated
    between neighbouring levels (estimator.bench.curve_fit), and P the prior's precision,
    1 / sd^2 on the duty exponent (0 without a prior). Gauss-Newton covariance of nonlinear
    least squares (e.g. Seber and Wild, Nonlinear Regression, ch. 2, from memory); a prior adds
    its information to the data's (Tarantola, Inverse Problem Theory, ch. 3, from memory)."""
    from estimator.bench.curve_fit import FORM_INFLATION

    free = [k for k in range(jac.shape[1]) if k not in held]
    r = np.asarray(scaled_residuals, dtype=float)
    s2 = float(np.sum(np.minimum(r * r, 16.0))) / max(r.size - len(free), 1)
    info = np.asarray(jac).T @ np.asarray(jac) / max(s2 * FORM_INFLATION ** 2, 1e-300)
    if duty_prior is not None:
        info[DUTY_INDEX, DUTY_INDEX] += 1.0 / duty_prior[1] ** 2
    cov = np.zeros((jac.shape[1], jac.shape[1]))
    with np.errstate(all="ignore"):
        cov[np.ix_(free, free)] = solvers.pinv(info[np.ix_(free, free)], "motor model's information")
    return cov


def _scale(r):
    from estimator.bench.levels import robust_scale
    return robust_scale(r) if r.size > 3 else float(np.sqrt(np.mean(r * r)))


def params_dict(theta):
    """The parameter-set block of a fitted theta (NAMES keys, linear values)."""
    return {k: float(x) for k, x in zip(NAMES, theta)}
