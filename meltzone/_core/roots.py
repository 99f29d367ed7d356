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
