"""Melt fractions of the boundary-layer scheme's mantle nodes: the batch (equilibrium) value, the isentropic value
of a parcel that rose from below its solidus, and the isentropic value at the top of the convecting mantle that
sets a solidified mantle's regime (:func:`meltzone._core.physics.diagnose`)."""

from __future__ import annotations

import math

from ._jit import njit
from .layout import G_AUX1, G_AUX2, G_F, G_TLIQ, G_TSOL, P_CM, P_LATENT, P_LID_MIN, P_STAGNANT
from ..melting import KATZ_BETA1, KATZ_BETA2, LAW_KATZ2003, LAW_LINEAR
from .melt import melt_fraction
from .properties import depth_index
from .roots import bisect_known

#: Absolute tolerance of the isentropic melt fraction's bisection
PHI_XTOL = 1e-13


@njit(leaf=True)
def node_melt(t, grid, i, law):
    return melt_fraction(t, grid[G_TSOL, i], grid[G_TLIQ, i], grid[G_AUX1, i], grid[G_AUX2, i], law)


@njit(leaf=True)
def _isentropic_residual(x, args):
    t, lc, tsol, tliq, aux1, aux2, law = args
    return x - melt_fraction(t - lc * x, tsol, tliq, aux1, aux2, law)


@njit(leaf=True)
def isentropic_melt(t, grid, i, law, par):
    """Melt fraction phi = phi_eq(t - (L / c_p) phi) at node i: the batch melt of a parcel that rose
    adiabatically from below its solidus and paid the latent heat of its melt (the batch limit of
    isentropic decompression melting, McKenzie & Bickle 1988, J. Petrol. 29:625; from memory). It ignores
    the steeper adiabat of a melting parcel. The linear law's fixed point in closed form, phi = min((t - T_sol) /
    (T_liq - T_sol + L / c_p), 1) (t - L phi / c_p then lies between the curves; the bisection it replaces, in
    every evaluation of the volcanism's melt column, agreed within PHI_XTOL and cost 5-20% of the demo's warm run);
    other laws by bisection: phi - phi_eq(t - L phi / c) rises with phi."""
    lc = par[P_LATENT] / par[P_CM]
    hi = node_melt(t, grid, i, law)
    if hi <= 0.0 or lc <= 0.0:
        return hi
    if law == LAW_LINEAR:
        return min((t - grid[G_TSOL, i]) / (grid[G_TLIQ, i] - grid[G_TSOL, i] + lc), 1.0)
    # plain floats in the tuple: no reference counting in the hot loop
    args = (t, lc, grid[G_TSOL, i], grid[G_TLIQ, i], grid[G_AUX1, i], grid[G_AUX2, i], law)
    # a Newton estimate of the root, checked on both sides with a margin, tells the bisection where the sign is
    # known: the same result, bit for bit, with ~5 instead of ~43 evaluations of the melt law
    below, above = -math.inf, math.inf
    if SAFETY * residual_noise(args) < 0.25 * KNOWN_MARGIN:
        r = _newton_root(args, hi)
        if _isentropic_residual(r - KNOWN_MARGIN, args) < -0.25 * KNOWN_MARGIN:
            below = r - KNOWN_MARGIN
        if _isentropic_residual(r + KNOWN_MARGIN, args) > 0.25 * KNOWN_MARGIN:
            above = r + KNOWN_MARGIN
    return bisect_known(_isentropic_residual, args, 0.0, hi, PHI_XTOL, 0.0, 60, below, above)


#: Half width [melt fraction] of the bracket around the Newton estimate outside which the bisection of
#: :func:`isentropic_melt` takes the residual's sign as known. The residual x - phi_eq(t - L x / c_p) rises with
#: slope >= 1, and in floating point it is off by at most :func:`residual_noise` (~1e-15: T ~ 2e3 K rounded to
#: ~2e-13 K, times d phi / dT ~ 2e-3 / K, plus the law's own rounding); where SAFETY times that is below
#: KNOWN_MARGIN / 4, a residual checked beyond -+KNOWN_MARGIN / 4 at the bracket's ends fixes the computed sign
#: everywhere beyond them (elsewhere the plain bisection runs). PHI_XTOL apart, the ~2-4 halvings that end
#: inside this bracket are the only ones evaluated (this model's choice)
KNOWN_MARGIN = 2.0e-13
#: factor on the rounding bound of the residual (:func:`residual_noise`) below KNOWN_MARGIN / 4
SAFETY = 4.0
#: unit round-off of float64 (2^-53)
UNIT_ROUNDOFF = 2.0 ** -53
#: Newton iterations of the estimate (from the linearised root it converges in ~3; a poor estimate only costs
#: the evaluations the bisection then makes)
NEWTON_ITERATIONS = 6


@njit(leaf=True)
def _melt_slope(u, tsol, tliq, aux1, aux2, law):
    """d phi_eq / dT [1/K] of :func:`meltzone._core.melt.melt_fraction` at u (0 outside the melting range;
    for the estimate only: its rounding does not reach the result)."""
    if u <= tsol or u >= tliq:
        return 0.0
    if law == LAW_LINEAR:
        return 1.0 / (tliq - tsol)
    if law == LAW_KATZ2003:
        if u < aux1:
            return KATZ_BETA1 * aux2 * ((u - tsol) / (aux1 - tsol)) ** (KATZ_BETA1 - 1.0) / (aux1 - tsol)
        return KATZ_BETA2 * (1.0 - aux2) * ((u - aux1) / (tliq - aux1)) ** (KATZ_BETA2 - 1.0) / (tliq - aux1)
    return math.nan


@njit(leaf=True)
def residual_noise(args):
    """Bound of the rounding error of :func:`_isentropic_residual` [melt fraction]: the melt law's largest slope
    times the rounding of its argument t - L x / c_p (x <= 1; two roundings of at most u (t + L / c_p) each, u
    the unit round-off), plus 8 u for the law's arithmetic and the difference (the Katz law's slopes are largest
    at the ends of its branches for exponents >= 1: beta aux2 / (aux1 - T_sol), beta (1 - aux2) / (T_liq -
    aux1)); infinite for another law (the linear law never gets here: :func:`isentropic_melt` solves it in
    closed form)."""
    t, lc, tsol, tliq, aux1, aux2, law = args
    if law == LAW_KATZ2003 and KATZ_BETA1 >= 1.0 and KATZ_BETA2 >= 1.0:
        slope = max(KATZ_BETA1 * aux2 / (aux1 - tsol), KATZ_BETA2 * (1.0 - aux2) / (tliq - aux1))
    else:
        return math.inf
    return slope * 2.0 * UNIT_ROUNDOFF * (abs(t) + lc) + 8.0 * UNIT_ROUNDOFF


@njit(leaf=True)
def _newton_root(args, hi):
    """Estimate of the root of :func:`_isentropic_residual` in [0, hi]: Newton's method from the root of the
    residual linearised at x = 0, kept inside the bracket that the residual's signs maintain (bisection where a
    step leaves it)."""
    t, lc, tsol, tliq, aux1, aux2, law = args
    lo = 0.0
    x = hi / (1.0 + lc * _melt_slope(t, tsol, tliq, aux1, aux2, law))
    for _ in range(NEWTON_ITERATIONS):
        u = t - lc * x
        f = x - melt_fraction(u, tsol, tliq, aux1, aux2, law)
        if f > 0.0:
            hi = x
        else:
            lo = x
        step = f / (1.0 + lc * _melt_slope(u, tsol, tliq, aux1, aux2, law))
        x_new = x - step
        if not lo < x_new < hi:
            x_new = 0.5 * (lo + hi)
        if abs(x_new - x) <= 1e-3 * KNOWN_MARGIN:
            return x_new
        x = x_new
    return x


@njit(leaf=True)
def isentropic_top_melt(tu, d_lid, grid, par, law):
    """Isentropic melt fraction of the adiabat at the top of a solidified convecting mantle: the surface
    (mobile lid), or the stagnant lid's base, depth max(D_lid, D_min) (linear between the nodes there). Judged
    at the surface under a lid, a mantle that warms under a thick lid turned back into a magma ocean while
    hundreds of km of rock sat on top (this model's choice: the regime is that of the mantle that convects)."""
    if par[P_STAGNANT] < 0.5:
        top = grid.shape[1] - 1
        return isentropic_melt(tu * grid[G_F, top], grid, top, law, par)
    j, s = depth_index(max(d_lid, par[P_LID_MIN]), grid)
    t = tu * (grid[G_F, j] + s * (grid[G_F, j + 1] - grid[G_F, j]))
    return (1.0 - s) * isentropic_melt(t, grid, j, law, par) + s * isentropic_melt(t, grid, j + 1, law, par)
