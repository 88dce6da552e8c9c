"""Onboard power watch: integer-only, heap-free kernel (runs unchanged on MicroPython).

``w = Watch(CONFIG)``; ``flags = w.update(dt_ms, command_permille, bus_mV, bus_mA)``.
Flag bits: 1 power_high, 2 power_low, 4 sensor_fault, 8 baseline_off, 16 mass_high.
Readable after each update: ``residual_permille`` r = (P_meas - s P_exp) / (s P_exp) [1/1000],
``power_dW`` measured and ``expected_dW`` expected bus power [0.1 W], ``thrust_mN`` thrust
from the measured power [mN], ``hover_permille`` hover command expected at this voltage
[1/1000], ``mass_g`` all-up mass implied in steady hover [g] (0 until known).

Models (design notes sec. 3):
- expected power: the parameter set's power model P(T) = idle + c_i T^1.5 sqrt(rho_ref/rho)
  + c_cu T^2 per rotor, times the rotor count, at the thrust T(u, V, rho) of the thrust
  curve; CONFIG carries it as a table over f = (V/V_ref)^n t(x), the voltage factor as a
  table over the bus voltage (both in CONFIG ``tables``);
- thrust from measured power: momentum theory T = k(T) (2 rho A P^2)^(1/3) per rotor with
  the calibrated static factor k(T) = k0 + k1 T and the site density, solved in closed form
  and tabulated over the measured power (also in ``tables``); the roots are taken by table;
- detector: two-sided CUSUM on r (Page 1954), reference k and threshold h from Siegmund's
  average-run-length approximation (estimator/watch_config.py), increments down-weighted
  while the command changes fast; a learning window at each flight start learns a power
  scale s and raises baseline_off when |s - 1| exceeds a tolerance; afterwards a slow,
  bounded (+-drift_tol) tracking of the residual's mean follows the hover point as the pack
  drains, frozen whenever a CUSUM sum is above h / 2.

Integer contract: every intermediate stays below 2^30 in magnitude for every input that
passes the range checks (the checks themselves only compare); the bound for each line
is the comment beside it, with CONFIG limits guaranteed by watch_config.check_config.
update() has no data-dependent loops, builds no tuples/lists/floats and never raises for
int inputs. This file is copied verbatim into the board bundle as ``liftwatch.py``.
"""

# Flag bits (plain numbers, no module constants: each global costs board heap):
# 1 power_high, 2 power_low, 4 sensor_fault, 8 baseline_off, 16 mass_high.


class Watch:
    """Power watch state for one vehicle; CONFIG is the list written by liftcal firmware
    (on the desktop: estimator.watch_config.as_tuple(make_config(...)[0]))."""

    def __init__(self, config):
        """config: CONFIG of liftwatch_config, a list (or tuple) of ints in CONFIG_KEYS order.

        Raises ValueError when CONFIG was made for another kernel format (here, not in update).
        """
        if len(config) != 30 or config[0] != 1:
            raise ValueError("CONFIG: not for this kernel")
        self.consts = config   # update() unpacks it into locals (cheaper than attributes)
        self.last_u = 0
        self.last_mA = -1
        self.stuck = 0
        self.residual_permille = 0
        self.power_dW = 0
        self.expected_dW = 0
        self.thrust_mN = 0
        self.hover_permille = 0
        self.calm = 0
        self.quiet = 0
        self.tick = 0
        self.p_acc = 0
        self.reset()

    def reset(self):
        """Start a new flight: forget the learned scale, the CUSUM sums and the mass estimate."""
        self.flags = 0
        self.learning = 1
        self.l_sum = 0
        self.l_n = 0
        self.l_ms = 0
        self.scale = 1000
        self.s_hi = 0
        self.s_lo = 0
        self.m_filt = 0
        self.m_n = 0
        self.mass_g = 0
        self.drift = 0

    def update(self, dt_ms, command_permille, bus_mV, bus_mA):
        """One sample: dt_ms [ms] since the last, command [1/1000], bus voltage [mV], current [mA].

        Returns the flag bits (int). Never raises for int inputs, never allocates.
        """
        u = command_permille
        (fmt, dt_max, v_min, v_max, i_min, i_max, stuck_n, spin, landed, rate_fast, settle, steady, cmd_min,
                cmd_span, quad, v_lo, vstep, tb, pshift, sh, tushift, pfloor, k, h,
                clip, learn, tol, mass_n, mass_lim, drift_tol) = self.consts
        # range checks: comparisons only, so any int is safe here
        if (dt_ms <= 0 or dt_ms > dt_max or u < 0 or u > 1000
                or bus_mV < v_min or bus_mV > v_max
                or bus_mA < i_min or bus_mA > i_max):
            self.flags = (self.flags & 27) | 4
            return self.flags
        # now 0 < dt <= dt_max (<= 60000), 0 <= u <= 1000, |mV| <= 60000, |mA| <= 300000
        st = self.stuck
        if bus_mA == self.last_mA and u >= spin:
            if st < stuck_n:
                st += 1                                   # <= stuck_n (<= 1000)
        else:
            st = 0
        self.stuck = st
        self.last_mA = bus_mA
        if st >= stuck_n:
            self.flags = (self.flags & 27) | 4
            return self.flags

        # flight phase: a new flight starts after landed_ms below the spin command
        if u < spin:
            q = self.quiet + dt_ms                        # <= landed + dt_max <= 120000
            if q >= landed:
                q = landed
                if self.learning == 0 or self.l_n > 0:
                    self.reset()
            self.quiet = q
        else:
            self.quiet = 0

        # trust: 0..16, ramps up over settle_ms after the command last moved fast
        du = u - self.last_u                              # |du| <= 1000
        if du < 0:
            du = -du
        self.last_u = u
        calm = self.calm
        if du * 1000 > rate_fast * dt_ms:            # <= 1e6 ; rate_fast*dt <= 1e4*6e4 = 6e8
            calm = 0
        elif calm < steady:
            calm += dt_ms                                 # <= steady + dt_max <= 1.2e5
        self.calm = calm
        w = 16
        if calm < settle:
            w = calm * 16 // settle                  # <= 16 * 6e4

        # expected power: thrust fraction t(x) in Q12, voltage factor by table, power by table
        x = (u - cmd_min) * 4096 // cmd_span    # |.| <= 1000 * 4096 = 4.1e6
        if x < 0:
            x = 0
        elif x > 4096:
            x = 4096
        a = quad                                     # 0..4096
        t = ((4096 - a) * x + a * (x * x >> 12)) >> 12    # each product <= 2^24 ; t <= 4096
        dv = bus_mV - v_lo                           # |.| <= 1.2e5
        if dv < 0:
            dv = 0
        elif dv >= vstep * 16:
            dv = vstep * 16 - 1
        i = dv // vstep                                   # 0..15
        fr = dv - i * vstep                               # 0..vstep-1
        # tables: one bytes object of 16-bit little-endian unsigned ints (2 bytes per knot):
        # voltage factor at byte 0, hover command at 34, power at 68, thrust at 166
        j = i + i
        a = tb[j] | tb[j + 1] << 8                        # Q12 values <= 8191
        vs = a + ((tb[j + 2] | tb[j + 3] << 8) - a) * fr // vstep  # <= 8191 * 3750 = 3.1e7
        vj = j
        vfr = fr
        f = vs * t >> 12                                  # <= 8191 * 4096 = 3.4e7 ; f <= 8191
        if f > 6143:
            f = 6143                                      # table covers f in 0..1.5 (Q12)
        j = (f >> 6 & 254) + 68                           # 2 x (f >> 7): 0..94, power table
        a = tb[j] | tb[j + 1] << 8                        # units of 2^power_shift dW, < 2^16
        pe = (a + (((tb[j + 2] | tb[j + 3] << 8) - a) * (f & 127) >> 7)) << pshift  # <= 2^16 * 127 ; pe < 2^18
        self.expected_dW = pe

        # measured power [dW] = mV * mA / 1e5, in two steps to stay below 2^30
        pm = (bus_mV // 10) * (bus_mA // 10) // 1000      # |.| <= 6000 * 30000 = 1.8e8
        if pm < 0:
            pm = 0
        self.power_dW = pm                                # <= 180000

        # slow outputs every 4th sample: hover command by table over V, thrust by table over the
        # mean measured power of the last 4 samples
        tick = self.tick + 1
        acc = self.p_acc + pm                             # <= 4 * 180000
        if tick >= 4:
            tick = 0
            pm4 = acc >> 2
            acc = 0
        self.tick = tick
        self.p_acc = acc
        if tick == 0:
            a = tb[vj + 34] | tb[vj + 35] << 8            # permille, 0..1000
            self.hover_permille = a + ((tb[vj + 36] | tb[vj + 37] << 8) - a) * vfr // vstep  # <= 3.75e6
            i = pm4 >> sh
            if i > 63:
                i = 63
                fr = (1 << sh) - 1
            else:
                fr = pm4 - (i << sh)                      # < 2^sh
            j = i + i + 166                               # thrust table
            a = tb[j] | tb[j + 1] << 8                    # units of 2^thrust_unit_shift mN, < 2^16
            self.thrust_mN = (a + (((tb[j + 2] | tb[j + 3] << 8) - a) * fr >> sh)) << tushift  # 2^28 ; <= 1e6

        flags = self.flags & 24                           # keep baseline_off, mass_high
        if pe < pfloor or u < spin:
            self.residual_permille = 0
            self.flags = flags
            return flags
        sp = pe * self.scale // 1000                      # <= 2^18 * 1300 = 3.4e8 ; sp <= 3.4e5, >= 1
        r = (pm - sp) * 1000 // sp                        # |pm - sp| * 1000 <= 3.4e8
        if r > 1000:
            r = 1000
        elif r < -1000:
            r = -1000                                     # |r| <= 1000
        self.residual_permille = r

        if self.learning:
            if w == 16:
                self.l_sum += r                           # <= 1000 * 65535 = 6.6e7
                self.l_n += 1                             # <= 65535
                self.l_ms += dt_ms                        # <= learn_ms + dt_max
            if self.l_n > 0 and (self.l_ms >= learn or self.l_n >= 65535):
                m = self.l_sum // self.l_n                # l_n >= 1 here (l_ms > 0 needs a sample)
                if m > tol:
                    m = tol
                    flags |= 8
                elif m < -tol:
                    m = -tol
                    flags |= 8
                self.scale = 1000 + m                     # 1000 +- tol (tol <= 300)
                self.learning = 0
            self.flags = flags
            return flags

        # slow drift of the baseline (pack drain moves the hover point along the fitted curves):
        # EMA of r over 512 trusted samples, bounded to +-drift_tol, frozen while either CUSUM
        # sum is above h / 2 so that a fault is never absorbed. Kept in 1/256 permille.
        d = self.drift
        s_hi = self.s_hi
        s_lo = self.s_lo
        if w == 16 and s_hi + s_lo < h >> 1:
            d += (r * 256 - d) >> 9                       # |r * 256| <= 256000
            lim = drift_tol * 256                         # <= 100 * 256
            if d > lim:
                d = lim
            elif d < -lim:
                d = -lim
            self.drift = d
        r -= d >> 8
        # two-sided CUSUM on r clipped to +-(h + k - 1), increments weighted by trust w/16
        if r > clip:
            r = clip
        elif r < -clip:
            r = -clip
        s = s_hi + (w * (r - k) >> 4)                     # |w (r - k)| <= 16 * 2000
        if s < 0:
            s = 0
        elif s > h + h:
            s = h + h                                     # <= 2 h <= 2000
        self.s_hi = s
        if s >= h:
            flags |= 1
        s = s_lo + (w * (-r - k) >> 4)
        if s < 0:
            s = 0
        elif s > h + h:
            s = h + h
        self.s_lo = s
        if s >= h:
            flags |= 2

        # implied mass in steady hover: filtered thrust / g (not while power is abnormal),
        # every 4th sample (EMA 1/4 per update: about 1.6 s at 10 Hz)
        if tick == 0 and calm >= steady and flags & 3 == 0:
            th = self.thrust_mN
            m = self.m_filt
            if self.m_n == 0:
                m = th
            else:
                m += (th - m) >> 2                        # |.| <= 1e6
            self.m_filt = m
            if self.m_n < mass_n:
                self.m_n += 1
            else:
                self.mass_g = m * 1000 // 9807            # <= 1e9 ; 9807 = 1000 g_n [m/s^2]
                if self.mass_g > mass_lim:
                    flags |= 16
        self.flags = flags
        return flags
