"""Reliability and run time over random planets of the documented box (seeded; nothing is asserted here).

    python benchmarks/bench_reliability.py [N] [--scheme boundary-layer] [--seed 7]

Box (invented planets): mass 0.5-15 M_E (log-uniform), core mass fraction 0.1-0.7, mobile or stagnant lid,
surface none or grey with 0-1e22 kg water and 0-1e21 kg CO2, equilibrium temperature 200-2000 K, a hot
(molten) or cool (1700-2200 K) start, run to 4.5 Gyr. Prints the failures by message, NaN counts, the largest
energy-closure error, and the median and 99th-percentile wall time of the runs that finished.
"""

from __future__ import annotations

import argparse
import math
import random
import time
from collections import Counter

import numpy as np


def planet(rng: random.Random, scheme: str) -> dict:
    grey = rng.random() < 0.5
    return {
        "planet": {"mass_earth": math.exp(rng.uniform(math.log(0.5), math.log(15.0))),
                   "core_mass_fraction": rng.uniform(0.1, 0.7)},
        "convection": {"scheme": scheme, "regime": rng.choice(["mobile-lid", "stagnant-lid"])},
        "surface": {"atmosphere": "grey" if grey else "none",
                    "water_inventory_kg": rng.uniform(0.0, 1e22) if grey else 0.0,
                    "co2_inventory_kg": rng.uniform(0.0, 1e21) if grey else 0.0,
                    "equilibrium_temperature_k": rng.uniform(200.0, 2000.0)},
        "initial": {"upper_temperature_k": 0.0 if rng.random() < 0.5 else rng.uniform(1700.0, 2200.0)},
        "run": {"end_time_gyr": 4.5},
    }


def main():
    import warnings

    import meltzone
    from meltzone.errors import MeltzoneError

    ap = argparse.ArgumentParser()
    ap.add_argument("n", nargs="?", type=int, default=200)
    ap.add_argument("--scheme", default="boundary-layer")
    ap.add_argument("--seed", type=int, default=7)
    args = ap.parse_args()
    rng = random.Random(args.seed)
    meltzone.evolve(planet(random.Random(0), args.scheme) | {"run": {"end_time_gyr": 1e-3}})  # compile first
    failures, times, closures, nans = Counter(), [], [], 0
    for _ in range(args.n):
        cfg = planet(rng, args.scheme)
        t0 = time.perf_counter()
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                r = meltzone.evolve(cfg)
                s = r.summary()
        except MeltzoneError as exc:
            key = str(exc).split(":")[1].strip()[:70] if ":" in str(exc) else str(exc)[:70]
            failures[f"{type(exc).__name__}: {key}"] += 1
            continue
        times.append(time.perf_counter() - t0)
        closures.append(s["energy_closure"])
        nans += int(any(not np.all(np.isfinite(v)) for v in r.history.series.values()))
    print(f"{args.n} planets ({args.scheme}, seed {args.seed}): {len(times)} finished, {sum(failures.values())} "
          f"failed, {nans} with NaN in a series")
    for msg, k in failures.most_common():
        print(f"  {k:4d} x {msg}")
    if times:
        print(f"wall time per planet: median {np.median(times):.2f} s, p99 {np.percentile(times, 99):.2f} s; "
              f"largest energy-closure error {max(closures):.1e}")


if __name__ == "__main__":
    main()
