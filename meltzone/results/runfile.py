"""Writing and reading run files (the layout is in :mod:`.schema`); atomic writes, one-line errors for damaged
or foreign files."""

from __future__ import annotations

import numpy as np

from ..config import PlanetSpec
from ..constants import YEAR
from ..errors import MeltzoneError, ResultsFileError
from ..evolution.contract import INTEGER_INTERVAL_FIELDS, INTERVAL_FIELDS, SERIES, History, MantleGrid
from ..h5 import atomic_h5, write_coordinate, write_variable
from ..interior import Interior
from .result import Result
from .schema import (_RESULT_ATTRS, _TEXT_COLUMNS, EVENT_COLUMNS, FILE_KINDS, FLAG_COLUMNS,
                     GRID_FIELDS, LAYER_COLUMNS, MATERIAL_FIELDS, MODEL_NOTE, PROFILE_FIELDS, RUN_KIND,
                     SCHEMA_VERSION, STRUCTURE_ARRAYS, STRUCTURE_SCALARS, _records)

def _write_table(group, dim: str, n: int, columns: dict, fields: dict, dim_long_name: str, aux=()):
    """Columns of length ``n`` on dimension ``dim`` (an index coordinate 0..n-1); the columns named in
    ``aux`` are listed in every other column's ``coordinates`` attribute (netCDF auxiliary coordinates)."""
    write_coordinate(group, dim, np.arange(n, dtype=np.int64), "1", dim_long_name)
    for name, values in columns.items():
        unit, long_name = fields[name]
        ds = write_variable(group, name, values, (dim,), unit, long_name)
        if aux and name not in aux:
            ds.attrs["coordinates"] = " ".join(aux)



def _write_structure(g, it: Interior):
    from ..phases import MANTLE_PHASES

    g.attrs["description"] = "interior structure on nodes, centre to surface, fixed during the evolution"
    g.attrs["phase_names"] = "core (-1); " + "; ".join(f"{name} ({i})" for i, name in enumerate(MANTLE_PHASES))
    columns = {name: getattr(it, attr) for name, (attr, _, _) in STRUCTURE_ARRAYS.items()}
    fields = {name: (unit, long) for name, (_, unit, long) in STRUCTURE_ARRAYS.items()}
    _write_table(g, "node", len(it.r), columns, fields, "node index, centre (0) to surface", aux=("radius",))
    for name, (attr, unit, long_name) in STRUCTURE_SCALARS.items():
        write_variable(g, name, getattr(it, attr), (), unit, long_name)
    cols = _records(it.materials, [attr for attr, _, _ in MATERIAL_FIELDS.values()])
    columns = {name: cols[attr] for name, (attr, _, _) in MATERIAL_FIELDS.items()}
    fields = {name: (unit, long) for name, (_, unit, long) in MATERIAL_FIELDS.items()}
    _write_table(g, "material", len(it.materials), columns, fields, "equation-of-state material (core first)")


def _write_snapshots(g, result, snaps):
    grid = result.history.grid
    g.attrs["description"] = ("temperature and melt fraction on the mantle nodes (CMB -> surface) at chosen model "
                              "times: log-spaced and at every event; between steps the state is interpolated")
    n_snap, n_node = snaps["temperature"].shape
    write_coordinate(g, "snapshot", np.arange(n_snap, dtype=np.int64), "1", "snapshot index")
    _write_mantle_grid(g, grid, result.interior.radius)
    write_variable(g, "snapshot_time", snaps["time"] / YEAR, ("snapshot",), "yr", "model time of the snapshot")
    write_variable(g, "snapshot_label", np.asarray(snaps["label"], dtype=str), ("snapshot",), "1",
                   "why the snapshot was taken: initial, final, log-spaced or the events at that time")
    for name, unit, long_name in (("temperature", "K", "mantle temperature"),
                                  ("melt_fraction", "1", "melt fraction")):
        ds = write_variable(g, name, snaps[name], ("snapshot", "mantle_node"), unit, long_name)
        ds.attrs["coordinates"] = "snapshot_time snapshot_label " + _MANTLE_AUX


_MANTLE_AUX = "mantle_radius mantle_depth mantle_pressure"


def _write_mantle_grid(g, grid: MantleGrid, radius: float):
    """The ``mantle_node`` dimension and the grid on it (GRID_FIELDS plus the depth)."""
    write_coordinate(g, "mantle_node", np.arange(grid.n, dtype=np.int64), "1", "mantle node index, CMB (0) to surface")
    for name, (attr, unit, long_name) in GRID_FIELDS.items():
        ds = write_variable(g, name, getattr(grid, attr), ("mantle_node",), unit, long_name)
        if name in ("solidus", "liquidus", "mantle_mass"):
            ds.attrs["coordinates"] = _MANTLE_AUX
        if name == "mantle_radius":
            write_variable(g, "mantle_depth", radius - grid.radius, ("mantle_node",), "m", "depth of the mantle node")


def _write_history(g, h: History, radius: float):
    """The history on dimension ``time`` (model time [yr], a coordinate): every series, and T and melt fraction
    on (time, mantle_node)."""
    g.attrs["critical_melt_fraction"] = h.critical_melt_fraction
    g.attrs["n_rejected"] = np.int64(h.n_rejected)
    for name, when in h.switch_times.items():  # NaN: the switch never happened
        g.attrs[f"switch_time_{name}_yr"] = np.nan if when is None else float(when) / YEAR
    write_coordinate(g, "time", h.time / YEAR, "yr", "model time since the start")
    for name, values in h.series.items():
        unit, long_name, _ = SERIES[name]
        write_variable(g, name, values, ("time",), unit, long_name)
    _write_mantle_grid(g, h.grid, radius)
    for name, (unit, long_name) in PROFILE_FIELDS.items():
        ds = write_variable(g, name, getattr(h, name), ("time", "mantle_node"), unit, long_name)
        ds.attrs["coordinates"] = _MANTLE_AUX


def _read_history(f) -> History:
    g = f["history"]
    time = _numeric(g["time"]) * YEAR
    series = {name: _numeric(g[name]) for name in SERIES if name in g}
    grid = MantleGrid(**{attr: _numeric(g[name]) for name, (attr, _, _) in GRID_FIELDS.items()})
    for name, (attr, _, _) in GRID_FIELDS.items():  # one value per mantle node (the node masses weigh the profiles)
        if np.shape(getattr(grid, attr)) != (grid.n,):
            raise ValueError(f"history/{name} has shape {np.shape(getattr(grid, attr))}, expected ({grid.n},)")
    prefix, suffix = "switch_time_", "_yr"
    switch = {}
    for k, v in g.attrs.items():
        if k.startswith(prefix) and k.endswith(suffix):
            v = float(_scalar(v))
            switch[k[len(prefix):-len(suffix)]] = None if np.isnan(v) else v * YEAR
    intervals = _table(f["intervals"], INTERVAL_FIELDS, "intervals")
    for name in INTEGER_INTERVAL_FIELDS:
        intervals[name] = intervals[name].astype(np.int64)
    s = f["scheme"]
    data = {str(name): _numeric(s[name]) for name in s.attrs["data_names"]}
    h = History(scheme=str(s.attrs["scheme"]), time=time, series=series,
                temperature=_numeric(g["temperature"]), melt_fraction=_numeric(g["melt_fraction"]),
                intervals=intervals, grid=grid, critical_melt_fraction=float(_scalar(g.attrs["critical_melt_fraction"])),
                switch_times=switch, n_rejected=int(_scalar(g.attrs["n_rejected"])), scheme_data=data)
    h.check()  # shapes and names (ValueError: a damaged file)
    if len(time) < 1 or np.any(np.diff(time) < 0.0):
        raise ValueError("history time is empty or not increasing")
    n = len(time)
    if len(intervals["step"]) and (intervals["step"].min() < 0 or intervals["step"].max() >= n
                                   or intervals["bottom_node"].min() < 0 or intervals["top_node"].max() >= grid.n):
        raise ValueError("intervals point outside the history or the mantle grid")
    return h


def _write_scheme(g, h: History):
    g.attrs["scheme"] = h.scheme
    g.attrs["description"] = (f"the arrays the {h.scheme} scheme needs to rebuild the state inside a step (their "
                              "meaning is the scheme's own); each axis is an index dimension <name>_dim<axis>")
    g.attrs["data_names"] = np.array(list(h.scheme_data), dtype=object)
    for name, values in h.scheme_data.items():
        values = np.asarray(values)
        dims = tuple(f"{name}_dim{axis}" for axis in range(values.ndim))
        for dim, n in zip(dims, values.shape):
            write_coordinate(g, dim, np.arange(n, dtype=np.int64), "1", f"index of {name}, axis {dim[-1]}")
        write_variable(g, name, values, dims, "mixed SI", f"{h.scheme} scheme data {name!r}")


def write(result: Result, path, snapshot_times=None):
    """Write a run to an HDF5 file, atomically (a temporary file in the same folder, then ``os.replace``).

    Groups (each opens with ``xarray.open_dataset(path, engine="h5netcdf", group=NAME)``):
    ``structure``, ``history``, ``intervals``, ``layers``, ``events``, ``snapshots``, ``flags``,
    ``scheme``; the root attributes hold the configuration as TOML, the sources of the laws,
    the meltzone version and the schema version. ``snapshot_times`` [s] replace the default
    snapshot times (:func:`snapshot_times`). Returns the path written.
    """
    import datetime
    from pathlib import Path

    import h5py

    from .. import __version__

    table, events = result.tracked()
    zones = result.flags()
    snaps = result.snapshots(snapshot_times)
    sources = result.law_sources()
    path = Path(path)
    try:
        with atomic_h5(path) as f:
            a = f.attrs
            a["meltzone_kind"] = RUN_KIND
            a["schema_version"] = np.int64(SCHEMA_VERSION)
            a["meltzone_version"] = __version__
            a["created_utc"] = datetime.datetime.now(datetime.timezone.utc).isoformat(timespec="seconds")
            a["title"] = f"meltzone run: {result.spec.planet.name}"
            a["note"] = MODEL_NOTE
            a["config_toml"] = result.spec.to_toml()
            a["sources"] = np.array(sources, dtype=h5py.string_dtype())
            for name in _RESULT_ATTRS:
                a[name] = getattr(result, name)
            from ..layers import ENERGY_CLOSURE_TOLERANCE

            a["energy_closure_tolerance"] = ENERGY_CLOSURE_TOLERANCE
            a["energy_closure_ok"] = np.int8(result.energy_closure <= ENERGY_CLOSURE_TOLERANCE)

            def group(name, description):
                g = f.create_group(name, track_order=True)
                g.attrs["description"] = description
                return g

            _write_structure(group("structure", ""), result.interior)
            _write_history(group("history", "time series, one row per accepted step, with T and melt fraction "
                                 "on every mantle node"), result.history, result.interior.radius)
            iv = result.intervals
            fields = INTERVAL_FIELDS
            _write_table(group("intervals", "contiguous runs of mantle nodes with melt fraction > 0 at each step "
                               "(nodes counted from the CMB)"), "interval", len(iv["step"]), iv, fields,
                         "melt interval")
            missing = set(table) - set(LAYER_COLUMNS)
            if missing:
                raise ValueError(f"layer table columns without units in LAYER_COLUMNS: {sorted(missing)}")
            _write_table(group("layers", "melt layers: one row per layer per step"), "row", len(table["layer"]),
                         {**table, "time": table["time"] / YEAR}, LAYER_COLUMNS, "layer-table row", aux=("time",))
            ev = _records(events, EVENT_COLUMNS)
            _write_table(group("events", "events of the melt layers and of the planet, sorted by time"), "event",
                         len(events), {**ev, "time": ev["time"] / YEAR}, EVENT_COLUMNS, "event index",
                         aux=("time",))
            _write_snapshots(group("snapshots", ""), result, snaps)
            fields = {name: (unit, long) for name, unit, long in FLAG_COLUMNS.values()}
            cols = _records(zones, FLAG_COLUMNS)
            _write_table(group("flags", "mantle depths that rest on theory or extrapolated laws"), "flag",
                         len(zones), {name: cols[key] for key, (name, _, _) in FLAG_COLUMNS.items()}, fields,
                         "flagged zone")
            _write_scheme(group("scheme", ""), result.history)
    except OSError as exc:
        raise ResultsFileError(f"cannot write results file {str(path)!r}: {exc.strerror or exc}") from None
    return path


# ---------------------------------------------------------------------- reading
def _open(path):
    import os

    import h5py

    name = os.fspath(path)
    if not os.path.exists(name):
        raise ResultsFileError(f"no such file: {name!r}")
    try:
        return h5py.File(name, "r")
    except OSError:
        raise ResultsFileError(f"{name!r} is not a readable HDF5 file") from None


def _kind(f, path) -> str:
    try:
        kind = f.attrs.get("meltzone_kind")
    except (OSError, KeyError, ValueError, TypeError) as exc:
        raise ResultsFileError(f"{str(path)!r} is a damaged HDF5 file (its attributes do not read: "
                               f"{' '.join(str(exc).split())})") from None
    if isinstance(kind, bytes):
        kind = kind.decode("utf-8", "replace")
    if kind is not None and not isinstance(kind, str):
        raise ResultsFileError(f"{str(path)!r}: attribute meltzone_kind is not a single string; the file was not "
                               "written by meltzone or has been edited")
    if kind is None:
        raise ResultsFileError(f"{str(path)!r} is an HDF5 file but not a meltzone file (no meltzone_kind attribute)")
    if kind not in FILE_KINDS:
        raise ResultsFileError(f"{str(path)!r}: unknown meltzone_kind {kind!r} (expected one of {FILE_KINDS})")
    return str(kind)


def file_kind(path) -> str:
    """``"run"`` or ``"sweep"``: the root attribute ``meltzone_kind`` of a meltzone HDF5 file.

    Raises ResultsFileError for a missing, unreadable, non-HDF5 or foreign file."""
    with _open(path) as f:
        return _kind(f, path)


def _read(ds):
    import h5py

    if h5py.check_string_dtype(ds.dtype) is not None:
        return np.array(ds.asstr()[()], dtype=object)
    return ds[()]


def _scalar(value):
    """A 0-d attribute or dataset value as a Python scalar; ValueError for an array (a damaged file)."""
    if isinstance(value, np.ndarray):
        if value.ndim:
            raise ValueError(f"an array where a single value belongs ({value.shape})")
        value = value[()]
    return value.item() if isinstance(value, np.generic) else value


def _numeric(ds, allow_nan: bool = False) -> np.ndarray:
    """A numeric dataset's values; ValueError when it holds text, or NaN/infinity where none belongs."""
    values = ds[()]
    if not isinstance(values, np.ndarray):
        values = np.asarray(values)
    if values.dtype.kind not in "fiub":
        raise ValueError(f"{ds.name} is not numeric")
    if values.dtype.kind == "f" and not allow_nan and not np.all(np.isfinite(values)):
        raise ValueError(f"{ds.name} holds NaN or infinite values")
    return values


#: Table columns in which NaN means "none" (see their long names).
_NAN_COLUMNS = {"full_top_depth", "full_bottom_depth", "depth", "pressure"}


def _table(g, names, label: str) -> dict:
    """The columns ``names`` of a table group, each 1-D and of the same length; ValueError otherwise."""
    cols = {}
    for name in names:
        ds = g[name]
        cols[name] = (_read(ds) if name in _TEXT_COLUMNS or name in ("material_name", "material_source")
                      else _numeric(ds, allow_nan=name in _NAN_COLUMNS))
    lengths = {np.shape(v)[0] if np.ndim(v) == 1 else -1 for v in cols.values()}
    if len(lengths) > 1 or -1 in lengths:
        raise ValueError(f"the columns of {label} differ in length or are not 1-D")
    return cols


def load(path) -> Result:
    """Read a run file written by :func:`write` back into a :class:`Result` (lossless for every array).

    Raises ResultsFileError for a missing, unreadable or foreign file, a sweep file, another schema
    version or a damaged file."""
    import tomllib
    import warnings

    from ..eos import Material

    with _open(path) as f:
        kind = _kind(f, path)
        if kind != RUN_KIND:
            raise ResultsFileError(f"{str(path)!r} is a meltzone {kind} file, not a single run")
        try:
            version = _scalar(f.attrs.get("schema_version"))
        except (ValueError, OSError, KeyError, TypeError):
            version = "unreadable"
        if not isinstance(version, (int, np.integer)) or version != SCHEMA_VERSION:
            raise ResultsFileError(f"{str(path)!r} has run-file schema version {version!r}; this meltzone "
                                   f"reads version {SCHEMA_VERSION}")
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")  # the run warned already (e.g. a mass outside the calibration)
                spec = PlanetSpec.from_mapping(tomllib.loads(f.attrs["config_toml"]))
            g = f["structure"]
            values = _table(g, STRUCTURE_ARRAYS, "structure")
            values = {attr: values[name] for name, (attr, _, _) in STRUCTURE_ARRAYS.items()}
            values.update({attr: _scalar(_numeric(g[name])) for name, (attr, _, _) in STRUCTURE_SCALARS.items()})
            cols = _table(g, MATERIAL_FIELDS, "structure materials")
            values["materials"] = tuple(Material(**{attr: _scalar(cols[name][i])
                                                    for name, (attr, _, _) in MATERIAL_FIELDS.items()})
                                        for i in range(len(cols["material_name"])))
            interior = Interior(**values)
            history = _read_history(f)
            table = _table(f["layers"], LAYER_COLUMNS, "layers")
            table["time"] = table["time"] * YEAR
            ev = _table(f["events"], EVENT_COLUMNS, "events")
            from ..layers import EVENT_KINDS

            if not set(map(str, ev["kind"])) <= set(EVENT_KINDS):
                raise ValueError("events of unknown kinds")
            events = [{"time": float(ev["time"][i]) * YEAR, "kind": str(ev["kind"][i]), "layer": int(ev["layer"][i]),
                       "depth": float(ev["depth"][i]), "pressure": float(ev["pressure"][i])}
                      for i in range(len(ev["time"]))]
            fl = _table(f["flags"], [name for name, _, _ in FLAG_COLUMNS.values()], "flags")
            zones = [{key: (str(fl[name][i]) if fl[name].dtype == object else float(fl[name][i]))
                      for key, (name, _, _) in FLAG_COLUMNS.items()} for i in range(len(fl["kind"]))]
            g = f["snapshots"]
            snaps = {"time": _numeric(g["snapshot_time"]) * YEAR, "label": _read(g["snapshot_label"]).astype(str),
                     "temperature": _numeric(g["temperature"]), "melt_fraction": _numeric(g["melt_fraction"])}
            shape = (len(snaps["time"]), history.grid.n)
            if snaps["temperature"].shape != shape or snaps["melt_fraction"].shape != shape \
                    or len(snaps["label"]) != shape[0]:
                raise ValueError("snapshots do not match their times or the mantle grid")
            scalars = {"melting_model": str(_scalar(f.attrs["melting_model"])),
                       "wall_time_s": float(_scalar(f.attrs["wall_time_s"]))}
            sources = tuple(str(s) for s in f.attrs["sources"])
        except MeltzoneError as exc:
            raise ResultsFileError(f"{str(path)!r}: the stored configuration does not load: {exc}") from None
        except (KeyError, ValueError, TypeError, OSError, IndexError, AttributeError) as exc:
            raise ResultsFileError(f"{str(path)!r} is a damaged or incomplete meltzone run file "
                                   f"({' '.join(str(exc).split()) or type(exc).__name__})") from None
    from ..evolution.schemes import get_scheme

    try:
        history.evaluator = get_scheme(history.scheme).evaluator(history)
    except MeltzoneError as exc:
        raise ResultsFileError(f"{str(path)!r}: {exc}") from None
    except (KeyError, ValueError, TypeError, IndexError) as exc:
        raise ResultsFileError(f"{str(path)!r} is a damaged meltzone run file: its scheme data do not rebuild the "
                               f"{history.scheme} scheme ({exc})") from None
    result = Result(spec=spec, interior=interior, history=history, sources=sources, **scalars)
    result._cache.update(tracked=(table, events), flags=zones, snapshots=snaps)
    return result
