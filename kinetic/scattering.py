"""Phonon scattering mechanisms: one small immutable class per published rate.

Each mechanism returns a relaxation rate ``1/tau`` [s^-1] from
``rate(omega, T, branch)``, broadcasting over arrays of angular frequency
``omega`` [rad s^-1] and temperature ``T`` [K]: the result broadcasts to the
shape of omega x T (a rate that does not depend on T keeps omega's shape; use
:meth:`kinetic.LatticeModel.rates` for full arrays). Resistive rates add by
Matthiessen's rule inside :class:`kinetic.LatticeModel`; :class:`Normal`
(momentum-conserving three-phonon processes) enters through Callaway's
correction instead.

Every mechanism has a ``name`` (its default is the mechanism's kind, e.g.
``"umklapp"``; pass ``name=`` to use two of a kind) and declares its
parameters, which the model addresses as ``"<name>.<param>"``. ``applies_to``
restricts a mechanism to branches by name (e.g. ``("L",)``), so branch-specific
coefficients are simply two mechanisms with different names.

Adding a mechanism is one class and its registration: subclass
:class:`Mechanism` as a frozen dataclass with a ``kind``, a plain-words
``label`` and a ``colour`` (hex, used by every plot and table), declare each
parameter in ``_spec`` (unit, plain-words description, bounds, how the rate
scales with it) and write ``rate``; then decorate the class with
:func:`register`. The fitter, the workbench, the command line, records and the
conformance suite (tests/test_mechanism_conformance.py) pick it up from
:data:`MECHANISMS`.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, fields, replace
from typing import ClassVar

import numpy as np
from scipy.constants import hbar, atomic_mass

from .dispersion import Branch
from .errors import ParameterError
from .parameters import Parameter
from .quantities import is_quantity, to_si

__all__ = [
    "Mechanism",
    "Boundary",
    "PointDefect",
    "Umklapp",
    "Normal",
    "ElectronPhonon",
    "Dislocation",
    "Precipitate",
    "MECHANISMS",
    "mechanism_from_dict",
    "register",
]


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
    bounds, and ``rate``.
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

    def rate(self, omega, T, branch: Branch):  # pragma: no cover - abstract
        raise NotImplementedError

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


def _full(value, omega, T):
    """``value`` as an array; it broadcasts against omega x T (no copy is made)."""
    return np.asarray(value)


def _scaled(r, factor):
    """r * factor, in place when r is a fresh array of the full broadcast shape (saves a large temporary)."""
    if isinstance(r, np.ndarray) and r.ndim and r.shape == np.broadcast_shapes(r.shape, np.shape(factor)):
        r *= factor
        return r
    return r * factor


def _power(x, n: float):
    """x**n with the common small integer powers done by multiplication (fast)."""
    if n == 1.0:
        return x
    if n == 2.0:
        return x * x
    if n == 3.0:
        return x * x * x
    if n == 4.0:
        x2 = x * x
        return x2 * x2
    return x**n


# ------------------------------------------------------------------------------------
@dataclass(frozen=True)
class Boundary(Mechanism):
    """Boundary (Casimir) scattering: 1/tau = v_g / L_eff.

    Parameters
    ----------
    length : float
        Boundary length L: grain size, film thickness or Casimir length [m].
    specularity : float
        Fraction p of specular reflections, 0 <= p < 1; Ziman's effective
        length L_eff = L (1 + p) / (1 - p) [dimensionless].

    Notes
    -----
    Casimir, Physica 5, 495 (1938); specularity correction from Ziman,
    *Electrons and Phonons* (Oxford, 1960), sec. 11.4 (common practice). Uses the
    branch group velocity, so it falls at the zone edge for a sine dispersion.

    Examples
    --------
    >>> from kinetic import Branch
    >>> float(Boundary(1e-3).rate(1e12, 300.0, Branch(5000.0, 400.0)))   # v / L [s^-1]
    5000000.0
    >>> Boundary.label, Boundary.colour
    ('Boundaries (grain size)', '#1f77b4')
    """

    length: float = 1e-3
    specularity: float = 0.0
    name: str = "boundary"
    applies_to: tuple | None = None

    kind: ClassVar[str] = "boundary"
    label: ClassVar[str] = "Boundaries (grain size)"
    colour: ClassVar[str] = "#1f77b4"
    limits_mean_free_path: ClassVar[bool] = True
    _spec: ClassVar[dict] = {
        "length": _Spec("m", "grain size / boundary length", (1e-9, 1e-1), power=-1.0),
        "specularity": _Spec("", "specular fraction of boundary reflections p", (0.0, 0.99), log=False,
                             allow_zero=True, upper_open=True),
    }

    @property
    def effective_length(self) -> float:
        """Ziman's effective length L (1 + p) / (1 - p) [m]."""
        p = self.specularity
        return self.length * (1.0 + p) / (1.0 - p)

    def rate(self, omega, T, branch):
        omega, T = _omega_T(omega, T)
        # a Debye branch's group velocity is its sound velocity: no array to build
        v = branch.velocity if branch.dispersion == "debye" else branch.group_velocity(omega)
        return _full(v / self.effective_length, omega, T)


@dataclass(frozen=True)
class PointDefect(Mechanism):
    """Point-defect (Rayleigh) scattering: 1/tau = A omega^4.

    Either give ``A`` directly [s^3], or use :meth:`from_gamma` for Klemens'
    form A = V0 Gamma / (4 pi v^3), evaluated with each branch's own sound
    velocity v.

    Parameters
    ----------
    A : float, optional
        Coefficient of omega^4 [s^3].
    gamma : float, optional
        Scattering parameter Gamma = sum_i f_i (1 - M_i/M)^2 (+ strain terms)
        [dimensionless].
    volume_per_atom : float, optional
        Volume per atom V0, needed with ``gamma`` [m^3].

    Notes
    -----
    Klemens, Proc. Phys. Soc. A 68, 1113 (1955), Eq. 3.14 in the form of
    reference notes; for a dispersive branch the low-frequency (sound)
    velocity is used (common practice).
    """

    A: float | None = None
    gamma: float | None = None
    volume_per_atom: float | None = None
    name: str = "point_defect"
    applies_to: tuple | None = None

    kind: ClassVar[str] = "point_defect"
    label: ClassVar[str] = "Point defects (mass disorder)"
    colour: ClassVar[str] = "#2ca02c"
    _spec: ClassVar[dict] = {
        "A": _Spec("s^3", "point-defect strength A (rate A omega^4)", (1e-48, 1e-38), power=1.0),
        "gamma": _Spec("", "mass-disorder parameter Gamma", (1e-7, 1.0), power=1.0),
        "volume_per_atom": _Spec("m^3", "volume per atom", (1e-30, 1e-27), fixed=True, power=1.0),
    }

    def __post_init__(self):
        super().__post_init__()
        if (self.A is None) == (self.gamma is None):
            raise ParameterError(f"{self.name}: give exactly one of A [s^3] or gamma (with volume_per_atom)")
        if self.gamma is not None and self.volume_per_atom is None:
            raise ParameterError(f"{self.name}: gamma needs volume_per_atom [m^3]")

    @classmethod
    def example(cls) -> "PointDefect":
        """Klemens' form with Gamma = 1e-4 and a volume per atom of 2e-29 m^3 (Si-like, invented)."""
        return cls(gamma=1e-4, volume_per_atom=2e-29)

    @classmethod
    def examples(cls) -> tuple:
        """Klemens' form and the bare coefficient A = 1.3e-45 s^3 (invented, Si-like)."""
        return (cls.example(), cls(A=1.3e-45))

    @classmethod
    def from_gamma(cls, gamma: float, volume_per_atom: float, **kw) -> "PointDefect":
        """Klemens' point-defect scattering from Gamma and the volume per atom [m^3]."""
        return cls(gamma=gamma, volume_per_atom=volume_per_atom, **kw)

    def coefficient(self, branch: Branch) -> float:
        """A for this branch [s^3]."""
        if self.A is not None:
            return self.A
        return self.volume_per_atom * self.gamma / (4.0 * np.pi * branch.velocity**3)

    def rate(self, omega, T, branch):
        omega, T = _omega_T(omega, T)
        r = omega * omega
        r = _scaled(r, r)
        return _scaled(r, self.coefficient(branch))


@dataclass(frozen=True)
class Umklapp(Mechanism):
    """Umklapp three-phonon scattering: 1/tau = B omega^2 T exp(-theta / (b T)).

    ``theta`` is the branch's own Debye temperature. Give ``B`` [s K^-1]
    directly, or use :meth:`from_material` for the Slack-style prefactor
    B = hbar gamma^2 / (M v^2 theta) evaluated per branch (M the mean atomic
    mass, v and theta the branch's velocity and Debye temperature).

    Parameters
    ----------
    B : float, optional
        Prefactor [s K^-1].
    gruneisen : float, optional
        Grüneisen parameter gamma, with ``atomic_mass`` [dimensionless].
    atomic_mass : float, optional
        Mean atomic mass M [kg].
    b : float
        Exponent divisor in exp(-theta / (b T)); 3 after Slack & Galginaitis
        [dimensionless].

    Notes
    -----
    Slack & Galginaitis, Phys. Rev. 133, A253 (1964); prefactor as in
    Morelli, Heremans & Slack, Phys. Rev. B 66, 195304 (2002), Eq. 9.
    """

    B: float | None = None
    gruneisen: float | None = None
    atomic_mass: float | None = None
    b: float = 3.0
    name: str = "umklapp"
    applies_to: tuple | None = None

    kind: ClassVar[str] = "umklapp"
    label: ClassVar[str] = "Umklapp (anharmonic)"
    colour: ClassVar[str] = "#d62728"
    _spec: ClassVar[dict] = {
        "B": _Spec("s K^-1", "Umklapp strength B", (1e-22, 1e-15), power=1.0),
        "gruneisen": _Spec("", "Grüneisen parameter (anharmonicity)", (0.1, 10.0), power=2.0),
        "atomic_mass": _Spec("kg", "mean atomic mass", (1e-27, 1e-24), fixed=True, power=-1.0),
        "b": _Spec("", "Umklapp temperature exponent b", (1.0, 10.0), log=False),
    }

    def __post_init__(self):
        super().__post_init__()
        if (self.B is None) == (self.gruneisen is None):
            raise ParameterError(f"{self.name}: give exactly one of B [s K^-1] or gruneisen (with atomic_mass)")
        if self.gruneisen is not None and self.atomic_mass is None:
            raise ParameterError(f"{self.name}: gruneisen needs atomic_mass [kg]")

    @classmethod
    def example(cls) -> "Umklapp":
        """B = 2e-19 s/K, b = 3 (Si-like order of magnitude, invented)."""
        return cls(B=2e-19)

    @classmethod
    def examples(cls) -> tuple:
        """The bare prefactor and Slack's form (gamma = 1, M = 4.66e-26 kg, Si-like, invented)."""
        return (cls.example(), cls(gruneisen=1.0, atomic_mass=4.66e-26))

    @classmethod
    def from_material(cls, material, *, gruneisen: float | None = None, b: float = 3.0, **kw) -> "Umklapp":
        """Slack-style Umklapp from a :class:`kinetic.materials.Material`.

        ``gruneisen`` defaults to the material's own (for the Si-type presets the
        thermodynamic value, which makes Umklapp too weak in this model); pass
        the preset's calibrated ``material.umklapp_fit["avg"|"split"]`` values,
        as :func:`kinetic.fitting.default_model` does, for a model that
        reproduces the reference k(T) table.
        """
        g = material.gruneisen if gruneisen is None else gruneisen
        if g is None:
            raise ParameterError(
                f"material {material.name!r} has no Grüneisen parameter; pass gruneisen= explicitly"
            )
        return cls(gruneisen=g, atomic_mass=material.atomic_mass * atomic_mass, b=b, **kw)

    def coefficient(self, branch: Branch) -> float:
        """B for this branch [s K^-1]."""
        if self.B is not None:
            return self.B
        return hbar * self.gruneisen**2 / (
            self.atomic_mass * branch.velocity**2 * branch.debye_temperature
        )

    def rate(self, omega, T, branch):
        omega, T = _omega_T(omega, T)
        # exp of a large negative argument underflows quietly to 0 (no warning).
        return _scaled(omega * omega, self.coefficient(branch) * T * np.exp(-branch.debye_temperature / (self.b * T)))


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
        "omega_power": _Spec("", "normal-process frequency exponent n", (0.5, 4.0), log=False, fixed=True),
        "temperature_power": _Spec("", "normal-process temperature exponent m", (0.5, 5.0), log=False,
                                   fixed=True),
    }

    def rate(self, omega, T, branch):
        omega, T = _omega_T(omega, T)
        w = _power(omega, self.omega_power)
        if w is omega:
            w = w.copy()
        return _scaled(w, self.B * _power(T, self.temperature_power))


@dataclass(frozen=True)
class ElectronPhonon(Mechanism):
    """Phonon scattering by free carriers, simplest form: 1/tau = C omega.

    Parameters
    ----------
    C : float
        Coefficient [dimensionless].

    Notes
    -----
    Ziman, Phil. Mag. 1, 191 (1956): proportional to omega when the phonon
    wavevector is small against the Fermi wavevector.
    """

    C: float = 1e-4
    name: str = "electron_phonon"
    applies_to: tuple | None = None

    kind: ClassVar[str] = "electron_phonon"
    label: ClassVar[str] = "Free carriers"
    colour: ClassVar[str] = "#8c564b"
    _spec: ClassVar[dict] = {"C": _Spec("", "carrier-scattering strength C", (1e-8, 1e-1), power=1.0)}

    def rate(self, omega, T, branch):
        omega, T = _omega_T(omega, T)
        return _full(self.C * omega, omega, T)


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
        "burgers": _Spec("m", "Burgers vector", (1e-10, 2e-9), fixed=True),
        "gruneisen": _Spec("", "Grüneisen parameter", (0.1, 10.0), fixed=True),
        "volume_per_atom": _Spec("m^3", "volume per atom", (1e-30, 1e-27), fixed=True),
        "poisson_ratio": _Spec("", "Poisson ratio", (0.0, 0.5), log=False, fixed=True,
                               allow_zero=True, upper_open=True),
        "velocity_ratio": _Spec("", "vL / vT", (1.0, 3.0), log=False, fixed=True),
        "orientation": _Spec("", "orientation factor eta", (0.1, 1.0), log=False, fixed=True, power=1.0),
    }

    def rate(self, omega, T, branch):
        omega, T = _omega_T(omega, T)
        r = self.poisson_ratio
        core = self.orientation * self.density * self.volume_per_atom ** (4.0 / 3.0) * _power(omega, 3.0) / branch.velocity**2
        bracket = 0.5 + (1.0 / 24.0) * ((1 - 2 * r) / (1 - r)) ** 2 * (1 + np.sqrt(2.0) * self.velocity_ratio**2) ** 2
        strain = (self.orientation * 2**1.5 / 3**3.5 * self.density * self.burgers**2
                  * self.gruneisen**2 * omega * bracket)
        return _full(core + strain, omega, T)


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
        "density_contrast": _Spec("", "density contrast dD/D", (1e-3, 10.0), fixed=True),
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


#: kind -> mechanism class, every registered mechanism (see :func:`register`)
MECHANISMS: dict = {}


def register(cls):
    """Register a mechanism class under its ``kind`` (usable as a class decorator).

    Checks what every consumer relies on: a frozen Mechanism dataclass with a
    new identifier ``kind``, a plain-words ``label``, a hex ``colour`` and
    each declared parameter a field with unit text, description and bounds.
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
    names = {f.name for f in fields(cls)}
    for pname, spec in cls._spec.items():
        if pname not in names:
            raise ParameterError(f"{cls.__name__} declares parameter {pname!r} but has no such field")
        if not spec.description or len(spec.bounds) != 2 or not spec.bounds[0] < spec.bounds[1]:
            raise ParameterError(f"{cls.__name__}.{pname} needs a description and bounds lo < hi")
    MECHANISMS[kind] = cls
    return cls


for _cls in (Boundary, PointDefect, Umklapp, Normal, ElectronPhonon, Dislocation, Precipitate):
    register(_cls)


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
