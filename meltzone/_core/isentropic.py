"""Melt fractions of the boundary-layer scheme's mantle nodes: the batch (equilibrium) value, the isentropic value
of a parcel that rose from below its solidus, and the isentropic value at the top of the convecting mantle that
sets a solidified mantle's regime (:func:`meltzone._core.physics.diagnose`)."""

from __future__ import annotations

from ._jit import njit
from ..melting import LAW_LINEAR
from .layout import G_AUX1, G_AUX2, G_F, G_TLIQ, G_TSOL, P_CM, P_LATENT, P_LID_MIN, P_STAGNANT
from .melt import melt_fraction
from .properties import depth_index
from .roots import bisect

#: Absolute tolerance of the isentropic melt fraction's bisection
PHI_XTOL = 1e-13


@njit
def node_melt(t, grid, i, law):
    return melt_fraction(t, grid[G_TSOL, i], grid[G_TLIQ, i], grid[G_AUX1, i], grid[G_AUX2, i], law)


@njit
def _isentropic_residual(x, args):
    t, lc, tsol, tliq, aux1, aux2, law = args
    return x - melt_fraction(t - lc * x, tsol, tliq, aux1, aux2, law)


@njit
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
    return bisect(_isentropic_residual, args, 0.0, hi, PHI_XTOL, 0.0, 60)


@njit
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
