"""Onboard power watch: integer-only, heap-free kernel (runs unchanged on MicroPython).

``w = Watch(CONFIG)``; ``flags = w.update(dt, u, v, a)``; flag bits in
estimator/core/watch_layout.py. Readable after each block in ``w.data`` (watch_layout.OUTPUT_AT;
on the desktop also by name, estimator.watch.config.NamedWatch): [32] ``mass_g`` [g], [33]
``sigma_permille`` [1/1000], [34] ``residual_permille`` [1/1000], [35] ``thrust_mN`` [mN], [36]
``hover_permille`` [1/1000], [5] ``scale`` [1/1000] (in the list, not as attributes: an
attribute's name would be interned on the board's heap). Their meaning, the model and its published sources (Page 1954,
Hawkins 1987, Siegmund 1985) and the integer contract: DEVELOPERS.md, "The onboard watch
kernel". Every intermediate stays below 2^30 (the bound of each product is the comment beside
it, with the CONFIG bounds of watch_layout.check); update() and _block() have no loops, build
nothing and never raise for int inputs. Copied verbatim into the board bundle as
``liftwatch.py``; CONFIG indices are literal numbers here (watch_layout.INDEX). The files named
here are liftcal's source, not the bundle's (there watch_layout is ``liftwatch_layout.py``).
"""


class Watch:
    """Power watch of one vehicle (CONFIG by liftcal firmware; desktop: watch.config.new_watch)."""

    def __init__(self, c):
        """c: CONFIG of liftwatch_config, a tuple of 129 ints [-] (watch_layout: the scalars sit at
        13..49, so most indices here compile to one-byte constants).
        Raises ValueError (no message: a string constant would stay on the heap) when CONFIG was
        made for another kernel format; the board loader liftwatch_load and the desktop builder
        check every bound first and say what is wrong in words."""
        if len(c) != 129 or c[13] != 8:
            raise ValueError
        span = c[21]
        # thrust fraction t = 4096 ((1 - a) d/S + a (d/S)^2) = d (ta + (tq d >> 10)) >> 14 with
        # d = u - u_min, S = command span (>= 100): ta <= 6.7e5, tq <= 6.9e6
        ta = ((4096 - c[22]) << 14) // span
        tq = (((c[22] << 12) // span) << 12) // span
        i_pos = max(c[17], 0)                             # currents below this: negative (power 0) or a fault
        # state (st in update): [0] CONFIG, [1..11] per-sample state ([2] lagged expected power
        # [0.1 W / 4], [3] the block weight w of a sample of dt), [12..20] CONFIG scalars read
        # every sample, [21..24] derived, [25] the block's thrust-factor sum, [26] its static
        # expected energy [0.1 W ms], [27] dt_last; the most used come first (the first ten are
        # update's locals 6..15, one byte of bytecode a use instead of two); dt_last, alpha and w
        # start as those of a 1 ms sample (a valid dt: checked on change only)
        self.state = [c, 0, 0, 1, 256 // (c[25] + 1), 0, 0, 0, 0, 0, -1, 0,
                      c[14], c[15], c[16], c[18], c[19], c[20], c[23], c[24], c[26],
                      ta, tq, c[20] + span, i_pos, 0, 0, 1]
        # data (sb in _block): block state, named by the unpacking in _block (DEVELOPERS.md: sig in
        # Q6, drift in Q8, fsl the hover thrust factor in Q7, low: the block's expected power fell
        # below the floor; [30] bm, [31] sxd, [32..36] the outputs, [37] ym the implied mass's EMA,
        # restarted with the mass sums, [38] xb x's EMA over the mass's blocks: clear leaves both); the
        # inflow slope cx starts at momentum theory's 0.5
        self.data = [0] * 39
        self.clear()

    def clear(self):
        """A new flight: forget the learned scale, noise, CUSUM sums, drift and mass (the outputs
        thrust_mN and hover_permille stay)."""
        sb = self.data
        for i in range(35):                               # a counted loop: no allocation
            sb[i] = 0
        sb[0] = 1
        sb[5] = 1000
        sb[6] = sb[18] = sb[26] = 6400                     # sig: 10 % (Q6) for cd's ridge while learning
        sb[19] = 3200
        sb[20] = 500

    def update(self, dt, u, v, a):
        """One sample: dt [ms] since the last, command u [1/1000], bus voltage v [mV], bus current a
        [mA] (one-letter names: the interpreter holds them already, DEVELOPERS.md "Heap on the
        board"). Returns the flag bits (int). Never raises for int inputs, never allocates."""
        st = self.state
        (tb, flags, pl4, w, alpha, ee, stuck, quiet, fl_ms, em, last_mA, bw,
         dt_max, v_min, v_max, i_max, spin, cmd_min, vstep, pfloor, blk,
         ta, tq, u_top, i_pos, fsum, es, dt_last) = st
        # range checks: comparisons only, so any int is safe here; dt only when it changes, then
        # the lag's alpha = dt / (lag + dt) in Q8 and the sample's block weight w (at most a block)
        if dt != dt_last:
            if dt <= 0 or dt > dt_max:
                st[1] = flags = flags | 4
                return flags
            alpha = (dt << 8) // (tb[25] + dt)           # lag_ms; 60000 * 256 = 1.5e7
            st[3] = w = min(dt, blk)
            st[27] = dt
            st[4] = alpha
        if v < v_min or v > v_max:
            st[1] = flags = flags | 4
            return flags
        if u < cmd_min:
            if u < 0:
                st[1] = flags = flags | 4
                return flags
            t = 0
        elif u > u_top:
            if u > 1000:
                st[1] = flags = flags | 4
                return flags
            t = 4096
        else:
            d = u - cmd_min                               # 0..span
            t = d * (ta + (tq * d >> 10)) >> 14           # tq*d <= 6.9e8 ; d*(..) <= 2^26
        if a < i_pos:
            if a < tb[17]:                               # i_min_mA
                st[1] = flags = flags | 4
                return flags
            pm = 0                                        # negative current: measured power 0
        elif a > i_max:
            st[1] = flags = flags | 4
            return flags
        else:
            pm = (v // 20) * a // 5000                    # [0.1 W] 3000 * 300000 = 9e8 ; pm <= 180000
        # now 0 < dt <= 60000, 0 <= u <= 1000, 0 <= v <= 60000 [mV], 0 <= pm <= 180000
        if a == last_mA and u >= spin:
            stuck += dt                                   # <= stuck_ms + dt_max < 7e5
            if stuck >= tb[30]:                          # stuck_ms
                st[6] = tb[30]
                st[1] = flags = flags | 4
                return flags
            st[6] = stuck
        elif stuck:
            st[6] = 0
        st[10] = a
        if flags & 4:                                     # a good sample clears sensor_fault
            st[1] = flags = flags & 27

        # expected power: voltage factor by table, power by table over f = factor x t
        dv = v - v_min                                    # 0 .. < 12 vstep
        i = dv // vstep
        y = tb[i]                                         # Q12, 0..6143
        f = (y + (tb[i + 1] - y) * (dv % vstep) // vstep) * t >> 12   # 6143 * 5001 ; 6143 * 4096 ; f <= 6143
        j = (min(f, 4095) >> 7) + 63                      # the table ends at f = 1: beyond, read in its last step
        y = tb[j]                                         # [0.1 W], < 2^18
        pe = y + ((tb[j + 1] - y) * (f & 127) >> 7)       # 2^18 * 127 = 3.3e7
        pl4 += ((pe << 2) - pl4) * alpha >> 8             # first-order lag; 2^20 * 256 = 2^28 ; pl4 < 2^20
        st[2] = pl4

        if u < spin:                                      # on the ground (or rotors stopped)
            quiet += dt                                   # <= landed_ms + dt_max <= 120000
            if quiet >= tb[31]:                          # landed_ms
                quiet = tb[31]
                if fl_ms:                                 # landed after a flight: a new one next
                    self.clear()
                    flags = 0
                    st[1] = 0
                    st[8] = 0
            st[7] = quiet
            if bw:
                st[9] = st[5] = st[11] = st[25] = 0
                st[26] = es - ee                          # the lead sum is kept (ee is cleared)
                self.data[29] = 0
            return flags
        if quiet:
            st[7] = 0
        fl_ms += dt                                       # < 2^29 + 2 x 61000 (capped at blocks)
        st[8] = fl_ms
        em += pm * w                                      # 180000 * 2000 = 3.6e8
        ee += (pl4 >> 2) * w                              # 2^18 * 2000 = 5.2e8
        bw += w                                           # < 2 blk
        fsum += f * w                                     # 6143 * 2000 = 1.2e7
        es += pe * w                                      # 2^18 * 2000 = 5.2e8
        if pe < pfloor:
            self.data[29] = 1                             # low: the block is not judged
        if bw >= blk:
            st[1] = flags = self._block(tb, flags, em, ee, bw, v, fl_ms, fsum, es - ee)
            st[8] = min(fl_ms, 536870912)                 # flight time saturates at 2^29 ms (6 days;
            em = ee = bw = fsum = es = 0                  # the block compares it with minutes only)
        st[9] = em
        st[5] = ee
        st[11] = bw
        st[25] = fsum
        st[26] = es
        return flags

    def _block(self, c, flags, e, p, b, v, t, f, l):
        """One block of flight time: residual, learning, CUSUM, noise, drift, implied mass; returns
        the flags. c: CONFIG; e, p: measured and lagged expected energy [0.1 W ms]; b: block length
        [ms]; v: last voltage [mV]; t: flight time [ms]; f: thrust factor (Q12 of full thrust) x ms;
        l: static less lagged expected energy (the lead). (Names the interpreter already holds
        cost no heap: DEVELOPERS.md, "Heap on the board".)"""
        sb = self.data
        lo = min                                          # in local slots below 16: 1 B a use, not 2
        hi = max
        (learning, l_sum, l_n, l_ms, l_dev, scale, sig, k, h, s_hi, s_lo, drift, fsl,
         m_sum, m_sq, m_n, m_ms, m_run, sxx, srx, cx, mu_p, var_p, n_p, y16, hold, sdd, srd, cd, low, bm, sxd, mass_g, sigma_permille, residual_permille, thrust_mN, hover_permille, ym, xb) = sb
        # CUSUM k, h [permille] from the noise; k at most k_max, h raised so that h k stays
        k = lo(hi(sig >> 6, c[36]), 1000)                     # the noise, within its floor c[36]..100 %
        h = k * c[39] >> 8                               # 1000 * 12800
        k = k * c[38] >> 8                               # 1000 * 2560
        if k > c[49]:
            h = lo(h * k // c[49], 1048576)             # 50000 * 10000 = 5e8
            k = c[49]
        sb[7] = k = hi(k, l_ms)                           # after learning: 2 standard errors of m (below)
        sb[8] = h
        hh = h >> 1                                       # sums below this: no suspicion
        sh = c[28]
        pmb = lo(e // b, (32 << sh) - 1)                 # mean measured power [0.1 W] <= 180000
        j = (pmb >> sh) + 96
        a = c[j]                                          # < 2^13
        # thrust from measured power (table); 2^13 * 2^13 ; <= 1e6
        sb[35] = th = (a + ((c[j + 1] - a) * (pmb & ((1 << sh) - 1)) >> sh)) << c[29]
        dv = v - c[15]
        vs = c[23]
        j = dv // vs
        a = c[j + 50]
        sb[36] = a + (c[j + 51] - a) * (dv % vs) // vs   # 1000 * 5001
        fb = f // b                                       # Q12, <= 6143
        if not fsl:
            fsl = fb << 7                                 # Q7 of Q12, < 2^20
        fsd = (fsl >> 7) + 1
        # x, the block's command thrust against the hover's [permille], is kept in v (the voltage is
        # read above; a local below 16 is 1 B a use); 6143 * 1000
        v = lo(hi((fb - fsd) * 1000 // fsd, -500), 500)
        sb[29] = 0
        if low or abs(v) > c[40]:
            sb[25] = hold = c[48]                        # a manoeuvre: not judged for settle_ms after it
        elif hold > 0:
            sb[25] = hold = hold - b
        steady = hold <= 0
        near = not low and abs(v) <= 250              # judged (at half weight unless steady)
        sb[12] = fsl + (((fb << 7) - fsl) >> (4 if learning else 7))   # 2^20
        esh = c[27]                                      # energy_shift (watch_layout)
        e0 = p >> esh                                     # < 2^19
        e0s = e0 * scale // 1000                          # 2^19 * 1300 = 6.8e8
        if e0s <= 0:
            return flags
        sb[34] = r = lo(hi((e >> esh) - e0s, -e0s), e0s) * 1000 // e0s   # 6.8e5 * 1000 (e0s <= 2^19 x 1300 / 1000)
        # lead g: static less lagged expected energy [permille of the expected] (spin-up draw)
        g = lo(hi((l >> esh) * 1000 // (e0 + 1), -500), 500)   # 2^19 * 1000
        quiet = near and (learning or s_hi + s_lo < hh)     # no suspicion: slopes learned
        # slopes of the residual on x (axial flight) and g (lead), one joint least-squares fit: g less
        # its part along x, gp = g - b x (b = cov(x, g) / var(x), Q8, within +-4), is orthogonal to x,
        # so cx = cov(r, x) / var(x) and cd = cov(r, gp) / var(gp) are the pair's slopes (Gram-Schmidt)
        bq = lo(hi(sxd * 16 // ((sxx >> 4) + 50), -1024), 1024)   # sxd <= 4e6 (Q4): x 16 = 6.4e7
        gp = g - bq * v // 256                            # |.| <= 500 + 4 x 500
        if quiet:
            sh = c[37] + 1                                # 2x the noise's EMA: a slow ramp is not taken in
            m = drift >> 8                                # the baseline: the residual's mean
            if learning:
                sh = 4
                m = l_sum // l_n if l_n else 0
            q = lo(hi(r - m, -1000), 1000)
            # EMA moments in Q4: a step (v - s) >> sh is floored, which biases a moment kept in
            # plain units by about -2^sh / 2, as large as var(g) itself after learning
            sdd += ((gp * gp << 4) - sdd) >> sh           # 2500^2 x 16 = 1e8
            srd += ((q * gp << 4) - srd) >> sh            # 1000 x 2500 x 16 = 4e7
            sb[26] = sdd
            sb[27] = srd
            if t >= c[32]:                               # the axial slope: not from take-off (climb-out)
                sxx += ((v * v << 4) - sxx) >> sh         # 250000 x 16 = 4e6
                sxd += ((v * g << 4) - sxd) >> sh         # 500 x 500 x 16
                srx += ((q * v << 4) - srx) >> sh         # 1000 x 500 x 16 = 8e6
                sb[18] = sxx
                sb[19] = srx
                sb[31] = sxd
                sb[20] = cx = lo(hi(srx * 125 // ((sxx >> 3) + 50), 0), 1000)   # 8e6 * 125 = 1e9 (a ridge of 25 permille^2)
            # cd [Q6] with a ridge of the noise over the EMA's length, sigma^2 / 128 + 4 permille^2
            # (sig Q6, so sig^2 >> 19): a clean log learns cd near least squares, a noisy one
            # shrinks it; sig starts at 10 % (clear) while learning, so it does not jump after
            sb[28] = cd = lo(hi(srd * 4 // ((sdd >> 4) + ((sig >> 9) * sig >> 10) + 4), 0), 1023)   # 4e7 * 4 ; 250 x 128000
        # e: the modelled part of r, |.| <= 500 (e and, in the mass, l: low slots, 1 B a use)
        e = lo(hi(cx * v // 1000 + cd * gp // 64, -500), 500)
        if t < c[32]:                                    # take-off: not judged, only the lead slope learned
            return flags
        if learning:
            if steady:
                r -= e                                    # |.| <= 1500: take the modelled part out
                l_n += 1                                  # <= 18000 (timeout / block)
                l_sum += r                                # <= 2.7e7
                sb[24] = y16 = y16 + ((((r - l_sum // l_n) << 4) - y16) >> 2)   # deviation (|.| <= 3000) smoothed x 16, |.| <= 48000
                l_dev += abs(y16)                         # <= 48000 x 18000 = 8.7e8
                l_ms += b
                sb[1] = l_sum
                sb[2] = l_n
                sb[3] = l_ms
                sb[4] = l_dev
            if l_ms >= c[33] or t >= c[34]:
                if l_n >= 4:
                    m = l_sum // l_n
                    s = (l_dev // l_n) * 53 >> 8          # mean |y16| / 16 x sqrt(7) x sqrt(pi/2)
                else:
                    m = 0
                    s = c[36] + c[36]                     # twice the noise floor
                s = lo(hi(s, c[36]), 1000)
                # baseline_off: |m| beyond the tolerance by 2 standard errors s / sqrt(l_n)
                tol = c[35]
                d = abs(m) - tol                          # |.| <= 2000
                if d > 0:
                    m = tol if m > 0 else -tol
                    if l_n and d * d > (s * s << 2) // l_n:   # 2000^2 ; 1000^2 x 4
                        flags |= 8
                # in flight k >= 2 s / sqrt(l_n + 1) (Hawkins 1987): two Newton steps from above
                q = (s * s << 2) // (l_n + 1)             # 1000^2 x 4
                l_ms = (s // 3 + 1 + q // (s // 3 + 1)) >> 1 or 1   # 0 only when q is: the root is 0
                sb[3] = (l_ms + q // l_ms) >> 1
                sb[4] = s << 6                            # kept: in flight the noise stays below 1.75x this
                sb[0] = 0
                sb[5] = 1000 + m
                # in flight the noise starts at 1.5x (an upper confidence bound), rises to 1.75x at most
                s += s >> 1
                sb[6] = s << 6                            # Q6, <= 128000
                sb[33] = s
        elif near:
            p = r - (drift >> 8) - e                      # the deviation (p, e, v, f: low slots, 1 B a use); |.| <= 1600
            cl = k + hh + 1                               # one block adds at most this
            zc = lo(hi(p, -cl), cl)
            if steady:
                s_hi += zc - k                            # <= 2h + 2 cl < 1e5
                s_lo -= zc + k
            else:                                         # a manoeuvre block: half the step
                s_hi += (zc - k) >> 1
                s_lo -= (zc + k) >> 1
            h2 = h + h
            sb[9] = s_hi = lo(hi(s_hi, 0), h2)
            sb[10] = s_lo = lo(hi(s_lo, 0), h2)
            if quiet and steady:
                # noise [Q6]: EMA of |y16| x 53 / 4 = |y| x 64 sqrt(7) sqrt(pi/2), |y| within 5 sigma; y
                # is p about the residual's own slow mean bm, not the bounded drift: a shift the drift
                # may not follow yet (a slow fault ramp) is the CUSUM's to judge, not noise
                s = hi(sig >> 6, c[36])
                p = lo(hi(p + (drift - bm >> 8), -5 * s), 5 * s)
                sb[24] = y16 = y16 + (((p << 4) - y16) >> 2)   # |.| <= 16 x 5000
                sig += (abs(y16) * 53 - (sig << 2)) >> (c[37] + 2)   # 8e4 * 53 = 4.2e6
                sb[6] = sig = lo(sig, l_dev + (l_dev >> 1) + (l_dev >> 2))   # 1.75x: a slow ramp hides in no more
                sb[33] = hi(sig >> 6, c[36])
            if steady and s_hi + s_lo < hh:               # calm: no suspicion
                # slow drift of the baseline [1/256 permille] (not after a suspicion): bm, the EMA of the
                # residual less its modelled part, r - e (the learning window's baseline; the EMA of r
                # held e's mean over steady blocks, a bias to z and 3.3x that to the noise), free within
                # 2 standard errors of the learned baseline (l_ms), beyond at a bounded rate (a few
                # permille a minute; a fault ramp moves 30); |bm|, |drift| <= 256000
                sb[30] = bm = bm + ((((r - e) << 8) - bm) >> c[41])   # 1000 * 256
                f = c[42]                                 # the step bound
                p = l_ms << 8                             # the band (x stays in v for the mass); 2000 * 256
                sb[11] = lo(hi(bm, lo(drift - f, -p)), hi(drift + f, p))
            flags = flags & 28 | (s_hi >= h) | (s_lo >= h) << 1   # power_high 1, power_low 2

        # implied mass over flight near hover (not while a power fault is suspected), judged at the end
        # of each window of mass_window_ms on everything since the first (or the last restart)
        if near:
            if learning or s_hi + s_lo < hh >> 1:       # (a quarter of h: a small shift is not read as mass)
                # thrust from measured power over the plan's weight [permille] (1000 / 9.807 mN/g = 102,
                # 0.3 permille high), less the modelled axial-flight part (T ~ P^(2/3)), less 1, less the
                # block's command thrust against the hover's, x, about its own mean xb over these blocks:
                # the vehicle's acceleration (T = m (g + a)) comes out, a hover command that drifts or
                # blocks picked on one side of it add no bias
                l = lo(th * 102 // c[45], 1500)           # 1e6 * 102
                sb[38] = xb = xb + ((v - xb) >> 4)        # |.| <= 250 (not restarted: from 0, or the last flight's)
                l = lo(hi(l - l * e // 1500 - 1000 - v + xb, -500), 500)   # 1500 * 500
                # mean and spread of l's EMA over 4 blocks (Q2; restarted with the sums): the variance of
                # independent blocks (a 5 Hz log's aliased jitter) is 1/7 in it, a slow wander's whole;
                # mass_z2_q8's correlation factor counts blocks of this EMA
                sb[37] = ym = ym + (((l << 2) - ym) >> lo(m_n, 2))   # 2000 x 4
                m_sum += ym >> 2                          # <= 500 x 3200 blocks
                m_sq += ym * ym >> 4                      # <= 250000 x 3200 = 8e8
                m_n += 1
                m_ms += b
                if m_ms >= c[43]:
                    # each window ends with a verdict on everything since the first (or the last restart),
                    # from the second window on (n_p, the last verdict's count, is 0 before: a first window
                    # alone, in the settling after take-off, read +14 % on a fault-free 5 Hz log); sb[21..23]
                    # (mu_p, var_p, n_p) keep the verdict's mean, variance and count for the replay
                    mu = m_sum // m_n
                    var = m_sq // m_n - mu * mu           # <= 250000
                    sb[32] = c[45] + (c[45] * mu + 500) // 1000   # 5e5 * 500 (rounded, not floored)
                    ex = mu - c[46]
                    if ex > 0 and n_p and ex * ex * m_n > ((var >> 4) * c[47] >> 4):   # 2.5e5 * 3200 ; 31250 * 32767
                        m_run += 1
                        if m_run >= c[44]:
                            flags |= 16
                    else:
                        m_run = 0
                    sb[21] = mu
                    sb[22] = var
                    sb[23] = n_p = m_n
                    m_ms = 0
                    if m_n > 2000:                        # halved: the sums stay bounded, the mean and spread kept
                        m_sum >>= 1
                        m_sq >>= 1
                        m_n >>= 1
                sb[17] = m_run
                sb[13] = m_sum
                sb[14] = m_sq
                sb[15] = m_n
                sb[16] = m_ms
            else:                                         # (already 0 when m_n and n_p are)
                sb[13] = sb[14] = sb[15] = sb[16] = sb[23] = 0
        return flags
