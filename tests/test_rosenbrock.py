"""The Rodas3 Rosenbrock stepper of meltzone._core.rosenbrock on stiff problems with exact solutions.

Sources: the method and its properties (order 3, embedded order 2, L-stable, stiffly accurate) from Sandu et al.
1997 (Atmos. Environ. 31:3459) and Hairer & Wanner 1996 (Solving ODEs II, sec. IV.7; the Prothero-Robinson
problem y' = lambda (y - g) + g' with exact solution g, sec. IV.15); the reference solver is scipy's Radau
(Hairer & Wanner's RADAU5). Tolerances are stated per test (common practice for a third-order method).
"""

from __future__ import annotations

import math

import numba
import numpy as np
import pytest
from scipy.integrate import solve_ivp

from meltzone._core import rosenbrock as rb


@numba.njit(cache=True)
def _affine(t, y, args, dy):
    """y' = A y + b sin t + c cos t: every test problem here (args = (A, b, c))."""
    a, b, c = args
    for i in range(y.shape[0]):
        s = 0.0
        for j in range(y.shape[0]):
            s += a[i, j] * y[j]
        dy[i] = s + b[i] * math.sin(t) + c[i] * math.cos(t)


def _make_driver(fun):
    @numba.njit(cache=True)
    def drive(args, t0, y0, t_end, h0, rtol, atol, fixed):
        """Integrate from t0 to t_end; fixed: constant steps of h0, else error-controlled. Returns the
        solution at t_end, the accepted and the rejected step counts."""
        n = y0.shape[0]
        y = y0.copy()
        jac, ft, lu, piv, kst, fwork = rb.workspace(n)
        f0, ynew, yerr, fnew, tmp = np.empty(n), np.empty(n), np.empty(n), np.empty(n), np.empty(n)
        t = t0
        h = h0
        fun(t, y, args, f0)
        acc = 0
        rej = 0
        fresh = False
        while t < t_end * (1 - 1e-14):
            h = min(h, t_end - t)
            if not fresh:
                rb.jacobian(fun, args, t, y, f0, n, jac, ft, tmp, fwork, kst[0], h, np.full(n + 1, rb.FD_REL))
                fresh = True
            rb.factor(jac, h, lu, piv)
            rb.step(fun, args, t, y, h, f0, ft, lu, piv, kst, ynew, yerr, fnew, tmp)
            err = 0.0
            for j in range(n):
                err = max(err, abs(yerr[j]) / (atol + rtol * max(abs(y[j]), abs(ynew[j]))))
            if fixed or err <= 1.0:
                t += h
                y[:] = ynew
                f0[:] = fnew
                fresh = False
                acc += 1
                if not fixed:
                    h *= rb.accepted_factor(err)
            else:
                rej += 1
                h *= rb.rejected_factor(err)
        return y, acc, rej

    return drive


_drive = _make_driver(_affine)


def _prothero_robinson(lam):
    """Prothero-Robinson y' = lam (y - sin t) + cos t (exact solution sin t from y(0) = 0) and a second,
    non-stiff component y' = -y."""
    return np.array([[lam, 0.0], [0.0, -1.0]]), np.array([-lam, 0.0]), np.array([1.0, 0.0])


def _homogeneous(a):
    n = a.shape[0]
    return np.ascontiguousarray(a, dtype=np.float64), np.zeros(n), np.zeros(n)


def test_order_three_on_a_smooth_problem():
    """Fixed steps on Prothero-Robinson with a mild lambda = -1 (not stiff): the global error falls as h^3
    (observed order within 0.25 of 3, common practice for a convergence test)."""
    args = _prothero_robinson(-1.0)
    y0 = np.array([0.0, 1.0])
    errs = []
    for n in (20, 40, 80):
        y, _, _ = _drive(args, 0.0, y0, 2.0, 2.0 / n, 1.0, 1.0, True)
        errs.append(max(abs(y[0] - math.sin(2.0)), abs(y[1] - math.exp(-2.0))))
    orders = np.log2(np.array(errs[:-1]) / np.array(errs[1:]))
    assert np.all(np.abs(orders - 3.0) < 0.25), orders


@pytest.mark.parametrize("z", [-1e2, -1e4, -1e8])
def test_l_stable_stability_function(z):
    """One step on y' = lambda y (exact Jacobian up to differencing): |R(z)| < 1 and R(z) -> 0 as z -> -inf
    (L-stability; Hairer & Wanner IV.3): |R(-1e2)| < 0.1, and |R(z)| < 10/|z| beyond."""
    problem = _homogeneous(np.array([[z, 0.0], [0.0, z]]))
    y, _, _ = _drive(problem, 0.0, np.array([1.0, 1.0]), 1.0, 1.0, 1.0, 1.0, True)
    assert abs(y[0]) < min(0.1, 10.0 / abs(z))


def test_a_stable_on_oscillatory_modes():
    """A damped oscillation y' = [[a, -b], [b, a]] y with h (a + ib) on a grid of the left half-plane (a < 0,
    |b| up to 1e4): one step never grows the norm (A-stability; Hairer & Wanner IV.3)."""
    for a_ in (-1e-3, -1.0, -1e2, -1e4):
        for b in (0.0, 0.5, 3.0, 1e2, 1e4):
            m = np.array([[a_, -b], [b, a_]])
            y, _, _ = _drive(_homogeneous(m), 0.0, np.array([1.0, 0.0]), 1.0, 1.0, 1.0, 1.0, True)
            assert math.hypot(y[0], y[1]) <= 1.0 + 1e-12, (a_, b)


def test_prothero_robinson_stiff():
    """lambda = -1e6 on [0, 10] with rtol = atol = 1e-6: the solution follows g = sin t to 1e-5 and the steps
    are set by accuracy (well under 1000), not by the 2e-6 stability limit of an explicit method (which would
    need ~3e6 steps)."""
    args = _prothero_robinson(-1e6)
    y, acc, rej = _drive(args, 0.0, np.array([0.0, 1.0]), 10.0, 1e-6, 1e-6, 1e-6, False)
    assert abs(y[0] - math.sin(10.0)) < 1e-5
    assert abs(y[1] - math.exp(-10.0)) < 1e-5
    assert acc + rej < 1000


def test_linear_stiff_system_against_exact_and_radau():
    """y' = A y + (1, 2, 3) sin t with eigenvalues -1, -1e3, -1e5 (A = V diag V^-1, a fixed well-conditioned
    V): at t = 5 the adaptive stepper (rtol 1e-8) agrees with the exact solution and with scipy's Radau
    (rtol 1e-10) to 1e-6 relative of the solution's size."""
    v = np.array([[1.0, 0.3, 0.1], [0.2, 1.0, 0.4], [0.1, 0.5, 1.0]])
    lam = np.array([-1.0, -1e3, -1e5])
    a = v @ np.diag(lam) @ np.linalg.inv(v)
    y0 = np.array([1.0, -2.0, 0.5])
    b = np.array([1.0, 2.0, 3.0])
    t_end = 5.0
    # exact: y = e^{At} y0 + int_0^t e^{A(t-s)} b sin s ds, mode by mode in the eigenbasis
    vi = np.linalg.inv(v)
    c0 = vi @ y0
    cb = vi @ b
    forced = (lam * (-np.sin(t_end)) - np.cos(t_end) + np.exp(lam * t_end)) / (lam ** 2 + 1.0)
    # int_0^t e^{l(t-s)} sin s ds = (e^{lt} - l sin t - cos t) / (l^2 + 1)
    exact = v @ (np.exp(lam * t_end) * c0 + cb * forced)
    y, acc, _ = _drive((a, b, np.zeros(3)), 0.0, y0, t_end, 1e-8, 1e-8, 1e-10, False)
    radau = solve_ivp(lambda t, y: a @ y + b * np.sin(t), (0.0, t_end), y0, method="Radau", rtol=1e-10,
                      atol=1e-12, jac=a).y[:, -1]
    size = np.max(np.abs(exact))
    assert np.max(np.abs(y - exact)) < 1e-6 * size
    assert np.max(np.abs(y - radau)) < 1e-6 * size
    assert acc < 5000


def test_lu_solve_against_numpy():
    """factor + solve of I/(h gamma) - J against numpy.linalg.solve on random 4 x 4 matrices that need row
    interchanges (seeded; tolerance 1e-12 relative, round-off of a 4 x 4 elimination)."""
    rng = np.random.default_rng(3)
    for _ in range(20):
        jac = rng.normal(size=(4, 4)) * 10.0 ** rng.integers(-3, 3, size=(4, 4))
        h = 10.0 ** rng.uniform(-3, 3)
        lu = np.empty((4, 4))
        piv = np.empty(4, dtype=np.int64)
        assert rb.factor(jac, h, lu, piv)
        b = rng.normal(size=4)
        x = b.copy()
        rb.solve(lu, piv, x)
        ref = np.linalg.solve(np.eye(4) / (h * rb.GAMMA) - jac, b)
        np.testing.assert_allclose(x, ref, rtol=1e-12, atol=1e-12 * np.max(np.abs(ref)))


def test_stiffness_estimates():
    """The explicit estimate h |lambda| is exact on a linear scalar mode, and the Gershgorin bound of the scaled
    Jacobian is at least the spectral radius (Gershgorin's theorem) for any positive scaling."""
    lam = -250.0
    y6 = np.array([1.0, 0.0, 0.0])
    y7 = np.array([0.9, 0.0, 0.0])
    est = rb.explicit_stiffness(0.01, lam * y6, lam * y7, y6, y7, np.array([1.0, 1.0, 1.0]))
    assert est == pytest.approx(2.5, rel=1e-14)
    rng = np.random.default_rng(5)
    for _ in range(20):
        jac = rng.normal(size=(3, 3)) * 10.0 ** rng.integers(-6, 6, size=(3, 3))
        scale = 10.0 ** rng.uniform(-5, 5, size=3)
        assert rb.spectral_bound(jac, scale) >= np.max(np.abs(np.linalg.eigvals(jac))) * (1 - 1e-12)
