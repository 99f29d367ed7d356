"""One planet from configuration to Result: spec -> interior -> melting curves on the mantle nodes -> the
evolution scheme named by ``convection.scheme`` -> :class:`meltzone.results.Result`."""

from __future__ import annotations

import time

from .config import as_spec


def evolve(config=None, *, progress=None, **kwargs):
    """Run the thermal evolution of one planet and return a :class:`meltzone.results.Result`.

    ``config``: a PlanetSpec, a mapping shaped like the TOML file, a TOML path, or None (defaults;
    flat keyword overrides such as ``mass_earth=4`` are accepted). ``progress``, if given, is called
    with the model time reached [s] every 100 accepted steps.
    """
    from . import melting
    from .evolution.schemes import get_scheme
    from .interior import build_interior
    from .results import Result

    spec = as_spec(config, **kwargs)
    scheme = get_scheme(spec.convection.scheme)
    t0 = time.perf_counter()
    interior = build_interior(spec)
    model = melting.get_model(spec.melting.model, table_file=spec.melting.table_file or None)
    curves = melting.node_curves(model, interior.P[interior.mantle], spec.melting.melt_fraction_law,
                                 spec.melting.water_wt_percent)
    history = scheme.run(spec, interior, curves, progress)
    return Result(spec=spec, interior=interior, melting_model=model.id, history=history,
                  wall_time_s=time.perf_counter() - t0)
