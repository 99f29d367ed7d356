"""The implicit integrator of the mixing-length scheme: backward Euler on the cells' enthalpies and the core's
stored heat, Newton on the tridiagonal Jacobian, adaptive steps, recording.

Unknowns x = (E_core, h_0 .. h_{n-1}) (core first, so that the core-CMB-cell coupling stays tridiagonal).
Residual of row 0: (E_c - E_c^old) / dt + A_0 F_0; of row i + 1 (cell i): M_i (h_i - h_i^old) / dt
- A_i F_i + A_{i+1} F_{i+1} - H_i, with face fluxes F_j (positive upward) at the end of the step. The sum of
the rows is the global energy balance, so the scheme conserves energy to the Newton tolerance (Patankar 1980,
Numerical Heat Transfer and Fluid Flow, finite volumes; common practice); Newton stops only once that sum
holds to CLOSE_K of the mantle's heat content. Jacobian entries of the internal
faces in closed form, of the outer faces by one-sided differences (the surface's through the implicit function
theorem on its radiative balance); the Thomas solve of :mod:`meltzone._core.tridiag`.

Step control: local error of backward Euler estimated from the linear predictor through the last two states,
LTE ~ dt / (dt + dt_prev) |x - x_pred| (common practice for one-step implicit methods), in kelvin of sensible
heat, against M_ERR; besides, no cell may change its temperature by more than M_DT_CELL nor its melt fraction
by more than M_DPHI in one step, so a melt layer cannot open and close between two recorded profiles unless
its melt fraction stays below M_DPHI.
"""

from __future__ import annotations

import math

import numpy as np

from ..constants import STEFAN_BOLTZMANN, YEAR
from ._jit import njit
from .layout import (C_W, F_A, F_DR, F_R, G_F, G_P, G_W, M_DPHI, M_DT_CELL, M_ERR, M_MAX_NEWTON, M_MIN_STEP,
                     M_MOBILE, M_TOP_CELLS, M_NEWTON_TOL, MH_ATM_CO2, MH_ATM_H2O, MH_DT, MH_E_STORED, MH_EC, MH_H,
                     MH_EXTRACT, MH_LID, MH_MELT, MH_NEWTON, MH_OUT, MH_PHI_TOP, MH_PIPE, MH_QC, MH_QS, MH_RIC, MH_T,
                     MH_TC, MH_TS, MH_TU,
                     MS_EPS, MS_H, MS_H_PREV, MS_N_H, MS_N_NEWTON, MS_N_REJ, MS_OUT, MS_T, MS_TC, P_A_RH, P_ATMOSPHERE,
                     P_BLEND, P_CC, P_CM, P_H_MAX, P_K, P_LATENT, P_P_EXTRACT, P_PHI_C, P_RADIUS, P_STAGNANT, P_T_END,
                     P_VOLC, STATUS_DONE, STATUS_HISTORY_FULL, STATUS_MAX_STEPS, STATUS_STEP_TOO_SMALL)
from .lid import smoothstep, smoothstep_slope
from .mlt_physics import (CW_DLN_ETA, CW_DTDH, CW_H_ACT, CW_LN_ETA, N_CW, adiabat_floor, cell_activation,
                          cell_log_viscosity, cell_slope, cell_state, cmb_flux, interior_flux, rigid_mixing_length,
                          surface_adiabat_state, surface_flux, surface_flux_slope)
from .record import find_intervals
from .physics import (CORE, GREY_H2O_COEFF, GREY_H2O_EXPONENT, _invert, contact_weight, core_energy, inner_core,
                      radiogenic_power)
from .layout import (MH_UPPER_CELL, MH_ABS, MH_DISSOLVED, MH_LOST, MH_OCEAN, MH_OLR, MH_P_CO2, MH_P_H2O, MS_LOST, P_G_SURF,
                     P_H2O_SOL_C, P_H2O_SOL_E, P_H2O_TOTAL, P_STEAM)
from .radiation import condense, escape_rate, radiation_state, thin_weight, volatiles
from .tridiag import solve

#: melt fraction a cell keeps where the mixing-length scheme's heat pipe extracts melt, and the e-folding time
#: [s] of the extraction (this model's choice: melt connects and leaves its source at ~0.1-1% porosity, McKenzie
#: 1984, J. Petrol. 25:713, Faul 2001, Nature 410:920; the time is short against the mantle's thermal evolution:
#: see meltzone.evolution.mixing_length, "Heat pipe")
PIPE_MELT = 0.01
PIPE_TIME = 1.0e4 * YEAR

#: relative perturbation of the finite-difference Jacobian, and of the melt mass for the volatiles' slope
FD_REL = 1.0e-8
VOL_FD = 1.0e-6
#: largest energy imbalance of an accepted step [K of the mantle's heat content] (this model's choice: the
#: energy closure's budget of 1e-8 over ~1e4 steps of ~1000 K)
CLOSE_K, CLOSE_REL = 1.0e-9, 1.0e-12
#: step growth bounds per accepted step
GROW_MAX, SHRINK_MIN = 2.0, 0.2
#: step factor after a failed Newton solve or a violated bound
CUT = 0.5
#: relative end-time slack of the loop
END_SLACK = 1e-14
#: super-adiabatic excess [K] (or the Newton tolerance, if larger) at which the Newton iteration takes the
#: convective flux's slope where the excess is smaller (the residual always holds the true flux). Exact slopes
#: once the updates fell below 0.01 K, so that the iteration would end quadratically, were dropped: in a magma
#: ocean near zero net flow the faces sit at the onset, where exact slopes vanish and overshoot, and Newton
#: cycled between the two for 30 iterations (measured on a steam-capped 1 M_E planet; over the 5 M_E benchmark
#: the regularised slopes alone take fewer iterations). Numerical choice of this model
DH_JAC_K = 1.0e-3
#: once the updates have converged and only the step's energy balance is left, the slopes are taken at an excess
#: of at most JAC_SHRINK times the last update (at least DH_JAC_MIN_K c_p): at DH_JAC_K a lava world's magma ocean
#: (faces ~1e-8 K super-adiabatic) converged linearly at ~0.9 per iteration and its steps were held at ~20 kyr
#: (1.08 M_E steam lava world: 139,837 steps to 4.5 Gyr, now 1,111); steps that close at once are unchanged.
#: Numerical choices of this model (JAC_SHRINK = 1 was tried: one steam world faster, another slower)
JAC_SHRINK = 10.0
DH_JAC_MIN_K = 1.0e-12
#: a step whose Newton updates took more iterations than SLOW_NEWTON to converge (those that close its energy
#: balance after that not counted) lets the next one be at most SLOW_FACTOR as long
#: (common practice of implicit integrators; values of this model, measured: fewest iterations over 10 Gyr)
SLOW_NEWTON, SLOW_FACTOR = 4, 0.8
#: a boundary layer counts as convecting when it carries this much more than conduction across the half cell
CONVECTING = 1.01


@njit(leaf=True)
def _states(h, grid, law, par, temp, phi):
    for i in range(h.shape[0]):
        temp[i], phi[i] = cell_state(h[i], grid, i, law, par)


@njit(leaf=True)
def _melt_in_contact(phi, grid, par):
    """(melt mass [kg] the atmosphere's volatiles dissolve in, lowest cell of it, contact weight): the cells
    molten from the top cell down without a gap, while the top cell is above the rheological transition (the
    boundary-layer scheme's contact_weight, from the top cell's melt fraction); melt under a solid top cell, and
    a basal magma ocean, are sealed off from the atmosphere."""
    top = phi.shape[0] - 1
    m_melt = 0.0
    low = top + 1
    for i in range(top, -1, -1):
        if phi[i] <= 0.0:
            break
        m_melt += grid[G_W, i] * phi[i]
        low = i
    cw = contact_weight(phi[top], par)
    return m_melt * cw, low, cw


@njit(leaf=True)
def _surface_from_melt(t, m_melt, lost, par):
    """(radiation state, (M_H2O vapour, M_CO2, M_H2O dissolved, M_H2O left, melt mass)) of the surface at time
    t, with the volatiles in solubility equilibrium with m_melt [kg] of melt (the boundary-layer scheme's laws,
    :mod:`meltzone._core.radiation`)."""
    steam = par[P_STEAM] > 0.5
    if par[P_ATMOSPHERE] <= 0.5 and not steam:
        return radiation_state(t, 1.0, steam, par, 1.0), (0.0, 0.0, 0.0, 0.0, 0.0)
    if steam:
        eps, m_h2o, m_co2, dissolved, water = volatiles(m_melt, lost, par[P_H2O_SOL_C], par[P_H2O_SOL_E], par, 0.0, 0.0)
    else:
        eps, m_h2o, m_co2, dissolved, water = volatiles(m_melt, lost, GREY_H2O_COEFF, GREY_H2O_EXPONENT, par, 0.0, 0.0)
    return radiation_state(t, eps, steam, par, thin_weight(m_h2o, par)), (m_h2o, m_co2, dissolved, water, m_melt)


@njit(leaf=True)
def _surface_state(t, phi, grid, lost, par):
    """The surface's radiation state and volatiles (:func:`_surface_from_melt`) with the melt of
    :func:`_melt_in_contact` at the melt fractions phi."""
    return _surface_from_melt(t, _melt_in_contact(phi, grid, par)[0], lost, par)


@njit(leaf=True)
def _water_after(t, ts, vol, par):
    """(vapour, ocean, dissolved, escape rate [kg/s]) at the surface temperature a step ended with."""
    m_h2o, m_co2, dissolved, water, m_melt = vol
    ocean = 0.0
    if par[P_STEAM] > 0.5:
        m_h2o, ocean, dissolved = condense(ts, water, m_melt, m_h2o, dissolved, par)
    return m_h2o, ocean, dissolved, escape_rate(t, m_h2o, ocean, par) if water > 0.0 else 0.0


@njit(leaf=True)
def fluxes(tc, h, temp, phi, grid, faces, core, par, law, floors, rad, has_core, cells, flux, d_lo, d_hi, dh_jac):
    """Face fluxes F_j [W/m^2] at the state (E_c, h) and their derivatives in the unknown below (d_lo: E_c for
    the CMB face, h_{j-1} otherwise) and above (d_hi: h_j); ``cells`` (CW_* rows) is filled on the way;
    ``dh_jac``: see :func:`meltzone._core.mlt_physics.interior_flux`. Returns T_s."""
    n = h.shape[0]
    # CMB face
    if has_core:
        dtc = FD_REL * tc + 1e-6
        flux[0] = cmb_flux(tc, temp[0], grid, law, faces, floors[0], par)
        f_t = cmb_flux(tc + dtc, temp[0], grid, law, faces, floors[0], par)
        # dE_c/dT_c from the stored-heat function (inner-core release included)
        slope = (core_energy(tc + dtc, grid, core, par) - core_energy(tc, grid, core, par)) / dtc
        d_lo[0] = (f_t - flux[0]) / dtc / slope
        dh = FD_REL * abs(h[0]) + 1e-3
        t1, _ = cell_state(h[0] + dh, grid, 0, law, par)
        d_hi[0] = (cmb_flux(tc, t1, grid, law, faces, floors[0], par) - flux[0]) / dh
    else:
        flux[0] = 0.0
        d_lo[0] = 0.0
        d_hi[0] = 0.0
    for i in range(n):
        dt_dh, dphi_dh = cell_slope(h[i], temp[i], grid, i, law, par)
        ln_eta, dln_dt, dln_dphi = cell_log_viscosity(temp[i], phi[i], cells[CW_H_ACT, i], floors[i], par)
        cells[CW_DTDH, i] = dt_dh
        cells[CW_LN_ETA, i] = ln_eta
        cells[CW_DLN_ETA, i] = dln_dt * dt_dh + dln_dphi * dphi_dh
    for j in range(1, n):
        flux[j], d_lo[j], d_hi[j] = interior_flux(h[j - 1], h[j], temp[j - 1], temp[j], cells, j - 1, j, faces, j,
                                                  dh_jac, par)
    top = n - 1
    q, ts = surface_flux(temp[top], phi[top], faces, n, floors[top], rad, par)
    dh = FD_REL * abs(h[top]) + 1e-3
    t1, p1 = cell_state(h[top] + dh, grid, top, law, par)
    flux[n] = q
    d_lo[n] = surface_flux_slope(ts, temp[top], phi[top], t1, p1, dh, faces, n, floors[top], rad, par)
    d_hi[n] = 0.0
    return ts


@njit(leaf=True)
def pipe_extraction(i, phi, grid, par):
    """(M [kg/s], dM/dphi [kg/s]) of the heat pipe's melt extraction out of cell i: melt above PIPE_MELT in a
    partly molten cell no deeper than volcanism.max_extraction_pressure_gpa leaves at the rate
    M = m (phi - PIPE_MELT) w / PIPE_TIME, w = 1 below the rheological transition, falling to 0 across it with the
    viscosity's smoothstep (a magma ocean convects its heat instead); see :func:`heat_pipe`."""
    if grid[G_P, i] > par[P_P_EXTRACT] or phi[i] <= PIPE_MELT:
        return 0.0, 0.0
    xb = (phi[i] - par[P_PHI_C]) / par[P_BLEND]
    if xb >= 1.0:
        return 0.0, 0.0
    w = 1.0 - smoothstep(xb)
    dw = -smoothstep_slope(xb) / par[P_BLEND]
    rate = grid[G_W, i] / PIPE_TIME
    excess = phi[i] - PIPE_MELT
    return rate * excess * w, rate * (w + excess * dw)


@njit(leaf=True)
def heat_pipe(i, h, temp, phi, grid, law, par, ts):
    """(S [W], dS/dh [W kg/J]) of the heat pipe out of cell i: the melt of :func:`pipe_extraction` erupts; the
    cell loses the melt's enthalpy and gains that of the same mass of cold surface material sinking in its place,
    L + c_p (T - T_s) per kg (the heat pipe of Moore & Webb 2013, Nature 501:501; from memory). Whether the pipe
    runs at all (volcanism on, stagnant lid, a solid top) is :func:`_pipe_surface`'s decision, once per step."""
    mass, d_mass = pipe_extraction(i, phi, grid, par)
    if mass == 0.0 and d_mass == 0.0:
        return 0.0, 0.0
    per_kg = par[P_LATENT] + par[P_CM] * (temp[i] - ts)
    dt_dh, dphi_dh = cell_slope(h[i], temp[i], grid, i, law, par)
    return mass * per_kg, d_mass * dphi_dh * per_kg + mass * par[P_CM] * dt_dh


@njit(leaf=True)
def newton(t_new, dt, x_old, x, tc, grid, faces, core, iso, par, law, mset, floors, rad, vol, lost, ts_pipe,
           has_core, temp, phi, cells, flux, d_lo, d_hi, lower, diag, upper, rhs, dx, work, vvec, zvec):
    """Solve the backward-Euler step from x_old over dt in place of x (which holds the start guess); x[0] is
    the core's stored heat, x[1:] the cells' enthalpies. ``tc`` starts the core inversion. Returns
    (converged, iterations, iterations until the updates converged, T_c, T_s, radiation state, volatiles, the
    heat pipe's power [W]); on success temp, phi and flux hold the end state's.

    With an atmosphere that exchanges volatiles with the melt, the radiation state is the end state's, too (the
    melt in contact, :func:`_melt_in_contact`, sets the dissolved and the airborne gases): the surface row then
    depends on every cell of that melt, J = T + e_top v^T with v_i = A_top dq/dM_melt dM_melt/dh_i (dq/dM_melt by
    a one-sided difference), solved by the Sherman-Morrison formula with two Thomas solves (Golub & Van Loan
    2013, Matrix Computations, sec. 2.1.4; checked: no). Lagged by a step, the feedback (more melt, more
    dissolved water, less greenhouse, more cooling) made the surface flux alternate from step to step under a
    steam atmosphere at the radiation limit and held the steps at ~30 kyr."""
    n = x.shape[0] - 1
    h = x[1:]
    heat = radiogenic_power(t_new, iso, par)
    m_total = 0.0
    for i in range(n):
        m_total += grid[G_W, i]
    tol_h = mset[M_NEWTON_TOL] * par[P_CM]
    c_core = 0.0
    for jj in range(core.shape[1]):
        c_core += core[C_W, jj] * par[P_CC]
    ts = 0.0
    big_prev = math.inf
    max_it = int(mset[M_MAX_NEWTON])
    coupled = par[P_STEAM] > 0.5 or par[P_ATMOSPHERE] > 0.5
    dh_jac = max(par[P_CM] * DH_JAC_K, tol_h)
    n_upd = 0  # iterations until the updates converged (the rest closes the energy balance)
    dh_it = dh_jac
    for it in range(max_it):
        _states(h, grid, law, par, temp, phi)
        for i in range(n):
            if not temp[i] > 0.0:  # a diverging iterate: the caller shortens the step
                return False, it + 1, it + 1, tc, ts, rad, vol, 0.0
        m_melt, low, cw = 0.0, n, 0.0
        if coupled:
            m_melt, low, cw = _melt_in_contact(phi, grid, par)
            rad, vol = _surface_from_melt(t_new, m_melt, lost, par)
        if has_core:
            tc, _ = _invert(CORE, x[0], 0.0, 0.0, grid, core, par, law, tc, 0.0)
        # slopes at the onset of convection regularised (see interior_flux and DH_JAC_K)
        ts = fluxes(tc, h, temp, phi, grid, faces, core, par, law, floors, rad, has_core, cells, flux, d_lo, d_hi,
                    dh_it)
        a0 = faces[F_A, 0]
        rhs[0] = (x[0] - x_old[0]) / dt + a0 * flux[0]
        diag[0] = 1.0 / dt + a0 * d_lo[0]
        upper[0] = a0 * d_hi[0]
        lower[0] = 0.0
        for i in range(n):
            a_lo = faces[F_A, i]
            a_hi = faces[F_A, i + 1]
            m = grid[G_W, i]
            pipe, d_pipe = heat_pipe(i, h, temp, phi, grid, law, par, ts_pipe) if ts_pipe > 0.0 else (0.0, 0.0)
            rhs[i + 1] = m * (h[i] - x_old[i + 1]) / dt - a_lo * flux[i] + a_hi * flux[i + 1] - heat * m / m_total \
                + pipe
            lower[i + 1] = -a_lo * d_lo[i]
            diag[i + 1] = m / dt - a_lo * d_hi[i] + a_hi * d_lo[i + 1] + d_pipe
            upper[i + 1] = a_hi * d_hi[i + 1]
        if not solve(lower, diag, upper, rhs, dx, work):
            return False, it + 1, it + 1, tc, ts, rad, vol, 0.0
        if coupled and m_melt > 0.0 and cw > 0.0:
            dm = VOL_FD * m_melt
            rad2, _ = _surface_from_melt(t_new, m_melt + dm, lost, par)
            q2, _ = surface_flux(temp[n - 1], phi[n - 1], faces, n, floors[n - 1], rad2, par)
            g = faces[F_A, n] * (q2 - flux[n]) / dm
            dphi_dh = 0.0
            for i in range(low, n):
                dphi_dh = cell_slope(h[i], temp[i], grid, i, law, par)[1]
                vvec[i + 1] = g * cw * grid[G_W, i] * dphi_dh
            # the contact weight's own slope in the top cell's melt fraction (dphi_dh is the top cell's now)
            xb = (phi[n - 1] - par[P_PHI_C]) / par[P_BLEND]
            vvec[n] += g * m_melt / cw * smoothstep_slope(xb) / par[P_BLEND] * dphi_dh
            vy = 0.0
            for i in range(low, n):
                vy += vvec[i + 1] * dx[i + 1]
            if vy != 0.0:
                for i in range(n + 1):
                    zvec[i] = 0.0
                zvec[n] = 1.0
                if not solve(lower, diag, upper, zvec, rhs, work):
                    return False, it + 1, it + 1, tc, ts, rad, vol, 0.0
                vz = 0.0
                for i in range(low, n):
                    vz += vvec[i + 1] * rhs[i + 1]
                if not abs(1.0 + vz) > 1e-12:
                    return False, it + 1, it + 1, tc, ts, rad, vol, 0.0
                for i in range(n + 1):
                    dx[i] -= rhs[i] * vy / (1.0 + vz)
        big = 0.0
        for i in range(n):
            h[i] -= dx[i + 1]
            big = max(big, abs(dx[i + 1]))
        if has_core:
            x[0] -= dx[0]
            big = max(big, abs(dx[0]) / c_core * par[P_CM])
        if not (big < 1e300):
            return False, it + 1, it + 1, tc, ts, rad, vol, 0.0
        # converged when the update, or the error left after it estimated from the contraction rate
        # theta = |dx_k| / |dx_k-1| as theta / (1 - theta) |dx_k|, is below the tolerance (Hairer & Wanner 1996,
        # Solving ODEs II, sec. IV.8; checked: no)
        theta = big / big_prev if big_prev > 0.0 else 0.0
        big_prev = big
        if big <= tol_h or (it > 0 and theta < 0.5 and theta / (1.0 - theta) * big <= tol_h):
            if n_upd == 0:
                n_upd = it + 1
            dh_it = max(min(dh_it, JAC_SHRINK * big), DH_JAC_MIN_K * par[P_CM])
            _states(h, grid, law, par, temp, phi)
            if has_core:
                tc, _ = _invert(CORE, x[0], 0.0, 0.0, grid, core, par, law, tc, 0.0)
                flux[0] = cmb_flux(tc, temp[0], grid, law, faces, floors[0], par)
            if coupled:
                rad, vol = _surface_state(t_new, phi, grid, lost, par)
            flux[n], ts = surface_flux(temp[n - 1], phi[n - 1], faces, n, floors[n - 1], rad, par)
            # the global energy balance of the step (the sum of the rows: the internal faces cancel), which is
            # the energy closure's increment, must hold to CLOSE_K of the mantle's heat content; else iterate on
            # (or to CLOSE_REL of the stored heat and the step's flows, the rounding of their sum)
            gap = (x[0] - x_old[0]) + dt * (faces[F_A, n] * flux[n] - heat)
            size = abs(x[0]) + dt * (abs(faces[F_A, n] * flux[n]) + heat)
            pipe_total = 0.0
            for i in range(n):
                gap += grid[G_W, i] * (h[i] - x_old[i + 1])
                size += grid[G_W, i] * abs(h[i])
                if ts_pipe > 0.0:
                    pipe = heat_pipe(i, h, temp, phi, grid, law, par, ts_pipe)[0]
                    pipe_total += pipe
                    gap += dt * pipe
                    size += dt * abs(pipe)
            if abs(gap) <= max(CLOSE_K * par[P_CM] * m_total, CLOSE_REL * size):
                return True, it + 1, n_upd, tc, ts, rad, vol, pipe_total
    return False, max_it, max_it, tc, ts, rad, vol, 0.0


@njit(leaf=True)
def upper_cell(temp, flux, faces, par):
    """Index of the top convecting cell: the highest cell whose upper face carries more heat by convection
    than by conduction (the top face: a boundary layer thinner than the half cell); 0 if none."""
    n = temp.shape[0]
    for j in range(n - 1, 0, -1):
        cond = -par[P_K] * (temp[j] - temp[j - 1]) / faces[F_DR, j]
        if flux[j] - cond > abs(cond):
            return j - 1
    return 0


@njit(leaf=True)
def _log_convective_ratio(f, temp, flux, faces, par):
    """ln(convective / conductive flux) at interior face f; -700 at the surface face or where conduction does
    not carry heat upward."""
    if f >= temp.shape[0]:
        return -700.0
    cond = -par[P_K] * (temp[f] - temp[f - 1]) / faces[F_DR, f]
    if cond <= 0.0:
        return -700.0
    return math.log(max((flux[f] - cond) / cond, 1e-300))


@njit(leaf=True)
def lid_base(temp, flux, faces, par, top_face):
    """Radius [m] of the stagnant lid's base: where the convective share of the face flux equals the conductive
    one, ln(convective / conductive) interpolated linearly in radius between the top convecting cell's upper face
    (``top_face``, 1 .. n, convection above conduction) and the face above it (the ratio falls about exponentially
    through the lid's base, with the viscosity), so that the thickness is not a cell-face depth."""
    j = top_face
    if j >= temp.shape[0]:
        return faces[F_R, j]
    y0 = _log_convective_ratio(j, temp, flux, faces, par)
    y1 = _log_convective_ratio(j + 1, temp, flux, faces, par)
    if y0 <= 0.0 or y1 >= 0.0:
        return faces[F_R, j]
    return faces[F_R, j] + (faces[F_R, j + 1] - faces[F_R, j]) * y0 / (y0 - y1)


@njit(leaf=True)
def record(t, dt, x, tc, ts, temp, phi, flux, grid, faces, core, iso, par, law, floors, rad, wat, out,
           newton_its, hist, temps, phis, n_h):
    """Store accepted step ``n_h``: history row (MH_*) and T, phi on every cell. ``wat`` = (vapour, CO2, ocean,
    dissolved, lost) [kg]."""
    n = temp.shape[0]
    melt = 0.0
    e = 0.0
    for i in range(n):
        temps[n_h, i] = temp[i]
        phis[n_h, i] = phi[i]
        melt += grid[G_W, i] * phi[i]
        # recomputed from (T, phi): the closure also tests the inversion
        e += grid[G_W, i] * (par[P_CM] * temp[i] + par[P_LATENT] * phi[i])
    has_core = core[C_W].sum() > 0.0
    e_core = core_energy(tc, grid, core, par) if has_core else 0.0
    top_face = n
    # top convecting cell: the surface cell when its boundary layer is thinner than the half cell
    if flux[n] * faces[F_DR, n] > CONVECTING * par[P_K] * (temp[n - 1] - ts) and temp[n - 1] > ts:
        iu = n - 1
    else:
        iu = upper_cell(temp, flux, faces, par)
        top_face = iu + 1
    hist[n_h, MH_T] = t
    hist[n_h, MH_TU] = temp[iu] / grid[G_F, iu]
    hist[n_h, MH_TC] = tc
    hist[n_h, MH_TS] = ts
    hist[n_h, MH_QS] = flux[n] * faces[F_A, n]
    hist[n_h, MH_QC] = flux[0] * faces[F_A, 0] if has_core else 0.0
    hist[n_h, MH_H] = radiogenic_power(t, iso, par)
    stagnant = par[P_STAGNANT] > 0.5
    hist[n_h, MH_LID] = par[P_RADIUS] - lid_base(temp, flux, faces, par, top_face) if stagnant else 0.0
    hist[n_h, MH_RIC] = inner_core(tc, core)[0] if has_core else 0.0
    hist[n_h, MH_MELT] = melt
    # the regime's melt fraction: the isentrope of the top convecting cell at the surface (the top cell's own
    # melt fraction when its boundary layer is thinner than the half cell)
    ir = upper_cell(temp, flux, faces, par)
    h_u = par[P_CM] * temp[ir] + par[P_LATENT] * phi[ir]
    hist[n_h, MH_PHI_TOP] = surface_adiabat_state(h_u, temp[ir], ir, grid, law, par)[1]
    hist[n_h, MH_UPPER_CELL] = ir
    hist[n_h, MH_E_STORED] = e + e_core
    hist[n_h, MH_OUT] = out
    m_h2o, m_co2, ocean, dissolved, lost = wat
    area = faces[F_A, n]
    hist[n_h, MH_ATM_H2O] = m_h2o
    hist[n_h, MH_ATM_CO2] = m_co2
    hist[n_h, MH_ABS] = STEFAN_BOLTZMANN * rad[2]
    hist[n_h, MH_OLR] = flux[n] + STEFAN_BOLTZMANN * rad[2]
    hist[n_h, MH_OCEAN] = ocean
    hist[n_h, MH_DISSOLVED] = dissolved
    hist[n_h, MH_LOST] = lost
    hist[n_h, MH_P_H2O] = m_h2o * par[P_G_SURF] / area
    hist[n_h, MH_P_CO2] = m_co2 * par[P_G_SURF] / area
    hist[n_h, MH_EC] = x[0]
    hist[n_h, MH_NEWTON] = newton_its
    hist[n_h, MH_DT] = dt


@njit(leaf=True)
def _save(state, t, dt, dt_prev, n_h, n_rej, tc, out, eps, lost, n_newton):
    state[MS_LOST] = lost
    state[MS_T] = t
    state[MS_H] = dt
    state[MS_H_PREV] = dt_prev
    state[MS_N_H] = n_h
    state[MS_N_REJ] = n_rej
    state[MS_TC] = tc
    state[MS_OUT] = out
    state[MS_EPS] = eps
    state[MS_N_NEWTON] = n_newton


@njit(leaf=True)
def _pipe_surface(phi_top, ts_last, par):
    """The surface temperature [K] the heat pipe's eruptions cool to this step (the last accepted step's), or 0
    when the pipe does not run: volcanism off, a mobile lid, or a top cell that is not solid (lagged by one
    step, as the rigid mixing length)."""
    if par[P_VOLC] < 0.5 or par[P_STAGNANT] < 0.5 or phi_top > PIPE_MELT:
        return 0.0
    return ts_last


@njit
def _rigid_lengths(temp, phi, grid, faces, floors, cells, par):
    """The faces' mixing lengths bounded by a rigid region above (F_LM), from the cells' viscosities at the
    state (temp, phi); lagged by one step, as the mobile lid's floors."""
    for i in range(temp.shape[0]):
        cells[CW_LN_ETA, i] = cell_log_viscosity(temp[i], phi[i], cells[CW_H_ACT, i], floors[i], par)[0]
    rigid_mixing_length(cells, grid, faces, par[P_A_RH])


@njit
def integrate(state, x, x_prev, grid, faces, core, iso, par, law, mset, hist, temps, phis, max_steps):
    """Advance (x, state) until the end time, a full history or ``max_steps``; return a STATUS_* code. ``x``
    (E_c, h_0 .. h_{n-1}) and ``x_prev`` (the state one step earlier, for the error estimate) are updated in
    place, so that the next call resumes exactly."""
    n = x.shape[0] - 1
    temp = np.empty(n)
    phi = np.empty(n)
    temp_old = np.empty(n)
    phi_old = np.empty(n)
    flux = np.zeros(n + 1)
    d_lo = np.empty(n + 1)
    d_hi = np.empty(n + 1)
    lower = np.empty(n + 1)
    diag = np.empty(n + 1)
    upper = np.empty(n + 1)
    rhs = np.empty(n + 1)
    dx = np.empty(n + 1)
    work = np.empty(n + 1)
    vvec = np.empty(n + 1)
    zvec = np.empty(n + 1)
    x_old = np.empty(n + 1)
    floors = np.zeros(n)
    cells = np.empty((N_CW, n))
    cell_activation(grid, par, cells)
    t = state[MS_T]
    dt = state[MS_H]
    dt_prev = state[MS_H_PREV]
    n_h = int(state[MS_N_H])
    n_rej = int(state[MS_N_REJ])
    n_newton = state[MS_N_NEWTON]
    tc = state[MS_TC]
    out = state[MS_OUT]
    lost = state[MS_LOST]
    has_core = core[C_W].sum() > 0.0
    c_core = max(core[C_W].sum() * par[P_CC], 1.0)
    cm = par[P_CM]
    mobile = mset[M_MOBILE] > 0.5
    mid = n // 2
    t_end = par[P_T_END]
    # the refined top cells (the M_TOP_CELLS added ones and the top half cell) count in the step bounds and the
    # error estimate by their mass against the cell below them (light cells of the resolved lid)
    first_light = n - 1 - int(mset[M_TOP_CELLS]) if mset[M_TOP_CELLS] > 0.5 else n
    m_ref = grid[G_W, first_light - 1] if first_light >= 1 else grid[G_W, 0]
    _states(x[1:], grid, law, par, temp, phi)
    rad, vol = _surface_state(t, phi, grid, lost, par)
    if n_h == 0:
        if mobile:
            adiabat_floor(x[1 + mid], mid, grid, law, par, floors)
        else:
            _rigid_lengths(temp, phi, grid, faces, floors, cells, par)
        if has_core:
            tc, _ = _invert(CORE, x[0], 0.0, 0.0, grid, core, par, law, tc, 0.0)
        ts = fluxes(tc, x[1:], temp, phi, grid, faces, core, par, law, floors, rad, has_core, cells, flux, d_lo,
                    d_hi, 0.0)
        vap, ocean, dissolved, _ = _water_after(t, ts, vol, par)
        record(t, 0.0, x, tc, ts, temp, phi, flux, grid, faces, core, iso, par, law, floors, rad,
               (vap, vol[1], ocean, dissolved, lost), out, 0, hist, temps, phis, 0)
        n_h = 1
    steps = 0
    while t < t_end * (1.0 - END_SLACK):
        if n_h >= hist.shape[0]:
            _save(state, t, dt, dt_prev, n_h, n_rej, tc, out, rad[1], lost, n_newton)
            return STATUS_HISTORY_FULL
        if steps >= max_steps:
            _save(state, t, dt, dt_prev, n_h, n_rej, tc, out, rad[1], lost, n_newton)
            return STATUS_MAX_STEPS
        dt = min(dt, par[P_H_MAX], t_end - t)
        if dt < mset[M_MIN_STEP] and t_end - t > mset[M_MIN_STEP]:
            _save(state, t, dt, dt_prev, n_h, n_rej, tc, out, rad[1], lost, n_newton)
            return STATUS_STEP_TOO_SMALL
        for i in range(n + 1):
            x_old[i] = x[i]
        _states(x_old[1:], grid, law, par, temp_old, phi_old)
        rad, vol = _surface_state(t, phi_old, grid, lost, par)
        if mobile:
            adiabat_floor(x_old[1 + mid], mid, grid, law, par, floors)
        else:
            _rigid_lengths(temp_old, phi_old, grid, faces, floors, cells, par)
        ts_pipe = _pipe_surface(phi_old[n - 1], hist[n_h - 1, MH_TS], par)
        if dt_prev > 0.0:  # Newton starts from the linear predictor (the error estimate's)
            for i in range(n + 1):
                x[i] = x_old[i] + dt * (x_old[i] - x_prev[i]) / dt_prev
        ok, its, its_upd, tc_new, ts, rad_new, vol_new, pipe = newton(
            t + dt, dt, x_old, x, tc, grid, faces, core, iso, par, law, mset, floors, rad, vol, lost, ts_pipe,
            has_core, temp, phi, cells, flux, d_lo, d_hi, lower, diag, upper, rhs, dx, work, vvec, zvec)
        n_newton += its
        err = 0.0
        big_t = 0.0
        big_phi = 0.0
        if ok:
            for i in range(n):
                wm = min(grid[G_W, i] / m_ref, 1.0) if i >= first_light else 1.0
                big_t = max(big_t, wm * abs(temp[i] - temp_old[i]))
                big_phi = max(big_phi, wm * abs(phi[i] - phi_old[i]))
            if dt_prev > 0.0:
                w = dt / (dt + dt_prev)
                for i in range(n + 1):
                    pred = x_old[i] + dt * (x_old[i] - x_prev[i]) / dt_prev
                    scale = c_core if i == 0 else cm
                    if i - 1 >= first_light:
                        scale = cm * m_ref / min(grid[G_W, i - 1], m_ref)
                    err = max(err, w * abs(x[i] - pred) / scale)
                err /= mset[M_ERR]
        if ok and err <= 1.0 and big_t <= mset[M_DT_CELL] and big_phi <= mset[M_DPHI]:
            heat = radiogenic_power(t + dt, iso, par)
            out += dt * (flux[n] * faces[F_A, n] + pipe - heat)
            rad = rad_new
            vol = vol_new
            # water: condensation at the step's surface temperature, escape at its end rate (explicit)
            vap, ocean, dissolved, rate = _water_after(t + dt, ts, vol, par)
            lost = min(lost + dt * rate, par[P_H2O_TOTAL])
            t += dt
            tc = tc_new
            for i in range(n + 1):
                x_prev[i] = x_old[i]
            record(t, dt, x, tc, ts, temp, phi, flux, grid, faces, core, iso, par, law, floors, rad,
                   (vap, vol[1], ocean, dissolved, lost), out, its, hist, temps, phis, n_h)
            hist[n_h, MH_PIPE] = pipe  # the heat pipe (its eruptions leave through the surface; not in MH_QS)
            extracted = 0.0
            if ts_pipe > 0.0:
                for i in range(n):
                    extracted += pipe_extraction(i, phi, grid, par)[0]
            hist[n_h, MH_EXTRACT] = extracted
            n_h += 1
            steps += 1
            dt_prev = dt
            factor = GROW_MAX if err <= 0.0 else min(GROW_MAX, 0.9 / math.sqrt(err))
            if big_t > 0.0:
                factor = min(factor, 0.9 * mset[M_DT_CELL] / big_t)
            if big_phi > 0.0:
                factor = min(factor, 0.9 * mset[M_DPHI] / big_phi)
            if its_upd > SLOW_NEWTON:
                factor = min(factor, SLOW_FACTOR)
            dt *= max(factor, SHRINK_MIN)
        else:
            n_rej += 1
            for i in range(n + 1):
                x[i] = x_old[i]
            factor = CUT
            if ok:
                if err > 1.0:
                    factor = min(factor, 0.9 / math.sqrt(err))
                if big_t > mset[M_DT_CELL]:
                    factor = min(factor, 0.9 * mset[M_DT_CELL] / big_t)
                if big_phi > mset[M_DPHI]:
                    factor = min(factor, 0.9 * mset[M_DPHI] / big_phi)
            dt *= max(factor, SHRINK_MIN)
    _save(state, t, dt, dt_prev, n_h, n_rej, tc, out, rad[1], lost, n_newton)
    return STATUS_DONE


@njit(leaf=True)
def all_intervals(phis, grid, iv):
    """Melt intervals of every recorded step (:func:`meltzone._core.record.find_intervals`) into ``iv``;
    returns the count, or -1 if ``iv`` is too small."""
    n_iv = 0
    for s in range(phis.shape[0]):
        n_iv = find_intervals(phis[s], grid, s, iv, n_iv, iv.shape[0])
        if n_iv < 0:
            return -1
    return n_iv


@njit(leaf=True)
def states_at(h, grid, law, par, temp, phi):
    """T and phi of every cell from the enthalpies h (the evaluator's inversion)."""
    _states(h, grid, law, par, temp, phi)
