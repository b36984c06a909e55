"""The lattice conductivity a fit uses: data as a Dataset, and the electronic subtraction.

:func:`lattice_target` turns measured data into the lattice conductivity
that is fitted: the data themselves (lattice data, or ``electronic="none"``),
or kappa_total - L sigma T when the data hold the total conductivity and a
resistivity (Wiedemann-Franz with the chosen Lorenz number).
"""
from __future__ import annotations

from collections.abc import Mapping

from ..conductivity import LORENZ_CHOICES, LatticeTarget
from ..conductivity import lattice_target as _chain_target
from ..data import Dataset
from ..errors import DataError, ParameterError

__all__ = [
    "DATA_KEYS",
    "ELECTRONIC_CHOICES",
    "LORENZ_METHODS",
    "LatticeTarget",
    "as_dataset",
    "check_electronic",
    "check_lorenz_method",
    "lattice_target",
]

#: Lorenz-number methods accepted for the electronic subtraction.
LORENZ_METHODS = LORENZ_CHOICES  # the conductivity chain's choices ("band" is an alias of "spb")
#: Choices of ``electronic=`` in :func:`lattice_target` and the fit functions.
ELECTRONIC_CHOICES = ("auto", "none")

#: Keys a data mapping may hold (those of :meth:`kinetic.data.Dataset.from_arrays`).
DATA_KEYS = ("temperature", "kappa", "kappa_err", "resistivity", "sigma", "seebeck", "kind", "label", "notes")


def as_dataset(data) -> Dataset:
    """A :class:`~kinetic.data.Dataset` from a Dataset, a dict or a (T, kappa[, err]) tuple.

    Parameters
    ----------
    data : Dataset, mapping or tuple
        A mapping is passed to ``Dataset.from_arrays(**data)`` (keys
        temperature [K], kappa [W/m/K], kappa_err, resistivity [Ohm m] or
        sigma [S/m], seebeck [V/K], kind, label, notes; any other key is
        refused); a tuple is ``(temperature, kappa)`` or
        ``(temperature, kappa, kappa_err)``.

    Raises
    ------
    DataError, ParameterError
        From ``Dataset.from_arrays``, or for anything else.

    Examples
    --------
    >>> ds = as_dataset({"temperature": [100.0, 300.0], "kappa": [80.0, 30.0], "kind": "lattice"})
    >>> ds.temperature.tolist()
    [100.0, 300.0]
    >>> as_dataset({"temperature": [300.0], "kappa": [1.0], "kapa_err": [0.1]})
    Traceback (most recent call last):
    ...
    kinetic.errors.ParameterError: data: unknown key 'kapa_err'; valid keys: temperature, kappa, kappa_err, resistivity, sigma, seebeck, kind, label, notes
    """
    if isinstance(data, Dataset):
        return data
    if isinstance(data, Mapping):
        d = dict(data)
        unknown = [k for k in d if k not in DATA_KEYS]
        if unknown:
            raise ParameterError(f"data: unknown key {unknown[0]!r}; valid keys: {', '.join(DATA_KEYS)}")
        try:
            T = d.pop("temperature")
            k = d.pop("kappa")
        except KeyError as exc:
            raise DataError(f"data mapping needs key {exc.args[0]!r}; got keys {sorted(data)}") from None
        return Dataset.from_arrays(T, k, **d)
    if isinstance(data, (tuple, list)) and len(data) in (2, 3):
        return Dataset.from_arrays(data[0], data[1], kappa_err=data[2] if len(data) == 3 else None)
    raise ParameterError(
        f"data must be a Dataset, a mapping of arrays or a (temperature, kappa[, kappa_err]) tuple, "
        f"got {type(data).__name__}"
    )


def check_electronic(electronic) -> str:
    """The ``electronic=`` choice, checked: "auto" or "none"."""
    if not isinstance(electronic, str) or electronic.lower() not in ELECTRONIC_CHOICES:
        raise ParameterError(f"electronic must be 'auto' (subtract L*sigma*T when the data hold a resistivity) "
                             f"or 'none' (fit kappa as given), got {electronic!r}")
    return electronic.lower()


def check_lorenz_method(lorenz_method) -> str:
    """The Lorenz method, checked against :data:`LORENZ_METHODS` (lower case)."""
    if not isinstance(lorenz_method, str) or lorenz_method.lower() not in LORENZ_METHODS:
        raise ParameterError(f"lorenz_method must be one of {', '.join(LORENZ_METHODS)}, got {lorenz_method!r}")
    return lorenz_method.lower()


def lattice_target(data, lorenz_method: str = "auto", *, electronic: str = "auto") -> LatticeTarget:
    """The lattice conductivity to fit: kappa itself, or kappa_total - L sigma T.

    Parameters
    ----------
    data : Dataset (or anything :func:`as_dataset` accepts)
    lorenz_method : {"auto", "sommerfeld", "spb", "kim"}
        Lorenz number for the subtraction ("spb" and "kim" need a Seebeck column).
        "auto" (default) takes the single-parabolic-band value from the Seebeck
        coefficient when the data has one, else the Sommerfeld value: for a doped
        semiconductor the Sommerfeld L0 can be ~40 % too high (Kim et al. 2015).
    electronic : {"auto", "none"}
        "auto" (default): subtract the electronic part L sigma T when the
        data hold the total conductivity and a resistivity. "none": fit the
        data's kappa as given (no subtraction, whatever the data hold; the
        target says so in its notes when the data were total conductivity).

    Returns
    -------
    LatticeTarget

    Raises
    ------
    ParameterError
        Unknown Lorenz method, or "spb"/"kim" without a Seebeck column.
    DataError
        No point is left with kappa_lattice > 0.
    """
    ds = as_dataset(data)
    method = check_lorenz_method(lorenz_method)
    electronic = check_electronic(electronic)
    if method in ("spb", "kim") and ds.kind == "total" and ds.has_electrical and ds.seebeck is None \
            and electronic == "auto":
        raise ParameterError(f"lorenz_method={method!r} needs a Seebeck column in {ds.label or 'data'}; "
                             "use 'sommerfeld' or add S to the data")
    # One conductivity chain: the subtraction itself lives in kinetic.conductivity.
    return _chain_target(ds, lorenz=method, electronic=electronic == "auto")
