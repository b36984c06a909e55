"""Small argument checks shared by the engine (private).

Each raises :class:`kinetic.errors.ParameterError` naming the parameter, the
value received and what was expected.
"""
from __future__ import annotations

import numpy as np

from .errors import ParameterError


def _show(value) -> str:
    arr = np.asarray(value)
    if arr.ndim == 0:
        return repr(value.item() if hasattr(value, "item") else value)
    return f"array of shape {arr.shape}"


def as_float_array(name: str, value) -> np.ndarray:
    """Convert to a float array or raise ParameterError."""
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise ParameterError(f"{name} must be a number or array of numbers, got {value!r}") from None
    return arr


def positive(name: str, value, *, unit: str = "") -> np.ndarray | float:
    """Finite and > 0 (scalar or array)."""
    arr = as_float_array(name, value)
    bad = ~np.isfinite(arr) | (arr <= 0)
    if np.any(bad):
        first = float(arr[bad].flat[0]) if arr.ndim else float(arr)
        where = f" at index {int(np.flatnonzero(bad.ravel())[0])} of {_show(value)}" if arr.ndim else ""
        raise ParameterError(
            f"{name} must be finite and positive{(' [' + unit.strip() + ']') if unit else ''}, got {first!r}{where}"
        )
    return arr if arr.ndim else float(arr)


def nonnegative(name: str, value, *, unit: str = "") -> np.ndarray | float:
    """Finite and >= 0 (scalar or array)."""
    arr = as_float_array(name, value)
    bad = ~np.isfinite(arr) | (arr < 0)
    if np.any(bad):
        first = float(arr[bad].flat[0]) if arr.ndim else float(arr)
        raise ParameterError(
            f"{name} must be finite and non-negative{(' [' + unit + ']') if unit else ''}, got {first!r}"
        )
    return arr if arr.ndim else float(arr)


def in_range(name: str, value, lo: float, hi: float, *, lo_open=False, hi_open=False) -> float:
    """A finite scalar inside [lo, hi] (or open ends)."""
    arr = as_float_array(name, value)
    if arr.ndim != 0:
        raise ParameterError(f"{name} must be a single number, got {_show(value)}")
    v = float(arr)
    ok = np.isfinite(v) and (v > lo if lo_open else v >= lo) and (v < hi if hi_open else v <= hi)
    if not ok:
        lb = "(" if lo_open else "["
        hb = ")" if hi_open else "]"
        raise ParameterError(f"{name} must be in {lb}{lo:g}, {hi:g}{hb}, got {v!r}")
    return v


def temperatures(value, name: str = "temperature") -> np.ndarray:
    """Temperatures in K: finite, > 0; returned as a float array (at least 1-D view kept as given)."""
    arr = positive(name, value, unit="K")
    return np.asarray(arr, dtype=float)
