"""Configuration sections of the host star and the orbit (part of :data:`meltzone.config.SCHEMA`)."""

from __future__ import annotations

from .config_key import Key
from .errors import ConfigError

#: Star masses [M_sun] of the shipped stellar tracks (meltzone.star.MASS_RANGE; a test keeps the two equal).
STAR_MASS_RANGE = (0.08, 1.4)
#: default L_XUV / L_bol of a saturated star (Jackson, Davis & Wheatley 2012; see the key's source)
XUV_SATURATION_RATIO = 10.0 ** -3.1

STAR_KEYS = {
    "mass_msun": Key(0.0, "M_sun", "mass of the host star; 0 = no star (surface.equilibrium_temperature_k is "
                     "then the fixed irradiation); with a star, do not set surface.equilibrium_temperature_k "
                     "(not even to its default)", lo=STAR_MASS_RANGE[0], hi=STAR_MASS_RANGE[1], special=0.0,
        source="bolometric luminosity from the tracks of Baraffe et al. 2015, A&A 577:A42 (rows of twelve "
               "tracks, 0.08-1.4 M_sun, shipped in meltzone/data/bhac15_luminosity.csv, interpolated in log age "
               "and log mass); the range is the shipped tracks' (the table's own upper end is 1.4 M_sun)"),
    "age_at_start_myr": Key(3.0, "Myr", "age of the star at the start of the run (model time 0)", lo=1.0,
                            hi=10000.0,
        source="~3 Myr: about half of young stars have lost their dust disks (the end of gas accretion onto "
               "planets), Haisch, Lada & Lada 2001, ApJ 553:L153 (from memory); limits: the tracks' 1 Myr - "
               "10 Gyr"),
    "xuv_saturation_ratio": Key(XUV_SATURATION_RATIO, "1", "L_XUV / L_bol while the star's activity is saturated",
                                lo=0.0, hi=0.1,
        source="10^-3.1: the saturated L_X/L_bol of late K dwarfs, the upper end of 10^-4.3 (early F) - 10^-3.1 "
               "(Jackson, Davis & Wheatley 2012, MNRAS 422:2024; abstract checked); X-rays only, the EUV adds to "
               "it; with the default age and exponent it gives the present Sun 1.48x Ribas et al.'s 1-1200 A fit "
               "(measured); 0 = no XUV"),
    "xuv_saturation_age_gyr": Key(0.1, "Gyr", "age at which the saturated XUV phase ends", lo=0.001, hi=10.0,
        source="0.1 Gyr = 10^8 yr, inside the saturation times 10^7.6 - 10^8.3 yr of FGK stars (Jackson et al. "
               "2012, abstract checked; no clear trend with spectral type there); longer for M dwarfs"),
    "xuv_decay_exponent": Key(1.23, "1", "exponent alpha of the XUV decay L_XUV ~ age^-alpha after saturation",
                              lo=0.0, hi=5.0,
        source="1.23: the Sun's 1-1200 A emission, Ribas et al. 2005, ApJ 622:680 (the exponent from memory, "
               "consistent with the abstract's 2.5x the present flux 2.5 Gyr ago and 6x 3.5 Gyr ago: 1.23 gives "
               "2.7x and 6.0x; checked so)"),
}

ORBIT_KEYS = {
    "semi_major_axis_au": Key(1.0, "AU", "orbital distance from the star (circular orbit)", lo=0.005,
                              hi=100.0,
        source="common practice; limits: a few stellar radii of a 1 M_sun star to beyond Neptune"),
    "bond_albedo": Key(0.3, "1", "Bond albedo of the planet (with its atmosphere)", lo=0.0, hi=0.95,
        source="0.3: Earth's today (common practice); steam atmospheres over magma oceans ~0.2-0.3 and more "
               "with clouds (Pluriel, Marcq & Turbet 2019, Icarus 317:583; abstract seen, from memory)"),
}

#: Escape of water to space (a key of [surface]).
ESCAPE_KEYS = {
    "escape_efficiency": Key(0.1, "1", "heating efficiency of energy-limited escape of hydrogen driven by the "
                             "star's XUV (0 = no escape; water is lost with a star and an atmosphere)",
                             lo=0.0, hi=1.0,
        source="0.1-0.3 published for hydrogen-rich upper atmospheres (Watson, Donahue & Walker 1981, Icarus "
               "48:150; Lammer et al. 2003, ApJ 598:L121; Hamano et al. 2013 use 0.1-0.3; from memory)"),
}


def check_star(values, t_eq_set: bool) -> bool:
    """True when a star is set; ConfigError naming both keys when surface.equilibrium_temperature_k was set too
    (explicitly, in the file, with --set or as a keyword: also at its default value)."""
    mass = values["star"]["mass_msun"]
    if mass <= 0.0:
        return False
    if t_eq_set:
        t_eq = values["surface"]["equilibrium_temperature_k"]
        raise ConfigError(f"star.mass_msun = {mass:g} and surface.equilibrium_temperature_k = {t_eq:g} K are both "
                          "set: the star's flux sets the irradiation; remove surface.equilibrium_temperature_k or set "
                          "star.mass_msun = 0")
    return True
