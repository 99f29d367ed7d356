"""The run file's layout: kinds, schema version, and every table's columns with units and long names."""

from __future__ import annotations

import numpy as np

# ====================================================================== the run file
#: Value of the root attribute ``meltzone_kind`` of a single-run file (sweep files carry "sweep").
RUN_KIND = "run"
#: Kinds of meltzone HDF5 files.
FILE_KINDS = ("run", "sweep")
#: Version of the run-file layout below; :func:`load` refuses any other.
SCHEMA_VERSION = 3  # 3: history T and melt fraction per node, mantle grid, switch times; scheme group

#: structure group, node arrays: file name -> (Interior attribute, unit, long name). Nodes run centre -> surface.
STRUCTURE_ARRAYS = {
    "radius": ("r", "m", "radius of the node"),
    "enclosed_mass": ("m", "kg", "mass enclosed within the node's radius"),
    "pressure": ("P", "Pa", "pressure"),
    "density": ("rho", "kg/m^3", "density"),
    "gravity": ("g", "m/s^2", "gravitational acceleration"),
    "phase": ("phase", "1", "mantle phase code (index into the attribute phase_names; -1 in the core)"),
    "reference_temperature": ("T_ref", "K", "temperature on the reference adiabat the phases were chosen on"),
    "adiabat": ("adiabat", "1", "adiabat shape: T / T_top in the mantle, T / T_cmb in the core"),
}
#: structure group, scalars (0-d variables): file name -> (Interior attribute, unit, long name).
STRUCTURE_SCALARS = {
    "planet_mass": ("mass", "kg", "planet mass"),
    "core_mass": ("core_mass", "kg", "core mass"),
    "planet_radius": ("radius", "m", "planet radius"),
    "core_radius": ("core_radius", "m", "core radius"),
    "cmb_pressure": ("cmb_pressure", "Pa", "pressure at the core-mantle boundary"),
    "center_pressure": ("center_pressure", "Pa", "pressure at the centre"),
    "surface_pressure": ("surface_pressure", "Pa", "pressure at the solid surface"),
    "surface_gravity": ("surface_gravity", "m/s^2", "gravitational acceleration at the surface"),
    "mean_density": ("mean_density", "kg/m^3", "mean density"),
    "moment_of_inertia_factor": ("moment_of_inertia_factor", "1", "moment of inertia factor C / (M R^2)"),
    "cmb_index": ("cmb_index", "1", "index of the first mantle node"),
    "reference_potential_temperature": ("reference_potential_temperature", "K",
                                        "potential temperature of the reference adiabat"),
    "iterations": ("iterations", "1", "structure integrations used by the radius search"),
}
#: structure group, equation-of-state materials on dimension ``material``: name -> (Material field, unit, long name).
MATERIAL_FIELDS = {
    "material_name": ("name", "1", "material name"),
    "material_form": ("form", "1", "equation-of-state form code (meltzone.eos FORM_*)"),
    "material_rho0": ("rho0", "kg/m^3", "reference density"),
    "material_k0": ("k0", "Pa", "bulk modulus at the reference density"),
    "material_kp": ("kp", "1", "pressure derivative of the bulk modulus"),
    "material_gamma0": ("gamma0", "1", "Grueneisen parameter at the reference density"),
    "material_q": ("q", "1", "volume exponent of the Grueneisen parameter"),
    "material_cv": ("cv", "J/kg/K", "heat capacity of the thermal pressure (0: none)"),
    "material_source": ("source", "1", "source of the parameters"),
}
#: history group: the mantle grid on ``mantle_node``: file name -> (MantleGrid attribute, unit, long name).
GRID_FIELDS = {
    "mantle_radius": ("radius", "m", "radius of the mantle node"),
    "mantle_pressure": ("pressure", "Pa", "pressure at the mantle node"),
    "mantle_mass": ("mass", "kg", "mass the mantle node stands for"),
    "solidus": ("solidus", "K", "solidus temperature"),
    "liquidus": ("liquidus", "K", "liquidus temperature"),
}
#: history group: profiles on (step, mantle_node): History attribute -> (unit, long name).
PROFILE_FIELDS = {
    "temperature": ("K", "mantle temperature at the end of the step"),
    "melt_fraction": ("1", "melt fraction at the end of the step"),
}
#: layers group (rows of meltzone.layers.track): column -> (unit, long name).
LAYER_COLUMNS = {
    "layer": ("1", "layer id, kept through time by node overlap"),
    "step": ("1", "history step of the row"),
    "time": ("yr", "model time of the row"),
    "top_radius": ("m", "radius of the shallowest molten node"),
    "bottom_radius": ("m", "radius of the deepest molten node"),
    "top_depth": ("m", "depth of the shallowest molten node"),
    "bottom_depth": ("m", "depth of the deepest molten node"),
    "top_pressure": ("Pa", "pressure at the shallowest molten node"),
    "bottom_pressure": ("Pa", "pressure at the deepest molten node"),
    "max_melt_fraction": ("1", "largest melt fraction in the layer"),
    "mean_melt_fraction": ("1", "mass-weighted mean melt fraction of the layer"),
    "melt_mass": ("kg", "melt mass in the layer"),
    "full_top_depth": ("m", "depth of the shallowest fully molten node (NaN: none)"),
    "full_bottom_depth": ("m", "depth of the deepest fully molten node (NaN: none)"),
}
#: events group: event key -> (unit, long name).
EVENT_COLUMNS = {
    "time": ("yr", "model time of the event (refined inside its step for formed, froze, last-melt, "
                  "magma-ocean-ended, magma-ocean-reformed, inner-core-nucleated)"),
    "kind": ("1", "event kind (meltzone.layers.EVENT_KINDS)"),
    "layer": ("1", "layer id (-1: an event of the whole planet)"),
    "depth": ("m", "depth of the event (NaN: none)"),
    "pressure": ("Pa", "pressure at the event's depth (NaN: none)"),
}
#: flags group: zone key of meltzone.phases.flags -> (file name, unit, long name).
FLAG_COLUMNS = {
    "kind": ("kind", "1", "flag kind"),
    "what": ("what", "1", "what rests on theory or extrapolation"),
    "top_depth_m": ("top_depth", "m", "depth of the top of the zone"),
    "bottom_depth_m": ("bottom_depth", "m", "depth of the bottom of the zone"),
    "top_pressure_pa": ("top_pressure", "Pa", "pressure at the top of the zone"),
    "bottom_pressure_pa": ("bottom_pressure", "Pa", "pressure at the bottom of the zone"),
    "source": ("source", "1", "source of the boundary, curve or data limit"),
    "confidence": ("confidence", "1", "confidence word: high (measured), medium (shock data), low (ab initio only)"),
}
#: Root attributes that hold the Result's scalars (the first two are read back, the others follow the history).
_RESULT_ATTRS = ("melting_model", "wall_time_s", "energy_closure", "n_steps", "n_rejected")
#: Note stored in the file and printed with every report.
MODEL_NOTE = "Results are model estimates, not measurements."


#: Columns stored as text, and as integers, in the record tables (events, flags, materials).
_TEXT_COLUMNS = {"kind", "what", "source", "confidence", "name"}
_INT_COLUMNS = {"layer", "form"}


def _records(rows, keys) -> dict:
    """Columns (arrays of the right dtype, also when there are no rows) from a list of dicts or objects."""
    def get(row, key):
        return row[key] if isinstance(row, dict) else getattr(row, key)

    return {key: np.array([get(r, key) for r in rows],
                          dtype=str if key in _TEXT_COLUMNS else np.int64 if key in _INT_COLUMNS else np.float64)
            for key in keys}
