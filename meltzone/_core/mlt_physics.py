"""Physics of the mixing-length scheme: enthalpy inversion per cell and the heat flux through every face.

The equations, sources and ranges are described in :mod:`meltzone.evolution.mixing_length`. Cells are the
interior's mantle nodes (CMB -> surface; rows G_* of the boundary-layer grid); faces 0 (CMB) .. n (surface)
carry the rows F_* of :mod:`meltzone._core.layout`. Fluxes are positive outward (upward) [W/m^2].
"""

from __future__ import annotations

import math

from ..melting import LAW_LINEAR
from ._jit import njit
from .layout import (F_DR, F_G, F_L, F_LM, F_P, F_R, F_RATIO, F_RHO, G_AUX1, G_AUX2, G_F, G_P, G_R, G_TLIQ,
                     G_TSOL, P_ALPHA, P_CM, P_K, P_KAPPA, P_LATENT, P_RA_CR)
from .melt import melt_fraction
from .physics import activation_enthalpy, log_viscosity_grad, viscosity
from .radiation import net_radiation
from .roots import illinois

#: bisection tolerance of the enthalpy inversion [K] for laws without a closed-form inverse
T_XTOL = 1.0e-11
#: the super-adiabatic temperature difference below which a boundary layer carries no heat [K]
DT_MIN = 1.0e-12
#: rows of the per-cell work array: dT/dh [K kg/J], ln eta [ln Pa s], d ln eta / dh [kg/J], activation enthalpy
#: [J/mol] (constant)
CW_DTDH, CW_LN_ETA, CW_DLN_ETA, CW_H_ACT = range(N_CW := 4)


@njit(leaf=True)
def cell_state(h, grid, i, law, par):
    """(T [K], phi) of cell i from its specific enthalpy h = c_p T + L phi(T, P_i) [J/kg].

    h rises monotonically with T (phi never falls with T), so the inverse is unique: closed form below the
    solidus, above the liquidus and inside the interval for the linear law; bisection otherwise."""
    c = par[P_CM]
    lat = par[P_LATENT]
    tsol = grid[G_TSOL, i]
    tliq = grid[G_TLIQ, i]
    if h <= c * tsol:
        return h / c, 0.0
    if h >= c * tliq + lat:
        return (h - lat) / c, 1.0
    if lat <= 0.0:
        t = h / c
        return t, melt_fraction(t, tsol, tliq, grid[G_AUX1, i], grid[G_AUX2, i], law)
    if law == LAW_LINEAR:  # c T + L (T - Ts) / (Tl - Ts) = h
        width = tliq - tsol
        t = tsol + (h - c * tsol) / (c + lat / width)
        return t, min(max((t - tsol) / width, 0.0), 1.0)
    lo = tsol
    hi = tliq
    a1 = grid[G_AUX1, i]
    a2 = grid[G_AUX2, i]
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if c * mid + lat * melt_fraction(mid, tsol, tliq, a1, a2, law) > h:
            hi = mid
        else:
            lo = mid
        if hi - lo <= T_XTOL:
            break
    t = 0.5 * (lo + hi)
    return t, melt_fraction(t, tsol, tliq, a1, a2, law)


@njit(leaf=True)
def cell_activation(grid, par, cells):
    """Fill the row CW_H_ACT of ``cells`` with each cell's activation enthalpy [J/mol] at its pressure."""
    for i in range(grid.shape[1]):
        cells[CW_H_ACT, i] = activation_enthalpy(grid[G_P, i], par)


@njit(leaf=True)
def cell_log_viscosity(t, phi, h_act, t_floor, par):
    """(ln eta, d ln eta / dT, d ln eta / dphi) of a cell [Pa s] at its own T, phi and pressure (activation
    enthalpy h_act [J/mol]; the boundary-layer scheme's law, :func:`meltzone._core.physics.log_viscosity_grad`);
    in mobile-lid mode the temperature is raised to ``t_floor`` (the interior's adiabat at the cell), so that the
    cold top stays as mobile as the interior (0 in stagnant-lid mode: the lid emerges from the viscosity)."""
    ln_eta, d_t, d_phi = log_viscosity_grad(max(t, t_floor), h_act, phi, par)
    return ln_eta, d_t if t >= t_floor else 0.0, d_phi


@njit(leaf=True)
def cell_slope(h, t, grid, i, law, par):
    """(dT/dh, dphi/dh) of cell i at enthalpy h (temperature t): 1 / c_p and 0 outside the melting interval,
    1 / (c_p + L dphi/dT) inside it (the derivative of the law by a centred difference of 1e-6 K)."""
    c = par[P_CM]
    tsol = grid[G_TSOL, i]
    tliq = grid[G_TLIQ, i]
    if h <= c * tsol or h >= c * tliq + par[P_LATENT]:
        return 1.0 / c, 0.0
    if law == LAW_LINEAR:
        dphi_dt = 1.0 / (tliq - tsol)
    else:
        dt = 1e-6
        a1 = grid[G_AUX1, i]
        a2 = grid[G_AUX2, i]
        up = min(t + dt, tliq)
        down = max(t - dt, tsol)
        dphi_dt = (melt_fraction(up, tsol, tliq, a1, a2, law) - melt_fraction(down, tsol, tliq, a1, a2, law)) / (
            up - down)
    dt_dh = 1.0 / (c + par[P_LATENT] * dphi_dt)
    return dt_dh, dphi_dt * dt_dh


@njit(leaf=True)
def interior_flux(ha, hb, ta, tb, cells, a, b, faces, j, dh_jac, par):
    """(F, dF/dh_a, dF/dh_b): heat flux [W/m^2] up through internal face j between cell a = j-1 (below) and
    b = j (above), and its derivatives in the two cells' enthalpies. ``cells`` holds per cell the rows CW_*
    (dT/dh, ln eta and d ln eta / dh); ``dh_jac`` [J/kg]: the least enthalpy excess at which the
    slopes are taken (0: exact).

    Conduction -k (T_b - T_a) / dr plus mixing-length convection rho kappa_h (h_ad - h_b) / dr where
    h_ad = h_a + c_p T_a (f_b / f_a - 1) is the enthalpy of cell a's parcel taken adiabatically to b (two-phase
    adiabat c_p dT + L dphi = alpha T dP / rho, with alpha / (rho c_p) dP = d ln f of the interior's adiabat).
    Super-adiabatic gradient s = (h_ad - h_b) / (c_p dr) [K/m]; kappa_h = min(alpha g l^4 s / (18 nu),
    (alpha g l^4 s / 16)^(1/2)) (viscous and inertial mixing length, Abe 1997; Bower et al. 2018), nu = eta / rho
    with eta the geometric mean of the two cells' viscosities, each at its own T, phi and pressure. This
    model's choice, as for any coefficient that varies over orders of magnitude between neighbouring volumes
    (Patankar 1980, Numerical Heat Transfer and Fluid Flow, ch. 4, interface coefficients from the cells' own
    values rather than from interpolated properties; from memory). Unlike the viscosity at the cells' mean melt
    fraction it does not depend on a cell whose melt fraction sits at phi_c (the blend's slope is zero there),
    so a top cell that reaches phi_c does not shut off its own supply. The derivatives are in closed form
    (F_visc ~ dh^2 / eta, F_inert ~ dh^(3/2), ln eta = (ln eta_a + ln eta_b) / 2)."""
    dr = faces[F_DR, j]
    c = par[P_CM]
    kc = par[P_K] / dr
    q = -kc * (tb - ta)
    d_a = kc * cells[CW_DTDH, a]
    d_b = -kc * cells[CW_DTDH, b]
    ratio = faces[F_RATIO, j]
    dh = ha + c * ta * (ratio - 1.0) - hb
    el = faces[F_LM, j]
    # the Jacobian's slopes are taken at least at dh_jac [J/kg] (0: exact slopes): the convective flux and its
    # slope vanish at the onset dh = 0, and a Newton step linearised there switches convection on one cell per
    # iteration
    if el > 0.0 and dh > -dh_jac:
        rho = faces[F_RHO, j]
        eta = math.exp(0.5 * (cells[CW_LN_ETA, a] + cells[CW_LN_ETA, b]))
        geo = par[P_ALPHA] * faces[F_G, j] * el ** 4 / (c * dr)  # alpha g l^4 s = geo dh
        if dh > 0.0:
            q += rho * min(geo * dh * rho / (18.0 * eta), math.sqrt(geo * dh / 16.0)) * dh / dr
        dh_s = max(dh, dh_jac)
        k_visc = geo * dh_s * rho / (18.0 * eta)
        k_inert = math.sqrt(geo * dh_s / 16.0)
        ddh_a = 1.0 + c * (ratio - 1.0) * cells[CW_DTDH, a]
        if k_visc < k_inert:
            f_s = rho * k_visc * dh_s / dr
            df_ddh = 2.0 * f_s / dh_s
            d_a += df_ddh * ddh_a - 0.5 * f_s * cells[CW_DLN_ETA, a]
            d_b += -df_ddh - 0.5 * f_s * cells[CW_DLN_ETA, b]
        else:
            f_s = rho * k_inert * dh_s / dr
            df_ddh = 1.5 * f_s / dh_s
            d_a += df_ddh * ddh_a
            d_b -= df_ddh
    return q, d_a, d_b


@njit(leaf=True)
def boundary_flux(dt, t_visc, phi, faces, j, t_floor, par):
    """Flux [W/m^2] across a thermal boundary layer at an outer face (CMB j = 0, surface j = n) driven by the
    temperature difference dt [K]: k dt / delta with delta = (kappa eta Ra_cr / (alpha rho g |dt|))^(1/3)
    (local critical Rayleigh number, Stevenson, Spohn & Schubert 1983), at most the distance F_DR from the
    face to its cell's centroid, a quarter node spacing (then plain conduction)."""
    half = faces[F_DR, j]
    if abs(dt) <= DT_MIN:
        return par[P_K] * dt / half
    eta = viscosity(max(t_visc, t_floor), faces[F_P, j], phi, par)
    delta = (par[P_KAPPA] * eta * par[P_RA_CR] / (par[P_ALPHA] * faces[F_RHO, j] * faces[F_G, j] * abs(dt))) \
        ** (1.0 / 3.0)
    return par[P_K] * dt / min(delta, half)


@njit(leaf=True)
def _surface_residual(ts, args):
    t_top, phi_top, faces, j, t_floor, rad, par = args
    return boundary_flux(t_top - ts, t_top, phi_top, faces, j, t_floor, par) - net_radiation(ts, rad)


@njit(leaf=True)
def surface_flux(t_top, phi_top, faces, j, t_floor, rad, par):
    """(q [W/m^2], T_s [K]) at the surface: T_s balances the top boundary layer's flux with the net radiation
    of ``rad`` (:func:`meltzone._core.radiation.radiation_state`: the boundary-layer scheme's laws;
    eps sigma (T_s^4 - T_eq^4) without a star and steam). The balance falls monotonically in T_s; Illinois
    regula falsi on [min(T_rad, T_top), max(T_rad, T_top)] (T_rad: no net radiation), to 1e-13 of T_s (the
    Newton iteration differentiates the result)."""
    lo = min(rad[3], t_top)
    hi = max(rad[3], t_top)
    ts = illinois(_surface_residual, (t_top, phi_top, faces, j, t_floor, rad, par), lo, hi, 200, 1e-13, 0.0)
    return net_radiation(ts, rad), ts


@njit(leaf=True)
def surface_flux_slope(ts, t_top, phi_top, t1, phi1, dh, faces, j, t_floor, rad, par):
    """dq/dh [W/m^2 / (J/kg)] of :func:`surface_flux` in the top cell's enthalpy, without a second root solve:
    dq/dh = dR/dT_s dT_s/dh with dT_s/dh = -(dg/dh) / (dg/dT_s) on the balance g(T_s, h) = 0 (implicit function
    theorem; R: the net radiation of ``rad``, 4 eps sigma T_s^3 for a grey body); dg/dh by a difference to
    (t1, phi1), the state at h + dh, dg/dT_s and dR/dT_s by differences in T_s."""
    q0 = boundary_flux(t_top - ts, t_top, phi_top, faces, j, t_floor, par)
    dg_dh = (boundary_flux(t1 - ts, t1, phi1, faces, j, t_floor, par) - q0) / dh
    e = 1e-7 * abs(t_top - ts) + 1e-7
    e_r = 1e-7 * ts + 1e-7
    d_rad = (net_radiation(ts + e_r, rad) - net_radiation(ts - e_r, rad)) / (2.0 * e_r)
    dg_dts = -(boundary_flux(t_top - ts + e, t_top, phi_top, faces, j, t_floor, par) - q0) / e - d_rad
    return -d_rad * dg_dh / dg_dts


@njit(leaf=True)
def surface_adiabat_state(h_u, t_u, iu, grid, law, par):
    """(T [K], phi) at the surface (the top cell's pressure and curves) of the two-phase adiabat through cell
    ``iu`` (enthalpy h_u, temperature t_u): h_s = h_u + c_p T_u (f_top / f_u - 1), the discrete isentrope of
    :func:`interior_flux` (c_p dT + L dphi = alpha T dP / rho with alpha dP / (rho c_p) = d ln f), inverted with
    the top cell's solidus and liquidus. With ``iu`` the top convecting cell this is the melt fraction at the top
    of the convecting mantle with the upper boundary layer taken away (the boundary-layer scheme's regime
    melt fraction: the isentrope's at the surface)."""
    top = grid.shape[1] - 1
    h_s = h_u + par[P_CM] * t_u * (grid[G_F, top] / grid[G_F, iu] - 1.0)
    return cell_state(h_s, grid, top, law, par)


@njit(leaf=True)
def cmb_flux(tc, t0, grid, law, faces, t_floor, par):
    """Flux [W/m^2] out of the core into the lowest cell: boundary layer on the temperature difference
    T_c - T_0 (the boundary-layer scheme's lower layer), viscosity of the layer's material at its mean temperature
    (T_c + T_0) / 2, with the melt fraction of that temperature at the CMB's pressure (this model's choice: the
    lowest cell's own melt fraction made the layer's viscosity, which spans orders of magnitude across the
    rheological transition, follow the cell's size; measured 1 M_E CMB heat flow at 1 Myr 3.0e14, 1.3e15, 1.9e15 W
    at 256, 512, 1024 nodes with it, 3.3e14, 3.7e14, 3.6e14 W with the layer's own)."""
    tm = 0.5 * (tc + t0)
    phi_m = melt_fraction(tm, grid[G_TSOL, 0], grid[G_TLIQ, 0], grid[G_AUX1, 0], grid[G_AUX2, 0], law)
    return boundary_flux(tc - t0, tm, phi_m, faces, 0, t_floor, par)


@njit(leaf=True)
def adiabat_floor(h_mid, mid, grid, law, par, floors):
    """Temperature floors [K] of the cell viscosities in mobile-lid mode: the adiabat through cell ``mid``,
    T_mid f(r_i) / f(r_mid)."""
    t_mid, _ = cell_state(h_mid, grid, mid, law, par)
    for i in range(floors.shape[0]):
        floors[i] = t_mid * grid[G_F, i] / grid[G_F, mid]


@njit
def rigid_mixing_length(cells, grid, faces, contrast):
    """Fill the face row F_LM with the mixing length bounded by the nearest rigid region above each face: the
    geometric F_L (distance to the nearer boundary), or, if less, the distance up to the first point where the
    viscosity has risen by the factor exp(``contrast``) over the face's own (ln eta of the cells, row CW_LN_ETA,
    linear in radius between the face and the cells' centres). A stagnant lid is then a rigid boundary for the
    mantle under it, as the surface is for a mobile lid. Only faces whose nearer boundary is the surface are
    bounded: the lid extends the upper boundary, while the hot lower boundary layer, whose viscosity also rises
    upward, keeps its distance to the core (bounded there, it grew conductively to ~500 km at 5 M_E and then
    overturned at a time that depended on the grid). ``contrast`` <= 0: F_L unchanged."""
    n = cells.shape[1]
    faces[F_LM] = faces[F_L]
    if contrast <= 0.0:
        return
    r_cmb = faces[F_R, 0]
    r_top = faces[F_R, n]
    for j in range(1, n):
        if faces[F_R, j] - r_cmb < r_top - faces[F_R, j]:
            continue
        base = 0.5 * (cells[CW_LN_ETA, j - 1] + cells[CW_LN_ETA, j])
        target = base + contrast
        el = faces[F_L, j]
        r0 = faces[F_R, j]
        r_prev = r0
        v_prev = base
        for i in range(j, n):
            ri = grid[G_R, i]
            vi = cells[CW_LN_ETA, i]
            if r_prev - r0 >= el:  # the segment starts beyond the nearer boundary
                break
            if vi >= target:
                frac = (target - v_prev) / (vi - v_prev) if vi > v_prev else 1.0
                el = min(el, r_prev - r0 + frac * (ri - r_prev))
                break
            r_prev = ri
            v_prev = vi
        faces[F_LM, j] = el
