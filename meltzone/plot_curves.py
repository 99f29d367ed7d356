"""The P-T figure of a melting model (``meltzone curves MODEL --plot FIG``).

The pressure axis is broken at the model's validated limit: a linear panel for the measured range, where
most of the information is, and a log panel beyond it, so that 0-140 GPa is not squeezed into a few percent of
a 0-3,000 GPa axis. Solidus and liquidus are solid within the validated range and dashed beyond; the phase
boundaries each have a colour and a legend entry (dashed: measured, dotted: predicted).
"""

from __future__ import annotations

import numpy as np

from .errors import MeltzoneError
from .figstyle import LINE_COLOURS, OKABE_ITO, add_note, new_figure, save

#: Above this ratio of plot range to validated limit the pressure axis is broken into a linear and a log panel.
BREAK_RATIO = 1.6


def build_curves(model, max_pressure_pa: float | None = None, n_points: int = 600):
    """The matplotlib Figure of :func:`plot_curves` (not written)."""
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    from .constants import GPA, TPA
    from .phases import BOUNDARIES

    p_max = min(model.max_pressure_pa, 3.0 * TPA) if max_pressure_pa is None else float(max_pressure_pa)
    if not np.isfinite(p_max) or p_max <= model.min_pressure_pa or p_max > model.max_pressure_pa:
        raise MeltzoneError(f"plot pressure limit {p_max / GPA:g} GPa must lie above "
                            f"{model.min_pressure_pa / GPA:g} and at most {model.max_pressure_pa / GPA:g} GPa "
                            f"(range of melting model {model.id!r})")
    p_val = min(model.validated_max_pressure_pa, p_max)
    broken = p_max > BREAK_RATIO * p_val and p_val > model.min_pressure_pa
    lin_max = min(1.15 * p_val, p_max) if broken else p_max
    p_lin = np.linspace(model.min_pressure_pa, lin_max, n_points)
    p_log = np.geomspace(max(p_val, 1.0), p_max, n_points) if broken else np.empty(0)

    fig = new_figure((10.5, 5.6))
    if broken:
        axes = fig.subplots(1, 2, gridspec_kw={"width_ratios": [3, 2]})  # each panel its own temperatures
        axes[1].set_xscale("log")
    else:
        axes = [fig.add_subplot()]
    ranges = [(model.min_pressure_pa, lin_max, p_lin), (p_val, p_max, p_log)][:len(axes)]
    handles = [Line2D([], [], color=OKABE_ITO["blue"], lw=2.2, label="solidus"),
               Line2D([], [], color=OKABE_ITO["vermillion"], lw=2.2, label="liquidus"),
               Line2D([], [], color="0.3", lw=2.2, label=f"solid: validated (<= {p_val / GPA:g} GPa)")]
    if p_max > p_val:
        handles.append(Line2D([], [], color="0.3", lw=2.2, ls=(0, (4, 2)), label="dashed: extrapolated"))
    drawn = set()
    for ax, (lo, hi, p) in zip(axes, ranges):
        sol, liq = model.solidus(p), model.liquidus(p)
        t_lo, t_hi = 0.9 * float(np.min(sol)), 1.05 * float(np.max(liq))
        t_grid = np.linspace(t_lo, t_hi, 400)
        ax.set_ylim(t_lo, t_hi)
        ax.set_ylabel("temperature [K]")
        ax.fill_between(p / GPA, sol, liq, color=OKABE_ITO["orange"], alpha=0.15, lw=0)
        inside = p <= p_val * (1 + 1e-12)
        for curve, colour in ((sol, OKABE_ITO["blue"]), (liq, OKABE_ITO["vermillion"])):
            ax.plot(p[inside] / GPA, curve[inside], color=colour, lw=2.2)
            if np.any(~inside):
                k = max(int(np.argmax(~inside)) - 1, 0)
                ax.plot(p[k:] / GPA, curve[k:], color=colour, lw=2.2, ls=(0, (4, 2)))
        if hi > p_val * (1 + 1e-9):
            ax.axvspan(max(lo, p_val) / GPA, hi / GPA, color="0.5", alpha=0.12, lw=0)
        for i, b in enumerate(BOUNDARIES):
            pb = b.pressure_at(t_grid)  # a solid-solid boundary is drawn up to the liquidus only
            on = (pb >= lo) & (pb <= hi)
            on[on] &= t_grid[on] <= model.liquidus(pb[on])
            if np.any(on):
                colour = LINE_COLOURS[(i + 2) % len(LINE_COLOURS)]
                line = ":" if b.status == "predicted" else "--"
                ax.plot(pb[on] / GPA, t_grid[on], ls=line, color=colour, lw=1.3)
                if b.name not in drawn:
                    drawn.add(b.name)
                    handles.append(Line2D([], [], ls=line, color=colour, lw=1.3,
                                          label=f"{b.name} ({b.status})"))
        ax.set_xlim(lo / GPA, hi / GPA)
        if ax is not axes[0]:  # round pressures on the log panel, no minor labels
            from matplotlib.ticker import FixedLocator, FormatStrFormatter, NullFormatter

            ax.xaxis.set_major_locator(FixedLocator([x for x in (200, 500, 1000, 2000, 5000)
                                                     if lo / GPA * 1.15 <= x <= hi / GPA]))
            ax.xaxis.set_major_formatter(FormatStrFormatter("%g"))
            ax.xaxis.set_minor_formatter(NullFormatter())
        ax.set_xlabel("pressure [GPa]" + ("" if ax is axes[0] else ", log scale"))
    handles.insert(2, Patch(color=OKABE_ITO["orange"], alpha=0.3, label="partial melting"))
    if p_max > p_val:
        handles.append(Patch(color="0.5", alpha=0.25, label="beyond the experiments"))
    if broken:
        axes[1].yaxis.tick_right()
        axes[1].yaxis.set_label_position("right")
        for ax, x in ((axes[0], 1.0), (axes[1], 0.0)):  # break marks on both panels' edges
            ax.plot([x, x], [0.0, 1.0], transform=ax.transAxes, ls="none", marker=[(-1.0, -1.6), (1.0, 1.6)],
                    ms=9, mew=1.0, color="0.15", clip_on=False)
        axes[0].spines["right"].set_visible(False)
        axes[1].spines["left"].set_visible(False)
    fig.suptitle(f"melting model {model.id!r}" + (": linear to the validated range, log beyond" if broken else ""),
                 fontsize=11)
    fig.legend(handles=handles, loc="outside right center", fontsize=7.5, frameon=False)
    add_note(fig)
    return fig


def plot_curves(model, path, *, max_pressure_pa: float | None = None, n_points: int = 600):
    """Draw the solidus, liquidus and mantle phase boundaries of a melting model in P-T space.

    Parameters
    ----------
    model : meltzone.melting.MeltingModel
        The model to draw.
    path : str or Path
        Output file; ``.png``, ``.pdf`` or ``.svg``.
    max_pressure_pa : float, optional
        Upper pressure of the plot [Pa]; default: the model's maximum, at most 3 TPa.
    n_points : int
        Number of pressures sampled along the curves (per panel).

    Returns
    -------
    Path
        The file written.
    """
    from .figstyle import figure_format

    figure_format(path)
    return save(build_curves(model, max_pressure_pa, n_points), path)
