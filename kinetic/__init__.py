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

__version__ = "0.1.0"

__all__ = [
    "KineticError", "ParameterError", "DataError", "RecordError", "FitError",
    "Parameter", "Branch", "Mechanism", "Boundary", "PointDefect", "Umklapp", "Normal",
    "ElectronPhonon", "Dislocation", "Precipitate", "LatticeModel", "Spectrum",
]
