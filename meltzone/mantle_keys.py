"""Configuration keys of the boundary-layer scheme's mantle physics (lid growth, starting core temperature,
pressure-dependent properties, the basal magma ocean), kept apart from :mod:`meltzone.config` so that module
stays small.

Each function takes the :class:`meltzone.config.Key` class (passed in, so this module imports nothing of
config) and returns the keys of one section, in the order ``meltzone config --example`` shows them.
"""

from __future__ import annotations


def convection_keys(key) -> dict:
    """Keys of [convection]: the deep mantle's activation volume, the stagnant-lid growth law."""
    return {
        "high_pressure_activation_volume_m3_mol": key(1.0e-6, "m^3/mol", "activation volume V_inf that V(P) "
                                                      "decays to at high pressure, V(P) = V_inf + (V0 - V_inf) "
                                                      "exp(-P / P_d); at most activation_volume_m3_mol",
                                                      lo=0.0, hi=3.0e-5,
            source="this model's choice, set by homologous-temperature scaling (Weertman 1970, Rev. Geophys. Space "
                   "Phys. 8:145, from memory): with it the solid's viscosity at the default solidus stays within a "
                   "factor ~4 of 1e20 Pa s from 25 GPa to 1.5 TPa (H / (R T_sol) 21-22), where V_inf = 0 lets it fall "
                   "to 2e15 Pa s; DFT activation volumes of post-perovskite stay above zero to 1 TPa (Tackley et al. "
                   "2013, Icarus 225:50, abstract checked)"),
        "lid_growth_law": key(
            "base-flux", "", "growth of the stagnant lid: 'base-flux', rho c (T_u - T_l) dD/dt = q_lid - q_u with "
            "T_l the lid's base temperature; or 'heat-balance-integral', rho c (T_u - T_lm) dD/dt = q_lid - q_u with "
            "T_lm the lid's mean temperature (the law before this key existed)",
            choices=("base-flux", "heat-balance-integral"),
            source="base-flux: Schubert & Spohn 1990, JGR 95:14095; Morschhauser, Grott & Breuer 2011, Icarus "
                   "212:541 (form from memory); heat-balance-integral: Goodman 1958, Trans. ASME 80:335 (from "
                   "memory); see meltzone._core.lid"),
        "mantle_properties": key(
            "density", "", "thermal expansivity, conductivity and diffusivity of the mantle: 'density', "
            "alpha0 (rho0/rho)^delta_T, k0 (rho/rho0)^g and k / (rho c_p) at the density of each boundary layer "
            "(rho0 the surface rock's; alpha0, k0, kappa0 the configured values); or 'constant' (the configured "
            "values everywhere, the model before this key existed)", choices=("density", "constant"),
            source="Anderson-Grueneisen form: Reynard & Price 1990, GRL 17:689; power law in compression for k: "
                   "Manga & Jeanloz 1997, JGR 102:2999 (abstracts checked); see meltzone._core.properties"),
        "expansivity_density_exponent": key(
            2.0, "1", "Anderson-Grueneisen parameter delta_T of alpha = alpha0 (rho0/rho)^delta_T (with "
            "mantle_properties = 'density')", lo=0.0, hi=8.0,
            source="2: the lower end of the 2-3 inferred from seismic data along the mantle (Reynard & Price 1990, "
                   "GRL 17:689, abstract checked; 4-6 within one mineral phase); rho0 is the surface rock's, so the "
                   "mantle's phase changes are inside rho/rho0. Earth's CMB: alpha0 x 0.32 (rho ratio 1.76 in this "
                   "interior, derived); limit 8: "
                   "above the 4-8 of Birch 1952 for solids (from memory)"),
        "conductivity_density_exponent": key(
            2.0, "1", "exponent g of k = k0 (rho/rho0)^g (with mantle_properties = 'density')", lo=0.0, hi=8.0,
            source="this model's choice inside the published spread: with k0 = 4 W/m/K it gives 12.4 W/m/K at "
                   "Earth's CMB (rho ratio 1.76 in this interior, derived), against 5-12 W/m/K through the lower "
                   "mantle (Manga & Jeanloz 1997, JGR 102:2999) and 20.5 W/m/K Fe-free, ~half with iron, at the top "
                   "of the CMB layer (Haigis, Salanne & Jahn 2012, EPSL; abstracts checked); limit 8: this model's "
                   "choice"),
        "rayleigh_viscosity_depth": key(
            "boundary-layer-base", "", "where the solid mantle's upper boundary layer takes its viscosity, melt "
            "weakening, alpha and kappa: 'boundary-layer-base' (the hot side of the layer, below a stagnant lid's "
            "base or a mobile lid's surface, on the adiabat), 'mid-mantle' (half way down the convecting mantle, on "
            "the adiabat) or 'surface' (T_u, surface pressure and surface melt fraction: the model before this key "
            "existed)", choices=("boundary-layer-base", "mid-mantle", "surface"),
            source="boundary-layer stability with the viscosity of the layer's hot side (Stevenson, Spohn & Schubert "
                   "1983, Icarus 54:466) and the interior viscosity below a stagnant lid (Solomatov & Moresi 2000, "
                   "JGR 105:21795), from memory; mid-mantle: whole-mantle Rayleigh numbers of parameterised "
                   "super-Earth models (Stamenkovic et al. 2012, ApJ 748:41; Tackley et al. 2013, Icarus 225:50; "
                   "abstracts checked, their exact choice from memory); see meltzone._core.properties"),
    }


def initial_keys(key) -> dict:
    """Keys of [initial]: the rule of the core's starting temperature."""
    return {
        "core_start": key(
            "rheological-transition", "", "the core's starting temperature when core_temperature_k = 0: "
            "'rheological-transition', the temperature at which the mantle at the CMB holds the critical melt "
            "fraction (or the starting mantle adiabat there, if colder) plus initial_cmb_jump_k; or 'adiabat', the "
            "starting mantle adiabat at the CMB plus initial_cmb_jump_k (the rule before this key existed); either is "
            "then raised, if needed, to 50 K above the core's melting curve at every core node (a molten start)",
            choices=("rheological-transition", "adiabat"),
            source="bottom-up crystallisation of the magma ocean, Monteux, Andrault & Samuel 2016, EPSL 448:140; "
                   "start after magma-ocean solidification with a superheated core, Noack & Lasbleis 2020, A&A "
                   "638:A129 (abstracts checked); phi_c as the stiffened base: this model's choice; see "
                   "meltzone.evolution.core_start"),
    }


def basal_ocean_keys(key) -> dict:
    """Keys of [melting] for the basal magma ocean (boundary-layer scheme; see
    :mod:`meltzone.evolution.boundary_layer`)."""
    return {
        "basal_magma_ocean": key("off", "", "basal magma ocean between core and solid mantle: 'reservoir' (a "
                                 "well-mixed layer at the core's temperature that cools with the core; experimental: "
                                 "its melting-curve form and parameters are this model's choice) or 'off' (the lower "
                                 "boundary layer sits on the core)", choices=("reservoir", "off"),
            source="Labrosse, Hernlund & Coltice 2007, Nature 450:866; parameterised after Blanc, Stegman & Ziegler "
                   "2020, EPSL 534 and O'Rourke 2020, GRL 47 (abstracts seen; parameters from memory)"),
        "basal_melt_depression_k": key(300.0, "K", "lowering of the mantle solidus for the iron-enriched melt of the "
                                       "basal magma ocean at its reference composition (at Earth's CMB solidus "
                                       "with basal_melt_depression_scaling = 'solidus')", lo=0.0, hi=3000.0,
            source="this model's choice, of the order of the FeO effect on deep-mantle melting (Labrosse et al. 2007; "
                   "Blanc et al. 2020; from memory)"),
        "basal_melt_enrichment_k": key(500.0, "K", "further lowering as the basal magma ocean crystallises: "
                                       "depression + enrichment x (1 - M_b / M_ref), linear in the crystallised "
                                       "fraction of the reference mass (FeO incompatible, concentrating in the melt); "
                                       "at least 1 K: without enrichment the ocean's mass would jump from 0 to its "
                                       "reference at one core temperature", lo=1.0, hi=5000.0,
            source="this model's choice (the mechanism of Labrosse et al. 2007, Nature 450:866: the melt enriches in "
                   "FeO as it crystallises, so the layer thins as the core cools; linear form chosen here)"),
        "basal_ocean_reference_fraction": key(0.02, "1", "reference mass M_ref of the basal magma ocean as a "
                                              "fraction of the mantle mass (its largest mass)", lo=1e-4, hi=0.5,
            source="this model's choice: ~90 km for Earth, the order of ultra-low-velocity zones (tens of km); "
                   "large fractions are a sensitivity test only: the ocean's top can then lie above the undepressed "
                   "solidus of the mantle over it (measured +660 K at 0.33 for 1 Earth mass), which this model does "
                   "not melt into the ocean; "
                   "Labrosse et al. 2007 start from a basal layer of ~1000 km, ~1/3 of the mantle (from memory)"),
        "basal_melt_depression_scaling": key("solidus", "", "how the basal melt's depression and enrichment vary "
                                             "with depth: 'solidus' (proportional to the local mantle solidus, the "
                                             "two keys holding where the default melting curves' solidus is that of "
                                             "Earth's core-mantle boundary, 135.8 GPa) or 'constant' (the same "
                                             "kelvins at every pressure, the model before this key existed)",
                                             choices=("solidus", "constant"),
            source="ideal-solution freezing-point depression at a fixed composition and entropy of fusion, "
                   "proportional to the melting temperature (van 't Hoff / cryoscopic relation, common practice; "
                   "the form T_m / (1 - ln x0) of the cryoscopic solidus of Stixrude 2014, Phil. Trans. R. Soc. A "
                   "372:20130076, from memory); PREM's core-mantle boundary pressure 135.8 GPa (Dziewonski & "
                   "Anderson 1981, PEPI 25:297, from memory)"),
    }
