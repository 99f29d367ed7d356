"""The host star in the core: bolometric and XUV luminosity at model time t, and the absorbed stellar flux.

Parameters (indices P_* of :mod:`meltzone._core.layout`, filled by :mod:`meltzone.star`): the star's age at
the start of the run (P_STAR_AGE0 [s]); log10 L [W] on a grid uniform in log10 of the star's age [yr]
(P_LUM0.. with its first age P_LUM_AGE0 and spacing P_LUM_DAGE), interpolated linearly in log age and held
at its end values outside it; the XUV law L_XUV = r_sat L_bol while the star is younger than t_sat, then
r_sat L_bol(t_sat) (age / t_sat)^-alpha (saturation then power-law decay: Ribas et al. 2005, ApJ 622:680 for
the Sun, 1-1200 A, alpha = 1.23; Jackson, Davis & Wheatley 2012, MNRAS 422:2024, X-rays saturated at L_X/L_bol
10^-4.3 - 10^-3.1 until 10^7.6 - 10^8.3 yr; statuses in meltzone.star).
"""

from __future__ import annotations

import math

from ..constants import STEFAN_BOLTZMANN, YEAR
from ._jit import njit
from .layout import (N_LUM, P_FLUX_FACTOR, P_LUM, P_LUM_AGE0, P_LUM_DAGE, P_STAR, P_STAR_AGE0, P_T_EQ,
                     P_XUV_EXP, P_XUV_SAT, P_XUV_T_SAT)


@njit(leaf=True)
def luminosity_at_age(age, par):
    """Bolometric luminosity [W] of the star at its age ``age`` [s] (the table of the parameters)."""
    x = (math.log10(max(age, YEAR) / YEAR) - par[P_LUM_AGE0]) / par[P_LUM_DAGE]
    if x <= 0.0:
        return 10.0 ** par[P_LUM]
    if x >= N_LUM - 1:
        return 10.0 ** par[P_LUM + N_LUM - 1]
    i = int(x)
    s = x - i
    return 10.0 ** ((1.0 - s) * par[P_LUM + i] + s * par[P_LUM + i + 1])


@njit(leaf=True)
def star_luminosity(t, par):
    """Bolometric luminosity [W] at model time t [s] (the star is P_STAR_AGE0 old at t = 0)."""
    return luminosity_at_age(par[P_STAR_AGE0] + t, par)


@njit(leaf=True)
def xuv_luminosity(t, par):
    """XUV luminosity [W] at model time t [s]: saturated, then a power law in age (see the module)."""
    age = par[P_STAR_AGE0] + t
    t_sat = par[P_XUV_T_SAT]
    if age <= t_sat:
        return par[P_XUV_SAT] * luminosity_at_age(age, par)
    return par[P_XUV_SAT] * luminosity_at_age(t_sat, par) * (age / t_sat) ** (-par[P_XUV_EXP])


@njit(leaf=True)
def absorbed_flux_t4(t, par):
    """The absorbed stellar flux divided by sigma [K^4] at model time t: (1 - A) L(t) / (16 pi a^2 sigma) with a
    star, T_eq^4 without one. The one way the star reaches the surface balance of both schemes (a constant
    T_eq is the degenerate case, with the former arithmetic: the results without a star are unchanged)."""
    if par[P_STAR] > 0.5:
        return par[P_FLUX_FACTOR] * star_luminosity(t, par) / STEFAN_BOLTZMANN
    return par[P_T_EQ] ** 4


@njit(leaf=True)
def absorbed_flux(t, par):
    """Absorbed stellar flux per unit surface [W/m^2] at model time t (sigma x :func:`absorbed_flux_t4`)."""
    return STEFAN_BOLTZMANN * absorbed_flux_t4(t, par)
