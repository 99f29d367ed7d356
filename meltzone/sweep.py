"""Parameter studies: many planets from one TOML spec, on local cores or a Dask cluster, into one HDF5 table.

Spec
----
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
  inferred from M and R by :func:`infer_core_fraction`; draws that no rocky
  composition fits are rejected and counted. Outcome probabilities are
  fractions p = k / n of the cases that ran, with the binomial standard error
  sqrt(p (1 - p) / n) and the Wilson score interval (Wilson 1927, JASA 22:209).

Execution
---------
:func:`run_sweep` runs every case in a worker (:func:`meltzone._sweep_exec.run_case`):
a local process pool by default (``spawn`` context, one process per core), a
Dask ``LocalCluster`` (``executor="dask-local"``), an existing Dask scheduler
(``scheduler=ADDRESS``), or any ``concurrent.futures.Executor`` or
``distributed.Client`` the caller passes. Each case returns a compact dict;
only the client writes files. Finished cases are checkpointed in batches
(atomically) to ``OUT.h5.progress/``; ``resume=True`` runs only the missing
cases. The final file is written atomically and the checkpoint removed.

File
----
Root attributes: ``meltzone_kind = "sweep"``, ``meltzone_version``,
``sweep_schema_version``, ``created_utc``, ``sweep_mode``, ``sweep_spec_toml``
(the normalized spec), ``base_config_toml`` (the full base planet),
``sweep_identity``, counts (``n_cases``, ``n_ok``, ``n_failed``,
``n_rejected``) and, in observed mode, ``observed_*`` and
``probability_*`` (+ ``_se``). Group ``cases`` (dimension ``case``): one
variable per swept key (named after the key, with ``units``, ``config_key``
and ``sampling``), ``radius_earth`` and the inferred ``core_mass_fraction`` in
observed mode, ``status`` (int8: 0 ok, 1 failed, 2 rejected), ``error`` and
``warning`` (strings, empty when none), the metrics of
:data:`meltzone._sweep_exec.METRICS` (float64, NaN when there is no value),
the yes/no flags (int8: 1 yes, 0 no, -1 no result) and ``wall_time_s``. Group
``events`` (dimension ``event``): ``case``, ``time_yr``, ``kind``, ``layer``,
``depth_m``, ``pressure_pa``. Both open with ``xarray.open_dataset(path,
engine="h5netcdf", group=...)``.

Results are model estimates, not measurements.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import json
import math
import os
import shutil
import sys
import time
import tomllib
import warnings
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable, Mapping

import numpy as np

from . import _sweep_exec as _exec
from ._sweep_exec import AGE_FLAGS, FAILED, FLAGS, METRICS, OK, REJECTED, STATUS_MEANINGS, infer_core_fraction
from .config import SCHEMA, PlanetSpec, _check_value, _toml_value
from .errors import ConfigError, MeltzoneError, ResultsFileError

__all__ = ["SweepSpec", "load_spec", "run_sweep", "infer_core_fraction", "print_summary", "summary_dict",
           "plot_sweep", "read_sweep", "binomial_estimate", "progress_path", "EXAMPLE_SPEC", "SweepIncomplete"]

MODES = ("grid", "latin-hypercube", "sobol", "monte-carlo", "observed")
DISTRIBUTIONS = ("uniform", "normal", "lognormal")
#: Version of the sweep file layout (root attribute ``sweep_schema_version``).
SWEEP_SCHEMA_VERSION = 2  # 2: magma_ocean_reformed metric and flag; evolution with the solidification switch
#: Upper bound on the number of cases of one sweep.
MAX_CASES = 10_000_000


class SweepIncomplete(MeltzoneError):
    """Some cases could not be run (workers died or the connection was lost); the rest are checkpointed."""


# ====================================================================== spec
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
            return "grid values " + ", ".join(_toml_value(v) for v in self.values)
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
    inversion_mantle_nodes: int = _exec.INVERSION_DEFAULTS["interior.mantle_nodes"]
    inversion_integration_steps: int = _exec.INVERSION_DEFAULTS["interior.integration_steps"]


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
        """Arguments of :func:`meltzone._sweep_exec.run_case` (without the detail folder) for one case."""
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
        lines = ["[sweep]", f"mode = {_toml_value(self.mode)}"]
        if self.samples is not None:
            lines.append(f"samples = {self.samples}")
        if self.seed is not None:
            lines.append(f"seed = {self.seed}")
        for sec, vals in self.base.items():
            if vals:
                lines += ["", f"[base.{sec}]"] + [f"{k} = {_toml_value(v)}" for k, v in vals.items()]
        if self.observed is not None:
            lines += ["", "[observed]"] + [f"{k} = {_toml_value(v)}" for k, v in self.observed.__dict__.items()]
        for p in self.parameters:
            lines += ["", f'[parameters."{p.name}"]']
            if p.values:
                lines.append("values = [" + ", ".join(_toml_value(v) for v in p.values) + "]")
                continue
            if p.distribution != "uniform":
                lines.append(f"distribution = {_toml_value(p.distribution)}")
                lines += [f"mean = {_toml_value(p.mean)}", f"sd = {_toml_value(p.sd)}"]
            if p.lo is not None:
                lines.append(f"min = {_toml_value(p.lo)}")
            if p.hi is not None:
                lines.append(f"max = {_toml_value(p.hi)}")
            if p.scale != "linear":
                lines.append(f"scale = {_toml_value(p.scale)}")
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
        try:
            text = path.read_text(encoding="utf-8")
        except OSError as exc:
            raise ConfigError(f"cannot read sweep spec {str(path)!r}: {exc.strerror or exc}") from None
        try:
            data = tomllib.loads(text)
        except tomllib.TOMLDecodeError as exc:
            raise ConfigError(f"sweep spec {str(path)!r} is not valid TOML: {exc}") from None
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
        bpath = folder / bf
        try:
            bdata = tomllib.loads(bpath.read_text(encoding="utf-8"))
        except OSError as exc:
            raise ConfigError(f"sweep.base_file: cannot read {str(bpath)!r}: {exc.strerror or exc}") from None
        except tomllib.TOMLDecodeError as exc:
            raise ConfigError(f"sweep.base_file {str(bpath)!r} is not valid TOML: {exc}") from None
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
        from .config import _KEY_SECTION

        hint = f'; did you mean "{_KEY_SECTION[name]}.{name}"?' if name in _KEY_SECTION else \
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
                _check_value(sec, key, schema, v)
            except ConfigError as exc:
                warnings.warn(f"{where}: value {_toml_value(v)} is rejected by the config ({exc}); those cases "
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
                _check_value(sec, key, schema, int(round(v)) if schema.kind is int else v)
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


# ====================================================================== example
EXAMPLE_SPEC = '''\
# meltzone sweep spec: many planets from one base config.
# Run:  meltzone sweep this.toml -o study.h5          (local cores)
#       meltzone sweep this.toml -o study.h5 --dask-local 4
#       meltzone sweep this.toml -o study.h5 --scheduler tcp://HOST:8786
# Stop with Ctrl-C and finish later with --resume. Results are model estimates.

[sweep]
# "grid" | "latin-hypercube" | "sobol" | "monte-carlo" | "observed"
mode = "latin-hypercube"
# number of cases (not for "grid"; a power of 2 for "sobol")
samples = 32
# seed of the sample (not for "grid"): the same seed gives the same cases
seed = 2024
# base_file = "planet.toml"   # optional planet config under [base] (path relative to this file)

# The base planet: any key of `meltzone config --example`, in the same sections.
[base.planet]
name = "Orrin sweep (invented planets)"

[base.interior]
mantle_nodes = 128

[base.run]
end_time_gyr = 4.5

# One table per swept key, named "section.key".
# grid:                 values = [1.0, 2.0, 4.0]
# latin-hypercube/sobol/monte-carlo:
#   uniform:            min = 0.5, max = 15.0 (add scale = "log" for log-uniform)
#   normal / lognormal: distribution = "normal", mean = ..., sd = ..., optional min/max truncation
[parameters."planet.mass_earth"]
min = 0.5
max = 15.0
scale = "log"

[parameters."planet.core_mass_fraction"]
min = 0.15
max = 0.45

[parameters."melting.water_wt_percent"]
distribution = "lognormal"
mean = 0.05
sd = 0.05
max = 1.0

# ---- observed mode: an invented planet with invented measurements ----
# [sweep]
# mode = "observed"
# samples = 200
# seed = 7
#
# [observed]
# mass_earth = 5.2        # measured mass [Earth masses]
# mass_sigma = 0.6        # 1-sigma uncertainty
# radius_earth = 1.55     # measured radius [Earth radii]
# radius_sigma = 0.05
# age_gyr = 3.0           # age at which outcome probabilities are evaluated (model time)
#
# Each draw's core mass fraction is inferred from (M, R); draws no rocky composition with
# core mass fraction 0-0.8 can fit are rejected and counted. Other uncertain keys may be added
# as [parameters."section.key"] tables with a distribution.
'''


# ====================================================================== checkpoint
def progress_path(out_path: str | os.PathLike) -> Path:
    """The checkpoint folder of a sweep writing ``out_path`` (``OUT.h5.progress``)."""
    out = Path(out_path)
    return out.with_name(out.name + ".progress")


def detail_path(out_path: str | os.PathLike) -> Path:
    """The folder of per-case result files (``OUT.h5.detail``)."""
    out = Path(out_path)
    return out.with_name(out.name + ".detail")


class _Checkpoint:
    """Finished cases on disk: ``manifest.json`` plus ``part-NNNNNN.json`` batches, each written atomically."""

    def __init__(self, folder: Path, identity: str, n_cases: int, every: int, seconds: float):
        self.folder = folder
        self.identity = identity
        self.n_cases = n_cases
        self.every = max(int(every), 1)
        self.seconds = float(seconds)
        self.buffer: list[dict] = []
        self.last = time.monotonic()
        self.seq = 0
        self._lock = None

    # -- setup
    def open(self, resume: bool) -> dict[int, dict]:
        done: dict[int, dict] = {}
        if self.folder.exists():
            manifest = self._read_manifest()
            n_parts = len(list(self.folder.glob("part-*.json")))
            if not resume:
                raise ConfigError(f"{self.folder} holds a checkpoint of an unfinished sweep ({n_parts} batches): "
                                  "add --resume to finish it, or remove the folder to start again")
            if manifest.get("identity") != self.identity:
                raise ConfigError(f"the checkpoint in {self.folder} belongs to a different sweep spec; use the "
                                  "spec it was started with, or remove the folder to start again")
            self._acquire_lock()
            for tmp in self.folder.glob("*.tmp"):
                tmp.unlink(missing_ok=True)
            for part in sorted(self.folder.glob("part-*.json")):
                try:
                    rows = json.loads(part.read_text(encoding="utf-8"))["results"]
                except (OSError, ValueError, KeyError) as exc:
                    warnings.warn(f"skipping unreadable checkpoint batch {part.name}: {exc}", UserWarning,
                                  stacklevel=3)
                    continue
                for row in rows:
                    i = int(row["case"])
                    if 0 <= i < self.n_cases:
                        done.setdefault(i, row)
                try:
                    self.seq = max(self.seq, int(part.stem.split("-")[1]))
                except (IndexError, ValueError):
                    pass
        else:
            self.folder.mkdir(parents=True)
            self._acquire_lock()
            self._atomic_write("manifest.json", {"identity": self.identity, "n_cases": self.n_cases,
                                                 "meltzone_kind": "sweep-checkpoint",
                                                 "created_utc": _now()})
        return done

    def _read_manifest(self) -> dict:
        try:
            return json.loads((self.folder / "manifest.json").read_text(encoding="utf-8"))
        except (OSError, ValueError):
            raise ConfigError(f"{self.folder} is not a meltzone sweep checkpoint (no readable manifest.json); "
                              "remove it to start again") from None

    def _acquire_lock(self) -> None:
        try:
            import fcntl
        except ImportError:  # pragma: no cover - not POSIX
            return
        fh = open(self.folder / "lock", "a")
        try:
            fcntl.flock(fh, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            fh.close()
            raise ConfigError(f"another sweep is writing {self.folder} (its lock is held); wait for it or stop "
                              "it first") from None
        self._lock = fh

    def _atomic_write(self, name: str, obj) -> None:
        tmp = self.folder / f".{name}.{os.getpid()}.tmp"
        with open(tmp, "w", encoding="utf-8") as fh:
            json.dump(obj, fh, allow_nan=True, separators=(",", ":"))
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, self.folder / name)

    # -- running
    def add(self, row: dict) -> None:
        self.buffer.append(row)
        if len(self.buffer) >= self.every or time.monotonic() - self.last >= self.seconds:
            self.flush()

    def flush(self) -> None:
        if self.buffer:
            self.seq += 1
            self._atomic_write(f"part-{self.seq:06d}.json", {"results": self.buffer})
            self.buffer = []
        self.last = time.monotonic()

    def close(self) -> None:
        if self._lock is not None:
            self._lock.close()
            self._lock = None

    def remove(self) -> None:
        self.close()
        shutil.rmtree(self.folder, ignore_errors=True)


def _now() -> str:
    return _dt.datetime.now(_dt.timezone.utc).replace(microsecond=0).isoformat()


# ====================================================================== progress bar
class _ProgressBar:
    """Cases done, failures and ETA on stderr (redrawn at most 5 times a second)."""

    def __init__(self, total: int, stream=None):
        self.total = total
        self.stream = stream or sys.stderr
        self.last = 0.0
        self.width = 28

    def __call__(self, info: dict) -> None:
        now = time.monotonic()
        if now - self.last < 0.2 and info["done"] < self.total:
            return
        self.last = now
        frac = info["done"] / self.total if self.total else 1.0
        bar = "#" * int(round(frac * self.width))
        eta = info["eta_s"]
        eta_text = "--" if eta is None else _duration(eta)
        bad = f", {info['failed']} failed" + (f", {info['rejected']} rejected" if info["rejected"] else "")
        self.stream.write(f"\r[{bar:<{self.width}}] {info['done']}/{self.total} cases{bad}, "
                          f"{info['rate']:.3g}/s, ETA {eta_text}   ")
        self.stream.flush()

    def close(self) -> None:
        self.stream.write("\n")
        self.stream.flush()


def _duration(s: float) -> str:
    s = int(round(s))
    if s < 60:
        return f"{s}s"
    if s < 3600:
        return f"{s // 60}m{s % 60:02d}s"
    return f"{s // 3600}h{(s % 3600) // 60:02d}m"


# ====================================================================== executors
class _Deferred:
    __slots__ = ("fn", "args", "value", "error")

    def __init__(self, fn, args):
        self.fn, self.args, self.value, self.error = fn, args, None, None

    def done(self) -> bool:
        return self.value is not None or self.error is not None


class _SerialBackend:
    """Cases run one after the other in this process (for tests and debugging)."""

    name = "serial"
    restartable = False

    def submit(self, fn, *args):
        return _Deferred(fn, args)

    def completed(self, futures):
        for f in futures:
            try:
                f.value = f.fn(*f.args)
            except Exception as exc:  # run_case catches case errors; anything else is machinery
                f.error = exc
            yield f

    def outcome(self, f):
        return ("ok", f.value) if f.error is None else ("lost", _exec._message(f.error))

    def abort(self, futures):
        pass

    def restart(self):  # pragma: no cover - not restartable
        raise AssertionError

    def close(self):
        pass


class _PoolBackend:
    """A concurrent.futures executor: our own process pool (restartable) or one the caller passed."""

    def __init__(self, executor=None, workers: int | None = None):
        self.own = executor is None
        self.workers = workers or os.cpu_count() or 1
        self.executor = executor if executor is not None else self._new_pool()
        self.restartable = self.own
        self.name = f"process pool ({self.workers} workers)" if self.own else type(executor).__name__

    def _new_pool(self):
        import multiprocessing as mp
        from concurrent.futures import ProcessPoolExecutor

        # spawn: a fresh interpreter per worker (no forked numba/LLVM or thread state); the workers
        # import meltzone and load the compiled kernels from the shared numba cache
        return ProcessPoolExecutor(self.workers, mp_context=mp.get_context("spawn"), initializer=_exec.worker_init)

    def submit(self, fn, *args):
        return self.executor.submit(fn, *args)

    def completed(self, futures):
        from concurrent.futures import as_completed

        return as_completed(futures)

    def outcome(self, f):
        from concurrent.futures import CancelledError
        from concurrent.futures.process import BrokenProcessPool

        try:
            return "ok", f.result()
        except BrokenProcessPool as exc:
            return "broken", f"a worker process died ({exc})" if str(exc) else "a worker process died"
        except CancelledError:
            return "lost", "cancelled"
        except Exception as exc:
            return "lost", _exec._message(exc)

    def abort(self, futures):
        for f in futures:
            f.cancel()
        if self.own:
            self._terminate()

    def _terminate(self):
        procs = list((getattr(self.executor, "_processes", None) or {}).values())
        self.executor.shutdown(wait=False, cancel_futures=True)
        for p in procs:  # our own workers, by their process objects
            if p.is_alive():
                p.terminate()
        for p in procs:
            p.join(timeout=5)

    def restart(self):
        self._terminate()
        self.executor = self._new_pool()

    def close(self):
        if self.own:
            self.executor.shutdown(wait=True)


class _DaskBackend:
    """A dask.distributed Client: ours (LocalCluster or a scheduler address) or one the caller passed."""

    restartable = False

    def __init__(self, client=None, *, local_workers: int | None = None, scheduler: str | None = None,
                 dashboard: str | None = None):
        self.cluster = None
        self.dashboard = dashboard
        self.tmp = None
        self.own = client is None
        if client is None:
            try:
                import distributed  # noqa: F401
            except ImportError:
                raise ConfigError("Dask executors need dask.distributed: pip install 'meltzone[cluster]'") from None
            from distributed import Client

            if scheduler is not None:
                try:
                    client = Client(scheduler, timeout="30s")
                except (OSError, TimeoutError) as exc:
                    raise ConfigError(f"cannot connect to the Dask scheduler at {scheduler!r}: {exc}") from None
                self.name = f"dask scheduler {scheduler}"
            else:
                client = self._local_cluster(local_workers or os.cpu_count() or 1)
        else:
            self.name = f"dask client {getattr(client, 'scheduler', None) and client.scheduler.address}"
        self.client = client
        self._base_future = None

    def _local_cluster(self, n: int):
        import logging
        import tempfile

        import dask
        from distributed import Client, LocalCluster

        self.tmp = tempfile.mkdtemp(prefix="meltzone-dask-")
        try:
            # the workers' statistical profiler samples every task's stack (~5% of a tiny case); not needed
            with dask.config.set({"temporary-directory": self.tmp, "distributed.worker.profile.enabled": False}):
                # no dashboard unless asked (then on loopback only); the scheduler's remaining HTTP routes
                # (health) on a free loopback port
                dash = self.dashboard
                self.cluster = LocalCluster(n_workers=n, threads_per_worker=1, processes=True, host="127.0.0.1",
                                            dashboard_address=dash, worker_dashboard_address=None,
                                            scheduler_kwargs={"dashboard_address": dash or "127.0.0.1:0"},
                                            local_directory=self.tmp, silence_logs=logging.ERROR)
            self.name = f"dask LocalCluster ({n} workers)"
            return Client(self.cluster)
        except BaseException:
            if self.cluster is not None:
                self.cluster.close()
            shutil.rmtree(self.tmp, ignore_errors=True)
            raise

    def submit(self, fn, *args, key=None):
        return self.client.submit(fn, *args, key=key, pure=False)

    def scatter_base(self, base: dict):
        if self._base_future is None:
            # a list: scatter() would take a dict's items as separate keyed data
            self._base_future = self.client.scatter([base], broadcast=True, hash=False)[0]
        return self._base_future

    def completed(self, futures):
        from distributed import as_completed

        return as_completed(futures)

    def outcome(self, f):
        try:
            return "ok", f.result()
        except Exception as exc:  # KilledWorker, CancelledError, lost connection: machinery, not the case
            return "lost", _exec._message(exc)

    def abort(self, futures):
        try:
            self.client.cancel(list(futures))
        except Exception:  # pragma: no cover - best effort on the way out
            pass

    def close(self):
        if self._base_future is not None and not self.own:
            try:
                self.client.cancel([self._base_future])
            except Exception:  # pragma: no cover
                pass
        if self.own:
            self.client.close()
            if self.cluster is not None:
                self.cluster.close()
        if self.tmp is not None:
            shutil.rmtree(self.tmp, ignore_errors=True)


def _is_dask_client(obj) -> bool:
    return type(obj).__module__.split(".")[0] == "distributed" and hasattr(obj, "submit") and hasattr(obj, "gather")


def _backend(executor, workers, scheduler, dashboard=None):
    if workers is not None and (isinstance(workers, bool) or not isinstance(workers, int) or workers < 1):
        raise ConfigError(f"workers = {workers!r}: must be an integer >= 1")
    if scheduler is not None:
        if executor not in (None, "dask"):
            raise ConfigError("give either a scheduler address or an executor, not both")
        if workers is not None:
            raise ConfigError("workers: the cluster behind a scheduler address has its own workers")
        return _DaskBackend(scheduler=scheduler)
    if executor is None or executor == "processes":
        return _PoolBackend(workers=workers)
    if executor == "serial":
        return _SerialBackend()
    if executor == "dask-local":
        return _DaskBackend(local_workers=workers, dashboard=dashboard)
    if dashboard is not None:
        raise ConfigError("dashboard: only for a Dask LocalCluster started here (executor 'dask-local')")
    if executor == "dask":
        raise ConfigError("executor 'dask' needs scheduler=ADDRESS (or pass a distributed.Client)")
    if isinstance(executor, str):
        raise ConfigError(f"executor = {executor!r}: must be 'processes', 'serial', 'dask-local', a "
                          "concurrent.futures.Executor or a distributed.Client")
    if workers is not None:
        raise ConfigError("workers: an executor passed by the caller has its own workers")
    if _is_dask_client(executor):
        return _DaskBackend(executor)
    from concurrent.futures import Executor

    if isinstance(executor, Executor):
        return _PoolBackend(executor)
    raise ConfigError(f"executor: {type(executor).__name__} is neither a concurrent.futures.Executor nor a "
                      "distributed.Client")


# ====================================================================== run
@dataclass
class SweepReport:
    """What one call of :func:`run_sweep` did."""

    path: str
    n_cases: int
    n_ok: int
    n_failed: int
    n_rejected: int
    ran: list          # case indices executed by this call
    resumed: int       # cases taken from the checkpoint
    executor: str
    wall_time_s: float

    def line(self) -> str:
        extra = f", {self.n_rejected} rejected" if self.n_rejected else ""
        res = f" ({self.resumed} from the checkpoint)" if self.resumed else ""
        return (f"wrote {self.path}: {self.n_cases} cases, {self.n_failed} failed{extra}{res}; "
                f"{len(self.ran)} run on {self.executor} in {self.wall_time_s:.1f} s")


def run_sweep(spec_or_path, out_path, executor=None, workers: int | None = None, resume: bool = False,
              progress=None, keep_detail: bool = False, *, scheduler: str | None = None,
              checkpoint_every: int = 64, checkpoint_seconds: float = 5.0, max_pool_restarts: int = 3,
              dashboard: str | None = None) -> SweepReport:
    """Run every case of a sweep and write one HDF5 table.

    Parameters
    ----------
    spec_or_path : str, PathLike, mapping or SweepSpec
        The sweep spec (see the module docstring and ``meltzone sweep --example``).
    out_path : str or PathLike
        The HDF5 file to write (atomically, at the end).
    executor : None, str, concurrent.futures.Executor or distributed.Client
        None or ``"processes"``: a local process pool of ``workers`` processes (default: the number of
        cores); ``"serial"``: this process; ``"dask-local"``: a Dask LocalCluster of ``workers``
        processes with one thread each, on 127.0.0.1, without dashboard, scratch in a temporary folder
        removed afterwards; an Executor or Client of the caller's (used, not shut down).
    workers : int, optional
        Number of worker processes for ``"processes"`` and ``"dask-local"``.
    resume : bool
        Take finished cases from ``OUT.h5.progress/`` and run only the missing ones.
    progress : None, bool or callable
        None: a progress bar on stderr when it is a terminal; False: none; True: always; a callable
        is called with a dict (done, total, failed, rejected, ran, elapsed_s, rate, eta_s).
    keep_detail : bool
        Also keep each case's full result in ``OUT.h5.detail/case-NNNNNN.h5`` (written by the
        worker that ran it) when :func:`meltzone.results.write` exists; otherwise warn and skip.
    scheduler : str, optional
        Address of a running Dask scheduler (``tcp://host:8786``) to connect a Client to.
    checkpoint_every, checkpoint_seconds : int, float
        A checkpoint batch is written after this many new cases or this many seconds, whichever
        comes first (and on Ctrl-C).
    max_pool_restarts : int
        How often a local process pool whose worker died is restarted before giving up.
    dashboard : str, optional
        ``"HOST:PORT"`` at which a Dask LocalCluster started here (``executor="dask-local"``) serves its
        dashboard, e.g. ``"127.0.0.1:8787"``; none by default.

    Returns
    -------
    SweepReport
        Counts, the cases run by this call, the executor and the wall time.

    Raises
    ------
    ConfigError
        A mistake in the spec, a checkpoint of another spec, or a bad executor argument.
    SweepIncomplete
        Some cases could not be run (machinery failure); the rest are checkpointed, re-run with resume.
    """
    t0 = time.perf_counter()
    spec = load_spec(spec_or_path)
    out = Path(out_path)
    if not out.parent.exists():
        raise ConfigError(f"output folder {str(out.parent)!r} does not exist")
    if out.is_dir():
        raise ConfigError(f"output {str(out)!r} is a folder; give a file name such as study.h5")
    n = spec.n_cases
    identity = spec.identity()
    _remove_orphans(out)

    detail = None
    if keep_detail:
        from . import results as _results

        if hasattr(_results, "write"):
            detail = str(detail_path(out).resolve())  # absolute: workers may run in another folder
        else:
            warnings.warn("keep_detail: this version of meltzone.results has no write(); per-case detail files "
                          "are skipped", UserWarning, stacklevel=2)

    if resume and not progress_path(out).exists() and _complete_file(out, identity):
        counts = _counts_from_file(out)
        return SweepReport(str(out), n, *counts, ran=[], resumed=n, executor="none (already complete)",
                           wall_time_s=time.perf_counter() - t0)

    ckpt = _Checkpoint(progress_path(out), identity, n, checkpoint_every, checkpoint_seconds)
    done = ckpt.open(resume)
    resumed = len(done)
    ran: list[int] = []
    lost: dict[int, str] = {}
    bar = None
    if progress is None:
        progress = sys.stderr.isatty()
    if progress is True:
        bar = _ProgressBar(n)
        callback: Callable | None = bar
    elif callable(progress):
        callback = progress
    else:
        callback = None
    state = {"failed": sum(1 for r in done.values() if r["status"] == FAILED),
             "rejected": sum(1 for r in done.values() if r["status"] == REJECTED)}
    t_run = time.monotonic()

    def report():
        if callback is None:
            return
        elapsed = time.monotonic() - t_run
        rate = len(ran) / elapsed if elapsed > 0 else 0.0
        remaining = n - len(done)
        callback({"done": len(done), "total": n, "failed": state["failed"], "rejected": state["rejected"],
                  "ran": len(ran), "elapsed_s": elapsed, "rate": rate,
                  "eta_s": remaining / rate if rate > 0 else None})

    def record(i: int, row: dict):
        if i in done:
            return
        done[i] = row
        ran.append(i)
        if row["status"] == FAILED:
            state["failed"] += 1
        elif row["status"] == REJECTED:
            state["rejected"] += 1
        ckpt.add(row)
        report()

    todo = [i for i in range(n) if i not in done]
    backend = None
    futures: dict = {}
    try:
        report()
        if todo:
            backend = _backend(executor, workers, scheduler, dashboard)
        restarts = 0
        token = identity[:12] + "-" + os.urandom(4).hex()
        while todo:
            futures = {}
            base_arg = backend.scatter_base(spec.base) if isinstance(backend, _DaskBackend) else spec.base
            # a few cases per task share the scheduler's and the pipe's per-task cost (1 per task for
            # small sweeps, up to 16 for large ones); results are still recorded and checkpointed per case
            size = max(1, min(16, len(todo) // 64))
            for start in range(0, len(todo), size):
                chunk = todo[start:start + size]
                payload = [(idx, assign, obs) for idx, _, assign, obs in (spec.case_payload(i) for i in chunk)]
                if isinstance(backend, _DaskBackend):
                    fut = backend.submit(_exec.run_cases, payload, base_arg, detail,
                                         key=f"meltzone-cases-{token}-{chunk[0]}")
                else:
                    fut = backend.submit(_exec.run_cases, payload, base_arg, detail)
                futures[fut] = chunk
            broken = None
            for fut in backend.completed(list(futures)):
                kind, value = backend.outcome(fut)
                chunk = futures[fut]
                if kind == "ok":
                    for row in value:
                        record(row["case"], row)
                elif kind == "lost":
                    lost.update({i: value for i in chunk})
                else:
                    broken = value
                    break
            if broken is not None:
                for fut, chunk in futures.items():  # keep whatever finished before the pool broke
                    if fut.done():
                        kind, value = backend.outcome(fut)
                        if kind == "ok":
                            for row in value:
                                record(row["case"], row)
                ckpt.flush()
                if not backend.restartable or restarts >= max_pool_restarts:
                    lost.update({i: broken for i in todo if i not in done})
                else:
                    restarts += 1
                    warnings.warn(f"{broken}; restarting the process pool ({restarts}/{max_pool_restarts})",
                                  UserWarning, stacklevel=2)
                    backend.restart()
            todo = [i for i in todo if i not in done and i not in lost]
        ckpt.flush()
    except BaseException:
        ckpt.flush()
        if done:
            ckpt.close()
        else:  # nothing finished: leave no checkpoint that a plain re-run would trip over
            ckpt.remove()
        if backend is not None:
            backend.abort(list(futures))
            backend.close()
        if bar is not None:
            bar.close()
        raise
    if bar is not None:
        bar.close()
    if backend is not None:
        backend.close()
    if lost:
        ckpt.close()
        first = next(iter(lost.values()))
        raise SweepIncomplete(f"{len(lost)} of {n} cases could not be run ({first}); {len(done)} finished cases are "
                              f"checkpointed in {ckpt.folder}; re-run with --resume")
    rows = [done[i] for i in range(n)]
    write_sweep_file(out, spec, rows, identity=identity)
    ckpt.remove()
    counts = (sum(r["status"] == OK for r in rows), sum(r["status"] == FAILED for r in rows),
              sum(r["status"] == REJECTED for r in rows))
    return SweepReport(str(out), n, *counts, ran=ran, resumed=resumed,
                       executor="none" if backend is None else backend.name, wall_time_s=time.perf_counter() - t0)


def _remove_orphans(out: Path) -> None:
    """Temporaries of this output left by a killed writer (atomic_h5 names them .OUT.h5.*.part)."""
    folder = out.parent if str(out.parent) else Path(".")
    for tmp in folder.glob(f".{out.name}.*.part"):
        try:
            if time.time() - tmp.stat().st_mtime > 1.0:
                tmp.unlink()
        except OSError:
            pass


def _complete_file(out: Path, identity: str) -> bool:
    if not out.is_file():
        return False
    try:
        import h5py

        with h5py.File(out, "r") as f:
            return f.attrs.get("meltzone_kind") == "sweep" and f.attrs.get("sweep_identity") == identity
    except OSError:
        return False


def _counts_from_file(out: Path) -> tuple[int, int, int]:
    import h5py

    with h5py.File(out, "r") as f:
        s = f["cases/status"][()]
    return int(np.sum(s == OK)), int(np.sum(s == FAILED)), int(np.sum(s == REJECTED))


# ====================================================================== file
def binomial_estimate(k: int, n: int, z: float = 1.959963984540054) -> dict:
    """Fraction p = k/n with its binomial standard error sqrt(p(1-p)/n) and the Wilson score interval.

    Wilson 1927, J. Am. Stat. Assoc. 22:209 (the interval stays inside [0, 1] and is sensible at
    k = 0 or k = n, where the standard error vanishes). z = 1.96 gives ~95%.
    """
    if n <= 0:
        return {"k": int(k), "n": int(n), "p": None, "se": None, "wilson_low": None, "wilson_high": None}
    p = k / n
    se = math.sqrt(p * (1.0 - p) / n)
    denom = 1.0 + z * z / n
    centre = (p + z * z / (2 * n)) / denom
    half = z * math.sqrt(p * (1 - p) / n + z * z / (4 * n * n)) / denom
    return {"k": int(k), "n": int(n), "p": p, "se": se, "wilson_low": max(centre - half, 0.0),
            "wilson_high": min(centre + half, 1.0)}


def _flag_names(spec_mode: str) -> dict:
    names = dict(FLAGS)
    if spec_mode == "observed":
        names.update(AGE_FLAGS)
    return names


def observed_probabilities(status: np.ndarray, flags: Mapping[str, np.ndarray]) -> dict:
    """Outcome probabilities of the observed mode among the cases that ran, and the rejected fraction."""
    status = np.asarray(status)
    ok = status == OK
    n_ok = int(np.sum(ok))
    out = {"rejected": binomial_estimate(int(np.sum(status == REJECTED)), len(status)),
           "failed": int(np.sum(status == FAILED))}
    for name in AGE_FLAGS:
        if name in flags:
            out[name] = binomial_estimate(int(np.sum(np.asarray(flags[name])[ok] == 1)), n_ok)
    return out


def write_sweep_file(path, spec: SweepSpec, rows: list, identity: str | None = None) -> None:
    """Write the sweep table atomically (layout: the "File" section of this module's docstring)."""
    from . import __version__
    from .results import atomic_h5, write_coordinate, write_variable

    n = len(rows)
    design = spec.design()
    status = np.array([r["status"] for r in rows], dtype=np.int8)
    flag_names = _flag_names(spec.mode)
    flags = {name: np.array([r["flags"].get(name, -1) if r["status"] == OK else -1 for r in rows], dtype=np.int8)
             for name in flag_names}
    with atomic_h5(path) as f:
        f.attrs["meltzone_kind"] = "sweep"
        f.attrs["meltzone_version"] = __version__
        f.attrs["sweep_schema_version"] = SWEEP_SCHEMA_VERSION
        f.attrs["created_utc"] = _now()
        f.attrs["sweep_mode"] = spec.mode
        f.attrs["sweep_spec_toml"] = spec.to_toml()
        f.attrs["base_config_toml"] = spec.base_spec().to_toml()
        f.attrs["sweep_identity"] = identity or spec.identity()
        f.attrs["n_cases"] = n
        f.attrs["n_ok"] = int(np.sum(status == OK))
        f.attrs["n_failed"] = int(np.sum(status == FAILED))
        f.attrs["n_rejected"] = int(np.sum(status == REJECTED))
        f.attrs["note"] = "Results are model estimates, not measurements."
        f.attrs["sources"] = ("sampling: scipy.stats.qmc (Latin hypercube, McKay et al. 1979; scrambled Sobol', "
                              "Sobol' 1967 / Owen 1998); binomial standard errors and Wilson 1927 intervals")
        if spec.observed is not None:
            for k, v in spec.observed.__dict__.items():
                f.attrs[f"observed_{k}"] = v
            probs = observed_probabilities(status, flags)
            for name in AGE_FLAGS:
                est = probs[name]
                f.attrs[f"probability_{name}"] = np.nan if est["p"] is None else est["p"]
                f.attrs[f"probability_{name}_se"] = np.nan if est["se"] is None else est["se"]

        g = f.create_group("cases", track_order=True)
        write_coordinate(g, "case", np.arange(n, dtype=np.int64), "1", "case index")
        by_key = {p.key: p for p in spec.parameters}
        for name, values in design.columns.items():
            if name == "radius_earth":
                ds = write_variable(g, name, values, ("case",), "Earth radii",
                                    "planet radius drawn from the observed radius and its uncertainty")
                ds.attrs["earth_radius_m"] = 6.371e6
                continue
            if name == "mass_earth" and spec.mode == "observed":
                ds = write_variable(g, name, values, ("case",), "Earth masses",
                                    "planet mass drawn from the observed mass and its uncertainty")
                ds.attrs["config_key"] = "planet.mass_earth"
                continue
            p = by_key[name]
            data = np.array(list(values), dtype=object).astype(str) if p.schema.kind is str else values
            ds = write_variable(g, name, data, ("case",), p.schema.unit or "1", p.schema.doc)
            ds.attrs["config_key"] = p.name
            ds.attrs["sampling"] = p.describe()
            if p.scale == "log":
                ds.attrs["scale"] = "log"
        if spec.mode == "observed":
            cmf = np.array([r["derived"].get("core_mass_fraction", np.nan) for r in rows], dtype=np.float64)
            ds = write_variable(g, "core_mass_fraction", cmf, ("case",), "1",
                                "core mass fraction inferred from the drawn mass and radius (NaN: rejected)")
            ds.attrs["config_key"] = "planet.core_mass_fraction"
        ds = write_variable(g, "status", status, ("case",), "1", "case status")
        ds.attrs["flag_values"] = np.array([OK, FAILED, REJECTED], dtype=np.int8)
        ds.attrs["flag_meanings"] = STATUS_MEANINGS
        write_variable(g, "error", np.array([r["error"] for r in rows], dtype=str), ("case",), "1",
                       "why the case failed or was rejected (empty when it ran)")
        write_variable(g, "warning", np.array([r.get("warning", "") for r in rows], dtype=str), ("case",), "1",
                       "warnings raised while the case ran (empty when none)")
        for name, (unit, long_name) in METRICS.items():
            data = np.array([r["metrics"].get(name, np.nan) if r["status"] == OK else np.nan for r in rows],
                            dtype=np.float64)
            write_variable(g, name, data, ("case",), unit, long_name)
        for name, long_name in flag_names.items():
            ds = write_variable(g, name, flags[name], ("case",), "1", long_name)
            ds.attrs["flag_values"] = np.array([-1, 0, 1], dtype=np.int8)
            ds.attrs["flag_meanings"] = "no_result no yes"
        write_variable(g, "wall_time_s", np.array([r.get("wall_time_s", np.nan) for r in rows], dtype=np.float64),
                       ("case",), "s", "wall time of the case in its worker (varies between runs)")

        ev = [(r["case"], *e) for r in rows for e in r["events"]]
        e = f.create_group("events", track_order=True)
        write_coordinate(e, "event", np.arange(len(ev), dtype=np.int64), "1", "event index")
        write_variable(e, "case", np.array([x[0] for x in ev], dtype=np.int64), ("event",), "1",
                       "case the event belongs to")
        write_variable(e, "time_yr", np.array([x[1] for x in ev], dtype=np.float64), ("event",), "yr",
                       "model time of the event")
        write_variable(e, "kind", np.array([x[2] for x in ev], dtype=str), ("event",), "1",
                       "event kind (see meltzone.layers.EVENT_KINDS)")
        write_variable(e, "layer", np.array([x[3] for x in ev], dtype=np.int64), ("event",), "1",
                       "melt layer id within its case (-1: regime event)")
        write_variable(e, "depth_m", np.array([x[4] for x in ev], dtype=np.float64), ("event",), "m",
                       "depth of the event (NaN: none)")
        write_variable(e, "pressure_pa", np.array([x[5] for x in ev], dtype=np.float64), ("event",), "Pa",
                       "pressure at the event's depth (NaN: none)")


def read_sweep(path) -> dict:
    """The sweep file as plain NumPy: {"attrs", "cases": {name: array}, "units", "events": {name: array}}."""
    import h5py

    path = Path(path)
    try:
        f = h5py.File(path, "r")
    except OSError as exc:
        raise ResultsFileError(f"cannot open {str(path)!r} as an HDF5 file: {exc}") from None
    with f:
        kind = f.attrs.get("meltzone_kind")
        if kind != "sweep":
            raise ResultsFileError(f"{str(path)!r} is not a meltzone sweep file (meltzone_kind = {kind!r})")
        attrs = {k: (v.item() if isinstance(v, np.generic) else v) for k, v in f.attrs.items()}
        cases, units, meta = {}, {}, {}
        for name, ds in f["cases"].items():
            data = ds[()]
            if ds.dtype.kind == "O":
                data = np.array([x.decode() if isinstance(x, bytes) else x for x in data], dtype=object)
            cases[name] = data
            units[name] = ds.attrs.get("units", "")
            meta[name] = {k: (v.item() if isinstance(v, np.generic) else v) for k, v in ds.attrs.items()
                          if k in ("config_key", "sampling", "scale", "long_name")}
        events = {}
        for name, ds in f["events"].items():
            data = ds[()]
            if ds.dtype.kind == "O":
                data = np.array([x.decode() if isinstance(x, bytes) else x for x in data], dtype=object)
            events[name] = data
    return {"attrs": attrs, "cases": cases, "units": units, "meta": meta, "events": events}


def _input_names(data: dict) -> list[str]:
    return [k for k, m in data["meta"].items() if "config_key" in m or k == "radius_earth"]


def _stats(values: np.ndarray) -> dict:
    v = np.asarray(values, dtype=np.float64)
    v = v[np.isfinite(v)]
    if not len(v):
        return {"n": 0, "min": None, "median": None, "max": None}
    return {"n": int(len(v)), "min": float(np.min(v)), "median": float(np.median(v)), "max": float(np.max(v))}


def summary_dict(path) -> dict:
    """Compact statistics of a sweep file: counts, failures, inputs and metrics (min/median/max over the
    cases that ran), yes/no outcome fractions with binomial standard errors, and the observed-mode
    probabilities."""
    data = read_sweep(path)
    a = data["attrs"]
    c = data["cases"]
    status = c["status"]
    ok = status == OK
    errors: dict[str, int] = {}
    for s, msg in zip(status, c["error"]):
        if s == FAILED:
            errors[msg] = errors.get(msg, 0) + 1
    out = {
        "path": str(path), "kind": "sweep", "mode": a.get("sweep_mode"), "created_utc": a.get("created_utc"),
        "n_cases": int(len(status)), "n_ok": int(np.sum(ok)), "n_failed": int(np.sum(status == FAILED)),
        "n_rejected": int(np.sum(status == REJECTED)),
        "failures": [{"error": m, "count": k} for m, k in sorted(errors.items(), key=lambda kv: -kv[1])[:5]],
        "inputs": {}, "metrics": {}, "outcomes": {},
        "note": "Results are model estimates, not measurements.",
    }
    for name in _input_names(data):
        if c[name].dtype.kind in "fiu":
            out["inputs"][name] = {"unit": data["units"][name], **_stats(c[name])}
        else:
            vals, counts = np.unique(c[name].astype(str), return_counts=True)
            out["inputs"][name] = {"unit": "", "values": {str(v): int(k) for v, k in zip(vals, counts)}}
    if "core_mass_fraction" in c and "core_mass_fraction" not in out["inputs"]:
        out["inputs"]["core_mass_fraction"] = {"unit": "1", **_stats(c["core_mass_fraction"])}
    for name in METRICS:
        if name in c:
            out["metrics"][name] = {"unit": data["units"][name], **_stats(c[name][ok])}
    for name in _flag_names(a.get("sweep_mode", "")):
        if name in c:
            out["outcomes"][name] = binomial_estimate(int(np.sum(c[name][ok] == 1)), int(np.sum(ok)))
    if a.get("sweep_mode") == "observed":
        probs = observed_probabilities(status, {k: c[k] for k in AGE_FLAGS if k in c})
        out["observed"] = {
            "mass_earth": a.get("observed_mass_earth"), "mass_sigma": a.get("observed_mass_sigma"),
            "radius_earth": a.get("observed_radius_earth"), "radius_sigma": a.get("observed_radius_sigma"),
            "age_gyr": a.get("observed_age_gyr"), **probs,
            "note": "probabilities among the draws that ran (rocky fits); standard error sqrt(p(1-p)/n)",
        }
    return out


def print_summary(path, as_json: bool = False) -> None:
    """Print :func:`summary_dict` as a table for people or, with ``as_json``, one JSON object (SI)."""
    s = summary_dict(path)
    if as_json:
        print(json.dumps(s, indent=2, allow_nan=False))
        return
    lines = [f"sweep     {s['path']} (mode {s['mode']}, written {s['created_utc']})",
             f"cases     {s['n_cases']}: {s['n_ok']} ran, {s['n_failed']} failed, {s['n_rejected']} rejected"]
    for fail in s["failures"]:
        lines.append(f"  {fail['count']:>5} x {fail['error']}")
    lines.append("")
    lines.append(f"{'':<28}{'unit':>14}{'n':>7}{'min':>12}{'median':>12}{'max':>12}")

    def row(name, st):
        if "values" in st:
            return f"{name:<28}{'':>14}  " + ", ".join(f"{v}: {k}" for v, k in st["values"].items())
        fmt = (lambda v: f"{'-':>12}" if v is None else f"{v:>12.4g}")
        return f"{name:<28}{st['unit']:>14}{st['n']:>7}{fmt(st['min'])}{fmt(st['median'])}{fmt(st['max'])}"

    lines.append("inputs")
    lines += ["  " + row(k, v) for k, v in s["inputs"].items()]
    lines.append("outcome metrics (cases that ran)")
    lines += ["  " + row(k, v) for k, v in s["metrics"].items()]
    lines.append("")
    lines.append(f"{'yes/no outcomes (cases that ran)':<44}{'fraction':>10}{'+/- s.e.':>10}{'k/n':>12}")
    for name, est in s["outcomes"].items():
        if est["p"] is None:
            lines.append(f"  {name:<42}{'-':>10}")
        else:
            lines.append(f"  {name:<42}{est['p']:>10.3f}{est['se']:>10.3f}{est['k']:>7}/{est['n']}")
    if "observed" in s:
        o = s["observed"]
        lines.append("")
        lines.append(f"observed  M = {o['mass_earth']:g} +/- {o['mass_sigma']:g} M_E, R = {o['radius_earth']:g} "
                     f"+/- {o['radius_sigma']:g} R_E, at {o['age_gyr']:g} Gyr")
        rej = o["rejected"]
        if rej["p"] is not None:
            lines.append(f"  draws no rocky composition fits: {rej['k']}/{rej['n']} = {rej['p']:.3f} +/- "
                         f"{rej['se']:.3f}")
        for name in AGE_FLAGS:
            est = o.get(name)
            if est is None or est["p"] is None:
                continue
            lines.append(f"  P({name}) = {est['p']:.3f} +/- {est['se']:.3f} (95% Wilson {est['wilson_low']:.3f}-"
                         f"{est['wilson_high']:.3f}; n = {est['n']})")
    lines.append("")
    lines.append(s["note"])
    print("\n".join(lines))


# ====================================================================== figures
SWEEP_FIGURES = ("lifetime", "probability")


def _column_or_base(data: dict, name: str):
    c = data["cases"]
    if name in c:
        return np.asarray(c[name], dtype=np.float64), True
    base = tomllib.loads(data["attrs"]["base_config_toml"])
    for sec, vals in base.items():
        if name in vals:
            return np.full(len(c["status"]), float(vals[name])), False
    raise MeltzoneError(f"{name!r} is neither an input of this sweep nor a key of its base config")


def plot_sweep(path, figure: str, out, *, x: str | None = None, y: str | None = None,
               outcome: str | None = None, bins: int = 8):
    """Draw a figure of a sweep file.

    Parameters
    ----------
    path : str or Path
        The sweep file.
    figure : str
        ``"lifetime"``: magma-ocean lifetime against planet mass, coloured by core mass fraction
        (cases whose ocean outlived the run drawn at the run's end as lower bounds);
        ``"probability"``: the fraction of cases with ``outcome`` in cells of two inputs ``x`` and ``y``.
    out : str or Path
        Output file (.png, .pdf or .svg).
    x, y : str, optional
        Inputs of the probability map (variable names in group ``cases``); default: the first two
        numeric inputs.
    outcome : str, optional
        A yes/no outcome (default ``magma_ocean_at_age`` in observed mode, else ``basal_layer_formed``).
    bins : int
        Cells per axis for inputs with more than 12 distinct values (grid values are used as they are).

    Returns
    -------
    Path
        The file written.
    """
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    from .plot import _figure_format

    if figure not in SWEEP_FIGURES:
        raise MeltzoneError(f"figure {figure!r}: a sweep file has figures " + ", ".join(map(repr, SWEEP_FIGURES)))
    out = Path(out)
    fmt = _figure_format(out)
    data = read_sweep(path)
    c = data["cases"]
    ok = c["status"] == OK
    fig = Figure(figsize=(7.0, 5.0), layout="constrained")
    FigureCanvasAgg(fig)
    ax = fig.add_subplot()
    if figure == "lifetime":
        mass, _ = _column_or_base(data, "mass_earth")
        cmf, _ = _column_or_base(data, "core_mass_fraction")
        t = c["magma_ocean_end_yr"]
        persists = ok & (c["magma_ocean_persists"] == 1)
        ended = ok & np.isfinite(t) & (t > 0)
        if not np.any(ended | persists):
            raise MeltzoneError("no case of this sweep has a magma-ocean lifetime to plot")
        lo_c, hi_c = np.nanmin(cmf[ok]), np.nanmax(cmf[ok])
        if hi_c <= lo_c:
            lo_c, hi_c = lo_c - 0.05, hi_c + 0.05
        sc = ax.scatter(mass[ended], t[ended], c=cmf[ended], cmap="viridis", vmin=lo_c, vmax=hi_c, s=22,
                        edgecolors="none", label="magma ocean ended")
        if np.any(persists):
            ax.scatter(mass[persists], c["end_time_yr"][persists], c=cmf[persists], cmap="viridis", vmin=lo_c,
                       vmax=hi_c, marker="^", s=30, edgecolors="k", linewidths=0.4,
                       label="outlived the run (lower bound)")
        ax.set_xscale("log")
        ax.set_yscale("log")
        _plain_log_ticks(ax.xaxis)
        ax.set_xlabel("planet mass [Earth masses]")
        ax.set_ylabel("magma-ocean lifetime [yr]")
        fig.colorbar(sc, ax=ax, label="core mass fraction")
        ax.legend(loc="best", fontsize=8)
        ax.set_title(f"Magma-ocean lifetime ({int(np.sum(ok))} cases)")
    else:
        inputs = _input_names(data)
        if "core_mass_fraction" in c and "core_mass_fraction" not in inputs:
            inputs.append("core_mass_fraction")
        x = x or (inputs[0] if inputs else None)
        y = y or next((k for k in inputs if k != x), None)
        if x is None or y is None:
            raise MeltzoneError("the probability map needs two swept inputs; this sweep has "
                                f"{len(inputs)} ({', '.join(inputs) or 'none'})")
        for name in (x, y):
            if name not in inputs:
                raise MeltzoneError(f"{name!r} is not an input of this sweep; inputs: {', '.join(inputs)}")
        names = _flag_names(data["attrs"].get("sweep_mode", ""))
        outcome = outcome or ("magma_ocean_at_age" if "magma_ocean_at_age" in c else "basal_layer_formed")
        if outcome not in names or outcome not in c:
            raise MeltzoneError(f"outcome {outcome!r}: choose one of {', '.join(k for k in names if k in c)}")
        xv, xe, xlog, xticks = _axis(c[x], ok, data["meta"].get(x, {}), bins)
        yv, ye, ylog, yticks = _axis(c[y], ok, data["meta"].get(y, {}), bins)
        use = ok & np.isfinite(xv) & np.isfinite(yv)
        yes = c[outcome] == 1
        n_cell, _, _ = np.histogram2d(xv[use], yv[use], bins=[xe, ye])
        k_cell, _, _ = np.histogram2d(xv[use & yes], yv[use & yes], bins=[xe, ye])
        with np.errstate(invalid="ignore", divide="ignore"):
            p = np.where(n_cell > 0, k_cell / n_cell, np.nan)
        mesh = ax.pcolormesh(xe, ye, p.T, cmap="magma", vmin=0.0, vmax=1.0, shading="flat")
        if p.size <= 100:
            for i in range(len(xe) - 1):
                for j in range(len(ye) - 1):
                    if n_cell[i, j] > 0:
                        xc = math.sqrt(xe[i] * xe[i + 1]) if xlog else 0.5 * (xe[i] + xe[i + 1])
                        yc = math.sqrt(ye[j] * ye[j + 1]) if ylog else 0.5 * (ye[j] + ye[j + 1])
                        ax.text(xc, yc, f"{int(k_cell[i, j])}/{int(n_cell[i, j])}", ha="center", va="center",
                                fontsize=7, color="w" if p[i, j] < 0.5 else "k")
        if xlog:
            ax.set_xscale("log")
            _plain_log_ticks(ax.xaxis)
        if ylog:
            ax.set_yscale("log")
            _plain_log_ticks(ax.yaxis)
        if xticks is not None:
            ax.set_xticks(np.arange(len(xticks)), xticks)
        if yticks is not None:
            ax.set_yticks(np.arange(len(yticks)), yticks)
        ax.set_xlabel(f"{x}" + (f" [{data['units'][x]}]" if data["units"].get(x, "1") not in ("", "1") else ""))
        ax.set_ylabel(f"{y}" + (f" [{data['units'][y]}]" if data["units"].get(y, "1") not in ("", "1") else ""))
        fig.colorbar(mesh, ax=ax, label=f"fraction of cases: {outcome}")
        ax.set_title(f"P({outcome}) ({int(np.sum(use))} cases; k/n per cell)")
    fig.text(0.01, 0.005, "Model estimates, not measurements.", fontsize=7, color="0.4")
    fig.savefig(out, format=fmt, dpi=150)
    return out


def _plain_log_ticks(axis) -> None:
    """Label a log axis 0.5, 1, 2, 5, 10 instead of powers of ten (planet masses span only ~1.5 decades)."""
    from matplotlib.ticker import FormatStrFormatter, LogLocator

    axis.set_major_locator(LogLocator(subs=(1.0, 2.0, 5.0)))
    axis.set_major_formatter(FormatStrFormatter("%g"))
    axis.set_minor_formatter(FormatStrFormatter(""))


def _axis(column: np.ndarray, use: np.ndarray, meta: dict, bins: int):
    """(positions, cell edges, log axis, tick labels or None) of one input of the probability map.

    Strings and grid values become categories at 0, 1, 2, ... labelled by their values; sampled
    numbers get ``bins`` equal cells (in log10 for inputs sampled with scale = "log")."""
    numeric = column.dtype.kind in "fiu"
    values = np.asarray(column, dtype=np.float64) if numeric else None
    used = column[use & np.isfinite(values)] if numeric else column[use]
    distinct = np.unique(used) if numeric else sorted({str(v) for v in used})
    if not len(distinct):
        return np.full(len(column), np.nan), np.array([-0.5, 0.5]), False, [""]
    if not numeric or str(meta.get("sampling", "")).startswith("grid"):
        labels = [f"{v:.4g}" for v in distinct] if numeric else list(distinct)
        index = {(float(v) if numeric else v): k for k, v in enumerate(distinct)}
        key = (lambda v: float(v)) if numeric else str
        pos = np.array([index.get(key(v), np.nan) for v in column], dtype=np.float64)
        return pos, np.arange(len(labels) + 1) - 0.5, False, labels
    log = bool(meta.get("scale") == "log" and np.all(distinct > 0))
    tv = np.log10(distinct) if log else distinct
    if tv[-1] <= tv[0]:
        edges = np.array([tv[0] - 0.5, tv[0] + 0.5]) if not log else np.array([tv[0] - 0.1, tv[0] + 0.1])
    else:
        edges = np.linspace(tv[0], tv[-1], max(int(bins), 1) + 1)
        edges[-1] = np.nextafter(edges[-1], np.inf)
    return values, (10.0 ** edges if log else edges), log, None
