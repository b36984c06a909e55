"""Shared helpers of the conductivity chain: units at the door, Lorenz choices (private)."""
from __future__ import annotations

import numpy as np

from ..electronic import L0
from ..errors import ParameterError
from .. import _validate as _v

#: Lorenz-number choices by name ("band" and "spb" are the same single-parabolic-band value from S).
LORENZ_CHOICES = ("auto", "sommerfeld", "band", "spb", "kim")
#: Plain words for the Lorenz-number choices (code key -> label), for menus and reports.
LORENZ_LABELS = {
    "auto": "automatic: band model if Seebeck is measured",
    "sommerfeld": "Sommerfeld value L\u2080 (degenerate)",
    "spb": "band model from Seebeck",
    "kim": "Kim et al. formula from Seebeck",
    "given": "given value",
}
#: A given Lorenz number must lie in [L0/10, 10 L0]: the band model spans 0.30-2.43 L0 for scattering
#: exponents -1 < lambda <= 6 ((2 + lambda)(kB/e)^2, computed) and room-temperature metals 0.86-0.98 L0
#: (reference/metals_wiedemann_franz.csv); a factor of 10 either side still catches the common slip of
#: giving L in units of 1e-8 (2.44 for 2.44e-8).
LORENZ_RANGE = (0.1 * L0, 10.0 * L0)
#: Relative slack at the ends of a measured temperature grid (a typed 600 may arrive as 600.0000000000001).
_END_SLACK = 1e-9


# ---------------------------------------------------------------------------------------------
# units at the door: thin array-returning forms of the package's one checking module (kinetic._validate)
def _si(value, unit: str, name: str) -> np.ndarray:
    """A float array in ``unit`` (a pint quantity converted); True/False are not numbers here."""
    if isinstance(value, bool):
        raise ParameterError(f"{name} must be a number or array of numbers [{unit}], got {value!r}")
    return _v.as_float_array(name, value, unit=unit)


def _kelvin(T, name: str = "temperature") -> np.ndarray:
    """Temperatures [K]: plain numbers, or pint quantities (degC converted); finite and > 0."""
    return _v.temperatures(_si(T, "K", name), name)


def _check_positive(name: str, arr, unit: str) -> np.ndarray:
    return np.asarray(_v.positive(name, arr, unit=unit), dtype=float)


def _check_finite(name: str, arr, unit: str) -> np.ndarray:
    return np.asarray(_v.finite(name, arr, unit=unit), dtype=float)


def _frozen(arr) -> np.ndarray:
    a = np.array(arr, dtype=float, copy=True)
    a.setflags(write=False)
    return a


def _lorenz_spec(lorenz, have_seebeck: bool) -> tuple[str, float | None]:
    """(electronic_kappa method, explicit L or None) for a Lorenz choice."""
    if isinstance(lorenz, str):
        key = lorenz.strip().lower()
        if key not in LORENZ_CHOICES:
            raise ParameterError(f"lorenz must be one of {', '.join(LORENZ_CHOICES)} or a number "
                                 f"[W Ohm K^-2], got {lorenz!r}")
        if key == "auto":
            key = "band" if have_seebeck else "sommerfeld"
        method = "spb" if key == "band" else key
        if method in ("spb", "kim") and not have_seebeck:
            raise ParameterError(f"lorenz={lorenz!r} needs a Seebeck coefficient [V/K]; give seebeck= "
                                 "or use 'sommerfeld'")
        return method, None
    L = _si(lorenz, "W*ohm/K**2", "lorenz")
    if L.ndim != 0 or not np.isfinite(L) or not LORENZ_RANGE[0] <= float(L) <= LORENZ_RANGE[1]:
        raise ParameterError(f"lorenz must be a name or one number in [{LORENZ_RANGE[0]:.3g}, "
                             f"{LORENZ_RANGE[1]:.3g}] W Ohm K^-2 (L0 = {L0:.4g}), got {lorenz!r}")
    return "sommerfeld", float(L)


def _electronic_flag(electronic) -> bool:
    if isinstance(electronic, (bool, np.bool_)):
        return bool(electronic)
    if isinstance(electronic, str) and electronic.strip().lower() in ("auto", "none"):
        return electronic.strip().lower() == "auto"
    raise ParameterError(f"electronic must be True/False (or 'auto'/'none'), got {electronic!r}")


