"""The table of evolution schemes: ``convection.scheme`` -> :class:`Scheme`.

Each entry names the module that defines the scheme's ``SCHEME`` object; the module is imported only when
the scheme is used, so that choosing one scheme never compiles another's kernels. A new scheme plugs in by
adding one line here (and its name to the ``convection.scheme`` choices in :mod:`meltzone.config`);
nothing downstream of :class:`~meltzone.evolution.contract.History` changes.
"""

from __future__ import annotations

from dataclasses import dataclass
from importlib import import_module
from typing import Callable

from ..constants import YEAR
from ..errors import ConfigError, ConvergenceError


@dataclass(frozen=True)
class Scheme:
    """An evolution scheme: its name (the value of ``convection.scheme``), how to run it, and how to rebuild
    its in-step evaluator from a History (after a file is read)."""

    name: str
    description: str
    run: Callable  #: (spec, interior, curves, progress=None) -> History
    evaluator: Callable  #: (History) -> Evaluator


#: scheme name -> module that defines ``SCHEME``
TABLE = {
    "boundary-layer": "meltzone.evolution.boundary_layer",
    "mixing-length": "meltzone.evolution.mixing_length",
}


def get_scheme(name: str) -> Scheme:
    """The registered scheme called ``name``; ConfigError naming ``convection.scheme`` otherwise."""
    try:
        module = TABLE[name]
    except KeyError:
        raise ConfigError(f"convection.scheme = {name!r} is not a scheme; choose one of "
                          f"{', '.join(repr(n) for n in TABLE)}") from None
    return import_module(module).SCHEME


def scheme_names() -> tuple[str, ...]:
    return tuple(TABLE)


#: exceptions a kernel can raise on its own (numba raises ZeroDivisionError for a float division by zero; the
#: plain-Python path, NUMBA_DISABLE_JIT=1, also ValueError for a math domain error and OverflowError)
KERNEL_ERRORS = (ArithmeticError, ValueError)


def kernel_failure(spec, scheme: str, exc: Exception, times) -> ConvergenceError:
    """The error a run reports when its kernel raised ``exc``: the planet, the scheme, the model time of its last
    recorded step (``times``: the history buffer's time column, zero where nothing was recorded yet) and what to
    change, in one line, instead of a traceback."""
    t_yr = float(max(times.max(), 0.0)) / YEAR
    return ConvergenceError(
        f"{spec.planet.name}: the {scheme} evolution failed after model time {t_yr:.6g} yr (its last recorded "
        f"step) with {type(exc).__name__}: {exc}; lower run.max_temperature_step_k or run.rtol, or report the "
        "configuration")
