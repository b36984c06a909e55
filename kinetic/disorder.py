"""Mass and strain disorder: the point-defect scattering parameter Gamma.

Gamma enters Klemens' point-defect rate V0 Gamma omega^4 / (4 pi v^3)
(:meth:`kinetic.PointDefect.from_gamma`).

* One site: Gamma = sum_i f_i (1 - M_i / M)^2, M = sum_i f_i M_i
  (Klemens, Proc. Phys. Soc. A 68, 1113, 1955).
* Several sites (compounds): Gamma = sum_s (c_s / sum c) (M_s / M)^2 Gamma_s,
  with c_s the site's multiplicity, M_s its mean mass and M the mean mass per
  atom (Slack, Phys. Rev. 105, 829, 1957; as written by Yang, Meisner & Chen,
  Appl. Phys. Lett. 85, 1140, 2004, Eq. 2).
* Binary alloy A(1-x)B(x) in the virtual crystal: Gamma = x (1 - x)
  [(dM / M)^2 + epsilon (d delta / delta)^2], dM = M_B - M_A, delta the
  cube root of the volume per atom, epsilon a phenomenological strain
  parameter (Abeles, Phys. Rev. 131, 1906, 1963, Eqs. 6-7).

Isotope masses and natural abundances come from the ``periodictable``
package.
"""
from __future__ import annotations

import re
from functools import lru_cache
from typing import Mapping, Sequence

import numpy as np
import periodictable

from ._validate import in_range, nonnegative, positive
from .errors import ParameterError

__all__ = [
    "species_mass",
    "isotope_gamma",
    "mass_fluctuation_gamma",
    "compound_gamma",
    "material_gamma",
    "alloy_gamma",
    "substitution_site",
    "virtual_crystal",
]

_ISOTOPE = re.compile(r"^(?:(\d+)-?([A-Z][a-z]?)|([A-Z][a-z]?)-?(\d+))$")


def _element(symbol: str):
    try:
        el = periodictable.elements.symbol(symbol)
    except (ValueError, KeyError):
        el = None
    if el is None or el.number == 0:
        raise ParameterError(
            f"unknown element {symbol!r}; use a chemical symbol such as 'Si', or an isotope such as '28Si' or 'Si-28'"
        )
    return el


def species_mass(species: str) -> float:
    """Mass of an element (natural, standard atomic weight) or isotope [u].

    ``"Si"`` gives the natural mean; ``"28Si"``, ``"Si28"`` or ``"Si-28"`` an
    isotope (masses from periodictable).
    """
    if not isinstance(species, str):
        raise ParameterError(f"species must be a string such as 'Si' or '28Si', got {species!r}")
    return _species_mass(species)


@lru_cache(maxsize=1024)
def _species_mass(species: str) -> float:
    m = _ISOTOPE.match(species.strip())
    if m:
        a, sym = (m.group(1), m.group(2)) if m.group(1) else (m.group(4), m.group(3))
        el = _element(sym)
        try:
            return float(el[int(a)].mass)
        except (KeyError, IndexError, TypeError):
            raise ParameterError(
                f"unknown isotope {species!r}; {sym} isotopes in periodictable: {list(el.isotopes)}"
            ) from None
    return float(_element(species.strip()).mass)


@lru_cache(maxsize=256)
def _natural_isotopes(symbol: str):
    el = _element(symbol)
    pairs = [(el[a].mass, el[a].abundance) for a in el.isotopes if el[a].abundance]
    if not pairs:
        raise ParameterError(f"periodictable lists no natural isotopes for {symbol!r}")
    m = np.array([p[0] for p in pairs], dtype=float)
    f = np.array([p[1] for p in pairs], dtype=float)
    m.setflags(write=False)
    f = f / f.sum()
    f.setflags(write=False)
    return m, f


def _gamma(masses, fractions) -> float:
    m = np.asarray(masses, dtype=float)
    f = np.asarray(fractions, dtype=float)
    mbar = float(np.sum(f * m))
    return float(np.sum(f * (1.0 - m / mbar) ** 2))


def isotope_gamma(element: str) -> float:
    """Gamma of an element's natural isotope mixture [dimensionless].

    Abundances from periodictable, renormalised to sum to one.

    Examples
    --------
    >>> round(isotope_gamma("Si") * 1e4, 3)
    1.997
    """
    m, f = _natural_isotopes(element)
    return _gamma(m, f)


def _fractions(composition: Mapping, what: str = "composition"):
    if not isinstance(composition, Mapping) or not composition:
        raise ParameterError(f"{what} must be a non-empty mapping of species to fraction, got {composition!r}")
    names = list(composition)
    f = np.array([float(nonnegative(f"{what}[{n!r}]", composition[n])) for n in names])
    total = f.sum()
    if abs(total - 1.0) > 1e-6:
        raise ParameterError(
            f"{what} fractions must sum to 1, got {total:.6g} (" +
            ", ".join(f"{n}: {v:g}" for n, v in zip(names, f)) + ")"
        )
    return names, f / total


def mass_fluctuation_gamma(composition: Mapping, *, isotopes: bool = False) -> float:
    """Gamma of one crystal site occupied by several species [dimensionless].

    Parameters
    ----------
    composition : mapping
        Species (element ``"Ge"`` or isotope ``"74Ge"``) -> site fraction;
        fractions must sum to 1.
    isotopes : bool
        Also resolve each element into its natural isotopes (so Gamma includes
        isotope disorder on top of the alloy disorder).

    Examples
    --------
    >>> round(mass_fluctuation_gamma({"Si": 0.8, "Ge": 0.2}), 3)
    0.232
    """
    names, f = _fractions(composition)
    if isotopes:
        masses, fracs = [], []
        for n, fi in zip(names, f):
            if _ISOTOPE.match(n.strip()):
                masses.append(species_mass(n)); fracs.append(fi)
            else:
                m, a = _natural_isotopes(n)
                masses.extend(m); fracs.extend(fi * a)
        return _gamma(masses, fracs)
    return _gamma([species_mass(n) for n in names], f)


def compound_gamma(sites: Sequence, *, isotopes: bool = True) -> float:
    """Gamma per atom of a compound with several sites [dimensionless].

    Parameters
    ----------
    sites : sequence of (multiplicity, composition)
        E.g. Mg2Si(0.6)Sn(0.4): ``[(2, {"Mg": 1}), (1, {"Si": 0.6, "Sn": 0.4})]``.
        A composition may be a single symbol string.
    isotopes : bool
        Include natural isotope disorder on each site.
    """
    if not sites:
        raise ParameterError("sites must list at least one (multiplicity, composition) pair")
    c, Ms, Gs = [], [], []
    for i, entry in enumerate(sites):
        try:
            mult, comp = entry
        except (TypeError, ValueError):
            raise ParameterError(f"sites[{i}] must be (multiplicity, composition), got {entry!r}") from None
        if isinstance(comp, str):
            comp = {comp: 1.0}
        c.append(float(positive(f"sites[{i}] multiplicity", mult)))
        names, f = _fractions(comp, f"sites[{i}] composition")
        Ms.append(float(np.sum(f * np.array([species_mass(n) for n in names]))))
        Gs.append(mass_fluctuation_gamma(dict(zip(names, f)), isotopes=isotopes))
    c, Ms, Gs = map(np.asarray, (c, Ms, Gs))
    w = c / c.sum()
    mbar = float(np.sum(w * Ms))
    return float(np.sum(w * (Ms / mbar) ** 2 * Gs))


def material_gamma(material, *, isotopes: bool = True) -> float:
    """Gamma of a material's composition (each element on its own site)."""
    comp = getattr(material, "composition", None)
    if not comp:
        raise ParameterError(f"material {getattr(material, 'name', material)!r} has no composition")
    return compound_gamma([(n, el) for el, n in comp.items()], isotopes=isotopes)


def alloy_gamma(x, mass_a: float, mass_b: float, *, delta_a: float | None = None,
                delta_b: float | None = None, strain_epsilon: float = 0.0):
    """Abeles' virtual-crystal Gamma of a binary alloy A(1-x)B(x).

    Parameters
    ----------
    x : float or array_like
        Fraction of B, 0..1 [dimensionless].
    mass_a, mass_b : float
        Atomic masses of the end members [u].
    delta_a, delta_b : float, optional
        Cube roots of the volumes per atom (any consistent length unit).
    strain_epsilon : float
        Phenomenological strain parameter epsilon; 0 gives the mass term only.

    Returns
    -------
    float or ndarray
        Gamma [dimensionless].
    """
    x = np.asarray(x, dtype=float)
    if np.any(~np.isfinite(x)) or np.any((x < 0) | (x > 1)):
        raise ParameterError(f"alloy fraction x must lie in [0, 1], got {x!r}")
    ma, mb = positive("mass_a", mass_a, unit="u"), positive("mass_b", mass_b, unit="u")
    m = (1 - x) * ma + x * mb
    g = x * (1 - x) * ((mb - ma) / m) ** 2
    eps = nonnegative("strain_epsilon", strain_epsilon)
    if eps > 0:
        if delta_a is None or delta_b is None:
            raise ParameterError("strain_epsilon > 0 needs delta_a and delta_b (cube roots of volume per atom)")
        da, db = positive("delta_a", delta_a), positive("delta_b", delta_b)
        d = (1 - x) * da + x * db
        g = g + x * (1 - x) * eps * ((db - da) / d) ** 2
    return g if g.ndim else float(g)


def substitution_site(composition_a: Mapping, composition_b: Mapping):
    """The crystal site on which B replaces A, for A(1-x)B(x) of two compounds.

    Two compounds of the same formula type (``{"Mg": 2, "Si": 1}`` and
    ``{"Mg": 2, "Sn": 1}``; or two elements) that differ by exactly one element
    with the same multiplicity form a solid solution on that element's
    sublattice. Returns ``(shared, multiplicity, element_a, element_b)`` with
    ``shared`` the {element: multiplicity} of the common sublattices, or None
    when the two compositions are not of that kind.

    Examples
    --------
    >>> substitution_site({"Mg": 2, "Si": 1}, {"Mg": 2, "Sn": 1})
    ({'Mg': 2.0}, 1.0, 'Si', 'Sn')
    >>> substitution_site({"Si": 1}, {"Ge": 1})
    ({}, 1.0, 'Si', 'Ge')
    """
    if not composition_a or not composition_b:
        return None
    a = {k: float(v) for k, v in composition_a.items()}
    b = {k: float(v) for k, v in composition_b.items()}
    only_a = [k for k in a if k not in b]
    only_b = [k for k in b if k not in a]
    if len(only_a) != 1 or len(only_b) != 1 or a[only_a[0]] != b[only_b[0]]:
        return None
    shared = {k: v for k, v in a.items() if k in b}
    if any(b[k] != v for k, v in shared.items()):
        return None
    return shared, a[only_a[0]], only_a[0], only_b[0]


def virtual_crystal(host_a, host_b, x: float, *, strain_epsilon: float = 0.0, isotopes: bool = True,
                    name: str | None = None):
    """Virtual-crystal alloy A(1-x)B(x) of two materials.

    Host properties are interpolated linearly in x (Vegard's law for the
    volume per atom; the same linear rule, common practice, for masses, sound
    velocities and Debye temperature). The thermodynamic Grueneisen parameter
    is not carried over (it must not enter a conductivity model; the Umklapp
    strength comes from the hosts' calibrated models).

    Gamma. When the two hosts differ by one element on one sublattice (Si-Ge;
    Mg2Si-Mg2Sn, Si and Sn on the anion site) Gamma is the per-atom Gamma of
    the compound with that site mixed, :func:`compound_gamma` (Slack 1957 as
    written by Yang, Meisner & Chen, APL 85, 1140, 2004, Eq. 2), natural isotopes
    included if ``isotopes``; the strain term of Abeles (Phys. Rev. 131, 1906,
    1963, Eq. 7), x (1 - x) epsilon (d delta / delta)^2 with delta the cube root
    of the volume per atom, is weighted by the site's share of atoms like the
    mass term. Otherwise Abeles' formula on the mean atomic masses
    (:func:`alloy_gamma`) plus the interpolated natural-isotope Gamma is used.

    Returns
    -------
    (Material, float)
        The interpolated material and its Gamma [dimensionless].
    """
    x = in_range("x", x, 0.0, 1.0)

    def lin(a, b):
        if a is None or b is None:
            return None
        return (1 - x) * a + x * b

    from .materials import Material

    va, vb = host_a.volume_per_atom, host_b.volume_per_atom
    site = substitution_site(host_a.composition, host_b.composition)
    mat = Material(
        name=name or f"{host_a.name}(1-x){host_b.name}(x), x={x:g}",
        atomic_mass=lin(host_a.atomic_mass, host_b.atomic_mass),
        volume_per_atom=lin(va, vb),
        debye_temperature=lin(host_a.debye_temperature, host_b.debye_temperature),
        velocity_longitudinal=lin(host_a.velocity_longitudinal, host_b.velocity_longitudinal),
        velocity_transverse=lin(host_a.velocity_transverse, host_b.velocity_transverse),
        velocity_debye=lin(host_a.velocity_debye, host_b.velocity_debye),
        atoms_per_cell=host_a.atoms_per_cell,
        sources={"all": f"virtual crystal: linear interpolation between {host_a.name} and {host_b.name}"},
    )
    eps = nonnegative("strain_epsilon", strain_epsilon)
    if site is not None:
        shared, mult, el_a, el_b = site
        mixed = {k: v for k, v in ((el_a, 1 - x), (el_b, x)) if v > 0}
        sites = [(m, el) for el, m in shared.items()] + [(mult, mixed)]
        g = compound_gamma(sites, isotopes=isotopes)
        if eps > 0:
            weight = mult / (mult + sum(shared.values()))
            d_a, d_b = va ** (1 / 3), vb ** (1 / 3)
            g += weight * x * (1 - x) * eps * ((d_b - d_a) / lin(d_a, d_b)) ** 2
        return mat, float(g)
    g = alloy_gamma(x, host_a.atomic_mass, host_b.atomic_mass, delta_a=va ** (1 / 3), delta_b=vb ** (1 / 3),
                    strain_epsilon=eps)
    if isotopes:
        try:
            g += (1 - x) * material_gamma(host_a) + x * material_gamma(host_b)
        except ParameterError:
            pass
    return mat, float(g)
