"""Plain reference laws of the boundary-layer scheme's lid growth and pressure-dependent properties, used by
tests/reference_evolution.py (written from the equations; no kernel import)."""

from __future__ import annotations


def lid_heat_temperature(tl, ph):
    """Temperature of the lid's rock in the stored heat: T_l with the base-flux law (Schubert & Spohn 1990, JGR
    95:14095; Morschhauser et al. 2011, Icarus 212:541; from memory: the lid's internal cooling is outside the
    budget), the mean of its linear profile (T_eq + T_l) / 2 with the heat-balance integral (Goodman 1958)."""
    return tl if ph.lid_law == "base-flux" else 0.5 * (ph.equilibrium_temperature + tl)


def lid_growth(q_lid, q_u, tu, tl, ph):
    """dD/dt = (q_lid - q_u) / (rho c (T_u - T_lid)) with T_lid of :func:`lid_heat_temperature`: rho c (T_u - T_l)
    dD/dt = q_lid - q_u (base flux) or rho c (T_u - T_lm) dD/dt = q_lid - q_u (heat-balance integral)."""
    return (q_lid - q_u) / (ph.density_top * ph.heat_capacity * max(tu - lid_heat_temperature(tl, ph), 1.0))


def properties(rho, ph):
    """(alpha, k, kappa) at density rho: alpha0 (rho0/rho)^delta_T (Anderson-Grueneisen form, Reynard & Price 1990,
    GRL 17:689), k0 (rho/rho0)^g (Manga & Jeanloz 1997, JGR 102:2999), kappa = k / (rho c_p) = kappa0 (rho/rho0)^(g-1),
    rho0 the surface rock's density; the configured constants with convection.mantle_properties = "constant"."""
    if not ph.density_properties:
        return ph.expansivity, ph.conductivity, ph.diffusivity
    x = rho / ph.reference_density
    return (ph.expansivity * x ** -ph.expansivity_exponent, ph.conductivity * x ** ph.conductivity_exponent,
            ph.diffusivity * x ** (ph.conductivity_exponent - 1.0))
