"""The case worker of a sweep: run one case (or a batch) and return a compact, picklable, JSON-ready dict.

This module is what a worker process (local process pool or Dask worker)
imports. It stays light at import (numpy and the standard library only); the
interior solver and the numba kernels are imported at the first case, and the
kernels come from numba's on-disk cache (``NUMBA_CACHE_DIR``, inherited from
the client's environment; see :mod:`meltzone._core._jit`), so a worker compiles
nothing that another process has already compiled. The kernels live in
importable modules, never in ``__main__``, so every worker finds them in the
cache. The evolution is called only through the public ``meltzone.evolve``.

A case never raises: a failure of the case itself (a parameter value the
config rejects, a solver that does not converge) comes back as ``status =
FAILED`` with the message in ``error``; a draw of the observed mode that no
rocky composition fits comes back as ``status = REJECTED``. Only a failure of
the machinery (a worker killed, a lost connection) surfaces in the client.

Results are model estimates, not measurements.
"""

from __future__ import annotations

import math
import os
import time
import warnings

from ..constants import YEAR

#: Case status codes (stored as int8 in the sweep file).
OK, FAILED, REJECTED = 0, 1, 2
STATUS_MEANINGS = "ok failed rejected"
#: Outcome metrics per case: name -> (unit, long name). All float64; NaN when there is no value
#: (failed case, or a time that did not happen within the run; see the flags).
METRICS = {
    "magma_ocean_end_yr": ("yr", "time at which the surface magma ocean ended (melt fraction at the top of the "
                                 "mantle fell below the rheological transition, or less than 1% of the mantle's "
                                 "mass above it, whichever came first); NaN: not within the run"),
    "magma_ocean_reformed_yr": ("yr", "time at which a solidified mantle first warmed back into a surface magma "
                                      "ocean (isentropic melt at the top above the rheological transition); NaN: "
                                      "never"),
    "last_melt_yr": ("yr", "start of the final melt-free stretch (no melt anywhere in the mantle); NaN: "
                           "melt remains at the end of the run"),
    "basal_layer_start_yr": ("yr", "time at which a basal melt layer (on the CMB, detached from the surface) "
                                   "first appeared; NaN: none"),
    "basal_layer_end_yr": ("yr", "time at which the basal melt layer froze or merged; NaN: none, or it "
                                 "outlived the run"),
    "basal_layer_thickness_m": ("m", "largest thickness of the basal melt layer; NaN: none"),
    "final_upper_temperature_k": ("K", "upper-mantle potential temperature at the end of the run"),
    "final_surface_heat_flow_w": ("W", "surface heat flow at the end of the run"),
    "final_cmb_heat_flow_w": ("W", "core-mantle boundary heat flow at the end of the run"),
    "inner_core_radius_m": ("m", "inner-core radius at the end of the run"),
    "n_layers": ("1", "number of distinct melt layers over the run"),
    "max_melt_depth_m": ("m", "greatest depth reached by melt over the run"),
    "max_melt_pressure_pa": ("Pa", "greatest pressure reached by melt over the run"),
    "energy_closure": ("1", "relative error of the energy budget at the end of the run"),
    "end_time_yr": ("yr", "model time reached"),
    "radius_m": ("m", "planet radius from the interior solver"),
    "n_events": ("1", "number of events in the case's event list"),
    # volcanism (NaN when not modelled)
    "volcanism_end_yr": ("yr", "end of the last episode of melt extraction within the run (a longer run may add "
                               "another); NaN: still active at the end, none, or not modelled"),
    "crust_thickness_m": ("m", "crust made of extracted melt at the end of the run"),
    "outgassed_h2o_kg": ("kg", "H2O outgassed by erupted melt over the run"),
    "outgassed_co2_kg": ("kg", "CO2 outgassed by erupted melt over the run"),
    "volcanic_episodes": ("1", "separate stretches of melt extraction within the run"),
    "volcanism_active_yr": ("yr", "time covered by the episodes of melt extraction"),
    "melt_extracted_90pct_yr": ("yr", "time by which 90% of the extracted melt volume came out; NaN: none"),
    "outgassed_90pct_yr": ("yr", "first recorded time by which 90% of the outgassed H2O + CO2 mass was out; NaN: "
                                 "none"),
}

#: Yes/no outcomes per case: name -> long name. int8: 1 yes, 0 no, -1 no result (failed or rejected case).
FLAGS = {
    "magma_ocean_persists": "a surface magma ocean is present at the end of the run (the first one outlived "
                            "it, or one formed again)",
    "magma_ocean_reformed": "a solidified mantle warmed back into a surface magma ocean during the run",
    "melt_persists": "melt remains somewhere in the mantle at the end of the run",
    "basal_layer_formed": "a basal melt layer that exists after the surface magma ocean has ended formed during "
                          "the run (the run summary's basal_layer is not null)",
    "basal_layer_persists": "the basal melt layer outlived the run",
}
#: Extra flags of the observed mode, evaluated at the stated age.
AGE_FLAGS = {
    "magma_ocean_at_age": "a surface magma ocean is present at the stated age",
    "basal_layer_by_age": "a basal melt layer formed at or before the stated age",
    "melting_at_age": "melt is present somewhere in the mantle at the stated age",
}


def worker_init() -> None:
    """Initializer of local pool workers.

    Ctrl-C is left to the client, which stops the workers itself; and a worker ends when its client
    dies (``kill -9``), instead of waiting forever on the task queue: a daemon thread waits on the
    parent's sentinel (readable once the parent is gone) and then exits the process.
    """
    import multiprocessing
    import signal
    import threading

    signal.signal(signal.SIGINT, signal.SIG_IGN)
    parent = multiprocessing.parent_process()
    if parent is None or getattr(parent, "sentinel", None) is None:
        return

    def watch():
        from multiprocessing.connection import wait

        wait([parent.sentinel])
        os._exit(3)

    threading.Thread(target=watch, name="meltzone-parent-watch", daemon=True).start()


def _nested_from_flat(assignments: dict) -> dict:
    nested: dict = {}
    for dotted, value in assignments.items():
        sec, _, key = dotted.partition(".")
        nested.setdefault(sec, {})[key] = value
    return nested


def _merge(base: dict, assignments: dict) -> dict:
    merged = {sec: dict(vals) for sec, vals in base.items()}
    for sec, vals in _nested_from_flat(assignments).items():
        merged.setdefault(sec, {}).update(vals)
    return merged


def _none_nan(v) -> float:
    return float("nan") if v is None else float(v)


def _flag(v: bool) -> int:
    return 1 if v else 0


def _magma_ocean_at(summary: dict, result, age_yr: float) -> bool:
    """Whether the surface is a magma ocean at ``age_yr``: the state at the start (summary's
    ``magma_ocean_at_start``, surface and mass criteria, meltzone.magma_ocean), toggled by every
    magma-ocean-ended / magma-ocean-reformed event at or before that time."""
    if "magma_ocean_at_start" in summary:
        state = bool(summary["magma_ocean_at_start"])
    else:
        state = bool(result.history["regime"][0] == 0) if result is not None else summary["magma_ocean_end_yr"] != 0.0
    for e in sorted(summary.get("events", ()), key=lambda e: e["time_yr"]):
        if e["time_yr"] > age_yr:
            break
        if e["kind"] == "magma-ocean-ended":
            state = False
        elif e["kind"] == "magma-ocean-reformed":
            state = True
    return state


def outcomes(summary: dict, result=None, age_yr: float | None = None) -> tuple[dict, dict]:
    """(metrics, flags) of one run from :func:`meltzone.layers.summarize` (and, for the age flags, the Result)."""
    basal = summary.get("basal_layer")
    metrics = {
        "magma_ocean_end_yr": _none_nan(summary["magma_ocean_end_yr"]),
        "magma_ocean_reformed_yr": _none_nan(summary.get("magma_ocean_reformed_yr")),
        "last_melt_yr": _none_nan(summary["last_melt_yr"]),
        "basal_layer_start_yr": _none_nan(basal["start_yr"]) if basal else math.nan,
        "basal_layer_end_yr": _none_nan(basal["end_yr"]) if basal else math.nan,
        "basal_layer_thickness_m": float(basal["max_thickness_m"]) if basal else math.nan,
        "final_upper_temperature_k": float(summary["final_upper_temperature_k"]),
        "final_surface_heat_flow_w": float(summary["final_surface_heat_flow_w"]),
        "final_cmb_heat_flow_w": float(summary["final_cmb_heat_flow_w"]),
        "inner_core_radius_m": float(summary["inner_core_radius_m"]),
        "n_layers": float(summary["n_layers"]),
        "max_melt_depth_m": float(summary["max_melt_depth_m"]),
        "max_melt_pressure_pa": float(summary["max_melt_pressure_pa"]),
        "energy_closure": float(summary["energy_closure"]),
        "end_time_yr": float(summary["end_time_yr"]),
        "radius_m": float(summary["radius_m"]),
        "n_events": float(len(summary.get("events", ()))),
        **{key: _none_nan(summary.get(key)) for key in ("volcanism_end_yr", "crust_thickness_m", "outgassed_h2o_kg",
                                                        "outgassed_co2_kg", "volcanic_episodes", "volcanism_active_yr",
                                                        "melt_extracted_90pct_yr", "outgassed_90pct_yr")},
    }
    flags = {
        "magma_ocean_persists": _flag(summary.get("magma_ocean_at_end", summary["magma_ocean_end_yr"] is None)),
        "magma_ocean_reformed": _flag(summary.get("magma_ocean_reformed_yr") is not None),
        "melt_persists": _flag(summary["last_melt_yr"] is None),
        "basal_layer_formed": _flag(basal is not None),
        "basal_layer_persists": _flag(basal is not None and basal["end_yr"] is None),
    }
    if age_yr is not None:
        import numpy as np

        flags["magma_ocean_at_age"] = _flag(_magma_ocean_at(summary, result, age_yr))
        flags["basal_layer_by_age"] = _flag(basal is not None and basal["start_yr"] <= age_yr)
        t_yr = result.history["time"] / YEAR
        melt = result.history["melt_mass"]
        # melt present at the last history step at or before the age (steps bracket the melt-free stretch)
        step = int(np.clip(np.searchsorted(t_yr, age_yr, side="right") - 1, 0, len(t_yr) - 1))
        flags["melting_at_age"] = _flag(melt[step] > 0.0)
    return metrics, flags


def message(exc: BaseException) -> str:
    """One line for an exception: its type and the first line of its text."""
    text = str(exc).strip().splitlines()[0] if str(exc).strip() else ""
    return f"{type(exc).__name__}: {text}" if text else type(exc).__name__


def run_case(index: int, base: dict, assignments: dict, observed: dict | None = None,
             detail_dir: str | None = None) -> dict:
    """Run one case of a sweep in this process and return its compact result.

    Parameters
    ----------
    index : int
        Case index (echoed back).
    base : dict
        The ``[base]`` planet config (nested sections, as in a TOML file).
    assignments : dict
        ``"section.key" -> value`` of this case, applied over ``base``.
    observed : dict, optional
        Observed mode: ``{"radius_earth", "age_gyr", "inversion": {flat overrides}}``; the core mass
        fraction is inferred from ``planet.mass_earth`` (in ``assignments``) and ``radius_earth``.
    detail_dir : str, optional
        Folder for the full result of this case (``case-NNNNNN.h5``), written by this worker, when
        :func:`meltzone.results.write` exists.

    Returns
    -------
    dict
        ``case``, ``status`` (OK / FAILED / REJECTED), ``error``, ``warning``, ``derived``
        (observed mode: ``core_mass_fraction``), ``metrics``, ``flags``, ``events`` (list of
        [time_yr, kind, layer, depth_m, pressure_pa]) and ``wall_time_s``.
    """
    t0 = time.perf_counter()
    out = {"case": int(index), "status": OK, "error": "", "warning": "", "derived": {}, "metrics": {},
           "flags": {}, "events": [], "wall_time_s": 0.0}
    caught: list[str] = []
    with warnings.catch_warnings(record=True) as record:
        warnings.simplefilter("always")
        try:
            _run(out, base, assignments, observed, detail_dir)
        except Exception as exc:  # the case failed; the sweep goes on and records why
            out["status"] = FAILED
            out["error"] = message(exc)
            out["metrics"], out["flags"] = {}, {}
            out["events"] = []
        for w in record:
            text = str(w.message).splitlines()[0]
            if text not in caught:
                caught.append(text)
    out["warning"] = "; ".join(caught)
    out["wall_time_s"] = time.perf_counter() - t0
    return out


def run_cases(cases: list, base: dict, detail_dir: str | None = None) -> list:
    """Run a batch of cases ``[(index, assignments, observed), ...]`` in this process (one task, so that the
    scheduler's per-task cost is shared); returns their rows in order, as :func:`run_case`."""
    return [run_case(index, base, assignments, observed, detail_dir) for index, assignments, observed in cases]


def _run(out, base, assignments, observed, detail_dir):
    from ..config import PlanetSpec

    merged = _merge(base, assignments)
    if observed is not None:
        mass = assignments["planet.mass_earth"]
        radius = observed["radius_earth"]
        if not mass > 0.0 or not radius > 0.0:
            out["status"] = REJECTED
            out["error"] = f"draw M = {mass:.4g} M_E, R = {radius:.4g} R_E is not a physical planet"
            out["derived"]["core_mass_fraction"] = math.nan
            return
        inversion = {f"{sec}.{k}": v for sec, vals in merged.items() for k, v in vals.items()}
        inversion.pop("planet.core_mass_fraction", None)
        inversion.update(observed.get("inversion", {}))
        inversion.pop("planet.mass_earth", None)
        from ..interior import infer_core_fraction

        cmf = infer_core_fraction(mass, radius, **inversion)
        if cmf is None:
            out["status"] = REJECTED
            out["error"] = (f"no rocky composition (core mass fraction 0-0.8) gives R = {radius:.4g} R_E at "
                            f"M = {mass:.4g} M_E")
            out["derived"]["core_mass_fraction"] = math.nan
            return
        out["derived"]["core_mass_fraction"] = cmf
        merged.setdefault("planet", {})["core_mass_fraction"] = cmf
    spec = PlanetSpec(merged)

    import meltzone

    from ..layers import summarize, track

    result = meltzone.evolve(spec)
    table, events = track(result)
    summary = summarize(result, table, events)
    age_yr = None if observed is None else observed["age_gyr"] * 1e9
    out["metrics"], out["flags"] = outcomes(summary, result, age_yr)
    out["events"] = [[float(e["time_yr"]), str(e["kind"]), int(e["layer"]), _none_nan(e["depth_m"]),
                      _none_nan(e["pressure_pa"])] for e in summary["events"]]
    if detail_dir is not None:
        from .. import results as _results

        writer = getattr(_results, "write", None)
        if writer is not None:
            os.makedirs(detail_dir, exist_ok=True)
            writer(result, os.path.join(detail_dir, f"case-{out['case']:06d}.h5"))
