"""The numba thermal-evolution kernel: right-hand side, profile, and an adaptive Dormand-Prince integrator.

The only hot code of meltzone. Inputs are plain float64 arrays with named
row/column indices (below); the friendly layer (:mod:`meltzone.evolution`)
builds them from a PlanetSpec and an Interior and wraps the outputs.

State ``y`` (SI): ``Y_EM`` stored heat of the mantle [J], ``Y_EC`` stored heat
of the core [J], ``Y_LID`` stagnant-lid thickness [m], ``Y_OUT`` cumulative
(surface heat loss - radiogenic heating) [J]. The temperatures (upper-mantle
potential temperature T_u and core temperature T_c) are recovered from the
energies by inverting the monotone stored-heat functions. Integrating the
energies themselves (a conservative formulation) makes the budget close to
round-off: any Runge-Kutta method preserves the linear invariant
E_m + E_c + Y_OUT, whatever the kinks of the melt-fraction law.

Physics (each law with its source and range; radiogenic data in :mod:`meltzone.evolution.heating`;
the plain NumPy twin used by the tests is ``tests/reference_evolution.py``):

* boundary-layer scaling q = a k dT / D (Ra / Ra_cr)^beta for the upper layer
  of the solid mantle (Stevenson, Spohn & Schubert 1983, Icarus 54:466: a = 1,
  beta = 1/3 and Ra_cr ~ 500; Ra_cr = 450 as in Tosi et al. 2017, A&A 605:A71),
  valid for Ra >> Ra_cr. beta and a are configurable: weaker exponents
  (beta ~ 0-0.15) stand for plate-bending or dehydration-limited plate
  tectonics (Christensen 1985, JGR 90:2995; Korenaga 2008, Rev. Geophys.
  46:RG2007; from memory) and need a > 1 for Earth-like heat flow. The magma
  ocean always keeps a = 1, beta = 1/3 (below), and so does the solid mantle
  until the top first reaches the rheological transition. The bottom layer from the local critical Rayleigh number,
  delta_c = (kappa eta_c Ra_cr / (alpha rho g_c dT_c))^(1/3) (same source),
  capped at half the mantle depth;
* Arrhenius viscosity eta = A exp[H(P)/(R T)] exp(-alpha_phi phi), H = E + int V dP
  (form and A, E, V of Tosi et al. 2017, Table 1; melt weakening alpha_phi ~ 26,
  Mei et al. 2002, EPSL 201:491, from memory), below the rheological transition
  at phi_c ~ 0.4 (Abe 1997; Solomatov 2015, Treatise on Geophysics 9.04); above
  it the Einstein-Roscoe suspension eta_liq (1 - phi_x / phi_m)^-2.5 with
  phi_m = 1 - phi_c (Roscoe 1952, Br. J. Appl. Phys. 3:267; < 10x rise up to 40 vol%
  crystals, Lejeune & Richet 1995, JGR 100:4215) and a liquid viscosity of
  ~0.01-0.1 Pa s (Karki & Stixrude 2010, Science 328:740; from memory); the two
  are blended in log eta over a melt-fraction width (convection.rheology_blend_width,
  default 0.05; this model's choice,
  so that the heat flow is continuous across the transition);
* magma ocean: the same boundary-layer law with the suspension viscosity
  (soft turbulence, Nu ~ Ra^(1/3); the prefactor Ra_cr^(-1/3) = 0.13 against 0.089
  in Solomatov's form, from memory);
* stagnant lid: rheological temperature scale dT_rh = a_rh R T_u^2 / E
  (Solomatov & Moresi 2000, JGR 105:21795; a_rh ~ 2.2-2.5, Grasset & Parmentier
  1998, JGR 103:18171; Thiriet et al. 2019, PEPI 286:138 show several (a_rh, beta)
  pairs fit equally), lid growth rho c (T_u - T_lm) dD/dt = -q_u + k (T_l - T_s) / D
  with T_lm the lid's mean temperature (the usual form, e.g. Schubert & Spohn 1990,
  has T_l; T_lm keeps the lid's heat content in the budget); blended with the
  magma-ocean top over the same melt-fraction width;
* surface: the surface temperature balances the flux through the top layer
  with eps sigma (T_s^4 - T_eq^4), eps = 2 / (tau + 2) (Abe & Matsui 1985;
  Elkins-Tanton 2008, EPSL 271:181), tau_i = (3 M_i / (8 pi R^2)) sqrt(kappa_i g / (3 P0))
  with kappa = 0.01 (H2O) and 0.001 (CO2) m^2/kg at P0 = 1 atm (from memory), the
  atmospheric masses in solubility equilibrium with the melt, X_H2O = 6.8e-8 P^0.7
  and X_CO2 = 4.4e-12 P (mass fractions, P in Pa; as used by Lebrun et al. 2013,
  JGR Planets 118; from memory). No condensation: water stays in the atmosphere
  after the magma ocean (an upper bound on the blanketing);
* core: adiabatic core of temperature T_c f_core(r), an inner core where it falls
  below the iron-alloy melting curve, releasing latent and gravitational energy
  (Stevenson et al. 1983; Labrosse 2015, PEPI 247:36);
* energy: the stored heat (sensible heat on the adiabat, latent heat of the
  melt, the lid's conductive profile, core sensible heat less the inner core's
  latent and gravitational energy) is one function of (T_u, lid) for the mantle
  and of T_c for the core: dE_m/dt = -Q_surface + Q_cmb + H, dE_c/dt = -Q_cmb.

* regime: a magma ocean while the melt fraction at the top of the convecting mantle
  exceeds phi_c. Until the top first reaches phi_c this is the batch melt of the
  adiabat at the surface; from then on it is the isentropic value of a solid mantle
  that melts as it rises and pays the latent heat (batch limit of McKenzie & Bickle
  1988, J. Petrol. 29:625; from memory), so a solidified mantle that warms again does
  not turn back into a magma ocean until about phi_c L / c_p (~220 K) hotter; the
  magma-ocean branch's suspension then follows that same melt fraction. The solid branch
  of a solidified mantle has melt weakening up to phi_c but no suspension viscosity. The
  integrator lands the step that first crosses phi_c on the crossing (to PHI_TOL = 1e-8 in
  melt fraction). A solid law that cannot carry the heat (weak scalings away from their
  calibration) lets the mantle warm to that threshold, where the magma-ocean branch then
  holds it.

Known limitations: with beta = 1/3 the mantle equilibrates with its heating within
~1 Gyr, so an Earth hindcast gives a present heat flow of ~31 TW (46 TW observed)
and a Urey ratio ~0.6 (Korenaga 2008, Rev. Geophys. 46:RG2007 discuss this paradox).
A weak scaling (beta = 0.015, a = 40, a calibration of this project for Earth's mobile
lid) lands the present Earth inside the published ranges (tests/test_evolution.py). The
configured (a, beta) apply once the top first reaches phi_c (the heat flow jumps there
when they differ from the classical law); before that, the classical law. Applied from
the start, a weak law could not end the magma ocean while the young Earth's radiogenic
heating exceeds its solid-state heat flow at phi_c (measured: ~1.4 Gyr): the model has no
melt extraction to vent that heat.
"""

from __future__ import annotations

import math

import numpy as np

from .._jit import njit
from .._melt_kernel import melt_fraction

# ------------------------------------------------------------ state vector
Y_EM, Y_EC, Y_LID, Y_OUT = range(4)
N_Y = 4

# ------------------------------------------------------------ scalar parameters
(P_RADIUS, P_CORE_RADIUS, P_G_SURF, P_G_CMB, P_RHO_MANTLE, P_RHO_TOP, P_K, P_KAPPA, P_ALPHA, P_CM, P_LATENT,
 P_A_VISC, P_E_ACT, P_V_ACT, P_RA_CR, P_BETA, P_A_RH, P_MELT_WEAK, P_ETA_LIQ, P_PHI_C, P_CC, P_LC, P_EG,
 P_T_EQ, P_ATMOSPHERE, P_H2O_TOTAL, P_CO2_TOTAL, P_STAGNANT, P_P_CMB, P_START_AGE, P_LAW, P_DT_MAX, P_RTOL,
 P_T_END, P_H_MAX, P_LID_MIN, P_P_TOP, P_MANTLE_MASS, P_V_DECAY, P_ATOL, P_NU_A, P_T_SOLID,
 P_BLEND) = range(43)
N_PAR = 43
#: P_T_SOLID until the top of the mantle first reaches the rheological transition (set by the integrator)
NOT_YET = 1.0e300
#: melt-fraction tolerance with which the integrator lands on that first crossing (near phi_c the melt
#: fraction of a slowly cooling mantle changes by ~1e-9 per year, so this is a few years at most)
PHI_TOL = 1.0e-8

# ------------------------------------------------------------ mantle grid rows (nodes CMB -> surface)
(G_R, G_P, G_F, G_W, G_TSOL, G_TLIQ, G_AUX1, G_AUX2) = range(8)
N_G = 8
# ------------------------------------------------------------ core grid rows (nodes centre -> CMB)
(C_R, C_F, C_W, C_TMELT, C_MCUM) = range(5)
N_C = 5
# ------------------------------------------------------------ isotopes: rows (heat W/kg of mantle today, decay 1/s)

# ------------------------------------------------------------ diagnostics
(D_QS, D_QU, D_QC, D_TS, D_DELTA_U, D_DELTA_C, D_TL, D_H, D_REGIME, D_PHI_TOP, D_RIC, D_ETA_U, D_ETA_C,
 D_TB, D_EPS, D_ATM_H2O, D_ATM_CO2, D_MELT_MASS, D_E_STORED, D_DLID, D_PHI_SURF) = range(21)
N_D = 21

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


@njit
def smoothstep(x):
    if x <= 0.0:
        return 0.0
    if x >= 1.0:
        return 1.0
    return x * x * (3.0 - 2.0 * x)


@njit
def activation_enthalpy(p, par):
    """E + integral of V(P) dP with V(P) = V0 exp(-P / P_d) [J/mol]; E + P V0 when P_d = 0.

    A decaying activation volume keeps the deep mantles of super-Earths from the astronomically
    high viscosities of a constant V (Stamenkovic et al. 2012, ApJ 748:41; Tackley et al. 2013,
    Icarus 225:50 discuss the pressure dependence; the exponential form and P_d here are this
    model's choice, not fitted to those papers)."""
    pd = par[P_V_DECAY]
    if pd <= 0.0:
        return par[P_E_ACT] + p * par[P_V_ACT]
    return par[P_E_ACT] + par[P_V_ACT] * pd * (1.0 - math.exp(-p / pd))


@njit
def viscosity(t, p, phi, par):
    """Effective viscosity [Pa s] at temperature t [K], pressure p [Pa] and melt fraction phi."""
    solid = math.log(par[P_A_VISC]) + activation_enthalpy(p, par) / (R_GAS * t) - par[P_MELT_WEAK] * phi
    w = smoothstep((phi - par[P_PHI_C]) / par[P_BLEND])
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
def isentropic_melt(t, grid, i, law, par):
    """Melt fraction phi = phi_eq(t - (L / c_p) phi) at node i: the batch melt of a parcel that rose
    adiabatically from below its solidus and paid the latent heat of its melt (the batch limit of
    isentropic decompression melting, McKenzie & Bickle 1988, J. Petrol. 29:625; from memory). It ignores
    the steeper adiabat of a melting parcel. Bisection: phi_eq(t - L phi / c) - phi falls with phi."""
    lc = par[P_LATENT] / par[P_CM]
    hi = node_melt(t, grid, i, law)
    lo = 0.0
    if hi <= 0.0 or lc <= 0.0:
        return hi
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        if node_melt(t - lc * mid, grid, i, law) > mid:
            lo = mid
        else:
            hi = mid
        if hi - lo < 1e-13:
            break
    return 0.5 * (lo + hi)


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
def _invert(kind, e, d, grid, core, par, law, guess, slope):
    """Temperature [K] whose stored heat is ``e``, and the last slope dE/dT: mantle (kind 0, lid d) or
    core (kind 1).

    Newton's first step with the caller's slope (the previous call's, > 0) or a centred difference, then
    secant steps; bisection on [10, 2e5] K if that fails. Both stored-heat functions rise monotonically
    with temperature."""
    t0 = min(max(guess, 10.0), 2.0e5)
    f0 = (mantle_energy(t0, d, grid, par, law) if kind == 0 else core_energy(t0, core, par)) - e
    s = slope
    if not s > 0.0:
        hh = 1e-3 * max(1.0, 1e-4 * t0)
        if kind == 0:
            s = (mantle_energy(t0 + hh, d, grid, par, law) - mantle_energy(t0 - hh, d, grid, par, law)) / (2 * hh)
        else:
            s = (core_energy(t0 + hh, core, par) - core_energy(t0 - hh, core, par)) / (2 * hh)
    scale = abs(e) + 1.0
    for _ in range(40):
        if abs(f0) <= 1e-14 * scale:
            return t0, s
        if not s > 0.0:
            break
        t1 = t0 - f0 / s
        if not (10.0 <= t1 <= 2.0e5):
            break
        f1 = (mantle_energy(t1, d, grid, par, law) if kind == 0 else core_energy(t1, core, par)) - e
        if f1 != f0 and t1 != t0:
            s_new = (f1 - f0) / (t1 - t0)
            if s_new > 0.0:
                s = s_new
        if abs(t1 - t0) <= 1e-12 * t0:
            return t1, s
        t0 = t1
        f0 = f1
    lo = 10.0
    hi = 2.0e5
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        f = (mantle_energy(mid, d, grid, par, law) if kind == 0 else core_energy(mid, core, par)) - e
        if f > 0.0:
            hi = mid
        else:
            lo = mid
        if hi - lo <= 1e-12 * mid:
            break
    return 0.5 * (lo + hi), 0.0


@njit
def temperatures(y, grid, core, par, law, work):
    """(T_u, T_c) of the energy state y; ``work`` = (T_u, T_c, dE_m/dT_u, dE_c/dT_c) of the last solution,
    the starting point of the next (a slope <= 0 asks for a fresh centred difference)."""
    d = max(y[Y_LID], 0.0) if par[P_STAGNANT] > 0.5 else 0.0
    tu, work[2] = _invert(0, y[Y_EM], d, grid, core, par, law, work[0], work[2])
    if core[C_W].sum() > 0.0:
        tc, work[3] = _invert(1, y[Y_EC], 0.0, grid, core, par, law, work[1], work[3])
    else:
        tc = work[1]
    work[0] = tu
    work[1] = tc
    return tu, tc


@njit
def energy_state(tu, tc, d_lid, out, grid, core, par, law, y):
    """Fill y from temperatures (the inverse of :func:`temperatures`); ``out`` is Y_OUT."""
    y[Y_EM] = mantle_energy(tu, max(d_lid, 0.0) if par[P_STAGNANT] > 0.5 else 0.0, grid, par, law)
    y[Y_EC] = core_energy(tc, core, par)
    y[Y_LID] = d_lid
    y[Y_OUT] = out


@njit
def top_layer_thickness(d_conv, ra, solid, par):
    """Upper thermal boundary layer [m]: delta = D (Ra_cr / Ra)^beta / a, i.e. Nu = a (Ra / Ra_cr)^beta,
    capped at the convecting depth D. ``solid``: the configured (a, beta) of the solid mantle, which
    applies once the top has first reached the rheological transition; otherwise (the magma ocean, and
    the solid branch of the blend before that) the classical form a = 1, beta = 1/3 (Stevenson et al. 1983;
    soft turbulence in the magma ocean)."""
    if solid:
        return min(d_conv * (par[P_RA_CR] / ra) ** par[P_BETA] / par[P_NU_A], d_conv)
    return min(d_conv * (par[P_RA_CR] / ra) ** (1.0 / 3.0), d_conv)


@njit
def _surface_balance(stagnant, solid, ts, tu, tl, d_lid, d_conv, dtc, base, eps, par):
    """Conductive flux through the top layer minus radiated flux at surface temperature ts [W/m^2]."""
    if stagnant:
        q_cond = par[P_K] * (tl - ts) / d_lid
    else:
        ra = base * max(tu - ts + max(dtc, 0.0), 1e-6)
        delta_u = top_layer_thickness(d_conv, ra, solid, par)
        q_cond = par[P_K] * (tu - ts) / delta_u
    return q_cond - eps * SIGMA_SB * (ts ** 4 - par[P_T_EQ] ** 4)


@njit
def _top_boundary(stagnant, solid, tu, tl, d_lid, d_conv, dtc, eta_u, eps, par):
    """(T_s, q_surface, q_u, delta_u) at the top: the surface temperature balances the conductive flux through
    the top layer (boundary layer, or lid over the boundary layer) with eps sigma (T_s^4 - T_eq^4).

    delta_u = D_conv (Ra_cr / Ra)^beta with Ra = alpha rho g dT D_conv^3 / (kappa eta_u) and dT the
    temperature contrast driving convection (top layer plus the CMB excess); Illinois root finding on T_s."""
    t_eq = par[P_T_EQ]
    t_top = tl if stagnant else tu
    lo = t_eq
    hi = max(t_top, t_eq)
    delta_u = d_conv
    ts = 0.5 * (lo + hi)
    base = par[P_ALPHA] * par[P_RHO_MANTLE] * par[P_G_SURF] * d_conv ** 3 / (par[P_KAPPA] * eta_u)
    if stagnant:
        ra = base * max(tu - tl + max(dtc, 0.0), 1e-6)
        delta_u = top_layer_thickness(d_conv, ra, solid, par)
    # Illinois (modified regula falsi) on g(T_s) = q_cond - q_rad, which falls monotonically from
    # g(T_eq) >= 0 to g(T_top) <= 0
    g_lo = _surface_balance(stagnant, solid, lo, tu, tl, d_lid, d_conv, dtc, base, eps, par)
    g_hi = _surface_balance(stagnant, solid, hi, tu, tl, d_lid, d_conv, dtc, base, eps, par)
    side = 0
    ts = lo
    prev = -1.0
    for _ in range(100):
        if g_lo <= 0.0:
            ts = lo
            break
        if g_hi >= 0.0:
            ts = hi
            break
        ts = (lo * g_hi - hi * g_lo) / (g_hi - g_lo)
        if not (lo < ts < hi):
            ts = 0.5 * (lo + hi)
        g = _surface_balance(stagnant, solid, ts, tu, tl, d_lid, d_conv, dtc, base, eps, par)
        if g > 0.0:
            lo, g_lo = ts, g
            if side == -1:
                g_hi *= 0.5
            side = -1
        else:
            hi, g_hi = ts, g
            if side == 1:
                g_lo *= 0.5
            side = 1
        if hi - lo < 1e-11 * hi or g == 0.0 or abs(ts - prev) < 1e-12 * ts:
            break
        prev = ts
    if stagnant:
        return ts, par[P_K] * (tl - ts) / d_lid, par[P_K] * (tu - tl) / delta_u, delta_u
    ra = base * max(tu - ts + max(dtc, 0.0), 1e-6)
    delta_u = top_layer_thickness(d_conv, ra, solid, par)
    q = par[P_K] * (tu - ts) / delta_u
    return ts, q, q, delta_u


@njit
def diagnose(t, tu, tc, d_lid, grid, core, iso, par, law, diag):
    """Fluxes, boundary layers, surface temperature and regime at (T_u, T_c, lid); fills ``diag`` (D_*)."""
    tu = max(tu, 1.0)
    tc = max(tc, 1.0)
    d_lid = max(d_lid, 0.0)
    n = grid.shape[1]
    top = n - 1
    depth = par[P_RADIUS] - par[P_CORE_RADIUS]
    law_i = law
    # the regime follows the melt fraction at the top of the convecting mantle: on the adiabat (batch) while
    # the surface magma ocean is above the rheological transition; once the top has first reached it
    # (t >= P_T_SOLID), the isentropic value of a solid mantle that melts as it rises, so that a solid
    # mantle does not turn back into a magma ocean as soon as its adiabat crosses phi_c at the surface
    phi_surf = node_melt(tu * grid[G_F, top], grid, top, law_i)
    solidified = t >= par[P_T_SOLID]
    phi_top = isentropic_melt(tu * grid[G_F, top], grid, top, law_i, par) if solidified else phi_surf
    magma = phi_top > par[P_PHI_C]
    stagnant = par[P_STAGNANT] > 0.5 and not magma
    # magma-ocean branch: the suspension viscosity of the same melt fraction that sets the regime, so that
    # both branches meet at phi_c
    eta_u = viscosity(tu, par[P_P_TOP], phi_top, par)
    # the solid-mantle branch of a solidified mantle: melt weakening, but no suspension, up to phi_c
    eta_s = viscosity(tu, par[P_P_TOP], min(phi_surf, par[P_PHI_C]), par) if solidified else eta_u
    tb = tu * grid[G_F, 0]
    dtc = tc - tb
    # bottom boundary layer (local critical Rayleigh number)
    t_mean_c = 0.5 * (tc + tb)
    phi_c = node_melt(t_mean_c, grid, 0, law_i)
    eta_c = viscosity(t_mean_c, par[P_P_CMB], phi_c, par)
    if abs(dtc) > 1e-9 and par[P_G_CMB] > 0.0:
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
    # top boundary: the magma ocean (soft-turbulence law) and the solid mantle (the configured law: mobile
    # lid, or the lid over its sublayer in stagnant-lid mode); across the rheological transition
    # (phi_c < phi_top < phi_c + P_BLEND) the two are blended with the same weight as the viscosity,
    # so that the fluxes are continuous in T_u
    w_mo = smoothstep((phi_top - par[P_PHI_C]) / par[P_BLEND])
    ts_m, qs_m, qu_m, du_m = 0.0, 0.0, 0.0, 0.0
    if w_mo > 0.0:
        ts_m, qs_m, qu_m, du_m = _top_boundary(False, False, tu, tu, 0.0, depth, dtc, eta_u, eps, par)
    tl = tu
    ddl_sl = 0.0
    ts_s, qs_s, qu_s, du_s = ts_m, qs_m, qu_m, du_m
    if w_mo < 1.0:
        if par[P_STAGNANT] > 0.5:
            tl = lid_base_temperature(tu, par)
            d_eff = max(d_lid, par[P_LID_MIN])
            d_conv = max(depth - d_eff, 0.05 * depth)
            ts_s, qs_s, qu_s, du_s = _top_boundary(True, solidified, tu, tl, d_eff, d_conv, dtc, eta_s, eps, par)
            # rho c (T_u - T_lid,mean) dD/dt = q_lid - q_u: new lid material is cooled from T_u to the mean of
            # the linear lid profile, the same bookkeeping as mantle_energy (with it, the convecting mantle
            # loses exactly q_u at the lid base)
            t_lid_mean = 0.5 * (par[P_T_EQ] + tl)
            ddl_sl = (qs_s - qu_s) / (par[P_RHO_TOP] * par[P_CM] * max(tu - t_lid_mean, 1.0))
        else:
            ts_s, qs_s, qu_s, du_s = _top_boundary(False, solidified, tu, tu, 0.0, depth, dtc, eta_s, eps, par)
    if w_mo <= 0.0:
        ts_m, qs_m, qu_m, du_m = ts_s, qs_s, qu_s, du_s
    qs = w_mo * qs_m + (1.0 - w_mo) * qs_s
    qu = w_mo * qu_m + (1.0 - w_mo) * qu_s
    ts = w_mo * ts_m + (1.0 - w_mo) * ts_s
    delta_u = du_m if magma else du_s
    # lid: grows by the stagnant-lid law, thins back to its minimum over ~1 kyr where the top is molten
    diag[D_DLID] = (1.0 - w_mo) * ddl_sl + w_mo * (par[P_LID_MIN] - d_lid) / 3.15576e10
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
    diag[D_ATM_H2O] = m_h2o
    diag[D_ATM_CO2] = m_co2


@njit
def temperature_rates(tu, tc, d_lid, dy, grid, core, par, law):
    """(dT_u/dt, dT_c/dt) from the energy rates dy (for the step control, history and interpolation)."""
    d = max(d_lid, 0.0) if par[P_STAGNANT] > 0.5 else 0.0
    h_t = 1e-3 * max(1.0, 1e-4 * tu)
    dem_dtu = (mantle_energy(tu + h_t, d, grid, par, law) - mantle_energy(tu - h_t, d, grid, par, law)) / (2 * h_t)
    dem_dd = 0.0
    if par[P_STAGNANT] > 0.5 and d_lid > 0.0:
        dml = par[P_RHO_TOP] * 4.0 * math.pi * (par[P_RADIUS] - d_lid) ** 2
        dem_dd = dml * par[P_CM] * (0.5 * (par[P_T_EQ] + lid_base_temperature(tu, par)) - tu)
    dtu = (dy[Y_EM] - dem_dd * dy[Y_LID]) / dem_dtu
    h_c = 1e-3 * max(1.0, 1e-4 * tc)
    dec = (core_energy(tc + h_c, core, par) - core_energy(tc - h_c, core, par)) / (2 * h_c)
    dtc = dy[Y_EC] / dec if dec > 0.0 else 0.0
    return dtu, dtc


@njit
def rhs(t, y, grid, core, iso, par, law, work, diag, dy):
    """dy/dt at (t, y); also fills ``diag`` and leaves (T_u, T_c) in ``work``."""
    tu, tc = temperatures(y, grid, core, par, law, work)
    d_lid = y[Y_LID]
    diagnose(t, tu, tc, d_lid, grid, core, iso, par, law, diag)
    area_s = 4.0 * math.pi * par[P_RADIUS] ** 2
    area_c = 4.0 * math.pi * par[P_CORE_RADIUS] ** 2
    q_surf = diag[D_QS] * area_s
    q_cmb = diag[D_QC] * area_c if core[C_W].sum() > 0.0 else 0.0
    heat = diag[D_H]
    ddl = diag[D_DLID] if par[P_STAGNANT] > 0.5 else 0.0
    dy[Y_EM] = -q_surf + q_cmb + heat
    dy[Y_EC] = -q_cmb
    dy[Y_LID] = ddl
    dy[Y_OUT] = q_surf - heat


@njit
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


@njit
def adiabat_melt_count(tu, grid):
    """Number of mantle nodes whose adiabatic temperature T_u f(r) is above the solidus."""
    n = 0
    for i in range(grid.shape[1]):
        if tu * grid[G_F, i] > grid[G_TSOL, i]:
            n += 1
    return n


@njit
def hermite_extremum(y0, y1, d0, d1, h):
    """Value of the cubic Hermite interpolant's interior extremum on a step, and whether there is one."""
    a = 2.0 * (y0 - y1) + h * (d0 + d1)
    b = 3.0 * (y1 - y0) - h * (2.0 * d0 + d1)
    c = h * d0
    best = y0
    found = False
    if abs(a) < 1e-300:
        if abs(b) > 1e-300:
            s = -c / (2.0 * b)
            if 0.0 < s < 1.0:
                best = ((a * s + b) * s + c) * s + y0
                found = True
        return best, found
    disc = b * b - 3.0 * a * c
    if disc < 0.0:
        return best, found
    sq = math.sqrt(disc)
    for s in ((-b + sq) / (3.0 * a), (-b - sq) / (3.0 * a)):
        if 0.0 < s < 1.0:
            best = ((a * s + b) * s + c) * s + y0
            found = True
    return best, found


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
def record(t, y, tu, tc, dy, diag, grid, core, par, law, hist, n_h, iv, n_iv, temp, phi):
    """Store one accepted step: history row, T(r), phi(r) and the melt intervals."""
    profile(tu, tc, y[Y_LID], diag, grid, par, law, temp, phi)
    n_iv_new = find_intervals(phi, grid, n_h, iv, n_iv, iv.shape[0])
    if n_iv_new < 0:
        return -1
    melt = 0.0
    for i in range(grid.shape[1]):
        melt += grid[G_W, i] * phi[i]
    dtu, dtc = temperature_rates(tu, tc, y[Y_LID], dy, grid, core, par, law)
    stagnant = diag[D_REGIME] == REGIME_STAGNANT_LID
    hist[n_h, H_T] = t
    hist[n_h, H_TU] = tu
    hist[n_h, H_TC] = tc
    hist[n_h, H_LID] = y[Y_LID] if stagnant else 0.0
    hist[n_h, H_OUT] = y[Y_OUT]
    hist[n_h, H_QS] = diag[D_QS] * 4.0 * math.pi * par[P_RADIUS] ** 2
    hist[n_h, H_QC] = -dy[Y_EC]
    hist[n_h, H_H] = diag[D_H]
    hist[n_h, H_RIC] = diag[D_RIC]
    hist[n_h, H_MELT] = melt
    hist[n_h, H_REGIME] = diag[D_REGIME]
    hist[n_h, H_TS] = diag[D_TS]
    hist[n_h, H_DELTA_U] = diag[D_DELTA_U]
    hist[n_h, H_DELTA_C] = diag[D_DELTA_C]
    hist[n_h, H_TL] = diag[D_TL]
    # recomputed from the temperatures (not copied from the state), so the closure check also tests the
    # inversion of the stored-heat functions
    hist[n_h, H_E_STORED] = mantle_energy(tu, max(y[Y_LID], 0.0) if par[P_STAGNANT] > 0.5 else 0.0, grid, par,
                                          law) + core_energy(tc, core, par)
    hist[n_h, H_DTU] = dtu
    hist[n_h, H_DTC] = dtc
    hist[n_h, H_DLID] = dy[Y_LID] if stagnant else 0.0
    hist[n_h, H_PHI_TOP] = diag[D_PHI_TOP]
    hist[n_h, H_ATM_H2O] = diag[D_ATM_H2O]
    hist[n_h, H_ATM_CO2] = diag[D_ATM_CO2]
    hist[n_h, H_N_IV] = n_iv_new - n_iv
    return n_iv_new


@njit
def integrate(state, grid, core, iso, par, law, hist, iv, max_steps):
    """Advance from ``state`` = (t, y[0..3], h, n_hist, n_iv, n_rejected, T_u, T_c, dE_m/dT_u, dE_c/dT_c,
    dy/dt[0..3]) until the end time, a full
    buffer or max_steps; updates ``state`` in place (so a call can resume) and returns a STATUS_* code.

    Error control on the two energies (relative rtol plus the heat of atol_k) and on the lid (relative plus
    atol_k x 1 km/K); every step also keeps |dT_u|, |dT_c| <= P_DT_MAX, and a step with a
    temperature extremum inside it is shortened when the interpolated extremum would change which
    nodes are above the solidus while neither end shows it, so that no melt layer appears and vanishes
    unseen between two recorded profiles.
    """
    n = grid.shape[1]
    temp = np.empty(n)
    phi = np.empty(n)
    diag = np.empty(N_D)
    work = np.zeros(4)
    work0 = np.zeros(4)
    y = np.empty(N_Y)
    ynew = np.empty(N_Y)
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
    work[0] = state[9]
    work[1] = state[10]
    work[2] = state[11]
    work[3] = state[12]
    t_end = par[P_T_END]
    rtol = par[P_RTOL]
    dt_max = par[P_DT_MAX]
    # absolute scales: heat of 1 K of mantle and of core, 1 km of lid
    abs_e_m = par[P_ATOL] * par[P_MANTLE_MASS] * par[P_CM]
    abs_e_c = par[P_ATOL] * max(core[C_W].sum() * par[P_CC], 1.0)
    abs_lid = par[P_ATOL] * 1.0e3
    if n_h == 0:
        rhs(t, y, grid, core, iso, par, law, work, diag, k1)
    else:  # resuming: the last accepted stage's slopes (first-same-as-last), exactly as left
        for j in range(N_Y):
            k1[j] = state[13 + j]
    tu = work[0]
    tc = work[1]
    top = n - 1
    phi_c = par[P_PHI_C]
    phi_prev = node_melt(tu * grid[G_F, top], grid, top, law)  # surface melt (batch) at the step's start
    if n_h == 0:
        if par[P_T_SOLID] >= NOT_YET and diag[D_PHI_SURF] <= phi_c:
            par[P_T_SOLID] = t  # starts below the rheological transition
            rhs(t, y, grid, core, iso, par, law, work, diag, k1)
        res = record(t, y, tu, tc, k1, diag, grid, core, par, law, hist, n_h, iv, n_iv, temp, phi)
        if res < 0:
            return STATUS_INTERVALS_FULL
        n_iv = res
        n_h = 1
    steps = 0
    while t < t_end * (1.0 - 1e-14):
        if n_h >= hist.shape[0]:
            _save(state, t, y, h, n_h, n_iv, n_rej, tu, tc, work, k1)
            return STATUS_HISTORY_FULL
        if steps >= max_steps:
            _save(state, t, y, h, n_h, n_iv, n_rej, tu, tc, work, k1)
            return STATUS_MAX_STEPS
        # temperature-step limit from the current slopes
        dtu, dtc = temperature_rates(tu, tc, y[Y_LID], k1, grid, core, par, law)
        rate = max(abs(dtu), abs(dtc))
        if rate > 0.0:
            h = min(h, dt_max / rate)
        h = min(h, par[P_H_MAX], t_end - t)
        if h < 1e-6:
            _save(state, t, y, h, n_h, n_iv, n_rej, tu, tc, work, k1)
            return STATUS_STEP_TOO_SMALL
        for j in range(4):
            work0[j] = work[j]
        for j in range(N_Y):
            tmp[j] = y[j] + h * A21 * k1[j]
        rhs(t + C2 * h, tmp, grid, core, iso, par, law, work, diag, k2)
        for j in range(N_Y):
            tmp[j] = y[j] + h * (A31 * k1[j] + A32 * k2[j])
        rhs(t + C3 * h, tmp, grid, core, iso, par, law, work, diag, k3)
        for j in range(N_Y):
            tmp[j] = y[j] + h * (A41 * k1[j] + A42 * k2[j] + A43 * k3[j])
        rhs(t + C4 * h, tmp, grid, core, iso, par, law, work, diag, k4)
        for j in range(N_Y):
            tmp[j] = y[j] + h * (A51 * k1[j] + A52 * k2[j] + A53 * k3[j] + A54 * k4[j])
        rhs(t + C5 * h, tmp, grid, core, iso, par, law, work, diag, k5)
        for j in range(N_Y):
            tmp[j] = y[j] + h * (A61 * k1[j] + A62 * k2[j] + A63 * k3[j] + A64 * k4[j] + A65 * k5[j])
        rhs(t + h, tmp, grid, core, iso, par, law, work, diag, k6)
        for j in range(N_Y):
            ynew[j] = y[j] + h * (B1 * k1[j] + B3 * k3[j] + B4 * k4[j] + B5 * k5[j] + B6 * k6[j])
        rhs(t + h, ynew, grid, core, iso, par, law, work, diag, k7)
        tu_new = work[0]
        tc_new = work[1]
        err = 0.0
        for j in range(3):
            yerr = h * (E1 * k1[j] + E3 * k3[j] + E4 * k4[j] + E5 * k5[j] + E6 * k6[j] + E7 * k7[j])
            if j == Y_EM:
                scale = abs_e_m + rtol * max(abs(y[j]), abs(ynew[j]))
            elif j == Y_EC:
                scale = abs_e_c + rtol * max(abs(y[j]), abs(ynew[j]))
            else:
                scale = abs_lid + rtol * max(abs(y[j]), abs(ynew[j]))
            e = abs(yerr) / scale
            if e > err:
                err = e
        big_jump = abs(tu_new - tu) > 1.5 * dt_max or abs(tc_new - tc) > 1.5 * dt_max
        # a temperature maximum or minimum inside the step could open and close a melt layer that neither
        # end of the step shows: compare the adiabat's melt count at the interpolated extremum with the ends
        unseen = False
        if err <= 1.0 and not big_jump and h > 1.0:
            dtu1, dtc1 = temperature_rates(tu_new, tc_new, ynew[Y_LID], k7, grid, core, par, law)
            if dtu * dtu1 < 0.0:
                t_ext, found = hermite_extremum(tu, tu_new, dtu, dtu1, h)
                if found:
                    n_ext = adiabat_melt_count(t_ext, grid)
                    if n_ext != adiabat_melt_count(tu, grid) and n_ext != adiabat_melt_count(tu_new, grid):
                        unseen = True
            if dtc * dtc1 < 0.0 and not unseen:
                t_ext, found = hermite_extremum(tc, tc_new, dtc, dtc1, h)
                if found:
                    above = t_ext > grid[G_TSOL, 0]
                    if above != (tc > grid[G_TSOL, 0]) and above != (tc_new > grid[G_TSOL, 0]):
                        unseen = True
        # the step that first takes the surface below phi_c ends on the crossing (within PHI_TOL), so that the
        # switch to the solidified mantle's criterion and law (P_T_SOLID) does not depend on the step size
        phi_end = diag[D_PHI_SURF]
        crossing = par[P_T_SOLID] >= NOT_YET and phi_end <= phi_c
        overshoot = (crossing and err <= 1.0 and not big_jump and not unseen and h > 1.0
                     and phi_c - phi_end > PHI_TOL and phi_prev > phi_c)
        if err <= 1.0 and not big_jump and not unseen and not overshoot:
            if crossing:
                # from here on the solidified mantle: its slopes at the step's end (the heat flow jumps here
                # when the solid mantle's (a, beta) differ from the classical law's)
                par[P_T_SOLID] = t + h
                rhs(t + h, ynew, grid, core, iso, par, law, work, diag, k7)
            # record first: if the interval buffer is full, the step is redone from the unchanged state
            res = record(t + h, ynew, tu_new, tc_new, k7, diag, grid, core, par, law, hist, n_h, iv, n_iv, temp,
                         phi)
            if res < 0:
                if crossing:
                    par[P_T_SOLID] = NOT_YET
                _save(state, t, y, h, n_h, n_iv, n_rej, tu, tc, work0, k1)
                return STATUS_INTERVALS_FULL
            phi_prev = phi_end
            t = t + h
            for j in range(N_Y):
                y[j] = ynew[j]
                k1[j] = k7[j]
            tu = tu_new
            tc = tc_new
            n_iv = res
            n_h += 1
            steps += 1
            fac = 5.0 if err == 0.0 else min(5.0, max(0.2, 0.9 * err ** (-0.2)))
            h = h * fac
        else:
            n_rej += 1
            work[0] = tu
            work[1] = tc
            if big_jump:
                h = 0.5 * h
            elif unseen:
                h = 0.3 * h
            elif overshoot:  # secant on the surface melt fraction
                h = h * min(max((phi_prev - phi_c) / (phi_prev - phi_end), 0.01), 0.99)
            else:
                h = h * max(0.1, 0.9 * err ** (-0.25))
    _save(state, t, y, h, n_h, n_iv, n_rej, tu, tc, work, k1)
    return STATUS_DONE


@njit
def _save(state, t, y, h, n_h, n_iv, n_rej, tu, tc, work, k1):
    state[0] = t
    for j in range(N_Y):
        state[1 + j] = y[j]
    state[5] = h
    state[6] = n_h
    state[7] = n_iv
    state[8] = n_rej
    state[9] = tu
    state[10] = tc
    state[11] = work[2]
    state[12] = work[3]
    for j in range(N_Y):
        state[13 + j] = k1[j]


@njit
def profile_at(t, tu, tc, d_lid, grid, core, iso, par, law, temp, phi, diag):
    """T(r), phi(r) and diagnostics at given temperatures (snapshots and event refinement)."""
    diagnose(t, tu, tc, d_lid, grid, core, iso, par, law, diag)
    profile(tu, tc, d_lid, diag, grid, par, law, temp, phi)


@njit
def rhs_py(t, y, grid, core, iso, par, law, guess):
    """dy/dt as a new array (for checks); ``guess`` = (T_u, T_c) start of the inversion."""
    diag = np.empty(N_D)
    dy = np.empty(N_Y)
    work = np.zeros(4)
    work[0] = guess[0]
    work[1] = guess[1]
    rhs(t, y, grid, core, iso, par, law, work, diag, dy)
    return dy


@njit
def interval_edges(hist, iv, grid, core, iso, par, law, out):
    """Sub-node edges of every melt interval: out[k] = (r_top, P_top, r_bottom, P_bottom) where T - T_sol
    crosses zero between the interval's last molten node and its solid neighbour (linear interpolation),
    the node itself at the surface or the CMB. Profiles are rebuilt from the history (T_u, T_c, lid)."""
    n = grid.shape[1]
    temp = np.empty(n)
    phi = np.empty(n)
    diag = np.empty(N_D)
    last = -1
    for k in range(iv.shape[0]):
        s = int(iv[k, I_STEP])
        if s != last:
            lid = hist[s, H_LID] if par[P_STAGNANT] > 0.5 else 0.0
            profile_at(hist[s, H_T], hist[s, H_TU], hist[s, H_TC], lid, grid, core, iso, par, law, temp, phi,
                       diag)
            last = s
        for side in range(2):
            node = int(iv[k, I_TOP]) if side == 0 else int(iv[k, I_BOTTOM])
            nb = node + 1 if side == 0 else node - 1
            r = grid[G_R, node]
            p = grid[G_P, node]
            if 0 <= nb < n:
                e0 = temp[node] - grid[G_TSOL, node]
                e1 = temp[nb] - grid[G_TSOL, nb]
                if e0 > 0.0 >= e1:
                    f = e0 / (e0 - e1)
                    r = r + f * (grid[G_R, nb] - r)
                    p = p + f * (grid[G_P, nb] - p)
            out[k, 2 * side] = r
            out[k, 2 * side + 1] = p
