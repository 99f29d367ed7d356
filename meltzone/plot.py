"""Figures. Each figure function is self-contained: it builds its own matplotlib Figure
on the Agg canvas (no pyplot state) and writes it to a file whose suffix picks the format.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from .errors import MeltzoneError
from .report import format_years

#: File suffixes a figure may be written to and the matplotlib format of each.
FIGURE_FORMATS = {".png": "png", ".pdf": "pdf", ".svg": "svg"}


def figure_format(path: Path) -> str:
    """The matplotlib format of a figure file, chosen by its suffix; MeltzoneError for any other suffix."""
    try:
        return FIGURE_FORMATS[path.suffix.lower()]
    except KeyError:
        raise MeltzoneError(f"cannot write a figure to {str(path)!r}: the file name must end in "
                            f"{', '.join(FIGURE_FORMATS)}") from None


def plot_curves(model, path, *, max_pressure_pa: float | None = None, n_points: int = 600) -> Path:
    """Draw the solidus, liquidus and mantle phase boundaries of a melting model in P-T space.

    The range beyond the model's experiments (``validated_max_pressure_pa``) is shaded
    and labelled extrapolated; phase boundaries come from :data:`meltzone.phases.BOUNDARIES`
    (dotted where only predicted).

    Parameters
    ----------
    model : meltzone.melting.MeltingModel
        The model to draw.
    path : str or Path
        Output file; ``.png``, ``.pdf`` or ``.svg``.
    max_pressure_pa : float, optional
        Upper pressure of the plot [Pa]; default: the model's maximum, at most 3 TPa.
    n_points : int
        Number of pressures sampled along the curves.

    Returns
    -------
    Path
        The file written.
    """
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    from .constants import GPA, TPA
    from .phases import BOUNDARIES

    path = Path(path)
    fmt = figure_format(path)
    p_max = min(model.max_pressure_pa, 3.0 * TPA) if max_pressure_pa is None else float(max_pressure_pa)
    if not np.isfinite(p_max) or p_max <= model.min_pressure_pa or p_max > model.max_pressure_pa:
        raise MeltzoneError(f"plot pressure limit {p_max / GPA:g} GPa must lie above "
                            f"{model.min_pressure_pa / GPA:g} and at most {model.max_pressure_pa / GPA:g} GPa "
                            f"(range of melting model {model.id!r})")
    p = np.linspace(model.min_pressure_pa, p_max, n_points)
    sol, liq = model.solidus(p), model.liquidus(p)

    fig = Figure(figsize=(7.0, 5.0), layout="constrained")
    FigureCanvasAgg(fig)
    ax = fig.add_subplot()
    ax.plot(p / GPA, sol, color="tab:blue", lw=2, label="solidus")
    ax.plot(p / GPA, liq, color="tab:red", lw=2, label="liquidus")
    ax.fill_between(p / GPA, sol, liq, color="tab:orange", alpha=0.15, lw=0, label="partial melting")
    t_lo, t_hi = 0.9 * float(np.min(sol)), 1.05 * float(np.max(liq))
    if model.validated_max_pressure_pa < p_max:
        ax.axvspan(model.validated_max_pressure_pa / GPA, p_max / GPA, color="0.5", alpha=0.15, lw=0,
                   label="extrapolated (beyond experiments)")
    t_grid = np.linspace(t_lo, t_hi, 400)
    for b in BOUNDARIES:
        # a solid-solid boundary is drawn up to the liquidus only
        pb = b.pressure_at(t_grid)
        inside = (pb >= model.min_pressure_pa) & (pb <= p_max)
        inside[inside] &= t_grid[inside] <= model.liquidus(pb[inside])
        if np.any(inside):
            line = ":" if b.status == "predicted" else "--"
            ax.plot(pb[inside] / GPA, t_grid[inside], ls=line, color="0.3", lw=1)
            ax.annotate(b.name, (pb[inside][0] / GPA, t_grid[inside][0]), fontsize=6, rotation=90,
                        ha="right", va="bottom", color="0.3")
    ax.set_xlim(model.min_pressure_pa / GPA, p_max / GPA)
    ax.set_ylim(t_lo, t_hi)
    ax.set_xlabel("Pressure [GPa]")
    ax.set_ylabel("Temperature [K]")
    ax.set_title(f"melting model {model.id!r}")
    ax.legend(loc="upper left", fontsize=8)
    ax.text(0.98, 0.02, "model estimate", transform=ax.transAxes, ha="right", va="bottom", fontsize=9,
            style="italic")
    try:
        fig.savefig(path, format=fmt)
    except OSError as exc:
        raise MeltzoneError(f"cannot write figure {str(path)!r}: {exc.strerror or exc}") from None
    return path


# ====================================================================== figures of a run
#: Figure functions of a single run, by the name ``meltzone plot --figure`` takes.
RUN_FIGURES = ("meltmap", "profiles", "history")
_NOTE = "model estimate, not a measurement"
_EVENT_MARKERS = {"formed": "^", "froze": "v", "split": "x", "merged": "+", "reached-surface": "o",
                  "reached-cmb": "D", "magma-ocean-ended": "*", "magma-ocean-reformed": "P",
                  "stagnant-lid-formed": "s"}
_CONFIDENCE_COLOURS = {"high": "0.6", "medium": "tab:orange", "low": "tab:red"}


def _target(path):
    """(Path, matplotlib format) of a figure file; MeltzoneError for a suffix other than .png, .pdf, .svg."""
    path = Path(path)
    return path, figure_format(path)


def _new_figure(figsize):
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=figsize, layout="constrained")
    FigureCanvasAgg(fig)
    return fig


def _save(fig, path: Path, fmt: str) -> Path:
    """Add the model-estimate note in the lower right corner of the figure and write the file."""
    fig.text(0.995, 0.005, _NOTE, ha="right", va="bottom", fontsize=7.5, style="italic", color="0.3")
    try:
        fig.savefig(path, format=fmt)
    except OSError as exc:
        raise MeltzoneError(f"cannot write figure {str(path)!r}: {exc.strerror or exc}") from None
    return path


def _mantle_depth_km(result) -> np.ndarray:
    """Depth [km] of the mantle nodes (CMB first, as in the history's mantle grid)."""
    return (result.interior.radius - result.history.grid.radius) / 1e3


def _first_time(result) -> float:
    """Left end [s] of the log time axes: the first step after the start, but not before 1 yr (the first
    steps of a molten start are seconds long) unless the run is shorter than 1 Myr."""
    from .constants import YEAR

    t = result.time
    positive = t[t > 0.0]
    if not len(positive):
        raise MeltzoneError("the run has no time step after the start: nothing to plot on a log time axis")
    return float(min(max(positive[0], min(YEAR, 1e-6 * t[-1])), t[-1]))


def _log_times(result, n: int) -> np.ndarray:
    """``n`` log-spaced model times [s] from :func:`_first_time` to the end of the run."""
    start, end = _first_time(result), float(result.time[-1])
    return np.geomspace(start, end, n) if start < end else np.array([end])


def _phase_boundaries(ax, result, label=True, xfrac=0.995):
    """Dotted lines at the mantle phase boundaries (depth axis = y), labelled with the deeper phase."""
    layers = result.interior.phase_layers()
    span = max(layers[-1]["bottom_depth_m"], 1.0)
    last, shift = -np.inf, 0
    for layer in layers[1:]:
        depth = layer["top_depth_m"] / 1e3
        ax.axhline(depth, color="0.35", ls=":", lw=0.8)
        if label:  # labels of boundaries closer than 4% of the depth range step to the left
            shift = shift + 1 if layer["top_depth_m"] - last < 0.04 * span else 0
            last = layer["top_depth_m"]
            ax.text(xfrac - 0.16 * shift, depth, layer["phase"], transform=ax.get_yaxis_transform(), ha="right",
                    va="top", fontsize=6.5, color="0.25")


def _pressure_axis(ax, result):
    """A right-hand axis with the pressure [GPa] of the depth on the left (y) axis."""
    from .constants import GPA

    it = result.interior
    depth = (it.radius - it.r[it.mantle])[::-1] / 1e3  # increasing
    p = it.P[it.mantle][::-1] / GPA
    from matplotlib.ticker import MaxNLocator

    sec = ax.secondary_yaxis("right", functions=(lambda d: np.interp(d, depth, p),
                                                 lambda q: np.interp(q, p, depth)))
    ticks = MaxNLocator(7).tick_values(p[0], p[-1])
    slack = 1e-3 * (p[-1] - p[0])
    sec.set_yticks(ticks[(ticks >= p[0] - slack) & (ticks <= p[-1] + slack)])
    sec.set_ylabel("pressure [GPa]")
    return sec


def meltmap(result, path, *, n_times: int = 240) -> Path:
    """Melt fraction against model time (log axis) and depth, with the melt layers and events.

    Melt fraction from the profiles rebuilt at ``n_times`` log-spaced times (state interpolated
    between steps, :meth:`meltzone.results.Result.profile_at_time`); outlines of each layer
    from the layer table; events marked; mantle phase boundaries dotted; a strip at the right
    shows the flagged zones (predicted phases, extrapolated laws) coloured by confidence.

    Parameters
    ----------
    result : meltzone.results.Result
        A run (fresh or loaded).
    path : str or Path
        Output file; ``.png``, ``.pdf`` or ``.svg``.
    n_times : int
        Number of times at which the melt fraction is drawn.

    Returns
    -------
    Path
        The file written.
    """
    from matplotlib.lines import Line2D

    from .constants import YEAR

    path, fmt = _target(path)
    times = _log_times(result, n_times)
    phi = np.array([result.profile_at_time(t)[1] for t in times])
    depth = _mantle_depth_km(result)
    cmb_depth = (result.interior.radius - result.interior.core_radius) / 1e3
    t_yr = times / YEAR
    if len(t_yr) > 1:
        ratio = np.sqrt(t_yr[1:] / t_yr[:-1])
        t_edges = np.concatenate([[t_yr[0] / ratio[0]], t_yr[:-1] * ratio, [t_yr[-1] * ratio[-1]]])
    else:
        t_edges = np.array([t_yr[0] / 1.5, t_yr[0] * 1.5])
    d_edges = np.clip(np.concatenate([[depth[0]], 0.5 * (depth[1:] + depth[:-1]), [depth[-1]]]), 0.0, cmb_depth)

    fig = _new_figure((9.0, 5.5))
    ax, strip = fig.subplots(1, 2, sharey=True, gridspec_kw={"width_ratios": [14, 1.6]})
    mesh = ax.pcolormesh(t_edges, d_edges, np.ma.masked_less_equal(phi.T, 0.0), cmap="YlOrRd", vmin=0.0, vmax=1.0,
                         shading="flat", rasterized=True)
    fig.colorbar(mesh, ax=strip, label="melt fraction", fraction=0.6, pad=0.02)
    ax.set_xscale("log")
    ax.set_xlim(t_edges[0], t_edges[-1])
    ax.set_ylim(cmb_depth, 0.0)

    table, events = result.tracked()
    colours = [f"C{i}" for i in range(10)]
    for i, lid in enumerate(np.unique(table["layer"])):
        rows = (table["layer"] == lid) & (table["time"] > 0.0)
        tt = table["time"][rows] / YEAR
        for col in ("top_depth", "bottom_depth"):
            ax.plot(tt, table[col][rows] / 1e3, color=colours[i % 10], lw=0.9)
    legend = [Line2D([], [], color="0.2", lw=0.9, label="layer outlines (top and bottom)")]
    t_min = t_edges[0]
    for kind, marker in _EVENT_MARKERS.items():
        evs = [e for e in events if e["kind"] == kind and np.isfinite(e["depth"])]
        if evs:
            ax.plot([max(e["time"] / YEAR, t_min) for e in evs], [e["depth"] / 1e3 for e in evs], ls="none",
                    marker=marker, ms=7, mfc="none" if marker == "o" else "k", mec="k", mew=1.1, clip_on=False)
            legend.append(Line2D([], [], ls="none", marker=marker, mfc="none" if marker == "o" else "k", mec="k",
                                 label=kind))
    for e in events:
        if not np.isfinite(e["depth"]):
            x = max(e["time"] / YEAR, t_min)
            ax.axvline(x, color="0.2", ls="--", lw=0.8)
            ax.text(x, 0.01, " " + e["kind"], transform=ax.get_xaxis_transform(), rotation=90, fontsize=7,
                    va="bottom", ha="right")
    _phase_boundaries(ax, result)
    fig.legend(handles=legend, loc="outside lower center", ncol=min(len(legend), 5), fontsize=7, frameon=False)
    ax.set_xlabel("model time [yr]")
    ax.set_ylabel("depth [km]")
    ax.set_title(f"{result.spec.planet.name}: where and when the mantle melts")

    zones = result.flags()
    kinds = list(dict.fromkeys(z["kind"] for z in zones))
    for z in zones:
        x = kinds.index(z["kind"])
        strip.bar(x, (z["bottom_depth_m"] - z["top_depth_m"]) / 1e3, bottom=z["top_depth_m"] / 1e3, width=0.8,
                  color=_CONFIDENCE_COLOURS.get(z["confidence"], "0.5"), alpha=0.8)
    strip.set_xticks(range(len(kinds)), [kd.replace("-", "\n", 1) for kd in kinds], rotation=90, fontsize=6)
    strip.set_xlim(-0.6, max(len(kinds), 1) - 0.4)
    strip.set_title("flagged", fontsize=8)
    strip.tick_params(axis="y", labelleft=False)
    _phase_boundaries(strip, result, label=False)
    strip.legend(handles=[Line2D([], [], lw=6, color=c, label=w) for w, c in _CONFIDENCE_COLOURS.items()],
                 title="confidence", fontsize=6, title_fontsize=6, loc="lower center", framealpha=0.85)
    _pressure_axis(strip, result)
    return _save(fig, path, fmt)


def profiles(result, path, *, times_yr=None, n: int = 6) -> Path:
    """Temperature against depth at chosen times, with the solidus, liquidus and phase boundaries.

    Parameters
    ----------
    result : meltzone.results.Result
        A run (fresh or loaded).
    path : str or Path
        Output file; ``.png``, ``.pdf`` or ``.svg``.
    times_yr : sequence of float, optional
        Model times [yr]; default: the start and ``n - 1`` log-spaced times to the end.
    n : int
        Number of default times.

    Returns
    -------
    Path
        The file written.
    """
    from .constants import YEAR

    path, fmt = _target(path)
    t_end = result.time[-1]
    if times_yr is None:
        times = np.concatenate([[result.time[0]], _log_times(result, max(n - 1, 1))])
    else:
        times = np.asarray(times_yr, dtype=float) * YEAR
        if np.any((times < result.time[0]) | (times > t_end * (1 + 1e-12))):
            raise MeltzoneError(f"profile times must lie within the run (0 - {t_end / YEAR:.4g} yr)")
        times = np.minimum(times, t_end)
    depth = _mantle_depth_km(result)
    grid = result.history.grid
    fig = _new_figure((7.0, 6.0))
    ax = fig.add_subplot()
    for z in result.flags():
        if z["kind"] == "extrapolated-melting":
            ax.axhspan(z["top_depth_m"] / 1e3, z["bottom_depth_m"] / 1e3, color="0.5", alpha=0.12, lw=0)
    ax.fill_betweenx(depth, grid.solidus, grid.liquidus, color="tab:orange", alpha=0.15, lw=0,
                     label="partial melting")
    ax.plot(grid.solidus, depth, color="tab:blue", lw=2, label="solidus")
    ax.plot(grid.liquidus, depth, color="tab:red", lw=2, label="liquidus")
    from matplotlib import colormaps

    cmap = colormaps["viridis"]
    for i, t in enumerate(times):
        temp, _ = result.profile_at_time(t)
        ax.plot(temp, depth, color=cmap(i / max(len(times) - 1, 1)), lw=1.4, label=f"T at {format_years(t / YEAR)}")
    if any(z["kind"] == "extrapolated-melting" for z in result.flags()):
        ax.fill_between([], [], color="0.5", alpha=0.12, lw=0, label="melting curves extrapolated")
    _phase_boundaries(ax, result)
    ax.set_ylim(depth[0], 0.0)
    ax.set_xlabel("temperature [K]")
    ax.set_ylabel("depth [km]")
    ax.set_title(f"{result.spec.planet.name}: temperature profiles")
    ax.legend(loc="lower left", fontsize=7, framealpha=0.85)
    _pressure_axis(ax, result)
    return _save(fig, path, fmt)


def history(result, path) -> Path:
    """Temperatures, heat flows, melt mass, lid thickness and inner-core radius against model time (log axis).

    Parameters
    ----------
    result : meltzone.results.Result
        A run (fresh or loaded).
    path : str or Path
        Output file; ``.png``, ``.pdf`` or ``.svg``.

    Returns
    -------
    Path
        The file written.
    """
    from .constants import YEAR

    path, fmt = _target(path)
    h = result.history
    keep = h["time"] >= _first_time(result)
    t = h["time"][keep] / YEAR

    def positive(values):
        return np.where(values > 0.0, values, np.nan)

    fig = _new_figure((8.0, 9.0))
    axes = fig.subplots(4, 1, sharex=True)
    ax = axes[0]
    for name, label, line in (("upper_temperature", "upper mantle (potential)", "-"),
                              ("core_temperature", "top of the core", "-"),
                              ("lid_base_temperature", "base of the lid (= upper mantle without a lid)", "--"),
                              ("surface_temperature", "surface", "-")):
        ax.plot(t, h[name][keep], ls=line, label=label)
    ax.set_ylabel("temperature [K]")
    ax = axes[1]
    for name, label in (("surface_heat_flow", "surface"), ("cmb_heat_flow", "core-mantle boundary"),
                        ("radiogenic_power", "radiogenic heating")):
        ax.plot(t, positive(h[name][keep]), label=label)
    ax.set_yscale("log")
    ax.set_ylabel("heat flow [W]")
    ax = axes[2]
    ax.plot(t, positive(h["melt_mass"][keep]), color="tab:red", label="melt in the mantle")
    ax.set_yscale("log")
    ax.set_ylabel("melt mass [kg]")
    ax = axes[3]
    ax.plot(t, h["lid_thickness"][keep] / 1e3, label="stagnant lid")
    ax.plot(t, h["inner_core_radius"][keep] / 1e3, label="inner-core radius")
    ax.set_ylabel("thickness, radius [km]")
    ax.set_xlabel("model time [yr]")
    ax.set_xscale("log")
    marks = [e for e in result.tracked()[1] if e["kind"] in ("magma-ocean-ended", "last-melt",
                                                               "stagnant-lid-formed", "inner-core-nucleated")]
    for a in axes:
        for e in marks:
            if e["time"] >= h["time"][keep][0]:
                a.axvline(e["time"] / YEAR, color="0.3", ls="--", lw=0.8)
        a.legend(fontsize=7, loc="best", framealpha=0.85)
        a.grid(alpha=0.3, which="major")
    for e in marks:
        if e["time"] >= h["time"][keep][0]:
            axes[0].text(e["time"] / YEAR, 0.03, e["kind"] + " ", transform=axes[0].get_xaxis_transform(),
                         rotation=90, fontsize=7, va="bottom", ha="right",
                         bbox={"facecolor": "white", "alpha": 0.7, "lw": 0, "pad": 1})
    axes[0].set_title(f"{result.spec.planet.name}: thermal history")
    return _save(fig, path, fmt)


def plot_run(result, figure: str, path) -> Path:
    """Draw one of :data:`RUN_FIGURES` of a run to ``path``."""
    funcs = {"meltmap": meltmap, "profiles": profiles, "history": history}
    if figure not in funcs:
        raise MeltzoneError(f"unknown figure {figure!r}; choose one of {', '.join(RUN_FIGURES)}")
    return funcs[figure](result, path)
