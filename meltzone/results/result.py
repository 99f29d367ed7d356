"""The Result of one run: the spec, the interior and the scheme's History, with views, tracking, the summary,
flags, snapshots, the sources of the laws used and an xarray view. Results are model estimates."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..config import PlanetSpec
from ..constants import EARTH_MASS, YEAR
from ..errors import MeltzoneError
from ..evolution.contract import SERIES, History
from ..interior import Interior
from .schema import (EVENT_COLUMNS, FLAG_COLUMNS, LAYER_COLUMNS, MODEL_NOTE, PROFILE_FIELDS, STRUCTURE_ARRAYS,
                     _records)

@dataclass(repr=False)
class Result:
    """Everything one run produced (SI units): the spec, the interior, the melting model's id and the
    scheme's :class:`~meltzone.evolution.contract.History`. ``history[name]`` is a series (or ``time``)."""

    spec: PlanetSpec
    interior: Interior
    melting_model: str
    history: History
    wall_time_s: float
    sources: tuple = ()
    _cache: dict = field(default_factory=dict, repr=False, compare=False)

    def __repr__(self) -> str:
        h = self.history
        return (f"Result(planet={self.spec.planet.name!r}, mass={self.interior.mass / EARTH_MASS:.4g} M_E, "
                f"scheme={h.scheme!r}, melting_model={self.melting_model!r}, steps={h.n_steps}, "
                f"end={h.time[-1] / YEAR:.4g} yr, energy_closure={h.energy_closure:.1e})")

    def to_xarray(self):
        """The run as an ``xarray.DataTree``: one node per topic (``history`` on model time [yr] and the
        mantle nodes, ``layers``, ``events``, ``structure``, ``flags``), every variable with its ``units``.
        Needs xarray (``pip install xarray``)."""
        try:
            import xarray as xr
        except ImportError:
            raise MeltzoneError("Result.to_xarray needs xarray: pip install xarray") from None
        h = self.history
        it = self.interior
        depth = it.radius - h.grid.radius
        mantle = {"mantle_radius": ("mantle_node", h.grid.radius, {"units": "m"}),
                  "mantle_depth": ("mantle_node", depth, {"units": "m"}),
                  "mantle_pressure": ("mantle_node", h.grid.pressure, {"units": "Pa"})}
        hist = xr.Dataset(
            {**{name: ("time", v, {"units": SERIES[name][0], "long_name": SERIES[name][1]})
                for name, v in h.series.items()},
             **{name: (("time", "mantle_node"), getattr(h, name), {"units": unit, "long_name": long_name})
                for name, (unit, long_name) in PROFILE_FIELDS.items()},
             "solidus": ("mantle_node", h.grid.solidus, {"units": "K"}),
             "liquidus": ("mantle_node", h.grid.liquidus, {"units": "K"})},
            coords={"time": ("time", h.time / YEAR, {"units": "yr", "long_name": "model time"}), **mantle},
            attrs={"scheme": h.scheme, "critical_melt_fraction": h.critical_melt_fraction})
        table, events = self.tracked()
        lay = xr.Dataset({k: ("row", (v / YEAR if k == "time" else v), {"units": "yr" if k == "time"
                                                                           else LAYER_COLUMNS[k][0]})
                          for k, v in table.items()})
        ev = _records(events, EVENT_COLUMNS)
        evs = xr.Dataset({k: ("event", (v / YEAR if k == "time" else v),
                              {"units": "yr" if k == "time" else EVENT_COLUMNS[k][0]}) for k, v in ev.items()})
        struct = xr.Dataset({name: ("node", getattr(it, attr), {"units": unit, "long_name": long_name})
                             for name, (attr, unit, long_name) in STRUCTURE_ARRAYS.items()})
        zones = self.flags()
        cols = _records(zones, FLAG_COLUMNS)
        flg = xr.Dataset({name: ("flag", cols[key], {"units": unit}) for key, (name, unit, _) in FLAG_COLUMNS.items()})
        root = xr.Dataset(attrs={"planet": self.spec.planet.name, "config_toml": self.spec.to_toml(),
                                 "melting_model": self.melting_model, "note": MODEL_NOTE})
        return xr.DataTree.from_dict({"/": root, "/history": hist, "/layers": lay, "/events": evs,
                                      "/structure": struct, "/flags": flg})

    # ------------------------------------------------------------------ views
    @property
    def time(self) -> np.ndarray:
        return self.history.time

    @property
    def intervals(self) -> dict:
        return self.history.intervals

    @property
    def energy_closure(self) -> float:
        return self.history.energy_closure

    @property
    def n_steps(self) -> int:
        return self.history.n_steps

    @property
    def n_rejected(self) -> int:
        return self.history.n_rejected

    def profile(self, step: int):
        """(temperature [K], melt fraction) on the mantle nodes at history step ``step``."""
        return self.history.temperature[step], self.history.melt_fraction[step]

    def profile_at_time(self, t: float):
        """(temperature [K], melt fraction) on the mantle nodes at model time ``t`` [s]: the recorded profile
        when ``t`` is a step, otherwise the scheme's state inside the step (:meth:`History.at`)."""
        times = self.time
        s = int(np.searchsorted(times, t, side="left"))
        if s < len(times) and times[s] == t:
            return self.profile(s)
        inside = self.history.at(t)
        return inside.temperature, inside.melt_fraction

    def tracked(self):
        """(layer table, events) from :func:`meltzone.layers.track`, computed once (read from the file when
        the Result was loaded)."""
        if "tracked" not in self._cache:
            from ..layers import track

            self._cache["tracked"] = track(self)
        return self._cache["tracked"]

    def summary(self) -> dict:
        """JSON-ready summary of the run (:func:`meltzone.layers.summarize`)."""
        from ..layers import summarize

        table, events = self.tracked()
        return summarize(self, table, events)

    def flags(self) -> list[dict]:
        """High-pressure flags of the mantle and the core (:func:`meltzone.phases.planet_flags`, on the
        reference adiabat the interior was built on)."""
        if "flags" not in self._cache:
            from ..melting import get_model
            from ..phases import planet_flags

            model = get_model(self.melting_model, self.spec.melting.table_file or None)
            self._cache["flags"] = planet_flags(self.interior, model)
        return self._cache["flags"]

    def snapshots(self, times=None) -> dict:
        """Temperature and melt fraction on the mantle nodes at chosen model times.

        ``times`` [s] default to :func:`snapshot_times` (log-spaced plus every event); a loaded
        Result returns the snapshots stored in its file. Returns a dict of ``time`` (n,),
        ``label`` (n,) strings, ``temperature`` and ``melt_fraction`` (n, mantle nodes).
        """
        if times is None and "snapshots" in self._cache:
            return self._cache["snapshots"]
        t = snapshot_times(self) if times is None else np.unique(np.asarray(times, dtype=np.float64))
        n = self.history.grid.n
        temp = np.empty((len(t), n))
        phi = np.empty((len(t), n))
        for i, ti in enumerate(t):
            temp[i], phi[i] = self.profile_at_time(ti)
        snaps = {"time": t, "label": np.array(_snapshot_labels(self, t), dtype=str), "temperature": temp,
                 "melt_fraction": phi}
        if times is None:
            self._cache["snapshots"] = snaps
        return snaps

    def law_sources(self) -> tuple[str, ...]:
        """Sources of the laws used by this run: ``self.sources`` when set, else :func:`collect_sources`."""
        return tuple(self.sources) or collect_sources(self)


#: Number of log-spaced snapshot times written by default (event times are added to them).
DEFAULT_SNAPSHOTS = 24


def snapshot_times(result, n: int = DEFAULT_SNAPSHOTS) -> np.ndarray:
    """Default snapshot times [s]: the start, ``n`` log-spaced times from the first step to the end, and
    the time of every event, sorted and unique."""
    t = result.time
    times = [t[0], t[-1]]
    positive = t[t > 0.0]
    if len(positive):
        times += list(np.geomspace(positive[0], t[-1], n))
    times += [e["time"] for e in result.tracked()[1]]
    return np.unique(np.clip(np.asarray(times, dtype=np.float64), t[0], t[-1]))


def _snapshot_labels(result, times) -> list[str]:
    events = result.tracked()[1]
    labels = []
    for ti in times:
        words = []
        if ti == result.time[0]:
            words.append("initial")
        if ti == result.time[-1]:
            words.append("final")
        words += [e["kind"] + (f" (layer {e['layer']})" if e["layer"] >= 0 else "") for e in events
                  if e["time"] == ti]
        labels.append("; ".join(words) or "log-spaced")
    return labels


# ====================================================================== sources of the laws used
def collect_sources(result) -> tuple[str, ...]:
    """Sources of the laws a run used, each with what it is for and its status (checked / from memory /
    this model's choice), from the citation registry :mod:`meltzone.citations`."""
    from ..citations import run_sources
    from ..melting import get_model

    try:
        model = get_model(result.melting_model, result.spec.melting.table_file or None)
    except MeltzoneError:  # a user table that has moved since the run: keep the id
        from types import SimpleNamespace

        model = SimpleNamespace(id=result.melting_model, citation=f"model {result.melting_model!r}")
    return run_sources(result.spec, model, result.interior.materials)
