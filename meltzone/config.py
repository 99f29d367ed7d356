"""PlanetSpec: the validated configuration of one planet (TOML file, ``--set`` overrides or kwargs).

The schema lives in :data:`SCHEMA`, one entry per key with its default, unit,
allowed range and meaning. Names carry their unit where it is not SI or not
obvious (``mass_earth``, ``end_time_gyr``, ``equilibrium_temperature_k``).
Everything else in the program reads the spec through
``spec.section.key`` and converts to SI in :meth:`PlanetSpec.si`-style helpers
close to where the value is used.

Bad values raise :class:`meltzone.errors.ConfigError` with a message naming the
key, the value and what is allowed.
"""

from __future__ import annotations

import math
import tomllib
import warnings
from dataclasses import dataclass
from pathlib import Path
from types import MappingProxyType
from typing import Any, Mapping

from .errors import ConfigError

#: Mass range [Earth masses] inside which the models are calibrated; outside it a run warns.
CALIBRATED_MASS_RANGE = (0.5, 15.0)
#: Largest core mass fraction the interior solver and evolution are tested for; above it a run warns.
TESTED_CORE_FRACTION_MAX = 0.8


@dataclass(frozen=True)
class Key:
    """One configuration key: default, unit, meaning and allowed values."""

    default: Any
    unit: str
    doc: str
    lo: float | None = None
    hi: float | None = None
    lo_open: bool = False
    hi_open: bool = False
    choices: tuple[str, ...] | None = None
    source: str = ""

    @property
    def kind(self) -> type:
        return type(self.default)

    def allowed(self) -> str:
        if self.choices is not None:
            return "one of " + ", ".join(repr(c) for c in self.choices)
        if self.kind is str:
            return "a string"
        parts = []
        if self.lo is not None:
            parts.append(f"{'>' if self.lo_open else '>='} {self.lo:g}")
        if self.hi is not None:
            parts.append(f"{'<' if self.hi_open else '<='} {self.hi:g}")
        what = "an integer" if self.kind is int else "a number"
        return what + (" " + " and ".join(parts) if parts else "")


SCHEMA: Mapping[str, Mapping[str, Key]] = MappingProxyType({
    "planet": {
        "name": Key("unnamed planet", "", "label used in reports and files"),
        "mass_earth": Key(1.0, "Earth masses", "planet mass (calibrated range 0.5-15)", lo=0.0, lo_open=True,
                          hi=100.0),
        "core_mass_fraction": Key(0.325, "1", "mass fraction of the iron-alloy core", lo=0.0, hi=1.0,
                                  hi_open=True),
    },
    "interior": {
        "mantle_nodes": Key(256, "1", "radial nodes in the mantle before refinement", lo=32, hi=8192),
        "core_nodes": Key(64, "1", "radial nodes in the core", lo=8, hi=2048),
        "integration_steps": Key(1000, "1", "RK4 steps of the structure integration across the radius",
                                 lo=200, hi=200000),
        "surface_pressure_pa": Key(1.0e5, "Pa", "pressure at the solid surface", lo=0.0, hi=1.0e10),
        "reference_potential_temperature_k": Key(1600.0, "K",
                                                 "potential temperature of the reference adiabat on which "
                                                 "mantle phases are chosen", lo=300.0, hi=5000.0,
            source="common practice (Earth's upper mantle ~1600-1650 K)"),
        "core_density_deficit": Key(0.10, "1", "fractional density deficit of the core alloy relative to "
                                    "pure iron (light elements)", lo=0.0, hi=0.3,
            source="~10% for Earth's outer core (Birch 1952, JGR 57:227; from memory); reproduces PREM here"),
        "mantle_fe_fraction": Key(0.10, "1", "molar Fe/(Mg+Fe) of the mantle silicates", lo=0.0, hi=0.5,
            source="common practice (Earth's mantle Mg# ~0.89-0.90)"),
    },
    "melting": {
        "model": Key("whole-mantle-sg", "", "mantle solidus/liquidus model id (see `meltzone curves`)"),
        "table_file": Key("", "", "CSV table for model 'table' (pressure, solidus, liquidus with units header)"),
        "melt_fraction_law": Key("linear", "", "melt fraction between solidus and liquidus",
                                 choices=("linear", "katz2003")),
        "water_wt_percent": Key(0.0, "wt%", "bulk mantle water content lowering the solidus (Katz et al. 2003)",
                                lo=0.0, hi=5.0),
        "core_melting_depression_k": Key(700.0, "K", "lowering of the iron melting curve by light elements",
                                         lo=0.0, hi=3000.0,
                                         source="~700 K for Earth's core, Alfe et al. 2002, EPSL 195:91 (from memory)"),
    },
    "convection": {
        "scheme": Key("boundary-layer", "", "evolution scheme: one potential temperature with thermal boundary "
                      "layers (parameterized convection)", choices=("boundary-layer",),
            source="Stevenson, Spohn & Schubert 1983, Icarus 54:466 (boundary-layer theory)"),
        "regime": Key("mobile-lid", "", "solid-state convection regime", choices=("mobile-lid", "stagnant-lid")),
        "viscosity_prefactor_pa_s": Key(6.127e10, "Pa s", "Arrhenius prefactor A in A exp[(E + P V)/(R T)]",
                                        lo=0.0, lo_open=True,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
        "activation_energy_j_mol": Key(3.35e5, "J/mol", "activation energy E", lo=0.0, hi=1.0e6,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
        "activation_volume_m3_mol": Key(4.0e-6, "m^3/mol", "activation volume V0 at zero pressure", lo=0.0,
                                        hi=3.0e-5,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
        "activation_volume_decay_pa": Key(2.0e11, "Pa", "pressure scale over which the activation volume "
                                          "decays, V(P) = V0 exp(-P / P_d); 0 keeps V constant", lo=0.0,
            source="this model's choice (see meltzone._core.physics.activation_enthalpy)"),
        "critical_rayleigh": Key(450.0, "1", "critical Rayleigh number", lo=1.0, hi=1.0e5,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
        "beta": Key(1.0 / 3.0, "1", "exponent of the solid mantle's Nusselt-Rayleigh scaling "
                    "Nu = a (Ra / Ra_cr)^beta, from the time the top first reaches the rheological transition "
                    "(1/3 before)", lo=0.0, hi=0.5,
            source='Stevenson, Spohn & Schubert 1983, Icarus 54:466 (common practice)'),
        "nusselt_prefactor": Key(1.0, "1", "prefactor a of the Nusselt-Rayleigh scaling Nu = a (Ra / Ra_cr)^beta "
                                 "of the solid mantle's upper boundary layer, from the time the top first reaches "
                                 "the rheological transition (the magma ocean keeps a = 1, beta = 1/3); weak "
                                 "scalings need a > 1, e.g. beta 0.015 with a 40 for the present Earth (calibrated for "
                                 "the mobile lid)",
                                 lo=0.0, hi=1.0e4, lo_open=True,
            source='1 in Stevenson, Spohn & Schubert 1983, Icarus 54:466'),
        "rheology_a": Key(2.5, "1", "factor of the rheological temperature scale (stagnant lid)",
                          lo=0.5, hi=10.0,
            source='Grasset & Parmentier 1998, JGR 103:18171; Solomatov & Moresi 2000 (2.2-2.5; from memory)'),
        "melt_weakening": Key(26.0, "1", "melt weakening factor alpha in exp(-alpha phi)", lo=0.0, hi=100.0,
            source='Mei et al. 2002, EPSL 201:491 (from memory)'),
        "liquid_viscosity_pa_s": Key(0.1, "Pa s", "viscosity of the silicate liquid", lo=1.0e-4, hi=1.0e3,
            source='Karki & Stixrude 2010, Science 328:740 (~0.01-0.1 Pa s; from memory)'),
        "rheology_blend_width": Key(0.05, "1", "melt-fraction width above critical_melt_fraction over which "
                                    "viscosity and heat flow pass from the solid to the magma-ocean law; the "
                                    "bare Earth's magma-ocean lifetime goes as ~0.5x at 0.02 and ~1.9x at 0.1",
                                    lo=0.005, hi=0.3,
            source="this model's choice (a smooth transition keeps the fluxes continuous)"),
        "critical_melt_fraction": Key(0.4, "1", "melt fraction of the rheological transition", lo=0.1, hi=0.8,
            source='Abe 1997, PEPI 100:27; Solomatov 2015, Treatise on Geophysics 9.04'),
        "thermal_conductivity": Key(4.0, "W/m/K", "mantle thermal conductivity", lo=0.1, hi=50.0,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
        "thermal_diffusivity": Key(1.0e-6, "m^2/s", "mantle thermal diffusivity", lo=1.0e-8, hi=1.0e-4,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
        "thermal_expansivity": Key(2.0e-5, "1/K", "mantle thermal expansivity", lo=1.0e-7, hi=1.0e-3,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
        "mantle_heat_capacity": Key(1100.0, "J/kg/K", "mantle specific heat", lo=100.0, hi=5000.0,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
        "latent_heat": Key(6.0e5, "J/kg", "latent heat of mantle melting", lo=0.0, hi=5.0e6,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
    },
    "core": {
        "core_heat_capacity": Key(800.0, "J/kg/K", "core specific heat", lo=100.0, hi=5000.0,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
        "core_latent_heat": Key(7.5e5, "J/kg", "latent heat of inner-core crystallisation", lo=0.0, hi=5.0e6,
            source='order of published values, 6e5-1e6 J/kg (e.g. Labrosse 2015, PEPI 247:36; from memory)'),
        "gravitational_energy": Key(3.0e5, "J/kg", "gravitational energy released per kg of inner core",
                                    lo=0.0, hi=5.0e6,
            source='order of published values (Labrosse 2015; from memory)'),
    },
    "heating": {
        "radiogenic_scale": Key(1.0, "1", "scale of bulk-silicate-Earth heat-producing element abundances",
                                lo=0.0, hi=100.0,
            source='McDonough & Sun 1995 abundances, Turcotte & Schubert Table 4.2 heat production'),
        "start_age_gyr": Key(4.5, "Gyr", "age of the radiogenic inventory at the start (decayed back this far)",
                             lo=0.0, hi=13.0,
            source='common practice (age of the Solar System 4.57 Gyr)'),
    },
    "surface": {
        "equilibrium_temperature_k": Key(255.0, "K", "radiative equilibrium temperature set by the star",
                                         lo=0.0, hi=3000.0,
            source="Earth's radiative equilibrium temperature (common practice)"),
        "atmosphere": Key("none", "", "surface boundary", choices=("none", "grey")),
        "water_inventory_kg": Key(0.0, "kg", "total H2O of mantle + atmosphere (grey atmosphere)", lo=0.0),
        "co2_inventory_kg": Key(0.0, "kg", "total CO2 of mantle + atmosphere (grey atmosphere)", lo=0.0),
    },
    "initial": {
        "upper_temperature_k": Key(0.0, "K", "initial upper-mantle potential temperature; 0 = fully molten "
                                   "start (50 K above the liquidus at every depth)", lo=0.0, hi=20000.0),
        "core_temperature_k": Key(0.0, "K", "initial temperature at the top of the core; 0 = the mantle adiabat "
                                  "at the CMB plus initial_cmb_jump_k", lo=0.0, hi=30000.0),
        "initial_cmb_jump_k": Key(200.0, "K", "initial excess of the core over the mantle adiabat at the CMB "
                                  "(used when core_temperature_k = 0)", lo=0.0, hi=10000.0,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
    },
    "run": {
        "end_time_gyr": Key(10.0, "Gyr", "model time at which the run stops", lo=0.0, lo_open=True, hi=100.0),
        "rtol": Key(1.0e-7, "1", "relative tolerance of the time integrator", lo=1.0e-12, hi=1.0e-2),
        "atol_k": Key(1.0e-7, "K", "absolute tolerance of the time integrator, as the heat of this temperature "
                      "change of the whole mantle or core (the lid's: atol_k x 1 km/K)", lo=1.0e-12, hi=10.0),
        "max_temperature_step_k": Key(10.0, "K", "largest change of either temperature in one step",
                                      lo=0.01, hi=500.0),
        "max_steps": Key(200000, "1", "upper bound on accepted steps", lo=100, hi=10000000),
        "max_step_myr": Key(20.0, "Myr", "largest time step", lo=1e-6, hi=1000.0),
    },
})


def _check_value(section: str, name: str, key: Key, value: Any) -> Any:
    where = f"{section}.{name}"
    if key.kind is str:
        if not isinstance(value, str):
            raise ConfigError(f"{where} = {value!r}: must be {key.allowed()}")
        if key.choices is not None and value not in key.choices:
            raise ConfigError(f"{where} = {value!r}: must be {key.allowed()}")
        return value
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise ConfigError(f"{where} = {value!r}: must be {key.allowed()}" + (f" [{key.unit}]" if key.unit else ""))
    if key.kind is int:
        if isinstance(value, float):
            if not value.is_integer():
                raise ConfigError(f"{where} = {value!r}: must be {key.allowed()}")
            value = int(value)
    else:
        value = float(value)
    if not math.isfinite(value):
        raise ConfigError(f"{where} = {value!r}: must be a finite number ({key.allowed()})")
    bad = False
    if key.lo is not None:
        bad |= value <= key.lo if key.lo_open else value < key.lo
    if key.hi is not None:
        bad |= value >= key.hi if key.hi_open else value > key.hi
    if bad:
        unit = f" [{key.unit}]" if key.unit and key.unit != "1" else ""
        raise ConfigError(f"{where} = {value!r}: must be {key.allowed()}{unit}")
    return value


class Section:
    """Read-only attribute view of one section's values."""

    __slots__ = ("_name", "_values")

    def __init__(self, name: str, values: Mapping[str, Any]):
        object.__setattr__(self, "_name", name)
        object.__setattr__(self, "_values", dict(values))

    def __getattr__(self, item: str) -> Any:
        try:
            return self._values[item]
        except KeyError:
            raise AttributeError(f"section [{self._name}] has no key {item!r}") from None

    def __setattr__(self, key, value):
        raise AttributeError("PlanetSpec is read-only; use spec.replace(...)")

    def as_dict(self) -> dict[str, Any]:
        return dict(self._values)

    def __repr__(self) -> str:
        return f"[{self._name}] " + ", ".join(f"{k}={v!r}" for k, v in self._values.items())


def _flat_index() -> dict[str, str]:
    index: dict[str, str] = {}
    for sec, keys in SCHEMA.items():
        for k in keys:
            assert k not in index, f"key {k} is in two sections"
            index[k] = sec
    return index


_KEY_SECTION = _flat_index()


class PlanetSpec:
    """Validated configuration of one planet.

    Build it from nested sections, flat keys or both::

        PlanetSpec(mass_earth=4, core_mass_fraction=0.3)
        PlanetSpec({"planet": {"mass_earth": 4}, "run": {"end_time_gyr": 5}})
        PlanetSpec.from_toml("planet.toml", overrides=["run.end_time_gyr=2"])

    Every key has a default (see ``meltzone config --example``).
    """

    def __init__(self, data: Mapping[str, Any] | None = None, /, **flat: Any):
        values = {sec: {k: key.default for k, key in keys.items()} for sec, keys in SCHEMA.items()}
        for sec, content in (data or {}).items():
            if sec not in SCHEMA:
                raise ConfigError(f"unknown section [{sec}]; known sections: {', '.join(SCHEMA)}")
            if not isinstance(content, Mapping):
                raise ConfigError(f"[{sec}] must be a table of keys, got {content!r}")
            for k, v in content.items():
                if k not in SCHEMA[sec]:
                    raise ConfigError(f"unknown key {sec}.{k}; keys of [{sec}]: {', '.join(SCHEMA[sec])}")
                values[sec][k] = _check_value(sec, k, SCHEMA[sec][k], v)
        for k, v in flat.items():
            if "." in k:
                sec, _, name = k.partition(".")
            else:
                sec, name = _KEY_SECTION.get(k, ""), k
            if sec not in SCHEMA or name not in SCHEMA[sec]:
                raise ConfigError(f"unknown key {k!r}; see `meltzone config --example` for every key")
            values[sec][name] = _check_value(sec, name, SCHEMA[sec][name], v)
        self._values = values
        for sec in SCHEMA:
            object.__setattr__(self, sec, Section(sec, values[sec]))
        cv = values["convection"]
        if cv["critical_melt_fraction"] + cv["rheology_blend_width"] >= 1.0:
            raise ConfigError(f"convection.critical_melt_fraction + convection.rheology_blend_width = "
                              f"{cv['critical_melt_fraction']:g} + {cv['rheology_blend_width']:g}: must be < 1, so "
                              "that the blend to the magma-ocean law ends before the melt fraction reaches 1")
        cmf = values["planet"]["core_mass_fraction"]
        if cmf > TESTED_CORE_FRACTION_MAX:
            warnings.warn(f"planet.core_mass_fraction = {cmf:g} is above {TESTED_CORE_FRACTION_MAX:g}, the largest "
                          "tested value; results are extrapolated", UserWarning, stacklevel=2)
        mass = values["planet"]["mass_earth"]
        lo, hi = CALIBRATED_MASS_RANGE
        if not lo <= mass <= hi:
            warnings.warn(f"planet.mass_earth = {mass:g} is outside the calibrated range {lo:g}-{hi:g} Earth "
                          "masses; results are extrapolated", UserWarning, stacklevel=2)

    # ------------------------------------------------------------------ I/O
    @classmethod
    def from_toml(cls, path: str | Path, overrides: list[str] | tuple[str, ...] = ()) -> "PlanetSpec":
        """Read a TOML file; ``overrides`` are ``section.key=value`` strings (TOML values)."""
        path = Path(path)
        try:
            text = path.read_text(encoding="utf-8")
        except OSError as exc:
            raise ConfigError(f"cannot read config file {str(path)!r}: {exc.strerror or exc}") from None
        try:
            data = tomllib.loads(text)
        except tomllib.TOMLDecodeError as exc:
            raise ConfigError(f"config file {str(path)!r} is not valid TOML: {exc}") from None
        return cls.from_mapping(data, overrides)

    @classmethod
    def from_mapping(cls, data: Mapping[str, Any] | None, overrides=()) -> "PlanetSpec":
        merged = {sec: dict(v) if isinstance(v, Mapping) else v for sec, v in (data or {}).items()}
        for item in overrides:
            sec, name, value = parse_override(item)
            merged.setdefault(sec, {})
            if not isinstance(merged[sec], dict):
                raise ConfigError(f"[{sec}] must be a table of keys")
            merged[sec][name] = value
        return cls(merged)

    def replace(self, **flat: Any) -> "PlanetSpec":
        """A copy with some keys changed (flat or ``section.key`` names)."""
        return PlanetSpec(self.as_dict(), **flat)

    def as_dict(self) -> dict[str, dict[str, Any]]:
        return {sec: dict(vals) for sec, vals in self._values.items()}

    def to_toml(self, comments: bool = False) -> str:
        """The full configuration as TOML text (every key, defaults included)."""
        lines = []
        for sec, keys in SCHEMA.items():
            lines.append(f"[{sec}]")
            for name, key in keys.items():
                if comments:
                    unit = f" [{key.unit}]" if key.unit and key.unit != "1" else ""
                    lines.append(f"# {key.doc}{unit}; {key.allowed()}; default {_toml_value(key.default)}")
                    if key.source:
                        lines.append(f"#   default from: {key.source}")
                lines.append(f"{name} = {_toml_value(self._values[sec][name])}")
            lines.append("")
        return "\n".join(lines)

    def __eq__(self, other) -> bool:
        return isinstance(other, PlanetSpec) and self._values == other._values

    def __repr__(self) -> str:
        p = self._values["planet"]
        return f"PlanetSpec({p['name']!r}, mass_earth={p['mass_earth']:g}, core_mass_fraction={p['core_mass_fraction']:g})"


def _toml_value(v: Any) -> str:
    if isinstance(v, str):
        return '"' + v.replace("\\", "\\\\").replace('"', '\\"') + '"'
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    return repr(float(v))


def parse_override(item: str) -> tuple[str, str, Any]:
    """Parse ``section.key=value`` (value in TOML syntax; bare words are taken as strings)."""
    if "=" not in item:
        raise ConfigError(f"--set {item!r}: expected section.key=value")
    lhs, _, rhs = item.partition("=")
    lhs = lhs.strip()
    rhs = rhs.strip()
    if "." in lhs:
        sec, _, name = lhs.partition(".")
    else:
        sec, name = _KEY_SECTION.get(lhs, ""), lhs
    if sec not in SCHEMA or name not in SCHEMA[sec]:
        raise ConfigError(f"--set {item!r}: unknown key {lhs!r}; see `meltzone config --example`")
    try:
        value = tomllib.loads(f"v = {rhs}")["v"]
    except tomllib.TOMLDecodeError:
        if SCHEMA[sec][name].kind is str:
            value = rhs
        else:
            raise ConfigError(f"--set {item!r}: {rhs!r} is not {SCHEMA[sec][name].allowed()}") from None
    if SCHEMA[sec][name].kind is str and not isinstance(value, str):
        value = rhs  # a string key takes the text as written (e.g. planet.name=123)
    return sec, name, value


def as_spec(config: Any = None, **kwargs: Any) -> PlanetSpec:
    """Accept a PlanetSpec, a mapping shaped like the TOML file, a TOML path or kwargs."""
    if isinstance(config, PlanetSpec):
        return config.replace(**kwargs) if kwargs else config
    if config is None:
        return PlanetSpec(**kwargs)
    if isinstance(config, (str, Path)):
        spec = PlanetSpec.from_toml(config)
        return spec.replace(**kwargs) if kwargs else spec
    if isinstance(config, Mapping):
        return PlanetSpec(config, **kwargs)
    raise ConfigError(f"config must be a PlanetSpec, a mapping or a TOML path, not {type(config).__name__}")
