"""The basal magma ocean of the boundary-layer scheme, Earth's inner core, and the iron curve's measured range.

Sources and tolerances are named in each test. Measured values quoted in docstrings come from this code with the
reservoir on (melting.basal_magma_ocean = "reservoir", experimental, off by default) and 256 mantle nodes unless
said otherwise.
"""

from __future__ import annotations

import numpy as np
import pytest

from meltzone import evolve
from meltzone.config import PlanetSpec
from meltzone.constants import GPA, YEAR

#: Earth's inner-core radius, PREM (Dziewonski & Anderson 1981, PEPI 25:297).
PREM_INNER_CORE_M = 1221.5e3
#: Published inner-core ages [Gyr]: baseline 0.5, up to 1.7 within the parameter uncertainty (Nimmo 2015,
#: Treatise on Geophysics 2nd ed. vol. 8, "Thermal and compositional evolution of the core", abstract checked);
#: < 0.7 for a CMB heat flow above the isentropic 13.25 TW (Labrosse 2015, PEPI 247:36, abstract checked).
INNER_CORE_AGE_GYR = (0.5, 1.7)


@pytest.fixture(scope="module")
def earth():
    """Earth: 1 M_E, core fraction 0.325, defaults (no reservoir), 4.5 Gyr."""
    return evolve(PlanetSpec(mass_earth=1.0, core_mass_fraction=0.325, end_time_gyr=4.5))


@pytest.fixture(scope="module")
def earth_reservoir():
    """Earth as above with the reservoir."""
    return evolve(PlanetSpec(mass_earth=1.0, core_mass_fraction=0.325, end_time_gyr=4.5, basal_magma_ocean="reservoir"))


#: A case whose basal ocean freezes within a short run, for the reservoir's numerics: 5 M_E with the activation
#: enthalpy saturating at E + V0 P_d (high-pressure activation volume 0; with the default 1 cm^3/mol the ocean
#: outlives 10 Gyr at 1-15 M_E).
FREEZING = {"high_pressure_activation_volume_m3_mol": 0.0}


@pytest.fixture(scope="module")
def five():
    """5 M_E to 3 Gyr at 256 and 512 mantle nodes (FREEZING: its basal ocean freezes at ~1.78 Gyr)."""
    return {n: evolve(PlanetSpec(mass_earth=5.0, end_time_gyr=3.0, mantle_nodes=n, basal_magma_ocean="reservoir",
                                 **FREEZING)) for n in (256, 512)}


def _lifetime(result):
    """End of the step at which the basal ocean's thickness first stays 0 to the end [s] (None if it lasts)."""
    th = result.history["basal_ocean_thickness"]
    if th[-1] > 0.0:
        return None
    return float(result.history.time[int(len(th) - np.argmax(th[::-1] > 0.0))])


def test_reservoir_converges_with_the_mantle_nodes(five):
    """Doubling interior.mantle_nodes (256 -> 512) changes the basal ocean's largest thickness and its lifetime by
    <= 5% (the thickness is interpolated between nodes, not a node count). Tolerance 5%: asked of this model;
    measured 0.02% and 0.01% (134.0 km, 1.77 Gyr)."""
    a, b = five[256], five[512]
    assert a.history["basal_ocean_thickness"].max() > 50e3
    assert b.history["basal_ocean_thickness"].max() == pytest.approx(a.history["basal_ocean_thickness"].max(),
                                                                       rel=0.05)
    la, lb = _lifetime(a), _lifetime(b)
    assert la is not None and lb is not None
    assert lb == pytest.approx(la, rel=0.05)


def test_reservoir_closes_the_energy_budget(five, earth_reservoir):
    """With the basal ocean the stored heat (mantle + core + ocean) still balances the time-integrated surface
    loss net of radiogenic heating: |closure| <= 1e-10 (the project asks <= 1e-4; the energies are integrated
    and the mass handed from ocean to mantle is debited and credited in the same step, so it closes to
    round-off: measured <= 1e-13)."""
    for result in (*five.values(), earth_reservoir):
        assert result.history.energy_closure <= 1e-10


def test_reservoir_off_has_no_ocean_and_differs():
    """melting.basal_magma_ocean = "off" has no basal-ocean series (the summary's basal_layer then comes from the
    layer table, as before the ocean) and the lower boundary layer on the core (tests/test_pinned_results.py
    pins those runs to 1e-12); the reservoir differs from it (the ocean is a reservoir of its own: an Earth's
    core temperature at 1 Gyr moves by > 1 K)."""
    off = evolve(PlanetSpec(mass_earth=1.0, end_time_gyr=1.0, basal_magma_ocean="off"))
    on = evolve(PlanetSpec(mass_earth=1.0, end_time_gyr=1.0, basal_magma_ocean="reservoir"))
    assert "basal_ocean_thickness" not in off.history
    assert on.history["basal_ocean_thickness"].max() > 0.0
    assert abs(on.history["core_temperature"][-1] - off.history["core_temperature"][-1]) > 1.0


def test_ocean_thins_as_the_core_cools(five):
    """Labrosse, Hernlund & Coltice 2007 (Nature 450:866): the basal ocean crystallises from its top as the core
    cools. Once below its cap, its thickness falls whenever T_c falls (no step where T_c drops and the ocean
    grows by more than 1 m) and it ends at zero thickness."""
    h = five[256].history
    th, tc = h["basal_ocean_thickness"], h["core_temperature"]
    below = th < th.max()
    d_th, d_tc = np.diff(th), np.diff(tc)
    both = below[1:] & below[:-1]
    assert np.any(both)
    assert not np.any((d_tc < 0.0) & (d_th > 1.0) & both)
    assert th[-1] == 0.0


def test_basal_layer_summary_reads_the_series(five):
    """The summary's basal_layer (scheme-neutral: the scheme's series when present) reports the series' largest
    thickness exactly and its end at the step that first shows no ocean (tolerance: that step's length)."""
    r = five[256]
    s = r.summary()
    b = s["basal_layer"]
    h = r.history
    assert b["max_thickness_m"] == float(h["basal_ocean_thickness"].max())
    end = _lifetime(r)
    assert b["end_yr"] * YEAR == pytest.approx(end, rel=1e-12)
    assert b["start_yr"] == 0.0


def test_core_times_in_the_summary(five, earth):
    """Summary keys inner_core_nucleation_yr (the inner-core-nucleated event) and core_solid_yr (the inner core
    fills the core; None if never): the 5 M_E core nucleates within the run and freezes at ~0.81 Gyr (measured),
    Earth's has not frozen; when present, the nucleation precedes the freezing."""
    s5 = five[256].summary()
    assert s5["inner_core_nucleation_yr"] is not None and s5["core_solid_yr"] is not None
    assert 0.0 <= s5["inner_core_nucleation_yr"] < s5["core_solid_yr"] <= 3.0e9
    h = five[256].history
    assert h["inner_core_radius"][-1] == pytest.approx(five[256].interior.core_radius, rel=1e-9)
    se = earth.summary()
    assert se["core_solid_yr"] is None
    nucleated = [e["time_yr"] for e in se["events"] if e["kind"] == "inner-core-nucleated"]
    assert se["inner_core_nucleation_yr"] == (nucleated[0] if nucleated else None)


#: Earth with the defaults (no reservoir, 4.5 Gyr), measured: inner core 1190.9 km, nucleated at 3.13 Gyr (age
#: 1.37 Gyr), T_c 4041 K, CMB heat flow 4.93 TW. With the reservoir: 1447 km, age 1.91 Gyr. Before the activation
#: volume's high-pressure limit (V_inf = 0: the activation enthalpy saturates at E + V0 P_d) the lower boundary
#: layer at the CMB was softer, the core cooled faster and ended at 3961 K with a 1769 km inner core (age 2.50 Gyr).
#: V_inf = 1 cm^3/mol was chosen from homologous-temperature scaling (the viscosity at the solidus nearly the same
#: from 25 GPa to 1.5 TPa; tests/test_mantle_properties.py), not fitted to the inner core. The radius moves ~7 km
#: per kelvin of core temperature near PREM's size, so 10% is ~17 K of T_c, inside the +-500 K uncertainty of the
#: iron curve at the ICB (Anzellini et al. 2013).
def test_earth_inner_core_radius_against_prem(earth):
    """Earth today (4.5 Gyr, defaults): inner-core radius against PREM's 1221.5 km (Dziewonski & Anderson 1981),
    tolerance 10% (122 km; ~17 K of CMB temperature). Measured 1190.9 km (-2.5%)."""
    assert earth.history["inner_core_radius"][-1] == pytest.approx(PREM_INNER_CORE_M, rel=0.10)


def test_earth_inner_core_age(earth):
    """Earth's inner-core age (4.5 Gyr minus its nucleation) inside the published 0.5-1.7 Gyr (Nimmo 2015,
    Treatise; Labrosse 2015, PEPI 247:36: < 0.7 Gyr at high CMB heat flow; both abstracts checked); no extra
    tolerance. Measured 1.37 Gyr."""
    nucleation = earth.summary()["inner_core_nucleation_yr"]
    assert nucleation is not None
    age = 4.5 - nucleation / 1e9
    assert INNER_CORE_AGE_GYR[0] <= age <= INNER_CORE_AGE_GYR[1]


#: Published cooling of Earth's core over the last 4 Gyr [K] (Nimmo 2015, Treatise on Geophysics 2nd ed. vol. 8,
#: abstract checked: "The change in core temperature over 4 Gyr was 600-1600 K").
CORE_COOLING_4GYR_K = (600.0, 1600.0)


@pytest.mark.xfail(strict=True, reason="measured 444 K from 0.5 to 4.5 Gyr (435 K with the reservoir): the "
                   "core-mantle coupling draws 4.9 TW today against the published 12 +- 5 TW and the start is "
                   "forgotten within ~0.5 Gyr (before the high-pressure activation volume, with 6.5 TW, cores "
                   "started at 4774, 5500 and 6500 K cooled by 521, 594 and 605 K); not tuned")
def test_earth_core_cooling_over_four_gyr(earth):
    """Earth's CMB temperature falls by 600-1600 K from 0.5 to 4.5 Gyr (Nimmo 2015, abstract checked), no extra
    tolerance; the same run as the inner-core checks above."""
    h = earth.history
    t_gyr = h.time / YEAR / 1e9
    drop = float(np.interp(0.5, t_gyr, h["core_temperature"])) - float(h["core_temperature"][-1])
    assert CORE_COOLING_4GYR_K[0] <= drop <= CORE_COOLING_4GYR_K[1]


def test_iron_curve_flagged_beyond_its_static_experiments():
    """The iron melting curve (Anzellini et al. 2013) rests on static data to 200 GPa (checked in the paper's
    summary; its 330 GPa value is extrapolated); laser-shock data reach 1000 GPa (Kraus et al. 2022, Science
    375:202, range checked in the abstract) but the fit is not fitted to them: the core flag starts above
    200 GPa, 'medium' to 1000 GPa and 'low' above, each band saying which data it lies beyond."""
    from meltzone.iron import IRON_SHOCK_MAX_PA, IRON_STATIC_MAX_PA
    from meltzone.phases import core_flags

    assert IRON_STATIC_MAX_PA == 200.0 * GPA and IRON_SHOCK_MAX_PA == 1000.0 * GPA
    p = np.array([100.0, 200.0, 600.0, 999.0, 1001.0, 2000.0]) * GPA
    depth = np.linspace(3000e3, 5000e3, len(p))
    zones = core_flags(depth, p)
    assert [z["confidence"] for z in zones] == ["medium", "low"]
    assert all(z["kind"] == "extrapolated-iron-melting" for z in zones)
    assert 200.0 * GPA < zones[0]["top_pressure_pa"] <= 600.0 * GPA and zones[1]["top_pressure_pa"] > 999.0 * GPA
    assert "static experiments (200 GPa)" in zones[0]["what"]
    assert "beyond every melting measurement" in zones[1]["what"]
    assert not core_flags(depth[:2], p[:2])


def test_run_note_says_where_the_iron_curve_passes_every_measurement():
    """The closing note of a report names where the core's iron curve leaves its static data (200 GPa,
    Anzellini et al. 2013) and, deeper, where it leaves the laser-shock data too (1000 GPa, Kraus et al. 2022):
    here at the 4600 km node (1001 GPa); a core within the shock data gets no such clause."""
    from meltzone.phases import core_flags
    from meltzone.report import note_lines

    p = np.array([100.0, 200.0, 600.0, 999.0, 1001.0, 2000.0]) * GPA
    depth = np.linspace(3000e3, 5000e3, len(p))
    note = note_lines(core_flags(depth, p))[0]
    assert "extrapolated-iron-melting below 3,800 km (> 600.0 GPa; low confidence below 4,600 km, > 1,001.0 GPa)" \
        in note
    assert "low confidence" not in note_lines(core_flags(depth[:4], p[:4]))[0]


def test_ocean_melting_curve_sets_a_continuous_thickness():
    """The ocean's top is interpolated between nodes: over a 10 K range of core temperature below the cap, the
    thickness changes in steps smaller than a tenth of the node spacing (a node count would jump by whole
    spacings), and it is zero below the curve's value at the CMB (solidus - depression - enrichment)."""
    from meltzone import melting
    from meltzone._core import layout as k
    from meltzone._core.basal import basal_ocean
    from meltzone.evolution.boundary_layer import build_inputs
    from meltzone.interior import build_interior

    spec = PlanetSpec(mass_earth=1.0, basal_magma_ocean="reservoir")
    it = build_interior(spec)
    curves = melting.node_curves(melting.get_model(spec.melting.model), it.P[it.mantle])
    inputs = build_inputs(spec, it, curves)
    grid, par = inputs.grid, inputs.par
    scale = grid[k.G_TSOL, 0] / par[k.P_BMO_TREF]  # the depression scales with the solidus (default)
    floor = grid[k.G_TSOL, 0] - (par[k.P_BMO_DEP] + par[k.P_BMO_ENRICH]) * scale
    assert basal_ocean(floor - 1.0, grid, par)[1] == 0.0
    tcs = np.linspace(floor + 100.0, floor + 110.0, 401)
    r_b = np.array([basal_ocean(t, grid, par)[0] for t in tcs])
    spacing = grid[k.G_R, 1] - grid[k.G_R, 0]
    assert r_b[-1] > r_b[0] + spacing  # it crosses nodes
    assert np.max(np.abs(np.diff(r_b))) < 0.1 * spacing


def test_run_file_keeps_the_thickness_history(five, tmp_path):
    """The run file holds the ocean's thickness history: written and read back exactly (common practice: a
    round trip), with its unit; the summary of the loaded run reports the same basal layer."""
    from meltzone.results.runfile import load, write

    path = tmp_path / "five.h5"
    write(five[256], path)
    back = load(path)
    np.testing.assert_array_equal(back.history["basal_ocean_thickness"], five[256].history["basal_ocean_thickness"])
    assert back.summary()["basal_layer"] == five[256].summary()["basal_layer"]


@pytest.mark.parametrize("scaling", ["solidus", "constant"])
def test_depression_scales_with_the_solidus(scaling):
    """On a synthetic mantle with one solidus T_s at every node the ocean's curve is linear in the mass below a
    radius, so its top has a closed form (analytic solution): T_c = T_s - (dT0 + dT_fe (1 - M / M_ref)) s with
    s = T_s / T_ref for melting.basal_melt_depression_scaling = "solidus" (ideal-solution freezing-point depression
    proportional to the melting temperature: van 't Hoff, common practice) and s = 1 for "constant". At
    T_s = 3 T_ref a core 3 x (dT0 + dT_fe / 2) below T_s holds half of M_ref with the scaling, and a core
    dT0 + dT_fe / 2 below it without; tolerance 1e-9 (round-off)."""
    from meltzone._core import layout as k
    from meltzone._core.basal import basal_ocean

    n, w, t_ref, t_s, dep, dfe = 11, 1.0e22, 4000.0, 12000.0, 300.0, 500.0
    grid = np.zeros((k.N_G, n))
    grid[k.G_R] = np.linspace(3.5e6, 6.4e6, n)
    grid[k.G_W] = w
    grid[k.G_TSOL] = t_s
    par = np.zeros(k.N_PAR)
    par[k.P_BMO], par[k.P_BMO_DEP], par[k.P_BMO_ENRICH], par[k.P_BMO_MREF] = 1.0, dep, dfe, 5.0 * w
    par[k.P_CORE_RADIUS] = grid[k.G_R, 0]
    s = t_s / t_ref if scaling == "solidus" else 1.0
    par[k.P_BMO_TREF] = t_ref if scaling == "solidus" else 0.0
    tc = t_s - s * (dep + 0.5 * dfe)
    assert basal_ocean(tc, grid, par)[1] == pytest.approx(0.5 * par[k.P_BMO_MREF], rel=1e-9)
    assert basal_ocean(t_s - s * (dep + dfe) - 1.0, grid, par)[1] == 0.0


def test_depression_reference_is_earths_cmb():
    """With the scaling on, the depression keys hold at Earth's core-mantle boundary: the reference solidus is the
    default curves' solidus at PREM's 135.8 GPa (Dziewonski & Anderson 1981, from memory), within 1% of the solidus
    on a 1 M_E planet's deepest node (so Earth's ocean keeps the kelvins of the keys), and the solidus at a 10 M_E
    planet's CMB is > 2.5x it (the depression there is that much larger; 12,705 K measured)."""
    from meltzone import melting
    from meltzone.evolution.boundary_layer import basal_reference_solidus
    from meltzone.interior import build_interior

    t_ref = basal_reference_solidus()
    model = melting.get_model("peridotite-mantle")
    one = build_interior(PlanetSpec(mass_earth=1.0))
    ten = build_interior(PlanetSpec(mass_earth=10.0))
    assert float(model.solidus(one.cmb_pressure)) == pytest.approx(t_ref, rel=0.01)
    assert float(model.solidus(ten.cmb_pressure)) > 2.5 * t_ref


def test_basal_ocean_lives_longer_in_more_massive_planets():
    """Published coupled core / basal-ocean / mantle models find larger, longer-lived basal magma oceans in more
    massive planets (Lherm, Nakajima & Blackman 2026, JGR Planets 131, abstract checked: "more massive planets
    host larger BMOs with prolonged, stronger silicate dynamos"). Checked as the direction (no tolerance), with
    the defaults (boundary-layer scheme, 10 Gyr): the basal layer's end rises strictly from 1 to 3 to 5 to 8 M_E
    (measured 2.49, 5.34, 7.61, 9.93 Gyr; its largest thickness 55, 59, 69, 103 km); the reservoir lives at least
    as long at 10 M_E as at 5 M_E (measured: both outlive 10 Gyr, 134 and 152 km). With V_inf = 0 (the activation
    enthalpy saturating at E + V0 P_d) both fell with mass: the reservoir 1.77 Gyr at 5 M_E, 170 Myr at 10 M_E."""
    ends = []
    for mass in (1.0, 3.0, 5.0, 8.0):
        b = evolve(PlanetSpec(mass_earth=mass, end_time_gyr=10.0)).summary()["basal_layer"]
        assert b is not None and b["end_yr"] is not None, mass
        ends.append(b["end_yr"])
    assert all(a < b for a, b in zip(ends, ends[1:])), ends
    life = {}
    for mass in (5.0, 10.0):
        r = evolve(PlanetSpec(mass_earth=mass, end_time_gyr=10.0, basal_magma_ocean="reservoir"))
        life[mass] = np.inf if _lifetime(r) is None else _lifetime(r)
    assert life[10.0] >= life[5.0]


def _kernel_inputs(mass, fraction, scaling="solidus"):
    from meltzone import melting
    from meltzone.evolution.boundary_layer import build_inputs
    from meltzone.interior import build_interior

    spec = PlanetSpec(mass_earth=mass, basal_magma_ocean="reservoir",
                      **{"melting.basal_ocean_reference_fraction": fraction,
                         "melting.basal_melt_depression_scaling": scaling})
    it = build_interior(spec)
    curves = melting.node_curves(melting.get_model(spec.melting.model), it.P[it.mantle])
    inputs = build_inputs(spec, it, curves)
    return inputs.grid, inputs.par


@pytest.mark.parametrize("mass, fraction", [(1.0, 0.02), (1.0, 0.33), (1.0, 0.5), (5.0, 0.5)])
def test_ocean_mass_is_continuous_in_the_core_temperature(mass, fraction):
    """The ocean's mass rises continuously and monotonically with T_c from 0 (below the melting curve at the CMB) to
    M_ref: it solves T_c = T_max(M_b) - dT(M_b) (the melt's curve at its hottest point), whose slope in M_b is at
    least dT_fe s_min / M_ref (s_min the smallest depression scale T_sol / T_ref below the cap), so a step of dT in
    T_c moves M_b by at most dT M_ref / (dT_fe s_min) (analytic bound, 1e-9 round-off allowance). At M_ref = 0.33 of
    Earth's mantle the former top condition (the curve at the top alone, which falls upward there) left no top:
    the whole 1.3e24 kg ocean froze at one core temperature (3370.0 K) and the time step collapsed."""
    from meltzone._core import layout as k
    from meltzone._core.basal import basal_ocean

    grid, par = _kernel_inputs(mass, fraction)
    m_ref, dep, dfe, t_ref = par[k.P_BMO_MREF], par[k.P_BMO_DEP], par[k.P_BMO_ENRICH], par[k.P_BMO_TREF]
    below = np.cumsum(grid[k.G_W]) <= m_ref + grid[k.G_W]
    s_min = grid[k.G_TSOL, below].min() / t_ref
    s_max = grid[k.G_TSOL, below].max() / t_ref
    floor = grid[k.G_TSOL, 0] - (dep + dfe) * grid[k.G_TSOL, 0] / t_ref
    top = grid[k.G_TSOL, below].max() - dep * s_max
    step = 0.05
    tcs = np.arange(floor - 1.0, top + 1.0, step)
    mb = np.array([basal_ocean(t, grid, par)[1] for t in tcs])
    assert mb[0] == 0.0 and mb[-1] == m_ref
    assert np.all(np.diff(mb) >= 0.0)
    assert np.max(np.diff(mb)) <= step * m_ref / (dfe * s_min) * (1.0 + 1e-9)


@pytest.mark.parametrize("mass, fraction", [(1.0, 0.33), (1.0, 0.5), (5.0, 0.5)])
def test_large_reference_fraction_runs_to_its_end(mass, fraction):
    """Large basal oceans (the key's range reaches 0.5 of the mantle; Labrosse et al. 2007 start from ~1/3) run to
    10 Gyr with the energy budget closed to 1e-10 (the run's relative closure error, History.energy_closure; the
    tolerance of test_reservoir_closes_the_energy_budget; measured <= 1e-14). Measured: 1 M_E keeps its ocean at 10 Gyr
    (1212 and 1683 km at most, measured with V_inf = 0). Before, 0.33 at 1 M_E stopped at 2.22 Gyr
    (the time step collapsed) and 0.5 at 760 yr."""
    r = evolve(PlanetSpec(mass_earth=mass, end_time_gyr=10.0, basal_magma_ocean="reservoir",
                          **{"melting.basal_ocean_reference_fraction": fraction}))
    h = r.history
    assert h.time[-1] == pytest.approx(10.0e9 * YEAR, rel=1e-9)
    assert h.energy_closure <= 1e-10
    assert h["basal_ocean_thickness"].max() > 0.0


@pytest.mark.parametrize("mass, fraction, scaling", [(1.0, 0.02, "solidus"), (1.0, 0.33, "constant"),
                                                     (10.0, 0.02, "constant"), (10.0, 0.33, "solidus")])
def test_ocean_top_against_a_plain_root_solve(mass, fraction, scaling):
    """The kernel's closed-form top of the basal ocean (meltzone._core.basal._segment_root) against a plain
    reference written from the rule in basal_ocean's docstring: the node masses M_0 = 0, M_j = sum_{i<j} w_i +
    w_j / 2; the solidus linear in M between nodes; its running maximum T_max(M); the curve
    T_max (1 - (dT0 + dT_fe (1 - M / M_ref)) / T_ref) (or T_max - dT0 - dT_fe (1 - M / M_ref) without the
    scaling), solved for M = M_b with scipy's brentq over 200 core temperatures from below the curve at the CMB
    to above it at M_ref; the radius linear in M. Tolerance 1e-9 relative (the closed form and the former
    60-step bisection agree to 6e-13 over 0.5-10 M_E, both fractions and both scalings)."""
    from scipy.optimize import brentq

    from meltzone._core import layout as k
    from meltzone._core.basal import basal_ocean

    grid, par = _kernel_inputs(mass, fraction, scaling)
    w, tsol, r = grid[k.G_W], grid[k.G_TSOL], grid[k.G_R]
    m_nodes = np.concatenate([[0.0], np.cumsum(w)[:-1] + 0.5 * w[1:]])
    m_ref = par[k.P_BMO_MREF]
    t_ref = par[k.P_BMO_TREF]
    dep, enrich = par[k.P_BMO_DEP], par[k.P_BMO_ENRICH]

    def curve(m):
        t_hot = max(np.max(tsol[m_nodes <= m], initial=tsol[0]), float(np.interp(m, m_nodes, tsol)))
        scale = t_hot / t_ref if t_ref > 0.0 else 1.0
        return t_hot - (dep + enrich * (1.0 - m / m_ref)) * scale

    m_top = min(m_ref, m_nodes[-1])
    for tc in np.linspace(curve(0.0) - 50.0, curve(m_top) + 50.0, 200):
        r_b, m_b, _ = basal_ocean(tc, grid, par)
        if tc <= curve(0.0):
            assert m_b == 0.0
            continue
        want = m_top if tc >= curve(m_top) else brentq(lambda m: curve(m) - tc, 0.0, m_top, xtol=1e-12 * m_top,
                                                          rtol=1e-14)
        assert m_b == pytest.approx(want, rel=1e-9)
        assert r_b == pytest.approx(float(np.interp(want, m_nodes, r)), rel=1e-9)
