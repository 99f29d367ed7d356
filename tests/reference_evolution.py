"""Slow, plain reference of the boundary-layer thermal evolution (used only by the tests and the benchmark).

Written from the model's equations, not from the kernel's arrays: it builds its own inputs from the
PlanetSpec and the Interior (named physical values in :class:`Physics`, its own node masses from the
density profile), writes every law again as a small NumPy/``math`` function, and integrates the stored
heat of mantle and core (and the lid thickness) with ``scipy.integrate.solve_ivp`` (LSODA by default).
The temperatures are recovered from the stored heat by ``brentq``. The moment at which the top of the
mantle first reaches the rheological transition is found with a terminal ``solve_ivp`` event, and a
second solve continues from there with the solidified mantle's criterion and law.

It imports nothing from the kernel, its packing or its index constants: only the interior solver,
the melting curves (solidus, liquidus, Katz clinopyroxene exhaustion, iron melting curve) and the
isotope data.

The model (equations and sources; every law below repeats its own):

* stored heat of the mantle E_m = sum_i m_i (c_p T_u f_i + L phi_i(T_u f_i)) over the nodes of the
  adiabat T_u f(r), less, under a stagnant lid of thickness D, M_lid(D) c_p (T_u - T_lid) with T_lid the lid's
  base temperature (base-flux law) or the mean of its linear profile (heat-balance integral); of the core E_c = sum_j m_j c_c T_c f_j - (L_c + E_G) M_ic(T_c);
* dE_m/dt = -Q_surface + Q_cmb + H(t), dE_c/dt = -Q_cmb, and under a stagnant lid
  rho c_p (T_u - T_l) dD/dt = q_lid - q_u (or rho c_p (T_u - T_lm) dD/dt = q_lid - q_u with
  convection.lid_growth_law = "heat-balance-integral"; blended towards the minimum lid over 1 kyr in the magma
  ocean);
* top: the magma ocean's boundary layer (a = 1, beta = 1/3 over the whole mantle, suspension viscosity)
  blended by smoothstep((phi_top - phi_c) / width) with the solid mantle's (mobile lid, or a stagnant lid
  over its sublayer); the solid mantle keeps a = 1, beta = 1/3 until the top first reaches phi_c and takes
  the configured (a, beta) from then on; a surface temperature in radiative balance (bare or grey);
* regime: phi_top is the batch melt fraction of the adiabat at the surface until it first falls to phi_c,
  the isentropic one after (McKenzie & Bickle 1988, J. Petrol. 29:625; from memory), at the stagnant lid's
  base under a lid (regime_melt); a magma ocean while phi_top > phi_c. The solid branch of a solidified mantle has melt weakening up to phi_c, no suspension;
* bottom: a boundary layer from the local critical Rayleigh number; core adiabat with an inner core where it
  falls below the iron-alloy melting curve; radiogenic heating with decay.

Melt-fraction laws other than linear and Katz 2003 raise NotImplementedError.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from types import SimpleNamespace

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from meltzone import melting
from meltzone.constants import G
from meltzone.evolution.heating import ISOTOPES
from meltzone.interior import build_interior
from meltzone.iron import iron_melting_temperature

from reference_mantle import lid_growth, lid_heat_temperature, properties

#: Molar gas constant [J/mol/K] (CODATA 2018).
R_GAS = 8.314462618
#: Stefan-Boltzmann constant [W/m^2/K^4] (CODATA 2018).
SIGMA_SB = 5.670374419e-8
#: Julian year [s] (IAU).
YEAR = 365.25 * 86400.0
#: Reference pressure of the grey opacities [Pa] (1 atm).
P0_OPACITY = 101325.0
#: Grey mass absorption coefficients [m^2/kg] at P0: H2O 0.01, CO2 0.001 (Abe & Matsui 1985, J. Geophys. Res.
#: 90:C545; Elkins-Tanton 2008, EPSL 271:181; from memory).
KAPPA_H2O, KAPPA_CO2 = 0.01, 0.001
#: Solubilities as mass fraction X = coeff P^expo, P in Pa: H2O 6.8e-8 P^0.7, CO2 4.4e-12 P (as used by Lebrun
#: et al. 2013, JGR Planets 118:1155; from memory).
H2O_SOLUBILITY, CO2_SOLUBILITY = (6.8e-8, 0.7), (4.4e-12, 1.0)
#: Katz, Spiegelman & Langmuir 2003 (G3 4:1073, Table 2) melt-fraction exponents beta1 = beta2 = 1.5.
KATZ_BETA1, KATZ_BETA2 = 1.5, 1.5
#: Thickness [m] of the stagnant lid at the start and below which it is not resolved (the model's choice, stated
#: in the docstring of meltzone.evolution.evolve's inputs).
LID_MIN = 1.0e3
#: Time scale [s] over which a lid thins back to LID_MIN where the top is molten (1 kyr, the model's choice).
LID_RELAX = 1.0e3 * YEAR
#: Largest exponent of a viscosity (keeps exp finite).
LOG_ETA_MAX = 700.0


# ====================================================================== inputs
@dataclass(frozen=True)
class Physics:
    """Named physical values of one planet (SI)."""

    radius: float
    core_radius: float
    gravity_surface: float
    gravity_cmb: float
    density_mantle: float  # mean density of the mantle
    density_top: float  # density of the surface rock (lid)
    pressure_top: float
    pressure_cmb: float
    mantle_mass: float
    conductivity: float
    diffusivity: float
    expansivity: float
    heat_capacity: float  # mantle
    latent_heat: float  # mantle melting
    viscosity_prefactor: float
    activation_energy: float
    activation_volume: float
    activation_volume_decay: float
    high_pressure_activation_volume: float
    critical_rayleigh: float
    beta: float
    nusselt_prefactor: float
    rheology_a: float
    melt_weakening: float
    liquid_viscosity: float
    critical_melt_fraction: float
    blend_width: float
    core_heat_capacity: float
    core_latent_heat: float
    core_melting_depression: float
    equilibrium_temperature: float
    grey_atmosphere: bool
    water_kg: float
    co2_kg: float
    stagnant_lid: bool
    lid_law: str  # convection.lid_growth_law
    density_properties: bool  # convection.mantle_properties == "density"
    expansivity_exponent: float
    conductivity_exponent: float
    reference_density: float  # the surface rock's
    rayleigh_viscosity_depth: str
    retained_melt: float  # where melt is extracted the weakening melt fraction is at most this; 1: the batch phi
    extraction_pressure: float  # [Pa] deepest melt extraction; 0 with volcanism off (no cap anywhere)
    start_age_s: float
    isotope_heat: tuple  # W per kg of mantle today (scaled), one per isotope
    isotope_decay: tuple  # 1/s


@dataclass(frozen=True)
class MantleNodes:
    """Mantle nodes, CMB to surface: radius, pressure, adiabat shape f = T/T_top, node mass, melting curves."""

    r: np.ndarray
    pressure: np.ndarray
    adiabat: np.ndarray
    mass: np.ndarray
    solidus: np.ndarray
    liquidus: np.ndarray
    t_cpx: np.ndarray  # Katz: temperature of clinopyroxene exhaustion
    f_cpx: np.ndarray  # Katz: melt fraction at clinopyroxene exhaustion
    katz: bool
    density: np.ndarray


@dataclass(frozen=True)
class CoreNodes:
    """Core nodes, centre to CMB: radius, adiabat shape f = T/T_cmb, node mass, enclosed mass, melting curve."""

    r: np.ndarray
    adiabat: np.ndarray
    mass: np.ndarray
    enclosed: np.ndarray
    melting: np.ndarray
    gravitational: np.ndarray  # E_g [J/kg] of an inner core whose edge is at each node


def gravitational_energy(r, enclosed, jump, rho):
    """E_g [J/kg] at each core node: (dRho_chi / rho) (mean potential of the liquid above - potential there), the
    potential from g = G m(r) / r^2 (Newton, the enclosed mass; trapezoid in r), its mean over the liquid's mass
    (trapezoid in enclosed mass); 0 at the CMB (Braginsky & Roberts 1995, GAFD 79:1)."""
    g = np.where(r > 0.0, G * enclosed / np.where(r > 0.0, r, 1.0) ** 2, 0.0)
    psi = np.concatenate([[0.0], np.cumsum(np.diff(r) * 0.5 * (g[1:] + g[:-1]))])
    out = np.zeros_like(r)
    for j in range(len(r) - 1):
        dm, mid = np.diff(enclosed[j:]), 0.5 * (psi[j + 1:] + psi[j:-1])
        out[j] = jump / rho[j] * (float(np.sum(dm * mid)) / (enclosed[-1] - enclosed[j]) - psi[j])
    return out


def shell_mass(r_in, r_out, r, rho):
    """Mass [kg] of the shell r_in..r_out: int 4 pi r^2 rho(r) dr with rho linear between the nodes ``r``
    (5-point Gauss-Legendre on each piece between nodes; exact for the cubic-times-linear integrand)."""
    x, wq = np.polynomial.legendre.leggauss(5)
    cuts = np.concatenate([[r_in], r[(r > r_in) & (r < r_out)], [r_out]])
    total = 0.0
    for a, b in zip(cuts[:-1], cuts[1:]):
        s = 0.5 * (b - a) * x + 0.5 * (a + b)
        # the density on this piece is the line through the bracketing nodes (continuous from the side inside)
        j = int(np.clip(np.searchsorted(r, 0.5 * (a + b)) - 1, 0, len(r) - 2))
        rho_s = rho[j] + (rho[j + 1] - rho[j]) * (s - r[j]) / (r[j + 1] - r[j])
        total += 0.5 * (b - a) * float(np.sum(wq * 4.0 * math.pi * s * s * rho_s))
    return total


def node_masses(r, rho, total):
    """Mass each node stands for: the shell between the midpoints to its neighbours (the first and last
    nodes reach the ends), from the density profile, scaled to add up to ``total`` (the shell's mass in the
    Interior; the linear density between nodes misses ~2e-4 of it across the phase boundaries)."""
    edges = np.concatenate([[r[0]], 0.5 * (r[1:] + r[:-1]), [r[-1]]])
    mass = np.array([shell_mass(a, b, r, rho) for a, b in zip(edges[:-1], edges[1:])])
    return mass * (total / mass.sum())


def build_inputs(spec, interior=None):
    """(Physics, MantleNodes, CoreNodes or None) of a PlanetSpec from its Interior."""
    it = interior if interior is not None else build_interior(spec)
    nc = it.cmb_index
    r_m, p_m, rho_m = it.r[nc:], it.P[nc:], it.rho[nc:]
    model = melting.get_model(spec.melting.model, table_file=spec.melting.table_file or None)
    law = spec.melting.melt_fraction_law
    if law not in ("linear", "katz2003"):
        raise NotImplementedError(f"melt-fraction law {law!r}")
    curves = melting.node_curves(model, p_m, law, spec.melting.water_wt_percent)
    mantle = MantleNodes(r=r_m, pressure=p_m, adiabat=it.adiabat[nc:],
                         mass=node_masses(r_m, rho_m, it.mantle_mass), solidus=curves["solidus"],
                         liquidus=curves["liquidus"], t_cpx=curves["aux1"], f_cpx=curves["aux2"],
                         katz=law == "katz2003", density=rho_m)
    core = None
    if nc >= 2:
        r_c, rho_c = it.r[:nc], it.rho[:nc]
        enclosed = np.array([shell_mass(0.0, x, r_c, rho_c) if x > 0 else 0.0 for x in r_c])
        enclosed = enclosed * (it.core_mass / enclosed[-1])
        eg = spec.core.gravitational_energy
        core = CoreNodes(r=r_c, adiabat=it.adiabat[:nc], mass=node_masses(r_c, rho_c, it.core_mass),
                         enclosed=enclosed,
                         melting=iron_melting_temperature(it.P[:nc], spec.melting.core_melting_depression_k),
                         gravitational=(gravitational_energy(r_c, enclosed, spec.core.compositional_density_jump, rho_c)
                                        if eg == 0.0 else np.full(nc, eg)))
    cv, sf = spec.convection, spec.surface
    scale = spec.heating.radiogenic_scale
    phys = Physics(
        radius=it.radius, core_radius=max(it.core_radius, 1.0), gravity_surface=it.surface_gravity,
        gravity_cmb=float(it.g[nc]) if nc else 0.0,
        density_mantle=it.mantle_mass / (4.0 / 3.0 * math.pi * (it.radius ** 3 - it.core_radius ** 3)),
        density_top=float(it.rho[-1]), pressure_top=it.surface_pressure, pressure_cmb=it.cmb_pressure,
        mantle_mass=it.mantle_mass, conductivity=cv.thermal_conductivity, diffusivity=cv.thermal_diffusivity,
        expansivity=cv.thermal_expansivity, heat_capacity=cv.mantle_heat_capacity, latent_heat=cv.latent_heat,
        viscosity_prefactor=cv.viscosity_prefactor_pa_s, activation_energy=cv.activation_energy_j_mol,
        activation_volume=cv.activation_volume_m3_mol, activation_volume_decay=cv.activation_volume_decay_pa,
        high_pressure_activation_volume=cv.high_pressure_activation_volume_m3_mol,
        critical_rayleigh=cv.critical_rayleigh, beta=cv.beta, nusselt_prefactor=cv.nusselt_prefactor,
        rheology_a=cv.rheology_a, melt_weakening=cv.melt_weakening, liquid_viscosity=cv.liquid_viscosity_pa_s,
        critical_melt_fraction=cv.critical_melt_fraction, blend_width=cv.rheology_blend_width,
        core_heat_capacity=spec.core.core_heat_capacity, core_latent_heat=spec.core.core_latent_heat,
        core_melting_depression=spec.melting.core_melting_depression_k,
        equilibrium_temperature=sf.equilibrium_temperature_k, grey_atmosphere=sf.atmosphere == "grey",
        water_kg=sf.water_inventory_kg, co2_kg=sf.co2_inventory_kg, stagnant_lid=cv.regime == "stagnant-lid",
        lid_law=cv.lid_growth_law, density_properties=cv.mantle_properties == "density",
        expansivity_exponent=cv.expansivity_density_exponent, conductivity_exponent=cv.conductivity_density_exponent,
        reference_density=float(it.rho[-1]), rayleigh_viscosity_depth=cv.rayleigh_viscosity_depth,
        retained_melt=spec.volcanism.retained_melt_fraction,
        extraction_pressure=spec.volcanism.max_extraction_pressure_gpa * 1e9 if spec.volcanism.enabled == "on" else 0.0,
        start_age_s=spec.heating.start_age_gyr * 1e9 * YEAR,
        isotope_heat=tuple(scale * iso.element_ppm * 1e-6 * iso.isotope_fraction * iso.heat_w_per_kg
                           for iso in ISOTOPES),
        isotope_decay=tuple(math.log(2.0) / (iso.half_life_yr * YEAR) for iso in ISOTOPES))
    return phys, mantle, core


def initial_temperatures(spec, mantle, core=None):
    """(T_u, T_c) at the start: the configured values, or by default 50 K above the liquidus at every node
    (T_u = max(T_liq / f) + 50 K) and the core the initial CMB jump above the mantle at the CMB: its adiabat
    (initial.core_start = "adiabat"), or the colder of the adiabat and the temperature at which the CMB node holds
    phi_c (the stiffened base of a magma ocean that crystallises from the bottom up; "rheological-transition");
    in either case at least 50 K above the iron curve at every core node (T_c >= max(T_m / f_core) + 50 K)."""
    tu = spec.initial.upper_temperature_k
    if tu <= 0.0:
        tu = float(np.max(mantle.liquidus / mantle.adiabat)) + 50.0
    tc = spec.initial.core_temperature_k
    if tc <= 0.0:
        t_base = tu * mantle.adiabat[0]
        if spec.initial.core_start == "rheological-transition":
            phi_c = spec.convection.critical_melt_fraction
            t_phi_c = brentq(lambda t: float(melt_fraction(np.array([t]), mantle, slice(0, 1))[0]) - phi_c,
                             mantle.solidus[0], mantle.liquidus[0], xtol=1e-9, rtol=1e-14)
            t_base = min(t_base, t_phi_c)
        tc = t_base + spec.initial.initial_cmb_jump_k
        if core is not None:
            tc = max(tc, float(np.max(core.melting / core.adiabat)) + 50.0)
    return tu, tc


# ====================================================================== laws
def smoothstep(x):
    """3 x^2 - 2 x^3 on [0, 1], 0 below and 1 above (the blend weight across the rheological transition)."""
    x = min(max(x, 0.0), 1.0)
    return x * x * (3.0 - 2.0 * x)


def melt_fraction(t, mantle, sl=slice(None)):
    """Melt fraction of nodes ``sl`` at temperatures ``t`` [K] (array).

    Linear: (T - T_sol) / (T_liq - T_sol) (common practice). Katz, Spiegelman & Langmuir 2003 (G3 4:1073,
    eqs. 2-9, beta1 = beta2 = 1.5): F = ((T - T_sol) / (T_lherz - T_sol))^beta1 until clinopyroxene is
    exhausted at F_cpx, T_cpx = T_sol + F_cpx^(1/beta1) (T_lherz - T_sol), then
    F = F_cpx + (1 - F_cpx) ((T - T_cpx) / (T_liq - T_cpx))^beta2. 0 below the solidus, 1 above the liquidus.
    """
    t = np.asarray(t, dtype=float)
    sol, liq = mantle.solidus[sl], mantle.liquidus[sl]
    if not mantle.katz:
        return np.clip((t - sol) / (liq - sol), 0.0, 1.0)
    t_cpx, f_cpx = mantle.t_cpx[sl], mantle.f_cpx[sl]
    t_lherz = sol + (t_cpx - sol) / f_cpx ** (1.0 / KATZ_BETA1)
    with np.errstate(invalid="ignore", divide="ignore"):
        low = (np.maximum(t - sol, 0.0) / (t_lherz - sol)) ** KATZ_BETA1
        high = f_cpx + (1.0 - f_cpx) * (np.maximum(t - t_cpx, 0.0) / (liq - t_cpx)) ** KATZ_BETA2
    phi = np.where(t < t_cpx, low, high)
    return np.where(t <= sol, 0.0, np.where(t >= liq, 1.0, phi))


def top_melt(t, mantle, i=-1):
    """Batch melt fraction of node ``i`` (the top by default) at temperature ``t``."""
    i = i % len(mantle.r)
    return float(melt_fraction(np.array([t]), mantle, slice(i, i + 1))[0])


def isentropic_top_melt(t, mantle, ph, i=-1):
    """Melt fraction at node ``i`` (the top by default) of a solid mantle that melts as it rises:
    phi = phi_eq(T - (L / c_p) phi), the batch limit of isentropic decompression melting (McKenzie & Bickle
    1988, J. Petrol. 29:625; from memory). Closed form for the linear law, brentq for Katz's."""
    lc = ph.latent_heat / ph.heat_capacity
    batch = top_melt(t, mantle, i)
    if batch <= 0.0 or lc <= 0.0:
        return batch
    if not mantle.katz:
        sol, liq = mantle.solidus[i], mantle.liquidus[i]
        return min(max((t - sol) / (liq - sol + lc), 0.0), 1.0)
    g = lambda phi: top_melt(t - lc * phi, mantle, i) - phi  # noqa: E731  (falls with phi)
    if g(batch) >= 0.0:
        return batch
    return brentq(g, 0.0, batch, xtol=1e-15, rtol=1e-14)


def regime_melt(tu, d, mantle, ph):
    """Isentropic melt fraction that sets a solidified mantle's regime: at the surface (mobile lid) or at the
    stagnant lid's base, depth max(d, LID_MIN), linear between the nodes there at the adiabat's temperature
    interpolated to that depth (this model's choice: the regime of the mantle that convects)."""
    if not ph.stagnant_lid:
        return isentropic_top_melt(tu * mantle.adiabat[-1], mantle, ph)
    r = mantle.r[-1] - max(d, LID_MIN)
    j = int(np.clip(np.searchsorted(mantle.r, r) - 1, 0, len(mantle.r) - 2))
    s = (r - mantle.r[j]) / (mantle.r[j + 1] - mantle.r[j])
    t = tu * (mantle.adiabat[j] + s * (mantle.adiabat[j + 1] - mantle.adiabat[j]))
    return (1.0 - s) * isentropic_top_melt(t, mantle, ph, j) + s * isentropic_top_melt(t, mantle, ph, j + 1)


def activation_enthalpy(p, ph):
    """H(P) = E + int_0^P V dP' with V = V0 exp(-P'/P_d): E + V0 P_d (1 - exp(-P / P_d)); E + P V0 when
    P_d = 0 (decaying activation volume: Stamenkovic et al. 2012, ApJ 748:41 discuss it; exponential form the
    model's choice)."""
    pd = ph.activation_volume_decay
    if pd <= 0.0:
        return ph.activation_energy + p * ph.activation_volume
    v_inf = ph.high_pressure_activation_volume
    return ph.activation_energy + v_inf * p + (ph.activation_volume - v_inf) * pd * (1.0 - math.exp(-p / pd))


def viscosity(t, p, phi, ph):
    """Viscosity [Pa s]: Arrhenius A exp(H(P) / (R T)) exp(-alpha_phi phi) (Tosi et al. 2017, A&A 605:A71;
    melt weakening Mei et al. 2002, EPSL 201:491, from memory) below the rheological transition phi_c; the
    Einstein-Roscoe suspension eta_liq (1 - phi_x / (1 - phi_c))^-2.5 with crystal fraction phi_x = 1 - phi
    (Roscoe 1952, Br. J. Appl. Phys. 3:267) above it; blended in log eta by smoothstep((phi - phi_c) / width)."""
    log_solid = (math.log(ph.viscosity_prefactor) + activation_enthalpy(p, ph) / (R_GAS * t)
                 - ph.melt_weakening * phi)
    w = smoothstep((phi - ph.critical_melt_fraction) / ph.blend_width)
    if w == 0.0:
        return math.exp(min(log_solid, LOG_ETA_MAX))
    crystals = min((1.0 - phi) / (1.0 - ph.critical_melt_fraction), 0.999)
    log_susp = math.log(ph.liquid_viscosity) - 2.5 * math.log(1.0 - crystals)
    return math.exp(min(w * log_susp + (1.0 - w) * log_solid, LOG_ETA_MAX))


def radiogenic_power(t, ph):
    """H(t) = M_mantle sum_i h_i exp(lambda_i (age0 - t)) [W] (Turcotte & Schubert 2002, Table 4.2 data)."""
    return ph.mantle_mass * sum(h * math.exp(lam * (ph.start_age_s - t))
                                for h, lam in zip(ph.isotope_heat, ph.isotope_decay))


def lid_floor(rate, d, kappa):
    """The lid thins no further than LID_MIN: below 2 LID_MIN the rate r is scaled by s + (1 - s) smoothstep(r /
    r_w), s = smoothstep((d - LID_MIN) / LID_MIN), r_w = kappa / LID_MIN, a lid of LID_MIN growing by its thickness
    in its conductive time (a thinning rate by s, a growing one below r_w less; smooth in d and in r; the model's
    choice, meltzone._core.lid)."""
    if d >= 2.0 * LID_MIN:
        return rate
    s = smoothstep((d - LID_MIN) / LID_MIN)
    return rate * (s + (1.0 - s) * smoothstep(rate * LID_MIN / kappa))


def lid_base_temperature(tu, ph):
    """T_l = T_u - a_rh R T_u^2 / E, the rheological temperature scale (Solomatov & Moresi 2000, JGR
    105:21795), at least 1 K above the equilibrium temperature and never above T_u."""
    return min(max(tu - ph.rheology_a * R_GAS * tu * tu / ph.activation_energy, ph.equilibrium_temperature + 1.0),
               tu)


def lid_mass(d, ph):
    """Mass [kg] of a lid of thickness d at the surface rock's density."""
    return ph.density_top * 4.0 / 3.0 * math.pi * (ph.radius ** 3 - max(ph.radius - d, 0.0) ** 3)


def mantle_heat(tu, d, ph, mantle):
    """E_m [J]: sensible + latent heat on the adiabat, and (stagnant lid) the lid's mass at the mean of its
    linear profile (T_eq + T_l) / 2 instead of T_u."""
    t = tu * mantle.adiabat
    e = float(np.sum(mantle.mass * (ph.heat_capacity * t + ph.latent_heat * melt_fraction(t, mantle))))
    if ph.stagnant_lid and d > 0.0:
        t_lid = lid_heat_temperature(lid_base_temperature(tu, ph), ph)
        e += lid_mass(d, ph) * ph.heat_capacity * (t_lid - tu)
    return e


def inner_core(tc, core):
    """(radius, mass) of the inner core: from the centre to where the core adiabat T_c f(r) first rises above
    the iron-alloy melting curve (both linear between nodes; enclosed mass interpolated)."""
    g = tc * core.adiabat - core.melting
    if g[0] >= 0.0:
        return 0.0, 0.0
    above = np.nonzero(g >= 0.0)[0]
    if not above.size:
        return float(core.r[-1]), float(core.enclosed[-1])
    j = int(above[0])
    s = g[j - 1] / (g[j - 1] - g[j])
    return (float(core.r[j - 1] + s * (core.r[j] - core.r[j - 1])),
            float(core.enclosed[j - 1] + s * (core.enclosed[j] - core.enclosed[j - 1])))


def inner_core_release(m_ic, ph, core):
    """Latent + gravitational energy [J] released by an inner core of mass m_ic: the integral over its mass of
    L + E_g with L = L_ICB T_m / T_m(330 GPa) (constant entropy of melting; T_m the alloy's curve, each interval
    between core nodes at the mean of its ends) and E_g of :func:`gravitational_energy` (or the configured
    constant), also the mean of the interval's ends; linear in mass inside an interval."""
    t_ref = float(iron_melting_temperature(330e9, ph.core_melting_depression))
    per_kg = (ph.core_latent_heat * 0.5 * (core.melting[1:] + core.melting[:-1]) / t_ref
              + 0.5 * (core.gravitational[1:] + core.gravitational[:-1]))
    edges = core.enclosed
    done = np.clip(m_ic - edges[:-1], 0.0, np.diff(edges))  # mass of each interval inside the inner core
    return float(np.sum(done * per_kg))


def core_heat(tc, ph, core):
    """E_c [J]: sensible heat on the core adiabat less the latent and gravitational energy of the inner core
    (Stevenson et al. 1983, Icarus 54:466; Labrosse 2015, PEPI 247:36)."""
    return (float(np.sum(core.mass * ph.core_heat_capacity * tc * core.adiabat))
            - inner_core_release(inner_core(tc, core)[1], ph, core))


def atmosphere_mass(total, melt_mass, coeff, expo, ph, xtol_rel=1e-13):
    """Atmospheric mass [kg] of a volatile in solubility equilibrium with the melt: M_atm + X(P) M_melt =
    M_total with P = M_atm g / (4 pi R^2) and X = coeff P^expo; brentq to xtol_rel of M_total."""
    if total <= 0.0:
        return 0.0
    if melt_mass <= 0.0:
        return total
    area = 4.0 * math.pi * ph.radius ** 2
    f = lambda m: m + coeff * (m * ph.gravity_surface / area) ** expo * melt_mass - total  # noqa: E731
    return brentq(f, 0.0, total, xtol=xtol_rel * total, rtol=max(4 * np.finfo(float).eps, min(1e-14, xtol_rel)))


def emissivity(tu, phi_top, ph, mantle):
    """(eps, M_H2O, M_CO2) of the grey atmosphere: eps = 2 / (tau + 2) (Abe & Matsui 1985; Elkins-Tanton 2008),
    tau = sum_i (3 M_i / (8 pi R^2)) sqrt(kappa_i g / (3 P0)); 1 without an atmosphere. The gases dissolve in
    the adiabat's melt only while the top is a magma ocean: weight smoothstep((phi_top - phi_c) / width),
    0 under a solid surface (the melt below is sealed off from the atmosphere)."""
    if not ph.grey_atmosphere:
        return 1.0, 0.0, 0.0
    contact = smoothstep((phi_top - ph.critical_melt_fraction) / ph.blend_width)
    melt = contact * float(np.sum(mantle.mass * melt_fraction(tu * mantle.adiabat, mantle)))
    m_h2o = atmosphere_mass(ph.water_kg, melt, *H2O_SOLUBILITY, ph)
    m_co2 = atmosphere_mass(ph.co2_kg, melt, *CO2_SOLUBILITY, ph)
    area = 4.0 * math.pi * ph.radius ** 2
    tau = sum(3.0 * m / (2.0 * area) * math.sqrt(kap * ph.gravity_surface / (3.0 * P0_OPACITY))
              for m, kap in ((m_h2o, KAPPA_H2O), (m_co2, KAPPA_CO2)))
    return 2.0 / (tau + 2.0), m_h2o, m_co2


def boundary_layer(depth, d_temp, eta, a, beta, ph):
    """Upper boundary layer [m]: Nu = a (Ra / Ra_cr)^beta, delta = D (Ra_cr / Ra)^beta / a <= D, with
    Ra = alpha rho g dT D^3 / (kappa eta) (Stevenson, Spohn & Schubert 1983, Icarus 54:466)."""
    ra = (ph.expansivity * ph.density_mantle * ph.gravity_surface * max(d_temp, 1e-6) * depth ** 3
          / (ph.diffusivity * eta))
    return min(depth * (ph.critical_rayleigh / ra) ** beta / a, depth)


def convecting_top(tu, dtc, eta, a, beta, eps, depth, ph):
    """(T_s, q) of a convecting top: k (T_u - T_s) / delta(T_u - T_s + max(dT_cmb, 0)) = eps sigma (T_s^4 -
    T_eq^4), solved for T_s in [T_eq, T_u]."""
    t_eq = ph.equilibrium_temperature

    def q_conv(ts):
        return ph.conductivity * (tu - ts) / boundary_layer(depth, tu - ts + max(dtc, 0.0), eta, a, beta, ph)

    g = lambda ts: q_conv(ts) - eps * SIGMA_SB * (ts ** 4 - t_eq ** 4)  # noqa: E731
    ts = t_eq if g(t_eq) <= 0.0 else brentq(g, t_eq, tu, xtol=1e-10, rtol=1e-14)
    return ts, q_conv(ts)


def lid_top(tu, tl, d_lid, dtc, eta, a, beta, eps, depth, ph):
    """(T_s, q_surface, q_u) under a stagnant lid: the sublayer carries q_u = k (T_u - T_l) / delta over the
    convecting depth D - d_lid (at least 5% of D), Ra from T_u - T_l + max(dT_cmb, 0); the lid conducts
    k (T_l - T_s) / d_lid = eps sigma (T_s^4 - T_eq^4)."""
    t_eq = ph.equilibrium_temperature
    d_conv = max(depth - d_lid, 0.05 * depth)
    delta = boundary_layer(d_conv, tu - tl + max(dtc, 0.0), eta, a, beta, ph)
    g = lambda ts: ph.conductivity * (tl - ts) / d_lid - eps * SIGMA_SB * (ts ** 4 - t_eq ** 4)  # noqa: E731
    ts = t_eq if g(t_eq) <= 0.0 else brentq(g, t_eq, tl, xtol=1e-10, rtol=1e-14)
    return ts, ph.conductivity * (tl - ts) / d_lid, ph.conductivity * (tu - tl) / delta


# ====================================================================== model
class ReferenceModel:
    """The reference of one PlanetSpec: ``run(t_eval)`` integrates it, ``diagnostics(t, tu, tc, d)`` gives the
    fluxes at a state."""

    def __init__(self, spec, interior=None):
        self.spec = spec
        self.ph, self.mantle, self.core = build_inputs(spec, interior)
        self.depth = self.ph.radius - self.ph.core_radius
        #: time [s] from which the top follows the isentropic melt fraction and the configured (a, beta)
        self.t_solid = math.inf
        self._guess = [None, None]

    # ---- stored heat <-> temperatures
    def _invert(self, which, e, d):
        heat = ((lambda t: mantle_heat(t, d, self.ph, self.mantle)) if which == 0
                else (lambda t: core_heat(t, self.ph, self.core)))
        t0 = self._guess[which] or 3000.0
        lo, hi = 0.98 * t0, 1.02 * t0
        while heat(lo) > e and lo > 10.0:
            lo *= 0.8
        while heat(hi) < e and hi < 2e5:
            hi *= 1.25
        t = brentq(lambda x: heat(x) - e, lo, hi, xtol=1e-11, rtol=1e-15)
        self._guess[which] = t
        return t

    def temperatures(self, y):
        """(T_u, T_c) of the state y = (E_m, E_c, lid)."""
        tu = self._invert(0, y[0], self._lid(y))
        tc = self._invert(1, y[1], 0.0) if self.core is not None else 0.0
        return tu, tc

    def _lid(self, y):
        return max(y[2], 0.0) if self.ph.stagnant_lid else 0.0

    def state(self, tu, tc, d):
        """y = (E_m, E_c, lid) of temperatures and a lid."""
        ec = core_heat(tc, self.ph, self.core) if self.core is not None else 0.0
        return np.array([mantle_heat(tu, d if self.ph.stagnant_lid else 0.0, self.ph, self.mantle), ec, d])

    # ---- the solid branch
    def solid_viscosity(self, tu, d, phi_surf):
        """Viscosity of the solidified mantle's upper boundary layer, times (kappa / kappa0) / (alpha / alpha0) at the
        same point (Ra ~ alpha / (kappa eta)), where convection.rayleigh_viscosity_depth puts it: the surface at T_u
        with the surface melt fraction ("surface"); the base of the upper boundary layer below the top of the
        convecting mantle (lid base or surface), on the adiabat, the layer's thickness by three fixed-point passes
        of Nu = a (Ra / Ra_cr)^beta ("boundary-layer-base"); half way down the convecting mantle ("mid-mantle").
        Melt weakening by the batch melt fraction there, at most phi_c; where melt is extracted (volcanism on, no
        deeper than its extraction pressure) at most the retained melt fraction, whose melt stays in the rock."""
        ph, m = self.ph, self.mantle

        def weakening(phi, p):
            cap = ph.critical_melt_fraction
            if ph.retained_melt < 1.0 and p <= ph.extraction_pressure:
                cap = min(cap, ph.retained_melt)
            return min(phi, cap)

        if ph.rayleigh_viscosity_depth == "surface":
            return viscosity(tu, ph.pressure_top, weakening(phi_surf, ph.pressure_top), ph)
        d_top = max(d, LID_MIN) if ph.stagnant_lid else 0.0
        d_conv = max(self.depth - d_top, 0.05 * self.depth)
        mid = ph.rayleigh_viscosity_depth == "mid-mantle"
        z = d_top + 0.5 * d_conv if mid else d_top
        d_temp = tu - lid_base_temperature(tu, ph) if ph.stagnant_lid else tu - ph.equilibrium_temperature
        for _ in range(1 if mid else 3):
            r = ph.radius - z
            t = tu * float(np.interp(r, m.r, m.adiabat))
            j = int(np.clip(np.searchsorted(m.r, r) - 1, 0, len(m.r) - 2))
            w = (r - m.r[j]) / (m.r[j + 1] - m.r[j])
            phi = float((1.0 - w) * melt_fraction(np.array([t]), m, slice(j, j + 1))[0]
                        + w * melt_fraction(np.array([t]), m, slice(j + 1, j + 2))[0])
            alpha, _, kappa = properties(float(np.interp(r, m.r, m.density)), ph)
            p = float(np.interp(r, m.r, m.pressure))
            eta = (viscosity(t, p, weakening(phi, p), ph)
                   * (kappa / ph.diffusivity) / (alpha / ph.expansivity))
            z = d_top + boundary_layer(d_conv, d_temp, eta, ph.nusselt_prefactor, ph.beta, ph)
        return eta

    # ---- fluxes
    def diagnostics(self, t, tu, tc, d):
        """Fluxes and regime at time t [s] and state (T_u, T_c, lid d)."""
        ph, mantle = self.ph, self.mantle
        phi_c = ph.critical_melt_fraction
        phi_surf = top_melt(tu * mantle.adiabat[-1], mantle)
        solid = t >= self.t_solid
        phi_top = regime_melt(tu, d, mantle, ph) if solid else phi_surf
        eta_mo = viscosity(tu, ph.pressure_top, phi_top, ph)
        eta_s = self.solid_viscosity(tu, d, phi_surf) if solid else eta_mo
        # bottom boundary layer: delta_c = (kappa eta_c Ra_cr / (alpha rho g_c |dT_c|))^(1/3) <= D / 2,
        # eta_c at the mean of T_c and the adiabat's base (Stevenson et al. 1983)
        tb = tu * mantle.adiabat[0]
        dtc = tc - tb if self.core is not None else 0.0
        t_mid = 0.5 * (tc + tb)
        phi_b = float(melt_fraction(np.array([t_mid]), mantle, slice(0, 1))[0])
        eta_c = viscosity(t_mid, ph.pressure_cmb, phi_b, ph)
        q_cmb = 0.0
        alpha_c, k_c, kappa_c = properties(mantle.density[0], ph)
        if self.core is not None and abs(dtc) > 1e-9 and ph.gravity_cmb > 0.0:
            delta_c = (kappa_c * eta_c * ph.critical_rayleigh
                       / (alpha_c * ph.density_mantle * ph.gravity_cmb * abs(dtc))) ** (1.0 / 3.0)
            q_cmb = k_c * dtc / min(delta_c, 0.5 * self.depth)
        eps, m_h2o, m_co2 = emissivity(tu, phi_top, ph, mantle)
        # magma-ocean top (a = 1, beta = 1/3, whole depth) blended with the solid top across phi_c
        w = smoothstep((phi_top - phi_c) / ph.blend_width)
        qs = 0.0
        d_rate = 0.0
        if w > 0.0:
            qs += w * convecting_top(tu, dtc, eta_mo, 1.0, 1.0 / 3.0, eps, self.depth, ph)[1]
            d_rate += w * (LID_MIN - d) / LID_RELAX
        if w < 1.0:
            a, beta = (ph.nusselt_prefactor, ph.beta) if solid else (1.0, 1.0 / 3.0)
            if ph.stagnant_lid:
                tl = lid_base_temperature(tu, ph)
                d_eff = max(d, LID_MIN)
                _, q_lid, q_u = lid_top(tu, tl, d_eff, dtc, eta_s, a, beta, eps, self.depth, ph)
                rho_base = float(np.interp(ph.radius - d_eff, mantle.r, mantle.density))
                q_u *= properties(rho_base, ph)[1] / ph.conductivity  # k at the lid's base
                d_rate += (1.0 - w) * lid_growth(q_lid, q_u, tu, tl, ph)
            else:
                q_lid = convecting_top(tu, dtc, eta_s, a, beta, eps, self.depth, ph)[1]
            qs += (1.0 - w) * q_lid
        magma = phi_top > phi_c
        return SimpleNamespace(
            surface_heat_flow=qs * 4.0 * math.pi * ph.radius ** 2,
            cmb_heat_flow=q_cmb * 4.0 * math.pi * ph.core_radius ** 2,
            radiogenic_power=radiogenic_power(t, ph),
            lid_rate=lid_floor(d_rate, d, ph.diffusivity) if ph.stagnant_lid else 0.0,
            phi_top=phi_top, phi_surface=phi_surf, magma_ocean=magma,
            regime=0 if magma else (2 if ph.stagnant_lid else 1),
            atmosphere_h2o=m_h2o, atmosphere_co2=m_co2,
            inner_core_radius=inner_core(tc, self.core)[0] if self.core is not None else 0.0)

    def rhs(self, t, y):
        """d(E_m, E_c, lid)/dt."""
        tu, tc = self.temperatures(y)
        dg = self.diagnostics(t, tu, tc, self._lid(y))
        return [-dg.surface_heat_flow + dg.cmb_heat_flow + dg.radiogenic_power, -dg.cmb_heat_flow, dg.lid_rate]

    # ---- integration
    def run(self, t_eval, rtol=1e-9, method="LSODA"):
        """Integrate to t_eval[-1] [s] and evaluate at t_eval.

        A terminal event on the top's batch melt fraction falling to phi_c ends the first solve (none when
        the start is already at or below phi_c); the second continues from there with the isentropic criterion
        and the configured (a, beta), with an event for the top's isentropic melt rising through phi_c (the
        magma ocean forming again). Returns an object with t, y (3 x len(t_eval): T_u, T_c, lid),
        history (dict of arrays named as the package's history), t_solid [s], reformed [s] (event times),
        nfev."""
        t_eval = np.asarray(t_eval, dtype=float)
        ph = self.ph
        tu0, tc0 = initial_temperatures(self.spec, self.mantle, self.core)
        self._guess = [tu0, tc0]
        d0 = LID_MIN if ph.stagnant_lid else 0.0
        y0 = self.state(tu0, tc0, d0)
        t_end = float(t_eval[-1])
        phi_c = ph.critical_melt_fraction
        e_scale = ph.mantle_mass * ph.heat_capacity
        c_scale = (float(np.sum(self.core.mass)) * ph.core_heat_capacity) if self.core is not None else 1.0
        opts = dict(method=method, rtol=rtol, atol=[1e-6 * e_scale, 1e-6 * c_scale, 1e-3], dense_output=True)
        self.t_solid = math.inf
        pieces = []
        nfev = 0
        reformed = []
        if top_melt(tu0 * self.mantle.adiabat[-1], self.mantle) <= phi_c:
            self.t_solid = 0.0
        else:
            def ended(t, y):
                return top_melt(self.temperatures(y)[0] * self.mantle.adiabat[-1], self.mantle) - phi_c
            ended.terminal, ended.direction = True, -1
            first = solve_ivp(self.rhs, (0.0, t_end), y0, events=ended, first_step=1.0, **opts)
            if not first.success:
                raise RuntimeError(first.message)
            nfev += first.nfev
            pieces.append((0.0, first.t[-1], first.sol, math.inf))
            if first.status == 1:
                self.t_solid = float(first.t_events[0][0])
                y0 = first.y_events[0][0]
        if self.t_solid < t_end:
            t_solid = self.t_solid

            def reforms(t, y):
                return regime_melt(self.temperatures(y)[0], self._lid(y), self.mantle, ph) - phi_c
            reforms.direction = 1  # rising through phi_c: the magma ocean forms again
            second = solve_ivp(self.rhs, (t_solid, t_end), y0, events=reforms,
                               first_step=1.0 if t_solid == 0.0 else None, **opts)
            if not second.success:
                raise RuntimeError(second.message)
            nfev += second.nfev
            pieces.append((t_solid, t_end, second.sol, t_solid))
            reformed = [float(te) for te in second.t_events[0]]
        y = np.empty((3, len(t_eval)))
        hist = {k: np.empty(len(t_eval)) for k in ("upper_temperature", "core_temperature", "surface_heat_flow",
                                                   "cmb_heat_flow", "inner_core_radius", "lid_thickness",
                                                   "regime", "top_melt_fraction")}
        for n, t in enumerate(t_eval):
            # the piece that holds t (the later one at its start)
            t0, t1, sol, t_switch = next(p for p in reversed(pieces) if p[0] <= t)
            state = sol(t)
            self.t_solid = t_switch
            tu, tc = self.temperatures(state)
            d = self._lid(state)
            dg = self.diagnostics(t, tu, tc, d)
            y[:, n] = tu, tc, d
            for key, val in (("upper_temperature", tu), ("core_temperature", tc),
                             ("surface_heat_flow", dg.surface_heat_flow), ("cmb_heat_flow", dg.cmb_heat_flow),
                             ("inner_core_radius", dg.inner_core_radius),
                             ("lid_thickness", d if dg.regime == 2 else 0.0), ("regime", dg.regime),
                             ("top_melt_fraction", dg.phi_top)):
                hist[key][n] = val
        t_solid = next((p[3] for p in pieces if p[3] < math.inf), math.inf)
        self.t_solid = t_solid
        return SimpleNamespace(t=t_eval, y=y, history=hist, t_solid=t_solid, reformed=reformed, nfev=nfev)
