"""Water outcomes of a run (summary keys): when a surface ocean first condensed, how much water was lost to
space, and the solidification type of Hamano, Abe & Genda 2013 (Nature 497:607).

Definitions (this model's, after Hamano et al. 2013: type I planets solidify within several Myr and keep most of
their water; type II planets, inside a critical distance, keep their magma ocean until hydrodynamic escape has
desiccated them; abstract checked): with a host star, a water inventory and a magma ocean at the start, the
type is ``"II"`` when at least half of the water has been lost to space by the time the surface magma ocean
ends (the summary's ``magma_ocean_end_yr``, whatever definition of the end it uses), ``"I"`` when less has;
null when the magma ocean outlives the run with less than half lost (undecided), or without a star, water or
magma ocean. Reads only the History (no kernel).
"""

from __future__ import annotations

import numpy as np

from .constants import YEAR

#: fraction of the water inventory lost by the end of the magma ocean that makes a planet type II
TYPE_II_LOST_FRACTION = 0.5


def water_outcomes(result, magma_ocean_end_s) -> dict:
    """``water_ocean_formed_yr`` (first step with condensed water, null if never), ``water_ocean_kg`` (at the
    end), ``water_lost_kg`` (to space by the end, volcanically outgassed water included), ``solidification_type``
    ("I", "II" or null)."""
    h = result.history
    spec = result.spec
    ocean = h["water_ocean"] if "water_ocean" in h else np.zeros_like(h.time)
    lost = h["water_lost"] if "water_lost" in h else np.zeros_like(h.time)
    outgassed = float(h["outgassed_h2o"][-1]) if "outgassed_h2o" in h else 0.0
    inventory = spec.surface.water_inventory_kg
    formed = np.flatnonzero(ocean > 0.0)
    kind = None
    if spec.star.mass_msun > 0.0 and inventory > 0.0 and h["regime"][0] == 0:
        t_end = h.time[-1] if magma_ocean_end_s is None else magma_ocean_end_s
        lost_then = float(np.interp(t_end, h.time, lost))
        if lost_then >= TYPE_II_LOST_FRACTION * inventory:
            kind = "II"
        elif magma_ocean_end_s is not None:
            kind = "I"
    return {
        "water_ocean_formed_yr": float(h.time[formed[0]] / YEAR) if formed.size else None,
        "water_ocean_kg": float(ocean[-1]),
        # at most the water there was to lose, the inventory and what the volcanoes outgassed from the mantle's own
        # water (a cap against the integrator's round-off only; the inventory alone dropped the outgassed water
        # that escaped later: 9.1e19 kg of the red-dwarf example's 2.89e21 kg)
        "water_lost_kg": float(min(lost[-1], inventory + outgassed)),
        "solidification_type": kind,
    }
