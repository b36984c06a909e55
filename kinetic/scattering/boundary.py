"""Boundary scattering (one mechanism: its class and its registration)."""
from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

from ._base import Mechanism, _full, _omega_T, _Spec, register

__all__ = ["Boundary"]


@register
@dataclass(frozen=True)
class Boundary(Mechanism):
    """Boundary (Casimir) scattering: 1/tau = v_g / L_eff.

    Parameters
    ----------
    length : float
        Boundary length L: grain size, film thickness or Casimir length [m].
    specularity : float
        Fraction p of specular reflections, 0 <= p < 1; Ziman's effective
        length L_eff = L (1 + p) / (1 - p) [dimensionless].

    Notes
    -----
    Casimir, Physica 5, 495 (1938); specularity correction from Ziman,
    *Electrons and Phonons* (Oxford, 1960), sec. 11.4 (common practice). Uses the
    branch group velocity, so it falls at the zone edge for a sine dispersion.

    Examples
    --------
    >>> from kinetic import Branch
    >>> float(Boundary(1e-3).rate(1e12, 300.0, Branch(5000.0, 400.0)))   # v / L [s^-1]
    5000000.0
    >>> Boundary.label, Boundary.colour
    ('Boundaries (grain size)', '#1f77b4')
    """

    length: float = 1e-3
    specularity: float = 0.0
    name: str = "boundary"
    applies_to: tuple | None = None

    kind: ClassVar[str] = "boundary"
    label: ClassVar[str] = "Boundaries (grain size)"
    colour: ClassVar[str] = "#1f77b4"
    limits_mean_free_path: ClassVar[bool] = True
    _spec: ClassVar[dict] = {
        "length": _Spec("m", "grain size (boundary length)", (1e-9, 1e-1), power=-1.0),
        "specularity": _Spec("", "share of specular reflections p", (0.0, 0.99), log=False,
                             allow_zero=True, upper_open=True),
    }

    @property
    def effective_length(self) -> float:
        """Ziman's effective length L (1 + p) / (1 - p) [m]."""
        p = self.specularity
        return self.length * (1.0 + p) / (1.0 - p)

    def rate_terms(self, branch, T):
        # a Debye branch's group velocity is its sound velocity: a constant rate
        if branch.dispersion != "debye":
            return None
        return ((0.0, branch.velocity / self.effective_length),)

    def rate(self, omega, T, branch):
        if branch.dispersion == "debye":
            return super().rate(omega, T, branch)
        omega, T = _omega_T(omega, T)
        return _full(branch.group_velocity(omega) / self.effective_length, omega, T)
