"""Slow, plain reference for the structure solver: scipy's solve_ivp (DOP853) and brentq.

Independent of meltzone's numba kernel: its own EOS functions (written from the
published formulae), its own inversion (scipy brentq) and its own event handling
(solve_ivp terminal events). Used by the tests as an oracle and by the benchmark
as the baseline.
"""

from __future__ import annotations

import math

from scipy.integrate import solve_ivp
from scipy.optimize import brentq

G = 6.67430e-11  # CODATA 2018


def vinet(rho, rho0, k0, kp):
    """Vinet et al. 1987, JGR 92:9319."""
    x = (rho0 / rho) ** (1.0 / 3.0)
    return 3.0 * k0 * (1.0 - x) / x**2 * math.exp(1.5 * (kp - 1.0) * (1.0 - x))


def bm3(rho, rho0, k0, kp):
    """Third-order Birch-Murnaghan, Birch 1947, Phys. Rev. 71:809."""
    y = (rho / rho0) ** (1.0 / 3.0)
    return 1.5 * k0 * (y**7 - y**5) * (1.0 + 0.75 * (kp - 4.0) * (y**2 - 1.0))


class _BeyondCurve(Exception):
    """The pressure lies above the curve's rising branch: the trial radius is far too small."""


def density(p, law, rho0, k0, kp):
    if p <= 0.0:
        return rho0
    hi = rho0 * 1.5
    while law(hi, rho0, k0, kp) < p:
        hi *= 1.5
        if hi > 30.0 * rho0:
            raise _BeyondCurve()
    return brentq(lambda r: law(r, rho0, k0, kp) - p, rho0 * 0.999, hi, xtol=1e-12, rtol=1e-14)


def cold_two_layer_radius(mass, core_fraction, core=(8300.0, 156.2e9, 6.08), mantle=(4100.0, 247e9, 3.97),
                          p_surface=0.0, rtol=1e-10):
    """Radius [m] and CMB pressure [Pa] of a cold Vinet-iron core + BM3 silicate mantle planet."""
    m_core = core_fraction * mass

    def rhs(r, y, layer):
        m, p = y
        rho = density(p, vinet, *core) if layer == "core" else density(p, bm3, *mantle)
        return [4.0 * math.pi * r * r * rho, -G * m * rho / (r * r)]

    def shoot(radius, full=False):
        r_stop = 1e-3 * radius
        y0 = [mass, p_surface]
        p_cmb = None
        empty = lambda r, y, *a: y[0]  # noqa: E731
        empty.terminal = True
        if core_fraction < 1.0:
            events = [empty]
            if core_fraction > 0.0:
                cmb = lambda r, y, *a: y[0] - m_core  # noqa: E731
                cmb.terminal = True
                events.append(cmb)
            sol = solve_ivp(rhs, (radius, r_stop), y0, args=("mantle",), events=events, rtol=rtol,
                            atol=[1e-12 * mass, 1e-3], method="DOP853")
            if sol.t_events[0].size:
                r0 = sol.t_events[0][0]
                return -(4.0 / 3.0) * math.pi * r0**3 * mantle[0] / mass, None
            if core_fraction <= 0.0:
                rho_c = density(sol.y[1, -1], bm3, *mantle)
                return (sol.y[0, -1] - (4.0 / 3.0) * math.pi * r_stop**3 * rho_c) / mass, None
            if not sol.t_events[1].size:
                return sol.y[0, -1] / mass, None
            r_cmb = sol.t_events[1][0]
            y0 = [m_core, sol.y_events[1][0][1]]
            p_cmb = y0[1]
        else:
            r_cmb = radius
        sol = solve_ivp(rhs, (r_cmb, r_stop), y0, args=("core",), events=(empty,), rtol=rtol,
                        atol=[1e-12 * mass, 1e-3], method="DOP853")
        if sol.t_events[0].size:
            r0 = sol.t_events[0][0]
            return -(4.0 / 3.0) * math.pi * r0**3 * core[0] / mass, p_cmb
        rho_c = density(sol.y[1, -1], vinet, *core)
        return (sol.y[0, -1] - (4.0 / 3.0) * math.pi * r_stop**3 * rho_c) / mass, p_cmb

    guess = (1.07 - 0.21 * min(core_fraction, 0.8)) * (mass / 5.9722e24) ** (1.0 / 3.7) * 6.371e6
    def residual(r):
        try:
            return shoot(r)[0]
        except _BeyondCurve:
            return 1.0

    radius = brentq(residual, 0.8 * guess, 1.2 * guess, xtol=1e-9 * guess)
    return radius, shoot(radius)[1]
