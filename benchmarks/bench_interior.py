"""Benchmark: one structure solve at default resolution, and start-up costs.

Reports the median warm solve time of the numba solver and its ratio to the plain
scipy solve_ivp reference (tests/reference_structure.py) on the same cold two-layer
planet, plus `import meltzone` and `meltzone --help` wall times. Ratios come from
runs in this one process; no timed assertions.

    python benchmarks/bench_interior.py
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import time

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "tests"))

import meltzone  # noqa: E402
from meltzone.constants import EARTH_MASS  # noqa: E402
from meltzone.eos import FORM_BM3, IRON, Material  # noqa: E402
from meltzone.interior import solve_structure  # noqa: E402
from reference_structure import cold_two_layer_radius  # noqa: E402


def timed(fn, repeat):
    out = []
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        out.append(time.perf_counter() - t)
    return statistics.median(out)


def wall(cmd):
    t = time.perf_counter()
    subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL)
    return time.perf_counter() - t


def main():
    meltzone.build_interior(mass_earth=5.0)  # warm-up (compile or load the cache)
    t_default = timed(lambda: meltzone.build_interior(mass_earth=5.0), 15)
    print(f"default solve, 5 M_E (full mantle phases, thermal pressure): median {1e3 * t_default:.1f} ms")

    pv = Material("MgSiO3", FORM_BM3, 4100.0, 247e9, 3.97, 1.5, 1.0, "Seager et al. 2007")
    m = 5.0 * EARTH_MASS
    fast = lambda: solve_structure(m, 0.325 * m, core_material=IRON.cold(), mantle=[pv],  # noqa: E731
                                   boundaries=np.empty((0, 3)), surface_pressure=0.0)
    fast()
    t_fast = timed(fast, 15)
    t_ref = timed(lambda: cold_two_layer_radius(m, 0.325), 3)
    print(f"cold two-layer 5 M_E: numba {1e3 * t_fast:.1f} ms, scipy solve_ivp reference {1e3 * t_ref:.1f} ms, "
          f"ratio {t_ref / t_fast:.1f}x")

    t_import = statistics.median(wall([sys.executable, "-c", "import meltzone"]) for _ in range(5))
    t_base = statistics.median(wall([sys.executable, "-c", "pass"]) for _ in range(5))
    t_help = statistics.median(wall([sys.executable, "-m", "meltzone.cli", "--help"]) for _ in range(5))
    print(f"import meltzone: {t_import:.3f} s (bare interpreter {t_base:.3f} s); meltzone --help: {t_help:.3f} s")
    loaded = subprocess.run([sys.executable, "-c", "import sys, meltzone, meltzone.cli; "
                             "print('numba' in sys.modules)"], capture_output=True, text=True).stdout.strip()
    print(f"numba imported by `import meltzone` and the CLI module: {loaded}")


if __name__ == "__main__":
    main()
