"""Physics of the boundary-layer scheme: viscosity, stored heat, surface balance, diagnostics, dy/dt, T(r).

The equations, their sources and ranges are described in :mod:`meltzone.evolution.boundary_layer` (the
scheme's friendly layer) and at each function. State ``y`` (SI, indices Y_*): stored heat of mantle and core
[J], stagnant-lid thickness [m] and the time integral of (surface heat loss - radiogenic heating) [J]. The
temperatures (upper-mantle potential temperature T_u, core temperature T_c) are recovered by inverting the
monotone stored-heat functions.
"""

from __future__ import annotations

import math

import numpy as np

from ..constants import GAS_CONSTANT, STEFAN_BOLTZMANN, YEAR
from ._jit import njit
from .layout import (C_F, C_MCUM, C_R, C_TMELT, C_W, D_ATM_CO2, D_ATM_H2O, D_DELTA_C, D_DELTA_U, D_DLID, D_EPS,
                     D_ETA_C, D_ETA_U, D_H, D_PHI_SURF, D_PHI_TOP, D_QC, D_QS, D_QU, D_REGIME, D_RIC, D_TB, D_TL,
                     D_TS, G_F, G_R, G_W, ISO_DECAY, ISO_HEAT, P_A_RH, P_A_VISC,
                     P_ALPHA, P_ATMOSPHERE, P_BETA, P_BLEND, P_CC, P_CM, P_CORE_RADIUS, P_E_ACT,
                     P_ETA_LIQ, P_G_CMB, P_G_SURF, P_K, P_KAPPA, P_LATENT, P_LID_MIN,
                     P_MANTLE_MASS, P_MELT_WEAK, P_NU_A, P_P_CMB, P_P_EXTRACT, P_P_TOP, P_PHI_C, P_PHI_RETAIN,
                     P_RA_CR, P_RADIUS, P_RETAIN, P_RHO_MANTLE, P_RHO_TOP, P_VOLC,
                     P_STAGNANT, P_START_AGE, P_T_EQ, P_V_ACT, P_V_DECAY, P_V_INF, REGIME_MAGMA_OCEAN,
                     REGIME_MOBILE_LID, REGIME_STAGNANT_LID, Y_EC, Y_EM, Y_LID, Y_OUT)
from .basal import basal_ocean, basal_top_energy
from .inner_core import inner_core_heat
from .lid import lid_growth, lid_heat_temperature, smoothstep, smoothstep_slope
from .properties import at_depth, depth_index, property_factors
from .layout import D_MB, D_RB, G_P, G_RHO, P_BMO, P_BMO_MREF, P_RA_VISC, RA_VISC_MID, RA_VISC_SURFACE
from .layout import Y_OG_CO2, Y_OG_H2O
from .isentropic import PHI_XTOL, isentropic_melt, isentropic_top_melt, node_melt  # noqa: F401
from .roots import bisect, illinois
from .layout import (D_ABS, D_DISSOLVED, D_ESCAPE, D_LOST, D_OCEAN, D_OLR, D_P_CO2, D_P_H2O, P_H2O_SOL_C,
                     P_H2O_SOL_E, P_STEAM, Y_WATER)
from .radiation import (atmosphere_mass, condense, escape_rate, net_radiation, radiation_state,  # noqa: F401
                        thin_weight, volatiles)

#: the grey atmosphere's H2O solubility, X = 6.8e-8 P^0.7 (P in Pa; as used by Lebrun et al. 2013)
GREY_H2O_COEFF, GREY_H2O_EXPONENT = 6.8e-8, 0.7

# Flags and indices passed between kernels as typed values, not literals: numba compiles one specialization per
# literal argument value, so ``f(0)`` and ``f(1)`` would compile ``f`` twice (the cold start's cost)
MANTLE, CORE = np.int64(0), np.int64(1)
BOTTOM = np.int64(0)
NO, YES = np.bool_(False), np.bool_(True)

#: Temperature bracket of the stored-heat inversion [K]
T_MIN, T_MAX = 10.0, 2.0e5
#: Time over which a lid thins back to its minimum where the top is molten [s] (this model's choice)
LID_RELAX_TIME = 1.0e3 * YEAR


@njit(leaf=True)
def activation_enthalpy(p, par):
    """E + integral of V(P) dP with V(P) = V_inf + (V0 - V_inf) exp(-P / P_d) [J/mol]; E + P V0 when P_d = 0.

    A decaying activation volume keeps the deep mantles of super-Earths from the astronomically
    high viscosities of a constant V (Stamenkovic et al. 2012, ApJ 748:41; Tackley et al. 2013,
    Icarus 225:50 discuss the pressure dependence; the exponential form and P_d here are this
    model's choice, not fitted to those papers). Its high-pressure limit V_inf keeps the activation
    enthalpy rising with the melting temperature (homologous scaling, H ~ g R T_sol with g ~ 21-22
    from 25 GPa to 1.5 TPa on the default solidus; Weertman 1970, from memory): with V_inf = 0, H
    saturates at E + V0 P_d and the solid at its solidus would soften ~1e5 times from 0.1 to 1.5 TPa."""
    pd = par[P_V_DECAY]
    if pd <= 0.0:
        return par[P_E_ACT] + p * par[P_V_ACT]
    v_inf = par[P_V_INF]
    return par[P_E_ACT] + v_inf * p + (par[P_V_ACT] - v_inf) * pd * (1.0 - math.exp(-p / pd))


@njit(leaf=True)
def log_viscosity_grad(t, h_act, phi, par):
    """(ln eta, d ln eta / dT [1/K], d ln eta / dphi) of the effective viscosity [Pa s] at temperature t [K],
    activation enthalpy h_act [J/mol] (of the pressure: :func:`activation_enthalpy`) and melt fraction phi:
    Arrhenius solid with melt weakening, blended across the rheological transition (smoothstep in ln eta over
    P_BLEND above phi_c) into the Einstein-Roscoe suspension; ln eta at most 700 (derivatives 0 there)."""
    solid = math.log(par[P_A_VISC]) + h_act / (GAS_CONSTANT * t) - par[P_MELT_WEAK] * phi
    ds_dt = -h_act / (GAS_CONSTANT * t * t)
    xb = (phi - par[P_PHI_C]) / par[P_BLEND]
    w = smoothstep(xb)
    if w <= 0.0:
        if solid > 700.0:
            return 700.0, 0.0, 0.0
        return solid, ds_dt, -par[P_MELT_WEAK]
    phi_m = 1.0 - par[P_PHI_C]  # maximum packing of crystals
    x = min((1.0 - phi) / phi_m, 0.999)
    susp = math.log(par[P_ETA_LIQ]) - 2.5 * math.log(1.0 - x)
    value = w * susp + (1.0 - w) * solid
    if value > 700.0:
        return 700.0, 0.0, 0.0
    dw = smoothstep_slope(xb) / par[P_BLEND]
    dsusp = -2.5 / (phi_m * (1.0 - x)) if (1.0 - phi) / phi_m < 0.999 else 0.0
    return value, (1.0 - w) * ds_dt, dw * (susp - solid) + w * dsusp - (1.0 - w) * par[P_MELT_WEAK]


@njit(leaf=True)
def log_viscosity(t, h_act, phi, par):
    """ln of the effective viscosity [Pa s] (:func:`log_viscosity_grad` without the derivatives)."""
    return log_viscosity_grad(t, h_act, phi, par)[0]


@njit(leaf=True)
def viscosity(t, p, phi, par):
    """Effective viscosity [Pa s] at temperature t [K], pressure p [Pa] and melt fraction phi."""
    return math.exp(log_viscosity(t, activation_enthalpy(p, par), phi, par))


@njit(leaf=True)
def lid_mass(d, par):
    r = par[P_RADIUS]
    ri = max(r - d, 0.0)
    return par[P_RHO_TOP] * (4.0 * math.pi / 3.0) * (r ** 3 - ri ** 3)


@njit(leaf=True)
def lid_base_temperature(tu, par):
    """T_l = T_u - a_rh R T_u^2 / E (stagnant lid), at least 1 K above the equilibrium temperature (with a star,
    the run's lowest: meltzone.star.lowest_luminosity) and never above T_u: the lid's base is never hotter than
    the mantle under it (a lid base above T_u drains the mantle through the lid whatever T_u is)."""
    return min(max(tu - par[P_A_RH] * GAS_CONSTANT * tu * tu / par[P_E_ACT], par[P_T_EQ] + 1.0), tu)


@njit(leaf=True)
def mantle_energy(tu, d, mb, grid, par, law):
    """Stored heat of the mantle [J] relative to 0 K: adiabat sensible + latent, lid corrected. The lowest
    ``mb`` kg (the basal magma ocean, counted with the core) are left out, node by node from the CMB."""
    cm = par[P_CM]
    e = 0.0
    n = grid.shape[1]
    first = 0
    if mb > 0.0:  # the ocean's nodes, whole or in part, from the CMB up (a branch kept out of the main loop:
        # inside it, it made the whole integration ~2x slower)
        rest = mb
        while first < n and rest > 0.0:
            ti = tu * grid[G_F, first]
            cut = min(rest, grid[G_W, first])
            rest -= cut
            e += (grid[G_W, first] - cut) * (cm * ti + par[P_LATENT] * node_melt(ti, grid, first, law))
            first += 1
    for i in range(first, n):
        ti = tu * grid[G_F, i]
        e += grid[G_W, i] * (cm * ti + par[P_LATENT] * node_melt(ti, grid, i, law))
    if par[P_STAGNANT] > 0.5 and d > 0.0:
        ml = lid_mass(d, par)
        e += ml * cm * (lid_heat_temperature(lid_base_temperature(tu, par), par) - tu)
    return e


@njit(leaf=True)
def inner_core(tc, core):
    """Inner-core radius [m] and mass [kg]: where the core adiabat T_c f(r) falls below the melting curve."""
    n = core.shape[1]
    g_prev = tc * core[C_F, 0] - core[C_TMELT, 0]
    if g_prev >= 0.0:
        return 0.0, 0.0
    for j in range(1, n):
        g = tc * core[C_F, j] - core[C_TMELT, j]
        if g >= 0.0:
            s = g_prev / (g_prev - g)
            r = core[C_R, j - 1] + s * (core[C_R, j] - core[C_R, j - 1])
            m = core[C_MCUM, j - 1] + s * (core[C_MCUM, j] - core[C_MCUM, j - 1])
            return r, m
        g_prev = g
    return core[C_R, n - 1], core[C_MCUM, n - 1]


@njit(leaf=True)
def core_energy(tc, grid, core, par):
    """Stored heat of the core [J]: sensible heat on the core adiabat minus latent + gravitational
    energy already released by the inner core (its integral over the inner core's mass, tabulated on the core
    nodes); with a basal magma ocean, plus its sensible heat at tc and its latent heat (the core and the ocean
    are one reservoir of temperature tc)."""
    e = 0.0
    for j in range(core.shape[1]):
        e += core[C_W, j] * par[P_CC] * tc * core[C_F, j]
    e = e - inner_core_heat(tc, core)
    if par[P_BMO] > 0.5:
        r_b, m_b, x_b = basal_ocean(tc, grid, par)
        e += m_b * (par[P_CM] * tc + par[P_LATENT])
    return e


@njit(leaf=True)
def radiogenic_power(t, iso, par):
    """Radiogenic heating of the mantle [W] at model time t [s]: sum_i H_i,today exp(lambda_i (age0 - t))."""
    h = 0.0
    for i in range(iso.shape[0]):
        h += iso[i, ISO_HEAT] * math.exp(iso[i, ISO_DECAY] * (par[P_START_AGE] - t))
    return h * par[P_MANTLE_MASS]


@njit(leaf=True)
def contact_weight(phi_top, par):
    """Share [0-1] of the adiabat's melt that the atmosphere's volatiles dissolve in: 1 while the top of the
    mantle is above the rheological transition (a surface magma ocean), 0 once it is below (the melt of a
    solid mantle, under a lid or a solid surface, is sealed off from the atmosphere), joined over the same
    melt-fraction width P_BLEND as the viscosity and the fluxes (smoothstep). The melt's water and CO2 are
    in solubility equilibrium with the atmosphere only while the magma ocean reaches the surface (Lebrun et
    al. 2013, JGR Planets 118:1155; Hamano et al. 2013, Nature 497:607; the solubility laws hold at a melt's
    free surface; from memory). Without it, a stagnant-lid mantle warming under a 200 km lid drew 5e20 kg of
    water out of the atmosphere into its sub-lid melt."""
    return smoothstep((phi_top - par[P_PHI_C]) / par[P_BLEND])


@njit(leaf=True)
def melt_mass_adiabat(tu, grid, law):
    m = 0.0
    for i in range(grid.shape[1]):
        m += grid[G_W, i] * node_melt(tu * grid[G_F, i], grid, i, law)
    return m


@njit(leaf=True)
def _stored_heat_residual(t, args):
    kind, e, d, mb, grid, core, par, law = args
    return (mantle_energy(t, d, mb, grid, par, law) if kind == 0 else core_energy(t, grid, core, par)) - e


@njit(leaf=True)
def _invert(kind, e, d, mb, grid, core, par, law, guess, slope):
    """Temperature [K] whose stored heat is ``e``, and the last slope dE/dT: mantle (kind 0, lid d) or
    core (kind 1).

    Newton's first step with the caller's slope (the previous call's, > 0) or a centred difference, then
    secant steps; bisection on [T_MIN, T_MAX] if that fails. Both stored-heat functions rise monotonically
    with temperature."""
    t0 = min(max(guess, T_MIN), T_MAX)
    f0 = (mantle_energy(t0, d, mb, grid, par, law) if kind == 0 else core_energy(t0, grid, core, par)) - e
    s = slope
    if not s > 0.0:
        hh = 1e-3 * max(1.0, 1e-4 * t0)
        if kind == 0:
            s = (mantle_energy(t0 + hh, d, mb, grid, par, law) - mantle_energy(t0 - hh, d, mb, grid, par, law)) / (
                2 * hh)
        else:
            s = (core_energy(t0 + hh, grid, core, par) - core_energy(t0 - hh, grid, core, par)) / (2 * hh)
    scale = abs(e) + 1.0
    for _ in range(40):
        if abs(f0) <= 1e-14 * scale:
            return t0, s
        if not s > 0.0:
            break
        t1 = t0 - f0 / s
        if not (T_MIN <= t1 <= T_MAX):
            break
        f1 = (mantle_energy(t1, d, mb, grid, par, law) if kind == 0 else core_energy(t1, grid, core, par)) - e
        if f1 != f0 and t1 != t0:
            s_new = (f1 - f0) / (t1 - t0)
            if s_new > 0.0:
                s = s_new
        if abs(t1 - t0) <= 1e-12 * t0:
            return t1, s
        t0 = t1
        f0 = f1
    return bisect(_stored_heat_residual, (kind, e, d, mb, grid, core, par, law), T_MIN, T_MAX, 0.0, 1e-12,
                  200), 0.0


@njit(leaf=True)
def temperatures(y, grid, core, par, law, work):
    """(T_u, T_c) of the energy state y; ``work`` = (T_u, T_c, dE_m/dT_u, dE_c/dT_c) of the last solution,
    the starting point of the next (a slope <= 0 asks for a fresh centred difference)."""
    d = max(y[Y_LID], 0.0) if par[P_STAGNANT] > 0.5 else 0.0
    # the core (and basal ocean) first: the ocean's mass, a function of T_c, is left out of the mantle's heat
    if core[C_W].sum() > 0.0:
        tc, work[3] = _invert(CORE, y[Y_EC], 0.0, 0.0, grid, core, par, law, work[1], work[3])
    else:
        tc = work[1]
    mb = basal_ocean(tc, grid, par)[1]
    tu, work[2] = _invert(MANTLE, y[Y_EM], d, mb, grid, core, par, law, work[0], work[2])
    work[0] = tu
    work[1] = tc
    return tu, tc


@njit(leaf=True)
def energy_state(tu, tc, d_lid, out, grid, core, par, law, y):
    """Fill y from temperatures (the inverse of :func:`temperatures`); ``out`` is Y_OUT."""
    mb = basal_ocean(tc, grid, par)[1]
    y[Y_EM] = mantle_energy(tu, max(d_lid, 0.0) if par[P_STAGNANT] > 0.5 else 0.0, mb, grid, par, law)
    y[Y_EC] = core_energy(tc, grid, core, par)
    y[Y_LID] = d_lid
    y[Y_OUT] = out


@njit(leaf=True)
def temperature_rates(tu, tc, d_lid, dy, grid, core, par, law):
    """(dT_u/dt, dT_c/dt) from the energy rates dy (for the step control, history and interpolation)."""
    d = max(d_lid, 0.0) if par[P_STAGNANT] > 0.5 else 0.0
    mb = basal_ocean(tc, grid, par)[1]
    h_t = 1e-3 * max(1.0, 1e-4 * tu)
    dem_dtu = (mantle_energy(tu + h_t, d, mb, grid, par, law)
               - mantle_energy(tu - h_t, d, mb, grid, par, law)) / (2 * h_t)
    dem_dd = 0.0
    if par[P_STAGNANT] > 0.5 and d_lid > 0.0:
        dml = par[P_RHO_TOP] * 4.0 * math.pi * (par[P_RADIUS] - d_lid) ** 2
        dem_dd = dml * par[P_CM] * (lid_heat_temperature(lid_base_temperature(tu, par), par) - tu)
    h_c = 1e-3 * max(1.0, 1e-4 * tc)
    dec = (core_energy(tc + h_c, grid, core, par) - core_energy(tc - h_c, grid, core, par)) / (2 * h_c)
    dtc = dy[Y_EC] / dec if dec > 0.0 else 0.0
    if 0.0 < mb < par[P_BMO_MREF]:  # the mantle gains (loses) the crystallised (molten) mass at the ocean's top
        dmb = (basal_ocean(tc + h_c, grid, par)[1] - basal_ocean(tc - h_c, grid, par)[1]) / (2 * h_c)
        dtu = (dy[Y_EM] - dem_dd * dy[Y_LID] + basal_top_energy(tu, mb, grid, par, law) * dmb * dtc) / dem_dtu
    else:
        dtu = (dy[Y_EM] - dem_dd * dy[Y_LID]) / dem_dtu
    return dtu, dtc


@njit(leaf=True)
def top_layer_thickness(d_conv, ra, solid, par):
    """Upper thermal boundary layer [m]: delta = D (Ra_cr / Ra)^beta / a, i.e. Nu = a (Ra / Ra_cr)^beta,
    capped at the convecting depth D. ``solid``: the configured (a, beta) of the solid mantle, which
    applies once the top has first reached the rheological transition; otherwise (the magma ocean, and
    the solid branch of the blend before that) the classical form a = 1, beta = 1/3 (Stevenson et al. 1983;
    soft turbulence in the magma ocean)."""
    if solid:
        return min(d_conv * (par[P_RA_CR] / ra) ** par[P_BETA] / par[P_NU_A], d_conv)
    return min(d_conv * (par[P_RA_CR] / ra) ** (1.0 / 3.0), d_conv)


#: Fixed-point passes locating the base of the upper boundary layer (solid_viscosity)
RA_POINT_PASSES = 3


@njit(leaf=True)
def weakening_melt(phi, p, par):
    """Melt fraction that weakens the solid mantle at batch melt fraction phi and pressure p [Pa]: at most phi_c;
    where melt is extracted (volcanism on, no deeper than P_P_EXTRACT; the caller is past the rheological switch)
    and P_RETAIN is on, at most the retained fraction P_PHI_RETAIN: melt leaves its source once it connects, at
    porosities of ~0.1-2% (McKenzie 1984, J. Petrol. 25:713, compaction; Faul 2001, Nature 410:920, abstract
    checked: geochemical models have it segregate at ~0.1%, seismic data suggest more is retained)."""
    cap = par[P_PHI_C]
    if par[P_RETAIN] > 0.5 and par[P_VOLC] > 0.5 and p <= par[P_P_EXTRACT]:
        cap = min(cap, par[P_PHI_RETAIN])
    return min(phi, cap)


@njit(leaf=True)
def solid_viscosity(tu, d_lid, phi_surf, grid, par, law):
    """Viscosity [Pa s] of the solidified mantle's upper boundary layer, with alpha / kappa at the same point folded
    in (Ra ~ alpha / (kappa eta)); where, by P_RA_VISC (properties.py): the surface at T_u with the surface melt
    fraction (the rule before the switch existed); the base of the upper boundary layer below the top of the
    convecting mantle (the lid's base, or the surface), at the adiabat's temperature, pressure and batch melt
    fraction there, the layer's thickness by RA_POINT_PASSES fixed-point passes (this model's choice); or half
    way down the convecting mantle. Melt weakening at most up to phi_c, and where melt is extracted at most up to
    the retained fraction (:func:`weakening_melt`)."""
    mode = par[P_RA_VISC]
    if mode < 0.5 + RA_VISC_SURFACE:
        return viscosity(tu, par[P_P_TOP], weakening_melt(phi_surf, par[P_P_TOP], par), par)
    d_top = max(d_lid, par[P_LID_MIN]) if par[P_STAGNANT] > 0.5 else 0.0
    d_conv = max(par[P_RADIUS] - par[P_CORE_RADIUS] - d_top, 0.05 * (par[P_RADIUS] - par[P_CORE_RADIUS]))
    mid = mode > RA_VISC_MID - 0.5
    z = d_top + 0.5 * d_conv if mid else d_top
    d_t = tu - lid_base_temperature(tu, par) if par[P_STAGNANT] > 0.5 else tu - par[P_T_EQ]
    eta = 0.0
    for _ in range(1 if mid else RA_POINT_PASSES):
        j, s = depth_index(z, grid)
        t = tu * (grid[G_F, j] + s * (grid[G_F, j + 1] - grid[G_F, j]))
        phi = (1.0 - s) * node_melt(t, grid, j, law) + s * node_melt(t, grid, j + 1, law)
        fa, fk, fkap = property_factors(grid[G_RHO, j] + s * (grid[G_RHO, j + 1] - grid[G_RHO, j]), par)
        p = grid[G_P, j] + s * (grid[G_P, j + 1] - grid[G_P, j])
        eta = viscosity(t, p, weakening_melt(phi, p, par), par) * fkap / fa
        ra = par[P_ALPHA] * par[P_RHO_MANTLE] * par[P_G_SURF] * d_conv ** 3 * max(d_t, 1e-6) / (par[P_KAPPA] * eta)
        z = d_top + top_layer_thickness(d_conv, ra, YES, par)
    return eta


@njit(leaf=True)
def _surface_balance(stagnant, solid, ts, tu, tl, d_lid, d_conv, dtc, base, rad, par):
    """Conductive flux through the top layer minus net radiated flux at surface temperature ts [W/m^2]
    (``rad``: the radiation state of :func:`meltzone._core.radiation.radiation_state`)."""
    if stagnant:
        q_cond = par[P_K] * (tl - ts) / d_lid
    else:
        ra = base * max(tu - ts + max(dtc, 0.0), 1e-6)
        delta_u = top_layer_thickness(d_conv, ra, solid, par)
        q_cond = par[P_K] * (tu - ts) / delta_u
    return q_cond - net_radiation(ts, rad)


@njit(leaf=True)
def _surface_balance_at(ts, args):
    stagnant, solid, tu, tl, d_lid, d_conv, dtc, base, rad, par = args
    return _surface_balance(stagnant, solid, ts, tu, tl, d_lid, d_conv, dtc, base, rad, par)


@njit(leaf=True)
def _top_boundary(stagnant, solid, tu, tl, d_lid, d_conv, dtc, eta_u, rad, par):
    """(T_s, q_surface, q_u, delta_u) at the top: the surface temperature balances the conductive flux through
    the top layer (boundary layer, or lid over the boundary layer) with the net radiation of ``rad``
    (eps sigma (T_s^4 - T_eq^4) for the bare and grey laws without a star).

    delta_u = D_conv (Ra_cr / Ra)^beta with Ra = alpha rho g dT D_conv^3 / (kappa eta_u) and dT the
    temperature contrast driving convection (top layer plus the CMB excess); Illinois root finding on T_s."""
    t_rad = rad[3]  # where the net radiation vanishes (T_eq without a star)
    t_top = tl if stagnant else tu
    lo = min(t_rad, t_top)
    hi = max(t_top, t_rad)
    delta_u = d_conv
    base = par[P_ALPHA] * par[P_RHO_MANTLE] * par[P_G_SURF] * d_conv ** 3 / (par[P_KAPPA] * eta_u)
    if stagnant:
        ra = base * max(tu - tl + max(dtc, 0.0), 1e-6)
        delta_u = top_layer_thickness(d_conv, ra, solid, par)
    # Illinois (modified regula falsi) on g(T_s) = q_cond - q_rad, which falls monotonically from
    # g(T_rad) >= 0 to g(T_top) <= 0 (both ends swap when the star heats the mantle from above)
    ts = illinois(_surface_balance_at, (stagnant, solid, tu, tl, d_lid, d_conv, dtc, base, rad, par), lo, hi, 100,
                  1e-11, 1e-12)
    if stagnant:
        return ts, par[P_K] * (tl - ts) / d_lid, par[P_K] * (tu - tl) / delta_u, delta_u
    ra = base * max(tu - ts + max(dtc, 0.0), 1e-6)
    delta_u = top_layer_thickness(d_conv, ra, solid, par)
    q = par[P_K] * (tu - ts) / delta_u
    return ts, q, q, delta_u


@njit(leaf=True)
def diagnose(t, tu, tc, d_lid, t_switch, lost, grid, core, iso, par, law, diag, added_h2o, added_co2):
    """Fluxes, boundary layers, surface temperature and regime at (T_u, T_c, lid) and time t; fills ``diag``
    (D_*). ``t_switch``: when the top of the mantle first reached the rheological transition (NOT_YET before);
    ``lost``: the water lost to space so far [kg]; ``added_h2o``, ``added_co2``: volcanically outgassed masses
    [kg] (in the atmosphere's inventory)."""
    tu = max(tu, 1.0)
    tc = max(tc, 1.0)
    d_lid = max(d_lid, 0.0)
    n = grid.shape[1]
    top = n - 1
    depth = par[P_RADIUS] - par[P_CORE_RADIUS]
    law_i = law
    # the regime follows the melt fraction at the top of the convecting mantle: on the adiabat (batch) while
    # the surface magma ocean is above the rheological transition; once the top has first reached it
    # (t >= t_switch), the isentropic value of a solid mantle that melts as it rises, so that a solid
    # mantle does not turn back into a magma ocean as soon as its adiabat crosses phi_c at the surface
    # (under a stagnant lid, at the lid's base: the convecting mantle's top; see isentropic_top_melt)
    phi_surf = node_melt(tu * grid[G_F, top], grid, top, law_i)
    solidified = t >= t_switch
    phi_top = isentropic_top_melt(tu, d_lid, grid, par, law_i) if solidified else phi_surf
    magma = phi_top > par[P_PHI_C]
    stagnant = par[P_STAGNANT] > 0.5 and not magma
    # magma-ocean branch: the suspension viscosity of the same melt fraction that sets the regime, so that
    # both branches meet at phi_c
    eta_u = viscosity(tu, par[P_P_TOP], phi_top, par)
    # the solid-mantle branch of a solidified mantle: melt weakening, but no suspension, up to phi_c; viscosity
    # (and alpha / kappa, folded into it) where the Rayleigh number takes them (properties.py)
    eta_s = solid_viscosity(tu, d_lid, phi_surf, grid, par, law_i) if solidified else eta_u
    r_b, m_b, x_b = basal_ocean(tc, grid, par)
    if m_b > 0.0:  # the lower boundary layer sits on the basal ocean: adiabat and pressure at its top
        j = min(int(x_b), n - 2)
        s = x_b - j
        tb = tu * (grid[G_F, j] + s * (grid[G_F, j + 1] - grid[G_F, j]))
        p_b = grid[G_P, j] + s * (grid[G_P, j + 1] - grid[G_P, j])
        j_b = np.int64(j + 1 if s > 0.5 else j)
    else:
        tb = tu * grid[G_F, 0]
        p_b = par[P_P_CMB]
        j_b = BOTTOM
    dtc = tc - tb
    # bottom boundary layer (local critical Rayleigh number)
    t_mean_c = 0.5 * (tc + tb)
    phi_c = node_melt(t_mean_c, grid, j_b, law_i)
    eta_c = viscosity(t_mean_c, p_b, phi_c, par)
    fa_c, fk_c, fkap_c = property_factors(grid[G_RHO, j_b], par)  # at the bottom layer (properties.py)
    if abs(dtc) > 1e-9 and par[P_G_CMB] > 0.0:
        delta_c = (par[P_KAPPA] * fkap_c * eta_c * par[P_RA_CR] / (par[P_ALPHA] * fa_c * par[P_RHO_MANTLE]
                                                                     * par[P_G_CMB] * abs(dtc))) ** (1.0 / 3.0)
        delta_c = min(delta_c, 0.5 * depth)
        qc = par[P_K] * fk_c * dtc / delta_c
    else:
        delta_c = 0.5 * depth
        qc = 0.0
    # surface radiation (meltzone._core.radiation): bare, grey or steam, under the absorbed stellar flux
    eps, m_h2o, m_co2, dissolved, water, m_melt = 1.0, 0.0, 0.0, 0.0, 0.0, 0.0
    steam = par[P_STEAM] > 0.5
    if steam or par[P_ATMOSPHERE] > 0.5:
        m_melt = contact_weight(phi_top, par) * melt_mass_adiabat(tu, grid, law_i)
        if steam:
            eps, m_h2o, m_co2, dissolved, water = volatiles(m_melt, lost, par[P_H2O_SOL_C], par[P_H2O_SOL_E], par,
                                                          added_h2o, added_co2)
        else:
            eps, m_h2o, m_co2, dissolved, water = volatiles(m_melt, lost, GREY_H2O_COEFF, GREY_H2O_EXPONENT, par,
                                                          added_h2o, added_co2)
    rad = radiation_state(t, eps, steam, par, thin_weight(m_h2o, par))
    # top boundary: the magma ocean (soft-turbulence law) and the solid mantle (the configured law: mobile
    # lid, or the lid over its sublayer in stagnant-lid mode); across the rheological transition
    # (phi_c < phi_top < phi_c + P_BLEND) the two are blended with the same weight as the viscosity,
    # so that the fluxes are continuous in T_u
    w_mo = smoothstep((phi_top - par[P_PHI_C]) / par[P_BLEND])
    ts_m, qs_m, qu_m, du_m = 0.0, 0.0, 0.0, 0.0
    if w_mo > 0.0:
        ts_m, qs_m, qu_m, du_m = _top_boundary(NO, NO, tu, tu, 0.0, depth, dtc, eta_u, rad, par)
    tl = tu
    ddl_sl = 0.0
    ts_s, qs_s, qu_s, du_s = ts_m, qs_m, qu_m, du_m
    if w_mo < 1.0:
        if par[P_STAGNANT] > 0.5:
            tl = lid_base_temperature(tu, par)
            d_eff = max(d_lid, par[P_LID_MIN])
            d_conv = max(depth - d_eff, 0.05 * depth)
            ts_s, qs_s, qu_s, du_s = _top_boundary(YES, solidified, tu, tl, d_eff, d_conv, dtc, eta_s,
                                                    rad, par)
            qu_s *= property_factors(at_depth(d_eff, grid, G_RHO), par)[1]  # k at the lid's base
            ddl_sl = lid_growth(qs_s, qu_s, tu, tl, par)  # the lid's growth law (lid.py)
        else:
            ts_s, qs_s, qu_s, du_s = _top_boundary(NO, solidified, tu, tu, 0.0, depth, dtc, eta_s, rad, par)
    if w_mo <= 0.0:
        ts_m, qs_m, qu_m, du_m = ts_s, qs_s, qu_s, du_s
    qs = w_mo * qs_m + (1.0 - w_mo) * qs_s
    qu = w_mo * qu_m + (1.0 - w_mo) * qu_s
    ts = w_mo * ts_m + (1.0 - w_mo) * ts_s
    delta_u = du_m if magma else du_s
    # lid: grows by the stagnant-lid law, thins back to its minimum over ~1 kyr where the top is molten
    diag[D_DLID] = (1.0 - w_mo) * ddl_sl + w_mo * (par[P_LID_MIN] - d_lid) / LID_RELAX_TIME
    r_ic, m_ic = inner_core(tc, core)
    diag[D_QS] = qs
    diag[D_QU] = qu
    diag[D_QC] = qc
    diag[D_TS] = ts
    diag[D_DELTA_U] = delta_u
    diag[D_DELTA_C] = delta_c
    diag[D_TL] = tl
    diag[D_H] = radiogenic_power(t, iso, par)
    if magma:
        diag[D_REGIME] = REGIME_MAGMA_OCEAN
    elif stagnant:
        diag[D_REGIME] = REGIME_STAGNANT_LID
    else:
        diag[D_REGIME] = REGIME_MOBILE_LID
    diag[D_PHI_TOP] = phi_top
    diag[D_PHI_SURF] = phi_surf
    diag[D_RIC] = r_ic
    diag[D_ETA_U] = eta_u if magma else eta_s
    diag[D_ETA_C] = eta_c
    diag[D_TB] = tb
    diag[D_EPS] = eps
    diag[D_ATM_CO2] = m_co2
    diag[D_RB] = r_b
    diag[D_MB] = m_b
    ocean = 0.0
    if steam:  # condensation at the surface temperature found (the radiation used the vapour before it)
        m_h2o, ocean, dissolved = condense(ts, water, m_melt, m_h2o, dissolved, par)
    area = 4.0 * math.pi * par[P_RADIUS] ** 2
    diag[D_ATM_H2O] = m_h2o
    diag[D_ABS] = STEFAN_BOLTZMANN * rad[2]
    diag[D_OLR] = qs + diag[D_ABS]
    diag[D_OCEAN] = ocean
    diag[D_DISSOLVED] = dissolved
    diag[D_LOST] = lost
    diag[D_P_H2O] = m_h2o * par[P_G_SURF] / area
    diag[D_P_CO2] = m_co2 * par[P_G_SURF] / area
    diag[D_ESCAPE] = escape_rate(t, m_h2o, ocean, par) if water > 0.0 else 0.0


@njit(leaf=True)
def rhs(t, y, t_switch, grid, core, iso, par, law, work, diag, dy):
    """dy/dt at (t, y); also fills ``diag`` and leaves (T_u, T_c) in ``work``."""
    tu, tc = temperatures(y, grid, core, par, law, work)
    d_lid = y[Y_LID]
    # the volcanically outgassed volatiles are in the atmosphere (zero without volcanism)
    diagnose(t, tu, tc, d_lid, t_switch, y[Y_WATER], grid, core, iso, par, law, diag, y[Y_OG_H2O], y[Y_OG_CO2])
    area_s = 4.0 * math.pi * par[P_RADIUS] ** 2
    area_c = 4.0 * math.pi * diag[D_RB] ** 2  # the core's radius, or the basal ocean's top
    q_surf = diag[D_QS] * area_s
    q_cmb = diag[D_QC] * area_c if core[C_W].sum() > 0.0 else 0.0
    heat = diag[D_H]
    ddl = diag[D_DLID] if par[P_STAGNANT] > 0.5 else 0.0
    mb = diag[D_MB]
    if 0.0 < mb < par[P_BMO_MREF]:  # (at its cap, M_ref, the ocean's mass does not change with T_c)
        # the ocean's top moves with T_c: mass that crystallises (melts) there leaves (joins) the core + ocean
        # reservoir with the heat per kg the mantle function counts for it, e_top; the rest of its heat (latent,
        # and sensible above the adiabat) stays in the reservoir. dE_c/dt = -Q_b + e_top dM_b/dT_c dT_c/dt with
        # dE_c/dt = E_c'(T_c) dT_c/dt, so dT_c/dt = -Q_b / (E_c' - e_top M_b'); both exchanges cancel in the sum
        h_c = 1e-3 * max(1.0, 1e-4 * tc)
        dmb = (basal_ocean(tc + h_c, grid, par)[1] - basal_ocean(tc - h_c, grid, par)[1]) / (2 * h_c)
        transfer = 0.0
        if dmb != 0.0:
            dec = (core_energy(tc + h_c, grid, core, par) - core_energy(tc - h_c, grid, core, par)) / (2 * h_c)
            e_top = basal_top_energy(tu, mb, grid, par, law)
            transfer = e_top * dmb * (-q_cmb / (dec - e_top * dmb))
        dy[Y_EM] = -q_surf + q_cmb + heat - transfer
        dy[Y_EC] = -q_cmb + transfer
    else:
        dy[Y_EM] = -q_surf + q_cmb + heat
        dy[Y_EC] = -q_cmb
    dy[Y_LID] = ddl
    dy[Y_OUT] = q_surf - heat
    dy[Y_WATER] = diag[D_ESCAPE]


@njit(leaf=True)
def profile(tu, tc, d_lid, diag, grid, par, law, temp, phi):
    """Temperature T(r) and melt fraction on the mantle nodes (CMB -> surface).

    Adiabat T_u f(r) between a top layer (linear from T_s to the adiabat over delta_u, below the
    conductive lid in stagnant-lid mode) and a bottom layer (linear from T_c over delta_c)."""
    n = grid.shape[1]
    ts = diag[D_TS]
    tl = diag[D_TL]
    du = max(diag[D_DELTA_U], 1e-6)
    dc = max(diag[D_DELTA_C], 1e-6)
    stagnant = diag[D_REGIME] == REGIME_STAGNANT_LID
    d_lid = max(d_lid, par[P_LID_MIN]) if stagnant else 0.0
    r_top = par[P_RADIUS]
    r_c = diag[D_RB]  # the core's radius, or the basal ocean's top
    ocean = diag[D_MB] > 0.0
    for i in range(n):
        t_ad = tu * grid[G_F, i]
        z = r_top - grid[G_R, i]
        if stagnant and z < d_lid:
            t = ts + (tl - ts) * z / d_lid
        elif stagnant and z < d_lid + du:
            t = tl + (t_ad - tl) * (z - d_lid) / du
        elif z < du:
            t = ts + (t_ad - ts) * z / du
        else:
            t = t_ad
        h = grid[G_R, i] - r_c
        if ocean and h < 0.0:  # inside the basal magma ocean, at the core's temperature (phi: the mantle's melt
            t = tc             # law, which does not know the ocean's enrichment; its extent is its own series)
        elif h < dc:
            t = tc + (t - tc) * h / dc
        temp[i] = t
        phi[i] = node_melt(t, grid, i, law)


@njit(leaf=True)
def profile_at(t, tu, tc, d_lid, t_switch, lost, grid, core, iso, par, law, temp, phi, diag, added_h2o, added_co2):
    """T(r), phi(r) and diagnostics at given temperatures, water lost and outgassed masses [kg] (snapshots and
    event refinement; see :func:`diagnose`)."""
    diagnose(t, tu, tc, d_lid, t_switch, lost, grid, core, iso, par, law, diag, added_h2o, added_co2)
    profile(tu, tc, d_lid, diag, grid, par, law, temp, phi)
