"""meltzone: where and when the mantles of rocky super-Earths melt.

Results are model estimates, not measurements. The public API is loaded
lazily so that ``import meltzone`` stays fast and compiles nothing.
"""

from __future__ import annotations

from importlib import import_module

__version__ = "0.1.0"

_LAZY = {
    "PlanetSpec": ("meltzone.config", "PlanetSpec"),
    "build_interior": ("meltzone.interior", "build_interior"),
    "Interior": ("meltzone.interior", "Interior"),
    "MeltzoneError": ("meltzone.errors", "MeltzoneError"),
    "ConfigError": ("meltzone.errors", "ConfigError"),
    "evolve": ("meltzone.pipeline", "evolve"),
    "Result": ("meltzone.results", "Result"),
    "load": ("meltzone.results", "load"),
    "write": ("meltzone.results", "write"),
    # the subpackage itself (it used to be an alias of run_sweep, which hid the subpackage's other names such as
    # meltzone.sweep.infer_core_fraction until something imported the subpackage)
    "sweep": ("meltzone.sweep", None),
    "run_sweep": ("meltzone.sweep", "run_sweep"),
}

__all__ = sorted(_LAZY) + ["__version__"]


def __getattr__(name: str):
    try:
        module, attr = _LAZY[name]
    except KeyError:
        raise AttributeError(f"module 'meltzone' has no attribute {name!r}") from None
    value = import_module(module) if attr is None else getattr(import_module(module), attr)
    globals()[name] = value
    return value


def __dir__():
    return __all__
