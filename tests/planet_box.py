"""The documented box of random planets (invented ones), shared by the reliability test and benchmark.

One table, :data:`BOX`: a row per configuration key with how it is drawn. To widen the box (a host star, a
steam atmosphere), add rows; a row with ``when`` is drawn only where an earlier row took that value, and set
to ``otherwise`` elsewhere.

Kinds: ``log`` (log-uniform on [lo, hi]), ``uniform`` (on [lo, hi]), ``choice`` (one of the values, equally
likely), ``fixed-or-uniform`` (the first value half of the time, else uniform on the other two: a hot start
from the molten default, 0 K, or a cool start of given T_u).
"""

from __future__ import annotations

import math
import random
from typing import NamedTuple


class Range(NamedTuple):
    """How one configuration key ``section.key`` is drawn."""

    section: str
    key: str
    kind: str
    values: tuple
    when: tuple | None = None  # (section, key, accepted) of an earlier row: a value, a tuple of values or "nonzero"
    otherwise: object = 0.0  # the value elsewhere; None leaves the key unset


BOX = (
    Range("planet", "mass_earth", "log", (0.5, 15.0)),
    Range("planet", "core_mass_fraction", "uniform", (0.1, 0.7)),
    Range("convection", "regime", "choice", ("mobile-lid", "stagnant-lid")),
    Range("surface", "atmosphere", "choice", ("none", "grey", "steam")),
    Range("surface", "water_inventory_kg", "uniform", (0.0, 1e22), when=("surface", "atmosphere", ("grey", "steam"))),
    Range("surface", "co2_inventory_kg", "uniform", (0.0, 1e21), when=("surface", "atmosphere", ("grey", "steam"))),
    # half the planets under a fixed irradiation, half around a host star (never both: a config error)
    Range("star", "mass_msun", "fixed-or-uniform", (0.0, 0.1, 1.2)),
    Range("orbit", "semi_major_axis_au", "log", (0.01, 2.0), when=("star", "mass_msun", "nonzero"), otherwise=None),
    Range("surface", "equilibrium_temperature_k", "uniform", (200.0, 2000.0), when=("star", "mass_msun", 0.0),
          otherwise=None),
    Range("initial", "upper_temperature_k", "fixed-or-uniform", (0.0, 1700.0, 2200.0)),
)


def _draw(rng: random.Random, row: Range):
    v = row.values
    if row.kind == "log":
        return math.exp(rng.uniform(math.log(v[0]), math.log(v[1])))
    if row.kind == "uniform":
        return rng.uniform(v[0], v[1])
    if row.kind == "choice":
        return rng.choice(v)
    if row.kind == "fixed-or-uniform":
        return v[0] if rng.random() < 0.5 else rng.uniform(v[1], v[2])
    raise ValueError(f"unknown kind {row.kind!r} of {row.section}.{row.key}")


def planet(rng: random.Random, scheme: str = "boundary-layer", end_time_gyr: float = 4.5,
           box: tuple = BOX) -> dict:
    """One random planet of ``box`` as a nested configuration dict."""
    cfg: dict = {"convection": {"scheme": scheme}, "run": {"end_time_gyr": end_time_gyr}}
    for row in box:
        section = cfg.setdefault(row.section, {})
        if row.when is not None and not _accepted(cfg.get(row.when[0], {}).get(row.when[1]), row.when[2]):
            if row.otherwise is not None:
                section[row.key] = row.otherwise
        else:
            section[row.key] = _draw(rng, row)
    return cfg


def _accepted(value, accepted) -> bool:
    if accepted == "nonzero":
        return value is not None and value != 0.0
    if isinstance(accepted, tuple):
        return value in accepted
    return value == accepted


def check(cfg: dict) -> dict:
    """Run one planet: ``failure`` (None, "ErrorClass: message" of a MeltzoneError, or "crash: ..."), ``nan`` (a series with a
    non-finite value), ``closure`` and ``closure_ok`` (the summary's energy closure and its tolerance check),
    ``wall_s`` (evolve and summary), ``steps``. Warnings are silenced (a hot start warns by design)."""
    import time
    import warnings

    import numpy as np

    import meltzone
    from meltzone.errors import MeltzoneError

    t0 = time.perf_counter()
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            result = meltzone.evolve(cfg)
            s = result.summary()
    except Exception as exc:  # a MeltzoneError is a reported failure; anything else a crash, named as such
        kind = "" if isinstance(exc, MeltzoneError) else "crash: "
        return {"failure": f"{kind}{type(exc).__name__}: {exc}", "nan": False, "closure": None, "closure_ok": True,
                "wall_s": time.perf_counter() - t0, "steps": 0}
    nan = any(not np.all(np.isfinite(v)) for v in result.history.series.values())
    return {"failure": None, "nan": bool(nan), "closure": s["energy_closure"], "closure_ok": s["energy_closure_ok"],
            "wall_s": time.perf_counter() - t0, "steps": result.history.n_steps}
