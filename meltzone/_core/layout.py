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
#: the energy block's length (the integrator state keeps y[:N_Y_ENERGY] at S_Y and the rest at S_YV)
N_Y_ENERGY = N_Y
# water lost to space [kg] (escape)
STATE_Y += ("water_lost",)
Y_WATER, = range(N_Y, N_Y := len(STATE_Y))
# volcanism (boundary-layer scheme): crust thickness [m], H2O and CO2 extracted from the mantle by melt [kg]
STATE_Y += ("crust_thickness", "extracted_h2o", "extracted_co2")
Y_CRUST, Y_XH2O, Y_XCO2 = range(N_Y, N_Y := len(STATE_Y))
# volcanism, continued: H2O and CO2 outgassed [kg] (the erupted melt's volatiles above their solubility at the
# vent), share of the planet's heat-producing elements held in the crust [1]
STATE_Y += ("outgassed_h2o", "outgassed_co2", "crust_heat_share")
Y_OG_H2O, Y_OG_CO2, Y_HPE = range(N_Y, N_Y := len(STATE_Y))

# ------------------------------------------------------------ mantle grid rows (nodes CMB -> surface)
GRID_ROWS = ("radius", "pressure", "adiabat", "mass", "solidus", "liquidus", "aux1", "aux2")
G_R, G_P, G_F, G_W, G_TSOL, G_TLIQ, G_AUX1, G_AUX2 = range(N_G := len(GRID_ROWS))
# density of the mantle nodes [kg/m^3] (pressure-dependent properties, properties.py)
GRID_ROWS += ("density",)
G_RHO, = range(N_G, N_G := len(GRID_ROWS))

# ------------------------------------------------------------ core grid rows (nodes centre -> CMB)
CORE_ROWS = ("radius", "adiabat", "mass", "melting_temperature", "enclosed_mass")
C_R, C_F, C_W, C_TMELT, C_MCUM = range(N_C := len(CORE_ROWS))
# heat released by an inner core grown to the node [J]: the integral of latent + gravitational energy over its mass
CORE_ROWS += ("inner_core_heat",)
C_EIC, = range(N_C, N_C := len(CORE_ROWS))

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
# host star, steam atmosphere, water and escape (radiation.py, star.py): switches (1 on), the star's age at the
# start [s], (1 - A) / (16 pi a^2) [1/m^2], the XUV law (saturation L_XUV/L_bol, its end [s], decay exponent),
# water lost per XUV energy [kg/J] (escape efficiency x 9 pi R^3 / (G M 4 pi a^2)), the H2O solubility law
# (mass fraction = coeff x P[Pa]^expo), the luminosity table: log10 of the star's age [yr] of its first point,
# the spacing, then N_LUM values of log10(L / W). With a star, P_T_EQ holds the equilibrium temperature at the
# start: the fixed surface temperature of the lid's stored-heat profile
PARAMETERS += ("star", "steam_atmosphere", "star_start_age", "flux_factor", "xuv_saturation_ratio",
               "xuv_saturation_age", "xuv_decay_exponent", "escape_factor", "h2o_solubility_coeff",
               "h2o_solubility_exponent", "luminosity_log_age0", "luminosity_log_age_step")
(P_STAR, P_STEAM, P_STAR_AGE0, P_FLUX_FACTOR, P_XUV_SAT, P_XUV_T_SAT, P_XUV_EXP, P_ESCAPE, P_H2O_SOL_C,
 P_H2O_SOL_E, P_LUM_AGE0, P_LUM_DAGE) = range(N_PAR, N_PAR := len(PARAMETERS))
#: points of the luminosity table in the parameters (uniform in log age)
N_LUM = 81
PARAMETERS += tuple(f"log_luminosity_{i:02d}" for i in range(N_LUM))
P_LUM = N_PAR
N_PAR = len(PARAMETERS)
# volcanism (boundary-layer scheme; meltzone._core.volcanism): switch (1 on), erupted fraction, initial mantle H2O
# and CO2 [mass fractions], their melt/solid partition coefficients, deepest pressure melt rises from [Pa],
# basalt-eclogite pressure [Pa], crust density [kg/m^3], ridge length / circumference
PARAMETERS += ("volcanism", "erupted_fraction", "mantle_h2o", "mantle_co2", "h2o_partition", "co2_partition",
               "max_extraction_pressure", "eclogite_pressure", "crust_density", "ridge_length_factor")
(P_VOLC, P_ERUPT, P_X_H2O, P_X_CO2, P_D_H2O, P_D_CO2, P_P_EXTRACT, P_P_ECLOGITE, P_RHO_CRUST,
 P_RIDGE) = range(N_PAR, N_PAR := len(PARAMETERS))
# stagnant-lid growth law (boundary-layer scheme): 0 heat-balance integral (lid's mean temperature), 1 base flux
# (T_u - T_l); 0 is the law of files written before the switch existed
PARAMETERS += ("lid_growth_law",)
P_LID_LAW, = range(N_PAR, N_PAR := len(PARAMETERS))
# pressure-dependent properties (properties.py): switch (1 density-dependent alpha, k, kappa), exponents delta_T and
# g, reference density [kg/m^3], where the solid mantle's Rayleigh number takes its viscosity (0 surface, 1 base of
# the upper boundary layer, 2 mid-mantle); zeros are the constant properties and surface viscosity of older files
PARAMETERS += ("density_dependent_properties", "expansivity_exponent", "conductivity_exponent",
               "property_reference_density", "rayleigh_viscosity_depth")
P_PROPS, P_ALPHA_EXP, P_K_EXP, P_RHO_REF, P_RA_VISC = range(N_PAR, N_PAR := len(PARAMETERS))
#: values of P_RA_VISC
RA_VISC_SURFACE, RA_VISC_TOP, RA_VISC_MID = range(3)
# volcanism, continued: switches (1 on) of the vent solubility limit, of the depleted mantle's melting and of the
# crust's heat sources; bulk solid/melt partition coefficient of the heat-producing elements
PARAMETERS += ("vent_solubility", "melt_depletion", "crust_heat_sources", "heat_source_partition")
P_VENT, P_DEPLETE, P_CRUST_HEAT, P_D_HPE = range(N_PAR, N_PAR := len(PARAMETERS))
# basal magma ocean, continued: the solidus [K] at which its depression and enrichment hold (they scale with the
# local solidus, basal.py); 0 keeps them constant (melting.basal_melt_depression_scaling = "constant", and files
# written before this parameter existed)
PARAMETERS += ("basal_depression_reference_solidus",)
P_BMO_TREF, = range(N_PAR, N_PAR := len(PARAMETERS))
# volcanism, continued: switch (1 on) of the retained melt fraction, and that fraction: where melt is extracted
# (volcanism on, after the rheological switch, no deeper than P_P_EXTRACT) the solid mantle's melt weakening takes
# min(phi, retained) (physics.solid_viscosity); 0, the switch of files written before it existed, takes phi
PARAMETERS += ("retained_melt", "retained_melt_fraction")
P_RETAIN, P_PHI_RETAIN = range(N_PAR, N_PAR := len(PARAMETERS))
# viscosity, continued: the activation volume V_inf [m^3/mol] approached at high pressure (physics.activation_enthalpy);
# 0, the value of files written before it existed, lets V(P) decay to zero
PARAMETERS += ("high_pressure_activation_volume",)
P_V_INF, = range(N_PAR, N_PAR := len(PARAMETERS))

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
# star, steam atmosphere and water (radiation.py): absorbed stellar flux and outgoing radiation [W/m^2], water
# in a surface ocean, dissolved in the melt and lost to space [kg], partial pressures [Pa], water escape [kg/s]
DIAGNOSTICS += ("absorbed_flux", "outgoing_radiation", "water_ocean", "water_dissolved", "water_lost",
                "pressure_h2o", "pressure_co2", "water_escape_rate")
(D_ABS, D_OLR, D_OCEAN, D_DISSOLVED, D_LOST, D_P_H2O, D_P_CO2, D_ESCAPE) = range(N_D, N_D := len(DIAGNOSTICS))
# volcanism: melt extracted [kg/s], heat the erupted melt carries out [W], crust rate [m/s], H2O and CO2
# extracted from the mantle [kg/s], convective (plate) velocity [m/s]
DIAGNOSTICS += ("melt_production", "volcanic_heat_flow", "crust_rate", "h2o_extraction", "co2_extraction",
                "convective_velocity")
D_MPROD, D_QVOLC, D_DCRUST, D_XH2O, D_XCO2, D_UCONV = range(N_D, N_D := len(DIAGNOSTICS))
# volcanism, continued: H2O and CO2 outgassed [kg/s], rate of the crust's share of the heat-producing elements
# [1/s], heat produced in the crust [W], surface flux it adds [W/m^2] and the lid rate it adds [m/s]
DIAGNOSTICS += ("h2o_outgassing", "co2_outgassing", "crust_heat_share_rate", "crust_heat", "crust_heat_flux",
                "crust_heat_lid_rate")
D_OG_H2O, D_OG_CO2, D_DHPE, D_QCRUST, D_QS_CRUST, D_DLID_CRUST = range(N_D, N_D := len(DIAGNOSTICS))

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
HISTORY_COLUMNS += ("absorbed_flux", "outgoing_radiation", "water_ocean", "water_dissolved", "water_lost",
                    "pressure_h2o", "pressure_co2")
H_ABS, H_OLR, H_OCEAN, H_DISSOLVED, H_LOST, H_P_H2O, H_P_CO2 = range(N_H, N_H := len(HISTORY_COLUMNS))
HISTORY_COLUMNS += ("melt_production", "volcanic_heat_flow", "crust_thickness", "outgassing_h2o_rate",
                    "outgassing_co2_rate", "outgassed_h2o", "outgassed_co2")
(H_MPROD, H_QVOLC, H_CRUST, H_OG_H2O_RATE, H_OG_CO2_RATE, H_OG_H2O,
 H_OG_CO2) = range(N_H, N_H := len(HISTORY_COLUMNS))
HISTORY_COLUMNS += ("crust_heat_share", "crust_heat_production")
H_HPE, H_QCRUST = range(N_H, N_H := len(HISTORY_COLUMNS))

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
# the state y beyond the energy block (y[N_Y_ENERGY:]) and its last slopes
STATE += tuple(STATE_Y[N_Y_ENERGY:]) + tuple("rate_" + name for name in STATE_Y[N_Y_ENERGY:])
S_YV = N_STATE
S_DYV = S_YV + N_Y - N_Y_ENERGY
N_STATE = len(STATE)
# the stiffness switch of loop.integrate: method in use (1 the implicit Rodas3, 0 Dormand-Prince), the counts of
# the stiffness test (steps above and below its bound) and the accepted implicit steps
STATE += ("implicit_method", "stiff_count", "nonstiff_count", "implicit_steps")
S_IMPLICIT, S_STIFF_COUNT, S_NONSTIFF_COUNT, S_N_IMPLICIT = range(N_STATE, N_STATE := len(STATE))

# ------------------------------------------------------------ mixing-length scheme (implicit.py, mlt_physics.py)
#: per-face geometry, faces 0 (CMB) .. n (surface) of the n mantle cells
MLT_FACE_ROWS = ("radius", "area", "density", "gravity", "pressure", "mixing_length", "spacing", "adiabat_ratio",
                 "adiabat", "rigid_mixing_length")
(F_R, F_A, F_RHO, F_G, F_P, F_L, F_DR, F_RATIO, F_F, F_LM) = range(N_F := len(MLT_FACE_ROWS))
#: settings of the implicit integrator
MLT_SETTINGS = ("error_k", "max_melt_step", "max_cell_step_k", "newton_tol_k", "max_newton", "mobile_lid",
                "min_step")
M_ERR, M_DPHI, M_DT_CELL, M_NEWTON_TOL, M_MAX_NEWTON, M_MOBILE, M_MIN_STEP = range(N_M := len(MLT_SETTINGS))
#: cells added at the top by the scheme's surface refinement (their step bounds count by their mass)
MLT_SETTINGS += ("refined_top_cells",)
M_TOP_CELLS, = range(N_M, N_M := len(MLT_SETTINGS))
#: history columns of the mixing-length scheme (one row per accepted step)
MLT_HISTORY_COLUMNS = ("time", "upper_temperature", "core_temperature", "surface_temperature", "surface_heat_flow",
                       "cmb_heat_flow", "radiogenic_power", "lid_thickness", "inner_core_radius", "melt_mass",
                       "top_melt_fraction", "stored_energy", "heat_out_minus_radiogenic", "atmosphere_h2o",
                       "atmosphere_co2", "core_energy", "newton_iterations", "step_size")
(MH_T, MH_TU, MH_TC, MH_TS, MH_QS, MH_QC, MH_H, MH_LID, MH_RIC, MH_MELT, MH_PHI_TOP, MH_E_STORED, MH_OUT,
 MH_ATM_H2O, MH_ATM_CO2, MH_EC, MH_NEWTON, MH_DT) = range(N_MH := len(MLT_HISTORY_COLUMNS))
MLT_HISTORY_COLUMNS += ("absorbed_flux", "outgoing_radiation", "water_ocean", "water_dissolved", "water_lost",
                        "pressure_h2o", "pressure_co2")
MH_ABS, MH_OLR, MH_OCEAN, MH_DISSOLVED, MH_LOST, MH_P_H2O, MH_P_CO2 = range(N_MH, N_MH := len(MLT_HISTORY_COLUMNS))
#: the stagnant lid's heat pipe: its power [W] (not in surface_heat_flow) and the mass rate of melt it extracts
#: [kg/s]
MLT_HISTORY_COLUMNS += ("pipe_power", "pipe_extraction")
MH_PIPE, MH_EXTRACT = range(N_MH, N_MH := len(MLT_HISTORY_COLUMNS))
#: index of the top convecting cell (the regime's melt fraction is its isentrope's at the surface)
MLT_HISTORY_COLUMNS += ("upper_cell",)
MH_UPPER_CELL, = range(N_MH, N_MH := len(MLT_HISTORY_COLUMNS))
#: integrator state of the mixing-length scheme (implicit.integrate resumes from it; h per cell kept apart)
MLT_STATE = ("time", "heat_out_minus_radiogenic", "step_size", "previous_step_size", "n_history", "n_rejected",
             "core_temperature", "emissivity")
MS_T, MS_OUT, MS_H, MS_H_PREV, MS_N_H, MS_N_REJ, MS_TC, MS_EPS = range(N_MS := len(MLT_STATE))
MLT_STATE += ("water_lost",)
MS_LOST, = range(N_MS, N_MS := len(MLT_STATE))
MLT_STATE += ("newton_iterations",)
MS_N_NEWTON, = range(N_MS, N_MS := len(MLT_STATE))

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
