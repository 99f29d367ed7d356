"""The Dormand-Prince 5(4) pair (Dormand & Prince 1980, J. Comput. Appl. Math. 6:19): tableau, one step and
the step-size controller's constants, apart from any physics (the shape of scipy's integrate/_ivp/rk.py).

:func:`step` takes the right-hand side as a first-class function ``fun(t, y, args, dy)`` and is inlined where
it is called (so that the caller stays cacheable).
"""

from __future__ import annotations

from ._jit import njit

# ------------------------------------------------------------ tableau (nodes C, matrix A, weights B, error E)
C2, C3, C4, C5 = 1.0 / 5.0, 3.0 / 10.0, 4.0 / 5.0, 8.0 / 9.0
A21 = 1.0 / 5.0
A31, A32 = 3.0 / 40.0, 9.0 / 40.0
A41, A42, A43 = 44.0 / 45.0, -56.0 / 15.0, 32.0 / 9.0
A51, A52, A53, A54 = 19372.0 / 6561.0, -25360.0 / 2187.0, 64448.0 / 6561.0, -212.0 / 729.0
A61, A62, A63, A64, A65 = 9017.0 / 3168.0, -355.0 / 33.0, 46732.0 / 5247.0, 49.0 / 176.0, -5103.0 / 18656.0
B1, B3, B4, B5, B6 = 35.0 / 384.0, 500.0 / 1113.0, 125.0 / 192.0, -2187.0 / 6784.0, 11.0 / 84.0
#: difference of the 5th- and 4th-order weights (the 7th stage is the first of the next step: FSAL)
E1, E3, E4, E5, E6, E7 = (71.0 / 57600.0, -71.0 / 16695.0, 71.0 / 1920.0, -17253.0 / 339200.0, 22.0 / 525.0,
                          -1.0 / 40.0)
#: stages, the last one evaluated at the new point
N_STAGES = 7

# ------------------------------------------------------------ step-size controller (as in scipy's rk.py)
#: multiply the optimal factor by this, so the next step is likely accepted
SAFETY = 0.9
#: smallest and largest factor after an accepted step
MIN_FACTOR = 0.2
MAX_FACTOR = 5.0
#: smallest factor after a rejected step
MIN_REJECT_FACTOR = 0.1
#: exponents of the error norm: -1 / (error order + 1) after an accepted step, -1 / error order after a rejection
ACCEPT_EXPONENT = -0.2
REJECT_EXPONENT = -0.25


@njit(leaf=True)
def accepted_factor(err):
    """Step growth after an accepted step with error norm ``err`` (<= 1)."""
    if err == 0.0:
        return MAX_FACTOR
    return min(MAX_FACTOR, max(MIN_FACTOR, SAFETY * err ** ACCEPT_EXPONENT))


@njit(leaf=True)
def rejected_factor(err):
    """Step shrink after a step rejected with error norm ``err`` (> 1)."""
    return max(MIN_REJECT_FACTOR, SAFETY * err ** REJECT_EXPONENT)


@njit(inline="always")
def step(fun, args, t, y, h, k, ynew, yerr, tmp):
    """One Dormand-Prince step of size h from (t, y) with k[0] = f(t, y) given: fills k[1..6] with the stages
    (k[6] = f(t + h, ynew), the next step's k[0]), ``ynew`` with the 5th-order solution and ``yerr`` with the
    local error estimate. ``tmp`` is scratch of y's size."""
    n = y.shape[0]
    k1, k2, k3, k4, k5, k6, k7 = k[0], k[1], k[2], k[3], k[4], k[5], k[6]
    for j in range(n):
        tmp[j] = y[j] + h * A21 * k1[j]
    fun(t + C2 * h, tmp, args, k2)
    for j in range(n):
        tmp[j] = y[j] + h * (A31 * k1[j] + A32 * k2[j])
    fun(t + C3 * h, tmp, args, k3)
    for j in range(n):
        tmp[j] = y[j] + h * (A41 * k1[j] + A42 * k2[j] + A43 * k3[j])
    fun(t + C4 * h, tmp, args, k4)
    for j in range(n):
        tmp[j] = y[j] + h * (A51 * k1[j] + A52 * k2[j] + A53 * k3[j] + A54 * k4[j])
    fun(t + C5 * h, tmp, args, k5)
    for j in range(n):
        tmp[j] = y[j] + h * (A61 * k1[j] + A62 * k2[j] + A63 * k3[j] + A64 * k4[j] + A65 * k5[j])
    fun(t + h, tmp, args, k6)
    for j in range(n):
        ynew[j] = y[j] + h * (B1 * k1[j] + B3 * k3[j] + B4 * k4[j] + B5 * k5[j] + B6 * k6[j])
    fun(t + h, ynew, args, k7)
    for j in range(n):
        yerr[j] = h * (E1 * k1[j] + E3 * k3[j] + E4 * k4[j] + E5 * k5[j] + E6 * k6[j] + E7 * k7[j])
