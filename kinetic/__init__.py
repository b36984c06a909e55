"""kinetic: thermal conductivity of solids from kinetic theory.

The engine (physics only, SI units). The Jupyter workbench lives in the
separate ``widgets`` package.

The public face is small: the names in ``__all__`` are what users reach for;
everything else lives in named submodules (``kinetic.electronic``,
``kinetic.disorder``, ``kinetic.estimates``, ...). Names load on first use
(PEP 562 module ``__getattr__``): ``import kinetic`` costs only the errors and
the version, so the ``kinetic`` command answers ``--help`` at once
(measured in benchmarks/bench_cli.py).

>>> import kinetic as kt
>>> model = kt.default_model("Si")
>>> 140 < float(model.kappa(300.0)) < 175   # Glassbrenner & Slack 1964: 156 W/m/K
True
"""
from importlib import import_module as _import_module

from ._version import __version__
from .errors import DataError, FitError, KineticError, ModelError, ParameterError, RecordError

#: Public name -> submodule that defines it (the curated face, in ``__all__``).
_PUBLIC = {
    # models
    "Material": "materials", "Branch": "dispersion", "LatticeModel": "lattice",
    "Boundary": "scattering", "PointDefect": "scattering", "Umklapp": "scattering", "Normal": "scattering",
    "default_model": "defaults", "ConductivityModel": "conductivity", "ElectronicTerm": "conductivity",
    "BipolarTerm": "conductivity",
    # data and fits
    "Dataset": "data", "load_data": "data", "fit": "fitting", "FitResult": "fitting", "predict_band": "fitting",
    "compare": "fitting", "save_record": "records", "load_record": "records", "fit_many": "batch",
    # what-if
    "sweep": "whatif", "grain_size_sweep": "whatif", "alloy_sweep": "whatif", "grain_alloy_map": "whatif",
}

#: Names that were public at the top level before the curated face; they still
#: resolve (old scripts keep working) but are not advertised. Prefer the submodule.
_COMPAT = {
    "Parameter": "parameters", "Mechanism": "scattering", "ElectronPhonon": "scattering",
    "Dislocation": "scattering", "Precipitate": "scattering", "Spectrum": "lattice",
    "parse_data": "data", "load_series": "data", "fit_joint": "fitting", "profile_interval": "fitting",
    "bootstrap": "fitting", "default_free": "defaults", "Record": "records", "zt_vs_fermi_level": "whatif",
    "report_figure": "report", "summary_table": "report", "isotope_gamma": "disorder",
    "mass_fluctuation_gamma": "disorder", "compound_gamma": "disorder", "material_gamma": "disorder",
    "alloy_gamma": "disorder", "virtual_crystal": "disorder", "slack_kappa": "estimates",
    "slack_kappa_for": "estimates", "cahill_minimum": "estimates", "cahill_minimum_for": "estimates",
    "L0": "electronic", "fermi_integral": "electronic", "seebeck_spb": "electronic",
    "lorenz_spb_eta": "electronic", "reduced_fermi_level": "electronic", "lorenz_spb": "electronic",
    "lorenz_kim": "electronic", "electronic_kappa": "electronic", "ElectronicKappa": "electronic",
    "lattice_from_total": "electronic", "LatticeFromTotal": "electronic", "wiedemann_franz_kappa": "electronic",
    "bipolar_kappa_activated": "electronic", "bipolar_kappa_two_band": "electronic",
    "power_factor": "electronic", "zt": "electronic", "ConductivityParts": "conductivity",
    "lattice_target": "conductivity", "BatchResult": "batch",
}

#: Public submodules, loaded on first attribute access (``kinetic.materials`` ...).
_SUBMODULES = {"materials", "defaults", "alloy", "grid", "spectrum", "zt_sweep", "disorder", "estimates", "electronic", "conductivity", "data",
               "porosity", "heat_capacity", "demo", "fitting", "records", "whatif", "report", "batch",
               "lattice", "scattering", "dispersion", "quantities", "checks", "presets", "maps"}

__all__ = ["__version__", "KineticError", "ParameterError", "ModelError", "DataError", "RecordError", "FitError",
           *_PUBLIC, "materials", "defaults", "electronic", "disorder", "estimates", "demo"]


def __getattr__(name):
    module = _PUBLIC.get(name) or _COMPAT.get(name)
    if module is not None:
        value = getattr(_import_module(f".{module}", __name__), name)
    elif name in _SUBMODULES:
        value = _import_module(f".{name}", __name__)
    else:
        raise AttributeError(f"module 'kinetic' has no attribute {name!r}")
    globals()[name] = value  # cache: later look-ups do not come back here
    return value


def __dir__():
    return sorted(set(__all__) | _SUBMODULES)
