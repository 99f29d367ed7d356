"""The basal magma ocean of the boundary-layer scheme: its extent at a core temperature, and the heat per kg
that crystallised ocean melt carries into the mantle's reservoir (sources in :func:`basal_ocean`; the scheme's
friendly layer, :mod:`meltzone.evolution.boundary_layer`, describes the energy bookkeeping)."""

from __future__ import annotations

import math

from ._jit import njit
from .layout import (G_AUX1, G_AUX2, G_F, G_R, G_TLIQ, G_TSOL, G_W, P_BMO, P_BMO_DEP, P_BMO_ENRICH, P_BMO_MREF,
                     P_BMO_TREF, P_CM, P_CORE_RADIUS, P_LATENT)
from .melt import melt_fraction


@njit(leaf=True)
def _depression_scale(t_sol, t_ref):
    """Factor on the basal melt's depression at a node of solidus t_sol [K]: t_sol / t_ref, or 1 when t_ref <= 0
    (constant depression; see :func:`basal_ocean`)."""
    if t_ref <= 0.0:
        return 1.0
    return t_sol / t_ref


@njit(leaf=True)
def _ocean_melting_point(t_sol, m, par):
    """Melting point [K] of the basal ocean's melt of mass m (composition: the crystallised fraction 1 - m / M_ref)
    where the mantle solidus is t_sol: t_sol - (dT0 + dT_fe (1 - m / M_ref)) x the depression's scale."""
    return t_sol - (par[P_BMO_DEP] + par[P_BMO_ENRICH] * (1.0 - m / par[P_BMO_MREF])) * _depression_scale(
        t_sol, par[P_BMO_TREF])


@njit(leaf=True)
def _segment_bisection(tc, t_max, t_a, t_b, m0, m1, lo, hi, par):
    """Root in [lo, hi] of the curve at the hottest point minus tc on one segment, by bisection (the fallback of
    :func:`_segment_root`)."""
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        if _ocean_melting_point(max(t_max, t_a + mid * (t_b - t_a)), m0 + mid * (m1 - m0), par) <= tc:
            lo = mid
        else:
            hi = mid
        if hi - lo <= 1e-15:
            break
    return 0.5 * (lo + hi)


@njit(leaf=True)
def _segment_root(tc, t_max, t_a, t_b, m0, m1, s_end, par):
    """Position s in [0, s_end] between two nodes (solidus t_a -> t_b, mass below m0 -> m1, both linear in s) where
    the ocean's curve at its hottest point, _ocean_melting_point(max(t_max, t_a + s (t_b - t_a)), m0 + s (m1 -
    m0)), reaches tc; the curve is below tc at s = 0 and above it at s_end and rises strictly with s.

    In closed form (algebra on the curve of :func:`_ocean_melting_point`): while the running maximum t_max is the
    hottest point the curve is linear in s; where the node's solidus exceeds it, it is linear in s for a constant
    depression and quadratic (solidus x scale, both linear) with the solidus scaling. A candidate outside its piece
    or off the curve by more than 1e-11 of tc (round-off) falls back to bisection."""
    dt = t_b - t_a
    dm = m1 - m0
    t_ref = par[P_BMO_TREF]
    d_all = par[P_BMO_DEP] + par[P_BMO_ENRICH]
    k_m = par[P_BMO_ENRICH] / par[P_BMO_MREF]  # d(depression) / d(mass) before the scale
    s_star = s_end  # where the linear solidus passes the running maximum
    if dt > 0.0:
        s_star = min(max((t_max - t_a) / dt, 0.0), s_end)
    s = -1.0
    if s_star > 0.0 and _ocean_melting_point(t_max, m0 + s_star * dm, par) >= tc:
        scale = t_max / t_ref if t_ref > 0.0 else 1.0
        slope = k_m * scale * dm
        if slope > 0.0:
            s = (tc - _ocean_melting_point(t_max, m0, par)) / slope
        lo, hi = 0.0, s_star
    else:
        if t_ref > 0.0:  # (t_a + s dt) (c0 + c1 s) = tc
            c0 = 1.0 - (d_all - k_m * m0) / t_ref
            c1 = k_m * dm / t_ref
            a2 = dt * c1
            a1 = t_a * c1 + dt * c0
            a0 = t_a * c0 - tc
            if abs(a2) * s_end <= 1e-12 * abs(a1):
                if a1 != 0.0:
                    s = -a0 / a1
            else:
                disc = a1 * a1 - 4.0 * a2 * a0
                if disc >= 0.0:
                    q = -0.5 * (a1 + math.copysign(math.sqrt(disc), a1))
                    s1 = q / a2
                    s2 = a0 / q if q != 0.0 else -1.0
                    s = s1 if s_star - 1e-12 <= s1 <= s_end + 1e-12 else s2
        else:  # t_a + s dt - d_all + k_m (m0 + s dm) = tc
            den = dt + k_m * dm
            if den > 0.0:
                s = (tc - t_a + d_all - k_m * m0) / den
        lo, hi = s_star, s_end
    if lo - 1e-12 <= s <= hi + 1e-12:
        s = min(max(s, lo), hi)
        if abs(_ocean_melting_point(max(t_max, t_a + s * dt), m0 + s * dm, par) - tc) <= 1e-11 * tc:
            return s
    return _segment_bisection(tc, t_max, t_a, t_b, m0, m1, lo, hi, par)


@njit(leaf=True)
def basal_ocean(tc, grid, par):
    """Basal magma ocean at core temperature tc: (r_b, M_b, x_b) = radius of its top [m], mass [kg] and position
    of its top in node units (j + s between nodes j and j + 1).

    Well mixed at the temperature of the top of the core (Labrosse, Hernlund & Coltice 2007, Nature 450:866), so
    of one composition: iron-enriched melt whose melting curve is the mantle solidus on the nodes lowered by
    dT0 + dT_fe (1 - M_b / M_ref), the depression dT0 at the reference composition, enriching further as it
    crystallises (FeO incompatible; linear in the crystallised fraction of M_ref: this model's choice after
    Labrosse et al. 2007 and Blanc, Stegman & Ziegler 2020, EPSL 534). With a reference solidus
    T_ref = par[P_BMO_TREF] > 0 both terms scale with the local solidus, times T_sol / T_ref: the freezing-point
    depression of an ideal solution at a fixed composition and entropy of fusion is proportional to the melting
    temperature (van 't Hoff / cryoscopic relation, common practice; the same form T_m / (1 - ln x0) as the
    cryoscopic solidus of Stixrude 2014, Phil. Trans. R. Soc. A 372:20130076, from memory), so dT0 and dT_fe hold at
    T_ref and grow with the solidus at super-Earth pressures; T_ref = 0 keeps them constant.

    The ocean is molten where tc is above that curve at every depth it spans, i.e. above the curve at its hottest
    point (the largest solidus below its top): M_b solves tc = T_max(M_b) - dT(M_b), T_max(M) the largest solidus
    below the mass M. Crystals form where the melt first reaches its curve and, lighter than the iron-rich melt
    (residual melts denser than every coexisting solid at deep-mantle pressures; dense melt segregates from
    lighter solids wherever they form: Boukare et al. 2025, Nature, doi:10.1038/s41586-025-08701-z; abstracts
    checked, see :mod:`meltzone.evolution.boundary_layer`), collect at its top, so M_b is also the mantle mass below r_b
    (linear between nodes: the node's shell mass centred on it, so that the thickness is not a node count). T_max
    - dT rises strictly with M_b, so the ocean thins continuously as the core cools. (Placing the top where tc
    meets the curve at the top alone left the melt below it under its own melting point, and where the solidus
    falls upward faster than the enrichment lifts the curve, at large M_ref, that curve had no crossing: the whole
    ocean froze at one core temperature and the step size collapsed.) Capped at M_ref; large M_ref are a
    sensitivity test only, as the top can then lie above the undepressed solidus of the mantle over it (measured
    +660 K at M_ref = 0.33 of a 1 M_E mantle), which this rule does not melt into the ocean. None (the core
    radius, 0, 0) when switched off or tc is below the curve at the CMB."""
    r_c = par[P_CORE_RADIUS]
    if par[P_BMO] < 0.5:
        return r_c, 0.0, 0.0
    m_ref = par[P_BMO_MREF]
    t_max = grid[G_TSOL, 0]
    if tc <= _ocean_melting_point(t_max, 0.0, par):
        return r_c, 0.0, 0.0
    n = grid.shape[1]
    m_prev = 0.0
    cum = 0.0
    for j in range(1, n):
        cum += grid[G_W, j - 1]
        m = cum + 0.5 * grid[G_W, j]
        t_a = grid[G_TSOL, j - 1]
        t_b = grid[G_TSOL, j]
        s_end = 1.0
        if m >= m_ref:
            s_end = (m_ref - m_prev) / (m - m_prev)
        m_end = m_ref if s_end < 1.0 else m
        if tc < _ocean_melting_point(max(t_max, t_a + s_end * (t_b - t_a)), m_end, par):
            s = _segment_root(tc, t_max, t_a, t_b, m_prev, m, s_end, par)
            return (grid[G_R, j - 1] + s * (grid[G_R, j] - grid[G_R, j - 1]), m_prev + s * (m - m_prev),
                    j - 1 + s)
        if s_end < 1.0:  # above its melting curve at the cap
            return grid[G_R, j - 1] + s_end * (grid[G_R, j] - grid[G_R, j - 1]), m_ref, j - 1 + s_end
        t_max = max(t_max, t_b)
        m_prev = m
    return grid[G_R, n - 1], m_prev, float(n - 1)


@njit(leaf=True)
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
