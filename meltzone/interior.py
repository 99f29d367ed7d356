"""Hydrostatic interior structure from equations of state -> :class:`Interior`.

Method
------
Mass continuity and hydrostatic equilibrium with self-consistent gravity,

    dm/dr = 4 pi r^2 rho,     dP/dr = -G m rho / r^2,

are integrated inward from the surface (m = M, P = P_surface) with classical
RK4 in numba (:mod:`meltzone._core.structure`). The core-mantle boundary is
where the enclosed mass falls to the core mass; mantle phase boundaries are
where (P, T_ref) crosses a Clapeyron line of :mod:`meltzone.phases`; each is
located inside its step by bisection so that no step straddles a density
jump. The radius is found by Brent's method (scipy.optimize.brentq) so that
the mass left at the centre vanishes (relative 1e-10 of the planet mass),
which makes the core hold the requested mass fraction and the surface the
requested pressure. The interior is solved once and then held fixed during
the evolution (common practice in parameterized models).

Adiabat shape: along the reference adiabat, d ln T / d ln rho = gamma with
gamma = gamma0 (rho0/rho)^q per phase (carried as dT/dr = gamma T / K dP/dr),
so f(r) = T_adiabat(r) / T_top is independent of the temperature scale.

Validity: 0.1-20 Earth masses, core mass fraction 0-0.8 (tested); the mantle
equations of state are measured to ~0.15 TPa (silicates) and the iron curve to
~0.3 TPa; deeper they are extrapolated and flagged by :mod:`meltzone.phases`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np
from scipy.optimize import brentq

from . import phases
from .config import PlanetSpec, as_spec
from .constants import EARTH_MASS, EARTH_RADIUS, GPA, G
from .eos import IRON, Material, mantle_materials
from .errors import ConfigError, ConvergenceError, ModelError

#: Relative tolerance on the planet mass at convergence.
MASS_TOLERANCE = 1e-10


@dataclass(frozen=True)
class Interior:
    """Radial structure on nodes, centre to surface (SI units).

    Node arrays (length n): ``r`` [m], ``m`` enclosed mass [kg], ``P`` [Pa],
    ``rho`` [kg/m^3], ``g`` [m/s^2], ``phase`` (index into
    :data:`meltzone.phases.MANTLE_PHASES`, -1 in the core), ``T_ref`` [K] on the
    reference adiabat, ``adiabat`` f(r) = T_adiabat/T_top in the mantle and
    T/T_cmb in the core (from :func:`build_interior`: liquid iron's isentrope, see
    :func:`with_liquid_core_adiabat`; from :func:`solve_structure`: the structure's own core temperature).
    Nodes ``0 .. cmb_index-1`` are the core; the mantle starts at ``cmb_index`` (the CMB radius appears once on
    each side).
    """

    mass: float
    core_mass: float
    radius: float
    core_radius: float
    cmb_pressure: float
    center_pressure: float
    surface_pressure: float
    surface_gravity: float
    mean_density: float
    moment_of_inertia_factor: float
    r: np.ndarray
    m: np.ndarray
    P: np.ndarray
    rho: np.ndarray
    g: np.ndarray
    phase: np.ndarray
    T_ref: np.ndarray
    adiabat: np.ndarray
    cmb_index: int
    reference_potential_temperature: float
    materials: tuple = field(default=(), repr=False)
    iterations: int = 0

    # convenience views -------------------------------------------------
    @property
    def mantle(self) -> slice:
        return slice(self.cmb_index, len(self.r))

    @property
    def core(self) -> slice:
        return slice(0, self.cmb_index)

    @property
    def mantle_mass(self) -> float:
        return self.mass - self.core_mass

    def phase_layers(self) -> list[dict]:
        """Contiguous mantle phase intervals, surface down (SI)."""
        r = self.r[self.mantle]
        ph = self.phase[self.mantle]
        p = self.P[self.mantle]
        out = []
        start = len(r) - 1
        for i in range(len(r) - 1, -1, -1):
            if i == 0 or ph[i - 1] != ph[start]:
                bottom = i - 1 if i > 0 else 0
                # the phase ends at the boundary node below (shared by both phases)
                out.append({
                    "phase": phases.MANTLE_PHASES[int(ph[start])],
                    "top_depth_m": float(self.radius - r[start]),
                    "bottom_depth_m": float(self.radius - r[bottom]),
                    "top_pressure_pa": float(p[start]),
                    "bottom_pressure_pa": float(p[bottom]),
                })
                start = i - 1
        return out

    def summary_dict(self) -> dict:
        """The scalars and the phase layers, as JSON-ready SI values."""
        return {
            "mass_kg": self.mass,
            "core_mass_kg": self.core_mass,
            "radius_m": self.radius,
            "core_radius_m": self.core_radius,
            "surface_gravity_m_s2": self.surface_gravity,
            "surface_pressure_pa": self.surface_pressure,
            "cmb_pressure_pa": self.cmb_pressure,
            "center_pressure_pa": self.center_pressure,
            "mean_density_kg_m3": self.mean_density,
            "moment_of_inertia_factor": self.moment_of_inertia_factor,
            "layers": self.phase_layers(),
        }


def zeng2016_radius(mass_kg: float, core_mass_fraction: float) -> float:
    """Radius [m] from R/R_E = (1.07 - 0.21 CMF) (M/M_E)^(1/3.7).

    Zeng, Sasselov & Jacobsen 2016, ApJ 819:127, eq. 8; fitted for 1-8 M_E and
    CMF 0-0.4. Used here as the starting guess of the radius search.
    """
    return (1.07 - 0.21 * core_mass_fraction) * (mass_kg / EARTH_MASS) ** (1.0 / 3.7) * EARTH_RADIUS


def solve_structure(mass_kg: float, core_mass_kg: float, *, surface_pressure: float = 1e5,
                    reference_temperature: float = 1600.0, core_material: Material = IRON,
                    mantle: list[Material] | None = None, boundaries: np.ndarray | None = None,
                    integration_steps: int = 1000, mantle_nodes: int = 256, core_nodes: int = 64) -> Interior:
    """Solve the structure for explicit materials (the engine behind :func:`build_interior`).

    ``mantle`` lists one material per phase in the order of ``boundaries`` (a
    (n, 3) array of P0 [Pa], T0 [K], slope [Pa/K]); a single mantle material
    with ``boundaries`` of shape (0, 3) gives a one-phase mantle. A
    ``core_mass_kg`` equal to ``mass_kg`` gives a planet of core material only.
    """
    from ._core import structure as k

    if mantle is None:
        mantle = mantle_materials(0.1)
    if boundaries is None:
        boundaries = phases.boundary_table()
    boundaries = np.ascontiguousarray(boundaries, dtype=np.float64).reshape(-1, 3)
    mantle_rows = np.ascontiguousarray(np.array([m.row() for m in mantle]), dtype=np.float64)
    core_row = core_material.row()
    if boundaries.shape[0] < mantle_rows.shape[0] - 1:
        raise ValueError("need one boundary between each pair of mantle phases")
    args = (float(mass_kg), float(core_mass_kg), float(surface_pressure), float(reference_temperature),
            int(integration_steps), core_row, mantle_rows, boundaries)

    guess = zeng2016_radius(mass_kg, min(core_mass_kg / mass_kg, 0.8))
    calls = [0]

    scratch = np.empty((1, k.PATH_COLS))

    def resid(radius):
        calls[0] += 1
        return k.integrate_inward(radius, *args, scratch, False)[2]  # the same signature as the stored run

    # the residual falls with the radius: too small a planet leaves mass at the centre (> 0),
    # too large a one runs out of mass above it (< 0)
    lo, hi = 0.85 * guess, 1.15 * guess
    f_lo, f_hi = resid(lo), resid(hi)
    for _ in range(30):
        if f_lo > 0.0 > f_hi:
            break
        if f_lo <= 0.0:
            hi, f_hi = lo, f_lo
            lo *= 0.8
            f_lo = resid(lo)
        else:
            lo, f_lo = hi, f_hi
            hi *= 1.25
            f_hi = resid(hi)
    else:
        raise ConvergenceError(f"no radius bracket found for M = {mass_kg / EARTH_MASS:g} M_E; the solver is tested "
                               "for 0.1-20 Earth masses and core mass fractions 0-0.8")
    radius = brentq(resid, lo, hi, xtol=1e-11 * guess, rtol=1e-13, maxiter=200)
    path = np.empty((4 * int(integration_steps) + 256, k.PATH_COLS))
    status, n, residual = k.integrate_inward(radius, *args, path, True)
    if status != k.REACHED_CENTRE and status != k.EMPTIED or abs(residual) > 1e2 * MASS_TOLERANCE:
        raise ConvergenceError(f"the structure of a {mass_kg / EARTH_MASS:g} M_E planet with core mass fraction "
                               f"{core_mass_kg / mass_kg:g} did not converge (mass residual {residual:.2e}); the "
                               "solver is tested for 0.1-20 Earth masses and core mass fractions 0-0.8; try "
                               "interior.integration_steps = 4000")
    path = path[:n][::-1]  # centre -> surface
    # close the path at r = 0: below r_stop (1e-3 R) pressure, temperature and density are uniform
    # to O((r_stop / R)^2); the moment of inertia of that sphere is added
    centre = path[0].copy()
    centre[k.PATH_I] += (8.0 * math.pi / 15.0) * centre[k.PATH_RHO] * centre[k.PATH_R] ** 5
    centre[k.PATH_R] = 0.0
    centre[k.PATH_M] = 0.0
    path = np.vstack([centre, path])
    return _nodes_from_path(path, mass_kg, core_mass_kg, surface_pressure, reference_temperature,
                            mantle_nodes, core_nodes, (core_material, *mantle), calls[0], core_row, mantle_rows)


def _nodes_from_path(path, mass, core_mass, p_surface, t_ref, mantle_nodes, core_nodes, materials, calls,
                     core_row, mantle_rows) -> Interior:
    from ._core import structure as k

    r_all = path[:, k.PATH_R]
    region = path[:, k.PATH_REGION].astype(np.int64)
    radius = float(r_all[-1])
    in_core = region < 0
    r_cmb = float(r_all[in_core].max()) if in_core.any() else 0.0
    moment = float(path[0, k.PATH_I])  # accumulated inward from the surface to the centre

    # --- node radii: uniform in each shell, refined around every boundary
    boundaries_r = [r_all[i] for i in range(1, len(r_all)) if region[i] != region[i - 1] and region[i] >= 0
                    and region[i - 1] >= 0]
    boundaries_r = sorted(set(float(b) for b in boundaries_r))
    mantle_r = np.linspace(r_cmb, radius, mantle_nodes)
    dr = (radius - r_cmb) / (mantle_nodes - 1) if mantle_nodes > 1 else radius
    extra = []
    for rb in boundaries_r + [r_cmb, radius]:
        extra.append(rb)
        for s in (0.125, 0.25, 0.5):
            extra.extend([rb - s * dr, rb + s * dr])
    mantle_r = np.unique(np.concatenate([mantle_r, [x for x in extra if r_cmb <= x <= radius]]))
    core_r = np.linspace(0.0, r_cmb, core_nodes) if r_cmb > 0 else np.empty(0)
    if r_cmb > 0:
        extra_c = [r_cmb - s * r_cmb / (core_nodes - 1) for s in (0.125, 0.25, 0.5)]
        core_r = np.unique(np.concatenate([core_r, extra_c]))

    # --- interpolate the path per region segment
    def interp(rq, mask, col):
        rs = r_all[mask]
        vs = path[mask, col]
        return np.interp(rq, rs, vs)

    def segment_values(rq, is_core):
        out = np.empty((len(rq), 5))
        reg = np.empty(len(rq), dtype=np.int64)
        if is_core:
            mask = in_core
            for j, col in enumerate((k.PATH_M, k.PATH_P, k.PATH_T, k.PATH_RHO)):
                out[:, j] = interp(rq, mask, col)
            reg[:] = -1
        else:
            # each mantle node takes the region whose radial span holds it (upper phase at a boundary)
            mant = ~in_core
            for ph in np.unique(region[mant]):
                m_ph = mant & (region == ph)
                lo_r, hi_r = r_all[m_ph].min(), r_all[m_ph].max()
                sel = (rq >= lo_r) & (rq <= hi_r)
                for j, col in enumerate((k.PATH_M, k.PATH_P, k.PATH_T, k.PATH_RHO)):
                    out[sel, j] = interp(rq[sel], m_ph, col)
                reg[sel] = ph
        return out, reg

    if r_cmb > 0:
        cvals, creg = segment_values(core_r, True)
    else:
        cvals, creg = np.empty((0, 5)), np.empty(0, dtype=np.int64)
    if radius > r_cmb and (~in_core).any():
        mvals, mreg = segment_values(mantle_r, False)
    else:
        mvals, mreg, mantle_r = np.empty((0, 5)), np.empty(0, dtype=np.int64), np.empty(0)
    r = np.concatenate([core_r, mantle_r])
    vals = np.concatenate([cvals, mvals])
    phase = np.concatenate([creg, mreg])
    m = vals[:, 0]
    if len(core_r):
        m[: len(core_r)][core_r == r_cmb] = core_mass
        m[0] = 0.0
    P = vals[:, 1]
    T = vals[:, 2]
    rho = vals[:, 3]
    with np.errstate(divide="ignore", invalid="ignore"):
        g = np.where(r > 0, G * m / np.where(r > 0, r, 1.0) ** 2, 0.0)
    cmb_index = len(core_r)
    adiabat = np.empty_like(T)
    if cmb_index:
        adiabat[:cmb_index] = T[:cmb_index] / T[cmb_index - 1]
    if len(mantle_r):
        adiabat[cmb_index:] = T[cmb_index:] / T[-1]
    center_p = float(path[0, k.PATH_P])
    cmb_p = float(P[cmb_index]) if cmb_index and len(mantle_r) else (float(P[cmb_index - 1]) if cmb_index else
                                                                     center_p)
    return Interior(
        mass=float(mass), core_mass=float(core_mass), radius=radius, core_radius=r_cmb,
        cmb_pressure=cmb_p, center_pressure=center_p, surface_pressure=float(p_surface),
        surface_gravity=G * mass / radius**2, mean_density=mass / (4.0 / 3.0 * math.pi * radius**3),
        moment_of_inertia_factor=moment / (mass * radius**2),
        r=r, m=m, P=P, rho=rho, g=g, phase=phase, T_ref=T, adiabat=adiabat, cmb_index=cmb_index,
        reference_potential_temperature=float(t_ref), materials=tuple(materials), iterations=calls,
    )


def build_interior(spec: PlanetSpec | dict | str | None = None, *, check_melting: bool = True,
                   core_profile: bool = True, **kwargs) -> Interior:
    """Interior of the planet described by ``spec`` (PlanetSpec, mapping, TOML path or flat kwargs).

    With ``check_melting`` (the default) the spec's melting model must cover every mantle pressure
    (:func:`check_melting_range`), so that an evolution of this planet can evaluate its curves. With
    ``core_profile`` (the default) the core's thermal profile is liquid iron's isentrope
    (:func:`with_liquid_core_adiabat`, ~60 ms); without it the structure's own (for callers that need the
    structure only, such as :func:`infer_core_fraction`).
    """
    spec = as_spec(spec, **kwargs)
    mass = spec.planet.mass_earth * EARTH_MASS
    core_material = IRON.scaled_density(1.0 - spec.interior.core_density_deficit,
                                        f"{100 * spec.interior.core_density_deficit:g}% light-element deficit")
    interior = solve_structure(
        mass, spec.planet.core_mass_fraction * mass,
        surface_pressure=spec.interior.surface_pressure_pa,
        reference_temperature=spec.interior.reference_potential_temperature_k,
        core_material=core_material,
        mantle=mantle_materials(spec.interior.mantle_fe_fraction),
        integration_steps=spec.interior.integration_steps,
        mantle_nodes=spec.interior.mantle_nodes,
        core_nodes=spec.interior.core_nodes,
    )
    if core_profile:
        interior = with_liquid_core_adiabat(interior, spec.melting.core_melting_depression_k)
    if check_melting:
        check_melting_range(spec, interior)
    return interior


def with_liquid_core_adiabat(interior: Interior, depression_k: float) -> Interior:
    """The interior with the core's thermal profile (``adiabat`` on the core nodes, T / T_cmb) replaced by
    liquid iron's isentrope through the core's pressures (:mod:`meltzone.liquid_iron`: why the liquid, and why only
    the profile). The isentrope is anchored at the alloy's melting temperature at the CMB (the coolest liquid
    core; :func:`meltzone.iron.iron_melting_temperature` with the spec's depression): its shape moves by < 0.1%
    between anchors 3500 and 4500 K at Earth's CMB (measured). ``T_ref`` stays the structure's integration
    temperature. Unchanged without a core or without a mantle above it. Where the depression leaves no positive
    melting temperature at the CMB (a shallow CMB with ``melting.core_melting_depression_k`` near its 3000 K
    limit) the anchor is pure iron's melting point; the evolution then refuses the curve with its own error."""
    from .iron import iron_melting_temperature
    from .liquid_iron import core_adiabat

    nc = interior.cmb_index
    if nc < 2 or nc >= len(interior.r):
        return interior
    p_core = interior.P[:nc]
    p_cmb = float(p_core[-1])
    try:
        anchor = float(iron_melting_temperature(p_cmb, depression_k))
    except ModelError:  # a depression beyond the curve at a shallow CMB: pure iron's melting point instead
        anchor = float(iron_melting_temperature(p_cmb, 0.0))
    f = core_adiabat(p_core, p_cmb, anchor)
    adiabat = interior.adiabat.copy()
    adiabat[:nc] = f
    return replace(interior, adiabat=adiabat)


def check_melting_range(spec: PlanetSpec, interior: Interior) -> None:
    """ConfigError naming planet.mass_earth, melting.model (and the table file or surface pressure where they
    matter) when the mantle's pressures leave the evaluable range of the spec's melting model."""
    from .config import MASS_LIMITS_EARTH
    from .melting import TABLE_MODEL_ID, get_model

    model = get_model(spec.melting.model, spec.melting.table_file or None)
    p = interior.P[interior.mantle]
    if not len(p):
        return
    p_lo, p_hi = float(p.min()), float(p.max())
    slack = 1e-9 * max(model.max_pressure_pa, 1.0)
    if model.min_pressure_pa - slack <= p_lo and p_hi <= model.max_pressure_pa + slack:
        return
    name = f"melting.model = {model.id!r}" + (f" (melting.table_file = {spec.melting.table_file!r})"
                                              if model.id == TABLE_MODEL_ID else "")
    span = (f"the mantle spans {p_lo / GPA:.4g}-{p_hi / GPA:.4g} GPa, {name} covers "
            f"{model.min_pressure_pa / GPA:g}-{model.max_pressure_pa / GPA:g} GPa")
    if p_hi > model.max_pressure_pa + slack:
        raise ConfigError(f"planet.mass_earth = {spec.planet.mass_earth:g} (planet.core_mass_fraction = "
                          f"{spec.planet.core_mass_fraction:g}): {span}; lower planet.mass_earth (the default model "
                          f"covers up to {MASS_LIMITS_EARTH[1]:g} M_E at any core fraction) or choose another "
                          "melting.model (see `meltzone curves`)")
    raise ConfigError(f"interior.surface_pressure_pa = {spec.interior.surface_pressure_pa:g}: {span}; raise the "
                      "surface pressure or choose a melting model that starts lower")


# ---------------------------------------------------------------------- inversion: mass and radius -> core fraction
#: Bracket [lower, upper] of the core mass fraction searched by :func:`infer_core_fraction`.
CORE_FRACTION_BRACKET = (0.0, 0.8)
#: Interior settings used for the inversion unless overridden (the radius changes by < 1e-8
#: relative between these and the defaults 256 / 1500; checked with meltzone.interior.build_interior).
INVERSION_DEFAULTS = {"interior.mantle_nodes": 64, "interior.integration_steps": 400}
#: Absolute tolerance on the inferred core mass fraction.
INVERSION_XTOL = 1.0e-5


def infer_core_fraction(mass_earth: float, radius_earth: float, **spec_overrides):
    """Core mass fraction that gives a planet of this mass the observed radius, or None.

    Solves R(CMF; M) = R_obs for CMF in [0, 0.8] with Brent's method
    (scipy.optimize.brentq; Brent 1973, *Algorithms for Minimization without
    Derivatives*) over the radius of :func:`meltzone.interior.build_interior`,
    which falls monotonically with the core mass fraction at fixed mass (a
    denser planet is smaller). Returns None when no rocky composition in the
    bracket fits: R_obs above R(CMF = 0) (too large: needs volatiles or a
    lighter mantle) or below R(CMF = 0.8) (too dense: iron-rich beyond the
    bracket).

    Parameters
    ----------
    mass_earth : float
        Planet mass [Earth masses].
    radius_earth : float
        Planet radius [Earth radii, 6.371e6 m].
    **spec_overrides
        Other config keys (flat or ``section.key`` names) of the planet, e.g.
        ``mantle_fe_fraction=0.15``; by default the interior uses
        ``interior.mantle_nodes = 64`` and ``interior.integration_steps = 400``
        (the radius is insensitive to both; see :data:`INVERSION_DEFAULTS`).

    Returns
    -------
    float or None
        The core mass fraction (to 1e-5), or None when no value in [0, 0.8] fits.
    """
    from .errors import ConfigError

    if not (math.isfinite(mass_earth) and math.isfinite(radius_earth)) or radius_earth <= 0.0:
        raise ConfigError(f"infer_core_fraction: mass {mass_earth!r} and radius {radius_earth!r} must be "
                          "finite and positive")
    overrides = dict(INVERSION_DEFAULTS)
    overrides.update(spec_overrides)
    base = PlanetSpec(**overrides).replace(mass_earth=float(mass_earth))

    steps = base.interior.integration_steps

    def excess(cmf: float) -> float:
        # the structure solver occasionally fails to bracket the radius (NaN residual) for iron-rich
        # planets at one step count; the radius differs by < 1e-8 relative between step counts, so a
        # retry at other counts changes the root by far less than INVERSION_XTOL
        first = None
        for n_steps in dict.fromkeys((steps, max(steps, 1500), 2 * max(steps, 1500) + 7)):
            try:
                it = build_interior(base.replace(core_mass_fraction=float(cmf), integration_steps=n_steps),
                                    core_profile=False)  # the radius only
            except ConfigError:
                raise
            except (ValueError, ArithmeticError, ConvergenceError) as exc:
                first = first or exc
                continue
            return it.radius / EARTH_RADIUS - radius_earth
        raise ConvergenceError(f"interior solver failed at core mass fraction {cmf:.4f} for M = {mass_earth:.4g} "
                               f"M_E ({type(first).__name__}: {str(first).strip()})")

    lo, hi = CORE_FRACTION_BRACKET
    f_lo = excess(lo)
    if f_lo < 0.0:
        return None  # larger than a coreless rocky planet
    f_hi = excess(hi)
    if f_hi > 0.0:
        return None  # smaller than the densest rocky planet of the bracket
    if f_lo == 0.0:
        return lo
    if f_hi == 0.0:
        return hi
    return float(brentq(excess, lo, hi, xtol=INVERSION_XTOL, rtol=1e-12))
