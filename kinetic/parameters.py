"""Parameter metadata shared by scattering mechanisms, the fitter and the widgets.

A mechanism declares its parameters once (value, unit, bounds, log scale,
description); the fitter builds its free-parameter vector from this and the
workbench builds its sliders from it, so a new mechanism gets both for free.
"""
from __future__ import annotations

from dataclasses import dataclass, replace


@dataclass(frozen=True)
class Parameter:
    """A named model parameter with its metadata.

    Parameters
    ----------
    name : str
        Short name inside its mechanism (``"length"``, ``"B"``).
    value : float
        Current value, in SI units given by ``unit``.
    unit : str
        SI unit as text, e.g. ``"m"``, ``"s K^-1"``, ``""`` for dimensionless.
    description : str
        One line of plain words for labels and reports.
    bounds : tuple of float
        Physically sensible range ``(lo, hi)`` used by sliders and as default
        fit bounds.
    log : bool
        True when the parameter spans decades (sliders and fits work in log10).
    fixed : bool
        True for parameters that describe the material rather than the
        mechanism's strength (e.g. a stored atomic mass); the fitter leaves them
        out of its default free set.
    """

    name: str
    value: float
    unit: str = ""
    description: str = ""
    bounds: tuple = (0.0, float("inf"))
    log: bool = True
    fixed: bool = False

    def with_value(self, value: float) -> "Parameter":
        return replace(self, value=float(value))

    @property
    def label(self) -> str:
        """``"description [unit]"`` for axis and slider labels."""
        u = f" [{self.unit}]" if self.unit else ""
        return f"{self.description or self.name}{u}"
