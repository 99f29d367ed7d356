"""Volcanism outcomes of a run: when volcanism ended, the crust, the outgassed H2O and CO2.

Reads only the History's volcanism series (:data:`meltzone.evolution.contract.VOLCANISM_SERIES`, SI); a run
without them (volcanism off, or a scheme that does not extract melt) gives None everywhere, and a run with only
the melt production and the heat pipe (the mixing-length scheme) None for the crust and the outgassing.
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
        "final_melt_production_km3_yr", "peak_melt_production_km3_yr", "volcanic_episodes", "volcanism_active_yr",
        "melt_extracted_90pct_yr", "outgassed_90pct_yr")


def _episodes(time: np.ndarray, prod: np.ndarray) -> tuple[int, float, float | None]:
    """Episodes of extraction (separate stretches of steps with melt production > 0), the time covered by
    them (every step interval with production at either end) and the time by which 90% of the extracted
    volume came out (trapezoidal integral of the production; None without any)."""
    active = prod > 0.0
    episodes = int(active[0]) + int(np.count_nonzero(active[1:] & ~active[:-1]))
    dt = np.diff(time)
    active_s = float(dt[active[1:] | active[:-1]].sum())
    volume = np.concatenate(([0.0], np.cumsum(0.5 * (prod[1:] + prod[:-1]) * dt)))
    t90 = None if volume[-1] <= 0.0 else float(np.interp(0.9 * volume[-1], volume, time) / YEAR)
    return episodes, active_s / YEAR, t90


def _outgassed_90pct(time: np.ndarray, outgassed: np.ndarray) -> float | None:
    """The first recorded time by which 90% of the run's outgassed H2O + CO2 (by mass, a non-decreasing record)
    was out (None if nothing was)."""
    if outgassed[-1] <= 0.0:
        return None
    return float(time[int(np.argmax(outgassed >= 0.9 * outgassed[-1]))] / YEAR)


def volcanism_outcomes(result) -> dict:
    """The volcanism keys of the run summary.

    ``volcanism_end_yr``: the end of the step in which melt extraction last stopped within the run (None while
    it is still going at the end, and when there never was any; ``volcanism_at_end`` tells which); resolved to
    one step, which the integrator bounds by ``run.max_step_myr``. ``crust_thickness_m``, ``outgassed_h2o_kg``,
    ``outgassed_co2_kg``: at the end of the run. Melt production in km^3/yr (volume of the crust it makes).

    Extraction under a stagnant lid can come in episodes separated by long quiet spells (heat stored under a
    thick lid, released when melt weakening thins it), so ``volcanism_end_yr`` is the end of the last episode
    before the run ends, not a proof that no later one follows. ``volcanic_episodes`` counts the episodes,
    ``volcanism_active_yr`` is the time covered by them, ``melt_extracted_90pct_yr`` the time by which 90% of
    the extracted volume came out and ``outgassed_90pct_yr`` the first recorded time by which 90% of the
    outgassed H2O + CO2 mass was out (0, 0.0, None and None without extraction)."""
    h = result.history
    if "melt_production" not in h:
        return {key: None for key in KEYS}
    prod = np.asarray(h["melt_production"], dtype=float)
    active = prod > 0.0
    end = None
    if active.any() and not active[-1]:
        s = int(len(active) - np.argmax(active[::-1]))  # first step of the final stretch without extraction
        end = float(h.time[s] / YEAR)
    time = np.asarray(h.time, dtype=float)
    episodes, active_yr, t90 = _episodes(time, prod)
    out = {
        "volcanism_end_yr": end,
        "volcanism_at_end": bool(active[-1]),
        "crust_thickness_m": None,
        "outgassed_h2o_kg": None,
        "outgassed_co2_kg": None,
        "final_melt_production_km3_yr": float(prod[-1] * KM3_PER_YR),
        "peak_melt_production_km3_yr": float(prod.max() * KM3_PER_YR),
        "volcanic_episodes": episodes,
        "volcanism_active_yr": active_yr,
        "melt_extracted_90pct_yr": t90,
        "outgassed_90pct_yr": None,
    }
    if "crust_thickness" in h:  # the crust and the outgassing (not followed by the mixing-length scheme)
        gas = np.asarray(h["outgassed_h2o"], dtype=float) + np.asarray(h["outgassed_co2"], dtype=float)
        out.update(crust_thickness_m=float(h["crust_thickness"][-1]), outgassed_h2o_kg=float(h["outgassed_h2o"][-1]),
                   outgassed_co2_kg=float(h["outgassed_co2"][-1]), outgassed_90pct_yr=_outgassed_90pct(time, gas))
    return out

