"""The implied mass on jittery flights: thrust from measured power less the block's command
thrust against the hover's (the vehicle's acceleration), its spread from a 4-block EMA, each
window judging everything since the first, the first window not alone.

Truth here is the simulator's injected payload (closed-loop flights, estimator/demo/flight_sim.py,
seeds the detection matrix does not use), not the kernel's own estimate. Issue 7's goal: a +15 %
payload raises mass_high within 60 s of take-off; a fault-free flight never raises it.

Before this model the octo (24 kg, 12S) logged at 5 Hz with 1 % collective jitter missed the
+15 % payload within 130 s on 3 of these 6 flights (its per-block implied mass spread 12-14 %:
acceleration and aliased jitter), and the detection matrix's worst was 160.8 s. These six pass
now; of 36 such flights (benchmarks/watch_mass_study.py has the study) some still take longer
than a minute: the closing note of issue 7 has the numbers.
"""

import pytest

import watch_study as ws
from estimator.watch.config import as_tuple
from test_watch_kernel import CHECKED, _state_ok, demo_config
from watch_helpers import set_state

N_FLIGHTS = 6
OCTO = "octo 12S"


def _first_mass_high(payload, rate, seed, duration_s=130.0):
    return ws.mass_high_delays(OCTO, payload, [rate], seed, duration_s, N_FLIGHTS)[rate]


# The goal's 60 s is not met on every flight: 5 Hz 43.8-79.8 s (3 of these six missed in 130 s
# before), irregular intervals (5-100 Hz) 44.1-69.6 s (32.0-67.7 s before: the first window is no
# longer judged alone, which costs a window where it would have flagged)
@pytest.mark.parametrize("rate", [5, None])
def test_a_heavy_octo_on_a_slow_jittery_log_is_flagged(rate):
    delays = _first_mass_high(0.15, rate, 777)
    assert max(delays) <= 90.0, delays
    assert sorted(delays)[2] <= 45.0, delays          # half of them within the take-off and two windows


@pytest.mark.parametrize("payload", [0.0, -0.10])
def test_a_fault_free_or_light_octo_on_a_slow_jittery_log_raises_no_mass_high(payload):
    # the other side of the same margin: the planned mass (and a lighter one) over 300 s
    for rate in (5, None):
        assert _first_mass_high(payload, rate, 778, 300.0) == [float("inf")] * N_FLIGHTS, rate


def test_the_implied_mass_stays_below_2_30_at_the_thrust_tables_top():
    # The thrust table's top is 1e6 mN (watch_layout.check). The implied mass once took the modelled
    # axial-flight part out of the thrust first, th (1 - x / 1.5) with x down to -1/2 before its
    # x 1000, so a block at the table's top in a modelled descent of -1/4 reached 1.17e9 > 2^30 (a
    # long int, heap, on the board). Here: that block, from a state set to it (learned, the
    # slope on the command's thrust at its bound, the block's command thrust 3/4 of the hover's).
    cfg = dict(demo_config(), takeoff_ms=0, steady_permille=300)
    tu = cfg["thrust_unit_shift"]
    cfg["thrust_table"] = [1000000 >> tu] * 33
    c = as_tuple(cfg)
    w = CHECKED(c)
    x = -250                                          # the block's command thrust against the hover's
    set_state(w, learning=0, scale=1000, sig=3000, l_ms=10, fsl=3999 << 7, sxx=x * x << 4, srx=8000000,
              sxd=0, sdd=0, srd=0, hold=0)
    b = 500
    e = b * ((32 << cfg["thrust_shift"]) - 1)         # measured energy at the thrust table's top ...
    w._block(c, 0, e, e * 4 // 3, b, cfg["v_min_mV"] + 10, 600000, 3000 * b, 0)   # ... 1/4 below the expected
    _state_ok(w)
    assert w.data[35] >= 1000000 >> tu << tu          # thrust_mN at the table's top
    assert w.data[15] == 1                            # m_n: the block was taken into the implied mass


def _verdict_after_one_block(n_p):
    # a kernel one block short of a window's end, its mean since the first block +20 % (mass_share 8 %),
    # its spread small: the block ends the window and the verdict follows
    from estimator.core.watch import Watch
    cfg = dict(demo_config(), takeoff_ms=0)
    c = as_tuple(cfg)
    w = Watch(c)
    block = cfg["block_ms"]
    n = cfg["mass_window_ms"] // block - 1
    fb = 2000                                         # the block's thrust factor, at the hover's: x = 0
    set_state(w, learning=0, scale=1000, sig=20 * 64, l_dev=20 * 64, l_ms=10, fsl=(fb - 1) << 7, hold=0,
              m_sum=200 * n, m_sq=(200 * 200 + 100) * n, m_n=n, m_ms=block * n, n_p=n_p, ym=200 << 2, xb=0)
    e = 3000 * block                                  # measured energy = expected: r = 0, no suspicion
    flags = w._block(c, 0, e, e, block, cfg["v_min_mV"] + 10, 600000, fb * block, 0)
    assert w.data[15] == n + 1 and w.data[16] == 0    # the block was taken and ended the window
    return flags


def test_a_first_window_alone_is_not_judged():
    # On a fault-free octo logged at 5 Hz with 1 % jitter (the detection matrix's cell, a -5 % step
    # flight before its onset) the first window after take-off read +14.1 % with a small spread: the
    # settling after take-off. Its verdict waits for the second window; a later one is judged.
    assert not _verdict_after_one_block(0) & 16
    assert _verdict_after_one_block(20) & 16
