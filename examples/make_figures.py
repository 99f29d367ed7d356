"""Regenerate the README's figures from the examples, at small, fast settings (128 mantle nodes; the grid sweep
with 64 nodes over 1 Gyr). All planets are invented; results are model estimates, not measurements.

    python examples/make_figures.py                  # writes examples/figures/*.png
    python examples/make_figures.py --out some/folder

Figures: the melt map, profiles and history of steam_world; the melt map of stagnant_lid; steam_world compared
with the same planet without an atmosphere; the P-T diagram of the default melting model; the probability map
of the grid sweep.
"""

import argparse
import tempfile
import tomllib
from pathlib import Path

import meltzone
from meltzone.melting import get_model
from meltzone.plot import history, meltmap, plot_curves, profiles
from meltzone.plot_compare import compare_figure
from meltzone.results import write
from meltzone.sweep import plot_sweep, run_sweep

EXAMPLES = Path(__file__).resolve().parent
NODES = 128


def main(out: Path) -> None:
    out.mkdir(parents=True, exist_ok=True)
    written = []
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        steam = meltzone.evolve(EXAMPLES / "steam_world.toml", mantle_nodes=NODES)
        written += [meltmap(steam, out / "steam_world-meltmap.png"),
                    profiles(steam, out / "steam_world-profiles.png"),
                    history(steam, out / "steam_world-history.png")]
        lid = meltzone.evolve(EXAMPLES / "stagnant_lid.toml", mantle_nodes=NODES)
        written.append(meltmap(lid, out / "stagnant_lid-meltmap.png"))

        bare = meltzone.evolve(steam.spec.replace(atmosphere="none"))
        files = [write(steam, tmp / "steam_world.h5"), write(bare, tmp / "steam_world-bare.h5")]
        written.append(compare_figure([steam, bare], files, out / "compare-atmosphere.png"))

        written.append(plot_curves(get_model(steam.melting_model), out / f"curves-{steam.melting_model}.png"))

        spec = tomllib.loads((EXAMPLES / "sweep_grid.toml").read_text())
        spec["base"].setdefault("interior", {})["mantle_nodes"] = 64
        spec["base"]["run"]["end_time_gyr"] = 1.0
        grid = tmp / "grid.h5"
        run_sweep(spec, grid, executor="serial", progress=False)
        written.append(plot_sweep(grid, "probability", out / "sweep_grid-probability.png",
                                  outcome="basal_layer_persists"))
    for path in written:
        print("wrote", path)


if __name__ == "__main__":
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=EXAMPLES / "figures", help="folder of the figures")
    main(parser.parse_args().out)
