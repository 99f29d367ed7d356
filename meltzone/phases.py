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


# ---------------------------------------------------------------- predicted-transition markers
@dataclass(frozen=True)
class TransitionMarker:
    """A transition the equations of state do not model, marked on profiles that reach it (SI units).

    ``pressure_pa`` +- ``uncertainty_pa`` is the band the flags report; ``status`` is
    ``measured`` (static experiments), ``shock`` (dynamic compression data) or ``predicted``
    (ab initio only); ``confidence`` follows the module's confidence words.
    """

    name: str
    pressure_pa: float
    uncertainty_pa: float
    status: str
    confidence: str
    source: str


#: Transitions of mantle oxides that are not EOS phases here (free SiO2 only appears in basaltic
#: parts and after post-perovskite dissociation; MgO in ferropericlase and the dissociated oxides).
MARKERS = (
    TransitionMarker("SiO2 stishovite -> CaCl2-type", 50.0 * GPA, 5.0 * GPA, "measured", "high",
                     "static experiments, ~50 GPa (checked as data; e.g. Kingma et al. 1995, Nature 374:243, "
                     "from memory)"),
    TransitionMarker("SiO2 CaCl2-type -> seifertite (alpha-PbO2-type)", 122.5 * GPA, 12.5 * GPA, "measured",
                     "medium", "static experiments, ~110-135 GPa (checked as data; e.g. Murakami et al. 2003, "
                     "Geophys. Res. Lett. 30:1207, from memory)"),
    TransitionMarker("SiO2 seifertite -> pyrite-type", 265.0 * GPA, 10.0 * GPA, "measured", "medium",
                     "static experiments, ~260-270 GPa (checked as data; Kuwayama et al. 2005, Science 309:923, "
                     "from memory)"),
    TransitionMarker("MgO B1 -> B2 (NaCl- to CsCl-type)", 0.45 * TPA, 0.05 * TPA, "shock", "medium",
                     "laser shock ~0.40-0.45 TPa near 9000-10000 K (McWilliams et al. 2012, Science 338:1330, "
                     "checked as data); ~0.5 TPa at 0 K ab initio (from memory); negative Clapeyron slope"),
    TransitionMarker("SiO2 pyrite-type -> cotunnite / Fe2P-type", 0.7 * TPA, 0.1 * TPA, "predicted", "low",
                     "ab initio, ~0.7 TPa (from memory; Umemoto, Wentzcovitch & Allen 2006, Science 311:983; "
                     "Tsuchiya & Tsuchiya 2011, PNAS 108:1252)"),
)

#: Pressure [Pa] above which the silicate equations of state are extrapolated: X-ray density data
#: of crystalline MgSiO3 end near 170 GPa at high temperature and 260 GPa at room temperature
#: (Fei et al. 2021, Nat. Commun. 12:876, checked); the mantle EOS parameters of
#: :mod:`meltzone.eos` are fitted below ~0.15 TPa.
EOS_EXPERIMENT_LIMIT_PA = 0.15 * TPA
#: Pressure [Pa] of the highest shock data on mantle silicate: MgSiO3 melt density to 1254 GPa
#: (Fei et al. 2021, checked). Extrapolations below it are "medium" confidence, above it "low".
SHOCK_DATA_LIMIT_PA = 1.254 * TPA

#: Phase codes whose entering boundary is only predicted (ab initio), with that boundary.
_PREDICTED_PHASES = {b.upper_phase + 1: b for b in BOUNDARIES if b.status == "predicted"}


def _zone(kind, what, depth, p, i_top, i_bottom, source, confidence) -> dict:
    return {"kind": kind, "what": what, "top_depth_m": float(depth[i_top]),
            "bottom_depth_m": float(depth[i_bottom]), "top_pressure_pa": float(p[i_top]),
            "bottom_pressure_pa": float(p[i_bottom]), "source": source, "confidence": confidence}


def _mask_zones(kind, what, source, depth, p, mask, confidence) -> list[dict]:
    """One zone per contiguous run of ``mask`` (depth-sorted) with one ``confidence`` value."""
    zones = []
    n = len(mask)
    i = 0
    while i < n:
        if not mask[i]:
            i += 1
            continue
        j = i
        while j + 1 < n and mask[j + 1] and confidence[j + 1] == confidence[i]:
            j += 1
        zones.append(_zone(kind, what, depth, p, i, j, source, str(confidence[i])))
        i = j + 1
    return zones


def _confidence_by_shock_data(p) -> np.ndarray:
    return np.where(p <= SHOCK_DATA_LIMIT_PA, "medium", "low")


def flags(depth_m, pressure_pa, temperature_k, melting_model, *, eos_limit_pa: float = EOS_EXPERIMENT_LIMIT_PA
          ) -> list[dict]:
    """High-pressure flags of a mantle profile: contiguous depth zones that rest on theory or extrapolation.

    Kinds (each zone a dict with ``kind, what, top_depth_m, bottom_depth_m, top_pressure_pa,
    bottom_pressure_pa, source, confidence``):

    * ``predicted-phase``: nodes in a phase whose entering boundary in :data:`BOUNDARIES`
      is ``predicted`` (ab initio), confidence ``low``.
    * ``extrapolated-melting``: nodes where ``melting_model.extrapolated(P)`` (beyond its
      experiments or range); ``medium`` up to the shock data on MgSiO3
      (:data:`SHOCK_DATA_LIMIT_PA`), ``low`` above.
    * ``extrapolated-eos``: nodes above ``eos_limit_pa`` (:data:`EOS_EXPERIMENT_LIMIT_PA`),
      confidence as for melting.
    * ``predicted-transition``: each marker of :data:`MARKERS` whose band (P +- uncertainty)
      the profile reaches; its depths are interpolated at the band edges (clipped to the profile).

    Parameters
    ----------
    depth_m, pressure_pa, temperature_k : array_like
        Mantle nodes (any order; pressure rising with depth).
    melting_model : MeltingModel or str
        A :class:`meltzone.melting.MeltingModel` or the id of a built-in one.
    eos_limit_pa : float
        Pressure [Pa] above which the silicate EOS counts as extrapolated.
    """
    if isinstance(melting_model, str):
        from .melting import get_model

        melting_model = get_model(melting_model)
    order = np.argsort(np.asarray(depth_m, dtype=float), kind="stable")
    depth = np.asarray(depth_m, dtype=float)[order]
    p = np.asarray(pressure_pa, dtype=float)[order]
    t = np.broadcast_to(np.asarray(temperature_k, dtype=float), np.shape(pressure_pa))[order]
    if depth.size == 0:
        return []
    zones: list[dict] = []
    code = phase_at(p, t)
    for phase, boundary in _PREDICTED_PHASES.items():
        zones += _mask_zones("predicted-phase", f"{MANTLE_PHASES[phase]} (predicted by ab initio calculations only)",
                             boundary.source, depth, p, code == phase, np.full(p.shape, "low"))
    v_gpa = melting_model.validated_max_pressure_pa / GPA
    zones += _mask_zones("extrapolated-melting",
                         f"melting curves of {melting_model.id!r} beyond their experiments (validated to "
                         f"{v_gpa:g} GPa)", melting_model.citation, depth, p,
                         np.asarray(melting_model.extrapolated(p)), _confidence_by_shock_data(p))
    zones += _mask_zones("extrapolated-eos",
                         f"silicate equations of state beyond their data (> {eos_limit_pa / GPA:g} GPa)",
                         "Fei et al. 2021, Nat. Commun. 12:876 (static density data end near 170 GPa at high "
                         "temperature; shock data to 1254 GPa)", depth, p, p > eos_limit_pa,
                         _confidence_by_shock_data(p))
    p_rising = np.maximum.accumulate(p)
    for marker in MARKERS:
        lo, hi = marker.pressure_pa - marker.uncertainty_pa, marker.pressure_pa + marker.uncertainty_pa
        if p_rising[-1] < lo or p_rising[0] > hi:
            continue
        top_p, bottom_p = max(lo, p_rising[0]), min(hi, p_rising[-1])
        zones.append({"kind": "predicted-transition", "what": marker.name,
                      "top_depth_m": float(np.interp(top_p, p_rising, depth)),
                      "bottom_depth_m": float(np.interp(bottom_p, p_rising, depth)),
                      "top_pressure_pa": float(top_p), "bottom_pressure_pa": float(bottom_p),
                      "source": marker.source, "confidence": marker.confidence})
    return zones


def core_flags(depth_m, pressure_pa) -> list[dict]:
    """High-pressure flags of the core: depths where the iron melting curve (which sets the inner core) is used
    beyond its static experiments (:data:`meltzone.iron.IRON_STATIC_MAX_PA`, 200 GPa; Anzellini et al. 2013,
    Science 340:464). Kind ``extrapolated-iron-melting``; confidence ``medium`` up to the laser-shock data
    (:data:`meltzone.iron.IRON_SHOCK_MAX_PA`, 1000 GPa; Kraus et al. 2022, Science 375:202), ``low`` above, where
    no melting measurement exists (each band says so in its ``what``). Same zone dicts as :func:`flags`."""
    from .iron import IRON_SHOCK_MAX_PA, IRON_STATIC_MAX_PA

    order = np.argsort(np.asarray(depth_m, dtype=float), kind="stable")
    depth = np.asarray(depth_m, dtype=float)[order]
    p = np.asarray(pressure_pa, dtype=float)[order]
    if depth.size == 0:
        return []
    static, shock = IRON_STATIC_MAX_PA / GPA, IRON_SHOCK_MAX_PA / GPA
    source = ("Anzellini et al. 2013, Science 340:464 (static data to 200 GPa); Kraus et al. 2022, Science 375:202 "
              "(laser shock to 1000 GPa)")
    bands = (((p > IRON_STATIC_MAX_PA) & (p <= IRON_SHOCK_MAX_PA), "medium",
              f"iron melting curve extrapolated beyond its static experiments ({static:g} GPa); laser-shock "
              f"melting data reach {shock:g} GPa"),
             (p > IRON_SHOCK_MAX_PA, "low",
              f"iron melting curve extrapolated beyond every melting measurement (laser shock to {shock:g} GPa)"))
    zones = [z for mask, confidence, what in bands
             for z in _mask_zones("extrapolated-iron-melting", what, source, depth, p, mask,
                                  np.full(p.shape, confidence))]
    return sorted(zones, key=lambda z: z["top_depth_m"])


def planet_flags(interior, melting_model) -> list[dict]:
    """All high-pressure flags of a planet: the mantle's (:func:`flags`, on the reference adiabat the interior
    was built on) and the core's (:func:`core_flags`)."""
    it = interior
    ms = it.mantle
    cs = it.core
    return (flags(it.radius - it.r[ms], it.P[ms], it.T_ref[ms], melting_model)
            + core_flags(it.radius - it.r[cs], it.P[cs]))

