"""`meltzone curves` and the flags of `meltzone interior --json`, through click's CliRunner."""

import json

import pytest
from click.testing import CliRunner

from meltzone import melting
from meltzone.cli import main

GPA = 1e9
LIST_KEYS = {"id", "min_pressure_pa", "max_pressure_pa", "validated_max_pressure_pa", "citation"}


def run(*args):
    return CliRunner().invoke(main, list(args))


def assert_user_error(res, word):
    """A user's mistake: exit code 2, one clear line, no traceback."""
    assert res.exit_code == 2, res.output
    assert word in res.output and "Traceback" not in res.output
    assert isinstance(res.exception, SystemExit)


def test_curves_lists_models():
    res = run("curves")
    assert res.exit_code == 0, res.output
    for mid in melting.list_models():
        assert mid in res.output
    assert "Hirschmann 2000" in res.output and "Monteux" in res.output


def test_curves_list_json():
    res = run("curves", "--json")
    assert res.exit_code == 0, res.output
    rows = json.loads(res.stdout)
    assert [r["id"] for r in rows] == melting.list_models()
    for r in rows:
        assert set(r) == LIST_KEYS
    default = {r["id"]: r for r in rows}["whole-mantle-sg"]
    assert default["max_pressure_pa"] >= 3e12 and default["validated_max_pressure_pa"] == pytest.approx(140 * GPA)


def test_curves_values_json():
    """Monteux et al. 2016 (from memory): 4161 / 4764 K at 136 GPa (tol 2 K); values equal the Python API;
    pressures above the 140 GPa experiments are flagged extrapolated."""
    res = run("curves", "whole-mantle-sg", "--pressure-gpa", "0,25,136,500", "--json")
    assert res.exit_code == 0, res.output
    data = json.loads(res.stdout)
    assert data["model"] == "whole-mantle-sg"
    assert data["pressure_pa"] == [0.0, 25 * GPA, 136 * GPA, 500 * GPA]
    assert data["solidus_k"][2] == pytest.approx(4161.0, abs=2.0)
    assert data["liquidus_k"][2] == pytest.approx(4764.0, abs=2.0)
    model = melting.get_model("whole-mantle-sg")
    assert data["solidus_k"] == pytest.approx(list(model.solidus(data["pressure_pa"])), rel=1e-15)
    assert data["extrapolated"] == [False, False, False, True]


def test_curves_table_text():
    """Hirschmann 2000 (checked): 1930.7 K at 5 GPa appears in the table output."""
    res = run("curves", "peridotite-lowp", "--pressure-gpa", "5")
    assert res.exit_code == 0, res.output
    assert "1930.7" in res.output and "model estimate" in res.output.lower()


def test_curves_user_table(tmp_path):
    path = tmp_path / "invented.csv"
    path.write_text("pressure_gpa,solidus_k,liquidus_k\n0,1500,2000\n100,3500,4500\n")
    res = run("curves", "table", "--table-file", str(path), "--pressure-gpa", "50", "--json")
    assert res.exit_code == 0, res.output
    data = json.loads(res.stdout)
    assert data["solidus_k"] == [pytest.approx(2500.0)] and data["liquidus_k"] == [pytest.approx(3250.0)]
    bad = tmp_path / "bad.csv"
    bad.write_text("pressure_gpa,solidus_k,liquidus_k\n0,1500,2000\n")
    assert_user_error(run("curves", "table", "--table-file", str(bad)), "bad.csv")


@pytest.mark.parametrize("args,word", [
    (["curves", "peridotite-lowp", "--pressure-gpa", "0,12"], "outside the range"),
    (["curves", "whole-mantle-sg", "--pressure-gpa", "6000"], "outside the range"),
    (["curves", "whole-mantle-sg", "--pressure-gpa", "1,x"], "--pressure-gpa"),
    (["curves", "basalt"], "unknown melting model"),
    (["curves", "table"], "needs a table file"),
    (["curves", "--pressure-gpa", "1"], "give a MODEL"),
])
def test_curves_user_errors(args, word):
    assert_user_error(run(*args), word)


@pytest.mark.parametrize("suffix,magic", [(".png", b"\x89PNG"), (".pdf", b"%PDF"), (".svg", b"<?xml")])
def test_curves_plot_each_format(tmp_path, suffix, magic):
    path = tmp_path / f"curves{suffix}"
    res = run("curves", "super-earth", "--plot", str(path))
    assert res.exit_code == 0, res.output
    assert path.stat().st_size > 1000 and path.read_bytes().startswith(magic)


def test_curves_plot_bad_suffix_and_model(tmp_path):
    assert_user_error(run("curves", "whole-mantle-sg", "--plot", str(tmp_path / "curves.jpg")), ".png")
    assert not (tmp_path / "curves.jpg").exists()
    assert_user_error(run("curves", "basalt", "--plot", str(tmp_path / "curves.png")), "unknown melting model")


def test_plot_curves_function(tmp_path):
    """plot.plot_curves writes the file and refuses a plot range beyond the model's."""
    from meltzone.errors import MeltzoneError
    from meltzone.plot import plot_curves

    out = plot_curves(melting.get_model("peridotite-lowp"), tmp_path / "lowp.png")
    assert out.stat().st_size > 1000
    with pytest.raises(MeltzoneError, match="at most 10 GPa"):
        plot_curves(melting.get_model("peridotite-lowp"), tmp_path / "x.png", max_pressure_pa=20 * GPA)


def test_interior_json_has_flags_for_ten_earth_masses():
    """A 10 Earth-mass planet (CMB ~1.4 TPa; derived from this interior model, see test_interior) reaches predicted phases (post-perovskite
    dissociation ~0.9 TPa, Umemoto & Wentzcovitch 2011) and melting beyond the experiments."""
    res = run("interior", "--mass", "10", "--json")
    assert res.exit_code == 0, res.output
    data = json.loads(res.stdout)
    assert isinstance(data["flags"], list) and data["flags"]
    kinds = {z["kind"] for z in data["flags"]}
    assert kinds & {"predicted-phase", "extrapolated-melting"}
    for z in data["flags"]:
        assert {"kind", "what", "top_depth_m", "bottom_depth_m", "top_pressure_pa", "bottom_pressure_pa",
                "source", "confidence"} <= set(z)


def test_interior_json_flags_for_earth():
    """An Earth-mass planet (CMB ~136 GPa, PREM) has no predicted phase with the default melting model."""
    res = run("interior", "--mass", "1", "--json")
    assert res.exit_code == 0, res.output
    kinds = {z["kind"] for z in json.loads(res.stdout)["flags"]}
    assert "predicted-phase" not in kinds
