"""Sweep files and their folder: what a sweep refuses to overwrite, where it cannot write, damaged or edited
files, stale temporaries of a killed writer, time units that xarray keeps as numbers, and the basal-layer
flag. Every user mistake is one line naming the file or folder, exit code 2 at the command line.

Tiny planets throughout (64 mantle nodes, 0.05 Gyr)."""

import os
import shutil
import subprocess
import sys
from pathlib import Path

import h5py
import numpy as np
import pytest
from click.testing import CliRunner

from meltzone.cli import main
from meltzone.errors import ResultsFileError
from meltzone.sweep import FLAGS, METRICS, progress_path, read_sweep, run_sweep, summary_dict
from meltzone.sweep.worker import outcomes

SPEC_TEXT = ("[sweep]\nmode = 'grid'\n[base.interior]\nmantle_nodes = 64\n[base.run]\nend_time_gyr = 0.05\n"
             "[parameters.'planet.mass_earth']\nvalues = [1.0, 2.0]\n")


@pytest.fixture(scope="module")
def sweep_file(tmp_path_factory):
    folder = tmp_path_factory.mktemp("sweep-file")
    spec = folder / "spec.toml"
    spec.write_text(SPEC_TEXT)
    out = folder / "two.h5"
    run_sweep(spec, out, executor="serial", progress=False)
    return out


@pytest.fixture
def spec_path(tmp_path):
    p = tmp_path / "spec.toml"
    p.write_text(SPEC_TEXT)
    return p


def one_line_error(result, *words):
    """The CLI's answer to a user mistake: exit 2, no traceback, and the words on one line."""
    assert result.exit_code == 2, result.output
    assert "Traceback" not in result.output
    assert len(result.stderr.strip().splitlines()) == 1, result.stderr
    line = [ln for ln in result.stderr.splitlines() if ln.startswith("error:")]
    assert len(line) == 1, result.output
    for w in words:
        assert w in line[0], (w, line[0])
    return line[0]


# ---------------------------------------------------------------- outputs a sweep must not overwrite
@pytest.mark.parametrize("resume", [False, True])
@pytest.mark.parametrize("kind,made_by", [
    ("a meltzone run file", lambda f: f.attrs.__setitem__("meltzone_kind", "run")),
    ("an HDF5 file that is not a meltzone file", lambda f: f.create_dataset("x", data=[1.0])),
])
def test_existing_run_or_foreign_file_is_refused_and_kept(tmp_path, spec_path, resume, kind, made_by):
    """`sweep [--resume] -o FILE` where FILE is a single-run file or a foreign HDF5 file: one line naming the
    file and its kind, exit 2, the file unchanged, no checkpoint folder left."""
    out = tmp_path / "run.h5"
    with h5py.File(out, "w") as f:
        made_by(f)
    before = out.read_bytes()
    args = ["sweep", str(spec_path), "-o", str(out), "--workers", "1"] + (["--resume"] if resume else [])
    one_line_error(CliRunner().invoke(main, args), str(out), kind)
    assert out.read_bytes() == before
    assert not progress_path(out).exists()


def test_existing_file_that_is_not_hdf5_is_refused(tmp_path, spec_path):
    out = tmp_path / "notes.h5"
    out.write_text("my notes")
    one_line_error(CliRunner().invoke(main, ["sweep", str(spec_path), "-o", str(out)]), str(out),
                   "not an HDF5 file")
    assert out.read_text() == "my notes"


# ---------------------------------------------------------------- a folder the sweep cannot write
def test_read_only_output_folder_is_one_line(tmp_path, spec_path):
    """chmod 0o555 on the output folder: one line naming the checkpoint folder, exit 2 (skipped where the
    user can write there anyway, e.g. as root)."""
    folder = tmp_path / "ro"
    folder.mkdir()
    folder.chmod(0o555)
    try:
        if os.access(folder, os.W_OK):
            pytest.skip("this user can write into a 0o555 folder (root): the permission error cannot happen")
        res = CliRunner().invoke(main, ["sweep", str(spec_path), "-o", str(folder / "out.h5"), "--workers", "1"])
        one_line_error(res, str(progress_path(folder / "out.h5")))
    finally:
        folder.chmod(0o755)


def test_permission_error_creating_the_checkpoint_is_one_line(tmp_path, spec_path, monkeypatch):
    """The same refusal where the test runs as root: the folder creation raises PermissionError (as the
    operating system does in a folder without write permission)."""
    real_mkdir = Path.mkdir

    def mkdir(self, *args, **kwargs):
        if self.name.endswith(".progress"):
            raise PermissionError(13, "Permission denied", str(self))
        return real_mkdir(self, *args, **kwargs)

    monkeypatch.setattr(Path, "mkdir", mkdir)
    out = tmp_path / "out.h5"
    line = one_line_error(CliRunner().invoke(main, ["sweep", str(spec_path), "-o", str(out), "--workers", "1"]),
                          str(progress_path(out)))
    assert "Permission denied" in line
    assert not out.exists()


# ---------------------------------------------------------------- damaged or edited sweep files
@pytest.mark.parametrize("group", ["cases", "events"])
def test_sweep_file_without_a_group_is_one_line(sweep_file, tmp_path, group):
    """A sweep file whose group was deleted with h5py: `summary` and `plot` name the file and the group."""
    damaged = tmp_path / "damaged.h5"
    shutil.copy(sweep_file, damaged)
    with h5py.File(damaged, "a") as f:
        del f[group]
    one_line_error(CliRunner().invoke(main, ["summary", str(damaged)]), str(damaged), repr(group))
    one_line_error(CliRunner().invoke(main, ["plot", str(damaged), "--figure", "lifetime", "-o",
                                             str(tmp_path / "f.png")]), str(damaged), repr(group))
    with pytest.raises(ResultsFileError, match=repr(group)):
        read_sweep(damaged)


@pytest.mark.parametrize("attr,value", [
    ("meltzone_kind", np.array(["sweep"], dtype=h5py.string_dtype())),
    ("sweep_schema_version", np.array([2, 2])),
])
def test_array_valued_root_attribute_is_one_line(sweep_file, tmp_path, attr, value):
    """meltzone_kind or the schema version written as an array (np.array([...]) with h5py): a one-line error
    naming the file, not numpy's "truth value of an array is ambiguous"."""
    edited = tmp_path / "edited.h5"
    shutil.copy(sweep_file, edited)
    with h5py.File(edited, "a") as f:
        f.attrs[attr] = value
    with pytest.raises(ResultsFileError, match="single"):
        read_sweep(edited)
    line = one_line_error(CliRunner().invoke(main, ["summary", str(edited)]), str(edited))
    assert "ambiguous" not in line


# ---------------------------------------------------------------- temporaries of a killed writer
def test_stale_temporaries_of_a_dead_writer_are_removed(tmp_path, spec_path):
    """`kill -9` while writing leaves `.OUT.h5.PID.*.part`; the next write of OUT.h5 removes those whose
    process is gone and leaves a live process's temporary (and other outputs' temporaries) alone."""
    dead = subprocess.Popen([sys.executable, "-c", "pass"])
    dead.wait()  # its pid names no process now
    out = tmp_path / "out.h5"
    stale = tmp_path / f".out.h5.{dead.pid}.x1y2.part"
    live = tmp_path / f".out.h5.{os.getpid()}.a3b4.part"
    other = tmp_path / f".other.h5.{dead.pid}.c5d6.part"
    for p in (stale, live, other):
        p.write_bytes(b"half a file")
    run_sweep(spec_path, out, executor="serial", progress=False)
    assert not stale.exists()
    assert live.exists() and other.exists()
    assert read_sweep(out)["attrs"]["n_cases"] == 2
    assert not list(tmp_path.glob(f".out.h5.{os.getpid()}.*.part"))[1:]  # only the planted one is left


# ---------------------------------------------------------------- time units
def test_model_times_are_years_and_xarray_keeps_numbers(sweep_file):
    """Every model-time variable has units "yr" (CF time units such as "years" or "seconds" make xarray
    decode timedeltas, which overflow at geological times); opened with xarray's h5netcdf engine, even
    when timedelta decoding is asked for, they stay float64 (common practice: CF conventions)."""
    xr = pytest.importorskip("xarray")
    time_like = {"years", "year", "seconds", "days", "hours", "minutes"}
    with h5py.File(sweep_file, "r") as f:
        units = {f"{g}/{k}": ds.attrs["units"] for g in ("cases", "events") for k, ds in f[g].items()}
    model_times = [k for k in units if k.endswith("_yr")]
    assert "events/time_yr" in model_times and "cases/magma_ocean_end_yr" in model_times
    assert all(units[k] == "yr" for k in model_times), {k: units[k] for k in model_times}
    assert not time_like & set(units.values())
    for group in ("cases", "events"):
        for decode in (None, True):
            with xr.open_dataset(sweep_file, engine="h5netcdf", group=group, decode_timedelta=decode) as ds:
                for name in ds.variables:
                    if f"{group}/{name}" in model_times:
                        assert ds[name].dtype == np.float64, (group, name, decode)
                    if decode is None:
                        assert ds[name].dtype.kind not in "mM", (group, name)


# ---------------------------------------------------------------- basal-layer flag
def _summary(basal):
    """The keys of a run summary that the sweep outcomes read (invented values)."""
    return {"magma_ocean_end_yr": 1.0e5, "magma_ocean_reformed_yr": None, "last_melt_yr": None,
            "basal_layer": basal, "final_upper_temperature_k": 1800.0, "final_surface_heat_flow_w": 1e14,
            "final_cmb_heat_flow_w": 1e13, "inner_core_radius_m": 0.0, "n_layers": 2, "max_melt_depth_m": 1e6,
            "max_melt_pressure_pa": 5e10, "energy_closure": 1e-10, "end_time_yr": 5e7, "radius_m": 6.4e6,
            "events": [], "magma_ocean_at_end": False}


def test_basal_layer_formed_follows_the_run_summary(sweep_file):
    """basal_layer_formed is 1 exactly when the run summary's basal_layer is not None (and the basal metrics
    come from that entry); the file's long_name says so."""
    metrics, flags = outcomes(_summary(None))
    assert flags["basal_layer_formed"] == 0 and flags["basal_layer_persists"] == 0
    assert np.isnan(metrics["basal_layer_start_yr"]) and np.isnan(metrics["basal_layer_thickness_m"])
    basal = {"start_yr": 2.0e5, "end_yr": None, "max_thickness_m": 3.0e4}
    metrics, flags = outcomes(_summary(basal))
    assert flags["basal_layer_formed"] == 1 and flags["basal_layer_persists"] == 1
    assert metrics["basal_layer_start_yr"] == 2.0e5 and metrics["basal_layer_thickness_m"] == 3.0e4
    assert "basal_layer is not null" in FLAGS["basal_layer_formed"]
    with h5py.File(sweep_file, "r") as f:
        assert f["cases/basal_layer_formed"].attrs["long_name"] == FLAGS["basal_layer_formed"]
    assert set(METRICS) <= set(summary_dict(sweep_file)["metrics"])


# ---------------------------------------------------------------- the package's public face
def test_import_is_light_and_the_public_names_stay():
    """`import meltzone.sweep` loads neither numba nor scipy, h5py or matplotlib (they come with the first
    case, file or figure); the public names of the former module are still there, and
    meltzone.sweep.infer_core_fraction is the interior's function."""
    code = ("import sys, meltzone.sweep as s; print(sorted(m for m in ('numba', 'scipy', 'h5py', 'matplotlib') "
            "if m in sys.modules))")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert done.stdout.strip() == "[]"
    import meltzone
    import meltzone.interior
    import meltzone.sweep as sweep

    assert sweep.infer_core_fraction is meltzone.interior.infer_core_fraction
    assert meltzone.run_sweep is sweep.run_sweep
    for name in ("load_spec", "read_sweep", "summary_dict", "plot_sweep", "binomial_estimate",
                 "progress_path", "EXAMPLE_SPEC", "SweepIncomplete", "SweepSpec"):
        assert name in sweep.__all__ and getattr(sweep, name) is not None, name
