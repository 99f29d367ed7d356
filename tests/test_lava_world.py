"""Hot planets: the stiff stretch of the boundary-layer scheme (a magma ocean held near the equilibrium
temperature, relaxing in ~1e3 yr) and the summary of a lava world.

Sources: the reference path tests/reference_evolution.py (scipy's LSODA, which switches to BDF when stiff;
tolerances of tests/test_reference_evolution.py, 1e-3 relative); the implicit path against the explicit one on
the same planet (both at run.rtol = 1e-7; event times within the reference tests' 1e-3 relative, where the
explicit path itself is 4.5e-4 from the reference at rtol 1e-9, measured 1.5e-4 apart; temperatures within
1e-5, measured 2.4e-7); depths of a hand-made profile (exact linear interpolation, 1e-9 m).
"""

from __future__ import annotations

import math
from types import SimpleNamespace

import numpy as np
import pytest

import meltzone
from meltzone import report, surface_melt
from meltzone._core import layout as k
from meltzone.config import PlanetSpec
from meltzone.evolution import boundary_layer
from meltzone.evolution.contract import MantleGrid

from test_reference_evolution import assert_trajectory, compare

HOT = {"planet": {"mass_earth": 1.0}, "surface": {"equilibrium_temperature_k": 1800.0},
       "convection": {"regime": "stagnant-lid"}}


@pytest.fixture(scope="module")
def hot():
    """The 1 M_E stagnant-lid planet under T_eq = 1800 K over 10 Gyr, and the integrator's final state."""
    states = []
    integrate = boundary_layer.integrate

    def spy(*args, **kwargs):
        out = integrate(*args, **kwargs)
        states.append(out[-1])
        return out

    mp = pytest.MonkeyPatch()
    mp.setattr(boundary_layer, "integrate", spy)
    try:
        result = meltzone.evolve(HOT)
    finally:
        mp.undo()
    return result, states[0]


def test_hot_planet_reaches_its_end_time_with_the_implicit_method(hot):
    """Before the stiff switch this run stopped at run.max_steps = 200000 near 0.92 Gyr (explicit steps held at
    ~4.5 kyr by stability); now it ends at 10 Gyr in a few thousand steps, most of them implicit, and the energy
    budget closes within the summary's tolerance."""
    result, state = hot
    s = result.summary()
    assert s["end_time_yr"] == pytest.approx(1e10, rel=1e-12)
    assert result.history.n_steps < 5000
    assert state[k.S_N_IMPLICIT] > 100
    assert s["energy_closure_ok"]
    assert np.all(np.isfinite(result.history["upper_temperature"]))


def test_lava_world_summary(hot):
    """A magma ocean that never ends, a surface above the solidus at the end with melt below it (a depth
    between the surface and the CMB), and no fully molten surface (the top melt fraction is ~0.43)."""
    result, _ = hot
    s = result.summary()
    assert s["magma_ocean_at_start"] and s["magma_ocean_at_end"] and s["magma_ocean_end_yr"] is None
    assert s["surface_above_solidus_at_end"]
    depth = s["surface_melt_depth_at_end_m"]
    assert 0.0 < depth < result.interior.radius - result.interior.core_radius
    assert s["surface_molten_depth_at_end_m"] is None
    assert s["max_surface_melt_depth_m"] >= depth
    assert any("lava world" in line for line in report.head_lines(result, s))


def test_cool_planet_has_no_surface_melt_at_the_end():
    """Earth-like (T_eq 255 K, 1 Gyr): the surface freezes, so the end values are None, while the fully molten
    start gives a surface-melt depth over the run (the whole mantle at t = 0)."""
    result = meltzone.evolve({"run": {"end_time_gyr": 1.0}})
    s = result.summary()
    assert not s["surface_above_solidus_at_end"]
    assert s["surface_melt_depth_at_end_m"] is None and s["surface_molten_depth_at_end_m"] is None
    it = result.interior
    assert s["max_surface_melt_depth_m"] == pytest.approx(it.radius - it.core_radius, rel=1e-3)


def test_lava_world_matches_the_reference():
    """Mobile lid under T_eq = 1800 K for 10 Gyr (the fast path mostly implicit) against the LSODA reference:
    T_u, T_c and inner core within the reference tests' 1e-3 (measured <= 2.4e-5). The net surface heat flow
    of a planet near radiative balance is a small difference of large terms (absorbed and emitted ~6e5 W/m^2
    at 1800 K against a net of ~0.1 W/m^2), so its relative difference is amplified: within 1e-2 (measured 2.1e-3
    with the density-dependent properties, 2.4e-5 before)."""
    spec = PlanetSpec({**HOT, "convection": {"regime": "mobile-lid"}})
    _, summary, _, _, diff = compare(spec)
    assert_trajectory({**diff, "surface_heat_flow": diff["surface_heat_flow"] / 10.0})
    assert summary["magma_ocean_at_end"]


#: the stagnant-lid case sat at phi_top = phi_c + 1.4e-5 from 5.9 to 164 Myr on the implicit path (the explicit run
#: and the reference switch at 5.89 Myr): before the rheological switch, melt extraction (and its heat) switched on
#: in every evaluation below phi_c, the Rosenbrock stages' and the Jacobian's differences included; it passes since
#: extraction waits for the switch (meltzone._core.volcanism), also with the lid floor's former rate scale
#: (measured)
@pytest.mark.parametrize("regime", ["mobile-lid", "stagnant-lid"])
def test_implicit_path_lands_the_same_events(monkeypatch, regime):
    """The implicit method alone (forced on from the start and kept on) against the default run on an Earth
    that crystallises (0.2 Gyr): the rheological switch (landed on phi_c in both), the magma-ocean end, the
    layer count and the final temperatures agree; the run keeps the explicit run's event list."""
    config = {"convection": {"regime": regime}, "run": {"end_time_gyr": 0.2}}
    explicit = meltzone.evolve(config)
    start = boundary_layer.initial_state

    def implicit_start(spec, inputs):
        state = start(spec, inputs)
        state[k.S_IMPLICIT] = 1.0
        state[k.S_NONSTIFF_COUNT] = -1e15  # never reaches the count that switches back
        return state

    monkeypatch.setattr(boundary_layer, "initial_state", implicit_start)
    implicit = meltzone.evolve(config)
    a, b = explicit.summary(), implicit.summary()
    sw_a = explicit.history.switch_times["rheological_switch"]
    sw_b = implicit.history.switch_times["rheological_switch"]
    assert sw_a is not None and sw_b == pytest.approx(sw_a, rel=1e-3)
    assert b["magma_ocean_end_yr"] == pytest.approx(a["magma_ocean_end_yr"], rel=1e-3)
    assert b["n_layers"] == a["n_layers"]
    assert [e["kind"] for e in b["events"]] == [e["kind"] for e in a["events"]]
    for name in ("upper_temperature", "core_temperature"):
        assert implicit.history[name][-1] == pytest.approx(explicit.history[name][-1], rel=1e-5)
    assert b["energy_closure_ok"]


def _history(temperature):
    grid = MantleGrid(radius=np.array([3e6, 4e6, 5e6, 6e6, 7e6]), pressure=np.zeros(5), mass=np.ones(5),
                      solidus=np.full(5, 1500.0), liquidus=np.full(5, 2000.0))
    temperature = np.asarray(temperature, dtype=float)
    phi = np.clip((temperature - 1500.0) / 500.0, 0.0, 1.0)
    return SimpleNamespace(grid=grid, temperature=temperature, melt_fraction=phi)


def test_surface_melt_depths_on_a_hand_made_profile():
    """Step 0: melt in the top three nodes, its edge halfway between nodes 2 and 1 (T - T_sol = +100, -100),
    fully molten in the top two with the edge a fifth of the way to node 2 (T - T_liq = +100, -400). Step 1:
    a solid surface (NaN). Step 2: all molten (the CMB node's depth)."""
    h = _history([[1000, 1400, 1600, 2100, 2200], [1600, 1700, 1800, 1900, 1400], [2100] * 5])
    d = surface_melt.depths(h)
    np.testing.assert_allclose(d["melt_depth"][[0, 2]], [2.5e6, 4e6], atol=1e-9)
    np.testing.assert_allclose(d["molten_depth"][[0, 2]], [1.2e6, 4e6], atol=1e-9)
    assert math.isnan(d["melt_depth"][1]) and math.isnan(d["molten_depth"][1])
    s = surface_melt.summary(h)
    assert s["surface_above_solidus_at_end"] and s["max_surface_melt_depth_m"] == pytest.approx(4e6)


def test_mixing_length_steam_lava_world_keeps_long_steps():
    """A lava world of the reliability box (planet 20 of its seeded draw: 1.08 M_E, core fraction 0.41, stagnant
    lid, a steam atmosphere of 2.9e20 kg of water over a magma ocean held at ~2000 K by an absorbed 11 kW/m^2,
    the mixing-length scheme, 4.5 Gyr). Its net surface flux (~0.07 W/m^2) is the difference of two fluxes 1e5
    times larger, so the Newton iteration's energy balance needs the airborne water to rounding and the slopes
    of its nearly adiabatic magma ocean near their true values. Before: 139,837 steps and 478 s, held at ~30 kyr
    by Newton failures; measured now 1,111 steps. Asserted: the run ends at 4.5 Gyr in fewer than 5,000 steps with
    the magma ocean kept (this model's criterion for a lava world that finishes; issue #15) and the energy
    budget closed to the summary's tolerance."""
    cfg = {"convection": {"scheme": "mixing-length", "regime": "stagnant-lid"}, "run": {"end_time_gyr": 4.5},
           "planet": {"mass_earth": 1.0811643683812628, "core_mass_fraction": 0.41058323454610335},
           "surface": {"atmosphere": "steam", "water_inventory_kg": 2.8980150741365395e+20,
                       "co2_inventory_kg": 2.7937075422064472e+19, "equilibrium_temperature_k": 666.5138538819617},
           "initial": {"upper_temperature_k": 2178.257538170669}}
    result = meltzone.evolve(cfg)
    s = result.summary()
    assert s["end_time_yr"] == pytest.approx(4.5e9, rel=1e-12)
    assert result.history.n_steps < 5000
    assert s["magma_ocean_at_end"] and s["energy_closure_ok"]
