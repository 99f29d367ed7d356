"""Thermal evolution: the friendly layer around the numba kernel (:mod:`meltzone.evolution.kernel`).

:func:`evolve` takes a PlanetSpec (or a mapping shaped like the TOML file, or a
TOML path), solves the interior, evaluates the melting curves once on the
radial grid, packs the kernel's arrays, runs the integrator (resuming with
larger buffers when they fill) and wraps the outputs in a :class:`Result`.

Parameter defaults follow Tosi et al. 2017 (A&A 605:A71, Table 1; checked):
A = 6.127e10 Pa s, E = 335 kJ/mol, V = 4 cm^3/mol, Ra_cr = 450, k = 4 W/m/K,
kappa = 1e-6 m^2/s, alpha = 2e-5 1/K, c_mantle = 1100 and c_core = 800 J/kg/K,
latent heat 6e5 J/kg, initial CMB excess 200 K.
"""

from __future__ import annotations

import math
import time as _time

import numpy as np

from ..config import PlanetSpec, as_spec
from ..constants import GYR, MYR
from ..errors import ConvergenceError
from ..interior import Interior, build_interior

#: Lid thickness [m] below which a stagnant lid is not resolved (its starting value).
LID_MIN = 1.0e3
#: Core inner-core light-element depression is applied to the iron melting curve of melting.py.


def _node_weights(r: np.ndarray, m: np.ndarray, m_bottom: float, m_top: float) -> np.ndarray:
    """Mass of the shell each node stands for (midpoint rule on the enclosed mass)."""
    mid = 0.5 * (r[1:] + r[:-1])
    m_mid = np.interp(mid, r, m)
    edges = np.concatenate([[m_bottom], m_mid, [m_top]])
    return np.diff(edges)


def build_arrays(spec: PlanetSpec, interior: Interior):
    """Kernel inputs (grid, core, iso, par, law) for a spec and its interior; also the curves used."""
    from .. import melting
    from . import kernel as k
    from .heating import isotope_table

    it = interior
    ms = it.mantle
    r = it.r[ms]
    p = it.P[ms]
    model = melting.get_model(spec.melting.model, table_file=spec.melting.table_file or None)
    curves = melting.node_curves(model, p, spec.melting.melt_fraction_law, spec.melting.water_wt_percent)
    grid = np.zeros((k.N_G, len(r)))
    grid[k.G_R] = r
    grid[k.G_P] = p
    grid[k.G_F] = it.adiabat[ms]
    grid[k.G_W] = _node_weights(r, it.m[ms], it.core_mass, it.mass)
    grid[k.G_TSOL] = curves["solidus"]
    grid[k.G_TLIQ] = curves["liquidus"]
    grid[k.G_AUX1] = curves["aux1"]
    grid[k.G_AUX2] = curves["aux2"]
    law = int(curves["law_code"])

    cs = it.core
    nc = it.cmb_index
    core = np.zeros((k.N_C, max(nc, 2)))
    if nc >= 2:
        core[k.C_R] = it.r[cs]
        core[k.C_F] = it.adiabat[cs]
        core[k.C_W] = _node_weights(it.r[cs], it.m[cs], 0.0, it.core_mass)
        core[k.C_TMELT] = melting.iron_melting_temperature(it.P[cs], spec.melting.core_melting_depression_k)
        core[k.C_MCUM] = it.m[cs]
    else:  # coreless planet: a dummy core without heat capacity that never freezes
        core[k.C_F] = 1.0
        core[k.C_W] = 0.0
        core[k.C_TMELT] = 0.0

    cv = spec.convection
    par = np.zeros(k.N_PAR)
    par[k.P_RADIUS] = it.radius
    par[k.P_CORE_RADIUS] = max(it.core_radius, 1.0)
    par[k.P_G_SURF] = it.surface_gravity
    par[k.P_G_CMB] = it.g[it.cmb_index] if nc else 0.0
    mantle_volume = 4.0 / 3.0 * math.pi * (it.radius ** 3 - it.core_radius ** 3)
    par[k.P_RHO_MANTLE] = it.mantle_mass / mantle_volume
    par[k.P_RHO_TOP] = it.rho[-1]
    par[k.P_K] = cv.thermal_conductivity
    par[k.P_KAPPA] = cv.thermal_diffusivity
    par[k.P_ALPHA] = cv.thermal_expansivity
    par[k.P_CM] = cv.mantle_heat_capacity
    par[k.P_LATENT] = cv.latent_heat
    par[k.P_A_VISC] = cv.viscosity_prefactor_pa_s
    par[k.P_E_ACT] = cv.activation_energy_j_mol
    par[k.P_V_ACT] = cv.activation_volume_m3_mol
    par[k.P_V_DECAY] = cv.activation_volume_decay_pa
    par[k.P_RA_CR] = cv.critical_rayleigh
    par[k.P_BETA] = cv.beta
    par[k.P_NU_A] = cv.nusselt_prefactor
    par[k.P_T_SOLID] = k.NOT_YET
    par[k.P_BLEND] = cv.rheology_blend_width
    par[k.P_A_RH] = cv.rheology_a
    par[k.P_MELT_WEAK] = cv.melt_weakening
    par[k.P_ETA_LIQ] = cv.liquid_viscosity_pa_s
    par[k.P_PHI_C] = cv.critical_melt_fraction
    par[k.P_CC] = spec.core.core_heat_capacity
    par[k.P_LC] = spec.core.core_latent_heat
    par[k.P_EG] = spec.core.gravitational_energy
    par[k.P_T_EQ] = spec.surface.equilibrium_temperature_k
    par[k.P_ATMOSPHERE] = 1.0 if spec.surface.atmosphere == "grey" else 0.0
    par[k.P_H2O_TOTAL] = spec.surface.water_inventory_kg
    par[k.P_CO2_TOTAL] = spec.surface.co2_inventory_kg
    par[k.P_STAGNANT] = 1.0 if cv.regime == "stagnant-lid" else 0.0
    par[k.P_P_CMB] = it.cmb_pressure
    par[k.P_START_AGE] = spec.heating.start_age_gyr * GYR
    par[k.P_LAW] = law
    par[k.P_DT_MAX] = spec.run.max_temperature_step_k
    par[k.P_RTOL] = spec.run.rtol
    par[k.P_ATOL] = spec.run.atol_k
    par[k.P_T_END] = spec.run.end_time_gyr * GYR
    par[k.P_H_MAX] = spec.run.max_step_myr * MYR
    par[k.P_LID_MIN] = LID_MIN
    par[k.P_P_TOP] = it.surface_pressure
    par[k.P_MANTLE_MASS] = it.mantle_mass
    iso = isotope_table(spec.heating.radiogenic_scale)
    return grid, core, iso, par, law, model


def initial_temperatures(spec: PlanetSpec, grid) -> tuple[float, float]:
    """(T_u, T_c) at the start: by default 50 K above the liquidus at every mantle node (fully molten),
    and the core the mantle adiabat at the CMB plus ``initial.initial_cmb_jump_k``."""
    from . import kernel as k

    tu = spec.initial.upper_temperature_k
    if tu <= 0.0:
        tu = float(np.max(grid[k.G_TLIQ] / grid[k.G_F])) + 50.0
    tc = spec.initial.core_temperature_k
    if tc <= 0.0:
        tc = tu * grid[k.G_F, 0] + spec.initial.initial_cmb_jump_k
    return tu, tc


def initial_state(spec: PlanetSpec, grid, core, par, law) -> np.ndarray:
    """y0 of the kernel (energies, lid, 0) and the temperatures it stands for."""
    from . import kernel as k

    tu, tc = initial_temperatures(spec, grid)
    y0 = np.zeros(k.N_Y)
    lid = LID_MIN if par[k.P_STAGNANT] > 0.5 else 0.0
    k.energy_state(tu, tc, lid, 0.0, grid, core, par, law, y0)
    return y0, tu, tc


def run_kernel(grid, core, iso, par, law, y0, t_guess, max_steps, progress=None, history_rows=4096,
               interval_rows=8192):
    """Run the integrator to the end time, growing the buffers (initial sizes ``history_rows``,
    ``interval_rows``) when they fill. Returns (hist, iv, state)."""
    from . import kernel as k

    hist = np.zeros((history_rows, k.N_H))
    iv = np.zeros((interval_rows, k.N_I))
    par[k.P_T_SOLID] = k.NOT_YET  # a fresh run: the integrator sets it when the top first reaches phi_c
    state = np.zeros(17)
    state[1:1 + k.N_Y] = y0
    state[5] = 1.0  # first step [s]; the controller grows it
    state[9], state[10] = t_guess
    chunk = 100 if progress is not None else max_steps
    done = 0
    while True:
        status = k.integrate(state, grid, core, iso, par, law, hist, iv, min(chunk, max_steps - done))
        done = int(state[6]) - 1
        if progress is not None:
            progress(state[0])
        if status == k.STATUS_DONE:
            break
        if status == k.STATUS_HISTORY_FULL:
            hist = np.concatenate([hist, np.zeros_like(hist)])
        elif status == k.STATUS_INTERVALS_FULL:
            iv = np.concatenate([iv, np.zeros_like(iv)])
        elif status == k.STATUS_MAX_STEPS:
            if done >= max_steps:
                raise ConvergenceError(
                    f"the evolution reached run.max_steps = {max_steps} at t = {state[0] / GYR:.4g} Gyr; "
                    "raise run.max_steps or run.max_temperature_step_k")
        elif status == k.STATUS_STEP_TOO_SMALL:
            raise ConvergenceError(f"time step collapsed at t = {state[0]:.4g} s "
                                   f"(T_u = {state[9]:.1f} K, T_c = {state[10]:.1f} K)")
    n_h = int(state[6])
    n_iv = int(state[7])
    return hist[:n_h].copy(), iv[:n_iv].copy(), state


def evolve(config=None, *, progress=None, **kwargs):
    """Run the thermal evolution of one planet and return a :class:`meltzone.results.Result`.

    ``config``: a PlanetSpec, a mapping shaped like the TOML file, a TOML path, or None (defaults;
    flat keyword overrides such as ``mass_earth=4`` are accepted). ``progress``, if given, is called
    with the model time reached [s] every 100 steps.
    """
    from ..results import Result

    spec = as_spec(config, **kwargs)
    t0 = _time.perf_counter()
    interior = build_interior(spec)
    grid, core, iso, par, law, model = build_arrays(spec, interior)
    y0, tu0, tc0 = initial_state(spec, grid, core, par, law)
    hist, iv, state = run_kernel(grid, core, iso, par, law, y0, (tu0, tc0), spec.run.max_steps, progress)
    wall = _time.perf_counter() - t0
    return Result.from_kernel(spec, interior, model, grid, core, iso, par, law, hist, iv, state, wall)


__all__ = ["evolve", "build_arrays", "initial_state", "initial_temperatures", "run_kernel"]
