"""Executors of a sweep: where the cases run. One small interface over three kinds of backend.

* :class:`SerialBackend`: one case after the other in this process (tests, debugging).
* :class:`PoolBackend`: a local ``spawn`` process pool of our own (restarted when a worker dies), or any
  ``concurrent.futures.Executor`` the caller passes (used, not shut down).
* :class:`DaskBackend`: a ``dask.distributed`` Client: a LocalCluster started here on 127.0.0.1 (no
  dashboard unless asked, scratch in a temporary folder removed afterwards), a Client connected to a
  scheduler address, or a Client the caller passes (used, not closed).

The backend is chosen by :func:`make_backend` from the explicit ``executor`` / ``scheduler`` arguments,
never from the call stack. Every backend has ``name``, ``restartable``, ``prepare(base)`` (the argument
that carries the base config to the workers: Dask scatters it once), ``submit(fn, *args, key=None)``,
``completed(futures)``, ``outcome(future)`` -> ``("ok", value)``, ``("lost", message)`` or ``("broken",
message)`` (the whole pool died), ``abort(futures)``, ``restart()`` and ``close()``.
"""

from __future__ import annotations

import os
import shutil

from ..errors import ConfigError
from . import worker

__all__ = ["SerialBackend", "PoolBackend", "DaskBackend", "make_backend", "is_dask_client"]


class _Deferred:
    """The pending call of the serial backend (run when its results are asked for)."""

    __slots__ = ("fn", "args", "value", "error")

    def __init__(self, fn, args):
        self.fn, self.args, self.value, self.error = fn, args, None, None

    def done(self) -> bool:
        return self.value is not None or self.error is not None


class SerialBackend:
    """Cases run one after the other in this process (for tests and debugging)."""

    name = "serial"
    restartable = False

    def prepare(self, base: dict):
        return base

    def submit(self, fn, *args, key=None):
        return _Deferred(fn, args)

    def completed(self, futures):
        for f in futures:
            try:
                f.value = f.fn(*f.args)
            except Exception as exc:  # run_case catches case errors; anything else is machinery
                f.error = exc
            yield f

    def outcome(self, f):
        return ("ok", f.value) if f.error is None else ("lost", worker.message(f.error))

    def abort(self, futures):
        pass

    def restart(self):  # pragma: no cover - not restartable
        raise AssertionError

    def close(self):
        pass


class PoolBackend:
    """A concurrent.futures executor: our own process pool (restartable) or one the caller passed."""

    def __init__(self, executor=None, workers: int | None = None):
        self.own = executor is None
        self.workers = workers or os.cpu_count() or 1
        self.executor = executor if executor is not None else self._new_pool()
        self.restartable = self.own
        self.name = f"process pool ({self.workers} workers)" if self.own else type(executor).__name__

    def _new_pool(self):
        import multiprocessing as mp
        from concurrent.futures import ProcessPoolExecutor

        # spawn: a fresh interpreter per worker (no forked numba/LLVM or thread state); the workers
        # import meltzone and load the compiled kernels from the shared numba cache
        return ProcessPoolExecutor(self.workers, mp_context=mp.get_context("spawn"), initializer=worker.worker_init)

    def prepare(self, base: dict):
        return base

    def submit(self, fn, *args, key=None):
        return self.executor.submit(fn, *args)

    def completed(self, futures):
        from concurrent.futures import as_completed

        return as_completed(futures)

    def outcome(self, f):
        from concurrent.futures import CancelledError
        from concurrent.futures.process import BrokenProcessPool

        try:
            return "ok", f.result()
        except BrokenProcessPool as exc:
            return "broken", f"a worker process died ({exc})" if str(exc) else "a worker process died"
        except CancelledError:
            return "lost", "cancelled"
        except Exception as exc:
            return "lost", worker.message(exc)

    def abort(self, futures):
        for f in futures:
            f.cancel()
        if self.own:
            self._terminate()

    def _terminate(self):
        procs = list((getattr(self.executor, "_processes", None) or {}).values())
        # shutdown(wait=False) forgets the pool's manager thread; keep it to join below
        manager = getattr(self.executor, "_executor_manager_thread", None)
        self.executor.shutdown(wait=False, cancel_futures=True)
        for p in procs:  # our own workers, by their process objects
            if p.is_alive():
                p.terminate()
        for p in procs:
            p.join(timeout=5)
        # The manager thread closes its wake-up pipe on its way out; if it is still doing so when the
        # interpreter exits, concurrent.futures' exit hook writes to the closing pipe and prints an
        # OSError traceback (a race in CPython 3.11). With the workers gone it ends promptly: wait for it.
        if manager is not None:
            manager.join(timeout=30)

    def restart(self):
        self._terminate()
        self.executor = self._new_pool()

    def close(self):
        if self.own:
            self.executor.shutdown(wait=True)


class DaskBackend:
    """A dask.distributed Client: ours (LocalCluster or a scheduler address) or one the caller passed."""

    restartable = False

    def __init__(self, client=None, *, local_workers: int | None = None, scheduler: str | None = None,
                 dashboard: str | None = None):
        self.cluster = None
        self.dashboard = dashboard
        self.tmp = None
        self.own = client is None
        if client is None:
            try:
                import distributed  # noqa: F401
            except ImportError:
                raise ConfigError("Dask executors need dask.distributed: pip install \".[cluster]\" in the cloned "
                                  "folder") from None
            from distributed import Client

            if scheduler is not None:
                try:
                    client = Client(scheduler, timeout="30s")
                except (OSError, TimeoutError) as exc:
                    raise ConfigError(f"cannot connect to the Dask scheduler at {scheduler!r}: {exc}") from None
                self.name = f"dask scheduler {scheduler}"
            else:
                client = self._local_cluster(local_workers or os.cpu_count() or 1)
        else:
            self.name = f"dask client {getattr(client, 'scheduler', None) and client.scheduler.address}"
        self.client = client
        self._base_future = None

    def _local_cluster(self, n: int):
        import logging
        import tempfile

        import dask
        from distributed import Client, LocalCluster

        self.tmp = tempfile.mkdtemp(prefix="meltzone-dask-")
        try:
            # the workers' statistical profiler samples every task's stack (~5% of a tiny case); not needed
            with dask.config.set({"temporary-directory": self.tmp, "distributed.worker.profile.enabled": False}):
                # no dashboard unless asked (then on loopback only); the scheduler's remaining HTTP routes
                # (health) on a free loopback port
                dash = self.dashboard
                self.cluster = LocalCluster(n_workers=n, threads_per_worker=1, processes=True, host="127.0.0.1",
                                            dashboard_address=dash, worker_dashboard_address=None,
                                            scheduler_kwargs={"dashboard_address": dash or "127.0.0.1:0"},
                                            local_directory=self.tmp, silence_logs=logging.ERROR)
            self.name = f"dask LocalCluster ({n} workers)"
            return Client(self.cluster)
        except BaseException:
            if self.cluster is not None:
                self.cluster.close()
            shutil.rmtree(self.tmp, ignore_errors=True)
            raise

    def submit(self, fn, *args, key=None):
        return self.client.submit(fn, *args, key=key, pure=False)

    def prepare(self, base: dict):
        if self._base_future is None:
            # a list: scatter() would take a dict's items as separate keyed data
            self._base_future = self.client.scatter([base], broadcast=True, hash=False)[0]
        return self._base_future

    def completed(self, futures):
        from distributed import as_completed

        return as_completed(futures)

    def outcome(self, f):
        try:
            return "ok", f.result()
        except Exception as exc:  # KilledWorker, CancelledError, lost connection: machinery, not the case
            return "lost", worker.message(exc)

    def abort(self, futures):
        try:
            self.client.cancel(list(futures))
        except Exception:  # pragma: no cover - best effort on the way out
            pass

    def close(self):
        if self._base_future is not None and not self.own:
            try:
                self.client.cancel([self._base_future])
            except Exception:  # pragma: no cover
                pass
        if self.own:
            self.client.close()
            if self.cluster is not None:
                self.cluster.close()
        if self.tmp is not None:
            shutil.rmtree(self.tmp, ignore_errors=True)


def is_dask_client(obj) -> bool:
    """Whether ``obj`` is a distributed.Client (by its type's module, without importing distributed)."""
    return type(obj).__module__.split(".")[0] == "distributed" and hasattr(obj, "submit") and hasattr(obj, "gather")


def make_backend(executor=None, workers: int | None = None, scheduler: str | None = None,
                 dashboard: str | None = None):
    """The backend chosen by the explicit arguments of :func:`meltzone.sweep.run_sweep`; ConfigError for a
    contradictory or unknown choice."""
    if workers is not None and (isinstance(workers, bool) or not isinstance(workers, int) or workers < 1):
        raise ConfigError(f"workers = {workers!r}: must be an integer >= 1")
    if scheduler is not None:
        if executor not in (None, "dask"):
            raise ConfigError("give either a scheduler address or an executor, not both")
        if workers is not None:
            raise ConfigError("workers: the cluster behind a scheduler address has its own workers")
        return DaskBackend(scheduler=scheduler)
    if executor is None or executor == "processes":
        return PoolBackend(workers=workers)
    if executor == "serial":
        return SerialBackend()
    if executor == "dask-local":
        return DaskBackend(local_workers=workers, dashboard=dashboard)
    if dashboard is not None:
        raise ConfigError("dashboard: only for a Dask LocalCluster started here (executor 'dask-local')")
    if executor == "dask":
        raise ConfigError("executor 'dask' needs scheduler=ADDRESS (or pass a distributed.Client)")
    if isinstance(executor, str):
        raise ConfigError(f"executor = {executor!r}: must be 'processes', 'serial', 'dask-local', a "
                          "concurrent.futures.Executor or a distributed.Client")
    if workers is not None:
        raise ConfigError("workers: an executor passed by the caller has its own workers")
    if is_dask_client(executor):
        return DaskBackend(executor)
    from concurrent.futures import Executor

    if isinstance(executor, Executor):
        return PoolBackend(executor)
    raise ConfigError(f"executor: {type(executor).__name__} is neither a concurrent.futures.Executor nor a "
                      "distributed.Client")
