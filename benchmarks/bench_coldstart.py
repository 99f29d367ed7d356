"""Benchmark: the first `meltzone run` (cold numba cache: every kernel compiles) against the second (warm: the
kernels load from the cache), each in a fresh subprocess with its own empty NUMBA_CACHE_DIR, on the demo planet.

    python benchmarks/bench_coldstart.py
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time


def _run(cache: str, out: str) -> float:
    env = dict(os.environ, NUMBA_CACHE_DIR=cache)
    t = time.perf_counter()
    subprocess.run([sys.executable, "-c", "from meltzone.cli import main; main()", "run", "-o", out],
                   env=env, check=True, capture_output=True)
    return time.perf_counter() - t


def main():
    with tempfile.TemporaryDirectory(prefix="meltzone-coldstart-") as tmp:
        cache = os.path.join(tmp, "numba")
        out = os.path.join(tmp, "tmp.h5")
        cold = _run(cache, out)
        warm = _run(cache, out)
    print(f"meltzone run (demo planet): cold cache {cold:.1f} s, warm cache {warm:.2f} s, "
          f"cold / warm = {cold / warm:.1f}")


if __name__ == "__main__":
    main()
