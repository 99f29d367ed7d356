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

import difflib
import math
import numbers
import tomllib
import unicodedata
import warnings
from pathlib import Path
from types import MappingProxyType
from typing import Any, Mapping

from .config_key import Key
from .config_volcanism import VOLCANISM_KEYS
from .constants import EARTH_MASS, EARTH_OCEAN_MASS
from .errors import ConfigError
from .mantle_keys import basal_ocean_keys, convection_keys, initial_keys

#: Mass range [Earth masses] inside which the models are calibrated; outside it a run warns.
CALIBRATED_MASS_RANGE = (0.5, 15.0)
#: Largest core mass fraction the interior solver and evolution are tested for; above it a run warns.
TESTED_CORE_FRACTION_MAX = 0.8
#: Hard limits of planet.mass_earth [Earth masses]: the Moon's order of mass, and the largest mass whose mantle
#: the default melting model covers at every core fraction (22.07 M_E coreless, measured), rounded down.
MASS_LIMITS_EARTH = (0.01, 20.0)
#: Lowest initial temperature [K] other than 0 (the default start) of the mantle and of the core.
MIN_INITIAL_TEMPERATURE_K = 500.0
_COLD_START_REASON = ("below any mantle temperature of a rocky planet (Earth's ~1620 K, Herzberg et al. 2010, EPSL "
                      "292:79); it also keeps E/(R T) of the Arrhenius law below 709, the float64 limit of exp, for "
                      "every allowed E (a 1 K start ran with an energy-closure error of 7e-3)")
#: Ids of the melting models (meltzone.melting.list_models(); a test keeps the two equal without importing numpy).
MELTING_MODELS = ("peridotite-lowp", "katz2003", "whole-mantle-sg", "peridotite-mantle", "super-earth", "table")
#: Characters refused in string values: control characters (incl. NUL), unpaired surrogates, line separators.
_BAD_CHAR_CATEGORIES = frozenset({"Cc", "Cs", "Zl", "Zp"})


from .config_star import ESCAPE_KEYS, ORBIT_KEYS, STAR_KEYS, check_star

#: Water share of the planet's mass above which a run warns that it describes a water world (this model's choice:
#: 1 wt%, ~43 Earth oceans per Earth mass, where the water layer is thousands of km deep and high-pressure ices
#: form; Earth's oceans are 0.023 wt%)
WATER_WORLD_SHARE = 0.01

SCHEMA: Mapping[str, Mapping[str, Key]] = MappingProxyType({
    "planet": {
        "name": Key("unnamed planet", "", "label used in reports and files", max_len=200, nonblank=True,
            source="this model's choice (a label; stored as an HDF5 string attribute)"),
        "mass_earth": Key(1.0, "Earth masses", "planet mass (calibrated range 0.5-15; a warning outside it)",
                          lo=MASS_LIMITS_EARTH[0], hi=MASS_LIMITS_EARTH[1],
            source="limits: 0.01 ~ the Moon (0.0123 M_E), smaller bodies are not planets with a convecting mantle; "
                   "20: the default melting model (0-5000 GPa) covers the mantle of every core fraction up to "
                   "22.07 M_E (coreless; 28.4 M_E at core fraction 0.325), measured with this interior solver"),
        "core_mass_fraction": Key(0.325, "1", "mass fraction of the iron-alloy core", lo=0.0, hi=1.0,
                                  hi_open=True,
            source="limits: 0 = coreless, < 1 = some mantle (tested to 0.8, a warning above it)"),
    },
    "interior": {
        "mantle_nodes": Key(256, "1", "radial nodes in the mantle before refinement", lo=32, hi=8192,
            source="numerical setting; limits: this model's choice (8192 bounds the memory of the history, nodes x "
                   "steps)"),
        "core_nodes": Key(64, "1", "radial nodes in the core", lo=8, hi=2048,
            source="numerical setting; limits: this model's choice"),
        "integration_steps": Key(1000, "1", "RK4 steps of the structure integration across the radius",
                                 lo=200, hi=200000,
            source="numerical setting; limits: this model's choice (200000 bounds the solve time)"),
        "surface_pressure_pa": Key(1.0e5, "Pa", "pressure at the solid surface", lo=0.0, hi=1.0e10,
            source="Earth's 1 bar (common practice); limit: 10 GPa, ~1000x Venus's 9.2 MPa, the base of any "
                   "atmosphere a rocky planet keeps"),
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
        "model": Key("peridotite-mantle", "", "mantle solidus/liquidus model id (see `meltzone curves`)",
                      choices=MELTING_MODELS,
            source="dry peridotite solidus of Hirschmann 2000, G3 1 (1394 K at 0 GPa; Earth's ridges melt today) and "
                   "Katz et al. 2003 liquidus below 5 GPa, blended over 5-10 GPa into the fits of Monteux, Andrault "
                   "& Samuel 2016, EPSL 448:140 (see `meltzone curves peridotite-mantle`); whole-mantle-sg, the "
                   "chondritic default before (1661 K at 0 GPa), stays selectable"),
        "table_file": Key("", "", "CSV table for melting.model = 'table' (pressure, solidus, liquidus with a units "
                          "header); only with that model", max_len=4096,
            source="limit: 4096 characters, the usual longest path (PATH_MAX on Linux)"),
        "melt_fraction_law": Key("linear", "", "melt fraction between solidus and liquidus",
                                 choices=("linear", "katz2003"),
            source="linear: common practice; katz2003: Katz, Spiegelman & Langmuir 2003, G3 4:1073"),
        "water_wt_percent": Key(0.0, "wt%", "bulk mantle water content lowering the solidus (Katz et al. 2003)",
                                lo=0.0, hi=5.0,
            source="dry mantle by default; limit: 5 wt%, beyond the water contents of the Katz et al. 2003, "
                   "G3 4:1073 fit (<~1-2 wt% of melt-bearing peridotite, from memory)"),
        "core_melting_depression_k": Key(700.0, "K", "lowering of the iron melting curve by light elements",
                                         lo=0.0, hi=3000.0,
                                         source="~700 K at Earth's ICB for the proposed core composition, pure "
                                                "iron 6350 +- 600 K there (Alfe, Price & Gillan 2003, Mineral. Mag. "
                                                "67:113; abstract checked); one constant at every pressure (this "
                                                "model's choice)"),
        **basal_ocean_keys(Key),  # basal magma ocean (boundary-layer scheme)
    },
    "convection": {
        "scheme": Key("boundary-layer", "", "evolution scheme: one potential temperature with thermal boundary "
                      "layers (parameterized convection), or a radially resolved mantle with mixing-length "
                      "convection",
                      choices=("boundary-layer", "mixing-length"),
            source="Stevenson, Spohn & Schubert 1983, Icarus 54:466 (boundary-layer theory); Abe 1997, PEPI 100:27 "
                   "and Bower et al. 2018, PEPI 274:49 (mixing-length theory)"),
        "regime": Key("mobile-lid", "", "solid-state convection regime", choices=("mobile-lid", "stagnant-lid"),
            source="Stevenson, Spohn & Schubert 1983 (mobile lid); Solomatov & Moresi 2000 (stagnant lid)"),
        "viscosity_prefactor_pa_s": Key(6.127e10, "Pa s", "Arrhenius prefactor A in A exp[(E + P V)/(R T)]",
                                        lo=1.0e7, hi=1.0e15,
            source="Tosi et al. 2017, A&A 605:A71, Table 1; limits: 3-4 orders of magnitude around the published "
                   "6.1e10 (Tosi 2017, E 335 kJ/mol) and 7e11 Pa s (Nakagawa 2020, PEPS 7:57, E 300 kJ/mol), i.e. "
                   "~1e17-1e26 Pa s at 1600 K and E 335 kJ/mol"),
        "activation_energy_j_mol": Key(3.35e5, "J/mol", "activation energy E", lo=0.0, hi=1.0e6,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
        "activation_volume_m3_mol": Key(4.0e-6, "m^3/mol", "activation volume V0 at zero pressure", lo=0.0,
                                        hi=3.0e-5,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
        "activation_volume_decay_pa": Key(2.0e11, "Pa", "pressure scale over which the activation volume "
                                          "decays, V(P) = V0 exp(-P / P_d); 0 keeps V constant", lo=0.0, hi=1.0e13,
            source="this model's choice (see meltzone._core.physics.activation_enthalpy); limit: 10 TPa, twice the "
                   "deepest pressure the melting models evaluate (5 TPa), beyond which V(P) ~ V0 as with 0"),
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
        **convection_keys(Key),
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
        "core_latent_heat": Key(7.5e5, "J/kg", "latent heat of inner-core crystallisation at Earth's ICB (330 GPa); "
                                "elsewhere scaled with the alloy's melting temperature (constant entropy of melting)",
                                lo=0.0, hi=5.0e6,
            source='order of published values, 6e5-1e6 J/kg (e.g. Labrosse 2015, PEPI 247:36; from memory); the '
                   'scaling: Clausius-Clapeyron with a constant entropy of fusion (Alfe et al. 2002, PRB 65:165118; '
                   'from memory)'),
        "gravitational_energy": Key(0.0, "J/kg", "gravitational energy released per kg of inner core, a constant; "
                                    "0 = from the structure: the light elements the inner core rejects, "
                                    "(compositional_density_jump / rho) x (mean potential of the liquid core - "
                                    "potential at the inner core's edge)",
                                    lo=1.0, hi=5.0e6, special=0.0,
            source='from the structure (0): Braginsky & Roberts 1995, GAFD 79:1; Labrosse 2015, PEPI 247:36 (the '
                   'integral form from memory); a constant: the former default 3e5 J/kg (order of published values, '
                   'from memory)'),
        "compositional_density_jump": Key(580.0, "kg/m^3", "compositional part of the density jump at the inner "
                                          "core's edge (light elements rejected by the solid); used when "
                                          "gravitational_energy = 0", lo=0.0, hi=3000.0,
            source="Labrosse 2015, PEPI 247:36 (580 kg/m^3 for Earth, checked in Nakagawa 2020, PEPS 7:57, Table 2, "
                   "which lists Labrosse 2015's parameters); Earth's total ICB jump 600-800 kg/m^3 (PREM; Masters & "
                   "Gubbins 2003, PEPI 140:159, from memory)"),
    },
    "heating": {
        "radiogenic_scale": Key(1.0, "1", "scale of bulk-silicate-Earth heat-producing element abundances",
                                lo=0.0, hi=100.0,
            source='McDonough & Sun 1995 abundances, Turcotte & Schubert Table 4.2 heat production'),
        "start_age_gyr": Key(4.5, "Gyr", "age of the radiogenic inventory at the start (decayed back this far)",
                             lo=0.0, hi=13.0,
            source='common practice (age of the Solar System 4.57 Gyr)'),
    },
    "star": STAR_KEYS,
    "orbit": ORBIT_KEYS,
    "surface": {
        "equilibrium_temperature_k": Key(255.0, "K", "radiative equilibrium temperature, fixed (used without a "
                                         "star; with star.mass_msun set, the star's flux replaces it)",
                                         lo=0.0, hi=3000.0,
            source="Earth's radiative equilibrium temperature (common practice)"),
        "atmosphere": Key("none", "", "surface boundary: a bare surface, a grey H2O-CO2 atmosphere, or a steam "
                          "(H2O-CO2) atmosphere with the runaway-greenhouse radiation limit, water dissolved in "
                          "the melt (Sossi et al. 2023) and condensing to an ocean", choices=("none", "grey", "steam"),
            source="none: a bare radiating surface; grey: Abe & Matsui 1985 (from memory); steam: the limit of "
                   "Goldblatt et al. 2013, Nature Geosci. 6:661 (see meltzone._core.radiation)"),
        "water_inventory_kg": Key(0.0, "kg", "total H2O of mantle + atmosphere (+ ocean) (grey or steam "
                                  "atmosphere)", lo=0.0,
                                  hi=1.0e24,
            source="limit: ~700 Earth oceans (1.4e21 kg each, common practice), ~1.7 wt% of the mantle of a 15 M_E "
                   "planet (6e25 kg); more water makes a water world, which this rocky-mantle model does not "
                   "describe"),
        "co2_inventory_kg": Key(0.0, "kg", "total CO2 of mantle + atmosphere (grey or steam atmosphere)", lo=0.0,
                                hi=1.0e23,
            source="limit: ~200x the CO2 of Venus's atmosphere (4.8e20 kg, from memory), ~0.2 wt% of the mantle of "
                   "a 15 M_E planet"),
        **ESCAPE_KEYS,
    },
    "initial": {
        "upper_temperature_k": Key(0.0, "K", "initial upper-mantle potential temperature; 0 = fully molten "
                                   "start (50 K above the liquidus at every depth); otherwise at least "
                                   "surface.equilibrium_temperature_k", lo=MIN_INITIAL_TEMPERATURE_K, hi=20000.0,
                                   special=0.0,
            source=f"limits: {MIN_INITIAL_TEMPERATURE_K:g} K, " + _COLD_START_REASON + "; 20000 K: this model's "
                   "choice, ten times the liquidus at the surface (~2000 K)"),
        "core_temperature_k": Key(0.0, "K", "initial temperature at the top of the core; 0 = by the rule of "
                                  "core_start, at least 50 K above the core's melting curve (a molten start)",
                                  lo=MIN_INITIAL_TEMPERATURE_K, hi=30000.0,
                                  special=0.0,
            source=f"limits: {MIN_INITIAL_TEMPERATURE_K:g} K, " + _COLD_START_REASON + "; 30000 K: above the iron "
                   "melting curve at any CMB pressure of an allowed planet (27540 K at 5 TPa, this code)"),
        **initial_keys(Key),
        "initial_cmb_jump_k": Key(200.0, "K", "initial excess of the core over the mantle at the CMB (its adiabat or "
                                  "rheological transition, see core_start; used when core_temperature_k = 0)",
                                  lo=0.0, hi=10000.0,
            source='Tosi et al. 2017, A&A 605:A71, Table 1'),
    },
    "volcanism": {name: Key(**kw) for name, kw in VOLCANISM_KEYS.items()},
    "run": {
        "end_time_gyr": Key(10.0, "Gyr", "model time at which the run stops", lo=0.0, lo_open=True, hi=100.0,
            source="limit: 100 Gyr, ~7x the age of the Universe (13.8 Gyr)"),
        "rtol": Key(1.0e-7, "1", "relative tolerance of the time integrator", lo=1.0e-12, hi=1.0e-2,
            source="numerical setting; limits: 1e-12 ~ 1e4 float64 epsilons, 1e-2 the loosest useful"),
        "atol_k": Key(1.0e-7, "K", "absolute tolerance of the time integrator, as the heat of this temperature "
                      "change of the whole mantle or core (the lid's: atol_k x 1 km/K)", lo=1.0e-12, hi=10.0,
            source="numerical setting; limit: 10 K, the default largest temperature step"),
        "max_temperature_step_k": Key(10.0, "K", "largest change of either temperature in one step",
                                      lo=0.01, hi=500.0,
            source="numerical setting; limits: this model's choice"),
        "max_steps": Key(200000, "1", "upper bound on accepted steps", lo=100, hi=10000000,
            source="numerical setting; limit: 1e7 steps bounds the recorded history's memory"),
        "max_step_myr": Key(20.0, "Myr", "largest time step", lo=1e-6, hi=1000.0,
            source="numerical setting; limits: 1 yr to 1 Gyr"),
    },
})


def _show(value: Any, limit: int = 60) -> str:
    """repr of a value for an error message: one line (repr escapes control characters), at most ``limit`` chars."""
    try:
        text = repr(value)
    except ValueError:  # an integer of more than 4300 digits
        return "an integer of more than 4300 digits"
    return text if len(text) <= limit else text[:limit - 3] + "..."


def _show_name(name: Any, limit: int = 40) -> str:
    """A key or section name for a message: control characters escaped, at most ``limit`` chars."""
    text = repr(str(name))[1:-1]
    return text if len(text) <= limit else text[:limit - 3] + "..."


def _kind_name(value: Any) -> str:
    """What a TOML value is, in TOML's words."""
    if isinstance(value, bool):
        return "a boolean"
    if isinstance(value, str):
        return "a string"
    if isinstance(value, (list, tuple)):
        return "an array"
    if isinstance(value, Mapping):
        return "a table"
    if isinstance(value, numbers.Integral):
        return "an integer"
    if isinstance(value, numbers.Real):
        return "a number"
    return "a " + type(value).__name__


def _check_text(where: str, key: Key, value: str) -> str:
    """Refuse control characters (NUL included), unpaired surrogates, line separators and over-long strings."""
    for i, ch in enumerate(value):
        if unicodedata.category(ch) in _BAD_CHAR_CATEGORIES:
            raise ConfigError(f"{where} = {_show(value)}: character {i + 1} ({ch!r}) is a control character or "
                              f"unpaired surrogate; must be {key.allowed()}")
    if key.max_len is not None and len(value) > key.max_len:
        raise ConfigError(f"{where} = {_show(value)}: {len(value)} characters; must be {key.allowed()}")
    if key.nonblank and not value.strip():
        raise ConfigError(f"{where} = {_show(value)}: empty; must be {key.allowed()}")
    return value


def check_value(section: str, name: str, key: Key, value: Any) -> Any:
    """The value of ``section.name`` checked against its Key (type, finiteness, range); ConfigError naming it."""
    where = f"{section}.{name}"
    unit = f" [{key.unit}]" if key.unit and key.unit != "1" else ""
    if key.kind is str:
        if not isinstance(value, str):
            raise ConfigError(f"{where} = {_show(value)}: must be {key.allowed()}, not {_kind_name(value)}")
        if key.choices is not None and value not in key.choices:
            close = difflib.get_close_matches(value, key.choices, n=1)
            hint = f" (did you mean {close[0]!r}?)" if close else ""
            raise ConfigError(f"{where} = {_show(value)}: must be {key.allowed()}{hint}")
        return _check_text(where, key, value)
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        raise ConfigError(f"{where} = {_show(value)}: must be {key.allowed()}{unit}, not {_kind_name(value)}")
    if key.kind is int:
        if not isinstance(value, numbers.Integral):
            value = float(value)
            if not value.is_integer():
                raise ConfigError(f"{where} = {_show(value)}: must be {key.allowed()}")
        value = int(value)
    else:
        try:
            value = float(value)
        except OverflowError:
            raise ConfigError(f"{where} = {_show(value)}: must be {key.allowed()}{unit}") from None
    if isinstance(value, float) and not math.isfinite(value):
        raise ConfigError(f"{where} = {value!r}: must be a finite number ({key.allowed()}{unit})")
    if key.special is not None and value == key.special:
        return value
    bad = False
    if key.lo is not None:
        bad |= value <= key.lo if key.lo_open else value < key.lo
    if key.hi is not None:
        bad |= value >= key.hi if key.hi_open else value > key.hi
    if bad:
        raise ConfigError(f"{where} = {_show(value)}: must be {key.allowed()}{unit}")
    return value


def _check_together(values: Mapping[str, Mapping[str, Any]], explicit: set) -> None:
    """Checks that involve more than one key (each message names every key involved); ``explicit`` holds the
    (section, key) pairs the input set (file, ``--set`` or keyword), whatever their values."""
    cv = values["convection"]
    if (v_inf := cv["high_pressure_activation_volume_m3_mol"]) > cv["activation_volume_m3_mol"]:
        raise ConfigError(f"convection.high_pressure_activation_volume_m3_mol = {v_inf:g} m^3/mol exceeds convection."
                          f"activation_volume_m3_mol = {cv['activation_volume_m3_mol']:g} m^3/mol: the activation "
                          "volume decays with pressure towards it, so it must not be larger")
    if cv["critical_melt_fraction"] + cv["rheology_blend_width"] >= 1.0:
        raise ConfigError(f"convection.critical_melt_fraction + convection.rheology_blend_width = "
                          f"{cv['critical_melt_fraction']:g} + {cv['rheology_blend_width']:g}: must be < 1, so "
                          "that the blend to the magma-ocean law ends before the melt fraction reaches 1")
    melt = values["melting"]
    if melt["model"] == "table" and not melt["table_file"]:
        raise ConfigError("melting.model = 'table' needs melting.table_file (a CSV file of pressure, solidus and "
                          "liquidus)")
    if melt["model"] != "table" and melt["table_file"]:
        raise ConfigError(f"melting.table_file = {_show(melt['table_file'])} is only read with melting.model = "
                          f"'table', not {melt['model']!r}: set melting.model = \"table\" or remove the table file")
    t_eq = values["surface"]["equilibrium_temperature_k"]
    if check_star(values, ("surface", "equilibrium_temperature_k") in explicit):
        return  # with a star, T_eq is not the irradiation
    for name in ("upper_temperature_k", "core_temperature_k"):
        t = values["initial"][name]
        if t != 0.0 and t < t_eq:
            raise ConfigError(f"initial.{name} = {t:g} K is below surface.equilibrium_temperature_k = {t_eq:g} K: "
                              "a planet's interior starts at least as hot as its surface (or 0 for the default "
                              "start)")


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


KEY_SECTION = _flat_index()
#: Every key as "section.key" (for suggestions).
_ALL_KEYS = tuple(f"{sec}.{k}" for sec, keys in SCHEMA.items() for k in keys)


def _split_key(name: str) -> tuple[str, str]:
    """"section.key" or a bare key (looked up in its section) -> (section, key); ("", name) when unknown."""
    if "." in name:
        sec, _, key = name.partition(".")
        return sec, key
    return KEY_SECTION.get(name, ""), name


def _suggest(word: Any, candidates) -> str:
    """' (did you mean X?)' with the nearest candidate by difflib, or ''."""
    close = difflib.get_close_matches(str(word), list(candidates), n=1, cutoff=0.6)
    return f" (did you mean {close[0]}?)" if close else ""


def _unknown_key(sec: str, key: Any) -> str:
    home = KEY_SECTION.get(key) if isinstance(key, str) else None
    if home is not None:
        return f"unknown key {sec}.{_show_name(key)}: {key} belongs to [{home}] ({home}.{key})"
    hint = _suggest(key, SCHEMA[sec]) or _suggest(f"{sec}.{key}", _ALL_KEYS)
    return f"unknown key {sec}.{_show_name(key)}" + (hint or f"; keys of [{sec}]: {', '.join(SCHEMA[sec])}")


def _unknown_section(sec: Any, content: Any) -> str:
    if not isinstance(content, Mapping) and isinstance(sec, str) and sec in KEY_SECTION:
        return (f"{sec} = {_show(content)} stands outside any section: write it under [{KEY_SECTION[sec]}] "
                f"({KEY_SECTION[sec]}.{sec})")
    return f"unknown section [{_show_name(sec)}]{_suggest(sec, SCHEMA)}; known sections: {', '.join(SCHEMA)}"


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
        given: dict[str, dict[str, Any]] = {}  # the keys the input set explicitly, as given
        if data is not None and not isinstance(data, Mapping):
            raise ConfigError(f"a config must be a table of sections, not {_kind_name(data)}")
        for sec, content in (data or {}).items():
            if sec not in SCHEMA:
                raise ConfigError(_unknown_section(sec, content))
            if not isinstance(content, Mapping):
                raise ConfigError(f"[{sec}] must be a table of keys, not {_kind_name(content)} ({sec} = "
                                  f"{_show(content)})")
            for k, v in content.items():
                if k not in SCHEMA[sec]:
                    raise ConfigError(_unknown_key(sec, k))
                values[sec][k] = check_value(sec, k, SCHEMA[sec][k], v)
                given.setdefault(sec, {})[k] = v
        for k, v in flat.items():
            sec, name = _split_key(k)
            if sec not in SCHEMA or name not in SCHEMA[sec]:
                raise ConfigError(_unknown_key(sec, name) if sec in SCHEMA else
                                  f"unknown key {_show(k)}{_suggest(k, _ALL_KEYS)}; see `meltzone config --example`")
            values[sec][name] = check_value(sec, name, SCHEMA[sec][name], v)
            given.setdefault(sec, {})[name] = v
        _check_together(values, {(sec, k) for sec, keys in given.items() for k in keys})
        self._values = values
        object.__setattr__(self, "_given", given)
        for sec in SCHEMA:
            object.__setattr__(self, sec, Section(sec, values[sec]))
        cmf = values["planet"]["core_mass_fraction"]
        if cmf > TESTED_CORE_FRACTION_MAX:
            warnings.warn(f"planet.core_mass_fraction = {cmf:g} is above {TESTED_CORE_FRACTION_MAX:g}, the largest "
                          "tested value; results are extrapolated", UserWarning, stacklevel=2)
        mass = values["planet"]["mass_earth"]
        lo, hi = CALIBRATED_MASS_RANGE
        if not lo <= mass <= hi:
            warnings.warn(f"planet.mass_earth = {mass:g} is outside the calibrated range {lo:g}-{hi:g} Earth "
                          "masses; results are extrapolated", UserWarning, stacklevel=2)
        water = values["surface"]["water_inventory_kg"]
        share = water / (mass * EARTH_MASS)
        if share > WATER_WORLD_SHARE and values["surface"]["atmosphere"] != "none":
            oceans = WATER_WORLD_SHARE * EARTH_MASS / EARTH_OCEAN_MASS
            warnings.warn(f"surface.water_inventory_kg = {water:g} is {100 * share:.3g}% of the planet's mass, above "
                          f"{100 * WATER_WORLD_SHARE:g}% (~{oceans:.0f} Earth oceans per Earth mass): a water world, "
                          "which this rocky-mantle model does not describe (no high-pressure ice or water layer); "
                          "results are not meaningful there",
                          UserWarning, stacklevel=2)

    # ------------------------------------------------------------------ I/O
    @classmethod
    def from_toml(cls, path: str | Path, overrides: list[str] | tuple[str, ...] = ()) -> "PlanetSpec":
        """Read a TOML file; ``overrides`` are ``section.key=value`` strings (TOML values).

        A file that sets no key at all gives a warning: every value is then a schema default.
        """
        data = read_toml(path)
        if all(isinstance(v, Mapping) and not v for v in data.values()):  # no key, at most empty sections
            p = SCHEMA["planet"]
            warnings.warn(f"config file {str(path)!r} sets no key: the schema defaults are used (planet.mass_earth "
                          f"= {p['mass_earth'].default:g} M_E, planet.core_mass_fraction = "
                          f"{p['core_mass_fraction'].default:g}; see `meltzone config --example`)", UserWarning,
                          stacklevel=2)
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
        """A copy with some keys changed (flat or ``section.key`` names); the keys set explicitly stay so, the
        others keep their defaults (so a check on explicitly set keys sees the same input)."""
        return PlanetSpec(self._given, **flat)

    def as_dict(self) -> dict[str, dict[str, Any]]:
        return {sec: dict(vals) for sec, vals in self._values.items()}

    def to_toml(self, comments: bool = False) -> str:
        """The full configuration as TOML text (every key, defaults included)."""
        lines = []
        for sec, keys in SCHEMA.items():
            lines.append(f"[{sec}]")
            for name, key in keys.items():
                unused = sec == "surface" and name == "equilibrium_temperature_k" and self.star.mass_msun > 0.0
                if comments:
                    unit = f" [{key.unit}]" if key.unit and key.unit != "1" else ""
                    lines.append(f"# {key.doc}{unit}; {key.allowed()}; default {toml_value(key.default)}")
                    if key.source:
                        lines.append(f"#   source: {key.source}")
                line = f"{name} = {toml_value(self._values[sec][name])}"
                # with a star this key is unused and may not be set (meltzone.config_star.check_star)
                lines.append(f"# {line}  (unused: star.mass_msun sets the irradiation)" if unused else line)
            lines.append("")
        return "\n".join(lines)

    def __eq__(self, other) -> bool:
        return isinstance(other, PlanetSpec) and self._values == other._values

    def __repr__(self) -> str:
        p = self._values["planet"]
        return f"PlanetSpec({p['name']!r}, mass_earth={p['mass_earth']:g}, core_mass_fraction={p['core_mass_fraction']:g})"


def read_toml(path: str | Path, what: str = "config file") -> dict[str, Any]:
    """The parsed content of a TOML file (a planet config, a sweep spec, ...; ``what`` names it in messages);
    ConfigError naming the file when it cannot be read (missing, a folder, no permission), is not UTF-8 text or
    is not valid TOML (with line and column)."""
    path = Path(path)
    where = f"{what} {str(path)!r}"
    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise ConfigError(f"cannot read {where}: {exc.strerror or exc}") from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        kind = " (an HDF5 file?)" if raw.startswith(b"\x89HDF") else ""
        raise ConfigError(f"{where} is not a UTF-8 text file{kind}: byte {exc.start + 1} is 0x{raw[exc.start]:02x}; "
                          "a config is TOML text (see `meltzone config --example`)") from None
    try:
        return tomllib.loads(text)
    except (tomllib.TOMLDecodeError, ValueError) as exc:  # ValueError: an integer of more than 4300 digits
        raise ConfigError(f"{where} is not valid TOML: {' '.join(str(exc).split())}") from None


def toml_value(v: Any) -> str:
    if isinstance(v, str):
        return '"' + v.replace("\\", "\\\\").replace('"', '\\"') + '"'
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    return repr(float(v))


def parse_override(item: str) -> tuple[str, str, Any]:
    """Parse ``section.key=value`` (value in TOML syntax; bare words are taken as strings)."""
    shown = _show(item)
    if "=" not in item:
        raise ConfigError(f"--set {shown}: expected section.key=value")
    lhs, _, rhs = item.partition("=")
    lhs = lhs.strip()
    rhs = rhs.strip()
    sec, name = _split_key(lhs)
    if sec not in SCHEMA or name not in SCHEMA[sec]:
        hint = _unknown_key(sec, name) if sec in SCHEMA else f"unknown key {_show(lhs)}{_suggest(lhs, _ALL_KEYS)}"
        raise ConfigError(f"--set {shown}: {hint}; see `meltzone config --example`")
    key = SCHEMA[sec][name]
    if any(unicodedata.category(ch) in _BAD_CHAR_CATEGORIES for ch in rhs):
        raise ConfigError(f"--set {shown}: {sec}.{name} must be {key.allowed()}; the value holds a control "
                          "character or unpaired surrogate")
    try:
        parsed = tomllib.loads(f"v = {rhs}")
        if set(parsed) != {"v"}:
            raise ValueError("more than one value")
        value = parsed["v"]
    except (tomllib.TOMLDecodeError, ValueError):  # ValueError: an integer of more than 4300 digits
        if key.kind is str:
            value = rhs
        else:
            raise ConfigError(f"--set {shown}: {sec}.{name} = {_show(rhs)} is not {key.allowed()}") from None
    if key.kind is str and not isinstance(value, str):
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
