"""Materials: host properties for lattice models, with presets from published data.

``get(name)`` returns a :class:`Material` built from :mod:`kinetic.presets`,
where every number carries its published source (``material.sources`` keeps
them). ``names()`` lists the presets. Users define their own with
``Material(...)``.

Branches. One averaged branch uses the Debye-average sound velocity v_D and the
Debye temperature of the atom density, hbar v_D q_D / kB (Callaway's
formulation; it equals the tabulated theta_D where the preset's numbers agree,
e.g. 645.6 K against 645 K for Si, and keeps exactly 3 modes per atom where they
do not). Split branches use the
longitudinal and transverse velocities, each with a Debye cutoff at the same
Debye-sphere radius q_D = (6 pi^2 n)^(1/3) (n atoms per volume), so each
branch holds its own share of modes: theta_b = hbar v_b q_D / kB. This is
the Debye counting, not the zone-boundary temperatures some split-branch
papers use (see ``theta_longitudinal`` / ``theta_transverse`` to override).

Sine branches hold the same number of modes (q_max = q_D). By default their
slope at q -> 0 is the sound velocity; with ``zone_edge=True`` (split branches
only) they take the preset's zone-edge frequencies from measured phonon
dispersion curves instead (``zone_edge_longitudinal`` / ``zone_edge_transverse``),
see :meth:`kinetic.dispersion.Branch.from_zone_edge`.

``material.calibration`` is the preset's calibration record (source, table,
range, rms) or None; :mod:`kinetic.defaults` builds the calibrated model.
"""
from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field, replace

import numpy as np
from scipy.constants import hbar
from scipy.constants import k as kB

from ._validate import positive
from .dispersion import Branch
from .errors import ParameterError
from .presets import ALIASES, PRESETS

__all__ = ["Material", "get", "names", "preset_key"]


@dataclass(frozen=True)
class Material:
    """Host-crystal properties used by the lattice model and the estimators.

    Parameters
    ----------
    name : str
        Label (preset key or your own).
    atomic_mass : float
        Mean mass per atom [u].
    volume_per_atom : float
        V0 [m^3].
    debye_temperature : float
        theta_D [K].
    velocity_longitudinal, velocity_transverse : float, optional
        Direction-averaged sound velocities [m s^-1]; needed for split branches.
    velocity_debye : float, optional
        Debye-average velocity, 3/v_D^3 = 1/v_L^3 + 2/v_T^3 [m s^-1]; computed
        from v_L, v_T when not given.
    gruneisen : float, optional
        Grüneisen parameter used by ``Umklapp.from_material``; for a preset
        the calibrated Umklapp gamma of its default model (model-specific,
        not gamma_th) [dimensionless].
    gruneisen_thermodynamic : float, optional
        Thermodynamic gamma_th = 3 alpha B / (rho c_p), for information only;
        no default path uses it [dimensionless].
    atoms_per_cell : int
        Atoms in the primitive cell (Slack's n).
    composition : mapping, optional
        Element -> atoms per formula unit, e.g. ``{"Mg": 2, "Si": 1}``.
    theta_longitudinal, theta_transverse : float, optional
        Branch Debye temperatures overriding the Debye counting [K].
    kappa_300K : float, optional
        A reference room-temperature conductivity [W m^-1 K^-1].
    umklapp_fit : mapping, optional
        ``{"avg": {"gruneisen": g, "b": b}, "split": {...}}``: Umklapp
        parameters calibrated on a published k(T) table for this engine's
        averaged or split branches (see the preset's source); used as the
        starting point of :func:`kinetic.fitting.default_model`.
    zone_edge_longitudinal, zone_edge_transverse : float, optional
        Zone-edge frequencies of the L and T acoustic branches from measured
        dispersion curves, mean of the X and L points [Hz].
    calibration : mapping, optional
        The preset's ``"calibration"`` value (table, t_min, t_max, rms,
        n_points, sample) plus ``source``; None for an uncalibrated material.
    sources : mapping
        Field -> where the number comes from.
    formula : str
    """

    name: str
    atomic_mass: float
    volume_per_atom: float
    debye_temperature: float
    velocity_longitudinal: float | None = None
    velocity_transverse: float | None = None
    velocity_debye: float | None = None
    gruneisen: float | None = None
    gruneisen_thermodynamic: float | None = None
    atoms_per_cell: int = 1
    composition: Mapping | None = None
    theta_longitudinal: float | None = None
    theta_transverse: float | None = None
    kappa_300K: float | None = None
    umklapp_fit: Mapping | None = None
    zone_edge_longitudinal: float | None = None
    zone_edge_transverse: float | None = None
    calibration: Mapping | None = None
    sources: Mapping = field(default_factory=dict)
    formula: str = ""

    def __post_init__(self):
        positive(f"{self.name}.atomic_mass", self.atomic_mass, unit="u")
        positive(f"{self.name}.volume_per_atom", self.volume_per_atom, unit="m^3")
        positive(f"{self.name}.debye_temperature", self.debye_temperature, unit="K")
        for f in ("velocity_longitudinal", "velocity_transverse", "velocity_debye", "gruneisen",
                  "gruneisen_thermodynamic",
                  "theta_longitudinal", "theta_transverse", "kappa_300K",
                  "zone_edge_longitudinal", "zone_edge_transverse"):
            v = getattr(self, f)
            if v is not None:
                object.__setattr__(self, f, float(positive(f"{self.name}.{f}", v)))
        if int(self.atoms_per_cell) != self.atoms_per_cell or self.atoms_per_cell < 1:
            raise ParameterError(f"{self.name}.atoms_per_cell must be a whole number >= 1, got {self.atoms_per_cell!r}")
        if self.velocity_debye is None and self.velocity_longitudinal and self.velocity_transverse:
            vd = (3.0 / (self.velocity_longitudinal**-3 + 2.0 * self.velocity_transverse**-3)) ** (1 / 3)
            object.__setattr__(self, "velocity_debye", vd)
        if self.velocity_debye is None:
            # Debye's relation theta = hbar v q_D / kB, q_D = (6 pi^2 / V0)^(1/3)
            object.__setattr__(self, "velocity_debye", kB * self.debye_temperature / (hbar * self.q_debye))

    @property
    def number_density(self) -> float:
        """Atoms per volume [m^-3]."""
        return 1.0 / self.volume_per_atom

    @property
    def q_debye(self) -> float:
        """Debye wavevector (6 pi^2 n)^(1/3) [m^-1]."""
        return (6.0 * np.pi**2 * self.number_density) ** (1.0 / 3.0)

    @property
    def has_split_velocities(self) -> bool:
        return self.velocity_longitudinal is not None and self.velocity_transverse is not None

    @property
    def has_zone_edges(self) -> bool:
        return self.zone_edge_longitudinal is not None and self.zone_edge_transverse is not None

    def branches(self, split: bool = False, dispersion: str = "debye", *, zone_edge: bool = False) -> list:
        """Phonon branches: one averaged branch, or longitudinal + transverse.

        ``zone_edge=True`` (split sine branches only) matches the measured
        zone-edge frequencies instead of the sound velocities.
        """
        if zone_edge:
            if not (split and dispersion == "sine"):
                raise ParameterError("zone_edge=True needs split branches with the sine dispersion")
            if not self.has_zone_edges:
                raise ParameterError(
                    f"material {self.name!r} has no zone-edge frequencies; give zone_edge_longitudinal and "
                    "zone_edge_transverse [Hz] or use zone_edge=False")
            q = self.q_debye
            return [Branch.from_zone_edge(self.zone_edge_longitudinal, q, 1, name="L"),
                    Branch.from_zone_edge(self.zone_edge_transverse, q, 2, name="T")]
        if not split:
            # the Debye sphere of the atom density (3 modes per atom exactly): theta from v_D and q_D,
            # which equals the table theta_D where the preset's numbers agree (Si: 645.6 vs 645 K)
            theta = hbar * self.velocity_debye * self.q_debye / kB
            return [Branch(self.velocity_debye, theta, 3, dispersion=dispersion, name="avg")]
        if not self.has_split_velocities:
            raise ParameterError(
                f"material {self.name!r} has no longitudinal/transverse velocities; "
                "use split_branches=False or give velocity_longitudinal and velocity_transverse"
            )
        thL = self.theta_longitudinal or hbar * self.velocity_longitudinal * self.q_debye / kB
        thT = self.theta_transverse or hbar * self.velocity_transverse * self.q_debye / kB
        return [
            Branch(self.velocity_longitudinal, thL, 1, dispersion=dispersion, name="L"),
            Branch(self.velocity_transverse, thT, 2, dispersion=dispersion, name="T"),
        ]

    def with_values(self, **kw) -> Material:
        return replace(self, **kw)

    def to_dict(self) -> dict:
        d = {k: getattr(self, k) for k in (
            "name", "atomic_mass", "volume_per_atom", "debye_temperature", "velocity_longitudinal",
            "velocity_transverse", "velocity_debye", "gruneisen", "gruneisen_thermodynamic", "atoms_per_cell",
            "theta_longitudinal", "theta_transverse", "kappa_300K", "formula",
            "zone_edge_longitudinal", "zone_edge_transverse")}
        d["composition"] = dict(self.composition) if self.composition else None
        d["umklapp_fit"] = {k: dict(v) for k, v in self.umklapp_fit.items()} if self.umklapp_fit else None
        d["calibration"] = dict(self.calibration) if self.calibration else None
        return d

    @classmethod
    def from_dict(cls, d: Mapping) -> Material:
        return cls(**dict(d))


def _value(entry):
    return None if entry is None else entry.get("value")


def names() -> list:
    """Preset names, e.g. ``["Si", "Ge", "C", ...]``."""
    return list(PRESETS)


def preset_key(name: str) -> str:
    """The preset key for a name or alias (``"diamond"`` -> ``"C"``); ParameterError listing the valid ones."""
    return _key(name)


def _key(name: str) -> str:
    if name in PRESETS:
        return name
    k = ALIASES.get(str(name).lower())
    if k is None:
        for p in PRESETS:
            if p.lower() == str(name).lower():
                return p
        raise ParameterError(
            f"unknown material {name!r}; presets are: {', '.join(PRESETS)} (aliases: {', '.join(ALIASES)})"
        )
    return k


def _calibration(p) -> dict | None:
    cal = p.get("calibration")
    if not cal or cal.get("value") is None:
        return None
    return {**cal["value"], "source": cal.get("source", ""), "how": cal.get("how", "")}


def get(name: str) -> Material:
    """A preset material by name (case-insensitive; "diamond" works for C).

    ``gruneisen`` is the Umklapp Grüneisen parameter of the preset's
    CALIBRATED model (``kinetic.defaults``), which belongs to that model's
    branch form; None for an uncalibrated preset, so that no path falls back
    silently to an uncalibrated value. The thermodynamic gamma_th of the
    preset is kept apart in ``gruneisen_thermodynamic`` (information only).
    """
    key = _key(name)
    p = PRESETS[key]
    model = (p.get("model") or {}).get("value") or {}
    umk = (model.get("mechanisms") or {}).get("umklapp") or {}
    g = umk.get("gruneisen")
    sources = {f: f"{e.get('source', '')} ({e.get('how', '')})" for f, e in p.items() if isinstance(e, dict)}
    if g is not None:
        sources["gruneisen"] = (f"calibrated Umklapp gamma of the preset model: {p['model'].get('source', '')} "
                                f"({p['model'].get('how', '')})")
    else:
        sources["gruneisen"] = "none: the preset has no calibrated model"
    sources["gruneisen_thermodynamic"] = (f"{p['gruneisen'].get('source', '')} ({p['gruneisen'].get('how', '')})"
                                          if p.get("gruneisen") else "unknown")
    return Material(
        name=key,
        formula=str(_value(p.get("formula")) or key),
        atomic_mass=_value(p["atomic_mass"]),
        volume_per_atom=_value(p["lattice_volume_per_atom"]),
        debye_temperature=_value(p["debye_temperature"]),
        velocity_longitudinal=_value(p.get("velocity_longitudinal")),
        velocity_transverse=_value(p.get("velocity_transverse")),
        velocity_debye=_value(p.get("velocity_debye")),
        gruneisen=g,
        gruneisen_thermodynamic=_value(p.get("gruneisen")),
        atoms_per_cell=int(_value(p.get("atoms_per_cell")) or 1),
        composition=_value(p.get("composition")),
        kappa_300K=_value(p.get("kappa_300K")),
        umklapp_fit=_value(p.get("umklapp_fit")),
        zone_edge_longitudinal=_value(p.get("zone_edge_longitudinal")),
        zone_edge_transverse=_value(p.get("zone_edge_transverse")),
        calibration=_calibration(p),
        sources=sources,
    )
