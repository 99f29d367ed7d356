"""Write the pre-refactor regression fixture (history arrays + summary) for three planets.

It uses the API of the code it pins (commit afced0b, before the evolution contract): run it with that checkout,
`python tests/data/make_pre_refactor_fixture.py tests/data/pre_refactor`.
"""
import json, sys
import numpy as np
import meltzone
from meltzone.results import HISTORY_FIELDS

CASES = {
    "mobile": {"planet": {"mass_earth": 1.0, "core_mass_fraction": 0.325}, "run": {"end_time_gyr": 2.0}},
    "stagnant_grey": {"planet": {"mass_earth": 3.0, "core_mass_fraction": 0.3},
                      "convection": {"regime": "stagnant-lid"},
                      "surface": {"atmosphere": "grey", "water_inventory_kg": 1e21, "co2_inventory_kg": 1e20,
                                  "equilibrium_temperature_k": 300.0},
                      "melting": {"melt_fraction_law": "katz2003"},
                      "run": {"end_time_gyr": 2.0}},
    "iron_rich": {"planet": {"mass_earth": 0.8, "core_mass_fraction": 0.6},
                  "run": {"end_time_gyr": 2.0}},
}
out = {}
arrays = {}
for name, cfg in CASES.items():
    r = meltzone.evolve(cfg)
    s = r.summary()
    out[name] = {"config": cfg, "summary": s}
    for f in list(HISTORY_FIELDS) + ["closure_error"]:
        arrays[f"{name}/{f}"] = r.history[f]
    print(name, len(r.history["time"]), s["magma_ocean_end_yr"], s["last_melt_yr"], s["basal_layer"])
np.savez_compressed(sys.argv[1] + ".npz", **arrays)
with open(sys.argv[1] + ".json", "w") as fh:
    json.dump(out, fh, indent=1)
