"""kinetic: thermal conductivity of solids from kinetic theory.

The engine (physics only, SI units). The Jupyter workbench lives in the
separate ``widgets`` package.
"""
from .errors import KineticError, ParameterError, DataError, RecordError, FitError
from .parameters import Parameter
from .dispersion import Branch
from .scattering import (
    Mechanism,
    Boundary,
    PointDefect,
    Umklapp,
    Normal,
    ElectronPhonon,
    Dislocation,
    Precipitate,
)
from .lattice import LatticeModel, Spectrum
from . import materials, disorder, estimates, electronic, data
from .data import Dataset, load_data, parse_data, load_series
from .fitting import fit, fit_joint, compare, profile_interval, bootstrap, predict_band, FitResult, default_model
from .records import save_record, load_record, Record
from .whatif import sweep, grain_size_sweep, alloy_sweep, grain_alloy_map, zt_vs_fermi_level
from .report import report_figure, summary_table
from . import demo
from .materials import Material
from .disorder import (isotope_gamma, mass_fluctuation_gamma, compound_gamma, material_gamma, alloy_gamma,
                       virtual_crystal)
from .estimates import slack_kappa, slack_kappa_for, cahill_minimum, cahill_minimum_for
from .electronic import (L0, fermi_integral, seebeck_spb, lorenz_spb_eta, reduced_fermi_level, lorenz_spb,
                         lorenz_kim, electronic_kappa, ElectronicKappa, lattice_from_total, LatticeFromTotal,
                         wiedemann_franz_kappa, bipolar_kappa_activated, bipolar_kappa_two_band,
                         power_factor, zt)

__version__ = "0.1.0"

__all__ = [
    "KineticError", "ParameterError", "DataError", "RecordError", "FitError",
    "Parameter", "Branch", "Mechanism", "Boundary", "PointDefect", "Umklapp", "Normal",
    "ElectronPhonon", "Dislocation", "Precipitate", "LatticeModel", "Spectrum",
    "materials", "disorder", "estimates", "electronic", "data", "Material",
    "Dataset", "load_data", "parse_data", "load_series",
    "fit", "fit_joint", "compare", "profile_interval", "bootstrap", "predict_band", "FitResult",
    "default_model", "save_record", "load_record", "Record", "sweep", "grain_size_sweep",
    "alloy_sweep", "grain_alloy_map", "zt_vs_fermi_level", "report_figure", "summary_table", "demo",
    "isotope_gamma", "mass_fluctuation_gamma", "compound_gamma", "material_gamma", "alloy_gamma",
    "virtual_crystal", "slack_kappa", "slack_kappa_for", "cahill_minimum", "cahill_minimum_for",
    "L0", "fermi_integral", "seebeck_spb", "lorenz_spb_eta", "reduced_fermi_level", "lorenz_spb",
    "lorenz_kim", "electronic_kappa", "ElectronicKappa", "lattice_from_total", "LatticeFromTotal",
    "wiedemann_franz_kappa", "bipolar_kappa_activated", "bipolar_kappa_two_band", "power_factor", "zt",
]
