"""Orlenne-2 c (invented): how long does a thick steam atmosphere keep the magma ocean alive?

Runs the planet of steam_world.toml, writes steam_world.h5 and steam_world-history.png in the
current folder and prints when the magma ocean ends and how much water sits in the atmosphere.
Results are model estimates, not measurements.

    python examples/steam_world.py
"""

from pathlib import Path

import meltzone
from meltzone.constants import YEAR
from meltzone.plot import format_years, history
from meltzone.results import write

config = Path(__file__).with_name("steam_world.toml")
result = meltzone.evolve(config)
summary = result.summary()

end = summary["magma_ocean_end_yr"]
print(f"{summary['planet']}: magma ocean "
      + ("still present at the end" if end is None else f"ends after {format_years(end)}"))
h2o = result.history["atmosphere_h2o"]
peak = int(h2o.argmax())
print(f"atmospheric H2O peaks at {h2o[peak]:.3g} kg after {format_years(result.time[peak] / YEAR)}, "
      f"{h2o[-1]:.3g} kg at the end")

# the same planet without an atmosphere, for comparison
bare = meltzone.evolve(result.spec.replace(atmosphere="none")).summary()
print(f"without an atmosphere the magma ocean would end after {format_years(bare['magma_ocean_end_yr'] or 0.0)}")

print("wrote", write(result, "steam_world.h5"))
print("wrote", history(result, "steam_world-history.png"))
