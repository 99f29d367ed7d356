"""The ``[volcanism]`` section of the configuration: melt extraction, the heat pipe, crust and outgassing of the
boundary-layer scheme (physics in :mod:`meltzone._core.volcanism`).

Plain keyword tables (``config.Key`` arguments), kept apart from :mod:`meltzone.config` so that the section
can grow without that module; :data:`meltzone.config.SCHEMA` wraps each in a ``Key``.
"""

from __future__ import annotations

#: key -> keyword arguments of meltzone.config.Key
VOLCANISM_KEYS = {
    "enabled": dict(
        default="on", unit="", choices=("on", "off"),
        doc="melt extraction from the partial-melt zone (boundary-layer scheme): heat pipe, crust growth and "
            "outgassing; the mixing-length scheme under a stagnant lid: the heat pipe only; 'off' keeps all melt "
            "in the mantle",
        source="Morschhauser, Grott & Breuer 2011, Icarus 212:541 (stagnant lid); Kite, Manga & Gaidos 2009, "
               "ApJ 700:1732 (ridges); Moore & Webb 2013, Nature 501:501 (heat pipe)"),
    "erupted_fraction": dict(
        default=1.0 / 6.0, unit="1", lo=0.0, hi=1.0,
        doc="fraction of the extracted melt that erupts (carries its heat to the surface and outgasses); the "
            "rest intrudes the crust",
        source="intrusive:extrusive ~5:1 in oceanic and ~10:1 in continental settings (Crisp 1984, J. Volcanol. "
               "Geotherm. Res. 20:177, abstract checked), i.e. 1/6 and 1/11; limits: none to all"),
    "mantle_h2o_ppm": dict(
        default=140.0, unit="ppm", lo=0.0, hi=1.0e5,
        doc="initial H2O of the solid mantle (by mass) that melting can extract",
        source="Earth's depleted mantle ~140 ppm H2O (Saal et al. 2002, Nature 419:451; from memory); limit: "
               "10 wt%"),
    "mantle_co2_ppm": dict(
        default=70.0, unit="ppm", lo=0.0, hi=1.0e5,
        doc="initial CO2 of the solid mantle (by mass) that melting can extract",
        source="Earth's depleted mantle ~70 ppm CO2 (Saal et al. 2002, Nature 419:451; from memory); limit: 10 wt%"),
    "h2o_partition_coefficient": dict(
        default=0.01, unit="1", lo=1.0e-6, hi=1.0,
        doc="bulk solid/melt partition coefficient of H2O in batch melting",
        source="~0.006-0.01 for peridotite (Aubaud et al. 2004, GRL 31:L20611; Hauri et al. 2006, EPSL 248:715; "
               "from memory); limits: 1e-6 (perfectly incompatible) to 1 (no enrichment)"),
    "co2_partition_coefficient": dict(
        default=5.5e-4, unit="1", lo=1.0e-6, hi=1.0,
        doc="bulk solid/melt partition coefficient of CO2 in batch melting",
        source="~5.5e-4 for peridotite (Rosenthal et al. 2015, EPSL 412:77; from memory); limits as for H2O"),
    "max_extraction_pressure_gpa": dict(
        default=12.0, unit="GPa", lo=0.1, hi=1000.0,
        doc="deepest pressure from which melt rises (deeper melt is denser than its residue and stays)",
        source="melt-solid density crossover of peridotite melts near 12-13 GPa (Stixrude et al. 2009, EPSL "
               "278:226; Kite et al. 2009, ApJ 700:1732 discuss it for super-Earths; from memory); limits: the "
               "shallowest melting to beyond any mantle"),
    "eclogite_pressure_gpa": dict(
        default=1.5, unit="GPa", lo=0.1, hi=100.0,
        doc="pressure at which the base of a stagnant-lid crust turns to eclogite and founders (caps the crust "
            "at this pressure's depth)",
        source="basalt-eclogite transition ~1.5-2 GPa (Ito & Kennedy 1971; used for super-Earth crusts by "
               "O'Rourke & Korenaga 2012, Icarus 221:1043; from memory); 100: no cap"),
    "crust_density_kg_m3": dict(
        default=2900.0, unit="kg/m^3", lo=2000.0, hi=4000.0,
        doc="density of the crust the extracted melt makes (volumes of melt production and crust)",
        source="basaltic crust, 2900 kg/m^3 (common practice; e.g. Mars, Neumann et al. 2004, JGR 109:E08002, "
               "from memory)"),
    "ridge_length_factor": dict(
        default=1.5, unit="1", lo=0.01, hi=10.0,
        doc="length of spreading ridges over the planet's circumference (mobile lid); sets the plates' length "
            "R / factor and so their speed, not the area of new seafloor (the plates cover the surface)",
        source="Earth: ~60000 km of ridges over a 40000 km circumference (common practice); Kite et al. 2009 "
               "scale ridge length with planet size (from memory)"),
    "vent_solubility": dict(
        default="on", unit="", choices=("on", "off"),
        doc="erupted melt keeps the H2O and CO2 its solubility allows at the partial pressure of each gas at the "
            "surface (X_H2O = 6.8e-8 P^0.7, X_CO2 = 4.4e-12 P, P in Pa); 'off' outgasses all of it",
        source="laws of Lebrun et al. 2013, JGR Planets 118:1155 (from memory); Tosi et al. 2017, A&A 605:A71 "
               "(abstract checked): solubility caps a stagnant-lid planet's H2O at a few tens of bar"),
    "melt_depletion": dict(
        default="on", unit="", choices=("on", "off"),
        doc="the mantle is depleted by the crust's mass (F = M_crust / M_mantle, well mixed) and melts only "
            "beyond it: melt fraction (phi - F) / (1 - F) of the fertile law's phi",
        source="this model's choice after the depletion-dependent solidus of Morschhauser, Grott & Breuer 2011, "
               "Icarus 212:541 (from memory)"),
    "crust_heat_sources": dict(
        default="on", unit="", choices=("on", "off"),
        doc="heat-producing elements enter the melt by batch melting and heat the crust (warms and thins a "
            "stagnant lid); 'off' keeps them all in the mantle",
        source="McLennan 2001, GRL 28:4019 (abstract checked: a Mars crust >= 30 km holds >= 50% of the heat "
               "sources); Morschhauser et al. 2011 (crustal heat sources thin the lid; from memory)"),
    "heat_source_partition_coefficient": dict(
        default=0.002, unit="1", lo=1.0e-5, hi=1.0,
        doc="bulk solid/melt partition coefficient of U, Th and K (one value for all) in batch melting",
        source="U, Th and K are highly incompatible in peridotite, bulk D ~ 0.001-0.01 (common practice; e.g. "
               "Workman & Hart 2005, EPSL 231:53, from memory); limits: perfectly incompatible to no enrichment"),
    "retained_melt_fraction": dict(
        default=1.0, unit="1", lo=0.0, hi=1.0,
        doc="melt fraction the solid mantle keeps where melt is extracted (after the rheological switch, no "
            "deeper than max_extraction_pressure_gpa): the melt weakening exp(-alpha phi) of the upper boundary "
            "layer's viscosity takes min(phi, this) instead of the batch melt fraction phi of the adiabat; 1 keeps "
            "phi (at most convection.critical_melt_fraction), 0 no weakening where melt leaves",
        source="melt connects and separates from its matrix at small porosity (McKenzie 1984, J. Petrol. 25:713, "
               "compaction, abstract checked); ~0.1% from trace elements and U-series, more retained by seismic "
               "data (Faul 2001, Nature 410:920, abstract checked; ~1-2%, from memory); limits: none to all"),
}
