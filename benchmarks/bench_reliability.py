"""Reliability and run time over random planets of the documented box (seeded; nothing is asserted here).

    python benchmarks/bench_reliability.py [N] [--scheme boundary-layer|mixing-length|both] [--seed 7]
                                           [--end-time-gyr 4.5] [--only 782,901] [--show-failures]

The box is the table ``BOX`` of tests/planet_box.py (invented planets): mass 0.5-15 M_E (log-uniform), core
mass fraction 0.1-0.7, mobile or stagnant lid, surface none, grey or steam with 0-1e22 kg water and 0-1e21 kg
CO2, half under an equilibrium temperature of 200-2000 K and half around a host star of 0.1-1.2 M_sun at
0.01-2 AU, a hot (molten) or cool (T_u 1700-2200 K) start; run to 4.5 Gyr (default
N = 1000). Prints, per scheme, the failures by message, NaN counts, the runs whose energy closure exceeds the
summary's tolerance, the largest closure error, and the median, 99th-percentile and largest wall time of the
runs that finished (evolve and summary, one process, after a compiling warm-up).

``--show-failures`` prints each failing planet as its index and configuration (JSON), so it can be rerun alone;
``--only 782,901`` runs just those planets of the seeded draw (the draw of all N is repeated, only the chosen ones
are run) and prints each one's configuration and outcome.
"""

from __future__ import annotations

import argparse
import json
import os
import random
import re
import sys
from collections import Counter

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "tests"))

from planet_box import check, planet  # noqa: E402


def draw(n: int, scheme: str, seed: int, end_time_gyr: float) -> list[dict]:
    """The seeded draw of n planets (planet i of a draw is the same whatever is run)."""
    rng = random.Random(seed)
    return [planet(rng, scheme, end_time_gyr) for _ in range(n)]


def only(indices: list[int], scheme: str, seed: int, end_time_gyr: float) -> None:
    """Run the chosen planets of the draw alone; print each one's configuration and outcome."""
    configs = draw(max(indices) + 1, scheme, seed, end_time_gyr)
    for i in indices:
        out = check(configs[i])
        print(f"#{i} {json.dumps(configs[i])}")
        print(f"   -> {out}")


def bench(n: int, scheme: str, seed: int, end_time_gyr: float, show_failures: bool = False) -> None:
    check(planet(random.Random(0), scheme, 1e-3))  # compile (or load the cache) first
    failures, times, closures, steps, nans, open_budget = Counter(), [], [], [], 0, 0
    failing = []
    for i, cfg in enumerate(draw(n, scheme, seed, end_time_gyr)):
        out = check(cfg)
        if out["failure"] is not None or out["nan"] or not out["closure_ok"]:
            failing.append((i, cfg, out["failure"] or ("NaN" if out["nan"] else f"closure {out['closure']:.1e}")))
        if out["failure"] is not None:
            failures[re.sub(r"\d[\d.e+-]*", "#", out["failure"])[:100]] += 1  # grouped by message
            continue
        times.append(out["wall_s"])
        closures.append(out["closure"])
        steps.append(out["steps"])
        nans += out["nan"]
        open_budget += not out["closure_ok"]
    print(f"{n} planets ({scheme}, seed {seed}, {end_time_gyr:g} Gyr): {len(times)} finished, "
          f"{sum(failures.values())} failed, {nans} with NaN in a series, {open_budget} above the closure tolerance")
    for msg, k in failures.most_common():
        print(f"  {k:4d} x {msg}")
    if times:
        print(f"wall time per planet: median {np.median(times):.3f} s, p99 {np.percentile(times, 99):.3f} s, "
              f"largest {max(times):.2f} s; steps median {np.median(steps):.0f}, p99 {np.percentile(steps, 99):.0f}; "
              f"largest energy-closure error {max(closures):.1e}")
        slow = sorted(range(len(times)), key=times.__getitem__)[-5:]
        print("slowest: " + ", ".join(f"{times[j]:.2f} s ({steps[j]} steps)" for j in reversed(slow)))
    if show_failures:
        for i, cfg, why in failing:
            print(f"#{i} {why[:160]}\n   {json.dumps(cfg)}")


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("n", nargs="?", type=int, default=1000)
    ap.add_argument("--scheme", default="boundary-layer", choices=["boundary-layer", "mixing-length", "both"])
    ap.add_argument("--seed", type=int, default=7)
    ap.add_argument("--end-time-gyr", type=float, default=4.5)
    ap.add_argument("--only", default="", help="comma-separated planet indices of the draw to run alone")
    ap.add_argument("--show-failures", action="store_true", help="print each failing planet's index and config")
    args = ap.parse_args()
    for scheme in ("boundary-layer", "mixing-length") if args.scheme == "both" else (args.scheme,):
        if args.only:
            only([int(i) for i in args.only.split(",")], scheme, args.seed, args.end_time_gyr)
        else:
            bench(args.n, scheme, args.seed, args.end_time_gyr, args.show_failures)


if __name__ == "__main__":
    main()
