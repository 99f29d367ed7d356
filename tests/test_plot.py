"""Figures of a run (meltmap, profiles, history): each is built from a small run, fresh or loaded from its file,
and written in the format its suffix names.

Formats are checked against their specifications, outside matplotlib: the PNG signature and IHDR chunk
(PNG specification, ISO/IEC 15948 sections 5.2 and 11.2.2), the PDF header "%PDF-" (ISO 32000-1 section
7.5.2), and SVG as XML whose root is the SVG namespace's <svg> element (parsed by the standard library).
"""

import struct
import xml.etree.ElementTree as ET

import pytest

import meltzone
from meltzone import plot, results
from meltzone.errors import MeltzoneError

PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"


@pytest.fixture(scope="module")
def run():
    return meltzone.evolve(None, mass_earth=1.0, end_time_gyr=0.5, mantle_nodes=64, name="Test-3 b (invented)")


@pytest.fixture(scope="module")
def stagnant():
    return meltzone.evolve(None, mass_earth=2.0, end_time_gyr=1.0, mantle_nodes=64, regime="stagnant-lid",
                           name="Test-4 b (invented)")


@pytest.fixture(scope="module")
def loaded(run, tmp_path_factory):
    return meltzone.load(results.write(run, tmp_path_factory.mktemp("plot") / "run.h5"))


def _png_size(data: bytes):
    """(width, height) from the IHDR chunk, which follows the 8-byte signature (length, type, then data)."""
    assert data[:8] == PNG_SIGNATURE
    length, kind = struct.unpack(">I4s", data[8:16])
    assert kind == b"IHDR" and length == 13
    return struct.unpack(">II", data[16:24])


@pytest.mark.parametrize("figure", plot.RUN_FIGURES)
def test_png_from_a_fresh_run(run, tmp_path, figure):
    path = getattr(plot, figure)(run, tmp_path / f"{figure}.png")
    width, height = _png_size(path.read_bytes())
    assert width >= 600 and height >= 400  # readable at the default size


@pytest.mark.parametrize("figure", plot.RUN_FIGURES)
def test_pdf_and_svg_from_a_loaded_run(loaded, tmp_path, figure):
    pdf = plot.plot_run(loaded, figure, tmp_path / f"{figure}.pdf")
    assert pdf.read_bytes().startswith(b"%PDF-") and pdf.stat().st_size > 1000
    svg = plot.plot_run(loaded, figure, tmp_path / f"{figure}.svg")
    root = ET.parse(svg).getroot()
    assert root.tag == "{http://www.w3.org/2000/svg}svg"
    assert "model estimate" in svg.read_text()  # the note is on the figure (SVG keeps text as text here)


def test_stagnant_lid_figures(stagnant, tmp_path):
    for figure in plot.RUN_FIGURES:
        path = plot.plot_run(stagnant, figure, tmp_path / f"{figure}.png")
        assert path.read_bytes()[:8] == PNG_SIGNATURE


@pytest.mark.parametrize("regime", ["mobile-lid", "stagnant-lid"])
def test_mixing_length_figures(tmp_path, regime):
    """Every run figure of the mixing-length scheme, whose history lacks some of the boundary-layer scheme's series
    (the lid base's temperature; the crust and the outgassing under a stagnant lid), from its file."""
    r = meltzone.evolve({"planet": {"mass_earth": 1.0, "name": "Test-5 b (invented)"}, "run": {"end_time_gyr": 0.5},
                         "interior": {"mantle_nodes": 32},
                         "convection": {"scheme": "mixing-length", "regime": regime}})
    loaded = meltzone.load(results.write(r, tmp_path / "mlt.h5"))
    for figure in plot.RUN_FIGURES:
        path = plot.plot_run(loaded, figure, tmp_path / f"{figure}.png")
        assert path.read_bytes()[:8] == PNG_SIGNATURE


def test_profiles_at_chosen_times(run, tmp_path):
    path = plot.profiles(run, tmp_path / "p.png", times_yr=[0.0, 1e4, 1e8])
    assert path.read_bytes()[:8] == PNG_SIGNATURE
    with pytest.raises(MeltzoneError, match="within the run"):
        plot.profiles(run, tmp_path / "q.png", times_yr=[1e12])
    assert not (tmp_path / "q.png").exists()


def test_bad_suffix_and_unknown_figure(run, tmp_path):
    with pytest.raises(MeltzoneError, match=".png"):
        plot.meltmap(run, tmp_path / "m.jpg")
    with pytest.raises(MeltzoneError, match="unknown figure"):
        plot.plot_run(run, "spaghetti", tmp_path / "m.png")
    assert list(tmp_path.iterdir()) == []


@pytest.mark.parametrize("years,text", [(250.0, "250 yr"), (3200.0, "3.2 kyr"), (4.5e7, "45 Myr"),
                                        (4.5e9, "4.5 Gyr"), (0.0, "0 yr")])
def test_format_years(years, text):
    assert plot.format_years(years) == text
