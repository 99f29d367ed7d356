"""Grid and time-step convergence of the mixing-length scheme's events (issue #12: "doubling the cells moves
layer edges by less than one old cell and event times by <= 2%").

For each planet (mass, regime, end time) the script runs the mixing-length scheme at several mantle-node counts
and prints the event times of the summary (magma-ocean end by both definitions, the rheological transition, the
basal layer's start, end and largest thickness, the last melt) with the relative change per doubling; then the
finest-but-one grid again with half the step tolerance (run.max_temperature_step_k halved), which halves the
local-error bound and the per-step temperature and melt-fraction bounds.

    python benchmarks/convergence_mlt.py                       # 1 and 5 M_E, mobile lid, 64-512 nodes
    python benchmarks/convergence_mlt.py --nodes 64,128,256 --mass 1 --regime stagnant-lid --end-gyr 0.1
"""

from __future__ import annotations

import argparse
import time

import meltzone
from meltzone.config import PlanetSpec

#: (label, summary key or (basal_layer, field)) of the printed events
EVENTS = (("MO end (both criteria)", "magma_ocean_end_yr"),
          ("MO end (surface)", "surface_magma_ocean_end_yr"),
          ("rheological transition", "rheological_transition_yr"),
          ("basal layer start", ("basal_layer", "start_yr")),
          ("basal layer end", ("basal_layer", "end_yr")),
          ("basal max thickness [km]", ("basal_layer", "max_thickness_m")),
          ("last melt", "last_melt_yr"))


def value(summary, key):
    if isinstance(key, tuple):
        sub = summary.get(key[0])
        v = None if sub is None else sub.get(key[1])
        return None if v is None else (v / 1e3 if key[1].endswith("_m") else v)
    return summary.get(key)


def run(mass, regime, end_gyr, nodes, dt_k=10.0):
    spec = PlanetSpec(mass_earth=mass, end_time_gyr=end_gyr, scheme="mixing-length", regime=regime,
                      mantle_nodes=nodes, max_temperature_step_k=dt_k)
    t0 = time.perf_counter()
    result = meltzone.evolve(spec)
    return result.summary(), time.perf_counter() - t0, result.n_steps


def fmt(v):
    if v is None:
        return "      none"
    return f"{v:10.4g}"


def table(rows, labels, base):
    """Print the events (rows: (summary, seconds, steps)) with the change against column base[j] (None: none)."""
    print(f"{'':26s}" + "".join(f"{lab:>18s}" for lab in labels))
    for name, key in EVENTS:
        vals = [value(s, key) for s, _, _ in rows]
        cells = []
        for j, v in enumerate(vals):
            change = ""
            ref = None if base[j] is None else vals[base[j]]
            if v is not None and ref not in (None, 0):
                change = f" ({100 * (v - ref) / ref:+.1f}%)"
            cells.append(f"{fmt(v)}{change:>8s}")
        print(f"{name:26s}" + "".join(f"{c:>18s}" for c in cells))
    print(f"{'steps / wall [s]':26s}" + "".join(f"{f'{n} / {w:.1f}':>18s}" for _, w, n in rows))


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--mass", default="1,5", help="planet masses [M_E], comma separated")
    ap.add_argument("--regime", default="mobile-lid", help="mobile-lid, stagnant-lid or both")
    ap.add_argument("--nodes", default="64,128,256,512", help="mantle-node counts, comma separated")
    ap.add_argument("--end-gyr", type=float, default=1.0, help="end time [Gyr]")
    ap.add_argument("--no-dt", action="store_true", help="skip the time-step check")
    a = ap.parse_args(argv)
    nodes = [int(x) for x in a.nodes.split(",")]
    regimes = ("mobile-lid", "stagnant-lid") if a.regime == "both" else (a.regime,)
    for regime in regimes:
        for mass in (float(x) for x in a.mass.split(",")):
            print(f"\n== {mass:g} M_E, {regime}, {a.end_gyr:g} Gyr; times in yr ==")
            rows = [run(mass, regime, a.end_gyr, n) for n in nodes]
            labels = [f"{n} nodes" for n in nodes]
            base = [None] + list(range(len(nodes) - 1))
            if not a.no_dt:
                j = max(len(nodes) - 2, 0)
                rows.append(run(mass, regime, a.end_gyr, nodes[j], dt_k=5.0))
                labels.append(f"{nodes[j]}, tol/2")
                base.append(j)
            table(rows, labels, base)


if __name__ == "__main__":
    main()
