"""The one place that decides numba's jit options and where its cache lives.

Import ``njit`` from here (never ``numba`` directly) in the core modules::

    from ._jit import njit

* ``cache=True`` on every kernel; nothing compiles at import (kernels compile at their first call and are
  then read from the cache).
* ``njit(leaf=True)`` for the small functions of the hot loops that allocate nothing and return no array:
  compiled without numba's reference counting (see :func:`njit`).
* ``MELTZONE_FASTMATH=1`` turns on ``fastmath`` (off by default: it changes results in the last digits). The
  option is not part of numba's cache key, so clear the cache when switching it.
* The cache never goes inside the installed package (a ``__pycache__`` written into site-packages outlives
  the install and can shadow a later editable install): ``NUMBA_CACHE_DIR`` if set; else a per-user folder,
  ``$XDG_CACHE_HOME/meltzone/numba-<version>-<sources>`` (``~/.cache`` without XDG_CACHE_HOME); else a
  temporary folder. ``<sources>`` is a short hash of this package's source files: numba's cache does not notice
  an edit to a function in another file (a caller keeps the old compiled callee and old index constants), so a
  changed core gets a fresh folder. A user-set ``NUMBA_CACHE_DIR`` is used as it is: clear it after an upgrade.
"""

from __future__ import annotations

import glob
import os
import sys
import tempfile


def _writable(folder: str) -> bool:
    try:
        os.makedirs(folder, exist_ok=True)
    except OSError:
        return False
    return os.access(folder, os.W_OK)


def _sources_hash() -> str:
    """Short hash of the core package's source files (names and contents)."""
    import hashlib

    digest = hashlib.sha256()
    for path in sorted(glob.glob(os.path.join(os.path.dirname(os.path.abspath(__file__)), "*.py"))):
        digest.update(os.path.basename(path).encode())
        with open(path, "rb") as fh:
            digest.update(fh.read())
    return digest.hexdigest()[:12]


def cache_dir() -> str:
    """The numba cache folder this process uses (chosen as the module docstring says; set at import)."""
    chosen = os.environ.get("NUMBA_CACHE_DIR")
    if chosen:
        return chosen
    from .. import __version__

    base = os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache")
    uid = os.getuid() if hasattr(os, "getuid") else 0
    tag = f"{__version__}-{_sources_hash()}"
    for candidate in (os.path.join(base, "meltzone", f"numba-{tag}"),
                      os.path.join(tempfile.gettempdir(), f"meltzone-numba-{uid}-{tag}")):
        if _writable(candidate):
            return candidate
    return tempfile.mkdtemp(prefix="meltzone-numba-")


CACHE_DIR = cache_dir()
os.environ["NUMBA_CACHE_DIR"] = CACHE_DIR

import numba  # noqa: E402  (after the cache folder is settled)

if numba.config.CACHE_DIR != CACHE_DIR:  # numba was imported before meltzone: it read the variable already
    numba.config.CACHE_DIR = CACHE_DIR

FASTMATH = os.environ.get("MELTZONE_FASTMATH", "0").strip().lower() in ("1", "true", "yes")


def njit(*args, leaf=False, **kwargs):
    """``numba.njit`` with the project's options (cache on, fastmath by environment, no GIL).

    ``leaf=True`` marks a small function called in the hot loops that allocates nothing and returns no array
    (floats, integers and tuples of them): it is compiled without numba's reference counting (``_nrt=False``,
    an option numba keeps for code that needs no memory management), so its array arguments stay owned by the
    caller and each call is spared the updates of their reference counts. Measured here: a function of two
    array arguments whose body costs ~1.4 ns took ~34 ns per call with them. Numba refuses to compile an
    allocation or a returned slice in such a function; that it returns none of its array arguments (the caller
    would hold a reference it did not count) is checked on the source by tests/test_jit.py."""
    kwargs.setdefault("cache", True)
    kwargs.setdefault("fastmath", FASTMATH)
    kwargs.setdefault("nogil", True)
    if leaf:
        kwargs["_nrt"] = False
    if args and callable(args[0]) and len(args) == 1:
        return numba.njit(**kwargs)(args[0])
    return numba.njit(*args, **kwargs)


def is_cached(module: str, function: str) -> bool:
    """True when the cache folder holds an index for ``function`` of the module named ``module`` (numba names
    the index ``<file stem>.<function>-<line>.py<version>.nbi`` in a sub-folder named after the source folder).
    The module is located, not imported."""
    from importlib.util import find_spec

    origin = find_spec(module).origin
    stem = os.path.splitext(os.path.basename(origin))[0]
    folder = os.path.basename(os.path.dirname(os.path.abspath(origin)))
    pattern = os.path.join(CACHE_DIR, f"{folder}_*", f"{stem}.{function}-*.py{sys.version_info[0]}"
                           f"{sys.version_info[1]}.nbi")
    return bool(glob.glob(pattern))
