"""The core: the alloy's melting curve at Earth's inner-core boundary and the molten default start.

Sources and tolerances are named in each test.
"""

from __future__ import annotations

import numpy as np
import pytest

from meltzone import evolve, iron, melting
from meltzone.config import PlanetSpec
from meltzone.constants import GPA


def test_alfe2003_alloy_melting_at_the_icb():
    """Alfe, Price & Gillan 2003, Mineral. Mag. 67:113 (abstract checked): pure iron melts at 6350 +- 600 K at
    the ICB and the core alloy ~700 K lower, 5650 +- 600 K. The curve (Anzellini et al. 2013) with the default
    depression (700 K) lands inside both ranges at 330 GPa (measured 6230 K and 5530 K)."""
    depression = PlanetSpec().melting.core_melting_depression_k
    assert depression == 700.0
    assert iron.iron_melting_temperature(330 * GPA) == pytest.approx(6350.0, abs=600.0)
    assert iron.iron_melting_temperature(330 * GPA, depression) == pytest.approx(5650.0, abs=600.0)


def _inputs(mass_earth):
    from meltzone.evolution.boundary_layer import build_inputs
    from meltzone.interior import build_interior

    spec = PlanetSpec(mass_earth=mass_earth)
    it = build_interior(spec)
    curves = melting.node_curves(melting.get_model(spec.melting.model), it.P[it.mantle])
    return spec, build_inputs(spec, it, curves)


def test_default_start_is_molten_in_the_core():
    """The default start (initial.core_temperature_k = 0) is molten in the core as in the mantle: the core
    adiabat T_c f(r) lies >= 50 K (the mantle's margin over its liquidus) above the alloy's melting curve at
    every core node (tolerance 1e-9 K). At 15 M_E the mantle adiabat + 200 K alone would start with an inner
    core (measured: 251 K below the curve at the centre); at 1 M_E the floor does not bind (the start is the
    mantle adiabat at the CMB + 200 K, as before)."""
    from meltzone._core import layout as k
    from meltzone.evolution.boundary_layer import initial_temperatures

    for mass in (1.0, 15.0):
        spec, inputs = _inputs(mass)
        tu, tc = initial_temperatures(spec, inputs)
        core = inputs.core
        assert np.min(tc * core[k.C_F] - core[k.C_TMELT]) >= 50.0 - 1e-9
        adiabat_start = tu * inputs.grid[k.G_F, 0] + spec.initial.initial_cmb_jump_k
        if mass == 1.0:
            assert tc == adiabat_start
        else:
            assert np.min(adiabat_start * core[k.C_F] - core[k.C_TMELT]) < 0.0 < tc - adiabat_start


def test_no_inner_core_at_the_start_of_a_default_run():
    """A default run of 15 M_E (boundary-layer scheme, 0.1 Gyr) has no inner core in its first record; it
    nucleates later (inner_core_nucleation_yr > 0; measured ~60 yr: the core cools fast under the young magma
    ocean)."""
    r = evolve(PlanetSpec(mass_earth=15.0, end_time_gyr=0.1))
    assert r.history["inner_core_radius"][0] == 0.0
    nucleation = r.summary()["inner_core_nucleation_yr"]
    assert nucleation is not None and nucleation > 0.0
