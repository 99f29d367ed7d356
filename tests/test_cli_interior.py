"""`meltzone interior` through click's CliRunner: table, JSON keys in SI, bad input -> exit 2, no traceback."""

import json

import pytest
from click.testing import CliRunner

from meltzone.cli import main

REQUIRED = ["radius_m", "core_radius_m", "surface_gravity_m_s2", "cmb_pressure_pa", "center_pressure_pa",
            "mean_density_kg_m3", "moment_of_inertia_factor", "layers"]


def test_interior_table():
    res = CliRunner().invoke(main, ["interior", "--mass", "4", "--core-fraction", "0.3"])
    assert res.exit_code == 0, res.output
    assert "CMB pressure" in res.output and "GPa" in res.output and "R_E" in res.output
    assert "bridgmanite" in res.output


def test_interior_json_keys_and_units():
    """The JSON is in SI: an Earth-mass planet has a radius of ~6.4e6 m (PREM 6.371e6 m)."""
    res = CliRunner().invoke(main, ["interior", "--mass", "1", "--json"])
    assert res.exit_code == 0, res.output
    data = json.loads(res.output)
    for key in REQUIRED:
        assert key in data
    assert data["radius_m"] == pytest.approx(6.371e6, rel=0.015)
    layer = data["layers"][0]
    assert set(layer) >= {"phase", "top_depth_m", "bottom_depth_m", "top_pressure_pa", "bottom_pressure_pa"}
    assert layer["top_depth_m"] == 0.0


@pytest.mark.parametrize("args,word", [
    (["--mass", "-1"], "mass_earth"),
    (["--mass", "0"], "mass_earth"),
    (["--mass", "nan"], "finite"),
    (["--core-fraction", "1.2"], "core_mass_fraction"),
    (["--set", "planet.colour=red"], "unknown key"),
    (["--set", "interior.mantle_nodes=many"], "mantle_nodes"),
    (["/nonexistent/planet.toml"], "cannot read"),
])
def test_interior_bad_input(args, word):
    res = CliRunner().invoke(main, ["interior", *args])
    assert res.exit_code == 2
    assert word in res.output
    assert "Traceback" not in res.output


def test_bad_toml_file(tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text("[planet\nmass_earth = 1\n")
    res = CliRunner().invoke(main, ["interior", str(bad)])
    assert res.exit_code == 2 and "not valid TOML" in res.output
    unknown = tmp_path / "unknown.toml"
    unknown.write_text("[planet]\nmass_earth = 1\nwobble = 2\n")
    res = CliRunner().invoke(main, ["interior", str(unknown)])
    assert res.exit_code == 2 and "planet.wobble" in res.output
