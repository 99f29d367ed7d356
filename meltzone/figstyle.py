"""What every meltzone figure shares: the file formats, a colour-blind-safe palette, the figure canvas, the note,
a log time axis that shows t = 0, labels that step aside when they would overlap, and a measure of overlap.

Matplotlib is imported only when a figure is built (no pyplot state: each figure has its own Agg canvas).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from .errors import MeltzoneError

#: File suffixes a figure may be written to and the matplotlib format of each.
FIGURE_FORMATS = {".png": "png", ".pdf": "pdf", ".svg": "svg"}

#: The Okabe & Ito (2008, "Color Universal Design", J*FLY) palette, distinguishable with the common forms of
#: colour-vision deficiency. Yellow is left out of line colours (too faint on white).
OKABE_ITO = {"black": "#000000", "orange": "#E69F00", "sky blue": "#56B4E9", "bluish green": "#009E73",
             "yellow": "#F0E442", "blue": "#0072B2", "vermillion": "#D55E00", "reddish purple": "#CC79A7"}
#: Line colours in order of use (no yellow), then grey.
LINE_COLOURS = ("#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000", "#777777")
#: Colours of the flag confidence levels (grey, orange, vermillion: ordered in lightness too).
CONFIDENCE_COLOURS = {"high": "#B0B0B0", "medium": "#E69F00", "low": "#D55E00"}

MODEL_NOTE = "model estimate, not a measurement"


def figure_format(path: Path) -> str:
    """The matplotlib format of a figure file, chosen by its suffix; MeltzoneError for any other suffix."""
    try:
        return FIGURE_FORMATS[Path(path).suffix.lower()]
    except KeyError:
        raise MeltzoneError(f"cannot write a figure to {str(path)!r}: the file name must end in "
                            f"{', '.join(FIGURE_FORMATS)}") from None


def new_figure(figsize):
    """A matplotlib Figure on its own Agg canvas with constrained layout."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=figsize, layout="constrained")
    FigureCanvasAgg(fig)
    return fig


def add_note(fig, text: str = MODEL_NOTE):
    """The model-estimate note in the lower right corner of the figure (as the figure's x label, so that
    constrained layout keeps it clear of the legends)."""
    return fig.supxlabel(text, x=0.995, ha="right", fontsize=7.5, style="italic", color="0.3")


def save(fig, path) -> Path:
    """Write ``fig`` to ``path`` in the format its suffix names; MeltzoneError naming the file on failure."""
    path = Path(path)
    fmt = figure_format(path)
    try:
        fig.savefig(path, format=fmt, dpi=150)
    except OSError as exc:
        raise MeltzoneError(f"cannot write figure {str(path)!r}: {exc.strerror or exc}") from None
    return path


# ---------------------------------------------------------------- time axis
def zero_position(t_first: float, t_last: float) -> float:
    """Where t = 0 sits on a log time axis whose data start at ``t_first``: a tenth of the axis's decades to
    the left (at least a factor 3), so that events at the start are drawn apart from the first steps."""
    decades = max(np.log10(t_last / t_first), 1.0)
    return t_first / 10.0 ** max(0.1 * decades, 0.5)


def log_time_axis(ax, t_zero: float, t_last: float, show_labels: bool = True) -> None:
    """A log time axis from ``t_zero`` to ``t_last`` whose leftmost tick, at ``t_zero``, reads "t = 0", with a
    break mark between it and the data (decade ticks too close to it are dropped)."""
    from matplotlib.ticker import FixedLocator, FuncFormatter, LogFormatterSciNotation, NullLocator

    ax.set_xscale("log")
    ax.set_xlim(t_zero / 1.6, t_last * 1.05)
    lo, hi = np.floor(np.log10(t_zero)), np.ceil(np.log10(t_last))
    step = max(int(np.ceil((hi - lo) / 8)), 1)
    decades = 10.0 ** np.arange(lo, hi + 1, step)
    gap = 0.07 * np.log10(t_last / t_zero)
    decades = decades[(np.log10(decades) > np.log10(t_zero) + max(gap, 0.45)) & (decades <= t_last * 1.05)]
    ticks = np.concatenate([[t_zero], decades])
    sci = LogFormatterSciNotation()
    ax.xaxis.set_major_locator(FixedLocator(ticks))
    ax.xaxis.set_minor_locator(NullLocator())
    ax.xaxis.set_major_formatter(FuncFormatter(lambda x, pos: "t = 0" if np.isclose(x, t_zero) else sci(x, pos)))
    if not show_labels:
        ax.tick_params(axis="x", labelbottom=False)
    # the break: two short slanted strokes on the x axis between t = 0 and the data
    x_break = t_zero * 10.0 ** (0.5 * max(gap, 0.45))
    ax.plot([x_break / 1.12, x_break * 1.12], [0.0, 0.0], transform=ax.get_xaxis_transform(), ls="none",
            marker=[(-1.0, -1.6), (1.0, 1.6)], ms=9, mew=1.0, color="0.15", clip_on=False, gid="axis-break")


# ---------------------------------------------------------------- labels that step aside
def _renderer(fig):
    fig.canvas.draw()
    return fig.canvas.get_renderer()


def stack_labels(fig, texts, step_points: float = 9.0, max_rows: int = 8) -> None:
    """Move annotations (``textcoords="offset points"``) that overlap an earlier one, in x order, up by
    ``step_points`` until they do not (at most ``max_rows`` rows). Call it last: the layout is settled by a draw
    first, and the check is repeated after a second draw (constrained layout may move the axes once more)."""
    from matplotlib.text import Text

    if not texts:
        return

    def text_box(t):  # the text alone: an Annotation's own extent includes its arrow
        return Text.get_window_extent(t, renderer)

    for _ in range(2):
        renderer = _renderer(fig)
        placed = []
        for t in sorted(texts, key=lambda a: text_box(a).x0):
            x, y = t.xyann
            for _ in range(max_rows):
                box = text_box(t).padded(5.0)
                if not any(box.overlaps(b) for b in placed):
                    break
                y += step_points
                t.xyann = (x, y)
            placed.append(text_box(t))


# ---------------------------------------------------------------- overlap, measured
def visible_texts(fig, renderer):
    """Every drawn, non-empty text of the figure with its window box: figure texts, titles, axis labels,
    the tick labels of ticks inside the view, axes texts and annotations, legend texts and titles."""
    from matplotlib.axis import Axis
    from matplotlib.text import Text

    tick_labels, drawn_ticks = set(), set()
    for axis in fig.findobj(Axis):
        for tick in axis.get_major_ticks() + axis.get_minor_ticks():
            tick_labels |= {id(tick.label1), id(tick.label2)}
        if axis.axes.get_visible():
            for tick in axis._update_ticks():  # the ticks inside the view (what matplotlib draws)
                drawn_ticks |= {id(tick.label1), id(tick.label2)}
    out = []
    for artist in fig.findobj(Text):
        if not artist.get_visible() or not artist.get_text().strip():
            continue
        if artist.axes is not None and not artist.axes.get_visible():
            continue
        if id(artist) in tick_labels and id(artist) not in drawn_ticks:
            continue
        box = Text.get_window_extent(artist, renderer)  # text only (an Annotation's extent adds its arrow)
        if box.width <= 0 or box.height <= 0:
            continue
        out.append((artist, box))
    return out


def _area(b) -> float:
    return max(b.width, 0.0) * max(b.height, 0.0)


def _intersection(a, b) -> float:
    w = min(a.x1, b.x1) - max(a.x0, b.x0)
    h = min(a.y1, b.y1) - max(a.y0, b.y0)
    return w * h if w > 0 and h > 0 else 0.0


def overlap_report(fig) -> dict:
    """How much the texts of a drawn figure overlap, in fractions of area (window boxes, axis-aligned).

    ``text_text``: the largest overlap of two texts over the smaller one's area; ``text_data``: per axes that
    holds data, the area of text and legend boxes inside its data area over that area (largest over the axes);
    ``outside``: the largest fraction of a text's box that lies outside the figure; ``pairs``: the strings of
    overlapping pairs (for messages)."""
    renderer = _renderer(fig)
    texts = visible_texts(fig, renderer)
    worst, pairs = 0.0, []
    for i, (ta, a) in enumerate(texts):
        for tb, b in texts[i + 1:]:
            frac = _intersection(a, b) / min(_area(a), _area(b))
            if frac > 0.0:
                pairs.append((ta.get_text(), tb.get_text(), round(frac, 3)))
            worst = max(worst, frac)
    fig_box = fig.bbox
    outside = max((1.0 - _intersection(b, fig_box) / _area(b) for _, b in texts), default=0.0)
    data = 0.0
    for ax in fig.axes:
        if not (ax.lines or ax.collections or ax.images or ax.patches) or ax.get_label() == "<colorbar>":
            continue
        area = ax.get_window_extent(renderer)
        boxes = [b for t, b in texts if t.axes is ax
                 and t not in ax.xaxis.get_ticklabels() + ax.yaxis.get_ticklabels()
                 and t not in (ax.xaxis.label, ax.yaxis.label, ax.title)]
        legend = ax.get_legend()
        if legend is not None:  # the legend's frame counts as a whole, not its texts one by one
            lb = legend.get_window_extent(renderer)
            boxes = [b for b in boxes if _intersection(b, lb) < _area(b)] + [lb]
        covered = sum(_intersection(b, area) for b in boxes) / _area(area)
        data = max(data, covered)
    return {"text_text": worst, "text_data": data, "outside": outside, "pairs": pairs}
