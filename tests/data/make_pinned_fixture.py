"""Write the pinned-results fixture (history arrays + summary) for five planets with the current code.

Run from the repository root: `python tests/data/make_pinned_fixture.py tests/data/pinned`. Re-pin only in a
commit whose message names the deliberate physics change that moved the pinned numbers; a refactor must leave
them unchanged (tests/test_pinned_results.py).
"""
import json
import platform
import subprocess
import sys

import numpy as np

import meltzone

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
    "lava_world": {"planet": {"mass_earth": 1.0}, "surface": {"equilibrium_temperature_k": 1800.0},
                   "convection": {"regime": "stagnant-lid"}, "run": {"end_time_gyr": 1.0}},
    "red_dwarf_steam": {"planet": {"mass_earth": 1.2, "core_mass_fraction": 0.32},
                        "star": {"mass_msun": 0.3, "age_at_start_myr": 5.0},
                        "orbit": {"semi_major_axis_au": 0.12, "bond_albedo": 0.3},
                        "surface": {"atmosphere": "steam", "water_inventory_kg": 2.8e21, "co2_inventory_kg": 5e19},
                        "run": {"end_time_gyr": 0.5}},
}


def environment():
    """What the 1e-12 pin depends on besides the code: the host CPU numba compiles for and the numerical
    libraries' releases."""
    import llvmlite
    import llvmlite.binding as llvm
    import numba
    import scipy
    return {"machine": platform.machine(), "cpu": llvm.get_host_cpu_name(),
            "cpu_features": llvm.get_host_cpu_features().flatten(), "numpy": np.__version__,
            "scipy": scipy.__version__, "numba": numba.__version__, "llvmlite": llvmlite.__version__}


def main(prefix):
    commit = subprocess.run(["git", "rev-parse", "--short", "HEAD"], capture_output=True, text=True).stdout.strip()
    out = {"_written_by": {"commit": commit, "meltzone": meltzone.__version__, "environment": environment()}}
    arrays = {}
    for name, cfg in CASES.items():
        r = meltzone.evolve(cfg)
        s = r.summary()
        out[name] = {"config": cfg, "summary": s}
        for f in r.history.series:
            arrays[f"{name}/{f}"] = r.history[f]
        arrays[f"{name}/time"] = r.history["time"]
        print(name, len(r.history["time"]), s["magma_ocean_end_yr"], s["last_melt_yr"])
    np.savez_compressed(prefix + ".npz", **arrays)
    with open(prefix + ".json", "w") as fh:
        json.dump(out, fh, indent=1)


if __name__ == "__main__":
    main(sys.argv[1])
