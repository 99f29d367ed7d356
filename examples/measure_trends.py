"""Trends with planet mass that the README quotes (model estimates), measured with the installed meltzone.

Prints one JSON object: the two schemes at 1, 5 and 10 Earth masses, mobile and stagnant lid (with the surface
heat flow at 4.5 Gyr); stagnant-lid planets of 1-12 Earth masses
at 4.5 Gyr (magma-ocean end, volcanism, crust, outgassing); the basal magma ocean with the boundary-layer
scheme's reservoir and with the mixing-length scheme at 0.5-15 Earth masses; the Earth hindcast. Takes a few
minutes on one core. Stagnant-lid extraction comes in episodes: volcanism_end_yr is the end of the last one
before 4.5 Gyr (see volcanic_episodes, volcanism_active_yr).

    python examples/measure_trends.py [--quick] [--retained=F]

--retained=F runs every planet with volcanism.retained_melt_fraction = F (the melt fraction that weakens the
solid mantle where melt is extracted; the default 1 keeps the batch melt fraction).
"""

from __future__ import annotations

import json
import sys
import time
import warnings

import numpy as np

import meltzone
from meltzone.constants import GYR, YEAR

warnings.simplefilter("ignore")
QUICK = "--quick" in sys.argv
RETAINED = [float(a.split("=", 1)[1]) for a in sys.argv if a.startswith("--retained=")]


def run(mass, **sections):
    spec = {"planet": {"mass_earth": mass}}
    if RETAINED:
        spec["volcanism"] = {"retained_melt_fraction": RETAINED[-1]}
    for name, values in sections.items():
        spec.setdefault(name, {}).update(values)
    t0 = time.perf_counter()
    result = meltzone.evolve(spec)
    return result.summary(), time.perf_counter() - t0, result


def basal(s):
    b = s.get("basal_layer")
    return None if b is None else {k: b[k] for k in ("start_yr", "end_yr", "max_thickness_m")}


def heat_flow_tw_at(result, t_gyr):
    """Surface heat flow [TW] at t_gyr (linear between recorded times; the volcanic heat pipe included)."""
    h = result.history
    q = h["surface_heat_flow"] + (h["volcanic_heat_flow"] if "volcanic_heat_flow" in h else 0.0)
    return float(np.interp(t_gyr * GYR, h.time, q) / 1e12)


def schemes():
    rows = []
    for regime in ("mobile-lid", "stagnant-lid"):
        for mass in (1.0, 5.0, 10.0):
            for scheme in ("boundary-layer", "mixing-length"):
                s, dt, r = run(mass, convection={"scheme": scheme, "regime": regime}, run={"end_time_gyr": 10.0})
                rows.append({"mass_earth": mass, "regime": regime, "scheme": scheme,
                             "magma_ocean_end_yr": s["magma_ocean_end_yr"],
                             "surface_magma_ocean_end_yr": s.get("surface_magma_ocean_end_yr"),
                             "rheological_transition_yr": s["rheological_transition_yr"], "basal_layer": basal(s),
                             "last_melt_yr": s["last_melt_yr"], "heat_flow_4p5_gyr_tw": heat_flow_tw_at(r, 4.5),
                             "run_time_s": round(dt, 2)})
    return rows


def stagnant():
    rows = []
    for mass in (1.0, 2.0, 3.0, 5.0, 8.0, 12.0):
        s, dt, r = run(mass, convection={"regime": "stagnant-lid"}, run={"end_time_gyr": 4.5})
        rows.append({"mass_earth": mass, "magma_ocean_end_yr": s["magma_ocean_end_yr"],
                     "surface_magma_ocean_end_yr": s.get("surface_magma_ocean_end_yr"),
                     "volcanism_end_yr": s.get("volcanism_end_yr"), "volcanic_episodes": s.get("volcanic_episodes"),
                     "volcanism_active_yr": s.get("volcanism_active_yr"),
                     "melt_extracted_90pct_yr": s.get("melt_extracted_90pct_yr"),
                     "outgassed_90pct_yr": s.get("outgassed_90pct_yr"),
                     "crust_thickness_m": s.get("crust_thickness_m"),
                     "outgassed_h2o_kg": s.get("outgassed_h2o_kg"), "outgassed_co2_kg": s.get("outgassed_co2_kg"),
                     "outgassed_h2o_ppm_of_mantle": None if s.get("outgassed_h2o_kg") is None
                     else 1e6 * s["outgassed_h2o_kg"] / r.interior.mantle_mass,
                     "last_melt_yr": s["last_melt_yr"], "steps": r.history.n_steps, "run_time_s": round(dt, 2)})
    return rows


def basal_ocean():
    rows = []
    for mass in (0.5, 1.0, 2.0, 5.0, 10.0, 15.0):
        a, _, _ = run(mass, melting={"basal_magma_ocean": "reservoir"}, run={"end_time_gyr": 10.0})
        b, _, _ = run(mass, convection={"scheme": "mixing-length"}, run={"end_time_gyr": 10.0})
        rows.append({"mass_earth": mass, "reservoir": basal(a), "mixing_length": basal(b)})
    return rows


def hindcast():
    out = {}
    for name, cv in (("classical", {}), ("weak", {"beta": 0.015, "nusselt_prefactor": 40.0})):
        s, _, r = run(1.0, convection=cv, run={"end_time_gyr": 4.5})
        h = r.history
        out[name] = {"potential_temperature_c": float(h["upper_temperature"][-1] - 273.15),
                     "surface_heat_flow_tw": float(h["surface_heat_flow"][-1] / 1e12),
                     "volcanic_heat_flow_tw": float(h["volcanic_heat_flow"][-1] / 1e12)
                     if "volcanic_heat_flow" in h else None,
                     "cmb_heat_flow_tw": float(h["cmb_heat_flow"][-1] / 1e12),
                     "urey": float(h["radiogenic_power"][-1] / h["surface_heat_flow"][-1]),
                     "melt_production_km3_yr": float(h["melt_production"][-1] * YEAR / 1e9)
                     if "melt_production" in h else None,
                     "inner_core_radius_km": float(h["inner_core_radius"][-1] / 1e3)}
    return out


if __name__ == "__main__":
    out = {"hindcast": hindcast(), "stagnant_lid": stagnant()}
    if not QUICK:
        out["schemes"] = schemes()
        out["basal_ocean"] = basal_ocean()
    print(json.dumps(out, indent=1, default=float))
