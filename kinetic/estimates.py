"""Quick estimators: Slack's high-temperature conductivity and the
Cahill-Watson-Pohl minimum (amorphous-limit) conductivity.
"""
from __future__ import annotations

import numpy as np
from scipy.constants import hbar, k as kB

from . import quadrature as quad
from ._validate import positive, temperatures as _check_T
from .errors import ParameterError

__all__ = ["slack_prefactor", "slack_kappa", "slack_gruneisen", "slack_kappa_for", "cahill_minimum", "cahill_minimum_for"]


def slack_prefactor(gruneisen):
    """A(gamma) of Slack's formula [W m^-1 K^-1 in Slack's mixed units].

    A(gamma) = 2.4294e-6 / (1 - 0.514/gamma + 0.228/gamma^2), the Julian form
    (Julian, Phys. Rev. 137, A128, 1965), which gives the often quoted
    3.04e-6 at gamma = 2 (Morelli & Slack 2006, from memory).
    """
    g = positive("gruneisen", gruneisen)
    return 2.4294e-6 / (1.0 - 0.514 / g + 0.228 / g**2)


def slack_kappa(temperature, *, atomic_mass, volume_per_atom, theta_acoustic, gruneisen, atoms_per_cell):
    """Slack's estimate of the lattice conductivity at T >~ theta [W m^-1 K^-1].

    kappa = A(gamma) M delta theta_a^3 n^(1/3) / (gamma^2 T), with M the mean
    atomic mass in u, delta = V0^(1/3) in Angstrom, theta_a the acoustic-branch
    Debye temperature, n atoms per primitive cell (Slack, Solid State Phys. 34,
    1, 1979; Morelli & Slack 2006, Eq. 1.10). With the full Debye temperature
    use theta_a = theta_D n^(-1/3) (common practice).

    Parameters
    ----------
    temperature : array_like [K]
    atomic_mass : float [u]
    volume_per_atom : float [m^3]
    theta_acoustic : float [K]
    gruneisen : float [dimensionless]
    atoms_per_cell : int
    """
    T = _check_T(temperature)
    M = positive("atomic_mass", atomic_mass, unit="u")
    delta = positive("volume_per_atom", volume_per_atom, unit="m^3") ** (1.0 / 3.0) * 1e10
    th = positive("theta_acoustic", theta_acoustic, unit="K")
    n = positive("atoms_per_cell", atoms_per_cell)
    return slack_prefactor(gruneisen) * M * delta * th**3 * n ** (1.0 / 3.0) / (gruneisen**2 * T)


def slack_gruneisen(material) -> float:
    """The Grüneisen parameter for Slack's formula: the preset's ``gruneisen_slack``.

    Never the thermodynamic gamma_th (``Material.gruneisen`` of the presets),
    which is about half the fitted value Slack's formula needs for the
    diamond-structure solids (reference/README.md) and would overstate kappa
    by ~4x (Si: ~510 instead of ~150 W/m/K at 300 K).

    Raises
    ------
    ParameterError
        The material is not a preset with a Slack gamma: says how to give one.
    """
    from .presets import PRESETS

    name = getattr(material, "name", str(material))
    entry = PRESETS.get(name, {}).get("gruneisen_slack") or {}
    g = entry.get("value")
    if g is None:
        raise ParameterError(
            f"material {name!r} has no Grüneisen parameter for Slack's formula (preset field "
            "'gruneisen_slack'); pass gruneisen= (the fitted Slack gamma, typically 1-2; not the "
            "thermodynamic gamma)")
    return float(g)


def slack_kappa_for(material, temperature, *, gruneisen=None):
    """Slack's estimate for a :class:`~kinetic.materials.Material` [W m^-1 K^-1].

    theta_a = theta_D n^(-1/3) (common practice) and gamma = ``gruneisen`` or
    the preset's Slack gamma (:func:`slack_gruneisen`, never the thermodynamic
    one). For Si (gamma 1.06, from memory, Morelli & Slack 2006) this gives
    ~129 W/m/K at 300 K against the measured 148-156.

    Raises
    ------
    ParameterError
        No Slack gamma in the preset and none given.
    """
    g = slack_gruneisen(material) if gruneisen is None else gruneisen
    n = material.atoms_per_cell
    return slack_kappa(temperature, atomic_mass=material.atomic_mass, volume_per_atom=material.volume_per_atom,
                       theta_acoustic=material.debye_temperature * n ** (-1.0 / 3.0), gruneisen=g,
                       atoms_per_cell=n)


def cahill_minimum(temperature, number_density, velocities):
    """Cahill-Watson-Pohl minimum thermal conductivity [W m^-1 K^-1].

    kappa_min = (pi/6)^(1/3) kB n^(2/3) sum_i v_i (T/Theta_i)^2
                int_0^(Theta_i/T) x^3 e^x / (e^x - 1)^2 dx,
    Theta_i = v_i (hbar / kB)(6 pi^2 n)^(1/3)
    (Cahill, Watson & Pohl, Phys. Rev. B 46, 6131, 1992, Eq. 3).

    Parameters
    ----------
    temperature : array_like [K]
    number_density : float
        Atoms per volume n [m^-3].
    velocities : sequence of float
        Sound velocities of the three polarisations, e.g. (vL, vT, vT) [m s^-1].
    """
    T = _check_T(temperature)
    shape = np.shape(T)
    Tf = np.atleast_1d(T).ravel()
    n = positive("number_density", number_density, unit="m^-3")
    vs = np.atleast_1d(positive("velocities", velocities, unit="m/s"))
    total = np.zeros_like(Tf)
    for v in vs:
        theta = v * (hbar / kB) * (6.0 * np.pi**2 * n) ** (1.0 / 3.0)
        x_max = theta / Tf
        r = np.minimum(1.0, quad.X_CUT / x_max)
        u, w = quad.log_nodes(r)
        x = x_max[:, None] * u
        f = x * quad.planck_weight(x) * x_max[:, None]  # x^3 e^x/(e^x-1)^2 dx = x * planck * x_max du
        integral = np.einsum("ij,ij->i", w, f) + quad.lower_tail(u, f)
        total += v * integral / x_max**2
    out = (np.pi / 6.0) ** (1.0 / 3.0) * kB * n ** (2.0 / 3.0) * total
    return out.reshape(shape)


def cahill_minimum_for(material, temperature):
    """Cahill-Watson-Pohl minimum for a material (vL, vT, vT, or 3 x v_D)."""
    if material.has_split_velocities:
        vs = (material.velocity_longitudinal, material.velocity_transverse, material.velocity_transverse)
    else:
        vs = (material.velocity_debye,) * 3
    return cahill_minimum(temperature, material.number_density, vs)
