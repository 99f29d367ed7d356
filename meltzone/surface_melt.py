"""Melt that reaches the surface: how deep it goes at every recorded step, and the summary outcomes of a lava
world (a planet whose surface stays above the solidus, e.g. under a hot equilibrium temperature).

Works on a :class:`~meltzone.evolution.contract.History` only (the profiles T and phi on the mantle nodes),
so it serves every scheme. Depths are measured from the top node (the surface) to where the region ends:
the edge lies where T - T_sol (melt) or T - T_liq (fully molten) crosses zero between the region's last node
and its neighbour below (linear interpolation, as for the melt layers of :mod:`meltzone.layers`), at the CMB
node when the region reaches it. NaN (None in the summary) where the top node has no melt, or is not fully
molten: nothing reached the surface.
"""

from __future__ import annotations

import numpy as np


def _depth_from_top(inside: np.ndarray, excess: np.ndarray, r: np.ndarray) -> np.ndarray:
    """Depth [m] of the bottom of the run of ``inside`` nodes that starts at the top node, per step (rows);
    NaN where the top node is not inside. ``excess`` (> 0 inside) places the edge between nodes."""
    steps, n = inside.shape
    rows = np.arange(steps)
    rev = inside[:, ::-1]
    whole = rev.all(axis=1)
    first_out = np.where(whole, n, np.argmin(rev, axis=1))  # nodes inside counted from the top
    last_in = np.clip(n - first_out, 0, n - 1)
    below = np.clip(last_in - 1, 0, n - 1)
    e0 = excess[rows, last_in]
    e1 = excess[rows, below]
    cross = ~whole & (e0 - e1 > 0.0)
    f = np.where(cross, np.clip(e0 / np.where(cross, e0 - e1, 1.0), 0.0, 1.0), 0.0)
    r_edge = r[last_in] + f * (r[below] - r[last_in])
    return np.where(rev[:, 0], r[-1] - r_edge, np.nan)


def depths(history) -> dict:
    """Series over the recorded steps [m]: ``melt_depth`` (the melt region that reaches the surface, phi > 0)
    and ``molten_depth`` (its fully molten part from the surface, phi >= 1); NaN where the surface has none."""
    g = history.grid
    temp = np.asarray(history.temperature)
    phi = np.asarray(history.melt_fraction)
    return {"melt_depth": _depth_from_top(phi > 0.0, temp - g.solidus, g.radius),
            "molten_depth": _depth_from_top(phi >= 1.0, temp - g.liquidus, g.radius)}


def _value(x: float):
    return None if not np.isfinite(x) else float(x)


def summary(history) -> dict:
    """Summary outcomes (SI; None where nothing reached the surface): whether the surface is above the solidus
    at the end (a lava world when the magma ocean also persists), how deep the surface's melt and its fully
    molten part reach at the end, and the greatest depth the surface's melt reached over the run."""
    d = depths(history)
    melt = d["melt_depth"]
    return {"surface_above_solidus_at_end": bool(np.isfinite(melt[-1])),
            "surface_melt_depth_at_end_m": _value(melt[-1]),
            "surface_molten_depth_at_end_m": _value(d["molten_depth"][-1]),
            "max_surface_melt_depth_m": _value(np.nanmax(melt)) if np.any(np.isfinite(melt)) else None}
