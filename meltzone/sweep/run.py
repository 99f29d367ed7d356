"""run_sweep: every case of a spec on the chosen executor, checkpointed as it goes, into one sweep file.

The client submits the cases in small batches (one task per batch, so that the scheduler's per-task cost
is shared), records each finished case once, checkpoints the finished cases (:mod:`.checkpoint`), restarts
its own process pool when a worker dies, and writes the file (:mod:`.file`) when every case has a row.
Ctrl-C (KeyboardInterrupt) flushes the checkpoint, stops the workers and re-raises.
"""

from __future__ import annotations

import os
import sys
import time
import warnings
from dataclasses import dataclass
from pathlib import Path
from typing import Callable

from ..errors import ConfigError, MeltzoneError, ResultsFileError
from . import worker
from .checkpoint import Checkpoint, detail_path, progress_path
from .executors import make_backend
from .file import complete_file, counts_from_file, output_kind, write_sweep_file
from .spec import SweepSpec, load_spec
from .worker import FAILED, OK, REJECTED

__all__ = ["run_sweep", "SweepReport", "SweepIncomplete"]


class SweepIncomplete(MeltzoneError):
    """Some cases could not be run (workers died or the connection was lost); the rest are checkpointed."""


@dataclass
class SweepReport:
    """What one call of :func:`run_sweep` did."""

    path: str
    n_cases: int
    n_ok: int
    n_failed: int
    n_rejected: int
    ran: list          # case indices executed by this call
    resumed: int       # cases taken from the checkpoint
    executor: str
    wall_time_s: float

    def line(self) -> str:
        extra = f", {self.n_rejected} rejected" if self.n_rejected else ""
        res = f" ({self.resumed} from the checkpoint)" if self.resumed else ""
        return (f"wrote {self.path}: {self.n_cases} cases, {self.n_failed} failed{extra}{res}; "
                f"{len(self.ran)} handled by this call (rejected draws included) on {self.executor} in "
                f"{self.wall_time_s:.1f} s")


# ---------------------------------------------------------------------- progress
class ProgressBar:
    """Cases done, failures and ETA on stderr (redrawn at most 5 times a second)."""

    def __init__(self, total: int, stream=None):
        self.total = total
        self.stream = stream or sys.stderr
        self.last = 0.0
        self.width = 28

    def __call__(self, info: dict) -> None:
        now = time.monotonic()
        if now - self.last < 0.2 and info["done"] < self.total:
            return
        self.last = now
        frac = info["done"] / self.total if self.total else 1.0
        bar = "#" * int(round(frac * self.width))
        eta = info["eta_s"]
        eta_text = "--" if eta is None else _duration(eta)
        bad = f", {info['failed']} failed" + (f", {info['rejected']} rejected" if info["rejected"] else "")
        self.stream.write(f"\r[{bar:<{self.width}}] {info['done']}/{self.total} cases{bad}, "
                          f"{info['rate']:.3g}/s, ETA {eta_text}   ")
        self.stream.flush()

    def close(self) -> None:
        self.stream.write("\n")
        self.stream.flush()


def _duration(s: float) -> str:
    s = int(round(s))
    if s < 60:
        return f"{s}s"
    if s < 3600:
        return f"{s // 60}m{s % 60:02d}s"
    return f"{s // 3600}h{(s % 3600) // 60:02d}m"


def _progress_callback(progress, n: int):
    """(callback or None, the bar to close or None) for the ``progress`` argument of :func:`run_sweep`."""
    if progress is None:
        progress = sys.stderr.isatty()
    if progress is True:
        bar = ProgressBar(n)
        return bar, bar
    return (progress if callable(progress) else None), None


# ---------------------------------------------------------------------- the cases of one call
class _Cases:
    """The finished cases of one call (from the checkpoint and from this call), what is left, what was lost."""

    def __init__(self, n: int, done: dict, ckpt: Checkpoint, callback: Callable | None):
        self.n = n
        self.done = done
        self.resumed = len(done)
        self.ckpt = ckpt
        self.callback = callback
        self.ran: list[int] = []
        self.lost: dict[int, str] = {}
        self.failed = sum(1 for r in done.values() if r["status"] == FAILED)
        self.rejected = sum(1 for r in done.values() if r["status"] == REJECTED)
        self.t0 = time.monotonic()

    def todo(self, among=None) -> list[int]:
        among = range(self.n) if among is None else among
        return [i for i in among if i not in self.done and i not in self.lost]

    def record(self, rows: list[dict]) -> None:
        """Keep the rows of one finished task (a case already recorded is not counted again)."""
        new = [row for row in rows if row["case"] not in self.done]
        for row in new:
            self.done[row["case"]] = row
            self.ran.append(row["case"])
            self.failed += row["status"] == FAILED
            self.rejected += row["status"] == REJECTED
        if new:
            self.ckpt.add(new)
            self.report()

    def report(self) -> None:
        if self.callback is None:
            return
        elapsed = time.monotonic() - self.t0
        rate = len(self.ran) / elapsed if elapsed > 0 else 0.0
        remaining = self.n - len(self.done)
        self.callback({"done": len(self.done), "total": self.n, "failed": self.failed, "rejected": self.rejected,
                       "ran": len(self.ran), "elapsed_s": elapsed, "rate": rate,
                       "eta_s": remaining / rate if rate > 0 else None})


def _submit(backend, spec: SweepSpec, todo: list[int], detail: str | None, token: str) -> dict:
    """Submit the missing cases in batches (1 case per task for small sweeps, up to 16 for large ones);
    returns {future: case indices}."""
    base = backend.prepare(spec.base)
    size = max(1, min(16, len(todo) // 64))
    futures = {}
    for start in range(0, len(todo), size):
        chunk = todo[start:start + size]
        payload = [(idx, assign, obs) for idx, _, assign, obs in (spec.case_payload(i) for i in chunk)]
        fut = backend.submit(worker.run_cases, payload, base, detail, key=f"meltzone-cases-{token}-{chunk[0]}")
        futures[fut] = chunk
    return futures


def _collect(backend, futures: dict, cases: _Cases) -> str | None:
    """Record every task as it finishes; returns the message when the pool broke (else None)."""
    for fut in backend.completed(list(futures)):
        kind, value = backend.outcome(fut)
        if kind == "ok":
            cases.record(value)
        elif kind == "lost":
            cases.lost.update({i: value for i in futures[fut]})
        else:
            for other in futures:  # keep whatever finished before the pool broke
                done = backend.outcome(other) if other.done() else ("pending", None)
                if done[0] == "ok":
                    cases.record(done[1])
            return value
    return None


def _run_all(backend, spec: SweepSpec, cases: _Cases, detail: str | None, token: str, max_restarts: int,
             active: dict) -> None:
    """Run the missing cases, restarting our own pool up to ``max_restarts`` times when a worker dies.
    ``active`` holds the futures in flight (for the caller to abort on Ctrl-C)."""
    restarts = 0
    todo = cases.todo()
    while todo:
        active.clear()
        active.update(_submit(backend, spec, todo, detail, token))
        broken = _collect(backend, active, cases)
        if broken is not None:
            cases.ckpt.flush()
            if not backend.restartable or restarts >= max_restarts:
                cases.lost.update({i: broken for i in cases.todo(todo)})
            else:
                restarts += 1
                warnings.warn(f"{broken}; restarting the process pool ({restarts}/{max_restarts})", UserWarning,
                              stacklevel=4)
                backend.restart()
        todo = cases.todo(todo)


# ---------------------------------------------------------------------- checks before running
def _check_output(out_path) -> Path:
    """The output path, refused when its folder is missing, it is a folder, or it holds anything but a
    meltzone sweep file (a run file, a foreign HDF5 file, another file): a sweep never overwrites those."""
    out = Path(out_path)
    if not out.parent.exists():
        raise ConfigError(f"output folder {str(out.parent)!r} does not exist")
    if out.is_dir():
        raise ConfigError(f"output {str(out)!r} is a folder; give a file name such as study.h5")
    kind = output_kind(out)
    if kind not in (None, "sweep"):
        raise ResultsFileError(f"output {str(out)!r} exists and is {kind}; a sweep does not overwrite it: choose "
                               "another output file or remove it")
    return out


def _detail_folder(out: Path, keep_detail: bool) -> str | None:
    if not keep_detail:
        return None
    from .. import results

    if hasattr(results, "write"):
        return str(detail_path(out).resolve())  # absolute: workers may run in another folder
    warnings.warn("keep_detail: this version of meltzone.results has no write(); per-case detail files are "
                  "skipped", UserWarning, stacklevel=3)
    return None


# ---------------------------------------------------------------------- the entry point
def run_sweep(spec_or_path, out_path, executor=None, workers: int | None = None, resume: bool = False,
              progress=None, keep_detail: bool = False, *, scheduler: str | None = None,
              checkpoint_every: int = 64, checkpoint_seconds: float = 5.0, max_pool_restarts: int = 3,
              dashboard: str | None = None) -> SweepReport:
    """Run every case of a sweep and write one HDF5 table.

    Parameters
    ----------
    spec_or_path : str, PathLike, mapping or SweepSpec
        The sweep spec (see :mod:`meltzone.sweep.spec` and ``meltzone sweep --example``).
    out_path : str or PathLike
        The HDF5 file to write (atomically, at the end). An existing file that is not a meltzone sweep
        file (a run file, a foreign file) is refused, never overwritten.
    executor : None, str, concurrent.futures.Executor or distributed.Client
        None or ``"processes"``: a local process pool of ``workers`` processes (default: the number of
        cores); ``"serial"``: this process; ``"dask-local"``: a Dask LocalCluster of ``workers``
        processes with one thread each, on 127.0.0.1, without dashboard, scratch in a temporary folder
        removed afterwards; an Executor or Client of the caller's (used, not shut down).
    workers : int, optional
        Number of worker processes for ``"processes"`` and ``"dask-local"``.
    resume : bool
        Take finished cases from ``OUT.h5.progress/`` and run only the missing ones.
    progress : None, bool or callable
        None: a progress bar on stderr when it is a terminal; False: none; True: always; a callable
        is called with a dict (done, total, failed, rejected, ran, elapsed_s, rate, eta_s).
    keep_detail : bool
        Also keep each case's full result in ``OUT.h5.detail/case-NNNNNN.h5`` (written by the
        worker that ran it) when :func:`meltzone.results.write` exists; otherwise warn and skip.
    scheduler : str, optional
        Address of a running Dask scheduler (``tcp://host:8786``) to connect a Client to.
    checkpoint_every, checkpoint_seconds : int, float
        A checkpoint batch is written after the first finished task, then after this many new cases or
        this many seconds, whichever comes first (and on Ctrl-C).
    max_pool_restarts : int
        How often a local process pool whose worker died is restarted before giving up.
    dashboard : str, optional
        ``"HOST:PORT"`` at which a Dask LocalCluster started here (``executor="dask-local"``) serves its
        dashboard, e.g. ``"127.0.0.1:8787"``; none by default.

    Returns
    -------
    SweepReport
        Counts, the cases run by this call, the executor and the wall time.

    Raises
    ------
    ConfigError
        A mistake in the spec, a checkpoint of another spec, or a bad executor argument.
    ResultsFileError
        The output holds another kind of file, or the output folder is not writable.
    SweepIncomplete
        Some cases could not be run (machinery failure); the rest are checkpointed, re-run with resume.
    """
    t0 = time.perf_counter()
    spec = load_spec(spec_or_path)
    out = _check_output(out_path)
    n = spec.n_cases
    identity = spec.identity()
    detail = _detail_folder(out, keep_detail)
    if resume and not progress_path(out).exists() and complete_file(out, identity):
        return SweepReport(str(out), n, *counts_from_file(out), ran=[], resumed=n,
                           executor="none (already complete)", wall_time_s=time.perf_counter() - t0)

    ckpt = Checkpoint(progress_path(out), identity, n, checkpoint_every, checkpoint_seconds)
    callback, bar = _progress_callback(progress, n)
    cases = _Cases(n, ckpt.open(resume), ckpt, callback)
    backend = None
    active: dict = {}
    try:
        cases.report()
        if cases.todo():
            backend = make_backend(executor, workers, scheduler, dashboard)
            token = identity[:12] + "-" + os.urandom(4).hex()
            _run_all(backend, spec, cases, detail, token, max_pool_restarts, active)
        ckpt.flush()
    except BaseException:
        _stop(ckpt, cases, backend, active, bar)
        raise
    if bar is not None:
        bar.close()
    if backend is not None:
        backend.close()
    if cases.lost:
        ckpt.close()
        first = next(iter(cases.lost.values()))
        raise SweepIncomplete(f"{len(cases.lost)} of {n} cases could not be run ({first}); {len(cases.done)} "
                              f"finished cases are checkpointed in {ckpt.folder}; re-run with --resume")
    rows = [cases.done[i] for i in range(n)]
    write_sweep_file(out, spec, rows, identity=identity)
    ckpt.remove()
    counts = [sum(r["status"] == code for r in rows) for code in (OK, FAILED, REJECTED)]
    return SweepReport(str(out), n, *counts, ran=cases.ran, resumed=cases.resumed,
                       executor="none" if backend is None else backend.name, wall_time_s=time.perf_counter() - t0)


def _stop(ckpt: Checkpoint, cases: _Cases, backend, active: dict, bar) -> None:
    """On the way out of an interrupted or failed sweep: keep what finished, stop the workers."""
    ckpt.flush()
    if cases.done:
        ckpt.close()
    else:  # nothing finished: leave no checkpoint that a plain re-run would trip over
        ckpt.remove()
    if backend is not None:
        backend.abort(list(active))
        backend.close()
    if bar is not None:
        bar.close()
