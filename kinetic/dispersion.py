"""Phonon branches: Debye (linear) or sine (Born-von Karman) dispersion.

A :class:`Branch` stands for one, two or three acoustic polarisations sharing a
dispersion relation omega(q). It is described by its sound velocity ``v0`` (the
slope at q -> 0) and its Debye temperature ``theta``, which fixes the radius of
its Debye sphere, q_max = kB theta / (hbar v0). Every branch therefore holds
exactly ``polarizations`` modes per atom when theta = hbar v0 (6 pi^2 n)^(1/3) / kB
(Debye's counting, n atoms per volume), whatever its dispersion, and its heat
capacity tends to Dulong-Petit's ``polarizations`` x kB per atom at high T. The
engine integrates over the reduced wavevector u = q / q_max in (0, 1].

* ``"debye"``: omega = v0 q; omega_max = kB theta / hbar; group velocity v0.
* ``"sine"``: omega = omega_max sin(pi u / 2) with omega_max = (2 / pi) kB theta / hbar,
  so that the slope at q -> 0 is v0 = omega_max pi / (2 q_max); group velocity
  v0 cos(pi u / 2) falls to zero at the zone edge. Born & von Karman's
  one-dimensional chain on a Debye-sphere zone, as used for phonon transport by
  e.g. Chung, McGaughey & Kaviany, J. Heat Transfer 126, 376 (2004).

A sine branch has two numbers to match (slope and zone-edge frequency) but only
one free (omega_max, once q_max = q_D is fixed by the mode count).
:meth:`Branch.from_zone_edge` matches the ZONE-EDGE frequency of a measured
dispersion curve (then the slope v0 = pi omega_edge / (2 q_D) is below the sound
velocity for flat transverse branches); the plain constructor matches the sound
velocity (then omega_max = 2 v0 q_D / pi).
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.constants import hbar
from scipy.constants import k as kB

from ._validate import positive
from .errors import ParameterError

DISPERSIONS = ("debye", "sine")


@dataclass(frozen=True)
class Branch:
    """An acoustic phonon branch (one to three polarisations).

    Parameters
    ----------
    velocity : float
        Sound velocity v0, the slope d omega / dq at q -> 0 [m s^-1].
    debye_temperature : float
        Branch Debye temperature theta, which fixes the Debye-sphere radius
        q_max = kB theta / (hbar v0); omega_max = kB theta / hbar for a Debye
        branch, (2 / pi) kB theta / hbar for a sine branch [K].
    polarizations : int
        Number of polarisations this branch stands for (1, 2 or 3).
    dispersion : {"debye", "sine"}
        Shape of omega(q); see the module docstring.
    name : str
        Label used in per-branch results (``"L"``, ``"T"``, ``"avg"``).

    Raises
    ------
    ParameterError
        For a non-positive velocity or temperature, a polarisation count
        outside 1..3 or an unknown dispersion.

    Examples
    --------
    >>> b = Branch(5000.0, 400.0)
    >>> round(b.omega_max / 1e13, 4)   # kB * 400 K / hbar
    5.2368
    >>> s = Branch(5000.0, 400.0, dispersion="sine")
    >>> s.q_max == b.q_max             # same Debye sphere, same number of modes
    True
    >>> round(s.omega_max / b.omega_max, 4)   # 2 / pi
    0.6366
    """

    velocity: float
    debye_temperature: float
    polarizations: int = 3
    dispersion: str = "debye"
    name: str = "avg"

    def __post_init__(self):
        object.__setattr__(self, "velocity", positive("velocity", self.velocity, unit="m/s"))
        object.__setattr__(
            self, "debye_temperature", positive("debye_temperature", self.debye_temperature, unit="K")
        )
        if self.polarizations not in (1, 2, 3):
            raise ParameterError(f"polarizations must be 1, 2 or 3, got {self.polarizations!r}")
        if self.dispersion not in DISPERSIONS:
            raise ParameterError(
                f"dispersion must be one of {', '.join(DISPERSIONS)}, got {self.dispersion!r}"
            )

    @classmethod
    def from_zone_edge(cls, frequency: float, q_debye: float, polarizations: int = 1, *,
                       name: str = "avg") -> Branch:
        """A sine branch whose zone-edge frequency is ``frequency`` [Hz] at q = ``q_debye`` [m^-1].

        The slope at q -> 0 is then v0 = pi omega_edge / (2 q_D) and the Debye
        temperature hbar v0 q_D / kB = (pi / 2) h f / kB; the branch holds
        ``polarizations`` modes per atom when ``q_debye`` = (6 pi^2 n)^(1/3).

        Examples
        --------
        >>> b = Branch.from_zone_edge(4.0e12, 1.436e10, 2, name="T")
        >>> round(b.omega_max / (2 * np.pi * 4.0e12), 12)
        1.0
        >>> round(b.q_max / 1.436e10, 12)
        1.0
        """
        omega_e = 2.0 * np.pi * positive("zone-edge frequency", frequency, unit="Hz")
        q = positive("q_debye", q_debye, unit="m^-1")
        v0 = np.pi * omega_e / (2.0 * q)
        return cls(float(v0), float(hbar * v0 * q / kB), polarizations, dispersion="sine", name=name)

    @property
    def omega_max(self) -> float:
        """Largest angular frequency of the branch (at the zone edge) [rad s^-1]."""
        w_debye = kB * self.debye_temperature / hbar
        if self.dispersion == "sine":
            return (2.0 / np.pi) * w_debye
        return w_debye

    @property
    def q_max(self) -> float:
        """Radius of the branch's Debye sphere, kB theta / (hbar v0) [m^-1]."""
        return kB * self.debye_temperature / (hbar * self.velocity)

    # --- functions of the reduced wavevector u = q / q_max in (0, 1] -------------
    def omega_of_u(self, u):
        """Angular frequency at reduced wavevector u [rad s^-1]."""
        if self.dispersion == "sine":
            return self.omega_max * np.sin(0.5 * np.pi * u)
        return self.omega_max * u

    def group_velocity_of_u(self, u):
        """Group velocity d omega / dq at reduced wavevector u [m s^-1].

        For a Debye branch this is the constant ``velocity`` (a float, which
        broadcasts against any array).
        """
        if self.dispersion == "sine":
            return self.velocity * np.cos(0.5 * np.pi * u)
        return self.velocity

    def u_of_omega(self, omega):
        """Inverse of :meth:`omega_of_u`; omega is clipped to [0, omega_max]."""
        r = np.clip(np.asarray(omega, dtype=float) / self.omega_max, 0.0, 1.0)
        if self.dispersion == "sine":
            return (2.0 / np.pi) * np.arcsin(r)
        return r

    def group_velocity(self, omega):
        """Group velocity at angular frequency omega [m s^-1]."""
        return self.group_velocity_of_u(self.u_of_omega(omega))

    def phase_velocity(self, omega):
        """Phase velocity omega / q at angular frequency omega [m s^-1]."""
        u = self.u_of_omega(omega)
        w = self.omega_of_u(u)
        q = u * self.q_max
        return np.where(q > 0, w / np.where(q > 0, q, 1.0), self.velocity)

    @property
    def zone_edge_frequency(self) -> float:
        """Frequency at the zone edge, omega_max / (2 pi) [Hz]."""
        return self.omega_max / (2.0 * np.pi)

    @property
    def mode_density(self) -> float:
        """Number of modes per unit volume held by the branch [m^-3]."""
        return self.polarizations * self.q_max**3 / (6.0 * np.pi**2)

    def to_dict(self) -> dict:
        return {
            "velocity": self.velocity,
            "debye_temperature": self.debye_temperature,
            "polarizations": self.polarizations,
            "dispersion": self.dispersion,
            "name": self.name,
        }

    @classmethod
    def from_dict(cls, d: dict) -> Branch:
        return cls(**d)
