"""Figures of a sweep file: the magma-ocean lifetime against planet mass, and outcome-probability maps.

Each figure builds its own matplotlib Figure on the Agg canvas (no pyplot state); matplotlib is imported
when a figure is drawn.
"""

from __future__ import annotations

import math
import tomllib

import numpy as np

from ..constants import is_duration
from ..errors import MeltzoneError
from .file import read_sweep
from .stats import flag_names, input_names
from .worker import METRICS, OK

__all__ = ["SWEEP_FIGURES", "build_sweep_figure", "plot_sweep"]

SWEEP_FIGURES = ("lifetime", "probability")


def _column_or_base(data: dict, name: str):
    c = data["cases"]
    if name in c:
        return np.asarray(c[name], dtype=np.float64), True
    base = tomllib.loads(data["attrs"]["base_config_toml"])
    for sec, vals in base.items():
        if name in vals:
            return np.full(len(c["status"]), float(vals[name])), False
    raise MeltzoneError(f"{name!r} is neither an input of this sweep nor a key of its base config")


def _choice(kind: str, name: str, allowed) -> str:
    """``name`` when it is in ``allowed``, else MeltzoneError naming it and listing the valid keys."""
    allowed = list(allowed)
    if name not in allowed:
        raise MeltzoneError(f"{kind} {name!r} is not valid for this sweep; choose one of: "
                            + (", ".join(allowed) or "(none)"))
    return name


def _label(data: dict, name: str) -> str:
    """``name [unit]``; a column of words (categories) has no unit."""
    column = data["cases"].get(name)
    if column is not None and np.asarray(column).dtype.kind not in "fiub":
        return name
    return f"{name} [{data['units'].get(name, '1')}]"


def plot_sweep(path, figure: str, out, *, x: str | None = None, y: str | None = None,
               outcome: str | None = None, bins: int = 8):
    """Draw a figure of a sweep file.

    Parameters
    ----------
    path : str or Path
        The sweep file.
    figure : str
        ``"lifetime"``: an outcome metric (default ``magma_ocean_end_yr``) against input ``x`` (default
        ``mass_earth``), coloured by input ``y`` (default ``core_mass_fraction``); for the magma-ocean lifetime,
        cases whose ocean outlived the run are drawn at the run's end as lower bounds.
        ``"probability"``: the fraction of cases with the yes/no ``outcome`` in cells of two inputs ``x`` and
        ``y``.
    out : str or Path
        Output file (.png, .pdf or .svg).
    x, y : str, optional
        Inputs (variable names in group ``cases``; for the lifetime figure also ``mass_earth`` and
        ``core_mass_fraction`` from the base config). Probability default: the first two numeric inputs.
    outcome : str, optional
        Lifetime: a metric of the sweep; probability: a yes/no outcome (default ``magma_ocean_at_age`` in
        observed mode, else ``basal_layer_formed``). A key the sweep does not have raises MeltzoneError
        listing the valid ones.
    bins : int
        Cells per axis for inputs with more than 12 distinct values (grid values are used as they are).

    Returns
    -------
    Path
        The file written.
    """
    from ..figstyle import figure_format, save

    if figure not in SWEEP_FIGURES:
        raise MeltzoneError(f"figure {figure!r}: a sweep file has figures " + ", ".join(map(repr, SWEEP_FIGURES)))
    figure_format(out)
    return save(build_sweep_figure(path, figure, x=x, y=y, outcome=outcome, bins=bins), out)


def build_sweep_figure(path, figure: str, *, x=None, y=None, outcome=None, bins: int = 8):
    """The matplotlib Figure of :func:`plot_sweep` (not written); ``figure`` is one of :data:`SWEEP_FIGURES`."""
    from ..figstyle import add_note, new_figure

    data = read_sweep(path)
    fig = new_figure((7.0, 5.0))
    ax = fig.add_subplot()
    (_lifetime if figure == "lifetime" else _probability)(fig, ax, data, x, y, outcome, bins)
    add_note(fig, "model estimates, not measurements")
    return fig


def _lifetime(fig, ax, data, x, y, outcome, bins):
    """An outcome metric against one input, coloured by another (see :func:`plot_sweep`)."""
    c = data["cases"]
    ok = c["status"] == OK
    inputs = list(dict.fromkeys(input_names(data) + ["mass_earth", "core_mass_fraction"]))
    outcome = _choice("outcome", outcome or "magma_ocean_end_yr", [k for k in METRICS if k in c])
    x = _choice("input", x or "mass_earth", inputs)
    y = _choice("input", y or "core_mass_fraction", inputs)
    xv, _ = _column_or_base(data, x)
    cv, _ = _column_or_base(data, y)
    t = np.asarray(c[outcome], dtype=np.float64)
    persists = ok & (c["magma_ocean_persists"] == 1) if outcome == "magma_ocean_end_yr" else np.zeros_like(ok)
    has = ok & np.isfinite(t) & np.isfinite(xv) & ((t > 0) if is_duration(outcome) else True)
    if not np.any(has | persists):
        raise MeltzoneError(f"no case of this sweep has a value of {outcome!r} to plot")
    lo_c, hi_c = np.nanmin(cv[ok]), np.nanmax(cv[ok])
    if hi_c <= lo_c:
        lo_c, hi_c = lo_c - 0.05, hi_c + 0.05
    sc = ax.scatter(xv[has], t[has], c=cv[has], cmap="viridis", vmin=lo_c, vmax=hi_c, s=22, edgecolors="none",
                    label="cases with a value")
    if np.any(persists):
        ax.scatter(xv[persists], c["end_time_yr"][persists], c=cv[persists], cmap="viridis", vmin=lo_c, vmax=hi_c,
                   marker="^", s=30, edgecolors="k", linewidths=0.4, label="outlived the run (lower bound)")
    shown = np.concatenate([xv[has | persists]])
    if np.all(shown > 0) and np.nanmax(shown) / np.nanmin(shown) > 3:
        ax.set_xscale("log")
        _plain_log_ticks(ax.xaxis)
    values = t[has]
    if np.all(values > 0) and np.nanmax(values) / np.nanmin(values) > 30:
        ax.set_yscale("log")
    ax.set_xlabel("planet mass [Earth masses]" if x == "mass_earth" else _label(data, x))
    ax.set_ylabel("magma-ocean lifetime [yr]" if outcome == "magma_ocean_end_yr" else _label(data, outcome))
    fig.colorbar(sc, ax=ax, label="core mass fraction [1]" if y == "core_mass_fraction" else _label(data, y))
    ax.legend(loc="best", fontsize=8)
    ax.set_title(f"{outcome} ({int(np.sum(has | persists))} of {int(np.sum(ok))} cases that ran)", fontsize=10)


def _probability(fig, ax, data, x, y, outcome, bins):
    """The fraction of cases with a yes/no outcome in cells of two inputs (see :func:`plot_sweep`)."""
    c = data["cases"]
    ok = c["status"] == OK
    inputs = input_names(data)
    if "core_mass_fraction" in c and "core_mass_fraction" not in inputs:
        inputs.append("core_mass_fraction")
    names = flag_names(data["attrs"].get("sweep_mode", ""))
    outcome = _choice("outcome", outcome or ("magma_ocean_at_age" if "magma_ocean_at_age" in c
                                             else "basal_layer_formed"), [k for k in names if k in c])
    x = x or (inputs[0] if inputs else None)
    y = y or next((k for k in inputs if k != x), None)
    if x is None or y is None:
        raise MeltzoneError("the probability map needs two swept inputs; this sweep has "
                            f"{len(inputs)} ({', '.join(inputs) or 'none'})")
    x, y = _choice("input", x, inputs), _choice("input", y, inputs)
    xv, xe, xlog, xticks = _axis(c[x], ok, data["meta"].get(x, {}), bins)
    yv, ye, ylog, yticks = _axis(c[y], ok, data["meta"].get(y, {}), bins)
    use = ok & np.isfinite(xv) & np.isfinite(yv)
    yes = c[outcome] == 1
    n_cell, _, _ = np.histogram2d(xv[use], yv[use], bins=[xe, ye])
    k_cell, _, _ = np.histogram2d(xv[use & yes], yv[use & yes], bins=[xe, ye])
    with np.errstate(invalid="ignore", divide="ignore"):
        p = np.where(n_cell > 0, k_cell / n_cell, np.nan)
    mesh = ax.pcolormesh(xe, ye, p.T, cmap="cividis", vmin=0.0, vmax=1.0, shading="flat")
    if p.size <= 100:
        for i in range(len(xe) - 1):
            for j in range(len(ye) - 1):
                if n_cell[i, j] > 0:
                    xc = math.sqrt(xe[i] * xe[i + 1]) if xlog else 0.5 * (xe[i] + xe[i + 1])
                    yc = math.sqrt(ye[j] * ye[j + 1]) if ylog else 0.5 * (ye[j] + ye[j + 1])
                    ax.text(xc, yc, f"{int(k_cell[i, j])}/{int(n_cell[i, j])}", ha="center", va="center",
                            fontsize=7, color="w" if p[i, j] < 0.5 else "k")
    for axis, log, ticks, set_scale in ((ax.xaxis, xlog, xticks, ax.set_xscale),
                                        (ax.yaxis, ylog, yticks, ax.set_yscale)):
        if log:
            set_scale("log")
            _plain_log_ticks(axis)
        if ticks is not None:
            axis.set_ticks(np.arange(len(ticks)), ticks)
    ax.set_xlabel(_label(data, x))
    ax.set_ylabel(_label(data, y))
    fig.colorbar(mesh, ax=ax, label=f"fraction of cases [1]: {outcome}")
    ax.set_title(f"P({outcome}) ({int(np.sum(use))} cases; k/n per cell)", fontsize=10)


def _plain_log_ticks(axis) -> None:
    """Label a log axis 0.5, 1, 2, 5, 10 instead of powers of ten (planet masses span only ~1.5 decades)."""
    from matplotlib.ticker import FormatStrFormatter, LogLocator

    axis.set_major_locator(LogLocator(subs=(1.0, 2.0, 5.0)))
    axis.set_major_formatter(FormatStrFormatter("%g"))
    axis.set_minor_formatter(FormatStrFormatter(""))


def _axis(column: np.ndarray, use: np.ndarray, meta: dict, bins: int):
    """(positions, cell edges, log axis, tick labels or None) of one input of the probability map.

    Strings and grid values become categories at 0, 1, 2, ... labelled by their values; sampled
    numbers get ``bins`` equal cells (in log10 for inputs sampled with scale = "log")."""
    numeric = column.dtype.kind in "fiu"
    values = np.asarray(column, dtype=np.float64) if numeric else None
    used = column[use & np.isfinite(values)] if numeric else column[use]
    distinct = np.unique(used) if numeric else sorted({str(v) for v in used})
    if not len(distinct):
        return np.full(len(column), np.nan), np.array([-0.5, 0.5]), False, [""]
    if not numeric or str(meta.get("sampling", "")).startswith("grid"):
        labels = [f"{v:.4g}" for v in distinct] if numeric else list(distinct)
        index = {(float(v) if numeric else v): k for k, v in enumerate(distinct)}
        key = (lambda v: float(v)) if numeric else str
        pos = np.array([index.get(key(v), np.nan) for v in column], dtype=np.float64)
        return pos, np.arange(len(labels) + 1) - 0.5, False, labels
    log = bool(meta.get("scale") == "log" and np.all(distinct > 0))
    tv = np.log10(distinct) if log else distinct
    if tv[-1] <= tv[0]:
        edges = np.array([tv[0] - 0.5, tv[0] + 0.5]) if not log else np.array([tv[0] - 0.1, tv[0] + 0.1])
    else:
        edges = np.linspace(tv[0], tv[-1], max(int(bins), 1) + 1)
        edges[-1] = np.nextafter(edges[-1], np.inf)
    return values, (10.0 ** edges if log else edges), log, None
