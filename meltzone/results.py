"""The Result of a run: history, per-step melt intervals, interior; (HDF5 schema: see write/load).

Results are model estimates, not measurements.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .config import PlanetSpec
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
    "top_melt_fraction": ("H_PHI_TOP", "1", "melt fraction at the top of the convecting mantle"),
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
        return self.profile_at_state(self.time[step], self.state(step))

    def state(self, step: int) -> np.ndarray:
        from .evolution import kernel as k

        y = np.zeros(k.N_Y)
        y[k.Y_TU] = self.history["upper_temperature"][step]
        y[k.Y_TC] = self.history["core_temperature"][step]
        y[k.Y_LID] = max(self.history["lid_thickness"][step], 0.0) if self.spec.convection.regime == \
            "stagnant-lid" else 0.0
        return y

    def profile_at_state(self, t: float, y: np.ndarray):
        from .evolution import kernel as k

        grid, core, iso, par, law = self.kernel_inputs
        n = grid.shape[1]
        temp = np.empty(n)
        phi = np.empty(n)
        diag = np.empty(k.N_D)
        k.profile_at(float(t), np.ascontiguousarray(y, dtype=np.float64), grid, core, iso, par, law, temp, phi,
                     diag)
        return temp, phi


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


def atomic_h5(path):
    """Context manager: an h5py.File opened on a temporary name in the target folder, moved into place
    (os.replace) only when the block succeeds; the temporary is removed on failure."""
    import contextlib
    import os
    import tempfile

    import h5py

    @contextlib.contextmanager
    def manager():
        target = os.path.abspath(os.fspath(path))
        folder = os.path.dirname(target) or "."
        fd, tmp = tempfile.mkstemp(prefix="." + os.path.basename(target) + ".", suffix=".part", dir=folder)
        os.close(fd)
        try:
            with h5py.File(tmp, "w", track_order=True) as f:
                yield f
            os.chmod(tmp, 0o644)
            os.replace(tmp, target)
        except BaseException:
            with contextlib.suppress(OSError):
                os.unlink(tmp)
            raise

    return manager()
