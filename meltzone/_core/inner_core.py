"""Heat released by the inner core's growth: latent and gravitational energy, integrated over its mass.

The friendly layer (:func:`meltzone.evolution.boundary_layer.inner_core_heat_row`) tabulates the integral on the
core nodes (row ``C_EIC``); here it is read at the crossing of the core adiabat with the alloy's melting curve,
interpolated with the same weight as the inner core's radius and mass (:func:`meltzone._core.physics.inner_core`),
so that the stored heat stays a continuous, piecewise-linear function of the core temperature.
"""

from __future__ import annotations

from ._jit import njit
from .layout import C_EIC, C_F, C_TMELT


@njit(leaf=True)
def inner_core_heat(tc, core):
    """Latent + gravitational energy [J] released by the inner core at core temperature tc (0 without one)."""
    n = core.shape[1]
    g_prev = tc * core[C_F, 0] - core[C_TMELT, 0]
    if g_prev >= 0.0:
        return 0.0
    for j in range(1, n):
        g = tc * core[C_F, j] - core[C_TMELT, j]
        if g >= 0.0:
            s = g_prev / (g_prev - g)
            return core[C_EIC, j - 1] + s * (core[C_EIC, j] - core[C_EIC, j - 1])
        g_prev = g
    return core[C_EIC, n - 1]
