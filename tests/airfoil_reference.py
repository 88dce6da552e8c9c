"""NeuralFoil's NACA 4412 polars (PyPI ``neuralfoil``, the section from ``aerosandbox``; tests
only) on a grid of angle of attack and Reynolds number, interpolated: the reference blade
section of the propeller-estimate tests."""

import math

import pytest


def naca4412_section(re_lo, re_hi=6e5, n_re=11):
    """section(alpha [rad], reynolds [-]) -> (cl, cd), clamped to -15..35 deg and re_lo..re_hi;
    skips the calling test when NeuralFoil is not installed."""
    pytest.importorskip("neuralfoil")
    np = pytest.importorskip("numpy")
    asb = pytest.importorskip("aerosandbox")
    interp = pytest.importorskip("scipy.interpolate")
    import neuralfoil

    alphas = np.linspace(-15.0, 35.0, 101)
    res = np.geomspace(re_lo, re_hi, n_re)
    aa, rr = np.meshgrid(alphas, res, indexing="ij")
    out = neuralfoil.get_aero_from_airfoil(asb.Airfoil("naca4412"), alpha=aa.ravel(), Re=rr.ravel(),
                                           model_size="large")
    cl = interp.RegularGridInterpolator((alphas, np.log(res)), np.asarray(out["CL"]).reshape(aa.shape))
    cd = interp.RegularGridInterpolator((alphas, np.log(res)), np.asarray(out["CD"]).reshape(aa.shape))

    def section(alpha, reynolds):
        a = min(max(math.degrees(alpha), alphas[0]), alphas[-1])
        lr = min(max(math.log(reynolds), math.log(res[0])), math.log(res[-1]))
        return float(cl((a, lr))), float(cd((a, lr)))
    return section
