"""Mantle solidus and liquidus models, melt-fraction laws, water depression and iron melting.

Everything here is NumPy only: importing this module compiles nothing and does
not import numba. The scalar numba twin of :func:`melt_fraction` lives in
:mod:`meltzone._core.melt`.

Pressures are in Pa and temperatures in K at the interface; the published fits
are written in GPa and degrees C inside the private curve functions, each with
its source, status ("checked" = read in the source or a faithful transcription;
"from memory" = recalled, not yet verified in the source text) and validity.

Models (ids are this package's own; see :func:`list_models`)
------------------------------------------------------------
``peridotite-lowp``
    Dry peridotite solidus of Hirschmann 2000 with the liquidus of Katz,
    Spiegelman & Langmuir 2003; 0-10 GPa. Refuses pressures above 10 GPa (the
    Hirschmann quadratic peaks near 13 GPa and must not be extrapolated).
``katz2003``
    Katz, Spiegelman & Langmuir 2003 entirely (solidus, lherzolite liquidus and
    liquidus); 0-10 GPa. The reference model of the ``katz2003`` melt-fraction law.
``whole-mantle-sg``
    Piecewise Simon-Glatzel fits of Monteux, Andrault & Samuel 2016 to the
    experiments of Fiquet et al. 2010 / Andrault et al. 2011 (validated to
    ~140 GPa). Above, each curve is continued by the power-law form
    ``T ~ P^0.48`` of the MgSiO3 melting curve of Stixrude 2014, joined where
    the logarithmic slope of the fit equals 0.48/P (solidus ~145 GPa, liquidus
    ~267 GPa), so value and slope are continuous. The continuation keeps the
    solidus/liquidus ratio fixed and so avoids the crossing of the two fits
    near 490 GPa. Evaluable to 5 TPa; everything above 140 GPa is extrapolated.
``peridotite-mantle`` (the configuration default)
    Hirschmann 2000 solidus and Katz et al. 2003 liquidus below 5 GPa, blended in log T (C1) over 5-10 GPa
    into ``whole-mantle-sg`` (the solidi meet within 3 K at 10 GPa), so a present-day Earth adiabat
    crosses the solidus under ridges; ``whole-mantle-sg`` above 10 GPa.
``super-earth``
    Identical to ``whole-mantle-sg`` up to 140 GPa; between 140 and 400 GPa it
    blends smoothly (in log T, C1 weight) into an absolute high-pressure law:
    the liquidus follows the MgSiO3 melting curve anchored to the Fei et al.
    2021 shock bound (9430 K at 500 GPa), the solidus its cryoscopic depression
    T_m / (1 - ln x0) (Stixrude 2014). Evaluable to 5 TPa; extrapolated above
    140 GPa.
``table``
    A user CSV file (see :func:`load_table`); linear interpolation inside the
    table, refused outside it.

The two high-pressure continuations bracket the extrapolation: at 1 TPa they
agree within ~8% on the liquidus, and differ mostly in the width of the
melting interval (~11% vs ~19% of the liquidus).
"""

from __future__ import annotations

import csv
import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable

import numpy as np

from .constants import GPA, TPA
from .errors import ModelError

#: 0 degrees C in K.
_CELSIUS = 273.15

# ----------------------------------------------------------------- melt-fraction law codes
#: Law code of the linear melt fraction phi = (T - T_sol) / (T_liq - T_sol) (common practice).
LAW_LINEAR = 0
#: Law code of the Katz, Spiegelman & Langmuir 2003 nonlinear law.
LAW_KATZ2003 = 1
#: Melt-fraction law names and their integer codes for the numba kernels.
LAW_CODES = {"linear": LAW_LINEAR, "katz2003": LAW_KATZ2003}

# ----------------------------------------------------------------- Katz et al. 2003 constants
# Katz, Spiegelman & Langmuir 2003, G3 4(9):1073, Table 2 (checked in transcription,
# M_cpx from memory). Calibrated on experiments to ~8-10 GPa.
#: Exponent below clinopyroxene exhaustion.
KATZ_BETA1 = 1.5
#: Exponent above clinopyroxene exhaustion.
KATZ_BETA2 = 1.5
#: Modal clinopyroxene of the fertile source (from memory).
KATZ_M_CPX = 0.17
#: Reaction coefficient R_cpx = r0 + r1 P[GPa].
KATZ_R_CPX = (0.50, 0.08)
#: Top of the Katz calibration [GPa]; the law's shape parameters are held at their value here above it.
KATZ_MAX_PRESSURE_GPA = 10.0
#: Water: dT = K X^gamma with X wt% in the melt (K [K], gamma), bulk partition coefficient D,
#: saturation X_sat = chi1 P^lambda + chi2 P [wt%, P in GPa].
KATZ_WATER_K = 43.0
KATZ_WATER_GAMMA = 0.75
KATZ_WATER_D = 0.01
KATZ_WATER_SATURATION = (12.0, 0.6, 1.0)  # chi1, lambda, chi2

# ----------------------------------------------------------------- high-pressure MgSiO3 melting
#: Exponent of the MgSiO3 melting power law T_m = T_ref (P / P_ref)^b; Stixrude 2014,
#: Phil. Trans. R. Soc. A 372:20130076 (from memory: 5400 K (P / 140 GPa)^0.480).
STIXRUDE_EXPONENT = 0.48
#: Anchor of the MgSiO3 melting law: Fei et al. 2021, Nat. Commun. 12:876 (checked): observed
#: upper bound of the melting temperature, 9430 K at 500 GPa (shock on bridgmanite).
FEI2021_ANCHOR = (500.0, 9430.0)  # (P [GPa], T [K])
#: Cryoscopic solidus T_sol = T_m / (1 - ln x0), x0 = 0.79; Stixrude 2014 (from memory).
STIXRUDE_X0 = 0.79
#: Pressure window [GPa] over which ``super-earth`` blends from the Monteux fits to the
#: high-pressure law (start = end of the experiments; end below the fits' crossing near 490 GPa).
SUPER_EARTH_BLEND_GPA = (140.0, 400.0)
#: Largest pressure at which the two high-pressure models may be evaluated [Pa]: covers the
#: mantles of 20 Earth-mass planets of any core fraction (a pure-silicate 20 M_E planet
#: reaches ~4.4 TPa at the centre in :mod:`meltzone.interior`).
HIGH_PRESSURE_MODEL_MAX_PA = 5.0 * TPA
#: Top of the experiments behind the Monteux et al. 2016 fits [Pa] (Fiquet et al. 2010,
#: Science 329:1516; Andrault et al. 2011, EPSL 304:251: diamond cell to ~140 GPa).
WHOLE_MANTLE_VALIDATED_PA = 140.0 * GPA

# ============================================================================ published curves
def _quadratic_c(p_gpa, c0, c1, c2):
    """Quadratic in P [GPa] with coefficients in degrees C, returned in K."""
    return c0 + c1 * p_gpa + c2 * p_gpa * p_gpa + _CELSIUS


def _hirschmann2000_solidus(p_gpa):
    """Dry peridotite solidus, T[C] = -5.104 P^2 + 132.899 P + 1120.661 (P in GPa).

    Hirschmann 2000, Geochem. Geophys. Geosyst. 1, 2000GC000070 (checked). Valid 0-10 GPa;
    the quadratic peaks near 13 GPa, so it is never used above 10 GPa.
    """
    return _quadratic_c(p_gpa, 1120.661, 132.899, -5.104)


def _katz2003_solidus(p_gpa):
    """Katz et al. 2003 (G3 4:1073, Table 2; checked): T_sol[C] = 1085.7 + 132.9 P - 5.1 P^2, 0-10 GPa."""
    return _quadratic_c(p_gpa, 1085.7, 132.9, -5.1)


def _katz2003_lherzolite_liquidus(p_gpa):
    """Katz et al. 2003 (checked): T_lherz[C] = 1475 + 80 P - 3.2 P^2, the cpx-out reference, 0-10 GPa."""
    return _quadratic_c(p_gpa, 1475.0, 80.0, -3.2)


def _katz2003_liquidus(p_gpa):
    """Katz et al. 2003 (checked): T_liq[C] = 1780 + 45 P - 2.0 P^2, 0-10 GPa."""
    return _quadratic_c(p_gpa, 1780.0, 45.0, -2.0)


def simon_glatzel(p_gpa, t0, p0, a, c):
    """Simon-Glatzel law T = T0 ((P - P0) / a + 1)^(1/c) (Simon & Glatzel 1929, Z. anorg. allg. Chem. 178:309)."""
    return t0 * ((p_gpa - p0) / a + 1.0) ** (1.0 / c)


#: Monteux, Andrault & Samuel 2016, EPSL 448:140 (citation checked; coefficients from memory):
#: (T0 [K], a [GPa], c) of T = T0 (P/a + 1)^(1/c), for P <= 20 GPa and P > 20 GPa.
#: The branches meet at 20 GPa within 1 K in value, not in slope (as published).
MONTEUX2016_SOLIDUS = ((1661.2, 1.336, 7.437), (2081.8, 101.69, 1.226))
MONTEUX2016_LIQUIDUS = ((1982.1, 6.594, 5.374), (2006.8, 34.65, 1.844))
MONTEUX2016_BRANCH_GPA = 20.0


def _branch_crossing(branches, lo=MONTEUX2016_BRANCH_GPA, hi=MONTEUX2016_BRANCH_GPA + 5.0):
    """Pressure [GPa] in [lo, hi] where the two Simon-Glatzel branches meet (bisection).

    The published switch at 20 GPa leaves a step of up to 1 K (rounded coefficients; the
    solidus steps down); switching where the branches meet (~20.8 GPa for the solidus,
    ~20.004 GPa for the liquidus) keeps the curve continuous and rising and moves it by
    < 1 K (derived).
    """
    def gap(p):
        return (simon_glatzel(p, branches[0][0], 0.0, *branches[0][1:])
                - simon_glatzel(p, branches[1][0], 0.0, *branches[1][1:]))

    if gap(lo) * gap(hi) > 0.0:
        return MONTEUX2016_BRANCH_GPA
    for _ in range(80):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if gap(mid) * gap(hi) <= 0.0 else (lo, mid)
    return 0.5 * (lo + hi)


#: (branches, switch pressure [GPa]) of the two Monteux et al. 2016 curves.
_MONTEUX_SOLIDUS = (MONTEUX2016_SOLIDUS, _branch_crossing(MONTEUX2016_SOLIDUS))
_MONTEUX_LIQUIDUS = (MONTEUX2016_LIQUIDUS, _branch_crossing(MONTEUX2016_LIQUIDUS))


def _monteux2016(p_gpa, curve):
    """Piecewise Simon-Glatzel curve of Monteux et al. 2016 (see MONTEUX2016_*), P in GPa.

    Valid ~0-140 GPa (the experiments of Fiquet et al. 2010 and Andrault et al. 2011); at
    136 GPa 4161 K (solidus) and 4764 K (liquidus). The two fits cross near 492 GPa.
    The branches switch where they meet near 20 GPa (see :func:`_branch_crossing`).
    """
    ((t_lo, a_lo, c_lo), (t_hi, a_hi, c_hi)), switch_gpa = curve
    low = simon_glatzel(p_gpa, t_lo, 0.0, a_lo, c_lo)
    high = simon_glatzel(p_gpa, t_hi, 0.0, a_hi, c_hi)
    return np.where(p_gpa <= switch_gpa, low, high)


def _tangent_power_law_join(branch):
    """Pressure [GPa] where the Simon-Glatzel branch T0 (P/a + 1)^(1/c) has log slope b / P.

    d ln T / dP = (1/c) / (P + a) equals b / P at P_j = b a / (1/c - b), b = STIXRUDE_EXPONENT.
    Beyond P_j the curve T(P_j) (P / P_j)^b then continues it with equal value and slope
    (derived).
    """
    _, a, c = branch
    b = STIXRUDE_EXPONENT
    if 1.0 / c <= b:
        raise ModelError("the high-pressure branch flattens faster than P^0.48: no tangent join")
    return b * a / (1.0 / c - b)


def _whole_mantle(p_gpa, curve):
    """Monteux et al. 2016 up to the tangent join, then T(P_j) (P/P_j)^0.48 (Stixrude 2014 form)."""
    t_high, a_high, c_high = curve[0][1]
    p_join = _tangent_power_law_join(curve[0][1])
    t_join = simon_glatzel(p_join, t_high, 0.0, a_high, c_high)
    # np.maximum keeps the unused branch of np.where finite at P = 0
    continued = t_join * (np.maximum(p_gpa, 1e-30) / p_join) ** STIXRUDE_EXPONENT
    return np.where(p_gpa <= p_join, _monteux2016(p_gpa, curve), continued)


def _whole_mantle_solidus(p_gpa):
    return _whole_mantle(p_gpa, _MONTEUX_SOLIDUS)


def _whole_mantle_liquidus(p_gpa):
    return _whole_mantle(p_gpa, _MONTEUX_LIQUIDUS)


def mgsio3_melting_temperature(pressure_pa):
    """Melting temperature [K] of MgSiO3 at high pressure, T_m = 9430 K (P / 500 GPa)^0.48.

    Power-law form and exponent of Stixrude 2014, Phil. Trans. R. Soc. A 372:20130076
    (from memory: 5400 K (P/140 GPa)^0.480, which gives 9949 K at 500 GPa, above the bound
    below), level re-anchored to the observed upper bound of Fei et al. 2021, Nat. Commun.
    12:876 (checked): 9430 K at 500 GPa. Gives ~5050 K at 136 GPa (de Koker & Stixrude
    2009: 5100 +- 100 K) and stays below the liquid point of Fei et al. at 717 GPa / 11834 K.
    Meant for 0.136-5 TPa; it vanishes at P = 0 (a high-pressure law only).

    Parameters
    ----------
    pressure_pa : array_like
        Pressure [Pa], >= 0.
    """
    p_gpa = np.asarray(pressure_pa, dtype=float) / GPA
    p_ref, t_ref = FEI2021_ANCHOR
    return t_ref * (np.maximum(p_gpa, 0.0) / p_ref) ** STIXRUDE_EXPONENT


def _smoothstep(x):
    """C1 weight 3x^2 - 2x^3 on [0, 1], 0 below, 1 above (zero slope at both ends; common practice)."""
    x = np.clip(x, 0.0, 1.0)
    return x * x * (3.0 - 2.0 * x)


def _log_blend(p_gpa, low_k, high_k):
    """exp((1 - w) ln T_low + w ln T_high), w = smoothstep over SUPER_EARTH_BLEND_GPA."""
    p1, p2 = SUPER_EARTH_BLEND_GPA
    w = _smoothstep((p_gpa - p1) / (p2 - p1))
    return np.exp((1.0 - w) * np.log(low_k) + w * np.log(high_k))


def _super_earth_liquidus(p_gpa):
    """Monteux et al. 2016 liquidus blended into the MgSiO3 melting curve (Fei 2021 anchor)."""
    p = np.asarray(p_gpa, dtype=float)
    t_high = mgsio3_melting_temperature(np.maximum(p, SUPER_EARTH_BLEND_GPA[0]) * GPA)
    return _log_blend(p, _monteux2016(np.minimum(p, SUPER_EARTH_BLEND_GPA[1]), _MONTEUX_LIQUIDUS), t_high)


def _super_earth_solidus(p_gpa):
    """Monteux et al. 2016 solidus blended into the cryoscopic solidus T_m / (1 - ln x0) (Stixrude 2014)."""
    p = np.asarray(p_gpa, dtype=float)
    t_high = mgsio3_melting_temperature(np.maximum(p, SUPER_EARTH_BLEND_GPA[0]) * GPA) / (1.0 - math.log(STIXRUDE_X0))
    return _log_blend(p, _monteux2016(np.minimum(p, SUPER_EARTH_BLEND_GPA[1]), _MONTEUX_SOLIDUS), t_high)


#: Pressure window [GPa] over which ``peridotite-mantle`` passes from the low-pressure peridotite curves to
#: the whole-mantle fits (inside the 0-10 GPa calibration of the former; the two solidi meet within 3 K at
#: 10 GPa: 2212 K Hirschmann 2000, 2214 K Monteux et al. 2016, derived).
PERIDOTITE_BLEND_GPA = (5.0, 10.0)


def _peridotite_blend(p_gpa, low, high):
    """exp((1 - w) ln T_low + w ln T_high), w = smoothstep over PERIDOTITE_BLEND_GPA (C1 in value and slope)."""
    p = np.asarray(p_gpa, dtype=float)
    p1, p2 = PERIDOTITE_BLEND_GPA
    w = _smoothstep((p - p1) / (p2 - p1))
    low_k = low(np.minimum(p, p2))
    return np.exp((1.0 - w) * np.log(low_k) + w * np.log(high(p)))


def _peridotite_mantle_solidus(p_gpa):
    """Hirschmann 2000 dry peridotite solidus, passing over 5-10 GPa into the whole-mantle solidus."""
    return _peridotite_blend(p_gpa, _hirschmann2000_solidus, _whole_mantle_solidus)


def _peridotite_mantle_liquidus(p_gpa):
    """Katz et al. 2003 liquidus, passing over 5-10 GPa into the whole-mantle liquidus."""
    return _peridotite_blend(p_gpa, _katz2003_liquidus, _whole_mantle_liquidus)


# ============================================================================ the model object
@dataclass(frozen=True)
class MeltingModel:
    """One solidus/liquidus pair with the pressure range where it may be used (SI units).

    ``solidus`` and ``liquidus`` take pressure [Pa] (scalar or array) and return K; they
    raise :class:`~meltzone.errors.ModelError` outside [min_pressure_pa, max_pressure_pa].
    ``extrapolated`` marks pressures beyond the experiments or calculations behind the
    model (``validated_max_pressure_pa``) and never raises. ``solidus_gpa`` and
    ``liquidus_gpa`` are the raw curves (P in GPa, no range check); ``note`` is added to
    range errors.
    """

    id: str
    citation: str
    min_pressure_pa: float
    max_pressure_pa: float
    validated_max_pressure_pa: float
    solidus_gpa: Callable = field(repr=False)
    liquidus_gpa: Callable = field(repr=False)
    note: str = ""

    def _pressure_gpa(self, pressure_pa) -> np.ndarray:
        p = np.asarray(pressure_pa, dtype=float)
        if not np.all(np.isfinite(p)):
            raise ModelError(f"melting model {self.id!r}: pressure must be finite, got {pressure_pa!r}")
        slack = 1e-9 * max(self.max_pressure_pa, 1.0)
        if p.size and (p.min() < self.min_pressure_pa - slack or p.max() > self.max_pressure_pa + slack):
            bad = p.min() if p.min() < self.min_pressure_pa - slack else p.max()
            raise ModelError(f"pressure {bad / GPA:g} GPa is outside the range of melting model {self.id!r} "
                             f"({self.min_pressure_pa / GPA:g}-{self.max_pressure_pa / GPA:g} GPa)"
                             + (f"; {self.note}" if self.note else ""))
        return np.clip(p, self.min_pressure_pa, self.max_pressure_pa) / GPA

    @staticmethod
    def _out(values, like):
        out = np.asarray(values, dtype=np.float64)
        return out[()] if np.ndim(like) == 0 else out

    def solidus(self, pressure_pa):
        """Solidus temperature [K] at pressure [Pa]."""
        return self._out(self.solidus_gpa(self._pressure_gpa(pressure_pa)), pressure_pa)

    def liquidus(self, pressure_pa):
        """Liquidus temperature [K] at pressure [Pa]."""
        return self._out(self.liquidus_gpa(self._pressure_gpa(pressure_pa)), pressure_pa)

    def extrapolated(self, pressure_pa) -> np.ndarray:
        """True where the pressure [Pa] lies beyond the model's experiments or outside its range."""
        p = np.asarray(pressure_pa, dtype=float)
        return (p > self.validated_max_pressure_pa) | (p < self.min_pressure_pa) | (p > self.max_pressure_pa)

    def describe(self) -> dict:
        """JSON-ready summary: id, pressure range [Pa], validated maximum [Pa], citation."""
        return {"id": self.id, "min_pressure_pa": float(self.min_pressure_pa),
                "max_pressure_pa": float(self.max_pressure_pa),
                "validated_max_pressure_pa": float(self.validated_max_pressure_pa), "citation": self.citation}


_MONTEUX_CITATION = ("Monteux, Andrault & Samuel 2016, EPSL 448:140 (Simon-Glatzel fits to Fiquet et al. 2010, "
                     "Science 329:1516 and Andrault et al. 2011, EPSL 304:251; coefficients from memory)")

_BUILTIN = {
    "peridotite-lowp": MeltingModel(
        "peridotite-lowp",
        "solidus Hirschmann 2000, G3 1:2000GC000070; liquidus Katz, Spiegelman & Langmuir 2003, G3 4:1073",
        0.0, 10.0 * GPA, 10.0 * GPA, _hirschmann2000_solidus, _katz2003_liquidus,
        note="the Hirschmann 2000 quadratic peaks near 13 GPa and is never extrapolated past 10 GPa"),
    "katz2003": MeltingModel(
        "katz2003", "Katz, Spiegelman & Langmuir 2003, G3 4:1073 (solidus and liquidus of Table 2)",
        0.0, 10.0 * GPA, 10.0 * GPA, _katz2003_solidus, _katz2003_liquidus,
        note="the Katz 2003 quadratics are calibrated to ~8-10 GPa only"),
    "whole-mantle-sg": MeltingModel(
        "whole-mantle-sg",
        _MONTEUX_CITATION + "; above 140 GPa extrapolated with the P^0.48 form of Stixrude 2014, "
        "Phil. Trans. R. Soc. A 372:20130076 (tangent join)",
        0.0, HIGH_PRESSURE_MODEL_MAX_PA, WHOLE_MANTLE_VALIDATED_PA, _whole_mantle_solidus, _whole_mantle_liquidus),
    "peridotite-mantle": MeltingModel(
        "peridotite-mantle",
        "solidus Hirschmann 2000, G3 1:2000GC000070 and liquidus Katz, Spiegelman & Langmuir 2003, G3 4:1073 "
        "below 5 GPa, blended over 5-10 GPa into " + _MONTEUX_CITATION + "; above 140 GPa extrapolated with the "
        "P^0.48 form of Stixrude 2014, Phil. Trans. R. Soc. A 372:20130076 (tangent join)",
        0.0, HIGH_PRESSURE_MODEL_MAX_PA, WHOLE_MANTLE_VALIDATED_PA, _peridotite_mantle_solidus,
        _peridotite_mantle_liquidus),
    "super-earth": MeltingModel(
        "super-earth",
        _MONTEUX_CITATION + "; blended over 140-400 GPa into MgSiO3 melting anchored to Fei et al. 2021, "
        "Nat. Commun. 12:876 (9430 K at 500 GPa) with the cryoscopic solidus of Stixrude 2014",
        0.0, HIGH_PRESSURE_MODEL_MAX_PA, WHOLE_MANTLE_VALIDATED_PA, _super_earth_solidus, _super_earth_liquidus),
}
#: Id of the user-table model.
TABLE_MODEL_ID = "table"


def list_models() -> list[str]:
    """Ids of the melting models, the user-table model last."""
    return [*_BUILTIN, TABLE_MODEL_ID]


def get_model(model_id: str, table_file: str | Path | None = None) -> MeltingModel:
    """The melting model with this id; ``table_file`` is required for (and only used by) ``"table"``."""
    if model_id == TABLE_MODEL_ID:
        if not table_file:
            raise ModelError("melting model 'table' needs a table file (melting.table_file or --table-file)")
        return load_table(table_file)
    try:
        return _BUILTIN[model_id]
    except (KeyError, TypeError):
        raise ModelError(f"unknown melting model {model_id!r}; known models: {', '.join(list_models())}") from None


# ============================================================================ user tables
#: Accepted pressure columns of a table and their factor to Pa.
TABLE_PRESSURE_COLUMNS = {"pressure_pa": 1.0, "pressure_gpa": GPA}
#: Required temperature columns of a table (K).
TABLE_TEMPERATURE_COLUMNS = ("solidus_k", "liquidus_k")
#: Temperatures [K] a table may hold: 100 K, below any silicate solidus (water ice melts at 273 K), to 30000 K,
#: above the liquidus of every built-in model at 5 TPa (26500-28500 K, this module).
TABLE_TEMPERATURE_RANGE_K = (100.0, 30000.0)
#: Highest pressure [Pa] a table may hold: 10 TPa, twice the deepest mantle pressure of an allowed planet
#: (4.4 TPa at 20 M_E, coreless; config.MASS_LIMITS_EARTH).
TABLE_MAX_PRESSURE_PA = 10.0e12


def load_table(path: str | Path) -> MeltingModel:
    """Read a user melting table (CSV) into a :class:`MeltingModel` with id ``"table"``.

    Format: lines starting with ``#`` and blank lines are skipped; the first other line is
    the header, naming (in any order, case-insensitive) one pressure column, ``pressure_pa``
    or ``pressure_gpa``, and the two temperature columns ``solidus_k`` and ``liquidus_k``;
    no other columns. At least two rows; pressures finite, 0-10 TPa and strictly rising;
    temperatures 100-30000 K (:data:`TABLE_TEMPERATURE_RANGE_K`); solidus below liquidus on
    every row. Values are linearly interpolated in pressure; the
    model refuses pressures outside the table (no extrapolation), so its validated range is
    the table's range.

    Raises
    ------
    ModelError
        Naming the file and the problem (line number where there is one).
    """
    path = Path(path)
    where = f"melting table {str(path)!r}"
    try:
        text = path.read_text(encoding="utf-8-sig")  # tolerate a byte-order mark
    except (OSError, UnicodeDecodeError) as exc:
        raise ModelError(f"cannot read {where}: {getattr(exc, 'strerror', None) or exc}") from None
    rows = [(n, line) for n, line in enumerate(text.splitlines(), start=1)
            if line.strip() and not line.lstrip().startswith("#")]
    if not rows:
        raise ModelError(f"{where} is empty: expected a header such as pressure_gpa,solidus_k,liquidus_k")
    header = [h.strip().lower() for h in next(csv.reader([rows[0][1]]))]
    pressure_cols = [h for h in header if h in TABLE_PRESSURE_COLUMNS]
    expected = ("expected one of " + " / ".join(TABLE_PRESSURE_COLUMNS) + " and "
                + ", ".join(TABLE_TEMPERATURE_COLUMNS))
    missing = [c for c in TABLE_TEMPERATURE_COLUMNS if c not in header]
    unknown = [h for h in header if h not in TABLE_PRESSURE_COLUMNS and h not in TABLE_TEMPERATURE_COLUMNS]
    if len(pressure_cols) != 1 or missing or unknown or len(set(header)) != len(header):
        problem = (f"missing column {missing[0]!r}" if missing else
                   f"unknown column {unknown[0]!r}" if unknown else
                   "no pressure column" if not pressure_cols else "repeated column")
        raise ModelError(f"{where}: {problem} in header {rows[0][1].strip()!r}; {expected}")
    index = {h: i for i, h in enumerate(header)}
    data = []
    for n, line in rows[1:]:
        fields = next(csv.reader([line]))
        if len(fields) != len(header):
            raise ModelError(f"{where}, line {n}: {len(fields)} values, the header has {len(header)}")
        try:
            values = [float(fields[index[c]]) for c in (pressure_cols[0], *TABLE_TEMPERATURE_COLUMNS)]
        except ValueError:
            raise ModelError(f"{where}, line {n}: not a number in {line.strip()!r}") from None
        if not all(math.isfinite(v) for v in values):
            raise ModelError(f"{where}, line {n}: non-finite value (NaN or infinity) in {line.strip()!r}")
        data.append((n, values))
    if len(data) < 2:
        raise ModelError(f"{where}: needs at least 2 rows of data, found {len(data)}")
    lines = [n for n, _ in data]
    table = np.array([v for _, v in data], dtype=float)
    p_pa = table[:, 0] * TABLE_PRESSURE_COLUMNS[pressure_cols[0]]
    sol, liq = table[:, 1], table[:, 2]
    p_max, (t_lo, t_hi) = TABLE_MAX_PRESSURE_PA, TABLE_TEMPERATURE_RANGE_K
    for i in range(len(p_pa)):
        row = f"{where}, line {lines[i]}"
        if not 0.0 <= p_pa[i] <= p_max:
            what = "negative pressure" if p_pa[i] < 0.0 else "pressure"
            raise ModelError(f"{row}: {what} {p_pa[i] / GPA:g} GPa; must be >= 0 and <= {p_max / GPA:g} GPa")
        if i and p_pa[i] <= p_pa[i - 1]:
            raise ModelError(f"{row}: pressure must rise strictly from row to row")
        for name, t in (("solidus", sol[i]), ("liquidus", liq[i])):
            if not t_lo <= t <= t_hi:
                raise ModelError(f"{row}: {name} {t:g} K must be >= {t_lo:g} K and <= {t_hi:g} K")
        if sol[i] >= liq[i]:
            raise ModelError(f"{row}: solidus ({sol[i]:g} K) must be below the liquidus ({liq[i]:g} K)")
    p_gpa = p_pa / GPA
    return MeltingModel(
        TABLE_MODEL_ID, f"user table {str(path)}", float(p_pa[0]), float(p_pa[-1]), float(p_pa[-1]),
        lambda p, x=p_gpa, y=sol: np.interp(p, x, y), lambda p, x=p_gpa, y=liq: np.interp(p, x, y),
        note="a table is never extrapolated beyond its first and last rows")


# ============================================================================ water, melt fraction
def water_solidus_depression(pressure_pa, bulk_water_wt_percent: float):
    """Lowering of the solidus [K] by water, Katz et al. 2003 form at vanishing melt fraction.

    dT = 43 K X^0.75 with X [wt%] the water in the first melt, X = min(bulk / D, X_sat),
    D = 0.01, X_sat = 12 P^0.6 + 1.0 P [wt%, P in GPa] (Katz, Spiegelman & Langmuir 2003,
    G3 4:1073, eqs. of section 4; checked in transcription). 1 wt% water in the melt lowers
    the solidus by 43 K.

    Simplification: Katz et al. let X fall as the melt fraction grows (X = bulk / (D + F (1 - D)))
    and shift the whole F(T) relation; here the depression of the first melt is applied to the
    solidus only (the liquidus is unchanged), the upper bound of the effect. The saturation
    pressure is held at 10 GPa above the Katz calibration. Returns 0 for dry mantle.

    Parameters
    ----------
    pressure_pa : array_like
        Pressure [Pa].
    bulk_water_wt_percent : float
        Bulk water content of the mantle [wt%], >= 0.
    """
    bulk = float(bulk_water_wt_percent)
    if not math.isfinite(bulk) or bulk < 0.0:
        raise ModelError(f"bulk water content must be a finite number >= 0 wt%, got {bulk_water_wt_percent!r}")
    p_gpa = np.clip(np.asarray(pressure_pa, dtype=float) / GPA, 0.0, KATZ_MAX_PRESSURE_GPA)
    chi1, lam, chi2 = KATZ_WATER_SATURATION
    x_melt = np.minimum(bulk / KATZ_WATER_D, chi1 * p_gpa ** lam + chi2 * p_gpa)
    return KATZ_WATER_K * x_melt ** KATZ_WATER_GAMMA


def law_code(law: str) -> int:
    """Integer code of a melt-fraction law name (see :data:`LAW_CODES`)."""
    try:
        return LAW_CODES[law]
    except (KeyError, TypeError):
        raise ModelError(f"unknown melt-fraction law {law!r}; known laws: {', '.join(LAW_CODES)}") from None


def katz_cpx_exhaustion(pressure_pa, solidus_k, liquidus_k):
    """Temperature [K] and melt fraction at clinopyroxene exhaustion for the Katz et al. 2003 law.

    F_cpx-out = M_cpx / R_cpx with R_cpx = 0.50 + 0.08 P [GPa] and M_cpx = 0.17 (Katz et al.
    2003, G3 4:1073; M_cpx from memory); T_cpx-out = T_sol + F_cpx-out^(1/beta1) (T_lherz - T_sol).

    The lherzolite liquidus T_lherz is not a property of models other than Katz's, so it is
    derived for every model as the same fraction of the solidus-liquidus interval that it
    takes in Katz's curves, f(P) = (T_lherz - T_sol) / (T_liq - T_sol) of Katz 2003 (0.561 at
    0 GPa, 0.401 at 10 GPa): T_lherz = T_sol + f(P) (T_liq - T_sol). With Katz's own curves
    this is exactly Katz's T_lherz. Above 10 GPa (outside the Katz calibration) P is held at
    10 GPa in R_cpx and f, so the law keeps its 10 GPa shape between the model's solidus and
    liquidus.

    Parameters
    ----------
    pressure_pa, solidus_k, liquidus_k : array_like
        Pressure [Pa] and the model's solidus and liquidus [K] at it.

    Returns
    -------
    (t_cpx_out_k, f_cpx_out) : tuple of float64 arrays
    """
    p_gpa = np.clip(np.asarray(pressure_pa, dtype=float) / GPA, 0.0, KATZ_MAX_PRESSURE_GPA)
    sol = np.asarray(solidus_k, dtype=float)
    liq = np.asarray(liquidus_k, dtype=float)
    k_sol = _katz2003_solidus(p_gpa)
    fraction = (_katz2003_lherzolite_liquidus(p_gpa) - k_sol) / (_katz2003_liquidus(p_gpa) - k_sol)
    r0, r1 = KATZ_R_CPX
    f_cpx = np.minimum(KATZ_M_CPX / (r0 + r1 * p_gpa), 1.0)
    t_lherz = sol + fraction * (liq - sol)
    t_cpx = sol + f_cpx ** (1.0 / KATZ_BETA1) * (t_lherz - sol)
    return np.asarray(t_cpx, dtype=np.float64), np.asarray(f_cpx + 0.0 * sol, dtype=np.float64)


def melt_fraction(temperature_k, solidus_k, liquidus_k, aux1, aux2, law_code: int):
    """Melt fraction phi in [0, 1] (vectorised twin of :func:`meltzone._core.melt.melt_fraction`).

    * ``LAW_LINEAR``: phi = (T - T_sol) / (T_liq - T_sol) (common practice); aux unused.
    * ``LAW_KATZ2003`` (Katz, Spiegelman & Langmuir 2003, G3 4:1073, eqs. 2-7 with
      beta1 = beta2 = 1.5): with aux1 = T_cpx-out and aux2 = F_cpx-out,
      phi = F_cpx ((T - T_sol) / (T_cpx - T_sol))^beta1 below T_cpx-out (equal to Katz's
      ((T - T_sol) / (T_lherz - T_sol))^beta1) and
      phi = F_cpx + (1 - F_cpx) ((T - T_cpx) / (T_liq - T_cpx))^beta2 above.

    phi = 0 at and below the solidus, 1 at and above the liquidus; non-decreasing in T.
    NaN temperatures give NaN. Arguments broadcast against each other.
    """
    t, tsol, tliq, a1, a2 = np.broadcast_arrays(*(np.asarray(x, dtype=np.float64) for x in
                                                  (temperature_k, solidus_k, liquidus_k, aux1, aux2)))
    with np.errstate(divide="ignore", invalid="ignore"):
        if law_code == LAW_LINEAR:
            phi = (t - tsol) / (tliq - tsol)
        elif law_code == LAW_KATZ2003:
            below = a2 * np.maximum((t - tsol) / (a1 - tsol), 0.0) ** KATZ_BETA1
            above = a2 + (1.0 - a2) * np.maximum((t - a1) / (tliq - a1), 0.0) ** KATZ_BETA2
            phi = np.where(t < a1, below, above)
        else:
            raise ModelError(f"unknown melt-fraction law code {law_code!r}; known codes: {LAW_CODES}")
        phi = np.where(t <= tsol, 0.0, np.where(t >= tliq, 1.0, phi))
    return phi[()] if phi.ndim == 0 else phi


def node_curves(model: MeltingModel, pressure_pa, law: str = "linear", water_wt_percent: float = 0.0) -> dict:
    """Per-node arrays for the evolution kernel, evaluated once on the interior grid.

    Returns a dict with contiguous float64 arrays ``"solidus"`` and ``"liquidus"`` [K]
    (solidus lowered by :func:`water_solidus_depression`), ``"aux1"`` and ``"aux2"`` (Katz
    law: T_cpx-out [K] and F_cpx-out; linear law: zeros) and the int ``"law_code"`` to pass
    to :func:`meltzone._core.melt.melt_fraction`.
    """
    code = law_code(law)
    p = np.ascontiguousarray(np.atleast_1d(np.asarray(pressure_pa, dtype=np.float64)))
    sol = np.atleast_1d(model.solidus(p)) - water_solidus_depression(p, water_wt_percent)
    liq = np.atleast_1d(model.liquidus(p))
    if np.any(~np.isfinite(sol)) or np.any(~np.isfinite(liq)) or np.any(sol >= liq):
        raise ModelError(f"melting model {model.id!r} gives a solidus at or above the liquidus or a "
                         "non-finite value on this grid")
    if code == LAW_KATZ2003:
        aux1, aux2 = katz_cpx_exhaustion(p, sol, liq)
    else:
        aux1, aux2 = np.zeros_like(p), np.zeros_like(p)
    as_f64 = np.ascontiguousarray
    return {"solidus": as_f64(sol, dtype=np.float64), "liquidus": as_f64(liq, dtype=np.float64),
            "aux1": as_f64(aux1, dtype=np.float64), "aux2": as_f64(aux2, dtype=np.float64), "law_code": int(code)}


def melt_fraction_at(model: MeltingModel, pressure_pa, temperature_k, law: str = "linear",
                     water_wt_percent: float = 0.0):
    """Melt fraction at (P [Pa], T [K]) for a model and law: :func:`node_curves` then :func:`melt_fraction`."""
    p, t = np.broadcast_arrays(np.asarray(pressure_pa, dtype=float), np.asarray(temperature_k, dtype=float))
    c = node_curves(model, p.ravel(), law, water_wt_percent)
    phi = melt_fraction(t.ravel(), c["solidus"], c["liquidus"], c["aux1"], c["aux2"], c["law_code"])
    phi = np.reshape(phi, p.shape)
    return phi[()] if phi.ndim == 0 else phi
