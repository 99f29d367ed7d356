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


def _one_line(text: str) -> str:
    """An error message on one line (line breaks and runs of blanks folded to one blank)."""
    return " ".join(str(text).split())


class _OneLineErrors(click.Group):
    """The command group: every error of every command reaches stderr as ONE line, ``error: ...`` (naming the
    option, key or file), with exit code 2, never a traceback. ``--help`` and ``--version`` are unchanged."""

    def main(self, args=None, prog_name=None, complete_var=None, standalone_mode=True, **extra):
        from .errors import MeltzoneError

        try:
            rv = super().main(args, prog_name, complete_var, standalone_mode=False, **extra)
        except click.exceptions.NoArgsIsHelpError as exc:  # bare `meltzone`: click's help on stderr, as before
            if not standalone_mode:
                raise
            exc.show()
            sys.exit(exc.exit_code)
        except (click.ClickException, MeltzoneError) as exc:
            if not standalone_mode:
                raise
            text = exc.format_message() if isinstance(exc, click.ClickException) else str(exc)
            click.echo(f"error: {_one_line(text)}", err=True)
            sys.exit(2)
        except click.Abort:
            if not standalone_mode:
                raise
            click.echo("error: aborted", err=True)
            sys.exit(1)
        if standalone_mode:
            sys.exit(rv if isinstance(rv, int) else 0)
        return rv


@click.group(cls=_OneLineErrors, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="meltzone")
def main():
    """meltzone: where and when the mantles of rocky planets melt (model estimates, not measurements)."""
    _show_warnings()


# ---------------------------------------------------------------- interior
def _no_empty_path(ctx, param, value):
    """Click callback: an empty or blank path is a mistake, not a request for the default file."""
    if value is not None and not str(value).strip():
        raise click.BadParameter("an empty path")
    return value


def _check_output_folder(path) -> None:
    """Refuse an output path whose folder is missing or not writable, before any work is done."""
    from pathlib import Path

    parent = Path(path).parent
    if not parent.resolve().is_dir():
        raise click.BadParameter(f"folder {str(parent)!r} does not exist", param_hint="--output")
    if not os.access(parent.resolve(), os.W_OK):
        raise click.BadParameter(f"folder {str(parent)!r} is not writable", param_hint="--output")


def _planet_options(func):
    func = click.option("--set", "overrides", multiple=True, metavar="SECTION.KEY=VALUE",
                        help="Override one config key (repeatable), e.g. --set interior.mantle_nodes=512.")(func)
    func = click.option("--core-fraction", type=float, default=None,
                        help="Core mass fraction [0, 1).")(func)
    func = click.option("--mass", type=float, default=None, help="Planet mass [Earth masses].")(func)
    func = click.argument("config", required=False, type=click.Path(dir_okay=False))(func)
    return func


#: The one rule for the planet a command starts from, quoted in the --help of `run` and `interior`.
BASE_PLANET_RULE = ("\b\nThe planet: without CONFIG, the built-in demo planet (Veyra-3 b, an invented\n"
                    "4 Earth-mass planet, core mass fraction 0.30, meltzone/data/demo.toml);\n"
                    "with CONFIG, the schema defaults (1 Earth mass, core mass fraction 0.325)\n"
                    "overridden by the file. --mass, --core-fraction and --set apply on top\n"
                    "in both cases.")


def _spec_from_options(config, mass, core_fraction, overrides):
    """The planet of `run` and `interior`: the demo planet without CONFIG, else the schema defaults overridden by
    CONFIG; then --set, --mass and --core-fraction."""
    from .config import PlanetSpec

    extra = list(overrides)
    if mass is not None:
        extra.append(f"planet.mass_earth={mass!r}")
    if core_fraction is not None:
        extra.append(f"planet.core_mass_fraction={core_fraction!r}")
    return PlanetSpec.from_toml(config or str(demo_config_path()), extra)


@main.command(epilog=BASE_PLANET_RULE)
@_planet_options
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object in SI units.")
@_user_errors
def interior(config, mass, core_fraction, overrides, as_json):
    """Solve and print the interior structure of a planet.

    CONFIG is a TOML planet configuration (see `meltzone config --example`).
    """
    from .interior import build_interior

    from . import phases, report
    from .melting import get_model

    spec = _spec_from_options(config, mass, core_fraction, overrides)
    it = build_interior(spec, check_melting=False)
    zones = phases.planet_flags(it, get_model(spec.melting.model, spec.melting.table_file or None))
    if as_json:
        _echo_json(report.json_safe(report.interior_dict(it, zones)))
    else:
        click.echo(report.interior_text(it, spec, zones))


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
        click.echo(f"meltzone: first run: compiling the numba kernels (about half a minute, once; they are cached in "
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
    from .report import format_years

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


@main.command(epilog=BASE_PLANET_RULE)
@_planet_options
@click.option("-o", "--output", type=click.Path(dir_okay=False), default=None, callback=_no_empty_path,
              help="Results file (HDF5). Default: <config stem>.h5, or meltzone-demo.h5 for the demo planet.")
@click.option("--json", "as_json", is_flag=True, help="Print the run's summary as JSON (SI, times in years).")
@_user_errors
def run(config, mass, core_fraction, overrides, output, as_json):
    """Evolve a planet, find its melt layers and write the results file.

    CONFIG is a TOML planet configuration (see `meltzone config --example`).
    """
    from pathlib import Path

    from . import report
    from .constants import GYR
    from .pipeline import evolve
    from .results import write

    spec = _spec_from_options(config, mass, core_fraction, overrides)
    out = Path(output) if output else Path(f"{Path(config).stem}.h5" if config else "meltzone-demo.h5")
    _check_output_folder(out)
    _announce_compilation()
    callback, finish = _progress_callback(spec.run.end_time_gyr * GYR)
    try:
        result = evolve(spec, progress=callback)
    finally:
        finish()
    write(result, out)
    if as_json:
        _echo_json(report.summary_dict(result, written=out))
    else:
        click.echo(report.run_text(result, written=out))


@main.command("summary")
@click.argument("path", type=click.Path(dir_okay=False))
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object (SI, times in years).")
@_user_errors
def summary_command(path, as_json):
    """Summarize a results file (a run, or a sweep)."""
    from . import report, results

    if results.file_kind(path) == "sweep":
        from .report import print_sweep_summary

        print_sweep_summary(path, as_json)
        return
    result = results.load(path)
    if as_json:
        _echo_json(report.summary_dict(result))
    else:
        click.echo(report.summary_text(result))


@main.command("layers")
@click.argument("path", type=click.Path(dir_okay=False))
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object (SI, times in years).")
@_user_errors
def layers_command(path, as_json):
    """Print the melt-layer table and the event table of a run file."""
    from . import report, results

    result = results.load(path)
    if as_json:
        _echo_json(report.layers_dict(result))
    else:
        click.echo(report.layers_text(result))


@main.command("plot")
@click.argument("path", type=click.Path(dir_okay=False))
@click.option("--figure", default="meltmap", show_default=True, metavar="NAME",
              help="Run files: meltmap (melt fraction against time and depth), profiles (temperature profiles) or "
                   "history (time series). Sweep files: lifetime (an outcome metric against an input) or probability "
                   "(the fraction of cases with a yes/no outcome over two inputs).")
@click.option("-o", "--output", type=click.Path(dir_okay=False), default=None, callback=_no_empty_path,
              help="Figure file, .png, .pdf or .svg by its suffix. Default: <FILE stem>-<figure>.png.")
@click.option("--outcome", default=None, metavar="KEY",
              help="Sweep files: the outcome drawn (probability: a yes/no outcome; lifetime: a metric).")
@click.option("--x", "x_key", default=None, metavar="KEY", help="Sweep files: the input on the x axis.")
@click.option("--y", "y_key", default=None, metavar="KEY",
              help="Sweep files: the input on the y axis (probability) or the colour (lifetime).")
@_user_errors
def plot_command(path, figure, output, outcome, x_key, y_key):
    """Draw a figure from a results file."""
    from pathlib import Path

    from . import results
    from .plot import RUN_FIGURES, figure_format, plot_run

    out = Path(output) if output else Path(f"{Path(path).stem}-{figure}.png")
    figure_format(out)
    if results.file_kind(path) == "sweep":
        from .sweep import plot_sweep

        chosen = {k: v for k, v in (("x", x_key), ("y", y_key), ("outcome", outcome)) if v is not None}
        plot_sweep(path, figure, out, **chosen)
    else:
        given = [name for name, v in (("--outcome", outcome), ("--x", x_key), ("--y", y_key)) if v is not None]
        if given:
            raise click.UsageError(f"{', '.join(given)}: only for sweep files; {path!r} is a run file")
        if figure not in RUN_FIGURES:
            raise click.BadParameter(f"{figure!r} is not a run figure; choose one of {', '.join(RUN_FIGURES)}",
                                     param_hint="--figure")
        plot_run(results.load(path), figure, out)
    click.echo(f"wrote {out}")


@main.command()
@click.option("--example", is_flag=True, help="Print a commented TOML config with every key, unit and default.")
@_user_errors
def config(example):
    """Configuration help: with --example, every key with its unit, allowed values and default, as a commented
    TOML file to start from."""
    from .config import PlanetSpec

    if not example:
        raise click.UsageError("nothing to do: use --example")
    click.echo("# meltzone planet configuration: every key with its unit, allowed values and default.\n"
               "# Values are SI unless the key's name or comment says otherwise.\n")
    click.echo(PlanetSpec().to_toml(comments=True))


@main.command("sweep")
@click.argument("spec", required=False, type=click.Path(dir_okay=False))
@click.option("-o", "--output", type=click.Path(dir_okay=False), default=None, callback=_no_empty_path,
              help="Sweep file to write (HDF5).")
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
              help="Write a checkpoint batch after the first finished task, then after N finished cases or 5 s.")
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


@main.command("compare")
@click.argument("paths", nargs=-1, required=True, type=click.Path(dir_okay=False))
@click.option("-o", "--output", type=click.Path(dir_okay=False), default=None, callback=_no_empty_path,
              help="Also draw the runs' melt maps and histories on shared axes to this file (.png, .pdf, .svg).")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object (SI, times in years).")
@_user_errors
def compare_command(paths, output, as_json):
    """Compare run files side by side: their outcomes, with differences against the first."""
    from . import report

    if len(paths) < 2:
        raise click.UsageError("give two or more run files to compare")
    if output:
        from .figstyle import figure_format

        figure_format(output)
        _check_output_folder(output)
    runs = report.load_runs(paths)
    if as_json:
        _echo_json(report.compare_dict(runs, paths))
    else:
        click.echo(report.compare_text(runs, paths))
    if output:
        from .plot_compare import compare_figure

        click.echo(f"wrote {compare_figure(runs, paths, output)}", err=as_json)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
