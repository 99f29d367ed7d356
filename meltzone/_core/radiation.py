"""Surface radiation and water in the core: the grey and bare laws, the steam atmosphere with its radiation
limit, water dissolved in the melt, condensed to an ocean and lost to space.

Both schemes' surface balances call :func:`net_radiation` with a radiation state ``rad`` = (law, emissivity,
absorbed flux / sigma [K^4], radiating temperature [K]) made once per evaluation by :func:`radiation_state`;
the absorbed stellar flux comes from :func:`meltzone._core.star.absorbed_flux_t4` alone.

* law 0 (``"none"``, ``"grey"``): net = eps sigma (T_s^4 - F_abs / sigma) (Abe & Matsui 1985, JGR 90:C545;
  Elkins-Tanton 2008, EPSL 271:181; from memory), eps = 2 / (tau + 2), tau_i = (3 M_i / (8 pi R^2))
  sqrt(kappa_i g / (3 P0)), kappa_H2O = 0.01, kappa_CO2 = 0.001 m^2/kg (from memory);
* law 1 (``"steam"``): outgoing = (1 - w) OLR_steam(T_s) + w eps sigma T_s^4, net = outgoing - F_abs. OLR_steam is
  the runaway-greenhouse limit F_lim = 282 W/m^2 (Goldblatt et al. 2013, Nature Geosci. 6:661, abstract checked)
  joined smoothly to sigma T_s^4 at low T_s, ((sigma T_s^4)^-4 + F_lim^-4)^(-1/4), times 1 + (T_s / T_w)^k
  with T_w = 1800 K and k = 20 for the near-infrared window that opens at high T_s (the limit holds from
  ~400 K to ~1600-1800 K, Goldblatt et al. 2013, Fig. 1, from memory), at most sigma T_s^4. The window's form,
  T_w and k are this model's choice, not a fit: no published table or fit of OLR(T_s) above ~1500 K could be
  read (searched: Goldblatt et al. 2013; Kopparapu et al. 2013; Hamano et al. 2013, 2015; Kasting 1988;
  Nakajima, Hayashi & Abe 1992, whose grey model tends to a constant at high T_s and has no window; Marcq 2012;
  Lebrun et al. 2013; Katyal et al. 2019; Nikolaou et al. 2019; Boukrouche et al. 2021: abstracts only).
  Checked against it: Goldblatt & Watson 2012, Phil. Trans. A 370:4197 (abstract: warming past the limit
  ceases near 1400 K): outgoing = absorbed at 1311-1537 K for 282.5-294 W/m^2 (294 W/m^2: the steam Earth's
  absorbed flux, Goldblatt et al. 2013, abstract), tested. Not represented: the window's dependence on the
  water column (Nikolaou et al. 2019, ApJ 875:11, reference from memory, abstract checked: whether the magma
  ocean keeps cooling depends on both the H2O mass and the melting temperature; published 2 F_lim at ~1800-2300
  K depending on the column, from memory). Where it matters: an Earth at 1 AU ends its magma ocean at T_s ~1680
  K under ~200 bar of water, where the window gives 1.25 F_lim (tests/test_surface.py). w = exp(-tau_H2O), the
  grey transmissivity of the water column (tau_H2O of the grey law below): the grey law takes over once
  escape has thinned the steam (an optically thin atmosphere radiates like the grey law), not while the steam
  is thick, where the radiation limit holds whatever the grey law would give (this model's choice; the former
  max(OLR_steam, eps sigma T_s^4) let the grey law of a thick atmosphere exceed the limit, e.g. 1.8 F_lim at
  1470 K under 0.5 oceans);
* water (law 1): H2O dissolves in the melt as X = 647 ppmw (p / 1 bar)^0.5 (Sossi et al. 2023, EPSL 601:117894,
  peridotite liquids at 2173 K and 1 bar, f_H2O < 0.03 bar, with the peridotite-glass absorption coefficient;
  524 ppmw with the basaltic one; abstract checked; used here far above its pressures), CO2 as the grey law's
  X = 4.4e-12 P; each gas's partial pressure is its own column weight M_i g / (4 pi R^2) (as the grey law).
  The melt is the adiabat's (boundary-layer scheme) or the cells' (mixing-length scheme); water is returned
  to the atmosphere as the melt crystallises (none is kept in the solids). Where T_s is below the saturation
  temperature of the vapour's pressure (and below the critical point, 647.096 K), vapour condenses until
  p_H2O = p_sat(T_s): the rest, less the dissolved water, is the surface ocean. p_sat: Wagner & Pruss 1993,
  J. Phys. Chem. Ref. Data 22:783 (IAPWS saturation-pressure equation, 273.16-647.096 K; from memory; it
  gives 101.3 kPa at 373.12 K, tested). The radiation uses the vapour before condensation (not iterated);
* escape (with a star; grey or steam atmosphere): energy-limited escape of hydrogen, dM_H/dt = eta pi R^3 F_XUV / (G M) (Watson, Donahue &
  Walker 1981, Icarus 48:150; Lammer et al. 2003, ApJ 598:L121; from memory) with F_XUV = L_XUV / (4 pi a^2)
  and the planet's radius for the absorbing radius; water is lost at 9 times the hydrogen's mass (H2O per
  2 H) while vapour is in the atmosphere and no ocean has condensed (a cold trap then holds the water,
  Hamano et al. 2013, Nature 497:607, from memory). The oxygen stays behind and is taken up by the magma
  ocean (oxidising it; as Hamano et al. 2013 assume, checked in their institute's summary); it is not tracked.
"""

from __future__ import annotations

import math

from ..constants import (STANDARD_ATMOSPHERE, STEFAN_BOLTZMANN, WATER_CRITICAL_PRESSURE,
                         WATER_CRITICAL_TEMPERATURE)
from ._jit import njit
from .layout import (P_CO2_TOTAL, P_ESCAPE, P_G_SURF, P_H2O_SOL_C, P_H2O_SOL_E, P_H2O_TOTAL, P_RADIUS, P_STAR,
                     P_T_EQ)
from .roots import bisect
from .star import absorbed_flux_t4, xuv_luminosity

#: runaway-greenhouse limit of the outgoing longwave radiation [W/m^2] (Goldblatt et al. 2013)
RADIATION_LIMIT = 282.0
#: surface temperature [K] around which the near-infrared window opens, and the steepness (this model's choice)
WINDOW_TEMPERATURE = 1800.0
WINDOW_EXPONENT = 20.0
#: exponent of the smooth minimum of sigma T^4 and the limit (this model's choice)
JOIN_EXPONENT = 4.0
#: the IAPWS saturation-pressure coefficients a1..a6 (Wagner & Pruss 1993; from memory)
SAT_A = (-7.85951783, 1.84408259, -11.7866497, 22.6807411, -15.9618719, 1.80122502)
#: grey absorption coefficients at 1 atm [m^2/kg] of water and CO2 (Abe & Matsui 1985; from memory)
KAPPA_H2O, KAPPA_CO2 = 0.01, 0.001
#: bracket of the radiating temperature of the steam law [K]
T_RAD_LO, T_RAD_HI = 1.0, 1.0e5
LAW_GREY, LAW_STEAM = 0.0, 1.0


@njit(leaf=True)
def _dissolved_residual(m_atm, args):
    total, melt_mass, coeff, expo, g, area = args
    p = m_atm * g / area
    return m_atm + coeff * p ** expo * melt_mass - total


@njit(leaf=True)
def atmosphere_mass(total, melt_mass, par, coeff, expo):
    """Atmospheric mass [kg] of a volatile in solubility equilibrium with the melt.

    Mass balance M_total = M_atm + X(P) M_melt, P = M_atm g / (4 pi R^2), X = coeff P^expo
    (mass fraction); solved by bisection (monotone in M_atm) to rounding (1e-16 of M_total): over a lava world
    the net surface flux is the difference of two fluxes ~1e5 times larger, one of them set by the airborne
    water, and the former 1e-12 of M_total made the mixing-length Newton iteration cycle (tests/test_surface.py)."""
    if total <= 0.0:
        return 0.0
    if melt_mass <= 0.0:
        return total
    area = 4.0 * math.pi * par[P_RADIUS] ** 2
    args = (total, melt_mass, coeff, expo, par[P_G_SURF], area)
    return bisect(_dissolved_residual, args, 0.0, total, 1e-16 * total, 0.0, 64)


@njit(leaf=True)
def optical_depth(mass, kappa, par):
    """Grey optical depth of a gas column of ``mass`` [kg] with absorption coefficient kappa [m^2/kg] at 1 atm
    (see the module): 3 M / (8 pi R^2) sqrt(kappa g / (3 P0))."""
    area = 4.0 * math.pi * par[P_RADIUS] ** 2
    return 3.0 * mass / (2.0 * area) * math.sqrt(kappa * par[P_G_SURF] / (3.0 * STANDARD_ATMOSPHERE))


@njit(leaf=True)
def emissivity_of(m_h2o, m_co2, par):
    """Grey emissivity eps = 2 / (tau + 2) of an atmosphere holding m_h2o and m_co2 [kg] (see the module)."""
    return 2.0 / (optical_depth(m_h2o, KAPPA_H2O, par) + optical_depth(m_co2, KAPPA_CO2, par) + 2.0)


@njit(leaf=True)
def thin_weight(m_h2o, par):
    """Weight w = exp(-tau_H2O) of the grey law in the steam law (1 without water, ~0 under thick steam)."""
    return math.exp(-optical_depth(m_h2o, KAPPA_H2O, par))


@njit(leaf=True)
def olr_steam(ts):
    """Outgoing longwave radiation [W/m^2] of a thick steam atmosphere over a surface at ts [K] (the module)."""
    bb = STEFAN_BOLTZMANN * ts ** 4
    joined = (bb ** -JOIN_EXPONENT + RADIATION_LIMIT ** -JOIN_EXPONENT) ** (-1.0 / JOIN_EXPONENT)
    return min(joined * (1.0 + (ts / WINDOW_TEMPERATURE) ** WINDOW_EXPONENT), bb)


@njit(leaf=True)
def outgoing(ts, rad):
    """The radiation law's emitted part [W/m^2] at surface temperature ts (law 0: eps sigma T_s^4; law 1 the
    steam law blended with the grey one by the weight rad[4], see the module)."""
    grey = rad[1] * STEFAN_BOLTZMANN * ts ** 4
    if rad[0] > 0.5:
        return (1.0 - rad[4]) * olr_steam(ts) + rad[4] * grey
    return grey


@njit(leaf=True)
def net_radiation(ts, rad):
    """Net radiation [W/m^2] leaving a surface at ts [K]: emitted minus absorbed (the module's laws)."""
    if rad[0] > 0.5:
        return outgoing(ts, rad) - STEFAN_BOLTZMANN * rad[2]
    return rad[1] * STEFAN_BOLTZMANN * (ts ** 4 - rad[2])


@njit(leaf=True)
def _net_at(ts, rad):
    return net_radiation(ts, rad)


@njit(leaf=True)
def radiation_state(t, eps, steam, par, thin):
    """(law, eps, absorbed flux / sigma [K^4], radiating temperature [K], weight of the grey law in the steam
    law ``thin``, :func:`thin_weight`) at model time t: the radiating temperature is where the net radiation
    vanishes (T_eq itself without a star and without steam)."""
    f4 = absorbed_flux_t4(t, par)
    if steam:
        rad = (LAW_STEAM, eps, f4, 0.0, thin)
        return (LAW_STEAM, eps, f4, bisect(_net_at, rad, T_RAD_LO, T_RAD_HI, 1e-9, 1e-13, 200), thin)
    if par[P_STAR] > 0.5:
        return (LAW_GREY, eps, f4, f4 ** 0.25, thin)
    return (LAW_GREY, eps, f4, par[P_T_EQ], thin)


@njit(leaf=True)
def saturation_pressure(t):
    """Saturation vapour pressure of water [Pa] at t [K] (Wagner & Pruss 1993; 273.16-647.096 K; the critical
    pressure above the critical temperature)."""
    tc = WATER_CRITICAL_TEMPERATURE
    if t >= tc:
        return WATER_CRITICAL_PRESSURE
    tau = 1.0 - t / tc
    a = SAT_A
    s = (a[0] * tau + a[1] * tau ** 1.5 + a[2] * tau ** 3 + a[3] * tau ** 3.5 + a[4] * tau ** 4
         + a[5] * tau ** 7.5)
    return WATER_CRITICAL_PRESSURE * math.exp(tc / t * s)


@njit(leaf=True)
def _sat_residual(t, p):
    return saturation_pressure(t) - p


@njit(leaf=True)
def saturation_temperature(p):
    """Temperature [K] at which water's vapour pressure is p [Pa] (the critical temperature at or above the
    critical pressure); bisection, saturation_pressure rises with t."""
    if p >= WATER_CRITICAL_PRESSURE:
        return WATER_CRITICAL_TEMPERATURE
    return bisect(_sat_residual, p, 150.0, WATER_CRITICAL_TEMPERATURE, 1e-9, 0.0, 100)


@njit(leaf=True)
def volatiles(m_melt, lost, coeff, expo, par, added_h2o, added_co2):
    """(eps, M_H2O vapour, M_CO2, M_H2O dissolved, M_H2O left) [kg] before condensation: the water left
    (inventory plus the volcanically outgassed ``added_h2o``, less the escaped) in solubility equilibrium with
    ``m_melt`` of melt, X_H2O = coeff P^expo (the steam atmosphere's Sossi et al. 2023 law, or the grey law's
    6.8e-8 P^0.7), CO2 (inventory plus ``added_co2``) as X = 4.4e-12 P."""
    water = max(par[P_H2O_TOTAL] + added_h2o - lost, 0.0)
    m_h2o = atmosphere_mass(water, m_melt, par, coeff, expo)
    m_co2 = atmosphere_mass(par[P_CO2_TOTAL] + added_co2, m_melt, par, 4.4e-12, 1.0)
    return emissivity_of(m_h2o, m_co2, par), m_h2o, m_co2, water - m_h2o, water


@njit(leaf=True)
def condense(ts, water, m_melt, m_h2o, dissolved, par):
    """(vapour, ocean, dissolved) [kg] at surface temperature ts: where ts is below the saturation temperature
    of the vapour's pressure, the vapour falls to p_sat(ts) and the melt holds the solubility at that pressure;
    the rest of the water is the ocean."""
    area = 4.0 * math.pi * par[P_RADIUS] ** 2
    g = par[P_G_SURF]
    p = m_h2o * g / area
    if ts >= WATER_CRITICAL_TEMPERATURE or m_h2o <= 0.0 or p <= saturation_pressure(ts):
        return m_h2o, 0.0, dissolved
    p_sat = saturation_pressure(ts)
    vapour = p_sat * area / g
    melt_part = min(par[P_H2O_SOL_C] * p_sat ** par[P_H2O_SOL_E] * m_melt, water - vapour)
    return vapour, max(water - vapour - melt_part, 0.0), melt_part


@njit(leaf=True)
def escape_rate(t, m_h2o, ocean, par):
    """Water lost to space [kg/s] at model time t (energy-limited escape of its hydrogen; 0 without a star,
    without vapour or under an ocean)."""
    if par[P_STAR] < 0.5 or m_h2o <= 0.0 or ocean > 0.0:
        return 0.0
    return par[P_ESCAPE] * xuv_luminosity(t, par)
