"""Published material numbers for kinetic's lattice-model presets (plain data).

``PRESETS`` maps a material key to a dict of fields.  Each field is a dict::

    {"value": float | str | dict | None,   # None = unknown (a gap, not a zero)
     "unit":  str,                         # SI; "1" for dimensionless
     "source": str,                        # published source, or the inputs used
     "how":   str,                         # "checked: <where>" | "computed from ..." |
                                           # "from memory" | "gap"
     "note":  str}                         # optional: which kind of quantity it is

Status words:

* ``checked: <where>`` - the number is printed in the named place (often an
  abstract, handbook page or data page; not necessarily the primary paper read
  in full).
* ``computed from ...`` - derived here with numpy/scipy (CODATA constants via
  scipy.constants, IUPAC standard atomic weights via periodictable 2.1.0) from
  the inputs named, each of which is itself sourced.
* ``from memory`` - recalled, not found in a source during this work.  Confirm
  against the original before a test or a default relies on it.
* ``gap`` - no trustworthy number found; ``value`` is None.

Conventions (see reference/README.md for the full caveats):

* ``lattice_volume_per_atom`` comes from the lattice constants, never from the
  quoted handbook density (they disagree by 1-6 % for PbTe, Bi2Te3, Mg2Si);
  ``density`` is the X-ray density M_bar * u / V_atom so the preset is
  self-consistent; the quoted handbook density is given in the note.
* ``atoms_per_cell`` is Slack's n: atoms in the primitive cell.
* ``velocity_longitudinal`` / ``velocity_transverse`` are direction averages
  of the Christoffel-equation velocities computed from the elastic constants
  (mean over 40,000 random directions; the two transverse modes are averaged
  together), not VRH values; the VRH values are in the notes.
  ``velocity_debye`` is the Debye average, 3/v_D^3 = <sum_i v_i^-3>.
* ``gruneisen`` is the THERMODYNAMIC gamma_th = 3 alpha B / (rho c_p) at
  about 300 K.  It is not the fitted gamma of Slack's formula or of the
  Morelli-Heremans-Slack Callaway model, which are larger (about 1 for the
  diamond-structure solids); those, where recalled, are in
  ``gruneisen_slack`` (from memory).
* ``debye_temperature`` says its kind in the note (low-temperature
  calorimetric, elastic, X-ray ...).  ``debye_temperature_acoustic`` is
  Slack's theta_a (acoustic-branch Debye temperature), from memory only.

References are cited in full in each ``source`` string.  Nothing here is
invented; a number without a source is a gap (None).
"""
from typing import Any, Dict

Field = Dict[str, Any]
Preset = Dict[str, Field]

# -- shared source strings ---------------------------------------------------
_IUPAC = ("IUPAC standard atomic weights as tabulated in periodictable 2.1.0 "
          "(mean mass per atom of the formula unit)")
_KITTEL = ("C. Kittel, Introduction to Solid State Physics, table of Debye "
           "temperatures (as reproduced on Wikipedia 'Debye model')")
_MS2006 = ("D. T. Morelli & G. A. Slack, 'High lattice thermal conductivity "
           "solids', in High Thermal Conductivity Materials (Springer, 2006), "
           "Table 1.1")
_GS1964 = ("C. J. Glassbrenner & G. A. Slack, Phys. Rev. 134, A1058 (1964)")


def _f(value: Any, unit: str, source: str, how: str, note: str = "") -> Field:
    entry: Field = {"value": value, "unit": unit, "source": source, "how": how}
    if note:
        entry["note"] = note
    return entry


def _gap(unit: str, note: str) -> Field:
    return {"value": None, "unit": unit, "source": "none found", "how": "gap",
            "note": note}


PRESETS: Dict[str, Preset] = {
    # ------------------------------------------------------------------ Si
    "Si": {
        "formula": _f("Si", "", "chemical formula", "checked: matprop.ru/Si_basic"),
        "structure": _f("diamond (Fd-3m, cF8)", "",
                        "Ioffe/matprop 'Basic parameters of Silicon'",
                        "checked: matprop.ru/Si_basic"),
        "atoms_per_cell": _f(2.0, "1", "diamond structure: 8 atoms per cubic cell, "
                             "fcc lattice with a 2-atom basis",
                             "checked: matprop.ru/Si_basic (8 atoms/cubic cell)"),
        "lattice_constant": _f(5.43102e-10, "m",
                               "Virginia Semiconductor, 'Basic Mechanical and Thermal "
                               "Properties of Silicon' (22.5 C)",
                               "checked: studylib.net/doc/7304847"),
        "atomic_mass": _f(28.085, "u", _IUPAC, "computed from periodictable 2.1.0"),
        "lattice_volume_per_atom": _f(2.00242e-29, "m^3", "a^3/8 with a = 5.43102e-10 m",
                                      "computed from lattice_constant"),
        "density": _f(2329.0, "kg/m^3", "M_bar * u / V_atom",
                      "computed from atomic_mass and lattice_volume_per_atom",
                      "matprop quotes 2.329 g/cm^3 (checked: matprop.ru/Si_basic)"),
        "debye_temperature": _f(645.0, "K", _KITTEL,
                                "checked: liquisearch.com/debye_model/debye_temperature_table",
                                "table value, low-temperature heat-capacity kind; "
                                "T->0 calorimetric theta_0 = 636 K ('Specific Heat of "
                                "Germanium and Silicon at Low Temperatures', abstract, "
                                "checked: scilit.net); elastic theta_0 = 645.5 K computed "
                                "from the C_ij below; Ioffe gives 640 K"),
        "elastic_constants": _f({"C11": 165.64e9, "C12": 63.94e9, "C44": 79.51e9}, "Pa",
                                "Virginia Semiconductor note (its ref. [6])",
                                "checked: studylib.net/doc/7304847"),
        "velocity_longitudinal": _f(9020.0, "m/s",
                                    "direction average of the Christoffel L velocity",
                                    "computed from elastic_constants and density",
                                    "VRH isotropic value 8948 m/s; [100] value 8433 m/s; "
                                    "D. Murray (UBC) note gives 9017 m/s (checked: "
                                    "geocities.ws/cofrest/md46.htm)"),
        "velocity_transverse": _f(5370.0, "m/s",
                                  "direction average of the two Christoffel T velocities",
                                  "computed from elastic_constants and density",
                                  "VRH isotropic value 5342 m/s; [100] 5843 m/s; "
                                  "Murray note gives 5372 m/s"),
        "velocity_debye": _f(5887.0, "m/s", "3/v_D^3 = <sum_i v_i^-3> over directions",
                             "computed from elastic_constants and density"),
        "gruneisen": _f(0.46, "1", "gamma_th = 3 alpha B / (rho c_p) with alpha = "
                        "2.59e-6 1/K (Virginia Semiconductor note, checked: "
                        "studylib.net/doc/7304847), B = (C11+2C12)/3 = 97.84 GPa, "
                        "c_p = 0.702 J/(g K) (microwaves101 'Silicon', weak source)",
                        "computed from alpha, elastic_constants, density, c_p",
                        "THERMODYNAMIC gamma at 300 K, not the fitted Slack/MHS gamma"),
        "gruneisen_slack": _f(1.06, "1", _MS2006, "from memory",
                              "fitted gamma for Slack's formula; pair only with the "
                              "theta_a of the same table and check the prefactor "
                              "convention first (see reference/README.md)"),
        "debye_temperature_acoustic": _f(395.0, "K", _MS2006, "from memory",
                                         "Slack's theta_a (acoustic branches only)"),
        "kappa_300K": _f(148.0, "W/(m K)",
                         "CRC Handbook recommended value (as on el-cat.com "
                         "'Properties of silicon')",
                         "checked: el-cat.com",
                         "Glassbrenner & Slack (1964) measured 156 W/(m K) at 300 K "
                         "(third-party copy of their table); natural "
                         "isotopes, high purity"),
        "umklapp_fit": _f({"avg": {"gruneisen": 1.943, "b": 2.805},
                            "split": {"gruneisen": 2.544, "b": 3.404}}, "1",
                          "Glassbrenner & Slack, Phys. Rev. 134, A1058 (1964), 50-1000 K "
                          "(reference/si_ge_kappa.csv), each point +-5 %",
                          "computed: kinetic.fit of boundary length, Umklapp gamma and b with "
                          "the isotope Gamma fixed (reduced chi2 0.85 averaged, 0.45 split)",
                          "model-specific Umklapp calibration for kinetic's own branches; not a "
                          "material constant and not comparable with Slack's gamma"),
        "composition": _f({"Si": 1}, "atoms per formula unit", "chemical formula",
                          "checked: matprop.ru/Si_basic"),
    },
    # ------------------------------------------------------------------ Ge
    "Ge": {
        "formula": _f("Ge", "", "chemical formula", "checked: matprop.ru/Ge_basic"),
        "structure": _f("diamond (Fd-3m, cF8)", "",
                        "Ioffe/matprop 'Basic Parameters of Germanium'",
                        "checked: matprop.ru/Ge_basic"),
        "atoms_per_cell": _f(2.0, "1", "diamond structure, 2-atom primitive cell",
                             "checked: matprop.ru/Ge_basic"),
        "lattice_constant": _f(5.658e-10, "m", "Ioffe/matprop 'Basic Parameters of "
                               "Germanium'", "checked: matprop.ru/Ge_basic"),
        "atomic_mass": _f(72.630, "u", _IUPAC, "computed from periodictable 2.1.0"),
        "lattice_volume_per_atom": _f(2.26412e-29, "m^3", "a^3/8 with a = 5.658e-10 m",
                                      "computed from lattice_constant"),
        "density": _f(5326.8, "kg/m^3", "M_bar * u / V_atom",
                      "computed from atomic_mass and lattice_volume_per_atom",
                      "matprop quotes 5.3234 g/cm^3 (checked: matprop.ru/Ge_basic)"),
        "debye_temperature": _f(374.0, "K", "Ioffe/matprop Ge basic; " + _KITTEL,
                                "checked: matprop.ru/Ge_basic",
                                "table value, low-temperature heat-capacity kind; "
                                "T->0 calorimetric theta_0 = 363 K (same specific-heat "
                                "abstract as Si, checked: scilit.net); elastic theta_0 "
                                "= 372.1 K computed from the C_ij below"),
        "elastic_constants": _f({"C11": 126e9, "C12": 44e9, "C44": 67.7e9}, "Pa",
                                "M. Levinshtein, S. Rumyantsev & M. Shur (eds.), Handbook "
                                "Series on Semiconductor Parameters (Ioffe data)",
                                "checked: copy in the solcore5 repository, "
                                "material_data/Levinshtein/GroupIV.txt"),
        "velocity_longitudinal": _f(5279.0, "m/s",
                                    "direction average of the Christoffel L velocity",
                                    "computed from elastic_constants and density",
                                    "VRH isotropic 5220 m/s; [100] 4864 m/s"),
        "velocity_transverse": _f(3244.0, "m/s",
                                  "direction average of the two Christoffel T velocities",
                                  "computed from elastic_constants and density",
                                  "VRH isotropic 3224 m/s; [100] 3565 m/s"),
        "velocity_debye": _f(3536.0, "m/s", "3/v_D^3 = <sum_i v_i^-3> over directions",
                             "computed from elastic_constants and density"),
        "gruneisen": _f(0.73, "1", "gamma_th = 3 alpha B / (rho c_p) with alpha = "
                        "5.84e-6 1/K (Reeber & Wang, Mater. Chem. Phys. 46, 259 (1996), "
                        "checked: ltmlab.fr germanium page), B = 71.33 GPa from C_ij, "
                        "C_p = 23.222 J/(mol K) (CRC via Wikipedia 'Germanium', checked)",
                        "computed from alpha, elastic_constants, density, C_p",
                        "THERMODYNAMIC gamma at 300 K (0.75 with alpha = 6.0e-6); "
                        "not the fitted Slack/MHS gamma"),
        "gruneisen_slack": _f(1.06, "1", _MS2006, "from memory",
                              "fitted gamma for Slack's formula"),
        "debye_temperature_acoustic": _f(235.0, "K", _MS2006, "from memory",
                                         "Slack's theta_a (acoustic branches only)"),
        "kappa_300K": _f(60.2, "W/(m K)", "CRC Handbook, as quoted on Wikipedia "
                         "'Germanium' (ltmlab.fr gives 60)",
                         "checked: cs.mcgill.ca wikispeedia copy of Wikipedia; ltmlab.fr"),
        "umklapp_fit": _f({"avg": {"gruneisen": 1.868, "b": 3.36},
                            "split": {"gruneisen": 2.383, "b": 3.81}}, "1",
                          "Ho, Powell & Liley, J. Phys. Chem. Ref. Data 1, 279 (1972) values in "
                          "reference/si_ge_kappa.csv, 100-1000 K (those values from memory)",
                          "computed: kinetic.fit of boundary length, Umklapp gamma and b with "
                          "the isotope Gamma fixed; b is poorly determined (+-1)",
                          "model-specific Umklapp calibration; inherits the from-memory status "
                          "of its input table"),
        "composition": _f({"Ge": 1}, "atoms per formula unit", "chemical formula",
                          "checked: matprop.ru/Ge_basic"),
    },
    # ------------------------------------------------------------------ diamond
    "C": {
        "name": _f("diamond", "", "alias: the key 'C' means diamond, not graphite",
                   "checked: m-newton.ex.ac.uk (Sque, diamond data page)"),
        "formula": _f("C", "", "chemical formula", "checked: Sque diamond page"),
        "structure": _f("diamond (Fd-3m, cF8)", "",
                        "J. Sque, Exeter diamond data page",
                        "checked: m-newton.ex.ac.uk/.../sque.togo/diamond"),
        "atoms_per_cell": _f(2.0, "1", "diamond structure, 2-atom primitive cell",
                             "checked: Sque diamond page"),
        "lattice_constant": _f(3.56683e-10, "m", "Sque diamond page (300 K; its refs. 1, 2, 4)",
                               "checked: m-newton.ex.ac.uk/.../sque.togo/diamond"),
        "atomic_mass": _f(12.011, "u", _IUPAC, "computed from periodictable 2.1.0"),
        "lattice_volume_per_atom": _f(5.67227e-30, "m^3", "a^3/8 with a = 3.56683e-10 m",
                                      "computed from lattice_constant",
                                      "Sque page gives 1.763e23 atoms/cm^3 (agrees)"),
        "density": _f(3516.2, "kg/m^3", "M_bar * u / V_atom",
                      "computed from atomic_mass and lattice_volume_per_atom",
                      "Sque page quotes 3515.25 kg/m^3 (checked); periodictable's "
                      "carbon density is graphite's, do not use it"),
        "debye_temperature": _f(2230.0, "K", _KITTEL,
                                "checked: liquisearch.com/debye_model/debye_temperature_table",
                                "table value, low-temperature heat-capacity kind; the "
                                "high-T calorimetric single-Debye fit is 1860 K (273-1073 K) "
                                "(Victor 1962, abstract, checked: scilit.com); elastic "
                                "theta_0 = 2244 K computed from the C_ij below"),
        "elastic_constants": _f({"C11": 1079e9, "C12": 123e9, "C44": 578e9}, "Pa",
                                "Ioffe NSM 'Diamond: mechanical properties' sound "
                                "velocities along [100] and [110] (17.52, 12.82; 18.32, "
                                "12.82, 11.66 km/s) with rho = 3515.25 kg/m^3",
                                "computed from the Ioffe velocities (checked: "
                                "ioffe.ru/SVA/NSM/Semicond/Diamond/mechanic.html)"),
        "velocity_longitudinal": _f(18170.0, "m/s",
                                    "direction average of the Christoffel L velocity",
                                    "computed from elastic_constants and density",
                                    "VRH isotropic 18130 m/s; [100] 17520 m/s (Ioffe)"),
        "velocity_transverse": _f(12350.0, "m/s",
                                  "direction average of the two Christoffel T velocities",
                                  "computed from elastic_constants and density",
                                  "VRH isotropic 12340 m/s; [100] 12820 m/s (Ioffe)"),
        "velocity_debye": _f(13440.0, "m/s", "3/v_D^3 = <sum_i v_i^-3> over directions",
                             "computed from elastic_constants and density"),
        "gruneisen": _f(0.73, "1", "gamma_th = 3 alpha B / (rho c_p) with alpha = "
                        "1.0e-6 1/K (diamond-materials.com, checked), B = 442.3 GPa (Sque "
                        "page, checked), c_p = 0.52 J/(g K) (Ioffe Diamond thermal, "
                        "checked)",
                        "computed from alpha, B, density, c_p",
                        "THERMODYNAMIC gamma at 300 K; the published alpha values "
                        "(0.8e-6 Ioffe, 1.0e-6, 1.05e-6 Sque) give 0.58-0.76; not the "
                        "fitted Slack/MHS gamma"),
        "gruneisen_slack": _f(0.75, "1", _MS2006, "from memory",
                              "fitted gamma for Slack's formula"),
        "debye_temperature_acoustic": _f(1450.0, "K", _MS2006, "from memory",
                                         "Slack's theta_a (acoustic branches only)"),
        "kappa_300K": _f(2300.0, "W/(m K)", "Sque diamond page (its ref. 12), type IIa",
                         "checked: m-newton.ex.ac.uk/.../sque.togo/diamond",
                         "type I: 895; high-purity synthetic with natural isotopes up to "
                         "~2400 (Inyushkin et al., PRB 97, 144305 (2018), checked)"),
        "composition": _f({"C": 1}, "atoms per formula unit", "chemical formula",
                          "checked: Sque diamond page"),
    },
    # ------------------------------------------------------------------ GaAs
    "GaAs": {
        "formula": _f("GaAs", "", "chemical formula", "checked: semi1source glossary"),
        "structure": _f("zinc blende (F-43m, cF8)", "", "semi1source glossary",
                        "checked: semi1source.com glossary"),
        "atoms_per_cell": _f(2.0, "1", "zinc blende, 2-atom primitive cell",
                             "checked: semi1source.com glossary"),
        "lattice_constant": _f(5.653e-10, "m", "semi1source glossary (0.565 nm in text)",
                               "checked: semi1source.com glossary"),
        "atomic_mass": _f(72.3223, "u", _IUPAC, "computed from periodictable 2.1.0"),
        "lattice_volume_per_atom": _f(2.25812e-29, "m^3", "a^3/8 with a = 5.653e-10 m",
                                      "computed from lattice_constant"),
        "density": _f(5318.3, "kg/m^3", "M_bar * u / V_atom",
                      "computed from atomic_mass and lattice_volume_per_atom",
                      "McSkimin et al. quote 5316.9 kg/m^3 (abstract, checked: "
                      "scilit.net/publications/77b88c7bd5870dee967b3528e085d99b)"),
        "debye_temperature": _f(345.0, "K", "J. S. Blakemore, J. Appl. Phys. 53, R123 "
                                "(1982), as on Ioffe 'GaAs thermal properties'",
                                "checked: ioffe.ru/SVA/NSM/Semicond/GaAs/thermal.html",
                                "theta_0 from the low-temperature T^3 heat capacity; "
                                "elastic theta_0 = 343.6 K computed from the C_ij below"),
        "elastic_constants": _f({"C11": 118.77e9, "C12": 53.72e9, "C44": 59.44e9}, "Pa",
                                "McSkimin, Jayaraman & Andreatch, elastic moduli of GaAs "
                                "(25 C, adiabatic; abstract gives 1.1877, 0.5372, 0.5944 "
                                "x 10^12 dyn/cm^2)",
                                "checked: scilit.net/publications/77b88c7bd5870dee967b3528e085d99b"),
        "velocity_longitudinal": _f(5156.0, "m/s",
                                    "direction average of the Christoffel L velocity",
                                    "computed from elastic_constants and density",
                                    "VRH isotropic 5087 m/s; Ioffe [100] 4730 m/s (checked)"),
        "velocity_transverse": _f(2992.0, "m/s",
                                  "direction average of the two Christoffel T velocities",
                                  "computed from elastic_constants and density",
                                  "VRH isotropic 2962 m/s; Ioffe [100] 3340 m/s (checked)"),
        "velocity_debye": _f(3262.0, "m/s", "3/v_D^3 = <sum_i v_i^-3> over directions",
                             "computed from elastic_constants and density"),
        "gruneisen": _f(0.74, "1", "gamma_th = 3 alpha B / (rho c_p) with B = 75.3 GPa, "
                        "alpha = 5.73e-6 1/K, c_p = 0.33 J/(g K) (all Ioffe 'GaAs thermal "
                        "properties', checked)",
                        "computed from B, alpha, c_p, density",
                        "THERMODYNAMIC gamma at 300 K; not the fitted Slack/MHS gamma"),
        "gruneisen_slack": _f(0.75, "1", _MS2006, "from memory",
                              "fitted gamma for Slack's formula"),
        "debye_temperature_acoustic": _f(220.0, "K", _MS2006, "from memory",
                                         "Slack's theta_a (acoustic branches only)"),
        "kappa_300K": _f(55.0, "W/(m K)", "Ioffe 'GaAs thermal properties'",
                         "checked: ioffe.ru/SVA/NSM/Semicond/GaAs/thermal.html",
                         "other sources: 45.5 (PMC6927520 Table 2), 46 (semi1source); "
                         "treat as +-10 %"),
        "composition": _f({"Ga": 1, "As": 1}, "atoms per formula unit",
                          "chemical formula", "checked: semi1source glossary"),
    },
    # ------------------------------------------------------------------ PbTe
    "PbTe": {
        "formula": _f("PbTe", "", "chemical formula",
                      "checked: Wikipedia 'Lead telluride' copy"),
        "structure": _f("rock salt (Fm-3m, cF8)", "", "Wikipedia 'Lead telluride' (CRC)",
                        "checked: en.wikipedia.org/wiki/Lead_telluride copy"),
        "atoms_per_cell": _f(2.0, "1", "rock salt, 2-atom primitive cell",
                             "checked: Wikipedia 'Lead telluride' copy"),
        "lattice_constant": _f(6.46e-10, "m", "Wikipedia 'Lead telluride' (CRC); AZoM/ESPI "
                               "gives 6.454 A", "checked: Wikipedia copy; azom.com "
                               "ArticleID=8431"),
        "atomic_mass": _f(167.40, "u", _IUPAC, "computed from periodictable 2.1.0"),
        "lattice_volume_per_atom": _f(3.36983e-29, "m^3", "a^3/8 with a = 6.46e-10 m",
                                      "computed from lattice_constant"),
        "density": _f(8248.9, "kg/m^3", "M_bar * u / V_atom (X-ray density)",
                      "computed from atomic_mass and lattice_volume_per_atom",
                      "handbook value 8164 kg/m^3 (Wikipedia/CRC, checked) is 1 % lower"),
        "debye_temperature": _f(105.0, "K", "Sharov, 'Linear coefficient of thermal "
                                "expansion and Debye temperature of PbTe at high "
                                "temperatures', Phys. Solid State (abstract), 105 +- 3 K",
                                "checked: j.ioffe.ru/articles/54581",
                                "X-RAY (atomic displacement) Debye temperature, 293-573 K; "
                                "a calorimetric theta is higher (~130-136 K, from memory)"),
        "velocity_longitudinal": _gap("m/s", "PbTe elastic constants (Houston, Strakna & "
                                      "Belson, J. Appl. Phys. 39, 3913 (1968)) not found; "
                                      "remembered C_ij give a theta_0 that does not match "
                                      "the checked thetas, so none is given"),
        "velocity_transverse": _gap("m/s", "see velocity_longitudinal"),
        "velocity_debye": _f(1139.0, "m/s", "v_D = (k_B theta/hbar)(6 pi^2 n_at)^(-1/3)",
                             "computed from debye_temperature (105 K, X-ray) and "
                             "lattice_volume_per_atom",
                             "inherits the X-ray kind of theta: likely an underestimate"),
        "gruneisen": _gap("1", "no bulk modulus / heat capacity found to form gamma_th; "
                          "alpha = 19.7e-6 1/K (Sharov, checked) is known"),
        "gruneisen_slack": _f(1.45, "1", _MS2006, "from memory", "low confidence"),
        "kappa_300K": _f(2.30, "W/(m K)", "AZoM/ESPI 'Lead Telluride (PbTe) Semiconductors'",
                         "checked: azom.com ArticleID=8431",
                         "weak source; does not say total or lattice, nor the doping"),
        "composition": _f({"Pb": 1, "Te": 1}, "atoms per formula unit",
                          "chemical formula", "checked: Wikipedia 'Lead telluride' copy"),
    },
    # ------------------------------------------------------------------ Bi2Te3
    "Bi2Te3": {
        "formula": _f("Bi2Te3", "", "chemical formula",
                      "checked: Wikipedia 'Bismuth telluride' mirror"),
        "structure": _f("tetradymite, rhombohedral (R-3m, hR15)", "",
                        "Wikipedia 'Bismuth telluride'; de.wikipedia (15 atoms per "
                        "hexagonal cell)", "checked: review.clateway.com mirror; "
                        "de.zxc.wiki/wiki/Bismuttellurid"),
        "atoms_per_cell": _f(5.0, "1", "primitive rhombohedral cell = hexagonal cell "
                             "(15 atoms, Z = 3) / 3", "computed from the checked hexagonal "
                             "cell content"),
        "lattice_constant": _f(4.395e-10, "m", "Wikipedia 'Bismuth telluride' (hexagonal a)",
                               "checked: Wikipedia mirror",
                               "MatWeb/AZoM give 4.38 A"),
        "lattice_constant_c": _f(30.44e-10, "m", "Wikipedia 'Bismuth telluride' (hexagonal c)",
                                 "checked: Wikipedia mirror", "MatWeb/AZoM give 30.45 A"),
        "atomic_mass": _f(160.152, "u", _IUPAC, "computed from periodictable 2.1.0"),
        "lattice_volume_per_atom": _f(3.39470e-29, "m^3",
                                      "(sqrt(3)/2) a^2 c / 15 with a = 4.395 A, c = 30.44 A",
                                      "computed from lattice_constant and lattice_constant_c"),
        "density": _f(7834.0, "kg/m^3", "M_bar * u / V_atom (X-ray density)",
                      "computed from atomic_mass and lattice_volume_per_atom",
                      "handbook values 7740 (Wikipedia), 7730 (MatWeb), 7642 (de.wiki) "
                      "are 1-2.5 % lower"),
        "debye_temperature": _f(158.0, "K", "Jenkins, Rayne & Ure, 'Elastic moduli of "
                                "Bi2Te3 from 4.2 K to 300 K', Phys. Lett. 30A (1969)",
                                "checked: c.coek.info/pdf-elastic-moduli-of-bi2te3-from-42k-"
                                "to-300k-.html",
                                "ELASTIC theta_0 at 4.2 K, which the paper says agrees "
                                "well with the calorimetric value"),
        "elastic_constants": _f({"C11": 74.36e9, "C66": 26.19e9, "C33": 51.60e9,
                                 "C44": 31.35e9, "C13": 15.41e9}, "Pa",
                                "Jenkins, Rayne & Ure, Phys. Lett. 30A (1969), at 4.2 K "
                                "(C14 not in the excerpt read)",
                                "checked: c.coek.info copy of the paper"),
        "velocity_longitudinal": _gap("m/s", "anisotropic crystal and C14 missing. A Hill "
                                      "average of the 4.2 K moduli with C14 = 0 gives "
                                      "v_L ~ 3000, v_T ~ 1880 m/s, but these imply theta "
                                      "~ 190 K against the checked 158 K, so they are not "
                                      "given as preset values"),
        "velocity_transverse": _gap("m/s", "see velocity_longitudinal"),
        "velocity_debye": _f(1718.0, "m/s", "v_D = (k_B theta/hbar)(6 pi^2 n_at)^(-1/3)",
                             "computed from debye_temperature (158 K, elastic) and "
                             "lattice_volume_per_atom"),
        "gruneisen": _gap("1", "not found; ~1.5 remembered with low confidence"),
        "kappa_300K": _f(1.54, "W/(m K)", "H. J. Goldsmid, as summarised in Witting et "
                         "al., Research 2020, 4361703, Table 2 ('endpoint' lattice "
                         "conductivity)",
                         "checked: spj.sciencemag.org/journals/research/2020/4361703/tab2",
                         "LATTICE conductivity, in-plane, Bi2Te3 end member; other "
                         "authors in the same table 1.30-1.77; which column is Bi2Te3 "
                         "is our reading of the table"),
        "composition": _f({"Bi": 2, "Te": 3}, "atoms per formula unit",
                          "chemical formula", "checked: Wikipedia 'Bismuth telluride' mirror"),
    },
    # ------------------------------------------------------------------ Mg2Si
    "Mg2Si": {
        "formula": _f("Mg2Si", "", "chemical formula", "checked: pveducation.org Mg2Si page"),
        "structure": _f("antifluorite (Fm-3m, cF12)", "",
                        "PVEducation 'Mg2Si' page citing O. Madelung, Semiconductors: "
                        "Data Handbook (Springer, 2004)",
                        "checked: pveducation.org/zh-hans/pvcdrom/mg2si"),
        "atoms_per_cell": _f(3.0, "1", "antifluorite: 12 atoms per cubic cell, fcc "
                             "lattice with a 3-atom basis", "checked: pveducation.org "
                             "Mg2Si page (12 atoms/cubic cell)"),
        "lattice_constant": _f(6.338e-10, "m", "PVEducation / Madelung (2004)",
                               "checked: pveducation.org/zh-hans/pvcdrom/mg2si"),
        "atomic_mass": _f(25.565, "u", _IUPAC, "computed from periodictable 2.1.0"),
        "lattice_volume_per_atom": _f(2.12166e-29, "m^3", "a^3/12 with a = 6.338e-10 m",
                                      "computed from lattice_constant"),
        "density": _f(2000.9, "kg/m^3", "M_bar * u / V_atom (X-ray density)",
                      "computed from atomic_mass and lattice_volume_per_atom",
                      "the page's 1880 kg/m^3 is 6 % lower (probably not a single-"
                      "crystal value)"),
        "debye_temperature": _f(417.0, "K", "PVEducation / Madelung (2004)",
                                "checked: pveducation.org/zh-hans/pvcdrom/mg2si",
                                "kind not stated on the page (given at 300 K)"),
        "velocity_longitudinal": _gap("m/s", "Mg2Si elastic constants (Whitten, Chung & "
                                      "Danielson, J. Phys. Chem. Solids 26, 49 (1965)) "
                                      "not found; remembered C_ij give theta_0 ~ 590 K "
                                      "against the checked 417 K, so none is given"),
        "velocity_transverse": _gap("m/s", "see velocity_longitudinal"),
        "velocity_debye": _f(3877.0, "m/s", "v_D = (k_B theta/hbar)(6 pi^2 n_at)^(-1/3)",
                             "computed from debye_temperature (417 K) and "
                             "lattice_volume_per_atom"),
        "gruneisen": _gap("1", "not found"),
        "kappa_300K": _gap("W/(m K)", "not found in a source; ~8 remembered, unverified"),
        "composition": _f({"Mg": 2, "Si": 1}, "atoms per formula unit",
                          "chemical formula", "checked: pveducation.org Mg2Si page"),
    },
}

#: Other names accepted for a preset key (lower case) -> key in PRESETS.
ALIASES: Dict[str, str] = {"diamond": "C", "c": "C", "si": "Si", "ge": "Ge",
                           "gaas": "GaAs", "pbte": "PbTe", "bi2te3": "Bi2Te3",
                           "mg2si": "Mg2Si"}
