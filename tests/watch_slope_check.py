"""The watch kernel's in-flight slopes against least squares on the same blocks (shared by
tests/test_watch_slopes.py and benchmarks/watch_slopes.py).

The kernel explains part of each block's power residual r by two slopes it learns in flight: cx
on x, the block's thrust factor against its slow mean (axial flight), and cd on g, the block's
static less lagged expected energy over its lagged expected energy (the lead: spin-up and
spin-down draw); what is left, p = r - drift - cx x - cd g, is what its CUSUM sums and its noise
estimate measures (estimator/core/watch.py, _block). Here, on the blocks the kernel judges at
full weight after learning, the spread of the kernel's p is set beside the spread an ordinary
least-squares fit of r on 1, x and g leaves over the same blocks (numpy.linalg.lstsq, fitted
with hindsight on the whole flight: the best any pair of fixed slopes does with these
regressors). x and g are restated in floats from _block's inputs as _block forms them.
"""

import numpy as np

from estimator.core.watch import Watch
from estimator.core.watch_layout import INDEX
from watch_study import kernel_inputs

ENERGY_SHIFT_AT = INDEX["energy_shift"]     # where CONFIG holds the block energies' shift
JUDGED_AFTER_S = 60.0                       # blocks after this flight time (learning has ended)


def _logging(kernel):
    class Logged(kernel):
        """The kernel, keeping per block: flight time [s], r, x, g [-], the kernel's slopes
        (cx [-]; cd: Q6 per permille of g, so the slope on g as a share is cd / 64) and
        drift [-] before the block, and whether the block was judged at full weight."""

        def __init__(self, c):
            super().__init__(c)
            self.blocks = []

        def _block(self, c, flags, e, p, b, v, t, f, l):
            sb = self.data
            learning, drift, fsl, cx, hold, cd, low = sb[0], sb[11], sb[12], sb[20], sb[25], sb[28], sb[29]
            # g's part along x, b = cov(x, g) / var(x) (moments in Q4, a ridge of 50 on var x), taken
            # out of g before its slope: the kernel's modelled part is cx x + cd (g - b x)
            bx = max(-4.0, min(4.0, (sb[31] * 16 // ((sb[18] >> 4) + 50)) / 256.0))
            out = kernel._block(self, c, flags, e, p, b, v, t, f, l)
            fb = f / b
            hover = (fsl / 128.0 if fsl else fb) + 1.0
            x = (fb - hover) / hover
            sh = c[ENERGY_SHIFT_AT]
            g = (l >> sh) / ((p >> sh) + 1.0)
            judged = hold <= 0 and not low and abs(x) <= 0.25 and not learning
            self.blocks.append((t / 1000.0, sb[34] / 1000.0, x, g, cx / 1000.0, cd / 64.0, drift / 256000.0, judged, bx))
            return out
    return Logged


def slope_spreads(cfg, log, kernel=Watch):
    """Replay ``log`` (time_s, command, voltage_V, current_A arrays) through ``kernel`` with CONFIG
    ``cfg``; returns dict: sd_kernel and sd_lsq [-] (spread of p and of the least-squares
    residual), the kernel's median slopes cx, cd and the least-squares ones lsq_cx, lsq_cd [-],
    and the number of blocks; None with fewer than 50 judged blocks."""
    w = _logging(kernel)(cfg)
    dts, u, mv, ma = kernel_inputs(log)
    up = w.update
    for i in range(len(u)):
        up(dts[i], u[i], mv[i], ma[i])
    t, r, x, g, cx, cd, drift, judged, bx = np.array(w.blocks, float).T
    sel = (t > JUDGED_AFTER_S) & (judged > 0)
    if sel.sum() < 50:
        return None
    x, g = np.clip(x, -0.5, 0.5), np.clip(g, -0.5, 0.5)
    p = r - drift - np.clip(cx * x + cd * (g - bx * x), -0.5, 0.5)
    a = np.vstack([np.ones(sel.sum()), x[sel], g[sel]]).T
    coef, *_ = np.linalg.lstsq(a, r[sel], rcond=None)
    return {"sd_kernel": float(np.std(p[sel])), "sd_lsq": float(np.std(r[sel] - a @ coef)),
            "cx": float(np.median(cx[sel])), "cd": float(np.median(cd[sel])),
            "lsq_cx": float(coef[1]), "lsq_cd": float(coef[2]), "blocks": int(sel.sum())}
