"""Melt layers through time: identity by overlap, events with refined times, and the run's summary.

Input: the :class:`~meltzone.evolution.contract.History` of a run (wrapped in a Result): its per-step melt
intervals (contiguous runs of mantle nodes with melt fraction phi > 0), the temperature on every mantle node
at every step, the mantle grid with its solidus, and its in-step evaluator.

* Edges: a layer's top and bottom lie where T - T_sol crosses zero between its
  last molten node and the solid neighbour (linear interpolation), so layers
  thinner than a node spacing keep a thickness.
* Identity: a layer at step s continues the layer(s) of step s-1 whose node
  ranges overlap it. One-to-one overlap keeps the id; when one layer overlaps
  several at the next step it *split* (the largest by melt mass keeps the id);
  when several overlap one they *merged* (the id of the largest survives).
  An interval with no predecessor *formed*; a layer with no successor *froze*.
* Events: formed, froze, split (its layer is the new piece), merged (its layer
  is the one absorbed), reached-surface, reached-cmb (per layer), and the regime events magma-ocean-ended (melt fraction at the top of
  the mantle fell below the rheological transition), magma-ocean-reformed (a solidified mantle warmed until
  its isentropic melt fraction at the top passed it again), stagnant-lid-formed,
  inner-core-nucleated and last-melt.
* Event times of formed, froze, last-melt, magma-ocean-ended, magma-ocean-reformed and
  inner-core-nucleated are refined inside their step: the scheme's evaluator
  (:meth:`History.at`) gives T(r), the regime's melt fraction and the centre's
  freezing margin at any time, and the crossing is found with
  scipy.optimize.brentq to ``EVENT_TIME_TOLERANCE`` of the step length.
  The other events are given at the end of the step that shows them.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import brentq

from . import magma_ocean
from . import surface_melt
from .constants import YEAR
from .water import water_outcomes
from .volcanics import volcanism_outcomes

#: Relative tolerance (of the step length) to which event times are refined.
EVENT_TIME_TOLERANCE = 1e-6

EVENT_KINDS = ("formed", "froze", "split", "merged", "reached-surface", "reached-cmb", "magma-ocean-ended",
               "magma-ocean-reformed", "stagnant-lid-formed", "inner-core-nucleated", "last-melt")


def interval_edges(intervals: dict, temperature: np.ndarray, grid) -> np.ndarray:
    """Sub-node edges of every melt interval: rows (r_top, P_top, r_bottom, P_bottom) where T - T_sol crosses
    zero between the interval's end node and its solid neighbour (linear interpolation), the node itself at the
    surface or the CMB. ``temperature``: the history's (steps, nodes) profiles; ``grid``: its MantleGrid."""
    n = grid.n
    step = np.asarray(intervals["step"], dtype=np.int64)
    out = np.empty((len(step), 4))
    for side, (key, offset) in enumerate((("top_node", 1), ("bottom_node", -1))):
        node = np.asarray(intervals[key], dtype=np.int64)
        nb = node + offset
        inside = (nb >= 0) & (nb < n)
        nbc = np.clip(nb, 0, n - 1)
        e0 = temperature[step, node] - grid.solidus[node]
        e1 = temperature[step, nbc] - grid.solidus[nbc]
        cross = inside & (e0 > 0.0) & (e1 <= 0.0)
        f = np.where(cross, e0 / np.where(cross, e0 - e1, 1.0), 0.0)
        r, p = grid.radius[node], grid.pressure[node]
        out[:, 2 * side] = np.where(cross, r + f * (grid.radius[nbc] - r), r)
        out[:, 2 * side + 1] = np.where(cross, p + f * (grid.pressure[nbc] - p), p)
    return out


def _refine(fn, t0, t1):
    """Root of fn in [t0, t1] (fn(t0) and fn(t1) of opposite sign), else the end of the step."""
    f0, f1 = fn(t0), fn(t1)
    if not (np.isfinite(f0) and np.isfinite(f1)) or f0 == 0.0 or f0 * f1 > 0.0:
        return t1
    return brentq(fn, t0, t1, xtol=max(EVENT_TIME_TOLERANCE * (t1 - t0), 1e-3), rtol=1e-15)


def track(result):
    """Layer table rows and the event list of a Result.

    Returns ``(rows, events)``: ``rows`` a dict of arrays (one entry per layer per step) and
    ``events`` a list of dicts {time, kind, layer, depth, pressure} in SI units (layer -1 for
    regime events), sorted by time.
    """
    it = result.interior
    r_nodes = result.history.grid.radius  # the scheme's cells (the mixing-length scheme refines the top)
    p_nodes = result.history.grid.pressure
    n_nodes = len(r_nodes)
    radius = it.radius
    h = result.history
    t = h.time
    iv = result.intervals
    tsol = h.grid.solidus

    steps = iv["step"]
    bottom_l = iv["bottom_node"].tolist()
    top_l = iv["top_node"].tolist()
    mass_l = iv["melt_mass"].tolist()
    t_l = t.tolist()
    order = np.argsort(steps, kind="stable")
    by_step: dict[int, list[int]] = {}
    for idx in order:
        by_step.setdefault(int(steps[idx]), []).append(int(idx))

    row_interval: list[int] = []
    row_layer: list[int] = []
    events = []
    next_id = 0
    prev: list[tuple[int, int, int, float]] = []  # (layer id, bottom node, top node, mass)
    edges = interval_edges(iv, h.temperature, h.grid)
    touched_surface: set[int] = set()
    touched_cmb: set[int] = set()

    def depth_of(node):
        return float(radius - r_nodes[node])

    def add_event(time, kind, layer, node):
        events.append({"time": float(time), "kind": kind, "layer": int(layer),
                       "depth": depth_of(node) if node is not None else float("nan"),
                       "pressure": float(p_nodes[node]) if node is not None else float("nan")})

    def excess(tt, lo, hi):
        temp = h.at(tt).temperature
        return float(np.max(temp[lo:hi + 1] - tsol[lo:hi + 1]))

    for s in range(len(t)):
        cur = [(bottom_l[idx], top_l[idx], mass_l[idx], idx) for idx in by_step.get(s, [])]
        # overlaps (node ranges, with a one-node tolerance so that neighbours count as touching)
        links_cur = [[j for j, p in enumerate(prev) if p[1] <= c[1] + 1 and c[0] <= p[2] + 1] for c in cur]
        links_prev = [[i for i, lc in enumerate(links_cur) if j in lc] for j in range(len(prev))]
        ids = [-1] * len(cur)
        # merges first: a current interval fed by several previous layers keeps the largest id
        for i, lc in enumerate(links_cur):
            if len(lc) >= 1:
                best = max(lc, key=lambda j: prev[j][3])
                ids[i] = prev[best][0]
                if len(lc) > 1:
                    for j in lc:
                        if j != best:
                            add_event(t_l[s], "merged", prev[j][0], cur[i][1])
        # splits: a previous layer feeding several current intervals keeps its id on the largest
        for j, lp in enumerate(links_prev):
            if len(lp) > 1:
                keep = max(lp, key=lambda i: cur[i][2])
                for i in lp:
                    if i != keep and ids[i] == prev[j][0]:
                        ids[i] = next_id
                        next_id += 1
                        add_event(t_l[s], "split", ids[i], cur[i][1])
        for i, c in enumerate(cur):
            if ids[i] < 0:
                ids[i] = next_id
                next_id += 1
                when = t[s]
                if s > 0:
                    lo, hi = max(c[0] - 1, 0), min(c[1] + 1, n_nodes - 1)
                    when = _refine(lambda tt: excess(tt, lo, hi), t[s - 1], t[s])
                add_event(when, "formed", ids[i], c[1])
        for j, lp in enumerate(links_prev):
            if not lp:
                b, tp = prev[j][1], prev[j][2]
                lo, hi = max(b - 1, 0), min(tp + 1, n_nodes - 1)
                when = _refine(lambda tt: excess(tt, lo, hi), t[s - 1], t[s])
                add_event(when, "froze", prev[j][0], tp)
        for i, c in enumerate(cur):
            lid = ids[i]
            if c[1] == n_nodes - 1 and lid not in touched_surface:
                touched_surface.add(lid)
                add_event(t_l[s], "reached-surface", lid, c[1])
            if c[0] == 0 and lid not in touched_cmb:
                touched_cmb.add(lid)
                add_event(t_l[s], "reached-cmb", lid, c[0])
            row_interval.append(c[3])
            row_layer.append(lid)
        prev = [(ids[i], c[0], c[1], c[2]) for i, c in enumerate(cur)]

    _regime_events(h, add_event, n_nodes)
    events.sort(key=lambda e: (e["time"], EVENT_KINDS.index(e["kind"])))
    sel = np.asarray(row_interval, dtype=np.int64)
    steps_sel = iv["step"][sel].astype(np.int64)
    e = edges[sel]

    def node_depth(nodes):
        nodes = np.asarray(nodes, dtype=np.int64)
        return np.where(nodes >= 0, radius - r_nodes[np.maximum(nodes, 0)], np.nan)

    table = {
        "layer": np.asarray(row_layer, dtype=np.int64),
        "step": steps_sel,
        "time": t[steps_sel].astype(np.float64),
        "top_radius": e[:, 0].copy(),
        "bottom_radius": e[:, 2].copy(),
        "top_depth": radius - e[:, 0],
        "bottom_depth": radius - e[:, 2],
        "top_pressure": e[:, 1].copy(),
        "bottom_pressure": e[:, 3].copy(),
        "max_melt_fraction": iv["max_melt_fraction"][sel].astype(np.float64),
        "mean_melt_fraction": iv["mean_melt_fraction"][sel].astype(np.float64),
        "melt_mass": iv["melt_mass"][sel].astype(np.float64),
        "full_top_depth": node_depth(iv["full_top_node"][sel]),
        "full_bottom_depth": node_depth(iv["full_bottom_node"][sel]),
    }
    return table, events


def _regime_events(h, add_event, n_nodes):
    t = h.time
    regime = h["regime"]
    top = n_nodes - 1
    for when, kind in magma_ocean.transitions(h, _refine):  # surface and mass criteria (magma_ocean.py)
        add_event(when, kind, -1, top)
    for s in range(1, len(t)):
        if regime[s] == 2 and regime[s - 1] != 2:
            add_event(t[s], "stagnant-lid-formed", -1, top)
    ric = h["inner_core_radius"]
    if ric[0] <= 0.0 and np.any(ric > 0.0):
        s = int(np.argmax(ric > 0.0))
        add_event(_refine(lambda tt: h.at(tt).centre_freezing_margin_k, t[s - 1], t[s]), "inner-core-nucleated",
                  -1, None)
    # melt is present while the profile shows some, or while the top of the adiabat is still above the
    # rheological transition (a magma ocean whose shallow melt the upper boundary layer hides)
    melt = np.where(regime == 0, np.inf, h["melt_mass"])
    if melt[-1] <= 0.0 and np.any(melt > 0.0):
        s = int(len(melt) - np.argmax(melt[::-1] > 0.0))  # first step of the final melt-free stretch
        add_event(_refine(lambda tt: float(np.max(h.at(tt).temperature - h.grid.solidus)), t[s - 1], t[s]),
                  "last-melt", -1, None)


#: Largest |relative energy-closure error| a run may end with and still count as closed; a run above it is
#: reported with a warning (``energy_closure_ok`` false). Good runs close to ~1e-13; this model's choice.
ENERGY_CLOSURE_TOLERANCE = 1e-6


def summarize(result, table=None, events=None) -> dict:
    """JSON-ready summary of a run (SI, with times in years where the key says ``_yr``).

    Null (None) means "did not happen" or "has not ended by the end of the run"; the flags next to each time
    tell which: ``magma_ocean_at_start`` / ``magma_ocean_at_end`` for ``magma_ocean_end_yr``, ``melt_at_end``
    (and ``n_layers``) for ``last_melt_yr``. ``basal_layer`` is None unless a basal melt layer exists after
    the surface magma ocean has ended (see :func:`basal_layer`).

    A magma ocean is reported while the regime is the magma ocean (the top's melt fraction above phi_c) and at
    least 1% of the mantle's mass is above phi_c (:mod:`meltzone.magma_ocean`): ``magma_ocean_end_yr``,
    ``magma_ocean_reformed_yr``, ``magma_ocean_at_start`` and ``magma_ocean_at_end`` use both criteria;
    ``surface_magma_ocean_end_yr`` and ``surface_magma_ocean_reformed_yr`` the regime alone.
    """
    if table is None or events is None:
        table, events = track(result)
    h = result.history
    it = result.interior
    _, mo_state = magma_ocean.states(h)
    at_start = bool(mo_state[0])
    surface_end, surface_again = magma_ocean.surface_times(h, _refine)
    ends = [e["time"] for e in events if e["kind"] == "magma-ocean-ended"]
    # the first magma ocean: none when the run starts below the transition (a later one is "reformed")
    mo_end = ends[0] / YEAR if at_start and ends else None
    again = [e["time"] for e in events if e["kind"] == "magma-ocean-reformed"]
    last = [e["time"] for e in events if e["kind"] == "last-melt"]
    still = bool(h["melt_mass"][-1] > 0 or h["regime"][-1] == 0)
    last_melt = last[-1] / YEAR if last and not still else None
    mo_end_s = None if not at_start else (ends[0] if ends else None)
    basal = basal_layer(result, table, events, after_s=0.0 if not at_start else mo_end_s)
    n_layers = int(len(np.unique(table["layer"]))) if len(table["layer"]) else 0
    closure = float(result.energy_closure)
    rheo = rheological_transition(result)
    per_step = np.bincount(np.asarray(result.intervals["step"], dtype=np.int64), minlength=len(h["time"]))
    return {
        "planet": result.spec.planet.name,
        "mass_kg": it.mass,
        "radius_m": it.radius,
        "magma_ocean_at_start": at_start,
        "magma_ocean_end_yr": mo_end,
        "magma_ocean_reformed_yr": again[0] / YEAR if again else None,
        "magma_ocean_at_end": bool(mo_state[-1]),
        "surface_magma_ocean_end_yr": None if surface_end is None else surface_end / YEAR,
        "surface_magma_ocean_reformed_yr": None if surface_again is None else surface_again / YEAR,
        "last_melt_yr": last_melt,
        "melt_at_end": still,
        "basal_layer": basal,
        "rheological_transition_yr": None if rheo is None else rheo / YEAR,
        "first_crystal_depth_m": first_crystal_depth(result),
        "max_simultaneous_layers": int(per_step.max()) if len(per_step) else 0,
        "final_upper_temperature_k": float(h["upper_temperature"][-1]),
        "final_surface_heat_flow_w": float(h["surface_heat_flow"][-1]),
        "final_cmb_heat_flow_w": float(h["cmb_heat_flow"][-1]),
        "inner_core_radius_m": float(h["inner_core_radius"][-1]),
        "n_layers": n_layers,
        "max_melt_depth_m": float(np.max(table["bottom_depth"])) if n_layers else None,
        "max_melt_pressure_pa": float(np.max(table["bottom_pressure"])) if n_layers else None,
        # melt that reaches the surface (lava worlds): at the end, and its greatest depth over the run
        **surface_melt.summary(h),
        "energy_closure": closure,
        "energy_closure_ok": bool(closure <= ENERGY_CLOSURE_TOLERANCE),
        "end_time_yr": float(h["time"][-1] / YEAR),
        # the core: when the inner core nucleated (0 when the run starts with one) and when the core was solid
        **core_times(result, events),
        # water: the ocean, the escape and the solidification type (meltzone.water)
        **water_outcomes(result, mo_end_s),
        # volcanism: when it ended, crust, outgassed H2O and CO2 (None without melt extraction)
        **volcanism_outcomes(result),
        "events": [{"time_yr": e["time"] / YEAR, "kind": e["kind"], "layer": e["layer"],
                    "depth_m": None if math.isnan(e["depth"]) else e["depth"],
                    "pressure_pa": None if math.isnan(e["pressure"]) else e["pressure"]} for e in events],
    }


def rheological_transition(result):
    """Model time [s] at which no mantle node is above the critical melt fraction any more (the whole mantle
    has passed the rheological transition; Abe 1997, PEPI 100:27; Solomatov 2015), refined inside its step;
    None when some node is above it at the end, or when none was at the start (nothing happened)."""
    h = result.history
    phi_c = h.critical_melt_fraction
    above = np.max(h.melt_fraction, axis=1) > phi_c
    if not above[0] or above[-1]:
        return None
    s = int(len(above) - np.argmax(above[::-1]))  # first step of the final stretch with none above
    t = h.time
    return _refine(lambda tt: float(np.max(h.at(tt).melt_fraction)) - phi_c, t[s - 1], t[s])


def first_crystal_depth(result):
    """Depth [m] where crystallisation starts: of the mantle nodes fully molten at the start, the one whose
    melt fraction first falls below 1 (the most crystallised when several do so in the same step); None when no
    node starts fully molten or none has crystallised by the end."""
    h = result.history
    phi = h.melt_fraction
    molten = phi[0] >= 1.0
    if not np.any(molten):
        return None
    below = (phi < 1.0) & molten
    steps = np.where(below.any(axis=0), np.argmax(below, axis=0), len(phi))
    first = int(steps.min())
    if first >= len(phi):
        return None
    candidates = np.flatnonzero(steps == first)
    node = int(candidates[np.argmin(phi[first, candidates])])
    return float(result.interior.radius - h.grid.radius[node])


def core_times(result, events) -> dict:
    """``inner_core_nucleation_yr`` (the inner-core-nucleated event; 0 when the run starts with an inner core) and
    ``core_solid_yr`` (end of the step at which the inner core first fills the core), None when it never
    happened."""
    h = result.history
    ric = np.asarray(h["inner_core_radius"], dtype=float)
    nucleated = [e["time"] for e in events if e["kind"] == "inner-core-nucleated"]
    start = 0.0 if len(ric) and ric[0] > 0.0 else (nucleated[0] / YEAR if nucleated else None)
    r_core = result.interior.core_radius
    solid = (ric >= r_core * (1.0 - 1e-9)) if r_core > 0.0 else np.zeros(len(ric), dtype=bool)
    return {"inner_core_nucleation_yr": start,
            "core_solid_yr": float(h.time[int(np.argmax(solid))] / YEAR) if solid.any() else None}


#: History series a scheme with a basal magma ocean of its own fills (preferred over the layer table).
BASAL_SERIES = "basal_ocean_thickness"


def _basal_from_series(result, table, after_s):
    """The basal layer from the scheme's own basal-ocean thickness series (see :func:`basal_layer`): it starts at
    the first step with a thickness > 0 and ends at the first step of the final stretch without one (None if it
    outlives the run); ``layer`` is the melt layer of the layer table on the CMB at its first step at or after
    ``after_s`` (None if the table has none there: the mantle's melt law does not know the ocean's enrichment)."""
    h = result.history
    th = np.asarray(h[BASAL_SERIES], dtype=float)
    t = h.time
    alive = th > 0.0
    if not alive.any() or not np.any(alive & (t >= after_s)):
        return None
    first = int(np.argmax(alive))
    end = None
    if not alive[-1]:
        end = float(t[int(len(alive) - np.argmax(alive[::-1]))])
    own = int(np.argmax(alive & (t >= after_s)))  # first step of the ocean once the surface ocean has ended
    cmb_depth = result.interior.radius - result.interior.core_radius
    rows = (np.asarray(table["step"]) == own) & np.isclose(table["bottom_depth"], cmb_depth, rtol=0, atol=1.0)
    return {"layer": int(table["layer"][int(np.argmax(rows))]) if rows.any() else None,
            "start_yr": float(t[first] / YEAR), "end_yr": None if end is None else end / YEAR,
            "max_thickness_m": float(th.max())}


def basal_layer(result, table, events, after_s=0.0):
    """The basal melt layer: a melt layer that sits on the core-mantle boundary, is not connected to the
    surface, and still exists at or after model time ``after_s`` [s] (the end of the surface magma ocean;
    0 for a run that starts solid; None when the magma ocean never ends, so that there is no basal layer of
    its own to report). A melt region that is only the deep end of a surface magma ocean does not count.

    Returns None or {layer, start_yr, end_yr, max_thickness_m}: ``start_yr`` is when that layer first sat on
    the CMB apart from any surface melt (it may separate while the magma ocean still lasts), ``end_yr`` when
    it froze or merged into another layer (None if it outlives the run), ``max_thickness_m`` its largest
    thickness on the CMB (edges interpolated between nodes). A scheme with a basal magma ocean of its own
    (series ``basal_ocean_thickness``) is read from that series instead (:func:`_basal_from_series`)."""
    it = result.interior
    cmb_depth = it.radius - it.core_radius
    if after_s is not None and BASAL_SERIES in result.history:
        return _basal_from_series(result, table, after_s)
    if after_s is None or not len(table["layer"]):
        return None
    basal_rows = (np.isclose(table["bottom_depth"], cmb_depth, rtol=0, atol=1.0)
                  & (table["top_depth"] > 0.0))
    later = basal_rows & (table["time"] >= after_s)
    if not np.any(later):
        return None
    lid = int(table["layer"][int(np.argmax(later))])
    rows = basal_rows & (table["layer"] == lid)
    start = float(table["time"][int(np.argmax(rows))])
    thickness = float(np.max(table["bottom_depth"][rows] - table["top_depth"][rows]))
    froze = [e["time"] for e in events if e["kind"] == "froze" and e["layer"] == lid]
    merged = [e["time"] for e in events if e["kind"] == "merged" and e["layer"] == lid]
    end = froze[0] if froze else (merged[0] if merged else None)
    return {"layer": lid, "start_yr": start / YEAR, "end_yr": None if end is None else end / YEAR,
            "max_thickness_m": thickness}
