"""Sweep specs: parsing and validation of the TOML, the swept parameters, and the designs.

A sweep spec is a TOML file with

* ``[sweep]``: ``mode`` (``"grid"``, ``"latin-hypercube"``, ``"sobol"``,
  ``"monte-carlo"`` or ``"observed"``), ``samples`` and ``seed`` (not for a grid),
  optionally ``base_file`` (a planet TOML, relative to the spec, under ``[base]``);
* ``[base]``: a planet config shaped like the planet TOML (``[base.planet]``,
  ``[base.interior]``, ... with any key of :data:`meltzone.config.SCHEMA`);
* ``[parameters."section.key"]``: one table per swept key. Grid: ``values = [...]``
  (the cases are the Cartesian product, the last parameter varying fastest).
  Latin hypercube, Sobol' and Monte Carlo: ``min``/``max`` (uniform; ``scale =
  "log"`` for log-uniform), or ``distribution = "normal"`` / ``"lognormal"`` with
  ``mean`` and ``sd`` and optional ``min``/``max`` truncation;
* ``[observed]`` (mode ``"observed"``): ``mass_earth``, ``mass_sigma``,
  ``radius_earth``, ``radius_sigma`` and ``age_gyr``.

Sampling methods (sources)
--------------------------
* Latin hypercube: one point per stratum of width 1/n in every dimension
  (McKay, Beckman & Conover 1979, Technometrics 21:239), drawn by
  ``scipy.stats.qmc.LatinHypercube`` with the seed.
* Sobol': scrambled Sobol' points (Sobol' 1967; Owen 1998 scrambling) from
  ``scipy.stats.qmc.Sobol(...).random_base2(m)``; ``samples`` must be 2^m, the
  sizes at which the sequence keeps its balance properties.
* Both are mapped to [min, max] with ``scipy.stats.qmc.scale`` (in log10 for
  ``scale = "log"``); other marginals by the inverse CDF (inverse-transform
  sampling), which keeps the stratification of the design.
* Monte Carlo: independent uniforms from ``numpy.random.default_rng(seed)``
  through the inverse CDF of each marginal: ``scipy.stats.truncnorm`` for a
  (truncated) normal, and for a lognormal the normal of ln x with
  sigma^2 = ln(1 + sd^2 / mean^2), mu = ln(mean) - sigma^2 / 2 (the lognormal
  moment relations; Johnson, Kotz & Balakrishnan 1994, *Continuous Univariate
  Distributions* vol. 1, ch. 14), truncated in ln x.
* Observed: (M, R) drawn from independent normals N(mass_earth, mass_sigma) and
  N(radius_earth, radius_sigma) (seeded); each draw's core mass fraction is
  inferred from M and R by :func:`meltzone.interior.infer_core_fraction`.

scipy is imported when a design is drawn, not at import.
"""

from __future__ import annotations

import hashlib
import json
import math
import os
import warnings
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Mapping

import numpy as np

from ..config import KEY_SECTION, SCHEMA, PlanetSpec, check_value, read_toml, toml_value
from ..errors import ConfigError

__all__ = ["MODES", "DISTRIBUTIONS", "SWEEP_SCHEMA_VERSION", "MAX_CASES", "Parameter", "Observed", "Design",
           "SweepSpec", "load_spec", "lognormal_parameters"]

MODES = ("grid", "latin-hypercube", "sobol", "monte-carlo", "observed")
DISTRIBUTIONS = ("uniform", "normal", "lognormal")
#: Version of the sweep file layout (root attribute ``sweep_schema_version``).
SWEEP_SCHEMA_VERSION = 2  # 2: magma_ocean_reformed metric and flag; evolution with the solidification switch
#: Upper bound on the number of cases of one sweep.
MAX_CASES = 10_000_000


@dataclass(frozen=True)
class Parameter:
    """One swept key and how its values are chosen."""

    name: str                      # "section.key"
    values: tuple = ()             # grid
    distribution: str = "uniform"  # sampled modes
    lo: float | None = None        # min (uniform bounds or truncation)
    hi: float | None = None        # max
    mean: float | None = None
    sd: float | None = None
    scale: str = "linear"

    @property
    def section(self) -> str:
        return self.name.partition(".")[0]

    @property
    def key(self) -> str:
        return self.name.partition(".")[2]

    @property
    def schema(self):
        return SCHEMA[self.section][self.key]

    def transform(self, u: np.ndarray) -> np.ndarray:
        """Map uniforms u in [0, 1) to this parameter's values (inverse-transform sampling)."""
        from scipy import stats
        from scipy.stats import qmc

        u = np.asarray(u, dtype=np.float64)
        if self.distribution == "uniform":
            if self.scale == "log":
                x = 10.0 ** qmc.scale(u[:, None], [math.log10(self.lo)], [math.log10(self.hi)])[:, 0]
            else:
                x = qmc.scale(u[:, None], [self.lo], [self.hi])[:, 0]
            return np.clip(x, self.lo, self.hi)
        if self.distribution == "normal":
            lo = -np.inf if self.lo is None else (self.lo - self.mean) / self.sd
            hi = np.inf if self.hi is None else (self.hi - self.mean) / self.sd
            x = stats.truncnorm.ppf(u, lo, hi, loc=self.mean, scale=self.sd)
        else:  # lognormal: normal in ln x
            mu, sigma = lognormal_parameters(self.mean, self.sd)
            lo = -np.inf if self.lo is None else (math.log(self.lo) - mu) / sigma
            hi = np.inf if self.hi is None else (math.log(self.hi) - mu) / sigma
            x = np.exp(stats.truncnorm.ppf(u, lo, hi, loc=mu, scale=sigma))
        if self.lo is not None:
            x = np.maximum(x, self.lo)
        if self.hi is not None:
            x = np.minimum(x, self.hi)
        return x

    def describe(self) -> str:
        if self.values:
            return "grid values " + ", ".join(toml_value(v) for v in self.values)
        if self.distribution == "uniform":
            return f"{'log-' if self.scale == 'log' else ''}uniform in [{self.lo:g}, {self.hi:g}]"
        trunc = ""
        if self.lo is not None or self.hi is not None:
            trunc = f", truncated to [{'-inf' if self.lo is None else f'{self.lo:g}'}, " \
                    f"{'inf' if self.hi is None else f'{self.hi:g}'}]"
        return f"{self.distribution} with mean {self.mean:g} and sd {self.sd:g}{trunc}"


def lognormal_parameters(mean: float, sd: float) -> tuple[float, float]:
    """(mu, sigma) of ln x for a lognormal x with this mean and standard deviation.

    sigma^2 = ln(1 + sd^2/mean^2), mu = ln(mean) - sigma^2/2 (Johnson, Kotz & Balakrishnan 1994,
    Continuous Univariate Distributions vol. 1, ch. 14).
    """
    sigma2 = math.log1p((sd / mean) ** 2)
    return math.log(mean) - 0.5 * sigma2, math.sqrt(sigma2)


@dataclass(frozen=True)
class Observed:
    """The measured planet of the observed mode (Earth units, ages in Gyr of model time)."""

    mass_earth: float
    mass_sigma: float
    radius_earth: float
    radius_sigma: float
    age_gyr: float
    inversion_mantle_nodes: int | None = None       # None: meltzone.interior.INVERSION_DEFAULTS
    inversion_integration_steps: int | None = None

    def __post_init__(self):
        from ..interior import INVERSION_DEFAULTS  # scipy: only when an observed spec is built

        for name, key in (("inversion_mantle_nodes", "interior.mantle_nodes"),
                          ("inversion_integration_steps", "interior.integration_steps")):
            if getattr(self, name) is None:
                object.__setattr__(self, name, INVERSION_DEFAULTS[key])


@dataclass
class Design:
    """The concrete cases of a spec: per-case assignments and the input columns of the file."""

    assignments: list        # one dict "section.key" -> value per case
    columns: dict            # variable name -> np.ndarray (inputs)
    radius_earth: np.ndarray | None = None  # observed mode: radius draw per case


@dataclass
class SweepSpec:
    """A validated sweep spec. Build it with :func:`load_spec` (path, TOML text or mapping)."""

    mode: str
    base: dict
    parameters: tuple
    samples: int | None = None
    seed: int | None = None
    observed: Observed | None = None
    _design: Design | None = field(default=None, repr=False, compare=False)

    # ------------------------------------------------------------------ cases
    @property
    def n_cases(self) -> int:
        if self.mode == "grid":
            return int(np.prod([len(p.values) for p in self.parameters])) if self.parameters else 1
        return int(self.samples)

    def base_spec(self) -> PlanetSpec:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            return PlanetSpec(self.base)

    def design(self) -> Design:
        """The cases (cached): assignments per case and the input columns, reproducible from the seed."""
        if self._design is None:
            self._design = _make_design(self)
        return self._design

    def case_payload(self, index: int) -> tuple:
        """Arguments of :func:`meltzone.sweep.worker.run_case` (without the detail folder) for one case."""
        d = self.design()
        obs = None
        if self.observed is not None:
            obs = {"radius_earth": float(d.radius_earth[index]), "age_gyr": self.observed.age_gyr,
                   "inversion": {"interior.mantle_nodes": self.observed.inversion_mantle_nodes,
                                 "interior.integration_steps": self.observed.inversion_integration_steps}}
        return index, self.base, d.assignments[index], obs

    def identity(self) -> str:
        """A hash of everything that decides the cases (checkpoints are only resumed by the same spec)."""
        d = self.design()
        blob = json.dumps({"v": SWEEP_SCHEMA_VERSION, "mode": self.mode, "base": self.base,
                           "cases": d.assignments,
                           "radius": None if d.radius_earth is None else [float(r) for r in d.radius_earth],
                           "observed": None if self.observed is None else self.observed.__dict__},
                          sort_keys=True, default=repr)
        return hashlib.sha256(blob.encode()).hexdigest()

    # ------------------------------------------------------------------ text
    def to_toml(self) -> str:
        """The normalized spec as TOML (reading it back gives the same cases)."""
        lines = ["[sweep]", f"mode = {toml_value(self.mode)}"]
        if self.samples is not None:
            lines.append(f"samples = {self.samples}")
        if self.seed is not None:
            lines.append(f"seed = {self.seed}")
        for sec, vals in self.base.items():
            if vals:
                lines += ["", f"[base.{sec}]"] + [f"{k} = {toml_value(v)}" for k, v in vals.items()]
        if self.observed is not None:
            lines += ["", "[observed]"] + [f"{k} = {toml_value(v)}" for k, v in self.observed.__dict__.items()]
        for p in self.parameters:
            lines += ["", f'[parameters."{p.name}"]']
            if p.values:
                lines.append("values = [" + ", ".join(toml_value(v) for v in p.values) + "]")
                continue
            if p.distribution != "uniform":
                lines.append(f"distribution = {toml_value(p.distribution)}")
                lines += [f"mean = {toml_value(p.mean)}", f"sd = {toml_value(p.sd)}"]
            if p.lo is not None:
                lines.append(f"min = {toml_value(p.lo)}")
            if p.hi is not None:
                lines.append(f"max = {toml_value(p.hi)}")
            if p.scale != "linear":
                lines.append(f"scale = {toml_value(p.scale)}")
        return "\n".join(lines) + "\n"


def _number(where: str, value: Any) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise ConfigError(f"{where} = {value!r}: must be a finite number")
    return float(value)


def _integer(where: str, value: Any, lo: int, hi: int) -> int:
    if isinstance(value, bool) or not isinstance(value, int) or not lo <= value <= hi:
        raise ConfigError(f"{where} = {value!r}: must be an integer from {lo} to {hi}")
    return int(value)


def _check_keys(where: str, table: Mapping, allowed: tuple[str, ...]) -> None:
    for k in table:
        if k not in allowed:
            raise ConfigError(f"{where}: unknown key {k!r}; allowed here: {', '.join(allowed)}")


def load_spec(spec: str | os.PathLike | Mapping | SweepSpec) -> SweepSpec:
    """Read and validate a sweep spec from a TOML path, a mapping shaped like the TOML, or a SweepSpec.

    Every mistake raises :class:`meltzone.errors.ConfigError` naming the table and key.
    """
    if isinstance(spec, SweepSpec):
        return spec
    folder = Path(".")
    if isinstance(spec, (str, os.PathLike)):
        path = Path(spec)
        data = read_toml(path, "sweep spec")
        folder = path.parent
    elif isinstance(spec, Mapping):
        data = spec
    else:
        raise ConfigError(f"a sweep spec must be a TOML path, a mapping or a SweepSpec, not {type(spec).__name__}")
    return _parse(data, folder)


def _parse(data: Mapping, folder: Path) -> SweepSpec:
    _check_keys("sweep spec", data, ("sweep", "base", "parameters", "observed"))
    sweep = data.get("sweep")
    if not isinstance(sweep, Mapping):
        raise ConfigError("sweep spec: a [sweep] table with mode = " + " | ".join(repr(m) for m in MODES)
                          + " is required (see `meltzone sweep --example`)")
    _check_keys("[sweep]", sweep, ("mode", "samples", "seed", "base_file"))
    mode = sweep.get("mode")
    if mode not in MODES:
        raise ConfigError(f"sweep.mode = {mode!r}: must be one of " + ", ".join(repr(m) for m in MODES))

    # ---- base
    base_in = data.get("base", {})
    if not isinstance(base_in, Mapping):
        raise ConfigError("[base] must be a table of planet config sections ([base.planet], [base.run], ...)")
    base: dict[str, dict] = {}
    if "base_file" in sweep:
        bf = sweep["base_file"]
        if not isinstance(bf, str):
            raise ConfigError(f"sweep.base_file = {bf!r}: must be a path string")
        bdata = read_toml(folder / bf, "sweep.base_file")
        for sec, vals in bdata.items():
            if not isinstance(vals, Mapping):
                raise ConfigError(f"sweep.base_file: [{sec}] must be a table of keys")
            base.setdefault(sec, {}).update(vals)
    for sec, vals in base_in.items():
        if not isinstance(vals, Mapping):
            raise ConfigError(f"[base.{sec}] must be a table of keys (got {sec} = {vals!r}; write it under "
                              f"[base.<section>])")
        base.setdefault(sec, {}).update(vals)
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            PlanetSpec(base)
    except ConfigError as exc:
        raise ConfigError(f"[base]: {exc}") from None

    # ---- sizes
    samples = seed = None
    if mode == "grid":
        for k in ("samples", "seed"):
            if k in sweep:
                raise ConfigError(f"sweep.{k}: not used by mode 'grid' (the cases are the product of the "
                                  "parameter values); remove it")
    else:
        if "samples" not in sweep:
            raise ConfigError(f"sweep.samples is required for mode {mode!r} (number of cases)")
        samples = _integer("sweep.samples", sweep["samples"], 1, MAX_CASES)
        if "seed" not in sweep:
            raise ConfigError(f"sweep.seed is required for mode {mode!r} (any integer >= 0; it makes the "
                              "sample reproducible)")
        seed = _integer("sweep.seed", sweep["seed"], 0, 2**63 - 1)
        if mode == "sobol" and samples & (samples - 1):
            lo = 1 << (samples.bit_length() - 1)
            raise ConfigError(f"sweep.samples = {samples}: Sobol' sampling needs a power of 2 to keep its "
                              f"balance properties (e.g. {lo} or {2 * lo})")

    # ---- observed
    observed = None
    obs = data.get("observed")
    if mode == "observed":
        if not isinstance(obs, Mapping):
            raise ConfigError("mode 'observed' needs an [observed] table with mass_earth, mass_sigma, "
                              "radius_earth, radius_sigma and age_gyr")
        names = ("mass_earth", "mass_sigma", "radius_earth", "radius_sigma", "age_gyr")
        _check_keys("[observed]", obs, names + ("inversion_mantle_nodes", "inversion_integration_steps"))
        vals = {}
        for k in names:
            if k not in obs:
                raise ConfigError(f"observed.{k} is required (mode 'observed')")
            vals[k] = _number(f"observed.{k}", obs[k])
        for k in ("mass_earth", "radius_earth", "age_gyr"):
            if vals[k] <= 0.0:
                raise ConfigError(f"observed.{k} = {obs[k]!r}: must be > 0")
        for k in ("mass_sigma", "radius_sigma"):
            if vals[k] < 0.0:
                raise ConfigError(f"observed.{k} = {obs[k]!r}: must be >= 0")
        extra = {}
        for k, (lo, hi) in (("inversion_mantle_nodes", (32, 8192)), ("inversion_integration_steps", (200, 200000))):
            if k in obs:
                extra[k] = _integer(f"observed.{k}", obs[k], lo, hi)
        observed = Observed(**vals, **extra)
        for key in ("mass_earth", "core_mass_fraction"):
            if key in base.get("planet", {}):
                raise ConfigError(f"[base.planet] {key}: in mode 'observed' the mass is drawn from [observed] "
                                  "and the core mass fraction inferred; remove it")
        run = base.setdefault("run", {})
        if "end_time_gyr" not in run:
            run["end_time_gyr"] = observed.age_gyr
        elif run["end_time_gyr"] < observed.age_gyr:
            raise ConfigError(f"[base.run] end_time_gyr = {run['end_time_gyr']!r} is before observed.age_gyr = "
                              f"{observed.age_gyr:g}: the run must reach the age at which outcomes are evaluated")
    elif obs is not None:
        raise ConfigError(f"[observed] is only used by mode 'observed' (this spec has mode {mode!r})")

    # ---- parameters
    params_in = data.get("parameters", {})
    if not isinstance(params_in, Mapping):
        raise ConfigError('[parameters] must hold one table per key, e.g. [parameters."planet.mass_earth"]')
    if mode != "observed" and not params_in:
        raise ConfigError(f'mode {mode!r} needs at least one [parameters."section.key"] table')
    params = tuple(_parse_parameter(name, table, mode) for name, table in params_in.items())
    return SweepSpec(mode=mode, base=base, parameters=params, samples=samples, seed=seed, observed=observed)


def _parse_parameter(name: str, table: Any, mode: str) -> Parameter:
    where = f'parameters."{name}"'
    sec, _, key = name.partition(".")
    if sec not in SCHEMA or key not in SCHEMA[sec]:
        hint = f'; did you mean "{KEY_SECTION[name]}.{name}"?' if name in KEY_SECTION else \
            "; names are section.key, see `meltzone config --example`"
        raise ConfigError(f"{where}: unknown config key{hint}")
    if not isinstance(table, Mapping):
        raise ConfigError(f"{where} must be a table (values = [...], or min/max, or distribution with mean/sd)")
    schema = SCHEMA[sec][key]
    if mode == "observed" and name in ("planet.mass_earth", "planet.core_mass_fraction"):
        raise ConfigError(f"{where}: in mode 'observed' the mass is drawn from [observed] and the core mass "
                          "fraction inferred; remove this table")
    if mode == "grid":
        _check_keys(where, table, ("values",))
        values = table.get("values")
        if not isinstance(values, list) or not values:
            raise ConfigError(f"{where}.values must be a non-empty list (mode 'grid')")
        clean = []
        for v in values:
            if schema.kind is str:
                if not isinstance(v, str):
                    raise ConfigError(f"{where}.values: {v!r} must be a string ({schema.allowed()})")
            elif isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v):
                raise ConfigError(f"{where}.values: {v!r} must be a finite number ({schema.allowed()})")
            elif schema.kind is int:
                if isinstance(v, float) and not v.is_integer():
                    raise ConfigError(f"{where}.values: {v!r} must be an integer ({schema.allowed()})")
                v = int(v)
            else:
                v = float(v)
            try:
                check_value(sec, key, schema, v)
            except ConfigError as exc:
                warnings.warn(f"{where}: value {toml_value(v)} is rejected by the config ({exc}); those cases "
                              "will be recorded as failed", UserWarning, stacklevel=4)
            clean.append(v)
        if len(set(clean)) != len(clean):
            raise ConfigError(f"{where}.values has repeated entries")
        return Parameter(name=name, values=tuple(clean))
    # sampled modes
    if schema.kind is str:
        raise ConfigError(f"{where}: {name} is a string key ({schema.allowed()}); sweep it in mode 'grid' "
                          "with values = [...]")
    if "values" in table:
        raise ConfigError(f"{where}.values is for mode 'grid'; mode {mode!r} takes min/max or a distribution")
    _check_keys(where, table, ("distribution", "min", "max", "mean", "sd", "scale"))
    dist = table.get("distribution", "uniform")
    if dist not in DISTRIBUTIONS:
        raise ConfigError(f"{where}.distribution = {dist!r}: must be one of " + ", ".join(map(repr, DISTRIBUTIONS)))
    lo = _number(f"{where}.min", table["min"]) if "min" in table else None
    hi = _number(f"{where}.max", table["max"]) if "max" in table else None
    scale = table.get("scale", "linear")
    if scale not in ("linear", "log"):
        raise ConfigError(f"{where}.scale = {scale!r}: must be 'linear' or 'log'")
    mean = sd = None
    if dist == "uniform":
        for k in ("mean", "sd"):
            if k in table:
                raise ConfigError(f"{where}.{k}: a uniform parameter takes min and max only (or set "
                                  "distribution = 'normal' / 'lognormal')")
        if lo is None or hi is None:
            raise ConfigError(f"{where}: min and max are required (uniform in [min, max])")
        if scale == "log" and lo <= 0.0:
            raise ConfigError(f"{where}.min = {table['min']!r}: must be > 0 with scale = 'log'")
    else:
        if scale != "linear":
            raise ConfigError(f"{where}.scale: only for uniform parameters (a lognormal is already log-scaled)")
        for k in ("mean", "sd"):
            if k not in table:
                raise ConfigError(f"{where}.{k} is required for distribution {dist!r}")
        mean = _number(f"{where}.mean", table["mean"])
        sd = _number(f"{where}.sd", table["sd"])
        if sd <= 0.0:
            raise ConfigError(f"{where}.sd = {table['sd']!r}: must be > 0")
        if dist == "lognormal":
            if mean <= 0.0:
                raise ConfigError(f"{where}.mean = {table['mean']!r}: must be > 0 for a lognormal")
            if lo is not None and lo <= 0.0:
                raise ConfigError(f"{where}.min = {table['min']!r}: must be > 0 for a lognormal")
    if lo is not None and hi is not None and not lo < hi:
        raise ConfigError(f"{where}: min = {lo:g} must be below max = {hi:g}")
    for k, v in (("min", lo), ("max", hi)):
        if v is not None:
            try:
                check_value(sec, key, schema, int(round(v)) if schema.kind is int else v)
            except ConfigError as exc:
                raise ConfigError(f"{where}.{k} = {v:g} is outside what {name} allows: {exc}") from None
    p = Parameter(name=name, distribution=dist, lo=lo, hi=hi, mean=mean, sd=sd, scale=scale)
    if dist != "uniform":
        _warn_outside(p, schema, where)
    return p


def _warn_outside(p: Parameter, schema, where: str) -> None:
    """Warn when an untruncated distribution puts > 0.1% of its mass outside the key's allowed range."""
    from scipy import stats

    lo = p.lo if p.lo is not None else schema.lo
    hi = p.hi if p.hi is not None else schema.hi
    if p.distribution == "normal":
        dist = stats.norm(p.mean, p.sd)
    else:
        mu, sigma = lognormal_parameters(p.mean, p.sd)
        dist = stats.lognorm(sigma, scale=math.exp(mu))
    outside = 0.0
    if p.lo is None and lo is not None:
        outside += dist.cdf(lo)
    if p.hi is None and hi is not None:
        outside += dist.sf(hi)
    if outside > 1e-3:
        warnings.warn(f"{where}: {100 * outside:.2g}% of the {p.distribution} lies outside what {p.name} allows "
                      f"({schema.allowed()}); those cases will fail. Add min/max to truncate.", UserWarning,
                      stacklevel=5)


def _uniforms(spec: SweepSpec, d: int) -> np.ndarray:
    """The (n, d) design in the unit cube for the sampled modes."""
    from scipy.stats import qmc

    n = spec.samples
    if d == 0:
        return np.empty((n, 0))
    if spec.mode == "latin-hypercube":
        return qmc.LatinHypercube(d, rng=spec.seed).random(n)
    if spec.mode == "sobol":
        return qmc.Sobol(d, scramble=True, rng=spec.seed).random_base2(int(round(math.log2(n))))
    raise AssertionError(spec.mode)


def _make_design(spec: SweepSpec) -> Design:
    params = spec.parameters
    columns: dict[str, np.ndarray] = {}
    radius = None
    if spec.mode == "grid":
        import itertools

        rows = list(itertools.product(*[p.values for p in params]))
        assignments = [{p.name: v for p, v in zip(params, row)} for row in rows]
        for j, p in enumerate(params):
            columns[p.key] = np.array([row[j] for row in rows], dtype=_dtype(p))
        return Design(assignments, columns)
    n = spec.samples
    if spec.mode in ("latin-hypercube", "sobol"):
        u = _uniforms(spec, len(params))
    else:
        rng = np.random.default_rng(spec.seed)
        if spec.mode == "observed":
            ob = spec.observed
            mass = ob.mass_earth + ob.mass_sigma * rng.standard_normal(n)
            radius = ob.radius_earth + ob.radius_sigma * rng.standard_normal(n)
            columns["mass_earth"] = mass
            columns["radius_earth"] = radius
        u = rng.random((n, len(params)))
    values = []
    for j, p in enumerate(params):
        x = p.transform(u[:, j])
        if p.schema.kind is int:
            x = np.rint(x).astype(np.int64)
        columns[p.key] = x
        values.append(x)
    assignments = []
    for i in range(n):
        a = {}
        if spec.mode == "observed":
            a["planet.mass_earth"] = float(columns["mass_earth"][i])
        for p, x in zip(params, values):
            a[p.name] = int(x[i]) if p.schema.kind is int else float(x[i])
        assignments.append(a)
    return Design(assignments, columns, radius)


def _dtype(p: Parameter):
    kind = p.schema.kind
    return object if kind is str else (np.int64 if kind is int else np.float64)
