"""The Result of a run and the run file: the one place the HDF5 schema lives (:func:`write`, :func:`load`).

Run file (schema version :data:`SCHEMA_VERSION`, root attribute ``meltzone_kind = "run"``), one group
per table, each readable with ``xarray.open_dataset(path, engine="h5netcdf", group=NAME)``:
``structure`` (interior nodes, dimension ``node``, coordinate ``radius``; scalars as 0-d variables;
EOS materials on ``material``), ``history`` (``step``, coordinate ``time`` [s]), ``intervals``
(``interval``), ``layers`` (``row``), ``events`` (``event``), ``snapshots`` (``snapshot`` x
``mantle_node``, coordinates ``snapshot_time`` and ``mantle_radius``), ``flags`` (``flag``) and
``kernel`` (the evolution kernel's input arrays). Root attributes: the configuration as TOML, the
sources of the laws used, the meltzone version and the UTC creation time.

Results are model estimates, not measurements.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .config import PlanetSpec
from .errors import MeltzoneError, ResultsFileError
from .interior import Interior

#: History fields: name -> (kernel column name, unit, description).
HISTORY_FIELDS = {
    "time": ("H_T", "s", "model time since the start"),
    "upper_temperature": ("H_TU", "K", "upper-mantle potential temperature"),
    "core_temperature": ("H_TC", "K", "temperature at the top of the core"),
    "surface_temperature": ("H_TS", "K", "surface temperature"),
    "surface_heat_flow": ("H_QS", "W", "heat flow out of the surface"),
    "cmb_heat_flow": ("H_QC", "W", "heat flow across the core-mantle boundary (out of the core)"),
    "radiogenic_power": ("H_H", "W", "radiogenic heating of the mantle"),
    "lid_thickness": ("H_LID", "m", "stagnant-lid thickness (0 when there is none)"),
    "inner_core_radius": ("H_RIC", "m", "inner-core radius"),
    "melt_mass": ("H_MELT", "kg", "mass of melt in the mantle"),
    "regime": ("H_REGIME", "1", "0 magma ocean, 1 mobile lid, 2 stagnant lid"),
    "top_melt_fraction": ("H_PHI_TOP", "1", "melt fraction at the top of the convecting mantle that sets the "
                           "regime: batch on the adiabat until it first falls to phi_c, isentropic after"),
    "upper_boundary_layer": ("H_DELTA_U", "m", "thickness of the upper thermal boundary layer"),
    "lower_boundary_layer": ("H_DELTA_C", "m", "thickness of the lower thermal boundary layer"),
    "lid_base_temperature": ("H_TL", "K", "temperature at the base of the lid (= T_u without a lid)"),
    "stored_energy": ("H_E_STORED", "J", "stored heat of mantle and core (sensible + latent)"),
    "heat_out_minus_radiogenic": ("H_OUT", "J", "time integral of surface heat flow minus radiogenic power"),
    "atmosphere_h2o": ("H_ATM_H2O", "kg", "H2O in the atmosphere"),
    "atmosphere_co2": ("H_ATM_CO2", "kg", "CO2 in the atmosphere"),
    "upper_temperature_rate": ("H_DTU", "K/s", "dT_u/dt"),
    "core_temperature_rate": ("H_DTC", "K/s", "dT_c/dt"),
    "lid_rate": ("H_DLID", "m/s", "d(lid)/dt"),
}

REGIME_NAMES = {0: "magma ocean", 1: "mobile lid", 2: "stagnant lid"}

#: Interval fields: name -> (kernel column, unit, description). Nodes count from the CMB (0) upward.
INTERVAL_FIELDS = {
    "step": ("I_STEP", "1", "history step the interval belongs to"),
    "top_node": ("I_TOP", "1", "shallowest molten node"),
    "bottom_node": ("I_BOTTOM", "1", "deepest molten node"),
    "max_melt_fraction": ("I_MAX_PHI", "1", "largest melt fraction in the interval"),
    "melt_mass": ("I_MASS", "kg", "melt mass in the interval"),
    "full_top_node": ("I_FULL_TOP", "1", "shallowest fully molten node (-1: none)"),
    "full_bottom_node": ("I_FULL_BOTTOM", "1", "deepest fully molten node (-1: none)"),
    "mean_melt_fraction": ("I_MEAN_PHI", "1", "mass-weighted mean melt fraction"),
}


@dataclass
class Result:
    """Everything one run produced (SI units). ``history[name]`` and ``intervals[name]`` are arrays."""

    spec: PlanetSpec
    interior: Interior
    melting_model: str
    history: dict
    intervals: dict
    energy_closure: float
    n_steps: int
    n_rejected: int
    wall_time_s: float
    kernel_inputs: tuple = field(default=(), repr=False)
    sources: tuple = ()
    _cache: dict = field(default_factory=dict, repr=False, compare=False)

    @classmethod
    def from_kernel(cls, spec, interior, model, grid, core, iso, par, law, hist, iv, state, wall):
        from .evolution import kernel as k

        history = {name: hist[:, getattr(k, col)].copy() for name, (col, _, _) in HISTORY_FIELDS.items()}
        history["regime"] = history["regime"].astype(np.int8)
        intervals = {name: iv[:, getattr(k, col)].copy() for name, (col, _, _) in INTERVAL_FIELDS.items()}
        for name in ("step", "top_node", "bottom_node", "full_top_node", "full_bottom_node"):
            intervals[name] = intervals[name].astype(np.int64)
        de = history["stored_energy"][0] - history["stored_energy"]
        out = history["heat_out_minus_radiogenic"]
        scale = max(float(np.max(np.abs(de))), 1.0)
        history["closure_error"] = (de - out) / scale
        closure = float(abs(history["closure_error"][-1]))
        return cls(spec=spec, interior=interior, melting_model=model.id, history=history, intervals=intervals,
                   energy_closure=closure, n_steps=len(hist) - 1, n_rejected=int(state[8]), wall_time_s=wall,
                   kernel_inputs=(grid, core, iso, par, law))

    # ------------------------------------------------------------------ views
    @property
    def time(self) -> np.ndarray:
        return self.history["time"]

    def profile(self, step: int):
        """(temperature [K], melt fraction) on the mantle nodes at history step ``step``."""
        return self.profile_at_state(self.time[step], *self.temperatures(step))

    def temperatures(self, step: int) -> tuple[float, float, float]:
        """(T_u [K], T_c [K], lid [m]) at history step ``step``."""
        h = self.history
        lid = float(h["lid_thickness"][step]) if self.spec.convection.regime == "stagnant-lid" else 0.0
        return float(h["upper_temperature"][step]), float(h["core_temperature"][step]), lid

    def profile_at_state(self, t: float, tu: float, tc: float, lid: float = 0.0, with_diagnostics=False):
        """(temperature [K], melt fraction) on the mantle nodes for the given temperatures and lid;
        with ``with_diagnostics`` also the kernel's diagnostics array (indices kernel.D_*)."""
        from .evolution import kernel as k

        grid, core, iso, par, law = self.kernel_inputs
        n = grid.shape[1]
        temp = np.empty(n)
        phi = np.empty(n)
        diag = np.empty(k.N_D)
        k.profile_at(float(t), float(tu), float(tc), float(lid), grid, core, iso, par, law, temp, phi, diag)
        return (temp, phi, diag) if with_diagnostics else (temp, phi)

    def state_at(self, t: float) -> tuple[float, float, float]:
        """(T_u [K], T_c [K], lid [m]) at model time ``t`` [s]: the stored step when ``t`` is one, otherwise
        the cubic Hermite interpolation between the two steps around it (values and rates at both ends;
        the interpolant :mod:`meltzone.layers` uses to refine event times)."""
        times = self.time
        t = float(t)
        if not times[0] <= t <= times[-1]:
            raise ValueError(f"time {t:g} s is outside the run ({times[0]:g} - {times[-1]:g} s)")
        s = int(np.searchsorted(times, t, side="left"))
        if times[s] == t:
            return self.temperatures(s)
        if "interp" not in self._cache:
            from .layers import _Interp

            self._cache["interp"] = _Interp(self)
        return tuple(self._cache["interp"].state(s, t))

    def profile_at_time(self, t: float):
        """(temperature [K], melt fraction) on the mantle nodes at model time ``t`` [s] (see :meth:`state_at`)."""
        return self.profile_at_state(t, *self.state_at(t))

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
        n = self.kernel_inputs[0].shape[1]
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


# ====================================================================== HDF5 primitives
# Conventions (netCDF-4 / xarray h5netcdf engine): each coordinate is a 1-D dataset made a
# dimension scale under its own name; every variable attaches a scale to each axis and carries
# `units` and `long_name`; a dimension without coordinate values gets the netCDF marker scale.
# Groups are created with track_order=True; data are gzip + shuffle compressed.

NETCDF_DIM_MARKER = "This is a netCDF dimension but not a netCDF variable."


def _compression(data) -> dict:
    arr = np.asarray(data)
    if arr.ndim == 0 or arr.size < 16 or arr.dtype.kind in "SUO":
        return {}
    return {"compression": "gzip", "compression_opts": 4, "shuffle": True}


def write_coordinate(group, name: str, values, units: str, long_name: str, growable: bool = False):
    """A 1-D coordinate dataset, made a dimension scale named after itself."""
    values = np.asarray(values)
    kwargs = _compression(values)
    if growable:
        kwargs.update(maxshape=(None,), chunks=(max(min(len(values), 4096), 1),))
    ds = group.create_dataset(name, data=values, **kwargs)
    ds.attrs["units"] = units
    ds.attrs["long_name"] = long_name
    ds.make_scale(name)
    return ds


def write_dimension(group, name: str, length: int):
    """A dimension without coordinate values (netCDF marker scale of float32 zeros)."""
    ds = group.create_dataset(name, shape=(length,), dtype="f4")
    ds.make_scale(f"{NETCDF_DIM_MARKER}{length:10d}")
    return ds


def write_variable(group, name: str, data, dims: tuple[str, ...], units: str, long_name: str,
                   growable: bool = False):
    """A data variable with a scale attached to every axis, in order."""
    data = np.asarray(data)
    if data.dtype == bool:
        data = data.astype(np.int8)
    if data.dtype.kind == "U":
        data = data.astype(object)
        import h5py

        ds = group.create_dataset(name, data=data, dtype=h5py.string_dtype())
    else:
        kwargs = _compression(data)
        if growable and data.ndim >= 1:
            kwargs.update(maxshape=(None,) + data.shape[1:],
                          chunks=(max(min(data.shape[0], 4096), 1),) + data.shape[1:])
        ds = group.create_dataset(name, data=data, **kwargs)
    if len(dims) != data.ndim:
        raise ValueError(f"{name}: {data.ndim} axes but dims {dims}")
    for axis, dim in enumerate(dims):
        ds.dims[axis].attach_scale(group[dim])
    ds.attrs["units"] = units
    ds.attrs["long_name"] = long_name
    return ds


def _remove_stale_temporaries(target: str) -> None:
    """Remove the temporaries of ``target`` (``.NAME.PID.*.part``) whose writer process is gone (killed
    while writing); those of a live process are left alone."""
    import glob
    import os

    prefix = os.path.join(os.path.dirname(target), "." + os.path.basename(target) + ".")
    for tmp in glob.glob(glob.escape(prefix) + "*.part"):
        pid = tmp[len(prefix):].partition(".")[0]
        if not pid.isdigit():
            continue
        try:
            os.kill(int(pid), 0)
        except ProcessLookupError:
            try:
                os.unlink(tmp)
            except OSError:
                pass
        except OSError:  # alive under another user (EPERM): not ours to remove
            pass


def atomic_h5(path):
    """Context manager: an h5py.File opened on a temporary name in the target folder, moved into place
    (os.replace) only when the block succeeds; the temporary is removed on failure. The temporary's name
    holds the writer's process id, and temporaries of the same target left by a process that is gone are
    removed first."""
    import contextlib
    import os
    import tempfile

    import h5py

    @contextlib.contextmanager
    def manager():
        target = os.path.abspath(os.fspath(path))
        folder = os.path.dirname(target) or "."
        _remove_stale_temporaries(target)
        fd, tmp = tempfile.mkstemp(prefix=f".{os.path.basename(target)}.{os.getpid()}.", suffix=".part",
                                   dir=folder)
        os.close(fd)
        try:
            with h5py.File(tmp, "w", track_order=True) as f:
                yield f
            with open(tmp, "rb+") as fh:  # the bytes reach the disk before the name points at them
                os.fsync(fh.fileno())
            umask = os.umask(0)
            os.umask(umask)
            os.chmod(tmp, 0o666 & ~umask)  # mkstemp made it 0600; give it the mode a plain open() would
            os.replace(tmp, target)
            with contextlib.suppress(OSError):  # and the rename itself survives a crash
                dir_fd = os.open(folder, os.O_RDONLY)
                try:
                    os.fsync(dir_fd)
                finally:
                    os.close(dir_fd)
        except BaseException:
            with contextlib.suppress(OSError):
                os.unlink(tmp)
            raise

    return manager()


# ====================================================================== the run file (schema version 1)
#: Value of the root attribute ``meltzone_kind`` of a single-run file (sweep files carry "sweep").
RUN_KIND = "run"
#: Kinds of meltzone HDF5 files.
FILE_KINDS = ("run", "sweep")
#: Version of the run-file layout below; :func:`load` refuses any other.
SCHEMA_VERSION = 2  # 2: kernel parameters P_NU_A, P_T_SOLID, P_BLEND (43 in all)

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
#: history group extra column (derived from the stored energy).
CLOSURE_FIELD = ("1", "relative energy-closure error: (stored-energy loss - time-integrated surface heat loss net "
                 "of radiogenic heating) / largest stored-energy change")
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
#: Root attributes that hold the Result's scalars.
_RESULT_ATTRS = ("melting_model", "energy_closure", "n_steps", "n_rejected", "wall_time_s")
#: Note stored in the file and printed with every report.
MODEL_NOTE = "Results are model estimates, not measurements."


def _kernel_names(prefix: str, n: int) -> list[str]:
    """Names of the kernel's index constants ``prefix*`` (row i -> name), e.g. G_R, G_P, ... for the grid."""
    from .evolution import kernel as k

    names = [""] * n
    for attr in dir(k):
        value = getattr(k, attr)
        if attr.startswith(prefix) and isinstance(value, int) and 0 <= value < n:
            names[value] = attr
    return names


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
    it = result.interior
    grid = result.kernel_inputs[0]
    from .evolution import kernel as k

    g.attrs["description"] = ("temperature and melt fraction on the mantle nodes (CMB -> surface) at chosen model "
                              "times: log-spaced and at every event; between steps the state is interpolated")
    n_snap, n_node = snaps["temperature"].shape
    write_coordinate(g, "snapshot", np.arange(n_snap, dtype=np.int64), "1", "snapshot index")
    write_coordinate(g, "mantle_node", np.arange(n_node, dtype=np.int64), "1", "mantle node index, CMB (0) to surface")
    write_variable(g, "snapshot_time", snaps["time"], ("snapshot",), "s", "model time of the snapshot")
    write_variable(g, "snapshot_label", np.asarray(snaps["label"], dtype=str), ("snapshot",), "1",
                   "why the snapshot was taken: initial, final, log-spaced or the events at that time")
    write_variable(g, "mantle_radius", grid[k.G_R], ("mantle_node",), "m", "radius of the mantle node")
    write_variable(g, "mantle_depth", it.radius - grid[k.G_R], ("mantle_node",), "m", "depth of the mantle node")
    write_variable(g, "mantle_pressure", grid[k.G_P], ("mantle_node",), "Pa", "pressure at the mantle node")
    aux_node = "mantle_radius mantle_depth mantle_pressure"
    for name, row, long_name in (("solidus", k.G_TSOL, "solidus temperature"),
                                 ("liquidus", k.G_TLIQ, "liquidus temperature")):
        write_variable(g, name, grid[row], ("mantle_node",), "K", long_name).attrs["coordinates"] = aux_node
    for name, unit, long_name in (("temperature", "K", "mantle temperature"),
                                  ("melt_fraction", "1", "melt fraction")):
        ds = write_variable(g, name, snaps[name], ("snapshot", "mantle_node"), unit, long_name)
        ds.attrs["coordinates"] = "snapshot_time snapshot_label " + aux_node


def _write_kernel(g, result):
    grid, core, iso, par, law = result.kernel_inputs
    g.attrs["description"] = ("the evolution kernel's input arrays (meltzone.evolution.kernel), so that a loaded "
                              "run can rebuild T(r) and melt fraction at any state; rows named by *_name")
    mixed = "mixed SI (see the row names)"
    for dim, n, prefix, long_name in (("grid_row", grid.shape[0], "G_", "mantle grid row"),
                                      ("core_row", core.shape[0], "C_", "core grid row"),
                                      ("parameter", len(par), "P_", "kernel parameter")):
        write_coordinate(g, dim, np.arange(n, dtype=np.int64), "1", long_name)
        write_variable(g, f"{dim}_name", np.array(_kernel_names(prefix, n), dtype=str), (dim,), "1",
                       f"{long_name} name (kernel index constant)")
    write_coordinate(g, "mantle_node", np.arange(grid.shape[1], dtype=np.int64), "1", "mantle node, CMB (0) up")
    write_coordinate(g, "core_node", np.arange(core.shape[1], dtype=np.int64), "1", "core node, centre (0) up")
    write_coordinate(g, "isotope", np.arange(iso.shape[0], dtype=np.int64), "1",
                     "radiogenic isotope (U-238, U-235, Th-232, K-40)")
    write_coordinate(g, "isotope_column", np.arange(iso.shape[1], dtype=np.int64), "1",
                     "0: heat production today [W/kg of mantle], 1: decay constant [1/s]")
    write_variable(g, "grid", grid, ("grid_row", "mantle_node"), mixed, "mantle grid (kernel G_* rows)")
    write_variable(g, "core", core, ("core_row", "core_node"), mixed, "core grid (kernel C_* rows)")
    write_variable(g, "iso", iso, ("isotope", "isotope_column"), mixed, "isotope table")
    write_variable(g, "par", par, ("parameter",), mixed, "scalar parameters (kernel P_* indices)")
    write_variable(g, "law", np.int64(law), (), "1", "melt-fraction law code")


def write(result: Result, path, snapshot_times=None):
    """Write a run to an HDF5 file, atomically (a temporary file in the same folder, then ``os.replace``).

    Groups (each opens with ``xarray.open_dataset(path, engine="h5netcdf", group=NAME)``):
    ``structure``, ``history``, ``intervals``, ``layers``, ``events``, ``snapshots``, ``flags``,
    ``kernel``; the root attributes hold the configuration as TOML, the sources of the laws,
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
            h = result.history
            fields = {name: (unit, long) for name, (_, unit, long) in HISTORY_FIELDS.items()}
            fields["closure_error"] = CLOSURE_FIELD
            _write_table(group("history", "time series, one row per accepted step"), "step", len(h["time"]),
                         {name: h[name] for name in fields}, fields, "history step", aux=("time",))
            iv = result.intervals
            fields = {name: (unit, long) for name, (_, unit, long) in INTERVAL_FIELDS.items()}
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
            _write_kernel(group("kernel", ""), result)
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
            history = {name: _read(f["history"][name]) for name in [*HISTORY_FIELDS, "closure_error"]}
            intervals = {name: _read(f["intervals"][name]) for name in INTERVAL_FIELDS}
            g = f["kernel"]
            kernel_inputs = (_read(g["grid"]), _read(g["core"]), _read(g["iso"]), _read(g["par"]),
                             int(_read(g["law"])))
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
            scalars = {name: _scalar(f.attrs[name]) for name in _RESULT_ATTRS}
            sources = tuple(str(s) for s in f.attrs["sources"])
        except MeltzoneError as exc:
            raise ResultsFileError(f"{str(path)!r}: the stored configuration does not load: {exc}") from None
        except (KeyError, ValueError, TypeError, OSError) as exc:
            raise ResultsFileError(f"{str(path)!r} is a damaged or incomplete meltzone run file ({exc})") from None
    result = Result(spec=spec, interior=interior, history=history, intervals=intervals,
                    kernel_inputs=kernel_inputs, sources=sources, **scalars)
    result._cache.update(tracked=(table, events), flags=zones, snapshots=snaps)
    return result
