"""Virtual-crystal alloy models built from the calibrated default models of two hosts.

Used by :func:`kinetic.whatif.alloy_sweep` and :func:`kinetic.whatif.grain_alloy_map`.

* The end members are the default models of the two presets (the model of each
  preset's reference sample, :func:`kinetic.defaults.default_model`), so x = 0
  and x = 1 reproduce each host's calibrated conductivity.
* At a fraction x the branches (velocity, Debye temperature) and every
  scattering parameter of the two models are interpolated linearly (the virtual
  crystal; common practice), and the point-defect Gamma is Abeles' alloy Gamma
  of :func:`kinetic.disorder.virtual_crystal` (mass + strain, plus isotopes).
* Normal processes, as in Abeles' model (Abeles, Phys. Rev. 131, 1906, 1963,
  after Callaway 1959): 1/tau_N = beta 1/tau_U with Callaway's correction, where
  beta = tau_U / tau_N is a constant ratio. Abeles took beta = 2.5 for Si-Ge
  (from memory). When a host model has no normal processes, they are added
  (:class:`AbelesNormal`) and each host's Umklapp strength is rescaled so that
  the host still gives its own calibrated conductivity at ``T_REF`` (Abeles
  likewise fixed the anharmonic strength on the pure crystals); as the normal
  rate follows the Umklapp rate at every T and omega, the end members then
  stay within ~1 % of the host models over the calibrated ranges (tested). The N-process correction is what keeps the
  alloy from being over-suppressed: momentum taken from high-frequency modes
  by normal processes is handed back to low-frequency ones that alloy
  scattering barely touches.
"""
from __future__ import annotations

from dataclasses import dataclass, replace
from typing import ClassVar

import numpy as np
from scipy.constants import atomic_mass as _u
from scipy.optimize import brentq

from .errors import ParameterError
from .lattice import LatticeModel
from .scattering import Boundary, Mechanism, PointDefect, Umklapp

# One default model per material, and its scope notes (kinetic.defaults).
from .defaults import default_model as _calibrated_default
from .defaults import scope_notes as _material_notes

__all__ = ["ABELES_BETA", "ABELES_EPSILON", "CHECKED_SERIES", "T_REF", "AbelesNormal", "abeles_hosts",
           "host_model", "scope_notes", "vc_model"]

#: Abeles' ratio beta = tau_U / tau_N for Si-Ge (Abeles, Phys. Rev. 131, 1906, 1963; from memory).
ABELES_BETA = 2.5
#: Abeles' strain parameter epsilon per alloy series (Abeles, Phys. Rev. 131, 1906, 1963:
#: 39 for Si-Ge, from memory); other series default to 0 (mass term only).
ABELES_EPSILON = {("Si", "Ge"): 39.0, ("Ge", "Si"): 39.0}
#: Temperature [K] at which the added normal rate equals beta x the Umklapp rate.
T_REF = 300.0

#: Alloy series compared with published measurements (tests/test_alloys.py):
#: (host_a, host_b) -> (x_min, x_max, temperature range [K], source).
CHECKED_SERIES = {
    ("Si", "Ge"): (0.2, 0.8, (300.0, 300.0),
                   ("Dismukes et al., J. Appl. Phys. 35, 2899 (1964); Abeles et al., Phys. Rev. 125, 44 "
                    "(1962) (single crystals, 300 K; values from memory)")),
    ("Mg2Si", "Mg2Sn"): (0.4, 0.7, (300.0, 300.0),
                         ("Zaitsev et al., Phys. Rev. B 74, 045207 (2006) (300 K lattice part; values "
                          "from memory)")),
}


def host_model(material) -> LatticeModel:
    """The default (calibrated reference-sample) model of a host material.

    Raises
    ------
    ParameterError
        The preset has no calibrated model: the message says which number is
        missing and how to give it.
    """
    return _calibrated_default(material)


@dataclass(frozen=True)
class AbelesNormal(Mechanism):
    """Normal processes at a fixed ratio to an Umklapp rate: 1/tau_N = beta 1/tau_U (Abeles 1963).

    Not resistive: it enters through Callaway's correction. ``B``,
    ``gruneisen``, ``atomic_mass`` and ``b`` are those of the Umklapp
    mechanism named ``umklapp`` (see :class:`kinetic.scattering.Umklapp`);
    they are copied, not fitted.
    """

    ratio: float = ABELES_BETA
    B: float | None = None
    gruneisen: float | None = None
    atomic_mass: float | None = None
    b: float = 3.0
    umklapp: str = "umklapp"
    name: str = "normal"
    applies_to: tuple | None = None

    kind: ClassVar[str] = "abeles_normal"
    resistive: ClassVar[bool] = False
    _spec: ClassVar[dict] = {}

    @classmethod
    def from_umklapp(cls, u: Umklapp, ratio: float, name: str) -> AbelesNormal:
        return cls(ratio=float(ratio), B=u.B, gruneisen=u.gruneisen, atomic_mass=u.atomic_mass, b=u.b,
                   umklapp=u.name, name=name, applies_to=u.applies_to)

    def __post_init__(self):
        super().__post_init__()
        # the Umklapp rate this one follows (validated once; not a dataclass field)
        object.__setattr__(self, "_u", Umklapp(B=self.B, gruneisen=self.gruneisen,
                                               atomic_mass=self.atomic_mass, b=self.b))

    def rate(self, omega, T, branch):
        return self.ratio * self._u.rate(omega, T, branch)


def _add_normal(model: LatticeModel, beta: float) -> LatticeModel:
    umk = [m for m in model.scattering if isinstance(m, Umklapp)]
    if not umk:
        raise ParameterError(f"Abeles' normal processes need an Umklapp mechanism in the {model.material} model")
    for u in umk:
        name = "normal" if len(umk) == 1 else f"normal_{u.name}"
        model = model.with_mechanism(AbelesNormal.from_umklapp(u, beta, name))
    return model


def _scale_umklapp(model: LatticeModel, s: float) -> LatticeModel:
    """Multiply every Umklapp rate by s (gruneisen by sqrt(s), or B by s)."""
    sc = []
    for m in model.scattering:
        if isinstance(m, Umklapp):
            m = m.with_values(gruneisen=m.gruneisen * np.sqrt(s)) if m.gruneisen is not None else \
                m.with_values(B=m.B * s)
        sc.append(m)
    return model._replace(scattering=tuple(sc))


def abeles_hosts(model_a: LatticeModel, model_b: LatticeModel, *, beta: float = ABELES_BETA,
                 t_ref: float = T_REF):
    """End-member models with Abeles' normal processes, each still matching its own kappa(t_ref).

    A host's own normal-process term, if it has one, is replaced by Abeles'
    form (1/tau_N = beta 1/tau_U), so that every alloy series is treated as the
    published alloy model does; with ``beta = 0`` both hosts are returned
    unchanged.

    Raises
    ------
    ParameterError
        A host model without an Umklapp mechanism, or no rescaling found.
    """
    if beta < 0:
        raise ParameterError(f"normal_ratio must be >= 0, got {beta!r}")
    if beta == 0:
        return model_a, model_b
    out = []
    for m in (model_a, model_b):
        target = float(m.kappa(np.array([t_ref]))[0])
        # the host's own normal-process term (if any) gives way to Abeles' form
        m = m.without(*[x.name for x in m.scattering if not x.resistive]) if any(
            not x.resistive for x in m.scattering) else m

        def with_n(log_s, m=m):
            return _add_normal(_scale_umklapp(m, float(np.exp(log_s))), beta)

        def f(log_s, target=target, with_n=with_n):
            return np.log(float(with_n(log_s).kappa(np.array([t_ref]))[0]) / target)

        try:
            log_s = brentq(f, -6.0, 6.0, xtol=1e-8)
        except ValueError:
            raise ParameterError(
                f"could not add Abeles' normal processes to the {m.material} model (beta = {beta}); "
                "pass normal_ratio=0 to leave them out") from None
        out.append(with_n(log_s))
    return tuple(out)


def _lerp(a, b, x):
    return (1.0 - x) * a + x * b


def vc_model(model_a: LatticeModel, model_b: LatticeModel, material, gamma: float, x: float, *,
             boundary_length: float | None = None) -> LatticeModel:
    """The virtual-crystal model at fraction x between two host models of the same form.

    Branches and scattering parameters are interpolated linearly; the point
    defect becomes Klemens' form with Abeles' ``gamma`` and the virtual
    crystal's volume per atom; Umklapp takes the virtual crystal's mean mass.

    Raises
    ------
    ParameterError
        The two host models differ in form (branch names or mechanisms).
    """
    x = float(x)
    na = [b.name for b in model_a.branches]
    nb = [b.name for b in model_b.branches]
    if na != nb or any(a.dispersion != b.dispersion for a, b in zip(model_a.branches, model_b.branches)):
        raise ParameterError(
            f"the default models of {model_a.material} and {model_b.material} have different branches "
            f"({na} vs {nb}); pass template= to use one form for the whole series")
    branches = [replace(a, velocity=_lerp(a.velocity, b.velocity, x),
                        debye_temperature=_lerp(a.debye_temperature, b.debye_temperature, x))
                for a, b in zip(model_a.branches, model_b.branches)]
    mb = {m.name: m for m in model_b.scattering}
    sc = []
    pd_done = False
    for m in model_a.scattering:
        if isinstance(m, AbelesNormal):
            continue  # rebuilt below from the interpolated Umklapp
        if isinstance(m, PointDefect):
            if not pd_done:
                sc.append(PointDefect.from_gamma(gamma, material.volume_per_atom, name=m.name,
                                                 applies_to=m.applies_to))
                pd_done = True
            continue
        other = mb.get(m.name)
        if other is None or type(other) is not type(m):
            raise ParameterError(
                f"mechanism {m.name!r} of the {model_a.material} model has no counterpart in the "
                f"{model_b.material} model; pass template= to use one form for the whole series")
        vals = {}
        for p, va in m.values.items():
            vb = other.values.get(p)
            if p == "atomic_mass":
                vals[p] = material.atomic_mass * _u
            elif p == "volume_per_atom":
                vals[p] = material.volume_per_atom
            elif vb is not None:
                vals[p] = _lerp(va, vb, x)
        if isinstance(m, Boundary) and boundary_length is not None:
            vals["length"] = boundary_length
        sc.append(m.with_values(**vals))
    if not pd_done:
        sc.append(PointDefect.from_gamma(gamma, material.volume_per_atom))
    by_name = {m.name: m for m in sc}
    for m in model_a.scattering:
        if isinstance(m, AbelesNormal):
            other = mb.get(m.name)
            ratio = _lerp(m.ratio, other.ratio, x) if isinstance(other, AbelesNormal) else m.ratio
            sc.append(AbelesNormal.from_umklapp(by_name[m.umklapp], ratio, m.name))
    return LatticeModel(branches, sc, normal_correction=model_a.normal_correction, material=material.name)


# ---------------------------------------------------------------------------------
# honest scope: plain notes where a prediction leaves what was checked
# ---------------------------------------------------------------------------------

def _span(lo, hi, unit="K"):
    return f"{lo:g} {unit}" if lo == hi else f"{lo:g}-{hi:g} {unit}"


def scope_notes(*, materials=(), temperature=None, lengths=None, series=None, fractions=None) -> list:
    """Plain notes where a what-if result leaves the range its models were checked on.

    Parameters
    ----------
    materials : iterable of str or Material
        Hosts whose default (calibrated) model the result starts from.
    temperature : array_like, optional
        Temperatures of the result [K].
    lengths : array_like, optional
        Boundary lengths (grain sizes) [m].
    series : (str, str), optional
        Alloy end members.
    fractions : array_like, optional
        Alloy fractions x.
    """
    notes = []
    T = None if temperature is None else np.atleast_1d(np.asarray(temperature, dtype=float))
    L = None if lengths is None else np.atleast_1d(np.asarray(lengths, dtype=float))
    for m in materials:
        notes += _material_notes(m, temperature=T, boundary_length=None if L is None else float(L.min()))
    if L is not None and np.any(L < 1e-4) and any(getattr(m, "name", m) != "Si" for m in materials):
        notes.append("in hot-pressed material the effective boundary length is often far below the grain "
                     "size (Meddins & Parrott, J. Phys. C 9, 1263, 1976)")
    if series is not None and fractions is not None:
        xs = np.atleast_1d(np.asarray(fractions, dtype=float))
        inner = xs[(xs > 0) & (xs < 1)]
        key = tuple(getattr(s, "name", s) for s in series)
        rng = CHECKED_SERIES.get(key) or CHECKED_SERIES.get(key[::-1])
        if rng is None:
            if inner.size:
                notes.append(f"the {key[0]}-{key[1]} alloy series was not checked against measurements "
                             "(virtual-crystal model, Abeles 1963)")
        else:
            lo, hi = (rng[0], rng[1]) if key in CHECKED_SERIES else (1 - rng[1], 1 - rng[0])
            bad = inner[(inner < lo) | (inner > hi)]
            if bad.size:
                notes.append(f"alloy fractions {', '.join(f'{v:g}' for v in bad[:5])} of {key[0]}-{key[1]} "
                             f"lie outside the checked range x = {lo:g}-{hi:g}")
            if T is not None and np.any((T < rng[2][0]) | (T > rng[2][1])):
                notes.append(f"the {key[0]}-{key[1]} alloys were checked at {_span(*rng[2])} only")
    return notes
