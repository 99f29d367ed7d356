"""The liquid iron of the outer core: Anderson & Ahrens 1994's equation of state and the core's isentrope.

Where it enters (option b, this model's choice): the core's thermal profile only. The temperature profile that
the inner core's growth reads (``Interior.adiabat`` on the core nodes, f = T / T_cmb) is the isentrope of liquid
iron through the structure's core pressures, because the outer core that sets it is a convecting liquid. The
structure (density, gravity, pressure) stays the epsilon-iron Vinet curve with the light-element deficit
``interior.core_density_deficit`` (:mod:`meltzone.eos`), for three reasons: the structure is solved once and
held fixed while the molten part of the core changes through the run; its radius, CMB and centre pressures
already match PREM inside the tests' tolerances (tests/test_interior.py); and the liquid's density depends on
the core's temperature (~1% per 1000 K at the CMB), which the fixed structure does not know. The solid inner
core is not given its own profile: the liquid's isentrope is continued to the centre (common practice in
parameterised core models, e.g. Labrosse 2015, PEPI 247:36).

Why it matters: the isentrope rises by d ln T = gamma d ln rho, and the epsilon-iron isotherm (K 1507 / 770 GPa
at the ICB / CMB) is stiffer than Earth's liquid outer core (PREM K_S 1304 / 644 GPa), so the old profile rose
by 1.31 from the CMB to the ICB; this isentrope rises by 1.37 (PREM's densities with Grueneisen 1.5 give 1.36).

Equation of state (Anderson & Ahrens 1994, J. Geophys. Res. 99:4273; parameters checked in the abstract):

* reference isentrope from 1 bar and 1811 K (the melting point of iron), rho0 = 7019 kg/m^3, in the
  fourth-order Birch-Murnaghan form of the isentropic bulk modulus K_S0 = 109.7 GPa, K_S0' = 4.66,
  K_S0'' = -0.043 /GPa (the form: from memory; the paper's name for it: "fourth-order" is implied by K'')::

      P_S = 3 K0 f (1 + 2 f)^(5/2) [1 + 3/2 (K' - 4) f + 3/2 (K0 K'' + (K' - 4)(K' - 3) + 35/9) f^2],
      f = ((rho / rho0)^(2/3) - 1) / 2

* Grueneisen parameter gamma = gamma0 + gamma' (rho / rho0)^n (E - E0), gamma0 = 1.735, gamma' = -0.130 kg/MJ,
  n = -1.87, E0 the internal energy at 1 bar and 1811 K (checked);
* off the reference isentrope, the definition gamma = V (dP/dE)_V integrated at constant density (this model's
  construction from those parameters): P = P_S + rho [gamma0 (E - E_S) + gamma' x^n ((E - E0)^2 - (E_S - E0)^2)
  / 2], x = rho / rho0, with E_S(rho) - E0 = int P_S / rho^2 drho on the reference isentrope;
* temperature: d ln T = gamma d ln rho along any isentrope (thermodynamic identity); off the reference
  isentrope E - E_S = c_v (T - T_S) with c_v = 4.25 R per mole, the middle of the 4.0-4.5 R the paper gives for
  liquid iron at core conditions (checked). The anchor's c_v barely matters: the profile's shape moves by
  < 0.1% between anchors 3500 and 4500 K at Earth's CMB (measured).

Validity: fitted to data up to 10 Mbar (1000 GPa: ultrasonic and 1-bar data, shock compression and sound
speeds; checked in the abstract); beyond it (super-Earth cores) the form is extrapolated and the core is
flagged beyond the iron melting data anyway (:func:`meltzone.phases.core_flags`). The reference curve rises
monotonically to rho / rho0 = 12 (checked numerically), the bracket of :func:`isentrope`.

Light elements: Earth's outer core is 7.5-7.6% less dense than liquid iron at its pressure and temperature, with
an almost identical adiabatic bulk modulus (Kuwayama et al. 2020, Phys. Rev. Lett. 124:165701, abstract
checked). A uniform density deficit leaves K_S and d ln rho at a given pressure unchanged, so it does not change
the isentrope's T(P) (for a Grueneisen parameter of the alloy equal to iron's: an assumption); it is stated here
(:data:`OUTER_CORE_DENSITY_DEFICIT`) for the check of this curve against PREM (tests/test_liquid_iron.py).
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from .constants import GAS_CONSTANT, GPA, MOLAR_MASS_FE
from .errors import ModelError

#: Anderson & Ahrens 1994, JGR 99:4273 (abstract checked): density [kg/m^3] at 1 bar and 1811 K.
AA94_RHO0 = 7019.0
#: Temperature of the reference isentrope's foot [K]: iron's melting point at 1 bar (same source).
AA94_T0 = 1811.0
#: Isentropic bulk modulus at the foot [Pa] and its first and second pressure derivatives [1, 1/Pa] (same source).
AA94_KS0 = 109.7 * GPA
AA94_KS0_PRIME = 4.66
AA94_KS0_SECOND = -0.043 / GPA
#: Grueneisen parameter gamma = gamma0 + gamma' (rho/rho0)^n (E - E0): gamma0 [1], gamma' [kg/J], n [1] (same
#: source; gamma' = -0.130 kg/MJ).
AA94_GAMMA0 = 1.735
AA94_GAMMA_PRIME = -0.130e-6
AA94_N = -1.87
#: Specific heat at constant volume of liquid iron at core conditions [J/kg/K]: 4.25 R per mole, the middle of
#: the paper's 4.0-4.5 R (same source, checked).
AA94_CV = 4.25 * GAS_CONSTANT / MOLAR_MASS_FE
#: Highest pressure of the data behind the fit [Pa]: 10 Mbar (same source, checked).
AA94_MAX_PA = 1000.0 * GPA
#: Density deficit of Earth's outer core against liquid iron at the same pressure and temperature:
#: 7.5-7.6% (Kuwayama et al. 2020, PRL 124:165701, abstract checked); the middle value.
OUTER_CORE_DENSITY_DEFICIT = 0.0755
#: Largest compression rho / rho0 of the tabulated reference isentrope (the reference curve rises to it).
MAX_COMPRESSION = 12.0


def reference_pressure(rho):
    """Pressure [Pa] on the 1811 K reference isentrope (fourth-order Birch-Murnaghan in K_S)."""
    f = 0.5 * ((np.asarray(rho, dtype=float) / AA94_RHO0) ** (2.0 / 3.0) - 1.0)
    a, b = _bm4_coefficients()
    return 3.0 * AA94_KS0 * f * (1.0 + 2.0 * f) ** 2.5 * (1.0 + a * f + b * f * f)


def _bm4_coefficients():
    k0, kp, kpp = AA94_KS0, AA94_KS0_PRIME, AA94_KS0_SECOND
    return 1.5 * (kp - 4.0), 1.5 * (k0 * kpp + (kp - 4.0) * (kp - 3.0) + 35.0 / 9.0)


def _reference_pressure_slope(rho):
    """dP_S / drho [Pa m^3/kg] of the reference isentrope."""
    f = 0.5 * ((rho / AA94_RHO0) ** (2.0 / 3.0) - 1.0)
    a, b = _bm4_coefficients()
    s = 1.0 + 2.0 * f
    poly = 1.0 + a * f + b * f * f
    dp_df = 3.0 * AA94_KS0 * (s ** 2.5 * poly + 5.0 * f * s ** 1.5 * poly + f * s ** 2.5 * (a + 2.0 * b * f))
    return dp_df * s / (3.0 * rho)


def grueneisen(rho, energy):
    """gamma(rho, E) [1]; ``energy`` is E - E0 [J/kg]."""
    return AA94_GAMMA0 + AA94_GAMMA_PRIME * (rho / AA94_RHO0) ** AA94_N * energy


@lru_cache(maxsize=1)
def _reference_isentrope():
    """Dense solution of (E_S - E0, ln T_S) against ln rho on the reference isentrope, rho0 .. 12 rho0."""
    def rhs(lnr, y):
        rho = math.exp(lnr)
        return [float(reference_pressure(rho)) / rho, grueneisen(rho, y[0])]

    lo = math.log(0.7 * AA94_RHO0)
    sol = solve_ivp(rhs, (math.log(AA94_RHO0), math.log(MAX_COMPRESSION * AA94_RHO0)), [0.0, math.log(AA94_T0)],
                    method="DOP853", rtol=1e-11, atol=1e-9, dense_output=True)
    below = solve_ivp(rhs, (math.log(AA94_RHO0), lo), [0.0, math.log(AA94_T0)], method="DOP853", rtol=1e-11,
                      atol=1e-9, dense_output=True)
    if not (sol.success and below.success):
        raise ModelError("liquid iron: the reference isentrope did not integrate")
    return sol.sol, below.sol, lo


def _on_reference(rho):
    """(E_S - E0 [J/kg], T_S [K]) on the reference isentrope at density rho."""
    up, down, lo = _reference_isentrope()
    lnr = math.log(rho)
    if lnr < lo:
        raise ModelError(f"liquid iron: density {rho:g} kg/m^3 below the tabulated range")
    e, lnt = (up if rho >= AA94_RHO0 else down)(lnr)
    return float(e), math.exp(float(lnt))


def pressure(rho, energy):
    """Pressure [Pa] at density rho [kg/m^3] and specific internal energy E - E0 [J/kg]."""
    e_s, _ = _on_reference(rho)
    x = (rho / AA94_RHO0) ** AA94_N
    return float(reference_pressure(rho)) + rho * (AA94_GAMMA0 * (energy - e_s)
                                                   + AA94_GAMMA_PRIME * x * 0.5 * (energy * energy - e_s * e_s))


def _energy(rho, temperature):
    e_s, t_s = _on_reference(rho)
    return e_s + AA94_CV * (temperature - t_s)


def density(p, temperature):
    """Density [kg/m^3] of liquid iron at pressure p [Pa] and temperature [K]."""
    def resid(rho):
        return pressure(rho, _energy(rho, temperature)) - p

    lo, hi = 0.75 * AA94_RHO0, MAX_COMPRESSION * AA94_RHO0
    if not resid(lo) < 0.0 < resid(hi):
        raise ModelError(f"liquid iron: no density for {p / GPA:g} GPa and {temperature:g} K in "
                         f"{lo:g}-{hi:g} kg/m^3")
    return brentq(resid, lo, hi, xtol=1e-10, rtol=1e-14)


def _adiabatic_modulus(rho, energy):
    """K_S = rho (dP/drho)_S = rho (dP/drho)_E + gamma P [Pa] (dE = P / rho^2 drho along an isentrope)."""
    e_s, _ = _on_reference(rho)
    x = (rho / AA94_RHO0) ** AA94_N
    de_s = float(reference_pressure(rho)) / (rho * rho)
    d_rho_e = (_reference_pressure_slope(rho)
               + AA94_GAMMA0 * (energy - e_s) + AA94_GAMMA_PRIME * x * 0.5 * (energy * energy - e_s * e_s)
               + rho * (-AA94_GAMMA0 * de_s + AA94_GAMMA_PRIME * AA94_N * x / rho * 0.5 * (energy * energy - e_s * e_s)
                        - AA94_GAMMA_PRIME * x * e_s * de_s))
    return rho * d_rho_e + grueneisen(rho, energy) * pressure(rho, energy)


def isentrope(p_top, t_top, pressures):
    """Liquid iron's isentrope from (p_top [Pa], t_top [K]) to ``pressures`` [Pa] (each >= p_top).

    Integrated in pressure: d ln rho / dP = 1 / K_S, dE / dP = P / (rho K_S), d ln T / dP = gamma / K_S.
    Returns a dict of arrays on ``pressures``: rho [kg/m^3], T [K], gamma [1], K_S [Pa].
    """
    p = np.asarray(pressures, dtype=float)
    if np.any(p < p_top * (1.0 - 1e-12)):
        raise ModelError("liquid iron: the isentrope is integrated to higher pressures only")
    rho0 = density(p_top, t_top)
    e0 = _energy(rho0, t_top)

    def rhs(pp, y):
        rho, e = math.exp(y[0]), y[1]
        k = _adiabatic_modulus(rho, e)
        return [1.0 / k, pp / (rho * k), grueneisen(rho, e) / k]

    order = np.argsort(p)
    p_max = float(p[order[-1]])
    if p_max > p_top:
        sol = solve_ivp(rhs, (p_top, p_max), [math.log(rho0), e0, math.log(t_top)], method="DOP853",
                        rtol=1e-10, atol=[1e-12, 1e-3, 1e-12], t_eval=np.clip(p[order], p_top, p_max))
        if not sol.success:
            raise ModelError(f"liquid iron: the isentrope did not integrate ({sol.message})")
        y = np.empty((3, len(p)))
        y[:, order] = sol.y
    else:
        y = np.tile([[math.log(rho0)], [e0], [math.log(t_top)]], len(p))
    rho = np.exp(y[0])
    return {"rho": rho, "T": np.exp(y[2]), "gamma": np.array([grueneisen(r, e) for r, e in zip(rho, y[1])]),
            "K_S": np.array([_adiabatic_modulus(r, e) for r, e in zip(rho, y[1])])}


def core_adiabat(core_pressures, cmb_pressure, cmb_temperature):
    """f = T / T_cmb on the core nodes along liquid iron's isentrope through (cmb_pressure, cmb_temperature)."""
    p = np.maximum(np.asarray(core_pressures, float), cmb_pressure)
    f = isentrope(cmb_pressure, cmb_temperature, p)["T"] / cmb_temperature
    f[p <= cmb_pressure] = 1.0  # exactly, at the CMB node
    return f
