"""Statistics of a sweep: binomial fractions with standard errors and Wilson intervals, the observed-mode
probabilities, and the compact summary of a sweep file (the data behind its text report).

Outcome probabilities are fractions p = k / n of the cases that ran, with the binomial standard error
sqrt(p (1 - p) / n) and the Wilson score interval (Wilson 1927, J. Am. Stat. Assoc. 22:209).
"""

from __future__ import annotations

import math
from typing import Mapping

import numpy as np

from .worker import AGE_FLAGS, FAILED, FLAGS, METRICS, OK, REJECTED

__all__ = ["binomial_estimate", "flag_names", "observed_probabilities", "input_names", "summarize_sweep"]


def binomial_estimate(k: int, n: int, z: float = 1.959963984540054) -> dict:
    """Fraction p = k/n with its binomial standard error sqrt(p(1-p)/n) and the Wilson score interval.

    Wilson 1927, J. Am. Stat. Assoc. 22:209 (the interval stays inside [0, 1] and is sensible at
    k = 0 or k = n, where the standard error vanishes). z = 1.96 gives ~95%.
    """
    if n <= 0:
        return {"k": int(k), "n": int(n), "p": None, "se": None, "wilson_low": None, "wilson_high": None}
    p = k / n
    se = math.sqrt(p * (1.0 - p) / n)
    denom = 1.0 + z * z / n
    centre = (p + z * z / (2 * n)) / denom
    half = z * math.sqrt(p * (1 - p) / n + z * z / (4 * n * n)) / denom
    return {"k": int(k), "n": int(n), "p": p, "se": se, "wilson_low": max(centre - half, 0.0),
            "wilson_high": min(centre + half, 1.0)}


def flag_names(spec_mode: str) -> dict:
    """The yes/no outcomes of a sweep of this mode: name -> long name."""
    names = dict(FLAGS)
    if spec_mode == "observed":
        names.update(AGE_FLAGS)
    return names


def observed_probabilities(status: np.ndarray, flags: Mapping[str, np.ndarray]) -> dict:
    """Outcome probabilities of the observed mode among the cases that ran, and the rejected fraction."""
    status = np.asarray(status)
    ok = status == OK
    n_ok = int(np.sum(ok))
    out = {"rejected": binomial_estimate(int(np.sum(status == REJECTED)), len(status)),
           "failed": int(np.sum(status == FAILED))}
    for name in AGE_FLAGS:
        if name in flags:
            out[name] = binomial_estimate(int(np.sum(np.asarray(flags[name])[ok] == 1)), n_ok)
    return out


def input_names(data: dict) -> list[str]:
    """The input variables of a sweep read by :func:`meltzone.sweep.read_sweep` (swept keys, drawn radius)."""
    return [k for k, m in data["meta"].items() if "config_key" in m or k == "radius_earth"]


def _stats(values: np.ndarray) -> dict:
    v = np.asarray(values, dtype=np.float64)
    v = v[np.isfinite(v)]
    if not len(v):
        return {"n": 0, "min": None, "median": None, "max": None}
    return {"n": int(len(v)), "min": float(np.min(v)), "median": float(np.median(v)), "max": float(np.max(v))}


def summarize_sweep(data: dict, path) -> dict:
    """Compact statistics of a sweep file's content ``data`` (:func:`meltzone.sweep.read_sweep` of ``path``):
    counts, failures, inputs and metrics (min/median/max over the cases that ran), yes/no outcome fractions
    with binomial standard errors, and the observed-mode probabilities."""
    a = data["attrs"]
    c = data["cases"]
    status = c["status"]
    ok = status == OK
    errors: dict[str, int] = {}
    for s, msg in zip(status, c["error"]):
        if s == FAILED:
            errors[msg] = errors.get(msg, 0) + 1
    out = {
        "path": str(path), "kind": "sweep", "mode": a.get("sweep_mode"), "created_utc": a.get("created_utc"),
        "n_cases": int(len(status)), "n_ok": int(np.sum(ok)), "n_failed": int(np.sum(status == FAILED)),
        "n_rejected": int(np.sum(status == REJECTED)),
        "failures": [{"error": m, "count": k} for m, k in sorted(errors.items(), key=lambda kv: -kv[1])[:5]],
        "inputs": {}, "metrics": {}, "outcomes": {},
        "note": "Results are model estimates, not measurements.",
    }
    for name in input_names(data):
        if c[name].dtype.kind in "fiu":
            out["inputs"][name] = {"unit": data["units"][name], **_stats(c[name])}
        else:
            vals, counts = np.unique(c[name].astype(str), return_counts=True)
            out["inputs"][name] = {"unit": "", "values": {str(v): int(k) for v, k in zip(vals, counts)}}
    if "core_mass_fraction" in c and "core_mass_fraction" not in out["inputs"]:
        out["inputs"]["core_mass_fraction"] = {"unit": "1", **_stats(c["core_mass_fraction"])}
    for name in METRICS:
        if name in c:
            out["metrics"][name] = {"unit": data["units"][name], **_stats(c[name][ok])}
    for name in flag_names(a.get("sweep_mode", "")):
        if name in c:
            out["outcomes"][name] = binomial_estimate(int(np.sum(c[name][ok] == 1)), int(np.sum(ok)))
    if a.get("sweep_mode") == "observed":
        probs = observed_probabilities(status, {k: c[k] for k in AGE_FLAGS if k in c})
        out["observed"] = {
            "mass_earth": a.get("observed_mass_earth"), "mass_sigma": a.get("observed_mass_sigma"),
            "radius_earth": a.get("observed_radius_earth"), "radius_sigma": a.get("observed_radius_sigma"),
            "age_gyr": a.get("observed_age_gyr"), **probs,
            "note": "probabilities among the draws that ran (rocky fits); standard error sqrt(p(1-p)/n)",
        }
    return out
