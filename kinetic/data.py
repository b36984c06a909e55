"""Measured data: read thermal-conductivity tables into a validated :class:`Dataset`.

A data file is a text table with one header row naming the columns, then one
row per temperature.  Columns are separated by commas, semicolons, tabs or runs
of spaces (detected from the header row, or given with ``delimiter=``).

Example (``sample.csv``)::

    # label: pellet A, 2 um grains
    T [K], kappa [mW/(cm K)], kappa_err [mW/(cm K)], rho [uOhm cm], S [uV/K]
    10, 25.1, 0.8, 210, 12
    20, 48.7, 1.1, 212, 25

Columns (names are case-insensitive; spaces, dots and hyphens count as ``_``)

=================  ===========================================================  ==============
quantity           accepted names                                               SI unit stored
=================  ===========================================================  ==============
temperature        T, temp, temperature, T_avg, T_mean, T_sample                K
thermal cond.      kappa, k, lambda, thermal_conductivity (kind from ``kind=``)  W/(m K)
                   kappa_total, k_total, kappa_tot (kind "total")
                   kappa_lattice, kappa_l, kappa_lat, kappa_ph, k_l (kind
                   "lattice")
its uncertainty    kappa_err, kappa_error, dk, dkappa, sigma_kappa, err, ...    W/(m K)
resistivity        rho, resistivity, electrical_resistivity                     Ohm m
el. conductivity   sigma, conductivity, electrical_conductivity                 S/m (stored as
                                                                                resistivity)
Seebeck coeff.     S, seebeck, thermopower, seebeck_coefficient                 V/K
=================  ===========================================================  ==============

(The full list is :data:`COLUMN_ALIASES`; ``columns={"my name": "kappa"}`` adds
your own, ``ignore_columns=["time"]`` skips extra columns.)

Units are written in square brackets (``T [K]``) or parentheses (``T (K)``)
after the name, or as ``T/K``, and are parsed with pint, so ``mW/(cm K)``,
``W m^-1 K^-1``, ``uOhm cm``, ``µΩ cm``, ``S/cm``, ``uV/K``, ``degC`` and
``degF`` all work.  Common lab spellings are understood too: ``W/mK`` and
``mW/cmK`` in a thermal-conductivity column mean W/(m K) and mW/(cm K) (not
"per millikelvin"); ``Ohm`` in any case; ``W m-1 K-1``; a bare ``C`` or ``F``
in the temperature column means degC or degF.  Celsius and Fahrenheit are
offset units and are converted as such (0 degC = 273.15 K).  A unit of the
wrong kind (``kappa [K]``) is an error naming the column.  A unit may carry a
scale factor: ``rho [1e-8 Ohm m]``.  An uncertainty column in ``%`` (or any
dimensionless unit) is relative to kappa.

Defaults when a column has no unit (each use is recorded in ``Dataset.notes``)

* temperature: K
* kappa: W/(m K)
* kappa_err: the unit of the kappa column (W/(m K) if that has none either)
* rho: Ohm m (SI).  Many labs record uOhm cm (= 1e-8 Ohm m) or mOhm cm: write
  the unit in the header, or pass ``units={"rho": "uOhm cm"}``.  SI is the
  default because any lab default would be wrong for someone else.
* sigma: S/m
* S: V/K.  A unit-less Seebeck column whose values exceed 1 V/K in magnitude
  is refused (it is almost certainly in uV/K; no known solid comes near
  1 V/K, from memory the largest reported are of order 0.05 V/K).

Design decisions a user should know

* The thermal conductivity kind is "lattice" for a lattice-named column,
  "total" for a total-named column, and for a plain ``kappa`` column the
  ``kind=`` argument, else a ``# kind: lattice`` comment line, else "total".
* Comment lines start with ``#`` and may appear before the header and among
  the data; text after ``#`` on a data line is a comment too.  Comments are
  kept verbatim (with the ``#``) in ``Dataset.notes``; notes written by the
  loader have no ``#``.  ``# label: ...`` (or ``# sample: ...``) sets the
  label and ``# kind: total|lattice`` the kind, unless given as arguments.
* Decimal commas (``300,5``) are accepted when the column delimiter is not a
  comma (semicolon, tab or spaces) and no number in the file uses a decimal
  point; a note says so.  A file that mixes both marks is refused naming the
  line.  ``decimal="."`` refuses any decimal comma, ``decimal=","`` any
  decimal point.  In a comma-separated file a decimal comma shows up as an
  extra field and the error says that may be the cause.
* Text encoding: UTF-8 (with or without byte-order mark) and UTF-16 with a
  byte-order mark are read silently.  A file that is not valid UTF-8 is read
  as Windows-1252 (a superset of Latin-1, what older instrument software on
  Windows writes) and a note names the first non-UTF-8 line.  Only headers and
  comments can contain such characters, and a mis-read unit fails loudly, so
  this cannot change a number.  ``encoding="utf-8"`` makes it an error
  instead.  Files with NUL bytes (spreadsheets, binary instrument files) are
  refused with a hint to export as CSV.
* Rows out of temperature order are sorted (a note says so); rows repeating
  a temperature with identical values are merged (a note names both lines);
  repeated temperatures with different values are refused naming both lines.
* Every value must be finite; temperature > 0 K, kappa > 0, uncertainties
  > 0 (a zero uncertainty would give a point infinite weight in a fit),
  resistivity > 0, conductivity > 0.  The Seebeck coefficient may have either
  sign.  Empty fields are errors (no missing values).
* Double quotes around fields (as some spreadsheets write) are ignored;
  trailing empty columns (a header ending in a delimiter) are dropped.

Every problem raises :class:`kinetic.errors.DataError` with one line naming the
file, line and column, e.g.::

    data.csv, line 7, column "kappa": expected a number, got 'abc'

Speed: the numbers are parsed in one vectorised pass over the whole file; only
when that pass fails does a line-by-line pass run to find and name the first
offending line and column.

References: units via pint (https://pint.readthedocs.io); thermal-conductivity
unit conversions follow the SI brochure (BIPM 2019).
"""
from __future__ import annotations

import csv
import hashlib
import math
import os
import re
import warnings
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Any, Callable, Iterable, Mapping

import numpy as np

from .errors import DataError, ParameterError, RecordError

__all__ = [
    "Dataset",
    "load_data",
    "load_series",
    "parse_data",
    "COLUMN_ALIASES",
    "DEFAULT_UNITS",
    "SI_UNITS",
]

# --------------------------------------------------------------------------------------
# Column names and units
# --------------------------------------------------------------------------------------

#: SI unit stored in a :class:`Dataset` for each quantity (pint spelling).
SI_UNITS: dict[str, str] = {
    "temperature": "K",
    "kappa": "W/(m K)",
    "kappa_err": "W/(m K)",
    "resistivity": "Ohm m",
    "sigma": "S/m",
    "seebeck": "V/K",
}

#: Unit assumed for a column whose header gives none (see the module docstring;
#: ``kappa_err`` without a unit takes the kappa column's unit instead).
DEFAULT_UNITS: dict[str, str] = dict(SI_UNITS)

_PINT_SI = {
    "temperature": "kelvin",
    "kappa": "watt / meter / kelvin",
    "kappa_err": "watt / meter / kelvin",
    "resistivity": "ohm * meter",
    "sigma": "siemens / meter",
    "seebeck": "volt / kelvin",
}

_WHAT = {
    "temperature": "a temperature",
    "kappa": "a thermal conductivity",
    "kappa_err": "a thermal conductivity (or a relative uncertainty in %)",
    "resistivity": "an electrical resistivity",
    "sigma": "an electrical conductivity",
    "seebeck": "a Seebeck coefficient",
}

_EXAMPLES = {
    "temperature": "K, degC or degF",
    "kappa": "W/(m K) or mW/(cm K)",
    "kappa_err": "W/(m K), mW/(cm K) or %",
    "resistivity": "Ohm m, uOhm cm or mOhm cm",
    "sigma": "S/m or S/cm",
    "seebeck": "V/K or uV/K",
}


def _aliases() -> dict[str, tuple[str, str | None]]:
    table: dict[str, tuple[str, str | None]] = {}

    def add(role, kind, *names):
        for n in names:
            table[n] = (role, kind)

    add("temperature", None, "t", "temp", "temperature", "t_avg", "t_mean", "t_sample",
        "tavg", "tmean", "sample_temperature")
    add("kappa", None, "kappa", "k", "κ", "lambda", "λ", "thermal_conductivity", "kappa_meas",
        "kappa_measured")
    add("kappa", "total", "kappa_total", "kappa_tot", "k_total", "k_tot", "κ_total", "κ_tot",
        "total_thermal_conductivity", "kappa_t")
    add("kappa", "lattice", "kappa_lattice", "kappa_l", "kappa_lat", "kappa_ph", "kappa_phonon",
        "k_lattice", "k_l", "k_lat", "k_ph", "κ_l", "κ_lattice", "κ_lat", "κ_ph",
        "lattice_thermal_conductivity")
    add("kappa_err", None, "kappa_err", "kappa_error", "kappa_unc", "kappa_uncertainty",
        "kappa_sigma", "sigma_kappa", "kappa_std", "dk", "dkappa", "d_kappa", "delta_kappa",
        "delta_k", "k_err", "k_error", "err", "error", "uncertainty", "u_kappa", "dκ", "δκ",
        "κ_err", "kappa_total_err", "kappa_lattice_err", "kappa_l_err", "dkappa_l",
        "kappa_tot_err", "kappa_lat_err")
    add("resistivity", None, "rho", "resistivity", "electrical_resistivity", "rho_e", "ρ",
        "rho_xx")
    add("sigma", None, "sigma", "conductivity", "electrical_conductivity", "sigma_e", "σ",
        "sigma_xx")
    add("seebeck", None, "s", "seebeck", "seebeck_coefficient", "thermopower",
        "thermoelectric_power", "s_xx")
    return table


#: Accepted column names (normalised: lower case, spaces/dots/hyphens as ``_``)
#: mapped to (quantity, kind).  kind is "total"/"lattice" for kappa columns
#: whose name says so, else None.
COLUMN_ALIASES: dict[str, tuple[str, str | None]] = _aliases()

_KINDS = ("total", "lattice")
_ROLE_ORDER = ("temperature", "kappa", "kappa_err", "resistivity", "sigma", "seebeck")
# the usual column names, for messages
_SHORT = {"temperature": "T", "kappa": "kappa", "kappa_err": "kappa_err",
          "resistivity": "rho", "sigma": "sigma", "seebeck": "S"}


def _norm_name(name: str) -> str:
    return re.sub(r"[\s\-.()]+", "_", name.strip().lower()).strip("_")


@lru_cache(maxsize=1)
def _ureg():
    import pint  # imported lazily: building the registry takes a while

    return pint.UnitRegistry()


@lru_cache(maxsize=256)
def _target_dims(role: str):
    return _ureg().parse_expression(_PINT_SI[role]).dimensionality


_SUPERSCRIPTS = str.maketrans({"⁻": "-", "⁰": "0", "¹": "1", "²": "2", "³": "3", "⁴": "4",
                               "·": " ", "⋅": " ", "×": "*", "Ω": "ohm", "−": "-"})
_TEMPERATURE_WORDS = {
    "c": "degC", "°c": "degC", "deg c": "degC", "degc": "degC", "° c": "degC",
    "celsius": "degC", "centigrade": "degC", "oc": "degC",
    "f": "degF", "°f": "degF", "deg f": "degF", "degf": "degF", "° f": "degF",
    "fahrenheit": "degF", "k": "K", "kelvin": "K", "°k": "K",
}


def _unit_candidates(unit: str, role: str) -> list[tuple[str, bool]]:
    """Spellings to try for a header unit, most literal first.

    Returns (pint string, is_reinterpretation).  A reinterpretation is used
    only when it gives the right dimension and the literal reading does not.
    """
    u = unit.strip()
    out = []
    if role == "temperature" and u.lower() in _TEMPERATURE_WORDS:
        # a bare "C" (coulomb) or "F" (farad) in a temperature column means degC/degF
        out.append((_TEMPERATURE_WORDS[u.lower()], u.lower() in ("c", "f")))
    base = re.sub(r"(?i)ohm", "ohm", u.translate(_SUPERSCRIPTS))     # "uOhm", "Ω" -> "uohm", "ohm"
    base = re.sub(r"ohm(?=[A-Za-zµμ])", "ohm ", base).strip()          # "µΩcm" -> "µohm cm"
    out.append((base, False))
    fixed = base
    # "W m-1 K-1" -> "W m^-1 K^-1" (only after a letter, so 1e-8 is untouched)
    fixed = re.sub(r"(?<=[A-Za-zµμ])(?<![0-9][eE])(-?\d+)(?![\d.])", r"^\1", fixed)
    # "ohm-cm" -> "ohm cm"
    fixed = re.sub(r"(?<=[A-Za-zµμ])-(?=[A-Za-zµμ])", " ", fixed)
    # "Kelvin", "Watt" -> lower case (two-letter symbols such as mS stay)
    fixed = re.sub(r"\b[A-Z][a-z]{2,}\b", lambda m: m.group(0).lower(), fixed)
    if fixed != base:
        out.append((fixed, True))
    if role in ("kappa", "kappa_err"):
        # "W/mK", "mW/cmK", "W/(mK)": per metre-kelvin, not per millikelvin
        mk = re.sub(r"/\(?\s*(c?m|mm)\s*K\s*\)?(?![A-Za-z])", r"/(\1*K)", fixed)
        if mk != fixed:
            out.append((mk, True))
    return out


class _UnitProblem(Exception):
    def __init__(self, kind: str, detail: str = ""):
        super().__init__(kind)
        self.kind = kind  # "unknown" or "dimension" or "offset"
        self.detail = detail


# The commonest spellings with their exact SI factors (SI prefixes), so that
# reading a typical file does not need to build a pint registry (about a
# second).  tests/test_data.py checks every entry against pint.
_COMMON_UNITS: dict[tuple[str, str], float] = {}
for _role, _table in {
    "temperature": {"K": 1.0, "kelvin": 1.0},
    "kappa": {"W/(m K)": 1.0, "W/(m*K)": 1.0, "W/m/K": 1.0, "W m^-1 K^-1": 1.0,
              "mW/(cm K)": 0.1, "mW/(cm*K)": 0.1, "W/(cm K)": 100.0},
    "resistivity": {"Ohm m": 1.0, "ohm m": 1.0, "ohm*m": 1.0, "uOhm cm": 1e-8, "uohm cm": 1e-8,
                    "µΩ cm": 1e-8, "mOhm cm": 1e-5, "mohm cm": 1e-5, "Ohm cm": 1e-2,
                    "ohm cm": 1e-2},
    "sigma": {"S/m": 1.0, "S/cm": 100.0},
    "seebeck": {"V/K": 1.0, "uV/K": 1e-6, "µV/K": 1e-6, "mV/K": 1e-3},
}.items():
    for _u, _f in _table.items():
        _COMMON_UNITS[(_role, _u)] = _f
        if _role == "kappa":
            _COMMON_UNITS[("kappa_err", _u)] = _f


@lru_cache(maxsize=512)
def _resolve_unit(unit: str, role: str) -> tuple[str, float, str, bool]:
    """Parse a unit for a quantity.

    Returns (pint spelling, scale factor to SI, mode, reinterpreted) with mode
    "scale" (multiply by the factor), "offset" (convert with pint, e.g. degC)
    or "relative" (a dimensionless uncertainty: multiply by factor * kappa).
    Raises _UnitProblem.
    """
    common = _COMMON_UNITS.get((role, unit.strip()))
    if common is not None:
        return unit.strip(), common, "scale", False
    ureg = _ureg()
    first_problem: _UnitProblem | None = None
    for spelling, reinterpreted in _unit_candidates(unit, role):
        try:
            if not spelling.strip():
                raise _UnitProblem("unknown")
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                q = ureg.parse_expression(spelling)
            if not hasattr(q, "dimensionality"):
                q = ureg.Quantity(q, "dimensionless")
        except _UnitProblem as exc:
            first_problem = first_problem or exc
            continue
        except Exception as exc:  # pint raises many kinds (undefined, syntax, offset calculus)
            kind = "offset" if type(exc).__name__ == "OffsetUnitCalculusError" else "unknown"
            first_problem = first_problem or _UnitProblem(kind)
            continue
        dims = q.dimensionality
        if role == "kappa_err" and dims == ureg.parse_expression("1").dimensionality:
            return spelling, float(q.to("dimensionless").magnitude), "relative", reinterpreted
        if dims != _target_dims(role):
            first_problem = first_problem or _UnitProblem("dimension", str(dims))
            continue
        target = _PINT_SI[role]
        zero = ureg.Quantity(0.0, q.units).to(target).magnitude
        if zero != 0.0:
            if q.magnitude != 1:
                first_problem = first_problem or _UnitProblem("offset")
                continue
            return spelling, 1.0, "offset", reinterpreted
        factor = float(ureg.Quantity(float(q.magnitude), q.units).to(target).magnitude)
        return spelling, factor, "scale", reinterpreted
    assert first_problem is not None
    raise first_problem


def _to_si(values: np.ndarray, spelling: str, factor: float, mode: str, role: str) -> np.ndarray:
    if mode == "offset":
        ureg = _ureg()
        return np.asarray(ureg.Quantity(values, spelling).to(_PINT_SI[role]).magnitude, dtype=float)
    if factor == 1.0:
        return values
    return values * factor


# --------------------------------------------------------------------------------------
# The Dataset
# --------------------------------------------------------------------------------------

_FORMAT = "kinetic.dataset"
_VERSION = 1


def _fmt(v: float) -> str:
    return f"{float(v):.6g}"


def _where_array(param: str) -> Callable[[int], str]:
    return lambda i: f"{param}[{i}]"


def _readonly(a: np.ndarray | None) -> np.ndarray | None:
    """A private read-only float copy (the caller's array is never frozen or aliased)."""
    if a is None:
        return None
    a = np.array(a, dtype=float, copy=True, order="C")
    a.flags.writeable = False
    return a


def _check_values(cols: dict[str, np.ndarray], where: Callable[[str, int], str],
                  show: Callable[[str, int], str]) -> None:
    """Physical checks shared by files and arrays (vectorised; the first bad index is named)."""
    rules = [
        ("temperature", lambda a: ~(a > 0), "a temperature above absolute zero (0 K)"),
        ("kappa", lambda a: ~(a > 0), "a positive thermal conductivity"),
        ("kappa_err", lambda a: ~(a > 0),
         "a positive uncertainty (a zero uncertainty would give the point infinite weight in a fit)"),
        ("resistivity", lambda a: ~(a > 0), "a positive electrical resistivity"),
        ("sigma", lambda a: ~(a > 0), "a positive electrical conductivity"),
    ]
    for role in _ROLE_ORDER:
        a = cols.get(role)
        if a is None:
            continue
        bad = np.flatnonzero(~np.isfinite(a))
        if bad.size:
            i = int(bad[0])
            raise DataError(f"{where(role, i)}: expected a finite number, got {show(role, i)}")
    for role, test, what in rules:
        a = cols.get(role)
        if a is None:
            continue
        bad = np.flatnonzero(test(a))
        if bad.size:
            i = int(bad[0])
            raise DataError(f"{where(role, i)}: expected {what}, got {show(role, i)}")


def _sort_and_merge(cols: dict[str, np.ndarray], where_row: Callable[[int], str],
                    notes: list[str], *, file_mode: bool) -> dict[str, np.ndarray]:
    """Sort rows by temperature; merge identical repeated rows; refuse conflicting repeats."""
    T = cols["temperature"]
    n = T.size
    d = np.diff(T)
    if n > 1 and np.any(d < 0):
        order = np.argsort(T, kind="stable")
        notes.append("rows sorted by temperature (the "
                     + ("file" if file_mode else "input") + " was not in ascending order)")
    else:
        order = None
    if order is not None:
        Ts = T[order]
        d = np.diff(Ts)
    else:
        Ts = T
    dup = np.flatnonzero(d == 0)
    keep = None
    if dup.size:
        names = [r for r in _ROLE_ORDER if cols.get(r) is not None]
        stack = np.stack([cols[r] if order is None else cols[r][order] for r in names], axis=1)
        same = np.all(stack[dup] == stack[dup + 1], axis=1)
        idx = np.arange(n) if order is None else order
        if not np.all(same):
            j = int(dup[~same][0])
            first, second = int(idx[j]), int(idx[j + 1])
            if first > second:
                first, second = second, first
            raise DataError(
                f"{where_row(second)}: temperature {_fmt(Ts[j])} K repeats "
                f"{_short_where(where_row(first), file_mode)} with different values; expected "
                "one row per temperature (remove one of them or average them)")
        keep = np.ones(n, dtype=bool)
        keep[dup + 1] = False
        pairs = [(int(min(idx[j], idx[j + 1])), int(max(idx[j], idx[j + 1]))) for j in dup[:3]]
        shown = "; ".join(f"{_short_where(where_row(b), file_mode)} repeats "
                          f"{_short_where(where_row(a), file_mode)}" for a, b in pairs)
        more = f" and {dup.size - 3} more" if dup.size > 3 else ""
        notes.append(f"merged {dup.size} repeated identical row{'s' if dup.size > 1 else ''} "
                     f"({shown}{more}); kept once")
    out = {}
    for r, a in cols.items():
        if a is None:
            out[r] = None
            continue
        b = a if order is None else a[order]
        if keep is not None:
            b = b[keep]
        out[r] = b
    return out


def _short_where(w: str, file_mode: bool) -> str:
    # "data.csv, line 7, column "T"" -> "line 7"
    if not file_mode:
        return w
    m = re.search(r"line \d+", w)
    return m.group(0) if m else w


@dataclass(frozen=True, eq=False, repr=False)
class Dataset:
    """One measured sample: thermal conductivity against temperature, in SI units.

    Build one with :func:`load_data` (from a file), :meth:`from_arrays` or
    :meth:`from_dict`.  Direct construction validates too.  Arrays are stored
    read-only.

    Attributes
    ----------
    temperature : ndarray
        Temperatures [K], 1-D, strictly ascending, > 0.
    kappa : ndarray
        Thermal conductivity [W m^-1 K^-1], > 0.
    kappa_err : ndarray or None
        One-standard-deviation uncertainty of kappa [W m^-1 K^-1], > 0.
    kind : str
        "total" (everything measured) or "lattice" (electronic part removed).
    resistivity : ndarray or None
        Electrical resistivity [Ohm m], > 0 (see :attr:`sigma`).
    seebeck : ndarray or None
        Seebeck coefficient [V/K], either sign.
    label : str
        Sample name (e.g. grain size or composition) for legends and fit records.
    source : str or None
        Path of the file read, or None.
    sha256 : str or None
        Hex SHA-256 of the file's bytes, or None for data not read from a file.
    notes : tuple of str
        Comment lines from the file (verbatim, starting with "#") and notes by the
        loader about what it did (sorting, merging, unit defaults).
    units : dict
        Quantity name ("temperature", "kappa", "kappa_err", "resistivity" or
        "sigma", "seebeck") -> the unit the values were given in, as written.
    """

    temperature: np.ndarray
    kappa: np.ndarray
    kappa_err: np.ndarray | None = None
    kind: str = "total"
    resistivity: np.ndarray | None = None
    seebeck: np.ndarray | None = None
    label: str = ""
    source: str | None = None
    sha256: str | None = None
    notes: tuple[str, ...] = ()
    units: dict[str, str] = field(default_factory=dict)

    def __post_init__(self):
        if self.kind not in _KINDS:
            raise ParameterError(f'kind must be "total" or "lattice", got {self.kind!r}')
        if not isinstance(self.label, str):
            raise ParameterError(f"label must be a string, got {self.label!r}")
        if self.source is not None and not isinstance(self.source, str):
            raise ParameterError(f"source must be a string or None, got {self.source!r}")
        if self.sha256 is not None and not (isinstance(self.sha256, str)
                                            and re.fullmatch(r"[0-9a-f]{64}", self.sha256)):
            raise ParameterError(f"sha256 must be 64 lower-case hex digits or None, got {self.sha256!r}")
        cols = {"temperature": self.temperature, "kappa": self.kappa,
                "kappa_err": self.kappa_err, "resistivity": self.resistivity,
                "seebeck": self.seebeck}
        conv = _as_columns(cols)
        n = conv["temperature"].size
        _check_values(conv, lambda r, i: f"{r}[{i}]", lambda r, i: repr(float(conv[r][i])))
        d = np.diff(conv["temperature"])
        if n > 1 and not np.all(d > 0):
            i = int(np.flatnonzero(~(d > 0))[0]) + 1
            raise DataError(
                f"temperature[{i}]: expected temperatures in strictly ascending order, got "
                f"{_fmt(conv['temperature'][i])} K after {_fmt(conv['temperature'][i - 1])} K "
                "(Dataset.from_arrays sorts and merges for you)")
        for r, a in conv.items():
            object.__setattr__(self, r, _readonly(a))
        object.__setattr__(self, "notes", tuple(str(s) for s in self.notes))
        object.__setattr__(self, "units", {str(k): str(v) for k, v in dict(self.units).items()})

    # ---- construction -------------------------------------------------------------

    @classmethod
    def from_arrays(cls, temperature, kappa, *, kappa_err=None, resistivity=None, sigma=None,
                    seebeck=None, kind: str = "total", label: str = "",
                    notes: Iterable[str] = ()) -> "Dataset":
        """Build a Dataset from arrays (or pint quantities), with the loader's checks.

        Parameters
        ----------
        temperature : array_like
            Temperatures [K] (a pint Quantity in any temperature unit is converted).
        kappa : array_like
            Thermal conductivity [W m^-1 K^-1].
        kappa_err : array_like, optional
            Uncertainty of kappa [W m^-1 K^-1], > 0.
        resistivity : array_like, optional
            Electrical resistivity [Ohm m], > 0.  Give this or ``sigma``, not both.
        sigma : array_like, optional
            Electrical conductivity [S/m], > 0; stored as resistivity = 1/sigma.
        seebeck : array_like, optional
            Seebeck coefficient [V/K].
        kind : {"total", "lattice"}
            What kappa contains.
        label : str
            Sample name.
        notes : iterable of str
            Extra notes to keep.

        Returns
        -------
        Dataset
            Rows sorted by temperature (with a note if they were not); identical
            repeated rows merged.

        Raises
        ------
        DataError
            A value is not finite, out of range, or arrays differ in length; the
            message names the parameter and index, e.g. ``kappa[3]``.
        ParameterError
            ``kind`` or ``label`` is invalid, or both resistivity and sigma given.
        """
        if kind not in _KINDS:
            raise ParameterError(f'kind must be "total" or "lattice", got {kind!r}')
        if not isinstance(label, str):
            raise ParameterError(f"label must be a string, got {label!r}")
        if resistivity is not None and sigma is not None:
            raise ParameterError("give resistivity [Ohm m] or sigma [S/m], not both")
        raw = {"temperature": temperature, "kappa": kappa, "kappa_err": kappa_err,
               "resistivity": resistivity, "sigma": sigma, "seebeck": seebeck}
        units: dict[str, str] = {}
        conv_in = {}
        for r, v in raw.items():
            if v is None:
                continue
            if hasattr(v, "magnitude") and hasattr(v, "units") and hasattr(v, "to"):
                units[r] = str(v.units)
                try:
                    v = v.to(_PINT_SI[r]).magnitude
                except Exception as exc:  # pint DimensionalityError and friends
                    raise DataError(f"{r}: expected {_WHAT[r]}, got a quantity in "
                                    f"{v.units} ({type(exc).__name__})") from None
            else:
                units[r] = SI_UNITS[r]
            conv_in[r] = v
        cols = _as_columns(conv_in)
        shown = {r: a for r, a in cols.items()}
        _check_values(cols, lambda r, i: f"{r}[{i}]", lambda r, i: repr(float(shown[r][i])))
        if cols.get("sigma") is not None:
            cols["resistivity"] = 1.0 / cols.pop("sigma")
        else:
            cols.pop("sigma", None)
        note_list = [str(s) for s in notes]
        cols = _sort_and_merge(cols, _where_array("temperature"), note_list, file_mode=False)
        return cls(temperature=cols["temperature"], kappa=cols["kappa"],
                   kappa_err=cols.get("kappa_err"), kind=kind,
                   resistivity=cols.get("resistivity"), seebeck=cols.get("seebeck"),
                   label=label, notes=tuple(note_list), units=units)

    def to_dict(self) -> dict[str, Any]:
        """A JSON-safe dict (lists of floats; ``json`` round-trips them exactly)."""
        def lst(a):
            return None if a is None else [float(x) for x in a.tolist()]

        return {
            "format": _FORMAT,
            "version": _VERSION,
            "label": self.label,
            "kind": self.kind,
            "source": self.source,
            "sha256": self.sha256,
            "notes": list(self.notes),
            "units": dict(self.units),
            "temperature": lst(self.temperature),
            "kappa": lst(self.kappa),
            "kappa_err": lst(self.kappa_err),
            "resistivity": lst(self.resistivity),
            "seebeck": lst(self.seebeck),
        }

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> "Dataset":
        """Rebuild a Dataset written by :meth:`to_dict` (exact round trip).

        Raises
        ------
        RecordError
            The dict is not a dataset, is from a newer version, or its values are
            invalid (the message says which key).
        """
        if not isinstance(d, Mapping):
            raise RecordError(f"dataset record must be a dict, got {type(d).__name__}")
        if d.get("format") != _FORMAT:
            raise RecordError(f'dataset record: expected format "{_FORMAT}", got {d.get("format")!r}')
        ver = d.get("version")
        if not isinstance(ver, int) or isinstance(ver, bool) or ver < 1:
            raise RecordError(f"dataset record: expected an integer version >= 1, got {ver!r}")
        if ver > _VERSION:
            raise RecordError(f"dataset record: version {ver} is newer than this kinetic "
                              f"understands ({_VERSION}); update kinetic")
        known = {"format", "version", "label", "kind", "source", "sha256", "notes", "units",
                 "temperature", "kappa", "kappa_err", "resistivity", "seebeck"}
        extra = sorted(set(d) - known)
        if extra:
            raise RecordError(f"dataset record: unknown key {extra[0]!r}")
        for key in ("temperature", "kappa"):
            if key not in d:
                raise RecordError(f"dataset record: missing key {key!r}")

        def arr(key):
            v = d.get(key)
            if v is None:
                return None
            if not isinstance(v, (list, tuple)) or not all(
                    isinstance(x, (int, float)) and not isinstance(x, bool) for x in v):
                raise RecordError(f"dataset record: {key} must be a list of numbers")
            return np.array(v, dtype=float)

        notes = d.get("notes", [])
        units = d.get("units", {})
        if not isinstance(notes, (list, tuple)) or not all(isinstance(s, str) for s in notes):
            raise RecordError("dataset record: notes must be a list of strings")
        if not isinstance(units, Mapping) or not all(
                isinstance(k, str) and isinstance(v, str) for k, v in units.items()):
            raise RecordError("dataset record: units must map strings to strings")
        try:
            return cls(temperature=arr("temperature"), kappa=arr("kappa"),
                       kappa_err=arr("kappa_err"), kind=d.get("kind", "total"),
                       resistivity=arr("resistivity"), seebeck=arr("seebeck"),
                       label=d.get("label", ""), source=d.get("source"), sha256=d.get("sha256"),
                       notes=tuple(notes), units=dict(units))
        except (DataError, ParameterError) as exc:
            raise RecordError(f"dataset record: {exc}") from None

    # ---- views ----------------------------------------------------------------------

    def __len__(self) -> int:
        return int(self.temperature.size)

    @property
    def sigma(self) -> np.ndarray | None:
        """Electrical conductivity [S/m] = 1/resistivity, or None."""
        if self.resistivity is None:
            return None
        return 1.0 / self.resistivity

    @property
    def has_electrical(self) -> bool:
        """True when resistivity (or conductivity) was measured."""
        return self.resistivity is not None

    def subset(self, tmin: float | None = None, tmax: float | None = None) -> "Dataset":
        """Rows with tmin <= T <= tmax [K] (either end may be None) as a new Dataset.

        Raises
        ------
        ParameterError
            tmin/tmax not numbers, or tmin > tmax.
        DataError
            No row lies in the range.
        """
        lo = -math.inf if tmin is None else _scalar("tmin", tmin)
        hi = math.inf if tmax is None else _scalar("tmax", tmax)
        if lo > hi:
            raise ParameterError(f"tmin must not exceed tmax, got tmin={lo!r} K, tmax={hi!r} K")
        m = (self.temperature >= lo) & (self.temperature <= hi)
        k = int(m.sum())
        if k == 0:
            raise DataError(f"{self.label or 'dataset'}: no rows between {_fmt(lo)} K and "
                            f"{_fmt(hi)} K (data span {_fmt(self.temperature[0])} to "
                            f"{_fmt(self.temperature[-1])} K)")

        def cut(a):
            return None if a is None else a[m]

        rng = " and ".join(s for s in ((f"T >= {_fmt(lo)} K" if tmin is not None else ""),
                                       (f"T <= {_fmt(hi)} K" if tmax is not None else "")) if s)
        note = f"subset {rng or 'all temperatures'} ({k} of {len(self)} rows)"
        return Dataset(temperature=cut(self.temperature), kappa=cut(self.kappa),
                       kappa_err=cut(self.kappa_err), kind=self.kind,
                       resistivity=cut(self.resistivity), seebeck=cut(self.seebeck),
                       label=self.label, source=self.source, sha256=self.sha256,
                       notes=self.notes + (note,), units=dict(self.units))

    def __eq__(self, other):
        if not isinstance(other, Dataset):
            return NotImplemented

        def same(a, b):
            if a is None or b is None:
                return a is None and b is None
            return a.shape == b.shape and bool(np.array_equal(a, b))

        return (all(same(getattr(self, r), getattr(other, r))
                    for r in ("temperature", "kappa", "kappa_err", "resistivity", "seebeck"))
                and (self.kind, self.label, self.source, self.sha256, self.notes, self.units)
                == (other.kind, other.label, other.source, other.sha256, other.notes, other.units))

    __hash__ = None  # type: ignore[assignment]  (holds arrays)

    def __repr__(self) -> str:
        extras = [name for name, a in (("kappa_err", self.kappa_err),
                                       ("resistivity", self.resistivity),
                                       ("seebeck", self.seebeck)) if a is not None]
        rows = f"{len(self)} row" + ("" if len(self) == 1 else "s")
        return (f"Dataset(label={self.label!r}, {rows}, T {_fmt(self.temperature[0])}"
                f"..{_fmt(self.temperature[-1])} K, kind={self.kind!r}"
                + (", with " + ", ".join(extras) if extras else "") + ")")


def _scalar(name: str, v) -> float:
    try:
        f = float(v)
    except (TypeError, ValueError):
        raise ParameterError(f"{name} must be a number [K], got {v!r}") from None
    if math.isnan(f):
        raise ParameterError(f"{name} must be a number [K], got nan")
    return f


def _as_columns(cols: Mapping[str, Any]) -> dict[str, np.ndarray]:
    """Convert inputs to 1-D float arrays of one length (DataError naming the parameter)."""
    out: dict[str, np.ndarray] = {}
    n = None
    for r in _ROLE_ORDER:
        if r not in cols or cols[r] is None:
            continue
        v = cols[r]
        try:
            a = np.asarray(v, dtype=float)
        except (TypeError, ValueError):
            raise DataError(f"{r}: expected an array of numbers, got {type(v).__name__}") from None
        if a.ndim != 1:
            raise DataError(f"{r}: expected a 1-D array of numbers, got "
                            + ("a single number" if a.ndim == 0 else f"an array of shape {a.shape}"))
        if n is None:
            n = a.size
            if n == 0:
                raise DataError(f"{r}: expected at least one value, got an empty array")
        elif a.size != n:
            raise DataError(f"{r}: expected {n} values (one per temperature), got {a.size}")
        out[r] = a
    if "temperature" not in out or "kappa" not in out:
        raise DataError("temperature and kappa are both required")
    return out


# --------------------------------------------------------------------------------------
# Reading files
# --------------------------------------------------------------------------------------

_NUM_RE = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?")
_NONFINITE_RE = re.compile(r"[+-]?(?:nan|inf|infinity)(?:\(.*\))?", re.IGNORECASE)
_META_RE = re.compile(r"#\s*(label|sample|kind)\s*[:=]\s*(.*?)\s*$", re.IGNORECASE)
_DELIMS = {",": "commas", ";": "semicolons", "\t": "tabs", None: "spaces"}


class _Header:
    """What the header row says: column names, units, roles."""

    def __init__(self, name: str, lineno: int):
        self.file = name
        self.lineno = lineno
        self.names: list[str] = []       # column names as written (no unit)
        self.units: list[str | None] = []
        self.roles: list[str | None] = []  # None: ignored column
        self.kind_from_name: str | None = None
        self.kappa_col_name = ""
        self.trailing_empty = 0

    def where(self, col: int | None = None) -> str:
        s = f"{self.file}, line {self.lineno}"
        if col is not None:
            s += f', column "{self.names[col]}"'
        return s


def _split_header(line: str, delim: str | None) -> list[str]:
    if '"' in line and delim is not None:
        fields = next(csv.reader([line], delimiter=delim, skipinitialspace=True))
        return [f.strip() for f in fields]
    fields, cur, depth = [], "", 0
    for ch in line:
        if ch in "[(":
            depth += 1
        elif ch in "])":
            depth = max(0, depth - 1)
        sep = ch.isspace() if delim is None else ch == delim
        if sep and depth == 0:
            if delim is not None or cur:
                fields.append(cur.strip())
            cur = ""
        else:
            cur += ch
    if delim is not None or cur:
        fields.append(cur.strip())
    fields = [f.strip('"').strip() for f in fields]
    if delim is None:
        merged: list[str] = []
        for f in fields:
            if merged and f[:1] in "[(" :
                merged[-1] = merged[-1] + " " + f
            else:
                merged.append(f)
        fields = merged
    return fields


def _detect_delimiter(header: str) -> str | None:
    if "\t" in header:
        return "\t"
    if ";" in header:
        return ";"
    depth = 0
    for ch in header:
        if ch in "[(":
            depth += 1
        elif ch in "])":
            depth = max(0, depth - 1)
        elif ch == "," and depth == 0:
            return ","
    return None


def _name_and_unit(fieldtext: str, lookup: Callable[[str], Any]) -> tuple[str, str | None]:
    f = fieldtext.strip()
    if f.count("[") != f.count("]"):
        raise ValueError('unbalanced "[" and "]" around the unit')
    m = re.fullmatch(r"(.*?)\s*\[(.*)\]", f)
    if m:
        return m.group(1).strip(), m.group(2).strip()
    if f.count("(") != f.count(")"):
        raise ValueError('unbalanced "(" and ")" around the unit')
    m = re.fullmatch(r"(.*?)\s*\((.*)\)", f)
    if m and m.group(1).strip():
        name, inner = m.group(1).strip(), m.group(2).strip()
        if lookup(name + "_" + inner) is not None:   # "kappa (lattice)" is a name
            return f, None
        return name, inner
    if "/" in f:
        name, unit = f.split("/", 1)
        if lookup(name.strip()) is not None:
            return name.strip(), unit.strip()
    return f, None


def _first_data_line_has(text: str, pos: int, ch: str) -> bool:
    """Whether the first data line after position ``pos`` contains ``ch`` (True if none)."""
    n = len(text)
    while pos < n:
        end = text.find("\n", pos)
        if end < 0:
            end = n
        s = text[pos:end].strip()
        if s and not s.startswith("#"):
            return ch in text[pos:end]
        pos = end + 1
    return True


def _known_field(fieldtext: str, lookup) -> bool:
    try:
        return lookup(_name_and_unit(fieldtext, lookup)[0]) is not None
    except ValueError:
        return False


def _parse_header(line: str, hdr: _Header, delim: str | None, columns: Mapping[str, str],
                  ignore: set[str]) -> None:
    fields = _split_header(line, delim)
    if delim is not None:
        while len(fields) > 1 and fields[-1] == "":
            fields.pop()
            hdr.trailing_empty += 1
    if all(_NUM_RE.fullmatch(f.strip().replace(",", ".")) for f in fields if f.strip()) and any(
            f.strip() for f in fields):
        raise DataError(
            f"{hdr.file}, line {hdr.lineno}: expected a header row naming the columns "
            f"(e.g. \"T [K], kappa [W/(m K)]\"), got numbers {line.strip()[:40]!r}")

    def lookup(name: str):
        key = _norm_name(name)
        if key in columns:
            return columns[key]
        return COLUMN_ALIASES.get(key)

    seen: dict[str, int] = {}
    for i, f in enumerate(fields):
        hdr.names.append(f)
        hdr.units.append(None)
        hdr.roles.append(None)
        if not f:
            raise DataError(f"{hdr.file}, line {hdr.lineno}, column {i + 1}: the column has no "
                            "name; expected a name such as T or kappa")
        try:
            name, unit = _name_and_unit(f, lookup)
        except ValueError as exc:
            hdr.names[i] = f
            raise DataError(f'{hdr.where(i)}: {exc}; expected e.g. "kappa [W/(m K)]"') from None
        hdr.names[i] = name or f
        if unit is not None and unit.strip() == "":
            unit = None
        hdr.units[i] = unit
        if not name:
            raise DataError(f'{hdr.file}, line {hdr.lineno}, column {i + 1}: the column "{f}" has '
                            "a unit but no name; expected a name such as T or kappa")
        if _norm_name(name) in ignore:
            continue
        hit = lookup(name)
        if hit is None:
            hint = ("" if any(_known_field(g, lookup) for g in fields) else
                    "; lines before the header must start with '#'")
            raise DataError(
                f'{hdr.where(i)}: unknown column; expected one of T, kappa, kappa_lattice, '
                f'kappa_err, rho, sigma, S (or an alias), or pass '
                f'ignore_columns=["{name}"]{hint}')
        role, kind = hit
        if role == "kappa":
            hdr.kind_from_name = kind
            hdr.kappa_col_name = name
        if role in seen or (role in ("resistivity", "sigma")
                            and ({"resistivity", "sigma"} & set(seen))):
            other = seen.get(role)
            if other is None:
                other = seen["sigma" if role == "resistivity" else "resistivity"]
            what = {"resistivity": "electrical", "sigma": "electrical"}.get(role, _SHORT[role])
            raise DataError(
                f'{hdr.where(i)}: a second {what} column (column "{hdr.names[other]}" already '
                f'is one); expected each quantity once (use ignore_columns to drop one)')
        seen[role] = i
        hdr.roles[i] = role
    for need in ("temperature", "kappa"):
        if need not in seen:
            label = "temperature" if need == "temperature" else "kappa"
            expected = "T, temp or temperature" if need == "temperature" else \
                "kappa, kappa_total or kappa_lattice"
            raise DataError(f'{hdr.file}, line {hdr.lineno}, column "{label}": missing; expected '
                            f'a column named {expected}')


def _decode(raw: bytes, name: str, encoding: str | None, notes: list[str]) -> str:
    if raw[:3] == b"\xef\xbb\xbf":
        body = raw[3:]
    elif raw[:2] in (b"\xff\xfe", b"\xfe\xff"):
        try:
            return raw.decode("utf-16")
        except UnicodeDecodeError as exc:
            raise DataError(f"{name}, line 1: not valid UTF-16 text although it starts with a "
                            f"UTF-16 byte-order mark ({exc.reason}); expected a text table") from None
    else:
        body = raw
    nul = body.find(b"\x00")
    if nul >= 0:
        line = body.count(b"\n", 0, nul) + 1
        if body[:4] == b"PK\x03\x04":
            what = "a zipped file such as an Excel .xlsx workbook"
        elif body[:4] == b"\xd0\xcf\x11\xe0":
            what = "an Excel .xls workbook"
        else:
            what = "a binary file"
        raise DataError(f"{name}, line {line}: this looks like {what} (it contains NUL bytes); "
                        "expected a text table: export it as CSV")
    if encoding is not None:
        try:
            return body.decode(encoding)
        except UnicodeDecodeError as exc:
            line = body.count(b"\n", 0, exc.start) + 1
            raise DataError(f"{name}, line {line}: byte {body[exc.start]:#04x} is not valid "
                            f"{encoding}; expected text in {encoding} (or leave encoding=None)") from None
        except LookupError:
            raise ParameterError(f"encoding: unknown text encoding {encoding!r}") from None
    try:
        return body.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = body.count(b"\n", 0, exc.start) + 1
        try:
            text, used = body.decode("cp1252"), "Windows-1252"
        except UnicodeDecodeError:
            text, used = body.decode("latin-1"), "Latin-1"
        notes.append(f"file is not UTF-8 (byte {body[exc.start]:#04x} on line {line}); "
                     f"read as {used} text")
        return text


class _FastFail(Exception):
    pass


def _fast_numbers(data: str, delim: str | None, ncols: int, nrows: int) -> np.ndarray:
    """Parse ``nrows`` lines of ``ncols`` numbers in one vectorised pass or raise _FastFail.

    ``data`` has no blank lines, no comments and no trailing newline.  The row
    structure is checked on the bytes with numpy (no Python loop over rows); the
    numbers are converted by numpy's C parser.  Any doubt raises _FastFail and
    the caller runs the exact line-by-line pass instead.
    """
    try:
        b = data.encode("ascii")
    except UnicodeEncodeError:
        raise _FastFail from None
    arr = np.frombuffer(b, dtype=np.uint8)
    if arr.size == 0:
        raise _FastFail
    if delim is None:
        # fields are runs of non-blank bytes; each line must hold exactly ncols of them
        if np.count_nonzero(arr < 32) != b.count(b"\t") + (nrows - 1):
            raise _FastFail                   # a control byte other than tab/newline
        sep = arr <= 32                       # space, tab, newline
        start = ~sep
        start[1:] &= sep[:-1]
        spos = np.flatnonzero(start)
        del start, sep
        if spos.size != nrows * ncols:
            raise _FastFail
        line_of = np.searchsorted(np.flatnonzero(arr == 10), spos)
        if not np.array_equal(np.bincount(line_of, minlength=nrows), np.full(nrows, ncols)):
            raise _FastFail
    else:
        # Without blanks, no delimiter may touch another, a newline or an end (no empty
        # field), and every line must hold ncols-1 delimiters.
        d = delim.encode()
        sq = b.translate(None, b" " if delim == "\t" else b" \t")
        if (d + d in sq or d + b"\n" in sq or b"\n" + d in sq or sq.startswith(d)
                or sq.endswith(d)):
            raise _FastFail                   # an empty field
        if sq.count(d) != nrows * (ncols - 1):
            raise _FastFail
        if nrows > 1 and ncols > 1:
            nb = np.frombuffer(sq, dtype=np.uint8)
            per_line = np.searchsorted(np.flatnonzero(nb == ord(delim)), np.flatnonzero(nb == 10))
            del nb
            if not np.array_equal(per_line, (ncols - 1) * np.arange(1, nrows)):
                raise _FastFail               # wrong number of fields on some line
        del sq
        b = b.translate(bytes.maketrans(d, b" "))
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            values = np.fromstring(b, dtype=float, sep=" ")
    except (ValueError, DeprecationWarning):
        raise _FastFail from None
    # every field is non-empty, so one value per field means no field held two numbers
    # (a field such as "1 2" gives two values and fails this test)
    if values.size != nrows * ncols or not np.all(np.isfinite(values)):
        raise _FastFail
    return values.reshape(nrows, ncols)


class _Slow:
    """Line-by-line parse naming the first problem (also the reference semantics)."""

    def __init__(self, hdr: _Header, delim: str | None, decimal: str | None):
        self.hdr = hdr
        self.delim = delim
        self.decimal = decimal
        self.first_comma: tuple[int, str] | None = None
        self.first_point: tuple[int, str] | None = None

    def where(self, line: int, col: int | None) -> str:
        s = f"{self.hdr.file}, line {line}"
        if col is not None:
            s += f', column "{self.hdr.names[col]}"'
        return s

    def number(self, tok: str, line: int, col: int) -> float:
        t = tok.strip()
        if t == "":
            raise DataError(f"{self.where(line, col)}: expected a number, got an empty field")
        if "," in t:
            if self.decimal == ".":
                raise DataError(f"{self.where(line, col)}: decimal comma in {t!r}; use a decimal "
                                'point (or pass decimal=",")')
            if self.decimal is None and self.first_point is not None:
                raise DataError(
                    f"{self.where(line, col)}: decimal comma in {t!r} but line "
                    f"{self.first_point[0]} uses a decimal point ({self.first_point[1]!r}); "
                    "use one decimal mark throughout")
            if self.first_comma is None and _NUM_RE.fullmatch(t.replace(",", ".")):
                self.first_comma = (line, t)
            t2 = t.replace(",", ".")
        else:
            t2 = t
        if "." in t:
            if self.decimal == ",":
                raise DataError(f'{self.where(line, col)}: decimal point in {t!r} but decimal=","'
                                " was given; use one decimal mark throughout")
            if self.decimal is None and self.first_comma is not None and "," not in t:
                raise DataError(
                    f"{self.where(line, col)}: decimal point in {t!r} but line "
                    f"{self.first_comma[0]} uses a decimal comma ({self.first_comma[1]!r}); "
                    "use one decimal mark throughout")
            if self.first_point is None and "," not in t:
                self.first_point = (line, t)
        if not _NUM_RE.fullmatch(t2):
            if _NONFINITE_RE.fullmatch(t2):
                raise DataError(f"{self.where(line, col)}: expected a finite number, got {t!r}")
            raise DataError(f"{self.where(line, col)}: expected a number, got {t!r}")
        v = float(t2)
        if not math.isfinite(v):
            raise DataError(f"{self.where(line, col)}: expected a finite number, got {t!r} "
                            "(too large for a float)")
        return v

    def parse(self, body: str, first_line: int) -> tuple[np.ndarray, np.ndarray]:
        ncols = len(self.hdr.names)
        rows: list[list[float]] = []
        lines_used: list[int] = []
        desc = _DELIMS[self.delim]
        for i, text in enumerate(body.split("\n")):
            if not text.strip():
                continue
            line = first_line + i
            fields = text.split() if self.delim is None else text.split(self.delim)
            if len(fields) < ncols:
                missing = self.hdr.names[len(fields)]
                raise DataError(
                    f'{self.where(line, None)}, column "{missing}": missing; expected {ncols} '
                    f"fields ({', '.join(self.hdr.names)}) separated by {desc}, got {len(fields)}")
            if len(fields) > ncols:
                hint = ""
                if self.delim == "," and re.search(r"\d,\d", text):
                    hint = ('; if the file uses decimal commas, separate the columns with ";" '
                            "or tabs, or use decimal points")
                raise DataError(
                    f"{self.where(line, None)}: expected {ncols} fields "
                    f"({', '.join(self.hdr.names)}) separated by {desc}, got {len(fields)} "
                    f"(extra field {fields[ncols].strip()!r}){hint}")
            rows.append([self.number(f, line, c) for c, f in enumerate(fields)])
            lines_used.append(line)
        if not rows:
            raise DataError(f"{self.hdr.file}, line {self.hdr.lineno}: header but no data rows; "
                            "expected at least one row of numbers after the header")
        return np.array(rows, dtype=float).reshape(len(rows), ncols), np.array(lines_used)


_BISECT_ROWS = 20_000


def _raise_first_bad_row(data: str, fast_data: str, hdr: _Header, delim: str | None,
                         decimal: str | None, ncols: int, lines_of: Callable[[], np.ndarray]) -> None:
    """Find the first row the vectorised pass refuses by bisection, and let the
    line-by-line pass word the error for that row alone.

    Rows are independent here (the decimal mark is already settled for the whole
    file), so a block of rows fails the vectorised pass exactly when one of its
    rows does.  This costs about two vectorised passes instead of a Python loop
    over every row.  Returns without raising if the row turns out fine for the
    line-by-line pass (the caller then runs that pass over the whole file).
    """
    fast_rows = fast_data.split("\n")

    def fails(lo: int, hi: int) -> bool:
        try:
            _fast_numbers("\n".join(fast_rows[lo:hi]), delim, ncols, hi - lo)
        except _FastFail:
            return True
        return False

    lo, hi = 0, len(fast_rows)
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if fails(lo, mid):
            hi = mid
        else:
            lo = mid
    text = data.split("\n")[lo]
    line = int(lines_of()[lo])
    _Slow(hdr, delim, decimal).parse(text, line)


def _row_lines(body: str, first_line: int) -> np.ndarray:
    return np.array([first_line + i for i, t in enumerate(body.split("\n")) if t.strip()],
                    dtype=np.int64)


def _check_option(name, value, allowed):
    if value not in allowed:
        shown = ", ".join(repr(a) for a in allowed)
        raise ParameterError(f"{name} must be one of {shown}, got {value!r}")


def _resolve_columns(columns: Mapping[str, str] | None) -> dict[str, tuple[str, str | None]]:
    out: dict[str, tuple[str, str | None]] = {}
    if columns is None:
        return out
    if not isinstance(columns, Mapping):
        raise ParameterError(f"columns must be a dict of header name -> column name, got {columns!r}")
    for k, v in columns.items():
        target = COLUMN_ALIASES.get(_norm_name(str(v)))
        if target is None:
            raise ParameterError(f'columns[{k!r}]: unknown column name {v!r}; expected e.g. '
                                 '"T", "kappa", "kappa_lattice", "kappa_err", "rho", "sigma", "S"')
        out[_norm_name(str(k))] = target
    return out


def _read_table(raw: bytes, name: str, *, label, kind, delimiter, decimal, encoding, units,
                columns, ignore_columns, source: str | None) -> Dataset:
    _check_option("kind", kind, (None, "total", "lattice"))
    _check_option("decimal", decimal, (None, ".", ","))
    if delimiter in ("whitespace", " "):
        delimiter = " "
    _check_option("delimiter", delimiter, (None, ",", ";", "\t", " "))
    if label is not None and not isinstance(label, str):
        raise ParameterError(f"label must be a string, got {label!r}")
    if decimal == "," and delimiter == ",":
        raise ParameterError('decimal="," needs a column delimiter other than ","')
    col_map = _resolve_columns(columns)
    if isinstance(ignore_columns, str):
        ignore_columns = [ignore_columns]
    ignore = {_norm_name(str(c)) for c in ignore_columns}
    if units is not None and not isinstance(units, Mapping):
        raise ParameterError(f"units must be a dict of column name -> unit, got {units!r}")
    unit_overrides: dict[str, str] = {}
    if units:
        for k, v in units.items():
            hit = col_map.get(_norm_name(str(k))) or COLUMN_ALIASES.get(_norm_name(str(k)))
            if hit is None:
                raise ParameterError(f"units[{k!r}]: unknown column name; expected e.g. "
                                     '"T", "kappa", "rho", "sigma", "S"')
            if not isinstance(v, str):
                raise ParameterError(f"units[{k!r}] must be a unit string, got {v!r}")
            unit_overrides[hit[0]] = v

    notes: list[str] = []
    sha = hashlib.sha256(raw).hexdigest()
    if not raw.strip(b" \t\r\n\x00\xef\xbb\xbf"):
        raise DataError(f"{name}, line 1: the file is empty; expected a header row and data rows")
    text = _decode(raw, name, encoding, notes)
    if text.startswith("\ufeff"):
        text = text[1:]
    if "\r" in text:
        text = text.replace("\r\n", "\n").replace("\r", "\n")

    # ---- comments before the header, then the header
    comments: list[tuple[int, str]] = []   # (line, text)
    pos, lineno, header = 0, 0, None
    n = len(text)
    while pos <= n - 1:
        end = text.find("\n", pos)
        if end < 0:
            end = n
        line = text[pos:end]
        lineno += 1
        s = line.strip()
        pos = end + 1
        if not s:
            continue
        if s.startswith("#"):
            comments.append((lineno, s))
            continue
        header = line
        break
    if header is None:
        if not comments:
            raise DataError(f"{name}, line 1: the file is empty; expected a header row and data rows")
        raise DataError(f"{name}, line {lineno}: only comment lines, no header row; expected a "
                        "line naming the columns, e.g. \"T [K], kappa [W/(m K)]\"")
    header_line = lineno
    if "#" in header:
        cut = header.index("#")
        comments.append((header_line, header[cut:].strip()))
        header = header[:cut]
    delim = (None if delimiter == " " else delimiter) if delimiter is not None \
        else _detect_delimiter(header)
    if delimiter is None and delim == "\t" and not _first_data_line_has(text, pos, "\t"):
        delim = None   # a space-aligned table whose header happens to contain a tab
    hdr = _Header(name, header_line)
    _parse_header(header, hdr, delim, col_map, ignore)
    body = text[pos:] if pos <= n else ""
    first_line = header_line + 1

    # ---- comments among the data (line structure kept)
    if "#" in body:
        lines = body.split("\n")
        for i, t in enumerate(lines):
            j = t.find("#")
            if j >= 0:
                c = t[j:].strip()
                if t[:j].strip():
                    comments.append((first_line + i, f"{c} (line {first_line + i})"))
                else:
                    comments.append((first_line + i, c))
                lines[i] = t[:j]
        body = "\n".join(lines)
    if '"' in body:
        body = body.replace('"', "")
    if hdr.trailing_empty and delim is not None:
        body = re.sub(rf"(?m)(?:[ \t]*{re.escape(delim)})+[ \t]*$", "", body)

    # ---- metadata comments
    meta_label = meta_kind = None
    for cline, c in comments:
        m = _META_RE.fullmatch(c)
        if m:
            key, val = m.group(1).lower(), m.group(2)
            if key in ("label", "sample") and meta_label is None and val:
                meta_label = val
            elif key == "kind":
                if val.lower() not in _KINDS:
                    raise DataError(f'{name}, line {cline}: the "# kind:" comment says {val!r}; '
                                    'expected "total" or "lattice"')
                meta_kind = val.lower()

    # ---- numbers
    ncols = len(hdr.names)
    core = body.rstrip()
    gaps = bool(core) and (re.match(r"[ \t]*\n", core) is not None
                           or re.search(r"\n[ \t]*\n", core) is not None)
    if not core.strip():
        raise DataError(f"{name}, line {header_line}: header but no data rows; expected at least "
                        "one row of numbers after the header")
    data = re.sub(r"(?m)^[ \t]*\n", "", core) if gaps else core
    nrows = data.count("\n") + 1
    table = None
    comma_note = False
    row_lines: np.ndarray | None = None
    fast_data, ok = data, True
    if delim != ",":
        has_comma, has_point = "," in data, "." in data
        if decimal == ".":
            ok = not has_comma
        elif has_comma or decimal == ",":
            ok = not has_point      # mixed marks: the slow pass names the line
            if ok and has_comma:
                fast_data = data.replace(",", ".")
                comma_note = True
    if ok:
        try:
            table = _fast_numbers(fast_data, delim, ncols, nrows)
        except _FastFail:
            table = None
            if nrows > _BISECT_ROWS:
                _raise_first_bad_row(data, fast_data, hdr, delim, decimal, ncols,
                                     lambda: (first_line + np.arange(nrows)) if not gaps
                                     else _row_lines(body, first_line))
    if table is None:
        slow = _Slow(hdr, delim, decimal)
        table, row_lines = slow.parse(body, first_line)
        comma_note = slow.first_comma is not None
    if comma_note:
        notes.append("decimal commas read as decimal points")

    def lines_of() -> np.ndarray:
        nonlocal row_lines
        if row_lines is None:
            row_lines = (first_line + np.arange(nrows)) if not gaps else _row_lines(body, first_line)
        return row_lines

    # ---- units and SI conversion

    col_of = {r: i for i, r in enumerate(hdr.roles) if r is not None}
    raw_cols: dict[str, np.ndarray] = {r: table[:, i] for r, i in col_of.items()}
    si: dict[str, np.ndarray] = {}
    shown_unit: dict[str, str] = {}
    unit_record: dict[str, str] = {}
    defaulted: set[str] = set()
    relative_err: float | None = None
    for role in _ROLE_ORDER:
        if role not in col_of:
            continue
        i = col_of[role]
        unit = hdr.units[i]
        where_h = hdr.where(i)
        if unit is not None and role in unit_overrides and unit_overrides[role].strip() != unit:
            raise DataError(f'{where_h}: the header gives unit "{unit}" but units= gives '
                            f'"{unit_overrides[role]}"; expected one of them')
        if unit is None and role in unit_overrides:
            unit = unit_overrides[role]
            where_h = f'units["{_SHORT[role]}"]'
            notes.append(f'column "{hdr.names[i]}" read in {unit} (from units=)')
        if unit is None:
            if role == "kappa_err" and hdr.units[col_of["kappa"]] is not None:
                unit = hdr.units[col_of["kappa"]] if "kappa" not in unit_overrides else \
                    unit_overrides["kappa"]
                notes.append(f'column "{hdr.names[i]}" has no unit; read in the kappa '
                             f"column's unit {unit}")
            elif role == "kappa_err" and "kappa" in unit_overrides:
                unit = unit_overrides["kappa"]
                notes.append(f'column "{hdr.names[i]}" has no unit; read in the kappa '
                             f"column's unit {unit}")
            else:
                unit = DEFAULT_UNITS[role]
                defaulted.add(role)
                notes.append(f'column "{hdr.names[i]}" has no unit; read as {unit}'
                             + (" (SI)" if role != "temperature" else ""))
        try:
            spelling, factor, mode, reinterpreted = _resolve_unit(unit, role)
        except _UnitProblem as exc:
            if exc.kind == "unknown":
                msg = f'unknown unit "{unit}"; expected a unit such as {_EXAMPLES[role]}'
            elif exc.kind == "offset":
                msg = (f'unit "{unit}" scales an offset unit, which is ambiguous; expected a '
                       f"plain unit such as {_EXAMPLES[role]}")
            else:
                msg = (f'unit "{unit}" is not {_WHAT[role]} (its dimension is {exc.detail}); '
                       f"expected a unit such as {_EXAMPLES[role]}")
            if where_h.startswith("units["):
                raise ParameterError(f"{where_h}: {msg}") from None
            raise DataError(f"{where_h}: {msg}") from None
        if reinterpreted:
            notes.append(f'unit "{unit}" of column "{hdr.names[i]}" read as {spelling}')
        unit_record[role] = unit.strip()
        shown_unit[role] = unit.strip()
        if mode == "relative":
            relative_err = factor
            notes.append(f'column "{hdr.names[i]}" is a relative uncertainty ({unit}); '
                         "converted to W/(m K)")
            continue
        si[role] = _to_si(raw_cols[role], spelling, factor, mode, role)

    if relative_err is not None:
        si["kappa_err"] = raw_cols["kappa_err"] * relative_err * si["kappa"]

    def where(role: str, idx: int) -> str:
        return f'{name}, line {int(lines_of()[idx])}, column "{hdr.names[col_of[role]]}"'

    def show(role: str, idx: int) -> str:
        v = float(raw_cols[role][idx])
        u = shown_unit.get(role, "")
        s = f"{_fmt(v)} {u}".strip()
        if role in si and u and u != SI_UNITS[role] and si[role][idx] != v:
            s += f" (= {_fmt(si[role][idx])} {SI_UNITS[role]})"
        if role in defaulted:
            s += " (no unit in the header, so read as " + DEFAULT_UNITS[role] + (
                '; write e.g. "T [degC]" if it is Celsius)' if role == "temperature" else ")")
        return s

    _check_values(si, where, show)
    if "seebeck" in defaulted:
        big = np.flatnonzero(np.abs(si["seebeck"]) > 1.0)
        if big.size:
            i = int(big[0])
            raise DataError(f'{where("seebeck", i)}: expected a Seebeck coefficient in V/K (no '
                            f"unit in the header), got {_fmt(si['seebeck'][i])}, far beyond any "
                            'known solid; write the unit in the header, e.g. "S [uV/K]"')
    if "sigma" in si:
        si["resistivity"] = 1.0 / si.pop("sigma")

    def where_row(idx: int) -> str:
        return f'{name}, line {int(lines_of()[idx])}, column "{hdr.names[col_of["temperature"]]}"'

    si = _sort_and_merge(si, where_row, notes, file_mode=True)

    # ---- kind and label
    from_name = hdr.kind_from_name
    if from_name is not None and kind is not None and kind != from_name:
        raise DataError(f'{hdr.where(col_of["kappa"])}: the column name says {from_name} but '
                        f'kind="{kind}" was given; expected them to agree')
    final_kind = from_name or kind or meta_kind or "total"
    if kind is None and from_name is None and meta_kind is None:
        notes.append(f'column "{hdr.kappa_col_name}" taken as total thermal conductivity '
                     '(pass kind="lattice" if the electronic part is already removed)')
    final_label = label if label is not None else (meta_label or Path(name).stem)
    all_notes = tuple(c for _, c in comments) + tuple(notes)
    return Dataset(temperature=si["temperature"], kappa=si["kappa"],
                   kappa_err=si.get("kappa_err"), kind=final_kind,
                   resistivity=si.get("resistivity"), seebeck=si.get("seebeck"),
                   label=final_label, source=source, sha256=sha, notes=all_notes,
                   units=unit_record)


def load_data(source, *, label: str | None = None, kind: str | None = None,
              delimiter: str | None = None, decimal: str | None = None,
              encoding: str | None = None, units: Mapping[str, str] | None = None,
              columns: Mapping[str, str] | None = None,
              ignore_columns: Iterable[str] = ()) -> Dataset:
    """Read a measured thermal-conductivity table into a :class:`Dataset` (SI units).

    Parameters
    ----------
    source : str or os.PathLike
        Path of a CSV, TSV or whitespace-separated text file with a header row
        (see the module docstring for column names, units and defaults).
    label : str, optional
        Sample name; default the file's ``# label:`` comment, else the file name
        without extension.
    kind : {"total", "lattice"}, optional
        What a plain ``kappa`` column holds; default the ``# kind:`` comment, else
        "total".  Must agree with a column named ``kappa_total``/``kappa_lattice``.
    delimiter : {",", ";", "\\t", " "}, optional
        Column separator (``" "`` or "whitespace": runs of spaces/tabs); default
        detected from the header row.
    decimal : {".", ","}, optional
        Decimal mark; default: a decimal comma is accepted when the delimiter is
        not a comma and the file has no decimal points.
    encoding : str, optional
        Text encoding; default UTF-8, falling back to Windows-1252 with a note.
    units : dict, optional
        Units for columns whose header gives none, e.g. ``{"rho": "uOhm cm"}``.
    columns : dict, optional
        Extra column names, e.g. ``{"k_meas": "kappa", "Tsample": "T"}``.
    ignore_columns : iterable of str
        Header names of columns to skip (e.g. ``["time", "field"]``).

    Returns
    -------
    Dataset
        Sorted by temperature, in K, W/(m K), Ohm m and V/K.

    Raises
    ------
    DataError
        The file is missing, unreadable or malformed; one line naming the file,
        line and column and what was expected.
    ParameterError
        An option is invalid.
    """
    if isinstance(source, (bytes, bytearray)) or not isinstance(source, (str, os.PathLike)):
        raise ParameterError(f"source must be a path (str or pathlib.Path), got "
                             f"{type(source).__name__} (use parse_data for file contents)")
    path = Path(source)
    name = os.fspath(source)
    try:
        raw = path.read_bytes()
    except FileNotFoundError:
        raise DataError(f"{name}: no such file; expected the path of a data table") from None
    except IsADirectoryError:
        raise DataError(f"{name}: is a folder; expected the path of a data file "
                        "(load_series reads every table in a folder)") from None
    except PermissionError:
        if path.is_dir():
            raise DataError(f"{name}: is a folder; expected the path of a data file "
                            "(load_series reads every table in a folder)") from None
        raise DataError(f"{name}: permission denied; expected a readable data file") from None
    except OSError as exc:
        raise DataError(f"{name}: cannot be read ({exc.strerror or exc}); expected a readable "
                        "data file") from None
    return _read_table(raw, name, label=label, kind=kind, delimiter=delimiter, decimal=decimal,
                       encoding=encoding, units=units, columns=columns,
                       ignore_columns=ignore_columns, source=str(path))


def parse_data(content: bytes | str, *, name: str = "data", label: str | None = None,
               kind: str | None = None, delimiter: str | None = None,
               decimal: str | None = None, encoding: str | None = None,
               units: Mapping[str, str] | None = None, columns: Mapping[str, str] | None = None,
               ignore_columns: Iterable[str] = ()) -> Dataset:
    """Read a table from its contents (e.g. an uploaded file) instead of a path.

    Parameters are those of :func:`load_data`; ``name`` (e.g. the uploaded file's
    name) appears in error messages and is the default label.  ``source`` of the
    result is None; ``sha256`` is that of the bytes (str content is encoded as
    UTF-8 first).

    Raises
    ------
    DataError, ParameterError
        As :func:`load_data`.
    """
    if isinstance(content, str):
        raw = content.encode("utf-8")
    elif isinstance(content, (bytes, bytearray, memoryview)):
        raw = bytes(content)
    else:
        raise ParameterError(f"content must be bytes or str, got {type(content).__name__}")
    if not isinstance(name, str):
        raise ParameterError(f"name must be a string, got {name!r}")
    return _read_table(raw, name, label=label, kind=kind, delimiter=delimiter, decimal=decimal,
                       encoding=encoding, units=units, columns=columns,
                       ignore_columns=ignore_columns, source=None)


_SERIES_SUFFIXES = (".csv", ".tsv", ".txt", ".dat")


def load_series(sources, labels: Iterable[str] | None = None, **options) -> list[Dataset]:
    """Read several files as a series, one sample each (e.g. grain sizes, compositions).

    Parameters
    ----------
    sources : iterable of paths, or one folder
        The files, in series order.  A folder means every .csv, .tsv, .txt and .dat
        file in it, sorted by name.
    labels : iterable of str, optional
        One label per file; default each file's ``# label:`` comment, else its name.
    **options
        Passed to :func:`load_data` (kind, delimiter, decimal, encoding, units,
        columns, ignore_columns).

    Returns
    -------
    list of Dataset

    Raises
    ------
    DataError
        A file is malformed (message as :func:`load_data`), a folder holds no
        tables, or two samples end up with the same label.
    ParameterError
        labels has the wrong length, or an option is invalid.
    """
    if "label" in options:
        raise ParameterError("load_series takes labels=[...] (one per file), not label=")
    if isinstance(sources, (str, os.PathLike)):
        folder = Path(sources)
        if not folder.is_dir():
            raise ParameterError(f"sources must be a list of paths or a folder, got the single "
                                 f"file {os.fspath(sources)!r} (use load_data, or pass [path])")
        paths = sorted(p for p in folder.iterdir()
                       if p.is_file() and p.suffix.lower() in _SERIES_SUFFIXES)
        if not paths:
            raise DataError(f"{os.fspath(sources)}: no .csv, .tsv, .txt or .dat files in this "
                            "folder; expected data tables")
    else:
        try:
            paths = list(sources)
        except TypeError:
            raise ParameterError(f"sources must be a list of paths, got {sources!r}") from None
    if not paths:
        raise ParameterError("sources must name at least one file, got an empty list")
    if labels is not None:
        if isinstance(labels, str):
            raise ParameterError("labels must be a list of strings (one per file), got a string")
        labels = list(labels)
        if len(labels) != len(paths):
            raise ParameterError(f"labels must have one entry per file: {len(paths)} files, "
                                 f"{len(labels)} labels")
    out: list[Dataset] = []
    used: dict[str, str] = {}
    for i, p in enumerate(paths):
        ds = load_data(p, label=None if labels is None else labels[i], **options)
        if ds.label in used:
            raise DataError(f'{os.fspath(p)}: label "{ds.label}" is already used by '
                            f"{used[ds.label]}; expected one label per sample (pass labels=[...] "
                            'or write a "# label: ..." line in each file)')
        used[ds.label] = os.fspath(p)
        out.append(ds)
    return out
