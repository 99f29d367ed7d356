"""Command line: a thin click group. Each command parses, calls the API and prints.

A user's mistake (a :class:`meltzone.errors.MeltzoneError`) reaches the
terminal as one line and exit code 2, never a traceback.
"""

from __future__ import annotations

import functools
import json
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
    def show(message, category, filename, lineno, file=None, line=None):
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


@main.command()
@click.argument("config_file", required=False, type=click.Path(dir_okay=False))
@click.option("--set", "overrides", multiple=True, metavar="SECTION.KEY=VALUE", help="Override one config key.")
@_user_errors
def run(config_file, overrides):
    """Run the main job on CONFIG_FILE (default: the built-in demo planet)."""
    from .config import PlanetSpec
    from .interior import build_interior

    spec = PlanetSpec.from_toml(config_file or str(demo_config_path()), list(overrides))
    click.echo(_interior_report(build_interior(spec), spec))


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


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
