"""Measured data: read thermal-conductivity tables into a validated :class:`Dataset`.

The package is split by concern:

=================  ==========================================================
module             concern
=================  ==========================================================
``guide``          the file-format guide (column names, units, defaults)
``columns``        accepted column names (:data:`COLUMN_ALIASES`)
``units``          SI targets, default units, lab spellings, pint conversion
``text``           bytes in: regular files, size limits, encodings, binary files
``header``         the header row: delimiter, names, units, roles
``numbers``        the numbers: a vectorised pass and a naming line-by-line pass
``dataset``        :class:`Dataset`, the validated SI table
``values``         checks shared by files and arrays (finite, positive, sorted)
``readers``        :func:`load_data`, :func:`parse_data`
``series``         :func:`load_series` (several samples)
``diffusivity``    k = D rho c_p from a flash measurement; the porosity step
``options``        the loader's options, named for CLI, Python and workbench
=================  ==========================================================

Read the format guide with ``help(kinetic.data.guide)``.

Example
-------
>>> from kinetic.data import parse_data
>>> ds = parse_data("T [K], kappa [mW/(cm K)]\\n300, 1500\\n400, 1050\\n", name="si.csv")
>>> ds.kappa.tolist()
[150.0, 105.0]
"""
from __future__ import annotations

from .columns import COLUMN_ALIASES
from .dataset import Dataset
from .readers import load_data, parse_data
from .series import load_series
from .units import DEFAULT_UNITS, SI_UNITS

__all__ = [
    "Dataset",
    "load_data",
    "load_series",
    "parse_data",
    "COLUMN_ALIASES",
    "DEFAULT_UNITS",
    "SI_UNITS",
]
