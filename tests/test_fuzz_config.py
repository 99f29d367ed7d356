"""Seeded fuzz test of config input through the command line.

Several hundred bad configs (wrong types, out-of-range values, control characters and surrogates, TOML syntax
errors, unknown sections and keys, bytes that are not UTF-8, empty and oversized values, keys that contradict
each other) are generated from a fixed seed and run through ``meltzone run FILE -o OUT`` with click's CliRunner.
Every case is invalid, so nothing evolves. Each must end with exit code 2 and exactly one line on stderr,
``error: ...``, naming the key, section or file, and no traceback (the rule of the command line; common practice).
"""

from __future__ import annotations

import math
import random
import string

from click.testing import CliRunner

from meltzone.cli import main
from meltzone.config import SCHEMA, toml_value

SEED = 20240611
N_PER_KIND = 40

NUMERIC = [(sec, k, key) for sec, keys in SCHEMA.items() for k, key in keys.items() if key.kind in (int, float)]
STRINGS = [(sec, k, key) for sec, keys in SCHEMA.items() for k, key in keys.items() if key.kind is str]
#: Control characters and line separators written as TOML escapes (TOML forbids raw ones in strings).
BAD_CHARS = ["\\u0000", "\\u0001", "\\u0007", "\\b", "\\u001b", "\\u001f", "\\u007f", "\\u0085", "\\u2028",
             "\\u2029", "\\n", "\\r", "\\t"]


def _word(rng: random.Random, n: int = 8) -> str:
    return "".join(rng.choice(string.ascii_lowercase) for _ in range(n))


def _doc(sec: str, line: str) -> str:
    return f"[{sec}]\n{line}\n"


def _wrong_type(rng):
    sec, k, key = rng.choice(NUMERIC)
    bad = rng.choice(['"12"', '"abc"', "true", "false", "[1.0, 2.0]", "{ a = 1 }", "1979-05-27T07:32:00Z",
                      "07:32:00", '""', "[]", "nan", "inf", "-inf", "+nan", "1e400"])
    if key.kind is int and rng.random() < 0.3:
        bad = rng.choice(["1.5", "250.5", "-0.5"])
    return _doc(sec, f"{k} = {bad}").encode(), f"{sec}.{k}"


def _out_of_range(rng):
    sec, k, key = rng.choice([t for t in NUMERIC if t[2].lo is not None or t[2].hi is not None])
    side = rng.choice([s for s in ("lo", "hi") if getattr(key, s) is not None])
    edge = getattr(key, side)
    step = max(abs(edge), 1.0) * rng.choice([1e-3, 0.5, 10.0, 1e20])
    value = edge - step if side == "lo" else edge + step
    if key.special is not None and value == key.special:
        value = edge - 0.5 * step
    if key.kind is int:
        value = int(math.floor(value) if side == "lo" else math.ceil(value))
        if side == "lo" and value >= edge:
            value = int(edge) - 1
    return _doc(sec, f"{k} = {toml_value(value)}").encode(), f"{sec}.{k}"


def _bad_text(rng):
    sec, k, key = rng.choice(STRINGS)
    if key.choices is not None:
        value = rng.choice(["", " ", _word(rng), key.choices[0].upper(), key.choices[0] + "x"])
        return _doc(sec, f'{k} = "{value}"').encode(), f"{sec}.{k}"
    text = _word(rng, 3) + rng.choice(BAD_CHARS) + _word(rng, 3)
    return _doc(sec, f'{k} = "{text}"').encode(), f"{sec}.{k}"


def _surrogate(rng, path_token):
    """Surrogates: a TOML escape (refused by TOML) or raw UTF-8-encoded surrogate bytes (not UTF-8)."""
    sec, k, _ = rng.choice(STRINGS)
    if rng.random() < 0.5:
        return _doc(sec, f'{k} = "ab\\ud800cd"').encode(), path_token
    return _doc(sec, f'{k} = "ab').encode() + b"\xed\xa0\x80" + b'cd"\n', path_token


def _oversized(rng):
    sec, k, key = rng.choice([t for t in STRINGS if t[2].max_len is not None])
    return _doc(sec, f'{k} = "{"x" * (key.max_len + rng.randint(1, 5000))}"').encode(), f"{sec}.{k}"


def _syntax(rng, path_token):
    sec, k, _ = rng.choice(NUMERIC)
    broken = rng.choice([f"[{sec}\n{k} = 1\n", f"[{sec}]\n{k} 1\n", f"[{sec}]\n{k} = \n", f'[{sec}]\n{k} = "1\n',
                         f"[{sec}]\n{k} = 1\n{k} = 2\n", f"[{sec}]\n[{sec}]\n", f"[{sec}]\n{k} = 1 2\n",
                         f"[[{sec}]\n", f"[{sec}]\n= 1\n", f"[{sec}]\n{k} = [1, \n", f"[{sec}]\n{k} = 0x\n"])
    return broken.encode(), path_token


def _unknown(rng):
    roll = rng.random()
    if roll < 0.35:
        sec = _word(rng)
        return f"[{sec}]\nx = 1\n".encode(), sec
    sec, k, _ = rng.choice(NUMERIC)
    if roll < 0.7:  # a typo of a real key
        i = rng.randrange(len(k))
        typo = k[:i] + rng.choice(string.ascii_lowercase.replace(k[i], "")) + k[i + 1:]
        return _doc(sec, f"{typo} = 1").encode(), f"{sec}.{typo}"
    if roll < 0.85:  # a real key in the wrong section
        other = rng.choice([s for s in SCHEMA if s != sec])
        return _doc(other, f"{k} = 1").encode(), k
    return f"{k} = 1\n".encode(), k  # a key outside any section


def _not_utf8(rng, path_token):
    head = rng.choice([b"\x89HDF\r\n\x1a\n", b"\xff\xfe", b"\x80", b"[planet]\nname = \"\xe9\"\n", b"\xc3\x28"])
    return head + bytes(rng.randrange(256) for _ in range(rng.randint(0, 64))) + b"\xff", path_token


def _together(rng):
    roll = rng.random()
    if roll < 0.4:
        model = rng.choice([m for m in SCHEMA["melting"]["model"].choices if m != "table"])
        return f'[melting]\nmodel = "{model}"\ntable_file = "{_word(rng)}.csv"\n'.encode(), "melting.table_file"
    if roll < 0.6:
        return b'[melting]\nmodel = "table"\n', "melting.table_file"
    name = rng.choice(["upper_temperature_k", "core_temperature_k"])
    t = rng.uniform(500.0, 1999.0)
    return (f"[surface]\nequilibrium_temperature_k = 2500.0\n[initial]\n{name} = {t!r}\n").encode(), f"initial.{name}"


def _cases():
    rng = random.Random(SEED)
    makers = [_wrong_type, _out_of_range, _bad_text, _oversized, _unknown, _together]
    file_makers = [_surrogate, _syntax, _not_utf8]
    cases = []
    for i in range(N_PER_KIND):
        for make in makers:
            cases.append(make(rng))
        for make in file_makers:
            cases.append(make(rng, None))  # None: the file's own path is the token
    return cases


def test_fuzz_bad_configs_one_line_exit_2(tmp_path):
    """Every generated bad config: exit code 2, one `error:` line on stderr naming the key or the file, no
    traceback, no results file (source: the command line's contract; common practice)."""
    runner = CliRunner()
    out = tmp_path / "out.h5"
    failures = []
    cases = _cases()
    for n, (content, token) in enumerate(cases):
        path = tmp_path / f"case{n}.toml"
        path.write_bytes(content)
        res = runner.invoke(main, ["run", str(path), "-o", str(out)])
        lines = res.stderr.splitlines()
        want = token if token is not None else str(path)
        ok = (res.exit_code == 2 and len(lines) == 1 and lines[0].startswith("error: ") and want in lines[0]
              and "Traceback" not in res.output and isinstance(res.exception, SystemExit) and not out.exists())
        if not ok:
            failures.append((n, want, res.exit_code, res.stderr[:300], repr(res.exception)))
    print(f"fuzz: {len(cases)} bad configs tried")
    assert len(cases) >= 300, f"only {len(cases)} cases"
    assert not failures, f"{len(failures)} of {len(cases)} cases failed, first: {failures[:3]}"


def test_fuzz_bad_overrides_one_line_exit_2(tmp_path):
    """Bad --set values on the demo planet (no CONFIG): exit code 2, one line naming the key (or --set)."""
    rng = random.Random(SEED + 1)
    runner = CliRunner()
    out = tmp_path / "out.h5"
    failures = []
    n_cases = 0
    for _ in range(60):
        sec, k, key = rng.choice(NUMERIC)
        value = rng.choice(["abc", "true", "[1,2]", "{a=1}", "nan", "-inf", "1\n[run]\nend_time_gyr = 1", "",
                            "1e999", "\x00", "\udcff", "1 2"])
        name = rng.choice([f"{sec}.{k}", k])
        res = runner.invoke(main, ["run", "--set", f"{name}={value}", "-o", str(out)])
        n_cases += 1
        lines = res.stderr.splitlines()
        if not (res.exit_code == 2 and len(lines) == 1 and lines[0].startswith("error: ") and k in lines[0]
                and "Traceback" not in res.output and not out.exists()):
            failures.append((name, value, res.exit_code, res.stderr[:300], repr(res.exception)))
    print(f"fuzz: {n_cases} bad --set values tried")
    assert not failures, f"{len(failures)} of {n_cases} cases failed, first: {failures[:3]}"
