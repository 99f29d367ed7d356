"""Volcanism of the boundary-layer scheme: the extraction law against its plain reference, Earth's ridges today,
a Mars-like stagnant-lid planet, the energy budget with the heat of the extracted melt, outgassing into a grey
atmosphere, the crust's caps, the off switch and the outputs."""

from __future__ import annotations

import numpy as np
import pytest

from meltzone import melting
from meltzone.config import PlanetSpec
from meltzone.constants import YEAR
from meltzone.evolution import boundary_layer
from meltzone.interior import build_interior
from meltzone.layers import ENERGY_CLOSURE_TOLERANCE
from meltzone.pipeline import evolve

from reference_volcanism import extraction

#: m^3/s -> km^3/yr
KM3_YR = YEAR / 1e9
#: The weak mobile-lid scaling calibrated for Earth (tests/test_evolution.py).
WEAK = {"beta": 0.015, "nusselt_prefactor": 40.0}
#: Earth's mantle potential temperature today, 1350 C (Herzberg, Condie & Korenaga 2010, EPSL 292:79; checked).
EARTH_TP_K = 1623.15
#: Present-day Earth: 1 M_E, core mass fraction 0.325 (common practice), mobile lid with the weak scaling, peridotite.
EARTH = {"mass_earth": 1.0, "core_mass_fraction": 0.325, "regime": "mobile-lid", "model": "peridotite-mantle", **WEAK}
#: A Mars-like planet: 0.107 M_E, core mass fraction 0.24 (common practice for Mars), stagnant lid, 4.5 Gyr.
MARS = {"mass_earth": 0.107, "core_mass_fraction": 0.24, "regime": "stagnant-lid", "end_time_gyr": 4.5}


def kernel_state(spec, tu, lid=0.0, crust=0.0, extracted=(0.0, 0.0), outgassed=(0.0, 0.0), share=0.0):
    """(diag, interior) of the kernel at T_u (solid mantle after the rheological switch, T_c 500 K above the
    adiabat at the CMB), lid, crust, extracted and outgassed H2O and CO2 [kg] and the crust's share of the heat
    sources (bare surface: the outgassed gases are the surface's)."""
    from meltzone._core import layout as k
    from meltzone._core.physics import diagnose
    from meltzone._core.volcanism import volcanism

    it = build_interior(spec)
    curves = melting.node_curves(melting.get_model(spec.melting.model), it.P[it.mantle],
                                 spec.melting.melt_fraction_law)
    inp = boundary_layer.build_inputs(spec, it, curves)
    diag = np.zeros(k.N_D)
    y = np.zeros(k.N_Y)
    y[k.Y_LID], y[k.Y_CRUST], y[k.Y_XH2O], y[k.Y_XCO2] = lid, crust, *extracted
    y[k.Y_OG_H2O], y[k.Y_OG_CO2], y[k.Y_HPE] = *outgassed, share
    tc = tu * inp.grid[k.G_F, 0] + 500.0
    diagnose(4.5e9 * YEAR, tu, tc, lid, 0.0, 0.0, inp.grid, inp.core, inp.iso, inp.par, inp.law, diag, 0.0, 0.0)
    volcanism(tu, y, diag, inp.grid, inp.par, inp.law)
    return diag, it


@pytest.mark.parametrize("case", [
    dict(planet=MARS, model="peridotite-mantle", tu=1650.0, lid=80e3, crust=30e3, extracted=(1e18, 5e17),
         outgassed=(1.5e17, 8e16), share=0.3),
    dict(planet=MARS, model="peridotite-mantle", tu=1700.0, lid=50e3, crust=60e3, extracted=(0.0, 0.0),
         outgassed=(0.0, 0.0), share=0.5),
    dict(planet={**MARS, "vent_solubility": "off", "melt_depletion": "off", "crust_heat_sources": "off"},
         model="peridotite-mantle", tu=1650.0, lid=60e3, crust=20e3, extracted=(1e18, 5e17),
         outgassed=(1.5e17, 8e16), share=0.2),
    dict(planet={"mass_earth": 3.0, "regime": "stagnant-lid"}, model="peridotite-mantle", tu=1850.0, lid=60e3,
         crust=10e3, extracted=(3e19, 1e19), outgassed=(4e20, 1e19), share=0.1),
    dict(planet={"mass_earth": 3.0, "regime": "stagnant-lid", "max_extraction_pressure_gpa": 3.0},
         model="peridotite-mantle", tu=1850.0, lid=40e3, crust=5e3, extracted=(0.0, 0.0),
         outgassed=(0.0, 0.0), share=0.0),
    dict(planet={"mass_earth": 1.0, **WEAK}, model="peridotite-mantle", tu=1650.0, lid=0.0, crust=5e3,
         extracted=(2e20, 1e20), outgassed=(3e19, 1.5e19), share=0.05),
    dict(planet={"mass_earth": 1.0, "melt_fraction_law": "katz2003", **WEAK}, model="peridotite-mantle",
         tu=1700.0, lid=0.0, crust=0.0, extracted=(0.0, 0.0), outgassed=(0.0, 0.0), share=0.0),
])
def test_extraction_law_matches_plain_reference(case):
    """The kernel's extraction (production, heat, crust rate, volatiles extracted and outgassed, velocity, the
    crust's heat sources) against the plain reference written from the equations
    (tests/reference_volcanism.py): stagnant and mobile lid, linear and Katz melt laws, depleted and fresh
    mantles, vent solubility, depletion and crustal heat on and off, a shallow density crossover (3 GPa).
    Tolerance 1e-9 relative (same sums in another order; the isentropic melt fraction to 1e-13). The
    stagnant-lid states melt below their lid with the upper boundary layer's viscosity taken at its base
    (measured delta_u: Mars-like 49 km at 1650 K, 278 km and no melt at 1600 K; 3 M_E 2.5 km at 1850 K, none up
    to 1800 K under its 60 km lid)."""
    from meltzone._core import layout as k

    spec = PlanetSpec(**case["planet"], model=case["model"])
    diag, it = kernel_state(spec, case["tu"], case["lid"], case["crust"], case["extracted"], case["outgassed"],
                            case["share"])
    ref = extraction(spec, it, case["tu"], diag[k.D_DELTA_U], diag[k.D_TS], diag[k.D_TL], case["lid"],
                     case["crust"], *case["extracted"], *case["outgassed"], case["share"], diag[k.D_H],
                     lid_rate=diag[k.D_DLID])
    assert ref["production"] > 0.0
    got = {"production": diag[k.D_MPROD], "heat": diag[k.D_QVOLC], "crust_rate": diag[k.D_DCRUST],
           "h2o": diag[k.D_XH2O], "co2": diag[k.D_XCO2], "velocity": diag[k.D_UCONV],
           "h2o_outgassing": diag[k.D_OG_H2O], "co2_outgassing": diag[k.D_OG_CO2], "share_rate": diag[k.D_DHPE],
           "crust_heat": diag[k.D_QCRUST], "crust_heat_flux": diag[k.D_QS_CRUST],
           "crust_lid_rate": diag[k.D_DLID_CRUST]}
    for name, value in ref.items():
        assert got[name] == pytest.approx(value, rel=1e-9, abs=1e-30), name


def test_crust_follows_a_thinning_lid():
    """A Mars-like crust at its cap, the lid (50 km, above the eclogite depth), under a lid that thins (T_u =
    1700 K): the lid's base overtakes the crust, which thins at the lid's rate (with the crust's heat) while the
    melt it extracts recycles at the cap (this model's rule; 1e-12 relative: the same sum)."""
    from meltzone._core import layout as k

    diag, _ = kernel_state(PlanetSpec(**MARS), 1700.0, 50e3, 50e3, share=0.5)
    rate = diag[k.D_DLID] + diag[k.D_DLID_CRUST]
    assert rate < 0.0 and diag[k.D_MPROD] > 0.0
    assert diag[k.D_DCRUST] == pytest.approx(rate, rel=1e-12)


def test_only_melt_above_the_density_crossover_rises():
    """A 3 M_E stagnant-lid mantle at T_u = 1850 K under a 40 km lid melts from the lid base to below 3 GPa:
    with the density crossover at 3 GPa the deeper melt stays (Stixrude et al. 2009; Kite et al. 2009: melt
    deeper than the crossover is denser than its residue, from memory), so production falls (by > 10%) but
    stays positive; at 12 GPa the whole melt zone counts."""
    from meltzone._core import layout as k

    planet = dict(mass_earth=3.0, regime="stagnant-lid", model="peridotite-mantle")
    deep = kernel_state(PlanetSpec(**planet), 1850.0, 40e3, 5e3)[0][k.D_MPROD]
    shallow = kernel_state(PlanetSpec(**planet, max_extraction_pressure_gpa=3.0), 1850.0, 40e3, 5e3)[0][k.D_MPROD]
    assert 0.0 < shallow < 0.9 * deep



def _earth_today():
    """(spec, diag, interior, volume rate [m^3/s]) of present-day Earth (1 M_E, core fraction 0.325, mobile lid with
    the weak scaling calibrated for Earth, peridotite melting model) at its potential temperature 1350 C (Herzberg
    et al. 2010, checked)."""
    from meltzone._core import layout as k

    spec = PlanetSpec(**EARTH)
    diag, it = kernel_state(spec, EARTH_TP_K)
    return spec, diag, it, diag[k.D_MPROD] / spec.volcanism.crust_density_kg_m3


def test_earth_ridge_melt_column_today():
    """Present-day Earth (see _earth_today): the melt column under its ridges (production / (2 u L_ridge)) within
    6-8 km, the oceanic crust's thickness (~7 km, White, McKenzie & O'Nions 1992, JGR 97:19683; from memory);
    measured 7.45 km (it depends on the melting curves and the adiabat only, not on the plate speed)."""
    from meltzone._core import layout as k

    spec, diag, it, volume_rate = _earth_today()
    column = volume_rate / (2.0 * diag[k.D_UCONV] * spec.volcanism.ridge_length_factor * 2 * np.pi * it.radius)
    assert 6.0e3 <= column <= 8.0e3


def test_earth_ridge_melt_production_today():
    """Present-day Earth (see _earth_today): melt made under ridges within ~75% of Crisp 1984's 26-34 km^3/yr of
    global magma production (ocean ridges ~75% of it; J. Volcanol. Geotherm. Res. 20:177, abstract checked), i.e.
    19.5-25.5 km^3/yr. Measured 25.0 km^3/yr: the plates cover the surface, so new seafloor is made at
    4 pi R^2 / tau = 3.36 km^2/yr (tau = 4 delta^2 / (pi kappa) = 152 Myr with the upper boundary layer 61 km
    thick; Earth ~3.4 km^2/yr, Rowley 2002 as summarised in Science 297:1239, checked), plate half-speed
    2.8 cm/yr; 17.1 km^3/yr while the plates were the mantle's depth long (they covered 0.68 of the surface)."""
    volume_rate = _earth_today()[3]
    assert 0.75 * 26.0 <= volume_rate * KM3_YR <= 0.75 * 34.0


def test_ridge_melt_covers_the_surface():
    """Area balance (common practice): the plates on both sides of the ridges cover the surface, so new seafloor
    is made at 2 u L_ridge = 4 pi R^2 / tau with tau = 4 delta^2 / (pi kappa), the age at which half-space
    cooling's mean flux equals k dT / delta (Turcotte & Schubert, Geodynamics, checked), whatever the ridge
    length: present Earth's melt production is the same with ridges 1 and 2 circumferences long (1e-12), its
    plates move half as fast with the longer ridges, and 2 u L_ridge equals 4 pi R^2 / tau (1e-12)."""
    from meltzone._core import layout as k

    spec, diag, it, _ = _earth_today()
    rates = {}
    for factor in (1.0, 2.0):
        d, _ = kernel_state(PlanetSpec(**EARTH, ridge_length_factor=factor), EARTH_TP_K)
        rates[factor] = (d[k.D_MPROD], d[k.D_UCONV], d[k.D_DELTA_U])
    assert rates[2.0][0] == pytest.approx(rates[1.0][0], rel=1e-12)
    assert rates[2.0][1] == pytest.approx(0.5 * rates[1.0][1], rel=1e-12)
    u, delta = rates[1.0][1], rates[1.0][2]
    tau = 4.0 * delta ** 2 / (np.pi * spec.convection.thermal_diffusivity)
    assert 2.0 * u * 2.0 * np.pi * it.radius == pytest.approx(4.0 * np.pi * it.radius ** 2 / tau, rel=1e-12)


@pytest.fixture(scope="module")
def earth():
    """Earth (as above) evolved to 4.5 Gyr."""
    return evolve(PlanetSpec(mass_earth=1.0, core_mass_fraction=0.325, regime="mobile-lid",
                             model="peridotite-mantle", end_time_gyr=4.5, **WEAK))


def test_earth_evolution_melts_under_ridges_today(earth):
    """The evolved Earth still melts under its ridges at 4.5 Gyr, at a rate no larger than Crisp 1984's global
    26-34 km^3/yr (its mantle is colder than 1350 C with this melting model, so the rate is lower than
    today's); its energy budget closes to ENERGY_CLOSURE_TOLERANCE with the heat of the extracted melt."""
    s = earth.summary()
    assert s["volcanism_at_end"] and s["volcanism_end_yr"] is None
    assert 0.0 < s["final_melt_production_km3_yr"] <= 34.0
    assert s["energy_closure"] <= ENERGY_CLOSURE_TOLERANCE
    assert s["crust_thickness_m"] > 0.0


@pytest.fixture(scope="module")
def mars():
    """The Mars-like planet with the chondritic whole-mantle curves, and with the peridotite model (the default)."""
    return evolve(PlanetSpec(**MARS, model="whole-mantle-sg")), evolve(PlanetSpec(**MARS, model="peridotite-mantle"))


@pytest.mark.xfail(strict=True, reason="known limitation: measured 114 km with the default peridotite curves "
                   "(volcanism ends at 1.06 Gyr) and 82 km with the chondritic whole-mantle curves (ends at 0.61 "
                   "Gyr). The first crust, 35 km at 10 Myr under a mantle at 1640 K, is Morschhauser et al. 2011's "
                   "admissible start (~1650 K, ~30 km primordial crust; abstract checked); the rest is one burst "
                   "when the lid, grown to ~420 km while the mantle warmed to 1870 K without melting below it, thins "
                   "at 0.8-1.1 Gyr (their second stage is extended and wanes ~3.5 Ga). Cause, measured: the thermal "
                   "state, not the crust law. From 30 to 850 Myr the convective flux at the lid's base is 4-11 "
                   "mW/m^2 against 79-52 mW/m^2 of radiogenic heat, so the mantle stores heat (1648 -> 1906 K) under "
                   "a lid too thick to melt below; when melt appears under it, melt weakening of the upper boundary "
                   "layer's base (exp(-26 phi)) thins that layer from 82 to 10 km, the lid thins from 430 to 112 km "
                   "in 150 Myr and the heat pipe (256 mW/m^2 at 0.9 Gyr) drains the stored heat as crust. The first "
                   "35 km melt from 40-190 km deep (0.5-2.3 GPa, mean phi 0.11-0.15), as Martian source regions do "
                   "(80-150 km, 5-15% melting; Grott et al. 2013, Space Sci. Rev. 174:49, abstract checked); the "
                   "burst from 357-451 km, then 188-316 km (mean phi 0.13-0.15). The crust law's own terms hardly "
                   "matter: extraction depth 7 or 4 GPa 114.4 and 114.6 km, erupted fraction 1/11 112.6 km, the Katz "
                   "2003 melt law 106 km. Published parameterisations take Ra from the mantle's viscosity without "
                   "melt weakening (from memory); that here (melt held in the layer capped at 0) gives no primordial "
                   "crust and a steady second stage under a mantle at 1970 K that reaches the eclogite cap, 136 km "
                   "(134 km with a 100x softer mantle; 48 km with the chondritic curves and the softer mantle); the "
                   "convective velocity alone taken without weakening 29 km, with a lid collapse to 30 km at 0.7 "
                   "Gyr. Other variants: 10x and 100x lower viscosity prefactor (their iron-rich, wet mantle is "
                   "softer) 93 and 75 km; a cool start at 1650 K 123 km; crust heat sources off 136 km; the "
                   "heat-balance-integral lid law 108 km. Missing: a water-dependent viscosity with dehydration "
                   "stiffening (Morschhauser et al. 2011; Fraeman & Korenaga 2010, Icarus 210:43; abstracts checked) "
                   "and a crust of lower conductivity (Morschhauser et al. 2011, abstract checked). With the weakening capped at "
                   "the retained melt fraction where melt is extracted (volcanism.retained_melt_fraction 0.01, McKenzie "
                   "1984; Faul 2001): no primordial crust (17 m), one waning stage 0.58-3.66 Gyr (0.43-2.44 Gyr with "
                   "the chondritic curves; heat pipe <= 21 mW/m^2 against 2.6 W/m^2 in the burst) that reaches the eclogite cap, 136 km with either curves "
                   "(0.002 and 0.02 retained: the same); not tuned")
def test_mars_crust_thickness(mars):
    """Mars-like stagnant-lid planet at 4.5 Gyr: mean crustal thickness 50 +- 12 km (Wieczorek & Zuber 2004,
    JGR 109:E01009; checked in a review page), with either melting model."""
    for r in mars:
        assert 38e3 <= r.summary()["crust_thickness_m"] <= 62e3


def test_mars_crust_within_its_caps(mars):
    """The Mars-like crust never exceeds its caps, the lid and the eclogite depth 1.5 GPa / (rho_cr g) (this
    model's rule after Morschhauser et al. 2011 and O'Rourke & Korenaga 2012; 0.1% for the smooth cut-off),
    and reaches at least 20 km (the order of Mars's crust, Wieczorek & Zuber 2004)."""
    for r in mars:
        h = r.history
        cap = 1.5e9 / (2900.0 * r.interior.surface_gravity)
        lid = h["regime"] == 2  # the history's lid thickness is 0 outside the stagnant-lid regime
        assert np.all(h["crust_thickness"][lid] <= np.minimum(np.maximum(h["lid_thickness"][lid], 1e3), cap)
                      * (1 + 1e-3))
        assert h["crust_thickness"][-1] >= 20e3


def test_crust_holds_heat_sources(mars):
    """The crust's share of the heat-producing elements stays within [0, 1] (to 1e-6) and its heat is that
    share (clipped to [0, 1] as the kernel does) of the radiogenic power (1e-12) in every regime (in a magma
    ocean too: the crust's heat leaves at the surface while the thinning lid returns the crust, and its share,
    to the mantle)."""
    for r in mars:
        h = r.history
        share = h["crust_heat_share"]
        assert np.all((share >= -1e-6) & (share <= 1.0))  # a Dormand-Prince step may undershoot by its error
        np.testing.assert_allclose(h["crust_heat_production"], np.clip(share, 0.0, 1.0) * h["radiogenic_power"],
                                   rtol=1e-12)


@pytest.mark.xfail(strict=True, reason="measured: the 114 km crust holds 47.6% of the heat sources at 4.5 Gyr "
                   "(the first 35 km held 17%). It does not follow from the thickness alone: by batch melting "
                   "(D = 0.002) a crust of F = M_crust / M_mantle made from melt fractions phi holds about "
                   "1 - exp(-F / phi), so these crusts imply phi ~ 0.15-0.16 (F = 0.094 and 0.029); a 50 km crust "
                   "(F = 0.042) reaches 50% only with phi <= 0.06, and with phi ~ 0.15 would hold ~24% (Martian "
                   "basalts record 5-15% melting, Grott et al. 2013, Space Sci. Rev. 174:49, abstract checked). "
                   "The melt fractions are those of a mantle at 1700-1900 K (see test_mars_crust_thickness): "
                   "phi_max 0.24-0.28 in the burst at 0.9-1.0 Gyr; measured variants: depletion off 49.8% (136 km), "
                   "the Katz 2003 melt law 41.4% (106 km); with volcanism.retained_melt_fraction 0.01 50.5% (136 km, at "
                   "its eclogite cap; 49.5% with 0.002, 51.9% with 0.02); not tuned")
def test_mars_crust_holds_half_the_heat_sources(mars):
    """The Mars-like crust of the peridotite model (> 30 km) holds at least half of the heat-producing elements
    (McLennan 2001, GRL 28:4019, abstract checked: a Martian crust >= 30 km likely holds at least 50%)."""
    h = mars[1].history
    assert h["crust_thickness"][-1] > 30e3 and h["crust_heat_share"][-1] >= 0.5


def test_vent_solubility_keeps_water_in_the_lava():
    """Under the gases it has outgassed, erupted melt keeps the H2O its solubility allows (6.8e-8 P^0.7; Lebrun
    et al. 2013, from memory): a 1 M_E stagnant-lid planet (peridotite model, 4.5 Gyr) outgasses < 50% of the
    H2O it does without the limit, while its CO2, far less soluble, is outgassed to > 95% of the unlimited
    amount (Tosi et al. 2017, A&A 605:A71, abstract checked: solubility caps H2O at tens of bar while most CO2
    is outgassed); the H2O left at the surface weighs less than 100 bar."""
    kw = dict(mass_earth=1.0, regime="stagnant-lid", model="peridotite-mantle", end_time_gyr=4.5)
    on = evolve(PlanetSpec(**kw))
    off = evolve(PlanetSpec(**kw, vent_solubility="off")).summary()
    s = on.summary()
    assert s["outgassed_h2o_kg"] < 0.5 * off["outgassed_h2o_kg"]
    assert s["outgassed_co2_kg"] > 0.95 * off["outgassed_co2_kg"]
    it = on.interior
    assert s["outgassed_h2o_kg"] * it.surface_gravity / (4 * np.pi * it.radius ** 2) < 100e5


def test_heat_pipe_keeps_the_energy_budget(mars):
    """With melt extraction and the crust's heat sources the budget still closes to ENERGY_CLOSURE_TOLERANCE
    (heat of the extracted melt and the crust's heat taken from the mantle and added to the heat out; common
    practice: the integrated linear invariant), and the erupted and intruded melt's heat is a sizeable part
    of the planet's loss while volcanism lasts (Moore & Webb 2013, Nature 501:501: volcanic heat transport
    matters early): its time integral over the solid (stagnant-lid) mantle's volcanic period is > 10% of the
    conducted one, with either melting model."""
    for r in mars:
        h = r.history
        assert h.energy_closure <= ENERGY_CLOSURE_TOLERANCE
        w = (h.time <= r.summary()["volcanism_end_yr"] * YEAR) & (h["regime"] == 2)
        assert np.trapezoid(h["volcanic_heat_flow"][w], h.time[w]) > 0.1 * np.trapezoid(h["surface_heat_flow"][w],
                                                                                       h.time[w])


def test_outgassing_within_the_mantle_inventory(mars):
    """Outgassed H2O and CO2 are positive, at most the erupted share of the initial mantle inventory (mass
    balance), at most the erupted share of what the melt extracted (the rest stays dissolved at the vent or in
    the intrusions), never decrease (to 1e-6 of the total: Dormand-Prince weights include a negative one, so
    a step may undershoot by its error), and the rates integrate to the totals (trapezoid over the recorded
    steps, 2% relative)."""
    for r in mars:
        h = r.history
        v = r.spec.volcanism
        for gas, ppm in (("h2o", v.mantle_h2o_ppm), ("co2", v.mantle_co2_ppm)):
            total = h[f"outgassed_{gas}"][-1]
            assert 0.0 < total <= v.erupted_fraction * ppm * 1e-6 * r.interior.mantle_mass * (1 + 1e-9)
            assert np.all(np.diff(h[f"outgassed_{gas}"]) >= -1e-6 * total)
            assert np.trapezoid(h[f"outgassing_{gas}_rate"], h.time) == pytest.approx(total, rel=2e-2)


def _partitioned_atmosphere(r, total):
    """M_atm solving M_atm + X(P) M_melt = total at the end of run ``r`` (see the test below), brentq 1e-6 kg."""
    from scipy.optimize import brentq

    h, it = r.history, r.interior
    g = h.grid
    phi = melting.melt_fraction(h["upper_temperature"][-1] * it.adiabat[it.mantle], g.solidus, g.liquidus,
                                np.zeros(g.n), np.zeros(g.n), melting.LAW_LINEAR)
    # the melt holds gases only while the top is above the rheological transition: smoothstep((phi_top - phi_c)
    # / width) (meltzone._core.physics.contact_weight; defaults phi_c 0.4, width 0.05)
    x = min(max((h["top_melt_fraction"][-1] - 0.4) / 0.05, 0.0), 1.0)
    m_melt = x * x * (3.0 - 2.0 * x) * float(np.sum(g.mass * phi))
    area = 4.0 * np.pi * it.radius ** 2
    return brentq(lambda m: m + 6.8e-8 * (m * it.surface_gravity / area) ** 0.7 * m_melt - total, 0.0, total,
                  xtol=1e-6)


def test_outgassed_volatiles_enter_the_grey_atmosphere():
    """With a grey atmosphere the outgassed volatiles join the surface inventory before the solubility partition:
    at the end, M_atm + X(P) M_melt = inventory + outgassed with X_H2O = 6.8e-8 P^0.7, P = M_atm g / (4 pi R^2)
    and M_melt the adiabat's melt while the top is a magma ocean, none under a solid top (the partition the
    scheme uses, as in Lebrun et al. 2013; from memory), solved
    here with brentq (1e-6 relative); a run without volcanism keeps just the inventory in that balance (checked
    the same way: the two runs' thermal histories differ, so their atmospheres are not compared with each other;
    measured: this Mars-like mantle warms under its lid and remelts at its top more than once, the run with
    volcanism ending in a re-formed magma ocean at 1876 K, the one without in a stagnant lid at 1687 K)."""
    kw = dict(**MARS, atmosphere="grey", water_inventory_kg=1e19, co2_inventory_kg=1e18)
    r = evolve(PlanetSpec(**kw))
    h = r.history
    assert h["outgassed_h2o"][-1] > 0.0
    assert h["atmosphere_h2o"][-1] == pytest.approx(_partitioned_atmosphere(r, 1e19 + h["outgassed_h2o"][-1]),
                                                    rel=1e-6)
    off = evolve(PlanetSpec(**kw, **{"volcanism.enabled": "off"}))
    assert "outgassed_h2o" not in off.history
    assert off.history["atmosphere_h2o"][-1] == pytest.approx(_partitioned_atmosphere(off, 1e19), rel=1e-6)


def test_eclogite_caps_the_crust():
    """A low basalt-eclogite pressure (0.3 GPa) caps the crust at its depth, P / (rho_cr g) (O'Rourke & Korenaga
    2012 discuss the transition; the cap is this model's rule), within 0.1%."""
    r = evolve(PlanetSpec(**{**MARS, "end_time_gyr": 1.0}, model="peridotite-mantle", eclogite_pressure_gpa=0.3))
    cap = 0.3e9 / (2900.0 * r.interior.surface_gravity)
    crust = r.history["crust_thickness"]
    assert crust.max() <= cap * (1 + 1e-3)
    assert crust[-1] >= 0.9 * cap


def test_volcanism_off_gives_nulls():
    """volcanism.enabled = "off": no volcanism series, and null outcomes (nothing modelled)."""
    r = evolve(PlanetSpec(**{**MARS, "end_time_gyr": 0.5}, model="peridotite-mantle", **{"volcanism.enabled": "off"}))
    assert "melt_production" not in r.history
    s = r.summary()
    assert all(s[key] is None for key in ("volcanism_end_yr", "crust_thickness_m", "outgassed_h2o_kg",
                                          "outgassed_co2_kg"))


def test_volcanism_outputs_in_file_and_report(mars, tmp_path):
    """The run file keeps the volcanism series (read back identical) and the report names the outcome; the
    history figure has its volcanism panels."""
    from meltzone import plot, report, results

    r = mars[1]
    path = results.write(r, tmp_path / "mars.h5")
    back = results.load(path)
    for name in ("melt_production", "crust_thickness", "outgassed_h2o", "outgassing_co2_rate"):
        np.testing.assert_array_equal(back.history[name], r.history[name])
    assert back.summary()["crust_thickness_m"] == r.summary()["crust_thickness_m"]
    s = r.summary()
    assert s["volcanism_end_yr"] is not None and not s["volcanism_at_end"]
    assert "volcanism         ended after" in report.run_text(r)
    labels = [ax.get_ylabel() for ax in plot.build_history(r).axes]
    assert "melt production [km^3/yr]" in labels and "outgassing [kg/yr]" in labels
