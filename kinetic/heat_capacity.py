"""Specific heat capacity of a solid for k = D rho c_p: Dulong-Petit and Debye values.

A flash instrument measures the thermal diffusivity D; the conductivity is
k = D rho c_p.  When c_p was not measured, labs take either

* the **Dulong-Petit** value 3 R per mole of atoms (Petit & Dulong 1819,
  Ann. Chim. Phys. 10, 395), the classical high-temperature limit of the
  harmonic lattice, temperature-independent; or
* the **Debye** value C_V(T) of the Debye model (Debye 1912, Ann. Phys. 344,
  789) with the preset's Debye temperature, computed by the engine
  (:meth:`kinetic.LatticeModel.heat_capacity`), which falls below 3 R at
  T < theta_D.

Both are harmonic, constant-volume values: the measured c_p exceeds them at
high temperature by the dilation term C_p - C_V = 9 alpha^2 B V T (a few per
cent near the Debye temperature, more near melting) and by anharmonic terms;
that is why the choice alone moves k by several per cent above room
temperature.  Per mass: c = C / (mean mass per atom).  Constants from
:mod:`scipy.constants`; atomic masses from the preset (IUPAC values via
periodictable) or from :mod:`periodictable` for a formula.

>>> round(dulong_petit("Si"), 1)        # 3 R / 28.085 g/mol [J/(kg K)]
888.1
>>> round(float(debye("Si", 300.0)))   # measured: 702 J/(kg K) (see tests)
712
"""
from __future__ import annotations

import numpy as np
import periodictable
from scipy import constants

from . import materials
from .errors import ParameterError
from .lattice import LatticeModel
from .materials import Material
from .scattering import Boundary

__all__ = ["HEAT_CAPACITY_MODELS", "compare_heat_capacity", "debye", "dulong_petit",
           "mean_atomic_mass", "model_heat_capacity"]

#: The model names accepted wherever a heat capacity may be chosen.
HEAT_CAPACITY_MODELS = ("dulong-petit", "debye")


def _material(material) -> Material:
    if isinstance(material, Material):
        return material
    if not isinstance(material, str):
        raise ParameterError(f"material must be a preset name or a Material, got {material!r}")
    try:
        return materials.get(material)
    except (KeyError, ParameterError):
        raise ParameterError(f"material: unknown preset {material!r}; expected one of "
                             f"{', '.join(materials.names())}") from None


def mean_atomic_mass(material) -> float:
    """Mean mass per atom [u] of a preset, a :class:`Material` or a chemical formula.

    >>> round(mean_atomic_mass("Mg2Si"), 3)     # (2 x 24.305 + 28.085) / 3
    25.565
    """
    if isinstance(material, str) and material not in materials.names() and _is_formula(material):
        f = periodictable.formula(material)
        n = sum(f.atoms.values())
        return float(f.mass) / float(n)
    return float(_material(material).atomic_mass)


def _is_formula(text: str) -> bool:
    try:
        return _known_name(text) is None and bool(periodictable.formula(text).atoms)
    except (ValueError, TypeError, KeyError):
        return False


def _known_name(text: str):
    try:
        return materials.get(text)
    except (KeyError, ParameterError):
        return None


def dulong_petit(material) -> float:
    """Dulong-Petit specific heat 3 R / M [J kg^-1 K^-1] (M: mean molar mass per atom).

    ``material`` is a preset name, a :class:`Material` or a chemical formula
    (e.g. ``"Mg2Si"``, read with periodictable).
    """
    m_atom = mean_atomic_mass(material) * constants.atomic_mass   # [kg]
    return 3.0 * constants.k / m_atom


def debye(material, temperature) -> np.ndarray:
    """Debye specific heat C_V(T) per mass [J kg^-1 K^-1] of a preset or Material.

    The temperature dependence is the engine's :meth:`LatticeModel.heat_capacity`
    for the material's averaged Debye branch, whose Debye temperature is
    hbar v_D q_D / kB (exactly 3 modes per atom; within 0.5 % of the preset's
    tabulated value), so per atom it tends to 3 k_B, and per mass to
    :func:`dulong_petit`, for T >> theta_D.
    """
    mat = _material(material)
    T = np.asarray(temperature, dtype=float)
    if not np.all(np.isfinite(T)) or np.any(T <= 0):
        raise ParameterError("temperature must be finite and > 0 K")
    # the boundary term only makes the model valid; it does not enter C_V
    model = LatticeModel(mat.branches(), [Boundary(1e-3)], material=mat.name)
    c_v = np.asarray(model.heat_capacity(T), dtype=float)             # [J m^-3 K^-1]
    c_inf = 3.0 * constants.k / mat.volume_per_atom                    # 3 n kB: the branch's 3 modes per atom
    return c_v / c_inf * dulong_petit(mat)


def model_heat_capacity(choice: str, material, temperature) -> np.ndarray:
    """c_p [J kg^-1 K^-1] at each temperature for ``choice`` in :data:`HEAT_CAPACITY_MODELS`."""
    T = np.asarray(temperature, dtype=float)
    if choice == "dulong-petit":
        return np.full(T.shape, dulong_petit(material))
    if choice == "debye":
        return debye(material, T)
    raise ParameterError(f"heat capacity model must be one of {', '.join(HEAT_CAPACITY_MODELS)}, "
                         f"got {choice!r}")


def compare_heat_capacity(material, temperature, measured=None) -> dict[str, np.ndarray]:
    """The heat capacities a lab could use, side by side [J kg^-1 K^-1].

    Returns a dict "dulong-petit", "debye" (where the preset is known), and
    "measured" (if given) -> c_p at each temperature.  Since k = D rho c_p,
    the ratio of two entries is the ratio of the k they give.

    >>> c = compare_heat_capacity("Ge", [300.0, 600.0])
    >>> [round(float(x), 3) for x in c["debye"] / c["dulong-petit"]]
    [0.927, 0.981]
    """
    T = np.atleast_1d(np.asarray(temperature, dtype=float))
    out = {"dulong-petit": np.full(T.shape, dulong_petit(material))}
    if _known_name(material) is not None or isinstance(material, Material):
        out["debye"] = debye(material, T)
    if measured is not None:
        m = np.broadcast_to(np.asarray(measured, dtype=float), T.shape).copy()
        out["measured"] = m
    return out
