"""Tamsk-7 b (invented): an old stagnant-lid planet; how long does partial melt survive under the lid?

Runs the planet of stagnant_lid.toml, writes stagnant_lid.h5, reads it back and draws
stagnant_lid-meltmap.png in the current folder. Results are model estimates, not measurements.

    python examples/stagnant_lid.py
"""

from pathlib import Path

import meltzone
from meltzone.constants import YEAR
from meltzone.plot import format_years, meltmap
from meltzone.results import write

config = Path(__file__).with_name("stagnant_lid.toml")
path = write(meltzone.evolve(config), "stagnant_lid.h5")

result = meltzone.load(path)  # everything below works on the file alone
table, events = result.tracked()
lid = result.history["lid_thickness"]
print(f"{result.spec.planet.name}: lid {lid[-1] / 1e3:.0f} km thick after {format_years(result.time[-1] / YEAR)}")
lid_formed = [e["time"] for e in events if e["kind"] == "stagnant-lid-formed"]
shallow = (table["time"] >= lid_formed[0]) if lid_formed else (table["top_depth"] > 0.0)  # melt under the lid
if shallow.any():
    last = table["time"][shallow].max()
    print(f"melt under the lid until {format_years(last / YEAR)}, "
          f"at {table['top_depth'][shallow].min() / 1e3:.0f}-{table['bottom_depth'][shallow].max() / 1e3:.0f} km depth")
for e in events:
    print(f"  {format_years(e['time'] / YEAR):>10}  {e['kind']}")
print("wrote", meltmap(result, "stagnant_lid-meltmap.png"))
