"""Command line: a thin click group. Each command parses, calls the API and prints.

A user's mistake (a :class:`meltzone.errors.MeltzoneError`) reaches the
terminal as one line and exit code 2, never a traceback.
"""

from __future__ import annotations

import functools
import json
import os
import sys
import warnings

import click

from . import __version__


def _user_errors(func):
    """Turn MeltzoneError into click's usage error (one line, exit code 2)."""

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        from .errors import MeltzoneError

        try:
            return func(*args, **kwargs)
        except MeltzoneError as exc:
            raise click.UsageError(str(exc)) from None

    return wrapper


def _show_warnings():
    """Our own warnings (UserWarning: a mass outside the calibrated range, ...) as one line on stderr;
    library deprecation notices keep Python's default handling (hidden outside development)."""
    default = warnings.showwarning

    def show(message, category, filename, lineno, file=None, line=None):
        if issubclass(category, DeprecationWarning):
            return default(message, category, filename, lineno, file, line)
        click.echo(f"warning: {message}", err=True)

    warnings.showwarning = show


def _echo_json(obj) -> None:
    click.echo(json.dumps(obj, indent=2, allow_nan=False))


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="meltzone")
def main():
    """meltzone: where and when the mantles of rocky planets melt (model estimates, not measurements)."""
    _show_warnings()


# ---------------------------------------------------------------- interior
def _planet_options(func):
    func = click.option("--set", "overrides", multiple=True, metavar="SECTION.KEY=VALUE",
                        help="Override one config key (repeatable), e.g. --set interior.mantle_nodes=512.")(func)
    func = click.option("--core-fraction", type=float, default=None,
                        help="Core mass fraction [0, 1).")(func)
    func = click.option("--mass", type=float, default=None, help="Planet mass [Earth masses].")(func)
    func = click.argument("config", required=False, type=click.Path(dir_okay=False))(func)
    return func


def _spec_from_options(config, mass, core_fraction, overrides):
    from .config import PlanetSpec

    extra = list(overrides)
    if mass is not None:
        extra.append(f"planet.mass_earth={mass!r}")
    if core_fraction is not None:
        extra.append(f"planet.core_mass_fraction={core_fraction!r}")
    if config:
        return PlanetSpec.from_toml(config, extra)
    return PlanetSpec.from_mapping({}, extra)


def _interior_report(interior, spec) -> str:
    from .constants import EARTH_MASS, EARTH_RADIUS, GPA

    it = interior
    lines = [
        f"planet            {spec.planet.name}: {it.mass / EARTH_MASS:.4g} M_E, core mass fraction "
        f"{it.core_mass / it.mass:.4g}",
        f"radius            {it.radius / 1e3:,.1f} km ({it.radius / EARTH_RADIUS:.4f} R_E)",
        f"core radius       {it.core_radius / 1e3:,.1f} km ({it.core_radius / it.radius:.3f} of the radius)",
        f"surface gravity   {it.surface_gravity:.3f} m/s^2",
        f"mean density      {it.mean_density:,.0f} kg/m^3",
        f"CMB pressure      {it.cmb_pressure / GPA:,.1f} GPa",
        f"centre pressure   {it.center_pressure / GPA:,.1f} GPa",
        f"moment of inertia {it.moment_of_inertia_factor:.4f} (C / M R^2)",
        "",
        f"{'mantle phase':<18}{'depth [km]':>22}{'pressure [GPa]':>22}",
    ]
    for layer in it.phase_layers():
        lines.append(f"{layer['phase']:<18}{layer['top_depth_m'] / 1e3:>10,.0f} - {layer['bottom_depth_m'] / 1e3:>9,.0f}"
                     f"{layer['top_pressure_pa'] / GPA:>10,.1f} - {layer['bottom_pressure_pa'] / GPA:>9,.1f}")
    lines.append("")
    lines.append("Model estimate from equations of state, not a measurement.")
    return "\n".join(lines)


@main.command()
@_planet_options
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object in SI units.")
@_user_errors
def interior(config, mass, core_fraction, overrides, as_json):
    """Solve and print the interior structure of a planet."""
    from .interior import build_interior

    spec = _spec_from_options(config, mass, core_fraction, overrides)
    it = build_interior(spec)
    if as_json:
        _echo_json(interior_json(it, spec))
    else:
        click.echo(_interior_report(it, spec))


def interior_json(it, spec) -> dict:
    """The JSON object printed by ``meltzone interior --json``."""
    from . import phases
    from .melting import get_model

    out = it.summary_dict()
    mantle = it.mantle
    model = get_model(spec.melting.model, spec.melting.table_file or None)
    out["flags"] = phases.flags(it.radius - it.r[mantle], it.P[mantle], it.T_ref[mantle], model)
    return out


# ---------------------------------------------------------------- curves
#: Pressures [GPa] printed by ``meltzone curves MODEL`` without --pressure-gpa (those inside the range).
_DEFAULT_CURVE_PRESSURES_GPA = (0.0, 5.0, 10.0, 25.0, 50.0, 100.0, 136.0, 250.0, 500.0, 1000.0, 2000.0, 3000.0,
                                5000.0)


def _parse_pressures_gpa(text: str) -> list[float]:
    import math

    try:
        values = [float(v) for v in text.split(",") if v.strip()]
    except ValueError:
        raise click.BadParameter(f"{text!r} is not a comma-separated list of numbers", param_hint="--pressure-gpa")
    if not values or not all(math.isfinite(v) for v in values):
        raise click.BadParameter(f"{text!r}: give one or more finite pressures in GPa", param_hint="--pressure-gpa")
    return values


@main.command()
@click.argument("model", required=False)
@click.option("--pressure-gpa", default=None, metavar="P1,P2,...",
              help="Pressures [GPa] at which to print the solidus and liquidus, e.g. 0,25,136,500.")
@click.option("--table-file", type=click.Path(dir_okay=False), default=None,
              help="CSV table for MODEL 'table' (header pressure_gpa or pressure_pa, solidus_k, liquidus_k).")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              help="Draw the P-T diagram to this file (.png, .pdf or .svg).")
@click.option("--max-pressure-gpa", type=float, default=None, help="Upper pressure of the plot [GPa].")
@click.option("--json", "as_json", is_flag=True, help="Print JSON in SI units.")
@_user_errors
def curves(model, pressure_gpa, table_file, plot_path, max_pressure_gpa, as_json):
    """List the mantle melting models, or print / plot the solidus and liquidus of MODEL."""
    from .constants import GPA
    from .melting import TABLE_MODEL_ID, get_model, list_models

    if model is None:
        if pressure_gpa or plot_path:
            raise click.UsageError("give a MODEL to print or plot (see `meltzone curves` for the ids)")
        rows = []
        for mid in list_models():
            if mid == TABLE_MODEL_ID and not table_file:
                rows.append({"id": mid, "min_pressure_pa": None, "max_pressure_pa": None,
                             "validated_max_pressure_pa": None, "citation": "user CSV table (--table-file)"})
            else:
                rows.append(get_model(mid, table_file).describe())
        if as_json:
            _echo_json(rows)
            return
        click.echo(f"{'id':<17}{'range [GPa]':>14}{'validated to':>14}  citation")
        for r in rows:
            rng, val = "from file", "-"
            if r["max_pressure_pa"] is not None:
                rng = f"{r['min_pressure_pa'] / GPA:g}-{r['max_pressure_pa'] / GPA:g}"
                val = f"{r['validated_max_pressure_pa'] / GPA:g}"
            click.echo(f"{r['id']:<17}{rng:>14}{val:>14}  {r['citation']}")
        return

    melting_model = get_model(model, table_file)
    if plot_path:
        from .plot import plot_curves

        plot_curves(melting_model, plot_path,
                    max_pressure_pa=None if max_pressure_gpa is None else max_pressure_gpa * GPA)
        click.echo(f"wrote {plot_path}", err=as_json)
        if not pressure_gpa:
            return
    if pressure_gpa:
        p_gpa = _parse_pressures_gpa(pressure_gpa)
    else:
        lo, hi = melting_model.min_pressure_pa / GPA, melting_model.max_pressure_pa / GPA
        p_gpa = sorted({lo, hi, *(p for p in _DEFAULT_CURVE_PRESSURES_GPA if lo <= p <= hi)})
    p_pa = [p * GPA for p in p_gpa]
    sol = melting_model.solidus(p_pa)
    liq = melting_model.liquidus(p_pa)
    extrapolated = melting_model.extrapolated(p_pa)
    if as_json:
        _echo_json({"model": melting_model.id, "pressure_pa": p_pa, "solidus_k": [float(t) for t in sol],
                    "liquidus_k": [float(t) for t in liq], "extrapolated": [bool(e) for e in extrapolated]})
        return
    click.echo(f"model     {melting_model.id}\ncitation  {melting_model.citation}\n"
               f"range     {melting_model.min_pressure_pa / GPA:g}-{melting_model.max_pressure_pa / GPA:g} GPa, "
               f"validated to {melting_model.validated_max_pressure_pa / GPA:g} GPa (* = extrapolated)\n")
    click.echo(f"{'P [GPa]':>10}{'solidus [K]':>14}{'liquidus [K]':>14}")
    for p, s, t, e in zip(p_gpa, sol, liq, extrapolated):
        click.echo(f"{p:>10g}{s:>14.1f}{t:>14.1f}{' *' if e else ''}")
    click.echo("\nModel estimate from published fits, not a measurement.")


def demo_config_path():
    """Path of the built-in demo planet's TOML (an invented planet)."""
    from importlib.resources import files

    return files("meltzone") / "data" / "demo.toml"


# ---------------------------------------------------------------- run, summary, layers, plot
def _announce_compilation() -> None:
    """One line on stderr when the numba kernels are not in the cache yet (the first run compiles them)."""
    from ._core._jit import CACHE_DIR, is_cached

    if not is_cached("meltzone._core.loop", "integrate"):
        click.echo(f"meltzone: first run: compiling the numba kernels (about 15 s, once; they are cached in "
                   f"{CACHE_DIR})", err=True)


def _progress_callback(end_time_s: float, min_wall_s: float = 1.0):
    """A progress callback for :func:`meltzone.evolve` that draws a one-line bar of the model time
    reached (log scale) on stderr, only when stderr is a terminal and the run has lasted ``min_wall_s``.
    Returns (callback or None, finish)."""
    import math
    import time

    if not sys.stderr.isatty():
        return None, lambda: None
    from .constants import YEAR
    from .plot import format_years

    start = time.perf_counter()
    shown = [False]
    end_yr = end_time_s / YEAR

    def callback(t_s: float) -> None:
        if time.perf_counter() - start < min_wall_s:
            return
        frac = min(math.log10(1.0 + t_s / YEAR) / math.log10(1.0 + end_yr), 1.0) if end_yr > 0 else 1.0
        bar = "#" * int(round(30 * frac))
        click.echo(f"\r  model time {format_years(t_s / YEAR):>10} of {format_years(end_yr)} [{bar:<30}]",
                   err=True, nl=False)
        shown[0] = True

    def finish() -> None:
        if shown[0]:
            click.echo("", err=True)

    return callback, finish


def _km(m) -> str:
    return "-" if m is None or m != m else f"{m / 1e3:,.0f}"


def _gpa(pa) -> str:
    from .constants import GPA

    return "-" if pa is None or pa != pa else f"{pa / GPA:,.1f}"


def _layer_spans(result) -> list[dict]:
    """One entry per layer id: first and last time [s] (formed / froze or merged event when there is one),
    whether it is still molten at the end, shallowest and deepest depth [m], largest melt fraction."""
    import numpy as np

    table, events = result.tracked()
    t_end = result.time[-1]
    spans = []
    for lid in dict.fromkeys(int(x) for x in table["layer"]):
        rows = table["layer"] == lid
        start = [e["time"] for e in events if e["layer"] == lid and e["kind"] == "formed"]
        stop = [e["time"] for e in events if e["layer"] == lid and e["kind"] in ("froze", "merged")]
        alive = bool(table["time"][rows][-1] == t_end) and not stop
        first = start[0] if start else float(table["time"][rows][0])
        last = stop[0] if stop else float(table["time"][rows][-1])
        spans.append({"layer": lid, "first_s": first, "last_s": last, "alive": alive,
                      "top_depth_m": float(np.min(table["top_depth"][rows])),
                      "bottom_depth_m": float(np.max(table["bottom_depth"][rows])),
                      "max_melt_fraction": float(np.max(table["max_melt_fraction"][rows]))})
    return spans


def _layer_lines(result) -> list[str]:
    from .constants import YEAR
    from .plot import format_years

    spans = _layer_spans(result)
    lines = [f"melt layers ({len(spans)})",
             f"  {'id':>3}  {'first':>10}  {'last':>10}  {'lifetime':>10}  {'depth [km]':>17}  {'max melt':>8}"]
    for s in spans:
        last = "end of run" if s["alive"] else format_years(s["last_s"] / YEAR)
        life = format_years((s["last_s"] - s["first_s"]) / YEAR) + ("+" if s["alive"] else "")
        lines.append(f"  {s['layer']:>3}  {format_years(s['first_s'] / YEAR):>10}  {last:>10}  {life:>10}  "
                     f"{_km(s['top_depth_m']):>7} - {_km(s['bottom_depth_m']):>7}  {s['max_melt_fraction']:>8.2f}")
    if not spans:
        lines.append("  (no melt at any step)")
    return lines


def _event_lines(events) -> list[str]:
    from .constants import YEAR
    from .plot import format_years

    lines = [f"events ({len(events)})",
             f"  {'time':>10}  {'kind':<21}{'layer':>5}  {'depth [km]':>10}  {'P [GPa]':>8}"]
    for e in events:
        layer = str(e["layer"]) if e["layer"] >= 0 else "-"
        lines.append(f"  {format_years(e['time'] / YEAR):>10}  {e['kind']:<21}{layer:>5}  {_km(e['depth']):>10}  "
                     f"{_gpa(e['pressure']):>8}")
    return lines


def _flag_lines(zones) -> list[str]:
    lines = [f"flagged zones ({len(zones)}): depths resting on theory or extrapolated laws",
             f"  {'kind':<21}{'confidence':<11}{'depth [km]':>17}  {'P [GPa]':>17}  what"]
    for z in zones:
        lines.append(f"  {z['kind']:<21}{z['confidence']:<11}{_km(z['top_depth_m']):>7} - {_km(z['bottom_depth_m']):>7}"
                     f"  {_gpa(z['top_pressure_pa']):>7} - {_gpa(z['bottom_pressure_pa']):>7}  {z['what']}")
    if not zones:
        lines.append("  (none)")
    return lines


def _head_lines(result, s: dict) -> list[str]:
    from .constants import EARTH_MASS, EARTH_RADIUS, YEAR
    from .plot import format_years

    it = result.interior
    spec = result.spec
    mo = s["magma_ocean_end_yr"]
    if mo is None:
        mo_text = "still present at the end of the run"
    elif mo == 0.0:
        mo_text = "none (the run starts below the rheological transition)"
    else:
        mo_text = f"ends after {format_years(mo)}"
    if s.get("magma_ocean_reformed_yr") is not None:
        again = "forms" if mo == 0.0 else "forms again"
        mo_text += (f"; {again} at {format_years(s['magma_ocean_reformed_yr'])} (the mantle warmed past the "
                    "rheological transition)" + (" and is present at the end" if s["magma_ocean_at_end"] else ""))
    last = s["last_melt_yr"]
    last_text = "melt remains at the end of the run" if last is None else f"last melt froze at {format_years(last)}"
    b = s["basal_layer"]
    if b is None:
        basal = "none"
    else:
        until = "outlives the run" if b["end_yr"] is None else f"until {format_years(b['end_yr'])}"
        thick = (f"up to {b['max_thickness_m'] / 1e3:,.3g} km thick" if b["max_thickness_m"] > 0.0
                 else "one grid node thick")
        basal = f"layer {b['layer']} from {format_years(b['start_yr'])}, {until}, {thick}"
    return [
        f"planet            {spec.planet.name}: {it.mass / EARTH_MASS:.4g} M_E, core mass fraction "
        f"{it.core_mass / it.mass:.3g}",
        f"interior          radius {it.radius / 1e3:,.0f} km ({it.radius / EARTH_RADIUS:.3f} R_E), CMB pressure "
        f"{_gpa(it.cmb_pressure)} GPa, core radius {it.core_radius / 1e3:,.0f} km",
        f"evolution         {format_years(result.time[-1] / YEAR)} in {result.n_steps} steps "
        f"({result.wall_time_s:.2g} s), {spec.convection.regime}, melting model {result.melting_model}",
        f"magma ocean       {mo_text}",
        f"partial melt      {last_text}; deepest melt {_km(s['max_melt_depth_m'])} km "
        f"({_gpa(s['max_melt_pressure_pa'])} GPa)",
        f"basal melt layer  {basal}",
        f"at the end        T_u {s['final_upper_temperature_k']:,.0f} K, surface heat flow "
        f"{s['final_surface_heat_flow_w'] / 1e12:,.3g} TW, CMB heat flow {s['final_cmb_heat_flow_w'] / 1e12:,.3g} TW, "
        f"inner core {s['inner_core_radius_m'] / 1e3:,.0f} km",
        f"energy closure    {s['energy_closure']:.2e} (relative error of the energy budget)",
    ]


def _note_lines(zones) -> list[str]:
    from .results import MODEL_NOTE

    parts = []
    for kind in dict.fromkeys(z["kind"] for z in zones):
        if kind == "predicted-transition":
            continue
        zs = [z for z in zones if z["kind"] == kind]
        top = min(zs, key=lambda z: z["top_depth_m"])
        parts.append(f"{kind} below {_km(top['top_depth_m'])} km (> {_gpa(top['top_pressure_pa'])} GPa)")
    text = MODEL_NOTE
    if parts:
        text += " Extrapolated or predicted: " + "; ".join(parts) + "."
    return [text]


def _json_safe(obj):
    """NaN and infinities -> None, so that the JSON output stays standard."""
    import math

    if isinstance(obj, float):
        return obj if math.isfinite(obj) else None
    if isinstance(obj, dict):
        return {k: _json_safe(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_json_safe(v) for v in obj]
    return obj


@main.command()
@click.argument("config_file", required=False, type=click.Path(dir_okay=False))
@click.option("--set", "overrides", multiple=True, metavar="SECTION.KEY=VALUE",
              help="Override one config key (repeatable), e.g. --set run.end_time_gyr=2.")
@click.option("-o", "--output", type=click.Path(dir_okay=False), default=None,
              help="Results file (HDF5). Default: <config stem>.h5, or meltzone-demo.h5 for the demo planet.")
@click.option("--json", "as_json", is_flag=True, help="Print the run's summary as JSON (SI, times in years).")
@_user_errors
def run(config_file, overrides, output, as_json):
    """Evolve a planet, find its melt layers and write the results file.

    CONFIG_FILE is a TOML planet configuration (see `meltzone config --example`); without it the
    built-in demo planet (an invented one) is run.
    """
    from pathlib import Path

    from .config import PlanetSpec
    from .constants import GYR
    from .pipeline import evolve
    from .results import write

    spec = PlanetSpec.from_toml(config_file or str(demo_config_path()), list(overrides))
    out = Path(output) if output else Path(f"{Path(config_file).stem}.h5" if config_file else "meltzone-demo.h5")
    if not out.parent.resolve().is_dir():
        raise click.BadParameter(f"folder {str(out.parent)!r} does not exist", param_hint="--output")
    if not os.access(out.parent.resolve(), os.W_OK):
        raise click.BadParameter(f"folder {str(out.parent)!r} is not writable", param_hint="--output")
    _announce_compilation()
    callback, finish = _progress_callback(spec.run.end_time_gyr * GYR)
    try:
        result = evolve(spec, progress=callback)
    finally:
        finish()
    write(result, out)
    summary = result.summary()
    if as_json:
        _echo_json(_json_safe({**summary, "file": str(out)}))
        return
    zones = result.flags()
    lines = [*_head_lines(result, summary), "", *_layer_lines(result), "", *_event_lines(result.tracked()[1]), "",
             *_flag_lines(zones), "", f"wrote {out}", *_note_lines(zones)]
    click.echo("\n".join(lines))


@main.command("summary")
@click.argument("path", type=click.Path(dir_okay=False))
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object (SI, times in years).")
@_user_errors
def summary_command(path, as_json):
    """Summarize a results file (a run, or a sweep)."""
    from . import results

    if results.file_kind(path) == "sweep":
        _sweep_module("print_summary").print_summary(path, as_json)
        return
    result = results.load(path)
    summary = result.summary()
    if as_json:
        _echo_json(_json_safe(summary))
    else:
        click.echo("\n".join([*_head_lines(result, summary), "", *_note_lines(result.flags())]))


@main.command("layers")
@click.argument("path", type=click.Path(dir_okay=False))
@_user_errors
def layers_command(path):
    """Print the melt-layer table and the event table of a run file."""
    from . import results

    result = results.load(path)
    click.echo("\n".join([*_layer_lines(result), "", *_event_lines(result.tracked()[1]), "",
                          *_note_lines(result.flags())]))


def _sweep_module(name: str):
    import importlib

    try:
        sweep = importlib.import_module("meltzone.sweep")
    except ImportError as exc:
        raise click.UsageError(f"this file is a sweep, but meltzone.sweep cannot be imported ({exc})") from None
    if not hasattr(sweep, name):
        raise click.UsageError(f"this file is a sweep, but meltzone.sweep has no {name}()")
    return sweep


@main.command("plot")
@click.argument("path", type=click.Path(dir_okay=False))
@click.option("--figure", default="meltmap", show_default=True, metavar="NAME",
              help="Run files: meltmap (melt fraction against time and depth), profiles (temperature profiles) or "
                   "history (time series). Sweep files: see the sweep documentation.")
@click.option("-o", "--output", type=click.Path(dir_okay=False), default=None,
              help="Figure file, .png, .pdf or .svg by its suffix. Default: <FILE stem>-<figure>.png.")
@_user_errors
def plot_command(path, figure, output):
    """Draw a figure from a results file."""
    from pathlib import Path

    from . import results
    from .plot import RUN_FIGURES, _figure_format, plot_run

    out = Path(output) if output else Path(f"{Path(path).stem}-{figure}.png")
    _figure_format(out)
    if results.file_kind(path) == "sweep":
        _sweep_module("plot_sweep").plot_sweep(path, figure, out)
    else:
        if figure not in RUN_FIGURES:
            raise click.BadParameter(f"{figure!r} is not a run figure; choose one of {', '.join(RUN_FIGURES)}",
                                     param_hint="--figure")
        plot_run(results.load(path), figure, out)
    click.echo(f"wrote {out}")


@main.command()
@click.option("--example", is_flag=True, help="Print a commented TOML config with every key, unit and default.")
@_user_errors
def config(example):
    """Print configuration help (every key, its unit and its default)."""
    from .config import PlanetSpec

    if not example:
        raise click.UsageError("nothing to do: use --example")
    click.echo("# meltzone planet configuration: every key with its unit, allowed values and default.\n"
               "# Values are SI unless the key's name or comment says otherwise.\n")
    click.echo(PlanetSpec().to_toml(comments=True))


@main.command("sweep")
@click.argument("spec", required=False, type=click.Path(dir_okay=False))
@click.option("-o", "--output", type=click.Path(dir_okay=False), default=None, help="Sweep file to write (HDF5).")
@click.option("--workers", type=click.IntRange(min=1), default=None, metavar="N",
              help="Local process pool of N workers (default: one per core).")
@click.option("--dask-local", "dask_local", type=click.IntRange(min=1), default=None, metavar="N",
              help="Start a Dask LocalCluster of N worker processes (1 thread each) on 127.0.0.1.")
@click.option("--dashboard", default=None, metavar="HOST:PORT",
              help="With --dask-local: serve the Dask dashboard here, e.g. 127.0.0.1:8787 (default: none).")
@click.option("--scheduler", default=None, metavar="ADDRESS",
              help="Connect to a running Dask scheduler, e.g. tcp://10.0.0.5:8786 (SLURM/PBS via dask-jobqueue).")
@click.option("--resume", is_flag=True, help="Finish an interrupted sweep: run only the cases not checkpointed.")
@click.option("--keep-detail", is_flag=True, help="Also keep each case's full run file in OUTPUT.detail/.")
@click.option("--checkpoint-every", type=click.IntRange(min=1), default=64, show_default=True, metavar="N",
              help="Write a checkpoint batch after N finished cases (and at least every 5 s).")
@click.option("--example", is_flag=True, help="Print a commented sweep spec and exit.")
@_user_errors
def sweep_command(spec, output, workers, dask_local, dashboard, scheduler, resume, keep_detail, checkpoint_every,
                  example):
    """Run a parameter study (grid, Latin hypercube, Sobol', Monte Carlo or observed planet) from SPEC."""
    if example:
        from .sweep import EXAMPLE_SPEC

        click.echo(EXAMPLE_SPEC, nl=False)
        return
    if spec is None:
        raise click.UsageError("give a sweep SPEC file (see `meltzone sweep --example`)")
    if output is None:
        raise click.UsageError("give the output file with -o OUT.h5")
    chosen = [name for name, v in (("--workers", workers), ("--dask-local", dask_local),
                                   ("--scheduler", scheduler)) if v is not None]
    if len(chosen) > 1:
        raise click.UsageError(f"choose one executor: {' and '.join(chosen)} exclude each other")
    if dashboard is not None and dask_local is None:
        raise click.BadParameter("only with --dask-local", param_hint="--dashboard")
    from .sweep import progress_path, run_sweep

    executor, n = None, workers
    if dask_local is not None:
        executor, n = "dask-local", dask_local
    try:
        report = run_sweep(spec, output, executor=executor, workers=n, resume=resume, keep_detail=keep_detail,
                           scheduler=scheduler, checkpoint_every=checkpoint_every, dashboard=dashboard)
    except KeyboardInterrupt:
        click.echo(f"\ninterrupted: finished cases are checkpointed in {progress_path(output)}; "
                   "re-run with --resume to finish", err=True)
        sys.exit(130)
    click.echo(report.line())
    click.echo(f"summary: meltzone summary {output}")


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
