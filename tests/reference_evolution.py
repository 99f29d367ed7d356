"""Slow, plain reference of the thermal evolution (mobile lid or magma ocean, bare or grey surface).

NumPy on the node arrays and scipy.integrate.solve_ivp (LSODA) in temperature form,
C_eff(T) dT/dt = heat budget, with the effective heat capacities from centred
differences of the stored heat. The numba kernel integrates the stored energies
instead; the two must agree. Written from the equations in the kernel's docstring,
not from its code paths: used only by the tests and the benchmark.
"""

from __future__ import annotations

import math
from types import SimpleNamespace

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from meltzone.evolution import build_arrays, initial_temperatures
from meltzone.evolution import kernel as k
from meltzone.interior import build_interior

R_GAS = 8.314462618
SIGMA = 5.670374419e-8


class ReferenceModel:
    def __init__(self, spec):
        if spec.convection.regime != "mobile-lid" or spec.surface.atmosphere != "none":
            raise NotImplementedError("the reference covers the mobile-lid regime with a bare surface")
        self.spec = spec
        self.interior = build_interior(spec)
        grid, core, iso, par, law, _ = build_arrays(spec, self.interior)
        self.grid, self.core, self.iso, self.par = grid, core, iso, par
        if law != 0:
            raise NotImplementedError("linear melt-fraction law only")
        self.f = grid[k.G_F]
        self.w = grid[k.G_W]
        self.tsol = grid[k.G_TSOL]
        self.tliq = grid[k.G_TLIQ]
        self.p = par
        # time [s] from which the top is judged by the isentropic melt fraction (see run)
        self.t_solid = math.inf

    # ---- materials
    def phi(self, t, sl=slice(None)):
        return np.clip((t - self.tsol[sl]) / (self.tliq[sl] - self.tsol[sl]), 0.0, 1.0)

    def phi_isentropic(self, t):
        """Top node: phi = (T - T_sol) / (T_liq - T_sol + L / c_p), the linear law solved in closed form
        for phi = phi_eq(T - L phi / c_p)."""
        lc = self.p[k.P_LATENT] / self.p[k.P_CM]
        return float(np.clip((t - self.tsol[-1]) / (self.tliq[-1] - self.tsol[-1] + lc), 0.0, 1.0))

    def viscosity(self, t, p, phi):
        par = self.p
        v0, pd = par[k.P_V_ACT], par[k.P_V_DECAY]
        enthalpy = par[k.P_E_ACT] + (v0 * pd * (1 - math.exp(-p / pd)) if pd > 0 else p * v0)
        log_solid = math.log(par[k.P_A_VISC]) + enthalpy / (R_GAS * t) - par[k.P_MELT_WEAK] * phi
        x = (phi - par[k.P_PHI_C]) / par[k.P_BLEND]
        w = 0.0 if x <= 0 else (1.0 if x >= 1 else x * x * (3 - 2 * x))
        if w == 0.0:
            return math.exp(min(log_solid, 700.0))
        crystals = min((1 - phi) / (1 - par[k.P_PHI_C]), 0.999)
        log_susp = math.log(par[k.P_ETA_LIQ]) - 2.5 * math.log(1 - crystals)
        return math.exp(min(w * log_susp + (1 - w) * log_solid, 700.0))

    # ---- stored heat
    def mantle_heat(self, tu):
        t = tu * self.f
        return float(np.sum(self.w * (self.p[k.P_CM] * t + self.p[k.P_LATENT] * self.phi(t))))

    def inner_core_mass(self, tc):
        c = self.core
        g = tc * c[k.C_F] - c[k.C_TMELT]
        if g[0] >= 0:
            return 0.0
        above = np.nonzero(g >= 0)[0]
        if not above.size:
            return float(c[k.C_MCUM][-1])
        j = above[0]
        s = g[j - 1] / (g[j - 1] - g[j])
        return float(c[k.C_MCUM][j - 1] + s * (c[k.C_MCUM][j] - c[k.C_MCUM][j - 1]))

    def core_heat(self, tc):
        c = self.core
        return float(np.sum(c[k.C_W] * self.p[k.P_CC] * tc * c[k.C_F])) - (
            self.p[k.P_LC] + self.p[k.P_EG]) * self.inner_core_mass(tc)

    # ---- fluxes
    def phi_surface(self, tu):
        return float(self.phi(tu * self.f[-1:], slice(-1, None))[0])

    def fluxes(self, t, tu, tc):
        par = self.p
        depth = par[k.P_RADIUS] - par[k.P_CORE_RADIUS]
        phi_surf = self.phi_surface(tu)
        # after the top first reached phi_c: the regime (and the magma-ocean branch's suspension) follows the
        # isentropic melt fraction, and the solid branch has melt weakening up to phi_c but no suspension
        if t >= self.t_solid:
            phi_top = self.phi_isentropic(tu * self.f[-1])
            eta_u = self.viscosity(tu, par[k.P_P_TOP], phi_top)
            eta_s = self.viscosity(tu, par[k.P_P_TOP], min(phi_surf, par[k.P_PHI_C]))
        else:
            phi_top = phi_surf
            eta_u = eta_s = self.viscosity(tu, par[k.P_P_TOP], phi_surf)
        tb = tu * self.f[0]
        dtc = tc - tb
        tm = 0.5 * (tc + tb)
        eta_c = self.viscosity(tm, par[k.P_P_CMB], float(self.phi(np.array([tm]), slice(0, 1))[0]))
        if abs(dtc) > 1e-9:
            dc = (par[k.P_KAPPA] * eta_c * par[k.P_RA_CR] / (par[k.P_ALPHA] * par[k.P_RHO_MANTLE]
                                                             * par[k.P_G_CMB] * abs(dtc))) ** (1 / 3)
            qc = par[k.P_K] * dtc / min(dc, 0.5 * depth)
        else:
            qc = 0.0
        t_eq = par[k.P_T_EQ]

        def q_conv(ts, a, beta, eta):
            ra = (par[k.P_ALPHA] * par[k.P_RHO_MANTLE] * par[k.P_G_SURF] * max(tu - ts + max(dtc, 0), 1e-6)
                  * depth**3 / (par[k.P_KAPPA] * eta))
            delta = min(depth * (par[k.P_RA_CR] / ra) ** beta / a, depth)
            return par[k.P_K] * (tu - ts) / delta

        def surface_flux(a, beta, eta):
            ts = brentq(lambda s: q_conv(s, a, beta, eta) - SIGMA * (s**4 - t_eq**4), t_eq, tu, xtol=1e-9,
                        rtol=1e-13)
            return q_conv(ts, a, beta, eta)

        # magma-ocean top: Nu = (Ra / Ra_cr)^(1/3); solid mantle: Nu = a (Ra / Ra_cr)^beta once the top has
        # reached phi_c (before, a = 1 and beta = 1/3 too); smoothstep blend over phi_c < phi_top < phi_c +
        # the blend width
        x = (phi_top - par[k.P_PHI_C]) / par[k.P_BLEND]
        w = 0.0 if x <= 0 else (1.0 if x >= 1 else x * x * (3 - 2 * x))
        qs = 0.0
        if w > 0.0:
            qs += w * surface_flux(1.0, 1.0 / 3.0, eta_u)
        if w < 1.0:
            # the configured solid-mantle scaling from t_solid on, the classical one before
            a, beta = (par[k.P_NU_A], par[k.P_BETA]) if t >= self.t_solid else (1.0, 1.0 / 3.0)
            qs += (1.0 - w) * surface_flux(a, beta, eta_s)
        h = float(np.sum(self.iso[:, 0] * np.exp(self.iso[:, 1] * (par[k.P_START_AGE] - t)))) * par[k.P_MANTLE_MASS]
        return qs * 4 * math.pi * par[k.P_RADIUS] ** 2, qc * 4 * math.pi * par[k.P_CORE_RADIUS] ** 2, h

    def rhs(self, t, y):
        tu, tc = y
        qs, qc, h = self.fluxes(t, tu, tc)
        dt = 1e-3 * max(1.0, 1e-4 * tu)
        c_m = (self.mantle_heat(tu + dt) - self.mantle_heat(tu - dt)) / (2 * dt)
        dtc_ = 1e-3 * max(1.0, 1e-4 * tc)
        c_c = (self.core_heat(tc + dtc_) - self.core_heat(tc - dtc_)) / (2 * dtc_)
        return [(-qs + qc + h) / c_m, -qc / c_c]

    def run(self, t_eval, rtol=1e-9, method="LSODA"):
        """Solve to t_eval[-1]; returns (t, y) at t_eval. A terminal event finds when the top first reaches
        phi_c, and a second solve continues from there with the isentropic criterion. Returns an object with
        t, y (2 x len(t_eval): T_u, T_c) and nfev (right-hand-side calls)."""
        tu0, tc0 = initial_temperatures(self.spec, self.grid)
        t_end = float(t_eval[-1])
        phi_c = self.p[k.P_PHI_C]
        opts = dict(method=method, rtol=rtol, atol=[1e-6, 1e-6])
        self.t_solid = math.inf
        if self.phi_surface(tu0) <= phi_c:
            self.t_solid = 0.0
            first = None
        else:
            event = lambda t, y: self.phi_surface(y[0]) - phi_c  # noqa: E731
            event.terminal, event.direction = True, -1
            first = solve_ivp(self.rhs, (0.0, t_end), [tu0, tc0], events=event, dense_output=True, first_step=1.0,
                              **opts)
            if not first.success:
                raise RuntimeError(first.message)
            if first.status != 1:  # never reached phi_c
                return SimpleNamespace(t=t_eval, y=first.sol(t_eval), nfev=first.nfev)
            self.t_solid = float(first.t_events[0][0])
            tu0, tc0 = first.y_events[0][0]
        # the solver picks its own first step here (a 1 s start late in the run sends LSODA into tiny steps)
        second = solve_ivp(self.rhs, (self.t_solid, t_end), [tu0, tc0], dense_output=True,
                           first_step=1.0 if self.t_solid == 0.0 else None, **opts)
        if not second.success:
            raise RuntimeError(second.message)
        y = np.empty((2, len(t_eval)))
        late = t_eval >= self.t_solid
        y[:, late] = second.sol(t_eval[late])
        if first is not None and np.any(~late):
            y[:, ~late] = first.sol(t_eval[~late])
        return SimpleNamespace(t=t_eval, y=y, nfev=second.nfev + (first.nfev if first is not None else 0))
