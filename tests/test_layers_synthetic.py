"""Layer identity, split, merge and freeze driven by synthetic melt intervals (no evolution run).

Source: the rules of :mod:`meltzone.layers` (identity by node overlap; on a split the largest piece by melt
mass keeps the id; on a merge the largest layer's id survives; edges interpolated where T - T_sol crosses
zero) applied to hand-made profiles whose answers follow from those rules by hand; the freezing time of a
profile that cools linearly in time is known analytically (the excess T - T_sol crosses zero at the time
given by linear interpolation). Tolerance: 1e-9 relative on times and edges.
"""

from types import SimpleNamespace

import numpy as np
import pytest

from meltzone import layers
from meltzone.evolution.contract import INTERVAL_FIELDS, SERIES, History, InStep, MantleGrid

N = 20
SOLIDUS = 2000.0
R_CMB, R_TOP = 3.0e6, 5.0e6


def _grid():
    r = np.linspace(R_CMB, R_TOP, N)
    return MantleGrid(radius=r, pressure=np.linspace(1.0e11, 0.0, N), mass=np.full(N, 1.0e21),
                      solidus=np.full(N, SOLIDUS), liquidus=np.full(N, SOLIDUS + 1000.0))


def _profile(*runs, hot=2300.0, cold=1900.0):
    t = np.full(N, cold)
    for lo, hi in runs:
        t[lo:hi + 1] = hot
    return t


def _intervals(temps, grid):
    rows = {k: [] for k in INTERVAL_FIELDS}
    for s, temp in enumerate(temps):
        phi = np.clip((temp - grid.solidus) / (grid.liquidus - grid.solidus), 0.0, 1.0)
        i = N - 1
        while i >= 0:
            if phi[i] > 0:
                top = i
                while i >= 0 and phi[i] > 0:
                    i -= 1
                sl = slice(i + 1, top + 1)
                mass = float(np.sum(grid.mass[sl] * phi[sl]))
                rows["step"].append(s)
                rows["top_node"].append(top)
                rows["bottom_node"].append(i + 1)
                rows["max_melt_fraction"].append(float(phi[sl].max()))
                rows["melt_mass"].append(mass)
                rows["full_top_node"].append(-1)
                rows["full_bottom_node"].append(-1)
                rows["mean_melt_fraction"].append(mass / float(np.sum(grid.mass[sl])))
            else:
                i -= 1
    return {k: np.asarray(v, dtype=np.int64 if k in ("step", "top_node", "bottom_node", "full_top_node",
                                                     "full_bottom_node") else float) for k, v in rows.items()}


class _Linear:
    """In-step state: T(r) linear in time between the stored profiles."""

    def __init__(self, time, temps):
        self.time, self.temps = time, temps

    def at(self, t):
        s = int(np.clip(np.searchsorted(self.time, t), 1, len(self.time) - 1))
        w = (t - self.time[s - 1]) / (self.time[s] - self.time[s - 1])
        temp = (1 - w) * self.temps[s - 1] + w * self.temps[s]
        return InStep(temperature=temp, melt_fraction=np.clip((temp - SOLIDUS) / 1000.0, 0, 1),
                      regime_melt_fraction=0.0, centre_freezing_margin_k=-1.0)


def _result(temps):
    grid = _grid()
    time = np.arange(len(temps), dtype=float) * 100.0
    temps = np.asarray(temps)
    phi = np.clip((temps - SOLIDUS) / 1000.0, 0.0, 1.0)
    series = {name: np.zeros(len(time)) for name, (_, _, req) in SERIES.items() if req}
    series["regime"] = np.ones(len(time), dtype=np.int8)
    series["melt_mass"] = (phi * grid.mass).sum(axis=1)
    h = History(scheme="synthetic", time=time, series=series, temperature=temps, melt_fraction=phi,
                intervals=_intervals(temps, grid), grid=grid, critical_melt_fraction=0.4,
                evaluator=_Linear(time, temps))
    h.check()
    r_all = np.concatenate([np.linspace(0.0, R_CMB, 5, endpoint=False), grid.radius])
    p_all = np.concatenate([np.linspace(3.0e11, 1.0e11, 5, endpoint=False), grid.pressure])
    interior = SimpleNamespace(r=r_all, P=p_all, radius=R_TOP, core_radius=R_CMB, mantle=slice(5, None),
                               cmb_index=5)
    return SimpleNamespace(history=h, intervals=h.intervals, interior=interior, time=time)


def test_split_keeps_the_id_on_the_larger_piece_and_merge_on_the_larger_layer():
    temps = [_profile((5, 14)),            # one layer
             _profile((5, 7), (10, 14)),   # split: the upper piece (5 nodes) is larger than the lower (3)
             _profile((5, 7), (10, 14)),
             _profile((5, 14)),            # merged again
             _profile()]                   # frozen
    table, events = layers.track(_result(temps))
    kinds = [(e["kind"], e["layer"]) for e in events if e["layer"] >= 0 and not e["kind"].startswith("reached")]
    assert kinds == [("formed", 0), ("split", 1), ("merged", 1), ("froze", 0)]
    rows1 = table["step"] == 1
    upper = table["layer"][rows1][np.argmax(table["top_depth"][rows1] == table["top_depth"][rows1].min())]
    assert upper == 0  # the larger (upper) piece kept the id
    assert set(table["layer"][table["step"] == 3]) == {0}


def test_freeze_time_and_edges_follow_the_profiles():
    hot, cold = 2300.0, 1900.0
    temps = [_profile((8, 11), hot=hot, cold=cold), _profile(hot=hot, cold=cold)]
    table, events = layers.track(_result(temps))
    froze = [e for e in events if e["kind"] == "froze"]
    # T - T_sol at the layer's nodes falls linearly from hot - sol to cold - sol over the step of 100 s
    expected = 100.0 * (hot - SOLIDUS) / (hot - cold)
    assert froze and froze[0]["time"] == pytest.approx(expected, rel=1e-9)
    # edges at step 0: T - T_sol goes from +300 (node 11) to -100 (node 12): crossing at 3/4 of the spacing
    r = _grid().radius
    dr = r[1] - r[0]
    assert table["top_radius"][0] == pytest.approx(r[11] + 0.75 * dr, rel=1e-12)
    assert table["bottom_radius"][0] == pytest.approx(r[8] - 0.75 * dr, rel=1e-12)
    thickness = table["bottom_depth"][0] - table["top_depth"][0]
    assert thickness == pytest.approx(r[11] - r[8] + 1.5 * dr, rel=1e-12)  # not a whole number of nodes


def test_two_layers_that_never_touch_keep_their_ids():
    temps = [_profile((2, 4), (12, 15)), _profile((2, 5), (11, 15)), _profile((3, 4), (12, 14))]
    table, events = layers.track(_result(temps))
    assert [e["layer"] for e in events if e["kind"] == "formed"] == [0, 1]
    assert not [e for e in events if e["kind"] in ("split", "merged", "froze")]
    for s in range(3):
        assert sorted(table["layer"][table["step"] == s]) == [0, 1]


def test_rheological_transition_first_crystal_and_simultaneous_layers():
    """Outcomes of the profiles alone. Rheological transition: the time the largest melt fraction falls to
    phi_c = 0.4 (linear in time inside the step here, so T_sol + 400 K is crossed at a known fraction of it);
    first crystal: the fully molten node that first falls below phi = 1; at most two melt layers at once."""
    full, partial = SOLIDUS + 1200.0, SOLIDUS + 200.0  # phi = 1 (clipped) and 0.2
    p0 = _profile((0, N - 1), hot=full)
    p1 = p0.copy()
    p1[6] = SOLIDUS + 900.0  # node 6 crystallises first (phi 0.9)
    p2 = _profile((0, 5), (9, N - 1), hot=SOLIDUS + 600.0)  # two layers, phi 0.6
    p3 = _profile((0, 5), (9, N - 1), hot=partial)  # phi 0.2 everywhere molten
    res = _result([p0, p1, p2, p3])
    t = layers.rheological_transition(res)
    # max phi falls linearly from 0.6 to 0.2 over the last step (200 s -> 300 s): 0.4 at 250 s
    assert t == pytest.approx(250.0, rel=1e-9)
    assert layers.first_crystal_depth(res) == pytest.approx(R_TOP - _grid().radius[6], rel=1e-12)
    per_step = np.bincount(res.intervals["step"])
    assert per_step.max() == 2
