"""Dislocation scattering (one mechanism: its class and its registration)."""
from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from ._base import Mechanism, _Spec, register

__all__ = ["Dislocation"]


@register
@dataclass(frozen=True)
class Dislocation(Mechanism):
    """Dislocation scattering: core (omega^3) plus strain-field (omega) terms.

    1/tau_core   = eta N_D V0^(4/3) omega^3 / v^2
    1/tau_strain = eta (2^(3/2) / 3^(7/2)) N_D b^2 gamma^2 omega
                   [1/2 + (1/24) ((1 - 2 r)/(1 - r))^2 (1 + sqrt(2) (vL/vT)^2)^2]

    Parameters
    ----------
    density : float
        Dislocation density N_D [m^-2].
    burgers : float
        Burgers vector magnitude b [m].
    gruneisen : float
        Grüneisen parameter gamma [dimensionless].
    volume_per_atom : float
        V0 for the core term [m^3].
    poisson_ratio : float
        r [dimensionless].
    velocity_ratio : float
        vL / vT [dimensionless].
    orientation : float
        eta, the averaging factor for dislocation orientation (0.55 for a
        random arrangement) [dimensionless].

    Notes
    -----
    Core and strain forms after Klemens (Proc. Phys. Soc. A 68, 1113, 1955)
    and Carruthers (Rev. Mod. Phys. 33, 92, 1961) as written by Kim et al.,
    Science 348, 109 (2015), supplementary Eqs. S5-S6 (from memory).
    """

    density: float = 1e14
    burgers: float = 4e-10
    gruneisen: float = 1.5
    volume_per_atom: float = 2e-29
    poisson_ratio: float = 0.3
    velocity_ratio: float = 1.7
    orientation: float = 0.55
    name: str = "dislocation"
    applies_to: tuple | None = None

    kind: ClassVar[str] = "dislocation"
    label: ClassVar[str] = "Dislocations"
    colour: ClassVar[str] = "#e377c2"
    _spec: ClassVar[dict] = {
        "density": _Spec("m^-2", "dislocation density", (1e8, 1e18), power=1.0),
        "burgers": _Spec("m", "Burgers vector length", (1e-10, 2e-9), fixed=True),
        "gruneisen": _Spec("", "Grüneisen parameter", (0.1, 10.0), fixed=True),
        "volume_per_atom": _Spec("m^3", "volume per atom", (1e-30, 1e-27), fixed=True),
        "poisson_ratio": _Spec("", "Poisson ratio", (0.0, 0.5), log=False, fixed=True,
                               allow_zero=True, upper_open=True),
        "velocity_ratio": _Spec("", "ratio of sound velocities vL / vT", (1.0, 3.0), log=False, fixed=True),
        "orientation": _Spec("", "orientation factor η (dislocations to heat flow)", (0.1, 1.0), log=False, fixed=True, power=1.0),
    }

    def rate_terms(self, branch, T):
        r = self.poisson_ratio
        core = self.orientation * self.density * self.volume_per_atom ** (4.0 / 3.0) / branch.velocity**2
        bracket = 0.5 + (1.0 / 24.0) * ((1 - 2 * r) / (1 - r)) ** 2 * (1 + np.sqrt(2.0) * self.velocity_ratio**2) ** 2
        strain = (self.orientation * 2**1.5 / 3**3.5 * self.density * self.burgers**2
                  * self.gruneisen**2 * bracket)
        return ((3.0, core), (1.0, strain))
