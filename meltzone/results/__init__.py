"""The Result of a run and the run file: the one place the HDF5 schema lives (:func:`write`, :func:`load`).

Run file (schema version :data:`SCHEMA_VERSION`, root attribute ``meltzone_kind = "run"``), one group
per table, each readable with ``xarray.open_dataset(path, engine="h5netcdf", group=NAME)``:
``structure`` (interior nodes, dimension ``node``, coordinate ``radius``; scalars as 0-d variables;
EOS materials on ``material``), ``history`` (dimension and coordinate ``time``, model time [yr]; T and melt
fraction on (``time``, ``mantle_node``) and the mantle grid), ``intervals`` (``interval``), ``layers``
(``row``), ``events`` (``event``), ``snapshots`` (``snapshot`` x ``mantle_node``, coordinates
``snapshot_time`` and ``mantle_radius``), ``flags`` (``flag``) and ``scheme`` (the arrays the evolution
scheme needs to rebuild a state inside a step). Every model time in the file is in years (units "yr");
in memory everything is SI (seconds). Root attributes: the configuration as TOML, the sources of the laws
used with their status, the energy-closure flag, the meltzone version and the UTC creation time.

Modules: :mod:`.result` (the Result), :mod:`.schema` (the file's tables, units and names),
:mod:`.runfile` (writing and reading). Results are model estimates, not measurements.
"""

from __future__ import annotations

from ..h5 import atomic_h5, write_coordinate, write_variable
from .result import DEFAULT_SNAPSHOTS, Result, collect_sources, snapshot_times
from .runfile import file_kind, load, write
from .schema import (EVENT_COLUMNS, FILE_KINDS, FLAG_COLUMNS, GRID_FIELDS, LAYER_COLUMNS, MATERIAL_FIELDS,
                     MODEL_NOTE, PROFILE_FIELDS, RUN_KIND, SCHEMA_VERSION, STRUCTURE_ARRAYS, STRUCTURE_SCALARS)

__all__ = ["Result", "write", "load", "file_kind", "snapshot_times", "collect_sources", "DEFAULT_SNAPSHOTS",
           "atomic_h5", "write_coordinate", "write_variable", "EVENT_COLUMNS", "FILE_KINDS", "FLAG_COLUMNS",
           "GRID_FIELDS", "LAYER_COLUMNS", "MATERIAL_FIELDS", "MODEL_NOTE", "PROFILE_FIELDS", "RUN_KIND",
           "SCHEMA_VERSION", "STRUCTURE_ARRAYS", "STRUCTURE_SCALARS"]
