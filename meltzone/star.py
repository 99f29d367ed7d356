"""The host star and the orbit: bolometric luminosity through time from published stellar tracks, the XUV
luminosity, the absorbed flux, and the kernel parameters of the star, the steam atmosphere and escape.

Bolometric luminosity: the tracks of Baraffe et al. 2015, A&A 577:A42 (solar metallicity; pre-main sequence
included), rows copied into ``meltzone/data/bhac15_luminosity.csv`` for twelve tracks of 0.08-1.4 M_sun (see
the file's header for what was taken and where each track's rows end). log L is interpolated linearly in log age along each track (the nearest row outside
it), then linearly in log mass between the two tracks around the star's mass (this model's choice); masses
0.08-1.4 M_sun (:data:`MASS_RANGE`). For the kernels it is sampled on N_LUM ages uniform in log age, 1 Myr -
10 Gyr (:func:`luminosity_grid`).

XUV: L_XUV = r_sat L_bol while the star is younger than t_sat, then r_sat L_bol(t_sat) (age / t_sat)^-alpha.
Jackson, Davis & Wheatley 2012, MNRAS 422:2024 (abstract checked): saturated L_X/L_bol from 10^-4.3 (early F) to
10^-3.1 (late K dwarfs), saturation times 10^7.6 - 10^8.3 yr for FGK stars; the default r_sat is 10^-3.1 (X-rays
only: the EUV would add to it), t_sat 0.1 Gyr. Ribas et al. 2005, ApJ 622:680: the Sun's 1-1200 A flux at 1 AU,
29.7 (age / Gyr)^-1.23 erg s^-1 cm^-2 for 0.1-7 Gyr (the fit from memory; its exponent is consistent with the
abstract's 2.5x the present flux 2.5 Gyr ago and 6x 3.5 Gyr ago, checked). The defaults give the present Sun
1.48x Ribas's fit (tests/test_surface.py measures it); the decline of other masses with the same exponent is
this model's choice (Jackson et al. fit their own, from memory ~1.1-1.5).
"""

from __future__ import annotations

import functools
import math
from importlib import resources

import numpy as np

from ._core import layout as k
from .config_star import XUV_SATURATION_RATIO
from .constants import AU, G, GYR, MYR, SOLAR_LUMINOSITY_BHAC15, STEFAN_BOLTZMANN, WATER_PER_HYDROGEN, YEAR

#: Star masses [M_sun] the shipped tracks cover.
MASS_RANGE = (0.08, 1.4)
#: log10 of the first age [yr] of the kernels' luminosity grid and its spacing (N_LUM points: 1 Myr - 10 Gyr).
GRID_LOG_AGE0 = 6.0
GRID_LOG_AGE_STEP = 4.0 / (k.N_LUM - 1)
#: Sossi et al. 2023, EPSL 601:117894: 647 ppmw of H2O per bar^0.5 in peridotite melt (X = c p^0.5), in Pa.
SOSSI2023_H2O = (647.0e-6 / math.sqrt(1.0e5), 0.5)


@functools.lru_cache(maxsize=1)
def tracks() -> dict[float, tuple[np.ndarray, np.ndarray]]:
    """mass [M_sun] -> (log10 age [yr], log10 L/L_sun) rows of the shipped BHAC15 table, ages increasing."""
    text = resources.files("meltzone").joinpath("data/bhac15_luminosity.csv").read_text()
    rows = [line.split(",") for line in text.splitlines() if line and not line.startswith(("#", "mass"))]
    data = np.array(rows, dtype=float)
    out = {}
    for m in np.unique(data[:, 0]):
        sel = data[data[:, 0] == m]
        out[float(m)] = (sel[:, 1].copy(), sel[:, 2].copy())
    return out


def log_luminosity(mass_msun: float, log_age_yr) -> np.ndarray:
    """log10 L/L_sun of a star of ``mass_msun`` at log10 age [yr] (array): the tracks' rows interpolated (see
    the module)."""
    tr = tracks()
    masses = sorted(tr)
    lo, hi = masses[0], masses[-1]
    if not lo <= mass_msun <= hi:
        raise ValueError(f"star mass {mass_msun:g} M_sun is outside the tracks ({lo:g}-{hi:g} M_sun)")
    x = np.asarray(log_age_yr, dtype=float)
    j = min(int(np.searchsorted(masses, mass_msun, side="right")), len(masses) - 1)
    m0, m1 = masses[j - 1], masses[j]
    l0 = np.interp(x, *tr[m0])
    l1 = np.interp(x, *tr[m1])
    w = math.log(mass_msun / m0) / math.log(m1 / m0)
    return (1.0 - w) * l0 + w * l1


def bolometric_luminosity(mass_msun: float, age_yr) -> np.ndarray:
    """Bolometric luminosity [W] at the star's age [yr]."""
    return SOLAR_LUMINOSITY_BHAC15 * 10.0 ** log_luminosity(mass_msun, np.log10(np.asarray(age_yr, dtype=float)))


def xuv_luminosity(mass_msun: float, age_yr, ratio: float = XUV_SATURATION_RATIO, saturation_age_yr: float = 1e8,
                   exponent: float = 1.23) -> np.ndarray:
    """XUV luminosity [W] at the star's age [yr] (saturated, then a power law in age; see the module)."""
    age = np.asarray(age_yr, dtype=float)
    sat = ratio * bolometric_luminosity(mass_msun, np.minimum(age, saturation_age_yr))
    return np.where(age <= saturation_age_yr, sat, sat * (np.maximum(age, saturation_age_yr)
                                                          / saturation_age_yr) ** -exponent)


def equilibrium_temperature(luminosity_w, semi_major_axis_au: float, bond_albedo: float):
    """Equilibrium temperature [K], ((1 - A) L / (16 pi sigma a^2))^(1/4) (common practice)."""
    a = semi_major_axis_au * AU
    return ((1.0 - bond_albedo) * np.asarray(luminosity_w) / (16.0 * math.pi * STEFAN_BOLTZMANN * a * a)) ** 0.25


def luminosity_grid(mass_msun: float) -> np.ndarray:
    """log10 L [W] on the kernels' N_LUM ages (uniform in log age from GRID_LOG_AGE0)."""
    ages = GRID_LOG_AGE0 + GRID_LOG_AGE_STEP * np.arange(k.N_LUM)
    return np.log10(SOLAR_LUMINOSITY_BHAC15) + log_luminosity(mass_msun, ages)


def fill_parameters(spec, interior, par: np.ndarray) -> None:
    """Fill the kernel parameters of the star, the steam atmosphere, water and escape (P_STAR ... P_LUM+) from
    the spec; without a star only the steam switch and the solubility law are set."""
    sf = spec.surface
    par[k.P_STEAM] = 1.0 if sf.atmosphere == "steam" else 0.0
    par[k.P_H2O_SOL_C], par[k.P_H2O_SOL_E] = SOSSI2023_H2O
    st = spec.star
    if st.mass_msun <= 0.0:
        par[k.P_STAR] = 0.0
        return
    ob = spec.orbit
    a = ob.semi_major_axis_au * AU
    par[k.P_STAR] = 1.0
    par[k.P_STAR_AGE0] = st.age_at_start_myr * MYR
    par[k.P_FLUX_FACTOR] = (1.0 - ob.bond_albedo) / (16.0 * math.pi * a * a)
    par[k.P_XUV_SAT] = st.xuv_saturation_ratio
    par[k.P_XUV_T_SAT] = st.xuv_saturation_age_gyr * GYR
    par[k.P_XUV_EXP] = st.xuv_decay_exponent
    # water lost per watt of XUV: eta pi R^3 / (G M) (hydrogen) x 9 (water per hydrogen) / (4 pi a^2)
    par[k.P_ESCAPE] = (sf.escape_efficiency * WATER_PER_HYDROGEN * interior.radius ** 3
                       / (4.0 * G * interior.mass * a * a))
    par[k.P_LUM_AGE0] = GRID_LOG_AGE0
    par[k.P_LUM_DAGE] = GRID_LOG_AGE_STEP
    par[k.P_LUM:k.P_LUM + k.N_LUM] = luminosity_grid(st.mass_msun)
    # the lid's floor and stored-heat profile keep a fixed surface temperature (one that changed with time would
    # make the stored heat a function of time): the lowest equilibrium temperature of the run
    lum_min = lowest_luminosity(par[k.P_LUM:k.P_LUM + k.N_LUM], st.age_at_start_myr * MYR / YEAR,
                                st.age_at_start_myr * MYR / YEAR + spec.run.end_time_gyr * GYR / YEAR)
    par[k.P_T_EQ] = float(equilibrium_temperature(lum_min, ob.semi_major_axis_au, ob.bond_albedo))


def lowest_luminosity(log_lum_grid: np.ndarray, age0_yr: float, age1_yr: float) -> float:
    """The lowest bolometric luminosity [W] the kernels' table ``log_lum_grid`` (log10 L [W] on the N_LUM ages
    of :func:`luminosity_grid`, linear in log age and held at its ends, as meltzone._core.star reads it) gives
    between the star's ages age0_yr and age1_yr: a piecewise-linear function is lowest at an end or at a node.

    The equilibrium temperature of this luminosity (not the start's) bounds the stagnant lid's base from below:
    a pre-main-sequence M dwarf dims by ~10x in its first 0.1 Gyr, and a floor at the start's equilibrium
    temperature (1957 K for a 0.57 M_sun star at 0.0102 AU, against 1267 K at 0.1 Gyr) put the lid's base
    ~400 K above the mantle under it, whose heat then drained through the lid until T_u reached the inversion's
    10 K floor."""
    ages = GRID_LOG_AGE0 + GRID_LOG_AGE_STEP * np.arange(len(log_lum_grid))
    x0, x1 = math.log10(max(age0_yr, 1.0)), math.log10(max(age1_yr, 1.0))
    inside = log_lum_grid[(ages > x0) & (ages < x1)]
    ends = np.interp([x0, x1], ages, log_lum_grid)
    return float(10.0 ** min(ends.min(), inside.min() if inside.size else np.inf))
