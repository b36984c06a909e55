"""Numbers with units at the engine's doors: pint quantities converted to SI.

Every engine call that takes a number with a unit (temperatures, frequencies,
lengths) passes it through :func:`to_si` first, so ``model.kappa(Q(26.85,
"degC"))`` is the conductivity at 300 K, ``Q(5, "um")`` a boundary length of
5e-6 m, and a length given where a temperature is expected is refused with one
line naming the argument. Plain numbers are taken to be in the SI unit already
(as everywhere in the engine).

pint is imported only when a quantity actually arrives (it is slow to import),
so ``import kinetic`` stays fast.

Examples
--------
>>> to_si(300.0, "K", "temperature")
300.0
>>> import pint
>>> Q = pint.UnitRegistry().Quantity
>>> round(float(to_si(Q(26.85, "degC"), "K", "temperature")), 6)
300.0
>>> to_si(Q(2.0, "um"), "m", "length")
2e-06
>>> to_si(Q(3.0, "m"), "K", "temperature")
Traceback (most recent call last):
...
kinetic.errors.ParameterError: temperature must be in K (a temperature), got 3.0 meter (a length)
"""
from __future__ import annotations

import numpy as np

from .errors import ParameterError

__all__ = ["to_si", "is_quantity"]

#: plain names of the dimensions the engine meets, for messages
_DIMENSION_WORDS = {
    "[temperature]": "a temperature",
    "[length]": "a length",
    "[time]": "a time",
    "1 / [time]": "a frequency",
    "[mass]": "a mass",
    "[length] ** 3": "a volume",
    "[length] ** 2": "an area",
    "1 / [length] ** 3": "a number density",
    "1 / [length] ** 2": "an areal density",
    "dimensionless": "a pure number",
}


def is_quantity(value) -> bool:
    """True for a pint Quantity (checked without importing pint)."""
    return hasattr(value, "magnitude") and hasattr(value, "units") and hasattr(value, "to")


def _words(dim) -> str:
    s = str(dim)
    return _DIMENSION_WORDS.get(s, s)


def to_si(value, unit: str, name: str):
    """``value`` in the SI unit ``unit``: a pint quantity is converted, anything else is returned as given.

    Parameters
    ----------
    value : number, array_like or pint Quantity
        A plain number or array (taken to be in ``unit`` already) or a pint
        quantity of any unit of the same dimension (offset units such as degC
        are converted as absolute temperatures).
    unit : str
        The SI unit the engine works in, as pint reads it (``"K"``, ``"m"``,
        ``"rad/s"``, ``""`` for a pure number).
    name : str
        The argument's name, for the error message.

    Returns
    -------
    float or ndarray or the value unchanged
        A converted quantity comes back as a float (scalar) or a float array.

    Raises
    ------
    ParameterError
        For a quantity of another dimension (e.g. metres given as a
        temperature), naming the argument.
    """
    if not is_quantity(value):
        return value
    import pint  # only when a quantity arrived: pint is already loaded by the caller then

    target = unit if unit else "dimensionless"
    try:
        converted = value.to(target)
    except pint.DimensionalityError:
        want = _words(value._REGISTRY.parse_units(target).dimensionality if unit else "dimensionless")
        got = _words(value.dimensionality)
        raise ParameterError(
            f"{name} must be in {unit or 'no unit'} ({want}), got {value.magnitude!r} {value.units} ({got})"
        ) from None
    except (pint.errors.OffsetUnitCalculusError, pint.errors.UndefinedUnitError, ValueError, TypeError) as exc:
        raise ParameterError(f"{name}: cannot convert {value!r} to {unit or 'a pure number'} ({exc})") from None
    mag = converted.magnitude
    arr = np.asarray(mag, dtype=float)
    return float(arr) if arr.ndim == 0 else arr
