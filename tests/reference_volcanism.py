"""Slow, plain reference of the melt-extraction law of the boundary-layer scheme (used only by the tests).

Written from the equations (listed in :func:`extraction`), not from the kernel's arrays: it builds its node
masses from the interior's enclosed-mass profile, its melt fractions with :func:`meltzone.melting.melt_fraction`
(the NumPy law) and the isentropic melt fraction with ``brentq``. The state of the boundary layers (the upper
layer's thickness, the surface and lid-base temperatures) is an input: it belongs to the thermal model, which
``tests/reference_evolution.py`` checks.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import brentq

from meltzone import melting


def node_masses(interior) -> np.ndarray:
    """Mass each mantle node stands for: the enclosed mass between the midpoints to its neighbours."""
    ms = interior.mantle
    r, m = interior.r[ms], interior.m[ms]
    edges = np.concatenate([[interior.core_mass], np.interp(0.5 * (r[1:] + r[:-1]), r, m), [interior.mass]])
    return np.diff(edges)


def extraction(spec, interior, tu, delta, ts, tl, lid, crust, extracted_h2o, extracted_co2):
    """Melt production [kg/s], heat out of the mantle [W], crust rate [m/s], H2O and CO2 taken from the mantle
    [kg/s] and the convective velocity [m/s] of a solid mantle (not a magma ocean).

    * u = (pi / 4) kappa d / delta^2 (half-space cooling of a plate of length d; Turcotte & Schubert), d the
      convecting depth (mantle depth less the lid) under a stagnant lid, the mantle depth under a mobile lid;
    * melt zone: the shallowest run of partially molten nodes below the lid and above the deepest extraction
      pressure. Stagnant lid: melt fraction at the profile's temperature (linear from T_l over delta below the
      lid, then the adiabat T_u f); mobile lid: isentropic phi = phi_eq(T_u f - L phi / c), melt at
      T_u f - L phi / c;
    * production: stagnant 4 pi R^2 u sum(m phi) / V_mantle (Morschhauser et al. 2011); mobile
      2 u L_ridge sum(m phi / (4 pi r^2)), L_ridge = factor x 2 pi R (Kite et al. 2009);
    * heat: per kg of melt L + c (f_e (T - T_s) + (1 - f_e) max(T - T_l, 0)) under a stagnant lid; none under a
      mobile lid (the plate's boundary-layer flux cools the whole upwelled column from T_u, melt included);
    * volatiles: batch melting, X_melt = X / (D + phi (1 - D)), X = X0 - extracted / mantle mass;
    * crust: production / (rho_cr 4 pi (R - D_cr)^2), times smoothstep((cap - D_cr) / (0.05 cap)) with
      cap = min(lid, P_ecl / (rho_cr g)) under a stagnant lid, plus min(cap - D_cr, 0) u / d; under a mobile
      lid less D_cr u / d (subduction).
    """
    v, cv = spec.volcanism, spec.convection
    stagnant = cv.regime == "stagnant-lid"
    ms = interior.mantle
    r, p, f = interior.r[ms], interior.P[ms], interior.adiabat[ms]
    mass = node_masses(interior)
    model = melting.get_model(spec.melting.model)
    curves = melting.node_curves(model, p, spec.melting.melt_fraction_law, spec.melting.water_wt_percent)

    def phi_eq(t, i):
        return float(melting.melt_fraction(np.array([t]), curves["solidus"][i:i + 1], curves["liquidus"][i:i + 1],
                                           curves["aux1"][i:i + 1], curves["aux2"][i:i + 1], curves["law_code"])[0])

    big_r, r_c = interior.radius, interior.core_radius
    depth = big_r - r_c
    lid = max(lid, 1.0e3) if stagnant else 0.0  # the scheme's smallest lid (boundary_layer.LID_MIN)
    d = max(depth - lid, 0.05 * depth) if stagnant else depth
    u = 0.25 * math.pi * cv.thermal_diffusivity * d / delta ** 2
    lc = cv.latent_heat / cv.mantle_heat_capacity
    fe = v.erupted_fraction
    x = {"h2o": max(v.mantle_h2o_ppm * 1e-6 - extracted_h2o / interior.mantle_mass, 0.0),
         "co2": max(v.mantle_co2_ppm * 1e-6 - extracted_co2 / interior.mantle_mass, 0.0)}
    dk = {"h2o": v.h2o_partition_coefficient, "co2": v.co2_partition_coefficient}
    sums = {"melt": 0.0, "heat": 0.0, "h2o": 0.0, "co2": 0.0}
    started = False
    for i in range(len(r) - 1, -1, -1):
        z = big_r - r[i]
        if p[i] > v.max_extraction_pressure_gpa * 1e9:
            break
        if z < lid:
            continue
        t_ad = tu * f[i]
        if stagnant:
            t = tl + (t_ad - tl) * (z - lid) / delta if z < lid + delta else t_ad
            phi = phi_eq(t, i)
        else:
            top = phi_eq(t_ad, i)
            phi = 0.0 if top <= 0.0 else brentq(lambda q: q - phi_eq(t_ad - lc * q, i), 0.0, top, xtol=1e-14)
            t = t_ad - lc * phi
        if phi <= 0.0:
            if started and z > lid + delta:
                break
            continue
        started = True
        w = mass[i] * phi if stagnant else mass[i] * phi / (4.0 * math.pi * r[i] ** 2)
        sums["melt"] += w
        sums["heat"] += w * (cv.latent_heat + cv.mantle_heat_capacity * (fe * (t - ts) + (1 - fe) * max(t - tl, 0.0)))
        for gas in ("h2o", "co2"):
            sums[gas] += w * x[gas] / (dk[gas] + phi * (1.0 - dk[gas]))
    if stagnant:
        k = 4.0 * math.pi * big_r ** 2 * u / (4.0 / 3.0 * math.pi * (big_r ** 3 - r_c ** 3))
    else:
        k = 2.0 * u * v.ridge_length_factor * 2.0 * math.pi * big_r
    prod = k * sums["melt"]
    rho_cr = v.crust_density_kg_m3
    grow = prod / (rho_cr * 4.0 * math.pi * (big_r - crust) ** 2)
    if stagnant:
        cap = min(lid, v.eclogite_pressure_gpa * 1e9 / (rho_cr * interior.surface_gravity))
        s = min(max((cap - crust) / (0.05 * cap), 0.0), 1.0)
        rate = grow * s * s * (3.0 - 2.0 * s) + min(cap - crust, 0.0) * u / d
    else:
        rate = grow - crust * u / depth
    return {"production": prod, "heat": k * sums["heat"] if stagnant else 0.0, "crust_rate": rate, "h2o": k * sums["h2o"],
            "co2": k * sums["co2"], "velocity": u}
