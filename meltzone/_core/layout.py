"""Index constants of every array the numba core reads or writes, in one place.

Each layout is a tuple of names (what the row, column or slot holds, in plain words, also used to label the
arrays in files); the index constants unpack ``range(len(names))``, so a count is never written by hand and a
name added to a tuple without its constant (or the reverse) fails at import. Pure Python: no numba here.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

# ------------------------------------------------------------ equation-of-state material row (structure.py)
MATERIAL_COLUMNS = ("form", "rho0", "k0", "kp", "gamma0", "q", "cv")
MAT_FORM, MAT_RHO0, MAT_K0, MAT_KP, MAT_GAMMA0, MAT_Q, MAT_CV = range(N_MAT := len(MATERIAL_COLUMNS))
#: equation-of-state forms (MAT_FORM)
FORM_VINET, FORM_BM3, FORM_INCOMPRESSIBLE = range(3)

# ------------------------------------------------------------ stored structure path (structure.py)
PATH_COLUMNS = ("radius", "enclosed_mass", "pressure", "temperature", "moment_of_inertia", "density", "region")
PATH_R, PATH_M, PATH_P, PATH_T, PATH_I, PATH_RHO, PATH_REGION = range(PATH_COLS := len(PATH_COLUMNS))
#: status codes of structure.integrate_inward
REACHED_CENTRE, EMPTIED, BLEW_UP, OUT_OF_ROOM = range(4)

# ------------------------------------------------------------ evolution state y (energies)
STATE_Y = ("mantle_energy", "core_energy", "lid_thickness", "heat_out_minus_radiogenic")
Y_EM, Y_EC, Y_LID, Y_OUT = range(N_Y := len(STATE_Y))

# ------------------------------------------------------------ mantle grid rows (nodes CMB -> surface)
GRID_ROWS = ("radius", "pressure", "adiabat", "mass", "solidus", "liquidus", "aux1", "aux2")
G_R, G_P, G_F, G_W, G_TSOL, G_TLIQ, G_AUX1, G_AUX2 = range(N_G := len(GRID_ROWS))

# ------------------------------------------------------------ core grid rows (nodes centre -> CMB)
CORE_ROWS = ("radius", "adiabat", "mass", "melting_temperature", "enclosed_mass")
C_R, C_F, C_W, C_TMELT, C_MCUM = range(N_C := len(CORE_ROWS))

# ------------------------------------------------------------ isotope table columns
ISOTOPE_COLUMNS = ("heat_today", "decay_constant")
ISO_HEAT, ISO_DECAY = range(N_ISO := len(ISOTOPE_COLUMNS))

# ------------------------------------------------------------ scalar parameters
PARAMETERS = (
    "radius", "core_radius", "surface_gravity", "cmb_gravity", "mantle_density", "top_density",
    "thermal_conductivity", "thermal_diffusivity", "thermal_expansivity", "mantle_heat_capacity", "latent_heat",
    "viscosity_prefactor", "activation_energy", "activation_volume", "critical_rayleigh", "beta",
    "rheology_a", "melt_weakening", "liquid_viscosity", "critical_melt_fraction", "core_heat_capacity",
    "core_latent_heat", "gravitational_energy", "equilibrium_temperature", "grey_atmosphere", "h2o_total",
    "co2_total", "stagnant_lid", "cmb_pressure", "start_age", "max_temperature_step", "rtol", "end_time",
    "max_step", "min_lid", "surface_pressure", "mantle_mass", "activation_volume_decay", "atol",
    "nusselt_prefactor", "rheology_blend_width")
(P_RADIUS, P_CORE_RADIUS, P_G_SURF, P_G_CMB, P_RHO_MANTLE, P_RHO_TOP, P_K, P_KAPPA, P_ALPHA, P_CM, P_LATENT,
 P_A_VISC, P_E_ACT, P_V_ACT, P_RA_CR, P_BETA, P_A_RH, P_MELT_WEAK, P_ETA_LIQ, P_PHI_C, P_CC, P_LC, P_EG,
 P_T_EQ, P_ATMOSPHERE, P_H2O_TOTAL, P_CO2_TOTAL, P_STAGNANT, P_P_CMB, P_START_AGE, P_DT_MAX, P_RTOL, P_T_END,
 P_H_MAX, P_LID_MIN, P_P_TOP, P_MANTLE_MASS, P_V_DECAY, P_ATOL, P_NU_A, P_BLEND) = range(N_PAR := len(PARAMETERS))
# basal magma ocean (boundary-layer scheme): switch (1 on), solidus depression [K], enrichment [K], reference mass [kg]
PARAMETERS += ("basal_ocean", "basal_melt_depression", "basal_melt_enrichment", "basal_reference_mass")
P_BMO, P_BMO_DEP, P_BMO_ENRICH, P_BMO_MREF = range(N_PAR, N_PAR := len(PARAMETERS))

# ------------------------------------------------------------ diagnostics of physics.diagnose
DIAGNOSTICS = ("surface_flux", "upper_flux", "cmb_flux", "surface_temperature", "upper_boundary_layer",
               "lower_boundary_layer", "lid_base_temperature", "radiogenic_power", "regime",
               "regime_melt_fraction", "inner_core_radius", "upper_viscosity", "lower_viscosity",
               "bottom_temperature", "emissivity", "atmosphere_h2o", "atmosphere_co2", "melt_mass",
               "stored_energy", "lid_rate", "surface_melt_fraction")
(D_QS, D_QU, D_QC, D_TS, D_DELTA_U, D_DELTA_C, D_TL, D_H, D_REGIME, D_PHI_TOP, D_RIC, D_ETA_U, D_ETA_C,
 D_TB, D_EPS, D_ATM_H2O, D_ATM_CO2, D_MELT_MASS, D_E_STORED, D_DLID, D_PHI_SURF) = range(N_D := len(DIAGNOSTICS))
# basal magma ocean: radius of its top [m] (the core radius without one) and its mass [kg]
DIAGNOSTICS += ("basal_ocean_radius", "basal_ocean_mass")
D_RB, D_MB = range(N_D, N_D := len(DIAGNOSTICS))

# ------------------------------------------------------------ history columns (one row per accepted step)
HISTORY_COLUMNS = ("time", "upper_temperature", "core_temperature", "lid_thickness", "heat_out_minus_radiogenic",
                   "surface_heat_flow", "cmb_heat_flow", "radiogenic_power", "inner_core_radius", "melt_mass",
                   "regime", "surface_temperature", "upper_boundary_layer", "lower_boundary_layer",
                   "lid_base_temperature", "stored_energy", "upper_temperature_rate", "core_temperature_rate",
                   "lid_rate", "top_melt_fraction", "atmosphere_h2o", "atmosphere_co2", "n_intervals")
(H_T, H_TU, H_TC, H_LID, H_OUT, H_QS, H_QC, H_H, H_RIC, H_MELT, H_REGIME, H_TS, H_DELTA_U, H_DELTA_C, H_TL,
 H_E_STORED, H_DTU, H_DTC, H_DLID, H_PHI_TOP, H_ATM_H2O, H_ATM_CO2, H_N_IV) = range(N_H := len(HISTORY_COLUMNS))
HISTORY_COLUMNS += ("basal_ocean_thickness",)
H_BMO, = range(N_H, N_H := len(HISTORY_COLUMNS))

# ------------------------------------------------------------ melt-interval columns
INTERVAL_COLUMNS = ("step", "top_node", "bottom_node", "max_melt_fraction", "melt_mass", "full_top_node",
                    "full_bottom_node", "mean_melt_fraction")
(I_STEP, I_TOP, I_BOTTOM, I_MAX_PHI, I_MASS, I_FULL_TOP, I_FULL_BOTTOM,
 I_MEAN_PHI) = range(N_I := len(INTERVAL_COLUMNS))

# ------------------------------------------------------------ integrator state (loop.integrate resumes from it)
STATE = ("time", "mantle_energy", "core_energy", "lid_thickness", "heat_out_minus_radiogenic", "step_size",
         "n_history", "n_intervals", "n_rejected", "upper_temperature", "core_temperature", "mantle_slope",
         "core_slope", "rate_mantle_energy", "rate_core_energy", "rate_lid", "rate_heat_out",
         "rheological_switch_time")
(S_T, S_Y, _S_Y1, _S_Y2, _S_Y3, S_H, S_N_H, S_N_IV, S_N_REJ, S_TU, S_TC, S_SLOPE_M, S_SLOPE_C, S_DY, _S_DY1,
 _S_DY2, _S_DY3, S_T_SWITCH) = range(N_STATE := len(STATE))
#: S_T_SWITCH until the top of the mantle first reaches the rheological transition
NOT_YET = 1.0e300
# the stiffness switch of loop.integrate: method in use (1 the implicit Rodas3, 0 Dormand-Prince), the counts of
# the stiffness test (steps above and below its bound) and the accepted implicit steps
STATE += ("implicit_method", "stiff_count", "nonstiff_count", "implicit_steps")
S_IMPLICIT, S_STIFF_COUNT, S_NONSTIFF_COUNT, S_N_IMPLICIT = range(N_STATE, N_STATE := len(STATE))

# ------------------------------------------------------------ mixing-length scheme (implicit.py, mlt_physics.py)
#: per-face geometry, faces 0 (CMB) .. n (surface) of the n mantle cells
MLT_FACE_ROWS = ("radius", "area", "density", "gravity", "pressure", "mixing_length", "spacing", "adiabat_ratio",
                 "adiabat")
(F_R, F_A, F_RHO, F_G, F_P, F_L, F_DR, F_RATIO, F_F) = range(N_F := len(MLT_FACE_ROWS))
#: settings of the implicit integrator
MLT_SETTINGS = ("error_k", "max_melt_step", "max_cell_step_k", "newton_tol_k", "max_newton", "mobile_lid",
                "min_step")
M_ERR, M_DPHI, M_DT_CELL, M_NEWTON_TOL, M_MAX_NEWTON, M_MOBILE, M_MIN_STEP = range(N_M := len(MLT_SETTINGS))
#: history columns of the mixing-length scheme (one row per accepted step)
MLT_HISTORY_COLUMNS = ("time", "upper_temperature", "core_temperature", "surface_temperature", "surface_heat_flow",
                       "cmb_heat_flow", "radiogenic_power", "lid_thickness", "inner_core_radius", "melt_mass",
                       "top_melt_fraction", "stored_energy", "heat_out_minus_radiogenic", "atmosphere_h2o",
                       "atmosphere_co2", "core_energy", "newton_iterations", "step_size")
(MH_T, MH_TU, MH_TC, MH_TS, MH_QS, MH_QC, MH_H, MH_LID, MH_RIC, MH_MELT, MH_PHI_TOP, MH_E_STORED, MH_OUT,
 MH_ATM_H2O, MH_ATM_CO2, MH_EC, MH_NEWTON, MH_DT) = range(N_MH := len(MLT_HISTORY_COLUMNS))
#: integrator state of the mixing-length scheme (implicit.integrate resumes from it; h per cell kept apart)
MLT_STATE = ("time", "heat_out_minus_radiogenic", "step_size", "previous_step_size", "n_history", "n_rejected",
             "core_temperature", "emissivity")
MS_T, MS_OUT, MS_H, MS_H_PREV, MS_N_H, MS_N_REJ, MS_TC, MS_EPS = range(N_MS := len(MLT_STATE))

REGIME_MAGMA_OCEAN, REGIME_MOBILE_LID, REGIME_STAGNANT_LID = range(3)
STATUS_DONE, STATUS_HISTORY_FULL, STATUS_INTERVALS_FULL, STATUS_MAX_STEPS, STATUS_STEP_TOO_SMALL = range(5)


class KernelInputs(NamedTuple):
    """The arrays the boundary-layer core reads (never writes): grid (N_G, mantle nodes), core (N_C, core
    nodes), iso (isotopes, N_ISO), par (N_PAR,) and the melt-fraction law code."""

    grid: np.ndarray
    core: np.ndarray
    iso: np.ndarray
    par: np.ndarray
    law: int
