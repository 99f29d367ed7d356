"""The host star, the steam atmosphere, water and escape: published values, plain references, coupled runs."""

import math

import numpy as np
import pytest

import meltzone
from meltzone import star
from meltzone._core import layout as k
from meltzone.config import SCHEMA, PlanetSpec
from meltzone.config_star import STAR_MASS_RANGE
from meltzone.errors import ConfigError

from reference_surface import olr_steam, saturation_pressure, water_escape_rate, xuv

OCEAN = 1.4e21  # kg, one Earth ocean (common practice)


def test_goldblatt2013_radiation_limit():
    """Goldblatt et al. 2013, Nature Geosci. 6:661 (abstract): a steam atmosphere's thermal emission is limited to
    282 W/m^2 whatever the surface temperature, until the surface radiates through the near-infrared window
    (Goldblatt et al. 2013 Fig. 1, from memory: above ~1600-1800 K). Tolerance: 1% on the plateau 400-1400 K;
    the rise: >1.3x the limit at 1700 K and >5x at 2000 K; never above sigma T^4."""
    from meltzone._core.radiation import olr_steam as kernel

    plateau = np.array([kernel(t) for t in np.linspace(400.0, 1400.0, 11)])
    assert np.all(np.abs(plateau / 282.0 - 1.0) < 0.01)
    assert kernel(1700.0) > 1.3 * 282.0 and kernel(2000.0) > 5 * 282.0
    for t in (250.0, 1000.0, 2600.0, 4000.0):
        assert kernel(t) <= 5.670374419e-8 * t ** 4 * (1 + 1e-12)


def test_steam_radiation_against_plain_reference():
    """The kernel's steam law against tests/reference_surface.py (written from the equations), 1e-12."""
    from meltzone._core.radiation import olr_steam as kernel

    ts = np.geomspace(150.0, 5000.0, 57)
    assert np.allclose([kernel(t) for t in ts], olr_steam(ts), rtol=1e-12, atol=0.0)


def test_post_runaway_surface_temperature_goldblatt_watson2012():
    """Goldblatt & Watson 2012, Phil. Trans. R. Soc. A 370:4197 (abstract checked): once the radiation limit is
    exceeded, warming ceases only after the surface reaches approximately 1400 K and radiates in the near
    infrared. Goldblatt et al. 2013 (abstract checked): a steam atmosphere over today's Earth absorbs 294 W/m^2,
    12 W/m^2 above the 282 W/m^2 limit. The steam law's equilibrium surface temperature (outgoing = absorbed)
    for absorbed fluxes from 0.2% above the limit to 294 W/m^2: within 1400 K +-15% ("approximately"; this
    test's reading). Measured: 1311 K at 282.5 W/m^2, 1405 K at 284, 1537 K at 294 (the window opens ~140 K
    later than the abstract's 1400 K for that flux)."""
    from scipy.optimize import brentq

    from meltzone._core.radiation import olr_steam as kernel

    for absorbed in (282.5, 284.0, 288.0, 294.0):
        t_eq = brentq(lambda t: kernel(t) - absorbed, 500.0, 4000.0, xtol=1e-6)
        assert 0.85 * 1400.0 < t_eq < 1.15 * 1400.0


def test_dissolved_water_solve_is_exact_to_rounding():
    """The partition of a volatile between atmosphere and melt (M_atm + coeff P^expo M_melt = M_total, P = M_atm g /
    (4 pi R^2); Sossi et al. 2023's water law and the grey law's) against scipy's brentq at the tightest
    tolerance it accepts (4 machine epsilons), 1e-13 relative, from 1e-6 to 10 times the inventory in melt. Why so
    tight: over a lava world the net surface flux is the small difference of two fluxes 1e5 times larger, and the
    airborne water sets one of them; solved to 1e-12 of the inventory (as before), the solve's own error made the
    mixing-length Newton iteration cycle and held the steps at ~30 kyr (1.08 M_E steam lava world, 4.5 Gyr:
    139,837 steps, 478 s)."""
    from types import SimpleNamespace

    from meltzone._core.radiation import atmosphere_mass
    from reference_evolution import atmosphere_mass as reference

    par = np.zeros(k.N_PAR)
    par[k.P_RADIUS], par[k.P_G_SURF] = 6.371e6, 9.81
    ph = SimpleNamespace(radius=par[k.P_RADIUS], gravity_surface=par[k.P_G_SURF])
    eps = np.finfo(float).eps
    for total, coeff, expo in ((2.9e20, 647e-6 / 1e5 ** 0.5, 0.5), (1e22, 6.8e-8, 0.7), (1e21, 4.4e-12, 1.0)):
        for melt in total * np.geomspace(1e-6, 10.0, 9):
            ref = reference(total, melt, coeff, expo, ph, xtol_rel=4 * eps)
            assert atmosphere_mass(total, melt, par, coeff, expo) == pytest.approx(ref, rel=1e-13)


def test_wagner_pruss_boiling_point_and_critical_point():
    """IAPWS saturation pressure (Wagner & Pruss 1993, from memory): 101.325 kPa at 373.124 K (the normal boiling
    point on ITS-90, common practice), 1e-3; 611.657 Pa at the triple point 273.16 K, 1e-3; the critical pressure
    at the critical temperature; the kernel's inverse returns the temperature (1e-9)."""
    from meltzone._core.radiation import saturation_pressure as kernel, saturation_temperature

    assert kernel(373.124) == pytest.approx(101325.0, rel=1e-3)
    assert kernel(273.16) == pytest.approx(611.657, rel=1e-3)
    assert kernel(647.096) == pytest.approx(22.064e6, rel=1e-12)
    for t in (300.0, 450.0, 600.0):
        assert kernel(t) == pytest.approx(saturation_pressure(t), rel=1e-12)
        assert saturation_temperature(kernel(t)) == pytest.approx(t, rel=1e-9)


def test_sossi2023_solubility_coefficient():
    """Sossi et al. 2023, EPSL 601:117894 (abstract): 647 ppmw H2O per bar^0.5 in peridotite liquids (peridotite-
    glass absorption coefficient), X ~ f_H2O^0.5. Exact at 1 and 100 bar (1e-12)."""
    c, e = star.SOSSI2023_H2O
    assert e == 0.5
    assert c * (1e5) ** e == pytest.approx(647e-6, rel=1e-12)
    assert c * (1e7) ** e == pytest.approx(6470e-6, rel=1e-12)


@pytest.mark.parametrize("log_age, log_l", [(7.000174, -0.337), (7.704278, -0.169), (9.661628, -0.007)])
def test_baraffe2015_solar_track_at_three_ages(log_age, log_l):
    """Baraffe et al. 2015, A&A 577:A42, the 1.0 M_sun track (rows of the table): log L/L_sun at 10 Myr (pre-main
    sequence), 51 Myr (zero-age main sequence) and 4.59 Gyr, reproduced to 1e-9 dex."""
    got = star.log_luminosity(1.0, log_age)
    assert float(got) == pytest.approx(log_l, abs=1e-9)


@pytest.mark.parametrize("mass, log_age, log_l", [
    (0.5, 7.000091, -0.908), (0.5, 7.700487, -1.336), (0.5, 9.500558, -1.449),
    (1.2, 6.502554, 0.074), (1.2, 7.330079, 0.373), (1.2, 9.000204, 0.281)])
def test_baraffe2015_two_more_tracks_at_three_ages(mass, log_age, log_l):
    """Baraffe et al. 2015, A&A 577:A42, the 0.5 and 1.2 M_sun tracks (rows of the table, read from the published
    file): log L/L_sun on the pre-main sequence, near the zero-age main sequence (1.2 M_sun: its luminosity peak at
    21 Myr) and on the main sequence, reproduced to 1e-9 dex."""
    assert float(star.log_luminosity(mass, log_age)) == pytest.approx(log_l, abs=1e-9)


def test_shipped_tracks_brighten_with_mass_after_4_myr():
    """Common practice (mass-luminosity relation): at a fixed age the luminosity rises with the star's mass; it holds
    between every pair of neighbouring shipped tracks from 4 Myr to 10 Gyr (a guard against a mis-copied row;
    before ~4 Myr deuterium burning makes the 0.08 M_sun star brighter than the 0.1 M_sun one, as in the table)."""
    tracks = star.tracks()
    ages = np.linspace(6.6, 10.0, 69)
    logl = np.array([np.interp(ages, *tracks[m]) for m in sorted(tracks)])
    assert np.all(np.diff(logl, axis=0) > 0.0)
    assert sorted(tracks) == [0.08, 0.1, 0.2, 0.3, 0.5, 0.7, 0.8, 0.9, 1.0, 1.1, 1.2, 1.4]


def test_star_table_range_and_kernel_grid():
    """The config's star-mass range is the shipped tracks'; the kernel's luminosity (one table in the parameters,
    linear in log age) equals the Python interpolation at the grid ages (1e-12) and stays within 0.02 dex of it
    between them (0.05 dex spacing; this model's choice)."""
    from meltzone._core.star import luminosity_at_age

    assert STAR_MASS_RANGE == star.MASS_RANGE == (min(star.tracks()), max(star.tracks()))
    spec = PlanetSpec(mass_msun=0.55, atmosphere="steam")
    par = np.zeros(k.N_PAR)
    star.fill_parameters(spec, meltzone.build_interior(mass_earth=1.0), par)
    grid_ages = 10.0 ** (star.GRID_LOG_AGE0 + star.GRID_LOG_AGE_STEP * np.arange(k.N_LUM))
    kern = np.array([luminosity_at_age(a * 3.15576e7, par) for a in grid_ages])
    assert np.allclose(kern, star.bolometric_luminosity(0.55, grid_ages), rtol=1e-12)
    mids = grid_ages[:-1] * 10 ** (0.5 * star.GRID_LOG_AGE_STEP)
    kern = np.array([luminosity_at_age(a * 3.15576e7, par) for a in mids])
    assert np.max(np.abs(np.log10(kern / star.bolometric_luminosity(0.55, mids)))) < 0.02


def test_xuv_and_escape_against_plain_reference():
    """The kernel's XUV law and energy-limited escape (Watson et al. 1981; Lammer et al. 2003) against
    tests/reference_surface.py at 50 Myr (saturated) and 1 Gyr (decaying), 1e-10."""
    from meltzone._core.radiation import escape_rate
    from meltzone._core.star import xuv_luminosity

    it = meltzone.build_interior(mass_earth=1.0)
    spec = PlanetSpec(mass_msun=1.0, atmosphere="steam", semi_major_axis_au=0.8, escape_efficiency=0.2)
    par = np.zeros(k.N_PAR)
    star.fill_parameters(spec, it, par)
    year = 3.15576e7
    for age in (5e7, 1e9):
        t = age * year - par[k.P_STAR_AGE0]
        l_ref = xuv(lambda a: float(star.bolometric_luminosity(1.0, a)), age)
        assert xuv_luminosity(t, par) == pytest.approx(l_ref, rel=1e-10)
        assert escape_rate(t, 1e20, 0.0, par) == pytest.approx(water_escape_rate(0.2, it.radius, it.mass, l_ref, 0.8),
                                                               rel=1e-10)
        assert escape_rate(t, 1e20, 1.0, par) == 0.0  # under an ocean: the cold trap holds the water


def test_xuv_of_the_present_sun_against_ribas2005():
    """Ribas et al. 2005, ApJ 622:680: the Sun's 1-1200 A flux at 1 AU is 29.7 (age/Gyr)^-1.23 erg/s/cm^2 (the
    coefficient from memory; the exponent checked against the abstract's ratios, 2.5x 2.5 Gyr ago and 6x 3.5 Gyr
    ago, 10%). The defaults (Jackson et al. 2012's saturated 10^-3.1 of L_bol to 0.1 Gyr, exponent 1.23) give 1.48x
    the fit at 4.56 Gyr (measured); tolerance: within a factor 2 at 1 and 4.56 Gyr (the default ratio is the X-ray
    saturation, not fitted to Ribas)."""
    for age_gyr in (1.0, 4.56):
        flux = float(star.xuv_luminosity(1.0, age_gyr * 1e9)) / (4 * math.pi * (1.495978707e11) ** 2) * 1e3
        ribas = 29.7 * age_gyr ** -1.23
        assert 1.0 / 2.0 < flux / ribas < 2.0
    now = float(star.xuv_luminosity(1.0, 4.56e9))
    assert float(star.xuv_luminosity(1.0, 2.06e9)) / now == pytest.approx(2.5, rel=0.1)
    assert float(star.xuv_luminosity(1.0, 1.06e9)) / now == pytest.approx(6.0, rel=0.1)


def _earth(a_au, atmosphere="steam", oceans=1.0, end_gyr=0.05, **extra):
    cfg = {"planet": {"mass_earth": 1.0}, "run": {"end_time_gyr": end_gyr},
           "star": {"mass_msun": 1.0}, "orbit": {"semi_major_axis_au": a_au},
           "surface": {"atmosphere": atmosphere, "water_inventory_kg": oceans * OCEAN,
                       "co2_inventory_kg": 1e20 if atmosphere != "none" else 0.0}}
    for section, values in extra.items():
        cfg.setdefault(section, {}).update(values)
    return meltzone.evolve(cfg)


def test_steam_atmosphere_delays_the_magma_ocean_lebrun2013():
    """Lebrun et al. 2013, JGR Planets 118:1155 (abstract checked): a steam atmosphere delays the end of an Earth magma
    ocean by typically 1 Myr, and water condenses after ~1.5 Myr at 1 AU (after the Moon-forming impact, ~2 Myr:
    "Earth's Earliest Atmosphere", Elements 2:217, 2006, abstract checked, author Zahnle from memory). The end of the
    magma ocean is the summary's magma_ocean_end_yr (the top of the adiabat below the critical melt fraction, or less
    than 1% of the mantle's mass above it). Measured here: 0.32 Myr delay (bare 1.3 kyr, steam 0.32 Myr), an ocean
    after 0.38 Myr (with the former whole-mantle curves and the top criterion: 0.15 Myr and 0.15 Myr); the energy
    released until the end (1.0e31 J) would take 10 Myr at the radiation limit (F_lim - F_abs = 60 W/m^2), but this
    model's near-infrared window (its shape this model's choice) radiates 760-69000 W/m^2 above 1800 K, and the magma
    ocean ends with its surface at 1681 K under 204 bar of water, where the window still radiates 1.25 F_lim: the
    whole delay is spent in the window (1825 K at 0.1 Myr), none on the plateau. The delay thus measures the window's
    shape between ~1700 and ~2000 K, which no source checked here fixes (with the window 200 K later, T_w = 2000 K, it
    was 0.90 Myr and the ocean 1.05 Myr; not adopted). Tolerance: the delay between 0.1 Myr (the order of Lebrun's)
    and the energy bound at the limit (an exact upper bound: no law here radiates less than min(F_lim, sigma T_s^4));
    an ocean within 0.05-5 Myr; energy closure 1e-9."""
    bare = _earth(1.0, "none").summary()
    r = _earth(1.0)
    steam = r.summary()
    h = r.history
    end = steam["magma_ocean_end_yr"] * 3.15576e7
    released = h["stored_energy"][0] - np.interp(end, h.time, h["stored_energy"])
    i_end = np.searchsorted(h.time, end)
    net_at_limit = 282.0 - np.mean(h["absorbed_flux"][:i_end])
    bound_yr = released / (net_at_limit * 4 * math.pi * r.interior.radius ** 2) / 3.15576e7
    delay = steam["magma_ocean_end_yr"] - bare["magma_ocean_end_yr"]
    assert 0.1e6 < delay < bound_yr
    assert 0.05e6 < steam["water_ocean_formed_yr"] < 5e6
    assert steam["energy_closure"] < 1e-9 and steam["solidification_type"] == "I"


def test_hamano2013_critical_distance_is_where_the_faintest_young_sun_meets_the_radiation_limit():
    """Hamano, Abe & Genda 2013, Nature 497:607 (abstract checked): type II planets, inside a critical distance,
    keep their magma ocean until escape has desiccated them; type I planets beyond it solidify within a few Myr
    and keep most of their water. Their criterion (from memory): type II where the absorbed flux exceeds the
    radiation limit F_lim = 282 W/m^2 (Goldblatt et al. 2013), so the surface cannot cool below the window. With
    the shipped Baraffe et al. 2015 solar track the absorbed flux is lowest at 13 Myr (0.443 L_sun): F_abs = F_lim
    at 0.612 AU (albedo 0.3). The type here: half the water lost before the summary's magma_ocean_end_yr.
    Measured: critical distance 0.572-0.575 AU with one ocean (0.544-0.547 AU with five; 0.602-0.606 AU with the
    former whole-mantle curves). Checked at 0.55 AU (II: the water is lost and no ocean condenses) and 0.67 AU
    (I, 10% outside 0.612 AU: an ocean condenses as the magma ocean ends). No ocean ever condenses inside
    0.613-0.618 AU (one or five oceans), against 0.66 AU for an Earth-sized planet in Lebrun et al. 2013 (abstract
    checked: the time to condense would be virtually infinite there). Beyond it, up to F_abs = F_lim at the
    zero-age main sequence (0.758 AU), the ocean condenses but boils off again as the Sun brightens (a runaway
    greenhouse after solidification, measured at 0.67 and 0.75 AU by 0.2 Gyr); at 0.9 AU it stays (common
    practice: Earth). Hamano et al.'s own distance (~0.74-0.8 AU, from memory) is the zero-age main-sequence
    Sun's: see the next two tests."""
    inner = _earth(0.55, end_gyr=0.2).summary()
    outer = _earth(0.67, end_gyr=0.2).summary()
    far = _earth(0.9, end_gyr=0.2).summary()
    assert inner["solidification_type"] == "II" and inner["water_ocean_formed_yr"] is None
    # all of it lost: the ocean and the water the volcanoes outgassed from the mantle later
    assert inner["water_lost_kg"] == pytest.approx(OCEAN + inner["outgassed_h2o_kg"], rel=1e-6)
    assert outer["solidification_type"] == "I" and outer["water_ocean_formed_yr"] is not None
    assert far["solidification_type"] == "I" and far["water_ocean_kg"] > 0.9 * OCEAN


#: the star started after the pre-main-sequence dip and the track's 32 Myr bump: 0.68-0.71 L_sun over 50-250 Myr
ZAMS_START = {"star": {"age_at_start_myr": 50.0}}


def test_hamano2013_distance_with_the_zero_age_main_sequence_sun():
    """Hamano et al. 2013 (Nature 497:607) place Venus (0.72 AU) near the critical distance (abstract checked);
    their distance, ~0.74-0.8 AU for an Earth-mass planet (from memory), is where the absorbed flux of the early
    main-sequence Sun (~0.7 L_sun, from memory) with albedo 0.3 meets the ~280 W/m^2 limit: the shipped Baraffe
    et al. 2015 track gives 0.68-0.71 L_sun at 50-200 Myr, F_abs = F_lim at 0.758-0.773 AU (computed here), inside
    the 0.74-0.8 AU. The default start (3 Myr) instead crosses the pre-main-sequence dip (0.443 L_sun at 13 Myr,
    F_abs = F_lim at 0.612 AU), which is why the distance of the previous test is smaller. With the star started
    at 50 Myr, the planet inside that distance never condenses an ocean and loses its water (desiccated after its magma
    ocean ended: the outcome of Hamano's type II, type I by this model's timing definition, see the strict xfail
    below); outside, an ocean condenses within ~1 Myr and stays (type I). Measured: no ocean inside
    0.759-0.764 AU (one or five oceans); at 0.72 AU the water is all lost by 0.2 Gyr, at 0.80 AU an ocean forms
    at 0.54 Myr and 98% of the water stays."""
    lum = star.bolometric_luminosity(1.0, np.array([5e7, 1e8, 2e8])) / 3.839e26
    a_crit = np.sqrt(0.7 * lum * 3.839e26 / (16 * math.pi * 282.0)) / 1.495978707e11
    assert np.all((0.74 < a_crit) & (a_crit < 0.8))
    inner = _earth(0.72, end_gyr=0.2, **ZAMS_START).summary()
    outer = _earth(0.80, end_gyr=0.2, **ZAMS_START).summary()
    assert inner["water_ocean_formed_yr"] is None
    assert inner["water_lost_kg"] == pytest.approx(OCEAN + inner["outgassed_h2o_kg"], rel=1e-6)
    assert outer["water_ocean_formed_yr"] < 2e6 and outer["water_ocean_kg"] > 0.9 * OCEAN
    assert outer["solidification_type"] == "I"


@pytest.mark.xfail(strict=True, reason="measured: type I at 0.72 AU with the zero-age main-sequence Sun (the type II "
                   "boundary lies at 0.672-0.675 AU, one or five oceans): the magma ocean ends at 0.57 Myr with 3% of "
                   "the water lost, its surface at 1686 K where the steam law's near-infrared window (this model's "
                   "shape) already radiates 1.27 F_lim, above the absorbed 1.11 F_lim; the water is lost afterwards "
                   "from above a solid surface")
def test_hamano2013_type_ii_inside_the_zero_age_main_sequence_distance():
    """Hamano et al. 2013 (abstract checked): inside the critical distance the magma ocean is kept until escape has
    desiccated the planet (type II). With the star started at 50 Myr, 0.72 AU is 5% inside F_abs = F_lim (0.758
    AU, previous test): type II by this model's definition (half the water lost before the magma ocean ends)."""
    assert _earth(0.72, end_gyr=0.2, **ZAMS_START).summary()["solidification_type"] == "II"


def test_grey_law_takes_over_only_when_the_steam_is_thin():
    """The steam law (this model's choice, see meltzone._core.radiation): under a thick water column the radiation
    limit holds whatever the grey law gives (Goldblatt et al. 2013: the limit does not depend on the amount of
    water once the atmosphere is thick); without water the grey law of the remaining CO2 applies. At 1470 K under
    half an ocean (grey tau ~ 1e3, eps sigma T^4 = 1.8 F_lim) the outgoing flux is the steam law's within 1e-9;
    with no water it is the grey law's; in between it lies between the two (plain reference: exp(-tau) weights)."""
    from meltzone._core.radiation import emissivity_of, optical_depth, outgoing, thin_weight

    par = np.zeros(k.N_PAR)
    it = meltzone.build_interior(mass_earth=1.0)
    par[k.P_RADIUS], par[k.P_G_SURF] = it.radius, it.surface_gravity
    for m_h2o in (0.7e21, 1e17, 0.0):
        eps = emissivity_of(m_h2o, 1e20, par)
        w = thin_weight(m_h2o, par)
        assert w == pytest.approx(math.exp(-optical_depth(m_h2o, 0.01, par)), rel=1e-12)
        got = outgoing(1470.0, (1.0, eps, 0.0, 0.0, w))
        grey = eps * 5.670374419e-8 * 1470.0 ** 4
        want = (1 - w) * olr_steam(1470.0) + w * grey
        assert got == pytest.approx(float(want), rel=1e-9)
        if m_h2o > 1e20:
            assert grey > 1.5 * 282.0 and got == pytest.approx(float(olr_steam(1470.0)), rel=1e-9)
        if m_h2o == 0.0:
            assert got == pytest.approx(grey, rel=1e-12)


def test_time_varying_flux_keeps_the_energy_closure_and_the_water_budget():
    """Energy closure with a star whose flux changes (the lid's stored heat keeps the start's T_eq as its surface
    temperature): 1e-9 for a stagnant lid over 1 Gyr; the water budget (vapour + ocean + dissolved + lost) equals
    the inventory plus the volcanically outgassed water at every step (1e-6; common practice: conservation)."""
    r = _earth(0.9, end_gyr=1.0, convection={"regime": "stagnant-lid"})
    assert r.history.energy_closure < 1e-9
    h = r.history
    total = h["atmosphere_h2o"] + h["water_ocean"] + h["water_dissolved"] + h["water_lost"]
    assert np.allclose(total, OCEAN + h["outgassed_h2o"], rtol=1e-6)
    assert h["outgassed_h2o"][-1] > 0.0  # the check includes volcanic water


def test_mixing_length_scheme_uses_the_same_surface():
    """The mixing-length scheme with a star and a steam atmosphere (64 cells, 3 Myr): the absorbed flux is the
    star's (against meltzone.star, 1e-6), energy closes (1e-6), an ocean forms at 1 AU (as in the boundary-layer
    scheme; common practice: the same surface law)."""
    r = _earth(1.0, end_gyr=0.003, convection={"scheme": "mixing-length"}, interior={"mantle_nodes": 64})
    h = r.history
    age = (r.spec.star.age_at_start_myr * 1e6 + h.time[-1] / 3.15576e7)
    want = 0.7 * float(star.bolometric_luminosity(1.0, age)) / (16 * math.pi * (1.495978707e11) ** 2)
    assert h["absorbed_flux"][-1] == pytest.approx(want, rel=2e-2)  # kernel grid vs direct interpolation
    assert h.energy_closure < 1e-6
    assert r.summary()["water_ocean_formed_yr"] is not None


def test_star_and_equilibrium_temperature_together_is_an_error():
    """Bad input names both keys (one line, ConfigError); out-of-range star and orbit keys name the key."""
    with pytest.raises(ConfigError, match="star.mass_msun.*surface.equilibrium_temperature_k"):
        PlanetSpec(mass_msun=1.0, equilibrium_temperature_k=400.0)
    for key, bad in (("mass_msun", 2.0), ("mass_msun", 0.05), ("semi_major_axis_au", 0.0),
                     ("bond_albedo", 1.0), ("escape_efficiency", -0.1), ("age_at_start_myr", 0.5)):
        with pytest.raises(ConfigError, match=key):
            PlanetSpec(**{key: bad})
    assert SCHEMA["surface"]["atmosphere"].choices == ("none", "grey", "steam")


def test_equilibrium_temperature_set_explicitly_at_its_default_with_a_star_is_an_error(tmp_path):
    """surface.equilibrium_temperature_k written at its default value next to a star is still both keys set: a
    ConfigError naming both, from a file, from --set and as a keyword (this project's rule: a key the star replaces
    may not be given); unset, the spec round-trips through its TOML text and replace() (common practice)."""
    default = SCHEMA["surface"]["equilibrium_temperature_k"].default
    both = "star.mass_msun.*surface.equilibrium_temperature_k"
    cfg = tmp_path / "p.toml"
    cfg.write_text(f"[star]\nmass_msun = 0.5\n[surface]\nequilibrium_temperature_k = {default!r}\n")
    with pytest.raises(ConfigError, match=both):
        PlanetSpec.from_toml(cfg)
    cfg.write_text("[star]\nmass_msun = 0.5\n")
    with pytest.raises(ConfigError, match=both):
        PlanetSpec.from_toml(cfg, overrides=[f"surface.equilibrium_temperature_k={default!r}"])
    with pytest.raises(ConfigError, match=both):
        PlanetSpec(mass_msun=0.5, equilibrium_temperature_k=default)
    spec = PlanetSpec.from_toml(cfg)
    with pytest.raises(ConfigError, match=both):
        spec.replace(equilibrium_temperature_k=default)
    assert spec.replace(semi_major_axis_au=0.7).orbit.semi_major_axis_au == 0.7
    text = spec.to_toml()
    assert "\n# equilibrium_temperature_k" in text
    (tmp_path / "back.toml").write_text(text)
    assert PlanetSpec.from_toml(tmp_path / "back.toml") == spec
    assert f"equilibrium_temperature_k = {default!r}" in PlanetSpec().to_toml()  # without a star: a plain key


def test_cli_bad_star_input_exits_2(tmp_path):
    """The CLI prints one line naming both keys and exits 2 (common practice of this project)."""
    from click.testing import CliRunner

    from meltzone.cli import main

    cfg = tmp_path / "p.toml"
    cfg.write_text("[star]\nmass_msun = 1.0\n[surface]\nequilibrium_temperature_k = 500.0\n")
    res = CliRunner().invoke(main, ["run", str(cfg)])
    assert res.exit_code == 2
    assert "star.mass_msun" in res.output and "equilibrium_temperature_k" in res.output
    assert "Traceback" not in res.output


def test_melt_under_a_solid_surface_takes_no_water_from_the_atmosphere():
    """The atmosphere's gases dissolve in the melt only while the magma ocean reaches the surface (solubility
    laws hold at a melt's free surface; Lebrun et al. 2013, JGR Planets 118:1155 and Hamano et al. 2013, Nature
    497:607 end the exchange with the magma ocean; from memory). A 3 M_E stagnant-lid planet under a grey
    atmosphere of 1e21 kg of water (no star, so no escape): once the top is below the rheological transition
    (surface_magma_ocean_end_yr), no water is
    dissolved and the atmosphere holds the inventory plus what volcanism outgassed (1e-9: the water budget
    closes); during the magma ocean the melt holds some. Before this rule the warming mantle's melt under a
    ~200 km lid drew ~5e20 kg of water out of the atmosphere."""
    r = meltzone.evolve({"planet": {"mass_earth": 3.0, "core_mass_fraction": 0.3},
                         "convection": {"regime": "stagnant-lid"},
                         "surface": {"atmosphere": "grey", "water_inventory_kg": 1e21, "co2_inventory_kg": 1e20,
                                     "equilibrium_temperature_k": 300.0},
                         "run": {"end_time_gyr": 1.5}})
    h = r.history
    s = r.summary()
    during = h.time < 0.5 * s["magma_ocean_end_yr"] * 3.15576e7
    after = h.time > s["surface_magma_ocean_end_yr"] * 3.15576e7  # the top below phi_c (here at ~0.7 Gyr)
    assert after.sum() > 10 and np.all(h["water_dissolved"][during][1:] > 1e18)
    assert np.all(h["water_dissolved"][after] == 0.0)
    expected = 1e21 + h["outgassed_h2o"][after]
    assert np.allclose(h["atmosphere_h2o"][after], expected, rtol=1e-9, atol=0.0)


def test_mixing_length_cells_in_contact_with_the_atmosphere():
    """The mixing-length scheme's counterpart of the rule above (meltzone._core.implicit._surface_state), on
    hand-made cells: the gases dissolve in the cells molten from the top cell down without a gap, times the
    boundary-layer scheme's weight smoothstep((phi_top - phi_c) / width) of the top cell's melt fraction; melt
    below a gap (a basal ocean) or under a solid top cell takes none. The resolved column can hold a gap that
    the boundary-layer scheme's single adiabat cannot, hence the connectivity rule here (this model's choice).
    Checked: the melt mass handed to the solubility partition equals the hand sum (1e-12)."""
    from meltzone._core.implicit import _surface_state

    n = 8
    grid = np.zeros((k.N_G, n))
    grid[k.G_W] = np.arange(1.0, n + 1.0) * 1e22  # cell masses [kg], CMB -> surface
    par = np.zeros(k.N_PAR)
    it = meltzone.build_interior(mass_earth=1.0)
    par[k.P_RADIUS], par[k.P_G_SURF] = it.radius, it.surface_gravity
    par[k.P_ATMOSPHERE], par[k.P_H2O_TOTAL], par[k.P_CO2_TOTAL] = 1.0, 1e21, 1e20
    par[k.P_PHI_C], par[k.P_BLEND], par[k.P_T_EQ] = 0.4, 0.05, 255.0

    def melt_mass(phi):
        return _surface_state(0.0, np.asarray(phi, dtype=float), grid, 0.0, par)[1][4]

    w = grid[k.G_W]
    molten_top = [0.5, 0.5, 0.0, 0.0, 0.1, 0.3, 0.6, 0.7]  # a basal ocean, a gap, a magma ocean at the top
    assert melt_mass(molten_top) == pytest.approx(0.1 * w[4] + 0.3 * w[5] + 0.6 * w[6] + 0.7 * w[7], rel=1e-12)
    solid_top = [0.5, 0.5, 0.0, 0.0, 0.1, 0.3, 0.6, 0.0]
    assert melt_mass(solid_top) == 0.0
    x = (0.42 - 0.4) / 0.05
    mush_top = [0.5, 0.5, 0.0, 0.0, 0.1, 0.3, 0.6, 0.42]
    expected = x * x * (3.0 - 2.0 * x) * (0.1 * w[4] + 0.3 * w[5] + 0.6 * w[6] + 0.42 * w[7])
    assert melt_mass(mush_top) == pytest.approx(expected, rel=1e-12)


def test_dry_escape_keeps_pace_with_outgassing():
    """A desiccated planet (water left w = inventory + outgassed - lost <= 0) whose volcanoes outgas water: the
    escape takes it as fast as it comes (the sliding solution of the escape's jump at w = 0; Filippov 1988,
    from memory), so the water left stays put (dw/dt = 0 at w = 0), never faster than energy-limited escape
    (Watson et al. 1981, tests/reference_surface.py), and makes up an overshoot w < 0 at -w / DRY_RELAX_TIME;
    with water left the rate of the atmosphere applies (-1 returned)."""
    from meltzone._core.radiation import escape_rate
    from meltzone._core.volcanism import DRY_RELAX_TIME, dry_escape

    it = meltzone.build_interior(mass_earth=1.0)
    spec = PlanetSpec(mass_msun=1.0, atmosphere="steam", semi_major_axis_au=0.8, escape_efficiency=0.2)
    par = np.zeros(k.N_PAR)
    star.fill_parameters(spec, it, par)
    par[k.P_H2O_TOTAL] = 1e21
    t = 1e9 * 3.15576e7 - par[k.P_STAR_AGE0]
    limit = escape_rate(t, 1e20, 0.0, par)
    l_ref = xuv(lambda a: float(star.bolometric_luminosity(1.0, a)), 1e9)
    assert limit == pytest.approx(water_escape_rate(0.2, it.radius, it.mass, l_ref, 0.8), rel=1e-10)
    y = np.zeros(k.N_Y)
    y[k.Y_OG_H2O] = 5e19
    y[k.Y_WATER] = 1.05e21  # all of it lost: w = 0
    supply = 0.5 * limit
    assert dry_escape(t, y, par, supply) == pytest.approx(supply, rel=1e-12)  # w stays 0
    assert dry_escape(t, y, par, 3.0 * limit) == pytest.approx(limit, rel=1e-12)  # beyond the limit: w grows
    y[k.Y_WATER] = 1.05e21 + 1e15  # an overshoot of 1e15 kg is made up
    assert dry_escape(t, y, par, supply) == pytest.approx(supply - 1e15 / DRY_RELAX_TIME, rel=1e-12)
    y[k.Y_WATER] = 1.05e21 + 1e30
    assert dry_escape(t, y, par, supply) == 0.0  # never negative
    y[k.Y_WATER] = 1.05e21 - 1e15  # water left: the atmosphere's rate
    assert dry_escape(t, y, par, supply) == -1.0
