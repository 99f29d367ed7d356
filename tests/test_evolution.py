"""Thermal evolution against handbook values, published ranges, analytic solutions and a scipy reference."""

from __future__ import annotations

import math

import numpy as np
import pytest

from meltzone.config import PlanetSpec
from meltzone.constants import GYR, YEAR
from meltzone.evolution.heating import BSE_MASS, radiogenic_power
from meltzone.layers import summarize
from meltzone.pipeline import evolve


# ------------------------------------------------------------------ radiogenic heating
def test_bse_radiogenic_power_today():
    """Bulk silicate Earth today: 19.9 +- 3.0 TW (McDonough, Sramek & Wipperfurth 2020), from the
    Turcotte & Schubert (2002, Table 4.2) heat productions and McDonough & Sun 1995 abundances."""
    assert radiogenic_power(BSE_MASS) == pytest.approx(19.9e12, abs=3.0e12)


def test_radiogenic_decay_law():
    """Each isotope halves over its half-life (Turcotte & Schubert Table 4.2): 4.5 Gyr ago the BSE produced
    sum_i H_i 2^(4.5 Gyr / t_half,i), computed here independently of the package (~4.8x today, derived)."""
    today = {"U-238": (9.46e-5, 4.47e9, 20.3e-9 * 0.9927), "U-235": (5.69e-4, 7.04e8, 20.3e-9 * 0.0072),
             "Th-232": (2.64e-5, 1.40e10, 79.5e-9), "K-40": (2.92e-5, 1.25e9, 240e-6 * 1.19e-4)}
    then = sum(h * c * 2 ** (4.5e9 / t) for h, t, c in today.values()) * BSE_MASS
    assert radiogenic_power(BSE_MASS, 4.5 * GYR) == pytest.approx(then, rel=1e-10)
    assert then / radiogenic_power(BSE_MASS) == pytest.approx(4.8, abs=0.3)


#: The chondritic melting curves for the solid-start tests: 1700 K at the surface is below their solidus (1661 K)
#: + phi_c of the interval, but 46% molten (batch) on the default peridotite curves (solidus 1394 K, liquidus 2053 K).
CHONDRITIC = {"model": "whole-mantle-sg"}


# ------------------------------------------------------------------ Earth hindcast
@pytest.fixture(scope="module")
def earth():
    """1 M_E, CMF 0.325, mobile lid, default abundances and parameters (Tosi et al. 2017, A&A 605:A71,
    Table 1), run to 4.5 Gyr."""
    return evolve(PlanetSpec(mass_earth=1.0, core_mass_fraction=0.325, regime="mobile-lid", end_time_gyr=4.5))


def test_earth_potential_temperature(earth):
    """Mantle potential temperature today 1350 C (Herzberg, Condie & Korenaga 2010, EPSL 292:79); MORB sources
    1280-1400 C (Herzberg et al. 2007): the model lands inside 1280-1400 C."""
    tp_c = earth.history["upper_temperature"][-1] - 273.15
    assert 1280.0 <= tp_c <= 1400.0


@pytest.mark.xfail(strict=True, reason="measured 4.93 TW, 1.4% under the range: the default high-pressure activation "
                   "volume (1 cm^3/mol, homologous scaling) stiffens the lower boundary layer at the CMB, so the core "
                   "stays warm enough for PREM's inner core (1191 km, tests/test_basal_ocean.py) but draws less than "
                   "5 TW (6.5 TW with V_inf = 0, with a 1769 km inner core); not tuned")
def test_earth_cmb_heat_flow(earth):
    """CMB heat flow 5-15 TW (Lay, Hernlund & Buffett 2008, Nat. Geosci. 1:25)."""
    assert 5e12 <= earth.history["cmb_heat_flow"][-1] <= 15e12


@pytest.mark.xfail(strict=True, reason="boundary-layer scaling with beta = 1/3 equilibrates the mantle with "
                   "its heating within ~1 Gyr, so today's heat flow is ~27 TW and the Urey ratio ~0.7: the "
                   "Urey-ratio paradox of classical parameterized convection (Korenaga 2008, Rev. Geophys. "
                   "46:RG2007); known limitation. The weak-scaling hindcast below comes within 0.5% of the range "
                   "(42.8 TW)")
def test_earth_surface_heat_flow(earth):
    """Surface heat flow 46 +- 3 TW (Jaupart et al. 2007, Treatise on Geophysics)."""
    assert 43e12 <= earth.history["surface_heat_flow"][-1] <= 49e12


@pytest.mark.xfail(strict=True, reason="see test_earth_surface_heat_flow: classical scaling gives Ur ~0.7")
def test_earth_urey_ratio(earth):
    """Bulk Earth Urey ratio "probably ~0.35" (Korenaga 2008, Rev. Geophys. 46:RG2007, abstract; checked);
    accepted 0.2-0.5 (this project's tolerance)."""
    h = earth.history
    assert 0.2 <= h["radiogenic_power"][-1] / h["surface_heat_flow"][-1] <= 0.5


def test_earth_cools_at_a_plausible_rate(earth):
    """Potential temperature 1500-1600 C at 2.5-3 Ga (Herzberg et al. 2010): the model is hotter 2 Gyr before
    the end than at the end, and by less than 300 K."""
    h = earth.history
    t = h["time"]
    then = np.interp(t[-1] - 2.0 * GYR, t, h["upper_temperature"])
    assert 0.0 < then - h["upper_temperature"][-1] < 300.0


# ------------------------------------------------------------------ Earth hindcast with a weak scaling
#: Plate tectonics whose heat flow barely depends on mantle viscosity (beta ~ 0; Christensen 1985, JGR
#: 90:2995; Korenaga 2008, Rev. Geophys. 46:RG2007; from memory). beta and a are this project's calibration:
#: chosen in a scan (beta 0-0.03, a 32-56) so that today's potential temperature and surface heat flow land
#: inside their ranges. The CMB heat flow, the Urey ratio and the Archean temperatures are then predictions.
WEAK = {"beta": 0.015, "nusselt_prefactor": 40.0}


@pytest.fixture(scope="module")
def earth_weak():
    """1 M_E, CMF 0.325, mobile lid, default abundances and start (fully molten), WEAK scaling, to 4.5 Gyr. The
    magma ocean and its solidification run with the classical law; WEAK applies once the top has reached phi_c."""
    return evolve(PlanetSpec(mass_earth=1.0, core_mass_fraction=0.325, regime="mobile-lid", end_time_gyr=4.5,
                             **WEAK))


def _after_magma_ocean(h):
    """Index of the first history row after the magma ocean."""
    return int(np.argmax(h["regime"] != 0))


@pytest.mark.xfail(strict=True, reason="measured 1268 C, 4.66 TW, Urey ratio 0.48: the potential temperature 12 K "
                   "and the CMB heat flow 0.34 TW under their ranges (1292 C and 6.3 TW with V_inf = 0, the "
                   "activation enthalpy saturating at E + V0 P_d): the stiffer lower boundary layer draws less heat "
                   "from the core into the mantle; not tuned")
def test_weak_scaling_earth_today(earth_weak):
    """Present Earth: potential temperature 1280-1400 C (Herzberg et al. 2007, 2010); CMB heat flow 5-15 TW (Lay,
    Hernlund & Buffett 2008); bulk Urey ratio ~0.35 (Korenaga 2008, checked), accepted 0.2-0.5 (this project's
    tolerance); the surface heat flow in the test below. The Urey ratio divides by the planet's whole loss, the
    surface heat flow plus volcanic_heat_flow (0 under this mobile lid: the ridges' melt heat is inside the plate's
    flux). Measured with the defaults (peridotite curves, density-dependent properties, viscosity at the upper
    boundary layer's base, volcanism on, the liquid-iron core isentrope, high-pressure activation volume
    1 cm^3/mol): 1268 C, 4.66 TW, 0.48."""
    h = earth_weak.history
    heat_out = h["surface_heat_flow"][-1] + h["volcanic_heat_flow"][-1]
    assert 1280.0 <= h["upper_temperature"][-1] - 273.15 <= 1400.0
    assert 5e12 <= h["cmb_heat_flow"][-1] <= 15e12
    assert 0.2 <= h["radiogenic_power"][-1] / heat_out <= 0.5


@pytest.mark.xfail(strict=True, reason="measured 41.67 TW, 4% under the range (42.78 TW before the high-pressure "
                   "activation volume, 43.43 TW with the former epsilon-iron core profile): the stiffer lower boundary "
                   "layer lowers the CMB heat flow from 6.3 to 4.66 TW and the potential temperature from 1292 to "
                   "1268 C; not tuned")
def test_weak_scaling_earth_surface_heat_flow(earth_weak):
    """Present Earth's whole heat loss 46 +- 3 TW (Jaupart et al. 2007, Treatise on Geophysics): the surface heat
    flow plus volcanic_heat_flow, every path the model has; no extra tolerance."""
    h = earth_weak.history
    heat_out = h["surface_heat_flow"][-1] + h["volcanic_heat_flow"][-1]
    assert 43e12 <= heat_out <= 49e12


def test_weak_scaling_stage_never_turns_back_into_a_magma_ocean(earth_weak):
    """The warming mantle of the plate-tectonic stage peaks above the potential temperature at which its adiabat
    is 40% molten at the surface (batch), but stays solid-state convection: the regime follows the isentropic
    melt fraction once the top has been below phi_c (McKenzie & Bickle 1988 batch isentropic melting)."""
    from meltzone.melting import melt_fraction

    h = earth_weak.history
    grid = h.grid
    after = _after_magma_ocean(h)
    peak = float(np.max(h["upper_temperature"][after:]))
    top_of_adiabat = peak * earth_weak.interior.adiabat[-1]
    assert melt_fraction(top_of_adiabat, grid.solidus[-1], grid.liquidus[-1], 0.0, 0.0, 0) > h.critical_melt_fraction
    assert not np.any(h["regime"][after:] == 0)


def test_weak_scaling_archean_mantle(earth_weak):
    """Potential temperature rising from 1350 C today to a maximum of ~1500-1600 C at 2.5-3.0 Ga (Herzberg,
    Condie & Korenaga 2010, EPSL 292:79, abstract; checked); their individual estimates carry ~50 K (from
    memory): asserted within 1450-1650 C. Measured: 1545 C at 2.5 Ga and 1568 C at 3.0 Ga, so the model cools
    ~250 K since 3 Ga against their ~200 K (1605 and 1641 C before the peridotite curves)."""
    h = earth_weak.history
    t = h["time"]
    for age in (2.5, 3.0):
        tp = np.interp(t[-1] - age * GYR, t, h["upper_temperature"]) - 273.15
        assert 1450.0 <= tp <= 1650.0


def test_weak_scaling_mantle_warms_then_cools(earth_weak):
    """"The mantle was warming in deep Archean-Hadean time because internal heating exceeded surface heat loss,
    and it has been cooling from 2.5 to 3.0 Ga to the present" (Herzberg, Condie & Korenaga 2010, abstract;
    checked). After the magma ocean, the model's peak lies inside the run, more than 100 K above the start of
    the plate-tectonic stage, and at least 2.5 Gyr before the end (measured: 1570 C at 3.2 Ga; 1652 C at 3.4 Ga
    on the chondritic curves)."""
    h = earth_weak.history
    after = _after_magma_ocean(h)
    tu = h["upper_temperature"][after:]
    peak = int(np.argmax(tu))
    assert 0 < peak < len(tu) - 1
    assert tu[peak] - tu[0] > 100.0
    assert h["time"][-1] - h["time"][after + peak] >= 2.5 * GYR


def test_switch_lands_on_the_crossing_whatever_the_step():
    """The solidification switch (History.switch_times["rheological_switch"]) is located on the first phi_c
    crossing, so it and the final state do not depend on the temperature-step bound (measured without the basal
    magma ocean: 204.50-204.56 kyr and 1334.16 C at 10, 2 and 0.5 K). With the basal magma ocean the lower boundary
    layer sits on the ocean's top, where the mantle is more molten and the core-mantle coupling stiffer: at rtol
    1e-7 the 10 K run is 0.2% late (200.90 against 200.47 kyr), at rtol 1e-9 the runs agree to 2e-6 (200.453 kyr),
    so the test runs at rtol 1e-9."""
    runs = [evolve(PlanetSpec(mass_earth=1.0, end_time_gyr=4.5, max_temperature_step_k=dt, rtol=1e-9, **WEAK))
            for dt in (10, 1)]
    t_solid = [r.history.switch_times["rheological_switch"] for r in runs]
    assert t_solid[0] == pytest.approx(t_solid[1], rel=1e-3)
    assert runs[0].history["upper_temperature"][-1] == pytest.approx(runs[1].history["upper_temperature"][-1],
                                                                      abs=0.1)


def test_switch_row_matches_its_rebuilt_profile(earth_weak):
    """The history row at the switch holds the solidified mantle's state, the same as the scheme's rebuild at that
    time (post-processing re-evaluates the scheme at recorded times): profile and regime melt fraction to 1e-9."""
    h = earth_weak.history
    switch = h.switch_times["rheological_switch"]
    s = int(np.argmin(np.abs(h.time - switch)))
    assert h.time[s] == switch
    inside = h.at(h.time[s])
    assert np.allclose(inside.temperature, h.temperature[s], rtol=1e-9, atol=0.0)
    assert inside.regime_melt_fraction == pytest.approx(h["top_melt_fraction"][s], rel=1e-9, abs=1e-12)


def test_magma_ocean_forms_again_when_the_solid_law_cannot_carry_the_heat():
    """A weak law far from its calibration (beta 0, a 20) loses less heat than the young Earth makes: the
    solidified mantle warms until its isentropic melt at the top passes phi_c (phi_c L / c_p ~ 220 K above the
    batch threshold) and the magma ocean forms again; the run reports it and stays cheap (no pinning stiffness)."""
    r = evolve(PlanetSpec(mass_earth=1.0, end_time_gyr=4.5, beta=0.0, nusselt_prefactor=20.0))
    s = summarize(r)
    assert s["magma_ocean_end_yr"] < 1e6
    assert s["magma_ocean_reformed_yr"] is not None and s["magma_ocean_reformed_yr"] > s["magma_ocean_end_yr"]
    assert s["magma_ocean_at_end"]
    assert len(r.time) < 5000


def test_solid_start_that_melts_later_has_no_first_magma_ocean():
    """A run that starts below the transition and warms into a magma ocean later: the first magma ocean is
    "none" (end null, magma_ocean_at_start false), the later one is reported as formed again, and the sweep
    flags follow the events."""
    from meltzone.sweep.worker import outcomes

    r = evolve(PlanetSpec(mass_earth=1.0, end_time_gyr=4.5, upper_temperature_k=1700.0, beta=0.0,
                          nusselt_prefactor=20.0, **CHONDRITIC))
    s = summarize(r)
    assert s["magma_ocean_end_yr"] is None and s["magma_ocean_at_start"] is False
    again = s["magma_ocean_reformed_yr"]
    assert again is not None and again > 0.0
    ends = [e["time_yr"] for e in s["events"] if e["kind"] == "magma-ocean-ended"]
    _, during = outcomes(s, r, 0.5 * (again + (ends[0] if ends else s["end_time_yr"])))
    assert during["magma_ocean_at_age"] == 1 and during["magma_ocean_reformed"] == 1
    _, before = outcomes(s, r, 0.5 * again)
    assert before["magma_ocean_at_age"] == 0
    assert during["magma_ocean_persists"] == int(s["magma_ocean_at_end"])


def test_weak_scaling_magma_ocean_ends_early(earth_weak):
    """Earth's magma ocean ended within ~100 Myr of accretion (Elkins-Tanton 2008, EPSL 271:181; from memory);
    the weak scaling only starts after it, so the bare-surface lifetime is the default run's."""
    assert summarize(earth_weak)["magma_ocean_end_yr"] < 1e8


# ------------------------------------------------------------------ numerics
def test_energy_closure(earth):
    """Stored-heat change equals the integrated (surface loss - radiogenic) to 1e-4 (required); the energy
    formulation makes it close to round-off."""
    assert earth.energy_closure <= 1e-4
    assert np.max(np.abs(earth.history["closure_error"])) <= 1e-9


def test_tolerance_halving_moves_magma_ocean_end_little():
    """Halving run.rtol moves the magma-ocean end time by <= 1% (required)."""
    a = summarize(evolve(mass_earth=1.0, end_time_gyr=0.01))["surface_magma_ocean_end_yr"]
    b = summarize(evolve(mass_earth=1.0, end_time_gyr=0.01, rtol=5e-8))["surface_magma_ocean_end_yr"]
    assert a is not None and b is not None
    assert abs(a / b - 1.0) <= 0.01


def test_temperature_step_is_bounded():
    """No accepted step changes T_u or T_c by more than 1.5 x run.max_temperature_step_k."""
    r = evolve(mass_earth=2.0, end_time_gyr=1.0, max_temperature_step_k=5.0)
    for name in ("upper_temperature", "core_temperature"):
        assert np.max(np.abs(np.diff(r.history[name]))) <= 7.5


# ------------------------------------------------------------------ magma ocean
def test_magma_ocean_bare_surface_lifetime():
    """Bare radiating Earth-mass planet: the surface reaches the rheological transition after 1e3-1e6 yr, the
    orders of magnitude of ~1 kyr (Lebrun et al. 2013, JGR Planets 118; from memory) to ~20 kyr for the deep
    mantle to stiffen (Monteux et al. 2016, EPSL 448:140); this model's single potential temperature makes
    the whole mantle cool through the final approach, so it sits at the long end."""
    end = summarize(evolve(mass_earth=1.0, end_time_gyr=0.05))["surface_magma_ocean_end_yr"]
    assert 1e3 <= end <= 1e6


def test_magma_ocean_lifetime_follows_the_blend_width():
    """Model sensitivity, not an outside value: the bare Earth's surface takes longer to reach phi_c when the
    solid-to-magma-ocean transition is wider (measured with the default peridotite curves: 0.36, 0.84 and 1.54 Myr
    at widths 0.02, 0.05 and 0.1; 0.09, 0.20 and 0.38 Myr on the chondritic curves, whose surface solidus is 267 K
    higher, so the top reaches phi_c at a hotter T_u, sooner). The default width keeps inside the published orders
    of magnitude of the test above; the widest takes 1.5 Myr."""
    ends = [summarize(evolve(mass_earth=1.0, end_time_gyr=0.05, rheology_blend_width=w))["surface_magma_ocean_end_yr"]
            for w in (0.02, 0.05, 0.1)]
    assert ends[0] < ends[1] < ends[2]
    assert 1e3 <= ends[0] and ends[1] <= 1e6 and ends[2] <= 1e7


def test_magma_ocean_steam_atmosphere_lasts_longer():
    """A thick steam atmosphere (1.4e21 kg H2O, ~one ocean, plus CO2) delays the end of the magma ocean
    (Lebrun et al. 2013: by ~1 Myr; Hamano, Abe & Genda 2013, Nature 497:607: within several Myr beyond the
    critical distance); accepted 1e5-1e8 yr and longer than the bare planet."""
    bare = summarize(evolve(mass_earth=1.0, end_time_gyr=0.05))["surface_magma_ocean_end_yr"]
    steam = summarize(evolve(mass_earth=1.0, end_time_gyr=0.05, atmosphere="grey", water_inventory_kg=1.4e21,
                             co2_inventory_kg=1.0e20))["surface_magma_ocean_end_yr"]
    assert steam > bare
    assert 1e5 <= steam <= 1e8


# ------------------------------------------------------------------ conductive lid
@pytest.fixture(scope="module")
def lid_run():
    """Stagnant lid growing on a mantle that neither convects (huge viscosity: the largest allowed prefactor and
    activation energy, ~1e47 Pa s at 1600 K) nor is heated: pure conduction. The heat-balance-integral growth law
    (the base-flux law has its own tests in tests/test_lid_growth.py)."""
    spec = PlanetSpec(mass_earth=1.0, regime="stagnant-lid", upper_temperature_k=1600.0, core_temperature_k=2700.0,
                      radiogenic_scale=0.0, viscosity_prefactor_pa_s=1e15, activation_energy_j_mol=1e6,
                      end_time_gyr=0.2, lid_growth_law="heat-balance-integral")
    return evolve(spec)


def test_lid_growth_integral_solution(lid_run):
    """With no flux from below, rho c (T_u - T_lm) dD/dt = k (T_l - T_s)/D integrates to
    D^2 = D0^2 + 2 k (T_l - T_s) t / (rho c (T_u - T_lm)) (heat-balance integral, Goodman 1958); the model's
    lid follows it within 3% (T_u drifts by a few K over the run)."""
    r = lid_run
    h = r.history
    cv = r.spec.convection
    rho_c = r.interior.rho[-1] * cv.mantle_heat_capacity
    t = h["time"]
    sel = t > 1e6 * YEAR
    dt_lid = h["lid_base_temperature"] - h["surface_temperature"]
    dt_mean = h["upper_temperature"] - 0.5 * (r.spec.surface.equilibrium_temperature_k + h["lid_base_temperature"])
    rate = 2 * cv.thermal_conductivity * dt_lid / (rho_c * dt_mean)
    d2 = 1e3**2 + np.concatenate([[0.0], np.cumsum(0.5 * (rate[1:] + rate[:-1]) * np.diff(t))])
    assert np.allclose(h["lid_thickness"][sel], np.sqrt(d2[sel]), rtol=0.03)


def test_lid_heat_flow_half_space(lid_run):
    """The lid's surface heat flow against half-space cooling, q = k (T_l - T_s) / sqrt(pi kappa t)
    (Turcotte & Schubert, Geodynamics, eq. 4.127), kappa = k / (rho c): within 15% (the linear profile of the
    integral method is ~3-12% off the error function, Goodman 1958)."""
    r = lid_run
    h = r.history
    cv = r.spec.convection
    kappa = cv.thermal_conductivity / (r.interior.rho[-1] * cv.mantle_heat_capacity)
    area = 4 * math.pi * r.interior.radius ** 2
    t = h["time"]
    sel = t > 5e6 * YEAR
    q_model = h["surface_heat_flow"][sel] / area
    q_half = cv.thermal_conductivity * (h["lid_base_temperature"][sel] - h["surface_temperature"][sel]) / np.sqrt(
        math.pi * kappa * t[sel])
    assert np.allclose(q_model, q_half, rtol=0.15)


# ------------------------------------------------------------------ super-Earths and inputs
@pytest.mark.parametrize("mass,regime", [(0.5, "mobile-lid"), (5.0, "stagnant-lid"), (15.0, "mobile-lid")])
def test_runs_across_the_mass_range(mass, regime):
    """0.5-15 M_E in both regimes: finishes, finite, closes its budget, cools overall."""
    r = evolve(mass_earth=mass, regime=regime, end_time_gyr=10.0)
    h = r.history
    for name in ("upper_temperature", "core_temperature", "surface_heat_flow", "melt_mass"):
        assert np.all(np.isfinite(h[name])), name
    assert r.energy_closure <= 1e-4
    assert h["upper_temperature"][-1] < h["upper_temperature"][0]
    assert h["time"][-1] == pytest.approx(10.0 * GYR)


def test_default_start_is_fully_molten():
    """Default initial state: above the liquidus at every mantle node (melt fraction 1 everywhere)."""
    r = evolve(mass_earth=3.0, end_time_gyr=1e-6)
    _, phi = r.profile(0)
    assert np.all(phi[1:-1] == 1.0)


def test_evolve_accepts_dict_and_toml(tmp_path):
    """The API takes a mapping shaped like the TOML file or a TOML path, with the same result."""
    spec = PlanetSpec({"planet": {"mass_earth": 2.0}, "run": {"end_time_gyr": 0.01}})
    path = tmp_path / "p.toml"
    path.write_text(spec.to_toml())
    a = evolve({"planet": {"mass_earth": 2.0}, "run": {"end_time_gyr": 0.01}})
    b = evolve(str(path))
    assert np.array_equal(a.history["upper_temperature"], b.history["upper_temperature"])


def test_recorded_budget_balances(earth):
    """Independent of the kernel's own integral: the trapezoid integral of the recorded heat out less the radiogenic
    power over the history equals the drop of the stored heat recomputed from the recorded temperatures, to the
    trapezoid rule's accuracy on these steps (1%). The heat out is every path: the surface heat flow plus the heat
    the extracted melt takes out of the mantle (volcanic_heat_flow, not in surface_heat_flow; volcanism is on by
    default: without it the sum misses 2.6% of the drop, with it it closes to 7e-4, measured)."""
    h = earth.history
    heat_out = h["surface_heat_flow"] + h["volcanic_heat_flow"]
    net = heat_out - h["radiogenic_power"]
    out = np.concatenate([[0.0], np.cumsum(0.5 * np.diff(h["time"]) * (net[1:] + net[:-1]))])
    drop = h["stored_energy"][0] - h["stored_energy"]
    assert out[-1] == pytest.approx(drop[-1], rel=0.01)
    assert np.max(np.abs(out - drop)) <= 0.01 * np.max(np.abs(drop))


def test_growing_buffers_do_not_change_the_run():
    """Regression: when the interval buffer filled, the step was resumed from the advanced state under the old
    time. A run that grows tiny buffers many times must equal one that never fills them, bit for bit."""
    from meltzone import melting
    from meltzone.evolution import boundary_layer
    from meltzone.interior import build_interior

    spec = PlanetSpec(mass_earth=1.0, end_time_gyr=0.5, mantle_nodes=64)
    interior = build_interior(spec)
    curves = melting.node_curves(melting.get_model(spec.melting.model), interior.P[interior.mantle])
    big = boundary_layer.run(spec, interior, curves, history_rows=100000, interval_rows=100000)
    small = boundary_layer.run(spec, interior, curves, history_rows=8, interval_rows=8)
    assert np.array_equal(big.time, small.time)
    assert all(np.array_equal(big.series[k], small.series[k]) for k in big.series)
    assert np.array_equal(big.temperature, small.temperature)
    assert all(np.array_equal(big.intervals[k], small.intervals[k]) for k in big.intervals)


def test_coreless_planet_evolves():
    """core_mass_fraction = 0 is allowed: no bottom boundary layer, no core heat flow, a finite run."""
    r = evolve(mass_earth=2.0, core_mass_fraction=0.0, end_time_gyr=0.5)
    assert np.all(r.history["cmb_heat_flow"] == 0.0)
    assert np.all(np.isfinite(r.history["upper_temperature"]))
    assert r.energy_closure <= 1e-4


def test_history_keeps_the_contract(earth):
    """The boundary-layer History fulfils the evolution contract (meltzone.evolution.contract: required series,
    shapes, interval fields; History.check raises otherwise) and its recorded melt fraction is the melt law of
    its recorded temperature on the mantle grid (meltzone.melting.melt_fraction, linear law; tolerance 1e-12)."""
    from meltzone.melting import melt_fraction

    h = earth.history
    h.check()
    assert h.temperature.shape == (len(h.time), h.grid.n)
    phi = melt_fraction(h.temperature, h.grid.solidus, h.grid.liquidus, 0.0, 0.0, 0)
    assert np.allclose(phi, h.melt_fraction, rtol=0.0, atol=1e-12)
    assert h.switch_times["rheological_switch"] is not None


def test_history_check_rejects_a_broken_history(earth):
    """History.check names what breaks the contract: a missing required series and a profile of the wrong shape
    (common practice: a validator that cannot fail is a defect)."""
    import dataclasses

    h = earth.history
    broken = dataclasses.replace(h, series={k: v for k, v in h.series.items() if k != "core_temperature"})
    with pytest.raises(ValueError, match="core_temperature"):
        broken.check()
    with pytest.raises(ValueError, match="profiles"):
        dataclasses.replace(h, temperature=h.temperature[:, 1:]).check()


def test_solid_start_has_its_switch_at_the_start():
    """A run that starts below the rheological transition has its switch time at the start (t = 0); a run that
    never reaches it reports None (the contract's "nothing happened")."""
    solid = evolve(mass_earth=1.0, end_time_gyr=0.01, upper_temperature_k=1700.0, **CHONDRITIC)
    assert solid.history.switch_times["rheological_switch"] == 0.0
    molten = evolve(mass_earth=1.0, end_time_gyr=1e-6)
    assert molten.history.switch_times["rheological_switch"] is None
