"""Benchmark: a sweep of tiny planets on this machine, local process pool and Dask, 1 and 2 workers.

Per-planet settings (tiny, to measure the machinery rather than the physics): interior.mantle_nodes = 64,
run.end_time_gyr = 0.1, Latin hypercube over planet.mass_earth (0.5-15, log) and
planet.core_mass_fraction (0.15-0.45), seed 1. Reports

* a bare loop of ``evolve()`` in this process, and of ``evolve()`` + ``track()`` + ``summarize()``
  (the work a sweep case does), planets per second;
* ``run_sweep`` with the process pool and with a Dask LocalCluster (1 thread per worker, loopback,
  no dashboard), 1 and 2 workers: total wall time (start-up and the final file included), steady-state
  planets per second (after the first result), per-planet overhead over the bare loop, the 2-vs-1 worker
  ratio, and the resident memory (psutil RSS) of each worker process.

Ratios come from runs in this one session; no timed assertions.

    python benchmarks/bench_sweep.py            # 1000 planets
    python benchmarks/bench_sweep.py --planets 100
"""

from __future__ import annotations

import argparse
import logging
import os
import shutil
import tempfile
import time


def make_spec(n: int) -> dict:
    return {"sweep": {"mode": "latin-hypercube", "samples": n, "seed": 1},
            "base": {"planet": {"name": "benchmark (invented planets)"}, "interior": {"mantle_nodes": 64},
                     "run": {"end_time_gyr": 0.1}},
            "parameters": {"planet.mass_earth": {"min": 0.5, "max": 15.0, "scale": "log"},
                           "planet.core_mass_fraction": {"min": 0.15, "max": 0.45}}}


def bare_loops(spec) -> tuple[float, float]:
    import warnings

    from meltzone import evolve
    from meltzone.config import PlanetSpec
    from meltzone.layers import summarize, track
    from meltzone.sweep import load_spec
    from meltzone.sweep.worker import _merge

    s = load_spec(spec)
    specs = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for a in s.design().assignments:
            specs.append(PlanetSpec(_merge(s.base, a)))
        evolve(specs[0])  # warm-up: load the compiled kernels
        failed = 0
        t = time.perf_counter()
        for p in specs:
            try:
                evolve(p)
            except Exception:  # a sweep records these as failed cases; the loop goes on likewise
                failed += 1
        t_evolve = time.perf_counter() - t
        t = time.perf_counter()
        for p in specs:
            try:
                r = evolve(p)
            except Exception:
                continue
            summarize(r, *track(r))
        t_case = time.perf_counter() - t
    if failed:
        print(f"({failed} planets fail in evolve(); the sweeps record them as failed cases)")
    return t_evolve, t_case


class Probe:
    """Progress callback: time of the first result, and worker RSS sampled halfway through."""

    def __init__(self, n: int, rss_fn):
        self.n = n
        self.t0 = time.perf_counter()
        self.first = None
        self.rss: list[int] = []
        self.rss_fn = rss_fn

    def __call__(self, info):
        if info["done"] >= 1 and self.first is None:
            self.first = (time.perf_counter(), info["done"])
        if not self.rss and info["done"] >= self.n // 2:
            self.rss = self.rss_fn()


def pool_rss() -> list[int]:
    import psutil

    out = []
    for p in psutil.Process().children():
        try:
            cmd = " ".join(p.cmdline())
            if "multiprocessing.spawn" in cmd and "resource_tracker" not in cmd:
                out.append(p.memory_info().rss)
        except psutil.Error:
            pass
    return out


def run_pool(spec, n, workers, folder):
    from meltzone.sweep import run_sweep

    probe = Probe(n, pool_rss)
    t = time.perf_counter()
    run_sweep(spec, os.path.join(folder, f"pool{workers}.h5"), workers=workers, progress=probe)
    return time.perf_counter() - t, probe


def run_dask(spec, n, workers, folder):
    import dask
    from distributed import Client, LocalCluster

    from meltzone.sweep import run_sweep

    scratch = tempfile.mkdtemp(prefix="meltzone-bench-dask-")
    t = time.perf_counter()
    with dask.config.set({"temporary-directory": scratch, "distributed.worker.profile.enabled": False}):
        cluster = LocalCluster(n_workers=workers, threads_per_worker=1, processes=True, host="127.0.0.1",
                               dashboard_address=None, scheduler_kwargs={"dashboard_address": "127.0.0.1:0"},
                               local_directory=scratch, silence_logs=logging.ERROR)
        client = Client(cluster)
    t_start = time.perf_counter() - t

    def rss():
        import psutil

        return list(client.run(lambda: psutil.Process().memory_info().rss).values())

    probe = Probe(n, rss)
    t = time.perf_counter()
    try:
        run_sweep(spec, os.path.join(folder, f"dask{workers}.h5"), executor=client, progress=probe)
        wall = time.perf_counter() - t
    finally:
        client.close()
        cluster.close()
        shutil.rmtree(scratch, ignore_errors=True)
    return wall + t_start, probe, t_start


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--planets", type=int, default=1000)
    ap.add_argument("--skip-dask", action="store_true")
    args = ap.parse_args()
    n = args.planets
    spec = make_spec(n)
    print(f"{n} planets: mantle_nodes 64, end_time 0.1 Gyr, LHS over mass 0.5-15 M_E (log) and core mass "
          f"fraction 0.15-0.45; {os.cpu_count()} cores")
    t_evolve, t_case = bare_loops(spec)
    print(f"bare evolve() loop:                    {t_evolve:7.1f} s  {n / t_evolve:7.1f} planets/s")
    print(f"bare evolve()+track()+summarize() loop: {t_case:6.1f} s  {n / t_case:7.1f} planets/s")
    folder = tempfile.mkdtemp(prefix="meltzone-bench-")
    rows = {}
    try:
        for workers in (1, 2):
            wall, probe = run_pool(spec, n, workers, folder)
            rows[("pool", workers)] = (wall, probe, None)
        if not args.skip_dask:
            for workers in (1, 2):
                wall, probe, t_start = run_dask(spec, n, workers, folder)
                rows[("dask", workers)] = (wall, probe, t_start)
    finally:
        shutil.rmtree(folder, ignore_errors=True)
    print()
    print(f"{'executor':<18}{'wall [s]':>10}{'planets/s':>11}{'steady/s':>10}{'overhead/planet':>17}"
          f"{'worker RSS [MB]':>18}")
    for (kind, workers), (wall, probe, t_start) in rows.items():
        t_first, done_first = probe.first
        steady = (n - done_first) / (probe.t0 + wall - (t_start or 0.0) - t_first) if n > done_first else float("nan")
        # per-planet overhead over the bare evolve+summarize loop, with the work shared by the workers
        overhead = (wall - t_case / workers) / n
        rss = ", ".join(f"{r / 2**20:.0f}" for r in probe.rss) or "-"
        label = f"{kind} x{workers}"
        print(f"{label:<18}{wall:>10.1f}{n / wall:>11.1f}{steady:>10.1f}{1e3 * overhead:>14.2f} ms{rss:>18}")
        if t_start is not None:
            print(f"{'':<18}(cluster start-up {t_start:.1f} s included)")
    print()
    for kind in ("pool", "dask"):
        if (kind, 1) in rows and (kind, 2) in rows:
            w1, w2 = rows[(kind, 1)][0], rows[(kind, 2)][0]
            print(f"{kind}: throughput 2 workers / 1 worker = {w1 / w2:.2f}")
    if ("pool", 1) in rows:
        print(f"pool x1 wall / bare evolve+summarize loop = {rows[('pool', 1)][0] / t_case:.2f}; "
              f"/ bare evolve loop = {rows[('pool', 1)][0] / t_evolve:.2f}")


if __name__ == "__main__":
    main()
