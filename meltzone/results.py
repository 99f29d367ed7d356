"""The Result of a run and the run file: the one place the HDF5 schema lives (:func:`write`, :func:`load`).

Run file (schema version :data:`SCHEMA_VERSION`, root attribute ``meltzone_kind = "run"``), one group
per table, each readable with ``xarray.open_dataset(path, engine="h5netcdf", group=NAME)``:
``structure`` (interior nodes, dimension ``node``, coordinate ``radius``; scalars as 0-d variables;
EOS materials on ``material``), ``history`` (``step``, coordinate ``time`` [s]), ``intervals``
(``interval``), ``layers`` (``row``), ``events`` (``event``), ``snapshots`` (``snapshot`` x
``mantle_node``, coordinates ``snapshot_time`` and ``mantle_radius``), ``flags`` (``flag``) and
``scheme`` (the arrays the evolution scheme needs to rebuild a state inside a step). The history group also
holds T and melt fraction on every mantle node at every step and the mantle grid. Root attributes: the
configuration as TOML, the sources of the laws used, the meltzone version and the UTC creation time.

Results are model estimates, not measurements.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .config import PlanetSpec
from .errors import MeltzoneError, ResultsFileError
from .evolution.contract import INTEGER_INTERVAL_FIELDS, INTERVAL_FIELDS, SERIES, History, MantleGrid
from .h5 import atomic_h5, write_coordinate, write_variable  # noqa: F401 (sweep files import them from here)
from .interior import Interior

@dataclass
class Result:
    """Everything one run produced (SI units): the spec, the interior, the melting model's id and the
    scheme's :class:`~meltzone.evolution.contract.History`. ``history[name]`` is a series (or ``time``)."""

    spec: PlanetSpec
    interior: Interior
    melting_model: str
    history: History
    wall_time_s: float
    sources: tuple = ()
    _cache: dict = field(default_factory=dict, repr=False, compare=False)

    # ------------------------------------------------------------------ views
    @property
    def time(self) -> np.ndarray:
        return self.history.time

    @property
    def intervals(self) -> dict:
        return self.history.intervals

    @property
    def energy_closure(self) -> float:
        return self.history.energy_closure

    @property
    def n_steps(self) -> int:
        return self.history.n_steps

    @property
    def n_rejected(self) -> int:
        return self.history.n_rejected

    def profile(self, step: int):
        """(temperature [K], melt fraction) on the mantle nodes at history step ``step``."""
        return self.history.temperature[step], self.history.melt_fraction[step]

    def profile_at_time(self, t: float):
        """(temperature [K], melt fraction) on the mantle nodes at model time ``t`` [s]: the recorded profile
        when ``t`` is a step, otherwise the scheme's state inside the step (:meth:`History.at`)."""
        times = self.time
        s = int(np.searchsorted(times, t, side="left"))
        if s < len(times) and times[s] == t:
            return self.profile(s)
        inside = self.history.at(t)
        return inside.temperature, inside.melt_fraction

    def tracked(self):
        """(layer table, events) from :func:`meltzone.layers.track`, computed once (read from the file when
        the Result was loaded)."""
        if "tracked" not in self._cache:
            from .layers import track

            self._cache["tracked"] = track(self)
        return self._cache["tracked"]

    def summary(self) -> dict:
        """JSON-ready summary of the run (:func:`meltzone.layers.summarize`)."""
        from .layers import summarize

        table, events = self.tracked()
        return summarize(self, table, events)

    def flags(self) -> list[dict]:
        """High-pressure flags of the mantle and the core (:func:`meltzone.phases.planet_flags`, on the
        reference adiabat the interior was built on)."""
        if "flags" not in self._cache:
            from .melting import get_model
            from .phases import planet_flags

            model = get_model(self.melting_model, self.spec.melting.table_file or None)
            self._cache["flags"] = planet_flags(self.interior, model)
        return self._cache["flags"]

    def snapshots(self, times=None) -> dict:
        """Temperature and melt fraction on the mantle nodes at chosen model times.

        ``times`` [s] default to :func:`snapshot_times` (log-spaced plus every event); a loaded
        Result returns the snapshots stored in its file. Returns a dict of ``time`` (n,),
        ``label`` (n,) strings, ``temperature`` and ``melt_fraction`` (n, mantle nodes).
        """
        if times is None and "snapshots" in self._cache:
            return self._cache["snapshots"]
        t = snapshot_times(self) if times is None else np.unique(np.asarray(times, dtype=np.float64))
        n = self.history.grid.n
        temp = np.empty((len(t), n))
        phi = np.empty((len(t), n))
        for i, ti in enumerate(t):
            temp[i], phi[i] = self.profile_at_time(ti)
        snaps = {"time": t, "label": np.array(_snapshot_labels(self, t), dtype=str), "temperature": temp,
                 "melt_fraction": phi}
        if times is None:
            self._cache["snapshots"] = snaps
        return snaps

    def law_sources(self) -> tuple[str, ...]:
        """Sources of the laws used by this run: ``self.sources`` when set, else :func:`collect_sources`."""
        return tuple(self.sources) or collect_sources(self)


#: Number of log-spaced snapshot times written by default (event times are added to them).
DEFAULT_SNAPSHOTS = 24


def snapshot_times(result, n: int = DEFAULT_SNAPSHOTS) -> np.ndarray:
    """Default snapshot times [s]: the start, ``n`` log-spaced times from the first step to the end, and
    the time of every event, sorted and unique."""
    t = result.time
    times = [t[0], t[-1]]
    positive = t[t > 0.0]
    if len(positive):
        times += list(np.geomspace(positive[0], t[-1], n))
    times += [e["time"] for e in result.tracked()[1]]
    return np.unique(np.clip(np.asarray(times, dtype=np.float64), t[0], t[-1]))


def _snapshot_labels(result, times) -> list[str]:
    events = result.tracked()[1]
    labels = []
    for ti in times:
        words = []
        if ti == result.time[0]:
            words.append("initial")
        if ti == result.time[-1]:
            words.append("final")
        words += [e["kind"] + (f" (layer {e['layer']})" if e["layer"] >= 0 else "") for e in events
                  if e["time"] == ti]
        labels.append("; ".join(words) or "log-spaced")
    return labels


# ====================================================================== sources of the laws used
def collect_sources(result) -> tuple[str, ...]:
    """Sources of the laws a run used, each with what it is for and its status (checked / from memory /
    this model's choice), from the citation registry :mod:`meltzone.citations`."""
    from .citations import run_sources
    from .melting import get_model

    try:
        model = get_model(result.melting_model, result.spec.melting.table_file or None)
    except MeltzoneError:  # a user table that has moved since the run: keep the id
        from types import SimpleNamespace

        model = SimpleNamespace(id=result.melting_model, citation=f"model {result.melting_model!r}")
    return run_sources(result.spec, model, result.interior.materials)


# ====================================================================== the run file
#: Value of the root attribute ``meltzone_kind`` of a single-run file (sweep files carry "sweep").
RUN_KIND = "run"
#: Kinds of meltzone HDF5 files.
FILE_KINDS = ("run", "sweep")
#: Version of the run-file layout below; :func:`load` refuses any other.
SCHEMA_VERSION = 3  # 3: history T and melt fraction per node, mantle grid, switch times; scheme group

#: structure group, node arrays: file name -> (Interior attribute, unit, long name). Nodes run centre -> surface.
STRUCTURE_ARRAYS = {
    "radius": ("r", "m", "radius of the node"),
    "enclosed_mass": ("m", "kg", "mass enclosed within the node's radius"),
    "pressure": ("P", "Pa", "pressure"),
    "density": ("rho", "kg/m^3", "density"),
    "gravity": ("g", "m/s^2", "gravitational acceleration"),
    "phase": ("phase", "1", "mantle phase code (index into the attribute phase_names; -1 in the core)"),
    "reference_temperature": ("T_ref", "K", "temperature on the reference adiabat the phases were chosen on"),
    "adiabat": ("adiabat", "1", "adiabat shape: T / T_top in the mantle, T / T_cmb in the core"),
}
#: structure group, scalars (0-d variables): file name -> (Interior attribute, unit, long name).
STRUCTURE_SCALARS = {
    "planet_mass": ("mass", "kg", "planet mass"),
    "core_mass": ("core_mass", "kg", "core mass"),
    "planet_radius": ("radius", "m", "planet radius"),
    "core_radius": ("core_radius", "m", "core radius"),
    "cmb_pressure": ("cmb_pressure", "Pa", "pressure at the core-mantle boundary"),
    "center_pressure": ("center_pressure", "Pa", "pressure at the centre"),
    "surface_pressure": ("surface_pressure", "Pa", "pressure at the solid surface"),
    "surface_gravity": ("surface_gravity", "m/s^2", "gravitational acceleration at the surface"),
    "mean_density": ("mean_density", "kg/m^3", "mean density"),
    "moment_of_inertia_factor": ("moment_of_inertia_factor", "1", "moment of inertia factor C / (M R^2)"),
    "cmb_index": ("cmb_index", "1", "index of the first mantle node"),
    "reference_potential_temperature": ("reference_potential_temperature", "K",
                                        "potential temperature of the reference adiabat"),
    "iterations": ("iterations", "1", "structure integrations used by the radius search"),
}
#: structure group, equation-of-state materials on dimension ``material``: name -> (Material field, unit, long name).
MATERIAL_FIELDS = {
    "material_name": ("name", "1", "material name"),
    "material_form": ("form", "1", "equation-of-state form code (meltzone.eos FORM_*)"),
    "material_rho0": ("rho0", "kg/m^3", "reference density"),
    "material_k0": ("k0", "Pa", "bulk modulus at the reference density"),
    "material_kp": ("kp", "1", "pressure derivative of the bulk modulus"),
    "material_gamma0": ("gamma0", "1", "Grueneisen parameter at the reference density"),
    "material_q": ("q", "1", "volume exponent of the Grueneisen parameter"),
    "material_cv": ("cv", "J/kg/K", "heat capacity of the thermal pressure (0: none)"),
    "material_source": ("source", "1", "source of the parameters"),
}
#: history group: the mantle grid on ``mantle_node``: file name -> (MantleGrid attribute, unit, long name).
GRID_FIELDS = {
    "mantle_radius": ("radius", "m", "radius of the mantle node"),
    "mantle_pressure": ("pressure", "Pa", "pressure at the mantle node"),
    "mantle_mass": ("mass", "kg", "mass the mantle node stands for"),
    "solidus": ("solidus", "K", "solidus temperature"),
    "liquidus": ("liquidus", "K", "liquidus temperature"),
}
#: history group: profiles on (step, mantle_node): History attribute -> (unit, long name).
PROFILE_FIELDS = {
    "temperature": ("K", "mantle temperature at the end of the step"),
    "melt_fraction": ("1", "melt fraction at the end of the step"),
}
#: layers group (rows of meltzone.layers.track): column -> (unit, long name).
LAYER_COLUMNS = {
    "layer": ("1", "layer id, kept through time by node overlap"),
    "step": ("1", "history step of the row"),
    "time": ("s", "model time of the row"),
    "top_radius": ("m", "radius of the shallowest molten node"),
    "bottom_radius": ("m", "radius of the deepest molten node"),
    "top_depth": ("m", "depth of the shallowest molten node"),
    "bottom_depth": ("m", "depth of the deepest molten node"),
    "top_pressure": ("Pa", "pressure at the shallowest molten node"),
    "bottom_pressure": ("Pa", "pressure at the deepest molten node"),
    "max_melt_fraction": ("1", "largest melt fraction in the layer"),
    "mean_melt_fraction": ("1", "mass-weighted mean melt fraction of the layer"),
    "melt_mass": ("kg", "melt mass in the layer"),
    "full_top_depth": ("m", "depth of the shallowest fully molten node (NaN: none)"),
    "full_bottom_depth": ("m", "depth of the deepest fully molten node (NaN: none)"),
}
#: events group: event key -> (unit, long name).
EVENT_COLUMNS = {
    "time": ("s", "model time of the event (refined inside its step for formed, froze, last-melt, "
                  "magma-ocean-ended, magma-ocean-reformed, inner-core-nucleated)"),
    "kind": ("1", "event kind (meltzone.layers.EVENT_KINDS)"),
    "layer": ("1", "layer id (-1: an event of the whole planet)"),
    "depth": ("m", "depth of the event (NaN: none)"),
    "pressure": ("Pa", "pressure at the event's depth (NaN: none)"),
}
#: flags group: zone key of meltzone.phases.flags -> (file name, unit, long name).
FLAG_COLUMNS = {
    "kind": ("kind", "1", "flag kind"),
    "what": ("what", "1", "what rests on theory or extrapolation"),
    "top_depth_m": ("top_depth", "m", "depth of the top of the zone"),
    "bottom_depth_m": ("bottom_depth", "m", "depth of the bottom of the zone"),
    "top_pressure_pa": ("top_pressure", "Pa", "pressure at the top of the zone"),
    "bottom_pressure_pa": ("bottom_pressure", "Pa", "pressure at the bottom of the zone"),
    "source": ("source", "1", "source of the boundary, curve or data limit"),
    "confidence": ("confidence", "1", "confidence word: high (measured), medium (shock data), low (ab initio only)"),
}
#: Root attributes that hold the Result's scalars (the first two are read back, the others follow the history).
_RESULT_ATTRS = ("melting_model", "wall_time_s", "energy_closure", "n_steps", "n_rejected")
#: Note stored in the file and printed with every report.
MODEL_NOTE = "Results are model estimates, not measurements."


def _write_table(group, dim: str, n: int, columns: dict, fields: dict, dim_long_name: str, aux=()):
    """Columns of length ``n`` on dimension ``dim`` (an index coordinate 0..n-1); the columns named in
    ``aux`` are listed in every other column's ``coordinates`` attribute (netCDF auxiliary coordinates)."""
    write_coordinate(group, dim, np.arange(n, dtype=np.int64), "1", dim_long_name)
    for name, values in columns.items():
        unit, long_name = fields[name]
        ds = write_variable(group, name, values, (dim,), unit, long_name)
        if aux and name not in aux:
            ds.attrs["coordinates"] = " ".join(aux)


#: Columns stored as text, and as integers, in the record tables (events, flags, materials).
_TEXT_COLUMNS = {"kind", "what", "source", "confidence", "name"}
_INT_COLUMNS = {"layer", "form"}


def _records(rows, keys) -> dict:
    """Columns (arrays of the right dtype, also when there are no rows) from a list of dicts or objects."""
    def get(row, key):
        return row[key] if isinstance(row, dict) else getattr(row, key)

    return {key: np.array([get(r, key) for r in rows],
                          dtype=str if key in _TEXT_COLUMNS else np.int64 if key in _INT_COLUMNS else np.float64)
            for key in keys}


def _write_structure(g, it: Interior):
    from .phases import MANTLE_PHASES

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
    write_variable(g, "snapshot_time", snaps["time"], ("snapshot",), "s", "model time of the snapshot")
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
    g.attrs["critical_melt_fraction"] = h.critical_melt_fraction
    g.attrs["n_rejected"] = np.int64(h.n_rejected)
    for name, when in h.switch_times.items():  # NaN: the switch never happened
        g.attrs[f"switch_time_{name}"] = np.nan if when is None else float(when)
    columns = {"time": h.time, **h.series}
    fields = {"time": ("s", "model time since the start")}
    fields.update({name: (unit, long) for name, (unit, long, _) in SERIES.items() if name in h.series})
    _write_table(g, "step", len(h.time), columns, fields, "history step", aux=("time",))
    _write_mantle_grid(g, h.grid, radius)
    for name, (unit, long_name) in PROFILE_FIELDS.items():
        ds = write_variable(g, name, getattr(h, name), ("step", "mantle_node"), unit, long_name)
        ds.attrs["coordinates"] = "time " + _MANTLE_AUX


def _read_history(f) -> History:
    g = f["history"]
    series = {name: _read(g[name]) for name in SERIES if name in g}
    grid = MantleGrid(**{attr: _read(g[name]) for name, (attr, _, _) in GRID_FIELDS.items()})
    prefix = "switch_time_"
    switch = {k[len(prefix):]: (None if np.isnan(v) else float(v)) for k, v in g.attrs.items()
              if k.startswith(prefix)}
    intervals = {name: _read(f["intervals"][name]) for name in INTERVAL_FIELDS}
    for name in INTEGER_INTERVAL_FIELDS:
        intervals[name] = intervals[name].astype(np.int64)
    s = f["scheme"]
    data = {str(name): _read(s[name]) for name in s.attrs["data_names"]}
    return History(scheme=str(s.attrs["scheme"]), time=_read(g["time"]), series=series,
                   temperature=_read(g["temperature"]), melt_fraction=_read(g["melt_fraction"]),
                   intervals=intervals, grid=grid, critical_melt_fraction=float(g.attrs["critical_melt_fraction"]),
                   switch_times=switch, n_rejected=int(g.attrs["n_rejected"]), scheme_data=data)


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

    from . import __version__

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
                         table, LAYER_COLUMNS, "layer-table row", aux=("time",))
            _write_table(group("events", "events of the melt layers and of the planet, sorted by time"), "event",
                         len(events), _records(events, EVENT_COLUMNS), EVENT_COLUMNS,
                         "event index", aux=("time",))
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
    kind = f.attrs.get("meltzone_kind")
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
    return value.item() if isinstance(value, np.generic) else value


def load(path) -> Result:
    """Read a run file written by :func:`write` back into a :class:`Result` (lossless for every array).

    Raises ResultsFileError for a missing, unreadable or foreign file, a sweep file, another schema
    version or a damaged file."""
    import tomllib
    import warnings

    from .eos import Material

    with _open(path) as f:
        kind = _kind(f, path)
        if kind != RUN_KIND:
            raise ResultsFileError(f"{str(path)!r} is a meltzone {kind} file, not a single run")
        version = _scalar(f.attrs.get("schema_version"))
        if version != SCHEMA_VERSION:
            raise ResultsFileError(f"{str(path)!r} has run-file schema version {version!r}; this meltzone "
                                   f"reads version {SCHEMA_VERSION}")
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")  # the run warned already (e.g. a mass outside the calibration)
                spec = PlanetSpec.from_mapping(tomllib.loads(f.attrs["config_toml"]))
            g = f["structure"]
            values = {attr: _read(g[name]) for name, (attr, _, _) in STRUCTURE_ARRAYS.items()}
            values.update({attr: _scalar(_read(g[name])) for name, (attr, _, _) in STRUCTURE_SCALARS.items()})
            cols = {attr: _read(g[name]) for name, (attr, _, _) in MATERIAL_FIELDS.items()}
            values["materials"] = tuple(Material(**{attr: _scalar(cols[attr][i]) for attr in cols})
                                        for i in range(len(cols["name"])))
            interior = Interior(**values)
            history = _read_history(f)
            table = {name: _read(f["layers"][name]) for name in LAYER_COLUMNS if name in f["layers"]}
            ev = {name: _read(f["events"][name]) for name in EVENT_COLUMNS}
            events = [{"time": float(ev["time"][i]), "kind": str(ev["kind"][i]), "layer": int(ev["layer"][i]),
                       "depth": float(ev["depth"][i]), "pressure": float(ev["pressure"][i])}
                      for i in range(len(ev["time"]))]
            fl = {key: _read(f["flags"][name]) for key, (name, _, _) in FLAG_COLUMNS.items()}
            zones = [{key: (str(v[i]) if v.dtype == object else float(v[i])) for key, v in fl.items()}
                     for i in range(len(fl["kind"]))]
            g = f["snapshots"]
            snaps = {"time": _read(g["snapshot_time"]), "label": _read(g["snapshot_label"]).astype(str),
                     "temperature": _read(g["temperature"]), "melt_fraction": _read(g["melt_fraction"])}
            scalars = {name: _scalar(f.attrs[name]) for name in _RESULT_ATTRS[:2]}
            sources = tuple(str(s) for s in f.attrs["sources"])
        except MeltzoneError as exc:
            raise ResultsFileError(f"{str(path)!r}: the stored configuration does not load: {exc}") from None
        except (KeyError, ValueError, TypeError, OSError) as exc:
            raise ResultsFileError(f"{str(path)!r} is a damaged or incomplete meltzone run file ({exc})") from None
    from .evolution.schemes import get_scheme

    try:
        history.evaluator = get_scheme(history.scheme).evaluator(history)
    except MeltzoneError as exc:
        raise ResultsFileError(f"{str(path)!r}: {exc}") from None
    result = Result(spec=spec, interior=interior, history=history, sources=sources, **scalars)
    result._cache.update(tracked=(table, events), flags=zones, snapshots=snaps)
    return result
