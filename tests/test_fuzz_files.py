"""Damaged and foreign results files never end in a traceback (seeded fuzz over a real run file).

Source: common practice for file readers (a damaged input is reported, not crashed on). Each case copies a
small run file and damages it with h5py or at the byte level: root attributes replaced by arrays or removed,
groups removed, datasets emptied, filled with NaN, given the wrong length or the wrong type, bytes truncated
or overwritten, a file that is not HDF5 at all. Every command that reads a run file (summary, layers, plot;
with and without --json) must either work (exit 0: the damage did not touch what it reads) or exit 2 with
one line that names the file, and never print a traceback. The damages that make a file unusable for
everything (the cases of ``MUST_FAIL``) must exit 2.
"""

import random
import shutil

import h5py
import numpy as np
import pytest
from click.testing import CliRunner

import meltzone
from meltzone.cli import main

SEED = 20261202
N_CASES = 80
COMMANDS = (("summary",), ("summary", "--json"), ("layers",), ("layers", "--json"), ("plot", "--figure", "history"))


@pytest.fixture(scope="module")
def good_file(tmp_path_factory):
    path = tmp_path_factory.mktemp("fuzz") / "good.h5"
    result = meltzone.evolve({"planet": {"mass_earth": 1.0}, "interior": {"mantle_nodes": 64},
                              "run": {"end_time_gyr": 0.05}})
    meltzone.write(result, path)
    return path


def _datasets(path):
    names = []
    with h5py.File(path, "r") as f:
        f.visititems(lambda name, obj: names.append(name) if isinstance(obj, h5py.Dataset) else None)
    return names


def _groups(path):
    with h5py.File(path, "r") as f:
        return [name for name in f if isinstance(f[name], h5py.Group)]


def _set_attr(path, name, value):
    with h5py.File(path, "r+") as f:
        f.attrs[name] = value


def _del_attr(path, name):
    with h5py.File(path, "r+") as f:
        del f.attrs[name]


def _del(path, name):
    with h5py.File(path, "r+") as f:
        del f[name]


def _replace(path, name, make):
    """Replace dataset ``name`` by ``make(old_values)`` (no dimension scales attached)."""
    with h5py.File(path, "r+") as f:
        old = f[name][()]
        del f[name]
        f.create_dataset(name, data=make(old))


def _nan(old):
    arr = np.asarray(old)
    if arr.dtype.kind == "f":
        return np.full_like(arr, np.nan)
    return arr.astype(float) * np.nan if arr.dtype.kind in "iu" else np.array([b"\xff"])


def _shorter(old):
    arr = np.asarray(old)
    return arr[:-1] if arr.ndim and len(arr) > 1 else np.zeros((0,) + arr.shape[1:], dtype=arr.dtype)


def _empty(old):
    arr = np.asarray(old)
    return np.zeros((0,) + arr.shape[1:], dtype=arr.dtype) if arr.ndim else np.array([], dtype=float)


def _text(old):
    return np.array(["not a number"] * max(np.size(old), 1), dtype=h5py.string_dtype())


def _truncate(path, fraction):
    data = path.read_bytes()
    path.write_bytes(data[: int(len(data) * fraction)])


def _scribble(path, rng):
    data = bytearray(path.read_bytes())
    for _ in range(64):
        i = rng.randrange(len(data))
        data[i] = rng.randrange(256)
    path.write_bytes(bytes(data))


#: Damages every reader must refuse (exit 2): the file's identity, its schema, or its history is unusable.
MUST_FAIL = {
    "kind as array": lambda p: _set_attr(p, "meltzone_kind", np.array(["run", "run"], dtype=h5py.string_dtype())),
    "schema as array": lambda p: _set_attr(p, "schema_version", np.array([3, 3])),
    "kind removed": lambda p: _del_attr(p, "meltzone_kind"),
    "kind foreign": lambda p: _set_attr(p, "meltzone_kind", "spreadsheet"),
    "schema unknown": lambda p: _set_attr(p, "schema_version", 999),
    "history removed": lambda p: _del(p, "history"),
    "history emptied": lambda p: [_replace(p, f"history/{n}", _empty) for n in ("time", "upper_temperature")],
    "mantle masses emptied": lambda p: _replace(p, "history/mantle_mass", _empty),
    "history time NaN": lambda p: _replace(p, "history/time", _nan),
    "temperature all NaN": lambda p: _replace(p, "history/upper_temperature", _nan),
    "events kind wrong length": lambda p: _replace(p, "events/kind", lambda old: np.array(
        ["formed"] * (len(old) + 3), dtype=h5py.string_dtype())),
    "config text removed": lambda p: _del_attr(p, "config_toml"),
    "config text broken": lambda p: _set_attr(p, "config_toml", "[planet\nmass_earth = "),
    "truncated to 30%": lambda p: _truncate(p, 0.3),
    "not HDF5": lambda p: p.write_text("pressure_gpa,solidus_k\n0,1500\n"),
    "empty file": lambda p: p.write_bytes(b""),
}


def _random_damages(path, rng, n):
    datasets = _datasets(path)
    groups = _groups(path)
    makers = (("nan", _nan), ("shorter", _shorter), ("empty", _empty), ("text", _text))
    cases = []
    for _ in range(n):
        what = rng.random()
        if what < 0.7:
            name = rng.choice(datasets)
            label, make = rng.choice(makers)
            cases.append((f"{name}: {label}", lambda p, name=name, make=make: _replace(p, name, make)))
        elif what < 0.8:
            name = rng.choice(groups)
            cases.append((f"group {name} removed", lambda p, name=name: _del(p, name)))
        elif what < 0.9:
            frac = rng.uniform(0.05, 0.95)
            cases.append((f"truncated to {frac:.0%}", lambda p, frac=frac: _truncate(p, frac)))
        else:
            seed = rng.randrange(1 << 30)
            cases.append((f"scribbled ({seed})", lambda p, seed=seed: _scribble(p, random.Random(seed))))
    return cases


def _check(runner, path, label, must_fail):
    outcomes = []
    for command in COMMANDS:
        args = [command[0], str(path), *command[1:]]
        if command[0] == "plot":
            args += ["-o", str(path.with_suffix(".png"))]
        res = runner.invoke(main, args)
        text = (res.stdout or "") + (res.stderr or "")
        assert "Traceback" not in text, f"{label}: {' '.join(command)} printed a traceback"
        assert res.exit_code in (0, 2), f"{label}: {' '.join(command)} exit {res.exit_code}: {text[-400:]}"
        if res.exit_code == 2:
            err = res.stderr.strip().splitlines()
            assert len(err) == 1 and path.name in err[0], f"{label}: {' '.join(command)}: {res.stderr!r}"
        if must_fail:
            assert res.exit_code == 2, f"{label}: {' '.join(command)} accepted a broken file: {text[:300]}"
        outcomes.append(res.exit_code)
    return outcomes


@pytest.mark.parametrize("label", sorted(MUST_FAIL))
def test_unusable_files_exit_2_naming_the_file(good_file, tmp_path, label):
    path = tmp_path / "damaged.h5"
    shutil.copy(good_file, path)
    MUST_FAIL[label](path)
    _check(CliRunner(), path, label, must_fail=True)


def test_seeded_random_damage_never_ends_in_a_traceback(good_file, tmp_path):
    rng = random.Random(SEED)
    runner = CliRunner()
    cases = _random_damages(good_file, rng, N_CASES)
    counts = {0: 0, 2: 0}
    for i, (label, damage) in enumerate(cases):
        path = tmp_path / f"case{i}.h5"
        shutil.copy(good_file, path)
        try:
            damage(path)
        except (OSError, KeyError, TypeError, ValueError):
            continue  # a damage h5py cannot apply to this object
        for code in _check(runner, path, label, must_fail=False):
            counts[code] += 1
    print(f"damaged run files: {len(cases)} cases x {len(COMMANDS)} commands; exit 0: {counts[0]}, "
          f"exit 2: {counts[2]}")
    assert counts[2] > 0 and sum(counts.values()) >= len(COMMANDS) * N_CASES // 2
