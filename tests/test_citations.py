"""The citation registry: every entry has a status word, and a run cites what its configuration uses.

Sources: the status words of the project's reference list (checked / from memory / this model's choice);
the laws named in each case are those the boundary-layer scheme applies for that configuration (common
practice: a run file lists the sources of every law it used, and only those).
"""

import pytest

import meltzone
from meltzone import citations


def test_every_entry_has_a_known_status_and_a_use():
    for key, c in citations.REGISTRY.items():
        assert c.status in citations.STATUSES, key
        assert c.used_for and c.text, key
        assert c.line().endswith(f"[{c.status}]")


def test_scheme_keys_are_registered_for_every_scheme_choice():
    from meltzone.config import SCHEMA

    for name in SCHEMA["convection"]["scheme"].choices:
        spec = meltzone.PlanetSpec.from_mapping({"convection": {"scheme": name}})
        keys = citations.SCHEME_KEYS[name](spec)
        assert keys and all(k in citations.REGISTRY for k in keys)


@pytest.mark.parametrize("section,key,value,cited", [
    ("convection", "regime", "stagnant-lid", "solomatov2000"),
    ("surface", "atmosphere", "grey", "lebrun2013"),
    ("convection", "beta", 0.015, "korenaga2008"),
])
def test_configuration_decides_what_is_cited(section, key, value, cited):
    base = meltzone.PlanetSpec.from_mapping({})
    spec = meltzone.PlanetSpec.from_mapping({section: {key: value}})
    assert cited not in citations.boundary_layer_keys(base)
    assert cited in citations.boundary_layer_keys(spec)


def test_run_sources_mark_memory_and_checked_melting_models():
    from meltzone.melting import get_model

    spec = meltzone.PlanetSpec.from_mapping({})
    lines = citations.run_sources(spec, get_model("katz2003"), ())
    assert lines[0].startswith("melting curves (katz2003)") and lines[0].endswith("[checked]")
    lines = citations.run_sources(spec, get_model("whole-mantle-sg"), ())
    assert lines[0].endswith("[from memory]")
    with pytest.raises(KeyError):
        citations.run_sources(spec, get_model("katz2003"), (), keys=("no-such-source",))
