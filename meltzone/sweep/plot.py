"""Figures of a sweep file: the magma-ocean lifetime against planet mass, and outcome-probability maps.

Each figure builds its own matplotlib Figure on the Agg canvas (no pyplot state); matplotlib is imported
when a figure is drawn.
"""

from __future__ import annotations

import math
import tomllib
from pathlib import Path

import numpy as np

from ..errors import MeltzoneError
from .file import read_sweep
from .stats import flag_names, input_names
from .worker import OK

__all__ = ["SWEEP_FIGURES", "plot_sweep"]

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


def plot_sweep(path, figure: str, out, *, x: str | None = None, y: str | None = None,
               outcome: str | None = None, bins: int = 8):
    """Draw a figure of a sweep file.

    Parameters
    ----------
    path : str or Path
        The sweep file.
    figure : str
        ``"lifetime"``: magma-ocean lifetime against planet mass, coloured by core mass fraction
        (cases whose ocean outlived the run drawn at the run's end as lower bounds);
        ``"probability"``: the fraction of cases with ``outcome`` in cells of two inputs ``x`` and ``y``.
    out : str or Path
        Output file (.png, .pdf or .svg).
    x, y : str, optional
        Inputs of the probability map (variable names in group ``cases``); default: the first two
        numeric inputs.
    outcome : str, optional
        A yes/no outcome (default ``magma_ocean_at_age`` in observed mode, else ``basal_layer_formed``).
    bins : int
        Cells per axis for inputs with more than 12 distinct values (grid values are used as they are).

    Returns
    -------
    Path
        The file written.
    """
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    from ..plot import figure_format

    if figure not in SWEEP_FIGURES:
        raise MeltzoneError(f"figure {figure!r}: a sweep file has figures " + ", ".join(map(repr, SWEEP_FIGURES)))
    out = Path(out)
    fmt = figure_format(out)
    data = read_sweep(path)
    c = data["cases"]
    ok = c["status"] == OK
    fig = Figure(figsize=(7.0, 5.0), layout="constrained")
    FigureCanvasAgg(fig)
    ax = fig.add_subplot()
    if figure == "lifetime":
        mass, _ = _column_or_base(data, "mass_earth")
        cmf, _ = _column_or_base(data, "core_mass_fraction")
        t = c["magma_ocean_end_yr"]
        persists = ok & (c["magma_ocean_persists"] == 1)
        ended = ok & np.isfinite(t) & (t > 0)
        if not np.any(ended | persists):
            raise MeltzoneError("no case of this sweep has a magma-ocean lifetime to plot")
        lo_c, hi_c = np.nanmin(cmf[ok]), np.nanmax(cmf[ok])
        if hi_c <= lo_c:
            lo_c, hi_c = lo_c - 0.05, hi_c + 0.05
        sc = ax.scatter(mass[ended], t[ended], c=cmf[ended], cmap="viridis", vmin=lo_c, vmax=hi_c, s=22,
                        edgecolors="none", label="magma ocean ended")
        if np.any(persists):
            ax.scatter(mass[persists], c["end_time_yr"][persists], c=cmf[persists], cmap="viridis", vmin=lo_c,
                       vmax=hi_c, marker="^", s=30, edgecolors="k", linewidths=0.4,
                       label="outlived the run (lower bound)")
        ax.set_xscale("log")
        ax.set_yscale("log")
        _plain_log_ticks(ax.xaxis)
        ax.set_xlabel("planet mass [Earth masses]")
        ax.set_ylabel("magma-ocean lifetime [yr]")
        fig.colorbar(sc, ax=ax, label="core mass fraction")
        ax.legend(loc="best", fontsize=8)
        ax.set_title(f"Magma-ocean lifetime ({int(np.sum(ok))} cases)")
    else:
        inputs = input_names(data)
        if "core_mass_fraction" in c and "core_mass_fraction" not in inputs:
            inputs.append("core_mass_fraction")
        x = x or (inputs[0] if inputs else None)
        y = y or next((k for k in inputs if k != x), None)
        if x is None or y is None:
            raise MeltzoneError("the probability map needs two swept inputs; this sweep has "
                                f"{len(inputs)} ({', '.join(inputs) or 'none'})")
        for name in (x, y):
            if name not in inputs:
                raise MeltzoneError(f"{name!r} is not an input of this sweep; inputs: {', '.join(inputs)}")
        names = flag_names(data["attrs"].get("sweep_mode", ""))
        outcome = outcome or ("magma_ocean_at_age" if "magma_ocean_at_age" in c else "basal_layer_formed")
        if outcome not in names or outcome not in c:
            raise MeltzoneError(f"outcome {outcome!r}: choose one of {', '.join(k for k in names if k in c)}")
        xv, xe, xlog, xticks = _axis(c[x], ok, data["meta"].get(x, {}), bins)
        yv, ye, ylog, yticks = _axis(c[y], ok, data["meta"].get(y, {}), bins)
        use = ok & np.isfinite(xv) & np.isfinite(yv)
        yes = c[outcome] == 1
        n_cell, _, _ = np.histogram2d(xv[use], yv[use], bins=[xe, ye])
        k_cell, _, _ = np.histogram2d(xv[use & yes], yv[use & yes], bins=[xe, ye])
        with np.errstate(invalid="ignore", divide="ignore"):
            p = np.where(n_cell > 0, k_cell / n_cell, np.nan)
        mesh = ax.pcolormesh(xe, ye, p.T, cmap="magma", vmin=0.0, vmax=1.0, shading="flat")
        if p.size <= 100:
            for i in range(len(xe) - 1):
                for j in range(len(ye) - 1):
                    if n_cell[i, j] > 0:
                        xc = math.sqrt(xe[i] * xe[i + 1]) if xlog else 0.5 * (xe[i] + xe[i + 1])
                        yc = math.sqrt(ye[j] * ye[j + 1]) if ylog else 0.5 * (ye[j] + ye[j + 1])
                        ax.text(xc, yc, f"{int(k_cell[i, j])}/{int(n_cell[i, j])}", ha="center", va="center",
                                fontsize=7, color="w" if p[i, j] < 0.5 else "k")
        if xlog:
            ax.set_xscale("log")
            _plain_log_ticks(ax.xaxis)
        if ylog:
            ax.set_yscale("log")
            _plain_log_ticks(ax.yaxis)
        if xticks is not None:
            ax.set_xticks(np.arange(len(xticks)), xticks)
        if yticks is not None:
            ax.set_yticks(np.arange(len(yticks)), yticks)
        ax.set_xlabel(f"{x}" + (f" [{data['units'][x]}]" if data["units"].get(x, "1") not in ("", "1") else ""))
        ax.set_ylabel(f"{y}" + (f" [{data['units'][y]}]" if data["units"].get(y, "1") not in ("", "1") else ""))
        fig.colorbar(mesh, ax=ax, label=f"fraction of cases: {outcome}")
        ax.set_title(f"P({outcome}) ({int(np.sum(use))} cases; k/n per cell)")
    fig.text(0.01, 0.005, "Model estimates, not measurements.", fontsize=7, color="0.4")
    fig.savefig(out, format=fmt, dpi=150)
    return out


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
