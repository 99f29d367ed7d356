"""The numba thermal-evolution kernel: right-hand side, profile, and an adaptive Dormand-Prince integrator.

The only hot code of meltzone. Inputs are plain float64 arrays with named
row/column indices (below); the friendly layer (:mod:`meltzone.evolution`)
builds them from a PlanetSpec and an Interior and wraps the outputs.

State ``y`` (SI): ``Y_TU`` upper-mantle potential temperature [K], ``Y_TC``
temperature at the top of the core [K], ``Y_LID`` stagnant-lid thickness [m],
``Y_OUT`` cumulative (surface heat loss - radiogenic heating) [J], integrated
alongside for the energy-closure check.

Physics (sources and validity in :mod:`meltzone.evolution.convection`,
:mod:`~meltzone.evolution.heating` and :mod:`~meltzone.evolution.surface`,
which hold the NumPy twins used for documentation, plotting and tests):

* boundary-layer scaling q = k dT / D (Ra / Ra_cr)^beta for the upper layer
  (Stevenson, Spohn & Schubert 1983, Icarus 54:466), the bottom layer from the
  local critical Rayleigh number, delta_c = (kappa eta_c Ra_cr / (alpha rho g_c dT_c))^(1/3);
* Arrhenius viscosity eta = A exp[(E + P V)/(R T)] exp(-alpha_phi phi) below the
  rheological transition, Einstein-Roscoe suspension eta_liq (1 - phi_x/phi_m)^-2.5
  above it, blended in log eta over a melt-fraction width of 0.05;
* stagnant lid: rheological temperature scale dT_rh = a_rh R T_u^2 / E
  (Solomatov & Moresi 2000, Phys. Fluids / JGR 105:21795; Grasset & Parmentier 1998),
  lid growth rho c (T_u - T_l) dD/dt = -q_u + k (T_l - T_s) / D;
* surface: the surface temperature balances the flux through the top layer
  with eps sigma (T_s^4 - T_eq^4), eps = 2 / (tau + 2) for a grey atmosphere;
* energy: the stored heat E(y) (sensible heat on the adiabat, latent heat of the
  melt, the lid's conductive profile, core sensible heat and inner-core latent and
  gravitational energy) is one function; the temperature equations are
  dE/dt = -Q_surface + H (mantle and core together), so the budget closes to the
  integrator's accuracy by construction and Y_OUT checks it.
"""

from __future__ import annotations

import math

import numpy as np

from .._jit import njit
from .._melt_kernel import melt_fraction

# ------------------------------------------------------------ state vector
Y_TU, Y_TC, Y_LID, Y_OUT = range(4)
N_Y = 4

# ------------------------------------------------------------ scalar parameters
(P_RADIUS, P_CORE_RADIUS, P_G_SURF, P_G_CMB, P_RHO_MANTLE, P_RHO_TOP, P_K, P_KAPPA, P_ALPHA, P_CM, P_LATENT,
 P_A_VISC, P_E_ACT, P_V_ACT, P_RA_CR, P_BETA, P_A_RH, P_MELT_WEAK, P_ETA_LIQ, P_PHI_C, P_CC, P_LC, P_EG,
 P_T_EQ, P_ATMOSPHERE, P_H2O_TOTAL, P_CO2_TOTAL, P_STAGNANT, P_P_CMB, P_START_AGE, P_LAW, P_DT_MAX, P_RTOL,
 P_T_END, P_H_MAX, P_LID_MIN, P_P_TOP, P_MANTLE_MASS) = range(38)
N_PAR = 38

# ------------------------------------------------------------ mantle grid rows (nodes CMB -> surface)
(G_R, G_P, G_F, G_W, G_TSOL, G_TLIQ, G_AUX1, G_AUX2) = range(8)
N_G = 8
# ------------------------------------------------------------ core grid rows (nodes centre -> CMB)
(C_R, C_F, C_W, C_TMELT, C_MCUM) = range(5)
N_C = 5
# ------------------------------------------------------------ isotopes: rows (heat W/kg of mantle today, decay 1/s)

# ------------------------------------------------------------ diagnostics
(D_QS, D_QU, D_QC, D_TS, D_DELTA_U, D_DELTA_C, D_TL, D_H, D_REGIME, D_PHI_TOP, D_RIC, D_ETA_U, D_ETA_C,
 D_TB, D_EPS, D_ATM_H2O, D_ATM_CO2, D_MELT_MASS, D_E_STORED) = range(19)
N_D = 19

# ------------------------------------------------------------ history columns
(H_T, H_TU, H_TC, H_LID, H_OUT, H_QS, H_QC, H_H, H_RIC, H_MELT, H_REGIME, H_TS, H_DELTA_U, H_DELTA_C, H_TL,
 H_E_STORED, H_DTU, H_DTC, H_DLID, H_PHI_TOP, H_ATM_H2O, H_ATM_CO2, H_N_IV) = range(23)
N_H = 23

# ------------------------------------------------------------ interval columns
(I_STEP, I_TOP, I_BOTTOM, I_MAX_PHI, I_MASS, I_FULL_TOP, I_FULL_BOTTOM, I_MEAN_PHI) = range(8)
N_I = 8

REGIME_MAGMA_OCEAN = 0
REGIME_MOBILE_LID = 1
REGIME_STAGNANT_LID = 2

STATUS_DONE = 0
STATUS_HISTORY_FULL = 1
STATUS_INTERVALS_FULL = 2
STATUS_MAX_STEPS = 3
STATUS_STEP_TOO_SMALL = 4

R_GAS = 8.314462618  # CODATA 2018
SIGMA_SB = 5.670374419e-8  # CODATA 2018
BLEND_WIDTH = 0.05  # melt-fraction width of the rheological-transition blend


@njit
def smoothstep(x):
    if x <= 0.0:
        return 0.0
    if x >= 1.0:
        return 1.0
    return x * x * (3.0 - 2.0 * x)


@njit
def viscosity(t, p, phi, par):
    """Effective viscosity [Pa s] at temperature t [K], pressure p [Pa] and melt fraction phi."""
    solid = math.log(par[P_A_VISC]) + (par[P_E_ACT] + p * par[P_V_ACT]) / (R_GAS * t) - par[P_MELT_WEAK] * phi
    w = smoothstep((phi - par[P_PHI_C]) / BLEND_WIDTH)
    if w <= 0.0:
        return math.exp(min(solid, 700.0))
    phi_m = 1.0 - par[P_PHI_C]  # maximum packing of crystals
    x = min((1.0 - phi) / phi_m, 0.999)
    susp = math.log(par[P_ETA_LIQ]) - 2.5 * math.log(1.0 - x)
    return math.exp(min(w * susp + (1.0 - w) * solid, 700.0))


@njit
def node_melt(t, grid, i, law):
    return melt_fraction(t, grid[G_TSOL, i], grid[G_TLIQ, i], grid[G_AUX1, i], grid[G_AUX2, i], law)


@njit
def lid_mass(d, par):
    r = par[P_RADIUS]
    ri = max(r - d, 0.0)
    return par[P_RHO_TOP] * (4.0 * math.pi / 3.0) * (r ** 3 - ri ** 3)


@njit
def lid_base_temperature(tu, par):
    """T_l = T_u - a_rh R T_u^2 / E (stagnant lid), at least 1 K above the equilibrium temperature."""
    return max(tu - par[P_A_RH] * R_GAS * tu * tu / par[P_E_ACT], par[P_T_EQ] + 1.0)


@njit
def mantle_energy(tu, d, grid, par, law):
    """Stored heat of the mantle [J] relative to 0 K: adiabat sensible + latent, lid corrected."""
    cm = par[P_CM]
    e = 0.0
    n = grid.shape[1]
    for i in range(n):
        ti = tu * grid[G_F, i]
        e += grid[G_W, i] * (cm * ti + par[P_LATENT] * node_melt(ti, grid, i, law))
    if par[P_STAGNANT] > 0.5 and d > 0.0:
        ml = lid_mass(d, par)
        e += ml * cm * (0.5 * (par[P_T_EQ] + lid_base_temperature(tu, par)) - tu)
    return e


@njit
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


@njit
def core_energy(tc, core, par):
    """Stored heat of the core [J]: sensible heat on the core adiabat minus latent + gravitational
    energy already released by the inner core."""
    e = 0.0
    for j in range(core.shape[1]):
        e += core[C_W, j] * par[P_CC] * tc * core[C_F, j]
    r_ic, m_ic = inner_core(tc, core)
    return e - (par[P_LC] + par[P_EG]) * m_ic


@njit
def radiogenic_power(t, iso, par):
    """Radiogenic heating of the mantle [W] at model time t [s]: sum_i H_i,today exp(lambda_i (age0 - t))."""
    h = 0.0
    for i in range(iso.shape[0]):
        h += iso[i, 0] * math.exp(iso[i, 1] * (par[P_START_AGE] - t))
    return h * par[P_MANTLE_MASS]


@njit
def atmosphere_mass(total, melt_mass, par, coeff, expo):
    """Atmospheric mass [kg] of a volatile in solubility equilibrium with the melt.

    Mass balance M_total = M_atm + X(P) M_melt, P = M_atm g / (4 pi R^2), X = coeff P^expo
    (mass fraction); solved by bisection (monotone in M_atm)."""
    if total <= 0.0:
        return 0.0
    if melt_mass <= 0.0:
        return total
    area = 4.0 * math.pi * par[P_RADIUS] ** 2
    lo = 0.0
    hi = total
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        p = mid * par[P_G_SURF] / area
        f = mid + coeff * p ** expo * melt_mass - total
        if f > 0.0:
            hi = mid
        else:
            lo = mid
        if hi - lo <= 1e-12 * total:
            break
    return 0.5 * (lo + hi)


@njit
def melt_mass_adiabat(tu, grid, law):
    m = 0.0
    for i in range(grid.shape[1]):
        m += grid[G_W, i] * node_melt(tu * grid[G_F, i], grid, i, law)
    return m


@njit
def diagnose(t, y, grid, core, iso, par, law, diag):
    """Fluxes, boundary layers, surface temperature and regime at state y; fills ``diag`` (D_*)."""
    tu = max(y[Y_TU], 1.0)
    tc = max(y[Y_TC], 1.0)
    d_lid = max(y[Y_LID], 0.0)
    n = grid.shape[1]
    top = n - 1
    depth = par[P_RADIUS] - par[P_CORE_RADIUS]
    law_i = law
    phi_top = node_melt(tu * grid[G_F, top], grid, top, law_i)
    magma = phi_top > par[P_PHI_C]
    stagnant = par[P_STAGNANT] > 0.5 and not magma
    eta_u = viscosity(tu, par[P_P_TOP], phi_top, par)
    tb = tu * grid[G_F, 0]
    # bottom boundary layer (local critical Rayleigh number)
    dtc = tc - tb
    t_mean_c = 0.5 * (tc + tb)
    phi_c = node_melt(t_mean_c, grid, 0, law_i)
    eta_c = viscosity(t_mean_c, par[P_P_CMB], phi_c, par)
    if abs(dtc) > 1e-9:
        delta_c = (par[P_KAPPA] * eta_c * par[P_RA_CR] / (par[P_ALPHA] * par[P_RHO_MANTLE] * par[P_G_CMB]
                                                            * abs(dtc))) ** (1.0 / 3.0)
        delta_c = min(delta_c, 0.5 * depth)
        qc = par[P_K] * dtc / delta_c
    else:
        delta_c = 0.5 * depth
        qc = 0.0
    # grey atmosphere
    eps = 1.0
    m_h2o = 0.0
    m_co2 = 0.0
    if par[P_ATMOSPHERE] > 0.5:
        m_melt = melt_mass_adiabat(tu, grid, law_i)
        # solubilities (mass fraction, P in Pa): H2O 6.8e-8 P^0.7, CO2 4.4e-12 P (as used by Lebrun et al. 2013)
        m_h2o = atmosphere_mass(par[P_H2O_TOTAL], m_melt, par, 6.8e-8, 0.7)
        m_co2 = atmosphere_mass(par[P_CO2_TOTAL], m_melt, par, 4.4e-12, 1.0)
        area = 4.0 * math.pi * par[P_RADIUS] ** 2
        # grey optical depth tau_i = (3 M_i / (8 pi R^2)) sqrt(kappa_i g / (3 P0)), P0 = 101325 Pa,
        # kappa_H2O = 0.01, kappa_CO2 = 0.001 m^2/kg (Abe & Matsui 1985; Elkins-Tanton 2008)
        tau = 0.0
        tau += 3.0 * m_h2o / (2.0 * area) * math.sqrt(0.01 * par[P_G_SURF] / (3.0 * 101325.0))
        tau += 3.0 * m_co2 / (2.0 * area) * math.sqrt(0.001 * par[P_G_SURF] / (3.0 * 101325.0))
        eps = 2.0 / (tau + 2.0)
    # top of the convecting region and the conductance of the layer above the surface
    if stagnant:
        tl = lid_base_temperature(tu, par)
        d_lid = max(d_lid, par[P_LID_MIN])
        d_conv = max(depth - d_lid, 0.05 * depth)
    else:
        tl = tu
        d_conv = depth
    dt_ra = max(tu - tl, 0.0) + max(dtc, 0.0)
    # upper boundary layer: delta_u = D (Ra_cr / Ra)^beta with dT of the top layer
    t_eq = par[P_T_EQ]
    t_top = tl if stagnant else tu
    lo = t_eq
    hi = t_top
    delta_u = d_conv
    for _ in range(80):
        ts = 0.5 * (lo + hi)
        if stagnant:
            dt_u = tu - tl
            ra = par[P_ALPHA] * par[P_RHO_MANTLE] * par[P_G_SURF] * max(dt_ra, 1e-6) * d_conv ** 3 / (
                par[P_KAPPA] * eta_u)
            delta_u = min(d_conv * (par[P_RA_CR] / ra) ** par[P_BETA], d_conv)
            q_cond = par[P_K] * (tl - ts) / d_lid
        else:
            ra = par[P_ALPHA] * par[P_RHO_MANTLE] * par[P_G_SURF] * max(tu - ts + max(dtc, 0.0), 1e-6) \
                * d_conv ** 3 / (par[P_KAPPA] * eta_u)
            delta_u = min(d_conv * (par[P_RA_CR] / ra) ** par[P_BETA], d_conv)
            q_cond = par[P_K] * (tu - ts) / delta_u
        q_rad = eps * SIGMA_SB * (ts ** 4 - t_eq ** 4)
        if q_cond > q_rad:
            lo = ts
        else:
            hi = ts
        if hi - lo < 1e-10 * t_top:
            break
    ts = 0.5 * (lo + hi)
    if stagnant:
        qu = par[P_K] * (tu - tl) / delta_u
        qs = par[P_K] * (tl - ts) / d_lid
    else:
        qu = par[P_K] * (tu - ts) / delta_u
        qs = qu
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
    diag[D_RIC] = r_ic
    diag[D_ETA_U] = eta_u
    diag[D_ETA_C] = eta_c
    diag[D_TB] = tb
    diag[D_EPS] = eps
    diag[D_ATM_H2O] = m_h2o
    diag[D_ATM_CO2] = m_co2


@njit
def rhs(t, y, grid, core, iso, par, law, diag, dy):
    """dy/dt at (t, y); also fills ``diag``."""
    diagnose(t, y, grid, core, iso, par, law, diag)
    tu = y[Y_TU]
    tc = y[Y_TC]
    d_lid = y[Y_LID]
    area_s = 4.0 * math.pi * par[P_RADIUS] ** 2
    area_c = 4.0 * math.pi * par[P_CORE_RADIUS] ** 2
    q_surf = diag[D_QS] * area_s
    q_cmb = diag[D_QC] * area_c
    heat = diag[D_H]
    # lid growth (stagnant lid, solid surface); thins back over ~1 kyr when the surface remelts
    if diag[D_REGIME] == REGIME_STAGNANT_LID:
        d_eff = max(d_lid, par[P_LID_MIN])
        ddl = (-diag[D_QU] + par[P_K] * (diag[D_TL] - diag[D_TS]) / d_eff) / (
            par[P_RHO_TOP] * par[P_CM] * max(tu - diag[D_TL], 1.0))
    elif par[P_STAGNANT] > 0.5:
        ddl = (par[P_LID_MIN] - d_lid) / 3.15576e10
    else:
        ddl = 0.0
    # energy: dE_m/dTu * dTu/dt + dE_m/dD * dD/dt = -Q_s + Q_c + H
    h_t = 1e-3 * max(1.0, 1e-4 * tu)
    dem_dtu = (mantle_energy(tu + h_t, d_lid, grid, par, law) - mantle_energy(tu - h_t, d_lid, grid, par, law)) / (
        2.0 * h_t)
    if par[P_STAGNANT] > 0.5 and d_lid > 0.0:
        dml = par[P_RHO_TOP] * 4.0 * math.pi * (par[P_RADIUS] - d_lid) ** 2
        dem_dd = dml * par[P_CM] * (0.5 * (par[P_T_EQ] + lid_base_temperature(tu, par)) - tu)
    else:
        dem_dd = 0.0
    dy[Y_TU] = (-q_surf + q_cmb + heat - dem_dd * ddl) / dem_dtu
    dy[Y_LID] = ddl
    h_c = 1e-3 * max(1.0, 1e-4 * tc)
    dec_dtc = (core_energy(tc + h_c, core, par) - core_energy(tc - h_c, core, par)) / (2.0 * h_c)
    dy[Y_TC] = -q_cmb / dec_dtc
    dy[Y_OUT] = q_surf - heat


@njit
def stored_energy(y, grid, core, par, law):
    return mantle_energy(y[Y_TU], max(y[Y_LID], 0.0), grid, par, law) + core_energy(y[Y_TC], core, par)


@njit
def profile(y, diag, grid, par, law, temp, phi):
    """Temperature T(r) and melt fraction on the mantle nodes (CMB -> surface) at state y.

    Adiabat T_u f(r) between a top layer (linear from T_s to the adiabat over delta_u, below the
    conductive lid in stagnant-lid mode) and a bottom layer (linear from T_c over delta_c)."""
    n = grid.shape[1]
    tu = y[Y_TU]
    tc = y[Y_TC]
    ts = diag[D_TS]
    tl = diag[D_TL]
    du = max(diag[D_DELTA_U], 1e-6)
    dc = max(diag[D_DELTA_C], 1e-6)
    stagnant = diag[D_REGIME] == REGIME_STAGNANT_LID
    d_lid = max(y[Y_LID], par[P_LID_MIN]) if stagnant else 0.0
    r_top = par[P_RADIUS]
    r_c = par[P_CORE_RADIUS]
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
        if h < dc:
            t = tc + (t - tc) * h / dc
        temp[i] = t
        phi[i] = node_melt(t, grid, i, law)


@njit
def find_intervals(phi, grid, step, iv, n_iv, cap):
    """Append the contiguous melt intervals (phi > 0) of one step to ``iv``; return the new count or -1 if full.

    Intervals are listed from the surface down; node indices count from the CMB (0) to the surface."""
    n = phi.shape[0]
    i = n - 1
    while i >= 0:
        if phi[i] > 0.0:
            top = i
            mx = 0.0
            mass = 0.0
            wsum = 0.0
            ftop = -1
            fbot = -1
            while i >= 0 and phi[i] > 0.0:
                if phi[i] > mx:
                    mx = phi[i]
                mass += grid[G_W, i] * phi[i]
                wsum += grid[G_W, i]
                if phi[i] >= 1.0:
                    if ftop < 0:
                        ftop = i
                    fbot = i
                i -= 1
            if n_iv >= cap:
                return -1
            iv[n_iv, I_STEP] = step
            iv[n_iv, I_TOP] = top
            iv[n_iv, I_BOTTOM] = i + 1
            iv[n_iv, I_MAX_PHI] = mx
            iv[n_iv, I_MASS] = mass
            iv[n_iv, I_FULL_TOP] = ftop
            iv[n_iv, I_FULL_BOTTOM] = fbot
            iv[n_iv, I_MEAN_PHI] = mass / wsum if wsum > 0.0 else 0.0
            n_iv += 1
        else:
            i -= 1
    return n_iv


# Dormand-Prince 5(4) coefficients (Dormand & Prince 1980, J. Comput. Appl. Math. 6:19)
C2, C3, C4, C5 = 1.0 / 5.0, 3.0 / 10.0, 4.0 / 5.0, 8.0 / 9.0
A21 = 1.0 / 5.0
A31, A32 = 3.0 / 40.0, 9.0 / 40.0
A41, A42, A43 = 44.0 / 45.0, -56.0 / 15.0, 32.0 / 9.0
A51, A52, A53, A54 = 19372.0 / 6561.0, -25360.0 / 2187.0, 64448.0 / 6561.0, -212.0 / 729.0
A61, A62, A63, A64, A65 = 9017.0 / 3168.0, -355.0 / 33.0, 46732.0 / 5247.0, 49.0 / 176.0, -5103.0 / 18656.0
B1, B3, B4, B5, B6 = 35.0 / 384.0, 500.0 / 1113.0, 125.0 / 192.0, -2187.0 / 6784.0, 11.0 / 84.0
E1, E3, E4, E5, E6, E7 = (71.0 / 57600.0, -71.0 / 16695.0, 71.0 / 1920.0, -17253.0 / 339200.0, 22.0 / 525.0,
                          -1.0 / 40.0)


@njit
def record(t, y, dy, diag, grid, core, par, law, hist, n_h, iv, n_iv, temp, phi):
    profile(y, diag, grid, par, law, temp, phi)
    n_iv_new = find_intervals(phi, grid, n_h, iv, n_iv, iv.shape[0])
    if n_iv_new < 0:
        return -1
    melt = 0.0
    for i in range(grid.shape[1]):
        melt += grid[G_W, i] * phi[i]
    hist[n_h, H_T] = t
    hist[n_h, H_TU] = y[Y_TU]
    hist[n_h, H_TC] = y[Y_TC]
    hist[n_h, H_LID] = y[Y_LID] if diag[D_REGIME] == REGIME_STAGNANT_LID else 0.0
    hist[n_h, H_OUT] = y[Y_OUT]
    hist[n_h, H_QS] = diag[D_QS] * 4.0 * math.pi * par[P_RADIUS] ** 2
    hist[n_h, H_QC] = diag[D_QC] * 4.0 * math.pi * par[P_CORE_RADIUS] ** 2
    hist[n_h, H_H] = diag[D_H]
    hist[n_h, H_RIC] = diag[D_RIC]
    hist[n_h, H_MELT] = melt
    hist[n_h, H_REGIME] = diag[D_REGIME]
    hist[n_h, H_TS] = diag[D_TS]
    hist[n_h, H_DELTA_U] = diag[D_DELTA_U]
    hist[n_h, H_DELTA_C] = diag[D_DELTA_C]
    hist[n_h, H_TL] = diag[D_TL]
    hist[n_h, H_E_STORED] = stored_energy(y, grid, core, par, law)
    hist[n_h, H_DTU] = dy[Y_TU]
    hist[n_h, H_DTC] = dy[Y_TC]
    hist[n_h, H_DLID] = dy[Y_LID]
    hist[n_h, H_PHI_TOP] = diag[D_PHI_TOP]
    hist[n_h, H_ATM_H2O] = diag[D_ATM_H2O]
    hist[n_h, H_ATM_CO2] = diag[D_ATM_CO2]
    hist[n_h, H_N_IV] = n_iv_new - n_iv
    return n_iv_new


@njit
def integrate(state, grid, core, iso, par, law, hist, iv, max_steps):
    """Advance from ``state`` = (t, y[0..3], h, n_hist, n_iv, n_rejected) until the end time, a full buffer
    or max_steps; updates ``state`` in place (so a call can resume) and returns a STATUS_* code.

    Error control on T_u, T_c (absolute rtol * 1 K + relative rtol) and the lid (rtol * 1 km + relative);
    every step also keeps |dT_u|, |dT_c| <= P_DT_MAX so that no melt layer appears and vanishes unseen.
    """
    n = grid.shape[1]
    temp = np.empty(n)
    phi = np.empty(n)
    diag = np.empty(N_D)
    y = np.empty(N_Y)
    ynew = np.empty(N_Y)
    yerr = np.empty(N_Y)
    tmp = np.empty(N_Y)
    k1 = np.empty(N_Y)
    k2 = np.empty(N_Y)
    k3 = np.empty(N_Y)
    k4 = np.empty(N_Y)
    k5 = np.empty(N_Y)
    k6 = np.empty(N_Y)
    k7 = np.empty(N_Y)
    t = state[0]
    for j in range(N_Y):
        y[j] = state[1 + j]
    h = state[5]
    n_h = int(state[6])
    n_iv = int(state[7])
    n_rej = int(state[8])
    t_end = par[P_T_END]
    rtol = par[P_RTOL]
    dt_max = par[P_DT_MAX]
    rhs(t, y, grid, core, iso, par, law, diag, k1)
    if n_h == 0:
        res = record(t, y, k1, diag, grid, core, par, law, hist, n_h, iv, n_iv, temp, phi)
        if res < 0:
            return STATUS_INTERVALS_FULL
        n_iv = res
        n_h = 1
    steps = 0
    while t < t_end * (1.0 - 1e-14):
        if n_h >= hist.shape[0]:
            _save(state, t, y, h, n_h, n_iv, n_rej)
            return STATUS_HISTORY_FULL
        if steps >= max_steps:
            _save(state, t, y, h, n_h, n_iv, n_rej)
            return STATUS_MAX_STEPS
        # temperature-step limit from the current slopes
        rate = max(abs(k1[Y_TU]), abs(k1[Y_TC]))
        if rate > 0.0:
            h = min(h, dt_max / rate)
        h = min(h, par[P_H_MAX], t_end - t)
        if h < 1e-6:
            _save(state, t, y, h, n_h, n_iv, n_rej)
            return STATUS_STEP_TOO_SMALL
        for j in range(N_Y):
            tmp[j] = y[j] + h * A21 * k1[j]
        rhs(t + C2 * h, tmp, grid, core, iso, par, law, diag, k2)
        for j in range(N_Y):
            tmp[j] = y[j] + h * (A31 * k1[j] + A32 * k2[j])
        rhs(t + C3 * h, tmp, grid, core, iso, par, law, diag, k3)
        for j in range(N_Y):
            tmp[j] = y[j] + h * (A41 * k1[j] + A42 * k2[j] + A43 * k3[j])
        rhs(t + C4 * h, tmp, grid, core, iso, par, law, diag, k4)
        for j in range(N_Y):
            tmp[j] = y[j] + h * (A51 * k1[j] + A52 * k2[j] + A53 * k3[j] + A54 * k4[j])
        rhs(t + C5 * h, tmp, grid, core, iso, par, law, diag, k5)
        for j in range(N_Y):
            tmp[j] = y[j] + h * (A61 * k1[j] + A62 * k2[j] + A63 * k3[j] + A64 * k4[j] + A65 * k5[j])
        rhs(t + h, tmp, grid, core, iso, par, law, diag, k6)
        for j in range(N_Y):
            ynew[j] = y[j] + h * (B1 * k1[j] + B3 * k3[j] + B4 * k4[j] + B5 * k5[j] + B6 * k6[j])
        rhs(t + h, ynew, grid, core, iso, par, law, diag, k7)
        err = 0.0
        for j in range(3):
            yerr[j] = h * (E1 * k1[j] + E3 * k3[j] + E4 * k4[j] + E5 * k5[j] + E6 * k6[j] + E7 * k7[j])
            scale = (rtol * (1.0 if j < 2 else 1.0e3)) + rtol * max(abs(y[j]), abs(ynew[j]))
            e = abs(yerr[j]) / scale
            if e > err:
                err = e
        big_jump = abs(ynew[Y_TU] - y[Y_TU]) > 1.5 * dt_max or abs(ynew[Y_TC] - y[Y_TC]) > 1.5 * dt_max
        if err <= 1.0 and not big_jump:
            t = t + h
            for j in range(N_Y):
                y[j] = ynew[j]
                k1[j] = k7[j]
            res = record(t, y, k7, diag, grid, core, par, law, hist, n_h, iv, n_iv, temp, phi)
            if res < 0:
                _save(state, t - h, y, h, n_h, n_iv, n_rej)
                return STATUS_INTERVALS_FULL
            n_iv = res
            n_h += 1
            steps += 1
            fac = 5.0 if err == 0.0 else min(5.0, max(0.2, 0.9 * err ** (-0.2)))
            h = h * fac
        else:
            n_rej += 1
            if big_jump:
                h = 0.5 * h
            else:
                h = h * max(0.1, 0.9 * err ** (-0.25))
            # the stage evaluations overwrote diag; k1 is still valid for the next try
    _save(state, t, y, h, n_h, n_iv, n_rej)
    return STATUS_DONE


@njit
def _save(state, t, y, h, n_h, n_iv, n_rej):
    state[0] = t
    for j in range(N_Y):
        state[1 + j] = y[j]
    state[5] = h
    state[6] = n_h
    state[7] = n_iv
    state[8] = n_rej


@njit
def profile_at(t, y, grid, core, iso, par, law, temp, phi, diag):
    """T(r), phi(r) and diagnostics at an arbitrary state (for snapshots and event refinement)."""
    diagnose(t, y, grid, core, iso, par, law, diag)
    profile(y, diag, grid, par, law, temp, phi)


@njit
def rhs_py(t, y, grid, core, iso, par, law):
    """dy/dt as a new array (for scipy-driven checks)."""
    diag = np.empty(N_D)
    dy = np.empty(N_Y)
    rhs(t, y, grid, core, iso, par, law, diag, dy)
    return dy
