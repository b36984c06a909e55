"""PointDefect scattering (one mechanism: its class and its registration)."""
from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from ..dispersion import Branch
from ..errors import ParameterError
from ._base import Mechanism, _Spec, register

__all__ = ["PointDefect"]


@register
@dataclass(frozen=True)
class PointDefect(Mechanism):
    """Point-defect (Rayleigh) scattering: 1/tau = A omega^4.

    Either give ``A`` directly [s^3], or use :meth:`from_gamma` for Klemens'
    form A = V0 Gamma / (4 pi v^3), evaluated with each branch's own sound
    velocity v.

    Parameters
    ----------
    A : float, optional
        Coefficient of omega^4 [s^3].
    gamma : float, optional
        Scattering parameter Gamma = sum_i f_i (1 - M_i/M)^2 (+ strain terms)
        [dimensionless].
    volume_per_atom : float, optional
        Volume per atom V0, needed with ``gamma`` [m^3].

    Notes
    -----
    Klemens, Proc. Phys. Soc. A 68, 1113 (1955), Eq. 3.14 in the form of
    reference notes; for a dispersive branch the low-frequency (sound)
    velocity is used (common practice).
    """

    A: float | None = None
    gamma: float | None = None
    volume_per_atom: float | None = None
    name: str = "point_defect"
    applies_to: tuple | None = None

    kind: ClassVar[str] = "point_defect"
    label: ClassVar[str] = "Point defects (mass disorder)"
    colour: ClassVar[str] = "#2ca02c"
    _spec: ClassVar[dict] = {
        "A": _Spec("s^3", "point-defect strength A (rate A ω⁴)", (1e-48, 1e-38), power=1.0),
        "gamma": _Spec("", "mass-disorder strength Γ", (1e-7, 1.0), power=1.0),
        "volume_per_atom": _Spec("m^3", "volume per atom", (1e-30, 1e-27), fixed=True, power=1.0),
    }

    def __post_init__(self):
        super().__post_init__()
        if (self.A is None) == (self.gamma is None):
            raise ParameterError(f"{self.name}: give exactly one of A [s^3] or gamma (with volume_per_atom)")
        if self.gamma is not None and self.volume_per_atom is None:
            raise ParameterError(f"{self.name}: gamma needs volume_per_atom [m^3]")

    @classmethod
    def example(cls) -> "PointDefect":
        """Klemens' form with Gamma = 1e-4 and a volume per atom of 2e-29 m^3 (Si-like, invented)."""
        return cls(gamma=1e-4, volume_per_atom=2e-29)

    @classmethod
    def examples(cls) -> tuple:
        """Klemens' form and the bare coefficient A = 1.3e-45 s^3 (invented, Si-like)."""
        return (cls.example(), cls(A=1.3e-45))

    @classmethod
    def from_gamma(cls, gamma: float, volume_per_atom: float, **kw) -> "PointDefect":
        """Klemens' point-defect scattering from Gamma and the volume per atom [m^3]."""
        return cls(gamma=gamma, volume_per_atom=volume_per_atom, **kw)

    def coefficient(self, branch: Branch) -> float:
        """A for this branch [s^3]."""
        if self.A is not None:
            return self.A
        return self.volume_per_atom * self.gamma / (4.0 * np.pi * branch.velocity**3)

    def rate_terms(self, branch, T):
        return ((4.0, self.coefficient(branch)),)
