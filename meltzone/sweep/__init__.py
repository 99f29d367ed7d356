"""Parameter studies: many planets from one TOML spec, on local cores or a Dask cluster, into one HDF5 table.

The package keeps the friendly side (spec, file, statistics, figures) apart from the distributed side
(case worker, executors), like a kernel and its distributed twin:

* :mod:`.spec`: the TOML spec, its parameters and designs (grid, Latin hypercube, Sobol', Monte Carlo,
  observed planet);
* :mod:`.worker`: one case in a worker process -> a compact row (metrics, flags, events);
* :mod:`.executors`: serial, local process pool, Dask (a client or an executor the caller passes);
* :mod:`.checkpoint`: finished cases on disk, for a resume that neither loses nor repeats a case;
* :mod:`.run`: :func:`run_sweep`;
* :mod:`.file`: the sweep HDF5 file (write and read); :mod:`.stats`: fractions, errors, the summary;
* :mod:`.plot`: sweep figures. The text report lives in :mod:`meltzone.report` (section "sweeps").

Importing this package loads numpy and the config schema only: scipy, h5py, matplotlib and the numba
kernels are imported when they are used. Results are model estimates, not measurements.
"""

from __future__ import annotations

from .checkpoint import detail_path, progress_path
from .example import EXAMPLE_SPEC
from .file import read_sweep, write_sweep_file
from .plot import SWEEP_FIGURES, plot_sweep
from .run import SweepIncomplete, SweepReport, run_sweep
from .spec import MODES, SWEEP_SCHEMA_VERSION, Observed, Parameter, SweepSpec, load_spec, lognormal_parameters
from .stats import binomial_estimate, observed_probabilities, summarize_sweep
from .worker import AGE_FLAGS, FAILED, FLAGS, METRICS, OK, REJECTED, STATUS_MEANINGS

__all__ = ["SweepSpec", "load_spec", "run_sweep", "infer_core_fraction", "summary_dict",
           "plot_sweep", "read_sweep", "binomial_estimate", "progress_path", "EXAMPLE_SPEC", "SweepIncomplete",
           "SweepReport", "write_sweep_file", "observed_probabilities", "detail_path", "lognormal_parameters",
           "Parameter", "Observed", "MODES", "SWEEP_SCHEMA_VERSION", "SWEEP_FIGURES", "METRICS", "FLAGS",
           "AGE_FLAGS", "OK", "FAILED", "REJECTED", "STATUS_MEANINGS"]


def summary_dict(path) -> dict:
    """Compact statistics of the sweep file at ``path`` (:func:`.stats.summarize_sweep` of its content)."""
    return summarize_sweep(read_sweep(path), path)


def __getattr__(name: str):
    # loaded on first use: meltzone.interior imports scipy
    if name == "infer_core_fraction":
        from ..interior import infer_core_fraction

        return infer_core_fraction
    raise AttributeError(f"module 'meltzone.sweep' has no attribute {name!r}")
