"""Slow, plain reference of the mixing-length scheme (used only by the tests).

Written from the scheme's equations (:mod:`meltzone.evolution.mixing_length`), not from the kernel's arrays:
cells, faces and their masses are built again from the PlanetSpec and the Interior (the node masses, the laws
of viscosity, melting, core heat and radiogenic power are those of the boundary-layer reference,
``tests/reference_evolution.py``), every flux is written again in NumPy, and the semi-discrete equations

    dE_c/dt = -A_0 F_0,   m_i dh_i/dt = A_i F_i - A_{i+1} F_{i+1} + H(t) m_i / M

are integrated with ``scipy.integrate.solve_ivp`` (BDF, tridiagonal Jacobian sparsity). Temperatures follow
from h = c_p T + L phi(T) (closed form for the linear law), the core's from brentq on its stored heat, the
surface temperature from brentq on the radiative balance. Only the linear melt-fraction law and the bare
surface are written here (the grey atmosphere is lagged by a step in the kernel, which a reference of the
continuous equations cannot reproduce exactly).
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq
from scipy.sparse import diags

import reference_evolution as ref
from meltzone.evolution.mixing_length import MIN_BLEND

SIGMA_SB = ref.SIGMA_SB


class Reference:
    """Cells and faces of one planet and the right-hand side of its semi-discrete equations."""

    def __init__(self, spec, interior):
        if spec.melting.melt_fraction_law != "linear" or spec.surface.atmosphere != "none":
            raise NotImplementedError("the reference covers the linear law and the bare surface")
        ph, self.mantle, self.core = ref.build_inputs(spec, interior)
        # the scheme widens the rheological transition to at least MIN_BLEND (its docstring)
        self.ph = replace(ph, blend_width=max(ph.blend_width, MIN_BLEND))
        # the activation enthalpy of every cell (its pressure is fixed): reference_evolution.activation_enthalpy
        self.h_act = np.array([ref.activation_enthalpy(p, self.ph) for p in self.mantle.pressure])
        it = interior
        nc = it.cmb_index
        r = self.mantle.r
        self.n = len(r)
        rf = np.concatenate([[r[0]], 0.5 * (r[1:] + r[:-1]), [r[-1]]])
        self.area = 4.0 * math.pi * rf ** 2
        self.rho_f = np.interp(rf, r, it.rho[nc:])
        self.g_f = np.interp(rf, r, it.g[nc:])
        self.p_f = np.interp(rf, r, it.P[nc:])
        self.length = np.minimum(rf - r[0], r[-1] - rf)
        # distances between centroids: an outer half cell's lies a quarter node spacing from its boundary
        self.dr = np.concatenate([[0.25 * (r[1] - r[0])], np.diff(r), [0.25 * (r[-1] - r[-2])]])
        self.dr[1] = 0.75 * (r[1] - r[0])
        self.dr[-2] = 0.75 * (r[-1] - r[-2])
        f = self.mantle.adiabat
        self.ratio = f[1:] / f[:-1]  # interior faces 1 .. n-1
        self.mobile = spec.convection.regime == "mobile-lid"
        self.r = r
        self.rf = rf
        self.extraction_pressure = self.ph.extraction_pressure  # 0 with volcanism off
        self.heat_share = self.mantle.mass / self.mantle.mass.sum()
        tu, self.tc0 = ref.initial_temperatures(spec, self.mantle, self.core)
        t0 = tu * f
        self.y0 = np.concatenate([[ref.core_heat(self.tc0, self.ph, self.core) if self.core else 0.0],
                                  self.mantle.mass * self.enthalpy(t0)])

    def enthalpy(self, t):
        return self.ph.heat_capacity * t + self.ph.latent_heat * ref.melt_fraction(t, self.mantle)

    def state(self, h):
        """(T, phi) from h = c T + L (T - T_sol) / (T_liq - T_sol) on the interval, c T outside."""
        c, lat = self.ph.heat_capacity, self.ph.latent_heat
        sol, liq = self.mantle.solidus, self.mantle.liquidus
        t_in = sol + (h - c * sol) / (c + lat / (liq - sol))
        t = np.where(h <= c * sol, h / c, np.where(h >= c * liq + lat, (h - lat) / c, t_in))
        return t, np.clip((t - sol) / (liq - sol), 0.0, 1.0)

    def core_temperature(self, e):
        return brentq(lambda t: ref.core_heat(t, self.ph, self.core) - e, 10.0, 2.0e5, xtol=1e-11, rtol=1e-15)

    def eta(self, t, p, phi, floor):
        return ref.viscosity(max(t, floor), p, phi, self.ph)

    def log_eta(self, t, phi, floors):
        """ln eta of every cell at its own T (at least its floor), phi and pressure: the law of
        reference_evolution.viscosity written again for arrays, with the cells' activation enthalpies."""
        ph = self.ph
        log_solid = (math.log(ph.viscosity_prefactor) + self.h_act / (ref.R_GAS * np.maximum(t, floors))
                     - ph.melt_weakening * phi)
        x = np.clip((phi - ph.critical_melt_fraction) / ph.blend_width, 0.0, 1.0)
        w = x * x * (3.0 - 2.0 * x)
        crystals = np.minimum((1.0 - phi) / (1.0 - ph.critical_melt_fraction), 0.999)
        log_susp = math.log(ph.liquid_viscosity) - 2.5 * np.log(1.0 - crystals)
        return np.minimum(np.where(w > 0.0, w * log_susp + (1.0 - w) * log_solid, log_solid), ref.LOG_ETA_MAX)

    def boundary(self, dt, t_visc, phi, j, floor):
        """k dT / min(delta, distance to the outer cell's centroid), delta = (kappa eta Ra_cr / (alpha rho g
        |dT|))^(1/3)."""
        ph = self.ph
        if abs(dt) <= 1e-12:
            return ph.conductivity * dt / self.dr[j]
        eta = self.eta(t_visc, self.p_f[j], phi, floor)
        delta = (ph.diffusivity * eta * ph.critical_rayleigh
                 / (ph.expansivity * self.rho_f[j] * self.g_f[j] * abs(dt))) ** (1.0 / 3.0)
        return ph.conductivity * dt / min(delta, self.dr[j])

    def rigid_length(self, log_eta):
        """Mixing length per face bounded by a rigid region above it: the distance from the face up to where ln eta
        (linear in radius between the face, at the mean of its two cells, and the cells' nodes above) first exceeds
        the face's own by a_rh (convection.rheology_a), if nearer than the nearer boundary; only at faces nearer
        the surface than the core-mantle boundary."""
        out = self.length.copy()
        a_rh = self.ph.rheology_a
        for f in range(1, self.n):
            if self.rf[f] - self.rf[0] < self.rf[-1] - self.rf[f]:
                continue
            base = 0.5 * (log_eta[f - 1] + log_eta[f])
            rr = np.concatenate([[self.rf[f]], self.r[f:]])
            vv = np.concatenate([[base], log_eta[f:]]) - base
            above = np.nonzero(vv >= a_rh)[0]
            if above.size:
                k = above[0]
                r_star = rr[k - 1] + (a_rh - vv[k - 1]) / (vv[k] - vv[k - 1]) * (rr[k] - rr[k - 1])
                out[f] = min(out[f], r_star - self.rf[f])
        return out

    def heat_pipe(self, h, t, phi, ts):
        """Heat [W] the stagnant lid's heat pipe takes out of each cell: m (phi - 0.01) w / 1e4 yr of melt, each kg
        carrying L + c_p (T - T_s), in partly molten cells no deeper than the extraction pressure, w = 1 -
        smoothstep((phi - phi_c) / blend); only under a solid top cell."""
        ph = self.ph
        out = np.zeros(self.n)
        if self.mobile or self.extraction_pressure <= 0.0 or phi[-1] > 0.01:
            return out
        x = np.clip((phi - ph.critical_melt_fraction) / ph.blend_width, 0.0, 1.0)
        w = 1.0 - x * x * (3.0 - 2.0 * x)
        on = (self.mantle.pressure <= self.extraction_pressure) & (phi > 0.01)
        rate = self.mantle.mass / (1.0e4 * ref.YEAR) * np.maximum(phi - 0.01, 0.0) * w
        out[on] = (rate * (ph.latent_heat + ph.heat_capacity * (t - ts)))[on]
        return out

    def fluxes(self, y):
        """(face fluxes F_0 .. F_n [W/m^2], T, phi, T_c, T_s)."""
        ph = self.ph
        n = self.n
        h = y[1:] / self.mantle.mass
        t, phi = self.state(h)
        floors = np.zeros(n)  # per cell
        if self.mobile:
            mid = n // 2
            floors = t[mid] * self.mantle.adiabat / self.mantle.adiabat[mid]
        q = np.zeros(n + 1)
        tc = 0.0
        if self.core:
            tc = self.core_temperature(y[0])
            # the layer's material at its mean temperature, with that temperature's melt fraction at the CMB
            tm = 0.5 * (tc + t[0])
            phi_m = float(ref.melt_fraction(np.array([tm]), self.mantle, slice(0, 1))[0])
            q[0] = self.boundary(tc - t[0], tm, phi_m, 0, floors[0])
        c = ph.heat_capacity
        # interior faces: conduction + mixing length on the two-phase adiabat's enthalpy excess
        ta, tb = t[:-1], t[1:]
        dh = h[:-1] + c * ta * (self.ratio - 1.0) - h[1:]
        dr = self.dr[1:n]
        q[1:n] = -ph.conductivity * (tb - ta) / dr
        j = np.nonzero((dh > 0.0) & (self.length[1:n] > 0.0))[0]
        if j.size:
            face = j + 1
            s = dh[j] / (c * dr[j])
            # geometric mean of the two cells' viscosities, each at its own T, phi and pressure
            log_eta = self.log_eta(t, phi, floors)
            eta = np.exp(0.5 * (log_eta[j] + log_eta[j + 1]))
            length = self.length[face] if self.mobile else self.rigid_length(log_eta)[face]
            base = ph.expansivity * self.g_f[face] * length ** 4 * s
            kappa_h = np.minimum(base * self.rho_f[face] / (18.0 * eta), np.sqrt(base / 16.0))
            q[face] += self.rho_f[face] * kappa_h * dh[j] / dr[j]
        top = t[-1]
        teq = ph.equilibrium_temperature

        def g(ts):
            return self.boundary(top - ts, top, phi[-1], n, floors[-1]) - SIGMA_SB * (ts ** 4 - teq ** 4)

        lo, hi = min(teq, top), max(teq, top)
        ts = lo if g(lo) <= 0.0 else hi if g(hi) >= 0.0 else brentq(g, lo, hi, xtol=1e-12, rtol=1e-15)
        q[n] = SIGMA_SB * (ts ** 4 - teq ** 4)
        return q, t, phi, tc, ts

    def rhs(self, time, y):
        q, t, phi, _, ts = self.fluxes(y)
        flow = self.area * q
        heat = ref.radiogenic_power(time, self.ph) * self.heat_share
        dy = np.empty_like(y)
        dy[0] = -flow[0] if self.core else 0.0
        dy[1:] = flow[:-1] - flow[1:] + heat - self.heat_pipe(y[1:] / self.mantle.mass, t, phi, ts)
        return dy

    def solve(self, times, rtol=1e-9, method="BDF"):
        """Temperatures (len(times), n) at ``times`` [s] from the start."""
        m = self.n + 1
        sparsity = diags([np.ones(m - 1), np.ones(m), np.ones(m - 1)], [-1, 0, 1])
        sol = solve_ivp(self.rhs, (0.0, float(times[-1])), self.y0, method=method, t_eval=times, rtol=rtol,
                        atol=np.concatenate([[1e-9 * abs(self.y0[0]) + 1.0], 1e-9 * np.abs(self.y0[1:])]),
                        jac_sparsity=sparsity, first_step=1.0)
        self.nfev = sol.nfev
        if not sol.success:
            raise RuntimeError(sol.message)
        return np.array([self.state(sol.y[1:, k] / self.mantle.mass)[0] for k in range(len(times))])
