"""Onboard power watch: integer-only, heap-free kernel (runs unchanged on MicroPython).

``w = Watch(CONFIG)``; ``flags = w.update(dt_ms, command_permille, bus_mV, bus_mA)``.
Flag bits: 1 power_high, 2 power_low, 4 sensor_fault, 8 baseline_off, 16 mass_high.
Readable after each update: ``residual_permille`` r = (P_meas - s P_exp) / (s P_exp) [1/1000],
``power_dW`` measured and ``expected_dW`` expected bus power [0.1 W], ``thrust_mN`` thrust
from the measured power [mN], ``hover_permille`` hover command expected at this voltage
[1/1000], ``mass_g`` all-up mass implied in steady hover [g] (0 until known) and ``scale``
the learned power scale s [1/1000] (1000 while the learning window runs).

Models (design notes sec. 3):
- expected power: the parameter set's power model P(T) = idle + c_i T^1.5 sqrt(rho_ref/rho)
  + c_cu T^2 per rotor, times the rotor count, at the thrust T(u, V, rho) of the thrust
  curve; CONFIG carries it as a table over f = (V/V_ref)^n t(x), the voltage factor as a
  table over the bus voltage;
- thrust from measured power: momentum theory T = k(T) (2 rho A P^2)^(1/3) per rotor with
  the calibrated static factor k(T) = k0 + k1 T and the site density, solved in closed form
  and tabulated over the measured power; the roots are taken by table;
- detector: two-sided CUSUM on r (Page 1954), reference k and threshold h from Siegmund's
  average-run-length approximation (estimator/watch_config.py), increments down-weighted
  while the command changes fast; a learning window at each flight start learns a power
  scale s and raises baseline_off when |s - 1| exceeds a tolerance; afterwards a slow,
  bounded (+-drift_tol) tracking of the residual's mean follows the hover point as the pack
  drains, frozen whenever a CUSUM sum is above h / 2.

CONFIG (estimator/watch_config.py) is a flat tuple of ints: first the tables, voltage factor
(Q12) at [0..12] and hover command (permille) at [13..25], both over the 13 voltages
v_min + i volt_step (they span the whole accepted voltage range); expected power [0.1 W] at
[26..74] over f = 0..1.5 in steps of 1/32 (Q12 128); thrust [2^thrust_unit_shift mN] at
[75..107] over the measured power 0..32 x 2^thrust_shift [0.1 W]; then 27 scalars at
[108..134] (CONFIG_KEYS order: [108] the format number 2, [109..127] those used on every
sample, [128..134] the rare ones). The voltage table comes first
so that its index needs no offset.

Speed (MicroPython): all state and constants live in one list ``st`` that update() unpacks
into locals in one step (a local costs almost nothing, an attribute is a map lookup); state
goes back with one indexed store per changed value; the public outputs are plain attributes.
A comparison costs about two arithmetic operations, so the common path avoids them: clamps
that cannot bind are not written (the voltage tables span the accepted range, the residual's
clamps are skipped when it is well inside them), trust is a count-down tested for zero.

Integer contract: every intermediate stays below 2^30 in magnitude for every input that
passes the range checks (the checks themselves only compare); the bound for each line
is the comment beside it, with CONFIG limits guaranteed by watch_config.check_config.
update() has no data-dependent loops, builds no tuples/lists/floats and never raises for
int inputs. This file is copied verbatim into the board bundle as ``liftwatch.py``.
"""

# Flag bits (plain numbers, no module constants: each global costs board heap):
# 1 power_high, 2 power_low, 4 sensor_fault, 8 baseline_off, 16 mass_high.


class Watch:
    """Power watch state for one vehicle; CONFIG is the tuple written by liftcal firmware
    (on the desktop: estimator.watch_config.as_tuple(make_config(...)[0]))."""

    def __init__(self, config):
        """config: CONFIG of liftwatch_config, a tuple (or list) of ints (see the module notes).

        Raises ValueError when CONFIG was made for another kernel format (here, not in update).
        """
        if len(config) != 135 or config[108] != 2:
            raise ValueError("CONFIG")
        c = config
        # CONFIG[108 + i]: [109..127] the scalars used on every sample, [128..134] the rare ones
        # (stuck_samples, landed_ms, learn_ms, baseline_tol, mass_samples, mass_limit_g, drift_tol)
        h = c[124]
        rb = c[125] - c[134]              # residual needs no clamp when |r| < rb (rb <= 1000)
        if rb > 1000:
            rb = 1000
        i_pos = c[112]                    # currents below this: negative (power 0) or a fault
        if i_pos < 0:
            i_pos = 0
        sh = c[126]
        span = c[119]
        # thrust fraction t = 4096 ((1 - a) d/S + a (d/S)^2) = d (ta + (tq d >> 10)) >> 14 with
        # d = u - u_min, S = command span (>= 100, check_config): ta <= 6.7e5, tq <= 6.9e6
        ta = ((4096 - c[120]) << 14) // span
        tq = (((c[120] << 12) // span) << 12) // span   # in two steps: every value below 2^30
        # st: [0] CONFIG itself (tables and rare scalars are read there), [1..17] the state,
        # [18..36] CONFIG[109..127], [37..49] values derived from them: update() unpacks them
        st = [c, 0, 0, 0, 0, c[117], 0, 0, -1, 0, 0, 1, 0, 0, 0, 1000, 0, 0,
              0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0,
              ta, tq, c[118] + span, i_pos, h + h, h >> 1, rb, -rb, -c[125],
              c[134] * 256, -256 * c[134], (32 << sh) - 1, (1 << sh) - 1]
        for i in range(19):
            st[18 + i] = c[109 + i]
        self.st = st
        self.residual_permille = 0
        self.power_dW = 0
        self.expected_dW = 0
        self.thrust_mN = 0
        self.hover_permille = 0
        self.mass_g = 0
        self.scale = 1000

    def update(self, dt_ms, command_permille, bus_mV, bus_mA):
        """One sample: dt_ms [ms] since the last, command [1/1000], bus voltage [mV], current [mA].

        Returns the flag bits (int). Never raises for int inputs, never allocates.
        """
        u = command_permille
        st = self.st
        (tb, flags, s_hi, s_lo, drift, rest, acc, last_u, last_mA, stuck, quiet, learning, l_sum, l_n, l_ms,
         scale, m_filt, m_n,
         dt_max, v_min, v_max, i_min, i_max, spin, rate_fast, settle, steady, cmd_min, cmd_span, quad, vstep,
         pfloor, k, h, clip, sh, tu,
         ta, tq, u_top, i_pos, hh, half_h, rb, nrb, nclip, dlim, ndlim, pm_top, sh_mask) = st
        # range checks: comparisons only, so any int is safe here. The command's and the
        # current's checks share their comparisons with the thrust curve's clamps and the
        # power's sign (u_top = cmd_min + cmd_span; i_pos = max(i_min, 0)).
        if dt_ms <= 0 or dt_ms > dt_max or bus_mV < v_min or bus_mV > v_max:
            flags = (flags & 27) | 4
            st[1] = flags
            return flags
        if u < cmd_min:
            if u < 0:
                flags = (flags & 27) | 4
                st[1] = flags
                return flags
            t = 0
        elif u > u_top:
            if u > 1000:
                flags = (flags & 27) | 4
                st[1] = flags
                return flags
            t = 4096
        else:
            # thrust fraction t(x) = (1 - a) x + a x^2 in Q12 at x = d / span, d = u - cmd_min
            d = u - cmd_min                               # 0..span
            t = d * (ta + (tq * d >> 10)) >> 14           # tq*d <= 4096 2^24 / span <= 6.9e8 ; d*(..) <= 2^26
        ma = bus_mA
        if bus_mA < i_pos:
            if bus_mA < i_min:
                flags = (flags & 27) | 4
                st[1] = flags
                return flags
            ma = 0                                        # negative current: measured power 0
        elif bus_mA > i_max:
            flags = (flags & 27) | 4
            st[1] = flags
            return flags
        # now 0 < dt <= dt_max (<= 60000), 0 <= u <= 1000, 0 <= v_min <= mV <= v_max <= 60000,
        # 0 <= ma <= 300000
        if bus_mA == last_mA and u >= spin:
            stuck += 1                                    # <= stuck_samples (<= 1000)
            if stuck >= tb[128]:                           # stuck_samples
                st[9] = tb[128]
                flags = (flags & 27) | 4
                st[1] = flags
                return flags
            st[9] = stuck
        elif stuck:
            st[9] = 0
        st[8] = bus_mA

        # trust w = 16 - wp: 0..16, ramps up over settle_ms after the command last moved fast;
        # rest is steady_ms minus the calm time (capped there): 0 = steady, full trust
        # (settle <= steady); wp = 0 is full trust
        du = u - last_u                                   # |du| <= 1000
        st[7] = u
        if du < 0:
            du = -du
        if du * 1000 > rate_fast * dt_ms:                 # <= 1e6 ; rate_fast*dt <= 1e4*6e4 = 6e8
            st[5] = steady
            rest = steady
            wp = 16
        elif rest:
            rest -= dt_ms                                 # |.| <= 1.2e5
            if rest < 0:
                rest = 0
            st[5] = rest
            wp = steady - rest                            # the calm time, <= steady
            wp = 0 if wp >= settle else 16 - wp * 16 // settle   # <= 16 * 6e4
        else:
            wp = 0

        # expected power: thrust fraction t (above), voltage factor by table, power by table
        dv = bus_mV - v_min                               # 0 .. v_max - v_min < 12 vstep
        i = dv // vstep                                   # voltage factor knot, CONFIG[0..11]
        fr = dv % vstep                                   # 0..vstep-1
        a = tb[i]                                         # Q12, 0..6143
        f = (a + (tb[i + 1] - a) * fr // vstep) * t >> 12  # 6143 * 5001 = 3.1e7 ; 6143 * 4096 = 2.5e7 ; f <= 6143
        j = (f >> 7) + 26                                 # power knot, CONFIG[26..73]
        a = tb[j]                                         # [0.1 W], < 2^18
        pe = a + ((tb[j + 1] - a) * (f & 127) >> 7)       # 2^18 * 127 = 3.3e7 ; pe < 2^18
        self.expected_dW = pe

        # measured power [dW] = mV * mA / 1e5 with the voltage in 20 mV steps (0.13 % at 15 V)
        pm = (bus_mV // 20) * ma // 5000                  # <= 3000 * 300000 = 9e8
        self.power_dW = pm                                # <= 180000 < 2^18

        # slow outputs every 4th sample: hover command by table over V, thrust by table over the
        # mean measured power of the last 4 samples. acc = 2^20 x samples + power sum (< 2^20)
        acc += pm + 1048576                               # < 4 * 2^20 + 4 * 180000 < 2^23
        if acc >= 4194304:
            pm4 = (acc & 1048575) >> 2                    # mean of the 4 samples
            acc = 0
            slow = 1
            a = tb[i + 13]                                # hover knot, CONFIG[13..24]: permille
            self.hover_permille = a + (tb[i + 14] - a) * fr // vstep   # 1000 * 5001 = 5e6
            if pm4 > pm_top:
                pm4 = pm_top                              # table covers 0..32 x 2^sh - 1
            j = (pm4 >> sh) + 75                          # thrust knot, CONFIG[75..106]
            a = tb[j]                                     # units of 2^thrust_unit_shift mN, < 2^13
            self.thrust_mN = (a + ((tb[j + 1] - a) * (pm4 & sh_mask) >> sh)) << tu  # 2^13 * 2^13 = 2^26 ; <= 1e6
        else:
            slow = 0
        st[6] = acc

        flags &= 24                                       # keep baseline_off, mass_high
        # flight phase: a new flight starts after landed_ms below the spin command
        if u < spin:
            quiet += dt_ms                                # <= landed + dt_max <= 120000
            if quiet >= tb[129]:                           # landed_ms
                quiet = tb[129]
                if learning == 0 or l_n > 0:              # a new flight: forget the learned
                    flags = 0                             # scale, the CUSUM sums, the mass
                    st[2] = 0       # s_hi
                    st[3] = 0       # s_lo
                    st[4] = 0       # drift
                    st[11] = 1      # learning
                    st[12] = 0      # l_sum
                    st[13] = 0      # l_n
                    st[14] = 0      # l_ms
                    st[15] = 1000   # scale
                    st[16] = 0      # m_filt
                    st[17] = 0      # m_n
                    self.mass_g = 0
                    self.scale = 1000
            st[10] = quiet
            self.residual_permille = 0
            st[1] = flags
            return flags
        if quiet:
            st[10] = 0
        if pe < pfloor:
            self.residual_permille = 0
            st[1] = flags
            return flags
        sp = pe * scale // 1000                           # <= 2^18 * 1300 = 3.4e8 ; sp <= 3.4e5, >= 1
        r = (pm - sp) * 1000 // sp                        # |pm - sp| * 1000 <= 3.4e8
        if nrb < r < rb:
            big = 0                                       # |r| < 1000 and |r - drift| < clip
        else:
            big = 1
            if r > 1000:
                r = 1000
            elif r < -1000:
                r = -1000                                 # |r| <= 1000
        self.residual_permille = r

        if learning:
            if not wp:
                l_sum += r                                # <= 1000 * 65535 = 6.6e7
                l_n += 1                                  # <= 65535
                l_ms += dt_ms                             # <= learn_ms + dt_max
                st[12] = l_sum
                st[13] = l_n
                st[14] = l_ms
            if l_n > 0 and (l_ms >= tb[130] or l_n >= 65535):  # learn_ms
                m = l_sum // l_n                          # l_n >= 1 here (l_ms > 0 needs a sample)
                if m > tb[131]:                           # baseline_tol_permille
                    m = tb[131]
                    flags |= 8
                elif m < -tb[131]:
                    m = -tb[131]
                    flags |= 8
                scale = 1000 + m                          # 1000 +- tol (tol <= 300)
                st[15] = scale
                self.scale = scale
                st[11] = 0                                # learning done
            st[1] = flags
            return flags

        # slow drift of the baseline (pack drain moves the hover point along the fitted curves):
        # EMA of r over 512 trusted samples, bounded to +-drift_tol, frozen while either CUSUM
        # sum is above h / 2 so that a fault is never absorbed. Kept in 1/256 permille.
        if not wp:
            if s_hi + s_lo < half_h:
                drift += (r * 256 - drift) >> 9           # |r * 256| <= 256000
                if drift > dlim:                          # dlim = drift_tol * 256 <= 25600
                    drift = dlim
                elif drift < ndlim:
                    drift = ndlim
                st[4] = drift
            r -= drift >> 8
            # two-sided CUSUM on r clipped to +-(h + k - 1); full trust: whole increments
            if big:
                if r > clip:
                    r = clip
                elif r < nclip:
                    r = nclip
            s_hi += r - k                                 # |.| <= 2000 + 2000
            s_lo -= r + k
        else:
            r -= drift >> 8
            # increments weighted by trust w/16
            if big:
                if r > clip:
                    r = clip
                elif r < nclip:
                    r = nclip
            w = 16 - wp
            s_hi += w * (r - k) >> 4                      # |w (r - k)| <= 16 * 2000
            s_lo += w * (-r - k) >> 4
        # each sum: clamp to 0..2h, alarm at h (one comparison when the sum is at 0)
        if s_hi < 0:
            s_hi = 0
        elif s_hi >= h:
            flags |= 1
            if s_hi > hh:
                s_hi = hh                                 # <= 2 h <= 2000
        st[2] = s_hi
        if s_lo < 0:
            s_lo = 0
        elif s_lo >= h:
            flags |= 2
            if s_lo > hh:
                s_lo = hh
        st[3] = s_lo

        # implied mass in steady hover: filtered thrust / g (not while power is abnormal),
        # every 4th sample (EMA 1/4 per update: about 1.6 s at 10 Hz)
        if slow and not rest and flags & 3 == 0:
            th = self.thrust_mN
            if m_n == 0:
                m_filt = th
            else:
                m_filt += (th - m_filt) >> 2              # |.| <= 1e6
            st[16] = m_filt
            if m_n < tb[132]:                             # mass_samples
                st[17] = m_n + 1
            else:
                m = m_filt * 1000 // 9807                 # <= 1e9 ; 9807 = 1000 g_n [m/s^2]
                self.mass_g = m
                if m > tb[133]:                           # mass_limit_g
                    flags |= 16
        st[1] = flags
        return flags
