"""Parameter set (+ vehicle) -> the integer CONFIG of the onboard power watch.

Desktop side: floats here, integers out. Every CONFIG value comes with a note of the float
values it was made from (the bundle writes them as comments); the layout, bounds and flag
bits live in estimator/core/watch_layout.py. The kernel's CUSUM runs once per block of flight
time on the block residual in units of its noise (learned in flight, the bench noise
power_model.residual_rel_std as a floor); its reference k and threshold h [noise sigma] come
from a target false-alarm rate per flight hour through Siegmund's approximation of the
average run length:

    ARL(k, h, mu) = (exp(-2 D b) + 2 D b - 1) / (2 D^2),  D = mu - k,  b = h + 1.166
    (ARL = b^2 when D = 0), in units of the noise sigma, for one-sided CUSUM on N(mu, 1);
    two-sided: 1 / ARL2 = 1 / ARL(k, h, mu) + 1 / ARL(k, h, -mu).

Source: D. Siegmund, *Sequential Analysis* (Springer 1985), sec. X.2 (from memory); the
CUSUM itself is E. S. Page, Biometrika 41 (1954). For k = 0.5, h = 4 it gives 336 one-sided
and 168 two-sided, the published table values (design notes sec. 3a).
"""

import math

from estimator.core import watch_layout as layout
from estimator.core.constants import STANDARD_GRAVITY_M_S2
from estimator.core.power_model import rotor_power_W
from estimator.errors import InputError
from estimator.watch.cusum_arl import SIEGMUND_OFFSET, log_arl_two_sided, log_siegmund_arl  # noqa: F401 (re-exported)
from estimator.watch.cusum_arl import siegmund_arl, siegmund_arl_two_sided, threshold_for_arl  # noqa: F401
from estimator.watch.named_watch import NamedWatch
from estimator.watch.sensor_range import current_range_mA, pack_voltages, voltage_range_mV
from estimator.watch.site_air import expected_thrust
from estimator.watch.thrust_table import avionics_power_W, coaxial_note, flight_power_model
from estimator.watch.thrust_table import thrust_from_power_total_N, thrust_knots_mN


DEFAULTS = {
    "false_alarms_per_hour": 1e-6,  # target false power alarms per flight hour for independent blocks
                                    # [1/h]; real block residuals have heavier tails than the Gaussian
                                    # (gusts, manoeuvres): 1e-4 gave 0.1 false alarms per hour in the
                                    # reduced matrix, 1e-6 about 0.01 for +0.1 s of median delay
    "noise_rel_std": None,          # override of power_model.residual_rel_std [-]
    "noise_floor_share": 0.5,       # block-noise floor = this x bench residual_rel_std [-] (a block
                                    # averages several readings; the model-form error stays)
    "noise_floor_min": 0.015,       # and never below this [-]: unmodelled power of slow vertical moves and
                                    # gusts stays near 1 % however clean the bench (0.4 % let a tiny quad's
                                    # 3-4 % residual after a descent alarm at 0.7 % learned noise; with the
                                    # joint slope fit the noise of clean 25-100 Hz logs reaches the floor:
                                    # at 1 % the detection matrix had 48 false alarms, at 1.5 % none)
    "cusum_k_sigma": 1.5,           # CUSUM reference value [noise sigma]
    "cusum_k_max": 0.05,            # ... but at most this [-]: half the smallest power step the watch must
                                    # catch within seconds (10 %), so that a noisy log (a slow logger on an
                                    # unfiltered current sensor) still catches it, later (h grows, h k fixed)
    "lag_ms": None,                 # expected-power lag: rotor spin-up + current-sensor response [ms]
                                    # (default: ROTOR_LAG_S_PER_M x diameter + SENSOR_LAG_MS)
    "block_s": 0.5,                 # energy block length [s]: an alarm takes two blocks, so shorter blocks
                                    # catch a step sooner (1 s -> 0.5 s: median delay of a +10 % step in
                                    # the detection matrix 3.2 -> 2.2 s, no more false alarms)
    "takeoff_s": 20.0,              # flight time after spin-up not judged (take-off, climb-out) [s]
    "learn_s": 20.0,                # steady flight time the learning window needs [s]
    "learn_timeout_s": 60.0,        # the learning window ends by this flight time anyway [s]
    "baseline_tol": 0.10,           # learned scale further than this from 1 -> baseline_off [-]
    "noise_s": 60.0,                # in-flight noise estimate: EMA time constant [s]
    "steady_share": 0.10,           # block thrust within this share of the hover thrust: steady [-]
    "settle_s": 4.0,                # after a block beyond steady_share (a manoeuvre) judged at half weight this long [s]
    "drift_s": 60.0,                # slow baseline tracking: EMA time constant [s]
    "drift_rate_per_min": 0.006,    # ... free within 2 standard errors of the learned baseline, beyond them
                                    # moving at most this share a minute [1/min]: the in-flight baseline
                                    # walks up to 2-4 % in a 10-min flight (pack, air) and a fault ramp of
                                    # 0 -> 15 % in 5 min is 5x faster (bounded in level at 1.5 % instead, the
                                    # baseline walked past it: one false power_low in 625 h of the detection matrix)
    "mass_share": 0.08,             # implied mass above planned by this share (+ margin) -> mass_high [-]
                                    # (measured, the site's air from the motor model: at 7 % the detection
                                    # matrix meets its +15 % payload goal, but a fault-free 100 Hz hexa
                                    # flight of the second world, seed 11, read mass_high at 43.5 s; at 8 %
                                    # seeds 3-12 and the matrix have none)
    "mass_window_s": 12.0,          # flight time near hover per implied-mass verdict (on all since the first) [s]
    "mass_windows": 1,              # verdicts in a row above limit + margin -> mass_high
    "mass_z": 2.0,                  # margin in standard errors of the mean since the first window [-]
    "mass_corr_s": 3.5,             # flight time per independent stretch of the implied mass [s], counted on
                                    # its 4-block EMA, where independent blocks' variance is 1/7: 3.5 s = 7
                                    # blocks counts them exactly (5 Hz logs), a slower wander less. Detection
                                    # matrix (625 h) and second world (seeds 3, 4): no false mass_high. At 7 s
                                    # (measured before the first window was left unjudged) 13 instead of 7 of
                                    # 36 held-out +15 % octo flights at 5 Hz took over 60 s
                                    # (benchmarks/watch_mass_study.py has the study)
    "landed_s": 3.0,                # command below spin this long = landed, next spin-up a new flight [s]
    "dt_max_s": 2.0,                # a sample gap above this is a sensor fault [s]
    "stuck_s": 3.0,                 # current identical this long while spinning -> sensor_fault [s]
    "spin_command": None,           # command above which the rotors make thrust [-] (default u_min + 0.05)
    "current_min_A": None,          # below this the current sensor is faulty [A] (default: watch/sensor_range.py)
    "current_max_A": None,          # above this [A] (default 1.5 x the motors' limit or full-command current; <= 300 A)
    "full_command_current_A": None, # full command on a full pack [A] (default: the power model without sag)
}

# CONFIG is one flat tuple of plain ints (layout in estimator/core/watch_layout.py): each table
# knot after knot at TABLE_AT, the scalars in CONFIG_KEYS order from SCALAR_AT.
CONFIG_FORMAT = layout.FORMAT
CONFIG_KEYS = tuple(name for name, _, _ in layout.SCALARS)
TABLES = tuple((name, n) for name, n, _, _ in layout.TABLES)
TABLE_AT = layout.TABLE_AT
SCALAR_AT = layout.SCALAR_AT
CONFIG_LENGTH = layout.CONFIG_LENGTH

# default lag: a rotor's speed time constant grows with its size, from a few tens of ms on
# 3-5 in propellers to about 0.15 s on 20+ in (common practice, from memory), plus a typical
# current-sensor filter; liftcal firmware/replay --lag-ms sets the real chain
ROTOR_LAG_S_PER_M = 0.25    # [s/m] of propeller diameter
SENSOR_LAG_MS = 20.0        # [ms]

def table(values, name, top):
    """A CONFIG table: tuple of ints in 0..top (InputError otherwise)."""
    out = tuple(int(v) for v in values)
    for v in out:
        if not 0 <= v <= top:
            raise InputError("watch CONFIG: %s value %d outside 0..%d" % (name, v, top))
    return out


def vehicle_facts(params, vehicle=None, source="parameter set"):
    """Mass, rotor count, site density and pack voltages for the watch.

    From ``vehicle`` (a checked vehicle file dict) when given, else the parameter set's
    ``vehicle`` block. Raises InputError when neither is there.
    """
    if vehicle is not None:
        from estimator.params import vehicle_block
        block = vehicle_block(vehicle)
        max_a = vehicle.get("motor", {}).get("max_current_A")
        block["max_current_A"] = None if max_a is None else max_a * block["rotor_count"]
        return block
    block = params.get("vehicle")
    if not block:
        raise InputError("%s: $.vehicle: missing; the watch needs the vehicle's mass, rotor count and "
                         "site (give --vehicle VEHICLE.json, or fit with --vehicle)" % source)
    block = dict(block)
    block.setdefault("max_current_A", None)
    return block


def make_config(params, vehicle=None, options=None, source="parameter set"):
    """Build (CONFIG, notes): CONFIG is a dict of ints / tuples of ints for liftwatch.Watch,
    notes maps each key to the float values it was made from (for the bundle's comments).

    params: parameter-set dict (DEVELOPERS.md layout); vehicle: vehicle-file dict or None;
    options: overrides of DEFAULTS; source: the parameter set's name in messages (its file).
    Raises InputError when the set cannot be represented
    within the sensor range (0-60 V, 0-300 A) or misses the vehicle.
    """
    o = dict(DEFAULTS)
    o.update(options or {})
    v = vehicle_facts(params, vehicle, source)
    curve = params["thrust_curve"]
    n_rot = int(v["rotor_count"])
    rho = float(v["site_density_kg_m3"])
    layout = v.get("layout", "flat")
    pm = flight_power_model(params, layout, rho)   # a coaxial pair's penalty as the pre-flight sheet's
    mass_kg = float(v["mass_kg"])
    p_av = avionics_power_W(v)   # the bus power that reaches no rotor: in the expected power, out of the implied thrust
    av_note = " + avionics %.3g A = %.1f W" % (v["avionics_current_A"], p_av) if p_av > 0.0 else ""
    notes = {}
    cfg = {}

    def put(key, value, note):
        cfg[key] = value
        notes[key] = note

    put("format", CONFIG_FORMAT, "CONFIG format of this kernel")

    sigma = o["noise_rel_std"] if o["noise_rel_std"] is not None else pm["residual_rel_std"]
    if not 0.0 <= sigma < 0.5:
        raise InputError("%s: $.power_model.residual_rel_std: %g is not a usable noise "
                         "level for the watch (expected 0 <= sigma < 0.5)" % (source, sigma))
    block_ms = int(round(1000.0 * o["block_s"]))
    if not 100 <= block_ms <= 1000:
        raise InputError("watch option block: %g s is outside 0.1..1 s" % o["block_s"])
    blocks_per_hour = 3600000.0 / block_ms
    arl_target = blocks_per_hour / o["false_alarms_per_hour"]
    k_sigma = float(o["cusum_k_sigma"])
    h_sigma = threshold_for_arl(k_sigma, arl_target)
    floor = max(o["noise_floor_min"], o["noise_floor_share"] * sigma)
    put("noise_floor_permille", min(300, max(1, int(round(1000.0 * floor)))),
        "block noise floor %.4f = max(%.4f, %.2f x bench residual_rel_std %.4f)"
        % (floor, o["noise_floor_min"], o["noise_floor_share"], sigma))
    put("cusum_k_q8", int(round(256.0 * k_sigma)), "k = %.3f sigma (block residual noise)" % k_sigma)
    put("cusum_h_q8", max(1, int(round(256.0 * h_sigma))),
        "h = %.3f sigma: two-sided in-control ARL %.3g blocks of %d ms = %g false alarms per flight hour "
        "(Siegmund 1985)" % (h_sigma, arl_target, block_ms, o["false_alarms_per_hour"]))
    k_max = float(o["cusum_k_max"])
    put("cusum_k_max_permille", min(1000, max(1, int(round(1000.0 * k_max)))),
        "k at most %.3f (half the smallest step to catch soon); above it h = h_sigma sigma x k_sigma sigma / "
        "k_max (Siegmund: ln ARL ~ 2 k h for a large ARL)" % k_max)
    put("block_ms", block_ms, "energy block %d ms of flight time" % block_ms)
    lag_ms = o["lag_ms"]
    if lag_ms is None:
        lag_ms = 1000.0 * ROTOR_LAG_S_PER_M * params["rotor"]["diameter_m"] + SENSOR_LAG_MS
    put("lag_ms", int(round(lag_ms)), "expected power through a first-order lag of %.0f ms "
        "(rotor spin-up + current sensor%s)" % (lag_ms, "" if o["lag_ms"] is not None else
                                                ": default from the propeller diameter"))

    v_full, v_empty = pack_voltages(v, curve)
    v_min_mV, v_max_mV, (n_lo, n_hi) = voltage_range_mV(v_full, v_empty)
    put("v_min_mV", v_min_mV, n_lo)
    put("v_max_mV", v_max_mV, n_hi)
    # the voltage tables span the whole accepted range v_min..v_max (no clamping in the kernel)
    v_step = (v_max_mV - v_min_mV) // 12 + 1
    put("volt_step_mV", v_step, "voltage tables: 12 steps of %.3f V from v_min_mV; the last knot, %.3f V, lies just above "
        "v_max_mV so that every voltage the watch accepts is inside the table" % (v_step / 1000.0, (v_min_mV + 12 * v_step) / 1000.0))

    # expected thrust from the fitted motor model in the site's air, where the watch judges: the
    # thrust factor of each table voltage at the hover command, the full-command thrust that puts
    # the controller curve through the hover point, the hover command at each voltage (the
    # curve's exponents are full-command values: at a hover on a loaded motor in thin air they
    # were 5-10 % off; site_hover)
    weight_N = mass_kg * STANDARD_GRAVITY_M_S2
    v_ref = curve["reference_voltage_V"]
    volts = [(v_min_mV + i * v_step) / 1000.0 for i in range(13)]
    factors, t_site, hov, how = expected_thrust(params, v, rho, weight_N / n_rot, volts)
    # full command on a full pack: the pre-flight sheet's pack current (commands.watch.watch_options, with a
    # vehicle file), else the power model's bus current at the full pack voltage (no sag: an upper figure)
    f_full = min((v_full / v_ref) ** curve["voltage_exponent"], 1.5)
    i_full = o["full_command_current_A"] or n_rot * rotor_power_W(pm, t_site * f_full, rho) / v_full + v.get("avionics_current_A", 0.0)
    i_min_mA, i_max_mA, (n_lo, n_hi), warning = current_range_mA(
        i_full, v.get("max_current_A"), o["current_max_A"], o["current_min_A"], o["full_command_current_A"] is None)
    put("i_min_mA", i_min_mA, n_lo)
    put("i_max_mA", i_max_mA, n_hi)
    if warning:
        notes["range_warning"] = warning
    # capped at 1.5 (6143): with t(x) <= 1 the power table's argument f = factor x t stays in its range
    vq = [min(6143, int(round(4096.0 * x))) for x in factors]
    capped = [v for v, x in zip(volts, factors) if 4096.0 * x >= 6143.0]
    put("volt_q12", table(vq, "volt_q12", 6143), "%s x 4096 at the table voltages %.3f..%.3f V%s" % (
        how, volts[0], volts[-1], "; from %.3f V on capped at 6143 (1.5, where the power table ends): the factor "
        "there is beyond it and reads as 1.5" % capped[0] if capped else ""))
    put("hover_table_permille", table(hov, "hover table", 1000), "hover command for %.3f kg on %d rotors at rho %.4f kg/m^3"
        % (mass_kg, n_rot, rho))

    u_min, u_max = curve["command_min"], curve.get("command_max", 1.0)
    put("command_min_permille", int(round(1000.0 * u_min)), "u_min = %.4f" % u_min)
    span = int(round(1000.0 * (u_max - u_min)))
    if span < 100:
        raise InputError("%s: $.thrust_curve: command range %.3f..%.3f is below 0.1 wide; the watch "
                         "needs a thrust curve over a wider command range" % (source, u_min, u_max))
    put("command_span_permille", span, "u_max - u_min = %.4f" % (u_max - u_min))
    put("quadratic_q12", int(round(4096.0 * min(max(curve["quadratic_share"], 0.0), 1.0))),
        "a = %.4f" % curve["quadratic_share"])
    spin = o["spin_command"] if o["spin_command"] is not None else u_min + 0.05
    put("spin_permille", int(round(1000.0 * spin)), "rotors spinning above command %.3f" % spin)

    p_tab = []
    for j in range(33):
        f = j * 128 / 4096.0
        p_tab.append(int(round(10.0 * (n_rot * rotor_power_W(pm, t_site * f, rho) + p_av))))
    f_top = min((1.05 * v_full / v_ref) ** curve["voltage_exponent"], 1.5)  # full command at 1.05 x full pack voltage
    # knots beyond 26 kW are capped: the sensor range (60 V x 300 A = 18 kW) ends before them,
    # so such power is out of range (a sensor fault) and never judged against the table
    p_tab = [min(p, (1 << 18) - 1) for p in p_tab]
    put("power_table", table(p_tab, "power table", (1 << 18) - 1), "N x P(T) [0.1 W] at T = %.3f N x f, "
        "f = 0..1 step 1/32, read in its last step beyond (power model at rho %.4f%s; capped at 26 kW)%s"
        % (t_site, rho, coaxial_note(params, layout, rho, weight_N / n_rot, n_rot), av_note))
    p_hover = n_rot * rotor_power_W(pm, weight_N / n_rot, rho)
    put("power_floor_dW", max(2, int(round(10.0 * (0.2 * p_hover + p_av)))), "20 %% of hover power %.1f W%s" % (p_hover, av_note))

    p_top_dW = min(1.1 * 10.0 * (n_rot * rotor_power_W(pm, t_site * f_top, rho) + p_av),
                   (cfg["v_max_mV"] // 20) * cfg["i_max_mA"] // 5000)   # no more than the sensors can read
    sh = 0
    while (32 << sh) < p_top_dW:
        sh += 1
    t_tab = thrust_knots_mN(lambda p_W: thrust_from_power_total_N(p_W, params, n_rot, rho, layout, p_av, pm),
                           (1 << sh) / 10.0)
    tu = 0
    while max(t_tab) >> tu >= 1 << 13:   # knots below 2^13: short in the bundle, 2^13 x 2^13 in the kernel
        tu += 1
    put("thrust_shift", sh, "thrust table step 2^%d x 0.1 W, up to %.0f W" % (sh, 32 * (1 << sh) / 10.0))
    put("thrust_unit_shift", tu, "thrust table unit 2^%d mN" % tu)
    put("thrust_table", table([x >> tu for x in t_tab], "thrust table", (1 << 13) - 1),
        "N x T((P - P_av)/N), the power model inverted, [2^%d mN] at P = 0.1 W x 2^%d x 0..32, rho %.4f kg/m^3%s; "
        "in mN: %s" % (tu, sh, rho, av_note.replace(" + avionics", ", P_av: avionics"), " ".join(str(x) for x in t_tab)))

    put("takeoff_ms", int(round(1000.0 * o["takeoff_s"])), "first %.1f s of each flight not judged" % o["takeoff_s"])
    put("learn_ms", int(round(1000.0 * o["learn_s"])), "learning window: %.1f s of steady flight" % o["learn_s"])
    put("learn_timeout_ms", int(round(1000.0 * max(o["learn_timeout_s"], o["learn_s"]))),
        "learning ends by %.0f s of flight in any case" % max(o["learn_timeout_s"], o["learn_s"]))
    put("baseline_tol_permille", int(round(1000.0 * o["baseline_tol"])),
        "|scale - 1| above %.3f -> baseline_off" % o["baseline_tol"])
    put("noise_shift", _shift(o["noise_s"] * 1000.0 / block_ms), "noise EMA over about %.0f s" % o["noise_s"])
    put("steady_permille", int(round(1000.0 * o["steady_share"])),
        "blocks whose thrust is within %.2f of the hover thrust are steady" % o["steady_share"])
    put("settle_ms", int(round(1000.0 * o["settle_s"])), "after a manoeuvre (a block beyond steady_permille) "
        "%.1f s judged at half weight (no noise, drift or mass learning): climbs and descents change the power "
        "at a given thrust" % o["settle_s"])
    put("drift_shift", _shift(o["drift_s"] * 1000.0 / block_ms), "baseline tracking EMA over about %.0f s" % o["drift_s"])
    put("drift_step_q8", int(round(256000.0 * o["drift_rate_per_min"] * block_ms / 60000.0)),
        "baseline tracking beyond 2 standard errors of the learned baseline moves at most %.4f a minute" % o["drift_rate_per_min"])
    put("mass_window_ms", int(round(1000.0 * o["mass_window_s"])), "implied mass judged every %.0f s of flight near hover"
        % o["mass_window_s"])
    put("mass_windows", int(o["mass_windows"]), "verdicts (one a window) in a row above the limit for mass_high")
    put("mass_plan_g", int(round(1000.0 * mass_kg)), "planned all-up mass %.3f kg" % mass_kg)
    put("mass_limit_permille", int(round(1000.0 * o["mass_share"])), "mass_high above plan + %.0f %% ..." % (100.0 * o["mass_share"]))
    corr_blocks = max(1.0, o["mass_corr_s"] * 1000.0 / block_ms)
    put("mass_z2_q8", min(32767, int(round(256.0 * o["mass_z"] ** 2 * corr_blocks))),
        "... + %.1f standard errors of the mean since the first window (its EMA correlated over %.1f s = %.0f blocks)"
        % (o["mass_z"], o["mass_corr_s"], corr_blocks))
    put("landed_ms", max(1, int(round(1000.0 * o["landed_s"]))), "landed after %.1f s below spin" % o["landed_s"])
    put("dt_max_ms", int(round(1000.0 * o["dt_max_s"])), "sample gap limit %.1f s" % o["dt_max_s"])
    put("stuck_ms", max(1, int(round(1000.0 * o["stuck_s"]))), "current identical for %.1f s while spinning -> "
        "sensor_fault" % o["stuck_s"])
    p_top = max(cfg["power_table"])
    esh = 0
    while (p_top * 2 * block_ms) >> esh >= 1 << 19:
        esh += 1
    put("energy_shift", esh, "block energies [0.1 W ms] >> %d stay below 2^19" % esh)
    check_config(cfg)
    return cfg, notes


def as_tuple(cfg):
    """The CONFIG dict as the flat tuple of ints Watch takes (tables at TABLE_AT, scalars from SCALAR_AT)."""
    out = [0] * CONFIG_LENGTH
    for name, n in TABLES:
        out[TABLE_AT[name]:TABLE_AT[name] + n] = cfg[name]
    out[SCALAR_AT:SCALAR_AT + len(CONFIG_KEYS)] = [cfg[k] for k in CONFIG_KEYS]
    return tuple(out)


def new_watch(cfg):
    """A NamedWatch (the kernel's Watch with its outputs by name) made from a CONFIG dict."""
    return NamedWatch(as_tuple(cfg))


def _shift(blocks):
    """log2 of an EMA length in blocks, rounded, within 0..12."""
    return int(min(12, max(0, round(math.log2(max(blocks, 1.0))))))


def check_config(cfg):
    """Refuse a CONFIG whose values would let a kernel intermediate reach 2^30 (InputError).

    The bounds are watch_layout.check's, the same the board loader applies.
    """
    if set(cfg) != set(CONFIG_KEYS) | set(name for name, _ in TABLES):
        raise InputError("watch CONFIG: keys differ from CONFIG_KEYS and TABLES")
    for name, n in TABLES:
        if not isinstance(cfg[name], tuple) or len(cfg[name]) != n:
            raise InputError("watch CONFIG: %s must be a tuple of %d ints" % (name, n))
    problem = layout.check(as_tuple(cfg))
    if problem:
        raise InputError("watch " + problem)
