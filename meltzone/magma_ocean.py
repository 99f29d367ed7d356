"""When a run has a magma ocean: the regime's surface criterion and the mantle's mass above the rheological
transition (used by :mod:`meltzone.layers`).

Two criteria, both on a run's :class:`~meltzone.evolution.contract.History`:

* surface criterion: the scheme's regime is the magma ocean, i.e. the melt fraction at the top of the convecting
  mantle is above the critical melt fraction phi_c (batch on the adiabat until the top first reaches phi_c,
  isentropic after; the boundary-layer scheme's ``regime``);
* mass criterion: at least ``MASS_FRACTION_MIN`` (1%) of the mantle's mass is above phi_c in the recorded
  profile T(r) (boundary layers included), so that a top node held at phi_c over a solid mantle is not a magma
  ocean.

A magma ocean is reported while both hold: ``magma_ocean_end_yr`` is the first time either fails (the mass
criterion ends it when a solid mantle's top is held at phi_c by the heat from below, which a model without melt
extraction cannot vent), and a magma ocean forms again only when both hold again. The surface criterion alone
gives ``surface_magma_ocean_end_yr`` (and ``surface_magma_ocean_reformed_yr``), the definition before the mass
criterion existed. The 1% threshold is this model's choice (a magma ocean is a global layer; 1% of Earth's mantle
is a ~20 km global shell at the surface).
"""

from __future__ import annotations

import numpy as np

#: Smallest mass fraction of the mantle above phi_c for a magma ocean (this model's choice, module docstring).
MASS_FRACTION_MIN = 0.01


def mass_fraction_above(melt_fraction, mass, phi_c):
    """Mass fraction of the mantle whose melt fraction exceeds ``phi_c``: per row of ``melt_fraction`` (steps x
    nodes), or for one profile (nodes)."""
    above = np.asarray(melt_fraction) > phi_c
    mass = np.asarray(mass, dtype=float)
    return (above @ mass) / mass.sum()


def states(h):
    """(surface criterion, both criteria) per recorded step of History ``h`` (boolean arrays)."""
    surface = np.asarray(h["regime"]) == 0
    mass_ok = mass_fraction_above(h.melt_fraction, h.grid.mass, h.critical_melt_fraction) >= MASS_FRACTION_MIN
    return surface, surface & mass_ok


def transitions(h, refine, mass_criterion=True):
    """[(time [s], "magma-ocean-ended" or "magma-ocean-reformed")] of History ``h``: where the magma-ocean state
    (both criteria, or the surface criterion alone) changes between two recorded steps, refined inside the step
    with ``refine(fn, t0, t1)`` on the criterion that changed (the earlier of two that fail, the later of two that
    come true)."""
    phi_c = h.critical_melt_fraction
    t = h.time
    surface, both = states(h)
    state = both if mass_criterion else surface

    def regime_fn(tt):
        return h.at(tt).regime_melt_fraction - phi_c

    def mass_fn(tt):
        return mass_fraction_above(h.at(tt).melt_fraction, h.grid.mass, phi_c) - MASS_FRACTION_MIN

    frac = mass_fraction_above(h.melt_fraction, h.grid.mass, phi_c) >= MASS_FRACTION_MIN
    out = []
    for s in range(1, len(t)):
        if state[s - 1] == state[s]:
            continue
        times = []
        if surface[s - 1] != surface[s]:
            times.append(refine(regime_fn, t[s - 1], t[s]))
        if mass_criterion and frac[s - 1] != frac[s]:
            times.append(refine(mass_fn, t[s - 1], t[s]))
        when = (min(times) if state[s - 1] else max(times)) if times else t[s]
        out.append((when, "magma-ocean-ended" if state[s - 1] else "magma-ocean-reformed"))
    return out


def surface_times(h, refine):
    """(end [s] of the first magma ocean, first reformation [s]) by the surface criterion alone; None where it did
    not happen (no end: none at the start, or it outlived the run)."""
    surface = np.asarray(h["regime"]) == 0
    events = transitions(h, refine, mass_criterion=False)
    ends = [when for when, kind in events if kind == "magma-ocean-ended"]
    again = [when for when, kind in events if kind == "magma-ocean-reformed"]
    return (ends[0] if surface[0] and ends else None), (again[0] if again else None)
