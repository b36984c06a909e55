"""Umklapp scattering (one mechanism: its class and its registration)."""
from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

import numpy as np
from scipy.constants import atomic_mass, hbar

from ..dispersion import Branch
from ..errors import ParameterError
from ._base import Mechanism, _Spec, register

__all__ = ["Umklapp"]


@register
@dataclass(frozen=True)
class Umklapp(Mechanism):
    """Umklapp three-phonon scattering: 1/tau = B omega^2 T exp(-theta / (b T)).

    ``theta`` is the branch's own Debye temperature. Give ``B`` [s K^-1]
    directly, or use :meth:`from_material` for the Slack-style prefactor
    B = hbar gamma^2 / (M v^2 theta) evaluated per branch (M the mean atomic
    mass, v and theta the branch's velocity and Debye temperature).

    Parameters
    ----------
    B : float, optional
        Prefactor [s K^-1].
    gruneisen : float, optional
        Grüneisen parameter gamma, with ``atomic_mass`` [dimensionless].
    atomic_mass : float, optional
        Mean atomic mass M [kg].
    b : float
        Exponent divisor in exp(-theta / (b T)); 3 after Slack & Galginaitis
        [dimensionless].

    Notes
    -----
    Slack & Galginaitis, Phys. Rev. 133, A253 (1964); prefactor as in
    Morelli, Heremans & Slack, Phys. Rev. B 66, 195304 (2002), Eq. 9.
    """

    B: float | None = None
    gruneisen: float | None = None
    atomic_mass: float | None = None
    b: float = 3.0
    name: str = "umklapp"
    applies_to: tuple | None = None

    kind: ClassVar[str] = "umklapp"
    label: ClassVar[str] = "Umklapp (anharmonic)"
    colour: ClassVar[str] = "#d62728"
    _spec: ClassVar[dict] = {
        "B": _Spec("s K^-1", "Umklapp strength B", (1e-22, 1e-15), power=1.0),
        "gruneisen": _Spec("", "Grüneisen parameter", (0.1, 10.0), power=2.0),
        "atomic_mass": _Spec("kg", "mean atomic mass", (1e-27, 1e-24), fixed=True, power=-1.0),
        "b": _Spec("", "Umklapp onset factor b, in exp(−θ/bT)", (1.0, 10.0), log=False),
    }

    def __post_init__(self):
        super().__post_init__()
        if (self.B is None) == (self.gruneisen is None):
            raise ParameterError(f"{self.name}: give exactly one of B [s K^-1] or gruneisen (with atomic_mass)")
        if self.gruneisen is not None and self.atomic_mass is None:
            raise ParameterError(f"{self.name}: gruneisen needs atomic_mass [kg]")

    @classmethod
    def example(cls) -> "Umklapp":
        """B = 2e-19 s/K, b = 3 (Si-like order of magnitude, invented)."""
        return cls(B=2e-19)

    @classmethod
    def examples(cls) -> tuple:
        """The bare prefactor and Slack's form (gamma = 1, M = 4.66e-26 kg, Si-like, invented)."""
        return (cls.example(), cls(gruneisen=1.0, atomic_mass=4.66e-26))

    @classmethod
    def from_material(cls, material, *, gruneisen: float | None = None, b: float = 3.0, **kw) -> "Umklapp":
        """Slack-style Umklapp from a :class:`kinetic.materials.Material`.

        ``gruneisen`` defaults to the material's own (for the Si-type presets the
        thermodynamic value, which makes Umklapp too weak in this model); pass
        the preset's calibrated ``material.umklapp_fit["avg"|"split"]`` values,
        as :func:`kinetic.fitting.default_model` does, for a model that
        reproduces the reference k(T) table.
        """
        g = material.gruneisen if gruneisen is None else gruneisen
        if g is None:
            raise ParameterError(
                f"material {material.name!r} has no Grüneisen parameter; pass gruneisen= explicitly"
            )
        return cls(gruneisen=g, atomic_mass=material.atomic_mass * atomic_mass, b=b, **kw)

    def coefficient(self, branch: Branch) -> float:
        """B for this branch [s K^-1]."""
        if self.B is not None:
            return self.B
        return hbar * self.gruneisen**2 / (
            self.atomic_mass * branch.velocity**2 * branch.debye_temperature
        )

    def rate_terms(self, branch, T):
        T = np.asarray(T, dtype=float)
        # exp of a large negative argument underflows quietly to 0 (no warning).
        c = np.exp((-branch.debye_temperature / self.b) / T)
        c *= T
        c *= self.coefficient(branch)
        return ((2.0, c),)
