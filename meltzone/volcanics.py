"""Volcanism outcomes of a run: when volcanism ended, the crust, the outgassed H2O and CO2.

Reads only the History's volcanism series (:data:`meltzone.evolution.contract.VOLCANISM_SERIES`, SI); a run
without them (volcanism off, or a scheme that does not extract melt) gives None everywhere.
"""

from __future__ import annotations

import numpy as np

from .constants import YEAR

#: m^3/s -> km^3/yr
KM3_PER_YR = YEAR / 1e9
#: kg/s -> kg/yr
KG_PER_YR = YEAR

#: Summary keys of :func:`volcanism_outcomes` (all None without volcanism series).
KEYS = ("volcanism_end_yr", "volcanism_at_end", "crust_thickness_m", "outgassed_h2o_kg", "outgassed_co2_kg",
        "final_melt_production_km3_yr", "peak_melt_production_km3_yr")


def volcanism_outcomes(result) -> dict:
    """The volcanism keys of the run summary.

    ``volcanism_end_yr``: the end of the step in which melt extraction stopped for good (None while it is
    still going at the end, and when there never was any; ``volcanism_at_end`` tells which); resolved to one
    step, which the integrator bounds by ``run.max_step_myr``. ``crust_thickness_m``, ``outgassed_h2o_kg``,
    ``outgassed_co2_kg``: at the end of the run. Melt production in km^3/yr (volume of the crust it makes)."""
    h = result.history
    if "melt_production" not in h:
        return {key: None for key in KEYS}
    prod = np.asarray(h["melt_production"], dtype=float)
    active = prod > 0.0
    end = None
    if active.any() and not active[-1]:
        s = int(len(active) - np.argmax(active[::-1]))  # first step of the final stretch without extraction
        end = float(h.time[s] / YEAR)
    return {
        "volcanism_end_yr": end,
        "volcanism_at_end": bool(active[-1]),
        "crust_thickness_m": float(h["crust_thickness"][-1]),
        "outgassed_h2o_kg": float(h["outgassed_h2o"][-1]),
        "outgassed_co2_kg": float(h["outgassed_co2"][-1]),
        "final_melt_production_km3_yr": float(prod[-1] * KM3_PER_YR),
        "peak_melt_production_km3_yr": float(prod.max() * KM3_PER_YR),
    }

