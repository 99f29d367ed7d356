"""The HDF5 run file: read back by general-purpose libraries (xarray + h5netcdf, h5py, tomllib, datetime),
lossless round trip, atomic writes that survive a SIGKILL, clear errors for foreign files.

The oracles are outside meltzone: xarray's netCDF-4 reader decides whether the dimensions are named, h5py's
dimension-scale API decides whether every axis has a scale, the standard library parses the stored TOML and
time stamp, and the operating system kills the writer.
"""

import datetime
import hashlib
import os
import signal
import subprocess
import sys
import textwrap
import tomllib

import h5py
import numpy as np
import pytest
import xarray as xr

import meltzone
from meltzone import layers, results
from meltzone.errors import ResultsFileError

GROUPS = {  # group -> dimensions it must have (named, as xarray reports them)
    "structure": {"node", "material"},
    "history": {"time", "mantle_node"},
    "intervals": {"interval"},
    "layers": {"row"},
    "events": {"event"},
    "snapshots": {"snapshot", "mantle_node"},
    "flags": {"flag"},
    "scheme": {"grid_dim0", "grid_dim1", "core_dim0", "core_dim1", "iso_dim0", "iso_dim1", "par_dim0"},
}
NETCDF_MARKER = b"This is a netCDF dimension but not a netCDF variable."


@pytest.fixture(scope="module")
def run():
    """A small run: 1 Earth mass, 0.5 Gyr, coarse mantle grid."""
    return meltzone.evolve(None, mass_earth=1.0, end_time_gyr=0.5, mantle_nodes=64, name="Test-1 b (invented)")


@pytest.fixture(scope="module")
def run_file(run, tmp_path_factory):
    return results.write(run, tmp_path_factory.mktemp("run") / "run.h5")


def _digest(path):
    return hashlib.sha256(path.read_bytes()).hexdigest()


# ---------------------------------------------------------------- read by other libraries
@pytest.mark.parametrize("group", sorted(GROUPS))
def test_xarray_opens_every_group_with_named_dimensions(run_file, group):
    """xarray (h5netcdf engine) names every dimension after its scale: no phony_dim_* anywhere."""
    with xr.open_dataset(run_file, engine="h5netcdf", group=group) as ds:
        assert set(ds.sizes) == GROUPS[group]
        for name, var in ds.variables.items():
            assert not any(d.startswith("phony_dim") for d in var.dims), name
            assert "units" in var.attrs and "long_name" in var.attrs, name


def test_xarray_reads_times_as_years_and_auxiliary_coordinates(run, run_file):
    """Every time axis is model time in years (units "yr", which xarray does not decode to timedeltas, also with
    decode_timedelta=True); model time is the history's dimension coordinate; radius is a coordinate."""
    from meltzone.constants import YEAR

    with xr.open_dataset(run_file, engine="h5netcdf", group="history", decode_timedelta=True) as ds:
        assert ds["time"].dims == ("time",) and ds["time"].dtype == np.float64 and ds["time"].attrs["units"] == "yr"
        np.testing.assert_allclose(ds["time"].values * YEAR, run.time, rtol=1e-15)
        assert ds["upper_temperature"].dims == ("time",) and ds["temperature"].dims == ("time", "mantle_node")
        np.testing.assert_array_equal(ds["upper_temperature"].values, run.history["upper_temperature"])
    for group, name in (("layers", "time"), ("events", "time"), ("snapshots", "snapshot_time")):
        with xr.open_dataset(run_file, engine="h5netcdf", group=group, decode_timedelta=True) as ds:
            assert ds[name].dtype == np.float64 and ds[name].attrs["units"] == "yr", group
    with xr.open_dataset(run_file, engine="h5netcdf", group="structure") as ds:
        assert "radius" in ds.coords
        np.testing.assert_array_equal(ds["pressure"].values, run.interior.P)
    with xr.open_dataset(run_file, engine="h5netcdf", group="snapshots") as ds:
        assert {"snapshot_time", "mantle_radius"} <= set(ds.coords)
        assert ds["temperature"].dims == ("snapshot", "mantle_node")
        assert ds["snapshot_time"].dtype == np.float64


def test_every_axis_has_a_scale_and_every_dataset_units(run_file):
    """h5py walk: each dataset is a dimension scale or has a scale attached to each of its axes; all carry
    `units` and `long_name` (netCDF marker dimensions, which hold no data, would be exempt)."""
    seen = []

    def visit(name, obj):
        if not isinstance(obj, h5py.Dataset):
            return
        seen.append(name)
        if obj.is_scale:
            if obj.attrs.get("NAME", b"").startswith(NETCDF_MARKER):
                return
        else:
            for axis in range(obj.ndim):
                assert len(obj.dims[axis]) >= 1, f"{name}: axis {axis} has no dimension scale"
        assert "units" in obj.attrs, f"{name} has no units"
        assert "long_name" in obj.attrs, f"{name} has no long_name"

    with h5py.File(run_file, "r") as f:
        f.visititems(visit)
        assert set(f) == set(GROUPS)
    assert len(seen) > 100


def test_root_attributes(run, run_file):
    """The root holds kind, schema, version, a UTC ISO time, the config as TOML and the sources."""
    with h5py.File(run_file, "r") as f:
        a = f.attrs
        assert a["meltzone_kind"] == "run" and a["schema_version"] == results.SCHEMA_VERSION
        assert a["meltzone_version"] == meltzone.__version__
        created = datetime.datetime.fromisoformat(a["created_utc"])
        assert created.utcoffset() == datetime.timedelta(0)
        assert abs((datetime.datetime.now(datetime.timezone.utc) - created).total_seconds()) < 3600
        config = tomllib.loads(a["config_toml"])  # the standard library parses it
        sources = [str(s) for s in a["sources"]]
    assert meltzone.PlanetSpec(config) == run.spec
    from meltzone.melting import get_model

    assert any(get_model(run.melting_model).citation in s for s in sources)
    for mat in run.interior.materials:
        assert any(mat.source in s for s in sources)
    assert any("Tosi et al. 2017" in s and "[checked]" in s for s in sources)
    assert any("[from memory]" in s for s in sources)  # the file keeps the status of unverified sources


# ---------------------------------------------------------------- round trip
def test_round_trip_is_lossless(run, run_file):
    loaded = meltzone.load(run_file)
    assert isinstance(loaded, meltzone.Result)
    a, b = run.history, loaded.history
    for group, x, y in (("series", a.series, b.series), ("intervals", a.intervals, b.intervals),
                        ("scheme data", a.scheme_data, b.scheme_data),
                        ("profiles", {"time": a.time, "temperature": a.temperature, "phi": a.melt_fraction},
                         {"time": b.time, "temperature": b.temperature, "phi": b.melt_fraction}),
                        ("grid", vars(a.grid), vars(b.grid))):
        assert set(x) == set(y), group
        for name in x:
            u, v = np.asarray(x[name]), np.asarray(y[name])
            if name == "time":  # stored in years: seconds come back within a rounding of the conversion
                assert u.dtype == v.dtype and np.allclose(u, v, rtol=4e-16, atol=0), f"{group}/{name}"
                continue
            assert u.dtype == v.dtype and np.array_equal(u, v), f"{group}/{name}"
    assert (b.scheme, b.critical_melt_fraction, b.switch_times) == (a.scheme, a.critical_melt_fraction,
                                                                     a.switch_times)
    for attr in ("r", "m", "P", "rho", "g", "phase", "T_ref", "adiabat"):
        x, y = getattr(run.interior, attr), getattr(loaded.interior, attr)
        assert y.dtype == x.dtype and np.array_equal(x, y), attr
    for attr, _, _ in results.STRUCTURE_SCALARS.values():
        x, y = getattr(run.interior, attr), getattr(loaded.interior, attr)
        assert type(y) is type(x) and y == x, attr
    assert loaded.interior.materials == run.interior.materials
    assert loaded.spec == run.spec
    assert (loaded.melting_model, loaded.energy_closure, loaded.n_steps, loaded.n_rejected) == \
        (run.melting_model, run.energy_closure, run.n_steps, run.n_rejected)
    for step in (0, len(run.time) // 2, len(run.time) - 1):  # a loaded Result rebuilds profiles
        for x, y in zip(run.profile(step), loaded.profile(step)):
            assert np.array_equal(x, y)


def test_loaded_file_rebuilds_the_state_inside_a_step(run, run_file):
    """A loaded run rebuilds its scheme's evaluator from the file (through the scheme table) and gives the same
    state inside a step as the live run: profile, regime melt fraction and centre margin to 1e-12 relative
    (common practice: a lossless file gives the same numbers)."""
    loaded = meltzone.load(run_file)
    s = len(run.time) // 2
    t = 0.5 * (run.time[s - 1] + run.time[s])
    live, back = run.history.at(t), loaded.history.at(t)
    np.testing.assert_allclose(back.temperature, live.temperature, rtol=1e-12, atol=0.0)
    np.testing.assert_allclose(back.melt_fraction, live.melt_fraction, rtol=1e-12, atol=1e-300)
    assert back.regime_melt_fraction == pytest.approx(live.regime_melt_fraction, rel=1e-12, abs=1e-300)
    assert back.centre_freezing_margin_k == pytest.approx(live.centre_freezing_margin_k, rel=1e-12)
    assert not np.array_equal(live.temperature, run.history.temperature[s])  # inside the step, not at its end


def test_loaded_layers_events_flags_and_snapshots(run, run_file):
    loaded = meltzone.load(run_file)
    table, events = run.tracked()
    lt, le = loaded.tracked()
    def same(a, b):  # times are stored in years: seconds come back within a rounding of the conversion
        return np.allclose(a, b, rtol=4e-16, atol=0)

    assert set(lt) == set(table)
    assert all(np.array_equal(lt[k], table[k], equal_nan=True) for k in table if k != "time")
    assert same(lt["time"], table["time"])
    assert len(le) == len(events)
    for key in ("time", "kind", "layer", "depth", "pressure"):
        a, b = np.array([e[key] for e in le]), np.array([e[key] for e in events])
        assert same(a, b) if key == "time" else np.array_equal(a, b, equal_nan=key in ("depth", "pressure")), key
    # the file is the record, and it agrees with tracking the loaded run afresh
    fresh_table, fresh_events = layers.track(loaded)
    assert all(np.allclose(fresh_table[k], table[k], rtol=1e-15, atol=0, equal_nan=True) for k in table)
    assert [e["kind"] for e in fresh_events] == [e["kind"] for e in events]
    a, b = loaded.summary(), run.summary()
    assert a.keys() == b.keys()
    for key in a:
        if key == "events":
            assert [{**e, "time_yr": None} for e in a[key]] == [{**e, "time_yr": None} for e in b[key]]
            assert same([e["time_yr"] for e in a[key]], [e["time_yr"] for e in b[key]])
        elif key in ("volcanism_active_yr", "melt_extracted_90pct_yr"):
            # sums and integrals over step lengths: each length carries the time's rounding relative to the
            # time itself, not to the step (measured: 1.3e-15 apart); 1e-12 still catches any real change
            assert a[key] == pytest.approx(b[key], rel=1e-12), key
        elif isinstance(a[key], float):
            assert a[key] == pytest.approx(b[key], rel=1e-15), key
        elif key != "basal_layer":
            assert a[key] == b[key], key
    assert [z["kind"] for z in loaded.flags()] == [z["kind"] for z in run.flags()]
    snaps = loaded.snapshots()
    np.testing.assert_array_equal(snaps["temperature"], run.snapshots()["temperature"])


def test_default_snapshots_are_log_spaced_plus_events(run):
    snaps = run.snapshots()
    t = snaps["time"]
    assert np.all(np.diff(t) > 0) and t[0] == run.time[0] and t[-1] == run.time[-1]
    assert np.sum(snaps["label"] == "log-spaced") >= results.DEFAULT_SNAPSHOTS - 4
    for e in run.tracked()[1]:
        assert e["time"] in t
    # at a stored step the snapshot is the step's own profile
    np.testing.assert_array_equal(snaps["temperature"][-1], run.profile(len(run.time) - 1)[0])
    assert snaps["temperature"].shape == (len(t), run.history.grid.n)


def test_custom_snapshot_times(run, tmp_path):
    times = [run.time[-1] / 3, run.time[-1] / 2]
    path = results.write(run, tmp_path / "custom.h5", snapshot_times=times)
    from meltzone.constants import YEAR

    with xr.open_dataset(path, engine="h5netcdf", group="snapshots") as ds:
        np.testing.assert_array_equal(ds["snapshot_time"].values, np.asarray(times) / YEAR)


# ---------------------------------------------------------------- kinds and foreign files
def test_file_kind(run_file, tmp_path):
    assert results.file_kind(run_file) == "run"
    sweep = tmp_path / "sweep.h5"
    with h5py.File(sweep, "w") as f:
        f.attrs["meltzone_kind"] = "sweep"
    assert results.file_kind(sweep) == "sweep"
    with pytest.raises(ResultsFileError, match="sweep file, not a single run"):
        results.load(sweep)


def _foreign(tmp_path, run_file):
    text = tmp_path / "notes.h5"
    text.write_text("not HDF5 at all\n")
    empty = tmp_path / "empty.h5"
    empty.write_bytes(b"")
    other = tmp_path / "other.h5"
    with h5py.File(other, "w") as f:
        f["x"] = np.arange(3)
    newer = tmp_path / "newer.h5"
    newer.write_bytes(run_file.read_bytes())
    with h5py.File(newer, "a") as f:
        f.attrs["schema_version"] = 99
    damaged = tmp_path / "damaged.h5"
    damaged.write_bytes(run_file.read_bytes())
    with h5py.File(damaged, "a") as f:
        del f["scheme"]
    return {"not HDF5": (text, "not a readable HDF5"), "empty": (empty, "not a readable HDF5"),
            "foreign": (other, "not a meltzone file"), "schema": (newer, "schema version 99"),
            "damaged": (damaged, "damaged or incomplete"), "missing": (tmp_path / "nope.h5", "no such file"),
            "folder": (tmp_path, "not a readable HDF5")}


def test_foreign_and_unreadable_files_raise_one_line(tmp_path, run_file):
    for label, (path, words) in _foreign(tmp_path, run_file).items():
        with pytest.raises(ResultsFileError) as info:
            results.load(path)
        assert words in str(info.value), label
        assert "\n" not in str(info.value), label
    with pytest.raises(ResultsFileError, match="not a meltzone file"):
        results.file_kind(tmp_path / "other.h5")


# ---------------------------------------------------------------- atomic writes
WRITER = textwrap.dedent("""
    import sys, time
    import numpy as np
    from meltzone.results import atomic_h5, write_coordinate, write_variable
    with atomic_h5(sys.argv[1]) as f:
        f.attrs["meltzone_kind"] = "run"
        write_coordinate(f, "i", np.arange(1_000_000), "1", "index")
        for k in range(600):
            write_variable(f, f"v{k}", np.random.default_rng(k).random(1_000_000), ("i",), "1", "noise")
            f.flush()
            if k == 1:
                print("writing", flush=True)
            time.sleep(0.05)
""")


def _kill_writer_midway(target):
    proc = subprocess.Popen([sys.executable, "-c", WRITER, str(target)], stdout=subprocess.PIPE, text=True)
    try:
        assert proc.stdout.readline().strip() == "writing"
        parts = [p for p in os.listdir(target.parent) if p.startswith("." + target.name) and p.endswith(".part")]
        assert parts, "the writer should be writing to a temporary file"
        os.kill(proc.pid, signal.SIGKILL)
        proc.wait(timeout=30)
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait()
    assert proc.returncode == -signal.SIGKILL
    return parts


def test_killed_writer_leaves_no_file_under_the_final_name(tmp_path):
    target = tmp_path / "big.h5"
    parts = _kill_writer_midway(target)
    assert not target.exists()
    assert target.name not in parts  # the half-written data sits only under the temporary name


def test_killed_writer_keeps_the_previous_complete_file(run, run_file, tmp_path):
    target = tmp_path / "run.h5"
    target.write_bytes(run_file.read_bytes())
    before = _digest(target)
    _kill_writer_midway(target)
    assert _digest(target) == before
    loaded = meltzone.load(target)  # still a complete, readable run
    np.testing.assert_allclose(loaded.time, run.time, rtol=4e-16, atol=0)


def test_failed_write_removes_its_temporary(run, tmp_path, monkeypatch):
    """An exception inside the write leaves neither the final file nor the temporary behind."""
    target = tmp_path / "fail.h5"
    table, events = run.tracked()
    monkeypatch.setitem(run._cache, "tracked", ({**table, "mystery": table["time"]}, events))
    with pytest.raises(ValueError, match="mystery"):
        results.write(run, target)
    assert os.listdir(tmp_path) == []


def test_written_file_is_world_readable_and_missing_folder_fails(run, run_file, tmp_path):
    assert os.stat(run_file).st_mode & 0o044 == 0o044  # not the 0600 of mkstemp
    with pytest.raises(ResultsFileError, match="cannot write"):
        results.write(run, tmp_path / "no" / "such" / "folder.h5")


def test_lazy_public_api():
    assert meltzone.load is results.load and meltzone.Result is results.Result
    from meltzone.pipeline import evolve

    assert meltzone.evolve is evolve


def test_lazy_sweep_is_the_subpackage():
    """In a fresh interpreter ``meltzone.sweep`` is the subpackage, whose names the README quotes
    (meltzone.sweep.infer_core_fraction); it was an alias of run_sweep that hid them."""
    import subprocess
    import sys

    code = ("import meltzone, types; s = meltzone.sweep; "
            "assert isinstance(s, types.ModuleType) and s.run_sweep is meltzone.run_sweep; "
            "from meltzone.interior import infer_core_fraction; assert s.infer_core_fraction is infer_core_fraction")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr


# ---------------------------------------------------------------- notebook use
def test_repr_is_short(run):
    """In a notebook a Result shows one line (common practice: a repr is a summary, not the data)."""
    text = repr(run)
    assert len(text) < 300 and "Test-1 b" in text and "boundary-layer" in text
    assert len(repr(run.history)) < 300


def test_to_xarray_groups_with_units(run):
    """Result.to_xarray(): an xarray DataTree with the history on model time [yr] and every variable's units
    (xarray is the oracle: its DataTree holds the named dimensions)."""
    from meltzone.constants import YEAR

    tree = run.to_xarray()
    hist = tree["history"].to_dataset()
    assert hist["temperature"].dims == ("time", "mantle_node") and hist["time"].attrs["units"] == "yr"
    np.testing.assert_allclose(hist["time"].values * YEAR, run.time, rtol=1e-15)
    assert all("units" in hist[v].attrs for v in hist.data_vars)
    assert set(tree.children) >= {"history", "layers", "events", "structure", "flags"}
    assert tree["events"].to_dataset().sizes["event"] == len(run.tracked()[1])


def test_compare_shows_rates_per_year_as_rates_and_times_as_times():
    """`meltzone compare` formats ``..._yr`` keys as durations but the melt-production rates (``..._km3_yr``,
    km^3 per year) as numbers (a user trial found 17,415 km^3/yr printed as "17.4 kyr")."""
    from meltzone.report import _cell, _difference, is_duration

    assert not is_duration("peak_melt_production_km3_yr") and is_duration("volcanism_active_yr")
    assert _cell("peak_melt_production_km3_yr", 17415.0) == "1.742e+04"
    assert "yr" not in _difference("final_melt_production_km3_yr", -16900.0)
    assert _cell("magma_ocean_end_yr", 1200.0).endswith("kyr")
