"""Plain NumPy references of the surface kernels (star, steam radiation, water, escape), written from the
equations of :mod:`meltzone._core.radiation` and :mod:`meltzone.star` with their own constants, not from the
kernels' arrays."""

import math

import numpy as np

SIGMA = 5.670374419e-8
G = 6.67430e-11
AU = 1.495978707e11
L_SUN = 3.839e26


def olr_steam(ts):
    """282 W/m^2 joined to sigma T^4 by a 4-norm, times 1 + (T / 1800 K)^20, at most sigma T^4."""
    bb = SIGMA * np.asarray(ts, dtype=float) ** 4
    joined = (bb ** -4.0 + 282.0 ** -4.0) ** -0.25
    return np.minimum(joined * (1.0 + (np.asarray(ts) / 1800.0) ** 20), bb)


def saturation_pressure(t):
    """Wagner & Pruss 1993 (IAPWS) saturation pressure [Pa]."""
    tc, pc = 647.096, 22.064e6
    tau = 1.0 - t / tc
    a = (-7.85951783, 1.84408259, -11.7866497, 22.6807411, -15.9618719, 1.80122502)
    s = a[0] * tau + a[1] * tau ** 1.5 + a[2] * tau ** 3 + a[3] * tau ** 3.5 + a[4] * tau ** 4 + a[5] * tau ** 7.5
    return pc * math.exp(tc / t * s)


def water_escape_rate(efficiency, radius, mass, l_xuv, a_au):
    """Energy-limited hydrogen escape eta pi R^3 F_XUV / (G M), F_XUV = L_XUV / (4 pi a^2), as water (x 18/2)."""
    flux = l_xuv / (4.0 * math.pi * (a_au * AU) ** 2)
    return efficiency * math.pi * radius ** 3 * flux / (G * mass) * (18.015 / 2.016)


def xuv(l_bol_at, age_yr, ratio=10.0 ** -3.1, t_sat_yr=1e8, alpha=1.23):
    """Saturated L_XUV = ratio L_bol until t_sat, then ratio L_bol(t_sat) (age / t_sat)^-alpha."""
    if age_yr <= t_sat_yr:
        return ratio * l_bol_at(age_yr)
    return ratio * l_bol_at(t_sat_yr) * (age_yr / t_sat_yr) ** -alpha
