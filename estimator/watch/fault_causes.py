"""Which check raised a sensor_fault: the desktop replay names the cause the board only flags.

The kernel (estimator.core.watch.Watch.update) sets sensor_fault (flag bit 4) on a sample
when, in this order: the sample gap is not positive or exceeds dt_max_ms; the bus voltage
is outside v_min_mV..v_max_mV; the command is outside 0..1000 permille; the current is
below i_min_mA or above i_max_mA; the current has stayed identical for stuck_ms of flight
while the rotors turn. The kernel stays integer-only and allocation-free, so it keeps no
cause; this module repeats the same comparisons on the replayed values (the same integers)
to say which one it was, with the value and the limit. All limits come from the watch
CONFIG (dict from estimator.watch.config.make_config).
"""


class StuckTimer:
    """The kernel's stuck-current timer, repeated: flight time [ms] the current has stayed
    identical while the command is at or above spin_permille, counted over samples that pass
    the range checks (the kernel counts only those)."""

    def __init__(self, cfg):
        self.spin = cfg["spin_permille"]
        self.last = -1          # the kernel starts from -1 mA
        self.ms = 0

    def step(self, dt_ms, command_permille, bus_mA, in_range):
        if not in_range:
            return
        if bus_mA == self.last and command_permille >= self.spin:
            self.ms += dt_ms
        else:
            self.ms = 0
        self.last = bus_mA


def in_range(dt_ms, command_permille, bus_mV, bus_mA, cfg):
    """True when the sample passes the kernel's range checks (gap, voltage, command, current)."""
    return (0 < dt_ms <= cfg["dt_max_ms"] and cfg["v_min_mV"] <= bus_mV <= cfg["v_max_mV"]
            and 0 <= command_permille <= 1000 and cfg["i_min_mA"] <= bus_mA <= cfg["i_max_mA"])


def fault_cause(dt_ms, command_permille, bus_mV, bus_mA, stuck_ms, cfg):
    """(cause, detail) of a sample the kernel flagged: cause one of gap, time, voltage,
    command, current, stuck_current; detail a short text with the value and the watch's
    limit. dt_ms [ms], command [permille], bus_mV [mV], bus_mA [mA], stuck_ms: the
    StuckTimer's count at this sample [ms]."""
    if dt_ms <= 0:
        return "time", "time did not advance between two rows"
    if dt_ms > cfg["dt_max_ms"]:
        return "gap", ("logging gap of %.1f s (the watch's limit %.1f s): no samples, so nothing judged "
                       "across it" % (dt_ms / 1000.0, cfg["dt_max_ms"] / 1000.0))
    if not cfg["v_min_mV"] <= bus_mV <= cfg["v_max_mV"]:
        return "voltage", ("bus voltage %.2f V outside the watch's range %.2f..%.2f V (half the empty pack "
                           "to 1.2 x the full pack)" % (bus_mV / 1000.0, cfg["v_min_mV"] / 1000.0,
                                                        cfg["v_max_mV"] / 1000.0))
    if not 0 <= command_permille <= 1000:
        return "command", "command %.3f outside 0..1" % (command_permille / 1000.0)
    if not cfg["i_min_mA"] <= bus_mA <= cfg["i_max_mA"]:
        return "current", ("current %.2f A outside the watch's current-sensor range %.1f..%.0f A"
                           % (bus_mA / 1000.0, cfg["i_min_mA"] / 1000.0, cfg["i_max_mA"] / 1000.0))
    return "stuck_current", ("current stuck at %.2f A for %.1f s while the rotors turn (the watch's limit "
                             "%.1f s): a frozen sensor or logger" % (bus_mA / 1000.0, stuck_ms / 1000.0,
                                                                      cfg["stuck_ms"] / 1000.0))
