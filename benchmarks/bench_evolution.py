"""Benchmark: a 10 Gyr run of a 5 Earth-mass planet at default resolution (>= 256 mantle nodes).

Reports the warm median wall time of the numba path (interior solve excluded and included), the number of
accepted steps, the cost per node-step, and the ratio to the plain NumPy + scipy solve_ivp reference path
(tests/reference_evolution.py) on the same planet, all measured in this one process.

    python benchmarks/bench_evolution.py
"""

from __future__ import annotations

import os
import statistics
import sys
import time

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "tests"))

from meltzone.config import PlanetSpec  # noqa: E402
from meltzone.evolution import build_arrays, evolve, initial_state, run_kernel  # noqa: E402
from meltzone.interior import build_interior  # noqa: E402
from reference_evolution import ReferenceModel  # noqa: E402


def main():
    spec = PlanetSpec(mass_earth=5.0, end_time_gyr=10.0)
    evolve(spec)  # warm-up: compile or load the cache
    interior = build_interior(spec)
    grid, core, iso, par, law, _ = build_arrays(spec, interior)
    y0, tu0, tc0 = initial_state(spec, grid, core, par, law)

    def kernel_only():
        return run_kernel(grid, core, iso, par, law, y0, (tu0, tc0), spec.run.max_steps)

    times = []
    for _ in range(7):
        t = time.perf_counter()
        hist, iv, state = kernel_only()
        times.append(time.perf_counter() - t)
    t_kernel = statistics.median(times)
    t_full = statistics.median([(lambda t0: (evolve(spec), time.perf_counter() - t0)[1])(time.perf_counter())
                                for _ in range(5)])
    n_steps = len(hist) - 1
    n_nodes = grid.shape[1]
    print(f"5 M_E, 10 Gyr, {n_nodes} mantle nodes: {n_steps} accepted steps, {int(state[8])} rejected")
    print(f"numba kernel: median {1e3 * t_kernel:.1f} ms; evolve() incl. interior and curves: {1e3 * t_full:.1f} ms")
    print(f"cost per node-step: {1e9 * t_kernel / (n_steps * n_nodes):.1f} ns")

    ref = ReferenceModel(spec)
    t = time.perf_counter()
    sol = ref.run(np.array([spec.run.end_time_gyr * 3.15576e16]), rtol=1e-7)
    t_ref = time.perf_counter() - t
    print(f"reference (NumPy + solve_ivp LSODA, rtol 1e-7): {t_ref:.2f} s, {sol.nfev} RHS calls; "
          f"kernel is {t_ref / t_kernel:.0f}x faster")
    print(f"final T_u: kernel {hist[-1, 1]:.2f} K, reference {sol.y[0, -1]:.2f} K")


if __name__ == "__main__":
    main()
