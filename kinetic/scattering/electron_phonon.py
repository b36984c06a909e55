"""ElectronPhonon scattering (one mechanism: its class and its registration)."""
from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

from ._base import Mechanism, _Spec, register

__all__ = ["ElectronPhonon"]


@register
@dataclass(frozen=True)
class ElectronPhonon(Mechanism):
    """Phonon scattering by free carriers, simplest form: 1/tau = C omega.

    Parameters
    ----------
    C : float
        Coefficient [dimensionless].

    Notes
    -----
    Ziman, Phil. Mag. 1, 191 (1956): proportional to omega when the phonon
    wavevector is small against the Fermi wavevector.
    """

    C: float = 1e-4
    name: str = "electron_phonon"
    applies_to: tuple | None = None

    kind: ClassVar[str] = "electron_phonon"
    label: ClassVar[str] = "Free carriers"
    colour: ClassVar[str] = "#8c564b"
    _spec: ClassVar[dict] = {"C": _Spec("", "electron-phonon scattering strength C", (1e-8, 1e-1), power=1.0)}

    def rate_terms(self, branch, T):
        return ((1.0, self.C),)
