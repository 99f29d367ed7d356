"""Configuration keys of the boundary-layer scheme's mantle physics (lid growth, starting core temperature,
pressure-dependent properties), kept apart from :mod:`meltzone.config` so that module stays small.

Each function takes the :class:`meltzone.config.Key` class (passed in, so this module imports nothing of
config) and returns the keys of one section, in the order ``meltzone config --example`` shows them.
"""

from __future__ import annotations


def convection_keys(key) -> dict:
    """Keys of [convection]: the stagnant-lid growth law."""
    return {
        "lid_growth_law": key(
            "base-flux", "", "growth of the stagnant lid: 'base-flux', rho c (T_u - T_l) dD/dt = q_lid - q_u, with "
            "the thickening lid's own cooling leaving through the surface; or 'heat-balance-integral', "
            "rho c (T_u - T_lm) dD/dt = q_lid - q_u with T_lm the lid's mean temperature (the law before this key "
            "existed)", choices=("base-flux", "heat-balance-integral"),
            source="base-flux: Schubert & Spohn 1990, JGR 95:14095; Morschhauser, Grott & Breuer 2011, Icarus "
                   "212:541 (form from memory); heat-balance-integral: Goodman 1958, Trans. ASME 80:335 (from "
                   "memory); see meltzone._core.lid"),
    }


def initial_keys(key) -> dict:
    """Keys of [initial]: the rule of the core's starting temperature."""
    return {
        "core_start": key(
            "rheological-transition", "", "the core's starting temperature when core_temperature_k = 0: "
            "'rheological-transition', the temperature at which the mantle at the CMB holds the critical melt "
            "fraction (or the starting mantle adiabat there, if colder) plus initial_cmb_jump_k; or 'adiabat', the "
            "starting mantle adiabat at the CMB plus initial_cmb_jump_k (the rule before this key existed)",
            choices=("rheological-transition", "adiabat"),
            source="bottom-up crystallisation of the magma ocean, Monteux, Andrault & Samuel 2016, EPSL 448:140; "
                   "start after magma-ocean solidification with a superheated core, Noack & Lasbleis 2020, A&A "
                   "638:A129 (abstracts checked); phi_c as the stiffened base: this model's choice; see "
                   "meltzone.evolution.core_start"),
    }
