"""Benchmark: the 5 M_E, 10 Gyr runs of both schemes in this checkout against a base commit, in ONE process.

The base commit's ``meltzone`` package is exported (``git archive``) into a temporary folder as the package
``meltzone_base`` and this checkout's is copied there as ``meltzone_new``; the package imports itself only
relatively, so both load side by side. Each side's interior and melting curves are built once; the timed repeats
alternate base and new, mixing-length and boundary-layer scheme, so that a change of the machine's load falls on
all alike. Reports per side and scheme the median and fastest CPU time of ``run`` (interior and curves excluded),
the base / new ratio per repeat and its median, and whether the two sides' histories agree to the last bit.
Both sides compile into one fresh numba cache folder first (about a minute each).

    python benchmarks/bench_versions.py [--base 4cc49de] [--repeats 7]
"""

from __future__ import annotations

import argparse
import importlib
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
SCHEMES = ("mixing-length", "boundary-layer")


def _export(base: str, folder: Path) -> None:
    """The base commit's package as folder/meltzone_base and this checkout's as folder/meltzone_new."""
    archive = subprocess.run(["git", "archive", base, "meltzone"], cwd=ROOT, check=True, capture_output=True).stdout
    subprocess.run(["tar", "-x", "-C", str(folder)], input=archive, check=True)
    (folder / "meltzone").rename(folder / "meltzone_base")
    shutil.copytree(ROOT / "meltzone", folder / "meltzone_new", ignore=shutil.ignore_patterns("__pycache__"))


def _runner(name: str, scheme: str):
    """A warm, argument-free call of the package's ``run`` for the 5 M_E, 10 Gyr planet and its history."""
    cfg = importlib.import_module(f"{name}.config")
    melting = importlib.import_module(f"{name}.melting")
    interior_mod = importlib.import_module(f"{name}.interior")
    module = importlib.import_module(f"{name}.evolution.{scheme.replace('-', '_')}")
    spec = cfg.PlanetSpec(mass_earth=5.0, end_time_gyr=10.0, scheme=scheme)
    interior = interior_mod.build_interior(spec)
    curves = melting.node_curves(melting.get_model(spec.melting.model), interior.P[interior.mantle])
    history = module.run(spec, interior, curves)  # compiles or loads the kernels
    return (lambda: module.run(spec, interior, curves)), history


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--base", default="4cc49de", help="commit to compare against (default 4cc49de)")
    ap.add_argument("--repeats", type=int, default=7, help="alternating timed rounds (default 7)")
    args = ap.parse_args(argv)
    with tempfile.TemporaryDirectory(prefix="meltzone-versions-") as tmp:
        folder = Path(tmp)
        _export(args.base, folder)
        os.environ["NUMBA_CACHE_DIR"] = str(folder / "numba-cache")
        sys.path.insert(0, str(folder))
        runs, agree = {}, {}
        for scheme in SCHEMES:
            (f_base, h_base), (f_new, h_new) = (_runner(name, scheme) for name in ("meltzone_base", "meltzone_new"))
            runs[scheme] = {"base": f_base, "new": f_new}
            same = h_base.time.shape == h_new.time.shape and all(
                (h_base[k] == h_new[k]).all() for k in ("core_temperature", "surface_heat_flow", "upper_temperature"))
            agree[scheme] = bool(same)
        times = {(scheme, side): [] for scheme in SCHEMES for side in ("base", "new")}
        for _ in range(args.repeats):
            for scheme in SCHEMES:
                for side in ("base", "new"):
                    t = time.process_time()
                    runs[scheme][side]()
                    times[scheme, side].append(time.process_time() - t)
    print(f"5 M_E, 10 Gyr, default nodes; base {args.base} against this checkout; {args.repeats} alternating "
          "repeats, CPU time of run()")
    for scheme in SCHEMES:
        for side in ("base", "new"):
            v = times[scheme, side]
            print(f"  {scheme:15s} {side:4s}: median {statistics.median(v) * 1e3:8.1f} ms, fastest "
                  f"{min(v) * 1e3:8.1f} ms")
        ratios = [b / n for b, n in zip(times[scheme, "base"], times[scheme, "new"])]
        print(f"  {scheme:15s} base / new per repeat: {' '.join(f'{r:.2f}' for r in ratios)}; median "
              f"{statistics.median(ratios):.2f}; histories identical: {agree[scheme]}")


if __name__ == "__main__":
    main()
