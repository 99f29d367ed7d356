"""Sweep specs: validation, the sampling designs against their defining properties, binomial errors, and the
core-fraction inversion against the interior solver (round trip) and Zeng et al. 2016.

No thermal evolution runs here (fast)."""

import math
from pathlib import Path

import numpy as np
import pytest
from scipy import stats

from meltzone.constants import EARTH_RADIUS
from meltzone.errors import ConfigError
from meltzone.interior import build_interior
from meltzone.sweep import EXAMPLE_SPEC, binomial_estimate, infer_core_fraction, load_spec

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"


def spec(mode, params, samples=None, seed=None, **extra):
    sweep = {"mode": mode}
    if samples is not None:
        sweep["samples"] = samples
    if seed is not None:
        sweep["seed"] = seed
    return {"sweep": sweep, "base": {"run": {"end_time_gyr": 0.1}}, "parameters": params, **extra}


# ---------------------------------------------------------------- grid
def test_grid_is_the_cartesian_product_last_fastest():
    s = load_spec(spec("grid", {"planet.mass_earth": {"values": [1, 2, 4]},
                                "convection.regime": {"values": ["mobile-lid", "stagnant-lid"]}}))
    a = s.design().assignments
    assert s.n_cases == 6 and len(a) == 6
    assert [x["planet.mass_earth"] for x in a] == [1.0, 1.0, 2.0, 2.0, 4.0, 4.0]
    assert [x["convection.regime"] for x in a] == ["mobile-lid", "stagnant-lid"] * 3
    assert isinstance(a[0]["planet.mass_earth"], float)


# ---------------------------------------------------------------- Latin hypercube
def test_latin_hypercube_one_sample_per_stratum():
    """McKay, Beckman & Conover 1979 (Technometrics 21:239): with n samples, each of the n equal strata of
    every dimension holds exactly one sample (in log10 for a log-scaled parameter)."""
    n = 37
    s = load_spec(spec("latin-hypercube", {
        "planet.mass_earth": {"min": 0.5, "max": 15.0, "scale": "log"},
        "planet.core_mass_fraction": {"min": 0.1, "max": 0.5},
        "heating.radiogenic_scale": {"min": 0.2, "max": 5.0}}, samples=n, seed=42))
    cols = s.design().columns
    u = {
        "mass_earth": (np.log10(cols["mass_earth"]) - math.log10(0.5)) / (math.log10(15.0) - math.log10(0.5)),
        "core_mass_fraction": (cols["core_mass_fraction"] - 0.1) / 0.4,
        "radiogenic_scale": (cols["radiogenic_scale"] - 0.2) / 4.8,
    }
    for name, v in u.items():
        strata = np.floor(np.clip(v, 0, 1 - 1e-12) * n).astype(int)
        assert sorted(strata) == list(range(n)), name


def test_integer_keys_are_rounded():
    s = load_spec(spec("latin-hypercube", {"interior.mantle_nodes": {"min": 64, "max": 256}}, samples=8, seed=1))
    vals = [a["interior.mantle_nodes"] for a in s.design().assignments]
    assert all(isinstance(v, int) and 64 <= v <= 256 for v in vals)


# ---------------------------------------------------------------- Sobol'
def test_sobol_balance_of_2_to_the_k_points():
    """Sobol' points are (t, m, s)-nets in base 2 and the first two coordinates form a (0, m, 2)-net
    (Sobol' 1967; Niederreiter 1992, *Random Number Generation and Quasi-Monte Carlo Methods*, ch. 4;
    from memory), preserved by Owen scrambling: with n = 2^m points every elementary box of volume 1/n
    (2^a by 2^(m-a) cells) holds exactly one point. scipy warns that this balance needs n = 2^m, so the
    spec requires it."""
    m = 6
    n = 2**m
    s = load_spec(spec("sobol", {"planet.mass_earth": {"min": 1.0, "max": 9.0},
                                 "planet.core_mass_fraction": {"min": 0.1, "max": 0.5}}, samples=n, seed=3))
    cols = s.design().columns
    u1 = (cols["mass_earth"] - 1.0) / 8.0
    u2 = (cols["core_mass_fraction"] - 0.1) / 0.4
    for a in range(m + 1):
        i = np.floor(np.clip(u1, 0, 1 - 1e-12) * 2**a).astype(int)
        j = np.floor(np.clip(u2, 0, 1 - 1e-12) * 2 ** (m - a)).astype(int)
        cells = i * 2 ** (m - a) + j
        assert len(np.unique(cells)) == n, f"box {2**a} x {2**(m - a)}"


def test_sobol_needs_a_power_of_two():
    with pytest.raises(ConfigError, match=r"power of 2 .*64 or 128"):
        load_spec(spec("sobol", {"planet.mass_earth": {"min": 1.0, "max": 9.0}}, samples=100, seed=3))


# ---------------------------------------------------------------- Monte Carlo
def test_monte_carlo_truncation_respected_and_moments():
    """Truncated draws stay inside [min, max]; their mean matches scipy.stats.truncnorm's analytic mean within
    4 standard errors (sd / sqrt(n)); an untruncated lognormal with mean m and sd s has sample mean within 4
    standard errors of m (lognormal moments, Johnson, Kotz & Balakrishnan 1994)."""
    n = 4000
    s = load_spec(spec("monte-carlo", {
        "planet.core_mass_fraction": {"distribution": "normal", "mean": 0.3, "sd": 0.15, "min": 0.2, "max": 0.6},
        "convection.viscosity_prefactor_pa_s": {"distribution": "lognormal", "mean": 6e10, "sd": 3e10},
        "melting.water_wt_percent": {"distribution": "lognormal", "mean": 0.1, "sd": 0.2, "min": 0.01,
                                     "max": 0.5},
        "heating.radiogenic_scale": {"distribution": "uniform", "min": 0.5, "max": 2.0}}, samples=n, seed=7))
    c = s.design().columns
    cmf = c["core_mass_fraction"]
    assert cmf.min() >= 0.2 and cmf.max() <= 0.6
    tn = stats.truncnorm((0.2 - 0.3) / 0.15, (0.6 - 0.3) / 0.15, loc=0.3, scale=0.15)
    assert abs(cmf.mean() - tn.mean()) < 4 * tn.std() / math.sqrt(n)
    visc = c["viscosity_prefactor_pa_s"]
    assert abs(visc.mean() - 6e10) < 4 * 3e10 / math.sqrt(n)
    w = c["water_wt_percent"]
    assert w.min() >= 0.01 and w.max() <= 0.5
    r = c["radiogenic_scale"]
    assert r.min() >= 0.5 and r.max() <= 2.0
    # uniform: variance (b - a)^2 / 12
    assert abs(r.var() - 1.5**2 / 12) < 0.1 * 1.5**2 / 12


def test_seeds_reproducible_and_distinct():
    params = {"planet.mass_earth": {"min": 1.0, "max": 8.0}, "planet.core_mass_fraction": {"min": 0.1, "max": 0.4}}
    for mode, n in (("latin-hypercube", 10), ("sobol", 16), ("monte-carlo", 10)):
        a = load_spec(spec(mode, params, samples=n, seed=11)).design().assignments
        b = load_spec(spec(mode, params, samples=n, seed=11)).design().assignments
        c = load_spec(spec(mode, params, samples=n, seed=12)).design().assignments
        assert a == b, mode
        assert a != c, mode


def test_observed_draws_are_seeded_normals():
    """Mass and radius draws have the stated mean and sigma (within 4 standard errors) and repeat with the seed."""
    data = {"sweep": {"mode": "observed", "samples": 3000, "seed": 5},
            "observed": {"mass_earth": 4.0, "mass_sigma": 0.5, "radius_earth": 1.5, "radius_sigma": 0.05,
                         "age_gyr": 1.0}}
    s = load_spec(data)
    c = s.design().columns
    assert abs(c["mass_earth"].mean() - 4.0) < 4 * 0.5 / math.sqrt(3000)
    assert c["radius_earth"].std() == pytest.approx(0.05, rel=0.06)
    assert np.array_equal(load_spec(data).design().columns["radius_earth"], c["radius_earth"])
    assert s.base["run"]["end_time_gyr"] == 1.0  # the run reaches the stated age


def test_to_toml_round_trip():
    s = load_spec(spec("monte-carlo", {
        "planet.mass_earth": {"min": 0.5, "max": 15.0, "scale": "log"},
        "melting.water_wt_percent": {"distribution": "lognormal", "mean": 0.1, "sd": 0.2, "max": 0.5}},
        samples=5, seed=9))
    import tomllib

    again = load_spec(tomllib.loads(s.to_toml()))
    assert again.identity() == s.identity()


# ---------------------------------------------------------------- validation
@pytest.mark.parametrize("data,words", [
    ({"sweep": {"mode": "fishing"}}, "sweep.mode"),
    ({"base": {}}, "[sweep]"),
    (spec("grid", {"planet.mass": {"values": [1]}}), 'parameters."planet.mass"'),
    (spec("grid", {"mass_earth": {"values": [1]}}), 'did you mean "planet.mass_earth"'),
    (spec("grid", {"planet.mass_earth": {"values": []}}), "non-empty list"),
    (spec("grid", {"planet.mass_earth": {"values": ["big"]}}), "finite number"),
    (spec("grid", {"planet.mass_earth": {"values": [1, 1]}}), "repeated"),
    (spec("grid", {"planet.mass_earth": {"values": [1]}}, samples=3), "sweep.samples"),
    (spec("latin-hypercube", {"planet.mass_earth": {"min": 1, "max": 2}}, samples=4), "sweep.seed is required"),
    (spec("latin-hypercube", {"planet.mass_earth": {"min": 1, "max": 2}}, seed=4), "sweep.samples is required"),
    (spec("latin-hypercube", {"planet.mass_earth": {"min": 3, "max": 2}}, samples=4, seed=1), "below max"),
    (spec("latin-hypercube", {"planet.mass_earth": {"min": 0, "max": 2, "scale": "log"}}, samples=4, seed=1),
     "must be > 0 with scale"),
    (spec("latin-hypercube", {"planet.mass_earth": {"min": 1, "max": 200}}, samples=4, seed=1),
     'parameters."planet.mass_earth".max = 200'),
    (spec("latin-hypercube", {"convection.regime": {"min": 1, "max": 2}}, samples=4, seed=1), "string key"),
    (spec("latin-hypercube", {"planet.mass_earth": {"values": [1, 2]}}, samples=4, seed=1), "for mode 'grid'"),
    (spec("monte-carlo", {"planet.mass_earth": {"distribution": "cauchy"}}, samples=4, seed=1), "distribution"),
    (spec("monte-carlo", {"planet.mass_earth": {"distribution": "normal", "mean": 2}}, samples=4, seed=1),
     "sd is required"),
    (spec("monte-carlo", {"planet.mass_earth": {"distribution": "normal", "mean": 2, "sd": -1}}, samples=4,
          seed=1), "sd = -1"),
    (spec("monte-carlo", {"planet.mass_earth": {"min": 1, "max": 2, "colour": 3}}, samples=4, seed=1),
     "unknown key 'colour'"),
    ({"sweep": {"mode": "grid"}, "base": {"planet": {"wobble": 1}},
      "parameters": {"planet.mass_earth": {"values": [1]}}}, "[base]: unknown key planet.wobble"),
    ({"sweep": {"mode": "observed", "samples": 4, "seed": 1}}, "[observed]"),
    ({"sweep": {"mode": "observed", "samples": 4, "seed": 1},
      "observed": {"mass_earth": 4, "mass_sigma": 0.5, "radius_earth": 1.5, "age_gyr": 1}}, "radius_sigma"),
    ({"sweep": {"mode": "observed", "samples": 4, "seed": 1}, "base": {"run": {"end_time_gyr": 0.5}},
      "observed": {"mass_earth": 4, "mass_sigma": 0.5, "radius_earth": 1.5, "radius_sigma": 0.1, "age_gyr": 1}},
     "before observed.age_gyr"),
    ({"sweep": {"mode": "observed", "samples": 4, "seed": 1},
      "observed": {"mass_earth": 4, "mass_sigma": 0.5, "radius_earth": 1.5, "radius_sigma": 0.1, "age_gyr": 1},
      "parameters": {"planet.core_mass_fraction": {"min": 0.1, "max": 0.2}}}, "inferred"),
])
def test_spec_errors_name_the_parameter(data, words):
    with pytest.raises(ConfigError) as info:
        load_spec(data)
    assert words in str(info.value)


def test_grid_value_the_config_rejects_warns():
    with pytest.warns(UserWarning, match="recorded as failed"):
        load_spec(spec("grid", {"planet.mass_earth": {"values": [1.0, 150.0]}}))


def test_example_spec_and_example_files_load(tmp_path):
    p = tmp_path / "example.toml"
    p.write_text(EXAMPLE_SPEC)
    s = load_spec(p)
    assert s.mode == "latin-hypercube" and s.n_cases == 32
    files = sorted(EXAMPLES.glob("sweep_*.toml"))
    assert {f.name for f in files} >= {"sweep_grid.toml", "sweep_lhs.toml", "sweep_sobol.toml",
                                       "sweep_monte_carlo.toml", "sweep_observed.toml"}
    for f in files:
        assert load_spec(f).n_cases >= 1, f.name


# ---------------------------------------------------------------- statistics
def test_binomial_standard_error_and_wilson_interval():
    """SE = sqrt(p(1-p)/n) (binomial); Wilson 1927 (JASA 22:209) at k = 0: upper bound z^2 / (n + z^2)."""
    est = binomial_estimate(30, 100)
    assert est["p"] == 0.3
    assert est["se"] == pytest.approx(math.sqrt(0.3 * 0.7 / 100), rel=1e-12)
    assert est["wilson_low"] < 0.3 < est["wilson_high"]
    z = 1.959963984540054
    zero = binomial_estimate(0, 10)
    assert zero["se"] == 0.0 and zero["wilson_low"] == 0.0
    assert zero["wilson_high"] == pytest.approx(z * z / (10 + z * z), rel=1e-12)
    assert binomial_estimate(0, 0)["p"] is None


# ---------------------------------------------------------------- core-fraction inversion
@pytest.mark.parametrize("mass,cmf", [(0.8, 0.12), (3.0, 0.33), (9.0, 0.55)])
def test_inversion_round_trip(mass, cmf):
    """A planet built by the interior solver at default resolution; the inversion (coarse interior, 64 nodes,
    400 steps) recovers its core mass fraction within 0.005."""
    radius = build_interior(mass_earth=mass, core_mass_fraction=cmf).radius / EARTH_RADIUS
    assert infer_core_fraction(mass, radius) == pytest.approx(cmf, abs=0.005)


@pytest.mark.parametrize("mass", [1.0, 4.0, 8.0])
@pytest.mark.parametrize("cmf", [0.1, 0.25, 0.4])
def test_inversion_against_zeng2016(mass, cmf):
    """Zeng, Sasselov & Jacobsen 2016 (ApJ 819:127): R/R_E = (1.07 - 0.21 CMF)(M/M_E)^(1/3.7) for 1-8 M_E and
    CMF 0-0.4. Invert the radius of their relation; the inferred CMF agrees within 0.1. Why 0.1: d ln R / d CMF
    = 0.21 / (1.07 - 0.21 CMF) ~ 0.2, so a CMF difference of 0.1 is a ~2% radius difference, the scale of the
    fit's stated accuracy (a few per cent; from memory) and of our 3% radius test in test_interior.py."""
    radius = (1.07 - 0.21 * cmf) * mass ** (1 / 3.7)
    got = infer_core_fraction(mass, radius)
    assert got is not None
    assert got == pytest.approx(cmf, abs=0.1)


def test_inversion_rejects_non_rocky_radii():
    """Too large for a coreless rock (R above R(CMF = 0)) or too small for CMF = 0.8: no rocky fit."""
    r0 = build_interior(mass_earth=4.0, core_mass_fraction=0.0, mantle_nodes=64, integration_steps=400).radius
    r8 = build_interior(mass_earth=4.0, core_mass_fraction=0.8, mantle_nodes=64, integration_steps=400).radius
    assert infer_core_fraction(4.0, 1.02 * r0 / EARTH_RADIUS) is None
    assert infer_core_fraction(4.0, 0.98 * r8 / EARTH_RADIUS) is None
    with pytest.raises(ConfigError):
        infer_core_fraction(4.0, float("nan"))


def test_inversion_respects_overrides():
    """A lighter core alloy (larger density deficit) needs more core for the same radius."""
    radius = build_interior(mass_earth=3.0, core_mass_fraction=0.3).radius / EARTH_RADIUS
    light = infer_core_fraction(3.0, radius, core_density_deficit=0.2)
    assert light is not None and light > 0.3 + 0.01
