"""CONFIG format 8: the expected-power table ends at f = 1 (full command at the reference voltage).

The kernel reads f beyond 1 within the table's last step (watch_layout: power_table, 33 knots
over f = 0..1); up to f = 1 the table is the power model's, checked against the float model in
test_watch_kernel.test_expected_power_matches_float_power_model. Source of the bound: the
kernel's own table (estimator/core/watch_layout.py), the model it encodes is the one power model
(estimator.core.power_model).
"""

from estimator.core import watch_layout
from estimator.core.watch import Watch
from estimator.watch.config import as_tuple, make_config
from watch_helpers import demo_fit_params


def test_power_table_ends_at_full_thrust_and_is_read_in_its_last_step_beyond():
    cfg = make_config(demo_fit_params())[0]
    tab = cfg["power_table"]
    assert len(tab) == 33 and watch_layout.CONFIG_LENGTH == 129
    w = Watch(as_tuple(cfg))
    # full command at the top of the voltage range: f = factor x t above 1 (factor > 1 there)
    for _ in range(60):                     # 6 s at 100 ms: the lag has settled
        w.update(100, 1000, cfg["v_max_mV"], 20000)
    expected_dW = w.state[2] >> 2           # the lagged expected power (state slot 2, 0.1 W / 4)
    assert tab[31] - 1 <= expected_dW <= tab[32] + 1, (expected_dW, tab[31], tab[32])


def test_a_format_7_config_is_refused_in_words():
    bad = list(as_tuple(make_config(demo_fit_params())[0]))
    bad[watch_layout.SCALAR_AT] = 7
    msg = watch_layout.check(bad)
    assert msg is not None and "format 7" in msg and "format 8" in msg
