"""Growth of the stagnant lid of the boundary-layer scheme (the law and the heat the growing lid releases).

The lid is a conductive layer with a linear profile from the surface temperature T_s to T_l at its base; the
mantle's stored heat counts it at the profile's mean T_lm = (T_eq + T_l) / 2 (see
:func:`meltzone._core.physics.mantle_energy`). Two growth laws (``convection.lid_growth_law``):

* base flux (the default, ``P_LID_LAW`` = 1): rho c (T_u - T_l) dD/dt = q_lid - q_u, the usual form of
  parameterised stagnant-lid models (Schubert & Spohn 1990, JGR 95:14095; Morschhauser, Grott & Breuer 2011,
  Icarus 212:541; the form from memory: the searched public text did not show the equation). Rock added at the
  base cools from T_u to T_l; q_lid = k (T_l - T_s) / D is the conductive flux of the linear profile. As the lid
  thickens, its linear profile cools further (the added rock ends at T_lm, not T_l): that heat,
  rho c (T_l - T_lm) dD/dt per unit area, leaves through the surface (energy bookkeeping of this model, so
  that the convecting mantle loses exactly q_u at the lid's base and the budget closes);
* heat-balance integral (``P_LID_LAW`` = 0): rho c (T_u - T_lm) dD/dt = q_lid - q_u (Goodman 1958, Trans. ASME
  80:335, integral method with a linear profile; from memory): the lid's whole heat change is paid at its base
  and the surface flux is q_lid.

For a lid on a non-convecting mantle (q_u = 0) both give D^2 = 2 kappa t St_eff with St_eff =
(T_l - T_s) / (T_u - T_l) (base flux) or (T_l - T_s) / (T_u - T_lm) (integral); the exact conduction
solution (a Stefan problem with the jump T_u - T_l in place of latent heat, Carslaw & Jaeger 1959) lies between
the two (see tests/test_lid_growth.py).
"""

from __future__ import annotations

from ._jit import njit
from .layout import P_CM, P_LID_LAW, P_RHO_TOP, P_T_EQ


@njit
def lid_growth(q_lid, q_u, tu, tl, par):
    """(dD/dt [m/s], extra surface flux [W/m^2]) of a stagnant lid with conductive flux q_lid at its base,
    q_u from the convecting mantle below, mantle temperature tu and lid-base temperature tl [K]."""
    rho_c = par[P_RHO_TOP] * par[P_CM]
    t_mean = 0.5 * (par[P_T_EQ] + tl)
    if par[P_LID_LAW] > 0.5:
        rate = (q_lid - q_u) / (rho_c * max(tu - tl, 1.0))
        return rate, rho_c * (tl - t_mean) * rate
    return (q_lid - q_u) / (rho_c * max(tu - t_mean, 1.0)), 0.0
