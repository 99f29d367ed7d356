"""Figure hygiene of every meltzone figure, built from small runs (64 mantle nodes), and the comparison of runs.

Figure hygiene is common practice (texts that do not cover each other or the data, every axis labelled with
its unit, small features made visible); it is measured with matplotlib's renderer: the window boxes of the
drawn texts (``Text.get_window_extent``) and of the axes (:func:`meltzone.figstyle.overlap_report`).
Tolerances: no two texts overlap at all (0); texts and legends inside a data area cover at most 5% of it; no
text leaves the figure. A layer is "thin" below 5% of the mantle depth (this model's choice,
:data:`meltzone.plot.THIN_LAYER_FRACTION`).

The comparison table must hold exactly each run's own ``meltzone summary --json`` values (exact equality).
"""

import json
import re

import numpy as np
import pytest
from click.testing import CliRunner

import meltzone
from meltzone import plot, results
from meltzone.cli import main
from meltzone.figstyle import LINE_COLOURS, OKABE_ITO, overlap_report
from meltzone.melting import get_model
from meltzone.plot_compare import build_compare

MAX_TEXT_ON_DATA = 0.05
UNIT = re.compile(r"\[[^\]]+\]")
NUMBER = re.compile(r"\d")


@pytest.fixture(scope="module")
def runs(tmp_path_factory):
    """Small runs written to files: a bare 1 M_E planet (a thin basal layer), the same with the super-Earth
    melting model and with the mixing-length scheme, a 3 M_E planet with a grey atmosphere, and a 100-yr run
    (one whole-mantle magma ocean, no thin layer)."""
    folder = tmp_path_factory.mktemp("figures")
    made = {
        "bare": meltzone.evolve(None, mass_earth=1.0, end_time_gyr=0.05, mantle_nodes=64, name="Fig-1 b (invented)"),
        "super": meltzone.evolve({"planet": {"mass_earth": 1.0, "name": "Fig-1 b (invented)"},
                                  "melting": {"model": "super-earth"}, "interior": {"mantle_nodes": 64},
                                  "run": {"end_time_gyr": 0.05}}),
        "steam": meltzone.evolve(None, mass_earth=3.0, end_time_gyr=0.05, mantle_nodes=64, atmosphere="grey",
                                 water_inventory_kg=1e21, co2_inventory_kg=1e20, name="Fig-2 c (invented)"),
        "young": meltzone.evolve(None, mass_earth=1.0, end_time_gyr=1e-7, mantle_nodes=64, name="Fig-3 (invented)"),
        "resolved": meltzone.evolve({"planet": {"mass_earth": 1.0, "name": "Fig-1 b (invented)"},
                                     "convection": {"scheme": "mixing-length"}, "interior": {"mantle_nodes": 64},
                                     "run": {"end_time_gyr": 0.05}}),
    }
    paths = {k: results.write(r, folder / f"{k}.h5") for k, r in made.items()}
    return made, paths


def _check_hygiene(fig):
    """Overlap within the tolerances of the module docstring; every axis that shows numeric tick labels has a
    label with a unit in brackets (the "t = 0" tick is a value, the time axis label carries [yr]); an axis of
    categories (the flag kinds) has a label."""
    rep = overlap_report(fig)
    assert rep["text_text"] == 0.0, rep["pairs"]
    assert rep["text_data"] <= MAX_TEXT_ON_DATA, rep
    assert rep["outside"] < 1e-6, rep
    fig.canvas.draw()
    for ax in fig.axes:
        if ax.get_label() == "<colorbar>":
            assert UNIT.search(ax.get_ylabel() or ax.get_xlabel()), ax
            continue
        for axis, label in ((ax.xaxis, ax.get_xlabel()), (ax.yaxis, ax.get_ylabel())):
            shown = [t.get_text() for t in axis.get_ticklabels() if t.get_visible() and t.get_text()]
            if not shown:
                continue
            if any(NUMBER.search(t) for t in shown):
                assert UNIT.search(label), (ax.get_label(), label)
            else:
                assert label.strip(), ax
    return rep


def _zooms(fig):
    return sorted(ax.get_label() for ax in fig.axes if ax.get_label().startswith("zoom-"))


@pytest.mark.parametrize("name", ["bare", "steam", "young"])
def test_run_figures_overlap_and_units(runs, name):
    for build in plot.BUILDERS.values():
        _check_hygiene(build(runs[0][name]))


@pytest.mark.parametrize("build", [plot.build_profiles, plot.build_meltmap])
def test_pressure_axis_reads_the_interiors_pressure_at_each_depth(runs, build):
    """Each tick of the right-hand pressure axis sits, on the screen, at the depth where the run's own interior has
    that pressure (1% of the mantle's pressure range; the structure is the oracle). It failed on the profiles'
    square-root depth scale, where a secondary axis placed 150 GPa at ~420 km instead of ~1,400 km."""
    r = runs[0]["super"]
    it = r.interior
    depth = (it.radius - it.r[it.mantle])[::-1] / 1e3
    p = it.P[it.mantle][::-1] / 1e9
    fig = build(r)
    fig.canvas.draw()
    twins = [ax for ax in fig.axes if ax.get_ylabel() == "pressure [GPa]"]
    assert len(twins) == 1
    sec = twins[0]
    host = next(ax for ax in fig.axes if ax is not sec and ax.bbox.bounds == sec.bbox.bounds)
    ticks = [(pos, float(t.get_text())) for pos, t in zip(sec.get_yticks(), sec.get_yticklabels()) if t.get_text()]
    assert len(ticks) >= 3
    for zoom in (None, (500.0, 0.0)):  # as built, then zoomed on the host (the twin must follow)
        if zoom is not None:
            fig.set_layout_engine("none")  # keep the built layout (labels of the far depths now lie outside)
            host.set_ylim(*zoom)
            fig.canvas.draw()
        for pos, pressure in ticks:
            y_screen = sec.transData.transform((0.0, pos))[1]
            d = host.transData.inverted().transform((0.0, y_screen))[1]  # the depth the host axis shows there
            assert np.interp(d, depth, p) == pytest.approx(pressure, abs=0.01 * p[-1])


def test_thin_basal_layer_gets_a_zoom_panel_and_a_labelled_minimum_width(runs):
    """The basal layer of the bare run is < 1% of the mantle: a zoom panel above the CMB in the melt map and
    the profiles, and its true thickness written on the melt map."""
    r = runs[0]["bare"]
    thin = plot.thin_layers(r)
    assert [t["where"] for t in thin] == ["cmb"]
    for build in (plot.build_meltmap, plot.build_profiles):
        assert _zooms(build(r)) == ["zoom-cmb"]
    fig = plot.build_meltmap(r)
    km = f"{thin[0]['thickness_m'] / 1e3:.3g} km thick"
    assert any(km in t.get_text() for ax in fig.axes for t in ax.texts)


def test_no_zoom_panel_without_a_thin_layer(runs):
    r = runs[0]["young"]
    assert plot.thin_layers(r) == []
    for build in (plot.build_meltmap, plot.build_profiles):
        assert _zooms(build(r)) == []


def test_thin_surface_layer_gets_a_surface_zoom(runs):
    """Synthetic layer table: a 15 km layer at 20-35 km depth added to the bare run (invented data)."""
    r = runs[0]["bare"]
    table, events = r.tracked()
    fake = results.Result(r.spec, r.interior, r.melting_model, r.history, r.wall_time_s)
    rows = table["time"] > 0
    extra = {k: np.concatenate([v, v[rows][:3]]) for k, v in table.items()}
    extra["layer"][-3:] = 99
    extra["top_depth"][-3:], extra["bottom_depth"][-3:] = 20e3, 35e3
    fake._cache["tracked"] = (extra, events)
    win = plot.zoom_windows(fake)
    assert win["surface"] is not None and win["surface"][1] >= 35.0
    assert _zooms(plot.build_meltmap(fake)) == ["zoom-cmb", "zoom-surface"]


def test_events_at_t0_sit_on_a_t0_tick(runs):
    """The run starts molten: 'formed' is at t = 0; the time axis has a tick labelled 't = 0' left of the first
    step, and the marker is drawn there."""
    r = runs[0]["bare"]
    assert any(e["kind"] == "formed" and e["time"] == 0.0 for e in r.tracked()[1])
    fig = plot.build_meltmap(r)
    fig.canvas.draw()
    main_ax = next(ax for ax in fig.axes if ax.get_ylabel() == "depth [km]")
    bottom = [ax for ax in fig.axes if ax.get_xlabel().startswith("model time")][0]
    labels = {t.get_text(): t.get_position()[0] for t in bottom.xaxis.get_ticklabels() if t.get_text()}
    assert "t = 0" in labels
    x0 = labels["t = 0"]
    assert x0 < plot._first_time(r) / meltzone.constants.YEAR
    assert any(np.isclose(line.get_xdata()[0], x0) for line in main_ax.get_lines()
               if line.get_marker() == "^")


def test_profiles_at_events_without_duplicates(runs):
    """Default profiles include the magma-ocean end; no two drawn profiles coincide within SAME_PROFILE_K."""
    r = runs[0]["bare"]
    chosen = plot.profile_times(r)
    assert any("magma-ocean end" in label for _, label in chosen)
    temps = [r.profile_at_time(t)[0] for t, _ in chosen]
    for i in range(len(temps)):
        for j in range(i):
            assert np.max(np.abs(temps[i] - temps[j])) >= plot.SAME_PROFILE_K


def test_history_has_an_atmosphere_panel_only_with_an_atmosphere(runs):
    def labels(fig):
        return [ax.get_ylabel() for ax in fig.axes]

    assert "atmosphere [kg]" in labels(plot.build_history(runs[0]["steam"]))
    assert "atmosphere [kg]" not in labels(plot.build_history(runs[0]["bare"]))


def test_palette_has_no_yellow_lines(runs):
    """Okabe & Ito (2008): yellow is too faint for lines on white; none of the run figures uses it."""
    assert OKABE_ITO["yellow"] not in LINE_COLOURS
    from matplotlib.colors import to_hex

    for build in plot.BUILDERS.values():
        fig = build(runs[0]["steam"])
        colours = {to_hex(line.get_color()) for ax in fig.axes for line in ax.get_lines()}
        assert OKABE_ITO["yellow"].lower() not in colours


@pytest.mark.parametrize("model", ["super-earth", "katz2003"])
def test_curves_measured_range_readable_and_labelled(model):
    """Broken pressure axis: the linear panel of the validated range takes at least half of the plotting width;
    curves solid inside the validated range and dashed beyond; every boundary drawn has a legend entry."""
    m = get_model(model)
    fig = plot.build_curves(m)
    _check_hygiene(fig)
    data_axes = [ax for ax in fig.axes if ax.get_lines()]
    legend_labels = [t.get_text() for t in fig.legends[0].get_texts()]
    from meltzone.constants import GPA

    if m.max_pressure_pa > 1.6 * m.validated_max_pressure_pa:
        assert len(data_axes) == 2
        widths = [ax.get_window_extent().width for ax in data_axes]
        assert widths[0] / sum(widths) >= 0.5
        assert data_axes[0].get_xlim()[1] <= 1.2 * m.validated_max_pressure_pa / GPA
        assert "dashed: extrapolated" in legend_labels
    for ax in data_axes:
        for line in ax.get_lines():
            x = np.asarray(line.get_xdata(), dtype=float)
            if line.get_color() in (OKABE_ITO["blue"], OKABE_ITO["vermillion"]) and len(x) > 2:
                beyond = x.min() >= m.validated_max_pressure_pa / GPA * (1 - 1e-3)
                inside = x.max() <= m.validated_max_pressure_pa / GPA * (1 + 1e-9)
                assert (line.get_linestyle() == "-") == inside or beyond and line.get_linestyle() != "-"
            elif line.get_linestyle() in ("--", ":"):
                assert any(lbl.startswith(("olivine", "wadsleyite", "ringwoodite", "bridgmanite", "post-perovskite",
                                           "MgSi2O5")) for lbl in legend_labels)


# ---------------------------------------------------------------- compare
def _summary_json(path):
    res = CliRunner().invoke(main, ["summary", str(path), "--json"])
    assert res.exit_code == 0, res.output
    return json.loads(res.output)


@pytest.mark.parametrize("pair", [("bare", "super"), ("bare", "resolved"), ("bare", "steam")])
def test_compare_table_equals_each_runs_summary(runs, pair, tmp_path):
    """Two melting models of one planet, the two schemes on one planet, and two planets (one with an
    atmosphere): the table's values are the
    runs' own ``summary --json`` values, the differences are against the first run, the figure is written."""
    paths = [str(runs[1][k]) for k in pair]
    out = tmp_path / "cmp.png"
    res = CliRunner().invoke(main, ["compare", *paths, "--json", "-o", str(out)])
    assert res.exit_code == 0, res.output
    data = json.loads(res.stdout)
    assert out.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    table = {row["key"]: row for row in data["table"]}
    for i, p in enumerate(paths):
        own = _summary_json(p)
        assert data["runs"][i]["summary"] == own
        for key, value in own.items():
            if key == "basal_layer":
                for sub in ("layer", "start_yr", "end_yr", "max_thickness_m"):
                    assert table[f"basal_layer.{sub}"]["values"][i] == (None if value is None else value[sub])
            elif key in ("events", "flags"):
                assert table[f"n_{key}"]["values"][i] == len(value)
            elif key != "planet":
                assert table[key]["values"][i] == value, key
    row = table["final_upper_temperature_k"]
    assert row["difference"][1] == row["values"][1] - row["values"][0]
    text = CliRunner().invoke(main, ["compare", *paths])
    assert text.exit_code == 0 and "final_upper_temperature_k" in text.output and "[2]" in text.output


def test_compare_figure_hygiene(runs):
    made, paths = runs
    keys = ["bare", "steam", "super"]
    _check_hygiene(build_compare([made[k] for k in keys], [paths[k] for k in keys], n_times=60))


# ---------------------------------------------------------------- bad input: one line, exit 2
def one_line_error(res, *words):
    assert res.exit_code == 2, res.output
    assert "Traceback" not in res.output
    lines = res.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error:"), res.stderr
    for w in words:
        assert w in lines[0], (w, lines[0])


@pytest.fixture(scope="module")
def sweep_file(tmp_path_factory):
    from meltzone.sweep import run_sweep

    folder = tmp_path_factory.mktemp("fig-sweep")
    spec = folder / "spec.toml"
    spec.write_text("[sweep]\nmode = 'grid'\n[base.interior]\nmantle_nodes = 64\n[base.run]\nend_time_gyr = 0.05\n"
                    "[parameters.'planet.mass_earth']\nvalues = [1.0, 2.0]\n"
                    "[parameters.'planet.core_mass_fraction']\nvalues = [0.3]\n")
    out = folder / "grid.h5"
    run_sweep(spec, out, executor="serial", progress=False)
    return out


def test_sweep_figures_take_any_outcome_and_inputs(sweep_file, tmp_path):
    for args in (["--figure", "probability", "--outcome", "basal_layer_persists"],
                 ["--figure", "probability", "--outcome", "melt_persists", "--x", "core_mass_fraction",
                  "--y", "mass_earth"],
                 ["--figure", "lifetime", "--outcome", "final_upper_temperature_k", "--x", "mass_earth",
                  "--y", "core_mass_fraction"]):
        out = tmp_path / f"{args[1]}-{args[3]}.png"
        res = CliRunner().invoke(main, ["plot", str(sweep_file), *args, "-o", str(out)])
        assert res.exit_code == 0, res.output
        assert out.stat().st_size > 5000


@pytest.mark.parametrize("figure,outcome", [("probability", "basal_layer_formed"),
                                            ("lifetime", "magma_ocean_end_yr")])
def test_sweep_figure_hygiene(sweep_file, figure, outcome):
    from meltzone.sweep.plot import build_sweep_figure

    _check_hygiene(build_sweep_figure(sweep_file, figure, outcome=outcome))


@pytest.mark.parametrize("args,words", [
    (["--figure", "probability", "--outcome", "no_such_flag"], ["no_such_flag", "basal_layer_formed"]),
    (["--figure", "lifetime", "--outcome", "basal_layer_formed"], ["basal_layer_formed", "magma_ocean_end_yr"]),
    (["--figure", "lifetime", "--x", "colour"], ["colour", "mass_earth"]),
    (["--figure", "probability", "--y", "radius"], ["radius", "core_mass_fraction"]),
])
def test_sweep_figure_bad_key_names_it_and_the_valid_ones(sweep_file, tmp_path, args, words):
    res = CliRunner().invoke(main, ["plot", str(sweep_file), *args, "-o", str(tmp_path / "x.png")])
    one_line_error(res, *words)
    assert not (tmp_path / "x.png").exists()


def test_compare_refuses_a_sweep_a_foreign_file_and_a_single_run(runs, sweep_file, tmp_path):
    run_path = str(runs[1]["bare"])
    one_line_error(CliRunner().invoke(main, ["compare", run_path, str(sweep_file)]), str(sweep_file), "sweep")
    foreign = tmp_path / "foreign.h5"
    import h5py

    with h5py.File(foreign, "w") as f:
        f.create_dataset("x", data=[1.0])
    one_line_error(CliRunner().invoke(main, ["compare", run_path, str(foreign)]), str(foreign))
    one_line_error(CliRunner().invoke(main, ["compare", run_path]), "two or more")
    one_line_error(CliRunner().invoke(main, ["compare", run_path, run_path, "-o", str(tmp_path / "c.jpg")]), ".png")
    one_line_error(CliRunner().invoke(main, ["plot", run_path, "--outcome", "melt_persists"]), "--outcome",
                   "sweep")
