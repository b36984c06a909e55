"""The :class:`Dataset`: one measured sample in SI units, validated, read-only."""
from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from typing import Any, Iterable, Mapping

import numpy as np

from ..errors import DataError, ParameterError, RecordError
from . import diffusivity as _flash
from .columns import _KINDS
from .units import _PINT_SI, _WHAT, SI_UNITS
from .values import (
    _as_columns,
    _check_values,
    _fmt,
    _is_quantity,
    _readonly,
    _scalar,
    _sort_and_merge,
    _where_array,
)

__all__ = ["Dataset"]

_FORMAT = "kinetic.dataset"
_VERSION = 1


@dataclass(frozen=True, eq=False, repr=False)
class Dataset:
    """One measured sample: thermal conductivity against temperature, in SI units.

    Build one with :func:`load_data` (from a file), :meth:`from_arrays` or
    :meth:`from_dict`.  Direct construction validates too.  Arrays are stored
    read-only.

    Attributes
    ----------
    temperature : ndarray
        Temperatures [K], 1-D, strictly ascending, > 0.
    kappa : ndarray
        Thermal conductivity [W m^-1 K^-1], > 0.
    kappa_err : ndarray or None
        One-standard-deviation uncertainty of kappa [W m^-1 K^-1], > 0.
    kind : str
        "total" (everything measured) or "lattice" (electronic part removed).
    resistivity : ndarray or None
        Electrical resistivity [Ohm m], > 0 (see :attr:`sigma`).
    seebeck : ndarray or None
        Seebeck coefficient [V/K], either sign.
    label : str
        Sample name (e.g. grain size or composition) for legends and fit records.
    source : str or None
        Path of the file read, or None.
    sha256 : str or None
        Hex SHA-256 of the file's bytes, or None for data not read from a file.
    notes : tuple of str
        Comment lines from the file (verbatim, starting with "#") and notes by the
        loader about what it did (sorting, merging, unit defaults).
    units : dict
        Quantity name ("temperature", "kappa", "kappa_err", "resistivity" or
        "sigma", "seebeck") -> the unit the values were given in, as written.
    diffusivity : ndarray or None
        For k from a flash measurement: the thermal diffusivity D [m^2/s].
    density : ndarray or None
        The mass density rho used in k = D rho c_p [kg/m^3] (of the sample as
        measured, before any porosity correction).
    heat_capacity : ndarray or None
        The specific heat capacity c_p used [J kg^-1 K^-1].
    heat_capacity_choice : str or None
        Where c_p came from: "column", "header", "option" (measured values),
        "dulong-petit" or "debye" (see :mod:`kinetic.heat_capacity`).
    relative_density : float or None
        Density of the pellet over that of the full-density solid, in (0, 1].
    porosity_correction : str or None
        The effective-medium relation that corrected kappa to full density
        (see :mod:`kinetic.porosity`), or None when kappa is that of the sample.
    """

    temperature: np.ndarray
    kappa: np.ndarray
    kappa_err: np.ndarray | None = None
    kind: str = "total"
    resistivity: np.ndarray | None = None
    seebeck: np.ndarray | None = None
    label: str = ""
    source: str | None = None
    sha256: str | None = None
    notes: tuple[str, ...] = ()
    units: dict[str, str] = field(default_factory=dict)
    diffusivity: np.ndarray | None = None
    density: np.ndarray | None = None
    heat_capacity: np.ndarray | None = None
    heat_capacity_choice: str | None = None
    relative_density: float | None = None
    porosity_correction: str | None = None

    def __post_init__(self):
        if self.kind not in _KINDS:
            raise ParameterError(f'kind must be "total" or "lattice", got {self.kind!r}')
        if not isinstance(self.label, str):
            raise ParameterError(f"label must be a string, got {self.label!r}")
        if self.source is not None and not isinstance(self.source, str):
            raise ParameterError(f"source must be a string or None, got {self.source!r}")
        if self.sha256 is not None and not (isinstance(self.sha256, str)
                                            and re.fullmatch(r"[0-9a-f]{64}", self.sha256)):
            raise ParameterError(f"sha256 must be 64 lower-case hex digits or None, got {self.sha256!r}")
        cols = {"temperature": self.temperature, "kappa": self.kappa,
                "kappa_err": self.kappa_err, "resistivity": self.resistivity,
                "seebeck": self.seebeck, "diffusivity": self.diffusivity,
                "density": self.density, "heat_capacity": self.heat_capacity}
        conv = _as_columns(cols)
        n = conv["temperature"].size
        _check_values(conv, lambda r, i: f"{r}[{i}]", lambda r, i: repr(float(conv[r][i])))
        d = np.diff(conv["temperature"])
        if n > 1 and not np.all(d > 0):
            i = int(np.flatnonzero(~(d > 0))[0]) + 1
            raise DataError(
                f"temperature[{i}]: expected temperatures in strictly ascending order, got "
                f"{_fmt(conv['temperature'][i])} K after {_fmt(conv['temperature'][i - 1])} K "
                "(Dataset.from_arrays sorts and merges for you)")
        for r, a in conv.items():
            object.__setattr__(self, r, _readonly(a))
        object.__setattr__(self, "notes", tuple(str(s) for s in self.notes))
        object.__setattr__(self, "units", {str(k): str(v) for k, v in dict(self.units).items()})
        for name in ("heat_capacity_choice", "porosity_correction"):
            v = getattr(self, name)
            if v is not None and not isinstance(v, str):
                raise ParameterError(f"{name} must be a string or None, got {v!r}")
        rd = self.relative_density
        if rd is not None:
            if isinstance(rd, bool) or not isinstance(rd, (int, float)) or not 0.0 < rd <= 1.0:
                raise ParameterError(f"relative_density must be a number in (0, 1], got {rd!r}")
            object.__setattr__(self, "relative_density", float(rd))

    # ---- construction -------------------------------------------------------------

    @classmethod
    def from_arrays(cls, temperature, kappa, *, kappa_err=None, resistivity=None, sigma=None,
                    seebeck=None, kind: str = "total", label: str = "",
                    notes: Iterable[str] = ()) -> "Dataset":
        """Build a Dataset from arrays (or pint quantities), with the loader's checks.

        Parameters
        ----------
        temperature : array_like
            Temperatures [K] (a pint Quantity in any temperature unit is converted).
        kappa : array_like
            Thermal conductivity [W m^-1 K^-1].
        kappa_err : array_like, optional
            Uncertainty of kappa [W m^-1 K^-1], > 0.
        resistivity : array_like, optional
            Electrical resistivity [Ohm m], > 0.  Give this or ``sigma``, not both.
        sigma : array_like, optional
            Electrical conductivity [S/m], > 0; stored as resistivity = 1/sigma.
        seebeck : array_like, optional
            Seebeck coefficient [V/K].
        kind : {"total", "lattice"}
            What kappa contains.
        label : str
            Sample name.
        notes : iterable of str
            Extra notes to keep.

        Returns
        -------
        Dataset
            Rows sorted by temperature (with a note if they were not); identical
            repeated rows merged.

        Raises
        ------
        DataError
            A value is not finite, out of range, or arrays differ in length; the
            message names the parameter and index, e.g. ``kappa[3]``.
        ParameterError
            ``kind`` or ``label`` is invalid, or both resistivity and sigma given.
        """
        if kind not in _KINDS:
            raise ParameterError(f'kind must be "total" or "lattice", got {kind!r}')
        if not isinstance(label, str):
            raise ParameterError(f"label must be a string, got {label!r}")
        if resistivity is not None and sigma is not None:
            raise ParameterError("give resistivity [Ohm m] or sigma [S/m], not both")
        raw = {"temperature": temperature, "kappa": kappa, "kappa_err": kappa_err,
               "resistivity": resistivity, "sigma": sigma, "seebeck": seebeck}
        units: dict[str, str] = {}
        conv_in = {}
        for r, v in raw.items():
            if v is None:
                continue
            if hasattr(v, "magnitude") and hasattr(v, "units") and hasattr(v, "to"):
                units[r] = str(v.units)
                try:
                    v = v.to(_PINT_SI[r]).magnitude
                except Exception as exc:  # pint DimensionalityError and friends
                    raise DataError(f"{r}: expected {_WHAT[r]}, got a quantity in "
                                    f"{v.units} ({type(exc).__name__})") from None
            else:
                units[r] = SI_UNITS[r]
            conv_in[r] = v
        cols = _as_columns(conv_in)
        shown = {r: a for r, a in cols.items()}
        _check_values(cols, lambda r, i: f"{r}[{i}]", lambda r, i: repr(float(shown[r][i])))
        if cols.get("sigma") is not None:
            cols["resistivity"] = 1.0 / cols.pop("sigma")
        else:
            cols.pop("sigma", None)
        note_list = [str(s) for s in notes]
        cols = _sort_and_merge(cols, _where_array("temperature"), note_list, file_mode=False)
        return cls(temperature=cols["temperature"], kappa=cols["kappa"],
                   kappa_err=cols.get("kappa_err"), kind=kind,
                   resistivity=cols.get("resistivity"), seebeck=cols.get("seebeck"),
                   label=label, notes=tuple(note_list), units=units)

    @classmethod
    def from_diffusivity(cls, temperature, diffusivity, *, density, heat_capacity,
                         diffusivity_err=None, material: str | None = None,
                         relative_density=None, porosity_correction: str | None = None,
                         diffusivity_rel_err: float | None = None,
                         density_rel_err: float | None = None,
                         heat_capacity_rel_err: float | None = None, kind: str = "total",
                         label: str = "", notes: Iterable[str] = ()) -> Dataset:
        """A Dataset of k = D rho c_p from arrays of a flash measurement.

        The door for arrays that :func:`kinetic.data.load_data` is for files, with
        the same rules (see :mod:`kinetic.data.diffusivity`).

        Parameters
        ----------
        temperature : array_like or pint Quantity
            Temperatures [K] (a quantity in any temperature unit is converted).
        diffusivity : array_like or pint Quantity
            Thermal diffusivity D [m^2/s] (a quantity in mm^2/s etc. is converted).
        density : float, array_like, str or pint Quantity
            Density [kg/m^3], e.g. ``"5.2 g/cm^3"`` or a quantity.
        heat_capacity : float, array_like, str or pint Quantity
            c_p [J kg^-1 K^-1], or "dulong-petit" / "debye" (needs ``material``).
        diffusivity_err : array_like or pint Quantity, optional
            Standard error of D [m^2/s] (else ``diffusivity_rel_err`` or 3 %).

        Other keywords are those of :func:`kinetic.data.load_data`.

        Examples
        --------
        >>> import pint
        >>> u = pint.UnitRegistry()
        >>> ds = Dataset.from_diffusivity(u.Quantity([300.0, 400.0], "K"),
        ...                               u.Quantity([4.0, 3.0], "mm^2/s"),
        ...                               density="2 g/cm^3", heat_capacity="0.5 J/(g K)")
        >>> ds.kappa.tolist()
        [4.0, 3.0]

        Raises
        ------
        DataError, ParameterError
            A missing, implausible or non-positive value, naming the parameter.
        """
        raw = {"temperature": temperature, "diffusivity": diffusivity,
               "diffusivity_err": diffusivity_err}
        conv = {}
        for r, v in raw.items():
            if v is None:
                continue
            if _is_quantity(v):
                try:
                    v = v.to(_PINT_SI[r]).magnitude
                except Exception as exc:  # noqa: BLE001  pint DimensionalityError and friends
                    raise DataError(f"{r}: expected {_WHAT[r]}, got a quantity in {v.units} "
                                    f"({type(exc).__name__})") from None
            conv[r] = v
        d_err = conv.pop("diffusivity_err", None)
        cols = _as_columns({"temperature": conv["temperature"], "kappa": conv["diffusivity"],
                            "diffusivity": conv["diffusivity"]})
        T, D = cols["temperature"], cols["diffusivity"]
        _check_values({"temperature": T, "diffusivity": D}, lambda r, i: f"{r}[{i}]",
                      lambda r, i: repr(float(cols[r][i])))
        if d_err is not None:
            d_err = _as_columns({"temperature": T, "kappa": np.asarray(d_err, float)})["kappa"]
        dens_col = cp_col = None
        dens_opt, cp_opt = density, heat_capacity
        if np.ndim(density) == 1 and not isinstance(density, str):
            dens_col = np.asarray(density.to(_PINT_SI["density"]).magnitude if
                                  _is_quantity(density) else density, dtype=float)
            dens_opt = None
        if np.ndim(heat_capacity) == 1 and not isinstance(heat_capacity, str):
            cp_col = np.asarray(heat_capacity.to(_PINT_SI["heat_capacity"]).magnitude if
                                _is_quantity(heat_capacity) else heat_capacity, dtype=float)
            cp_opt = None
        out = _flash.kappa_from_diffusivity(
            name="from_diffusivity", temperature=T, diffusivity=D, diffusivity_err=d_err,
            density_column=dens_col, cp_column=cp_col, header={},
            col_where=lambda r, i: f"{r}[{i}]", density=dens_opt, heat_capacity=cp_opt,
            material=material, diffusivity_rel_err=diffusivity_rel_err,
            density_rel_err=density_rel_err, heat_capacity_rel_err=heat_capacity_rel_err)
        por = _flash.porosity_step(name="from_diffusivity", kappa=out["kappa"],
                                   kappa_err=out["kappa_err"], relative_density=relative_density,
                                   relation=porosity_correction, header={})
        note_list = [str(n) for n in notes] + out["notes"] + por["notes"]
        cols = {"temperature": T, "kappa": por["kappa"], "kappa_err": por["kappa_err"],
                "diffusivity": D, "density": out["density"], "heat_capacity": out["heat_capacity"]}
        cols = _sort_and_merge(cols, _where_array("temperature"), note_list, file_mode=False)
        return cls(temperature=cols["temperature"], kappa=cols["kappa"],
                   kappa_err=cols["kappa_err"], kind=kind, label=label, notes=tuple(note_list),
                   units={"temperature": "K", "kappa": "W/(m K) (from D rho c_p)"},
                   diffusivity=cols["diffusivity"], density=cols["density"],
                   heat_capacity=cols["heat_capacity"], heat_capacity_choice=out["choice"],
                   relative_density=por["relative_density"],
                   porosity_correction=por["relation"])

    def to_dict(self) -> dict[str, Any]:
        """A JSON-safe dict (lists of floats; ``json`` round-trips them exactly)."""
        def lst(a):
            return None if a is None else [float(x) for x in a.tolist()]

        return {
            "format": _FORMAT,
            "version": _VERSION,
            "label": self.label,
            "kind": self.kind,
            "source": self.source,
            "sha256": self.sha256,
            "notes": list(self.notes),
            "units": dict(self.units),
            "temperature": lst(self.temperature),
            "kappa": lst(self.kappa),
            "kappa_err": lst(self.kappa_err),
            "resistivity": lst(self.resistivity),
            "seebeck": lst(self.seebeck),
            **({} if self.diffusivity is None else {
                "diffusivity": lst(self.diffusivity),
                "density": lst(self.density),
                "heat_capacity": lst(self.heat_capacity),
                "heat_capacity_choice": self.heat_capacity_choice,
            }),
            **({} if self.relative_density is None else {
                "relative_density": self.relative_density,
                "porosity_correction": self.porosity_correction,
            }),
        }

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> "Dataset":
        """Rebuild a Dataset written by :meth:`to_dict` (exact round trip).

        Raises
        ------
        RecordError
            The dict is not a dataset, is from a newer version, or its values are
            invalid (the message says which key).
        """
        if not isinstance(d, Mapping):
            raise RecordError(f"dataset record must be a dict, got {type(d).__name__}")
        if d.get("format") != _FORMAT:
            raise RecordError(f'dataset record: expected format "{_FORMAT}", got {d.get("format")!r}')
        ver = d.get("version")
        if not isinstance(ver, int) or isinstance(ver, bool) or ver < 1:
            raise RecordError(f"dataset record: expected an integer version >= 1, got {ver!r}")
        if ver > _VERSION:
            raise RecordError(f"dataset record: version {ver} is newer than this kinetic "
                              f"understands ({_VERSION}); update kinetic")
        known = {"format", "version", "label", "kind", "source", "sha256", "notes", "units",
                 "temperature", "kappa", "kappa_err", "resistivity", "seebeck",
                 "diffusivity", "density", "heat_capacity", "heat_capacity_choice",
                 "relative_density", "porosity_correction"}
        extra = sorted(set(d) - known)
        if extra:
            raise RecordError(f"dataset record: unknown key {extra[0]!r}")
        for key in ("temperature", "kappa"):
            if key not in d:
                raise RecordError(f"dataset record: missing key {key!r}")

        def arr(key):
            v = d.get(key)
            if v is None:
                return None
            if not isinstance(v, (list, tuple)) or not all(
                    isinstance(x, (int, float)) and not isinstance(x, bool) for x in v):
                raise RecordError(f"dataset record: {key} must be a list of numbers")
            return np.array(v, dtype=float)

        notes = d.get("notes", [])
        units = d.get("units", {})
        if not isinstance(notes, (list, tuple)) or not all(isinstance(s, str) for s in notes):
            raise RecordError("dataset record: notes must be a list of strings")
        if not isinstance(units, Mapping) or not all(
                isinstance(k, str) and isinstance(v, str) for k, v in units.items()):
            raise RecordError("dataset record: units must map strings to strings")
        try:
            return cls(temperature=arr("temperature"), kappa=arr("kappa"),
                       kappa_err=arr("kappa_err"), kind=d.get("kind", "total"),
                       resistivity=arr("resistivity"), seebeck=arr("seebeck"),
                       label=d.get("label", ""), source=d.get("source"), sha256=d.get("sha256"),
                       notes=tuple(notes), units=dict(units),
                       diffusivity=arr("diffusivity"), density=arr("density"),
                       heat_capacity=arr("heat_capacity"),
                       heat_capacity_choice=d.get("heat_capacity_choice"),
                       relative_density=d.get("relative_density"),
                       porosity_correction=d.get("porosity_correction"))
        except (DataError, ParameterError) as exc:
            raise RecordError(f"dataset record: {exc}") from None

    # ---- views ----------------------------------------------------------------------

    def __len__(self) -> int:
        return int(self.temperature.size)

    @property
    def sigma(self) -> np.ndarray | None:
        """Electrical conductivity [S/m] = 1/resistivity, or None."""
        if self.resistivity is None:
            return None
        return 1.0 / self.resistivity

    @property
    def has_electrical(self) -> bool:
        """True when resistivity (or conductivity) was measured."""
        return self.resistivity is not None

    def subset(self, tmin: float | None = None, tmax: float | None = None) -> "Dataset":
        """Rows with tmin <= T <= tmax [K] (either end may be None) as a new Dataset.

        Raises
        ------
        ParameterError
            tmin/tmax not numbers, or tmin > tmax.
        DataError
            No row lies in the range.
        """
        lo = -math.inf if tmin is None else _scalar("tmin", tmin)
        hi = math.inf if tmax is None else _scalar("tmax", tmax)
        if lo > hi:
            raise ParameterError(f"tmin must not exceed tmax, got tmin={lo!r} K, tmax={hi!r} K")
        m = (self.temperature >= lo) & (self.temperature <= hi)
        k = int(m.sum())
        if k == 0:
            raise DataError(f"{self.label or 'dataset'}: no rows between {_fmt(lo)} K and "
                            f"{_fmt(hi)} K (data span {_fmt(self.temperature[0])} to "
                            f"{_fmt(self.temperature[-1])} K)")

        def cut(a):
            return None if a is None else a[m]

        rng = " and ".join(s for s in ((f"T >= {_fmt(lo)} K" if tmin is not None else ""),
                                       (f"T <= {_fmt(hi)} K" if tmax is not None else "")) if s)
        note = f"subset {rng or 'all temperatures'} ({k} of {len(self)} rows)"
        return Dataset(temperature=cut(self.temperature), kappa=cut(self.kappa),
                       kappa_err=cut(self.kappa_err), kind=self.kind,
                       resistivity=cut(self.resistivity), seebeck=cut(self.seebeck),
                       label=self.label, source=self.source, sha256=self.sha256,
                       notes=self.notes + (note,), units=dict(self.units),
                       diffusivity=cut(self.diffusivity), density=cut(self.density),
                       heat_capacity=cut(self.heat_capacity),
                       heat_capacity_choice=self.heat_capacity_choice,
                       relative_density=self.relative_density,
                       porosity_correction=self.porosity_correction)

    def __eq__(self, other):
        if not isinstance(other, Dataset):
            return NotImplemented

        def same(a, b):
            if a is None or b is None:
                return a is None and b is None
            return a.shape == b.shape and bool(np.array_equal(a, b))

        return (all(same(getattr(self, r), getattr(other, r))
                    for r in ("temperature", "kappa", "kappa_err", "resistivity", "seebeck",
                              "diffusivity", "density", "heat_capacity"))
                and (self.kind, self.label, self.source, self.sha256, self.notes, self.units)
                == (other.kind, other.label, other.source, other.sha256, other.notes, other.units)
                and (self.heat_capacity_choice, self.relative_density, self.porosity_correction)
                == (other.heat_capacity_choice, other.relative_density, other.porosity_correction))

    __hash__ = None  # type: ignore[assignment]  (holds arrays)

    def __repr__(self) -> str:
        extras = [name for name, a in (("kappa_err", self.kappa_err),
                                       ("resistivity", self.resistivity),
                                       ("seebeck", self.seebeck)) if a is not None]
        rows = f"{len(self)} row" + ("" if len(self) == 1 else "s")
        return (f"Dataset(label={self.label!r}, {rows}, T {_fmt(self.temperature[0])}"
                f"..{_fmt(self.temperature[-1])} K, kind={self.kind!r}"
                + (", with " + ", ".join(extras) if extras else "") + ")")


# --------------------------------------------------------------------------------------
# Reading files
# --------------------------------------------------------------------------------------
