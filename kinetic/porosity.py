"""Porosity: correct the k of a pellet to the k of the full-density solid.

A pressed or sintered pellet of relative density d = rho_pellet / rho_full
holds a pore fraction phi = 1 - d.  Pores filled with gas conduct far less
than the solid (air 0.026 W/(m K) against 1-100 W/(m K); common practice is to
take them as insulating, k_pore = 0, which is what :func:`full_density_kappa`
does), so the measured k is lower than that of the dense solid.  Each
relation below gives k_pellet / k_full = f(phi); the correction divides by it.

==================  ===========================================  =====================
name                k / k0 for insulating pores (k_pore = 0)     valid for
==================  ===========================================  =====================
maxwell-eucken      2 (1 - phi) / (2 + phi)                      dilute, isolated
                                                                 spherical pores in a
                                                                 continuous solid,
                                                                 phi <~ 0.15 (upper
                                                                 Hashin-Shtrikman
                                                                 bound)
landauer            1 - 3 phi / 2  (zero at phi = 2/3)           random mixtures of
                                                                 solid and pores, no
                                                                 phase preferred;
                                                                 phi < 2/3
dem                 (1 - phi)^(3/2)                              spherical pores added
                                                                 step by step to the
                                                                 solid, all phi < 1
loeb                1 - phi                                      pores elongated along
                                                                 the heat flow (Loeb's
                                                                 pore-shape factor 1),
                                                                 no radiation
==================  ===========================================  =====================

Sources: Maxwell, *A Treatise on Electricity and Magnetism* (1873), vol. 1,
Art. 314; Eucken, VDI-Forschungsheft 353 (1932); Hashin & Shtrikman, J. Appl.
Phys. 33, 3125 (1962) (the Maxwell-Eucken forms are their bounds for an
isotropic two-phase medium); Landauer, J. Appl. Phys. 23, 779 (1952) (the
symmetric effective-medium equation of Bruggeman 1935); Bruggeman, Ann. Phys.
416, 636 (1935) (the asymmetric, "differential" scheme, which gives the 3/2
power for spherical insulating inclusions); Loeb, J. Am. Ceram. Soc. 37, 96
(1954) (from memory).  Carson, Lovatt, Tanner & Cleland, Int. J. Heat Mass
Transfer 48, 2150 (2005) place the effective-medium curve between the two
Maxwell-Eucken bounds and use it to divide "internal" from "external"
porosity.

The correction is an explicit step with its own uncertainty: the spread of
the other relations around the chosen one (:func:`full_density_kappa`).

>>> round(float(ratio("maxwell-eucken", 0.1)), 6)   # 2 x 0.9 / 2.1
0.857143
>>> k0, err = full_density_kappa(8.0, 0.9)          # 8 W/(m K) at 90 % density
>>> round(float(k0), 3), round(float(err), 3)
(9.333, 0.444)
"""
from __future__ import annotations

import numpy as np

from .errors import ParameterError

__all__ = ["RELATIONS", "bruggeman_landauer", "dem", "full_density_kappa", "loeb",
           "maxwell_eucken_lower", "maxwell_eucken_upper", "outside_validity", "ratio"]


def _phi(phi) -> np.ndarray:
    p = np.asarray(phi, dtype=float)
    if not np.all(np.isfinite(p)) or np.any(p < 0) or np.any(p >= 1):
        raise ParameterError(f"porosity must lie in [0, 1), got {phi!r}")
    return p


def maxwell_eucken_upper(k_solid, k_pore, phi):
    """Maxwell-Eucken with the solid continuous, pores dispersed [same unit as k].

    k = k_s (2 k_s + k_p - 2 phi (k_s - k_p)) / (2 k_s + k_p + phi (k_s - k_p));
    the upper Hashin-Shtrikman bound when k_p < k_s.
    """
    ks, kp, p = np.asarray(k_solid, float), np.asarray(k_pore, float), _phi(phi)
    return ks * (2 * ks + kp - 2 * p * (ks - kp)) / (2 * ks + kp + p * (ks - kp))


def maxwell_eucken_lower(k_solid, k_pore, phi):
    """Maxwell-Eucken with the pore phase continuous, solid dispersed (lower bound).

    The same formula with the phases swapped (solid fraction 1 - phi
    dispersed in the pore phase); zero for insulating pores.
    """
    ks, kp, p = np.asarray(k_solid, float), np.asarray(k_pore, float), _phi(phi)
    s = 1.0 - p
    num = kp * (2 * kp + ks - 2 * s * (kp - ks))
    den = kp * (2 + s) + ks * p          # = 2 k_p + k_s + s (k_p - k_s); zero only for k_p = phi = 0
    num, den, ks_b = np.broadcast_arrays(num, den, ks)
    out = np.array(ks_b, dtype=float)    # phi = 0 with insulating pores: all solid
    np.divide(num, den, out=out, where=den != 0)
    return out if out.ndim else float(out)


def bruggeman_landauer(k_solid, k_pore, phi):
    """Landauer's symmetric effective medium: (1-phi)(k_s-k)/(k_s+2k) + phi (k_p-k)/(k_p+2k) = 0.

    The positive root k = (b + sqrt(b^2 + 8 k_s k_p)) / 4 with
    b = (2 - 3 phi) k_s + (3 phi - 1) k_p; for k_p = 0 it is
    k_s (1 - 3 phi / 2), zero beyond the percolation threshold phi = 2/3.
    """
    ks, kp, p = np.asarray(k_solid, float), np.asarray(k_pore, float), _phi(phi)
    b = (2 - 3 * p) * ks + (3 * p - 1) * kp
    return (b + np.sqrt(b * b + 8 * ks * kp)) / 4


def dem(k_solid, phi):
    """Differential effective medium for insulating spheres: k = k_s (1 - phi)^(3/2)."""
    return np.asarray(k_solid, float) * (1.0 - _phi(phi)) ** 1.5


def loeb(k_solid, phi):
    """Loeb's relation with pore-shape factor 1: k = k_s (1 - phi)."""
    return np.asarray(k_solid, float) * (1.0 - _phi(phi))


#: name -> (k/k0 for insulating pores as a function of phi, largest phi of its
#: validity range, one line on where it holds).
RELATIONS: dict[str, tuple] = {
    "maxwell-eucken": (lambda p: maxwell_eucken_upper(1.0, 0.0, p), 0.15,
                       "dilute isolated spherical pores (Maxwell 1873, Eucken 1932)"),
    "landauer": (lambda p: bruggeman_landauer(1.0, 0.0, p), 2.0 / 3.0,
                 "random mixture of solid and pores (Landauer 1952)"),
    "dem": (lambda p: dem(1.0, p), 1.0,
            "spherical pores added step by step (Bruggeman 1935 differential scheme)"),
    "loeb": (lambda p: loeb(1.0, p), 1.0,
             "pores along the heat flow, shape factor 1 (Loeb 1954, from memory)"),
}


def ratio(relation: str, phi):
    """k_pellet / k_full for insulating pores of volume fraction ``phi`` under ``relation``."""
    if relation not in RELATIONS:
        raise ParameterError(f"porosity relation must be one of {', '.join(RELATIONS)}, "
                             f"got {relation!r}")
    return RELATIONS[relation][0](phi)


def outside_validity(relation: str, relative_density: float) -> bool:
    """True when the porosity 1 - relative_density exceeds ``relation``'s validity range."""
    return (1.0 - float(relative_density)) > RELATIONS[relation][1]


def full_density_kappa(kappa, relative_density, *, relation: str = "maxwell-eucken"):
    """k of the full-density solid from k of a pellet, and the correction's uncertainty.

    Parameters
    ----------
    kappa : array_like
        Measured k of the pellet [W m^-1 K^-1].
    relative_density : float
        Pellet density / full density, in (0, 1].
    relation : str
        One of :data:`RELATIONS`.

    Returns
    -------
    (k_full, k_err)
        k_full = kappa / ratio(relation, 1 - d) [W m^-1 K^-1] and the spread of
        the correction: the largest difference between k_full and the value of
        any other relation valid at this porosity (one standard deviation, to be
        added in quadrature to the measurement's).

    Raises
    ------
    ParameterError
        relative_density outside (0, 1], an unknown relation, or a porosity
        where the chosen relation predicts no conduction (phi >= 2/3 for
        "landauer").  Beyond a relation's validity range but short of that,
        the value is returned; :func:`outside_validity` says so.
    """
    d = float(relative_density)
    if not 0.0 < d <= 1.0:
        raise ParameterError(f"relative_density must be in (0, 1], got {relative_density!r}")
    phi = 1.0 - d
    if relation not in RELATIONS:
        raise ParameterError(f"porosity relation must be one of {', '.join(RELATIONS)}, "
                             f"got {relation!r}")
    k = np.asarray(kappa, dtype=float)
    f, phi_max, _ = RELATIONS[relation]
    if not f(phi) > 0:
        raise ParameterError(f"porosity {phi:.3g} (relative density {d:.3g}) is beyond the range "
                             f"of the {relation} relation (porosity < {phi_max:.3g}, where it "
                             "predicts no conduction at all); choose another relation")
    k_full = k / f(phi)
    others = [g(phi) for name, (g, pmax, _) in RELATIONS.items()
              if name != relation and phi < pmax and g(phi) > 0]
    if not others:
        return k_full, np.zeros_like(k_full)
    spread = np.max(np.stack([np.abs(k / r - k_full) for r in others]), axis=0)
    return k_full, spread
