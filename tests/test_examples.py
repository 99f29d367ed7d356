"""The shipped examples keep working: each scenario's TOML is a valid config and each script runs."""

import subprocess
import sys
from pathlib import Path

import pytest

from meltzone.config import PlanetSpec

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"
SCENARIOS = ["steam_world", "stagnant_lid", "iron_rich", "red_dwarf_water_world"]


@pytest.mark.parametrize("name", SCENARIOS)
def test_example_config_is_valid_and_invented(name):
    spec = PlanetSpec.from_toml(EXAMPLES / f"{name}.toml")
    assert "invented" in spec.planet.name


@pytest.mark.parametrize("name", SCENARIOS)
def test_example_script_runs(name, tmp_path):
    """Each script runs in a fresh folder and writes its results file (and says nothing on stderr but warnings)."""
    proc = subprocess.run([sys.executable, str(EXAMPLES / f"{name}.py")], cwd=tmp_path, capture_output=True,
                          text=True, timeout=600)
    assert proc.returncode == 0, proc.stderr
    assert list(tmp_path.glob("*.h5"))
