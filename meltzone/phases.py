"""Mantle phase regions in pressure-temperature space: the one source of truth.

Each boundary is a straight Clapeyron line through a reference point,
``P_b(T) = P0 + slope (T - T0)``; a node at (P, T) is past the boundary when
``P > P_b(T)``. The interior solver, the phase map and the high-pressure flags
all read :data:`BOUNDARIES`.

Status words: ``measured`` (bracketed by static experiments), ``predicted``
(ab initio calculations or shock data only). Confidence words in the flags:
``high`` (measured), ``medium`` (shock data), ``low`` (ab initio only).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .constants import GPA, TPA

#: Mantle phases (assemblages), shallow to deep. Index = phase code in the Interior.
MANTLE_PHASES = (
    "olivine",
    "wadsleyite",
    "ringwoodite",
    "bridgmanite",
    "post-perovskite",
    "ppv-dissociated",
    "oxides",
)
#: Phase code of the core nodes in the Interior.
CORE_PHASE = -1


@dataclass(frozen=True)
class PhaseBoundary:
    """A Clapeyron line between two neighbouring mantle assemblages (SI units)."""

    name: str
    upper_phase: int  # index into MANTLE_PHASES (shallower, lower pressure)
    pressure_pa: float  # reference pressure P0
    temperature_k: float  # reference temperature T0
    slope_pa_per_k: float  # Clapeyron slope dP/dT
    uncertainty_pa: float  # 1-sigma-like half width of the pressure as the source states it
    status: str  # "measured" or "predicted"
    source: str

    def pressure_at(self, temperature_k):
        """Boundary pressure [Pa] at temperature [K]."""
        return self.pressure_pa + self.slope_pa_per_k * (np.asarray(temperature_k, dtype=float) - self.temperature_k)


BOUNDARIES = (
    PhaseBoundary("olivine -> wadsleyite", 0, 13.75 * GPA, 1750.0, 3.5e6, 0.5 * GPA, "measured",
                  "Katsura et al. 2004, J. Geophys. Res. 109:B02209 (~13.5-14 GPa at 1700-1800 K, "
                  "+3 to +4 MPa/K; from memory)"),
    PhaseBoundary("wadsleyite -> ringwoodite", 1, 18.0 * GPA, 1873.0, 5.0e6, 1.0 * GPA, "measured",
                  "Suzuki et al. 2000, Geophys. Res. Lett. 27:803 (~18 GPa near 1900 K, ~+5 MPa/K; from memory)"),
    PhaseBoundary("ringwoodite -> bridgmanite + ferropericlase", 2, 25.12 * GPA, 273.15, -1.3e6, 0.5 * GPA,
                  "measured", "Fei et al. 2004, J. Geophys. Res. 109:B02305 (P = 25.12 - 0.0013 T[C] GPa)"),
    PhaseBoundary("bridgmanite -> post-perovskite", 3, 124.0 * GPA, 2500.0, 12.5e6, 3.0 * GPA, "measured",
                  "Murakami et al. 2004, Science 304:855; Tateno et al. 2009, EPSL 277:130 "
                  "(~124 GPa at 2500 K, ~139 GPa at 3700 K)"),
    PhaseBoundary("post-perovskite -> MgO + MgSi2O5", 4, 0.9 * TPA, 5000.0, 0.0, 0.2 * TPA, "predicted",
                  "Umemoto & Wentzcovitch 2011, EPSL 311:225 (ab initio, ~0.9 TPa; the slope is negative in the "
                  "source, its size is not used here and is covered by the uncertainty)"),
    PhaseBoundary("MgSi2O5 -> MgO + SiO2 (Fe2P-type)", 5, 2.1 * TPA, 5000.0, 0.0, 0.3 * TPA, "predicted",
                  "Umemoto & Wentzcovitch 2011, EPSL 311:225 (ab initio, ~2.1 TPa; slope negative, not used)"),
)


def boundary_table() -> np.ndarray:
    """Boundaries as a float64 array of rows (P0 [Pa], T0 [K], slope [Pa/K]) for the kernels."""
    return np.array([[b.pressure_pa, b.temperature_k, b.slope_pa_per_k] for b in BOUNDARIES], dtype=np.float64)


def phase_at(pressure_pa, temperature_k):
    """Mantle phase code at each (P, T): the number of boundaries passed (vectorised)."""
    p = np.asarray(pressure_pa, dtype=float)
    t = np.broadcast_to(np.asarray(temperature_k, dtype=float), p.shape)
    code = np.zeros(p.shape, dtype=np.int64)
    for b in BOUNDARIES:
        code += (p > b.pressure_at(t)).astype(np.int64)
    return code
