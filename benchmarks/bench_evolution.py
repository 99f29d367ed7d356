"""Benchmark: a 10 Gyr run of a 5 Earth-mass planet at default resolution (>= 256 mantle nodes).

Reports the warm median wall time of the boundary-layer scheme's integrator (interior, curves and input
packing excluded) and of the whole ``meltzone.evolve`` (included), the cost per node-step, and, for the default
run (volcanism, crust, outgassing and the pressure-dependent properties on), the same run with
``melting.basal_magma_ocean = "reservoir"`` and the run with ``volcanism.enabled = "off"`` (the kernel without
melt extraction): each one's accepted, rejected and implicit steps, its right-hand-side evaluations and the
time per evaluation, and the ratios to the default run, the with / without volcanism ratio split into
(evaluations ratio) x (cost per evaluation ratio), so that one sees whether extra time is more steps or dearer
ones. All timed in this one process, the variants alternating in every repeat so that a change of the
machine's load falls on all; wall and this process's CPU time (the steadier of the two on a shared machine),
and the load average before and after. Last, the ratio to the plain
NumPy + scipy solve_ivp reference path (tests/reference_evolution.py) on the same planet.

    python benchmarks/bench_evolution.py [repeats] [--no-reference]     (default 7 repeats)
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
from meltzone._core import dopri, layout as k  # noqa: E402
from meltzone._core.loop import N_DEP  # noqa: E402
from meltzone.config import PlanetSpec  # noqa: E402
from meltzone.constants import GYR  # noqa: E402
from meltzone.evolution import boundary_layer  # noqa: E402
from meltzone.interior import build_interior  # noqa: E402


def step_counts(state):
    """(accepted, rejected, implicit accepted, right-hand-side evaluations) of a finished integrator state.

    The loop does not count its evaluations; they follow from the steps: the first slope, one more where the
    run starts below or crosses the rheological transition, N_STAGES - 1 per Dormand-Prince attempt (first
    same as last) and, per accepted Rodas3 step, 3 stages plus the finite-difference Jacobian (2 N_DEP + 1).
    Rejections are counted as explicit (a rejected Rodas3 step reuses its Jacobian: 3, not 6), so with
    implicit steps the number is an upper bound by at most 3 per rejected implicit step; exact without."""
    accepted = int(state[k.S_N_H]) - 1
    rejected = int(state[k.S_N_REJ])
    implicit = int(state[k.S_N_IMPLICIT])
    switched = 1 if state[k.S_T_SWITCH] < k.NOT_YET else 0
    n_rhs = (1 + switched + (dopri.N_STAGES - 1) * (accepted - implicit + rejected)
             + (3 + 2 * N_DEP + 1) * implicit)
    return accepted, rejected, implicit, n_rhs


def load():
    try:
        return "load average %.2f %.2f %.2f" % os.getloadavg()
    except OSError:
        return "load average unknown"


def main(repeats=7, reference=True):
    spec = PlanetSpec(mass_earth=5.0, end_time_gyr=10.0)
    meltzone.evolve(spec)  # warm-up: compile or load the cache
    interior = build_interior(spec)
    curves = melting.node_curves(melting.get_model(spec.melting.model), interior.P[interior.mantle])
    spec_on = spec.replace(basal_magma_ocean="reservoir")
    spec_nov = spec.replace(**{"volcanism.enabled": "off"})
    meltzone.evolve(spec_on)  # warm-up of the reservoir's kernels
    variants = {"default": spec, "reservoir": spec_on, "no volcanism": spec_nov}
    inputs = {name: boundary_layer.build_inputs(s, interior, curves) for name, s in variants.items()}
    times = {name: [] for name in variants}  # wall [s]
    cpu = {name: [] for name in variants}  # this process's CPU time [s]: less sensitive to other processes
    counts = {}
    print(f"before: {load()}")
    for _ in range(repeats):
        for name, spec_i in variants.items():
            t, c = time.perf_counter(), time.process_time()
            state = boundary_layer.integrate(spec_i, inputs[name])[-1]
            times[name].append(time.perf_counter() - t)
            cpu[name].append(time.process_time() - c)
            counts[name] = step_counts(state)
    print(f"after:  {load()}")
    med = {name: statistics.median(ts) for name, ts in times.items()}
    med_cpu = {name: statistics.median(ts) for name, ts in cpu.items()}
    t_kernel = med["default"]
    t_full = statistics.median([(lambda t0: (meltzone.evolve(spec), time.perf_counter() - t0)[1])(time.perf_counter())
                                for _ in range(5)])
    n_steps, n_rej, _, _ = counts["default"]
    n_nodes = inputs["default"].grid.shape[1]
    print(f"5 M_E, 10 Gyr, {n_nodes} mantle nodes, {repeats} alternating repeats (median)")
    print(f"integrator: median {1e3 * t_kernel:.1f} ms; evolve() incl. interior and curves: {1e3 * t_full:.1f} ms")
    print(f"cost per node-step: {1e9 * t_kernel / (n_steps * n_nodes):.1f} ns")
    for name in variants:
        acc, rej, imp, n_rhs = counts[name]
        print(f"{name:>13}: median {1e3 * med[name]:6.1f} ms wall, {1e3 * med_cpu[name]:6.1f} ms CPU; {acc} accepted, "
              f"{rej} rejected, {imp} implicit steps; {n_rhs} RHS evaluations; "
              f"{1e6 * med_cpu[name] / n_rhs:.2f} us CPU per evaluation (loop overhead included)")
    print(f"reservoir / off: {med['reservoir'] / t_kernel:.2f} wall, "
          f"{med_cpu['reservoir'] / med_cpu['default']:.2f} CPU")
    n_with, n_without = counts["default"][3], counts["no volcanism"][3]
    fastest = {name: min(ts) for name, ts in cpu.items()}  # the least disturbed repeat: steadiest under load
    for label, m, ts in (("wall, medians", med, times), ("CPU, medians", med_cpu, cpu),
                         ("CPU, fastest repeats", fastest, cpu)):
        ratio = m["default"] / m["no volcanism"]
        print(f"with volcanism / without ({label}): {ratio:.2f} = evaluations {n_with / n_without:.3f} x cost per "
              f"evaluation {ratio * n_without / n_with:.3f}"
              + ("" if label.endswith("fastest repeats") else "; per repeat "
                 + " ".join(f"{a / b:.2f}" for a, b in zip(ts["default"], ts["no volcanism"]))))

    if not reference:
        return
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
          f"the integrator without volcanism is {t_ref / med['no volcanism']:.0f}x faster")
    print(f"final T_u without volcanism: integrator {history['upper_temperature'][-1]:.2f} K, reference "
          f"{sol.y[0, -1]:.2f} K")


if __name__ == "__main__":
    args = [a for a in sys.argv[1:] if a != "--no-reference"]
    main(int(args[0]) if args else 7, "--no-reference" not in sys.argv)
