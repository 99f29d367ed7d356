"""Caddow b (invented): a dense, iron-rich planet compared with an Earth-like one of the same mass.

Runs the planet of iron_rich.toml and the same planet with an Earth-like core mass fraction,
prints both interiors and their melting, and writes iron_rich.h5 and iron_rich-profiles.png in
the current folder. Results are model estimates, not measurements.

    python examples/iron_rich.py
"""

from pathlib import Path

import meltzone
from meltzone.constants import GPA
from meltzone.plot import format_years, profiles
from meltzone.results import write

spec = meltzone.PlanetSpec.from_toml(Path(__file__).with_name("iron_rich.toml"))
for cmf in (spec.planet.core_mass_fraction, 0.325):
    result = meltzone.evolve(spec.replace(core_mass_fraction=cmf))
    it, s = result.interior, result.summary()
    last = "continues to the end" if s["last_melt_yr"] is None else f"ends after {format_years(s['last_melt_yr'])}"
    print(f"core mass fraction {cmf:.3g}: radius {it.radius / 1e3:,.0f} km, mantle "
          f"{(it.radius - it.core_radius) / 1e3:,.0f} km thick, CMB {it.cmb_pressure / GPA:.0f} GPa; "
          f"partial melting {last}")
    if cmf == spec.planet.core_mass_fraction:
        print("wrote", write(result, "iron_rich.h5"))
        print("wrote", profiles(result, "iron_rich-profiles.png", times_yr=[0.0, 1e3, 1e5, 1e7, 1e9, 4.5e9]))
