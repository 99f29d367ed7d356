"""`meltzone run`, `summary`, `layers` and `plot` through click's CliRunner, and the README demo command.

Checks: the report's sections, the file it writes (read back by xarray, outside meltzone), the JSON summary's
keys and JSON types (parsed by the standard library, NaN refused), one-line errors with exit code 2 and no
traceback for a user's mistakes, no progress bar in non-terminal output.
"""

import io
import json
import os
import shutil
import subprocess
import sys

import h5py
import numpy as np
import pytest
import xarray as xr
from click.testing import CliRunner

import meltzone
from meltzone import cli
from meltzone.cli import main

TINY = """\
# a tiny invented planet for the tests
[planet]
name = "Test-2 b (invented)"
mass_earth = 1.0

[interior]
mantle_nodes = 64

[run]
end_time_gyr = 0.5
"""


def _strict_json(text):
    def refuse(const):
        raise ValueError(f"non-standard JSON constant {const}")

    return json.loads(text, parse_constant=refuse)


@pytest.fixture(scope="module")
def ran(tmp_path_factory):
    """(config path, results path, CliRunner result) of one tiny run."""
    folder = tmp_path_factory.mktemp("cli")
    config = folder / "tiny.toml"
    config.write_text(TINY)
    out = folder / "tiny-run.h5"
    res = CliRunner().invoke(main, ["run", str(config), "-o", str(out)])
    return config, out, res


def test_run_writes_the_file_and_prints_the_report(ran):
    _, out, res = ran
    assert res.exit_code == 0, res.output
    for words in ("Test-2 b (invented)", "CMB pressure", "magma ocean", "melt layers", "events", "flagged zones",
                  "energy closure", f"wrote {out}", "model estimates"):
        assert words in res.output, words
    assert "\r" not in res.output and "model time " not in res.output  # no progress bar outside a terminal
    with xr.open_dataset(out, engine="h5netcdf", group="history") as ds:
        assert ds.sizes["time"] > 10
    with xr.open_dataset(out, engine="h5netcdf") as root:
        assert root.attrs["meltzone_kind"] == "run"


def test_run_reports_the_layers_in_the_file(ran):
    """Every layer id of the file's layer table (read by xarray) appears in `meltzone layers`."""
    _, out, _ = ran
    res = CliRunner().invoke(main, ["layers", str(out)])
    assert res.exit_code == 0, res.output
    with xr.open_dataset(out, engine="h5netcdf", group="layers") as ds:
        ids = np.unique(ds["layer"].values)
    with xr.open_dataset(out, engine="h5netcdf", group="events") as ds:
        kinds = set(ds["kind"].values.tolist())
    assert f"melt layers ({len(ids)})" in res.output
    table = res.output.split("events (")[0]
    for lid in ids:
        assert any(line.split()[:1] == [str(lid)] for line in table.splitlines()), lid
    for kind in kinds:
        assert kind in res.output


def test_run_default_output_name_and_set(tmp_path, monkeypatch):
    config = tmp_path / "little.toml"
    config.write_text(TINY)
    monkeypatch.chdir(tmp_path)
    res = CliRunner().invoke(main, ["run", str(config), "--set", "run.end_time_gyr=0.25", "--json"])
    assert res.exit_code == 0, res.output
    assert os.path.exists("little.h5")
    data = _strict_json(res.output)
    assert data["file"] == "little.h5"
    assert data["end_time_yr"] == pytest.approx(0.25e9)
    assert meltzone.load("little.h5").spec.run.end_time_gyr == 0.25


SUMMARY_TYPES = {
    "magma_ocean_end_yr": (float, type(None)), "last_melt_yr": (float, type(None)),
    "basal_layer": (dict, type(None)), "final_upper_temperature_k": float, "final_surface_heat_flow_w": float,
    "final_cmb_heat_flow_w": float, "inner_core_radius_m": float, "n_layers": int, "energy_closure": float,
    "events": list,
}


def test_summary_json_keys_and_types(ran):
    _, out, _ = ran
    res = CliRunner().invoke(main, ["summary", str(out), "--json"])
    assert res.exit_code == 0, res.output
    data = _strict_json(res.output)
    for key, kind in SUMMARY_TYPES.items():
        assert isinstance(data[key], kind), key
    assert not isinstance(data["n_layers"], bool)
    if data["basal_layer"] is not None:
        b = data["basal_layer"]
        assert isinstance(b["start_yr"], float) and isinstance(b["max_thickness_m"], float)
        assert b["end_yr"] is None or isinstance(b["end_yr"], float)
    assert data["events"], "a molten start has events"
    for e in data["events"]:
        assert isinstance(e["time_yr"], (float, int)) and isinstance(e["kind"], str)
        assert isinstance(e["layer"], int)
        assert e["depth_m"] is None or isinstance(e["depth_m"], float)
        assert e["pressure_pa"] is None or isinstance(e["pressure_pa"], float)
    # the events match the file's event group, read by xarray: the same model times, in years in both
    with xr.open_dataset(out, engine="h5netcdf", group="events") as ds:
        assert ds["time"].attrs["units"] == "yr"
        np.testing.assert_allclose([e["time_yr"] for e in data["events"]], ds["time"].values, rtol=1e-14)
    res = CliRunner().invoke(main, ["summary", str(out)])
    assert res.exit_code == 0 and "magma ocean" in res.output and "model estimates" in res.output


@pytest.mark.parametrize("figure,suffix,magic", [("meltmap", ".png", b"\x89PNG\r\n\x1a\n"),
                                                 ("profiles", ".pdf", b"%PDF-"), ("history", ".svg", b"<?xml")])
def test_plot_command(ran, tmp_path, figure, suffix, magic):
    _, out, _ = ran
    fig = tmp_path / f"fig{suffix}"
    res = CliRunner().invoke(main, ["plot", str(out), "--figure", figure, "-o", str(fig)])
    assert res.exit_code == 0, res.output
    assert fig.read_bytes().startswith(magic)


def _error_line(res):
    assert res.exit_code == 2, res.output
    assert "Traceback" not in res.output and not isinstance(res.exception, (ValueError, OSError, KeyError))
    errors = [line for line in res.output.splitlines() if line.startswith("error:")]
    assert len(errors) == 1
    return errors[0]


def test_user_mistakes_exit_2_with_one_line(ran, tmp_path):
    config, out, _ = ran
    bad_toml = tmp_path / "bad.toml"
    bad_toml.write_text("[planet\nmass_earth = 1\n")
    unknown = tmp_path / "unknown.toml"
    unknown.write_text("[planet]\nmass_earth = 1\nwobble = 3\n")
    text = tmp_path / "text.h5"
    text.write_text("hello\n")
    foreign = tmp_path / "foreign.h5"
    with h5py.File(foreign, "w") as f:
        f["data"] = np.arange(4)
    cases = [
        (["run", str(bad_toml)], "not valid TOML"),
        (["run", str(unknown)], "planet.wobble"),
        (["run", str(tmp_path / "absent.toml")], "cannot read"),
        (["run", str(config), "--set", "planet.colour=red"], "unknown key"),
        (["run", str(config), "--set", "planet.mass_earth=heavy"], "mass_earth"),
        (["run", str(config), "--set", "run.end_time_gyr=-1"], "end_time_gyr"),
        (["run", str(config), "-o", str(tmp_path / "no" / "x.h5")], "does not exist"),
        (["summary", str(text)], "not a readable HDF5"),
        (["summary", str(foreign)], "not a meltzone file"),
        (["layers", str(foreign)], "not a meltzone file"),
        (["layers", str(tmp_path / "absent.h5")], "no such file"),
        (["plot", str(text)], "not a readable HDF5"),
        (["plot", str(out), "-o", str(tmp_path / "fig.gif")], ".png"),
        (["plot", str(out), "--figure", "spaghetti", "-o", str(tmp_path / "f.png")], "spaghetti"),
    ]
    for args, words in cases:
        line = _error_line(CliRunner().invoke(main, args))
        assert words in line, (args, line)
    assert not (tmp_path / "fig.gif").exists()


def test_sweep_files_go_to_the_sweep_module(ran, tmp_path, monkeypatch):
    """A file with meltzone_kind = "sweep" is handed to meltzone.report.print_sweep_summary and
    meltzone.sweep.plot_sweep."""
    import meltzone.report
    import meltzone.sweep

    sweep = tmp_path / "sweep.h5"
    with h5py.File(sweep, "w") as f:
        f.attrs["meltzone_kind"] = "sweep"
    calls = []
    monkeypatch.setattr(meltzone.report, "print_sweep_summary",
                        lambda path, as_json: calls.append(("summary", str(path), as_json)))
    monkeypatch.setattr(meltzone.sweep, "plot_sweep",
                        lambda path, figure, out: calls.append(("plot", str(path), figure, str(out))))
    assert CliRunner().invoke(main, ["summary", str(sweep), "--json"]).exit_code == 0
    fig = tmp_path / "s.png"
    assert CliRunner().invoke(main, ["plot", str(sweep), "--figure", "scatter", "-o", str(fig)]).exit_code == 0
    assert calls == [("summary", str(sweep), True), ("plot", str(sweep), "scatter", str(fig))]
    _error_line(CliRunner().invoke(main, ["layers", str(sweep)]))


class _Terminal(io.StringIO):
    def isatty(self):
        return True


def test_progress_bar_only_on_a_terminal(monkeypatch):
    from meltzone.constants import GYR

    monkeypatch.setattr(sys, "stderr", io.StringIO())
    callback, finish = cli._progress_callback(1.0 * GYR, min_wall_s=0.0)
    assert callback is None
    tty = _Terminal()
    monkeypatch.setattr(sys, "stderr", tty)
    callback, finish = cli._progress_callback(1.0 * GYR, min_wall_s=0.0)
    callback(1e-3 * GYR)
    callback(1.0 * GYR)
    finish()
    shown = tty.getvalue()
    assert shown.count("\r") == 2 and "1 Gyr of 1 Gyr" in shown and "#" * 30 in shown and shown.endswith("\n")
    # log scale: 1 Myr of 1 Gyr fills about log10(1e6)/log10(1e9) = 2/3 of the bar
    first = shown.split("\r")[1]
    assert first.count("#") == 20


def test_help_lists_the_commands():
    res = CliRunner().invoke(main, ["--help"])
    for command in ("run", "summary", "layers", "plot"):
        assert command in res.output


def test_readme_demo_command(tmp_path):
    """README quick start: `meltzone run` with no arguments writes meltzone-demo.h5 for the invented demo planet."""
    exe = shutil.which("meltzone")
    command = [exe, "run"] if exe else [sys.executable, "-m", "meltzone.cli", "run"]
    proc = subprocess.run(command, cwd=tmp_path, capture_output=True, text=True, timeout=600)
    assert proc.returncode == 0, proc.stderr
    assert "model estimates" in proc.stdout and "wrote meltzone-demo.h5" in proc.stdout
    assert proc.stderr.strip() == ""  # no progress bar, no warnings when stderr is not a terminal
    result = meltzone.load(tmp_path / "meltzone-demo.h5")
    assert "invented" in result.spec.planet.name
    assert result.spec == meltzone.PlanetSpec.from_toml(cli.demo_config_path())


def test_run_coreless_planet_and_string_override(tmp_path, monkeypatch):
    """A coreless planet runs from the CLI (no traceback), and a string key takes --set text as written."""
    monkeypatch.chdir(tmp_path)
    res = CliRunner().invoke(main, ["run", "--set", "planet.core_mass_fraction=0", "--set", "planet.name=123",
                                    "--set", "run.end_time_gyr=0.05", "-o", "coreless.h5"])
    assert res.exit_code == 0, res.output
    assert "123" in res.output and os.path.exists("coreless.h5")


def test_run_refuses_an_unwritable_output_folder_before_running(tmp_path, monkeypatch):
    """The output folder is checked before the evolution starts (exit 2, one line)."""
    monkeypatch.setattr(os, "access", lambda p, m: False if m == os.W_OK else True)
    res = CliRunner().invoke(main, ["run", "-o", str(tmp_path / "out.h5")])
    assert res.exit_code == 2 and "not writable" in res.output and "Traceback" not in res.output


def test_empty_output_path_and_blank_planet_name_are_mistakes(tmp_path, monkeypatch):
    """An empty -o is a mistake, not a request for the default file (which it used to overwrite silently), and a
    blank planet name would leave the reports' planet line empty: both exit 2 naming the option or key (user
    trial; common practice of this project)."""
    monkeypatch.chdir(tmp_path)
    line = _error_line(CliRunner().invoke(main, ["run", "-o", ""]))
    assert "--output" in line and "empty" in line
    assert not (tmp_path / "meltzone-demo.h5").exists()
    line = _error_line(CliRunner().invoke(main, ["run", "--set", "planet.name=", "-o", str(tmp_path / "x.h5")]))
    assert "planet.name" in line and "empty" in line
