"""More compound presets for heat-spreading and thermoelectric design: AlN, SiC (6H),
InSb, Mg2Sn, CoSb3.

Conventions as in :mod:`kinetic.presets` (see its docstring). Velocities are
direction averages of the Christoffel-equation velocities computed from the
elastic constants named in ``elastic_constants`` (40,000 random directions;
the two transverse modes averaged), and ``debye_temperature`` is the elastic
theta_0 = hbar v_D (6 pi^2 n)^(1/3) / kB of those velocities, so that a Debye
branch holds 3 modes per atom; other kinds of theta are in the notes. Each
preset's ``model`` and ``calibration`` fields hold the scattering model
calibrated with :func:`kinetic.fit` on the k(T) table of
reference/compound_kappa.csv (script: reference/calibrate_compounds.py).
"""
from typing import Dict

from ._fields import _IUPAC, Preset, _f, _gap
from .compounds import _calibrated

_CHRIS = "direction average of the Christoffel velocities"

EXTRA_COMPOUNDS: Dict[str, Preset] = {
    # ------------------------------------------------------------------ AlN
    "AlN": {
        "formula": _f("AlN", "", "chemical formula", "checked: MPOD 1000160"),
        "structure": _f("wurtzite (P6_3mc, hP4)", "", "MPOD file 1000160 (point group 6mm)",
                        "checked: mpod.cimav.edu.mx/datafiles/1000160.mpod"),
        "atoms_per_cell": _f(4.0, "1", "wurtzite: 4 atoms per hexagonal cell",
                             "checked: MPOD 1000160 cell (standard wurtzite content)"),
        "lattice_constant": _f(3.111e-10, "m", "MPOD 1000160 (a)",
                               "checked: mpod.cimav.edu.mx/datafiles/1000160.mpod"),
        "lattice_constant_c": _f(4.978e-10, "m", "MPOD 1000160 (c)",
                                 "checked: mpod.cimav.edu.mx/datafiles/1000160.mpod"),
        "atomic_mass": _f(20.4943, "u", _IUPAC, "computed from periodictable 2.1.0"),
        "lattice_volume_per_atom": _f(1.04310e-29, "m^3", "(sqrt(3)/2) a^2 c / 4",
                                      "computed from lattice_constant and lattice_constant_c"),
        "density": _f(3262.5, "kg/m^3", "M_bar * u / V_atom (X-ray density)",
                      "computed", "Merck Index gives 3.26 g/cm^3 (checked: drugfuture.com)"),
        "elastic_constants": _f({"C11": 410e9, "C12": 148.5e9, "C13": 98.9e9, "C33": 388.5e9,
                                 "C44": 124.6e9}, "Pa",
                                "McNeil, Grimsditch & French, J. Am. Ceram. Soc. 76, 1132 (1993) "
                                "(Brillouin scattering)",
                                "checked: MPOD file 1000160 (mpod.cimav.edu.mx)"),
        "velocity_longitudinal": _f(10926.0, "m/s", _CHRIS, "computed from elastic_constants, density"),
        "velocity_transverse": _f(6388.0, "m/s", _CHRIS, "computed from elastic_constants, density"),
        "velocity_debye": _f(7073.0, "m/s", "3/v_D^3 = <sum_i v_i^-3>",
                             "computed from elastic_constants, density"),
        "debye_temperature": _f(963.8, "K", "elastic theta_0 from velocity_debye",
                                "computed from velocity_debye and lattice_volume_per_atom",
                                "ELASTIC theta_0 (so the Debye branch holds 3 modes per atom)"),
        "gruneisen": _gap("1", "thermodynamic gamma not formed (no checked alpha, c_p)"),
        "kappa_300K": _f(319.0, "W/(m K)", "Merck Index entry 'Aluminum Nitride' (3.19 W/cm K); "
                         "G. A. Slack et al., J. Phys. Chem. Solids 48, 641 (1987)",
                         "checked: drugfuture.com/chemdata/Aluminum-Nitride.html",
                         "high-purity single crystal; ceramics are 100-180 (roditi.com, checked)"),
        "composition": _f({"Al": 1, "N": 1}, "atoms per formula unit", "chemical formula",
                          "checked: MPOD 1000160"),
    },
    # ------------------------------------------------------------------ 6H-SiC
    "SiC": {
        "name": _f("6H-SiC", "", "the key 'SiC' means the 6H polytype", "common practice"),
        "formula": _f("SiC", "", "chemical formula", "checked: scilit abstract (6H SiC)"),
        "structure": _f("6H polytype (P6_3mc)", "", "Burgemeister et al. 1979 (6H)", "from memory"),
        "atoms_per_cell": _f(12.0, "1", "6H: 6 Si-C bilayers per hexagonal cell", "from memory"),
        "lattice_constant": _f(3.0806e-10, "m", "6H-SiC a", "from memory"),
        "lattice_constant_c": _f(15.1173e-10, "m", "6H-SiC c", "from memory"),
        "atomic_mass": _f(20.048, "u", _IUPAC, "computed from periodictable 2.1.0"),
        "lattice_volume_per_atom": _f(1.03537e-29, "m^3", "(sqrt(3)/2) a^2 c / 12",
                                      "computed from lattice_constant and lattice_constant_c"),
        "density": _f(3215.3, "kg/m^3", "M_bar * u / V_atom (X-ray density)", "computed",
                      "handbook 3.21 g/cm^3 (from memory)"),
        "elastic_constants": _f({"C11": 501e9, "C12": 111e9, "C13": 52e9, "C33": 553e9,
                                 "C44": 163e9}, "Pa",
                                "Kamitani et al., J. Appl. Phys. 82, 3152 (1997), 6H-SiC "
                                "(Brillouin scattering)", "from memory"),
        "velocity_longitudinal": _f(12224.0, "m/s", _CHRIS, "computed from elastic_constants, density"),
        "velocity_transverse": _f(7725.0, "m/s", _CHRIS, "computed from elastic_constants, density"),
        "velocity_debye": _f(8457.0, "m/s", "3/v_D^3 = <sum_i v_i^-3>",
                             "computed from elastic_constants, density"),
        "debye_temperature": _f(1155.3, "K", "elastic theta_0 from velocity_debye",
                                "computed from velocity_debye and lattice_volume_per_atom",
                                "ELASTIC theta_0; calorimetric ~1200 K (from memory)"),
        "gruneisen": _gap("1", "not formed"),
        "kappa_300K": _f(387.0, "W/(m K)", "Burgemeister, von Muench & Pettenpaul, J. Appl. Phys. "
                         "50, 5790 (1979), purest 6H crystals, perpendicular to c",
                         "checked: scilit.com abstract (3.87 W/cm deg, T^-1.49 over 300-500 K)",
                         "parallel to c ~30 % lower (same abstract)"),
        "composition": _f({"Si": 1, "C": 1}, "atoms per formula unit", "chemical formula",
                          "checked: scilit abstract"),
    },
    # ------------------------------------------------------------------ InSb
    "InSb": {
        "formula": _f("InSb", "", "chemical formula", "common practice"),
        "structure": _f("zinc blende (F-43m, cF8)", "", "Ioffe InSb basic parameters", "from memory"),
        "atoms_per_cell": _f(2.0, "1", "zinc blende, 2-atom primitive cell", "common practice"),
        "lattice_constant": _f(6.479e-10, "m", "Ioffe InSb basic parameters", "from memory"),
        "atomic_mass": _f(118.289, "u", _IUPAC, "computed from periodictable 2.1.0"),
        "lattice_volume_per_atom": _f(3.39965e-29, "m^3", "a^3/8", "computed from lattice_constant"),
        "density": _f(5777.8, "kg/m^3", "M_bar * u / V_atom (X-ray density)", "computed",
                      "handbook 5.77 g/cm^3 (from memory)"),
        "elastic_constants": _f({"C11": 66.9e9, "C12": 36.5e9, "C44": 30.2e9}, "Pa",
                                "Ioffe 'InSb mechanical properties' (Slutsky & Garland 1959 "
                                "ultrasonic data)", "from memory"),
        "velocity_longitudinal": _f(3709.0, "m/s", _CHRIS, "computed from elastic_constants, density"),
        "velocity_transverse": _f(2021.0, "m/s", _CHRIS, "computed from elastic_constants, density"),
        "velocity_debye": _f(2203.0, "m/s", "3/v_D^3 = <sum_i v_i^-3>",
                             "computed from elastic_constants, density"),
        "debye_temperature": _f(202.5, "K", "elastic theta_0 from velocity_debye",
                                "computed from velocity_debye and lattice_volume_per_atom",
                                "ELASTIC theta_0; Ioffe quotes 160 K (from memory)"),
        "gruneisen": _gap("1", "not formed"),
        "kappa_300K": _f(18.0, "W/(m K)", "Ioffe 'InSb thermal properties' (0.18 W/cm K)",
                         "from memory"),
        "composition": _f({"In": 1, "Sb": 1}, "atoms per formula unit", "chemical formula",
                          "common practice"),
    },
    # ------------------------------------------------------------------ Mg2Sn
    "Mg2Sn": {
        "formula": _f("Mg2Sn", "", "chemical formula", "checked: drugfuture.com Magnesium Stannide"),
        "structure": _f("antifluorite (Fm-3m, cF12)", "", "Merck Index 'Magnesium Stannide' "
                        "(calcium fluoride structure)", "checked: drugfuture.com/chemdata/"
                        "Magnesium-Stannide.html"),
        "atoms_per_cell": _f(3.0, "1", "antifluorite: 3-atom primitive cell", "common practice"),
        "lattice_constant": _f(6.7612e-10, "m", "Joergensen et al., 'Multi-temperature structure of "
                               "thermoelectric Mg2Si and Mg2Sn', Acta Cryst. B 73, 1158 (2017): "
                               "a = 6.7323 + 8.5e-5 T + 3.8e-8 T^2 A, at 300 K",
                               "checked: abstract on dissem.in (formula); value computed at 300 K"),
        "atomic_mass": _f(55.7733, "u", _IUPAC, "computed from periodictable 2.1.0"),
        "lattice_volume_per_atom": _f(2.57567e-29, "m^3", "a^3/12", "computed from lattice_constant"),
        "density": _f(3595.7, "kg/m^3", "M_bar * u / V_atom (X-ray density)", "computed"),
        "elastic_constants": _f({"C11": 82.4e9, "C12": 20.8e9, "C44": 36.6e9}, "Pa",
                                "Davis, Whitten & Danielson, J. Phys. Chem. Solids 28, 439 (1967)",
                                "from memory"),
        "velocity_longitudinal": _f(4923.0, "m/s", _CHRIS, "computed from elastic_constants, density"),
        "velocity_transverse": _f(3084.0, "m/s", _CHRIS, "computed from elastic_constants, density"),
        "velocity_debye": _f(3392.0, "m/s", "3/v_D^3 = <sum_i v_i^-3>",
                             "computed from elastic_constants, density"),
        "debye_temperature": _f(341.9, "K", "elastic theta_0 from velocity_debye",
                                "computed from velocity_debye and lattice_volume_per_atom",
                                "ELASTIC theta_0; the X-ray (ADP) theta is 243(2) K (Joergensen et "
                                "al. 2017, checked: dissem.in abstract)"),
        "gruneisen": _gap("1", "not formed"),
        "kappa_300K": _f(5.9, "W/(m K)", "J. J. Martin, J. Phys. Chem. Solids 33, 1139 (1972)",
                         "from memory", "lattice part"),
        "composition": _f({"Mg": 2, "Sn": 1}, "atoms per formula unit", "chemical formula",
                          "checked: drugfuture.com Magnesium Stannide"),
    },
    # ------------------------------------------------------------------ CoSb3
    "CoSb3": {
        "formula": _f("CoSb3", "", "chemical formula", "common practice"),
        "structure": _f("skutterudite (Im-3, cI32)", "", "chemicalstructure.net 'Skutterudite'",
                        "checked: space group"),
        "atoms_per_cell": _f(16.0, "1", "Co4Sb12 primitive (bcc) cell", "common practice"),
        "lattice_constant": _f(9.0385e-10, "m", "CoSb3 cubic a", "from memory"),
        "atomic_mass": _f(106.0533, "u", _IUPAC, "computed from periodictable 2.1.0"),
        "lattice_volume_per_atom": _f(2.30749e-29, "m^3", "a^3/32", "computed from lattice_constant"),
        "density": _f(7631.7, "kg/m^3", "M_bar * u / V_atom (X-ray density)", "computed"),
        "velocity_longitudinal": _f(4590.0, "m/s", "sound-velocity measurement on CoSb3 (as quoted "
                                    "in the skutterudite literature)", "from memory"),
        "velocity_transverse": _f(2640.0, "m/s", "see velocity_longitudinal", "from memory"),
        "velocity_debye": _f(2932.0, "m/s", "3/v_D^3 = 1/v_L^3 + 2/v_T^3",
                             "computed from the two velocities"),
        "debye_temperature": _f(306.6, "K", "elastic theta_0 from velocity_debye",
                                "computed from velocity_debye and lattice_volume_per_atom",
                                "ELASTIC theta_0; heat capacity gives 295 K (Realyvazquez-Guevara "
                                "et al., checked: scribd 319116060); Caillat 1996 307 K (from memory)"),
        "gruneisen": _gap("1", "not formed"),
        "kappa_300K": _f(10.0, "W/(m K)", "Caillat, Borshchevsky & Fleurial, J. Appl. Phys. 80, "
                         "4442 (1996)", "from memory", "lattice part of single crystals"),
        "composition": _f({"Co": 1, "Sb": 3}, "atoms per formula unit", "chemical formula",
                          "common practice"),
    },
}



# Calibrated reference-sample models, written by reference/calibrate_compounds.py
# (refit there, never edit by hand). rms is relative (a fraction).
_CAL = {
    'AlN': {'branches': 'avg',
     'dispersion': 'debye',
     'mechanisms': {'boundary': {'length': 0.002},
                    'point_defect': {'gamma': 4.32e-06},
                    'umklapp': {'gruneisen': 1.8247, 'b': 4.289}},
     'free': ['umklapp.gruneisen', 'umklapp.b'],
     'source': 'G. A. Slack, R. A. Tanzilli, R. O. Pohl & J. W. Vandersande, J. Phys. Chem. Solids 48, '
               '641 (1987): intrinsic AlN single crystal',
     'table_how': '300 K value checked (319 W/m/K = 3.19 W/cm K in the Merck Index entry, '
                  'drugfuture.com/chemdata/Aluminum-Nitride.html); 400 and 500 K from memory',
     'table': 'reference/compound_kappa.csv',
     't_min': 300.0,
     't_max': 500.0,
     'rms': 0.0015,
     'n_points': 3,
     'sample': 'lattice',
     'max_deviation': 0.002,
     'reference_300K': 319.0,
     'model_300K': 319.2445,
     'uncertainty_percent': 10.0},
    'SiC': {'branches': 'avg',
     'dispersion': 'debye',
     'mechanisms': {'boundary': {'length': 0.002},
                    'point_defect': {'gamma': 0.00020913},
                    'umklapp': {'gruneisen': 2.5023, 'b': 3.178}},
     'free': ['umklapp.gruneisen', 'umklapp.b'],
     'source': 'Burgemeister, von Muench & Pettenpaul, J. Appl. Phys. 50, 5790 (1979): kappa '
               'perpendicular to c = 387 (T/300 K)^-1.49 W/m/K, 300-500 K, purest 6H crystals',
     'table_how': 'checked: abstract on scilit.com/publications/e8055c143caf231b8e8a91a70c738915 (the '
                  'law; values computed from it)',
     'table': 'reference/compound_kappa.csv',
     't_min': 300.0,
     't_max': 500.0,
     'rms': 0.0036,
     'n_points': 5,
     'sample': 'in-plane (perpendicular to c); parallel to c is ~30 % lower (same abstract)',
     'max_deviation': 0.0045,
     'reference_300K': 387.0,
     'model_300K': 388.5245,
     'uncertainty_percent': 10.0},
    'InSb': {'branches': 'avg',
     'dispersion': 'debye',
     'mechanisms': {'boundary': {'length': 0.002},
                    'point_defect': {'gamma': 4.086e-05},
                    'umklapp': {'gruneisen': 1.7354, 'b': 10.0}},
     'free': ['umklapp.gruneisen', 'umklapp.b'],
     'source': "Ioffe 'InSb thermal properties' (0.18 W/cm/K at 300 K) and the curve of Busch & "
               'Steigmeier, Helv. Phys. Acta 34, 1 (1961)',
     'table_how': 'from memory (18 W/m/K at 300 K, about 1/T below 300 K; other points computed from '
                  'the 1/T law); above 300 K InSb has a large electronic/bipolar part',
     'table': 'reference/compound_kappa.csv',
     't_min': 200.0,
     't_max': 300.0,
     'rms': 0.0061,
     'n_points': 3,
     'sample': 'lattice part',
     'max_deviation': 0.0077,
     'reference_300K': 18.0,
     'model_300K': 17.8721,
     'uncertainty_percent': 10.0},
    'Mg2Sn': {'branches': 'avg',
     'dispersion': 'debye',
     'mechanisms': {'boundary': {'length': 0.002},
                    'point_defect': {'gamma': 0.00059826},
                    'umklapp': {'gruneisen': 4.354, 'b': 10.0}},
     'free': ['umklapp.gruneisen', 'umklapp.b'],
     'source': 'J. J. Martin, J. Phys. Chem. Solids 33, 1139 (1972); V. K. Zaitsev et al., Phys. Rev. '
               'B 74, 045207 (2006): lattice conductivity of Mg2Sn',
     'table_how': 'from memory (5.9 W/m/K at 300 K, about 1/T above; other points computed from the '
                  '1/T law)',
     'table': 'reference/compound_kappa.csv',
     't_min': 300.0,
     't_max': 600.0,
     'rms': 0.0086,
     'n_points': 4,
     'sample': 'lattice part',
     'max_deviation': 0.0129,
     'reference_300K': 5.9,
     'model_300K': 5.9759,
     'uncertainty_percent': 15.0},
    'CoSb3': {'branches': 'avg',
     'dispersion': 'debye',
     'mechanisms': {'boundary': {'length': 0.002},
                    'point_defect': {'gamma': 6.532e-05},
                    'umklapp': {'gruneisen': 3.8269, 'b': 10.0}},
     'free': ['umklapp.gruneisen', 'umklapp.b'],
     'source': 'T. Caillat, A. Borshchevsky & J.-P. Fleurial, J. Appl. Phys. 80, 4442 (1996): lattice '
               'conductivity of CoSb3 single crystals',
     'table_how': 'from memory (about 10 W/m/K at 300 K falling roughly as T^-0.95; points from '
                  'memory)',
     'table': 'reference/compound_kappa.csv',
     't_min': 300.0,
     't_max': 600.0,
     'rms': 0.0179,
     'n_points': 4,
     'sample': 'lattice part; Morelli et al., PRB 51, 9622 (1995) (checked: abstract) report intrinsic '
               'kappa_L of single crystals',
     'max_deviation': 0.0281,
     'reference_300K': 10.0,
     'model_300K': 10.281,
     'uncertainty_percent': 15.0},
}
for _k, _e in _CAL.items():
    EXTRA_COMPOUNDS[_k].update(_calibrated(_e))
