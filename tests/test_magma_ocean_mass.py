"""The magma ocean's end by the surface and mass criteria (meltzone.magma_ocean) on synthetic histories.

Definition under test (this model's; module docstring of meltzone.magma_ocean): a magma ocean is reported while
the regime is the magma ocean (the top's melt fraction above phi_c) and at least 1% of the mantle's mass is above
phi_c. The profiles are linear in time inside each step, so the crossing times follow by hand. Tolerance: 1e-9
relative on times (brentq to 1e-6 of the step on a step function of time lands on its jump).
"""

from types import SimpleNamespace

import numpy as np
import pytest

from meltzone import layers, magma_ocean
from meltzone.config import PlanetSpec
from meltzone.constants import YEAR
from meltzone.evolution.contract import INTERVAL_FIELDS, SERIES, History, InStep, MantleGrid

from test_layers_synthetic import SOLIDUS, _Linear as _LinearProfiles

N = 20
# SOLIDUS: 2000 K, linear law over a 1000 K interval, phi = (T - 2000 K) / 1000 K (tests/test_layers_synthetic.py)
PHI_C = 0.4
#: the top node holds 0.26% of the mantle's mass: at phi_c alone it is not a magma ocean
MASS = np.concatenate([np.full(N - 1, 1.0e21), [0.05e21]])


class _Linear(_LinearProfiles):
    """T(r) linear in time between the stored profiles (tests/test_layers_synthetic.py, the same linear law); the
    regime's melt fraction is the top node's phi."""

    def at(self, t):
        state = super().at(t)
        return InStep(temperature=state.temperature, melt_fraction=state.melt_fraction,
                      regime_melt_fraction=float(state.melt_fraction[-1]), centre_freezing_margin_k=-1.0)


def _result(bulk_phi, top_phi):
    """A run whose bulk nodes hold melt fractions ``bulk_phi`` and whose top node ``top_phi`` (one per step, 100 s
    apart); the regime is the magma ocean while the top's melt fraction is above phi_c (the surface criterion)."""
    time = np.arange(len(bulk_phi), dtype=float) * 100.0
    phi = np.array([np.concatenate([np.full(N - 1, b), [t]]) for b, t in zip(bulk_phi, top_phi)])
    temps = SOLIDUS + 1000.0 * phi
    grid = MantleGrid(radius=np.linspace(3.0e6, 5.0e6, N), pressure=np.linspace(1e11, 0.0, N), mass=MASS,
                      solidus=np.full(N, SOLIDUS), liquidus=np.full(N, SOLIDUS + 1000.0))
    series = {name: np.zeros(len(time)) for name, (_, _, req) in SERIES.items() if req}
    series["regime"] = np.where(np.asarray(top_phi) > PHI_C, 0, 1).astype(np.int8)
    series["melt_mass"] = (phi * MASS).sum(axis=1)
    intervals = {k: np.zeros(0, dtype=np.int64 if k in ("step", "top_node", "bottom_node", "full_top_node",
                                                        "full_bottom_node") else float) for k in INTERVAL_FIELDS}
    h = History(scheme="synthetic", time=time, series=series, temperature=temps, melt_fraction=phi,
                intervals=intervals, grid=grid, critical_melt_fraction=PHI_C, evaluator=_Linear(time, temps))
    h.check()
    interior = SimpleNamespace(r=np.concatenate([[0.0], grid.radius]), P=np.concatenate([[2e11], grid.pressure]),
                               radius=5.0e6, core_radius=3.0e6, mantle=slice(1, None), cmb_index=1, mass=6e24)
    return SimpleNamespace(history=h, intervals=h.intervals, interior=interior, time=time, energy_closure=0.0,
                           spec=PlanetSpec({"planet": {"name": "synthetic"}}))  # every run's spec is complete


def test_top_held_at_phi_c_over_a_solid_mantle_is_no_magma_ocean():
    """The top node stays at phi 0.45 (surface criterion: a magma ocean throughout) while the bulk cools from
    phi 0.6 to 0.2 over 100-200 s: the bulk crosses phi_c at 150 s, after which 0.26% of the mass is above phi_c.
    magma_ocean_end_yr = 150 s; the surface criterion never ends (surface_magma_ocean_end_yr None); no magma ocean
    at the end."""
    res = _result([1.0, 0.6, 0.2, 0.2], [1.0, 0.45, 0.45, 0.45])
    s = layers.summarize(res)
    assert s["magma_ocean_at_start"] is True
    assert s["magma_ocean_end_yr"] == pytest.approx(150.0 / YEAR, rel=1e-9)
    assert s["surface_magma_ocean_end_yr"] is None
    assert s["magma_ocean_at_end"] is False and s["magma_ocean_reformed_yr"] is None
    frac = magma_ocean.mass_fraction_above(res.history.melt_fraction, MASS, PHI_C)
    assert frac[-1] == pytest.approx(0.05 / 19.05, rel=1e-12) and frac[-1] < magma_ocean.MASS_FRACTION_MIN


def test_surface_criterion_ends_first_when_the_top_solidifies_first():
    """Bulk at phi 0.6 throughout (well above 1% of the mass), top falls from 0.6 to 0.2 over 100-200 s: both
    definitions end at 150 s, where the top crosses phi_c."""
    s = layers.summarize(_result([1.0, 0.6, 0.6, 0.6], [1.0, 0.6, 0.2, 0.2]))
    assert s["magma_ocean_end_yr"] == pytest.approx(150.0 / YEAR, rel=1e-9)
    assert s["surface_magma_ocean_end_yr"] == pytest.approx(s["magma_ocean_end_yr"], rel=1e-12)


def test_mass_coming_back_above_the_threshold_reforms_it():
    """Ended by mass at 150 s (as in the first test), then the bulk warms from phi 0.2 to 0.6 over 300-400 s with
    the top still above phi_c: the magma ocean forms again at 350 s and is present at the end; the surface
    criterion sees neither."""
    s = layers.summarize(_result([1.0, 0.6, 0.2, 0.2, 0.6], [1.0, 0.45, 0.45, 0.45, 0.45]))
    assert s["magma_ocean_end_yr"] == pytest.approx(150.0 / YEAR, rel=1e-9)
    assert s["magma_ocean_reformed_yr"] == pytest.approx(350.0 / YEAR, rel=1e-9)
    assert s["magma_ocean_at_end"] is True
    assert s["surface_magma_ocean_end_yr"] is None and s["surface_magma_ocean_reformed_yr"] is None
