"""The sweep file: one HDF5 table of every case, written by the client only, read back as plain NumPy.

Layout
------
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
:data:`meltzone.sweep.worker.METRICS` (float64, NaN when there is no value; model
times in "yr"), the yes/no flags (int8: 1 yes, 0 no, -1 no result) and
``wall_time_s``. Group ``events`` (dimension ``event``): ``case``, ``time_yr``,
``kind``, ``layer``, ``depth_m``, ``pressure_pa``. Both open with
``xarray.open_dataset(path, engine="h5netcdf", group=...)``; every coordinate is
a dimension scale with units (the primitives of :mod:`meltzone.results`), and
the file is written to a temporary name and moved into place.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from ..errors import ResultsFileError
from .checkpoint import now_utc
from .spec import SWEEP_SCHEMA_VERSION, SweepSpec
from .stats import flag_names, observed_probabilities
from .worker import AGE_FLAGS, FAILED, METRICS, OK, REJECTED, STATUS_MEANINGS

__all__ = ["write_sweep_file", "read_sweep", "output_kind", "complete_file", "counts_from_file",
           "REQUIRED_GROUPS"]

#: Groups every sweep file has, and the case variables every reader relies on.
REQUIRED_GROUPS = {"cases": ("case", "status", "error"), "events": ("case",)}


def write_sweep_file(path, spec: SweepSpec, rows: list, identity: str | None = None) -> None:
    """Write the sweep table atomically (layout: this module's docstring); ResultsFileError naming the
    file when it cannot be written."""
    try:
        _write(path, spec, rows, identity)
    except ResultsFileError:
        raise
    except OSError as exc:
        raise ResultsFileError(f"cannot write sweep file {str(path)!r}: {exc.strerror or exc}") from None


def _write(path, spec: SweepSpec, rows: list, identity: str | None) -> None:
    from .. import __version__
    from ..results import atomic_h5, write_coordinate, write_variable

    n = len(rows)
    design = spec.design()
    status = np.array([r["status"] for r in rows], dtype=np.int8)
    names = flag_names(spec.mode)
    flags = {name: np.array([r["flags"].get(name, -1) if r["status"] == OK else -1 for r in rows], dtype=np.int8)
             for name in names}
    with atomic_h5(path) as f:
        f.attrs["meltzone_kind"] = "sweep"
        f.attrs["meltzone_version"] = __version__
        f.attrs["sweep_schema_version"] = SWEEP_SCHEMA_VERSION
        f.attrs["created_utc"] = now_utc()
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
        for name, long_name in names.items():
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


# ---------------------------------------------------------------------- reading
def _decoded(value):
    if isinstance(value, bytes):
        return value.decode("utf-8", "replace")
    return value.item() if isinstance(value, np.generic) else value


def _single(f, name: str, path, kinds: tuple):
    """Root attribute ``name`` as one value of one of ``kinds`` (None when absent); ResultsFileError naming
    the file and the attribute for an array or a value of another type."""
    if name not in f.attrs:
        return None
    value = _decoded(f.attrs[name])
    if isinstance(value, bool) or not isinstance(value, kinds):
        what = f"an array of shape {value.shape}" if isinstance(value, np.ndarray) else type(value).__name__
        raise ResultsFileError(f"{str(path)!r}: root attribute {name!r} is {what}, not a single value; the file "
                               "was not written by meltzone or has been edited")
    return value


def _read_group(f, name: str, path) -> dict:
    import h5py

    group = f.get(name)
    if not isinstance(group, h5py.Group):
        raise ResultsFileError(f"{str(path)!r} is a sweep file without its {name!r} group (damaged or edited)")
    for var in REQUIRED_GROUPS[name]:
        if not isinstance(group.get(var), h5py.Dataset):
            raise ResultsFileError(f"{str(path)!r} is a sweep file without {name}/{var} (damaged or edited)")
    data, units, meta = {}, {}, {}
    for var, ds in group.items():
        values = ds[()]
        if ds.dtype.kind == "O":
            values = np.array([x.decode() if isinstance(x, bytes) else x for x in values], dtype=object)
        data[var] = values
        units[var] = _decoded(ds.attrs.get("units", ""))
        meta[var] = {k: _decoded(v) for k, v in ds.attrs.items()
                     if k in ("config_key", "sampling", "scale", "long_name")}
    return {"data": data, "units": units, "meta": meta}


def read_sweep(path) -> dict:
    """The sweep file as plain NumPy: {"attrs", "cases": {name: array}, "units", "meta", "events"}.

    Raises ResultsFileError naming the file for a missing, non-HDF5 or foreign file, a file of another
    kind, an attribute that is not a single value, or a missing group or variable."""
    import h5py

    path = Path(path)
    try:
        f = h5py.File(path, "r")
    except OSError as exc:
        raise ResultsFileError(f"cannot open {str(path)!r} as an HDF5 file: {exc}") from None
    with f:
        kind = _single(f, "meltzone_kind", path, (str,))
        if kind != "sweep":
            raise ResultsFileError(f"{str(path)!r} is not a meltzone sweep file (meltzone_kind = {kind!r})")
        _single(f, "sweep_schema_version", path, (int, np.integer))
        attrs = {k: _decoded(v) for k, v in f.attrs.items()}
        cases = _read_group(f, "cases", path)
        events = _read_group(f, "events", path)
    return {"attrs": attrs, "cases": cases["data"], "units": cases["units"], "meta": cases["meta"],
            "events": events["data"]}


def output_kind(path) -> str | None:
    """What lies at a sweep's output path: None (nothing), ``"sweep"``, or a description of anything else
    (a meltzone run file, a foreign HDF5 file, not an HDF5 file), which a sweep must not overwrite."""
    import h5py

    path = Path(path)
    if not path.exists():
        return None
    try:
        f = h5py.File(path, "r")
    except OSError:
        return "not an HDF5 file"
    with f:
        try:
            kind = _single(f, "meltzone_kind", path, (str,))
        except ResultsFileError:
            return "an HDF5 file whose meltzone_kind attribute is not a single string"
    if kind == "sweep":
        return "sweep"
    if kind is None:
        return "an HDF5 file that is not a meltzone file"
    return f"a meltzone {kind} file"


def complete_file(out: Path, identity: str) -> bool:
    """Whether ``out`` is the finished sweep file of the spec with this identity."""
    import h5py

    if output_kind(out) != "sweep":
        return False
    with h5py.File(out, "r") as f:
        return _decoded(f.attrs.get("sweep_identity")) == identity


def counts_from_file(out: Path) -> tuple[int, int, int]:
    """(ok, failed, rejected) cases of a sweep file."""
    status = read_sweep(out)["cases"]["status"]
    return int(np.sum(status == OK)), int(np.sum(status == FAILED)), int(np.sum(status == REJECTED))
