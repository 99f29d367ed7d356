"""The one bracketing root finder of the core: bisection on a function passed as a first-class argument.

``bisect(f, args, lo, hi, xtol_abs, xtol_rel, maxiter)`` halves [lo, hi] around the root of ``f(x, args)``,
which must be <= 0 at ``lo`` and > 0 at ``hi`` (increasing through the root); it stops after ``maxiter``
halvings or once hi - lo <= xtol_abs + xtol_rel * midpoint, and returns the bracket's midpoint. Bisection
needs only the sign, so it suits the monotone but kinked functions of the melt-fraction laws (common
practice). The finder is inlined where it is called, so that each caller compiles its own copy against the
function it passes and stays cacheable (a function passed as a runtime value would not be).
"""

from __future__ import annotations

import math

from ._jit import njit


@njit(inline="always")
def bisect(f, args, lo, hi, xtol_abs, xtol_rel, maxiter):
    """Midpoint of the final bracket of the root of ``f(x, args)`` in [lo, hi] (f(lo) <= 0 < f(hi))."""
    return bisect_known(f, args, lo, hi, xtol_abs, xtol_rel, maxiter, -math.inf, math.inf)


@njit(inline="always")
def bisect_known(f, args, lo, hi, xtol_abs, xtol_rel, maxiter, below, above):
    """:func:`bisect` told where the sign of ``f`` is already known: f <= 0 at and left of ``below``, f > 0 at
    and right of ``above`` (the caller has checked both with a margin; f increases). The same midpoints, the
    same decisions and so the same result bit for bit as :func:`bisect`, without evaluating ``f`` outside
    (below, above): a tight bracket leaves a few evaluations of the ~log2(width / xtol) halvings. The halvings
    before the first midpoint inside run without a branch on their outcome (it is unpredictable)."""
    done = 0
    while done < maxiter:
        mid = 0.5 * (lo + hi)
        if not (mid <= below or mid >= above):
            break
        up = mid >= above
        hi = mid if up else hi
        lo = lo if up else mid
        done += 1
        if hi - lo <= xtol_abs + xtol_rel * mid:
            return 0.5 * (lo + hi)
    for _ in range(done, maxiter):
        mid = 0.5 * (lo + hi)
        if mid <= below:
            up = False
        elif mid >= above:
            up = True
        else:
            up = f(mid, args) > 0.0
        if up:
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
