"""Phase boundaries against their sources, and the high-pressure flags of mantle profiles."""

import json

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from meltzone import melting, phases

GPA = 1e9
TPA = 1e12
KINDS = {"predicted-phase", "extrapolated-melting", "extrapolated-eos", "predicted-transition"}
KEYS = {"kind", "what", "top_depth_m", "bottom_depth_m", "top_pressure_pa", "bottom_pressure_pa", "source",
        "confidence"}


def boundary(name_start):
    (b,) = [b for b in phases.BOUNDARIES if b.name.startswith(name_start)]
    return b


def profile(p_max_pa, n=400, temperature_k=3000.0):
    """A synthetic mantle profile, surface down: pressure rising linearly with depth (analytic)."""
    depth = np.linspace(0.0, 3.0e6 * p_max_pa / (1.4 * TPA), n)
    return depth, np.linspace(1e5, p_max_pa, n), np.full(n, temperature_k)


# ------------------------------------------------------------------ boundaries
def test_tateno2009_post_perovskite_pressure_at_2500k():
    """Tateno et al. 2009, EPSL 277:130 (brackets: ~124 GPa at 2500 K, ~139 GPa at 3700 K) and Murakami et al.
    2004, Science 304:855 (checked: post-perovskite above 125 GPa at 2500 K); tol 3 GPa."""
    b = boundary("bridgmanite -> post-perovskite")
    assert b.pressure_at(2500.0) / GPA == pytest.approx(124.0, abs=3.0)
    assert b.pressure_at(3700.0) / GPA == pytest.approx(139.0, abs=3.0)


def test_fei2004_post_spinel_boundary():
    """Fei et al. 2004, JGR 109:B02305 (checked): P = 25.12 - 0.0013 T[C] GPa; at 1600 C 23.04 GPa; tol 0.01 GPa."""
    b = boundary("ringwoodite -> bridgmanite")
    for t_c in (1200.0, 1600.0, 2000.0):
        assert b.pressure_at(t_c + 273.15) / GPA == pytest.approx(25.12 - 0.0013 * t_c, abs=0.01)


def test_katsura2004_olivine_wadsleyite():
    """Katsura et al. 2004, JGR 109:B02209 (from memory): ~13.5-14 GPa at 1700-1800 K."""
    b = boundary("olivine -> wadsleyite")
    for t in (1700.0, 1800.0):
        assert 13.5 <= b.pressure_at(t) / GPA <= 14.0


def test_umemoto2011_dissociation_is_predicted():
    """Umemoto & Wentzcovitch 2011, EPSL 311:225 (checked): ab initio, ~0.9 TPa and ~2.1 TPa; status predicted."""
    assert boundary("post-perovskite -> MgO").pressure_pa == pytest.approx(0.9 * TPA, rel=0.05)
    assert boundary("MgSi2O5 -> MgO").pressure_pa == pytest.approx(2.1 * TPA, rel=0.05)
    assert {b.status for b in phases.BOUNDARIES if b.pressure_pa > 0.5 * TPA} == {"predicted"}


@settings(deadline=None, derandomize=True, max_examples=100)
@given(t_k=st.floats(1000.0, 8000.0), p1=st.floats(0.0, 3e12), p2=st.floats(0.0, 3e12))
def test_phase_code_rises_with_pressure(t_k, p1, p2):
    """Assemblages are ordered shallow to deep: at fixed T the phase code never falls with pressure."""
    lo, hi = sorted((p1, p2))
    assert phases.phase_at(lo, t_k) <= phases.phase_at(hi, t_k)


def test_markers_table():
    """Each marker carries a source, a status, a confidence word and a band; MgO B1 -> B2 covers 0.40-0.50 TPa
    (McWilliams et al. 2012 laser shock 0.40-0.45 TPa, checked as data; ~0.5 TPa at 0 K, from memory); SiO2
    stishovite -> CaCl2-type ~50 GPa, seifertite ~110-135 GPa, pyrite-type ~260-270 GPa (checked as data)."""
    for m in phases.MARKERS:
        assert m.source and m.status in {"measured", "shock", "predicted"}
        assert m.confidence in {"high", "medium", "low"} and m.uncertainty_pa > 0
    by = {m.name.split(" (")[0]: m for m in phases.MARKERS}
    mgo = by["MgO B1 -> B2"]
    assert mgo.pressure_pa - mgo.uncertainty_pa <= 0.40 * TPA and mgo.pressure_pa + mgo.uncertainty_pa >= 0.50 * TPA
    for name, lo, hi in (("SiO2 stishovite -> CaCl2-type", 50, 50), ("SiO2 seifertite -> pyrite-type", 260, 270)):
        m = by[name]
        assert m.pressure_pa - m.uncertainty_pa <= lo * GPA and m.pressure_pa + m.uncertainty_pa >= hi * GPA


# ------------------------------------------------------------------ flags
def _check_zones(zones):
    for z in zones:
        assert set(z) == KEYS and z["kind"] in KINDS and z["confidence"] in {"high", "medium", "low"}
        assert z["top_depth_m"] <= z["bottom_depth_m"] and z["top_pressure_pa"] <= z["bottom_pressure_pa"]
        assert z["source"]
    json.dumps(zones, allow_nan=False)


def test_flags_earth_like_profile():
    """An Earth-like mantle (to 136 GPa, PREM CMB pressure) has no predicted phase and no extrapolated
    melting for whole-mantle-sg (validated to 140 GPa); it crosses the SiO2 CaCl2-type marker (~50 GPa)."""
    zones = phases.flags(*profile(136 * GPA), melting.get_model("whole-mantle-sg"))
    _check_zones(zones)
    kinds = {z["kind"] for z in zones}
    assert "predicted-phase" not in kinds and "extrapolated-melting" not in kinds
    assert "extrapolated-eos" not in kinds
    assert any(z["what"].startswith("SiO2 stishovite -> CaCl2") for z in zones)


def test_flags_super_earth_profile():
    """A 10 Earth-mass mantle (~1.4 TPa at the CMB in this interior model) reaches the predicted post-perovskite
    dissociation (~0.9 TPa, Umemoto & Wentzcovitch 2011), melting beyond the 140 GPa experiments, the EOS
    beyond 0.15 TPa and the MgO B1 -> B2 band (0.40-0.50 TPa)."""
    depth, p, t = profile(1.4 * TPA)
    zones = phases.flags(depth, p, t, melting.get_model("whole-mantle-sg"))
    _check_zones(zones)
    kinds = {z["kind"] for z in zones}
    assert kinds == KINDS
    (ppv_d,) = [z for z in zones if z["kind"] == "predicted-phase"]
    assert ppv_d["confidence"] == "low" and "ppv-dissociated" in ppv_d["what"]
    assert ppv_d["top_pressure_pa"] == pytest.approx(0.9 * TPA, rel=0.01)
    spacing = p[1] - p[0]
    melt = [z for z in zones if z["kind"] == "extrapolated-melting"]
    assert min(z["top_pressure_pa"] for z in melt) == pytest.approx(140 * GPA, abs=spacing)
    assert max(z["bottom_pressure_pa"] for z in melt) == pytest.approx(p[-1])
    eos = [z for z in zones if z["kind"] == "extrapolated-eos"]
    assert min(z["top_pressure_pa"] for z in eos) == pytest.approx(150 * GPA, abs=spacing)
    (mgo,) = [z for z in zones if z["what"].startswith("MgO B1")]
    assert mgo["top_pressure_pa"] == pytest.approx(0.40 * TPA)
    assert mgo["bottom_pressure_pa"] == pytest.approx(0.50 * TPA)
    # depths interpolated on the linear profile (analytic)
    assert mgo["top_depth_m"] == pytest.approx(np.interp(0.40 * TPA, p, depth), rel=1e-9)


def test_flags_confidence_drops_beyond_shock_data():
    """Fei et al. 2021, Nat. Commun. 12:876 (checked): shock data on MgSiO3 reach 1254 GPa. Extrapolated
    melting is 'medium' below and 'low' above, in two contiguous zones."""
    depth, p, t = profile(2.0 * TPA, n=800)
    melt = [z for z in phases.flags(depth, p, t, "super-earth") if z["kind"] == "extrapolated-melting"]
    assert [z["confidence"] for z in melt] == ["medium", "low"]
    assert melt[0]["bottom_pressure_pa"] <= 1.254 * TPA < melt[1]["top_pressure_pa"]
    assert melt[1]["top_depth_m"] - melt[0]["bottom_depth_m"] == pytest.approx(depth[1] - depth[0])


def test_flags_low_pressure_model_beyond_its_range():
    """peridotite-lowp (Hirschmann 2000, 0-10 GPa) is flagged from 10 GPa down on an Earth-like profile."""
    depth, p, t = profile(136 * GPA)
    melt = [z for z in phases.flags(depth, p, t, "peridotite-lowp") if z["kind"] == "extrapolated-melting"]
    assert len(melt) == 1 and melt[0]["top_pressure_pa"] == pytest.approx(10 * GPA, abs=p[1] - p[0])


def test_flags_do_not_depend_on_node_order():
    depth, p, t = profile(1.0 * TPA)
    forward = phases.flags(depth, p, t, "whole-mantle-sg")
    backward = phases.flags(depth[::-1], p[::-1], t[::-1], "whole-mantle-sg")
    assert forward == backward


def test_flags_shallow_profile_has_none():
    """A 5 GPa-deep mantle crosses no marker band and nothing is extrapolated for whole-mantle-sg."""
    assert phases.flags(*profile(5 * GPA), "whole-mantle-sg") == []


def test_flags_eos_limit_is_a_parameter():
    depth, p, t = profile(1.0 * TPA)
    zones = phases.flags(depth, p, t, "whole-mantle-sg", eos_limit_pa=0.5 * TPA)
    eos = [z for z in zones if z["kind"] == "extrapolated-eos"]
    assert eos[0]["top_pressure_pa"] == pytest.approx(0.5 * TPA, abs=p[1] - p[0])
