"""The evolution contract: what every scheme returns, and how a scheme is found.

A scheme (:class:`meltzone.evolution.schemes.Scheme`) is a function
``run(spec, interior, curves, progress=None) -> History`` registered in
:mod:`meltzone.evolution.schemes` under the name the user gives
in ``convection.scheme``. Everything below the scheme (layers, results files,
reports, figures, sweeps) sees only :class:`History` (wrapped in a
``meltzone.results.Result``): no kernel module, no index constants, no packed
arrays. This module imports no numba code.

Units are SI throughout (time in seconds); conversions happen at the edges.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Protocol

import numpy as np

#: Scalar series of a History: name -> (unit, description, required). Every scheme fills the required
#: ones; a scheme may leave an optional one out (consumers then show nothing for it).
SERIES = {
    "upper_temperature": ("K", "potential temperature of the upper convecting mantle", True),
    "core_temperature": ("K", "temperature at the top of the core", True),
    "surface_temperature": ("K", "surface temperature", True),
    "surface_heat_flow": ("W", "heat flow out of the surface", True),
    "cmb_heat_flow": ("W", "heat flow across the core-mantle boundary (out of the core)", True),
    "radiogenic_power": ("W", "radiogenic heating of the mantle", True),
    "lid_thickness": ("m", "stagnant-lid thickness (0 when there is none)", True),
    "inner_core_radius": ("m", "inner-core radius", True),
    "melt_mass": ("kg", "mass of melt in the mantle", True),
    "regime": ("1", "0 magma ocean, 1 mobile lid, 2 stagnant lid", True),
    "top_melt_fraction": ("1", "melt fraction at the top of the convecting mantle that sets the regime: batch "
                          "on the adiabat until it first falls to phi_c, isentropic after (at the stagnant lid's "
                          "base)", True),
    "stored_energy": ("J", "stored heat of mantle and core (sensible + latent)", True),
    "heat_out_minus_radiogenic": ("J", "time integral of surface heat flow minus radiogenic power", True),
    "closure_error": ("1", "relative energy-closure error: (stored-energy loss - time-integrated surface heat "
                      "loss net of radiogenic heating) / largest stored-energy change", True),
    "atmosphere_h2o": ("kg", "H2O in the atmosphere", True),
    "atmosphere_co2": ("kg", "CO2 in the atmosphere", True),
    "upper_boundary_layer": ("m", "thickness of the upper thermal boundary layer", False),
    "lower_boundary_layer": ("m", "thickness of the lower thermal boundary layer", False),
    "lid_base_temperature": ("K", "temperature at the base of the lid (= T_u without a lid)", False),
    "upper_temperature_rate": ("K/s", "dT_u/dt", False),
    "core_temperature_rate": ("K/s", "dT_c/dt", False),
    "lid_rate": ("m/s", "d(lid)/dt", False),
    "basal_ocean_thickness": ("m", "thickness of the basal magma ocean between core and solid mantle (0: none)", False),
    "absorbed_flux": ("W/m^2", "absorbed stellar flux per unit surface (sigma T_eq^4 without a star)", False),
    "outgoing_radiation": ("W/m^2", "outgoing radiation at the top of the atmosphere (net surface loss + absorbed "
                           "flux)", False),
    "water_ocean": ("kg", "water condensed in a surface ocean", False),
    "water_dissolved": ("kg", "water dissolved in the melt", False),
    "water_lost": ("kg", "water lost to space (escape of its hydrogen)", False),
    "pressure_h2o": ("Pa", "partial pressure of H2O at the surface (its column weight)", False),
    "pressure_co2": ("Pa", "partial pressure of CO2 at the surface (its column weight)", False),
    # volcanism (melt extraction; volcanism.enabled = "on": the boundary-layer scheme, and the mixing-length
    # scheme's heat pipe under a stagnant lid, which records only melt_production and volcanic_heat_flow)
    "melt_production": ("m^3/s", "volume rate of melt extracted from the mantle (as crust)", False),
    "volcanic_heat_flow": ("W", "heat the extracted melt takes out of the mantle past a stagnant lid (erupted: "
                           "heat pipe; intruded: through crust and lid); not in surface_heat_flow; 0 under a "
                           "mobile lid, whose surface heat flow includes it", False),
    "crust_thickness": ("m", "thickness of the crust made of extracted melt", False),
    "outgassing_h2o_rate": ("kg/s", "H2O outgassed by erupted melt", False),
    "outgassing_co2_rate": ("kg/s", "CO2 outgassed by erupted melt", False),
    "outgassed_h2o": ("kg", "H2O outgassed by erupted melt since the start", False),
    "outgassed_co2": ("kg", "CO2 outgassed by erupted melt since the start", False),
    "crust_heat_share": ("1", "share of the planet's heat-producing elements in the crust", False),
    "crust_heat_production": ("W", "radiogenic heat produced in the crust (in surface_heat_flow as it leaves)",
                              False),
}
#: The series of volcanism (present together or not at all; the mixing-length scheme records only the first two,
#: from its heat pipe, and follows neither crust nor outgassing).
VOLCANISM_SERIES = ("melt_production", "volcanic_heat_flow", "crust_thickness", "outgassing_h2o_rate",
                    "outgassing_co2_rate", "outgassed_h2o", "outgassed_co2", "crust_heat_share",
                    "crust_heat_production")

REGIME_MAGMA_OCEAN, REGIME_MOBILE_LID, REGIME_STAGNANT_LID = 0, 1, 2
REGIME_NAMES = {REGIME_MAGMA_OCEAN: "magma ocean", REGIME_MOBILE_LID: "mobile lid",
                REGIME_STAGNANT_LID: "stagnant lid"}

#: Melt intervals (contiguous runs of mantle nodes with melt fraction > 0, listed per step from the surface
#: down): name -> (unit, description). Nodes count from the CMB (0) upward.
INTERVAL_FIELDS = {
    "step": ("1", "history step the interval belongs to"),
    "top_node": ("1", "shallowest molten node"),
    "bottom_node": ("1", "deepest molten node"),
    "max_melt_fraction": ("1", "largest melt fraction in the interval"),
    "melt_mass": ("kg", "melt mass in the interval"),
    "full_top_node": ("1", "shallowest fully molten node (-1: none)"),
    "full_bottom_node": ("1", "deepest fully molten node (-1: none)"),
    "mean_melt_fraction": ("1", "mass-weighted mean melt fraction"),
}
INTEGER_INTERVAL_FIELDS = ("step", "top_node", "bottom_node", "full_top_node", "full_bottom_node")


@dataclass
class MantleGrid:
    """The mantle nodes the scheme resolved, CMB (index 0) to surface, with the curves evaluated on them."""

    radius: np.ndarray  #: [m]
    pressure: np.ndarray  #: [Pa]
    mass: np.ndarray  #: mass each node stands for [kg]
    solidus: np.ndarray  #: [K]
    liquidus: np.ndarray  #: [K]

    @property
    def n(self) -> int:
        return len(self.radius)


class Evaluator(Protocol):
    """The state inside a step, as the scheme that ran knows it (used to refine event times)."""

    def at(self, t: float) -> "InStep":
        """The profile and the regime quantities at model time ``t`` [s] within the run."""


@dataclass
class InStep:
    """What post-processing needs at a time inside a step."""

    temperature: np.ndarray  #: T on the mantle nodes [K]
    melt_fraction: np.ndarray  #: phi on the mantle nodes
    regime_melt_fraction: float  #: the melt fraction that sets the regime (compare with phi_c)
    centre_freezing_margin_k: float  #: iron melting temperature minus temperature at the centre [K]


@dataclass
class History:
    """What a scheme returns: named, typed series with units (:data:`SERIES`), T and phi on every mantle
    node at every accepted step, the melt intervals, the regime, the times the scheme knows exactly, and an
    :class:`Evaluator` for times inside a step. ``scheme_data`` holds the arrays the scheme needs to rebuild
    its evaluator from a file (written and read back verbatim; their meaning is the scheme's own)."""

    scheme: str
    time: np.ndarray  #: (n_steps,) [s]
    series: dict  #: name -> (n_steps,) array, names from SERIES
    temperature: np.ndarray  #: (n_steps, n_nodes) [K]
    melt_fraction: np.ndarray  #: (n_steps, n_nodes)
    intervals: dict  #: name -> (n_intervals,) array, names from INTERVAL_FIELDS
    grid: MantleGrid
    critical_melt_fraction: float
    switch_times: dict = field(default_factory=dict)  #: name -> time [s] or None (e.g. "rheological_switch")
    n_rejected: int = 0
    scheme_data: dict = field(default_factory=dict, repr=False)
    evaluator: Evaluator | None = field(default=None, repr=False, compare=False)

    @property
    def n_steps(self) -> int:
        """Accepted steps (rows less the initial one)."""
        return len(self.time) - 1

    def __repr__(self) -> str:
        end = f"{self.time[-1]:.4g} s" if len(self.time) else "empty"
        return (f"History(scheme={self.scheme!r}, steps={self.n_steps}, end={end}, nodes={self.grid.n}, "
                f"intervals={len(self.intervals.get('step', ()))}, series={len(self.series)})")

    @property
    def energy_closure(self) -> float:
        """|relative closure error| at the end of the run."""
        return float(abs(self.series["closure_error"][-1]))

    def __getitem__(self, name: str) -> np.ndarray:
        if name == "time":
            return self.time
        return self.series[name]

    def __contains__(self, name: str) -> bool:
        return name == "time" or name in self.series

    def at(self, t: float) -> InStep:
        """The state at model time ``t`` [s] (the scheme's own evaluator)."""
        if self.evaluator is None:
            from .schemes import get_scheme

            self.evaluator = get_scheme(self.scheme).evaluator(self)
        return self.evaluator.at(float(t))

    def check(self) -> None:
        """Raise ValueError if the History breaks the contract (shapes, names, required series)."""
        n = len(self.time)
        missing = [k for k, (_, _, req) in SERIES.items() if req and k not in self.series]
        unknown = [k for k in self.series if k not in SERIES]
        if missing or unknown:
            raise ValueError(f"history series missing {missing}, unknown {unknown}")
        for k, v in self.series.items():
            if np.shape(v) != (n,):
                raise ValueError(f"history series {k!r} has shape {np.shape(v)}, expected ({n},)")
        shape = (n, self.grid.n)
        if self.temperature.shape != shape or self.melt_fraction.shape != shape:
            raise ValueError(f"profiles must be {shape}")
        if set(self.intervals) != set(INTERVAL_FIELDS):
            raise ValueError("intervals must have the fields of INTERVAL_FIELDS")
