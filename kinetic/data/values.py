"""Value checks shared by files and arrays: finite, in range, one length, sorted and merged."""
from __future__ import annotations

import math
import re
from collections.abc import Callable, Mapping
from typing import Any

import numpy as np

from ..errors import DataError, ParameterError
from .columns import _FLASH_ROLES, _ROLE_ORDER
from .units import _PINT_SI, _WHAT


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
        ("diffusivity", lambda a: ~(a > 0), "a positive thermal diffusivity"),
        ("density", lambda a: ~(a > 0), "a positive density"),
        ("heat_capacity", lambda a: ~(a > 0), "a positive heat capacity"),
    ]
    for role in _ROLE_ORDER + _FLASH_ROLES:
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




def _scalar(name: str, v) -> float:
    if _is_quantity(v):
        try:
            v = v.to("kelvin").magnitude
        except Exception as exc:  # noqa: BLE001  pint DimensionalityError and friends
            raise ParameterError(f"{name} must be a temperature, got a quantity in {v.units} "
                                 f"({type(exc).__name__})") from None
    try:
        f = float(v)
    except (TypeError, ValueError):
        raise ParameterError(f"{name} must be a number [K], got {v!r}") from None
    if math.isnan(f):
        raise ParameterError(f"{name} must be a number [K], got nan")
    return f


def _is_quantity(v) -> bool:
    return hasattr(v, "magnitude") and hasattr(v, "units") and hasattr(v, "to")


def _as_columns(cols: Mapping[str, Any]) -> dict[str, np.ndarray]:
    """Convert inputs to 1-D float arrays of one length (DataError naming the parameter)."""
    out: dict[str, np.ndarray] = {}
    n = None
    for r in _ROLE_ORDER + _FLASH_ROLES:
        if r not in cols or cols[r] is None:
            continue
        v = cols[r]
        if _is_quantity(v):   # a pint quantity is converted, never read as a bare number
            try:
                v = v.to(_PINT_SI[r]).magnitude
            except Exception as exc:  # noqa: BLE001  pint DimensionalityError and friends
                raise DataError(f"{r}: expected {_WHAT[r]}, got a quantity in {v.units} "
                                f"({type(exc).__name__})") from None
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
