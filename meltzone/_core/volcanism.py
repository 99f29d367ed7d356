"""Volcanism of the boundary-layer scheme: melt extraction, the heat pipe, crust growth and outgassing.

:func:`volcanism` fills the diagnostics D_MPROD ... D_UCONV at a state; :func:`rhs` adds them to the right-hand
side of :func:`meltzone._core.physics.rhs` (the form the integrator calls, :func:`rhs_packed`). The equations,
their sources and what is this model's choice are listed at :func:`volcanism`; the friendly layer
(:mod:`meltzone.evolution.volcanism`) documents the config keys. The slow plain reference the tests compare
with is ``tests/reference_volcanism.py``.
"""

from __future__ import annotations

import math

from ._jit import njit
from .layout import (D_DCRUST, D_DELTA_U, D_MPROD, D_QVOLC, D_REGIME, D_TL, D_TS, D_UCONV, D_XCO2, D_XH2O, G_F,
                     G_P, G_R, G_W, P_CM, P_CORE_RADIUS, P_D_CO2, P_ERUPT, P_D_H2O, P_G_SURF, P_KAPPA, P_LATENT,
                     P_LID_MIN, P_MANTLE_MASS, P_P_ECLOGITE, P_P_EXTRACT, P_RADIUS, P_RHO_CRUST,
                     P_RIDGE, P_STAGNANT, P_VOLC, P_X_CO2, P_X_H2O, REGIME_MAGMA_OCEAN, Y_CRUST, Y_EM, Y_LID, Y_OUT, Y_XCO2, Y_XH2O)
from .physics import isentropic_melt, node_melt, smoothstep
from .physics import rhs as energy_rhs

#: Relative width below its largest thickness over which a stagnant-lid crust stops growing (this model's
#: choice: a smooth cut-off keeps the right-hand side continuous)
CRUST_CAP_WIDTH = 0.05


@njit
def convective_velocity(d, delta, par):
    """Convective (plate) velocity [m/s] u = (pi / 4) kappa d / delta^2 of a cell of depth (plate length) d
    whose upper thermal boundary layer is delta.

    Half-space cooling of a plate of length d moving at u has the mean flux 2 k dT / sqrt(pi kappa d / u)
    (Turcotte & Schubert, Geodynamics, checked); equated with k dT / delta it gives u above. With the
    boundary-layer law delta = d (Ra_cr / Ra)^beta this is u0 (Ra / Ra_cr)^(2 beta) with u0 = pi kappa / (4 d),
    the form of the convective velocity of Morschhauser, Grott & Breuer 2011, Icarus 212:541 (their u0 is a
    constant, ~2e-12 m/s for Mars, from memory; the same order as pi kappa / (4 d) = 5e-13 m/s there).
    kappa is the configured one, as k in the flux k dT / delta it is equated with (the density-dependent
    properties enter only the layer's Rayleigh number, at its base)."""
    return 0.25 * math.pi * par[P_KAPPA] * d / (delta * delta)


@njit
def volcanism(tu, y, diag, grid, par, law):
    """Melt extraction and its consequences at upper-mantle potential temperature ``tu`` and state ``y``,
    after :func:`meltzone._core.physics.diagnose` has filled ``diag``; fills D_MPROD (melt mass extracted
    [kg/s]), D_QVOLC (heat the erupted melt carries to the surface [W]), D_DCRUST (crust growth [m/s]),
    D_XH2O and D_XCO2 (H2O and CO2 the melt takes out of the mantle [kg/s]) and D_UCONV (convective
    velocity [m/s]). All zero in the magma-ocean regime (the ocean is its own melt; in the blend across the
    rheological transition the regime is the magma ocean's and so is the upper boundary layer) and with
    volcanism off: production starts at the rheological switch, where the integrator lands a step.

    * Melt zone (nodes from the surface down, to the deepest pressure melt rises from, P_P_EXTRACT: deeper
      melt is denser than its residue, Stixrude et al. 2009, EPSL 278:226; Kite et al. 2009, ApJ 700:1732;
      from memory). Stagnant lid: the partially molten nodes below the lid, melt fraction at the
      temperature of the profile (linear through the upper boundary layer from T_l, then the adiabat), as in
      Morschhauser et al. 2011. Mobile lid: the melting column under ridges, where the mantle rises to the
      surface: isentropic (batch) melt fraction of the adiabat (McKenzie & Bickle 1988, J. Petrol. 29:625,
      from memory).
    * Production. Stagnant lid (Morschhauser, Grott & Breuer 2011, Icarus 212:541; Grott et al. 2011,
      EPSL 308:391; form from memory): dD_cr/dt = u phi_mean V_mz / V_mantle, here as a melt mass rate
      4 pi R^2 u sum_i(m_i phi_i) / V_mantle (m_i the node masses of the melt zone). Mobile lid (Kite,
      Manga & Gaidos 2009, ApJ 700:1732; from memory): plate speed x ridge length x melt column, two plates
      per ridge: 2 u L_ridge sum_i(rho_i dz_i phi_i), L_ridge = P_RIDGE x 2 pi R. u from
      :func:`convective_velocity` with the convecting depth (stagnant lid) or the mantle depth (mobile lid).
    * Heat (D_QVOLC, out of the mantle and into the heat out): the erupted fraction f_e carries
      c_p (T_melt - T_s) + L per kg to the surface (heat pipe, Moore & Webb 2013, Nature 501:501, abstract
      checked); the intruded rest freezes in the crust and lid and brings them L + c_p (T_melt - T_l), the
      melt's loss of latent heat and excess over the lid base in Morschhauser et al. 2011's mantle energy
      balance (from memory); the lid's heat is that of its conductive profile (a function of T_u and its
      thickness), so that heat leaves through the surface. T_melt: the node's temperature; for the
      isentropic column less the latent heat paid, L phi / c_p; T_l = T_u under a mobile lid. The mantle's mass
      is fixed: the extracted melt returns as cold crust and lid, which the lid's stored heat already counts
      (burial, Moore & Webb 2013). Stagnant lid only: under a mobile lid the melt is made and frozen in the
      plate the upper boundary layer stands for; isentropic upwelling pays its latent heat from the column's own
      sensible heat, and the boundary-layer flux k (T_u - T_s) / delta already carries off the whole column's
      heat from T_u (half-space cooling; Turcotte & Schubert, Geodynamics), so D_QVOLC is 0 there (counting the
      melt's heat as well took it twice: measured 0.6 TW and 35 K colder today for Earth; this model's reading).
    * Crust: grows by the extracted melt's volume (density P_RHO_CRUST) over the sphere at its base. Stagnant
      lid: no thicker than the lid (crust below it is recycled, Morschhauser et al. 2011) nor than the depth
      where its base turns to eclogite, P_P_ECLOGITE / (rho_cr g) (dense eclogite founders; O'Rourke &
      Korenaga 2012, Icarus 221:1043; from memory); growth fades over CRUST_CAP_WIDTH below that cap and crust
      above it is removed at the convective rate u / d_conv. Mobile lid: subducted at the rate plates are
      consumed, D u / d_mantle (this model's choice).
    * Volatiles: batch melting (Shaw 1970, common practice), X_melt = X_mantle / (D + phi (1 - D)) per
      node; X_mantle = initial - extracted / mantle mass. The erupted fraction outgasses all of it (an upper
      bound: no solubility limit at the vent)."""
    diag[D_MPROD] = 0.0
    diag[D_QVOLC] = 0.0
    diag[D_DCRUST] = 0.0
    diag[D_XH2O] = 0.0
    diag[D_XCO2] = 0.0
    diag[D_UCONV] = 0.0
    if par[P_VOLC] < 0.5 or diag[D_REGIME] == REGIME_MAGMA_OCEAN:
        return
    stagnant = par[P_STAGNANT] > 0.5
    r_p = par[P_RADIUS]
    depth = r_p - par[P_CORE_RADIUS]
    delta = max(diag[D_DELTA_U], 1.0)
    d_lid = max(y[Y_LID], par[P_LID_MIN]) if stagnant else 0.0
    d_conv = max(depth - d_lid, 0.05 * depth) if stagnant else depth
    u = convective_velocity(d_conv, delta, par)
    diag[D_UCONV] = u
    crust = max(y[Y_CRUST], 0.0)
    cap = 0.0
    if stagnant:
        cap = min(d_lid, par[P_P_ECLOGITE] / (par[P_RHO_CRUST] * par[P_G_SURF]))
        # crust above its cap is removed at the convective rate (the lid thinned, or its base turned to eclogite)
        diag[D_DCRUST] = min(cap - crust, 0.0) * u / d_conv
    else:
        diag[D_DCRUST] = -crust * u / depth
    cp = par[P_CM]
    lat = par[P_LATENT]
    ts = diag[D_TS]
    tl = diag[D_TL]
    f_e = par[P_ERUPT]
    x_h2o = max(par[P_X_H2O] - y[Y_XH2O] / par[P_MANTLE_MASS], 0.0)
    x_co2 = max(par[P_X_CO2] - y[Y_XCO2] / par[P_MANTLE_MASS], 0.0)
    d_h2o = par[P_D_H2O]
    d_co2 = par[P_D_CO2]
    s_m = 0.0  # sum of m_i phi_i (stagnant) or of phi_i rho_i dz_i (mobile)
    s_q = 0.0
    s_h = 0.0
    s_c = 0.0
    found = False
    for i in range(grid.shape[1] - 1, -1, -1):
        if grid[G_P, i] > par[P_P_EXTRACT]:
            break
        z = r_p - grid[G_R, i]
        if z < d_lid:
            continue
        t_ad = tu * grid[G_F, i]
        if stagnant:
            t = tl + (t_ad - tl) * (z - d_lid) / delta if z < d_lid + delta else t_ad
            phi = node_melt(t, grid, i, law)
        else:
            phi = isentropic_melt(t_ad, grid, i, law, par)
            t = t_ad - lat / cp * phi
        if phi <= 0.0:
            if found and z > d_lid + delta:
                break  # below the melt zone
            continue
        found = True
        m = grid[G_W, i] * phi
        if not stagnant:
            m /= 4.0 * math.pi * grid[G_R, i] ** 2
        s_m += m
        # erupted: to the surface (heat pipe); intruded: freezes in the lid, whose heat is that of its conductive
        # profile (a function of T_u and its thickness), so what it brings above T_l leaves through the surface
        s_q += m * (lat + cp * (f_e * (t - ts) + (1.0 - f_e) * max(t - tl, 0.0)))
        s_h += m * x_h2o / (d_h2o + phi * (1.0 - d_h2o))
        s_c += m * x_co2 / (d_co2 + phi * (1.0 - d_co2))
    if s_m <= 0.0:
        return
    if stagnant:
        v_mantle = 4.0 / 3.0 * math.pi * (r_p ** 3 - par[P_CORE_RADIUS] ** 3)
        k = 4.0 * math.pi * r_p * r_p * u / v_mantle
    else:
        k = 2.0 * u * par[P_RIDGE] * 2.0 * math.pi * r_p
    mprod = k * s_m
    diag[D_MPROD] = mprod
    diag[D_QVOLC] = k * s_q if stagnant else 0.0  # mobile lid: inside the plate's flux (above)
    diag[D_XH2O] = k * s_h
    diag[D_XCO2] = k * s_c
    grow = mprod / (par[P_RHO_CRUST] * 4.0 * math.pi * (r_p - min(crust, 0.5 * r_p)) ** 2)
    if stagnant:
        grow *= smoothstep((cap - crust) / (CRUST_CAP_WIDTH * cap)) if cap > 0.0 else 0.0
    diag[D_DCRUST] += grow


@njit
def rhs(t, y, t_switch, grid, core, iso, par, law, work, diag, dy):
    """dy/dt with volcanism: :func:`meltzone._core.physics.rhs`, less the heat the erupted melt carries to the
    surface (added to the heat out, so the budget still closes), plus the crust and the extracted volatiles."""
    energy_rhs(t, y, t_switch, grid, core, iso, par, law, work, diag, dy)
    volcanism(work[0], y, diag, grid, par, law)
    q = diag[D_QVOLC]
    dy[Y_EM] -= q
    dy[Y_OUT] += q
    dy[Y_CRUST] = diag[D_DCRUST]
    dy[Y_XH2O] = diag[D_XH2O]
    dy[Y_XCO2] = diag[D_XCO2]


@njit(inline="always")
def rhs_packed(t, y, args, dy):
    """:func:`rhs` with its inputs in one tuple (t_switch, grid, core, iso, par, law, work, diag), the form the
    stepper of :mod:`meltzone._core.dopri` calls."""
    t_switch, grid, core, iso, par, law, work, diag = args
    rhs(t, y, t_switch, grid, core, iso, par, law, work, diag, dy)
