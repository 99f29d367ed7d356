"""Equations of state and the material table.

Cold (300 K) compression curves plus a thermal pressure on the reference
adiabat, P(rho, T) = P_cold(rho) + gamma(rho) rho c_v (T - 300 K), the
high-temperature (Dulong-Petit, c_v = 3 n R / M) limit of the
Mie-Grueneisen-Debye form (common practice; e.g. Jackson & Rigden 1996,
PEPI 96:85 for the MGD model). Electronic and anharmonic terms are neglected.
Without it (``Material.cold()``) a planet is 1-3% smaller than warm, PREM-based
models (Zeng, Sasselov & Jacobsen 2016, ApJ 819:127).

Forms
-----
* Vinet (Vinet et al. 1987, J. Geophys. Res. 92:9319)::

      P = 3 K0 (1 - x) x^-2 exp[1.5 (K0' - 1)(1 - x)],   x = (rho0/rho)^(1/3)

* Third-order Birch-Murnaghan (Birch 1947, Phys. Rev. 71:809)::

      P = 1.5 K0 (y^7 - y^5) [1 + 0.75 (K0' - 4)(y^2 - 1)],   y = (rho/rho0)^(1/3)

* Incompressible (rho = rho0), for analytic checks only.

Both compressible forms are monotonic over the compressions reached in rocky
planets of up to 20 Earth masses (rho/rho0 < 4); the root finder keeps its
bracket inside the rising branch.

Grueneisen parameter per phase: gamma = gamma0 (rho0/rho)^q (common practice;
Anderson 1979 form).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from .constants import (
    CM3_PER_MOL,
    GAS_CONSTANT,
    GPA,
    MOLAR_MASS_FE,
    MOLAR_MASS_MG,
    MOLAR_MASS_O,
    MOLAR_MASS_SI,
)
from ._core.layout import FORM_BM3, FORM_INCOMPRESSIBLE, FORM_VINET, MATERIAL_COLUMNS  # noqa: F401

#: Temperature of the cold compression curves [K].
REFERENCE_TEMPERATURE = 300.0


@dataclass(frozen=True)
class Material:
    """One equation of state with its Grueneisen parameters (SI units)."""

    name: str
    form: int
    rho0: float  # kg/m^3
    k0: float  # Pa
    kp: float  # 1
    gamma0: float  # 1
    q: float  # 1
    source: str
    cv: float = 0.0  # J/kg/K, Dulong-Petit 3nR/M; 0 switches the thermal pressure off

    def row(self) -> np.ndarray:
        """The material as a float64 row for the kernels (columns MAT_* of :mod:`meltzone._core.layout`)."""
        return np.array([getattr(self, name) for name in MATERIAL_COLUMNS], dtype=np.float64)

    def scaled_density(self, factor: float, label: str) -> "Material":
        """Same compression curve with every density multiplied by ``factor``."""
        return replace(self, name=f"{self.name} ({label})", rho0=self.rho0 * factor)

    def cold(self) -> "Material":
        """The same material without thermal pressure (300 K curve only)."""
        return replace(self, cv=0.0)


# --- Core --------------------------------------------------------------------
#: epsilon (hcp) iron, Vinet fit: rho0 8300 kg/m^3, K0 156.2 GPa, K0' 6.08
#: (Seager et al. 2007, ApJ 669:1279, Table 1, after Anderson et al. 2001).
#: Valid to the ~0.3 TPa of the experiments it fits; used beyond that as the
#: usual extrapolation of mass-radius studies. Core Grueneisen parameter 1.5,
#: constant (Labrosse 2015, Phys. Earth Planet. Inter. 247:36). This is the structure's core; the core's
#: thermal profile that the evolution reads is liquid iron's isentrope (:mod:`meltzone.liquid_iron`).
IRON = Material("epsilon-iron", FORM_VINET, 8300.0, 156.2 * GPA, 6.08, 1.5, 0.0,
                "Seager et al. 2007, ApJ 669:1279 (Vinet fit of Anderson et al. 2001); gamma: Labrosse 2015, PEPI 247:36",
                cv=3.0 * GAS_CONSTANT / MOLAR_MASS_FE)

# --- Mantle end members (V0 in cm^3/mol of formula unit) ------------------
# name: (formula unit Mg sites, Si, O, V0, K0 [GPa], K0', gamma0, q, source)
_END_MEMBERS = {
    # Crystals 2025, 15:221 (MGD parameter compilation): forsterite V0, K0, K', gamma0, q.
    "forsterite": (2, 1, 4, 43.6, 128.0, 4.2, 0.99, 2.1,
                   "Crystals 2025, 15:221 (forsterite MGD set)"),
    # K0 170.0 GPa (after Mao et al. 2016, as compiled in Crystals 2025, 15:221);
    # gamma0 1.26, q 2.9 (same compilation, olivine polymorphs);
    # V0 40.52 cm3/mol and K' 4.3 from memory (Mg2SiO4 wadsleyite, ~3.47 g/cm3).
    "wadsleyite": (2, 1, 4, 40.52, 170.0, 4.3, 1.26, 2.9,
                   "K0, gamma0, q: Crystals 2025, 15:221 (after Mao et al. 2016); V0, K': from memory"),
    # K0 185.0 GPa, gamma0 1.26, q 2.9 (as above); V0 39.49 cm3/mol, K' 4.2 from memory.
    "ringwoodite": (2, 1, 4, 39.49, 185.0, 4.2, 1.26, 2.9,
                    "K0, gamma0, q: Crystals 2025, 15:221 (after Mao et al. 2016); V0, K': from memory"),
    # Crystals 2025, 15:221: bridgmanite V0 24.45, K0 251, K' 4.1, gamma0 1.54, q 0.8.
    "bridgmanite": (1, 1, 3, 24.45, 251.0, 4.1, 1.54, 0.8, "Crystals 2025, 15:221 (bridgmanite MGD set)"),
    # Crystals 2025, 15:221: post-perovskite V0 23.53, K0 292, K' 3.7, gamma0 1.77, q 2.0.
    "post-perovskite": (1, 1, 3, 23.53, 292.0, 3.7, 1.77, 2.0, "Crystals 2025, 15:221 (post-perovskite MGD set)"),
    # Periclase MgO: V0 11.25 cm3/mol, K0 160 GPa, K' 4.0, gamma0 1.5, q 1.5
    # (Speziale et al. 2001, J. Geophys. Res. 106:515; from memory).
    "periclase": (1, 0, 1, 11.25, 160.0, 4.0, 1.5, 1.5, "Speziale et al. 2001, JGR 106:515 (from memory)"),
}


def _formula_mass(mg_sites: int, si: int, o: int, fe_fraction: float) -> float:
    """Molar mass [kg/mol] with a fraction ``fe_fraction`` of the Mg sites held by Fe."""
    divalent = (1.0 - fe_fraction) * MOLAR_MASS_MG + fe_fraction * MOLAR_MASS_FE
    return mg_sites * divalent + si * MOLAR_MASS_SI + o * MOLAR_MASS_O


def assemblage(name: str, members: tuple[str, ...], fe_fraction: float) -> Material:
    """Effective BM3 material for an assemblage of end members, one formula unit each.

    Molar volumes add; K0 is the Voigt-Reuss-Hill average, K0', gamma0 and q
    are volume-weighted (common practice for a one-curve assemblage, e.g.
    Watt et al. 1976, Rev. Geophys. 14:541 for the Hill average). Iron
    replaces magnesium on the divalent sites at unchanged molar volume; the
    few-per-cent volume effect of Fe is neglected (approximation).
    """
    vols, ks, kps, g0s, qs, mass, atoms, sources = [], [], [], [], [], 0.0, 0, []
    for m in members:
        mg, si, o, v0, k0, kp, g0, q, src = _END_MEMBERS[m]
        vols.append(v0)
        ks.append(k0)
        kps.append(kp)
        g0s.append(g0)
        qs.append(q)
        mass += _formula_mass(mg, si, o, fe_fraction)
        atoms += mg + si + o
        sources.append(f"{m}: {src}")
    v = np.array(vols)
    w = v / v.sum()
    k = np.array(ks)
    k_hill = 0.5 * (np.sum(w * k) + 1.0 / np.sum(w / k))
    rho0 = mass / (v.sum() * CM3_PER_MOL)
    return Material(name, FORM_BM3, rho0, k_hill * GPA, float(np.sum(w * kps)), float(np.sum(w * g0s)),
                    float(np.sum(w * qs)), "; ".join(sources), cv=3.0 * atoms * GAS_CONSTANT / mass)


def mantle_materials(fe_fraction: float) -> list[Material]:
    """Materials for the mantle phases, in the order of :data:`meltzone.phases.MANTLE_PHASES`.

    The two deepest assemblages (predicted dissociation products of
    post-perovskite) have no measured equation of state: they use the
    post-perovskite + periclase curve, extrapolated, and are flagged.
    """
    ppv = assemblage("post-perovskite + ferropericlase", ("post-perovskite", "periclase"), fe_fraction)
    return [
        assemblage("olivine", ("forsterite",), fe_fraction),
        assemblage("wadsleyite", ("wadsleyite",), fe_fraction),
        assemblage("ringwoodite", ("ringwoodite",), fe_fraction),
        assemblage("bridgmanite + ferropericlase", ("bridgmanite", "periclase"), fe_fraction),
        ppv,
        replace(ppv, name="MgO + MgSi2O5 (post-perovskite EOS, extrapolated)",
                source=ppv.source + " (extrapolated beyond its phase)"),
        replace(ppv, name="MgO + SiO2 (post-perovskite EOS, extrapolated)",
                source=ppv.source + " (extrapolated beyond its phase)"),
    ]


def pressure(rho, material: Material, temperature=REFERENCE_TEMPERATURE):
    """Pressure [Pa] at density ``rho`` [kg/m^3] and temperature [K] (NumPy, vectorised; tests and plots)."""
    rho = np.asarray(rho, dtype=float)
    if material.form == FORM_INCOMPRESSIBLE:
        return np.zeros_like(rho)
    if material.form == FORM_VINET:
        x = np.cbrt(material.rho0 / rho)
        cold = 3.0 * material.k0 * (1.0 - x) / x**2 * np.exp(1.5 * (material.kp - 1.0) * (1.0 - x))
    else:
        y = np.cbrt(rho / material.rho0)
        cold = 1.5 * material.k0 * (y**7 - y**5) * (1.0 + 0.75 * (material.kp - 4.0) * (y**2 - 1.0))
    gamma = material.gamma0 * (material.rho0 / rho) ** material.q
    return cold + gamma * rho * material.cv * (np.asarray(temperature, dtype=float) - REFERENCE_TEMPERATURE)
