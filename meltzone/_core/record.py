"""Recording of accepted steps into the output buffers (grown by the caller when full, then resumed).

Buffers: ``hist`` (rows x N_H, columns H_*), ``temps`` and ``phis`` (rows x mantle nodes: T and melt fraction
on every node), ``iv`` (rows x N_I, the melt intervals: contiguous runs of nodes with phi > 0).
"""

from __future__ import annotations

import math

from ._jit import njit
from .layout import (D_ATM_CO2, D_ATM_H2O, D_DELTA_C, D_DELTA_U, D_H, D_PHI_TOP, D_QS, D_REGIME, D_RIC, D_TL,
                     D_TS, G_W, H_ATM_CO2, H_ATM_H2O, H_DELTA_C, H_DELTA_U, H_DLID, H_DTC, H_DTU, H_E_STORED, H_H,
                     H_LID, H_MELT, H_N_IV, H_OUT, H_PHI_TOP, H_QC, H_QS, H_REGIME, H_RIC, H_T, H_TC, H_TL, H_TS,
                     H_TU, I_BOTTOM, I_FULL_BOTTOM, I_FULL_TOP, I_MASS, I_MAX_PHI, I_MEAN_PHI, I_STEP, I_TOP,
                     P_RADIUS, P_STAGNANT, REGIME_STAGNANT_LID, Y_EC, Y_LID, Y_OUT)
from .layout import D_RB, H_BMO, P_CORE_RADIUS
from .layout import (D_ABS, D_DISSOLVED, D_OCEAN, D_OLR, D_P_CO2, D_P_H2O, H_ABS, H_DISSOLVED, H_LOST, H_OCEAN,
                     H_OLR, H_P_CO2, H_P_H2O, Y_WATER)
from .layout import (D_MPROD, D_OG_CO2, D_OG_H2O, D_QCRUST, D_QVOLC, H_CRUST, H_HPE, H_MPROD, H_OG_CO2,
                     H_OG_CO2_RATE, H_OG_H2O, H_OG_H2O_RATE, H_QCRUST, H_QVOLC, P_RHO_CRUST, Y_CRUST, Y_HPE,
                     Y_OG_CO2, Y_OG_H2O)
from .physics import basal_ocean, core_energy, mantle_energy, profile, temperature_rates


@njit(leaf=True)
def find_intervals(phi, grid, step, iv, n_iv, cap):
    """Append the contiguous melt intervals (phi > 0) of one step to ``iv``; return the new count or -1 if full.

    Intervals are listed from the surface down; node indices count from the CMB (0) to the surface."""
    n = phi.shape[0]
    i = n - 1
    while i >= 0:
        if phi[i] > 0.0:
            top = i
            mx = 0.0
            mass = 0.0
            wsum = 0.0
            ftop = -1
            fbot = -1
            while i >= 0 and phi[i] > 0.0:
                if phi[i] > mx:
                    mx = phi[i]
                mass += grid[G_W, i] * phi[i]
                wsum += grid[G_W, i]
                if phi[i] >= 1.0:
                    if ftop < 0:
                        ftop = i
                    fbot = i
                i -= 1
            if n_iv >= cap:
                return -1
            iv[n_iv, I_STEP] = step
            iv[n_iv, I_TOP] = top
            iv[n_iv, I_BOTTOM] = i + 1
            iv[n_iv, I_MAX_PHI] = mx
            iv[n_iv, I_MASS] = mass
            iv[n_iv, I_FULL_TOP] = ftop
            iv[n_iv, I_FULL_BOTTOM] = fbot
            iv[n_iv, I_MEAN_PHI] = mass / wsum if wsum > 0.0 else 0.0
            n_iv += 1
        else:
            i -= 1
    return n_iv


@njit(leaf=True)
def record(t, y, tu, tc, dy, diag, grid, core, par, law, hist, temps, phis, n_h, iv, n_iv):
    """Store accepted step ``n_h``: history row, T(r) and phi(r) on the mantle nodes (rows of ``temps`` and
    ``phis``) and the melt intervals (appended to ``iv`` from row ``n_iv``). Returns the new interval count,
    or -1 when ``iv`` is full (the history row is then incomplete and is written again)."""
    temp = temps[n_h]
    phi = phis[n_h]
    profile(tu, tc, y[Y_LID], diag, grid, par, law, temp, phi)
    n_iv_new = find_intervals(phi, grid, n_h, iv, n_iv, iv.shape[0])
    if n_iv_new < 0:
        return -1
    melt = 0.0
    for i in range(grid.shape[1]):
        melt += grid[G_W, i] * phi[i]
    dtu, dtc = temperature_rates(tu, tc, y[Y_LID], dy, grid, core, par, law)
    stagnant = diag[D_REGIME] == REGIME_STAGNANT_LID
    hist[n_h, H_T] = t
    hist[n_h, H_TU] = tu
    hist[n_h, H_TC] = tc
    hist[n_h, H_LID] = y[Y_LID] if stagnant else 0.0
    hist[n_h, H_OUT] = y[Y_OUT]
    hist[n_h, H_QS] = diag[D_QS] * 4.0 * math.pi * par[P_RADIUS] ** 2
    hist[n_h, H_QC] = -dy[Y_EC]
    hist[n_h, H_H] = diag[D_H]
    hist[n_h, H_RIC] = diag[D_RIC]
    hist[n_h, H_MELT] = melt
    hist[n_h, H_REGIME] = diag[D_REGIME]
    hist[n_h, H_TS] = diag[D_TS]
    hist[n_h, H_DELTA_U] = diag[D_DELTA_U]
    hist[n_h, H_DELTA_C] = diag[D_DELTA_C]
    hist[n_h, H_TL] = diag[D_TL]
    # recomputed from the temperatures (not copied from the state), so the closure check also tests the
    # inversion of the stored-heat functions
    hist[n_h, H_E_STORED] = mantle_energy(tu, max(y[Y_LID], 0.0) if par[P_STAGNANT] > 0.5 else 0.0,
                                          basal_ocean(tc, grid, par)[1], grid, par, law) + core_energy(tc, grid,
                                                                                                         core, par)
    hist[n_h, H_DTU] = dtu
    hist[n_h, H_DTC] = dtc
    hist[n_h, H_DLID] = dy[Y_LID] if stagnant else 0.0
    hist[n_h, H_PHI_TOP] = diag[D_PHI_TOP]
    hist[n_h, H_ATM_H2O] = diag[D_ATM_H2O]
    hist[n_h, H_ATM_CO2] = diag[D_ATM_CO2]
    hist[n_h, H_N_IV] = n_iv_new - n_iv
    hist[n_h, H_BMO] = diag[D_RB] - par[P_CORE_RADIUS]
    hist[n_h, H_ABS] = diag[D_ABS]
    hist[n_h, H_OLR] = diag[D_OLR]
    hist[n_h, H_OCEAN] = diag[D_OCEAN]
    hist[n_h, H_DISSOLVED] = diag[D_DISSOLVED]
    hist[n_h, H_LOST] = y[Y_WATER]
    hist[n_h, H_P_H2O] = diag[D_P_H2O]
    hist[n_h, H_P_CO2] = diag[D_P_CO2]
    # volcanism: melt production as the volume of the crust it makes [m^3/s]; outgassing of the erupted melt
    hist[n_h, H_MPROD] = diag[D_MPROD] / par[P_RHO_CRUST] if par[P_RHO_CRUST] > 0.0 else 0.0
    hist[n_h, H_QVOLC] = diag[D_QVOLC]
    hist[n_h, H_CRUST] = y[Y_CRUST]
    hist[n_h, H_OG_H2O_RATE] = diag[D_OG_H2O]
    hist[n_h, H_OG_CO2_RATE] = diag[D_OG_CO2]
    hist[n_h, H_OG_H2O] = y[Y_OG_H2O]
    hist[n_h, H_OG_CO2] = y[Y_OG_CO2]
    hist[n_h, H_HPE] = y[Y_HPE]
    hist[n_h, H_QCRUST] = diag[D_QCRUST]
    return n_iv_new
