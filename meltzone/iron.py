"""Melting of the core's iron alloy: the curve that sets the inner core, and its validated range.

Pure iron after Anzellini et al. 2013 (Science 340:464): laser-heated diamond-cell melting to 200 GPa (the
range checked in the paper's summary), extrapolated by the authors to 6230 +- 500 K at the inner-core boundary
(330 GPa, checked). The alloy's curve is lowered by a light-element depression
(``melting.core_melting_depression_k``, default 700 K): Alfe, Price & Gillan 2003 (Mineral. Mag. 67:113,
abstract checked) find pure iron melting at 6350 +- 600 K at the ICB and a shift of ~-700 K for their
proposed core composition, so an ICB temperature of 5650 +- 600 K; with Anzellini's curve the default gives
5530 K there. The depression is one constant in kelvin at every pressure (this model's choice: the published
value is for Earth's ICB only), applied to every use of the curve (inner core of both evolution schemes, the
default molten start). Results are model estimates.

Beyond 200 GPa the fit is extrapolated. Laser-shock melting data reach 1000 GPa (Kraus et al. 2022, Science
375:202, range checked against the abstract; the journal's summary, checked, adds that the liquid cores of
Earth-like planets of 4-6 Earth masses last longest); two of their points, recalled from memory (liquid at 556 GPa
/ 8085 K, solid at 991 GPa / 10766 K, tests/test_melting.py), are consistent with the extrapolated fit. Their own
Simon-Glatzel fit was found in no source readable here (searched: the abstract pages, news reports, papers citing
it; the paper's text was not reachable); secondary sources quote it as T = 5530 K ((P - 260 GPa)/293 GPa +
1)^0.552 for 260-1000 GPa. Not verified in the source, those coefficients are not used as a model; taken as quoted,
they lie within 0.5% of the extrapolated fit from 260 to 1000 GPa (0.2% from 300 GPa; tests/test_melting.py holds
it to 1%) and 0.9, 1.4 and 2.3% below it at 1500, 2000 and 3000 GPa. An ab initio fit to 5000 GPa (Gonzalez-Cataldo
& Militzer 2023, Phys. Rev. Research), also known here only as quoted by secondary sources, T = 6469 K (1 + (P - 300 GPa)/434.82
GPa)^(1/1.839), lies 6% below the extrapolated fit at 2000 GPa: beyond 1000 GPa the curve rests on no melting
measurement. Super-Earth cores reach far beyond it (centres at 1766, 3787 and 6094 GPa at 5, 10 and 15 Earth masses
with the defaults, measured), so their freezing times are model estimates on an extrapolated curve. The curve is
flagged beyond the static data (:data:`IRON_STATIC_MAX_PA`) by :func:`meltzone.phases.core_flags`: "medium" up to
the shock data's 1000 GPa (:data:`IRON_SHOCK_MAX_PA`), "low" above.
"""

from __future__ import annotations

import math

import numpy as np

from .constants import GPA
from .errors import ModelError
from .melting import simon_glatzel

#: Anzellini et al. 2013, Science 340:464: Simon-Glatzel branches (T0 [K], P0 [GPa], a [GPa], c);
#: the fit is from memory but reproduces the checked 6230 +- 500 K at 330 GPa. Branch 1 from the
#: delta-gamma-liquid triple point (5.2 GPa, 1991 K) to the gamma-epsilon-liquid triple point
#: (98.5 GPa, 3712 K); branch 2 above. The two meet within 1 K.
ANZELLINI2013_BRANCHES = ((1991.0, 5.2, 27.39, 2.38), (3712.0, 98.5, 161.2, 1.72))
#: Pressure of the gamma-epsilon-liquid triple point of iron [GPa] (Anzellini et al. 2013).
ANZELLINI2013_TRIPLE_POINT_GPA = 98.5
#: Top of the static experiments behind the fit [Pa]: Anzellini et al. 2013 reached 200 GPa (checked in the
#: paper's summary; their 330 GPa value is an extrapolation). Earth's inner core (330-364 GPa) lies beyond.
IRON_STATIC_MAX_PA = 200.0 * GPA
#: Pressure of Earth's inner-core boundary [Pa], where the core's latent heat is given (PREM: 329 GPa,
#: Dziewonski & Anderson 1981; the round value of Anzellini et al. 2013).
EARTH_ICB_PRESSURE_PA = 330.0 * GPA
#: Top of the laser-shock melting data on iron [Pa]: 1000 GPa (Kraus et al. 2022, Science 375:202, checked
#: against the abstract); the Anzellini et al. 2013 fit is not fitted to them (see the module).
IRON_SHOCK_MAX_PA = 1000.0 * GPA


def iron_melting_temperature(pressure_pa, depression_k: float = 0.0):
    """Melting temperature [K] of the core alloy: pure iron (Anzellini et al. 2013) minus a depression.

    Simon-Glatzel branches of Anzellini et al. 2013, Science 340:464 (6230 +- 500 K at
    330 GPa, checked; fit coefficients from memory): T = 1991 ((P - 5.2)/27.39 + 1)^(1/2.38)
    up to the triple point at 98.5 GPa / 3712 K, then 3712 ((P - 98.5)/161.2 + 1)^(1/1.72).
    Static data to 200 GPa; two laser-shock points to 1000 GPa (Kraus et al. 2022, Science 375:202; recalled from
    memory) lie near it. Beyond 200 GPa the fit is extrapolated (a monotone power law). Below 5.2 GPa
    the first branch is used down to 0 GPa (1822 K at 1 bar against 1811 K measured for iron).

    Parameters
    ----------
    pressure_pa : array_like
        Pressure [Pa], >= 0.
    depression_k : float
        Lowering by light elements [K], >= 0 (``melting.core_melting_depression_k``; ~700 K at Earth's ICB,
        Alfe, Price & Gillan 2003, Mineral. Mag. 67:113, checked).
    """
    p_gpa = np.asarray(pressure_pa, dtype=float) / GPA
    if not np.all(np.isfinite(p_gpa)) or np.any(p_gpa < 0.0):
        raise ModelError(f"iron melting: pressure must be finite and >= 0, got {pressure_pa!r}")
    if not math.isfinite(depression_k) or depression_k < 0.0:
        raise ModelError(f"iron melting: depression must be a finite number >= 0 K, got {depression_k!r}")
    low, high = ANZELLINI2013_BRANCHES
    t = np.where(p_gpa <= ANZELLINI2013_TRIPLE_POINT_GPA, simon_glatzel(p_gpa, *low),
                 simon_glatzel(np.maximum(p_gpa, high[1]), *high)) - depression_k
    if np.any(t <= 0.0):
        raise ModelError(f"iron melting: a depression of {depression_k:g} K leaves no positive melting temperature")
    return t[()] if t.ndim == 0 else t
