"""Tesmir b (invented): does the water of a planet around a young red dwarf condense or escape?

Runs the planet of red_dwarf_water_world.toml, writes red_dwarf_water_world.h5 and its history figure in the
current folder and prints the magma ocean's end, the ocean, the water lost to space and the solidification
type (Hamano, Abe & Genda 2013). Results are model estimates, not measurements.

    python examples/red_dwarf_water_world.py
"""

from pathlib import Path

import meltzone
from meltzone.plot import format_years, history
from meltzone.results import write

config = Path(__file__).with_name("red_dwarf_water_world.toml")
result = meltzone.evolve(config)
s = result.summary()

end = s["magma_ocean_end_yr"]
print(f"{s['planet']}: magma ocean " + ("still present at the end" if end is None else f"ends after {format_years(end)}"))
formed = s["water_ocean_formed_yr"]
print("surface ocean: " + ("none" if formed is None else f"condenses after {format_years(formed)}, "
                                                          f"{s['water_ocean_kg']:.3g} kg at the end"))
print(f"water lost to space: {s['water_lost_kg']:.3g} kg; solidification type {s['solidification_type']}")

print("wrote", write(result, "red_dwarf_water_world.h5"))
print("wrote", history(result, "red_dwarf_water_world-history.png"))
