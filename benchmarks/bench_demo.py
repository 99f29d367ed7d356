"""Benchmark: the warm demo (`meltzone run` without a config, the invented Veyra-3 b) of this checkout against a
base commit (default f39928c, the code before issue #15), measured in the same run.

The base commit is checked out into a temporary git worktree (removed afterwards). Each side runs in its own
subprocesses with its own NUMBA_CACHE_DIR (warmed by one untimed process first); the timed processes alternate
old, new, old, new, ... so drifting machine load hits both alike. Each timed process reports the fastest of
``--repeats`` evolutions' wall time (``Result.wall_time_s``: structure, curves and the integration; imports and
file writing excluded), the wall time of its first evolution (which loads the kernels from the cache) and the
accepted steps; the whole `meltzone run` is timed from outside as well (imports, kernel loading and the HDF5
file included: what a user waits for).

    python benchmarks/bench_demo.py [--base f39928c] [--new COMMIT] [--rounds 3] [--repeats 3]
"""

from __future__ import annotations

import argparse
import json
import os
import signal
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]

#: run in the subprocess: the demo planet as `meltzone run` builds it, evolved once (the kernels load from the
#: cache) and argv[1] times more; prints the first one's wall time, the fastest of the others and the steps
DRIVER = """
import json, sys
from meltzone.cli import demo_config_path
from meltzone.config import PlanetSpec
from meltzone.pipeline import evolve
spec = PlanetSpec.from_toml(str(demo_config_path()))
first = evolve(spec).wall_time_s
times = []
for _ in range(int(sys.argv[1])):
    res = evolve(spec)
    times.append(res.wall_time_s)
print(json.dumps({"first_s": first, "evolve_s": min(times), "steps": res.history.n_steps,
                  "file": __import__("meltzone").__file__}))
"""


#: (row key, label) of the three timings
MEASURES = (("evolve_s", "evolution (warm, in process)"), ("first_s", "first evolution (kernels load)"),
            ("cli_s", "whole `meltzone run`"))


def _env(tree: Path, cache: Path) -> dict:
    env = dict(os.environ, NUMBA_CACHE_DIR=str(cache), PYTHONPATH=str(tree), MPLBACKEND="Agg")
    env.pop("MELTZONE_FASTMATH", None)
    return env


def _evolve(tree: Path, cache: Path, repeats: int = 1) -> dict:
    out = subprocess.run([sys.executable, "-c", DRIVER, str(repeats)], env=_env(tree, cache), cwd=tree, check=True,
                         capture_output=True, text=True)
    row = json.loads(out.stdout.strip().splitlines()[-1])
    if not row["file"].startswith(str(tree)):
        raise RuntimeError(f"the subprocess imported {row['file']}, not the tree {tree}")
    return row


def _cli(tree: Path, cache: Path, out: Path) -> float:
    t = time.perf_counter()
    subprocess.run([sys.executable, "-c", "from meltzone.cli import main; main()", "run", "-o", str(out)],
                   env=_env(tree, cache), cwd=tree, check=True, capture_output=True)
    return time.perf_counter() - t


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--base", default="f39928c", help="commit to compare against (default f39928c)")
    ap.add_argument("--new", default=None, help="commit for the new side (default: this checkout as it is)")
    ap.add_argument("--rounds", type=int, default=3, help="alternating timed pairs (default 3)")
    ap.add_argument("--repeats", type=int, default=3,
                    help="evolutions per timed process, the fastest counts (default 3; load spikes hit single runs)")
    args = ap.parse_args(argv)
    signal.signal(signal.SIGTERM, lambda *_: sys.exit(1))  # so that the temporary worktree is removed
    with tempfile.TemporaryDirectory(prefix="meltzone-bench-demo-") as tmp:
        tmp = Path(tmp)
        base = tmp / "base"
        trees = {"old": base, "new": tmp / "new" if args.new else ROOT}
        made = []
        try:
            for k, commit in (("old", args.base), ("new", args.new)):
                if commit:
                    subprocess.run(["git", "-C", str(ROOT), "worktree", "add", "--detach", str(trees[k]), commit],
                                   check=True, capture_output=True)
                    made.append(trees[k])
            caches = {k: tmp / f"numba-{k}" for k in trees}
            for k in trees:  # warm each side's cache (untimed: compiles every kernel)
                _evolve(trees[k], caches[k])
                _cli(trees[k], caches[k], tmp / f"{k}.h5")
            rows = {"old": [], "new": []}
            for r in range(args.rounds):
                for k in ("old", "new"):
                    row = _evolve(trees[k], caches[k], args.repeats)
                    row["cli_s"] = _cli(trees[k], caches[k], tmp / f"{k}.h5")
                    rows[k].append(row)
                o, n = rows["old"][-1], rows["new"][-1]
                print(f"round {r + 1}: " + "; ".join(
                    f"{label} old {o[key]:.3f} s, new {n[key]:.3f} s, ratio {n[key] / o[key]:.2f}"
                    for key, label in MEASURES), flush=True)
            print(f"base {args.base}: steps old {rows['old'][0]['steps']}, new {rows['new'][0]['steps']}")
            for key, label in MEASURES:
                ratios = [n[key] / o[key] for o, n in zip(rows["old"], rows["new"])]
                print(f"  {label}: ratio new/old median {statistics.median(ratios):.2f} "
                      f"(min {min(ratios):.2f}, max {max(ratios):.2f})")
        finally:
            for tree in made:
                subprocess.run(["git", "-C", str(ROOT), "worktree", "remove", "--force", str(tree)],
                               check=False, capture_output=True)


if __name__ == "__main__":
    main()
