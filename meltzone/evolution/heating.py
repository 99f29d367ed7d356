"""Radiogenic heating: U-238, U-235, Th-232 and K-40 in the silicate mantle.

Heat production per kg of isotope and half-lives: Turcotte & Schubert,
Geodynamics (2nd ed. 2002, Cambridge Univ. Press), Table 4.2.
Bulk silicate Earth abundances today: U 20.3 ppb, Th 79.5 ppb, K 240 ppm
(McDonough & Sun 1995, Chem. Geol. 120:223; from memory). Natural isotope
fractions: U-238 0.9927 and U-235 0.0072 by mass of U; K-40 1.19e-4 by mass of
K (IUPAC isotopic abundance 0.0117 atom%, converted to mass; common practice).
Together these give ~19.9 TW for a 4.035e24 kg bulk silicate Earth today, as
the 19.9 +- 3.0 TW of McDonough, Sramek & Wipperfurth 2020 (Geochem. Geophys.
Geosyst. 21:e2020GC009142).

The heat production at model time t of a planet whose inventory at the start
is ``radiogenic_scale`` times the bulk silicate Earth's, decayed back by
``start_age`` (model time 0 is ``start_age`` before "today"), is

    H(t) = M_mantle * scale * sum_i c_i h_i exp(lambda_i (start_age - t)).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..constants import YEAR


@dataclass(frozen=True)
class Isotope:
    name: str
    heat_w_per_kg: float  # W per kg of the isotope
    half_life_yr: float
    element_ppm: float  # bulk silicate Earth, mass ppm of the element
    isotope_fraction: float  # mass fraction of the element that is this isotope

    @property
    def decay_constant(self) -> float:
        """lambda [1/s] = ln 2 / half-life."""
        return math.log(2.0) / (self.half_life_yr * YEAR)

    @property
    def heat_per_kg_rock(self) -> float:
        """Heat production today [W per kg of mantle rock] at bulk-silicate-Earth abundance."""
        return self.element_ppm * 1e-6 * self.isotope_fraction * self.heat_w_per_kg


ISOTOPES = (
    Isotope("U-238", 9.46e-5, 4.47e9, 20.3e-3, 0.9927),
    Isotope("U-235", 5.69e-4, 7.04e8, 20.3e-3, 0.0072),
    Isotope("Th-232", 2.64e-5, 1.40e10, 79.5e-3, 1.0),
    Isotope("K-40", 2.92e-5, 1.25e9, 240.0, 1.19e-4),
)

#: Mass of the bulk silicate Earth [kg] used for the 19.9 TW check (mantle + crust; common practice).
BSE_MASS = 4.035e24


def isotope_table(scale: float = 1.0) -> np.ndarray:
    """(4, 2) float64 array for the kernel: heat per kg of mantle today [W/kg] times scale, lambda [1/s]."""
    return np.array([[scale * iso.heat_per_kg_rock, iso.decay_constant] for iso in ISOTOPES], dtype=np.float64)


def radiogenic_power(mantle_mass_kg: float, age_before_today_s: float = 0.0, scale: float = 1.0) -> float:
    """Radiogenic power [W] of a mantle of this mass, ``age_before_today_s`` before today."""
    tab = isotope_table(scale)
    return float(mantle_mass_kg * np.sum(tab[:, 0] * np.exp(tab[:, 1] * age_before_today_s)))
