"""Pressure-dependent mantle properties of the boundary-layer scheme: thermal expansivity, conductivity and
diffusivity as functions of density, and positions on the mantle grid by depth.

With ``P_PROPS`` on (``convection.mantle_properties = "density"``), at density rho:

* alpha = alpha0 (rho0 / rho)^delta_T, the Anderson-Grueneisen form with a constant delta_T (Reynard & Price 1990,
  GRL 17:689, abstract checked: delta_T 4-6 for mantle minerals within one phase, 2-3 inferred from seismic data
  along the mantle);
* k = k0 (rho / rho0)^g, a power law of compression (Manga & Jeanloz 1997, JGR 102:2999, abstract checked: a power
  law in compression, k ~ 5-12 W/m/K through the lower mantle);
* kappa = k / (rho c_p), i.e. kappa0 (rho / rho0)^(g - 1);

with alpha0, k0 and kappa0 the configured values, taken at rho0 = the density of the surface rock (so the top
of a mobile-lid mantle keeps them). Off, all three are the configured constants. The lower boundary layer takes
them at its own node; the upper one where its viscosity is taken (``P_RA_VISC``,
:func:`meltzone._core.physics.solid_viscosity`): the surface (T_u, surface pressure and surface melt fraction:
the scheme before this switch), the base of the upper boundary layer below the top of the convecting mantle (the
hot side of the layer, whose viscosity the boundary-layer stability argument uses: Stevenson, Spohn & Schubert
1983, Icarus 54:466; stagnant-lid scalings take the interior viscosity below the lid, Solomatov & Moresi 2000, JGR
105:21795; from memory), or mid-depth of the convecting mantle (a whole-mantle Rayleigh number with a mid-mantle
viscosity, as discussed for the deep mantles of super-Earths: Stamenkovic et al. 2012, ApJ 748:41; Tackley et al.
2013, Icarus 225:50; abstracts checked, their exact choices from memory), on the adiabat there.
"""

from __future__ import annotations

from ._jit import njit
from .layout import G_R, P_ALPHA_EXP, P_K_EXP, P_PROPS, P_RHO_REF


@njit(leaf=True)
def property_factors(rho, par):
    """(alpha / alpha0, k / k0, kappa / kappa0) at density rho [kg/m^3] (module docstring); 1 when off."""
    if par[P_PROPS] < 0.5 or rho <= 0.0:
        return 1.0, 1.0, 1.0
    x = rho / par[P_RHO_REF]
    fk = x ** par[P_K_EXP]
    return x ** (-par[P_ALPHA_EXP]), fk, fk / x


@njit(leaf=True)
def depth_index(z, grid):
    """(j, s): depth z [m] below the surface lies between nodes j and j + 1 at fraction s (clamped to the mantle)."""
    n = grid.shape[1]
    r = grid[G_R, n - 1] - z
    if r >= grid[G_R, n - 1]:
        return n - 2, 1.0
    for j in range(n - 2, -1, -1):
        if grid[G_R, j] <= r:
            return j, (r - grid[G_R, j]) / (grid[G_R, j + 1] - grid[G_R, j])
    return 0, 0.0


@njit(leaf=True)
def at_depth(z, grid, row):
    """Value of grid row ``row`` at depth z [m] below the surface (linear between nodes)."""
    j, s = depth_index(z, grid)
    return grid[row, j] + s * (grid[row, j + 1] - grid[row, j])
