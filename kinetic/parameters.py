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
    rate_power : float or None
        k when the mechanism's rate goes as value**k at fixed everything else
        (1 for a coefficient that enters linearly, -1 for a boundary length,
        2 for a Grüneisen parameter squared); the engine then differentiates
        its integrals exactly (:meth:`kinetic.LatticeModel.kappa_jacobian`).
        None for anything else (exponents, specularity): a finite difference.

    Examples
    --------
    >>> p = Parameter("length", 1e-6, unit="m", description="grain size / boundary length", rate_power=-1)
    >>> p.label
    'grain size / boundary length [m]'
    >>> p.linear, Parameter("A", 1e-44, rate_power=1).linear
    (False, True)
    """

    name: str
    value: float
    unit: str = ""
    description: str = ""
    bounds: tuple = (0.0, float("inf"))
    log: bool = True
    fixed: bool = False
    rate_power: float | None = None

    @property
    def linear(self) -> bool:
        """True when the mechanism's rate is proportional to this parameter."""
        return self.rate_power == 1

    def with_value(self, value: float) -> "Parameter":
        return replace(self, value=float(value))

    @property
    def label(self) -> str:
        """Plain words of the trade with the unit, ``"description [unit]"``, for axis and slider labels."""
        u = f" [{self.unit}]" if self.unit else ""
        return f"{self.description or self.name}{u}"
