"""The core's starting temperature (initial.core_start, meltzone.evolution.core_start) against hand calculations.

Rules (module docstring of meltzone.evolution.core_start): "rheological-transition", T_c = min(T_ad, T_phi_c) +
dT with T_phi_c where the CMB node holds phi_c (bottom-up crystallisation, Monteux, Andrault & Samuel 2016, EPSL
448:140; start after magma-ocean solidification, Noack & Lasbleis 2020, A&A 638:A129; abstracts checked; phi_c as
the stiffened base this model's choice); "adiabat", T_c = T_ad + dT (Tosi et al. 2017, A&A 605:A71, Table 1,
checked: initial core-mantle temperature drop 200 K).
"""

from __future__ import annotations

import numpy as np
import pytest

from meltzone.config import PlanetSpec
from meltzone.pipeline import evolve
from meltzone.report import run_text

SHORT = dict(mass_earth=5.0, end_time_gyr=1e-4, regime="stagnant-lid")


@pytest.fixture(scope="module")
def runs():
    return {rule: evolve(PlanetSpec(core_start=rule, **SHORT)) for rule in ("rheological-transition", "adiabat")}


def test_rheological_transition_start_by_hand(runs):
    """Linear melt law: T_phi_c = T_sol + phi_c (T_liq - T_sol) on the CMB node's curves; the rule gives T_phi_c + 200 K,
    then the core's molten floor (applied after the rule: 50 K above the alloy's melting curve T_m(P) at every core
    node, T_c f(r) >= T_m + 50) raises it where the rule would start with an inner core. At 5 M_E the floor binds
    (measured: rule 9487 K, floor 10182 K); both by hand from the interior's pressures and adiabat shape, 1e-9
    relative; below the adiabat rule's start (the molten start's adiabat is above both at the CMB)."""
    from meltzone.iron import iron_melting_temperature

    r = runs["rheological-transition"]
    g, it = r.history.grid, r.interior
    phi_c = r.spec.convection.critical_melt_fraction
    rule = g.solidus[0] + phi_c * (g.liquidus[0] - g.solidus[0]) + 200.0
    t_melt = iron_melting_temperature(it.P[it.core], r.spec.melting.core_melting_depression_k)
    floor = float(np.max(t_melt / it.adiabat[it.core])) + 50.0
    assert rule < floor  # the combination is exercised: the floor binds here
    assert r.history["core_temperature"][0] == pytest.approx(max(rule, floor), rel=1e-9)
    assert max(rule, floor) < runs["adiabat"].history["core_temperature"][0]


def test_adiabat_start_by_hand(runs):
    """T_c = T_u f(CMB) + 200 K with f the adiabat's shape (T / T_u) at the CMB node, 1e-9 relative."""
    r = runs["adiabat"]
    f_cmb = r.interior.adiabat[r.interior.cmb_index]
    assert r.history["core_temperature"][0] == pytest.approx(r.history["upper_temperature"][0] * f_cmb + 200.0,
                                                             rel=1e-9)


def test_cold_start_is_capped_by_the_adiabat():
    """A mantle started below its rheological transition at the CMB: the core starts at the adiabat + 200 K, as with
    the adiabat rule (the cap of the module docstring), 1e-12 relative."""
    spec = PlanetSpec(mass_earth=1.0, end_time_gyr=1e-4, upper_temperature_k=1700.0)
    a, b = (evolve(spec.replace(core_start=rule)).history["core_temperature"][0]
            for rule in ("rheological-transition", "adiabat"))
    assert a == pytest.approx(b, rel=1e-12)


def test_run_report_shows_the_start(runs):
    """The run report names the starting temperatures and the rule (common practice: a report says what it assumed)."""
    text = run_text(runs["rheological-transition"])
    line = next(ln for ln in text.splitlines() if ln.startswith("start "))
    assert "initial.core_start = rheological-transition" in line and "+200 K" in line
    core = runs["rheological-transition"].history["core_temperature"][0]
    assert f"core {core:,.0f} K" in line


# ------------------------------------------------------------------ what the start does not set: the core's liquid lifetime
#: Starts compared: the two rules and the hottest start the config allows (initial.core_temperature_k = 30000 K).
STARTS = {"rheological-transition": {}, "adiabat": {"core_start": "adiabat"}, "hot": {"core_temperature_k": 30000.0}}


@pytest.fixture(scope="module")
def lifetimes():
    """(core_solid_yr [yr], core temperature at the end [K]) by (mass [M_E], start): defaults (mobile lid,
    boundary-layer scheme), 10 Gyr; a core_solid_yr of None (the core still has liquid at the end) counts as
    longer than the run (inf)."""
    out = {}
    for m in (3.0, 5.0, 8.0):
        for label, kw in STARTS.items():
            r = evolve(PlanetSpec(mass_earth=m, end_time_gyr=10.0, **kw))
            t = r.summary()["core_solid_yr"]
            out[m, label] = (np.inf if t is None else t, float(r.history["core_temperature"][-1]))
    return out


def test_magma_ocean_erases_the_core_start(lifetimes):
    """"The magma ocean phase effectively erases any signs of the initial core thermodynamic state" (Vazan, Ormel,
    Noack & Dominik 2018, rocky cores of sub-Neptunes; abstract checked): the core temperature after 10 Gyr moves by
    less than 1% between the two rules and the 30000 K start, at 3, 5 and 8 M_E (measured: at most 0.7%, 3 M_E
    6613 -> 6658 K with the 30000 K start; the magma ocean drains the excess within a few kyr)."""
    for m in (3.0, 5.0, 8.0):
        ref = lifetimes[m, "rheological-transition"][1]
        for label in ("adiabat", "hot"):
            assert lifetimes[m, label][1] == pytest.approx(ref, rel=0.01), (m, label)


@pytest.mark.xfail(strict=True, reason="measured: no 3-8 M_E core is fully solid within 10 Gyr with any start (inner "
                   "cores 0.76-0.78, 0.87-0.88, 0.95 of the core radius at 3, 5, 8 M_E); with V_inf = 0 (the "
                   "activation enthalpy saturating at E + V0 P_d) they were solid at 4.3, 0.85, 0.13 Gyr")
def test_massive_cores_solid(lifetimes):
    """Cores of planets heavier than 2 M_E are solid (Morard et al. 2011, iron melting from first principles compared
    with super-Earth thermal profiles; abstract checked): with every start, the 3-8 M_E cores are fully solid within
    the 10 Gyr run."""
    assert all(t < 10e9 for t, _ in lifetimes.values())


@pytest.mark.xfail(strict=True, reason="measured: every 3-8 M_E core keeps liquid through the 10 Gyr run with every "
                   "start, so the run does not order them (the fraction of the core radius that is solid at 10 Gyr "
                   "rises with mass, 0.78, 0.88, 0.95); with V_inf = 0 the opposite order: fully solid at 4.26-4.43, "
                   "0.85-0.86, 0.13 Gyr at 3, 5, 8 M_E")
def test_liquid_core_lasts_longer_with_planet_mass(lifetimes):
    """"The liquid core last[s] longer with increasing planet mass" (Zhang & Rogers 2022, ApJ, thermal evolution with
    mixing-length convection in mantle and core; abstract checked, which names the mantle's mass, through its thermal
    isolation of the core, as the control): 3 < 5 < 8 M_E for every start."""
    for label in STARTS:
        assert lifetimes[3.0, label][0] < lifetimes[5.0, label][0] < lifetimes[8.0, label][0], label


@pytest.mark.xfail(strict=True, reason="measured: the 3, 5 and 8 M_E cores all keep liquid through 10 Gyr with every "
                   "start; see test_liquid_core_lasts_longer_with_planet_mass")
def test_liquid_core_lasts_longest_at_four_to_six_earth_masses(lifetimes):
    """"The liquid metal core lasted the longest for Earth-like planets four to six times larger in mass than the
    Earth" (Kraus et al. 2022, Science 375:202; journal summary checked): 5 M_E outlasts 3 and 8 M_E."""
    for label in STARTS:
        assert lifetimes[5.0, label][0] > max(lifetimes[3.0, label][0], lifetimes[8.0, label][0]), label
