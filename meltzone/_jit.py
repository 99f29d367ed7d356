"""The one place that decides numba's jit options.

Import this module (never ``numba`` directly) from kernel modules::

    from meltzone._jit import njit

* ``cache=True`` on every kernel; nothing compiles at import (kernels compile
  at their first call and are then read from the cache).
* ``MELTZONE_FASTMATH=1`` turns on ``fastmath`` (off by default: it changes
  results in the last digits). The option is not part of numba's cache key,
  so clear the cache (``NUMBA_CACHE_DIR``) when switching it.
* When neither ``NUMBA_CACHE_DIR`` nor the package's own folder is writable
  (a read-only install), the cache goes to ``~/.cache/meltzone/numba`` or,
  failing that, a temporary folder, instead of numba failing with
  "no locator available".
"""

from __future__ import annotations

import os
import tempfile


def _ensure_cache_dir() -> None:
    if os.environ.get("NUMBA_CACHE_DIR"):
        return
    here = os.path.dirname(os.path.abspath(__file__))
    if os.access(here, os.W_OK):
        return
    for candidate in (
        os.path.join(os.path.expanduser("~"), ".cache", "meltzone", "numba"),
        os.path.join(tempfile.gettempdir(), f"meltzone-numba-{os.getuid() if hasattr(os, 'getuid') else 0}"),
    ):
        try:
            os.makedirs(candidate, exist_ok=True)
        except OSError:
            continue
        if os.access(candidate, os.W_OK):
            os.environ["NUMBA_CACHE_DIR"] = candidate
            return


_ensure_cache_dir()

import numba  # noqa: E402  (after the cache directory is settled)

FASTMATH = os.environ.get("MELTZONE_FASTMATH", "0").strip().lower() in ("1", "true", "yes")


def njit(*args, **kwargs):
    """``numba.njit`` with the project's options (cache on, fastmath by env)."""
    kwargs.setdefault("cache", True)
    kwargs.setdefault("fastmath", FASTMATH)
    kwargs.setdefault("nogil", True)
    if args and callable(args[0]) and len(args) == 1:
        return numba.njit(**kwargs)(args[0])
    return numba.njit(*args, **kwargs)
