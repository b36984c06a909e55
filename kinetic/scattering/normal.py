"""Normal scattering (one mechanism: its class and its registration)."""
from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from ._base import Mechanism, _power, _Spec, register

__all__ = ["Normal"]


@register
@dataclass(frozen=True)
class Normal(Mechanism):
    """Normal (momentum-conserving) three-phonon processes: 1/tau_N = B omega^n T^m.

    Defaults n = 2, m = 3 (Callaway, Phys. Rev. 113, 1046, 1959, Eq. 22's
    B2 T^3 omega^2); Holland's transverse branch uses n = 1, m = 4 (Holland,
    Phys. Rev. 132, 2461, 1963). Not resistive: it enters through Callaway's
    correction term, branch by branch.

    Parameters
    ----------
    B : float
        Prefactor [s^(n-1) K^-m].
    omega_power : float
        n [dimensionless].
    temperature_power : float
        m [dimensionless].
    """

    B: float = 1e-24
    omega_power: float = 2.0
    temperature_power: float = 3.0
    name: str = "normal"
    applies_to: tuple | None = None

    kind: ClassVar[str] = "normal"
    label: ClassVar[str] = "Normal processes"
    colour: ClassVar[str] = "#9467bd"
    resistive: ClassVar[bool] = False
    _spec: ClassVar[dict] = {
        "B": _Spec("s^(n-1) K^-m", "normal-process strength B", (1e-30, 1e-8), power=1.0),
        "omega_power": _Spec("", "normal processes: power of frequency n", (0.5, 4.0), log=False, fixed=True),
        "temperature_power": _Spec("", "normal processes: power of temperature m", (0.5, 5.0), log=False,
                                   fixed=True),
    }

    def rate_terms(self, branch, T):
        return ((self.omega_power, self.B * _power(np.asarray(T, dtype=float), self.temperature_power)),)
