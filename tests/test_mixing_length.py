"""The mixing-length scheme on planets: the contract, a plain reference, energy closure, grid convergence, a
published magma-ocean study, bad input."""

import sys
import tomllib
from importlib.resources import files
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

import meltzone
from meltzone.config import as_spec
from meltzone.constants import YEAR
from meltzone.errors import ConfigError, ConvergenceError
from meltzone.interior import build_interior
from meltzone.pipeline import evolve

sys.path.insert(0, str(Path(__file__).parent))
from reference_mixing_length import Reference  # noqa: E402

YR = 365.25 * 86400.0
SCHEME = {"convection": {"scheme": "mixing-length"}}


def spec_of(mass=1.0, nodes=64, end_gyr=10.0, **sections):
    d = {"planet": {"mass_earth": mass}, "interior": {"mantle_nodes": nodes}, "run": {"end_time_gyr": end_gyr},
         "convection": {"scheme": "mixing-length"}}
    for name, values in sections.items():
        d.setdefault(name, {}).update(values)
    return as_spec(d)


@pytest.fixture(scope="module")
def earth():
    return evolve(spec_of(1.0, 64, 2.0))


def test_history_keeps_the_contract_and_a_file_round_trip(earth, tmp_path):
    """The History passes the contract's own check (common practice); the evaluator returns the recorded
    profile and regime melt fraction at a step and a profile between the neighbours' inside it; the file read back gives the same summary."""
    h = earth.history
    h.check()
    assert h.scheme == "mixing-length"
    s = len(h.time) // 2
    assert np.allclose(h.at(h.time[s]).temperature, h.temperature[s], rtol=1e-12)
    # the regime's melt fraction (the top convecting cell's isentrope at the surface) as recorded, at every step
    for j in range(1, len(h.time)):
        assert h.at(h.time[j]).regime_melt_fraction == pytest.approx(h["top_melt_fraction"][j], abs=1e-9)
    mid = h.at(0.5 * (h.time[s] + h.time[s + 1])).temperature
    lo = np.minimum(h.temperature[s], h.temperature[s + 1]) - 1e-9
    hi = np.maximum(h.temperature[s], h.temperature[s + 1]) + 1e-9
    assert np.all((mid >= lo) & (mid <= hi))
    path = tmp_path / "mlt.h5"
    meltzone.results.write(earth, path)
    back = meltzone.load(path)
    assert back.history.scheme == "mixing-length"
    assert back.summary()["basal_layer"] == earth.summary()["basal_layer"]
    t = 0.37 * (h.time[s] + h.time[s + 1])
    assert np.allclose(back.history.at(t).temperature, h.at(t).temperature, rtol=1e-12)


@pytest.mark.parametrize("mass,sections,end_gyr", [
    (0.5, {}, 1e-4),
    (1.0, {"convection": {"regime": "stagnant-lid"}}, 1e-4),
    (2.0, {"initial": {"upper_temperature_k": 1900.0}}, 1e-4),  # partly crystalline at the start
    # a cool start: the top cell freezes within the window and the heat pipe runs under it (without the pipe in
    # the reference: 3.6e-2; a start at 1800 K kept the top cell molten for the whole window)
    (1.0, {"convection": {"regime": "stagnant-lid"}, "initial": {"upper_temperature_k": 1500.0}}, 1e-4),
    # the same over 0.5 Gyr, long enough for the lid to throttle the mantle: the rigid mixing length binds
    # (without it in the reference: 1.5e-1; within 100 kyr it made no difference)
    (1.0, {"convection": {"regime": "stagnant-lid"}, "initial": {"upper_temperature_k": 1500.0}}, 0.5),
])
def test_kernel_agrees_with_plain_reference(mass, sections, end_gyr):
    """T(r, t) of the kernel (backward Euler, run.max_temperature_step_k = 1) against the plain reference
    (tests/reference_mixing_length.py: the same semi-discrete equations written again in NumPy, solve_ivp BDF,
    rtol 1e-6) over the first 100 kyr (through the bulk rheological transition, ~1 kyr), and one case over
    0.5 Gyr, at 32 nodes (~66 cells): relative 1e-3 at eight log-spaced recorded steps (measured 1.2e-4,
    2.1e-4, 2.2e-4, 1.6e-4, 4.2e-4)."""
    spec = spec_of(mass, 32, end_gyr, run={"max_temperature_step_k": 1.0}, **sections)
    it = build_interior(spec)
    from meltzone import melting
    from meltzone.evolution.mixing_length import refined_interior, run

    curves = melting.node_curves(melting.get_model(spec.melting.model), it.P[it.mantle], "linear", 0.0)
    h = run(spec, it, curves)
    assert h.time[-1] >= 0.99 * end_gyr * 1e9 * YR
    idx = np.unique(np.geomspace(1, h.n_steps, 8).astype(int))
    # the reference on the same cells: the interior's nodes with the scheme's CMB refinement (a choice of grid)
    temp = Reference(spec, refined_interior(it)).solve(h.time[idx], rtol=1e-6)
    assert np.max(np.abs(h.temperature[idx] - temp) / temp) <= 1e-3


@pytest.mark.parametrize("which", ["demo", "15 Earth masses"])
def test_energy_closes(which):
    """Energy closure |stored-energy loss - integrated (surface loss - radiogenic heating)| / largest change
    <= 1e-8 (the conservative finite-volume form closes to the Newton tolerance; measured ~1e-14) for the demo
    planet (grey atmosphere, 5 Gyr) and a 15 M_E planet over 10 Gyr, at 64 nodes."""
    if which == "demo":
        d = tomllib.loads(files("meltzone").joinpath("data/demo.toml").read_text())
        d.update({"convection": {"scheme": "mixing-length"}, "interior": {"mantle_nodes": 64}})
        spec = as_spec(d)
    else:
        spec = spec_of(15.0, 64)
    r = evolve(spec)
    assert r.history.energy_closure <= 1e-8
    assert r.history.n_steps > 100


def test_steam_lava_world_keeps_its_ocean_finishes_and_closes_its_energy():
    """A lava world under steam (invented: 0.82 M_E, core fraction 0.17, stagnant lid, 8.2e21 kg of water and
    1.8e20 kg of CO2, a 0.80 M_sun star at 0.072 AU, 4.5 Gyr, 64 nodes). Hamano, Abe & Genda 2013 (Nature
    497:607, abstract checked): inside the critical distance the magma ocean lasts until escape has desiccated the
    planet (type II). Checked: the surface magma ocean is there at the end, the water is lost to space, and the
    run reaches its end within 20,000 steps with its energy budget closed to 1e-8 (issue criteria; the lagged
    volatiles left 5.8e-7 at 256 nodes; measured now at 64 nodes: see the assertion values in the note)."""
    spec = as_spec({"convection": {"scheme": "mixing-length", "regime": "stagnant-lid"},
                    "interior": {"mantle_nodes": 64},
                    "run": {"end_time_gyr": 4.5, "max_steps": 20000},
                    "planet": {"mass_earth": 0.8167, "core_mass_fraction": 0.1707},
                    "surface": {"atmosphere": "steam", "water_inventory_kg": 8.16e21, "co2_inventory_kg": 1.81e20},
                    "star": {"mass_msun": 0.8028}, "orbit": {"semi_major_axis_au": 0.07193}})
    s = evolve(spec).summary()
    assert s["magma_ocean_at_end"] and s["magma_ocean_end_yr"] is None
    assert s["water_lost_kg"] == pytest.approx(8.16e21, rel=1e-3)
    assert s["energy_closure"] <= 1e-8


@pytest.fixture(scope="module")
def basal_runs():
    """(separation [yr], largest thickness [m], last melt [yr], rheological transition [yr]) of the basal layer of
    1 M_E (defaults, 2 Gyr) at 256 and 512 nodes."""
    out = []
    for nodes in (256, 512):
        s = evolve(spec_of(1.0, nodes, 2.0)).summary()
        ev = {e["kind"]: e["time_yr"] for e in s["events"] if e["layer"] != 0 or e["kind"] == "split"}
        basal = s["basal_layer"]
        out.append((basal["start_yr"], basal["max_thickness_m"], ev["last-melt"], s["rheological_transition_yr"]))
    return out


def test_grid_convergence_of_the_basal_layer(basal_runs):
    """Doubling the cells (256 -> 512 nodes, 1 M_E, 2 Gyr): the basal layer freezes (last melt) and separates from
    the surface magma ocean within 2% (issue #12's criterion for event times) and reaches its largest thickness
    within 5%; the rheological transition (the last cell above phi_c: the CMB half cell, a film the core keeps
    above phi_c) within 2%. Measured with the split of the lowest cells: last melt 1.482 and 1.483 Gyr (0.04%),
    separation 20.09 and 20.13 kyr (0.2%; 17.0, 20.1, 20.1, 20.5, 20.8 kyr at 128-1448 nodes), largest thickness
    1230 and 1279 km (4.0%), rheological transition 51.36 and 51.37 Myr (0.02%); before the split 0.4%, 1.4%,
    0.4%, 0.7%; before the CMB levels 0.8%, 0.7%, 1.8%, and the last cell above phi_c was a single cell on a
    plateau under the surface (5.7 and 22 Myr); before the high-pressure activation volume 2.4%, 8.8%, 10.3%. The
    largest thickness is reached at the separation, where T - T_sol touches zero between the layers: a tangency,
    ill-conditioned in the refinement's pattern rather than in the node count (at 256 and 512 nodes 29.5 and 29.1
    kyr without the split, 8.2 and 10.1 kyr with an eightfold split, while those grids' profiles agree within 2 K
    at 50 km above the CMB and 1 K in the core over the first 30 kyr); the edges at fixed times converge
    (test_grid_convergence_of_the_basal_layer_edge)."""
    (s1, d1, l1, r1), (s2, d2, l2, r2) = basal_runs
    assert s2 == pytest.approx(s1, rel=0.02)
    assert d2 == pytest.approx(d1, rel=0.05)
    assert l2 == pytest.approx(l1, rel=0.02)
    assert r2 == pytest.approx(r1, rel=0.02)


@pytest.fixture(scope="module")
def super_earth_basal_ends():
    """End of the basal layer [yr] at 5 and 10 M_E (defaults, 10 Gyr) at 256 and 512 nodes."""
    return {(m, n): evolve(spec_of(m, n, 10.0)).summary()["basal_layer"]["end_yr"]
            for m in (5.0, 10.0) for n in (256, 512)}


def test_grid_convergence_of_the_super_earth_basal_layer_end(super_earth_basal_ends):
    """Issue #12's criterion "doubling the cells moves event times by <= 2%" on the end of the 5 and 10 M_E basal
    layers, 256 -> 512 nodes. Measured with the CMB levels and the split of the lowest cells
    (meltzone.evolution.mixing_length, "Lower boundary layer"): 5 M_E 2.3374 and 2.3386 Gyr (0.05%), 10 M_E
    2.3049 and 2.3061 Gyr (0.06%); with the levels alone 2.257 and 2.283 Gyr (1.2%), 2.216 and 2.240 Gyr (1.1%), a
    drift that did not shrink with the cells; without either 3.2% and 3.5%, and with V_inf = 0 the 5 M_E layer
    was a film in the bottom cell and its end moved 4x (33 and 132 Myr)."""
    e = super_earth_basal_ends
    for m in (5.0, 10.0):
        assert e[m, 512] == pytest.approx(e[m, 256], rel=0.02), m


def test_super_earth_basal_layers_outlive_earths():
    """Lherm, Nakajima & Blackman 2026 (JGR Planets 131, abstract checked): "more massive planets host larger BMOs
    with prolonged ... silicate dynamos". The resolved profile's basal layer (defaults, 128 nodes, 10 Gyr) lives
    longer and grows thicker at 5, 10 and 15 M_E than at 1 M_E (measured 1.48, 2.34, 2.30, 2.63 Gyr and 1257,
    2148, 2068, 2061 km; with the CMB levels alone 1.45, 2.23, 2.19, 2.52 Gyr; without them 1.42, 2.04, 1.85, 2.43
    Gyr; with V_inf = 0: 0.98 Gyr, 5.4 Myr and none at 10-15 M_E). The order among 5-15 M_E is not asserted (10
    M_E ends 1.5% before 5 M_E at 128 nodes)."""
    ends = {m: evolve(spec_of(m, 128, 10.0)).summary()["basal_layer"] for m in (1.0, 5.0, 10.0, 15.0)}
    for m in (5.0, 10.0, 15.0):
        assert ends[m]["end_yr"] > ends[1.0]["end_yr"], m
        assert ends[m]["max_thickness_m"] > ends[1.0]["max_thickness_m"], m


def basal_top(history, t):
    """Radius [m] of the basal melt layer's top at time ``t`` [s]: where T - T_sol, positive at the CMB, first
    falls to zero going up (linear between nodes); the evaluator's profile inside the step."""
    d = history.at(t).temperature - history.grid.solidus
    j = int(np.argmax(d <= 0.0))
    r = history.grid.radius
    return r[j - 1] + (r[j] - r[j - 1]) * d[j - 1] / (d[j - 1] - d[j])


def test_grid_convergence_of_the_basal_layer_edge():
    """Issue #12's criterion "doubling the cells moves layer edges by less than one old cell" on the basal layer's
    top at 40 and 60 kyr (it separated at ~20 kyr), 0.3 and 1 Myr (when its top follows the core's heat), 1 M_E,
    256 -> 512 nodes. Measured with the split of the lowest cells: 9.3, 4.5, 1.5 and 0.8 km against a median cell
    of 11.4 km (thickness 888, 731, 328, 178 km); in an earlier version before the split 2.3, 0.3, 0.5 and 2.6 km
    (thickness 823, 630, 240, 111 km). Not covered by doubling the nodes: the refinement's pattern near the CMB. At
    256 nodes with no, a fourfold and an eightfold split the thickness is 959, 888, 678 km at 40 kyr, 767, 731, 594
    km at 60 kyr, 336, 329, 304 km at 0.3 Myr and 174, 178, 172 km at 1 Myr: the early edges follow the
    separation (a tangency, see test_grid_convergence_of_the_basal_layer), the later ones agree within 10% and 4%. With the CMB boundary layer's viscosity at the lowest cell's melt fraction the edge at 1 Myr
    moved by 51 km (93, 145, 170 km at 256, 512, 1024 nodes)."""
    runs = [evolve(spec_of(1.0, n, 1.1e-3)).history for n in (256, 512)]
    cell = float(np.median(np.diff(runs[0].grid.radius)))
    for t in np.array([4e4, 6e4, 3e5, 1e6]) * YR:
        coarse, fine = (basal_top(h, t) for h in runs)
        assert abs(fine - coarse) < cell


def mass_above_end(history, share):
    """First recorded time [s] at which less than ``share`` of the mantle mass is above phi_c."""
    above = (history.melt_fraction > history.critical_melt_fraction) @ history.grid.mass / history.grid.mass.sum()
    return history.time[int(np.argmax(above < share))]


#: the summary's 1% threshold at 5 M_E, on a plateau (strict expected failure; the measured state in the reason)
PLATEAU = pytest.mark.xfail(strict=True, raises=AssertionError, reason="measured 3.45 and 4.07 kyr at 512 and 1024 "
                            "nodes (4.88, 4.89 kyr at 128, 256): from 2 to 8 kyr the mass above phi_c is the basal "
                            "layer's, 0.7% falling to 0.3%, plus a shallow layer's under the surface, 0.4-0.7% in "
                            "steps as single cells pass phi_c, so 1% falls on that plateau (before the split of the "
                            "lowest cells 1.876 and 1.881 kyr, a first brief dip below 1%)")


@pytest.mark.parametrize("mass, share, nodes", [(5.0, 0.02, (256, 512)), (1.0, 0.10, (128, 256)),
                                                pytest.param(5.0, 0.01, (512, 1024), marks=PLATEAU)])
def test_grid_convergence_of_the_mass_based_magma_ocean_end(mass, share, nodes):
    """Doubling the cells moves the time at which less than ``share`` of the mantle mass is above phi_c by at
    most 2% (the required grid convergence of event times; this model's choice). Measured at 128, 256, 512 and
    1024 nodes with the split of the lowest cells: 5 M_E, 2%: 1.744, 1.778, 1.771, 1.783 kyr; 5%: 1.630, 1.635,
    1.649, 1.652 kyr. 1 M_E, 10%: 0.738, 0.726, 0.725, 0.726, 0.728 kyr at 64-1024 nodes. The 1% threshold of the
    summary's magma-ocean end: at 5 M_E a strict expected failure (the plateau in its reason); at 1 M_E not
    asserted (1.4 to 3.0 Myr): a shallow mushy layer of ~1-1.5% of the mantle mass stays a few hundredths above
    phi_c for Myr (see the scheme's docstring)."""
    ends = [mass_above_end(evolve(spec_of(mass, n, 1e-5)).history, share) for n in nodes]
    assert ends[1] == pytest.approx(ends[0], rel=0.02)


def edges_above(history, t):
    """Radii [m] at which the melt fraction crosses phi_c at the recorded step nearest after ``t`` (linear
    between nodes)."""
    i = int(np.searchsorted(history.time, t))
    d = history.melt_fraction[i] - history.critical_melt_fraction
    r = history.grid.radius
    j = np.nonzero(np.sign(d[1:]) != np.sign(d[:-1]))[0]
    return r[j] + (r[j + 1] - r[j]) * d[j] / (d[j] - d[j + 1])


def test_grid_convergence_of_the_rheological_front():
    """Doubling the cells (256 -> 512 nodes, 5 M_E) moves the edges of the regions above phi_c at 0.3, 0.6 and
    1 kyr by less than one cell of the coarser grid (the required grid convergence of layer edges; this model's
    choice): the rheological front falling from the surface towards it, and the top of the thin layer the core
    holds above phi_c on the CMB (82, 70, 62 km thick). Measured with the split of the lowest cells: front 2.7,
    1.6, 5.8 km, CMB layer 0.2, 0.1, 0.06 km, against a median cell of 18 km (that layer's top 81.8, 82.5, 82.3,
    82.1 km above the CMB at 0.3 kyr with no, a twofold, fourfold and eightfold split at 256 nodes); before the
    split front 6.5, 0.4, 4.6 km. Before the CMB boundary layer's viscosity was taken at its mean temperature's
    melt fraction there was no CMB layer and the front moved by 4.8, 0.9, 6.1 km."""
    times = np.array([300.0, 600.0, 1000.0]) * YR
    runs = [evolve(spec_of(5.0, n, 1.01e-6)).history for n in (256, 512)]
    cell = float(np.median(np.diff(runs[0].grid.radius)))
    for t in times:
        coarse, fine = (edges_above(h, t) for h in runs)
        assert coarse.size == fine.size == 2
        assert np.all(np.abs(fine - coarse) < cell)


@pytest.mark.parametrize("mass, nodes", [(5.0, 256), (1.0, 128), (1.0, 256), pytest.param(
    1.0, 64, marks=pytest.mark.xfail(strict=True, raises=AssertionError, reason="measured: three crossings, 5.54, "
                                     "6.18, 7.85 Myr, the regime's melt fraction within 0.4% of phi_c for ~2 Myr "
                                     "(0.394-0.405) at this coarse grid, with the split of the lowest cells"))])
def test_surface_magma_ocean_ends_once(mass, nodes):
    """A cooling planet without re-melting from outside: the regime series leaves the magma ocean once and does
    not return within 50 Myr (common practice: the top of the convecting mantle falls through phi_c once). With the
    face viscosity at the cells' mean melt fraction the top cell froze and re-melted 83, 11 and 3 times (5 M_E at
    256, 1 M_E at 64 and 128 nodes); the end lies between 2 and 50 Myr (with the top cell's own melt fraction as
    the regime's, 2.7, 0.9 and 1.2 Myr). Measured with the split of the lowest cells: once at 13.9, 8.7 and 5.6
    Myr; at 64 nodes (1 M_E) three times (strict expected failure). Making the regime's melt fraction continuous
    where the top convecting cell changes (weighted between two cells' isentropes by the convective share, as the
    lid's base is) was tried: 64 nodes still three times, and 512 and 1024 nodes then three and seven times."""
    h = evolve(spec_of(mass, nodes, 0.05)).history
    regime = h.series["regime"]
    flips = np.flatnonzero(np.diff(regime) != 0)
    assert regime[0] == 0
    assert flips.size == 1
    assert 2.0 <= h.time[flips[0] + 1] / (1e6 * YEAR) <= 50.0


def surface_end_yr(mass, nodes, end_gyr):
    return evolve(spec_of(mass, nodes, end_gyr)).summary()["surface_magma_ocean_end_yr"]


def test_grid_convergence_of_the_surface_magma_ocean_end():
    """Issue #12's criterion "doubling the cells moves event times by <= 2%" on the end of the surface magma ocean
    (the regime's melt fraction, the isentrope of the top convecting cell at the surface, leaving phi_c), 1 M_E,
    512 -> 1024 nodes: measured 4.794 and 4.750 Myr (0.9%; 5.51, 8.53, 5.44, 4.79 Myr at 64-512 nodes, so not
    within 2% below 512 nodes). With the top cell's own melt fraction it was 0.88, 0.34, 0.16 Myr at 256, 512,
    1024 nodes (halving with the cell)."""
    coarse, fine = (surface_end_yr(1.0, n, 0.0055) for n in (512, 1024))
    assert fine == pytest.approx(coarse, rel=0.02)


@pytest.mark.xfail(strict=True, reason="measured 13.9 and 13.4 Myr (3.5%) at 256 and 512 nodes with the split of the "
                                       "lowest cells, 14.9 and 7.0 Myr at 256 nodes with zones of 3% and 10% instead of 5% (16.6 and 14.8 Myr "
                                       "before it; 16.1 and 14.8 Myr "
                                       "without the CMB levels; 20.6 and 16.6 "
                                       "Myr before the high-pressure activation volume; 22.3, 17.0 and 7.8 Myr at "
                                       "256, 512 and 1024 before the liquid-iron core profile): "
                                       "the 5 M_E regime melt fraction drifts along phi_c for ~10 Myr; cause: the "
                                       "conductive lid under the surface lies inside the top half cell (with the "
                                       "experimental surface refinement TOP_LEVELS = 4, re-measured: 8.40 and 8.20 Myr, 2.4%; it "
                                       "stays off, see the scheme's docstring)")
def test_grid_convergence_of_the_surface_magma_ocean_end_at_five_earth_masses():
    """Issue #12's criterion "doubling the cells moves event times by <= 2%" on the end of the surface magma ocean
    of 5 M_E, 256 -> 512 nodes (strict xfail: the measured state is in the reason)."""
    coarse, fine = (surface_end_yr(5.0, n, 0.025) for n in (256, 512))
    assert fine == pytest.approx(coarse, rel=0.02)


def _heat_loss_tw(result):
    """Surface heat flow plus the volcanic heat pipe at the end of the run [TW]."""
    h = result.history
    pipe = h["volcanic_heat_flow"][-1] if "volcanic_heat_flow" in h.series else 0.0
    return (h["surface_heat_flow"][-1] + pipe) / 1e12


def test_heat_pipe_records_its_volcanism():
    """The stagnant lid's heat pipe (1 M_E, 64 nodes, 4.5 Gyr): the history records its power and its melt
    production, and the summary the volcanism's timing and rates, with the crust and the outgassing null (this
    scheme does not follow them). Each erupted kg takes out L + c_p (T - T_s) (Moore & Webb 2013's heat pipe; from
    memory), so the power per extracted kg lies between L and L + c_p (T_max - T_s) with T_max the hottest cell;
    the energy closure holds with the pipe in the budget (1e-8). A mobile lid runs no pipe: no volcanism series,
    its volcanism keys null."""
    r = evolve(spec_of(1.0, 64, 4.5, convection={"scheme": "mixing-length", "regime": "stagnant-lid"}))
    h, s = r.history, r.summary()
    par = h.scheme_data["par"]
    from meltzone._core import layout as k

    rate = h["melt_production"] * par[k.P_RHO_CRUST]  # kg/s
    on = rate > 0.0
    assert on.any() and s["volcanism_at_end"] and s["final_melt_production_km3_yr"] > 0.0
    per_kg = h["volcanic_heat_flow"][on] / rate[on]
    hottest = h.temperature[on].max(axis=1)
    assert np.all(per_kg >= par[k.P_LATENT] * (1 - 1e-9))
    assert np.all(per_kg <= par[k.P_LATENT] + par[k.P_CM] * (hottest - h["surface_temperature"][on]))
    assert np.all(h["volcanic_heat_flow"][~on] == 0.0)
    assert s["crust_thickness_m"] is None and s["outgassed_h2o_kg"] is None and s["outgassed_90pct_yr"] is None
    assert s["energy_closure"] <= 1e-8
    mobile = evolve(spec_of(1.0, 64, 0.1, convection={"scheme": "mixing-length", "regime": "mobile-lid"}))
    assert "melt_production" not in mobile.history and mobile.summary()["volcanism_end_yr"] is None
    assert mobile.summary()["final_melt_production_km3_yr"] is None


@pytest.mark.xfail(strict=True, raises=AssertionError, reason="measured at 1 M_E, 64 nodes, 4.5 Gyr, with the mixing "
                   "length bounded under the rigid lid and the heat pipe: stagnant 25.1 TW against mobile 31.2 TW, "
                   "ratio 0.80 (0.82 at 256 nodes; before the bound 1.08; the boundary-layer scheme ~0.6). The "
                   "stagnant mantle runs hotter (as it should) and its heat pipe carries the difference; 5 and 10 M_E "
                   "0.81 and 0.82 at 256 nodes (measured with the split of the lowest cells)")
def test_stagnant_lid_loses_heat_more_slowly_than_a_mobile_lid():
    """A stagnant lid throttles a planet's heat loss: its flux passes through the rheological sublayer under the lid
    (temperature scale ~ R T_i^2 / E), so at a similar interior temperature it carries a fraction of what a mobile
    lid carries (Solomatov & Moresi 2000, JGR 105, doi:10.1029/2000JB900197; abstract checked: "the low heat
    transport efficiency of stagnant lid convection"; the scaling from memory). The boundary-layer scheme
    gives 0.63 of the mobile lid's loss at 1 M_E at 4.5 Gyr (15.9 against 25.1 TW; 0.34 before the
    high-pressure activation volume). Asserted: the mixing-length scheme's stagnant
    lid loses at most 0.7 of what its mobile lid loses (this project's tolerance, generous for the hotter
    interior a stagnant lid keeps)."""
    stagnant = evolve(spec_of(1.0, 64, 4.5, convection={"scheme": "mixing-length", "regime": "stagnant-lid"}))
    mobile = evolve(spec_of(1.0, 64, 4.5, convection={"scheme": "mixing-length", "regime": "mobile-lid"}))
    assert _heat_loss_tw(stagnant) < 0.7 * _heat_loss_tw(mobile)


def test_grid_convergence_of_the_stagnant_lid_heat_flow():
    """Issue #12's grid convergence in the solid stage: a 5 M_E stagnant-lid planet at 4.5 Gyr, 256 -> 512 nodes,
    its surface heat flow (the heat pipe included) within 2% and its core temperature within 1% (this model's
    tolerances; measured 178.2 and 178.0 TW, 0.1%; 8533 and 8533 K, with the split of the lowest cells; 178.7 TW
    and 8519 K without it at 256 nodes). With the rigid mixing length also bounding
    the faces nearer the core, the hot lower boundary layer, whose viscosity rises upward too, grew conductively
    to ~500 km and overturned at a time set by the grid (2.3 Gyr at 512 nodes, 4.3 Gyr at 256): 294 against
    192 TW at 4.5 Gyr."""
    runs = [evolve(spec_of(5.0, n, 4.5, convection={"scheme": "mixing-length", "regime": "stagnant-lid"}))
            for n in (256, 512)]
    coarse, fine = (_heat_loss_tw(r) for r in runs)
    assert fine == pytest.approx(coarse, rel=0.02)
    t_coarse, t_fine = (float(r.history["core_temperature"][-1]) for r in runs)
    assert t_fine == pytest.approx(t_coarse, rel=0.01)
    # the lid's base (interpolated where convection and conduction carry equal shares) moves by less than the
    # coarse grid's cell there (issue #12's criterion for layer edges; measured 126.2 and 122.5 km against an
    # 18 km cell; as a cell-face depth it was 135.4 and 130.7 km; at 1 M_E 191.5, 189.7, 189.6 km at 128, 256,
    # 512 nodes)
    lid_coarse, lid_fine = (float(r.history["lid_thickness"][-1]) for r in runs)
    r = runs[0].history.grid.radius
    j = int(np.searchsorted(r, runs[0].interior.radius - lid_coarse))
    assert 0.0 < lid_coarse and abs(lid_fine - lid_coarse) < r[j] - r[j - 1]


def test_crystallisation_direction_and_time_as_published():
    """Monteux, Andrault & Samuel 2016 (EPSL 448:140; abstract read): a fully molten Earth mantle with the
    melting curves this project's default model takes from that study solidifies from the bottom up, the
    entire mantle becoming significantly more viscous within 20 kyr, and the last fully molten silicate lies in
    the upper mantle. Asserted: the first cells to crystallise lie in the lower half of the mantle, the last
    fully molten cells in the upper quarter, and 90% of the mantle mass is below the rheological transition
    within 20 kyr (measured ~0.7 kyr: this scheme cools faster; their viscosity and boundary layers differ)."""
    r = evolve(spec_of(1.0, 64, 5e-5))
    h = r.history
    phi = h.melt_fraction
    n = h.grid.n
    first = int(np.argmax(np.any(phi < 1.0, axis=1)))
    assert np.all(np.nonzero(phi[first] < 1.0)[0] < n // 2)
    last = np.nonzero(np.any(phi >= 1.0, axis=1))[0][-1]
    assert np.all(np.nonzero(phi[last] >= 1.0)[0] >= 3 * n // 4)
    above = (phi > h.critical_melt_fraction) @ h.grid.mass / h.grid.mass.sum()
    assert above[-1] < 0.1
    assert h.time[int(np.argmax(above < 0.1))] <= 2e4 * YR


def test_bad_input_names_the_key_or_the_setting():
    """User mistakes (common practice of this project): an unknown scheme exits 2 naming convection.scheme;
    more cells than the scheme takes raise a ConfigError naming interior.mantle_nodes; a run that cannot finish
    names the planet, the model time and the setting to change."""
    from meltzone.cli import main

    res = CliRunner().invoke(main, ["run", "--set", "convection.scheme=lattice"])
    assert res.exit_code == 2 and "convection.scheme" in res.output
    with pytest.raises(ConfigError, match="interior.mantle_nodes"):
        evolve(spec_of(1.0, 4096, 0.001))
    with pytest.raises(ConvergenceError, match=r"Mars-ish.*Gyr.*run.max_steps"):
        evolve(spec_of(1.0, 32, 1.0, run={"max_steps": 100}, planet={"name": "Mars-ish"}))
