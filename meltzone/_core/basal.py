"""The basal magma ocean of the boundary-layer scheme: its extent at a core temperature, and the heat per kg
that crystallised ocean melt carries into the mantle's reservoir (sources in :func:`basal_ocean`; the scheme's
friendly layer, :mod:`meltzone.evolution.boundary_layer`, describes the energy bookkeeping)."""

from __future__ import annotations

from ._jit import njit
from .layout import (G_AUX1, G_AUX2, G_F, G_R, G_TLIQ, G_TSOL, G_W, P_BMO, P_BMO_DEP, P_BMO_ENRICH, P_BMO_MREF,
                     P_BMO_TREF, P_CM, P_CORE_RADIUS, P_LATENT)
from .melt import melt_fraction


@njit
def _depression_scale(t_sol, t_ref):
    """Factor on the basal melt's depression at a node of solidus t_sol [K]: t_sol / t_ref, or 1 when t_ref <= 0
    (constant depression; see :func:`basal_ocean`)."""
    if t_ref <= 0.0:
        return 1.0
    return t_sol / t_ref


@njit
def basal_ocean(tc, grid, par):
    """Basal magma ocean at core temperature tc: (r_b, M_b, x_b) = radius of its top [m], mass [kg] and position
    of its top in node units (j + s between nodes j and j + 1).

    Well mixed at the temperature of the top of the core (Labrosse, Hernlund & Coltice 2007, Nature 450:866);
    its top is where tc meets its melting curve, the mantle solidus on the nodes lowered by
    dT0 + dT_fe (1 - M / M_ref): the iron-enriched melt (depression dT0 at the reference composition) enriches
    further as it crystallises (FeO incompatible; linear in the crystallised fraction of M_ref: this model's
    choice after Labrosse et al. 2007 and Blanc, Stegman & Ziegler 2020, EPSL 534). With a reference solidus
    T_ref = par[P_BMO_TREF] > 0 both terms scale with the local solidus, times T_sol / T_ref: the freezing-point
    depression of an ideal solution at a fixed composition and entropy of fusion is proportional to the melting
    temperature (van 't Hoff / cryoscopic relation, common practice; the same form T_m / (1 - ln x0) as the
    cryoscopic solidus of Stixrude 2014, Phil. Trans. R. Soc. A 372:20130076, from memory), so dT0 and dT_fe hold at
    T_ref and grow with the solidus at super-Earth pressures; T_ref = 0 keeps them constant. M is the mantle mass below
    radius r, linear between nodes (the node's shell mass centred on it), so that the thickness is not a node
    count. Capped at M_ref. None (the core radius, 0, 0) when switched off or tc is below the curve at the CMB."""
    r_c = par[P_CORE_RADIUS]
    if par[P_BMO] < 0.5:
        return r_c, 0.0, 0.0
    dep = par[P_BMO_DEP]
    dfe = par[P_BMO_ENRICH]
    m_ref = par[P_BMO_MREF]
    t_ref = par[P_BMO_TREF]
    g_prev = tc - grid[G_TSOL, 0] + (dep + dfe) * _depression_scale(grid[G_TSOL, 0], t_ref)
    if g_prev <= 0.0:
        return r_c, 0.0, 0.0
    n = grid.shape[1]
    m_prev = 0.0
    cum = 0.0
    for j in range(1, n):
        cum += grid[G_W, j - 1]
        m = cum + 0.5 * grid[G_W, j]
        g = tc - grid[G_TSOL, j] + (dep + dfe * (1.0 - m / m_ref)) * _depression_scale(grid[G_TSOL, j], t_ref)
        s_ref = 2.0
        if m >= m_ref:
            s_ref = (m_ref - m_prev) / (m - m_prev)
            if g_prev + s_ref * (g - g_prev) > 0.0:  # still above its melting curve at the cap
                return grid[G_R, j - 1] + s_ref * (grid[G_R, j] - grid[G_R, j - 1]), m_ref, j - 1 + s_ref
        if g <= 0.0:
            s = g_prev / (g_prev - g)
            return (grid[G_R, j - 1] + s * (grid[G_R, j] - grid[G_R, j - 1]), m_prev + s * (m - m_prev),
                    j - 1 + s)
        g_prev = g
        m_prev = m
    return grid[G_R, n - 1], m_prev, float(n - 1)


@njit
def basal_top_energy(tu, mb, grid, par, law):
    """Stored heat per kg [J/kg] the mantle function counts for mass at the top of a basal ocean of mass mb:
    adiabatic sensible + latent heat of the node whose shell holds that mass (what crystallised basal-ocean
    melt carries into the mantle's reservoir)."""
    rest = mb
    n = grid.shape[1]
    i = 0
    while i < n - 1 and rest >= grid[G_W, i]:
        rest -= grid[G_W, i]
        i += 1
    ti = tu * grid[G_F, i]
    phi = melt_fraction(ti, grid[G_TSOL, i], grid[G_TLIQ, i], grid[G_AUX1, i], grid[G_AUX2, i], law)
    return par[P_CM] * ti + par[P_LATENT] * phi
