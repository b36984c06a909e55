"""The lattice conductivity a fit uses: measured total minus the electronic (and bipolar) parts."""
from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from ..data import Dataset
from ..electronic import lattice_from_total
from ..errors import DataError, ParameterError
from ._common import LORENZ_LABELS, _electronic_flag, _lorenz_spec
from .terms import BipolarTerm

__all__ = ["LatticeTarget", "lattice_target", "ElectronicOptions", "electronic_options"]


@dataclass(frozen=True)
class LatticeTarget:
    """The lattice conductivity a fit uses, after the electronic (and bipolar) subtraction.

    Attributes
    ----------
    temperature : ndarray
        [K], the points kept.
    kappa : ndarray
        Lattice conductivity to fit [W/m/K].
    kappa_err : ndarray or None
        Its known 1-sigma error [W/m/K]: measurement and electronic part in
        quadrature; None when neither is known.
    measured_err : ndarray or None
        The measurement part alone [W/m/K] (the data's kappa_err).
    kappa_electronic, kappa_electronic_err : ndarray or None
        Subtracted L sigma T and its error [W/m/K], None if nothing was subtracted.
    lorenz : ndarray or None
        Lorenz numbers used [W Ohm/K^2].
    kept : ndarray of bool
        Which rows of the dataset are used.
    notes : tuple of str
    kappa_bipolar : ndarray or None
        Subtracted bipolar part [W/m/K] (its parameters are taken as exact), None if none.
    """

    temperature: np.ndarray
    kappa: np.ndarray
    kappa_err: np.ndarray | None
    measured_err: np.ndarray | None
    kappa_electronic: np.ndarray | None
    kappa_electronic_err: np.ndarray | None
    lorenz: np.ndarray | None
    kept: np.ndarray
    notes: tuple = ()
    kappa_bipolar: np.ndarray | None = None


def lattice_target(dataset, *, lorenz="auto", electronic=True, bipolar: BipolarTerm | None = None) -> LatticeTarget:
    """The lattice conductivity to fit: kappa itself, or kappa_total - L sigma T (- kappa_bipolar).

    Parameters
    ----------
    dataset : Dataset
    lorenz : str or float, keyword
        As in :class:`ElectronicTerm` ("auto" takes the single-parabolic-band
        value from the Seebeck column when there is one, else Sommerfeld: for a
        doped semiconductor L0 can be ~40 % too high, Kim et al. 2015).
    electronic : bool or {"auto", "none"}, keyword
        False ("none") fits a measured total as it is, resistivity or not.
    bipolar : BipolarTerm, optional, keyword
        Also subtracted from a measured total.

    Raises
    ------
    ParameterError
        Unknown Lorenz choice, or "band"/"kim" without a Seebeck column.
    DataError
        No point is left with kappa_lattice > 0.
    """
    use = _electronic_flag(electronic)
    if not isinstance(dataset, Dataset):
        raise ParameterError(f"dataset must be a kinetic.data.Dataset, got {type(dataset).__name__}")
    if bipolar is not None and not isinstance(bipolar, BipolarTerm):
        raise ParameterError(f"bipolar must be a BipolarTerm or None, got {type(bipolar).__name__}")
    ds = dataset
    name = ds.label or "data"
    T = np.asarray(ds.temperature, dtype=float)
    k = np.asarray(ds.kappa, dtype=float)
    err = None if ds.kappa_err is None else np.asarray(ds.kappa_err, dtype=float)
    all_rows = np.ones(T.size, bool)
    subtract_e = use and ds.kind == "total" and ds.has_electrical
    if subtract_e:
        method, L = _lorenz_spec(lorenz, ds.seebeck is not None)
    else:
        _lorenz_spec(lorenz, True)
    if ds.kind == "lattice":
        return LatticeTarget(T, k, err, err, None, None, None, all_rows, ())
    kb = None if bipolar is None else bipolar.kappa(T)
    if not subtract_e:
        why = ("electronic part not subtracted: electronic=False, or electronic='none' in a fit" if not use else
               "no resistivity given, so the electronic part was not subtracted")
        notes = [f"{name}: total conductivity fitted as lattice ({why})"]
        if kb is None:
            return LatticeTarget(T, k, err, err, None, None, None, all_rows, tuple(notes))
        return _drop_nonpositive(name, T, k - kb, err, err, None, None, None, kb, notes, "bipolar")
    lt = lattice_from_total(T, k, resistivity=ds.resistivity, seebeck=ds.seebeck, method=method, lorenz=L,
                            kappa_total_err=err, on_nonpositive="keep")
    kl = np.asarray(lt.kappa_lattice) - (0.0 if kb is None else kb)
    notes = []
    tgt = _drop_nonpositive(name, T, kl, np.asarray(lt.kappa_lattice_err), err, np.asarray(lt.kappa_electronic),
                            np.asarray(lt.kappa_electronic_err), np.asarray(lt.lorenz), kb, notes,
                            f"Lorenz method {lt.method!r}")
    what = "L\u03c3T" + (" and the bipolar part" if kb is not None else "")
    words = LORENZ_LABELS.get(lt.method, lt.method)
    return replace(tgt, notes=tgt.notes + (f"{name}: electronic part {what} subtracted (Lorenz number: {words})",))


def _drop_nonpositive(name, T, kl, kl_err, meas_err, ke, ke_err, L, kb, notes, how) -> LatticeTarget:
    kept = kl > 0
    if not np.any(kept):
        raise DataError(f"{name}: kappa_total - L*sigma*T <= 0 at every point ({how}); check the resistivity units"
                        if ke is not None else f"{name}: kappa_total - kappa_bipolar <= 0 at every point; "
                        "check the bipolar parameters")
    if not np.all(kept):
        dropped = T[~kept]
        notes.append(f"{name}: {dropped.size} point(s) dropped where kappa_lattice <= 0 "
                     f"(T = {', '.join(f'{t:g}' for t in dropped[:5])} K)")
    cut = (lambda a: None if a is None else np.asarray(a)[kept])  # noqa: E731
    return LatticeTarget(T[kept], kl[kept], cut(kl_err), cut(meas_err), cut(ke), cut(ke_err), cut(L), kept,
                         tuple(notes), cut(kb))


@dataclass(frozen=True)
class ElectronicOptions:
    """What a dataset allows for the electronic part (for menus and messages).

    Attributes
    ----------
    available : bool
        True when the data are a total conductivity with a resistivity column.
    lorenz_choices : tuple of str
        The Lorenz choices the data support (code keys of ``LORENZ_LABELS``);
        empty when ``available`` is False.
    message : str
        One plain sentence saying what can be done and why.
    """

    available: bool
    lorenz_choices: tuple
    message: str


def electronic_options(dataset) -> ElectronicOptions:
    """Whether the electronic part can be split off ``dataset`` (a Dataset or None) and with which L."""
    if dataset is None:
        return ElectronicOptions(False, (), "No data loaded.")
    if not isinstance(dataset, Dataset):
        raise ParameterError(f"dataset must be a kinetic.data.Dataset or None, got {type(dataset).__name__}")
    if dataset.kind == "lattice":
        return ElectronicOptions(False, (), "The data are already lattice conductivity; nothing to split off.")
    if dataset.resistivity is None:
        return ElectronicOptions(False, (), "The data have no resistivity column, so the electronic part cannot "
                                            "be split off; the model is compared with the total.")
    if dataset.seebeck is None:
        return ElectronicOptions(True, ("auto", "sommerfeld"), "Resistivity measured: the electronic part can be "
                                 "split off (no Seebeck column: only the Sommerfeld value).")
    return ElectronicOptions(True, ("auto", "sommerfeld", "spb", "kim"),
                             "Resistivity measured: the electronic part can be split off.")
