"""Text and JSON reports: every table and sentence meltzone prints, for interiors, runs and sweeps.

The command line (:mod:`meltzone.cli`) only parses, calls the API and prints what these functions return.
Times are shown in years (``format_years``), depths in km, pressures in GPa; JSON objects are SI with times in
years where the key says ``_yr``, and null where nothing happened.

Results are model estimates, not measurements.
"""

from __future__ import annotations

import json
import math

import numpy as np

from .constants import EARTH_MASS, EARTH_RADIUS, GPA, YEAR, is_duration
from .results import MODEL_NOTE


def format_years(years: float) -> str:
    """A model time in years as a short string with the unit: 250 yr, 3.2 kyr, 45 Myr, 4.5 Gyr."""
    if years is None or not np.isfinite(years):
        return "-"
    for scale, unit in ((1e9, "Gyr"), (1e6, "Myr"), (1e3, "kyr")):
        if abs(years) >= scale:
            return f"{years / scale:.3g} {unit}"
    return f"{years:.3g} yr"


def km(m) -> str:
    return "-" if m is None or m != m else f"{m / 1e3:,.0f}"


def gpa(pa) -> str:
    return "-" if pa is None or pa != pa else f"{pa / GPA:,.1f}"


def json_safe(obj):
    """NaN and infinities -> None, numpy scalars -> Python numbers, so that the JSON output stays standard."""
    if isinstance(obj, np.generic):
        obj = obj.item()
    if isinstance(obj, float):
        return obj if math.isfinite(obj) else None
    if isinstance(obj, dict):
        return {k: json_safe(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [json_safe(v) for v in obj]
    return obj


# ---------------------------------------------------------------- flags
def flag_lines(zones) -> list[str]:
    lines = [f"flagged zones ({len(zones)}): depths resting on theory or extrapolated laws",
             f"  {'kind':<26}{'confidence':<11}{'depth [km]':>17}  {'P [GPa]':>17}  what"]
    for z in zones:
        lines.append(f"  {z['kind']:<26}{z['confidence']:<11}{km(z['top_depth_m']):>7} - {km(z['bottom_depth_m']):>7}"
                     f"  {gpa(z['top_pressure_pa']):>7} - {gpa(z['bottom_pressure_pa']):>7}  {z['what']}")
    if not zones:
        lines.append("  (none)")
    return lines


def note_lines(zones) -> list[str]:
    """The closing note: model estimate, and where the profile rests on extrapolated or predicted laws (for a
    kind whose confidence falls deeper down, also where it becomes low)."""
    parts = []
    for kind in dict.fromkeys(z["kind"] for z in zones):
        if kind == "predicted-transition":
            continue
        zs = [z for z in zones if z["kind"] == kind]
        top = min(zs, key=lambda z: z["top_depth_m"])
        low = [z for z in zs if z["confidence"] == "low"]
        deeper = ""
        if low and top["confidence"] != "low":
            first_low = min(low, key=lambda z: z["top_depth_m"])
            deeper = (f"; low confidence below {km(first_low['top_depth_m'])} km, "
                      f"> {gpa(first_low['top_pressure_pa'])} GPa")
        parts.append(f"{kind} below {km(top['top_depth_m'])} km (> {gpa(top['top_pressure_pa'])} GPa{deeper})")
    text = MODEL_NOTE
    if parts:
        text += " Extrapolated or predicted: " + "; ".join(parts) + "."
    return [text]


# ---------------------------------------------------------------- interior
def interior_text(interior, spec, zones) -> str:
    """The report of ``meltzone interior``: structure, mantle phases and the flagged zones."""
    it = interior
    lines = [
        f"planet            {spec.planet.name}: {it.mass / EARTH_MASS:.4g} M_E, core mass fraction "
        f"{it.core_mass / it.mass:.4g}",
        f"radius            {it.radius / 1e3:,.1f} km ({it.radius / EARTH_RADIUS:.4f} R_E)",
        f"core radius       {it.core_radius / 1e3:,.1f} km ({it.core_radius / it.radius:.3f} of the radius)",
        f"surface gravity   {it.surface_gravity:.3f} m/s^2",
        f"mean density      {it.mean_density:,.0f} kg/m^3",
        f"CMB pressure      {it.cmb_pressure / GPA:,.1f} GPa",
        f"centre pressure   {it.center_pressure / GPA:,.1f} GPa",
        f"moment of inertia {it.moment_of_inertia_factor:.4f} (C / M R^2)",
        "",
        f"{'mantle phase':<18}{'depth [km]':>22}{'pressure [GPa]':>22}",
    ]
    for layer in it.phase_layers():
        lines.append(f"{layer['phase']:<18}{layer['top_depth_m'] / 1e3:>10,.0f} - {layer['bottom_depth_m'] / 1e3:>9,.0f}"
                     f"{layer['top_pressure_pa'] / GPA:>10,.1f} - {layer['bottom_pressure_pa'] / GPA:>9,.1f}")
    lines += ["", *flag_lines(zones), ""]
    lines += [n.replace(MODEL_NOTE, "Model estimate from equations of state, not a measurement.")
              for n in note_lines(zones)]
    return "\n".join(lines)


def interior_dict(interior, zones) -> dict:
    """The JSON object of ``meltzone interior --json`` (SI units) with its flagged zones."""
    out = interior.summary_dict()
    out["flags"] = list(zones)
    return out


# ---------------------------------------------------------------- runs
def layer_spans(result) -> list[dict]:
    """One entry per layer id: first and last time [s] (formed / froze or merged event when there is one),
    whether it is still molten at the end, shallowest and deepest depth [m], largest melt fraction."""
    table, events = result.tracked()
    t_end = result.time[-1]
    spans = []
    for lid in dict.fromkeys(int(x) for x in table["layer"]):
        rows = table["layer"] == lid
        start = [e["time"] for e in events if e["layer"] == lid and e["kind"] == "formed"]
        stop = [e["time"] for e in events if e["layer"] == lid and e["kind"] in ("froze", "merged")]
        alive = bool(table["time"][rows][-1] == t_end) and not stop
        first = start[0] if start else float(table["time"][rows][0])
        last = stop[0] if stop else float(table["time"][rows][-1])
        spans.append({"layer": lid, "first_s": first, "last_s": last, "alive": alive,
                      "top_depth_m": float(np.min(table["top_depth"][rows])),
                      "bottom_depth_m": float(np.max(table["bottom_depth"][rows])),
                      "max_melt_fraction": float(np.max(table["max_melt_fraction"][rows]))})
    return spans


def layer_lines(result) -> list[str]:
    spans = layer_spans(result)
    lines = [f"melt layers ({len(spans)})",
             f"  {'id':>3}  {'first':>10}  {'last':>10}  {'lifetime':>10}  {'depth [km]':>17}  {'max melt':>8}"]
    for s in spans:
        last = "end of run" if s["alive"] else format_years(s["last_s"] / YEAR)
        life = format_years((s["last_s"] - s["first_s"]) / YEAR) + ("+" if s["alive"] else "")
        lines.append(f"  {s['layer']:>3}  {format_years(s['first_s'] / YEAR):>10}  {last:>10}  {life:>10}  "
                     f"{km(s['top_depth_m']):>7} - {km(s['bottom_depth_m']):>7}  {s['max_melt_fraction']:>8.2f}")
    if not spans:
        lines.append("  (no melt at any step)")
    return lines


def event_lines(events) -> list[str]:
    lines = [f"events ({len(events)})",
             f"  {'time':>10}  {'kind':<21}{'layer':>5}  {'depth [km]':>10}  {'P [GPa]':>8}"]
    for e in events:
        layer = str(e["layer"]) if e["layer"] >= 0 else "-"
        when = "t = 0" if e["time"] == 0.0 else format_years(e["time"] / YEAR)
        lines.append(f"  {when:>10}  {e['kind']:<21}{layer:>5}  {km(e['depth']):>10}  {gpa(e['pressure']):>8}")
    return lines


def _start_text(result) -> str:
    h, ini = result.history, result.spec.initial
    rule = ("set (initial.core_temperature_k)" if ini.core_temperature_k > 0.0 else
            f"initial.core_start = {ini.core_start}, +{ini.initial_cmb_jump_k:g} K")
    return f"T_u {h['upper_temperature'][0]:,.0f} K, core {h['core_temperature'][0]:,.0f} K ({rule})"


def _magma_ocean_text(s: dict) -> str:
    mo = s["magma_ocean_end_yr"]
    if not s["magma_ocean_at_start"]:
        text = "none (the run starts below the rheological transition)"
    elif mo is None:
        text = "still present at the end of the run"
    else:
        text = f"ends after {format_years(mo)}"
        surface = s.get("surface_magma_ocean_end_yr")
        if surface is not None and surface != mo:
            text += f" (< 1% of the mantle above the rheological transition; the top of the convecting mantle, " \
                    f"taken to the surface along its adiabat, left it after {format_years(surface)})"
    if s.get("magma_ocean_reformed_yr") is not None:
        again = "forms" if not s["magma_ocean_at_start"] else "forms again"
        text += (f"; {again} at {format_years(s['magma_ocean_reformed_yr'])} (the mantle warmed past the "
                 "rheological transition)" + (" and is present at the end" if s["magma_ocean_at_end"] else ""))
    again_top = s.get("surface_magma_ocean_reformed_yr")
    if (again_top is not None and s.get("surface_magma_ocean_end_yr") is not None
            and again_top != s.get("magma_ocean_reformed_yr")):
        text += f"; by the top of the mantle alone it formed again at {format_years(again_top)}"
    if s.get("surface_above_solidus_at_end"):
        molten = s.get("surface_molten_depth_at_end_m")
        text += (f"; surface above the solidus at the end, melt to {km(s['surface_melt_depth_at_end_m'])} km"
                 + ("" if molten is None else f", fully molten to {km(molten)} km")
                 + (" (lava world)" if s["magma_ocean_at_end"] else ""))
    return text


def _melt_text(s: dict) -> str:
    if s["melt_at_end"]:
        text = "melt remains at the end of the run"
    elif s["last_melt_yr"] is None:
        return "none at any step"
    else:
        text = f"last melt froze at {format_years(s['last_melt_yr'])}"
    return f"{text}; deepest melt {km(s['max_melt_depth_m'])} km ({gpa(s['max_melt_pressure_pa'])} GPa)"


def _crystallisation_text(s: dict) -> str:
    depth = s.get("first_crystal_depth_m")
    rheo = s.get("rheological_transition_yr")
    first = "none fully molten at the start" if depth is None else f"starts at {km(depth)} km depth"
    whole = ("every mantle node below the critical melt fraction after " + format_years(rheo)) if rheo is not None \
        else "some of the mantle above the rheological transition at the end" if (
            s["magma_ocean_at_end"] or s["magma_ocean_at_start"]) \
        else "no part above the rheological transition at the start"
    return f"{first}; {whole}; at most {s.get('max_simultaneous_layers', 0)} melt layers at once"


def _basal_text(s: dict) -> str:
    b = s["basal_layer"]
    if b is None:
        return "none after the magma ocean"
    until = "outlives the run" if b["end_yr"] is None else f"until {format_years(b['end_yr'])}"
    return (f"layer {b['layer']} on the CMB from {format_years(b['start_yr'])}, {until}, up to "
            f"{b['max_thickness_m'] / 1e3:,.3g} km thick")


def _water_text(s: dict) -> str:
    formed = s.get("water_ocean_formed_yr")
    ocean = "no surface ocean" if formed is None else (f"an ocean condenses at {format_years(formed)} "
                                                        f"({s['water_ocean_kg']:.3g} kg at the end)")
    kind = s.get("solidification_type")
    kind = "" if kind is None else f"; solidification type {kind} (Hamano et al. 2013)"
    return f"{ocean}; {s.get('water_lost_kg', 0.0):.3g} kg lost to space{kind}"


def _volcanism_text(s: dict) -> str:
    if s.get("final_melt_production_km3_yr") is None:
        return "not modelled (volcanism.enabled = \"off\", or a scheme without melt extraction)"
    if s["volcanism_at_end"]:
        when = f"active at the end ({s['final_melt_production_km3_yr']:.3g} km^3/yr)"
    elif s["volcanism_end_yr"] is None:
        when = "none"
    else:
        when = f"ended after {format_years(s['volcanism_end_yr'])}"
    n = s.get("volcanic_episodes")
    if n:
        when += (f" ({n} episode{'s' if n > 1 else ''}, active {format_years(s['volcanism_active_yr'])} in "
                 f"total)")
    if s.get("crust_thickness_m") is None:
        return (f"{when}, peak {s['peak_melt_production_km3_yr']:.3g} km^3/yr (the heat pipe's extraction; crust "
                f"and outgassing not followed by this scheme)")
    return (f"{when}, peak {s['peak_melt_production_km3_yr']:.3g} km^3/yr; crust "
            f"{s['crust_thickness_m'] / 1e3:,.3g} km; outgassed H2O {s['outgassed_h2o_kg']:.3g} kg, CO2 "
            f"{s['outgassed_co2_kg']:.3g} kg")


def head_lines(result, s: dict) -> list[str]:
    """The run's outcome in a few lines (the summary dict ``s`` of :meth:`Result.summary`)."""
    it = result.interior
    spec = result.spec
    closure = f"{s['energy_closure']:.2e} (relative error of the energy budget)"
    if not s.get("energy_closure_ok", True):
        closure += " WARNING: above the tolerance, the run's energy budget does not close"
    return [
        f"planet            {spec.planet.name}: {it.mass / EARTH_MASS:.4g} M_E, core mass fraction "
        f"{it.core_mass / it.mass:.3g}",
        f"interior          radius {it.radius / 1e3:,.0f} km ({it.radius / EARTH_RADIUS:.3f} R_E), CMB pressure "
        f"{gpa(it.cmb_pressure)} GPa, core radius {it.core_radius / 1e3:,.0f} km",
        f"evolution         {format_years(result.time[-1] / YEAR)} in {result.n_steps} steps "
        f"({result.wall_time_s:.2g} s), {spec.convection.scheme} scheme, {spec.convection.regime}, melting model "
        f"{result.melting_model}",
        f"start             {_start_text(result)}",
        f"magma ocean       {_magma_ocean_text(s)}",
        f"crystallisation   {_crystallisation_text(s)}",
        f"partial melt      {_melt_text(s)}",
        f"basal melt layer  {_basal_text(s)}",
        *([f"water             {_water_text(s)}"] if spec.surface.water_inventory_kg > 0 else []),
        f"volcanism         {_volcanism_text(s)}",
        f"at the end        T_u {s['final_upper_temperature_k']:,.0f} K, surface heat flow "
        f"{s['final_surface_heat_flow_w'] / 1e12:,.3g} TW, CMB heat flow {s['final_cmb_heat_flow_w'] / 1e12:,.3g} TW, "
        f"inner core {s['inner_core_radius_m'] / 1e3:,.0f} km",
        f"energy closure    {closure}",
    ]


def run_text(result, written=None) -> str:
    """The report of ``meltzone run``: outcome, layers, events, flagged zones, the file written."""
    zones = result.flags()
    lines = [*head_lines(result, result.summary()), "", *layer_lines(result), "",
             *event_lines(result.tracked()[1]), "", *flag_lines(zones), ""]
    if written is not None:
        lines.append(f"wrote {written}")
    return "\n".join(lines + note_lines(zones))


def summary_text(result) -> str:
    """The report of ``meltzone summary`` for a run file."""
    zones = result.flags()
    return "\n".join([*head_lines(result, result.summary()), "", *flag_lines(zones), "", *note_lines(zones)])


def layers_text(result) -> str:
    """The report of ``meltzone layers``: the layer table and the event table."""
    return "\n".join([*layer_lines(result), "", *event_lines(result.tracked()[1]), "",
                      *note_lines(result.flags())])


def summary_dict(result, written=None) -> dict:
    """The JSON object of ``run --json`` and ``summary --json``: the summary with its flagged zones."""
    out = {**result.summary(), "flags": list(result.flags())}
    if written is not None:
        out["file"] = str(written)
    return json_safe(out)


def layers_dict(result) -> dict:
    """The JSON object of ``layers --json``: one entry per layer (times in years) and the events."""
    layers = [{"layer": s["layer"], "first_yr": s["first_s"] / YEAR,
               "last_yr": None if s["alive"] else s["last_s"] / YEAR, "molten_at_end": s["alive"],
               "top_depth_m": s["top_depth_m"], "bottom_depth_m": s["bottom_depth_m"],
               "max_melt_fraction": s["max_melt_fraction"]} for s in layer_spans(result)]
    return json_safe({"planet": result.spec.planet.name, "layers": layers,
                      "events": result.summary()["events"], "flags": list(result.flags())})


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
    from .sweep import summary_dict

    s = summary_dict(path)
    print(json.dumps(s, indent=2, allow_nan=False) if as_json else "\n".join(sweep_summary_lines(s)))


# ====================================================================== compare
#: What sets a run apart, shown above the compared outcomes: name -> how to read it from a Result.
_SETUP = {
    "planet": lambda r: r.spec.planet.name,
    "mass_earth": lambda r: float(r.spec.planet.mass_earth),
    "core_mass_fraction": lambda r: float(r.spec.planet.core_mass_fraction),
    "scheme": lambda r: r.spec.convection.scheme,
    "regime": lambda r: r.spec.convection.regime,
    "melting_model": lambda r: r.melting_model,
    "atmosphere": lambda r: r.spec.surface.atmosphere,
    "end_time_gyr": lambda r: float(r.spec.run.end_time_gyr),
}
#: Keys of the summary's basal_layer object, flattened to ``basal_layer.<key>`` in the comparison.
_BASAL_KEYS = ("layer", "start_yr", "end_yr", "max_thickness_m")


def load_runs(paths) -> list:
    """The Results of run files, in order; ResultsFileError naming the file for a sweep file, a foreign or
    unreadable file (nothing is compared until every file has been read)."""
    from .errors import ResultsFileError
    from .results import file_kind, load

    for path in paths:
        if file_kind(path) != "run":
            raise ResultsFileError(f"{str(path)!r} is a sweep file; compare takes run files (a sweep has "
                                   "`meltzone summary` and `meltzone plot --figure probability|lifetime`)")
    return [load(path) for path in paths]


def _flat_outcomes(summary: dict) -> dict:
    """The scalar outcomes of a run's ``summary --json`` object, the basal layer flattened, plus the counts of
    its events and flags (their lists are not compared entry by entry)."""
    out = {}
    for key, value in summary.items():
        if key == "basal_layer":
            for sub in _BASAL_KEYS:
                out[f"basal_layer.{sub}"] = None if value is None else value.get(sub)
        elif key in ("events", "flags"):
            out[f"n_{key}"] = len(value)
        elif key not in ("planet", "file"):
            out[key] = value
    return out


def _is_number(v) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool)


def compare_dict(results, paths) -> dict:
    """The JSON object of ``meltzone compare --json``: each run's file, set-up and ``summary --json`` object,
    and a table of the outcomes side by side (``values`` in the order of the runs) with their differences
    against the first run (``difference``: value minus the first value where both are numbers, else null;
    ``same``: all values equal). Keys a run does not have (another scheme's extras) are null for it."""
    summaries = [summary_dict(r) for r in results]
    flat = [_flat_outcomes(s) for s in summaries]
    keys = list(dict.fromkeys(k for f in flat for k in f))
    table = []
    for key in keys:
        values = [f.get(key) for f in flat]
        first = values[0]
        diff = [None] + [v - first if _is_number(v) and _is_number(first) else None for v in values[1:]]
        table.append({"key": key, "values": values, "difference": diff, "same": all(v == first for v in values)})
    runs = [{"file": str(p), "setup": {k: get(r) for k, get in _SETUP.items()}, "summary": s}
            for p, r, s in zip(paths, results, summaries)]
    return json_safe({"runs": runs, "table": table, "note": MODEL_NOTE})


def _cell(key: str, value) -> str:
    if value is None:
        return "-"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if is_duration(key) and _is_number(value):
        return format_years(value)
    if _is_number(value):
        return f"{value:.4g}"
    return str(value)


def _difference(key: str, diff) -> str:
    if diff is None:
        return ""
    if diff == 0:
        return " (=)"
    if is_duration(key):
        return f" ({'+' if diff > 0 else '-'}{format_years(abs(diff))})"
    return f" ({diff:+.3g})"


def compare_text(results, paths) -> str:
    """The report of ``meltzone compare``: the set-up of each run, then each outcome side by side with the
    difference against the first run (in parentheses; ``=`` when equal)."""
    d = compare_dict(results, paths)
    names = [f"[{i + 1}]" for i in range(len(paths))]
    rows = [("set-up", names)] + [(f"  {key}", [_cell(key, r["setup"][key]) for r in d["runs"]]) for key in _SETUP]
    rows += [("", [""] * len(names)), ("outcome", names)]
    for row in d["table"]:
        rows.append((f"  {row['key']}", [_cell(row["key"], row["values"][0])]
                     + [_cell(row["key"], v) + _difference(row["key"], diff)
                        for v, diff in zip(row["values"][1:], row["difference"][1:])]))
    width = [max(len(cells[i]) for _, cells in rows) + 2 for i in range(len(names))]
    lines = [f"compared runs ({len(paths)}); differences against [1] in parentheses"]
    lines += [f"  {n} {r['file']}" for n, r in zip(names, d["runs"])]
    lines.append("")
    lines += [f"{label:<30}" + "".join(f"{c:>{w}}" for c, w in zip(cells, width)) if label else ""
              for label, cells in rows]
    lines += ["", d["note"]]
    return "\n".join(lines)
