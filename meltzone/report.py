"""Text reports: what the command line prints for people (tables) and scripts (JSON).

Sections: "sweeps" (the summary of a sweep file). Every report states that results are model estimates,
not measurements.
"""

from __future__ import annotations

import json

__all__ = ["sweep_summary_lines", "print_sweep_summary"]


# ====================================================================== sweeps
def sweep_summary_lines(s: dict) -> list[str]:
    """The summary of a sweep (:func:`meltzone.sweep.summary_dict`) as table lines for people: counts and
    the most common failures, inputs and metrics (min/median/max over the cases that ran), yes/no outcome
    fractions with binomial standard errors, and the observed-mode probabilities with Wilson intervals."""
    from .sweep.worker import AGE_FLAGS

    lines = [f"sweep     {s['path']} (mode {s['mode']}, written {s['created_utc']})",
             f"cases     {s['n_cases']}: {s['n_ok']} ran, {s['n_failed']} failed, {s['n_rejected']} rejected"]
    for fail in s["failures"]:
        lines.append(f"  {fail['count']:>5} x {fail['error']}")
    lines.append("")
    lines.append(f"{'':<28}{'unit':>14}{'n':>7}{'min':>12}{'median':>12}{'max':>12}")

    def row(name, st):
        if "values" in st:
            return f"{name:<28}{'':>14}  " + ", ".join(f"{v}: {k}" for v, k in st["values"].items())
        fmt = (lambda v: f"{'-':>12}" if v is None else f"{v:>12.4g}")
        return f"{name:<28}{st['unit']:>14}{st['n']:>7}{fmt(st['min'])}{fmt(st['median'])}{fmt(st['max'])}"

    lines.append("inputs")
    lines += ["  " + row(k, v) for k, v in s["inputs"].items()]
    lines.append("outcome metrics (cases that ran)")
    lines += ["  " + row(k, v) for k, v in s["metrics"].items()]
    lines.append("")
    lines.append(f"{'yes/no outcomes (cases that ran)':<44}{'fraction':>10}{'+/- s.e.':>10}{'k/n':>12}")
    for name, est in s["outcomes"].items():
        if est["p"] is None:
            lines.append(f"  {name:<42}{'-':>10}")
        else:
            lines.append(f"  {name:<42}{est['p']:>10.3f}{est['se']:>10.3f}{est['k']:>7}/{est['n']}")
    if "observed" in s:
        o = s["observed"]
        lines.append("")
        lines.append(f"observed  M = {o['mass_earth']:g} +/- {o['mass_sigma']:g} M_E, R = {o['radius_earth']:g} "
                     f"+/- {o['radius_sigma']:g} R_E, at {o['age_gyr']:g} Gyr")
        rej = o["rejected"]
        if rej["p"] is not None:
            lines.append(f"  draws no rocky composition fits: {rej['k']}/{rej['n']} = {rej['p']:.3f} +/- "
                         f"{rej['se']:.3f}")
        for name in AGE_FLAGS:
            est = o.get(name)
            if est is None or est["p"] is None:
                continue
            lines.append(f"  P({name}) = {est['p']:.3f} +/- {est['se']:.3f} (95% Wilson {est['wilson_low']:.3f}-"
                         f"{est['wilson_high']:.3f}; n = {est['n']})")
    lines.append("")
    lines.append(s["note"])
    return lines


def print_sweep_summary(path, as_json: bool = False) -> None:
    """Print the summary of the sweep file at ``path`` as a table or, with ``as_json``, as one JSON object
    (SI units, times in years). ResultsFileError naming the file when it is not a readable sweep file."""
    from .sweep.stats import summary_dict

    s = summary_dict(path)
    print(json.dumps(s, indent=2, allow_nan=False) if as_json else "\n".join(sweep_summary_lines(s)))
