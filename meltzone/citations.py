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
    "schubert1990": Citation("stagnant-lid growth law", "Schubert & Spohn 1990, JGR 95:14095", MEMORY),
    "abe1985": Citation("grey atmosphere emissivity 2/(tau + 2) and H2O/CO2 absorption coefficients",
                        "Abe & Matsui 1985, JGR 90:C545", MEMORY),
    "elkins_tanton2008": Citation("grey atmosphere over a magma ocean", "Elkins-Tanton 2008, EPSL 271:181", MEMORY),
    "lebrun2013": Citation("H2O and CO2 solubility in the melt, X_H2O = 6.8e-8 P^0.7, X_CO2 = 4.4e-12 P",
                           "Lebrun et al. 2013, JGR Planets 118:1155", MEMORY),
    "labrosse2015": Citation("inner-core latent and gravitational energy", "Labrosse 2015, PEPI 247:36", MEMORY),
    "anzellini2013": Citation("iron melting curve (Simon-Glatzel fit; 6230 +- 500 K at 330 GPa checked)",
                              "Anzellini et al. 2013, Science 340:464", MEMORY),
    "kraus2022": Citation("iron melting measured to 1000 GPa by laser shock (range checked in the abstract; the points "
                          "the Anzellini fit is held to, 556 GPa / 8085 K and 991 GPa / 10766 K, from memory)",
                          "Kraus et al. 2022, Science 375:202", MEMORY),
    "alfe2002": Citation("light-element depression of the core's melting curve (~700 K)",
                         "Alfe et al. 2002, EPSL 195:91", MEMORY),
    # basal magma ocean (boundary-layer scheme)
    "labrosse2007": Citation("basal magma ocean: a well-mixed, iron-enriched melt layer on the core that crystallises "
                             "from its top as the core cools", "Labrosse, Hernlund & Coltice 2007, Nature 450:866",
                             MEMORY),
    "blanc2020": Citation("parameterised basal magma ocean cooling with the core (top at the melt's liquidus)",
                          "Blanc, Stegman & Ziegler 2020, EPSL 534", MEMORY),
    "orourke2020": Citation("parameterised basal magma ocean (Venus)", "O'Rourke 2020, GRL 47", MEMORY),
    "basal_ocean_melting": Citation("the basal ocean's melting curve: mantle solidus - depression - enrichment x "
                                    "(1 - M/M_ref), capped at M_ref", "melting.basal_melt_depression_k, "
                                    "basal_melt_enrichment_k, basal_ocean_reference_fraction", CHOICE),
    "turcotte_schubert": Citation("radiogenic heat production and half-lives (Table 4.2)",
                                  "Turcotte & Schubert, Geodynamics (2nd ed. 2002, Cambridge)", CHECKED),
    "mcdonough1995": Citation("bulk-silicate-Earth U, Th, K abundances", "McDonough & Sun 1995, Chem. Geol. "
                              "120:223", MEMORY),
    "mcdonough2020": Citation("bulk-silicate-Earth radiogenic power 19.9 +- 3.0 TW today",
                              "McDonough, Sramek & Wipperfurth 2020, G3 21", CHECKED),
    "abe1997_mlt": Citation("mixing-length eddy diffusivity, viscous alpha g l^4 s / (18 nu) and inertial "
                            "(alpha g l^4 s / 16)^(1/2)", "Abe 1997, PEPI 100:27", MEMORY),
    "bower2018": Citation("mixing-length energy balance of a partially molten mantle as a non-linear diffusion "
                          "equation, eddy diffusivity spanning ~12 orders of magnitude, finite volumes (abstract "
                          "checked; the flux forms from memory)", "Bower et al. 2018, PEPI 274:49", CHECKED),
    "two_phase_adiabat": Citation("two-phase isentrope c_p dT + L dphi = alpha T dP / rho", "Solomatov 2015, "
                                  "Treatise on Geophysics 9.04", MEMORY),
    "mlt_mobile_lid": Citation("mobile lid of the mixing-length scheme: face viscosities no colder than the "
                               "mid-mantle adiabat", "mobile-lid top", CHOICE),
    "patankar1980": Citation("conservative finite volumes; backward Euler with Newton on the tridiagonal Jacobian",
                             "Patankar 1980, Numerical Heat Transfer and Fluid Flow (Hemisphere)", MEMORY),
    "dormand1980": Citation("Dormand-Prince 5(4) Runge-Kutta pair", "Dormand & Prince 1980, J. Comput. Appl. "
                            "Math. 6:19", CHECKED),
    "sandu1997": Citation("Rodas3 Rosenbrock method (order 3, L-stable) for stiff stretches of the evolution",
                          "Sandu et al. 1997, Atmos. Environ. 31:3459 (coefficients as transcribed in the Kinetic "
                          "PreProcessor's Rosenbrock integrator; Hairer & Wanner 1996, Solving ODEs II, IV.7)",
                          CHECKED),
    "hairer1993": Citation("stiffness test of the Dormand-Prince pair (h |lambda| > 3.25 from its last two "
                           "stages)", "Hairer, Norsett & Wanner 1993, Solving ODEs I, 2nd ed., II.6", MEMORY),
}

#: Melting models whose fits were read in their sources (the tests reproduce the published values); the
#: others rest on coefficients recalled from memory (see meltzone.melting).
CHECKED_MELTING_MODELS = ("peridotite-lowp", "katz2003")


def boundary_layer_keys(spec) -> tuple[str, ...]:
    """Registry keys of the laws a boundary-layer run of ``spec`` uses."""
    cv = spec.convection
    keys = ["tosi2017", "stevenson1983", "dormand1980", "sandu1997", "hairer1993", "mei2002", "abe1997",
            "solomatov2015", "roscoe1952", "lejeune1995", "karki2010", "rheology_blend", "mckenzie1988",
            "labrosse2015", "anzellini2013", "alfe2002", "turcotte_schubert", "mcdonough1995", "mcdonough2020"]
    if cv.activation_volume_decay_pa > 0.0:
        keys.append("activation_volume_decay")
    if cv.beta != 1.0 / 3.0 or cv.nusselt_prefactor != 1.0:
        keys += ["korenaga2008", "christensen1985"]
    if cv.regime == "stagnant-lid":
        keys += ["solomatov2000", "grasset1998", "thiriet2019", "schubert1990"]
    if spec.surface.atmosphere == "grey":
        keys += ["abe1985", "elkins_tanton2008", "lebrun2013"]
    keys.append("kraus2022")
    if spec.melting.basal_magma_ocean == "reservoir":
        keys += ["labrosse2007", "blanc2020", "orourke2020", "basal_ocean_melting"]
    return tuple(keys)


def mixing_length_keys(spec) -> tuple[str, ...]:
    """Registry keys of the laws a mixing-length run of ``spec`` uses."""
    keys = ["tosi2017", "abe1997_mlt", "bower2018", "two_phase_adiabat", "patankar1980", "stevenson1983",
            "mei2002", "abe1997", "solomatov2015", "roscoe1952", "lejeune1995", "karki2010", "rheology_blend",
            "labrosse2015", "anzellini2013", "alfe2002", "turcotte_schubert", "mcdonough1995", "mcdonough2020"]
    if spec.convection.activation_volume_decay_pa > 0.0:
        keys.append("activation_volume_decay")
    if spec.convection.regime == "mobile-lid":
        keys.append("mlt_mobile_lid")
    if spec.surface.atmosphere == "grey":
        keys += ["abe1985", "elkins_tanton2008", "lebrun2013"]
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
