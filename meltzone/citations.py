"""The citation registry: every published source a run's laws and defaults rest on, with its status.

Status words (the same as in the project's reference list):

* ``checked``: read in the source's public text (paper, abstract or table) or a faithful transcription;
* ``from memory``: recalled, not yet read in the source (the value or form may be off; verify before relying);
* ``this model's choice``: no published source; a choice of this project, stated so.

A run file stores, for every source its run used, what it is used for, the citation and the status
(root attribute ``sources``), so that a reader sees which numbers rest on checked sources and which do not.
This module imports nothing of the evolution: a scheme names the keys it uses
(:func:`boundary_layer_keys` for the boundary-layer scheme), and :func:`run_sources` formats them.
"""

from __future__ import annotations

from dataclasses import dataclass

CHECKED = "checked"
MEMORY = "from memory"
CHOICE = "this model's choice"
STATUSES = (CHECKED, MEMORY, CHOICE)


@dataclass(frozen=True)
class Citation:
    """One source: what it is used for, the citation text and its status."""

    used_for: str
    text: str
    status: str

    def line(self) -> str:
        return f"{self.used_for}: {self.text} [{self.status}]"


#: key -> Citation. Keys are stable names used by the schemes; texts follow "Authors year, Journal vol:page".
REGISTRY = {
    "tosi2017": Citation("default mantle and core parameters (A, E, V, Ra_cr, k, kappa, alpha, c_p, L, CMB jump)",
                         "Tosi et al. 2017, A&A 605:A71, Table 1", CHECKED),
    "stevenson1983": Citation("boundary-layer scaling Nu = a (Ra/Ra_cr)^beta, lower boundary layer from a local "
                              "critical Rayleigh number, core cooling with inner-core growth",
                              "Stevenson, Spohn & Schubert 1983, Icarus 54:466", MEMORY),
    "korenaga2008": Citation("weak heat-flow scalings and the Urey-ratio paradox of classical scaling",
                             "Korenaga 2008, Rev. Geophys. 46:RG2007", CHECKED),
    "christensen1985": Citation("weak exponents beta for plate-tectonic heat flow",
                                "Christensen 1985, JGR 90:2995", MEMORY),
    "activation_volume_decay": Citation("activation volume decaying with pressure, V(P) = V0 exp(-P/P_d) "
                                        "(pressure dependence discussed by Stamenkovic et al. 2012, ApJ 748:41 and "
                                        "Tackley et al. 2013, Icarus 225:50; abstracts checked)",
                                        "exponential form and P_d", CHOICE),
    "homologous_activation_volume": Citation("high-pressure activation volume V_inf, V(P) = V_inf + (V0 - V_inf) "
                                             "exp(-P/P_d), so that H(P) keeps following the solidus (homologous "
                                             "temperature scaling, H ~ g R T_m: Weertman 1970, Rev. Geophys. Space "
                                             "Phys. 8:145, memory; post-perovskite DFT activation volumes stay above "
                                             "zero to 1 TPa: Tackley et al. 2013, Icarus 225:50, abstract checked)",
                                             "V_inf = 1 cm^3/mol", CHOICE),
    "mei2002": Citation("melt weakening of the solid viscosity, exp(-26 phi)", "Mei et al. 2002, EPSL 201:491",
                        MEMORY),
    "abe1997": Citation("rheological transition at a critical melt fraction ~0.4", "Abe 1997, PEPI 100:27", MEMORY),
    "solomatov2015": Citation("magma-ocean rheology and the rheological transition",
                              "Solomatov 2015, Treatise on Geophysics 9.04", MEMORY),
    "roscoe1952": Citation("Einstein-Roscoe suspension viscosity eta_liq (1 - phi_x/phi_m)^-2.5",
                           "Roscoe 1952, Br. J. Appl. Phys. 3:267", MEMORY),
    "lejeune1995": Citation("suspension viscosity rise below 40 vol% crystals", "Lejeune & Richet 1995, JGR 100:4215",
                            MEMORY),
    "karki2010": Citation("silicate liquid viscosity ~0.01-0.1 Pa s", "Karki & Stixrude 2010, Science 328:740",
                          MEMORY),
    "rheology_blend": Citation("blend of solid and magma-ocean laws over a melt-fraction width",
                               "convection.rheology_blend_width", CHOICE),
    "mckenzie1988": Citation("isentropic (batch) melt fraction of a rising solid mantle",
                             "McKenzie & Bickle 1988, J. Petrol. 29:625", MEMORY),
    "solomatov2000": Citation("stagnant lid: rheological temperature scale a_rh R T^2 / E",
                              "Solomatov & Moresi 2000, JGR 105:21795", MEMORY),
    "grasset1998": Citation("stagnant lid: a_rh ~2.2-2.5", "Grasset & Parmentier 1998, JGR 103:18171", MEMORY),
    "thiriet2019": Citation("stagnant lid: several (a_rh, beta) pairs fit equally",
                            "Thiriet et al. 2019, PEPI 286:138", CHECKED),
    "schubert1990": Citation("stagnant-lid growth law rho c (T_u - T_l) dD/dt = q_lid - q_u",
                             "Schubert & Spohn 1990, JGR 95:14095", MEMORY),
    "morschhauser2011": Citation("stagnant-lid growth law rho c (T_u - T_l) dD/dt = q_lid - q_u (as used)",
                                 "Morschhauser, Grott & Breuer 2011, Icarus 212:541", MEMORY),
    "goodman1958": Citation("heat-balance integral of a growing conductive layer with a linear profile",
                            "Goodman 1958, Trans. ASME 80:335", MEMORY),
    "monteux2016": Citation("bottom-up crystallisation of a magma ocean (the base stiffens first)",
                            "Monteux, Andrault & Samuel 2016, EPSL 448:140 (abstract)", CHECKED),
    "noack2020": Citation("evolution started after magma-ocean solidification with a superheated core",
                          "Noack & Lasbleis 2020, A&A 638:A129 (abstract)", CHECKED),
    "core_start_phi_c": Citation("the core starts initial_cmb_jump_k above the CMB node's rheological transition",
                                 "initial.core_start = rheological-transition", CHOICE),
    "reynard1990": Citation("Anderson-Grueneisen form alpha = alpha0 (rho0/rho)^delta_T; delta_T 2-3 along the "
                            "mantle from seismic data, 4-6 within a mineral phase", "Reynard & Price 1990, GRL "
                            "17:689 (abstract)", CHECKED),
    "manga1997": Citation("conductivity as a power law of compression; 5-12 W/m/K through the lower mantle",
                          "Manga & Jeanloz 1997, JGR 102:2999 (abstract)", CHECKED),
    "haigis2012": Citation("lower-mantle conductivity 9.5-20.5 W/m/K Fe-free, ~half with iron",
                           "Haigis, Salanne & Jahn 2012, EPSL (abstract)", CHECKED),
    "property_exponents": Citation("delta_T = 2 and g = 2 with rho0 the surface rock's density",
                                   "convection.expansivity_density_exponent, conductivity_density_exponent", CHOICE),
    "rayleigh_point": Citation("the solid upper boundary layer's viscosity at its base (fixed-point passes), or "
                               "mid-mantle", "convection.rayleigh_viscosity_depth", CHOICE),
    "stamenkovic2012": Citation("pressure-dependent viscosity and properties make super-Earth lower mantles "
                                "sluggish", "Stamenkovic et al. 2012, ApJ 748:41 (abstract)", CHECKED),
    "tackley2013": Citation("viscosity and conductivity rise and expansivity falls with pressure in super-Earths; "
                            "self-regulated deep viscosity", "Tackley et al. 2013, Icarus 225:50 (abstract)", CHECKED),
    "abe1985": Citation("grey atmosphere emissivity 2/(tau + 2) and H2O/CO2 absorption coefficients",
                        "Abe & Matsui 1985, JGR 90:C545", MEMORY),
    "elkins_tanton2008": Citation("grey atmosphere over a magma ocean", "Elkins-Tanton 2008, EPSL 271:181", MEMORY),
    "lebrun2013": Citation("H2O and CO2 solubility in the melt, X_H2O = 6.8e-8 P^0.7, X_CO2 = 4.4e-12 P",
                           "Lebrun et al. 2013, JGR Planets 118:1155", MEMORY),
    "labrosse2015": Citation("inner-core latent and gravitational energy (values from memory); a CMB heat flow above "
                             "the isentropic 13.25 TW gives an inner core < 700 Myr old (abstract checked)",
                             "Labrosse 2015, PEPI 247:36", MEMORY),
    "braginsky1995": Citation("gravitational energy of the inner core's growth: the rejected light elements "
                              "redistributed in the liquid core's potential, (dRho_chi / rho) (mean psi - psi_icb) "
                              "per kg", "Braginsky & Roberts 1995, GAFD 79:1", MEMORY),
    "nakagawa2020": Citation("Labrosse 2015's core parameters: compositional density jump at the ICB 580 kg/m^3, "
                             "c_p 750 J/kg/K, Grueneisen 1.5, dT_m/dP 9 K/GPa (Table 2)",
                             "Nakagawa 2020, Prog. Earth Planet. Sci. 7:57", CHECKED),
    "anzellini2013": Citation("iron melting curve (Simon-Glatzel fit from memory; data to 200 GPa and 6230 +- 500 K "
                              "extrapolated to 330 GPa checked)",
                              "Anzellini et al. 2013, Science 340:464", MEMORY),
    "kraus2022": Citation("iron melting measured to 1000 GPa by laser shock (range checked in the abstract; the points "
                          "the Anzellini fit is held to, 556 GPa / 8085 K and 991 GPa / 10766 K, from memory; their "
                          "Simon-Glatzel fit known only as quoted by secondary sources, not used as a model)",
                          "Kraus et al. 2022, Science 375:202", MEMORY),
    "latent_scaling": Citation("inner-core latent heat L(P) = L_ICB T_m(P) / T_m(330 GPa): a constant entropy of "
                               "melting (ab initio iron, Alfe et al. 2002, PRB 65:165118)", "core.core_latent_heat",
                               MEMORY),
    "alfe2003": Citation("light-element depression of the core's melting curve (~-700 K at the ICB; pure iron "
                         "6350 +- 600 K there)", "Alfe, Price & Gillan 2003, Mineral. Mag. 67:113 (abstract)",
                         CHECKED),
    "anderson_ahrens1994": Citation("liquid iron's equation of state for the core's thermal profile (isentrope): "
                                    "rho0 7019 kg/m^3 at 1 bar / 1811 K, K_S0 109.7 GPa, K_S0' 4.66, K_S0'' -0.043 "
                                    "/GPa, gamma = 1.735 - 0.130 kg/MJ (rho/rho0)^-1.87 (E - E0), c_v 4.0-4.5 R "
                                    "(abstract checked; the fourth-order Birch-Murnaghan form from memory)",
                                    "Anderson & Ahrens 1994, JGR 99:4273", CHECKED),
    "liquid_core_profile": Citation("the core's thermal profile along liquid iron's isentrope through the fixed "
                                    "epsilon-iron structure's pressures, anchored at the alloy's melting point at "
                                    "the CMB; P off the reference isentrope from gamma = V (dP/dE)_V",
                                    "meltzone.liquid_iron", CHOICE),
    "kuwayama2020": Citation("Earth's outer core 7.5-7.6% less dense than liquid iron, almost identical K_S (the "
                             "check of the liquid-iron isentrope against PREM)",
                             "Kuwayama et al. 2020, PRL 124:165701 (abstract)", CHECKED),
    "katsura2022": Citation("the check of the mantle's reference adiabat: 1646 +- 35 K at 50 km and 2587 +- 60 K at "
                            "2800 km depth (tests/test_interior.py)",
                            "Katsura 2022, JGR Solid Earth, \"A revised adiabatic temperature profile for the mantle\" "
                            "(abstract)", CHECKED),
    # basal magma ocean (boundary-layer scheme)
    "labrosse2007": Citation("basal magma ocean: a well-mixed, iron-enriched melt layer on the core that crystallises "
                             "from its top as the core cools", "Labrosse, Hernlund & Coltice 2007, Nature 450:866",
                             MEMORY),
    "blanc2020": Citation("parameterised basal magma ocean cooling with the core (top at the melt's liquidus)",
                          "Blanc, Stegman & Ziegler 2020, EPSL 534", MEMORY),
    "orourke2020": Citation("parameterised basal magma ocean (Venus)", "O'Rourke 2020, GRL 47", MEMORY),
    "basal_ocean_melting": Citation("the basal ocean's melting curve: mantle solidus - depression - enrichment x "
                                    "(1 - M_b/M_ref), met by the core temperature at its hottest point below the "
                                    "top; capped at M_ref", "melting.basal_melt_depression_k, "
                                    "basal_melt_enrichment_k, basal_ocean_reference_fraction", CHOICE),
    "basal_crystal_buoyancy": Citation("basal ocean: crystals, lighter than the iron-rich melt, collect at its top "
                                       "wherever they form", "\"Investigating magma ocean solidification on Earth "
                                       "through laser-heated diamond anvil cell experiments\" (abstract; GRL 2021 "
                                       "from memory); Boukare et al. 2025, Nature, "
                                       "doi:10.1038/s41586-025-08701-z (abstract; lead author from a news report)",
                                       CHECKED),
    "basal_depression_scaling": Citation("the basal melt's depression and enrichment proportional to the local "
                                         "solidus (ideal-solution freezing-point depression at a fixed composition "
                                         "and entropy of fusion; keys hold at PREM's 135.8 GPa CMB, Dziewonski & "
                                         "Anderson 1981, PEPI 25:297)", "van 't Hoff cryoscopic relation (common "
                                         "practice); the form T_m / (1 - ln x0) of Stixrude 2014, Phil. Trans. R. "
                                         "Soc. A 372:20130076", MEMORY),
    "turcotte_schubert": Citation("radiogenic heat production and half-lives (Table 4.2)",
                                  "Turcotte & Schubert, Geodynamics (2nd ed. 2002, Cambridge)", CHECKED),
    "mcdonough1995": Citation("bulk-silicate-Earth U, Th, K abundances", "McDonough & Sun 1995, Chem. Geol. "
                              "120:223", MEMORY),
    "mcdonough2020": Citation("bulk-silicate-Earth radiogenic power 19.9 +- 3.0 TW today",
                              "McDonough, Sramek & Wipperfurth 2020, G3 21", CHECKED),
    "abe1997_mlt": Citation("mixing-length eddy diffusivity, viscous alpha g l^4 s / (18 nu) and inertial "
                            "(alpha g l^4 s / 16)^(1/2) (searched; the forms not found)", "Abe 1997, PEPI 100:27",
                            MEMORY),
    "bower2018": Citation("mixing-length energy balance of a partially molten mantle as a non-linear diffusion "
                          "equation, eddy diffusivity spanning ~12 orders of magnitude, finite volumes (abstract "
                          "checked; the flux forms from memory)", "Bower et al. 2018, PEPI 274:49", CHECKED),
    "two_phase_adiabat": Citation("two-phase isentrope c_p dT + L dphi = alpha T dP / rho", "Solomatov 2015, "
                                  "Treatise on Geophysics 9.04", MEMORY),
    "mlt_mobile_lid": Citation("mobile lid of the mixing-length scheme: face viscosities no colder than the "
                               "mid-mantle adiabat", "mobile-lid top", CHOICE),
    "patankar1980": Citation("conservative finite volumes; backward Euler with Newton on the tridiagonal Jacobian",
                             "Patankar 1980, Numerical Heat Transfer and Fluid Flow (Hemisphere)", MEMORY),
    "hairer_wanner1996": Citation("Newton iteration of an implicit step stopped on the error left after an update, "
                                  "estimated from the contraction rate", "Hairer & Wanner 1996, Solving Ordinary "
                                  "Differential Equations II, 2nd ed. (Springer), sec. IV.8", MEMORY),
    "dormand1980": Citation("Dormand-Prince 5(4) Runge-Kutta pair", "Dormand & Prince 1980, J. Comput. Appl. "
                            "Math. 6:19", CHECKED),
    # host star, steam atmosphere, water, escape (meltzone.star, meltzone._core.radiation)
    "baraffe2015": Citation("bolometric luminosity of the host star through time (twelve tracks of 0.08-1.4 "
                            "M_sun, rows copied from the table)", "Baraffe et al. 2015, A&A 577:A42", CHECKED),
    "star_interpolation": Citation("the star's luminosity between tracks: linear in log age and log mass",
                                   "meltzone.star", CHOICE),
    "ribas2005": Citation("XUV of the Sun through time, power law in age with exponent 1.23 after ~0.1 Gyr (the "
                          "exponent agrees with the abstract's 2.5x 2.5 Gyr ago and 6x 3.5 Gyr ago; the coefficient "
                          "29.7 erg/s/cm^2 from memory)", "Ribas et al. 2005, ApJ 622:680", CHECKED),
    "jackson2012": Citation("saturated X-ray emission L_X/L_bol 10^-4.3 (early F) - 10^-3.1 (late K), saturation "
                            "times 10^7.6 - 10^8.3 yr (abstract)", "Jackson, Davis & Wheatley 2012, MNRAS 422:2024",
                            CHECKED),
    "haisch2001": Citation("the star's age at the start: disk dispersal after ~3 Myr", "Haisch, Lada & Lada 2001, "
                           "ApJ 553:L153", MEMORY),
    "goldblatt2013": Citation("runaway-greenhouse limit of outgoing longwave radiation, 282 W/m^2",
                              "Goldblatt et al. 2013, Nature Geosci. 6:661", CHECKED),
    "steam_window": Citation("the steam law's join to sigma T^4 and its near-infrared window opening near 1800 K "
                             "(shape after Goldblatt et al. 2013 Fig. 1, from memory; not fitted: no published "
                             "OLR(T_s) table could be verified; the grey law weighs in only as exp(-tau_H2O))",
                             "meltzone._core.radiation.olr_steam", CHOICE),
    "sossi2023": Citation("H2O solubility in peridotite melt, 647 ppmw bar^-0.5 (X ~ p^0.5)",
                          "Sossi et al. 2023, EPSL 601:117894", CHECKED),
    "wagner1993": Citation("saturation vapour pressure of water (IAPWS equation, to the critical point)",
                           "Wagner & Pruss 1993, J. Phys. Chem. Ref. Data 22:783", MEMORY),
    "watson1981": Citation("energy-limited hydrodynamic escape of hydrogen", "Watson, Donahue & Walker 1981, Icarus "
                           "48:150", MEMORY),
    "lammer2003": Citation("energy-limited escape with a heating efficiency ~0.1-0.3", "Lammer et al. 2003, ApJ "
                           "598:L121", MEMORY),
    "hamano2013": Citation("solidification types I and II; oxygen of escaped water taken up by the magma ocean "
                           "(abstract and institute summary checked)", "Hamano, Abe & Genda 2013, Nature 497:607",
                           CHECKED),
    "sandu1997": Citation("Rodas3 Rosenbrock method (order 3, L-stable) for stiff stretches of the evolution",
                          "Sandu et al. 1997, Atmos. Environ. 31:3459 (coefficients as transcribed in the Kinetic "
                          "PreProcessor's Rosenbrock integrator; Hairer & Wanner 1996, Solving ODEs II, IV.7)",
                          CHECKED),
    "hairer1993": Citation("stiffness test of the Dormand-Prince pair (h |lambda| > 3.25 from its last two "
                           "stages)", "Hairer, Norsett & Wanner 1993, Solving ODEs I, 2nd ed., II.6", MEMORY),
}

# volcanism of the boundary-layer scheme (meltzone._core.volcanism)
REGISTRY.update({
    "morschhauser2011": Citation("melt extraction under a stagnant lid at the convective velocity, crust no thicker "
                                 "than the lid, heat of the intruded melt", "Morschhauser, Grott & Breuer 2011, "
                                 "Icarus 212:541; Grott et al. 2011, EPSL 308:391 (forms)", MEMORY),
    "kite2009": Citation("melt production under ridges (plate speed x ridge length x melt column); deep melt denser "
                         "than its residue", "Kite, Manga & Gaidos 2009, ApJ 700:1732", MEMORY),
    "moore2013": Citation("heat pipe: erupted melt carries its heat to the surface", "Moore & Webb 2013, Nature "
                          "501:501 (abstract)", CHECKED),
    "crisp1984": Citation("erupted fraction (intrusive:extrusive ~5:1 oceanic, ~10:1 continental); Earth's magma "
                          "production 26-34 km^3/yr", "Crisp 1984, J. Volcanol. Geotherm. Res. 20:177 (abstract)",
                          CHECKED),
    "volatile_partition": Citation("batch melting of H2O and CO2: D = 0.01 and 5.5e-4; mantle 140 ppm H2O, 70 ppm "
                                   "CO2", "Shaw 1970; Aubaud et al. 2004, GRL 31:L20611; Hauri et al. 2006, EPSL "
                                   "248:715; Rosenthal et al. 2015, EPSL 412:77; Saal et al. 2002, Nature 419:451",
                                   MEMORY),
    "stixrude2009": Citation("deepest pressure melt rises from (melt-solid density crossover, 12 GPa)",
                             "Stixrude et al. 2009, EPSL 278:226", MEMORY),
    "orourke2012": Citation("stagnant-lid crust capped where its base turns to eclogite (1.5 GPa)",
                            "O'Rourke & Korenaga 2012, Icarus 221:1043; Ito & Kennedy 1971", MEMORY),
    "volcanism_choices": Citation("cell length = convecting depth in a stagnant lid's convective velocity; "
                                  "intruded melt's heat leaves through the lid; mobile-lid crust subducted at the "
                                  "plates' age; smooth cut-off of crust growth over 5% of its cap", "meltzone",
                                  CHOICE),
    "plate_area": Citation("mobile lid: the plates on both sides of the ridges cover the surface (length R / ridge "
                           "factor), so seafloor is made at 4 pi R^2 over the age 4 delta^2 / (pi kappa); Earth "
                           "makes ~3.4 km^2/yr", "common practice (area balance); Rowley 2002, GSA Bull. 114:927, "
                           "the figure as summarised in Science 297:1239", CHECKED),
    "vent_solubility": Citation("erupted melt keeps the H2O (6.8e-8 P^0.7) and CO2 (4.4e-12 P) its solubility "
                                "allows at each gas's partial pressure at the surface", "laws of Lebrun et al. "
                                "2013, JGR Planets 118:1155", MEMORY),
    "tosi2017_outgassing": Citation("solubility in basaltic melt caps a stagnant-lid planet's outgassed H2O at a few "
                                    "tens of bar while most CO2 is outgassed (abstract)", "Tosi et al. 2017, A&A "
                                    "605:A71", CHECKED),
    "melt_depletion": Citation("the mantle, depleted by the crust's mass F, melts only beyond it: (phi - F) / "
                               "(1 - F); after the depletion-dependent solidus of Morschhauser et al. 2011",
                               "meltzone; Morschhauser, Grott & Breuer 2011, Icarus 212:541", CHOICE),
    "crust_heat_sources": Citation("heat-producing elements enter the melt by batch melting (bulk D = 0.002) and "
                                   "heat the crust; a Mars crust >= 30 km holds >= 50% of them (abstract)",
                                   "McLennan 2001, GRL 28:4019", CHECKED),
    "lid_base_regime": Citation("under a stagnant lid the solidified mantle's regime (magma ocean or not) is judged "
                                "by the isentropic melt fraction at the lid's base, the convecting mantle's top",
                                "meltzone", CHOICE),
    "crust_follows_lid": Citation("stagnant-lid crust at its lid cap follows a thinning lid and returns to the "
                                  "mantle with its share of the heat sources", "meltzone", CHOICE),
    "conductive_crust": Citation("steady conductive lid with the crust's heat sources at its top: the surface flux "
                                 "gains sH/A (1 - D_cr/(2 D_l)), the lid base loses sH/A D_cr/(2 D_l)",
                                 "Turcotte & Schubert, Geodynamics (common practice)", MEMORY),
    "retained_melt": Citation("where melt is extracted the solid mantle keeps only a small melt fraction, which "
                              "weakens its viscosity (min(phi, retained) in exp(-alpha phi)); melt separates at "
                              "~0.1% porosity by geochemical models, more retained by seismic data (abstracts)",
                              "McKenzie 1984, J. Petrol. 25:713; Faul 2001, Nature 410:920", CHECKED),
})

#: Melting models whose fits were read in their sources (the tests reproduce the published values); the
#: others rest on coefficients recalled from memory (see meltzone.melting).
CHECKED_MELTING_MODELS = ("peridotite-lowp", "katz2003")


def _activation_volume_keys(cv) -> list[str]:
    """Registry keys of the activation volume's pressure law (both schemes share it)."""
    if cv.activation_volume_decay_pa <= 0.0:
        return []
    return ["activation_volume_decay"] + (["homologous_activation_volume"]
                                          if cv.high_pressure_activation_volume_m3_mol > 0.0 else [])


def boundary_layer_keys(spec) -> tuple[str, ...]:
    """Registry keys of the laws a boundary-layer run of ``spec`` uses."""
    cv = spec.convection
    keys = ["tosi2017", "stevenson1983", "dormand1980", "sandu1997", "hairer1993",
            "mei2002", "abe1997", "solomatov2015", "roscoe1952",
            "lejeune1995", "karki2010", "rheology_blend", "mckenzie1988", "labrosse2015", "anzellini2013",
            "alfe2003", "latent_scaling", "turcotte_schubert", "mcdonough1995", "mcdonough2020"]
    keys += _activation_volume_keys(cv)
    if cv.beta != 1.0 / 3.0 or cv.nusselt_prefactor != 1.0:
        keys += ["korenaga2008", "christensen1985"]
    if cv.regime == "stagnant-lid":
        keys += ["solomatov2000", "grasset1998", "thiriet2019", "lid_base_regime"]
        keys += ["schubert1990", "morschhauser2011"] if cv.lid_growth_law == "base-flux" else ["goodman1958"]
    if spec.surface.atmosphere == "grey":
        keys += ["abe1985", "elkins_tanton2008", "lebrun2013"]
    keys.append("kraus2022")
    keys += surface_keys(spec)
    if spec.melting.basal_magma_ocean == "reservoir":
        keys += ["labrosse2007", "blanc2020", "orourke2020", "basal_ocean_melting",
                 "basal_crystal_buoyancy"] + (
            ["basal_depression_scaling"] if spec.melting.basal_melt_depression_scaling == "solidus" else [])
    if spec.volcanism.enabled == "on":
        vc = spec.volcanism
        keys += ["morschhauser2011", "kite2009", "moore2013", "crisp1984", "volatile_partition", "stixrude2009",
                 "volcanism_choices"] + (["orourke2012", "crust_follows_lid"] if cv.regime == "stagnant-lid" else
                                         ["plate_area"])
        keys += (["vent_solubility", "tosi2017_outgassing"] if vc.vent_solubility == "on" else []) + (
            ["melt_depletion"] if vc.melt_depletion == "on" else []) + (
            ["crust_heat_sources", "conductive_crust"] if vc.crust_heat_sources == "on" else []) + (
            ["retained_melt"] if vc.retained_melt_fraction < 1.0 else [])
    if cv.mantle_properties == "density":
        keys += ["reynard1990", "manga1997", "haigis2012", "property_exponents"]
    if cv.rayleigh_viscosity_depth != "surface":
        keys += ["rayleigh_point", "stamenkovic2012", "tackley2013"]
    return tuple(keys + _start_keys(spec) + _core_keys(spec))


def _core_keys(spec) -> list[str]:
    """Keys of the core's thermal profile (liquid iron's isentrope) and of the inner core's gravitational energy
    (from the structure when core.gravitational_energy = 0)."""
    profile = ["anderson_ahrens1994", "liquid_core_profile"]
    return profile + (["braginsky1995", "nakagawa2020"] if spec.core.gravitational_energy == 0.0 else [])


def _start_keys(spec) -> list[str]:
    """Keys of the core's starting temperature (meltzone.evolution.core_start)."""
    ini = spec.initial
    if ini.core_temperature_k > 0.0 or ini.core_start == "adiabat":
        return []
    return ["monteux2016", "noack2020", "core_start_phi_c"]


def mixing_length_keys(spec) -> tuple[str, ...]:
    """Registry keys of the laws a mixing-length run of ``spec`` uses."""
    keys = ["tosi2017", "abe1997_mlt", "bower2018", "two_phase_adiabat", "patankar1980", "hairer_wanner1996",
            "stevenson1983",
            "mei2002", "abe1997", "solomatov2015", "roscoe1952", "lejeune1995", "karki2010", "rheology_blend",
            "labrosse2015", "anzellini2013", "alfe2003", "latent_scaling", "turcotte_schubert", "mcdonough1995",
            "mcdonough2020"]
    keys += _activation_volume_keys(spec.convection)
    if spec.convection.regime == "mobile-lid":
        keys.append("mlt_mobile_lid")
    if spec.surface.atmosphere == "grey":
        keys += ["abe1985", "elkins_tanton2008", "lebrun2013"]
    return tuple(keys + _start_keys(spec) + _core_keys(spec)) + surface_keys(spec)


def surface_keys(spec) -> tuple[str, ...]:
    """Registry keys of the star, the steam atmosphere, water and escape a run of ``spec`` uses (both schemes)."""
    keys = []
    if spec.surface.atmosphere == "steam":
        keys += ["goldblatt2013", "steam_window", "sossi2023", "wagner1993", "abe1985", "lebrun2013"]
    if spec.star.mass_msun > 0.0:
        keys += ["baraffe2015", "star_interpolation", "ribas2005", "jackson2012", "haisch2001"]
        if spec.surface.atmosphere != "none" and spec.surface.escape_efficiency > 0.0:
            keys += ["watson1981", "lammer2003", "hamano2013"]
    return tuple(keys)


#: convection.scheme -> function(spec) giving the registry keys of the laws that scheme uses. A new scheme
#: adds its entry here.
SCHEME_KEYS = {"boundary-layer": boundary_layer_keys, "mixing-length": mixing_length_keys}


def run_sources(spec, melting_model, materials, keys=None) -> tuple[str, ...]:
    """Lines "used for: citation [status]" for a run: the melting model, the equation-of-state materials
    and the registry ``keys`` the evolution scheme used (default: :data:`SCHEME_KEYS` of the spec's scheme;
    an unknown key raises KeyError: a scheme must register what it cites)."""
    if keys is None:
        keys = SCHEME_KEYS[spec.convection.scheme](spec)
    status = CHECKED if melting_model.id in CHECKED_MELTING_MODELS else (
        "user table" if melting_model.id == "table" else MEMORY)
    out = [f"melting curves ({melting_model.id}): {melting_model.citation} [{status}]"]
    out += [f"equation of state ({m.name}): {m.source} [{'partly from memory' if 'memory' in m.source else CHECKED}]"
            for m in materials]
    out += [REGISTRY[k].line() for k in keys]
    return tuple(dict.fromkeys(out))
