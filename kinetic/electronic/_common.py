"""Constants and argument checks shared by the electronic modules (private helpers).

SI throughout: temperature [K], Seebeck coefficient [V/K], Lorenz number
[W Ohm K^-2], conductivity [S/m], resistivity [Ohm m].
"""
from __future__ import annotations

import math

import numpy as np
from scipy import constants as _const

from .._validate import as_float_array
from ..errors import ParameterError

__all__ = ["KB_OVER_E", "L0", "KIM_STATED_ACCURACY"]

#: kB/e [V/K] (scipy.constants, CODATA): the natural unit of the Seebeck coefficient.
KB_OVER_E: float = _const.k / _const.e

#: Sommerfeld Lorenz number (pi^2/3)(kB/e)^2 [W Ohm/K^2], the degenerate limit.
L0: float = math.pi ** 2 / 3.0 * KB_OVER_E ** 2

#: Relative accuracy Kim et al. (APL Mater. 3, 041506, 2015) state for their
#: formula against the single-band acoustic-phonon model (abstract).
KIM_STATED_ACCURACY: float = 0.05



# ---------------------------------------------------------------------------
# small helpers
# ---------------------------------------------------------------------------

def _sign_check(name: str, value, unit: str, allow_zero: bool) -> np.ndarray:
    """Finite and > 0 (or >= 0); the message names the first bad value and its index."""
    arr = as_float_array(name, value)
    bad = ~np.isfinite(arr) | ((arr < 0) if allow_zero else (arr <= 0))
    if np.any(bad):
        first = float(arr[bad].flat[0])
        where = ""
        if arr.ndim:
            idx = tuple(int(i) for i in np.argwhere(bad)[0])
            where = f" at index {idx[0] if len(idx) == 1 else idx} of an array of shape {arr.shape}"
        kind = "non-negative" if allow_zero else "positive"
        u = f" [{unit}]" if unit else ""
        raise ParameterError(f"{name} must be finite and {kind}{u}, got {first!r}{where}")
    return arr


def _positive(name: str, value, *, unit: str = "") -> np.ndarray:
    """Finite and > 0, as an array."""
    return _sign_check(name, value, unit, allow_zero=False)


def _nonnegative(name: str, value, *, unit: str = "") -> np.ndarray:
    """Finite and >= 0, as an array."""
    return _sign_check(name, value, unit, allow_zero=True)


def _finite(name: str, value, unit: str = "") -> np.ndarray:
    arr = as_float_array(name, value)
    if not np.all(np.isfinite(arr)):
        bad = float(arr[~np.isfinite(arr)].flat[0])
        u = f" [{unit}]" if unit else ""
        raise ParameterError(f"{name} must be finite{u}, got {bad!r}")
    return arr


def _out(arr: np.ndarray, like) -> np.ndarray | float:
    """Return a float for scalar input, else an array."""
    arr = np.asarray(arr, dtype=float)
    if np.ndim(like) == 0 and arr.ndim == 0:
        return float(arr)
    return arr


def _broadcast(**arrays) -> list[np.ndarray]:
    try:
        return [np.asarray(a, dtype=float) for a in np.broadcast_arrays(*arrays.values())]
    except ValueError:
        shapes = ", ".join(f"{k} {np.shape(v)}" for k, v in arrays.items())
        raise ParameterError(f"array shapes do not broadcast together: {shapes}") from None


def _readonly(arr) -> np.ndarray:
    arr = np.array(arr, dtype=float, copy=True)
    arr.setflags(write=False)
    return arr


def _conductivity(sigma, resistivity) -> np.ndarray:
    """sigma [S/m] from exactly one of sigma / resistivity."""
    if (sigma is None) == (resistivity is None):
        raise ParameterError(
            "give exactly one of sigma [S/m] or resistivity [Ohm m], got "
            + ("neither" if sigma is None else "both")
        )
    if sigma is not None:
        return np.asarray(_nonnegative("sigma", sigma, unit="S/m"), dtype=float)
    rho = np.asarray(_positive("resistivity", resistivity, unit="Ohm m"), dtype=float)
    return 1.0 / rho


def _temperature(value) -> np.ndarray:
    return np.asarray(_positive("temperature", value, unit="K"), dtype=float)




def _scalar(name, value):
    arr = as_float_array(name, value)
    if arr.ndim != 0:
        raise ParameterError(f"{name} must be a single number, got an array of shape {arr.shape}")
    return float(arr)


