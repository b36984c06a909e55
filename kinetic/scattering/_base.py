"""Base of the scattering mechanisms: parameter declarations, the Mechanism class and the registry."""
from __future__ import annotations

import math
from dataclasses import dataclass, fields, replace
from typing import ClassVar

import numpy as np

from ..dispersion import Branch
from ..errors import ParameterError
from ..parameters import Parameter
from ..quantities import is_quantity, to_si

__all__ = ["Mechanism", "MECHANISMS", "register", "mechanism_from_dict"]


@dataclass(frozen=True)
class _Spec:
    unit: str
    description: str
    bounds: tuple
    log: bool = True
    fixed: bool = False
    allow_zero: bool = False
    upper_open: bool = False
    #: k when the rate goes as value**k (1: linear); None otherwise
    power: float | None = None


@dataclass(frozen=True)
class Mechanism:
    """Base class: parameter bookkeeping shared by every mechanism.

    Subclasses define dataclass fields for their parameters (``None`` for an
    unused alternative parameterisation), a ``kind``, a plain-words ``label``
    and a ``colour``, ``_spec`` with each parameter's unit, description and
    bounds, and either ``rate_terms`` (a rate that is a sum of power laws in
    omega: the engine's fast route on Debye branches) or ``rate``.
    """

    kind: ClassVar[str] = ""
    #: plain words of the trade for panels, legends and reports
    label: ClassVar[str] = ""
    #: hex colour of the mechanism in every plot and table
    colour: ClassVar[str] = "#7f7f7f"
    resistive: ClassVar[bool] = True
    #: True when the rate stays finite as omega -> 0 for every branch (a boundary),
    #: so the mean free path of long-wavelength phonons is bounded
    limits_mean_free_path: ClassVar[bool] = False
    _spec: ClassVar[dict] = {}

    def __post_init__(self):
        if not isinstance(self.name, str) or not self.name.isidentifier():
            raise ParameterError(
                f"mechanism name must be a plain identifier (letters, digits, underscore), got {self.name!r}"
            )
        if self.applies_to is not None:
            at = tuple(self.applies_to)
            if not at or not all(isinstance(b, str) for b in at):
                raise ParameterError(
                    f"{self.name}.applies_to must be None or a non-empty list of branch names, got {self.applies_to!r}"
                )
            object.__setattr__(self, "applies_to", at)
        for pname, spec in self._spec.items():
            value = getattr(self, pname)
            if value is None:
                continue
            if is_quantity(value):
                value = to_si(value, spec.unit, f"{self.name}.{pname}")
            try:
                v = float(value)
            except (TypeError, ValueError):
                raise ParameterError(
                    f"{self.name}.{pname} must be a number [{spec.unit}], got {value!r}"
                ) from None
            lo, hi = spec.bounds
            ok = math.isfinite(v) and (v >= 0 if spec.allow_zero else v > 0)
            if spec.upper_open and v >= hi:
                ok = False
            if not ok:
                rng = "finite and >= 0" if spec.allow_zero else "finite and > 0"
                if spec.upper_open:
                    rng += f" and < {hi:g}"
                unit = f" [{spec.unit}]" if spec.unit else ""
                raise ParameterError(f"{self.name}.{pname} must be {rng}{unit}, got {v!r}")
            object.__setattr__(self, pname, v)

    @classmethod
    def example(cls) -> "Mechanism":
        """A valid instance with typical values (the class defaults unless overridden).

        The conformance suite builds every registered mechanism from this.
        """
        return cls()

    @classmethod
    def examples(cls) -> tuple:
        """One valid instance per parameterisation (default: just :meth:`example`)."""
        return (cls.example(),)

    # --- parameters ---------------------------------------------------------------
    @property
    def parameters(self) -> dict:
        """``{param: Parameter}`` for the parameters this instance uses."""
        out = {}
        for pname, spec in self._spec.items():
            value = getattr(self, pname)
            if value is None:
                continue
            out[pname] = Parameter(
                name=pname,
                value=value,
                unit=spec.unit,
                description=spec.description,
                bounds=spec.bounds,
                log=spec.log,
                fixed=spec.fixed,
                rate_power=spec.power,
            )
        return out

    @property
    def values(self) -> dict:
        """``{param: value}`` for the parameters this instance uses."""
        return {p: getattr(self, p) for p in self._spec if getattr(self, p) is not None}

    def with_values(self, **values) -> "Mechanism":
        """A copy with some parameter values replaced (validated again)."""
        unknown = [k for k in values if k not in self.values]
        if unknown:
            raise ParameterError(
                f"{self.name} has no parameter {unknown[0]!r}; its parameters are: "
                + ", ".join(self.values)
            )
        return replace(self, **{k: (v if is_quantity(v) else float(v)) for k, v in values.items()})

    def applies(self, branch: Branch) -> bool:
        return self.applies_to is None or branch.name in self.applies_to

    def branch_rate(self, omega, T, branch: Branch):
        """``rate`` where the mechanism applies to ``branch``, else zeros."""
        if not self.applies(branch):
            return np.zeros(np.broadcast_shapes(np.shape(omega), np.shape(T)))
        return self.rate(omega, T, branch)

    def rate_terms(self, branch: Branch, T):
        """The rate as a sum of power laws in omega, or None.

        Returns ``((n, c_n), ...)`` meaning 1/tau = sum_n c_n(T) omega^n
        [s^-1], each ``c_n`` a float or an array computed elementwise from
        ``T`` [K] (so shaped like it), or None when the rate on ``branch`` is
        not such a sum (then only :meth:`rate` describes it).

        A mechanism that defines this gets :meth:`rate` from it (one formula,
        not two). On a Debye branch omega at the engine's nodes is a factor
        per temperature times a factor per node, so the engine builds such a
        rate from one short column per power (checked there, O(n_T)) and one
        matrix product for all mechanisms together, instead of evaluating
        and checking every mechanism on every node.
        """
        return None

    def rate(self, omega, T, branch: Branch):
        """Scattering rate 1/tau [s^-1] at angular frequencies ``omega`` [rad/s] and temperatures ``T`` [K].

        ``omega`` and ``T`` broadcast together. This default sums
        :meth:`rate_terms`; a mechanism whose rate is not a sum of power laws
        in omega overrides it.
        """
        omega, T = _omega_T(omega, T)
        terms = self.rate_terms(branch, T)
        if terms is None:
            raise NotImplementedError(f"{type(self).__name__} defines neither rate nor rate_terms")
        return _sum_terms(terms, omega)

    # --- records ------------------------------------------------------------------
    def to_dict(self) -> dict:
        d = {"kind": self.kind, "name": self.name, "values": dict(self.values)}
        if self.applies_to is not None:
            d["applies_to"] = list(self.applies_to)
        extra = {f.name: getattr(self, f.name) for f in fields(self)
                 if f.name not in self._spec and f.name not in ("name", "applies_to")}
        if extra:
            d["options"] = extra
        return d


def _omega_T(omega, T):
    return np.asarray(omega, dtype=float), np.asarray(T, dtype=float)


def _sum_terms(terms, omega):
    """sum_n c_n omega^n from ``((n, c_n), ...)``; a lone constant term stays unbroadcast (no array built)."""
    out = None
    for n, c in terms:
        t = np.asarray(c, dtype=float) if n == 0 else _power(omega, n) * c
        out = t if out is None else out + t
    return np.asarray(0.0) if out is None else out


def _full(value, omega, T):
    """``value`` as an array; it broadcasts against omega x T (no copy is made)."""
    return np.asarray(value)


def _scaled(r, factor):
    """r * factor, in place when r is a fresh array of the full broadcast shape (saves a large temporary)."""
    if isinstance(r, np.ndarray) and r.ndim and r.shape == np.broadcast_shapes(r.shape, np.shape(factor)):
        r *= factor
        return r
    return r * factor


def _raw_power(x, n: float):
    """x**n with the common small integer powers done by multiplication (fast)."""
    if n == 1.0:
        return x
    if n == 2.0:
        return x * x
    if n == 3.0:
        return x * x * x
    if n == 4.0:
        x2 = x * x
        x2 *= x2
        return x2
    return x**n


#: x**n of read-only arrays (the engine's node frequencies and temperatures), by identity
_POWERS: dict = {}


def _power(x, n: float):
    """x**n; for a read-only array (the engine's nodes) the result is kept and shared, read-only.

    Mechanisms meet the same node frequencies on every call of a prepared grid,
    so omega^2, omega^3, omega^4 are computed once per grid. Never modify the
    result in place.
    """
    if n == 1.0 or not (isinstance(x, np.ndarray) and not x.flags.writeable and x.size > 64):
        return _raw_power(x, n)
    key = (id(x), float(n))
    hit = _POWERS.get(key)
    if hit is not None and hit[0] is x:  # the kept reference keeps the id from being reused
        return hit[1]
    # x^4 as (x^2)^2 from the kept x^2 (shared with the omega^2 rates): one pass, same rounding as _raw_power
    out = _power(x, 2.0) ** 2 if n == 4.0 else _raw_power(x, n)
    out.setflags(write=False)
    if len(_POWERS) >= 24:
        _POWERS.pop(next(iter(_POWERS)), None)
    _POWERS[key] = (x, out)
    return out


#: kind -> mechanism class, every registered mechanism (see :func:`register`)
MECHANISMS: dict = {}


def register(cls):
    """Register a mechanism class under its ``kind`` (usable as a class decorator).

    Checks what every consumer relies on: a frozen Mechanism dataclass with a
    new identifier ``kind``, a plain-words ``label``, a hex ``colour``, a
    ``rate`` or ``rate_terms``, and each declared parameter a field with unit
    text, description and bounds.
    Returns the class.

    Raises
    ------
    ParameterError
        When any of these is missing or the kind is taken.
    """
    if not (isinstance(cls, type) and issubclass(cls, Mechanism)):
        raise ParameterError(f"only Mechanism subclasses can be registered, got {cls!r}")
    kind = cls.kind
    if not isinstance(kind, str) or not kind.isidentifier():
        raise ParameterError(f"{cls.__name__}.kind must be a plain identifier, got {kind!r}")
    if kind in MECHANISMS and MECHANISMS[kind] is not cls:
        raise ParameterError(f"mechanism kind {kind!r} is already registered by {MECHANISMS[kind].__name__}")
    if not (isinstance(cls.label, str) and cls.label.strip()):
        raise ParameterError(f"{cls.__name__} needs a plain-words label")
    c = cls.colour
    if not (isinstance(c, str) and len(c) == 7 and c[0] == "#"
            and all(ch in "0123456789abcdefABCDEF" for ch in c[1:])):
        raise ParameterError(f"{cls.__name__}.colour must be a hex colour such as '#1f77b4', got {c!r}")
    if cls.rate is Mechanism.rate and cls.rate_terms is Mechanism.rate_terms:
        raise ParameterError(f"{cls.__name__} needs rate(omega, T, branch) or rate_terms(branch, T)")
    names = {f.name for f in fields(cls)}
    for pname, spec in cls._spec.items():
        if pname not in names:
            raise ParameterError(f"{cls.__name__} declares parameter {pname!r} but has no such field")
        if not spec.description or len(spec.bounds) != 2 or not spec.bounds[0] < spec.bounds[1]:
            raise ParameterError(f"{cls.__name__}.{pname} needs a description and bounds lo < hi")
    MECHANISMS[kind] = cls
    return cls


def mechanism_from_dict(d: dict) -> Mechanism:
    """Rebuild a mechanism from :meth:`Mechanism.to_dict` output."""
    try:
        kind = d["kind"]
    except (KeyError, TypeError):
        raise ParameterError(f"mechanism entry needs a 'kind'; got {d!r}") from None
    if kind not in MECHANISMS:
        raise ParameterError(f"unknown mechanism kind {kind!r}; known: {', '.join(MECHANISMS)}")
    kw = dict(d.get("values", {}))
    kw.update(d.get("options", {}))
    kw["name"] = d.get("name", kind)
    if d.get("applies_to") is not None:
        kw["applies_to"] = tuple(d["applies_to"])
    try:
        return MECHANISMS[kind](**kw)
    except TypeError as exc:
        raise ParameterError(f"mechanism {kw['name']!r}: {exc}") from None
