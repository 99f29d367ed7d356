"""Physical constants and unit conversions (SI inside the code, always).

Every group names its source. Convenience units (Earth masses, GPa, Gyr) are
converted here and only at the edges of the program (config, CLI, plots).
"""

from __future__ import annotations

# --- Fundamental constants -------------------------------------------------
#: Newtonian constant of gravitation [m^3 kg^-1 s^-2]; CODATA 2018
#: (Tiesinga et al. 2021, Rev. Mod. Phys. 93:025010).
G = 6.67430e-11
#: Stefan-Boltzmann constant [W m^-2 K^-4]; CODATA 2018 (exact from h, c, k).
STEFAN_BOLTZMANN = 5.670374419e-8
#: Molar gas constant [J mol^-1 K^-1]; CODATA 2018 (exact, N_A k).
GAS_CONSTANT = 8.314462618

# --- Earth reference values ------------------------------------------------
#: Earth mass [kg]: IAU 2015 Resolution B3 nominal GM_E = 3.986004e14 m^3 s^-2
#: divided by the CODATA 2018 G (Prsa et al. 2016, AJ 152:41).
EARTH_MASS = 3.986004e14 / G  # = 5.9722e24 kg
#: Earth mean radius [m] (Moritz 2000, Geodetic Reference System 1980 mean radius R_1).
EARTH_RADIUS = 6.371e6

# --- Time -------------------------------------------------------------------
#: Julian year [s] (IAU: 365.25 d of 86400 s).
YEAR = 365.25 * 86400.0
MYR = 1.0e6 * YEAR
GYR = 1.0e9 * YEAR

# --- Pressure ---------------------------------------------------------------
GPA = 1.0e9
TPA = 1.0e12
#: Standard atmosphere [Pa] (exact by definition; BIPM SI Brochure 2019).
STANDARD_ATMOSPHERE = 101325.0

# --- Molar masses [kg/mol] (IUPAC 2013 standard atomic weights) -------------
MOLAR_MASS_MG = 24.305e-3
MOLAR_MASS_FE = 55.845e-3
MOLAR_MASS_SI = 28.0855e-3
MOLAR_MASS_O = 15.999e-3

#: cm^3/mol to m^3/mol
CM3_PER_MOL = 1.0e-6


# --- Star and orbit -----------------------------------------------------------
#: Astronomical unit [m] (IAU 2012 Resolution B2, exact).
AU = 1.495978707e11
#: Solar luminosity [W] as used by the stellar tracks of Baraffe et al. 2015, A&A 577:A42 (3.839e33 erg/s),
#: so that their L/L_sun converts back to their watts (IAU 2015 B3 nominal: 3.828e26 W).
SOLAR_LUMINOSITY_BHAC15 = 3.839e26

# --- Water --------------------------------------------------------------------
#: Critical point of water: 647.096 K, 22.064 MPa (IAPWS 1995, Wagner & Pruss 2002, JPCRD 31:387).
WATER_CRITICAL_TEMPERATURE = 647.096
WATER_CRITICAL_PRESSURE = 22.064e6
#: Mass of Earth's oceans [kg], the unit "one Earth ocean" (1.4e21 kg; common practice).
EARTH_OCEAN_MASS = 1.4e21
#: Mass of water per mass of hydrogen in it: M(H2O) / (2 M(H)) = 18.015 / 2.016 (IUPAC 2013 atomic weights).
WATER_PER_HYDROGEN = 18.015 / 2.016


def is_duration(key: str) -> bool:
    """Whether a summary key holds a time [yr] (``..._yr``), not a rate per year (``..._km3_yr``)."""
    return key.endswith("_yr") and not key.endswith("_km3_yr")
