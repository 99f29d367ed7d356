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
    (measured: rule 9483 K, floor 9691 K); both by hand from the interior's pressures and adiabat shape, 1e-9
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
