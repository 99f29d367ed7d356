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


def extraction(spec, interior, tu, delta, ts, tl, lid, crust, extracted_h2o, extracted_co2, surface_h2o=0.0,
               surface_co2=0.0, share=0.0, radiogenic=0.0, lid_rate=0.0):
    """Melt production [kg/s], heat out of the mantle [W], crust rate [m/s], H2O and CO2 taken from the mantle
    and outgassed [kg/s], the convective velocity [m/s], the rate of the crust's share of the heat sources
    [1/s], the crust's heat [W], the surface flux it adds [W/m^2] and the lid rate it adds [m/s] of a solid
    mantle (not a magma ocean). ``surface_h2o``, ``surface_co2``: the masses of the gases at the surface [kg];
    ``share``: the crust's share of the heat sources; ``radiogenic``: the planet's radiogenic power [W].

    * u = (pi / 4) kappa d / delta^2 (half-space cooling of a plate of length d; Turcotte & Schubert), d the
      convecting depth (mantle depth less the lid) under a stagnant lid; under a mobile lid the plates' length
      R / factor, so that the plates on both sides of ridges factor x 2 pi R long cover 4 pi R^2;
    * melt zone: the shallowest run of partially molten nodes below the lid and above the deepest extraction
      pressure. Stagnant lid: melt fraction at the profile's temperature (linear from T_l over delta below the
      lid, then the adiabat T_u f); mobile lid: isentropic phi = phi_eq(T_u f - L phi / c), melt at
      T_u f - L phi / c;
    * production: stagnant 4 pi R^2 u sum(m phi) / V_mantle (Morschhauser et al. 2011); mobile
      2 u L_ridge sum(m phi / (4 pi r^2)), L_ridge = factor x 2 pi R (Kite et al. 2009);
    * heat: per kg of melt L + c (f_e (T - T_s) + (1 - f_e) max(T - T_l, 0)) under a stagnant lid; none under a
      mobile lid (the plate's boundary-layer flux cools the whole upwelled column from T_u, melt included);
    * depleted source: phi -> (phi - F) / (1 - F), F = crust mass / mantle mass (melt_depletion on);
    * volatiles: batch melting, X_melt = X / (D + phi (1 - D)), X = X0 - extracted / mantle mass; the erupted
      share outgasses max(X_melt - S, 0) with S = 6.8e-8 P^0.7 (H2O), 4.4e-12 P (CO2), P = M_surface g / (4 pi
      R^2) (vent_solubility on; else S = 0);
    * heat sources: the share s grows by k sum(w (1 - s) / (D + phi (1 - D))) / M_mantle and recycles with
      the crust that the cap stops or removes (s / M_crust per kg); crust heat s H: surface flux
      (s H / A) (1 - min(D_cr / D_l, 1) / 2), lid rate -(s H / A) min(D_cr / D_l, 1) / 2 / (rho c (T_u - T_lm))
      under a stagnant lid (T_lm the mean of T_eq and T_l), all of s H / A at the surface under a mobile lid;
    * crust: production / (rho_cr 4 pi (R - D_cr)^2), times smoothstep((cap - D_cr) / (0.05 cap)) with
      cap = min(lid, P_ecl / (rho_cr g)) under a stagnant lid, plus min(cap - D_cr, 0) u / d, plus, where the
      lid (above its minimum) is the cap, (1 - smoothstep) min(lid_rate + crust lid rate, 0): the crust follows
      a thinning lid (``lid_rate``: the lid's rate without the crust's heat [m/s]); under a mobile lid less
      D_cr u / d (subduction).
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
    lid_in = lid
    lid = max(lid, 1.0e3) if stagnant else 0.0  # the scheme's smallest lid (boundary_layer.LID_MIN)
    d = max(depth - lid, 0.05 * depth) if stagnant else big_r / v.ridge_length_factor
    u = 0.25 * math.pi * cv.thermal_diffusivity * d / delta ** 2
    lc = cv.latent_heat / cv.mantle_heat_capacity
    fe = v.erupted_fraction
    rho_cr = v.crust_density_kg_m3
    m_crust = rho_cr * 4.0 / 3.0 * math.pi * (big_r ** 3 - (big_r - crust) ** 3)
    dep = m_crust / interior.mantle_mass if v.melt_depletion == "on" else 0.0
    load = interior.surface_gravity / (4.0 * math.pi * big_r ** 2)
    vent = v.vent_solubility == "on"
    sol = {"h2o": 6.8e-8 * (surface_h2o * load) ** 0.7 if vent else 0.0,
           "co2": 4.4e-12 * surface_co2 * load if vent else 0.0}
    x = {"h2o": max(v.mantle_h2o_ppm * 1e-6 - extracted_h2o / interior.mantle_mass, 0.0),
         "co2": max(v.mantle_co2_ppm * 1e-6 - extracted_co2 / interior.mantle_mass, 0.0)}
    dk = {"h2o": v.h2o_partition_coefficient, "co2": v.co2_partition_coefficient}
    d_hpe = v.heat_source_partition_coefficient
    sums = {"melt": 0.0, "heat": 0.0, "h2o": 0.0, "co2": 0.0, "og_h2o": 0.0, "og_co2": 0.0, "hpe": 0.0}
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
        phi = (phi - dep) / (1.0 - dep)
        if phi <= 0.0:
            continue
        w = mass[i] * phi if stagnant else mass[i] * phi / (4.0 * math.pi * r[i] ** 2)
        sums["melt"] += w
        sums["heat"] += w * (cv.latent_heat + cv.mantle_heat_capacity * (fe * (t - ts) + (1 - fe) * max(t - tl, 0.0)))
        for gas in ("h2o", "co2"):
            x_melt = x[gas] / (dk[gas] + phi * (1.0 - dk[gas]))
            sums[gas] += w * x_melt
            sums["og_" + gas] += w * max(x_melt - sol[gas], 0.0)
        sums["hpe"] += w / (d_hpe + phi * (1.0 - d_hpe))
    if stagnant:
        k = 4.0 * math.pi * big_r ** 2 * u / (4.0 / 3.0 * math.pi * (big_r ** 3 - r_c ** 3))
    else:
        k = 2.0 * u * v.ridge_length_factor * 2.0 * math.pi * big_r
    prod = k * sums["melt"]
    area_base = 4.0 * math.pi * (big_r - crust) ** 2
    grow = prod / (rho_cr * area_base)
    # the crust's heat sources: the lid rate they add (needed by the crust that follows a thinning lid)
    flux = share * radiogenic / (4.0 * math.pi * big_r ** 2) if v.crust_heat_sources == "on" else 0.0
    half = 0.5 * min(crust / lid, 1.0) if stagnant else 0.0
    # the lid's rock at T_l (base-flux growth law) or at the mean of its linear profile (heat-balance
    # integral; no star: T_eq fixed)
    t_lid = tl if cv.lid_growth_law == "base-flux" else 0.5 * (spec.surface.equilibrium_temperature_k + tl)
    crust_lid_rate = -flux * half / (interior.rho[ms][-1] * cv.mantle_heat_capacity * max(tu - t_lid, 1.0))
    if stagnant:
        cap = min(lid, v.eclogite_pressure_gpa * 1e9 / (rho_cr * interior.surface_gravity))
        s = min(max((cap - crust) / (0.05 * cap), 0.0), 1.0)
        keep = s * s * (3.0 - 2.0 * s)
        loss = min(cap - crust, 0.0) * u / d
        if lid_in > 1.0e3 and lid < v.eclogite_pressure_gpa * 1e9 / (rho_cr * interior.surface_gravity):
            loss += (1.0 - keep) * min(lid_rate + crust_lid_rate, 0.0)
    else:
        keep, loss = 1.0, -crust * u / d  # consumed at the plates' age d / u
    rate = grow * keep + loss
    out = {"production": prod, "heat": k * sums["heat"] if stagnant else 0.0, "crust_rate": rate, "h2o": k * sums["h2o"],
           "co2": k * sums["co2"], "velocity": u, "h2o_outgassing": fe * k * sums["og_h2o"],
           "co2_outgassing": fe * k * sums["og_co2"], "share_rate": 0.0, "crust_heat": 0.0,
           "crust_heat_flux": 0.0, "crust_lid_rate": 0.0}
    if v.crust_heat_sources == "on":
        recycled = (1.0 - keep) * prod - rho_cr * area_base * loss
        out["share_rate"] = (k * sums["hpe"] * (1.0 - share) / interior.mantle_mass
                             - (share * recycled / m_crust if m_crust > 0.0 else 0.0))
        out["crust_heat"] = share * radiogenic
        out["crust_heat_flux"] = flux * (1.0 - half)
        out["crust_lid_rate"] = crust_lid_rate if stagnant else 0.0
    return out
