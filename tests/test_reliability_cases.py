"""The one-line error a kernel's own exception becomes (the planets of the box that once failed are added below
as they are fixed; rerun any of them alone with ``python benchmarks/bench_reliability.py --only 782``).
"""

from __future__ import annotations

import pytest

import meltzone
from meltzone import cli
from meltzone.errors import ConvergenceError


def _raise_zero_division(*args):
    raise ZeroDivisionError("division by zero")


def test_kernel_exception_becomes_one_line_error(monkeypatch):
    """An exception raised inside the kernel (a ZeroDivisionError, as numba raises it for a float division by
    zero) reaches the user as a ConvergenceError naming the planet, the model time and the setting to change,
    and through the CLI as one `error:` line with exit code 2 (the project's rule for every user-facing
    failure)."""
    from click.testing import CliRunner

    import meltzone._core.loop as loop

    monkeypatch.setattr(loop, "integrate", _raise_zero_division)
    with pytest.raises(ConvergenceError) as err:
        meltzone.evolve({"planet": {"name": "Zed-1 b (invented)"}, "run": {"end_time_gyr": 0.01}})
    text = str(err.value)
    assert "Zed-1 b (invented)" in text and "model time 0 yr" in text and "run.max_temperature_step_k" in text
    assert "ZeroDivisionError" in text
    runner = CliRunner()
    with runner.isolated_filesystem():
        res = runner.invoke(cli.main, ["run", "--set", "run.end_time_gyr=0.01"])
    assert res.exit_code == 2
    lines = [line for line in res.output.splitlines() if line.startswith("error:")]
    assert len(lines) == 1 and "run.max_temperature_step_k" in lines[0], res.output
    assert "Traceback" not in res.output
