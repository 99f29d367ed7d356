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
from .lid import floored_rate, lid_heat_temperature
from .layout import (D_ATM_CO2, D_ATM_H2O, D_DCRUST, D_DELTA_U, D_DHPE, D_DLID, D_DLID_CRUST, D_H, D_MPROD, D_OCEAN,
                     D_OG_CO2, D_OG_H2O, D_PHI_SURF, D_PHI_TOP, D_QCRUST, D_QS, D_QS_CRUST, D_QVOLC, D_REGIME, D_TL,
                     D_TS, D_UCONV, D_XCO2, D_XH2O, G_F, G_P, G_R, G_W, P_ATMOSPHERE, P_CM, P_CORE_RADIUS,
                     P_CRUST_HEAT, P_D_CO2, P_D_H2O, P_D_HPE, P_DEPLETE, P_ERUPT, P_G_SURF, P_KAPPA, P_LATENT,
                     P_LID_MIN, P_MANTLE_MASS, P_P_ECLOGITE, P_P_EXTRACT, P_RADIUS, P_RHO_CRUST, P_RHO_TOP, P_RIDGE,
                     P_STAGNANT, P_STEAM, P_VENT, P_VOLC, P_X_CO2, P_X_H2O, REGIME_MAGMA_OCEAN, Y_CRUST, Y_EM, Y_HPE,
                     Y_LID, Y_OG_CO2, Y_OG_H2O, Y_OUT, Y_XCO2, Y_XH2O)
from .layout import P_H2O_TOTAL, Y_WATER
from .radiation import escape_rate
from .physics import GREY_H2O_COEFF, GREY_H2O_EXPONENT, isentropic_melt, node_melt, smoothstep
from .physics import rhs as energy_rhs

#: Relative width below its largest thickness over which a stagnant-lid crust stops growing (this model's
#: choice: a smooth cut-off keeps the right-hand side continuous)
CRUST_CAP_WIDTH = 0.05
#: CO2 solubility in basaltic melt at the vent, mass fraction per Pa of CO2 (X = 4.4e-12 P; Pan, Holloway &
#: Kennedy 1991, as used by Lebrun et al. 2013, JGR Planets 118:1155; from memory; the grey atmosphere's law).
#: H2O: X = 6.8e-8 P^0.7 (GREY_H2O_COEFF, GREY_H2O_EXPONENT; the same source)
VENT_CO2_COEFF = 4.4e-12
#: Time over which the escape of a desiccated planet's outgassed water makes up an overshoot of the water lost
#: beyond the water there was [s] (:func:`dry_escape`; this model's choice: a numerical relaxation, long
#: against the longest step, run.max_step, so that it never limits an explicit step)
DRY_RELAX_TIME = 1.0e8 * 3.15576e7
#: The diagnostics :func:`volcanism` fills
OUTPUTS = (D_MPROD, D_QVOLC, D_DCRUST, D_XH2O, D_XCO2, D_UCONV, D_OG_H2O, D_OG_CO2, D_DHPE, D_QCRUST, D_QS_CRUST,
           D_DLID_CRUST)


@njit(leaf=True)
def convective_velocity(d, delta, par):
    """Convective (plate) velocity [m/s] u = (pi / 4) kappa d / delta^2 of a cell of depth (plate length) d
    whose upper thermal boundary layer is delta.

    Half-space cooling of a plate of length d moving at u has the mean flux 2 k dT / sqrt(pi kappa d / u)
    (Turcotte & Schubert, Geodynamics, checked; the surface flux k dT / sqrt(pi kappa t) averaged over ages 0 to
    d / u, the area-weighted mean of a plate whose area is uniform in age); equated with k dT / delta it gives
    u above: the plate is consumed at the age tau = d / u = 4 delta^2 / (pi kappa), whatever its length. With the
    boundary-layer law delta = d (Ra_cr / Ra)^beta this is u0 (Ra / Ra_cr)^(2 beta) with u0 = pi kappa / (4 d),
    the form of the convective velocity of Morschhauser, Grott & Breuer 2011, Icarus 212:541 (their u0 is a
    constant, ~2e-12 m/s for Mars, from memory; the same order as pi kappa / (4 d) = 5e-13 m/s there).
    kappa is the configured one, as k in the flux k dT / delta it is equated with (the density-dependent
    properties enter only the layer's Rayleigh number, at its base)."""
    return 0.25 * math.pi * par[P_KAPPA] * d / (delta * delta)


@njit(leaf=True)
def volcanism(tu, y, diag, grid, par, law, solidified=True):
    """Melt extraction and its consequences at upper-mantle potential temperature ``tu`` and state ``y``,
    after :func:`meltzone._core.physics.diagnose` has filled ``diag`` (``solidified``: the time is at or after
    the rheological switch); fills D_MPROD (melt mass extracted
    [kg/s]), D_QVOLC (heat the erupted melt carries to the surface [W]), D_DCRUST (crust growth [m/s]),
    D_XH2O and D_XCO2 (H2O and CO2 the melt takes out of the mantle [kg/s]) and D_UCONV (convective
    velocity [m/s]). No extraction in the magma-ocean regime (the ocean is its own melt; in the blend across the
    rheological transition the regime is the magma ocean's and so is the upper boundary layer): there only the
    crust's heat (all of it at the surface) and its return with the thinning lid; all zero with volcanism off.
    Production starts at the rheological switch, where the integrator lands a step: before it (``solidified``
    False) every state counts as the magma ocean's, also a stage of a step that dips below phi_c while the step
    ends above it (the loop lands the first crossing). Extraction switched on at full strength in such a stage
    (the top's melt fraction is phi_c there) and off in the others, and the Dormand-Prince weights, one of them
    negative, left a 12 M_E stagnant-lid planet with a crust of -6 m and -6e15 kg of outgassed water (measured).

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
      :func:`convective_velocity` with the convecting depth (stagnant lid) or, under a mobile lid, the plates'
      length R / P_RIDGE: the plates on both sides of the ridges cover the surface, 2 L_ridge d = 4 pi R^2,
      so new seafloor is made at 2 u L_ridge = 4 pi R^2 / tau, the surface over the plate's age at the trench
      tau = 4 delta^2 / (pi kappa), whatever the ridge length (area balance; common practice: Earth makes
      ~3.4 km^2/yr, Rowley 2002, GSA Bull. 114:927, from memory; the figure checked in Science
      297:1239 (2002), the journal's summary). The plates were the mantle's depth long before: with ridges
      1.5 circumferences long they covered 0.68 of Earth's surface (17.1 km^3/yr of ridge melt today).
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
      above it is removed at the convective rate u / d_conv. Where the lid (above its minimum) is the cap, crust
      in the cut-off band also follows a lid that thins, (1 - smoothstep) min(dD_lid/dt, 0): the lid's base
      overtakes it and it returns to the mantle with its share of the heat sources (this model's choice; in a
      reformed magma ocean, where the lid thins to its minimum, so does the crust). Mobile lid: subducted at the rate plates are
      consumed, D / tau = D u / (R / P_RIDGE) (this model's choice).
    * Depleted source (P_DEPLETE): the crust's mass is missing from the mantle, whose mean depletion is
      F = M_crust / M_mantle (the whole mantle, well mixed; recycled crust refertilises it). A residue that lost
      the fraction F melts again only where the fertile rock would hold more than F of melt, so each node's
      melt fraction is (phi - F) / (1 - F) of the residue (zero below): the solidus rises by F (T_liq - T_sol)
      with the linear law. This model's choice after the depletion-dependent solidus of Morschhauser et al.
      2011 (form from memory); the mantle's stored heat keeps the fertile melt fraction.
    * Volatiles: batch melting (Shaw 1970, common practice), X_melt = X_mantle / (D + phi (1 - D)) per
      node; the source is the whole mantle, well mixed: X_mantle = initial - extracted / mantle mass (what the
      melt took out, erupted or intruded, has left it; Grott et al. 2011, Morschhauser et al. 2011, from
      memory). The erupted fraction outgasses what exceeds the solubility at the vent (P_VENT): X_H2O =
      6.8e-8 P^0.7 and X_CO2 = 4.4e-12 P [Pa] at the partial pressure of each gas at the surface, its column
      weight M g / (4 pi R^2) with M the atmosphere's (and ocean's) mass where an atmosphere is modelled, else
      the mass outgassed so far (the laws of Lebrun et al. 2013, from memory; Tosi et al. 2017, A&A 605:A71,
      abstract checked: solubility at the surface caps the H2O of a stagnant-lid atmosphere at a few tens of
      bar while most CO2 is outgassed). The rest stays in the erupted lava. Without P_VENT all of it outgasses.
    * Crust's heat sources (P_CRUST_HEAT): the heat-producing elements enter the melt by batch melting with
      the bulk partition coefficient P_D_HPE; their share s in the crust grows by
      k sum(m_i phi_i (1 - s) / (D + phi_i (1 - D))) / M_mantle and returns with recycled crust (crust that
      the cap stops, and crust removed from above it or subducted, carry s / M_crust per kg). The crust then
      holds the heat s H (H the radiogenic power, D_QCRUST; McLennan 2001, GRL 28:4019, abstract checked: a
      crust of >= 30 km may hold >= 50% of Mars's heat-producing elements). Its steady conductive profile
      in a lid of thickness D_l with the crust D_cr <= D_l at its top: surface flux k dT / D_l
      + (sH / A) (1 - D_cr / (2 D_l)) (D_QS_CRUST, leaves the mantle), lid-base flux k dT / D_l
      - (sH / A) D_cr / (2 D_l), which thins the lid at the lid law's rate per flux (D_DLID_CRUST; Morschhauser
      et al. 2011: the crust's heat sources thin the lid; the conductive profile is common practice,
      Turcotte & Schubert). Mobile lid: all of sH leaves at the surface."""
    for j in OUTPUTS:
        diag[j] = 0.0
    if par[P_VOLC] < 0.5:
        return
    magma = diag[D_REGIME] == REGIME_MAGMA_OCEAN or not solidified
    stagnant = par[P_STAGNANT] > 0.5
    r_p = par[P_RADIUS]
    depth = r_p - par[P_CORE_RADIUS]
    delta = max(diag[D_DELTA_U], 1.0)
    d_lid = max(y[Y_LID], par[P_LID_MIN]) if stagnant else 0.0
    # stagnant: the convecting depth; mobile: the plates' length, R / P_RIDGE (the plates on both sides of ridges
    # of length P_RIDGE 2 pi R cover the surface 4 pi R^2 the boundary layer's flux leaves through)
    d_conv = max(depth - d_lid, 0.05 * depth) if stagnant else r_p / par[P_RIDGE]
    u = convective_velocity(d_conv, delta, par)
    diag[D_UCONV] = u
    crust = min(max(y[Y_CRUST], 0.0), 0.5 * r_p)
    rho_cr = par[P_RHO_CRUST]
    area_base = 4.0 * math.pi * (r_p - crust) ** 2
    m_crust = rho_cr * 4.0 / 3.0 * math.pi * (r_p ** 3 - (r_p - crust) ** 3)
    share = min(max(y[Y_HPE], 0.0), 1.0)
    heat_sources = par[P_CRUST_HEAT] > 0.5
    if heat_sources:  # in a reformed magma ocean all of it at the surface
        crust_heat(tu, share, crust, d_lid, stagnant and not magma, diag, par)
    cap = 0.0
    keep = 1.0  # share of the extracted melt the crust keeps (the rest recycles crust from its base)
    if stagnant:
        cap = min(d_lid, par[P_P_ECLOGITE] / (rho_cr * par[P_G_SURF]))
        keep = smoothstep((cap - crust) / (CRUST_CAP_WIDTH * cap)) if cap > 0.0 else 0.0
        # crust above its cap is removed at the convective rate (its base turned to eclogite), and crust in the
        # cap's cut-off band follows a lid that thins: the lid's base overtakes it (this model's choice)
        # at the lid's rate as floored (lid.floored_rate, 0 at D_min): the law's raw rate there is the thinning
        # the floor holds back (measured, with it a steam world's crust chattered by +-3 m under a 1 km lid and
        # the run stopped at run.max_steps)
        loss = min(cap - crust, 0.0) * u / d_conv
        if d_lid < par[P_P_ECLOGITE] / (rho_cr * par[P_G_SURF]):
            loss += (1.0 - keep) * min(floored_rate(diag[D_DLID] + diag[D_DLID_CRUST], y[Y_LID], par), 0.0)
    else:
        loss = -crust * u / d_conv  # consumed at the plates' age at the trench, d_conv / u
    diag[D_DCRUST] = loss
    if magma:  # no extraction: the ocean is its own melt; the crust and its share return as the lid thins
        if heat_sources and m_crust > 0.0:
            diag[D_DHPE] = share * rho_cr * area_base * loss / m_crust
        return
    cp = par[P_CM]
    lat = par[P_LATENT]
    ts = diag[D_TS]
    tl = diag[D_TL]
    f_e = par[P_ERUPT]
    x_h2o = max(par[P_X_H2O] - y[Y_XH2O] / par[P_MANTLE_MASS], 0.0)
    x_co2 = max(par[P_X_CO2] - y[Y_XCO2] / par[P_MANTLE_MASS], 0.0)
    d_h2o = par[P_D_H2O]
    d_co2 = par[P_D_CO2]
    d_hpe = par[P_D_HPE]
    dep = min(m_crust / par[P_MANTLE_MASS], 0.99) if par[P_DEPLETE] > 0.5 else 0.0
    sol_h2o, sol_co2 = vent_solubility(y, diag, par)
    s_m = 0.0  # sum of m_i phi_i (stagnant) or of phi_i rho_i dz_i (mobile)
    s_q = 0.0
    s_h = 0.0
    s_c = 0.0
    s_oh = 0.0
    s_oc = 0.0
    s_p = 0.0
    found = False
    top = grid.shape[1] - 1
    # mobile lid: the top node's isentropic melt fraction is the regime's, which diagnose computed at the same
    # T_u once the mantle has solidified; that is when it differs from the batch value it takes before
    reuse_top = not stagnant and tu >= 1.0 and diag[D_PHI_TOP] != diag[D_PHI_SURF]
    for i in range(top, -1, -1):
        if grid[G_P, i] > par[P_P_EXTRACT]:
            break  # deeper melt is denser than its residue and stays
        z = r_p - grid[G_R, i]
        if z < d_lid:
            continue
        t_ad = tu * grid[G_F, i]
        if stagnant:
            t = tl + (t_ad - tl) * (z - d_lid) / delta if z < d_lid + delta else t_ad
            phi = node_melt(t, grid, i, law)
        else:
            phi = diag[D_PHI_TOP] if i == top and reuse_top else isentropic_melt(t_ad, grid, i, law, par)
            t = t_ad - lat / cp * phi
        if phi > 0.0:
            found = True
        elif found and z > d_lid + delta:
            break  # below the melt zone
        phi = (phi - dep) / (1.0 - dep)  # melt fraction of the depleted residue
        if phi <= 0.0:
            continue
        m = grid[G_W, i] * phi
        if not stagnant:
            m /= 4.0 * math.pi * grid[G_R, i] ** 2
        s_m += m
        # erupted: to the surface (heat pipe); intruded: freezes in the lid, whose heat is that of its conductive
        # profile (a function of T_u and its thickness), so what it brings above T_l leaves through the surface
        s_q += m * (lat + cp * (f_e * (t - ts) + (1.0 - f_e) * max(t - tl, 0.0)))
        xm_h = x_h2o / (d_h2o + phi * (1.0 - d_h2o))
        xm_c = x_co2 / (d_co2 + phi * (1.0 - d_co2))
        s_h += m * xm_h
        s_c += m * xm_c
        s_oh += m * max(xm_h - sol_h2o, 0.0)
        s_oc += m * max(xm_c - sol_co2, 0.0)
        s_p += m / (d_hpe + phi * (1.0 - d_hpe))
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
    diag[D_OG_H2O] = k * f_e * s_oh
    diag[D_OG_CO2] = k * f_e * s_oc
    diag[D_DCRUST] += keep * mprod / (rho_cr * area_base)
    if heat_sources:
        # HPE in, and out with the crust that recycles (the cap's share of the new melt, and the crust removed)
        out = (1.0 - keep) * mprod - rho_cr * area_base * loss
        diag[D_DHPE] = k * s_p * (1.0 - share) / par[P_MANTLE_MASS] - (share * out / m_crust if m_crust > 0.0
                                                                        else 0.0)


@njit(leaf=True)
def recycling_rate(diag, par):
    """Rate 1 / tau [1/s] at which a mobile lid's plates carry the crust and its share of the heat sources to
    the trenches (see :func:`volcanism`: dD/dt = -D u / d_conv, d_conv = R / P_RIDGE), with ``diag`` of an
    evaluation; zero without volcanism or under a stagnant lid. The integrator's implicit method takes it as
    those rows' Jacobian diagonal (the crust's rate exactly, its share's to the thin-crust order; this model's
    choice), and its stiffness test as an eigenvalue of the system."""
    if par[P_VOLC] < 0.5 or par[P_STAGNANT] > 0.5:
        return 0.0
    return diag[D_UCONV] * par[P_RIDGE] / par[P_RADIUS]


@njit(leaf=True)
def vent_solubility(y, diag, par):
    """(X_H2O, X_CO2): mass fractions that stay dissolved in the erupted melt at the partial pressures of the
    gases at the surface (their column weights; see :func:`volcanism`); zero without P_VENT."""
    if par[P_VENT] < 0.5:
        return 0.0, 0.0
    if par[P_ATMOSPHERE] > 0.5 or par[P_STEAM] > 0.5:
        m_h2o = diag[D_ATM_H2O] + diag[D_OCEAN]
        m_co2 = diag[D_ATM_CO2]
    else:
        m_h2o = y[Y_OG_H2O]
        m_co2 = y[Y_OG_CO2]
    load = par[P_G_SURF] / (4.0 * math.pi * par[P_RADIUS] ** 2)
    return (GREY_H2O_COEFF * (max(m_h2o, 0.0) * load) ** GREY_H2O_EXPONENT,
            VENT_CO2_COEFF * max(m_co2, 0.0) * load)


@njit(leaf=True)
def crust_heat(tu, share, crust, d_lid, stagnant, diag, par):
    """The crust's heat sources (see :func:`volcanism`): D_QCRUST [W], the surface flux they add [W/m^2]
    and the lid rate they add [m/s] (zero without a stagnant lid)."""
    q = share * diag[D_H]
    diag[D_QCRUST] = q
    flux = q / (4.0 * math.pi * par[P_RADIUS] ** 2)
    if not stagnant:
        diag[D_QS_CRUST] = flux
        return
    half = 0.5 * min(crust / d_lid, 1.0)
    diag[D_QS_CRUST] = flux * (1.0 - half)
    # the lid law's rate per flux (meltzone._core.lid.lid_growth, either growth law)
    diag[D_DLID_CRUST] = -flux * half / (par[P_RHO_TOP] * par[P_CM] * max(tu - lid_heat_temperature(diag[D_TL], par),
                                                                          1.0))


@njit(leaf=True)
def rhs(t, y, t_switch, grid, core, iso, par, law, work, diag, dy):
    """dy/dt with volcanism: :func:`meltzone._core.physics.rhs`, less the heat the erupted melt carries to the
    surface and the crust's heat that leaves through it (both added to the heat out, so the budget still
    closes; the crust's heat joins the surface heat flow), the lid thinned by the crust's heat (never below its
    minimum: :func:`meltzone._core.lid.floored_rate`), plus the crust,
    the extracted and outgassed volatiles and the crust's share of the heat sources; on a planet whose water is
    all lost, the escape of the outgassed water (:func:`dry_escape`)."""
    energy_rhs(t, y, t_switch, grid, core, iso, par, law, work, diag, dy)
    volcanism(work[0], y, diag, grid, par, law, t >= t_switch)
    q = diag[D_QVOLC] + diag[D_QS_CRUST] * 4.0 * math.pi * par[P_RADIUS] ** 2
    dy[Y_EM] -= q
    dy[Y_OUT] += q
    diag[D_QS] += diag[D_QS_CRUST]
    if par[P_STAGNANT] > 0.5:  # the lid thins no further than its minimum (lid.py)
        dy[Y_LID] = floored_rate(dy[Y_LID] + diag[D_DLID_CRUST], y[Y_LID], par)
    dy[Y_CRUST] = diag[D_DCRUST]
    dy[Y_XH2O] = diag[D_XH2O]
    dy[Y_XCO2] = diag[D_XCO2]
    dy[Y_OG_H2O] = diag[D_OG_H2O]
    dy[Y_OG_CO2] = diag[D_OG_CO2]
    dy[Y_HPE] = diag[D_DHPE]
    if diag[D_OG_H2O] > 0.0 and (par[P_STEAM] > 0.5 or par[P_ATMOSPHERE] > 0.5):
        dry = dry_escape(t, y, par, diag[D_OG_H2O])
        if dry >= 0.0:
            dy[Y_WATER] = dry


@njit(leaf=True)
def dry_escape(t, y, par, supply):
    """Water lost to space [kg/s] by a planet whose water is all lost (water left w = inventory + outgassed - lost
    <= 0) while the volcanoes outgas ``supply`` [kg/s] of it: energy-limited escape removes the vapour as fast as
    it comes, up to its own limit (:func:`meltzone._core.radiation.escape_rate`), less w / DRY_RELAX_TIME (an
    overshoot w < 0 of the step that desiccated the planet is made up), never negative. -1 where the water
    left is positive (the rate of :func:`meltzone._core.physics.diagnose` applies). Without it the rate jumped from
    0 (w <= 0) to the full limit (w > 0): the water left, refilled by outgassing, crossed 0 every few kyr, and a
    trace of vapour in one stage of a step moved the lid's rate by ~4e-11 m/s; the error estimates then held a
    stagnant-lid planet's steps at 1-10 kyr (measured: 11,000-35,000 steps to 4.5 Gyr). The escape that keeps
    pace with the supply is the sliding solution of that jump (Filippov 1988, Differential Equations with
    Discontinuous Righthand Sides, Kluwer; from memory), so the atmosphere stays dry as before."""
    water = par[P_H2O_TOTAL] + y[Y_OG_H2O] - y[Y_WATER]
    if water > 0.0:
        return -1.0
    return max(min(escape_rate(t, 1.0, 0.0, par), supply) + water / DRY_RELAX_TIME, 0.0)


@njit(inline="always")
def rhs_packed(t, y, args, dy):
    """:func:`rhs` with its inputs in one tuple (t_switch, grid, core, iso, par, law, work, diag), the form the
    stepper of :mod:`meltzone._core.dopri` calls."""
    t_switch, grid, core, iso, par, law, work, diag = args
    rhs(t, y, t_switch, grid, core, iso, par, law, work, diag, dy)
