"""The Dormand-Prince 5(4) tableau and controller of the evolution integrator against scipy's RK45.

Source: scipy.integrate's RK45 (scipy/integrate/_ivp/rk.py), an independent transcription of Dormand & Prince
1980 (J. Comput. Appl. Math. 6:19); its error weights E are the 4th- minus the 5th-order weights, ours the
5th- minus the 4th-order ones, hence the sign. Tolerance: 1e-15 absolute (exact rationals).
"""

import numpy as np
from scipy.integrate._ivp import rk

from meltzone._core import dopri


def test_tableau_matches_scipy_rk45():
    a = np.zeros((6, 5))
    a[1, 0] = dopri.A21
    a[2, :2] = dopri.A31, dopri.A32
    a[3, :3] = dopri.A41, dopri.A42, dopri.A43
    a[4, :4] = dopri.A51, dopri.A52, dopri.A53, dopri.A54
    a[5, :5] = dopri.A61, dopri.A62, dopri.A63, dopri.A64, dopri.A65
    np.testing.assert_allclose(a, rk.RK45.A, atol=1e-15, rtol=0)
    np.testing.assert_allclose([0.0, dopri.C2, dopri.C3, dopri.C4, dopri.C5, 1.0], rk.RK45.C, atol=1e-15, rtol=0)
    np.testing.assert_allclose([dopri.B1, 0.0, dopri.B3, dopri.B4, dopri.B5, dopri.B6], rk.RK45.B, atol=1e-15, rtol=0)
    ours = np.array([dopri.E1, 0.0, dopri.E3, dopri.E4, dopri.E5, dopri.E6, dopri.E7])
    np.testing.assert_allclose(ours, -rk.RK45.E, atol=1e-15, rtol=0)


def test_controller_constants_match_scipy():
    assert dopri.SAFETY == rk.SAFETY and dopri.MIN_FACTOR == rk.MIN_FACTOR and dopri.MAX_FACTOR <= rk.MAX_FACTOR
    assert dopri.ACCEPT_EXPONENT == -1.0 / (rk.RK45.error_estimator_order + 1)
