"""Numba scalar kernels of the melt-fraction laws (plain floats in, plain floats out).

The NumPy twin is :func:`meltzone.melting.melt_fraction` (same formulas; the tests
compare both). The per-node inputs come from :func:`meltzone.melting.node_curves`:
``tsol``, ``tliq`` [K], ``aux1``, ``aux2`` (Katz law: T_cpx-out [K], F_cpx-out) and
``law_code``.

The law codes and the Katz exponents are read from :mod:`meltzone.melting` and frozen
when a kernel compiles; numba's cache does not notice edits there, so clear
``NUMBA_CACHE_DIR`` after changing them.
"""

from __future__ import annotations

from ._jit import njit

from ..melting import KATZ_BETA1, KATZ_BETA2, LAW_KATZ2003, LAW_LINEAR


@njit(leaf=True)
def melt_fraction(t, tsol, tliq, aux1, aux2, law_code):
    """Melt fraction phi in [0, 1] at temperature ``t`` [K] for one node.

    ``LAW_LINEAR``: (t - tsol) / (tliq - tsol) (common practice). ``LAW_KATZ2003``
    (Katz, Spiegelman & Langmuir 2003, G3 4:1073, beta1 = beta2 = 1.5):
    aux2 ((t - tsol) / (aux1 - tsol))^beta1 below aux1 = T_cpx-out, then
    aux2 + (1 - aux2) ((t - aux1) / (tliq - aux1))^beta2. 0 at and below the solidus,
    1 at and above the liquidus; NaN for NaN ``t`` or an unknown law code.
    """
    if t <= tsol:
        return 0.0
    if t >= tliq:
        return 1.0
    if law_code == LAW_LINEAR:
        return (t - tsol) / (tliq - tsol)
    if law_code == LAW_KATZ2003:
        if t < aux1:
            return aux2 * ((t - tsol) / (aux1 - tsol)) ** KATZ_BETA1
        return aux2 + (1.0 - aux2) * ((t - aux1) / (tliq - aux1)) ** KATZ_BETA2
    return float("nan")


@njit
def melt_fraction_nodes(t, tsol, tliq, aux1, aux2, law_code, out):
    """Fill ``out[i]`` with :func:`melt_fraction` of node ``i`` (contiguous float64 arrays)."""
    for i in range(t.shape[0]):
        out[i] = melt_fraction(t[i], tsol[i], tliq[i], aux1[i], aux2[i], law_code)
    return out
