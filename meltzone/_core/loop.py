"""The integration loop of the boundary-layer scheme: step control, the switch between an explicit and an
implicit method, the unseen-extremum check, landing on the first crossing of the rheological transition, and
recording.

:func:`integrate` advances the state vector ``state`` (indices S_* of :mod:`meltzone._core.layout`) with the
Dormand-Prince pair of :mod:`meltzone._core.dopri` (Rodas3 of :mod:`meltzone._core.rosenbrock` where the
problem is stiff) on the right-hand side of :mod:`meltzone._core.physics`,
records every accepted step (:mod:`meltzone._core.record`) and returns a STATUS_* code when it ends, a buffer
fills or ``max_steps`` are done; ``state`` is updated in place so that the next call resumes exactly.
"""

from __future__ import annotations

import math

import numpy as np

from . import dopri, rosenbrock
from ._jit import njit
from .layout import N_Y_ENERGY, S_DYV, S_YV, Y_CRUST, Y_HPE
from .layout import (C_W, D_PHI_SURF, G_F, G_TSOL, N_D, N_Y, NOT_YET, P_ATOL, P_CC, P_CM, P_DT_MAX,
                     P_H_MAX, P_MANTLE_MASS, P_PHI_C, P_RTOL, P_T_END, S_DY, S_H, S_N_H, S_N_IV, S_N_REJ,
                     S_SLOPE_C, S_SLOPE_M, S_T, S_T_SWITCH, S_TC, S_TU, S_Y, STATUS_DONE, STATUS_HISTORY_FULL,
                     STATUS_INTERVALS_FULL, STATUS_MAX_STEPS, STATUS_STEP_TOO_SMALL, Y_EC, Y_EM, Y_LID)
from .layout import S_IMPLICIT, S_N_IMPLICIT, S_NONSTIFF_COUNT, S_STIFF_COUNT, Y_OG_CO2, Y_OG_H2O, Y_OUT
from .layout import Y_XCO2, Y_XH2O
from .physics import node_melt, temperature_rates
from .volcanism import recycling_rate, rhs_packed
from .record import record

#: melt-fraction tolerance with which the loop lands on the first crossing of phi_c (near phi_c the melt
#: fraction of a slowly cooling mantle changes by ~1e-9 per year, so this is a few years at most)
PHI_TOL = 1.0e-8
#: a step is redone when T_u or T_c changed by more than this many times run.max_temperature_step_k ...
JUMP_LIMIT = 1.5
#: ... with the step multiplied by this
JUMP_FACTOR = 0.5
#: step factor when a temperature extremum inside the step would hide a melt layer
UNSEEN_FACTOR = 0.3
#: bounds of the secant factor that lands a step on the phi_c crossing
CROSSING_MIN_FACTOR, CROSSING_MAX_FACTOR = 0.01, 0.99
#: shortest step [s]: below it the run stops with STATUS_STEP_TOO_SMALL
MIN_STEP = 1e-6
#: steps no longer than this [s] skip the extremum and crossing checks (nothing can hide in them)
CHECKED_STEP = 1.0
#: absolute error scale of the lid per kelvin of run.atol_k [m]
LID_SCALE = 1.0e3
#: error scales of the crust (a record of the extracted melt, not part of the energy budget): absolute [m] and
#: relative (this model's choice: enough to keep a stagnant-lid crust below its cap within a step)
CRUST_ATOL, CRUST_RTOL = 1.0, 1.0e-4
#: the records of non-negative rates (volatiles extracted and outgassed): a step must not decrease them ...
MONOTONE = (Y_XH2O, Y_XCO2, Y_OG_H2O, Y_OG_CO2)
#: ... else it is redone this much shorter (see :func:`integrate`)
MONOTONE_FACTOR = 0.5
#: relative end-time slack of the loop
END_SLACK = 1e-14
#: the right-hand side depends on the state's components before this one (not on the time-integrated heat loss)
N_DEP = Y_OUT
#: relative perturbation of the Rosenbrock Jacobian's columns and of its df/dt (this model's choice, measured).
#: rosenbrock.FD_REL (6.1e-6) moves a ~5000 K magma ocean under steam by ~0.03 K and, at 1 Gyr, the time by
#: ~6e3 yr: so misjudged, the stiff radiative relaxation dominated Rodas3's error estimate and held the implicit
#: steps at 1e4-3e5 yr for Gyr (five steam planets at 0.027-0.05 AU: 19-78 thousand steps; 2-4 thousand at
#: 1e-7; 65659 instead of 18702 at 1e-4). The mantle-energy column keeps rosenbrock.FD_REL unless the top of
#: the mantle is fully molten: a partly molten 7.2 M_E stagnant lid (T_u held at a melt-fraction kink) stalled
#: at ~5e3 yr steps with 1e-7 there (200000 steps by 3.2 Gyr)
FD_REL_ENERGY = 1.0e-7
#: (Y_EM, Y_EC, Y_LID, time) perturbations of :func:`rosenbrock.jacobian`: with a partly molten top, and fully
#: molten
FD_RELS = np.full(N_DEP + 1, FD_REL_ENERGY)
FD_RELS[Y_EM] = rosenbrock.FD_REL
FD_RELS_MOLTEN = np.full(N_DEP + 1, FD_REL_ENERGY)


@njit(leaf=True)
def adiabat_melt_count(tu, grid):
    """Number of mantle nodes whose adiabatic temperature T_u f(r) is above the solidus."""
    n = 0
    for i in range(grid.shape[1]):
        if tu * grid[G_F, i] > grid[G_TSOL, i]:
            n += 1
    return n


@njit(leaf=True)
def hermite_extremum(y0, y1, d0, d1, h):
    """Value of the cubic Hermite interpolant's interior extremum on a step, and whether there is one."""
    a = 2.0 * (y0 - y1) + h * (d0 + d1)
    b = 3.0 * (y1 - y0) - h * (2.0 * d0 + d1)
    c = h * d0
    best = y0
    found = False
    if abs(a) < 1e-300:
        if abs(b) > 1e-300:
            s = -c / (2.0 * b)
            if 0.0 < s < 1.0:
                best = ((a * s + b) * s + c) * s + y0
                found = True
        return best, found
    disc = b * b - 3.0 * a * c
    if disc < 0.0:
        return best, found
    sq = math.sqrt(disc)
    for s in ((-b + sq) / (3.0 * a), (-b - sq) / (3.0 * a)):
        if 0.0 < s < 1.0:
            best = ((a * s + b) * s + c) * s + y0
            found = True
    return best, found


@njit(leaf=True)
def _unseen_extremum(tu, tc, tu_new, tc_new, dtu, dtc, dtu1, dtc1, h, grid):
    """True when a temperature maximum or minimum inside the step would change which nodes are above the
    solidus while neither end shows it (a melt layer could open and close unseen): the adiabat's melt count at
    the interpolated extremum of T_u, and the CMB node's state at that of T_c, against both ends."""
    if dtu * dtu1 < 0.0:
        t_ext, found = hermite_extremum(tu, tu_new, dtu, dtu1, h)
        if found:
            n_ext = adiabat_melt_count(t_ext, grid)
            if n_ext != adiabat_melt_count(tu, grid) and n_ext != adiabat_melt_count(tu_new, grid):
                return True
    if dtc * dtc1 < 0.0:
        t_ext, found = hermite_extremum(tc, tc_new, dtc, dtc1, h)
        if found:
            above = t_ext > grid[G_TSOL, 0]
            if above != (tc > grid[G_TSOL, 0]) and above != (tc_new > grid[G_TSOL, 0]):
                return True
    return False


@njit(leaf=True)
def y_slot(j):
    """Index in the integrator state of y[j] (the energy block at S_Y, the rest at S_YV)."""
    return S_Y + j if j < N_Y_ENERGY else S_YV + j - N_Y_ENERGY


@njit(leaf=True)
def dy_slot(j):
    """Index in the integrator state of the last slope of y[j]."""
    return S_DY + j if j < N_Y_ENERGY else S_DYV + j - N_Y_ENERGY


@njit(leaf=True)
def _implicit_step(args, t, y, h, k1, fresh, ws, ynew, yerr, k7, tmp):
    """One Rodas3 step of the boundary-layer right-hand side (the Jacobian first unless ``fresh``, i.e. already
    at (t, y)); False when the step's matrix is singular. A function of its own, so that the Rosenbrock stages
    are not inlined into the loop's body. The components after the heat out (water lost, crust, extracted and
    outgassed volatiles, the crust's heat share) are records of rates that switch on and off with the regime and
    the melt zone: their Jacobian rows and time derivatives are zeroed, so the method treats them explicitly (a
    W-method for them: their increments combine their own rates and stay zero where those are zero; a
    difference across a switch once drove a crust and outgassed masses negative under a reformed magma ocean).
    Only the crust's and its heat share's diagonals get the mobile lid's recycling rate -1/tau
    (:func:`recycling_rate`, known; a diagonal keeps their increments zero where their rates are): the plates'
    linear decay, which otherwise held the steps at the stability bound h ~ 3 tau. The energy rows keep theirs,
    so the linear energy invariant still closes (it involves no column of the recorded components)."""
    jac, ft, lu, piv, kst, fwork = ws
    if not fresh:
        molten = args[7][D_PHI_SURF] >= 1.0  # diag: of the last evaluation, f(t, y) = k1
        decay = recycling_rate(args[7], args[4])
        rosenbrock.jacobian(rhs_packed, args, t, y, k1, N_DEP, jac, ft, tmp, fwork, kst[0], h,
                            FD_RELS_MOLTEN if molten else FD_RELS)
        for i in range(Y_OUT + 1, jac.shape[0]):
            if decay > 0.0 and (i == Y_CRUST or i == Y_HPE):
                jac[i, i] = -decay
                continue
            ft[i] = 0.0
            for j in range(jac.shape[1]):
                jac[i, j] = 0.0
    if not rosenbrock.factor(jac, h, lu, piv):
        return False
    rosenbrock.step(rhs_packed, args, t, y, h, k1, ft, lu, piv, kst, ynew, yerr, k7, tmp)
    return True


@njit
def _count_stiffness(mode, implicit, h, jac, k, ysti, ynew, sc, rtol, decay):
    """Update the stiffness switch ``mode`` (method, count above, count below the bound) with the h |lambda|
    estimate of an accepted step of size h, scaled as the error norm (``sc`` holds the absolute scales, the
    state's dependent components): the explicit pair's (its last two stages ``k`` at t + h, evaluated at
    ``ysti`` and ``ynew``) switches to the implicit method after STIFF_STEPS estimates above
    rosenbrock.STIFF_BOUND (NONSTIFF_STEPS below it reset the count; Hairer et al. 1993, II.6); the implicit
    method's (the Gershgorin bound of its Jacobian ``jac``) back after NONSTIFF_STEPS in a row below it. Either
    estimate is at least h ``decay``, the recorded components' own eigenvalue (the mobile lid's recycling rate,
    :func:`recycling_rate`), which the dependent components' estimate does not see; the explicit method
    switches at once when that one is above the bound (it is known, not estimated)."""
    scale = np.empty(N_DEP)
    for j in range(N_DEP):
        scale[j] = sc[j] + rtol * abs(ynew[j])
    if implicit:
        h_lambda = h * rosenbrock.spectral_bound(jac[:N_DEP, :N_DEP], scale)
    else:
        h_lambda = rosenbrock.explicit_stiffness(h, k[dopri.N_STAGES - 2], k[dopri.N_STAGES - 1], ysti, ynew,
                                                 scale)
    if mode[0] < 0.5 and h * decay > rosenbrock.STIFF_BOUND:  # known, not estimated: no need to confirm it
        mode[0] = 1.0
        mode[1] = 0.0
        mode[2] = 0.0
        return
    h_lambda = max(h_lambda, h * decay)
    if mode[0] < 0.5:
        if h_lambda > rosenbrock.STIFF_BOUND:
            mode[2] = 0.0
            mode[1] += 1.0
            if mode[1] >= rosenbrock.STIFF_STEPS:
                mode[0] = 1.0
                mode[1] = 0.0
        else:
            mode[2] += 1.0
            if mode[2] == rosenbrock.NONSTIFF_STEPS:
                mode[1] = 0.0
    elif h_lambda < rosenbrock.STIFF_BOUND:
        mode[2] += 1.0
        if mode[2] >= rosenbrock.NONSTIFF_STEPS:
            mode[0] = 0.0
            mode[1] = 0.0
            mode[2] = 0.0
    else:
        mode[2] = 0.0


@njit(leaf=True)
def _save(state, t, y, h, n_h, n_iv, n_rej, tu, tc, work, k1, t_switch, mode):
    state[S_T] = t
    for j in range(N_Y):
        state[y_slot(j)] = y[j]
        state[dy_slot(j)] = k1[j]
    state[S_H] = h
    state[S_N_H] = n_h
    state[S_N_IV] = n_iv
    state[S_N_REJ] = n_rej
    state[S_TU] = tu
    state[S_TC] = tc
    state[S_SLOPE_M] = work[2]
    state[S_SLOPE_C] = work[3]
    state[S_T_SWITCH] = t_switch
    state[S_IMPLICIT] = mode[0]
    state[S_STIFF_COUNT] = mode[1]
    state[S_NONSTIFF_COUNT] = mode[2]
    state[S_N_IMPLICIT] = mode[3]


@njit
def integrate(state, grid, core, iso, par, law, hist, temps, phis, iv, max_steps):
    """Advance from ``state`` until the end time, a full buffer or ``max_steps``; update ``state`` in place (so
    a call can resume) and return a STATUS_* code.

    Error control on the two energies (relative rtol plus the heat of atol_k), on the lid (relative plus
    atol_k x LID_SCALE) and on the crust (CRUST_ATOL, CRUST_RTOL); every step also keeps |dT_u|, |dT_c| <=
    P_DT_MAX, and a step with a temperature extremum inside it is shortened when the interpolated extremum would
    change which nodes are above the solidus while neither end shows it, so that no melt layer appears and vanishes unseen between two recorded
    profiles. The step that first takes the top of the mantle below phi_c ends on the crossing (within
    PHI_TOL), and its end is the rheological switch time (state S_T_SWITCH, NOT_YET before), from which the
    solidified mantle's criterion and law apply; so the switch does not depend on the step size.

    Steps are Dormand-Prince until its stiffness test (:mod:`meltzone._core.rosenbrock`) finds them limited by
    stability rather than accuracy (a magma ocean held near the equilibrium temperature relaxes in ~1e3 yr);
    then Rodas3 with a finite-difference Jacobian, under the same error norm, temperature-step bound, checks
    and recording (the slopes at both ends of every step, as before), until the explicit pair would be stable
    again. A run the test never flags takes exactly the steps it took without the switch.
    """
    diag = np.empty(N_D)
    work = np.zeros(4)  # (T_u, T_c, dE_m/dT_u, dE_c/dT_c) of the last inversion: the next one's start
    work0 = np.zeros(4)
    y = np.empty(N_Y)
    ynew = np.empty(N_Y)
    yerr = np.empty(N_Y)
    tmp = np.empty(N_Y)
    k = np.empty((dopri.N_STAGES, N_Y))
    k1 = k[0]
    k7 = k[dopri.N_STAGES - 1]
    t = state[S_T]
    for j in range(N_Y):
        y[j] = state[y_slot(j)]
    h = state[S_H]
    n_h = int(state[S_N_H])
    n_iv = int(state[S_N_IV])
    n_rej = int(state[S_N_REJ])
    work[0] = state[S_TU]
    work[1] = state[S_TC]
    work[2] = state[S_SLOPE_M]
    work[3] = state[S_SLOPE_C]
    t_switch = state[S_T_SWITCH]
    # the stiffness switch (S_IMPLICIT ..): method, the test's counts, accepted implicit steps; and the
    # implicit method's arrays (Jacobian and time derivative at the step's start, LU factors, stages)
    mode = np.empty(4)
    mode[0] = state[S_IMPLICIT]
    mode[1] = state[S_STIFF_COUNT]
    mode[2] = state[S_NONSTIFF_COUNT]
    mode[3] = state[S_N_IMPLICIT]
    ws = rosenbrock.workspace(N_Y)
    jac = ws[0]
    jac_fresh = False  # jac and ft belong to the current (t, y)
    t_end = par[P_T_END]
    rtol = par[P_RTOL]
    dt_max = par[P_DT_MAX]
    # absolute scales: heat of atol_k of mantle and of core, atol_k x LID_SCALE of lid
    abs_e_m = par[P_ATOL] * par[P_MANTLE_MASS] * par[P_CM]
    abs_e_c = par[P_ATOL] * max(core[C_W].sum() * par[P_CC], 1.0)
    abs_lid = par[P_ATOL] * LID_SCALE
    sc = np.array([abs_e_m, abs_e_c, abs_lid])  # the error norm's absolute scales of Y_EM, Y_EC, Y_LID
    args = (t_switch, grid, core, iso, par, law, work, diag)
    if n_h == 0:
        rhs_packed(t, y, args, k1)
    else:  # resuming: the last accepted stage's slopes (first-same-as-last), exactly as left
        for j in range(N_Y):
            k1[j] = state[dy_slot(j)]
    tu = work[0]
    tc = work[1]
    top = grid.shape[1] - 1
    phi_c = par[P_PHI_C]
    phi_prev = node_melt(tu * grid[G_F, top], grid, top, law)  # surface melt (batch) at the step's start
    if n_h == 0:
        if t_switch >= NOT_YET and diag[D_PHI_SURF] <= phi_c:
            t_switch = t  # starts below the rheological transition
            args = (t_switch, grid, core, iso, par, law, work, diag)
            rhs_packed(t, y, args, k1)
        res = record(t, y, tu, tc, k1, diag, grid, core, par, law, hist, temps, phis, n_h, iv, n_iv)
        if res < 0:
            return STATUS_INTERVALS_FULL
        n_iv = res
        n_h = 1
    steps = 0
    while t < t_end * (1.0 - END_SLACK):
        if n_h >= hist.shape[0]:
            _save(state, t, y, h, n_h, n_iv, n_rej, tu, tc, work, k1, t_switch, mode)
            return STATUS_HISTORY_FULL
        if steps >= max_steps:
            _save(state, t, y, h, n_h, n_iv, n_rej, tu, tc, work, k1, t_switch, mode)
            return STATUS_MAX_STEPS
        # temperature-step limit from the current slopes
        dtu, dtc = temperature_rates(tu, tc, y[Y_LID], k1, grid, core, par, law)
        rate = max(abs(dtu), abs(dtc))
        if rate > 0.0:
            h = min(h, dt_max / rate)
        h = min(h, par[P_H_MAX], t_end - t)
        if h < MIN_STEP:
            _save(state, t, y, h, n_h, n_iv, n_rej, tu, tc, work, k1, t_switch, mode)
            return STATUS_STEP_TOO_SMALL
        for j in range(4):
            work0[j] = work[j]
        implicit = mode[0] > 0.5
        if implicit:
            if not _implicit_step(args, t, y, h, k1, jac_fresh, ws, ynew, yerr, k7, tmp):
                h = JUMP_FACTOR * h  # singular at this step size: try a shorter one
                n_rej += 1
                continue
            jac_fresh = True
        else:
            dopri.step(rhs_packed, args, t, y, h, k, ynew, yerr, tmp)
        tu_new = work[0]
        tc_new = work[1]
        err = 0.0
        for j in (Y_EM, Y_EC, Y_LID):
            scale = (abs_e_m if j == Y_EM else abs_e_c if j == Y_EC else abs_lid) + rtol * max(abs(y[j]),
                                                                                               abs(ynew[j]))
            e = abs(yerr[j]) / scale
            if e > err:
                err = e
        e = abs(yerr[Y_CRUST]) / (CRUST_ATOL + CRUST_RTOL * max(abs(y[Y_CRUST]), abs(ynew[Y_CRUST])))
        if e > err:
            err = e
        big_jump = abs(tu_new - tu) > JUMP_LIMIT * dt_max or abs(tc_new - tc) > JUMP_LIMIT * dt_max
        # a cumulative of non-negative rates is non-negative and never decreases (common practice); both methods
        # weight some stages negatively, so a step across the onset of a rate (a melt zone that opens: a kink)
        # can decrease one (measured: -3.5e16 kg of outgassed water at 8 M_E). Not resolved: redone shorter
        decreased = False
        for j in MONOTONE:
            if ynew[j] < y[j]:
                decreased = True
        big_jump = big_jump or decreased
        unseen = False
        if err <= 1.0 and not big_jump and h > CHECKED_STEP:
            dtu1, dtc1 = temperature_rates(tu_new, tc_new, ynew[Y_LID], k7, grid, core, par, law)
            unseen = _unseen_extremum(tu, tc, tu_new, tc_new, dtu, dtc, dtu1, dtc1, h, grid)
        phi_end = diag[D_PHI_SURF]
        crossing = t_switch >= NOT_YET and phi_end <= phi_c
        overshoot = (crossing and err <= 1.0 and not big_jump and not unseen and h > CHECKED_STEP
                     and phi_c - phi_end > PHI_TOL and phi_prev > phi_c)
        if err <= 1.0 and not big_jump and not unseen and not overshoot:
            # the explicit step's decay at its end (diag: of its last evaluation), the implicit one's as used
            # (none while the crust and its share are zero: they stay so under any step)
            decay = -jac[Y_CRUST, Y_CRUST] if implicit else recycling_rate(diag, par)
            if ynew[Y_CRUST] <= 0.0 and ynew[Y_HPE] <= 0.0:
                decay = 0.0
            _count_stiffness(mode, implicit, h, jac, k, tmp, ynew, sc, rtol, decay)
            jac_fresh = False
            if crossing:
                # from here on the solidified mantle: its slopes at the step's end (the heat flow jumps here
                # when the solid mantle's (a, beta) differ from the classical law's)
                t_switch = t + h
                args = (t_switch, grid, core, iso, par, law, work, diag)
                rhs_packed(t + h, ynew, args, k7)
            # record first: if the interval buffer is full, the step is redone from the unchanged state
            res = record(t + h, ynew, tu_new, tc_new, k7, diag, grid, core, par, law, hist, temps, phis, n_h,
                         iv, n_iv)
            if res < 0:
                if crossing:
                    t_switch = NOT_YET
                _save(state, t, y, h, n_h, n_iv, n_rej, tu, tc, work0, k1, t_switch, mode)
                return STATUS_INTERVALS_FULL
            phi_prev = phi_end
            t = t + h
            for j in range(N_Y):
                y[j] = ynew[j]
                k1[j] = k7[j]
            tu = tu_new
            tc = tc_new
            n_iv = res
            n_h += 1
            steps += 1
            if implicit:
                mode[3] += 1
                h = h * rosenbrock.accepted_factor(err)
            else:
                h = h * dopri.accepted_factor(err)
        else:
            n_rej += 1
            work[0] = tu
            work[1] = tc
            if decreased:
                h = MONOTONE_FACTOR * h
            elif big_jump:
                h = JUMP_FACTOR * h
            elif unseen:
                h = UNSEEN_FACTOR * h
            elif overshoot:  # secant on the surface melt fraction
                h = h * min(max((phi_prev - phi_c) / (phi_prev - phi_end), CROSSING_MIN_FACTOR),
                            CROSSING_MAX_FACTOR)
            elif implicit:
                h = h * rosenbrock.rejected_factor(err)
            else:
                h = h * dopri.rejected_factor(err)
    _save(state, t, y, h, n_h, n_iv, n_rej, tu, tc, work, k1, t_switch, mode)
    return STATUS_DONE
