"""The configuration: its schema, TOML round trip, --set parsing, and every kind of bad input refused up front
with a ConfigError (or a one-line CLI error) naming the key or the file. Checks of the code's own contract
(common practice) unless a docstring names a source."""

from __future__ import annotations

import math
import tomllib
import warnings

import pytest
from click.testing import CliRunner

from meltzone import melting
from meltzone.cli import BASE_PLANET_RULE, _spec_from_options, demo_config_path, main
from meltzone.config import (MASS_LIMITS_EARTH, MELTING_MODELS, SCHEMA, PlanetSpec, parse_override,
                             read_toml)
from meltzone.constants import GPA
from meltzone.errors import ConfigError, ModelError

ALL_KEYS = [(sec, k, key) for sec, keys in SCHEMA.items() for k, key in keys.items()]


# ---------------------------------------------------------------- the schema
@pytest.mark.parametrize("sec,name,key", ALL_KEYS, ids=[f"{s}.{k}" for s, k, _ in ALL_KEYS])
def test_every_key_has_unit_doc_range_and_source(sec, name, key):
    """Every key: a unit string (non-empty for numbers), a doc, a range (both ends) or choices or a length limit,
    a source or reason, and a default that passes its own check."""
    assert isinstance(key.unit, str) and isinstance(key.doc, str) and key.doc
    assert key.source, f"{sec}.{name} has no source or reason"
    if key.kind in (int, float):
        assert key.unit, f"{sec}.{name} has no unit"
        assert key.lo is not None and key.hi is not None, f"{sec}.{name} is unbounded"
        assert key.lo < key.hi
    else:
        assert key.choices is not None or key.max_len is not None, f"{sec}.{name} accepts any string"
    assert getattr(PlanetSpec(), sec).as_dict()[name] == key.default


def test_melting_model_choices_match_the_registry():
    """config.MELTING_MODELS (kept in config so that validation does not import numpy) = melting.list_models()."""
    assert list(MELTING_MODELS) == melting.list_models()


def test_previously_unbounded_keys_are_refused_beyond_their_limit():
    """The values of the simulated user that ran with no key named (or reported nonsense) are refused."""
    for flat, value in [("water_inventory_kg", 1e30), ("co2_inventory_kg", 1e30), ("viscosity_prefactor_pa_s", 1e30),
                        ("activation_volume_decay_pa", 1e30), ("upper_temperature_k", 1.0),
                        ("core_temperature_k", 1.0), ("mass_earth", 30.0), ("mass_earth", 100.0),
                        ("mass_earth", 1e-3)]:
        with pytest.raises(ConfigError, match=flat):
            PlanetSpec(**{flat: value})


def test_zero_keeps_meaning_the_default_start():
    """initial.upper_temperature_k = 0 (molten start) and core_temperature_k = 0 (adiabat + jump) stay allowed;
    the smallest other value is 500 K; the limits are shown as '0 or a number >= 500'."""
    PlanetSpec(upper_temperature_k=0.0, core_temperature_k=0.0)
    PlanetSpec(upper_temperature_k=500.0, core_temperature_k=500.0)
    with pytest.raises(ConfigError, match="initial.upper_temperature_k"):
        PlanetSpec(upper_temperature_k=499.0)
    assert SCHEMA["initial"]["upper_temperature_k"].allowed().startswith("0 or a number >= 500")


def test_initial_temperature_below_the_surface_is_refused():
    with pytest.raises(ConfigError, match="initial.upper_temperature_k.*surface.equilibrium_temperature_k"):
        PlanetSpec(upper_temperature_k=900.0, equilibrium_temperature_k=1200.0)
    with pytest.raises(ConfigError, match="initial.core_temperature_k.*surface.equilibrium_temperature_k"):
        PlanetSpec(core_temperature_k=900.0, equilibrium_temperature_k=1200.0)


# ---------------------------------------------------------------- TOML round trip and --example
def test_toml_round_trip():
    """to_toml -> tomllib -> PlanetSpec gives the same spec, strings with quotes, backslashes and non-ASCII
    letters included."""
    spec = PlanetSpec(name='K2-18 "b" \\ Ærø ☄', mass_earth=3.7, core_mass_fraction=0.21, mantle_nodes=300,
                      regime="stagnant-lid", atmosphere="grey", water_inventory_kg=1e21, max_steps=12345,
                      upper_temperature_k=2500.0, model="super-earth")
    again = PlanetSpec(tomllib.loads(spec.to_toml()))
    assert again == spec
    assert PlanetSpec(tomllib.loads(spec.to_toml(comments=True))) == spec


def test_example_shows_ranges_and_parses():
    """`meltzone config --example` is valid TOML for the default spec, and the comment above every key states
    its allowed values (a range for numbers, the choices or the length limit for strings)."""
    res = CliRunner().invoke(main, ["config", "--example"])
    assert res.exit_code == 0, res.output
    assert PlanetSpec(tomllib.loads(res.stdout)) == PlanetSpec()
    lines = res.stdout.splitlines()
    for sec, name, key in ALL_KEYS:
        i = lines.index(f"{name} = " + lines[[j for j, ln in enumerate(lines) if ln.startswith(f"{name} = ")][0]]
                        .split(" = ", 1)[1])
        comment = next(ln for ln in reversed(lines[:i]) if ln.startswith("# ") and not ln.startswith("#   "))
        assert key.allowed() in comment, (sec, name)
        if key.kind in (int, float):
            assert ">" in comment and "<" in comment, (sec, name, comment)
    assert "<= 1e+24" in res.stdout  # water_inventory_kg


# ---------------------------------------------------------------- --set
@pytest.mark.parametrize("item,expected", [
    ("planet.mass_earth=2", ("planet", "mass_earth", 2)),
    ("mass_earth = 2.5", ("planet", "mass_earth", 2.5)),
    ("planet.name=Veyra 3 b", ("planet", "name", "Veyra 3 b")),
    ("planet.name=123", ("planet", "name", "123")),
    ('planet.name="quoted"', ("planet", "name", "quoted")),
    ("melting.model=super-earth", ("melting", "model", "super-earth")),
    ("run.max_steps=1000", ("run", "max_steps", 1000)),
])
def test_parse_override(item, expected):
    assert parse_override(item) == expected


@pytest.mark.parametrize("item,words", [
    ("planet.mass_earth", "expected section.key=value"),
    ("planet.mass_erth=2", "did you mean mass_earth"),
    ("planet.end_time_gyr=2", "belongs to [run]"),
    ("plnet.mass_earth=2", "did you mean planet.mass_earth"),
    ("planet.mass_earth=heavy", "planet.mass_earth"),
    ("planet.mass_earth=1\n[run]\nend_time_gyr = 1", "control character"),
    ("planet.name=a\x00b", "control character"),
    ("planet.name=\udcff", "surrogate"),
])
def test_parse_override_errors(item, words):
    with pytest.raises(ConfigError, match=words.replace("[", r"\[").replace("]", r"\]")):
        PlanetSpec.from_mapping({}, [item])


# ---------------------------------------------------------------- values
@pytest.mark.parametrize("flat,value,words", [
    ("mass_earth", "4", "not a string"),
    ("mass_earth", True, "not a boolean"),
    ("mantle_nodes", False, "not a boolean"),
    ("mass_earth", [1.0, 2.0], "not an array"),
    ("mass_earth", {"value": 1.0}, "not a table"),
    ("mass_earth", math.nan, "finite"),
    ("mass_earth", math.inf, "finite"),
    ("end_time_gyr", -math.inf, "finite"),
    ("mantle_nodes", 256.5, "integer"),
    ("mantle_nodes", 10**400, "mantle_nodes"),
    ("rtol", 10**400, "rtol"),
    ("regime", "stagnant", "did you mean 'stagnant-lid'"),
    ("model", "", "melting.model"),
    ("name", "a\x00b", "control character"),
    ("name", "a\ud800b", "surrogate"),
    ("name", "line\u2028break", "control character"),
    ("name", "x" * 201, "201 characters"),
    ("table_file", "t\x07.csv", "melting.table_file"),
])
def test_bad_values_name_the_key(flat, value, words):
    with pytest.raises(ConfigError, match=words) as info:
        PlanetSpec(**{flat: value})
    text = str(info.value)
    assert flat in text and "\n" not in text and len(text) < 400


def test_huge_integers_name_the_key_or_file(tmp_path):
    """Integers beyond float range or beyond Python's 4300-digit string limit: ConfigError, not OverflowError."""
    with pytest.raises(ConfigError, match="run.max_steps = an integer of more than 4300 digits"):
        PlanetSpec(max_steps=10**5000)
    path = tmp_path / "huge.toml"
    path.write_text("[run]\nmax_steps = " + "9" * 5000 + "\n")
    with pytest.raises(ConfigError, match="huge.toml' is not valid TOML"):
        PlanetSpec.from_toml(path)
    with pytest.raises(ConfigError, match="run.max_steps"):
        PlanetSpec.from_mapping({}, ["run.max_steps=" + "9" * 5000])


def test_unicode_name_is_kept():
    assert PlanetSpec(name="Kepler-452 b ☄ Ærø").planet.name == "Kepler-452 b ☄ Ærø"


def test_table_file_needs_the_table_model_and_back():
    with pytest.raises(ConfigError, match="melting.table_file.*melting.model"):
        PlanetSpec(table_file="curves.csv")
    with pytest.raises(ConfigError, match="melting.model = 'table' needs melting.table_file"):
        PlanetSpec(model="table")
    assert PlanetSpec(model="table", table_file="curves.csv").melting.table_file == "curves.csv"


@pytest.mark.parametrize("data,words", [
    ({"planit": {"mass_earth": 1.0}}, r"unknown section \[planit\] \(did you mean planet\?\)"),
    ({"planet": {"mass_erth": 1.0}}, r"unknown key planet.mass_erth \(did you mean mass_earth\?\)"),
    ({"planet": {"end_time_gyr": 1.0}}, r"end_time_gyr belongs to \[run\]"),
    ({"mass_earth": 2.0}, r"outside any section: write it under \[planet\]"),
    ({"planet": 3}, r"\[planet\] must be a table"),
])
def test_unknown_sections_and_keys_suggest_the_nearest(data, words):
    with pytest.raises(ConfigError, match=words):
        PlanetSpec(data)


# ---------------------------------------------------------------- files
def test_file_errors_name_the_file(tmp_path):
    h5 = tmp_path / "run.h5"
    h5.write_bytes(b"\x89HDF\r\n\x1a\n\x00\x00\xff\xfe")
    with pytest.raises(ConfigError, match=r"run.h5' is not a UTF-8 text file \(an HDF5 file\?\)"):
        PlanetSpec.from_toml(h5)
    with pytest.raises(ConfigError, match="cannot read config file .*absent.toml"):
        PlanetSpec.from_toml(tmp_path / "absent.toml")
    with pytest.raises(ConfigError, match="cannot read config file"):
        PlanetSpec.from_toml(tmp_path)
    bad = tmp_path / "bad.toml"
    bad.write_text("[planet]\nmass_earth = 1\nname = \n")
    with pytest.raises(ConfigError, match=r"bad.toml' is not valid TOML: .*line 3, column 8"):
        read_toml(bad)


def test_empty_file_warns_that_the_defaults_are_used(tmp_path):
    empty = tmp_path / "empty.toml"
    empty.write_text("# nothing here\n[planet]\n")
    with pytest.warns(UserWarning, match="sets no key.*1 M_E.*0.325"):
        spec = PlanetSpec.from_toml(empty)
    assert spec == PlanetSpec()
    full = tmp_path / "full.toml"
    full.write_text("[planet]\nmass_earth = 1.0\n")
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        PlanetSpec.from_toml(full)


# ---------------------------------------------------------------- melting tables
@pytest.mark.parametrize("rows,line,words", [
    ("0,1e-300,2000\n10,1500,2500\n", 3, "solidus 1e-300 K must be >= 100 K"),
    ("0,1000,1e300\n10,1500,2500\n", 3, r"liquidus 1e\+300 K must be >= 100 K and <= 30000 K"),
    ("-5,1000,2000\n10,1500,2500\n", 3, "negative pressure -5 GPa; must be >= 0"),
    ("0,1000,2000\n20,1500,2500\n10,1600,2600\n", 5, "pressure must rise strictly"),
    ("0,1000,2000\n1e5,1500,2500\n", 4, "pressure 100000 GPa; must be >= 0 and <= 10000 GPa"),
    ("0,1000,2000\n10,nan,2500\n", 4, "non-finite"),
    ("0,2000,1000\n10,1500,2500\n", 3, "solidus .* must be below the liquidus"),
])
def test_absurd_melting_tables_are_refused_with_file_and_line(tmp_path, rows, line, words):
    """Physical bounds of a table (melting.TABLE_TEMPERATURE_RANGE_K, TABLE_MAX_PRESSURE_PA)."""
    path = tmp_path / "curve.csv"
    path.write_text("# test table\npressure_gpa,solidus_k,liquidus_k\n" + rows)
    with pytest.raises(ModelError, match=rf"curve.csv', line {line}: {words}"):
        melting.load_table(path)


# ---------------------------------------------------------------- mass limits and melting range
def test_mass_limit_covers_the_default_melting_model_at_any_core_fraction():
    """The upper mass limit (measured: 22.07 M_E coreless, 28.4 M_E at 0.325 for the 5 TPa range of the
    default model) leaves the deepest mantle pressure inside the default model's range with no core, the
    worst case; the interior's own check passes."""
    from meltzone.interior import build_interior

    model = melting.get_model(SCHEMA["melting"]["model"].default)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", UserWarning)
        it = build_interior(mass_earth=MASS_LIMITS_EARTH[1], core_mass_fraction=0.0)
    p_max = float(it.P[it.mantle].max())
    assert 0.8 * model.max_pressure_pa < p_max < model.max_pressure_pa, p_max / GPA


def test_melting_range_error_names_mass_and_model():
    """A melting model whose range ends below the mantle's pressure (katz2003: 10 GPa; an Earth's CMB is
    ~136 GPa, PREM) is refused before any evolution, naming planet.mass_earth and melting.model."""
    from meltzone import evolve
    from meltzone.interior import build_interior

    spec = PlanetSpec(model="katz2003")
    for call in (lambda: build_interior(spec), lambda: evolve(spec)):
        with pytest.raises(ConfigError, match=r"planet.mass_earth = 1 .*melting.model = 'katz2003' covers 0-10 GPa"):
            call()
    build_interior(spec, check_melting=False)  # the structure alone does not need the curves


# ---------------------------------------------------------------- the command line
def _one_error_line(res, *words):
    assert res.exit_code == 2, (res.exit_code, res.output)
    lines = res.stderr.splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: "), res.stderr
    assert "Traceback" not in res.output
    for w in words:
        assert w in lines[0], (w, lines[0])
    return lines[0]


@pytest.mark.parametrize("args,words", [
    (["run", "--bogus"], ["--bogus"]),
    (["interior", "--mass", "heavy"], ["--mass"]),
    (["interior", "--set", "planet.mass_earth=30"], ["planet.mass_earth", "<= 20"]),
    (["interior", "--set", "melting.table_file=x.csv"], ["melting.table_file", "melting.model"]),
    (["nosuchcommand"], ["nosuchcommand"]),
    (["config"], ["--example"]),
    (["curves", "nosuchmodel"], ["nosuchmodel"]),
    (["summary"], ["PATH"]),
])
def test_cli_errors_are_one_line_exit_2(args, words):
    _one_error_line(CliRunner().invoke(main, args), *words)


def test_cli_non_utf8_config_names_the_file(tmp_path):
    h5 = tmp_path / "results.h5"
    h5.write_bytes(b"\x89HDF\r\n\x1a\n" + bytes(range(256)))
    _one_error_line(CliRunner().invoke(main, ["run", str(h5), "-o", str(tmp_path / "o.h5")]), str(h5), "UTF-8")
    _one_error_line(CliRunner().invoke(main, ["run", str(tmp_path), "-o", str(tmp_path / "o.h5")]), str(tmp_path))


def test_help_is_unchanged_and_states_the_base_planet_rule():
    for cmd in ("run", "interior"):
        res = CliRunner().invoke(main, [cmd, "--help"])
        assert res.exit_code == 0 and res.stdout.startswith(f"Usage: main {cmd} [OPTIONS] [CONFIG]")
        assert "built-in demo planet" in res.stdout and "schema defaults" in res.stdout and not res.stderr
    res = CliRunner().invoke(main, ["--help"])
    assert res.exit_code == 0 and "Commands:" in res.stdout


def test_base_planet_rule(tmp_path):
    """Without CONFIG: the demo planet file (4 M_E, 0.30) for every command; with CONFIG: the schema defaults
    overridden by the file; --mass / --core-fraction / --set on top in both cases. The help text states the
    numbers of both files."""
    demo = PlanetSpec.from_toml(demo_config_path())
    assert _spec_from_options(None, None, None, ()) == demo
    assert _spec_from_options(None, None, None, ("run.end_time_gyr=1",)) == demo.replace(end_time_gyr=1.0)
    assert _spec_from_options(None, 2.0, 0.2, ()) == demo.replace(mass_earth=2.0, core_mass_fraction=0.2)
    cfg = tmp_path / "p.toml"
    cfg.write_text("[run]\nend_time_gyr = 3.0\n")
    assert _spec_from_options(str(cfg), 2.0, None, ()) == PlanetSpec(end_time_gyr=3.0, mass_earth=2.0)
    p = SCHEMA["planet"]
    assert f"{demo.planet.mass_earth:g} Earth-mass" in BASE_PLANET_RULE
    assert f"core mass fraction {demo.planet.core_mass_fraction:.2f}" in BASE_PLANET_RULE
    assert f"({p['mass_earth'].default:g} Earth mass, core mass fraction {p['core_mass_fraction'].default:g})" \
        in BASE_PLANET_RULE
    res = CliRunner().invoke(main, ["interior", "--json"])
    assert res.exit_code == 0
    import json

    data = json.loads(res.stdout)
    assert data["mass_kg"] / 5.9722e24 == pytest.approx(4.0, rel=1e-3)


def test_cli_empty_file_warns_once(tmp_path):
    empty = tmp_path / "empty.toml"
    empty.write_text("")
    res = CliRunner().invoke(main, ["interior", str(empty)])
    assert res.exit_code == 0
    warn = [ln for ln in res.stderr.splitlines() if ln.startswith("warning:")]
    assert len(warn) == 1 and "1 M_E" in warn[0] and "0.325" in warn[0]
    assert "1 M_E, core mass fraction 0.325" in res.stdout


def test_a_water_world_inventory_warns_and_an_ocean_does_not():
    """Water above 1 wt% of the planet (this model's threshold, ~43 Earth oceans per Earth mass) makes a water
    world, which a rocky-mantle model does not describe: a warning naming the key. Five Earth oceans (1.4e21 kg
    each, common practice) on an Earth-mass planet (0.12 wt%) pass silently."""
    import warnings

    from meltzone.config import as_spec

    with pytest.warns(UserWarning, match="surface.water_inventory_kg.*water world"):
        as_spec({"planet": {"mass_earth": 1.0}, "surface": {"atmosphere": "steam", "water_inventory_kg": 1e24}})
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        as_spec({"planet": {"mass_earth": 1.0}, "surface": {"atmosphere": "steam", "water_inventory_kg": 7e21}})
