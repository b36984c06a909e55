"""ConductivityModel (lattice + electronic + bipolar) and its ConductivityParts."""
from __future__ import annotations

from collections.abc import Mapping
from dataclasses import KW_ONLY, dataclass, field, replace

import numpy as np

from ..data import Dataset
from ..errors import ParameterError
from ..lattice import LatticeModel
from ._common import _electronic_flag, _frozen, _kelvin, _lorenz_spec
from ._show import parts_html, parts_text
from .terms import BipolarTerm, ElectronicTerm

__all__ = ["ConductivityParts", "ConductivityModel"]


@dataclass(frozen=True, eq=False)
class ConductivityParts:
    """Thermal conductivity split into its parts, on one temperature grid.

    Attributes
    ----------
    temperature : ndarray
        T [K].
    total : ndarray
        lattice + electronic + bipolar [W m^-1 K^-1] (exactly that sum).
    lattice : ndarray
        Phonon part [W m^-1 K^-1].
    electronic : ndarray
        L T / rho [W m^-1 K^-1]; zeros when the model has no electronic term,
        NaN where ``outside="nan"`` left it undefined (the total is NaN there too).
    bipolar : ndarray
        Bipolar part [W m^-1 K^-1]; zeros when the model has none.
    electronic_err : ndarray
        1-sigma uncertainty of ``electronic`` from the Lorenz choice [W m^-1 K^-1]; zeros when absent.
    has_electronic, has_bipolar : bool
        Whether the model holds these terms (so plots can hide the zero curves).
    lorenz_method : str or None
        How L was chosen ("sommerfeld", "spb", "kim", "given"), None without an electronic term.
    notes : list of str
        Plain-words remarks (missing electronic data, temperatures outside the measured range).
    """

    temperature: np.ndarray
    total: np.ndarray
    lattice: np.ndarray
    electronic: np.ndarray
    bipolar: np.ndarray
    electronic_err: np.ndarray
    has_electronic: bool = False
    has_bipolar: bool = False
    lorenz_method: str | None = None
    notes: list = field(default_factory=list)

    def columns(self) -> dict:
        """Column name with unit -> array, for tables and CSV export."""
        return {"temperature [K]": self.temperature, "total [W/(m K)]": self.total,
                "lattice [W/(m K)]": self.lattice, "electronic [W/(m K)]": self.electronic,
                "electronic_err [W/(m K)]": self.electronic_err, "bipolar [W/(m K)]": self.bipolar}

    def __repr__(self) -> str:
        return parts_text(self)

    def _repr_html_(self) -> str:
        return parts_html(self)


@dataclass(frozen=True, eq=False)
class ConductivityModel:
    """Lattice model plus optional electronic and bipolar terms (immutable).

    Parameters
    ----------
    lattice : LatticeModel
    electronic : ElectronicTerm, optional
    bipolar : BipolarTerm, optional
    notes : tuple of str, keyword
        Remarks carried into every :meth:`parts` result (e.g. from :meth:`from_dataset`).

    Parameters are addressed as the lattice model's ``"<mechanism>.<param>"``
    plus ``"bipolar.<param>"``; a lattice mechanism named "bipolar" next to a
    bipolar term is refused.
    """

    lattice: LatticeModel
    electronic: ElectronicTerm | None = None
    bipolar: BipolarTerm | None = None
    _: KW_ONLY
    notes: tuple = ()

    def __post_init__(self):
        for name, obj, cls in (("lattice", self.lattice, LatticeModel), ("electronic", self.electronic, ElectronicTerm),
                               ("bipolar", self.bipolar, BipolarTerm)):
            if not isinstance(obj, cls) and not (obj is None and name != "lattice"):
                article = "an" if cls.__name__[0] in "AEIOU" else "a"
                optional = "" if name == "lattice" else " or None"
                raise ParameterError(f"{name} must be {article} {cls.__name__}{optional}, got {type(obj).__name__}")
        if self.bipolar is not None and "bipolar" in self.lattice.mechanism_names:
            raise ParameterError("the lattice model has a mechanism named 'bipolar', which collides with the "
                                 "bipolar term's parameters; rename it with name='...'")
        object.__setattr__(self, "notes", tuple(str(n) for n in self.notes))

    @classmethod
    def from_dataset(cls, lattice: LatticeModel, dataset: Dataset, *, lorenz="auto", electronic=True,
                     bipolar: BipolarTerm | None = None) -> "ConductivityModel":
        """The model of a measured sample: its resistivity (and Seebeck) columns give the electronic term.

        ``electronic``: True (or "auto") uses the resistivity when the data are a
        total conductivity with a resistivity column (else no term, with a note);
        False (or "none") leaves the electronic part out.
        """
        use = _electronic_flag(electronic)
        if not isinstance(dataset, Dataset):
            raise ParameterError(f"dataset must be a kinetic.data.Dataset, got {type(dataset).__name__}")
        name = dataset.label or "data"
        term, notes = None, []
        if not use:
            _lorenz_spec(lorenz, True)
            notes.append(f"{name}: electronic part left out (electronic=False)")
        elif dataset.kind == "lattice":
            _lorenz_spec(lorenz, True)
            notes.append(f"{name}: the data are lattice conductivity; no electronic part")
        elif dataset.resistivity is None:
            _lorenz_spec(lorenz, True)
            notes.append(f"{name}: no resistivity column, so no electronic part")
        else:
            term = ElectronicTerm.from_dataset(dataset, lorenz=lorenz)
        return cls(lattice, term, bipolar, notes=tuple(notes))

    # --- parameters -------------------------------------------------------------------------
    @property
    def params(self) -> dict:
        """Every parameter value: the lattice model's and ``"bipolar.<name>"``."""
        out = dict(self.lattice.params)
        if self.bipolar is not None:
            out.update(self.bipolar.params)
        return out

    def parameter_info(self) -> dict:
        """Key -> :class:`kinetic.parameters.Parameter` (units, bounds, plain words) for every parameter."""
        out = dict(self.lattice.parameter_info())
        if self.bipolar is not None:
            out.update(self.bipolar.parameters)
        return out

    def with_params(self, values: Mapping) -> "ConductivityModel":
        """A new model with some parameter values replaced (lattice keys and ``"bipolar.<name>"``)."""
        values = dict(values)
        known = self.params
        for key in values:
            if key not in known:
                raise ParameterError(f"unknown parameter {key!r}; valid names: {', '.join(known)}")
        bip = {k: v for k, v in values.items() if k.startswith("bipolar.") and self.bipolar is not None}
        lat = {k: v for k, v in values.items() if k not in bip}
        return replace(self, lattice=self.lattice.with_params(lat) if lat else self.lattice,
                       bipolar=self.bipolar.with_params(bip) if bip else self.bipolar)

    def with_lattice(self, lattice: LatticeModel) -> "ConductivityModel":
        return replace(self, lattice=lattice)

    def with_electronic(self, electronic: ElectronicTerm | None) -> "ConductivityModel":
        return replace(self, electronic=electronic)

    def with_bipolar(self, bipolar: BipolarTerm | None) -> "ConductivityModel":
        return replace(self, bipolar=bipolar)

    # --- evaluation -------------------------------------------------------------------------
    def parts(self, temperature, *, outside: str = "raise") -> ConductivityParts:
        """Lattice, electronic, bipolar and total conductivity at temperature [K] (array or pint quantity).

        ``outside``: what to do at temperatures beyond a measured resistivity
        grid: "raise" (default, ParameterError) or "nan" (electronic and total
        NaN there, with a note).
        """
        if outside not in ("raise", "nan"):
            raise ParameterError(f"outside must be 'raise' or 'nan', got {outside!r}")
        T = _kelvin(temperature)
        lat = np.asarray(self.lattice.kappa(T), dtype=float)
        zeros = np.zeros(T.shape)
        notes = list(self.notes)
        ke, ke_err, method = zeros, zeros, None
        if self.electronic is not None:
            ok = self.electronic.inside(T) if outside == "nan" else np.ones(T.shape, bool)
            ke, ke_err = np.full(T.shape, np.nan), np.full(T.shape, np.nan)
            if np.any(ok):
                ev = self.electronic.evaluate(T[ok])
                ke[ok], ke_err[ok], method = ev.value, ev.uncertainty, ev.method
            else:
                method = self.electronic.method
            if not np.all(ok):
                lo, hi = self.electronic.temperature_range
                notes.append(f"electronic part undefined at {int((~ok).sum())} temperature(s) outside the "
                             f"measured resistivity range {lo:g}-{hi:g} K (total set to NaN there)")
        kb = zeros if self.bipolar is None else self.bipolar.kappa(T)
        return ConductivityParts(_frozen(T), _frozen(lat + ke + kb), _frozen(lat), _frozen(ke), _frozen(kb),
                                 _frozen(ke_err), self.electronic is not None, self.bipolar is not None,
                                 method, notes)

    def kappa(self, temperature) -> np.ndarray:
        """Total thermal conductivity [W m^-1 K^-1] at temperature [K]."""
        return np.array(self.parts(temperature).total)


