"""HDF5 primitives shared by the run file (:mod:`meltzone.results`) and the sweep file: coordinates that are
dimension scales, variables with a scale on every axis and units, and atomic writes.

Conventions (netCDF-4 / xarray h5netcdf engine): each coordinate is a 1-D dataset made a dimension scale under
its own name; every variable attaches a scale to each axis and carries `units` and `long_name`. Groups are
created with track_order=True; data are gzip + shuffle compressed.
"""

from __future__ import annotations

import numpy as np


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
