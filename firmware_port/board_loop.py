"""Example board loop for the liftcal power watch (MicroPython). Adapt the adapter to your board.

Before any flight: props off while wiring and configuring; test on a clamped stand behind a
guard with nobody in the plane of the rotors; charge and store packs by the maker's rules;
local aviation rules and the aircraft maker's limits come first. The watch's numbers are
estimates: confirm them with a tethered or low hover test before trusting an alarm or its silence.

What runs where: a hardware timer fires every SAMPLE_MS and calls ``Monitor.tick``, which
reads three integers through the adapter and calls ``Watch.update`` (integer-only, no heap:
safe in an interrupt). Anything that allocates (printing, logging, radio) is handed to
``micropython.schedule`` and runs outside the interrupt.
"""

import micropython
import time

SAMPLE_MS = 100  # timer period [ms]; the watch takes the real period from ticks_ms, so late ticks are seen


class SensorAdapter:
    """Reads command, bus voltage and bus current as ints; hardware objects are passed in.

    ``command_src()`` returns the collective command in permille (0..1000). It runs inside the
    timer interrupt: it must only return a value already read (an int kept in a list or an
    attribute), never read a UART or parse telemetry itself (that allocates); read the flight
    controller's telemetry in the main loop and store the command there. ``volt_adc`` /
    ``amp_adc`` are ADC-like objects with
    ``read_u16()``. Scale factors convert raw counts to mV / mA with integer maths only:
    mV = raw * mv_num // mv_den + mv_offset (choose num/den so raw * num stays below 2^30).
    """

    def __init__(self, command_src, volt_adc, amp_adc, mv_num, mv_den, ma_num, ma_den,
                 mv_offset=0, ma_offset=0):
        self.command_src = command_src
        self.volt_adc = volt_adc
        self.amp_adc = amp_adc
        self.mv_num = mv_num
        self.mv_den = mv_den
        self.ma_num = ma_num
        self.ma_den = ma_den
        self.mv_offset = mv_offset
        self.ma_offset = ma_offset

    def command_permille(self):
        return self.command_src()

    def bus_mV(self):
        return self.volt_adc.read_u16() * self.mv_num // self.mv_den + self.mv_offset

    def bus_mA(self):
        return self.amp_adc.read_u16() * self.ma_num // self.ma_den + self.ma_offset


def report(flags):
    """Runs outside the interrupt (scheduled): tell the pilot. Replace with your buzzer/LED/radio."""
    if flags & 4:
        print("liftwatch: sensor fault - check the current/voltage sensor wiring")
    if flags & 1:
        print("liftwatch: power HIGH for the command - land and check bearings, windings, props")
    if flags & 2:
        print("liftwatch: power LOW for the command - land and check for a chipped or loose blade")
    if flags & 16:
        print("liftwatch: implied mass above plan - land; heavier payload, or a rotor drawing extra power? check both")
    if flags & 8:
        print("liftwatch: baseline far from the bench fit - another field than the bundle's? rebuild it; else refit, check pack and props")


class Monitor:
    """Timer-driven sampling: tick() is the interrupt handler, it never allocates."""

    def __init__(self, adapter, config=None, clock=time):
        from liftwatch_load import load   # imported here: load() lets the loader go once it ran
        self.adapter = adapter
        self.watch = load(config)   # checks CONFIG first; ConfigProblem says what is wrong
        self.clock = clock          # anything with ticks_ms() and ticks_diff() (time, or a test clock)
        self.last_ms = clock.ticks_ms()
        self.reported = 0
        self.report_ref = report  # bound once, so tick() creates no new objects

    def tick(self, timer):
        """Timer handler: dt is the real time since the last tick (ticks_diff: wrap-safe), so a
        late or missed timer shows up as a long dt (the watch's gap check) instead of being hidden."""
        a = self.adapter
        c = self.clock
        now = c.ticks_ms()
        dt = c.ticks_diff(now, self.last_ms)
        self.last_ms = now
        flags = self.watch.update(dt, a.command_permille(), a.bus_mV(), a.bus_mA())
        new = flags & ~self.reported
        self.reported = flags
        if new:
            try:
                micropython.schedule(self.report_ref, new)
            except RuntimeError:
                pass  # schedule queue full: the flag is still set and reported next time


def start(adapter, timer_id=-1):
    """Start sampling on a hardware timer; returns (monitor, timer). Board-specific wiring."""
    from machine import Timer
    monitor = Monitor(adapter)
    timer = Timer(timer_id)
    timer.init(period=SAMPLE_MS, mode=Timer.PERIODIC, callback=monitor.tick)
    return monitor, timer
