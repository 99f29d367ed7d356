"""The checkpoint of a running sweep: finished cases on disk, so that a stopped sweep resumes without losing
or repeating a case.

The folder ``OUT.h5.progress/`` holds ``manifest.json`` (the spec's identity) and ``part-NNNNNN.json``
batches of finished cases, each written to a temporary name and moved into place. A batch is written after
the first finished task (so even an early stop keeps something), then after ``every`` new cases or
``seconds`` of time, whichever comes first, and on the way out. An advisory lock (``lock``) keeps two
sweeps from writing the same folder.
"""

from __future__ import annotations

import datetime as _dt
import json
import os
import shutil
import time
import warnings
from pathlib import Path

from ..errors import ConfigError, ResultsFileError

__all__ = ["progress_path", "detail_path", "Checkpoint", "now_utc"]


def progress_path(out_path: str | os.PathLike) -> Path:
    """The checkpoint folder of a sweep writing ``out_path`` (``OUT.h5.progress``)."""
    out = Path(out_path)
    return out.with_name(out.name + ".progress")


def detail_path(out_path: str | os.PathLike) -> Path:
    """The folder of per-case result files (``OUT.h5.detail``)."""
    out = Path(out_path)
    return out.with_name(out.name + ".detail")


def now_utc() -> str:
    """The current UTC time, ISO 8601 to the second."""
    return _dt.datetime.now(_dt.timezone.utc).replace(microsecond=0).isoformat()


class Checkpoint:
    """Finished cases on disk: ``manifest.json`` plus ``part-NNNNNN.json`` batches, each written atomically.

    Parameters
    ----------
    folder : Path
        The checkpoint folder (:func:`progress_path` of the output).
    identity : str
        The spec's identity; a checkpoint is only resumed by the same spec.
    n_cases : int
        Number of cases of the sweep.
    every, seconds : int, float
        A batch is written after this many new cases or this many seconds, whichever comes first; the
        first finished task is written at once.
    """

    def __init__(self, folder: Path, identity: str, n_cases: int, every: int, seconds: float):
        self.folder = Path(folder)
        self.identity = identity
        self.n_cases = n_cases
        self.every = max(int(every), 1)
        self.seconds = float(seconds)
        self.buffer: list[dict] = []
        self.last = time.monotonic()
        self.seq = 0
        self.written = 0  # batches written by this process
        self._lock = None

    # -- setup
    def open(self, resume: bool) -> dict[int, dict]:
        """Create the folder, or (with ``resume``) take the finished cases from it: {case: row}.

        Raises ConfigError for a checkpoint without ``resume``, of another spec, or locked by another
        sweep; ResultsFileError naming the folder when it cannot be created or written."""
        try:
            if self.folder.exists():
                return self._reopen(resume)
            self.folder.mkdir(parents=True)
            self._acquire_lock()
            self._atomic_write("manifest.json", {"identity": self.identity, "n_cases": self.n_cases,
                                                 "meltzone_kind": "sweep-checkpoint", "created_utc": now_utc()})
            return {}
        except (ConfigError, ResultsFileError):
            raise
        except OSError as exc:
            raise ResultsFileError(f"cannot write the sweep checkpoint folder {str(self.folder)!r}: "
                                   f"{exc.strerror or exc}") from None

    def _reopen(self, resume: bool) -> dict[int, dict]:
        manifest = self._read_manifest()
        n_parts = len(list(self.folder.glob("part-*.json")))
        if not resume:
            raise ConfigError(f"{self.folder} holds a checkpoint of an unfinished sweep ({n_parts} batches): "
                              "add --resume to finish it, or remove the folder to start again")
        if manifest.get("identity") != self.identity:
            raise ConfigError(f"the checkpoint in {self.folder} belongs to a different sweep spec; use the "
                              "spec it was started with, or remove the folder to start again")
        self._acquire_lock()
        for tmp in self.folder.glob("*.tmp"):  # under the lock: no live writer owns them
            tmp.unlink(missing_ok=True)
        done: dict[int, dict] = {}
        for part in sorted(self.folder.glob("part-*.json")):
            try:
                rows = json.loads(part.read_text(encoding="utf-8"))["results"]
            except (OSError, ValueError, KeyError) as exc:
                warnings.warn(f"skipping unreadable checkpoint batch {part.name}: {exc}", UserWarning, stacklevel=4)
                continue
            for row in rows:
                i = int(row["case"])
                if 0 <= i < self.n_cases:
                    done.setdefault(i, row)
            try:
                self.seq = max(self.seq, int(part.stem.split("-")[1]))
            except (IndexError, ValueError):
                pass
        return done

    def _read_manifest(self) -> dict:
        try:
            return json.loads((self.folder / "manifest.json").read_text(encoding="utf-8"))
        except (OSError, ValueError):
            raise ConfigError(f"{self.folder} is not a meltzone sweep checkpoint (no readable manifest.json); "
                              "remove it to start again") from None

    def _acquire_lock(self) -> None:
        try:
            import fcntl
        except ImportError:  # pragma: no cover - not POSIX
            return
        fh = open(self.folder / "lock", "a")
        try:
            fcntl.flock(fh, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            fh.close()
            raise ConfigError(f"another sweep is writing {self.folder} (its lock is held); wait for it or stop "
                              "it first") from None
        self._lock = fh

    def _atomic_write(self, name: str, obj) -> None:
        tmp = self.folder / f".{name}.{os.getpid()}.tmp"
        with open(tmp, "w", encoding="utf-8") as fh:
            json.dump(obj, fh, allow_nan=True, separators=(",", ":"))
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, self.folder / name)

    # -- running
    def add(self, rows: list[dict]) -> None:
        """Record the rows of one finished task; write a batch when it is the first task of this process,
        or when ``every`` cases or ``seconds`` have gathered."""
        self.buffer.extend(rows)
        if (not self.written or len(self.buffer) >= self.every
                or time.monotonic() - self.last >= self.seconds):
            self.flush()

    def flush(self) -> None:
        """Write the gathered rows as one batch (nothing when there are none).

        Safe against an interrupt (Ctrl-C) at any point of the write: whether the rows count as written is
        decided by the batch file itself, so the flush on the way out neither repeats a batch whose rename
        finished just before the interrupt nor drops one whose rename never happened."""
        if self.buffer:
            rows, name = self.buffer, f"part-{self.seq + 1:06d}.json"
            try:
                self.buffer = []
                self._atomic_write(name, {"results": rows})
            finally:
                if (self.folder / name).exists():
                    self.seq += 1
                    self.written += 1
                else:  # not on disk: the next flush writes them
                    self.buffer = rows + self.buffer
        self.last = time.monotonic()

    def close(self) -> None:
        """Release the lock (the folder stays for --resume)."""
        if self._lock is not None:
            self._lock.close()
            self._lock = None

    def remove(self) -> None:
        """Release the lock and remove the folder (the sweep file is written, or nothing finished)."""
        self.close()
        shutil.rmtree(self.folder, ignore_errors=True)
