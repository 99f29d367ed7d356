"""numba kernels of the interior solver: EOS evaluation and the inward RK4 integration.

Plain floats and float64 arrays only. Material rows follow the columns MAT_* of
:mod:`meltzone._core.layout` (form, rho0, K0, K0', gamma0, q, c_v; built by
:meth:`meltzone.eos.Material.row`); boundary rows are (P0, T0, slope) as in
:func:`meltzone.phases.boundary_table`.

State integrated inward from the surface, y = (m, P, T, I):

* dm/dr = 4 pi r^2 rho                          (mass continuity)
* dP/dr = -G m rho / r^2                         (hydrostatic equilibrium)
* dT/dr = gamma T / K_S dP/dr                    (adiabat: d ln T / d ln rho = gamma, with the adiabatic
                                                  K_S = K_T + gamma^2 rho c_v T of the Mie-Grueneisen form;
                                                  the isothermal K_T stood in for it before, which made the
                                                  mantle adiabat rise 3-8% too steeply in ln T per phase)
* dI/dr = (8 pi / 3) rho r^4                     (moment of inertia)
"""

from __future__ import annotations

import math

import numpy as np

from ..constants import G
from ._jit import njit
from .layout import (BLEW_UP, EMPTIED, FORM_INCOMPRESSIBLE, FORM_VINET, MAT_CV, MAT_FORM, MAT_GAMMA0, MAT_K0,
                     MAT_KP, MAT_Q, MAT_RHO0, OUT_OF_ROOM, PATH_COLS, PATH_I, PATH_M, PATH_P, PATH_R, PATH_REGION,
                     PATH_RHO, PATH_T, REACHED_CENTRE)  # noqa: F401 (PATH_COLS: read by meltzone.interior)

FOUR_PI = 4.0 * math.pi
EIGHT_PI_THIRD = 8.0 * math.pi / 3.0
#: temperature of the cold compression curves [K] (eos.REFERENCE_TEMPERATURE)
T_COLD = 300.0


@njit(leaf=True)
def cold_pressure(rho, mat):
    """Pressure of the 300 K compression curve [Pa]."""
    form = int(mat[MAT_FORM])
    rho0 = mat[MAT_RHO0]
    k0 = mat[MAT_K0]
    kp = mat[MAT_KP]
    if form == FORM_INCOMPRESSIBLE:
        return 0.0
    if form == FORM_VINET:
        x = (rho0 / rho) ** (1.0 / 3.0)
        return 3.0 * k0 * (1.0 - x) / (x * x) * math.exp(1.5 * (kp - 1.0) * (1.0 - x))
    y = (rho / rho0) ** (1.0 / 3.0)
    y2 = y * y
    y5 = y2 * y2 * y
    return 1.5 * k0 * (y5 * y2 - y5) * (1.0 + 0.75 * (kp - 4.0) * (y2 - 1.0))


@njit(leaf=True)
def cold_bulk_modulus(rho, mat):
    """Isothermal bulk modulus K = rho dP/drho [Pa] of the 300 K curve."""
    form = int(mat[MAT_FORM])
    rho0 = mat[MAT_RHO0]
    k0 = mat[MAT_K0]
    kp = mat[MAT_KP]
    if form == FORM_INCOMPRESSIBLE:
        return 1.0e300
    if form == FORM_VINET:
        x = (rho0 / rho) ** (1.0 / 3.0)
        eta = 1.5 * (kp - 1.0)
        return k0 / (x * x) * math.exp(eta * (1.0 - x)) * (2.0 - x + eta * x * (1.0 - x))
    y = (rho / rho0) ** (1.0 / 3.0)
    y2 = y * y
    y4 = y2 * y2
    c = 0.75 * (kp - 4.0)
    return 0.5 * k0 * y * ((7.0 * y4 * y2 - 5.0 * y4) * (1.0 + c * (y2 - 1.0)) + 2.0 * c * y * (y4 * y2 * y - y4 * y))


@njit(leaf=True)
def thermal_pressure(rho, t, mat):
    """High-temperature (Dulong-Petit) limit of the Mie-Grueneisen-Debye thermal pressure [Pa].

    P_th = gamma(rho) rho c_v (T - 300 K), c_v = 3 n R / M (common practice; valid above the
    Debye temperature, ~1000 K for mantle silicates). Zero when the material row has c_v = 0.
    """
    return grueneisen(rho, mat) * rho * mat[MAT_CV] * (t - T_COLD)


@njit(leaf=True)
def eos_pressure(rho, t, mat):
    return cold_pressure(rho, mat) + thermal_pressure(rho, t, mat)


@njit(leaf=True)
def eos_bulk_modulus(rho, t, mat):
    """Isothermal bulk modulus [Pa] at (rho, T): cold part plus (1 - q) P_th."""
    return cold_bulk_modulus(rho, mat) + (1.0 - mat[MAT_Q]) * thermal_pressure(rho, t, mat)


@njit(leaf=True)
def adiabatic_bulk_modulus(rho, t, gamma, mat):
    """Adiabatic bulk modulus K_S = K_T (1 + alpha gamma T) [Pa] (thermodynamic identity; Poirier 2000,
    Introduction to the Physics of the Earth's Interior, from memory). For this Mie-Grueneisen form
    alpha K_T = (dP/dT)_V = gamma rho c_v, so K_S = K_T + gamma^2 rho c_v T; K_T without thermal pressure."""
    return eos_bulk_modulus(rho, t, mat) + gamma * gamma * rho * mat[MAT_CV] * t


@njit(leaf=True)
def eos_density(p, t, mat, guess):
    """Density [kg/m^3] at (P, T): safeguarded Newton inside a bracket on the rising branch.

    NaN when the pressure lies above the curve's maximum (Birch-Murnaghan with K0' < 4 turns over at
    extreme compression); the caller treats that as a failed trial.
    """
    rho0 = mat[MAT_RHO0]
    if int(mat[MAT_FORM]) == FORM_INCOMPRESSIBLE:
        return rho0
    # fast path: a few plain Newton steps from the caller's guess (the previous node's density)
    if guess > 0.5 * rho0:
        rho = guess
        for _ in range(8):
            f = eos_pressure(rho, t, mat) - p
            k = eos_bulk_modulus(rho, t, mat)
            if k <= 0.0:
                break
            new = rho - f * rho / k
            if not (0.5 * rho0 < new < 30.0 * rho0):
                break
            if abs(new - rho) <= 1e-12 * rho:
                return new
            rho = new
    lo = 0.5 * rho0
    if eos_pressure(lo, t, mat) >= p:
        # hotter than the solid can be at this pressure: clamp at the edge of the valid branch
        return lo
    hi = max(guess, rho0) * 1.05
    p_hi = eos_pressure(hi, t, mat)
    while p_hi < p:
        if hi > 30.0 * rho0 or cold_bulk_modulus(hi, mat) <= 0.0:
            # beyond the rising branch of the curve: no density for this pressure
            return math.nan
        lo = hi
        hi *= 1.5
        p_hi = eos_pressure(hi, t, mat)
    rho = min(max(guess, lo), hi)
    for _ in range(100):
        f = eos_pressure(rho, t, mat) - p
        if f > 0.0:
            hi = rho
        else:
            lo = rho
        dfdrho = eos_bulk_modulus(rho, t, mat) / rho
        new = rho - f / dfdrho if dfdrho > 0.0 else 0.5 * (lo + hi)
        if not (lo < new < hi):
            new = 0.5 * (lo + hi)
        if abs(new - rho) <= 1e-13 * rho:
            return new
        rho = new
    return rho


@njit(leaf=True)
def grueneisen(rho, mat):
    return mat[MAT_GAMMA0] * (mat[MAT_RHO0] / rho) ** mat[MAT_Q]


@njit(leaf=True)
def mantle_phase(p, t, bounds):
    """Number of boundaries whose Clapeyron line lies below (P, T)."""
    n = 0
    for i in range(bounds.shape[0]):
        if p > bounds[i, 0] + bounds[i, 2] * (t - bounds[i, 1]):
            n += 1
    return n


@njit(leaf=True)
def _rhs(r, m, p, t, mat, guess, dy):
    rho = eos_density(p, t, mat, guess)
    if r > 0.0:
        dpdr = -G * m * rho / (r * r)
    else:
        dpdr = 0.0
    dy[0] = FOUR_PI * r * r * rho
    dy[1] = dpdr
    gamma = grueneisen(rho, mat)
    dy[2] = gamma * t / max(adiabatic_bulk_modulus(rho, t, gamma, mat), 0.1 * cold_bulk_modulus(rho, mat)) * dpdr
    dy[3] = -EIGHT_PI_THIRD * rho * r ** 4  # I grows inward
    return rho


@njit(leaf=True)
def _rk4(r, y, h, mat, guess, out, k1, k2, k3, k4, tmp):
    """One classical RK4 step of size h (negative: inward) from (r, y) into out; returns rho at r."""
    rho = _rhs(r, y[0], y[1], y[2], mat, guess, k1)
    for j in range(4):
        tmp[j] = y[j] + 0.5 * h * k1[j]
    _rhs(r + 0.5 * h, tmp[0], tmp[1], tmp[2], mat, rho, k2)
    for j in range(4):
        tmp[j] = y[j] + 0.5 * h * k2[j]
    _rhs(r + 0.5 * h, tmp[0], tmp[1], tmp[2], mat, rho, k3)
    for j in range(4):
        tmp[j] = y[j] + h * k3[j]
    _rhs(r + h, tmp[0], tmp[1], tmp[2], mat, rho, k4)
    for j in range(4):
        out[j] = y[j] + h / 6.0 * (k1[j] + 2.0 * k2[j] + 2.0 * k3[j] + k4[j])
    return rho


@njit(leaf=True)
def _event_value(kind, y, m_core, bounds, idx):
    # kind 0: mass empties; 1: core-mantle boundary; 2: phase boundary idx
    if kind == 0:
        return y[0]
    if kind == 1:
        return y[0] - m_core
    return bounds[idx, 0] + bounds[idx, 2] * (y[2] - bounds[idx, 1]) - y[1]


@njit(leaf=True)
def _store(path, n, r, y, rho, region):
    """Row n of the stored path (columns PATH_*): radius, the state y = (m, P, T, I), density and region."""
    path[n, PATH_R] = r
    path[n, PATH_M] = y[0]
    path[n, PATH_P] = y[1]
    path[n, PATH_T] = y[2]
    path[n, PATH_I] = y[3]
    path[n, PATH_RHO] = rho
    path[n, PATH_REGION] = region


@njit
def integrate_inward(radius, mass, core_mass, p_surface, t_surface, n_steps, core_mat, mantle_mats, bounds,
                     path, store):
    """Integrate from the surface to the centre; return (status, n_stored, residual).

    ``residual`` is the mass left at the centre over the total mass (>0: the
    trial radius is too large), negative when the mass runs out above the
    centre (minus the mass of the sphere left empty). When ``store`` is true,
    every accepted step goes into ``path`` (columns PATH_*).
    """
    h = radius / n_steps
    r_stop = 1e-3 * radius
    y = np.empty(4)
    y_new = np.empty(4)
    k1 = np.empty(4)
    k2 = np.empty(4)
    k3 = np.empty(4)
    k4 = np.empty(4)
    tmp = np.empty(4)
    y[0] = mass
    y[1] = p_surface
    y[2] = t_surface
    y[3] = 0.0
    r = radius
    n_phase = mantle_mats.shape[0]
    if core_mass >= mass:
        region = -1
    else:
        region = min(mantle_phase(p_surface, t_surface, bounds), n_phase - 1)
    mat = core_mat if region < 0 else mantle_mats[region]
    rho = eos_density(p_surface, t_surface, mat, mat[MAT_RHO0])
    n = np.int64(0)  # typed, not a literal: one specialization of _store
    if store:
        _store(path, n, r, y, rho, region)
        n = 1
    cap = path.shape[0]
    while r > r_stop:
        hh = min(h, r - r_stop)
        rho = _rk4(r, y, -hh, mat, rho, y_new, k1, k2, k3, k4, tmp)
        if not (math.isfinite(y_new[0]) and math.isfinite(y_new[1]) and y_new[1] < 1e15):
            return BLEW_UP, n, y[0] / mass
        kind = -1
        idx = 0
        if y_new[0] <= 0.0:
            kind = 0
        elif region >= 0 and core_mass > 0.0 and y_new[0] <= core_mass:
            kind = 1
        elif 0 <= region < n_phase - 1 and region < bounds.shape[0]:
            if mantle_phase(y_new[1], y_new[2], bounds) > region:
                kind = 2
                idx = region
        if kind >= 0:
            lo = 0.0
            hi = hh
            for _ in range(60):
                mid = 0.5 * (lo + hi)
                _rk4(r, y, -mid, mat, rho, y_new, k1, k2, k3, k4, tmp)
                if _event_value(kind, y_new, core_mass, bounds, idx) > 0.0:
                    lo = mid
                else:
                    hi = mid
                if hi - lo < 1e-10 * radius:
                    break
            hh = hi
            _rk4(r, y, -hh, mat, rho, y_new, k1, k2, k3, k4, tmp)
        r -= hh
        for j in range(4):
            y[j] = y_new[j]
        if kind == 0:
            rho = eos_density(y[1], y[2], mat, rho)
            if not math.isfinite(rho):
                rho = mat[MAT_RHO0]
            return EMPTIED, n, -(FOUR_PI / 3.0) * r ** 3 * rho / mass
        if kind >= 1 and store:
            # the boundary radius is stored on both sides: first as the bottom of the shallower region
            if n >= cap:
                return OUT_OF_ROOM, n, 0.0
            _store(path, n, r, y, eos_density(y[1], y[2], mat, rho), region)
            n += 1
        if kind == 1:
            y[0] = core_mass
            region = -1
            mat = core_mat
        elif kind == 2:
            region += 1
            mat = mantle_mats[region]
        rho = eos_density(y[1], y[2], mat, rho)
        if store:
            if n >= cap:
                return OUT_OF_ROOM, n, 0.0
            _store(path, n, r, y, rho, region)
            n += 1
    if not math.isfinite(rho):
        # the centre lies beyond the rising branch of the curve: far too much mass left, radius too small
        return BLEW_UP, n, y[0] / mass
    residual = (y[0] - (FOUR_PI / 3.0) * r ** 3 * rho) / mass
    return REACHED_CENTRE, n, residual
