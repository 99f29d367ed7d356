"""Growth of the stagnant lid of the boundary-layer scheme: the law, and the temperature at which the mantle's
stored heat counts the lid's rock (:func:`meltzone._core.physics.mantle_energy`).

The lid is a conductive layer with a linear profile from the surface temperature T_s to T_l at its base; its
conductive flux is q_lid = k (T_l - T_s) / D. Two growth laws (``convection.lid_growth_law``), each with the
bookkeeping that makes the convecting mantle lose exactly q_u at the lid's base (so the budget closes):

* base flux (the default, ``P_LID_LAW`` = 1): rho c (T_u - T_l) dD/dt = q_lid - q_u, the usual form of
  parameterised stagnant-lid models (Schubert & Spohn 1990, JGR 95:14095; Morschhauser, Grott & Breuer 2011,
  Icarus 212:541; the form from memory: the searched public text did not show the equation): rock added at the
  base cools from T_u to T_l. The stored heat counts the lid's rock at T_l, as these models leave the lid's
  internal cooling out of the mantle's budget; the surface heat flow is q_lid. (Counting it at its mean
  T_lm = (T_eq + T_l) / 2 instead, with that cooling released at the surface, made the lid's flux ~5x larger in
  the blend with the magma-ocean law and the integration stiff under a grey atmosphere: measured, a 3 M_E planet
  took 20,000 steps for its first 54 Myr.)
* heat-balance integral (``P_LID_LAW`` = 0): rho c (T_u - T_lm) dD/dt = q_lid - q_u (Goodman 1958, Trans. ASME
  80:335, integral method with a linear profile; from memory), the lid's rock counted at T_lm: its whole heat
  change is paid at its base.

For a lid on a non-convecting mantle (q_u = 0) they give D^2 = 2 kappa t St_eff with St_eff =
(T_l - T_s) / (T_u - T_l) (base flux) or (T_l - T_s) / (T_u - T_lm) (integral); the exact conduction solution
(a Stefan problem with the jump T_u - T_l in place of latent heat, Carslaw & Jaeger 1959) lies between the two
(see tests/test_lid_growth.py).

The lid never thins below its minimum thickness P_LID_MIN (the one the scheme resolves, and starts from): within
D_min of the floor a thinning rate is scaled by s_D = smoothstep((D - D_min) / D_min), so that D approaches D_min
without crossing it and the rate stays continuous in D (:func:`floored_rate`; this model's choice, width D_min).
A growing rate r is scaled by s_D + (1 - s_D) smoothstep(r / r_w), r_w = kappa / D_min: the floored
rate is then C1 in the rate too (slope s_D on both sides of r = 0), stays 0 at r = 0 (no spurious growth) and is
r itself for r >= r_w and for D >= 2 D_min (this model's choice; a growing rate left unscaled made the slope
jump from s_D to 1 where the lid law's rate changes sign with the lid at its floor). r_w is the rate at which
a lid of D_min grows by its own thickness in its conductive time D_min^2 / kappa (32 kyr at 1 km), the scale of
the law's rates there (~k dT / (D_min rho c dT_u) ~ 2e-8 m/s): with r_w = D_min / 1 Myr, 30 times smaller, the
floored rate turned over within ~0.01 K of T_u where the lid sits near its floor while the top blends into the
magma-ocean law (the lid law against the relaxation to D_min): the Rosenbrock Jacobian's difference in the
mantle's energy (~0.01 K) misjudged the lid's row by a factor 4, Rodas3's error estimate grew as h^2 and held the
steps at ~1 kyr (measured: 8 and 12 M_E stagnant-lid planets, 75,000 and 58,000 steps to 4.5 Gyr, 2,600 and
2,400 with kappa / D_min; the results within 1e-6).
Whatever follows the lid
(the crust's base in meltzone._core.volcanism) takes this floored rate, not the law's: at the floor the law's
rate is the thinning the floor holds back. Before the floor, a lid whose
convecting mantle delivered more heat than it conducted (q_u > q_lid, e.g. a mantle held warm by a bright
young star) thinned at a rate taken at D_min (every law reads max(D, D_min)) without end: measured, a 0.61 M_E
planet at 0.0102 AU of a 0.57 M_sun star reached D = -6600 km, and its lid then needed 0.46 Gyr to climb back
to a positive thickness while the physics asked it to grow.
"""

from __future__ import annotations

from ._jit import njit
from .layout import P_CM, P_KAPPA, P_LID_LAW, P_LID_MIN, P_RHO_TOP, P_T_EQ


@njit(leaf=True)
def lid_heat_temperature(tl, par):
    """Temperature [K] at which the stored heat counts the lid's rock: T_l (base flux) or the mean of the linear
    profile, (T_eq + T_l) / 2 (heat-balance integral)."""
    return tl if par[P_LID_LAW] > 0.5 else 0.5 * (par[P_T_EQ] + tl)


@njit(leaf=True)
def lid_growth(q_lid, q_u, tu, tl, par):
    """dD/dt [m/s] of a stagnant lid with conductive flux q_lid at its base, q_u from the convecting mantle below,
    mantle temperature tu and lid-base temperature tl [K]: q_lid - q_u over rho c (tu - the temperature of
    :func:`lid_heat_temperature`)."""
    return (q_lid - q_u) / (par[P_RHO_TOP] * par[P_CM] * max(tu - lid_heat_temperature(tl, par), 1.0))


@njit(leaf=True)
def smoothstep(x):
    """0 for x <= 0, 3 x^2 - 2 x^3 between, 1 for x >= 1 (C1; common practice)."""
    if x <= 0.0:
        return 0.0
    if x >= 1.0:
        return 1.0
    return x * x * (3.0 - 2.0 * x)


@njit(leaf=True)
def smoothstep_slope(x):
    """d smoothstep / dx: 6 x (1 - x) between 0 and 1, else 0."""
    return 6.0 * x * (1.0 - x) if 0.0 < x < 1.0 else 0.0


@njit(leaf=True)
def floored_rate(rate, d, par):
    """dD/dt [m/s] with the floor of the module: ``rate`` times s_D + (1 - s_D) smoothstep(rate / r_w), s_D =
    smoothstep((D - D_min) / D_min), r_w = kappa / D_min; ``rate`` itself for D >= 2 D_min. A thinning
    rate is scaled by s_D (0 at and below D_min), a growing one above r_w is unchanged."""
    x = (d - par[P_LID_MIN]) / par[P_LID_MIN]
    if x >= 1.0:
        return rate
    s_d = smoothstep(x)
    return rate * (s_d + (1.0 - s_d) * smoothstep(rate * par[P_LID_MIN] / par[P_KAPPA]))
