"""Benchmark: the mixing-length scheme against the boundary-layer scheme, a 10 Gyr run of a 5 Earth-mass planet
at 256 mantle nodes, in one process.

Reports the warm median and fastest wall time (of five; the fastest is the steadier on a shared machine) of
each scheme's ``run`` (interior and curves excluded), their ratio, the
mixing-length run's accepted and rejected steps, Newton iterations per accepted step, the cost per cell and
Newton iteration, and next to it a bare jitted tridiagonal (Thomas) solve of the same size.

    python benchmarks/bench_mlt.py
"""

from __future__ import annotations

import statistics
import time

import numpy as np

import meltzone
from meltzone import melting
from meltzone.config import PlanetSpec
from meltzone.evolution import boundary_layer, mixing_length
from meltzone.interior import build_interior


def median_time(f, repeat=5):
    out = []
    for _ in range(repeat):
        t = time.perf_counter()
        value = f()
        out.append(time.perf_counter() - t)
    return statistics.median(out), min(out), value


def main():
    spec_bl = PlanetSpec(mass_earth=5.0, end_time_gyr=10.0)
    spec_ml = PlanetSpec(mass_earth=5.0, end_time_gyr=10.0, scheme="mixing-length")
    meltzone.evolve(spec_bl)  # warm-up: compile or load the cache
    meltzone.evolve(spec_ml)
    interior = build_interior(spec_bl)
    curves = melting.node_curves(melting.get_model(spec_bl.melting.model), interior.P[interior.mantle])
    t_bl, b_bl, _ = median_time(lambda: boundary_layer.run(spec_bl, interior, curves))
    t_ml, b_ml, h = median_time(lambda: mixing_length.run(spec_ml, interior, curves))

    from meltzone._core.tridiag import solve

    n = h.grid.n + 1
    rng = np.random.default_rng(1)
    lower, upper = rng.random(n), rng.random(n)
    diag = 4.0 + rng.random(n)
    rhs, out, work = rng.random(n), np.empty(n), np.empty(n)
    solve(lower, diag, upper, rhs, out, work)
    reps = 2000
    t_thomas = float("inf")
    for _ in range(10):
        t = time.perf_counter()
        for _ in range(reps):
            solve(lower, diag, upper, rhs, out, work)
        t_thomas = min(t_thomas, (time.perf_counter() - t) / reps)

    newton = float(h.scheme_data["newton_iterations_all"])  # rejected steps' included
    steps = h.n_steps
    print(f"5 M_E, 10 Gyr, {h.grid.n} cells")
    print(f"boundary-layer run   {t_bl * 1e3:9.1f} ms median, {b_bl * 1e3:9.1f} ms fastest")
    print(f"mixing-length run    {t_ml * 1e3:9.1f} ms median, {b_ml * 1e3:9.1f} ms fastest   ratio {t_ml / t_bl:.1f}x "
          f"median, {b_ml / b_bl:.1f}x fastest   (goal <= 500 ms, <= 20x)")
    print(f"mixing-length steps  {steps} accepted, {h.n_rejected} rejected, {newton:.0f} Newton iterations "
          f"({newton / max(steps, 1):.2f} per accepted step, rejected steps' included)")
    per = b_ml / max(newton, 1.0) / h.grid.n
    print(f"cost per cell and Newton iteration {per * 1e9:8.1f} ns")
    print(f"bare jitted tridiagonal solve of {n}: {t_thomas * 1e6:.2f} us = {t_thomas / n * 1e9:.1f} ns per row "
          f"(fastest); a cell's Newton iteration costs {per / (t_thomas / n):.1f} rows")


if __name__ == "__main__":
    main()
