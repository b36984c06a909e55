"""Argument checks at the doors of the engine: the one validation module (private).

Six ideas, one function each, every one raising
:class:`kinetic.errors.ParameterError` with a message that names the
parameter, the value received and what was expected:

=================  ==============================================================
``finite``         a number or array of numbers, no NaN or infinity
``positive``       finite and > 0 (``nonnegative``: finite and >= 0)
``in_range``       a single finite number inside [lo, hi] (open ends on request)
``integer``        a whole number (not a bool, not 2.5), optionally with limits
``choice``         one of a fixed set of values
``shape``          an array of the given shape (``None`` in the shape: any length)
=================  ==============================================================

plus ``temperatures`` (positive, in K), ``callable_or_none`` and
``as_float_array`` (the conversion the others share).

Numbers with units. Wherever a check is given ``unit=``, a pint quantity
(anything with ``.to``, ``.magnitude`` and ``.units``) is converted to that SI
unit first, so ``Q(26.85, "degC")`` arrives as 300 K; a quantity of the wrong
dimension is refused. Without ``unit=``, only a dimensionless quantity is
accepted. A quantity is never read as a bare number. pint itself is not
imported here: the quantity does its own conversion.

>>> positive("boundary_length", 2e-6, unit="m")
2e-06
>>> integer("n_starts", 8, lo=1)
8
>>> choice("weights", "auto", ("auto", "errors", "relative"))
'auto'
>>> in_range("fraction", 1.5, 0.0, 1.0)
Traceback (most recent call last):
...
kinetic.errors.ParameterError: fraction must be in [0, 1], got 1.5
"""
from __future__ import annotations

import numbers

import numpy as np

from .errors import ParameterError
from .quantities import is_quantity, to_si

__all__ = [
    "as_float_array",
    "callable_or_none",
    "choice",
    "finite",
    "in_range",
    "integer",
    "is_quantity",
    "nonnegative",
    "positive",
    "shape",
    "temperatures",
]


def _show(value) -> str:
    arr = np.asarray(value)
    if arr.ndim == 0:
        return repr(value.item() if hasattr(value, "item") else value)
    return f"array of shape {arr.shape}"


def _unit_tag(unit: str) -> str:
    return f" [{unit.strip()}]" if unit and unit.strip() else ""


def _from_quantity(name: str, value, unit: str):
    """The magnitude of a quantity in ``unit`` (one converter for the whole package:
    :func:`kinetic.quantities.to_si`, whose errors name the dimension expected and given)."""
    return to_si(value, unit.strip() if unit else "", name)


def as_float_array(name: str, value, *, unit: str = "") -> np.ndarray:
    """``value`` as a float array (a pint quantity converted to ``unit``), or ParameterError.

    >>> as_float_array("x", [1, 2]).tolist()
    [1.0, 2.0]
    """
    if is_quantity(value):
        value = _from_quantity(name, value, unit)
    if isinstance(value, (str, bytes)):
        raise ParameterError(f"{name} must be a number or array of numbers, got {value!r}")
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise ParameterError(f"{name} must be a number or array of numbers, got {value!r}") from None
    return arr


def _first_bad(name: str, value, arr: np.ndarray, bad: np.ndarray) -> tuple[float, str]:
    first = float(arr[bad].flat[0]) if arr.ndim else float(arr)
    where = f" at index {int(np.flatnonzero(bad.ravel())[0])} of {_show(value)}" if arr.ndim else ""
    return first, where


def finite(name: str, value, *, unit: str = "") -> np.ndarray | float:
    """A finite number or array (no NaN, no infinity).

    >>> finite("offset", -3)
    -3.0
    """
    arr = as_float_array(name, value, unit=unit)
    bad = ~np.isfinite(arr)
    if np.any(bad):
        first, where = _first_bad(name, value, arr, bad)
        raise ParameterError(f"{name} must be finite{_unit_tag(unit)}, got {first!r}{where}")
    return arr if arr.ndim else float(arr)


def positive(name: str, value, *, unit: str = "") -> np.ndarray | float:
    """Finite and > 0 (scalar or array).

    >>> positive("length", [1e-6, 0.0], unit="m")
    Traceback (most recent call last):
    ...
    kinetic.errors.ParameterError: length must be finite and positive [m], got 0.0 at index 1 of array of shape (2,)
    """
    arr = as_float_array(name, value, unit=unit)
    bad = ~np.isfinite(arr) | (arr <= 0)
    if np.any(bad):
        first, where = _first_bad(name, value, arr, bad)
        raise ParameterError(f"{name} must be finite and positive{_unit_tag(unit)}, got {first!r}{where}")
    return arr if arr.ndim else float(arr)


def nonnegative(name: str, value, *, unit: str = "") -> np.ndarray | float:
    """Finite and >= 0 (scalar or array)."""
    arr = as_float_array(name, value, unit=unit)
    bad = ~np.isfinite(arr) | (arr < 0)
    if np.any(bad):
        first, where = _first_bad(name, value, arr, bad)
        raise ParameterError(f"{name} must be finite and non-negative{_unit_tag(unit)}, got {first!r}{where}")
    return arr if arr.ndim else float(arr)


def in_range(name: str, value, lo: float, hi: float, *, lo_open=False, hi_open=False, unit: str = "") -> float:
    """A finite scalar inside [lo, hi] (or open ends).

    >>> in_range("relative_density", 1.0, 0.0, 1.0, lo_open=True)
    1.0
    """
    arr = as_float_array(name, value, unit=unit)
    if arr.ndim != 0:
        raise ParameterError(f"{name} must be a single number, got {_show(value)}")
    v = float(arr)
    ok = np.isfinite(v) and (v > lo if lo_open else v >= lo) and (v < hi if hi_open else v <= hi)
    if not ok:
        lb = "(" if lo_open else "["
        hb = ")" if hi_open else "]"
        raise ParameterError(f"{name} must be in {lb}{lo:g}, {hi:g}{hb}{_unit_tag(unit)}, got {v!r}")
    return v


def integer(name: str, value, *, lo: int | None = None, hi: int | None = None) -> int:
    """A whole number (``True``, ``2.5`` and ``"3"`` are refused), within [lo, hi] if given.

    >>> integer("seed", 2.5)
    Traceback (most recent call last):
    ...
    kinetic.errors.ParameterError: seed must be a whole number, got 2.5
    """
    if isinstance(value, bool) or not isinstance(value, numbers.Integral):
        limits = (f" >= {lo}" if lo is not None else "") + (f" <= {hi}" if hi is not None else "")
        raise ParameterError(f"{name} must be a whole number{limits}, got {value!r}")
    v = int(value)
    if (lo is not None and v < lo) or (hi is not None and v > hi):
        limits = " and ".join(s for s in ((f">= {lo}" if lo is not None else ""),
                                          (f"<= {hi}" if hi is not None else "")) if s)
        raise ParameterError(f"{name} must be a whole number {limits}, got {v!r}")
    return v


def choice(name: str, value, allowed):
    """``value`` if it is one of ``allowed``; the error lists the valid ones."""
    allowed = tuple(allowed)
    try:
        ok = value in allowed
    except TypeError:  # unhashable value against a set-like
        ok = False
    if not ok:
        shown = ", ".join(repr(a) for a in allowed)
        raise ParameterError(f"{name} must be one of {shown}, got {value!r}")
    return value


def shape(name: str, value, expected: tuple, *, unit: str = "") -> np.ndarray:
    """A float array of the expected shape; ``None`` in ``expected`` accepts any length there.

    >>> shape("covariance", [[1.0, 0.0], [0.0, 1.0]], (2, 2)).shape
    (2, 2)
    >>> shape("temperature", [[1.0]], (None,))
    Traceback (most recent call last):
    ...
    kinetic.errors.ParameterError: temperature must be an array of shape (n,), got shape (1, 1)
    """
    arr = as_float_array(name, value, unit=unit)
    want = tuple(expected)
    ok = arr.ndim == len(want) and all(w is None or w == s for w, s in zip(want, arr.shape))
    if not ok:
        shown = "(" + ", ".join("n" if w is None else str(w) for w in want) + ("," if len(want) == 1 else "") + ")"
        raise ParameterError(f"{name} must be an array of shape {shown}, got shape {arr.shape}")
    return arr


def callable_or_none(name: str, f):
    """A callable or None (e.g. a progress callback)."""
    if f is not None and not callable(f):
        raise ParameterError(f"{name} must be a callable or None, got {f!r}")
    return f


def temperatures(value, name: str = "temperature") -> np.ndarray:
    """Temperatures in K: finite, > 0 (a pint quantity is converted to K); a float array.

    >>> temperatures([300, 600]).tolist()
    [300.0, 600.0]
    """
    arr = positive(name, value, unit="K")
    return np.asarray(arr, dtype=float)
