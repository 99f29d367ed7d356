"""The boundary-layer scheme: one potential temperature for the convecting mantle, thermal boundary layers
at its top and bottom, an adiabatic core (``convection.scheme = "boundary-layer"``).

:func:`run` builds the numba core's inputs (:class:`meltzone._core.layout.KernelInputs`) from the spec, the
interior and the melting curves evaluated on the mantle nodes, runs the integrator of :mod:`meltzone._core.loop`
(growing its buffers when they fill) and returns a :class:`~meltzone.evolution.contract.History`;
:class:`Evaluator` rebuilds the state inside a step. Nothing outside this module and :mod:`meltzone._core`
sees the packed arrays.

Parameter defaults follow Tosi et al. 2017 (A&A 605:A71, Table 1; checked):
A = 6.127e10 Pa s, E = 335 kJ/mol, V = 4 cm^3/mol, Ra_cr = 450, k = 4 W/m/K,
kappa = 1e-6 m^2/s, alpha = 2e-5 1/K, c_mantle = 1100 and c_core = 800 J/kg/K,
latent heat 6e5 J/kg, initial CMB excess 200 K.

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
  pairs fit equally), lid growth rho c (T_u - T_l) dD/dt = -q_u + k (T_l - T_s) / D
  (Schubert & Spohn 1990; Morschhauser et al. 2011, Icarus 212:541; from memory), the lid's
  rock counted at T_l in the stored heat; or, with
  ``convection.lid_growth_law = "heat-balance-integral"``, rho c (T_u - T_lm) dD/dt =
  -q_u + k (T_l - T_s) / D with T_lm the lid's mean temperature (:mod:`meltzone._core.lid`); blended with the
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
  (Stevenson et al. 1983; Labrosse 2015, PEPI 247:36); the latent heat scales with
  the alloy's melting temperature at the inner core's edge (constant entropy of
  melting, :func:`inner_core_heat_row`), ~4x Earth's at the centre of a 10 M_E core; the gravitational energy
  from the light elements the solid rejects, in the structure's own potential well
  (:func:`gravitational_energy_nodes`, ``core.compositional_density_jump``; ~0.6x the latent heat at Earth's ICB);
* basal magma ocean (``melting.basal_magma_ocean = "reservoir"``, experimental and off by default; Labrosse,
Hernlund & Coltice
  2007, Nature 450:866; parameterised models: Blanc, Stegman & Ziegler 2020, EPSL 534; O'Rourke 2020, GRL 47;
  abstracts seen, details from memory): a well-mixed melt layer on the core at the core's temperature T_c, of
  one composition; its melting curve is the mantle solidus on the nodes lowered by dT0 + dT_fe (1 - M_b/M_ref)
  (dT0 = ``basal_melt_depression_k``, dT_fe = ``basal_melt_enrichment_k``, M_ref =
  ``basal_ocean_reference_fraction`` x mantle mass; capped at M_ref). Its mass M_b is where T_c meets that
  curve at its hottest point below the top (the largest solidus there), so that the melt is above its melting
  curve at every depth it spans; crystals, lighter than the iron-rich melt (residual melts denser than every
  coexisting solid at deep-mantle pressures: "Investigating magma ocean solidification on Earth through
  laser-heated diamond anvil cell experiments", abstract checked, GRL 2021 from memory; dense iron-rich melt
  segregates from lighter solids wherever they form: Boukare et al. 2025, Nature,
  doi:10.1038/s41586-025-08701-z, abstract checked), collect at its top r_b, where the mantle mass below is M_b
  (linear between nodes, so the thickness is not a node count). M_b then rises strictly and
  continuously with T_c for any M_ref. (The former top condition, T_c on the curve at the top alone, left the
  melt below under its own curve; where the solidus falls upward faster than the enrichment lifts the curve
  its top jumped (1 M_E, measured: from M_ref = 0.14 of the mantle), and from 0.18 the curve had no crossing:
  a 0.33 ocean, 1212 km, froze at one T_c and the time step collapsed at 2.2 Gyr.) With
  ``basal_melt_depression_scaling = "solidus"`` (the default) both terms are multiplied by T_sol / T_ref, T_ref
  the solidus at Earth's CMB (4158 K,
  :func:`basal_reference_solidus`): a freezing-point depression at fixed composition is proportional to the
  melting temperature (ideal solution, common practice), where one constant in kelvin carried Earth's value
  unchanged to the ~3x hotter solidus of a 10 M_E CMB. The enrichment term is this model's
  choice: at one composition an isothermal layer whose curve falls upward would be molten to any height once
  T_c passes the curve at its base; the FeO the crystals reject (Labrosse et al. 2007) lowers the melt's
  melting point as the layer shrinks, which sets its mass at each T_c and makes it thin as the core cools. The
  core and the ocean are one reservoir of stored heat E_c(T_c) (core sensible, inner core, plus the ocean's M_b
  (c_m T_c + L)); the mantle's stored
  heat leaves the ocean's mass out. Mass that crystallises at the top joins the mantle with the heat the mantle
  function counts for it (c_m T_u f + L phi at r_b); the rest, its latent heat and its excess over the
  adiabat, stays in the reservoir. The lower boundary layer sits on the ocean's top (radius r_b, the adiabat,
  pressure and solidus there), and the CMB heat flow series is the reservoir's loss, Q_b plus the heat of the
  mass it hands over. The History's ``basal_ocean_thickness`` is r_b - r_c; in the profiles the ocean's nodes
  are at T_c with the mantle's melt law of T_c (that law does not know the enrichment). ``"off"`` (the default)
  gives the scheme without it (the lower boundary layer on the core). Off by default: its melting-curve form
  and its three parameters are this model's choice; at 0.5-2 M_E it stays at its cap for > 10 Gyr while the
  mixing-length scheme's basal layer ends at 1.3-2.0 Gyr; and it moves Earth's inner core from PREM (1447
  against 1191 km without it at 4.5 Gyr, measured). With the default high-pressure activation volume (V_inf =
  1 cm^3/mol, physics.activation_enthalpy) it outlives 10 Gyr at 0.5-15 M_E (77-161 km), as published studies
  expect basal oceans to last longer in more massive planets (Lherm, Nakajima & Blackman 2026, JGR Planets 131;
  abstract checked). With V_inf = 0 its lifetime fell with mass above 2 M_E (1.77 Gyr at 5 M_E, 170 Myr at 10,
  46 Myr at 15): its heat loss at the start was ~1800x larger at 10 M_E than at 1 M_E (5.3e16 against 3.0e13 W)
  for ~30x the heat to lose, through the jump T_c - T_b (10,080 against 1,890 K), the boundary layer's
  viscosity at its mean temperature (2e17 against 1.4e21 Pa s; H / (R T) = 15 against 24, the activation
  enthalpy saturating at E + V0 P_d) and the density-dependent conductivity (k = 46 against 12 W/m/K);
* energy: the stored heat (sensible heat on the adiabat, latent heat of the
  melt, the lid's conductive profile, core sensible heat less the inner core's
  latent and gravitational energy) is one function of (T_u, lid) for the mantle
  and of T_c for the core: dE_m/dt = -Q_surface + Q_cmb + H, dE_c/dt = -Q_cmb.

* regime: a magma ocean while the melt fraction at the top of the convecting mantle
  exceeds phi_c. Until the top first reaches phi_c this is the batch melt of the
  adiabat at the surface; from then on it is the isentropic value of a solid mantle
  that melts as it rises and pays the latent heat (batch limit of McKenzie & Bickle
  1988, J. Petrol. 29:625; from memory), at the surface under a mobile lid and at the
  stagnant lid's base under a lid (the top of the mantle that convects; this model's
  choice: judged at the surface, a mantle warming under a lid of hundreds of km turned
  back into a magma ocean), so a solidified mantle that warms again does
  not turn back into a magma ocean until about phi_c L / c_p (~220 K) hotter; the
  magma-ocean branch's suspension then follows that same melt fraction. The solid branch
  of a solidified mantle has melt weakening up to phi_c but no suspension viscosity. The
  integrator lands the step that first crosses phi_c on the crossing (to PHI_TOL = 1e-8 in
  melt fraction). A solid law that cannot carry the heat (weak scalings away from their
  calibration) lets the mantle warm to that threshold, where the magma-ocean branch then
  holds it.

* pressure-dependent properties (:mod:`meltzone._core.properties`): alpha, k and kappa of each boundary layer
  from the density there; the solid upper boundary layer's viscosity (and melt weakening) at the layer's base
  below the lid (``convection.rayleigh_viscosity_depth``);
* starting core temperature by ``initial.core_start`` (:mod:`meltzone.evolution.core_start`).

Known limitations: with beta = 1/3 the mantle equilibrates with its heating within
~1 Gyr, so an Earth hindcast gives a present heat flow of ~28 TW (46 TW observed)
and a Urey ratio ~0.7 (Korenaga 2008, Rev. Geophys. 46:RG2007 discuss this paradox).
Without melt extraction, a stagnant-lid mantle warms until the isentropic melt fraction at the lid's base
reaches phi_c; the lid then thins (which raises that melt fraction) and the magma ocean reforms in a runaway,
cools the mantle within ~1 Myr and the lid regrows (measured: 1 M_E at 728 Myr, 2 M_E Katz law at 669 Myr).
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

from .._core import layout as k
from ..constants import GYR, MYR, YEAR
from ..errors import ConvergenceError
from ..iron import EARTH_ICB_PRESSURE_PA, iron_melting_temperature
from .contract import (INTEGER_INTERVAL_FIELDS, INTERVAL_FIELDS, SERIES, VOLCANISM_SERIES, History, InStep,
                       MantleGrid)
from .schemes import KERNEL_ERRORS, Scheme, kernel_failure

#: Lid thickness [m] below which a stagnant lid is not resolved (its starting value).
LID_MIN = 1.0e3
#: Model-time interval of the progress callback, in accepted steps.
PROGRESS_STEPS = 100
#: The History's switch-time key of the first time the top reached the rheological transition.
SWITCH = "rheological_switch"
#: convection.rayleigh_viscosity_depth choices, in the order of the core's RA_VISC_* codes.
RAYLEIGH_VISCOSITY_DEPTHS = ("surface", "boundary-layer-base", "mid-mantle")


def _node_weights(r: np.ndarray, m: np.ndarray, m_bottom: float, m_top: float) -> np.ndarray:
    """Mass of the shell each node stands for (midpoint rule on the enclosed mass)."""
    mid = 0.5 * (r[1:] + r[:-1])
    m_mid = np.interp(mid, r, m)
    edges = np.concatenate([[m_bottom], m_mid, [m_top]])
    return np.diff(edges)


def gravitational_energy_nodes(r, enclosed_mass, gravity, density, jump):
    """Gravitational energy [J] released per kg of inner core grown at each core node (centre to CMB): the
    solid rejects light elements, which the convecting liquid carries up, E_g = (dRho_chi / rho) (psi_bar - psi)
    with psi(r) the gravitational potential (d psi / dr = g, trapezoid on the nodes), psi_bar its mean over the
    liquid's mass above the node (trapezoid in enclosed mass), rho the node's density and dRho_chi the
    compositional part of the density jump at the inner core's edge (Braginsky & Roberts 1995, GAFD 79:1;
    Labrosse 2015, PEPI 247:36: the energy of the light elements' redistribution, from memory; dRho_chi = 580
    kg/m^3 for Earth, checked). 0 at the CMB (no liquid left). It grows with the planet's potential well:
    ~4.7e5 J/kg at Earth's ICB, ~1e6 at 5 M_E and ~1.4e6 at 10 M_E (measured on this model's cores)."""
    r, m, g = (np.asarray(a, dtype=float) for a in (r, enclosed_mass, gravity))
    psi = np.concatenate([[0.0], np.cumsum(0.5 * (g[1:] + g[:-1]) * np.diff(r))])
    shell = np.diff(m) * 0.5 * (psi[1:] + psi[:-1])  # integral of psi dm over each interval
    above = np.concatenate([np.cumsum(shell[::-1])[::-1], [0.0]])
    liquid = m[-1] - m
    mean = np.where(liquid > 0.0, above / np.where(liquid > 0.0, liquid, 1.0), psi)
    return jump / np.asarray(density, dtype=float) * (mean - psi)


def inner_core_heat_row(enclosed_mass, melting_k, latent_ref, gravitational, melting_ref_k):
    """Heat [J] released by an inner core grown to each core node: the integral over its mass of the latent heat
    L(P) + the gravitational energy E_g (both J/kg). L = L_ref T_m(P) / T_m,ref: the entropy of melting
    L / T_m is held at its value at Earth's ICB (``core.core_latent_heat`` at 330 GPa), so the latent heat grows
    with the alloy's melting temperature (Clausius-Clapeyron at a constant entropy of fusion, Richards' rule;
    ab initio entropies of melting of iron vary little along the curve, Alfe et al. 2002, PRB 65:165118; from
    memory). Each interval between nodes uses the mean of its two nodes' T_m; ``gravitational`` is a constant
    or an array on the nodes (:func:`gravitational_energy_nodes`), then also the mean of the two ends."""
    m = np.asarray(enclosed_mass, dtype=float)
    t_mid = 0.5 * (melting_k[1:] + melting_k[:-1])
    eg = np.asarray(gravitational, dtype=float)
    eg_mid = 0.5 * (eg[1:] + eg[:-1]) if eg.ndim else eg
    per_kg = latent_ref * t_mid / melting_ref_k + eg_mid
    return np.concatenate([[0.0], np.cumsum(np.diff(m) * per_kg)])


#: Pressure [Pa] at which the basal melt's depression keys hold with melting.basal_melt_depression_scaling =
#: "solidus": Earth's core-mantle boundary, 135.8 GPa (PREM, Dziewonski & Anderson 1981, PEPI 25:297; from memory).
BASAL_DEPRESSION_REFERENCE_PA = 135.8e9


def basal_reference_solidus() -> float:
    """The solidus [K] at which the basal melt's depression and enrichment keys hold (``P_BMO_TREF``): the default
    melting curves' solidus at :data:`BASAL_DEPRESSION_REFERENCE_PA` (4158 K; the same for every built-in model
    that reaches that pressure, so one value whatever the run's curves)."""
    from ..melting import get_model
    return float(get_model("peridotite-mantle").solidus(BASAL_DEPRESSION_REFERENCE_PA))


def build_inputs(spec, interior, curves):
    """The core's inputs (:class:`~meltzone._core.layout.KernelInputs`) for a spec, its interior and the
    melting curves on the mantle nodes (:func:`meltzone.melting.node_curves`)."""
    from ..star import fill_parameters
    from .heating import isotope_table

    it = interior
    ms = it.mantle
    r = it.r[ms]
    grid = np.zeros((k.N_G, len(r)))
    grid[k.G_R] = r
    grid[k.G_P] = it.P[ms]
    grid[k.G_F] = it.adiabat[ms]
    grid[k.G_W] = _node_weights(r, it.m[ms], it.core_mass, it.mass)
    grid[k.G_TSOL] = curves["solidus"]
    grid[k.G_TLIQ] = curves["liquidus"]
    grid[k.G_AUX1] = curves["aux1"]
    grid[k.G_AUX2] = curves["aux2"]

    cs = it.core
    nc = it.cmb_index
    core = np.zeros((k.N_C, max(nc, 2)))
    if nc >= 2:
        core[k.C_R] = it.r[cs]
        core[k.C_F] = it.adiabat[cs]
        core[k.C_W] = _node_weights(it.r[cs], it.m[cs], 0.0, it.core_mass)
        core[k.C_TMELT] = iron_melting_temperature(it.P[cs], spec.melting.core_melting_depression_k)
        core[k.C_MCUM] = it.m[cs]
        depression = spec.melting.core_melting_depression_k
        eg = spec.core.gravitational_energy
        if eg == 0.0:  # from the structure
            eg = gravitational_energy_nodes(it.r[cs], it.m[cs], it.g[cs], it.rho[cs],
                                            spec.core.compositional_density_jump)
        core[k.C_EIC] = inner_core_heat_row(core[k.C_MCUM], core[k.C_TMELT], spec.core.core_latent_heat, eg,
                                            float(iron_melting_temperature(EARTH_ICB_PRESSURE_PA, depression)))
    else:  # coreless planet: a dummy core without heat capacity that never freezes
        core[k.C_F] = 1.0
        core[k.C_W] = 0.0
        core[k.C_TMELT] = 0.0

    cv = spec.convection
    par = np.zeros(k.N_PAR)
    par[k.P_RADIUS] = it.radius
    par[k.P_CORE_RADIUS] = max(it.core_radius, 1.0)
    par[k.P_G_SURF] = it.surface_gravity
    par[k.P_G_CMB] = it.g[it.cmb_index] if nc else 0.0
    mantle_volume = 4.0 / 3.0 * math.pi * (it.radius ** 3 - it.core_radius ** 3)
    par[k.P_RHO_MANTLE] = it.mantle_mass / mantle_volume
    par[k.P_RHO_TOP] = it.rho[-1]
    par[k.P_K] = cv.thermal_conductivity
    par[k.P_KAPPA] = cv.thermal_diffusivity
    par[k.P_ALPHA] = cv.thermal_expansivity
    par[k.P_CM] = cv.mantle_heat_capacity
    par[k.P_LATENT] = cv.latent_heat
    par[k.P_A_VISC] = cv.viscosity_prefactor_pa_s
    par[k.P_E_ACT] = cv.activation_energy_j_mol
    par[k.P_V_ACT] = cv.activation_volume_m3_mol
    par[k.P_V_DECAY] = cv.activation_volume_decay_pa
    par[k.P_V_INF] = cv.high_pressure_activation_volume_m3_mol
    par[k.P_RA_CR] = cv.critical_rayleigh
    par[k.P_BETA] = cv.beta
    par[k.P_NU_A] = cv.nusselt_prefactor
    par[k.P_BLEND] = cv.rheology_blend_width
    par[k.P_A_RH] = cv.rheology_a
    par[k.P_MELT_WEAK] = cv.melt_weakening
    par[k.P_ETA_LIQ] = cv.liquid_viscosity_pa_s
    par[k.P_PHI_C] = cv.critical_melt_fraction
    par[k.P_CC] = spec.core.core_heat_capacity
    par[k.P_LC] = spec.core.core_latent_heat
    par[k.P_EG] = spec.core.gravitational_energy
    par[k.P_T_EQ] = spec.surface.equilibrium_temperature_k
    par[k.P_ATMOSPHERE] = 1.0 if spec.surface.atmosphere == "grey" else 0.0
    par[k.P_H2O_TOTAL] = spec.surface.water_inventory_kg
    par[k.P_CO2_TOTAL] = spec.surface.co2_inventory_kg
    par[k.P_STAGNANT] = 1.0 if cv.regime == "stagnant-lid" else 0.0
    par[k.P_P_CMB] = it.cmb_pressure
    par[k.P_START_AGE] = spec.heating.start_age_gyr * GYR
    par[k.P_DT_MAX] = spec.run.max_temperature_step_k
    par[k.P_RTOL] = spec.run.rtol
    par[k.P_ATOL] = spec.run.atol_k
    par[k.P_T_END] = spec.run.end_time_gyr * GYR
    par[k.P_H_MAX] = spec.run.max_step_myr * MYR
    par[k.P_LID_MIN] = LID_MIN
    par[k.P_P_TOP] = it.surface_pressure
    par[k.P_MANTLE_MASS] = it.mantle_mass
    mt = spec.melting
    par[k.P_BMO] = 1.0 if mt.basal_magma_ocean == "reservoir" and nc >= 2 else 0.0
    par[k.P_BMO_DEP] = mt.basal_melt_depression_k
    par[k.P_BMO_ENRICH] = mt.basal_melt_enrichment_k
    par[k.P_BMO_MREF] = mt.basal_ocean_reference_fraction * it.mantle_mass
    par[k.P_BMO_TREF] = basal_reference_solidus() if mt.basal_melt_depression_scaling == "solidus" else 0.0
    fill_parameters(spec, it, par)  # star, steam atmosphere, water, escape (meltzone.star)
    vc = spec.volcanism
    par[k.P_VOLC] = 1.0 if vc.enabled == "on" else 0.0
    par[k.P_ERUPT] = vc.erupted_fraction
    par[k.P_X_H2O] = vc.mantle_h2o_ppm * 1e-6
    par[k.P_X_CO2] = vc.mantle_co2_ppm * 1e-6
    par[k.P_D_H2O] = vc.h2o_partition_coefficient
    par[k.P_D_CO2] = vc.co2_partition_coefficient
    par[k.P_P_EXTRACT] = vc.max_extraction_pressure_gpa * 1e9
    par[k.P_P_ECLOGITE] = vc.eclogite_pressure_gpa * 1e9
    par[k.P_RHO_CRUST] = vc.crust_density_kg_m3
    par[k.P_RIDGE] = vc.ridge_length_factor
    par[k.P_LID_LAW] = 1.0 if cv.lid_growth_law == "base-flux" else 0.0
    grid[k.G_RHO] = it.rho[ms]
    par[k.P_PROPS] = 1.0 if cv.mantle_properties == "density" else 0.0
    par[k.P_ALPHA_EXP] = cv.expansivity_density_exponent
    par[k.P_K_EXP] = cv.conductivity_density_exponent
    par[k.P_RHO_REF] = it.rho[-1]
    par[k.P_RA_VISC] = RAYLEIGH_VISCOSITY_DEPTHS.index(cv.rayleigh_viscosity_depth)
    par[k.P_VENT] = 1.0 if vc.vent_solubility == "on" else 0.0
    par[k.P_DEPLETE] = 1.0 if vc.melt_depletion == "on" else 0.0
    par[k.P_CRUST_HEAT] = 1.0 if vc.crust_heat_sources == "on" else 0.0
    par[k.P_D_HPE] = vc.heat_source_partition_coefficient
    par[k.P_RETAIN] = 1.0 if vc.retained_melt_fraction < 1.0 else 0.0
    par[k.P_PHI_RETAIN] = vc.retained_melt_fraction
    iso = isotope_table(spec.heating.radiogenic_scale)
    return k.KernelInputs(grid, core, np.ascontiguousarray(iso, dtype=np.float64), par, int(curves["law_code"]))


#: Margin of the default (fully molten) start above the melting curves, mantle and core [K] (this model's choice).
MOLTEN_MARGIN_K = 50.0


def initial_temperatures(spec, inputs) -> tuple[float, float]:
    """(T_u, T_c) at the start: by default 50 K above the liquidus at every mantle node (fully molten),
    and the core by the rule of ``initial.core_start`` (:mod:`meltzone.evolution.core_start`), but at least
    50 K above the core alloy's melting curve at every core node, so that the default start is molten in the core
    too (no inner core at t = 0). The floor is applied after the rule (either rule). With the default rule
    (rheological transition) it binds from 3 M_E on (measured at core fraction 0.325: not at 1 and 2 M_E); with the
    adiabat rule from 6 M_E on (:mod:`meltzone.evolution.core_start`)."""
    from .core_start import core_start_temperature, phi_c_temperature

    grid, core = inputs.grid, inputs.core
    tu = spec.initial.upper_temperature_k
    if tu <= 0.0:
        tu = float(np.max(grid[k.G_TLIQ] / grid[k.G_F])) + MOLTEN_MARGIN_K
    tc = spec.initial.core_temperature_k
    if tc <= 0.0:
        t_phi_c = phi_c_temperature(spec.convection.critical_melt_fraction, *(grid[row, 0] for row in (
            k.G_TSOL, k.G_TLIQ, k.G_AUX1, k.G_AUX2)), inputs.law)
        tc = core_start_temperature(spec.initial.core_start, tu * grid[k.G_F, 0], spec.initial.initial_cmb_jump_k,
                                    t_phi_c)
        if core[k.C_W].sum() > 0.0:
            tc = max(tc, float(np.max(core[k.C_TMELT] / core[k.C_F])) + MOLTEN_MARGIN_K)
    return float(tu), float(tc)


def initial_state(spec, inputs) -> np.ndarray:
    """The integrator's state at the start (S_* of :mod:`meltzone._core.layout`): energies of the initial
    temperatures, the minimal lid in stagnant-lid mode, a first step of 1 s, no rheological switch yet."""
    from .._core.physics import energy_state  # numba: imported when a run starts

    tu, tc = initial_temperatures(spec, inputs)
    state = np.zeros(k.N_STATE)
    lid = LID_MIN if inputs.par[k.P_STAGNANT] > 0.5 else 0.0
    y = np.zeros(k.N_Y)
    energy_state(tu, tc, lid, 0.0, inputs.grid, inputs.core, inputs.par, inputs.law, y)
    state[k.S_Y:k.S_Y + k.N_Y_ENERGY] = y[:k.N_Y_ENERGY]
    state[k.S_YV:k.S_YV + k.N_Y - k.N_Y_ENERGY] = y[k.N_Y_ENERGY:]
    state[k.S_H] = 1.0  # [s]; the controller grows it
    state[k.S_TU] = tu
    state[k.S_TC] = tc
    state[k.S_T_SWITCH] = k.NOT_YET
    return state


def integrate(spec, inputs, progress=None, history_rows=4096, interval_rows=8192):
    """Run the integrator from :func:`initial_state` to the end time, growing the buffers (initial sizes
    ``history_rows``, ``interval_rows``) when they fill. Returns (hist, temps, phis, iv, state), trimmed (the
    profiles as views of their buffers: copying them costs more than the rest of the wrapper)."""
    from .._core.loop import integrate as step_all

    n = inputs.grid.shape[1]
    hist = np.zeros((history_rows, k.N_H))
    temps = np.zeros((history_rows, n))
    phis = np.zeros((history_rows, n))
    iv = np.zeros((interval_rows, k.N_I))
    state = initial_state(spec, inputs)
    max_steps = spec.run.max_steps
    chunk = PROGRESS_STEPS if progress is not None else max_steps
    while True:
        done = int(state[k.S_N_H]) - 1
        try:
            status = step_all(state, *inputs, hist, temps, phis, iv, min(chunk, max_steps - max(done, 0)))
        except KERNEL_ERRORS as exc:
            raise kernel_failure(spec, "boundary-layer", exc, hist[:, k.H_T]) from exc
        done = int(state[k.S_N_H]) - 1
        if progress is not None:
            progress(state[k.S_T])
        if status == k.STATUS_DONE:
            break
        if status == k.STATUS_HISTORY_FULL:
            hist, temps, phis = (np.concatenate([a, np.zeros_like(a)]) for a in (hist, temps, phis))
        elif status == k.STATUS_INTERVALS_FULL:
            iv = np.concatenate([iv, np.zeros_like(iv)])
        elif status == k.STATUS_MAX_STEPS:
            if done >= max_steps:
                raise ConvergenceError(
                    f"{spec.planet.name}: the evolution reached run.max_steps = {max_steps} at model time "
                    f"{state[k.S_T] / GYR:.4g} Gyr; raise run.max_steps or run.max_temperature_step_k")
        elif status == k.STATUS_STEP_TOO_SMALL:
            raise ConvergenceError(
                f"{spec.planet.name}: the time step collapsed at model time {state[k.S_T] / YEAR:.4g} yr "
                f"(T_u = {state[k.S_TU]:.1f} K, T_c = {state[k.S_TC]:.1f} K); raise run.rtol or run.atol_k")
    n_h = int(state[k.S_N_H])
    n_iv = int(state[k.S_N_IV])
    return hist[:n_h].copy(), temps[:n_h], phis[:n_h], iv[:n_iv].copy(), state


def run(spec, interior, curves, progress=None, *, history_rows=4096, interval_rows=8192) -> History:
    """Evolve one planet with the boundary-layer scheme and return its :class:`History`.

    ``curves``: :func:`meltzone.melting.node_curves` on the interior's mantle nodes. ``progress``, if given, is
    called with the model time reached [s] every PROGRESS_STEPS accepted steps."""
    inputs = build_inputs(spec, interior, curves)
    hist, temps, phis, iv, state = integrate(spec, inputs, progress, history_rows, interval_rows)
    column = {name: j for j, name in enumerate(k.HISTORY_COLUMNS)}
    series = {name: hist[:, column[name]].copy() for name in SERIES if name in column}
    series["regime"] = series["regime"].astype(np.int8)
    if inputs.par[k.P_BMO] < 0.5:  # no basal ocean modelled: no series (consumers fall back to the layer table)
        del series["basal_ocean_thickness"]
    if inputs.par[k.P_VOLC] < 0.5:  # volcanism off: none of its series (the summary then has nulls)
        for name in VOLCANISM_SERIES:
            del series[name]
    # closure: stored-energy loss against the time-integrated (surface heat loss - radiogenic heating)
    de = series["stored_energy"][0] - series["stored_energy"]
    scale = max(float(np.max(np.abs(de))), 1.0)
    series["closure_error"] = (de - series["heat_out_minus_radiogenic"]) / scale
    intervals = {name: iv[:, k.INTERVAL_COLUMNS.index(name)].copy() for name in INTERVAL_FIELDS}
    for name in INTEGER_INTERVAL_FIELDS:
        intervals[name] = intervals[name].astype(np.int64)
    grid = inputs.grid
    t_switch = float(state[k.S_T_SWITCH])
    history = History(
        scheme=SCHEME.name, time=hist[:, k.H_T].copy(), series=series, temperature=temps, melt_fraction=phis,
        intervals=intervals,
        grid=MantleGrid(radius=grid[k.G_R].copy(), pressure=grid[k.G_P].copy(), mass=grid[k.G_W].copy(),
                        solidus=grid[k.G_TSOL].copy(), liquidus=grid[k.G_TLIQ].copy()),
        critical_melt_fraction=float(inputs.par[k.P_PHI_C]),
        switch_times={SWITCH: None if t_switch >= k.NOT_YET else t_switch},
        n_rejected=int(state[k.S_N_REJ]),
        scheme_data={"grid": grid, "core": inputs.core, "iso": inputs.iso, "par": inputs.par,
                     "law": np.int64(inputs.law)})
    history.evaluator = Evaluator(history)
    return history


def complete_core(core, par):
    """The core array of a run file written before the inner core's heat row: that row added with the law those
    files used, (L + E_g) x enclosed mass (constant latent heat)."""
    if core.shape[0] >= k.N_C:
        return core
    row = (par[k.P_LC] + par[k.P_EG]) * core[k.C_MCUM]
    return np.ascontiguousarray(np.vstack([core, row[None, :]]))


def _hermite(t, t0, t1, y0, y1, d0, d1):
    h = t1 - t0
    s = (t - t0) / h
    h00 = 2 * s**3 - 3 * s**2 + 1
    h10 = s**3 - 2 * s**2 + s
    h01 = -2 * s**3 + 3 * s**2
    h11 = s**3 - s**2
    return h00 * y0 + h10 * h * d0 + h01 * y1 + h11 * h * d1


def _quadratic(t, t0, t1, y0, y1, d0):
    """The quadratic through (t0, y0) and (t1, y1) with slope d0 at t0."""
    h = t1 - t0
    s = (t - t0) / h
    return y0 + d0 * h * s + (y1 - y0 - d0 * h) * s * s


def padded_parameters(par: np.ndarray) -> np.ndarray:
    """The parameters of a file written before the later ones existed, completed with zeros: each later
    parameter's 0 is the law of the files written before it (meltzone._core.layout)."""
    if len(par) < k.N_PAR:
        par = np.concatenate([par, np.zeros(k.N_PAR - len(par))])
    return par


class Evaluator:
    """The state inside a step: T_u, T_c and the lid by cubic Hermite interpolation (values and rates at both
    ends of the step), then the core's diagnostics and profile at that state and time. The step that ends on the
    rheological switch is the exception: the rates recorded at its end are the solid law's, after the switch,
    where the heat flow jumps (their sign can flip), so inside it the state is the quadratic with the values at
    both ends and the rate at its start (measured at 5 M_E, beta 0.1, a 10: the cubic dipped below the end
    value and put the magma ocean's end 0.9% early, 1.810 instead of 1.826 Myr)."""

    def __init__(self, history: History):
        d = history.scheme_data
        grid, core, iso, par = (np.ascontiguousarray(d[name], dtype=np.float64) for name in ("grid", "core", "iso",
                                                                                              "par"))
        par = padded_parameters(par)
        core = complete_core(core, par)
        if grid.shape[0] < k.N_G:  # a file written before the density row (read only with P_PROPS on)
            grid = np.concatenate([grid, np.zeros((k.N_G - grid.shape[0], grid.shape[1]))])
        self.inputs = k.KernelInputs(grid, core, iso, par, int(d["law"]))
        h = history
        self.t = h.time
        self.cols = [(h["upper_temperature"], h["upper_temperature_rate"]),
                     (h["core_temperature"], h["core_temperature_rate"]),
                     (h["lid_thickness"], h["lid_rate"])]
        self.stagnant = self.inputs.par[k.P_STAGNANT] > 0.5
        self.lost = h["water_lost"] if "water_lost" in h else np.zeros_like(h.time)
        switch = h.switch_times.get(SWITCH)
        self.t_switch = k.NOT_YET if switch is None else float(switch)
        self.outgassed = [h.series.get(name) for name in ("outgassed_h2o", "outgassed_co2")]

    def state(self, t: float) -> tuple[float, float, float]:
        """(T_u [K], T_c [K], lid [m]) at model time ``t`` [s]."""
        times = self.t
        if not times[0] <= t <= times[-1]:
            raise ValueError(f"time {t:g} s is outside the run ({times[0]:g} - {times[-1]:g} s)")
        s = max(int(np.searchsorted(times, t, side="left")), 1)
        if len(times) == 1:
            vals = [float(v[0]) for v, _ in self.cols]
        else:
            if times[s] == self.t_switch:  # the step the integrator landed on the switch (class docstring)
                vals = [_quadratic(t, times[s - 1], times[s], v[s - 1], v[s], d[s - 1]) for v, d in self.cols]
            else:
                vals = [_hermite(t, times[s - 1], times[s], v[s - 1], v[s], d[s - 1], d[s]) for v, d in self.cols]
        if not self.stagnant:
            vals[2] = 0.0
        return float(vals[0]), float(vals[1]), float(max(vals[2], 0.0))

    def at(self, t: float) -> InStep:
        from .._core.physics import profile_at

        tu, tc, lid = self.state(t)
        grid, core, iso, par, law = self.inputs
        n = grid.shape[1]
        temp = np.empty(n)
        phi = np.empty(n)
        diag = np.empty(k.N_D)
        lost = float(np.interp(t, self.t, self.lost))  # the water lost, linear inside the step
        added = [0.0 if v is None else float(np.interp(t, self.t, v)) for v in self.outgassed]
        profile_at(float(t), tu, tc, lid, self.t_switch, lost, grid, core, iso, par, law, temp, phi, diag, *added)
        return InStep(temperature=temp, melt_fraction=phi, regime_melt_fraction=float(diag[k.D_PHI_TOP]),
                      centre_freezing_margin_k=float(core[k.C_TMELT, 0] - tc * core[k.C_F, 0]))


SCHEME = Scheme(name="boundary-layer",
                description="one potential temperature with thermal boundary layers (fast; parameter studies)",
                run=run, evaluator=Evaluator)
