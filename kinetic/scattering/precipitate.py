"""Precipitate scattering (one mechanism: its class and its registration)."""
from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from ._base import Mechanism, _full, _omega_T, _power, _Spec, register

__all__ = ["Precipitate"]


@register
@dataclass(frozen=True)
class Precipitate(Mechanism):
    """Scattering by nanoprecipitates, bridging the Rayleigh and geometric limits.

    1/tau = v n_p sigma, with 1/sigma = 1/sigma_geometric + 1/sigma_Rayleigh,
    sigma_geometric = 2 pi R^2 and
    sigma_Rayleigh = pi R^2 (4/9) (dD/D)^2 (omega R / v)^4.

    Parameters
    ----------
    radius : float
        Precipitate radius R [m].
    number_density : float
        Precipitates per volume n_p [m^-3].
    density_contrast : float
        Relative density mismatch dD/D between particle and host
        [dimensionless].

    Notes
    -----
    Kim & Majumdar, J. Appl. Phys. 99, 084306 (2006), Eqs. 12-14 (from memory):
    omega^4 at small omega R / v, constant 2 pi R^2 when omega R / v >> 1.
    """

    radius: float = 2e-9
    number_density: float = 1e23
    density_contrast: float = 1.0
    name: str = "precipitate"
    applies_to: tuple | None = None

    kind: ClassVar[str] = "precipitate"
    label: ClassVar[str] = "Nanoprecipitates"
    colour: ClassVar[str] = "#17becf"
    _spec: ClassVar[dict] = {
        "radius": _Spec("m", "precipitate radius", (2e-10, 1e-6)),
        "number_density": _Spec("m^-3", "precipitates per volume", (1e15, 1e27), power=1.0),
        "density_contrast": _Spec("", "density contrast ΔD/D", (1e-3, 10.0), fixed=True),
    }

    def rate(self, omega, T, branch):
        omega, T = _omega_T(omega, T)
        v = branch.velocity
        R = self.radius
        geometric = 2.0 * np.pi * R**2
        # harmonic mean written so omega -> 0 gives 0 without dividing by zero
        y4 = _power(omega * (R / v), 4.0)
        rayleigh_over_y4 = np.pi * R**2 * (4.0 / 9.0) * self.density_contrast**2
        sigma = geometric * rayleigh_over_y4 * y4 / (geometric + rayleigh_over_y4 * y4)
        return _full(v * self.number_density * sigma, omega, T)
