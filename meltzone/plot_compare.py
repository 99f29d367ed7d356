"""The figure of ``meltzone compare``: several runs side by side on shared axes.

One melt map per run (model time on a shared log axis with a "t = 0" tick, depth on a shared axis down to the
deepest core-mantle boundary; below a run's own CMB its panel is shaded as core), then three histories with one
colour per run: upper-mantle temperature, surface heat flow and melt mass. Runs of different planets, schemes,
melting models or atmospheres share the axes; each run's colour is the same in every panel.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from .figstyle import LINE_COLOURS, add_note, figure_format, log_time_axis, new_figure, save, zero_position
from .plot import _cmb_depth_km, _first_time, melt_field, melt_mesh

#: Series drawn for every run: (series name, axis label, log scale).
COMPARE_SERIES = (("upper_temperature", "upper mantle\nT [K]", False),
                  ("surface_heat_flow", "surface heat\nflow [W]", True),
                  ("melt_mass", "melt mass\n[kg]", True))


def run_names(paths) -> list[str]:
    """Short names of compared runs: ``[i] file stem``."""
    return [f"[{i + 1}] {Path(p).stem}" for i, p in enumerate(paths)]


def build_compare(results, paths, n_times: int = 160):
    """The matplotlib Figure of :func:`compare_figure` (not written)."""
    from matplotlib.lines import Line2D

    from .constants import YEAR

    names = run_names(paths)
    colours = [LINE_COLOURS[i % len(LINE_COLOURS)] for i in range(len(results))]
    t_first = min(_first_time(r) for r in results) / YEAR
    t_last = max(float(r.time[-1]) for r in results) / YEAR
    t_zero = zero_position(t_first, t_last)
    deepest = max(_cmb_depth_km(r) for r in results)
    n = len(results)
    fig = new_figure((9.5, 2.0 * n + 2.0 * len(COMPARE_SERIES) + 1.2))
    axes = fig.subplots(n + len(COMPARE_SERIES), 1, sharex=True,
                        gridspec_kw={"height_ratios": [1.2] * n + [1.0] * len(COMPARE_SERIES)})
    mesh = None
    for ax, r, name, colour in zip(axes[:n], results, names, colours):
        t_edges, d_edges, phi, phi0 = melt_field(r, n_times)
        mesh = melt_mesh(ax, t_edges, d_edges, phi, phi0, t_zero)
        cmb = _cmb_depth_km(r)
        if cmb < deepest:
            ax.axhspan(cmb, deepest, color="0.85", lw=0)
        ax.axhline(cmb, color="0.3", lw=0.8)
        ax.set_ylim(deepest, 0.0)
        ax.set_ylabel("depth [km]")
        ax.set_title(f"{name}: {r.spec.planet.name}, {r.spec.convection.scheme}, {r.spec.convection.regime}, "
                     f"{r.melting_model}, atmosphere {r.spec.surface.atmosphere}", fontsize=8, loc="left",
                     color=colour)
    for ax, (series, label, log) in zip(axes[n:], COMPARE_SERIES):
        for r, name, colour in zip(results, names, colours):
            h = r.history
            keep = h["time"] >= _first_time(r)
            values = h[series]
            ax.plot(h["time"][keep] / YEAR, np.where(values[keep] > 0, values[keep], np.nan) if log else values[keep],
                    color=colour, lw=1.4, label=name)
            if h["time"][0] == 0.0 and (values[0] > 0 or not log):
                ax.plot([t_zero], [values[0]], ls="none", marker="o", mfc="none", mec=colour, ms=5, clip_on=False)
        if log:
            ax.set_yscale("log")
        ax.set_ylabel(label)
        ax.grid(alpha=0.3)
    for ax in axes:
        log_time_axis(ax, t_zero, t_last, show_labels=ax is axes[-1])
    axes[-1].set_xlabel("model time [yr] (log scale; open circles: the values at t = 0)")
    fig.colorbar(mesh, ax=list(axes[:n]), label="melt fraction [1]", fraction=0.03, pad=0.01)
    for r, colour in zip(results, colours):  # each run's magma-ocean end, in its colour, on the histories
        for e in r.tracked()[1]:
            if e["kind"] == "magma-ocean-ended" and e["time"] > 0:
                for ax in axes[n:]:
                    ax.axvline(e["time"] / YEAR, color=colour, ls=(0, (4, 2)), lw=0.9)
    handles = [line for line in axes[n].get_lines() if line.get_label() in names]
    handles.append(Line2D([], [], color="0.3", ls=(0, (4, 2)), lw=0.9, label="magma-ocean end (run's colour)"))
    fig.legend(handles=handles, loc="outside lower center", ncol=min(len(handles), 3), fontsize=8, frameon=False)
    fig.suptitle("compared runs", fontsize=11)
    add_note(fig)
    return fig


def compare_figure(results, paths, out, n_times: int = 160) -> Path:
    """Write the comparison figure of runs (:func:`build_compare`) to ``out`` (.png, .pdf or .svg).

    Parameters
    ----------
    results : sequence of meltzone.results.Result
        The runs, in the order of the table.
    paths : sequence of str or Path
        Their files (for the names in the figure).
    out : str or Path
        Output file.
    n_times : int
        Times per melt map.

    Returns
    -------
    Path
        The file written.
    """
    figure_format(out)
    return save(build_compare(results, paths, n_times), out)
