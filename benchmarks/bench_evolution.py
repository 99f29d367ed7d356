"""Benchmark: a 10 Gyr run of a 5 Earth-mass planet at default resolution (>= 256 mantle nodes).

Reports the warm median wall time of the boundary-layer scheme's integrator (interior, curves and input
packing excluded) and of the whole ``meltzone.evolve`` (included), the number of accepted steps, the cost per
node-step, the ratio of the same integrator with ``melting.basal_magma_ocean = "reservoir"`` to it with "off" (the
default), the ratio to it with ``volcanism.enabled = "off"`` (the kernel without melt extraction), and the ratio
to the plain NumPy + scipy solve_ivp reference path (tests/reference_evolution.py) on
the same planet, all measured in this one process.

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

import meltzone  # noqa: E402
from meltzone import melting  # noqa: E402
from meltzone.config import PlanetSpec  # noqa: E402
from meltzone.constants import GYR  # noqa: E402
from meltzone.evolution import boundary_layer  # noqa: E402
from meltzone.interior import build_interior  # noqa: E402


def main():
    spec = PlanetSpec(mass_earth=5.0, end_time_gyr=10.0)
    meltzone.evolve(spec)  # warm-up: compile or load the cache
    interior = build_interior(spec)
    curves = melting.node_curves(melting.get_model(spec.melting.model), interior.P[interior.mantle])
    inputs = boundary_layer.build_inputs(spec, interior, curves)

    # the same run with the basal magma ocean's reservoir and without volcanism, timed in this process,
    # alternating with the default run so that a change of machine load falls on all
    spec_on = spec.replace(basal_magma_ocean="reservoir")
    inputs_on = boundary_layer.build_inputs(spec_on, interior, curves)
    meltzone.evolve(spec_on)  # warm-up of the reservoir's kernels
    spec_nov = spec.replace(**{"volcanism.enabled": "off"})
    inputs_nov = boundary_layer.build_inputs(spec_nov, interior, curves)
    times, times_on, times_nov = [], [], []
    for _ in range(7):
        for spec_i, inputs_i, out in ((spec, inputs, times), (spec_on, inputs_on, times_on),
                                      (spec_nov, inputs_nov, times_nov)):
            t = time.perf_counter()
            boundary_layer.integrate(spec_i, inputs_i)
            out.append(time.perf_counter() - t)
    t_kernel = statistics.median(times)
    t_on = statistics.median(times_on)
    t_nov = statistics.median(times_nov)
    t_full = statistics.median([(lambda t0: (meltzone.evolve(spec), time.perf_counter() - t0)[1])(time.perf_counter())
                                for _ in range(5)])
    history = boundary_layer.run(spec, interior, curves)
    n_steps = history.n_steps
    n_nodes = history.grid.n
    print(f"5 M_E, 10 Gyr, {n_nodes} mantle nodes: {n_steps} accepted steps, {history.n_rejected} rejected")
    print(f"integrator: median {1e3 * t_kernel:.1f} ms; evolve() incl. interior and curves: {1e3 * t_full:.1f} ms")
    print(f"cost per node-step: {1e9 * t_kernel / (n_steps * n_nodes):.1f} ns")
    print(f"with the basal magma ocean's reservoir: median {1e3 * t_on:.1f} ms; reservoir / off: {t_on / t_kernel:.2f}")
    print(f"without volcanism: median {1e3 * t_nov:.1f} ms; with it / without: {t_kernel / t_nov:.2f}")

    try:
        from reference_evolution import ReferenceModel
    except ImportError as exc:  # the reference path follows the package's API; say so rather than fail
        print(f"reference path not available ({exc})")
        return
    ref = ReferenceModel(spec_nov)  # the reference has no melt extraction
    history = boundary_layer.run(spec_nov, interior, curves)
    t = time.perf_counter()
    sol = ref.run(np.array([spec.run.end_time_gyr * GYR]), rtol=1e-7)
    t_ref = time.perf_counter() - t
    print(f"reference (NumPy + solve_ivp LSODA, rtol 1e-7): {t_ref:.2f} s, {sol.nfev} RHS calls; "
          f"integrator is {t_ref / t_kernel:.0f}x faster")
    print(f"final T_u without volcanism: integrator {history['upper_temperature'][-1]:.2f} K, reference "
          f"{sol.y[0, -1]:.2f} K")


if __name__ == "__main__":
    main()
