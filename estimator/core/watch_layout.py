"""The watch's CONFIG layout: indices, bounds and flag bits, in one place (ints and strings only).

CONFIG is one flat tuple of plain ints, each below 2^30 in magnitude: the first table
(volt_q12) knot after knot, then the scalars in SCALARS order from SCALAR_AT ("format"
first), then the other three tables (TABLES order, at TABLE_AT). The scalars sit at 13..49
so that the kernel's literal indices of them are one-byte constants in its bytecode (an index
below 48; a table is read at a computed index, so its place costs nothing). The kernel (estimator/core/watch.py) reads it by these
indices; the desktop builder (estimator/watch/config.py) writes it; ``check`` is the one set
of bounds both sides apply: the desktop before writing a bundle, the board loader
(firmware_port/liftwatch_load.py, which ships this file as ``liftwatch_layout``) before it
makes a Watch. The bounds are those under which every kernel intermediate stays below 2^30
(the comments in estimator/core/watch.py give the products).

Runs unchanged on MicroPython: no imports, no floats.
"""

FORMAT = 8  # CONFIG format of this kernel (7: the power table up to f = 1.5, 49 knots; 6: drift bounded in level, not per block; 5: the scalars after the tables)

# flag bits returned by Watch.update (design notes sec. 4)
POWER_HIGH = 1
POWER_LOW = 2
SENSOR_FAULT = 4
BASELINE_OFF = 8
MASS_HIGH = 16
FLAG_BITS = ((POWER_HIGH, "power_high"), (POWER_LOW, "power_low"), (SENSOR_FAULT, "sensor_fault"),
             (BASELINE_OFF, "baseline_off"), (MASS_HIGH, "mass_high"))

# (name, knots, lowest, highest): tables in CONFIG order
TABLES = (
    ("volt_q12", 13, 0, 6143),              # (V / V_ref)^n in Q12 at 13 voltages v_min + i step
    ("hover_table_permille", 13, 0, 1000),  # hover command at the same voltages
    ("power_table", 33, 0, 262143),         # expected bus power [0.1 W] over f = 0..1 step 1/32 (held beyond)
    ("thrust_table", 33, 0, 8191),          # thrust [2^thrust_unit_shift mN] over measured power
)

# (name, lowest, highest): scalars in CONFIG order. The first group is copied into the
# kernel's state list and used on every sample; the second is read once per block.
SCALARS = (
    ("format", FORMAT, FORMAT),
    ("dt_max_ms", 1, 60000),               # a longer sample gap is a sensor fault
    ("v_min_mV", 0, 60000),
    ("v_max_mV", 1, 60000),
    ("i_min_mA", -300000, 300000),
    ("i_max_mA", 0, 300000),
    ("spin_permille", 0, 1000),             # rotors make thrust above this command
    ("command_min_permille", 0, 1000),
    ("command_span_permille", 100, 1000),
    ("quadratic_q12", 0, 4096),
    ("volt_step_mV", 1, 5001),
    ("power_floor_dW", 1, 262143),          # expected power below this: block not judged
    ("lag_ms", 0, 10000),                   # first-order lag of expected power (rotor + sensor)
    ("block_ms", 100, 1000),                # energy block length
    ("energy_shift", 0, 16),                # block energies >> this stay below 2^19
    ("thrust_shift", 0, 13),
    ("thrust_unit_shift", 0, 7),
    ("stuck_ms", 1, 600000),                # identical current while spinning this long: fault
    ("landed_ms", 1, 60000),                # below spin this long: landed, the next spin-up is a new flight
    # read once per block
    ("takeoff_ms", 0, 600000),              # flight time skipped before learning and mass
    ("learn_ms", 1000, 600000),             # steady flight time the learning window needs
    ("learn_timeout_ms", 1000, 1800000),    # learning ends by this flight time in any case
    ("baseline_tol_permille", 0, 300),      # |scale - 1| above this: baseline_off
    ("noise_floor_permille", 1, 300),       # block residual noise never below this (bench)
    ("noise_shift", 0, 12),                 # in-flight noise estimate: EMA over 2^shift blocks
    ("cusum_k_q8", 0, 2560),                # CUSUM reference value [noise sigma x 256]
    ("cusum_h_q8", 1, 12800),               # CUSUM threshold [noise sigma x 256]
    ("steady_permille", 1, 1000),           # block thrust within this of the hover thrust: steady
    ("drift_shift", 0, 12),                 # slow baseline tracking: EMA over 2^shift blocks
    ("drift_step_q8", 0, 2560),             # that EMA's step per block at most this [1/256 permille]
    ("mass_window_ms", 1000, 120000),       # flight time near hover per implied-mass verdict
    ("mass_windows", 1, 100),               # verdicts in a row above the limit for mass_high
    ("mass_plan_g", 1, 500000),             # planned all-up mass
    ("mass_limit_permille", 0, 1000),       # mass_high above plan by this share ...
    ("mass_z2_q8", 0, 32767),               # ... plus a margin: z^2 x correlation factor x 256
    ("settle_ms", 0, 60000),                # after a block outside steady_permille: half weight this long
    ("cusum_k_max_permille", 1, 1000),      # CUSUM reference value at most this (h grows so that h k stays)
)

TABLE_AT = {}
_at = 0
for _t in TABLES:
    TABLE_AT[_t[0]] = _at
    _at += _t[1]
    if _t[0] == "volt_q12":                 # the scalars follow the first table
        SCALAR_AT = _at                     # 13
        _at += len(SCALARS)
CONFIG_LENGTH = _at
INDEX = {}
for _i in range(len(SCALARS)):
    INDEX[SCALARS[_i][0]] = SCALAR_AT + _i
del _at, _t, _i

# where Watch keeps its outputs: indices in its block state list Watch.data (ints, updated
# once per block); mass_g, sigma_permille and residual_permille are cleared at a landing
OUTPUT_AT = (("mass_g", 32), ("sigma_permille", 33), ("residual_permille", 34), ("thrust_mN", 35),
             ("hover_permille", 36), ("scale", 5))


def check(config):
    """Check a CONFIG against the layout and every bound.

    config: the CONFIG sequence [-] (ints in the units its layout names: mV, mA, ms, 0.1 W).
    Returns None when it is usable, else one sentence saying what is wrong (never raises for
    a sequence; the board loader and the desktop builder both turn it into their own error).
    """
    if len(config) != CONFIG_LENGTH:
        return ("CONFIG has %d values, this kernel needs %d: it was made for another liftwatch "
                "version; run liftcal firmware again" % (len(config), CONFIG_LENGTH))
    for i in range(CONFIG_LENGTH):
        if type(config[i]) is not int:
            return "CONFIG[%d] is not an integer (CONFIG holds integers only)" % i
    if config[SCALAR_AT] != FORMAT:
        return ("CONFIG format %d, this kernel reads format %d: run liftcal firmware again"
                % (config[SCALAR_AT], FORMAT))
    for name, n, lo, hi in TABLES:
        at = TABLE_AT[name]
        for j in range(at, at + n):
            if not lo <= config[j] <= hi:
                return "CONFIG[%d] (%s knot %d) is %d, outside %d..%d" % (j, name, j - at, config[j], lo, hi)
    for i in range(len(SCALARS)):
        name, lo, hi = SCALARS[i]
        v = config[SCALAR_AT + i]
        if not lo <= v <= hi:
            return "CONFIG[%d] %s is %d, outside %d..%d" % (SCALAR_AT + i, name, v, lo, hi)

    def g(name):
        return config[INDEX[name]]

    if g("v_min_mV") >= g("v_max_mV"):
        return "CONFIG v_min_mV must be below v_max_mV"
    if g("v_min_mV") + 12 * g("volt_step_mV") <= g("v_max_mV"):
        return "CONFIG voltage tables (12 steps of volt_step_mV from v_min_mV) must reach v_max_mV"
    if g("i_min_mA") > g("i_max_mA"):
        return "CONFIG i_min_mA must not be above i_max_mA"
    if g("command_min_permille") + g("command_span_permille") > 1000 + 1000:
        return "CONFIG thrust curve command range beyond 0..2000 permille"
    tu = g("thrust_unit_shift")
    at = TABLE_AT["thrust_table"]
    for j in range(at, at + 33):
        if config[j] << tu > 1000000:
            return "CONFIG thrust table knot %d is above 1000 N" % (j - at)
    # block energies: expected power (< 2^18 x 0.1 W) x 2 blocks >> energy_shift below 2^19
    top = 0
    at = TABLE_AT["power_table"]
    for j in range(at, at + 33):
        if config[j] > top:
            top = config[j]
    if (top * 2 * g("block_ms")) >> g("energy_shift") >= 1 << 19:
        return "CONFIG energy_shift too small for the power table (block energies would reach 2^19)"
    if g("learn_timeout_ms") < g("learn_ms"):
        return "CONFIG learn_timeout_ms must not be below learn_ms"
    if g("mass_limit_permille") > 500:
        return "CONFIG mass_limit_permille above 500 (implied-mass deviations are clipped at 50 %)"
    return None
