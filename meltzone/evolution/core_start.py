"""The core's starting temperature (``initial.core_start``), shared by the evolution schemes.

``"rheological-transition"`` (the default): T_c = min(T_ad, T_phi_c) + dT_cmb, where T_ad is the starting mantle
adiabat at the CMB, T_phi_c the temperature at which the mantle at CMB pressure holds the critical melt fraction
phi_c (its rheological transition, on the run's own melting curves and melt law) and dT_cmb =
``initial.initial_cmb_jump_k``. A magma ocean crystallises from the bottom up because the adiabat is shallower than
the melting curves (Monteux, Andrault & Samuel 2016, EPSL 448:140, abstract checked): the base of the mantle
stiffens first, within kyr, while the core in contact with it cools with it; the core's own evolution then starts
from the stiffened base plus the jump, as parameterised models start after the magma ocean has solidified with a
superheated core (Noack & Lasbleis 2020, A&A 638:A129, abstract checked: "initial temperature profiles after the
accretion and magma ocean solidification"; the 200 K jump of Tosi et al. 2017, A&A 605:A71, Table 1, checked).
Taking phi_c as the state of the stiffened base is this model's choice. The min() caps the rule for a mantle
that starts below its rheological transition at the CMB: the core is then the adiabat plus the jump, as in
``"adiabat"``.

``"adiabat"``: T_c = T_ad + dT_cmb (Tosi et al. 2017, Table 1: initial core-mantle temperature drop 200 K; the rule
before this key existed). With the fully molten start the mantle adiabat sits 50 K or more above the liquidus at
the CMB, so the core starts ~250 K above the mantle liquidus there: 10,273 K at 5 M_E, 18,331 K at 15 M_E
(measured), far hotter than the base of a crystallised mantle.

Both rules are followed by the core's molten floor (:func:`meltzone.evolution.boundary_layer.initial_temperatures`):
T_c is raised, if needed, to 50 K above the core alloy's melting curve at every core node (the mantle's margin over
its liquidus), so the default start has no inner core. The floor is applied after the rule: a core that the rule
would start partly frozen starts just molten instead (this model's choice: the rule describes a base that
stiffens while the core, in contact with it, stays liquid). Measured with the defaults (core fraction 0.325, the
default iron curve): the rule binds at 1 and 2 M_E (4614 K against a floor of 4156 K; 6178 K against 5912 K), the
floor from 3 M_E on (3, 5, 10, 15 M_E: 7439, 10182, 16276, 21931 K against the rule's 7428, 9487, 13562, 16978 K);
the adiabat rule (5057, 8056, 10274, 14659, 18331 K at 1, 3, 5, 10, 15 M_E) is below the floor from 6 M_E on, where
both rules start the core at the same temperature.

What the start does not do: it does not set how long the core stays liquid. The magma ocean drains any excess
within a few kyr (CMB heat flow ~7e21 W at 10 M_E), so the core leaves the magma-ocean stage where the molten mantle
left it, whatever its start; measured with the defaults (mobile lid, 10 Gyr), core_solid_yr moves by at most 4%
between the two rules and even with core_temperature_k = 30000 K (3 M_E 4.26 -> 4.43 Gyr, 5 M_E 0.845 -> 0.861 Gyr,
10 M_E 50.7 -> 50.5 Myr), as "the magma ocean phase effectively erases any signs of the initial core thermodynamic
state" (Vazan, Ormel, Noack & Dominik 2018, sub-Neptune rocky cores, abstract checked). Massive cores freeze fast here
because after the magma ocean the whole mantle sits on one adiabat held near the rheological transition at the top
(T_u ~1670 K): its base is thousands of kelvin below its own solidus (10 M_E: ~3900 K at the CMB against a 12,700 K
solidus) and the lower boundary layer drains the core (measured, not a start effect).

An explicit ``initial.core_temperature_k`` overrides both and the floor.
"""

from __future__ import annotations

from scipy.optimize import brentq

from ..melting import melt_fraction

#: Choices of ``initial.core_start``.
CORE_START_RULES = ("rheological-transition", "adiabat")


def phi_c_temperature(phi_c: float, solidus: float, liquidus: float, aux1: float, aux2: float, law: int) -> float:
    """Temperature [K] at which the melt fraction (law code ``law``, :func:`meltzone.melting.melt_fraction`) of a
    node with these curves equals ``phi_c`` (brentq between solidus and liquidus; the law is monotone there)."""
    return float(brentq(lambda t: float(melt_fraction(t, solidus, liquidus, aux1, aux2, law)) - phi_c, solidus,
                        liquidus, xtol=1e-9, rtol=1e-14))


def core_start_temperature(rule: str, t_adiabat_cmb: float, jump_k: float, t_phi_c_cmb: float) -> float:
    """The core's starting temperature [K] of ``rule`` (module docstring)."""
    if rule == "adiabat":
        return t_adiabat_cmb + jump_k
    return min(t_adiabat_cmb, t_phi_c_cmb) + jump_k
