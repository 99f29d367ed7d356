"""The one bracketing root finder of the core: bisection on a function passed as a first-class argument.

``bisect(f, args, lo, hi, xtol_abs, xtol_rel, maxiter)`` halves [lo, hi] around the root of ``f(x, args)``,
which must be <= 0 at ``lo`` and > 0 at ``hi`` (increasing through the root); it stops after ``maxiter``
halvings or once hi - lo <= xtol_abs + xtol_rel * midpoint, and returns the bracket's midpoint. Bisection
needs only the sign, so it suits the monotone but kinked functions of the melt-fraction laws (common
practice). The finder is inlined where it is called, so that each caller compiles its own copy against the
function it passes and stays cacheable (a function passed as a runtime value would not be).
"""

from __future__ import annotations

from ._jit import njit


@njit(inline="always")
def bisect(f, args, lo, hi, xtol_abs, xtol_rel, maxiter):
    """Midpoint of the final bracket of the root of ``f(x, args)`` in [lo, hi] (f(lo) <= 0 < f(hi))."""
    for _ in range(maxiter):
        mid = 0.5 * (lo + hi)
        if f(mid, args) > 0.0:
            hi = mid
        else:
            lo = mid
        if hi - lo <= xtol_abs + xtol_rel * mid:
            break
    return 0.5 * (lo + hi)


@njit(inline="always")
def illinois(f, args, lo, hi, maxiter, xtol_rel, step_rel):
    """Root of ``f(x, args)``, which falls through zero on [lo, hi], by the Illinois variant of regula falsi
    (Dowell & Jarratt 1971, BIT 11:168; common practice): lo if f(lo) <= 0, hi if f(hi) >= 0; stops when the
    bracket is narrower than xtol_rel * hi, f vanishes, or an iterate moves less than step_rel of itself."""
    g_lo = f(lo, args)
    g_hi = f(hi, args)
    side = 0
    x = lo
    prev = -1.0
    for _ in range(maxiter):
        if g_lo <= 0.0:
            x = lo
            break
        if g_hi >= 0.0:
            x = hi
            break
        x = (lo * g_hi - hi * g_lo) / (g_hi - g_lo)
        if not (lo < x < hi):
            x = 0.5 * (lo + hi)
        g = f(x, args)
        if g > 0.0:
            lo, g_lo = x, g
            if side == -1:
                g_hi *= 0.5
            side = -1
        else:
            hi, g_hi = x, g
            if side == 1:
                g_lo *= 0.5
            side = 1
        if hi - lo < xtol_rel * hi or g == 0.0 or abs(x - prev) < step_rel * x:
            break
        prev = x
    return x
