"""The Rodas3 Rosenbrock method for small stiff systems: tableau, finite-difference Jacobian, one step, the
step-size controller's constants, and the stiffness tests that switch to and from it; apart from any physics.

Rodas3 (Sandu, Verwer, Blom, Spee, Carmichael & Potra 1997, Atmos. Environ. 31:3459, "Benchmarking stiff ODE
solvers for atmospheric chemistry problems II: Rosenbrock solvers"; the method family of Hairer & Wanner 1996,
Solving ODEs II, 2nd ed., sec. IV.7): 4 stages, order 3 with an embedded order-2 solution, stiffly accurate
and L-stable. Written in the form without matrix-vector products (Hairer & Wanner IV.7, eq. 7.4'):

    (I / (h gamma) - J) K_i = f(t + alpha_i h, y + sum_j A_ij K_j) + sum_j (C_ij / h) K_j + h gamma_i f_t
    y_new = y + sum_i M_i K_i,     error = sum_i E_i K_i

Coefficients checked against the Kinetic PreProcessor's Rosenbrock integrator (Sandu's transcription of the
1997 tables, ``Rodas3`` in its ros.f90 / Rosenbrock.f90, read in several public copies): A21 = 0,
A31 = 2, A32 = 0, A41 = 2, A42 = 0, A43 = 1; C21 = 4, C31 = 1, C32 = -1, C41 = 1, C42 = -1, C43 = -8/3;
M = (2, 0, 1, 1), E = (0, 0, 0, 1), alpha = (0, 0, 1, 1), gamma_i = (1/2, 3/2, 0, 0), gamma = 1/2;
stage 2 reuses stage 1's f (alpha2 = 0, A2j = 0). The order (3) and L-stability are verified in
tests/test_rosenbrock.py (convergence on a smooth problem, |R(z)| -> 0 as z -> -inf, Prothero-Robinson).

Like a Runge-Kutta method, a Rosenbrock step keeps a linear invariant c.y whenever c.f = 0 for every y: then
c.J = 0 (also for the differenced Jacobian, up to round-off), so every stage has c.K_i = 0. The boundary-layer
scheme's energy budget (mantle + core + heat lost) therefore still closes to round-off (measured ~1e-14).

Stiffness detection of the explicit pair: Hairer, Norsett & Wanner 1993, Solving ODEs I, 2nd ed., sec. II.6
(DOPRI5's test, from the two stages evaluated at t + h: h |lambda| ~ h ||f(y_7) - f(y_6)|| / ||y_7 - y_6||,
stiff when above 3.25, about the pair's stability boundary on the negative real axis, 15 times (here 100)
with fewer than 6 non-stiff results between them; from memory, consistent with the public dopri5.f).
Back to the explicit pair when h rho(J) (bounded by the Gershgorin radius of the scaled Jacobian) stays below
the same boundary for as many steps (this model's choice, the mirror of the test above).
"""

from __future__ import annotations

import math

import numpy as np

from ._jit import njit

# ------------------------------------------------------------ Rodas3 tableau (Sandu et al. 1997; checked)
GAMMA = 0.5
A31, A41, A43 = 2.0, 2.0, 1.0
C21, C31, C32, C41, C42, C43 = 4.0, 1.0, -1.0, 1.0, -1.0, -8.0 / 3.0
M1, M3, M4 = 2.0, 1.0, 1.0
#: the gamma_i of the f_t term (stages 1-2; stages 3-4 have none)
G1, G2 = 0.5, 1.5
#: local error order (embedded order + 1) for the controller
ERROR_ORDER = 3.0

# ------------------------------------------------------------ step-size controller (the values of dopri.py)
SAFETY = 0.9
MIN_FACTOR = 0.2
MAX_FACTOR = 5.0
MIN_REJECT_FACTOR = 0.1

# ------------------------------------------------------------ switching
#: h |lambda| above which a step of the explicit pair counts as stability-limited (Hairer et al. 1993, II.6)
STIFF_BOUND = 3.25
#: stability-limited accepted steps in a row before switching to the implicit method. Hairer's code takes 15;
#: this model's choice is 100: explicit runs that do well show up to ~16 in a row (a 3 M_E stagnant lid
#: cooling over 2 Gyr: 770 steps), a magma ocean held at the equilibrium temperature tens of thousands
STIFF_STEPS = 100
#: accepted steps below the bound that reset the count (and, in the implicit method, switch back)
NONSTIFF_STEPS = 6
#: relative perturbation of the finite-difference Jacobian (central differences) and of df/dt (forward): the
#: cube root of the double-precision epsilon, the usual optimum of a central difference. The right-hand side
#: carries the round-off of the stored-heat inversion (~1e-5 relative in the lid's rate, a difference of two
#: near-equal heat flows), with which a forward difference at sqrt(epsilon) misjudged the lid's column by ~2 %
#: and the error estimate stopped falling with the step (measured). A caller may pass smaller perturbations
#: for columns whose rates are smooth only on a smaller scale (:func:`jacobian`'s ``rel``)
FD_REL = 6.055454452393343e-06


@njit
def workspace(n):
    """Scratch of a system of n: (jac, ft, lu, piv, kst, fwork) for :func:`jacobian`, :func:`factor` and
    :func:`step` (the Jacobian, df/dt, the LU factors and pivots, the 4 stages, one slope); the stages are
    free between steps (the Jacobian's second scratch)."""
    return (np.empty((n, n)), np.empty(n), np.empty((n, n)), np.empty(n, dtype=np.int64), np.empty((4, n)),
            np.empty(n))


@njit(leaf=True)
def accepted_factor(err):
    """Step growth after an accepted step with error norm ``err`` (<= 1)."""
    if err == 0.0:
        return MAX_FACTOR
    return min(MAX_FACTOR, max(MIN_FACTOR, SAFETY * err ** (-1.0 / ERROR_ORDER)))


@njit(leaf=True)
def rejected_factor(err):
    """Step shrink after a step rejected with error norm ``err`` (> 1)."""
    return max(MIN_REJECT_FACTOR, SAFETY * err ** (-1.0 / ERROR_ORDER))


@njit(leaf=True)
def explicit_stiffness(h, f6, f7, y6, y7, scale):
    """h |lambda| estimate of an explicit step from its two stages at t + h (Hairer et al. 1993, II.6): the
    stage values y6, y7 and their slopes f6, f7, each component divided by ``scale`` (0 when they agree)."""
    num = 0.0
    den = 0.0
    for j in range(scale.shape[0]):
        num += ((f7[j] - f6[j]) / scale[j]) ** 2
        den += ((y7[j] - y6[j]) / scale[j]) ** 2
    if den <= 0.0:
        return 0.0
    return h * math.sqrt(num / den)


@njit(leaf=True)
def spectral_bound(jac, scale):
    """Upper bound on the spectral radius of ``jac`` (n x n): the largest Gershgorin row sum of
    D^-1 J D with D = diag(scale) (similar to J, so the same eigenvalues)."""
    n = jac.shape[0]
    best = 0.0
    for i in range(n):
        s = 0.0
        for j in range(n):
            s += abs(jac[i, j]) * scale[j] / scale[i]
        if s > best:
            best = s
    return best


@njit(leaf=True)
def _perturb(y, tmp, j, sign, rel):
    """tmp = y with component j moved by sign rel max(|y_j|, 1); returns the move actually represented."""
    for i in range(y.shape[0]):
        tmp[i] = y[i]
    tmp[j] = y[j] + sign * rel * max(abs(y[j]), 1.0)
    return abs(tmp[j] - y[j])


@njit(leaf=True)
def _difference(out, f1, f0, d):
    for i in range(out.shape[0]):
        out[i] = (f1[i] - f0[i]) / d


@njit(inline="always")
def jacobian(fun, args, t, y, f0, n_dep, jac, ft, tmp, fwork, kscr, h, rel):
    """Finite-difference Jacobian ``jac`` = df/dy at (t, y) with f0 = f(t, y) given, and ``ft`` = df/dt.

    Only the first ``n_dep`` components of y enter f (the later columns are zero and not differenced).
    Central differences in y with the perturbation rel[j] max(|y_j|, 1); a forward difference in time with
    rel[n_dep] max(|t|, h) (``rel``: n_dep + 1 relative perturbations, FD_REL where nothing better is known) (never backwards: f may change its law at a past switch time). ``kscr`` (n) is scratch.
    Inlined where it is called, like :func:`step`."""
    jac[:, :] = 0.0
    for j in range(n_dep):
        up = _perturb(y, tmp, j, 1.0, rel[j])
        fun(t, tmp, args, fwork)
        down = _perturb(y, tmp, j, -1.0, rel[j])
        fun(t, tmp, args, kscr)
        _difference(jac[:, j], fwork, kscr, up + down)
    dt = rel[n_dep] * max(abs(t), h)
    fun(t + dt, y, args, fwork)
    _difference(ft, fwork, f0, dt)


@njit(leaf=True)
def factor(jac, h, lu, piv):
    """LU factors (partial pivoting) of I / (h GAMMA) - jac into ``lu`` and ``piv``; False when singular."""
    n = jac.shape[0]
    g = 1.0 / (h * GAMMA)
    for i in range(n):
        for j in range(n):
            lu[i, j] = -jac[i, j]
        lu[i, i] += g
    for c in range(n):
        p = c
        for r in range(c + 1, n):
            if abs(lu[r, c]) > abs(lu[p, c]):
                p = r
        piv[c] = p
        if lu[p, c] == 0.0:
            return False
        if p != c:
            for j in range(n):
                lu[c, j], lu[p, j] = lu[p, j], lu[c, j]
        for r in range(c + 1, n):
            m = lu[r, c] / lu[c, c]
            lu[r, c] = m
            for j in range(c + 1, n):
                lu[r, j] -= m * lu[c, j]
    return True


@njit(leaf=True)
def solve(lu, piv, b):
    """Solve in place with the factors of :func:`factor`."""
    n = b.shape[0]
    for c in range(n):  # the row interchanges first (the multipliers were interchanged with their rows)
        p = piv[c]
        if p != c:
            b[c], b[p] = b[p], b[c]
    for c in range(n):
        for r in range(c + 1, n):
            b[r] -= lu[r, c] * b[c]
    for c in range(n - 1, -1, -1):
        s = b[c]
        for j in range(c + 1, n):
            s -= lu[c, j] * b[j]
        b[c] = s / lu[c, c]


@njit(leaf=True)
def _stages_one_two(y, h, f0, ft, lu, piv, kst, tmp):
    """Stages 1 and 2 (alpha2 = 0, A2j = 0: stage 2 reuses f0); ``tmp`` = stage 3's argument."""
    k1, k2 = kst[0], kst[1]
    for j in range(y.shape[0]):
        k1[j] = f0[j] + h * G1 * ft[j]
    solve(lu, piv, k1)
    for j in range(y.shape[0]):
        k2[j] = f0[j] + (C21 / h) * k1[j] + h * G2 * ft[j]
    solve(lu, piv, k2)
    for j in range(y.shape[0]):
        tmp[j] = y[j] + A31 * k1[j]


@njit(leaf=True)
def _stage_three(y, h, f3, lu, piv, kst, tmp):
    """Stage 3 from f3 = f(t + h, y + A31 K1); ``tmp`` = stage 4's argument."""
    k1, k2, k3 = kst[0], kst[1], kst[2]
    for j in range(y.shape[0]):
        k3[j] = f3[j] + (C31 * k1[j] + C32 * k2[j]) / h
    solve(lu, piv, k3)
    for j in range(y.shape[0]):
        tmp[j] = y[j] + A41 * k1[j] + A43 * k3[j]


@njit(leaf=True)
def _stage_four(y, h, f4, lu, piv, kst, ynew, yerr):
    """Stage 4 from f4, the new solution and the error estimate."""
    k1, k2, k3, k4 = kst[0], kst[1], kst[2], kst[3]
    for j in range(y.shape[0]):
        k4[j] = f4[j] + (C41 * k1[j] + C42 * k2[j] + C43 * k3[j]) / h
    solve(lu, piv, k4)
    for j in range(y.shape[0]):
        ynew[j] = y[j] + M1 * k1[j] + M3 * k3[j] + M4 * k4[j]
        yerr[j] = k4[j]


@njit(inline="always")
def step(fun, args, t, y, h, f0, ft, lu, piv, kst, ynew, yerr, fnew, tmp):
    """One Rodas3 step of size h from (t, y) with f0 = f(t, y), ft = df/dt and the factors (``lu``, ``piv``)
    of I / (h GAMMA) - J given: fills the stages ``kst`` (4 x n), ``ynew``, the error estimate ``yerr`` and
    ``fnew`` = f(t + h, ynew) (the next step's f0, evaluated last so that ``args``' scratch describes ynew).
    Inlined where it is called (``fun`` is a first-class function); the arithmetic lives in the stage
    functions, which keeps the inlined body, and so the caller's compilation, short."""
    _stages_one_two(y, h, f0, ft, lu, piv, kst, tmp)
    fun(t + h, tmp, args, fnew)
    _stage_three(y, h, fnew, lu, piv, kst, tmp)
    fun(t + h, tmp, args, fnew)
    _stage_four(y, h, fnew, lu, piv, kst, ynew, yerr)
    fun(t + h, ynew, args, fnew)
