"""Figures of a run: the melt map, temperature profiles and the thermal history.

Each ``build_*`` function returns a matplotlib Figure on its own Agg canvas (no pyplot state); the public
functions write it to a file whose suffix picks the format. What is small but important is drawn so that it
shows: a layer thinner than :data:`THIN_LAYER_FRACTION` of the mantle near the surface or the core-mantle
boundary gets a zoom panel (and only then) and a minimum drawn width with its true thickness written beside it;
events at t = 0 sit on a "t = 0" tick of the log time axis; legends and event labels are placed outside the data.
Colours are the Okabe & Ito (2008) colour-blind-safe palette (:mod:`meltzone.figstyle`).
"""

from __future__ import annotations

import numpy as np

from .constants import YEAR as _YEAR
from .errors import MeltzoneError
from .figstyle import (CONFIDENCE_COLOURS, FIGURE_FORMATS, LINE_COLOURS, OKABE_ITO, add_note,  # noqa: F401
                       figure_format, log_time_axis, new_figure, save, stack_labels, zero_position)
from .plot_curves import build_curves, plot_curves  # noqa: F401 (the curves figure, re-exported)
from .report import format_years

#: Figure functions of a single run, by the name ``meltzone plot --figure`` takes.
RUN_FIGURES = ("meltmap", "profiles", "history")
#: A layer whose greatest thickness is below this fraction of the mantle depth is "thin": it gets a minimum
#: drawn width, a label with its true thickness, and a zoom panel when it lies near the surface or the CMB
#: (this model's choice: below ~5% a layer is a few pixels on a full-mantle axis).
THIN_LAYER_FRACTION = 0.05
#: Minimum drawn thickness of a thin layer, as a fraction of the depth axis.
MIN_DRAWN_FRACTION = 0.015
#: Colour map of the melt fraction (cividis: perceptually uniform and readable with colour-vision deficiency;
#: reversed so that melt is dark on a white, solid background).
MELT_CMAP = "cividis_r"
#: Events that concern the whole planet: drawn as vertical lines with a label above the figure.
PLANET_EVENTS = ("magma-ocean-ended", "magma-ocean-reformed", "stagnant-lid-formed", "inner-core-nucleated",
                 "last-melt")
_EVENT_MARKERS = {"formed": "^", "froze": "v", "split": "x", "merged": "+", "reached-surface": "o",
                  "reached-cmb": "D"}
_FLAG_LABELS = {"extrapolated-melting": "melting\nextrap.", "extrapolated-eos": "EOS\nextrap.",
                "predicted-transition": "predicted\nphases"}


def _save_new(build, path, *args, **kwargs):
    figure_format(path)  # a bad suffix fails before any work
    return save(build(*args, **kwargs), path)


# ---------------------------------------------------------------- what the figures share
def _mantle_depth_km(result) -> np.ndarray:
    """Depth [km] of the mantle nodes (CMB first, as in the history's mantle grid)."""
    return (result.interior.radius - result.history.grid.radius) / 1e3


def _cmb_depth_km(result) -> float:
    return (result.interior.radius - result.interior.core_radius) / 1e3


def _first_time(result) -> float:
    """Left end [s] of the data on log time axes: the first step after the start, but not before 1 yr (the
    first steps of a molten start are seconds long) unless the run is shorter than 1 Myr."""
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


def thin_layers(result, fraction: float = THIN_LAYER_FRACTION) -> list[dict]:
    """Melt layers whose greatest thickness stays below ``fraction`` of the mantle depth.

    Each: ``layer`` id, ``where`` ("surface" when its top reaches the upper tenth of the mantle, "cmb" when it
    sits on the core-mantle boundary, else "mantle"), ``first_s``/``last_s``, ``top_depth_m``,
    ``bottom_depth_m`` (shallowest top, deepest bottom) and ``thickness_m`` (greatest thickness)."""
    table, _ = result.tracked()
    mantle = _cmb_depth_km(result) * 1e3
    out = []
    for lid in dict.fromkeys(int(x) for x in table["layer"]):
        rows = table["layer"] == lid
        thick = float(np.max(table["bottom_depth"][rows] - table["top_depth"][rows]))
        if thick >= fraction * mantle:
            continue
        top, bottom = float(np.min(table["top_depth"][rows])), float(np.max(table["bottom_depth"][rows]))
        where = "cmb" if bottom >= mantle - 1.0 else "surface" if top <= 0.1 * mantle else "mantle"
        out.append({"layer": lid, "where": where, "first_s": float(np.min(table["time"][rows])),
                    "last_s": float(np.max(table["time"][rows])), "top_depth_m": top, "bottom_depth_m": bottom,
                    "thickness_m": thick})
    return out


def zoom_windows(result) -> dict:
    """Depth windows [km] of the zoom panels: ``{"surface": (0, d) or None, "cmb": (d, cmb) or None}``, a
    window only where a thin layer (:func:`thin_layers`) lies; each spans three times the layer (at least 2%
    and at most 25% of the mantle)."""
    mantle = _cmb_depth_km(result)
    thin = thin_layers(result)
    win = {"surface": None, "cmb": None}
    top = [t["bottom_depth_m"] / 1e3 for t in thin if t["where"] == "surface"]
    if top:
        win["surface"] = (0.0, float(np.clip(3.0 * max(top), 0.02 * mantle, 0.25 * mantle)))
    bottom = [t["thickness_m"] / 1e3 for t in thin if t["where"] == "cmb"]
    if bottom:
        win["cmb"] = (mantle - float(np.clip(3.0 * max(bottom), 0.02 * mantle, 0.25 * mantle)), mantle)
    return win


def _phase_boundaries(ax, result, label=True, window=None):
    """Dotted lines at the mantle phase boundaries (depth axis = y), labelled with the deeper phase; labels
    closer than 5% of the axis to the previous one are left out (the line stays)."""
    layers = result.interior.phase_layers()
    lo, hi = window or (0.0, layers[-1]["bottom_depth_m"] / 1e3)
    last = -np.inf
    for layer in layers[1:]:
        depth = layer["top_depth_m"] / 1e3
        if not lo <= depth <= hi:
            continue
        ax.axhline(depth, color="0.35", ls=":", lw=0.8)
        if label and depth - last >= 0.05 * (hi - lo):
            last = depth
            ax.text(0.995, depth, layer["phase"], transform=ax.get_yaxis_transform(), ha="right", va="top",
                    fontsize=6.5, color="0.25")


def _pressure_axis(ax, result, depth_scale=None):
    """A right-hand axis with the pressure [GPa] of the depth on the left (y) axis: a twin axis on the same depth
    scale (``depth_scale``: the (forward, inverse) functions of the left axis's function scale, None for a linear
    one), its ticks placed at the depths of round pressures. (A secondary axis with depth -> pressure functions
    placed its ticks as on a linear depth axis, so on the square-root depth scale of the profiles its 150 GPa
    sat at ~420 km instead of ~1,400 km.)"""
    from matplotlib.ticker import MaxNLocator, NullLocator

    from .constants import GPA

    it = result.interior
    depth = (it.radius - it.r[it.mantle])[::-1] / 1e3  # increasing
    p = it.P[it.mantle][::-1] / GPA
    lim = ax.get_ylim()
    lo, hi = sorted(lim)
    p_lo, p_hi = np.interp([lo, hi], depth, p)
    ticks = MaxNLocator(6).tick_values(p_lo, p_hi)
    slack = 1e-3 * (p_hi - p_lo)
    ticks = ticks[(ticks >= p_lo - slack) & (ticks <= p_hi + slack)]
    labels_left = ax.yaxis.majorTicks[0].label1.get_visible()
    sec = ax.twinx()
    ax.tick_params(axis="y", labelleft=labels_left)  # twinx moves the host's ticks left and shows their labels
    sec.tick_params(axis="x", which="both", bottom=False, top=False, labelbottom=False, labeltop=False)
    if depth_scale is not None:
        sec.set_yscale("function", functions=depth_scale)
    sec.set_ylim(lim)
    ax.callbacks.connect("ylim_changed", lambda host: sec.set_ylim(host.get_ylim()))  # zoom, pan, set_ylim
    sec.set_yticks(np.interp(ticks, p, depth), [f"{t:g}" for t in ticks])
    sec.yaxis.set_minor_locator(NullLocator())
    sec.set_ylabel("pressure [GPa]")
    return sec


def _planet_event_lines(fig, axes, events, t_zero, top_ax):
    """Vertical dashed lines at the whole-planet events on every axes, with horizontal labels above
    ``top_ax``: events closer than 0.05 decades share one label; labels that would overlap are stacked in rows
    (a lower row's white box hides the leader lines of the rows above it)."""
    from .constants import YEAR

    groups = []  # [x, [kinds], when]
    for e in sorted((e for e in events if e["kind"] in PLANET_EVENTS), key=lambda e: e["time"]):
        x = max(e["time"] / YEAR, t_zero) if e["time"] > 0 else t_zero
        if groups and abs(np.log10(x / groups[-1][0])) < 0.05:
            groups[-1][1].append(e["kind"])
            continue
        groups.append([x, [e["kind"]], "t = 0" if e["time"] <= 0 else format_years(e["time"] / YEAR)])
    labels = []
    for x, kinds, when in groups:
        for ax in axes:
            ax.axvline(x, color="0.2", ls="--", lw=0.8)
        labels.append(top_ax.annotate(f"{', '.join(kinds)} ({when})", (x, 1.0), xycoords=("data", "axes fraction"),
                                      xytext=(0, 3), textcoords="offset points", ha="center", va="bottom",
                                      fontsize=7, annotation_clip=False,
                                      bbox={"facecolor": "white", "edgecolor": "none", "pad": 0.5},
                                      arrowprops={"arrowstyle": "-", "color": "0.5", "lw": 0.5}))
    stack_labels(fig, labels)
    for label in labels:  # lower rows on top
        label.set_zorder(10.0 - label.xyann[1] / 100.0)


# ---------------------------------------------------------------- the melt map
def melt_field(result, n_times: int = 240):
    """(time edges [yr], depth edges [km], melt fraction (n_times, nodes), melt fraction at t = 0) of a melt
    map: profiles rebuilt at ``n_times`` log-spaced times (:meth:`Result.profile_at_time`), cells centred on
    the times and the mantle nodes."""
    from .constants import YEAR

    times = _log_times(result, n_times)
    phi = np.array([result.profile_at_time(t)[1] for t in times])
    depth = _mantle_depth_km(result)
    t_yr = times / YEAR
    if len(t_yr) > 1:
        ratio = np.sqrt(t_yr[1:] / t_yr[:-1])
        t_edges = np.concatenate([[t_yr[0] / ratio[0]], t_yr[:-1] * ratio, [t_yr[-1] * ratio[-1]]])
    else:
        t_edges = np.array([t_yr[0] / 1.5, t_yr[0] * 1.5])
    d_edges = np.clip(np.concatenate([[depth[0]], 0.5 * (depth[1:] + depth[:-1]), [depth[-1]]]), 0.0,
                      _cmb_depth_km(result))
    return t_edges, d_edges, phi, result.profile(0)[1]


def melt_mesh(ax, t_edges, d_edges, phi, phi0, t_zero):
    """Draw a melt field (:func:`melt_field`) on ``ax``, with the t = 0 profile as a column at ``t_zero``."""
    kw = {"cmap": MELT_CMAP, "vmin": 0.0, "vmax": 1.0, "shading": "flat", "rasterized": True}
    mesh = ax.pcolormesh(t_edges, d_edges, np.ma.masked_less_equal(phi.T, 0.0), **kw)
    ax.pcolormesh([t_zero / 1.3, t_zero * 1.3], d_edges, np.ma.masked_less_equal(phi0[:, None], 0.0), **kw)
    return mesh


def build_meltmap(result, n_times: int = 240):
    """The matplotlib Figure of :func:`meltmap` (not written)."""
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch
    from matplotlib.transforms import ScaledTranslation

    from .constants import YEAR
    t_edges, d_edges, phi, phi0 = melt_field(result, n_times)
    cmb = _cmb_depth_km(result)
    t_zero = zero_position(np.sqrt(t_edges[0] * t_edges[1]), t_edges[-1])

    win = zoom_windows(result)
    rows = [k for k in ("surface", "main", "cmb") if k == "main" or win[k] is not None]
    fig = new_figure((10.5, 5.8 + 1.6 * (len(rows) - 1)))
    gs = fig.add_gridspec(len(rows), 2, width_ratios=[13, 3.4], height_ratios=[1 if r != "main" else 3 for r in rows])
    main = fig.add_subplot(gs[rows.index("main"), 0])
    panels = {"main": main}
    for r in rows:
        if r != "main":
            panels[r] = fig.add_subplot(gs[rows.index(r), 0], sharex=main)
            panels[r].set_label(f"zoom-{r}")
    strip = fig.add_subplot(gs[rows.index("main"), 1], sharey=main)
    table, events = result.tracked()
    thin = {t["layer"]: t for t in thin_layers(result)}
    min_width = MIN_DRAWN_FRACTION * cmb
    handles = [Line2D([], [], color="0.2", lw=0.9, label="layer outlines (top and bottom)")]
    for name, ax in panels.items():
        lo, hi = (0.0, cmb) if name == "main" else win[name]
        mesh = melt_mesh(ax, t_edges, d_edges, phi, phi0, t_zero)
        log_time_axis(ax, t_zero, t_edges[-1], show_labels=(ax is panels[rows[-1]]))
        ax.set_ylim(hi, lo)
        where = {"main": "", "surface": "\nnear surface", "cmb": "\nabove CMB"}[name]
        ax.set_ylabel(f"depth [km]{where}")
        for i, lid in enumerate(np.unique(table["layer"])):
            sel = table["layer"] == lid
            tt = np.where(table["time"][sel] > 0, table["time"][sel] / YEAR, t_zero)
            colour = LINE_COLOURS[i % 6]
            for col in ("top_depth", "bottom_depth"):
                ax.plot(tt, table[col][sel] / 1e3, color=colour, lw=0.9)
            if int(lid) in thin and name == "main":  # minimum drawn width, true thickness written
                top, bot = table["top_depth"][sel] / 1e3, table["bottom_depth"][sel] / 1e3
                if thin[int(lid)]["where"] == "cmb":
                    top = np.minimum(top, bot - min_width)
                else:
                    bot = np.maximum(bot, top + min_width)
                ax.fill_between(tt, top, bot, color=colour, alpha=0.45, lw=0, step="post")
                mid = float(np.sqrt(max(tt[0], t_zero) * tt[-1]))
                y = float(np.median(top if thin[int(lid)]["where"] == "cmb" else bot))
                ax.annotate(f"layer {lid}: {thin[int(lid)]['thickness_m'] / 1e3:.3g} km thick at most (drawn wider)",
                            (mid, y), xytext=(0, 4 if thin[int(lid)]["where"] == "cmb" else -4),
                            textcoords="offset points", ha="center",
                            va="bottom" if thin[int(lid)]["where"] == "cmb" else "top", fontsize=7,
                            color="k", bbox={"facecolor": "white", "alpha": 0.75, "lw": 0, "pad": 1})
        # layer events: markers at their depth; several at one place are set side by side
        seen = {}
        for e in events:
            d = e["depth"] / 1e3 if np.isfinite(e["depth"]) else np.nan
            if e["kind"] not in _EVENT_MARKERS or not lo - 1e-6 <= d <= hi + 1e-6:
                continue
            x = e["time"] / YEAR if e["time"] > 0 else t_zero
            key = (round(np.log10(x) * 40), round(d / max(hi - lo, 1e-9) * 50))
            shift = seen.get(key, 0)
            seen[key] = shift + 1
            marker = _EVENT_MARKERS[e["kind"]]
            ax.plot([x], [d], ls="none", marker=marker, ms=6.5, mfc="none" if marker in "o^vD" else "k", mec="k",
                    mew=1.1, clip_on=False, zorder=5,
                    transform=ax.transData + ScaledTranslation(7.5 * shift / 72, 0, fig.dpi_scale_trans))
        _phase_boundaries(ax, result, window=(lo, hi))
    for kind, marker in _EVENT_MARKERS.items():
        if any(e["kind"] == kind and np.isfinite(e["depth"]) for e in events):
            handles.append(Line2D([], [], ls="none", marker=marker, mfc="none" if marker in "o^vD" else "k", mec="k",
                                  label=kind))
    if thin:
        handles.append(Patch(color="0.4", alpha=0.45, label="thin layer, drawn at a minimum width"))
    fig.colorbar(mesh, ax=strip, label="melt fraction [1]", fraction=0.5, pad=0.04)
    panels[rows[-1]].set_xlabel("model time [yr] (log scale; 't = 0' marks the start)")

    zones = [z for z in result.flags() if z["top_depth_m"] < cmb * 1e3]
    kinds = list(dict.fromkeys(z["kind"] for z in zones))
    for z in zones:
        strip.bar(kinds.index(z["kind"]), (min(z["bottom_depth_m"] / 1e3, cmb) - z["top_depth_m"] / 1e3),
                  bottom=z["top_depth_m"] / 1e3, width=0.8, color=CONFIDENCE_COLOURS.get(z["confidence"], "0.5"))
    strip.set_xticks(range(len(kinds)), [_FLAG_LABELS.get(k, k.replace("-", "\n")) for k in kinds], fontsize=6.5)
    strip.set_xlim(-0.6, max(len(kinds), 1) - 0.4)
    strip.set_xlabel("flagged depths")
    strip.tick_params(axis="y", labelleft=False)
    _phase_boundaries(strip, result, label=False)
    handles += [Patch(color=c, label=f"flag confidence: {w}") for w, c in CONFIDENCE_COLOURS.items()]
    _pressure_axis(strip, result)
    fig.legend(handles=handles, loc="outside lower center", ncol=4, fontsize=7, frameon=False)
    fig.suptitle(f"{result.spec.planet.name}: where and when the mantle melts", fontsize=11)
    add_note(fig)
    _planet_event_lines(fig, list(panels.values()), events, t_zero, panels[rows[0]])
    return fig


def meltmap(result, path, *, n_times: int = 240):
    """Melt fraction against model time (log axis, with a "t = 0" column) and depth, with layers and events.

    Melt fraction from profiles rebuilt at ``n_times`` log-spaced times (state interpolated between
    steps, :meth:`meltzone.results.Result.profile_at_time`); outlines of each layer from the layer
    table; layer events marked at their depth (side by side where several coincide); whole-planet events
    as dashed lines labelled above the panels; zoom panels near the surface and the CMB where a thin layer
    lies (:func:`zoom_windows`); a strip at the right shows the flagged zones coloured by confidence.

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
    return _save_new(build_meltmap, path, result, n_times)


# ---------------------------------------------------------------- temperature profiles
#: Two profiles closer than this everywhere [K] are drawn once (the later one is left out; this model's choice,
#: below the width of a drawn line at the usual temperature axis of a few thousand K).
SAME_PROFILE_K = 15.0


def profile_times(result, n: int = 5) -> list[tuple[float, str]]:
    """(time [s], label) of the default profiles: the start, the events that matter (magma-ocean end, the
    rheological transition, the end of the basal layer, the last melt, a reformed magma ocean), then ``n``
    log-spaced times; profiles that coincide within :data:`SAME_PROFILE_K` are kept once, event labels first."""
    from .constants import YEAR

    t_end = float(result.time[-1])
    chosen = [(float(result.time[0]), "start")]
    names = {"magma-ocean-ended": "magma-ocean end", "magma-ocean-reformed": "magma ocean forms again",
             "last-melt": "last melt"}
    events = result.tracked()[1]
    chosen += [(e["time"], names[e["kind"]]) for e in events if e["kind"] in names]
    for when in result.history.switch_times.values():
        if when is not None and np.isfinite(when):
            chosen.append((float(when), "rheological transition"))
    basal = result.summary()["basal_layer"]
    if basal is not None and basal["end_yr"] is not None:
        chosen.append((basal["end_yr"] * YEAR, "basal layer ends"))
    chosen += [(float(t), "") for t in _log_times(result, n)]
    kept, temps = [], []
    for t, label in chosen:
        t = min(max(t, float(result.time[0])), t_end)
        temp = result.profile_at_time(t)[0]
        same = [i for i, other in enumerate(temps) if np.max(np.abs(other - temp)) < SAME_PROFILE_K]
        if same:
            i = same[0]
            if label and label not in kept[i][1]:
                kept[i] = (kept[i][0], ", ".join(x for x in (kept[i][1], label) if x))
            continue
        kept.append((t, label))
        temps.append(temp)
    return sorted(kept)


#: the (forward, inverse) functions of the square-root depth scale
SQRT_DEPTH = (lambda d: np.sqrt(np.clip(d, 0.0, None)), lambda s: np.square(s))


def _sqrt_depth_axis(ax, cmb: float) -> None:
    """A depth axis [km] on a square-root scale with round ticks (the top 10% of the mantle takes ~30% of it)."""
    from matplotlib.ticker import FixedLocator

    ax.set_yscale("function", functions=SQRT_DEPTH)
    ticks = [d for d in (0, 50, 100, 200, 400, 700, 1000, 1500, 2000, 3000, 4000, 5000, 6000, 8000)
             if d <= cmb * 0.97] + [round(cmb)]
    ax.yaxis.set_major_locator(FixedLocator(ticks))


def build_profiles(result, times_yr=None, n: int = 5):
    """The matplotlib Figure of :func:`profiles` (not written)."""
    from matplotlib import colormaps
    from matplotlib.patches import Patch

    from .constants import YEAR

    t_end = result.time[-1]
    if times_yr is None:
        chosen = profile_times(result, n)
    else:
        times = np.asarray(times_yr, dtype=float) * YEAR
        if np.any((times < result.time[0]) | (times > t_end * (1 + 1e-12))):
            raise MeltzoneError(f"profile times must lie within the run (0 - {t_end / YEAR:.4g} yr)")
        chosen = [(float(min(t, t_end)), "") for t in times]
    depth = _mantle_depth_km(result)
    cmb = _cmb_depth_km(result)
    grid = result.history.grid
    win = zoom_windows(result)
    cols = ["main"] + [k for k in ("surface", "cmb") if win[k] is not None]
    fig = new_figure((7.5 + 3.0 * (len(cols) - 1), 6.8))
    axes = fig.subplots(1, len(cols), squeeze=False, gridspec_kw={"width_ratios": [3] + [2] * (len(cols) - 1)})[0]
    flagged = [z for z in result.flags() if z["kind"] == "extrapolated-melting"]
    styles, n_event, n_log = [], 0, sum(1 for _, label in chosen if not label)
    for t, label in chosen:  # the start black, events in palette colours (dashed), log-spaced times in viridis
        if t == result.time[0] and label:
            styles.append({"color": "k", "lw": 1.6, "ls": "-"})
        elif label:
            styles.append({"color": LINE_COLOURS[(2 + n_event) % 6], "lw": 1.6, "ls": (0, (5, 2))})
            n_event += 1
        else:
            styles.append({"color": colormaps["viridis"](0.85 * (len(styles) - n_event - 1) / max(n_log - 1, 1)),
                           "lw": 1.3, "ls": "-"})
    handles = []
    for name, ax in zip(cols, axes):
        lo, hi = (0.0, cmb) if name == "main" else win[name]
        if name != "main":
            ax.set_label(f"zoom-{name}")
        for z in flagged:
            ax.axhspan(z["top_depth_m"] / 1e3, min(z["bottom_depth_m"] / 1e3, cmb), color="0.5", alpha=0.12, lw=0)
        ax.fill_betweenx(depth, grid.solidus, grid.liquidus, color=OKABE_ITO["orange"], alpha=0.18, lw=0)
        curves = [ax.plot(grid.solidus, depth, color=OKABE_ITO["blue"], lw=2.2, label="solidus")[0],
                  ax.plot(grid.liquidus, depth, color=OKABE_ITO["vermillion"], lw=2.2, label="liquidus")[0]]
        if name == "main":
            handles += curves
        spacing = float(np.max(np.abs(np.diff(depth))))
        inside = (depth >= lo - spacing) & (depth <= hi + spacing)
        t_min, t_max = float(np.min(grid.solidus[inside])), float(np.max(grid.liquidus[inside]))
        for (t, label), style in zip(chosen, styles):
            temp, _ = result.profile_at_time(t)
            when = "t = 0" if t == 0.0 else format_years(t / YEAR)
            line = ax.plot(temp, depth, label=f"T at {when}" + (f": {label}" if label else ""), **style)[0]
            if name == "main":
                handles.append(line)
            t_min, t_max = min(t_min, float(np.min(temp[inside]))), max(t_max, float(np.max(temp[inside])))
        _phase_boundaries(ax, result, window=(lo, hi))
        ax.set_ylim(hi, lo)
        if name == "main":  # square-root depth: the upper mantle, where melting under a lid happens, gets room
            _sqrt_depth_axis(ax, cmb)
        else:
            pad = 0.05 * (t_max - t_min)
            ax.set_xlim(t_min - pad, t_max + pad)
            ax.set_title("near the surface" if name == "surface" else "above the CMB", fontsize=9)
        ax.set_xlabel("temperature [K]")
        ax.set_ylabel("depth [km]")
    handles.insert(2, Patch(color=OKABE_ITO["orange"], alpha=0.3, label="partial melting (solidus to liquidus)"))
    if flagged:
        handles.append(Patch(color="0.5", alpha=0.25, label="melting curves extrapolated"))
    _pressure_axis(axes[0], result, SQRT_DEPTH)
    fig.legend(handles=handles, loc="outside lower left", ncol=3, fontsize=7, frameon=False)
    fig.suptitle(f"{result.spec.planet.name}: temperature profiles", fontsize=11)
    add_note(fig)
    return fig


def profiles(result, path, *, times_yr=None, n: int = 5):
    """Temperature against depth at the events that matter and at log-spaced times, with the solidus,
    liquidus and phase boundaries; zoom panels near the surface and the CMB where a thin layer lies.

    Parameters
    ----------
    result : meltzone.results.Result
        A run (fresh or loaded).
    path : str or Path
        Output file; ``.png``, ``.pdf`` or ``.svg``.
    times_yr : sequence of float, optional
        Model times [yr]; default: :func:`profile_times` (the start, the events, ``n`` log-spaced times,
        without duplicates).
    n : int
        Number of log-spaced default times.

    Returns
    -------
    Path
        The file written.
    """
    return _save_new(build_profiles, path, result, times_yr, n)


# ---------------------------------------------------------------- thermal history
def _has_atmosphere(result) -> bool:
    """True for a run with an atmosphere model, or any volatile in the atmosphere."""
    h = result.history
    return (str(result.spec.surface.atmosphere) != "none"
            or any(np.any(h[k] > 0.0) for k in ("atmosphere_h2o", "atmosphere_co2")))


#: Factors from the History's SI units to the units a history panel shows (by the panel label's unit).
UNIT_SCALE = {"[km]": 1e-3, "[km^3/yr]": _YEAR / 1e9, "[kg/yr]": _YEAR}


def _surface_panels(h) -> list:
    """The atmosphere's panels of a run with the surface series: partial pressures; outgoing radiation against the
    absorbed stellar flux; water in the ocean, in the melt and lost to space (only the ones that are not all 0)."""
    out = []
    groups = [("partial pressure [Pa]", [("pressure_h2o", "H2O", "-"), ("pressure_co2", "CO2", "-")]),
              ("radiation [W/m^2]", [("outgoing_radiation", "outgoing (top of atmosphere)", "-"),
                                     ("absorbed_flux", "absorbed stellar flux", (0, (4, 2)))]),
              ("water [kg]", [("water_ocean", "surface ocean", "-"), ("water_dissolved", "dissolved in the melt", "-"),
                              ("water_lost", "lost to space", "-")])]
    for ylabel, series in groups:
        shown = [item for item in series if item[0] in h and np.any(h[item[0]] > 0.0)]
        if shown:
            out.append((ylabel, "log", shown))
    return out


def build_history(result):
    """The matplotlib Figure of :func:`history` (not written)."""
    from .constants import YEAR

    h = result.history
    keep = h["time"] >= _first_time(result)
    t = h["time"][keep] / YEAR
    t_zero = zero_position(t[0], t[-1])

    def positive(values):
        return np.where(values > 0.0, values, np.nan)

    panels = [
        ("temperature [K]", "linear", [("upper_temperature", "upper mantle (potential)", "-"),
                                       ("core_temperature", "top of the core", "-"),
                                       ("lid_base_temperature", "base of the lid", (0, (4, 2))),
                                       ("surface_temperature", "surface", "-")]),
        ("heat flow [W]", "log", [("surface_heat_flow", "surface", "-"), ("cmb_heat_flow", "core-mantle boundary", "-"),
                                  ("radiogenic_power", "radiogenic heating", "-")]),
        ("melt mass [kg]", "log", [("melt_mass", "melt in the mantle", "-")]),
        ("thickness, radius [km]", "linear", [("lid_thickness", "stagnant lid", "-"),
                                             ("inner_core_radius", "inner-core radius", "-"),
                                             ("crust_thickness", "crust", "-")]),
    ]
    # volcanism: melt extraction and the outgassing of its erupted part (the mixing-length scheme records only
    # the extraction)
    for ylabel, series in (("melt production [km^3/yr]", [("melt_production", "extracted melt", "-")]),
                           ("outgassing [kg/yr]", [("outgassing_h2o_rate", "H2O", "-"),
                                                   ("outgassing_co2_rate", "CO2", "-")])):
        some = any(np.any(h[name] > 0.0) for name, _, _ in series if name in h)
        panels.append((ylabel, "log" if some else "linear", series))
    if _has_atmosphere(result):
        some = any(np.any(h[k] > 0.0) for k in ("atmosphere_h2o", "atmosphere_co2"))
        panels.append(("atmosphere [kg]", "log" if some else "linear",
                       [("atmosphere_h2o", "H2O in the atmosphere", "-"),
                        ("atmosphere_co2", "CO2 in the atmosphere", "-")]))
        panels += _surface_panels(h)
    # the series a run does not record are left out, and so are panels left empty (the mixing-length scheme has
    # no lid-base temperature, crust or outgassing; a run without volcanism no volcanism series)
    panels = [(ylabel, scale, [item for item in series if item[0] in h]) for ylabel, scale, series in panels]
    panels = [panel for panel in panels if panel[2]]
    fig = new_figure((9.0, 2.1 * len(panels) + 1.4))
    axes = fig.subplots(len(panels), 1, sharex=True)
    for ax, (ylabel, scale, series) in zip(axes, panels):
        for i, (name, label, line) in enumerate(series):
            scale_by = UNIT_SCALE.get(ylabel[ylabel.rfind("["):], 1.0)
            values = h[name] * scale_by
            colour = LINE_COLOURS[i]
            ax.plot(t, positive(values[keep]) if scale == "log" else values[keep], ls=line, color=colour,
                    label=label)
            if (values[0] > 0 or scale != "log") and h["time"][0] == 0.0:
                ax.plot([t_zero], [values[0]], ls="none", marker="o", mfc="none", mec=colour, ms=5, clip_on=False)
        ax.set_yscale(scale)
        low, high = ax.get_ylim()
        if scale == "log" and high > 10.0 * low:  # decades are labelled: minor labels (2, 3, 4 x 10^n) collide
            from matplotlib.ticker import NullFormatter
            ax.yaxis.set_minor_formatter(NullFormatter())
        ax.set_ylabel(ylabel)
        ax.legend(fontsize=7, loc="center left", bbox_to_anchor=(1.01, 0.5), frameon=False)
        ax.grid(alpha=0.3, which="major")
        log_time_axis(ax, t_zero, t[-1], show_labels=ax is axes[-1])
    axes[-1].set_xlabel("model time [yr] (log scale; open circles: the values at t = 0)")
    fig.suptitle(f"{result.spec.planet.name}: thermal history", fontsize=11)
    add_note(fig)
    _planet_event_lines(fig, list(axes), result.tracked()[1], t_zero, axes[0])
    return fig


def history(result, path):
    """Temperatures, heat flows, melt mass, lid and crust thickness and inner-core radius (and, for a planet
    with an atmosphere, its H2O and CO2; with volcanism, melt production and outgassing) against model time on a log axis with the values at t = 0; ``result`` and
    ``path`` as in :func:`meltmap`; returns the file written."""
    return _save_new(build_history, path, result)


#: Builders of the run figures, by name.
BUILDERS = {"meltmap": build_meltmap, "profiles": build_profiles, "history": build_history}


def plot_run(result, figure: str, path):
    """Draw one of :data:`RUN_FIGURES` of a run to ``path``."""
    if figure not in BUILDERS:
        raise MeltzoneError(f"unknown figure {figure!r}; choose one of {', '.join(RUN_FIGURES)}")
    return _save_new(BUILDERS[figure], path, result)
