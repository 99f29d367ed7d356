"""Figures. Each figure function is self-contained: it builds its own matplotlib Figure
on the Agg canvas (no pyplot state) and writes it to a file whose suffix picks the format.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from .errors import MeltzoneError

#: File suffixes a figure may be written to and the matplotlib format of each.
FIGURE_FORMATS = {".png": "png", ".pdf": "pdf", ".svg": "svg"}


def _figure_format(path: Path) -> str:
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
    fmt = _figure_format(path)
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
