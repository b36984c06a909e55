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

# ruff: noqa: I001  (the import order below is the registration order, i.e. the order of MECHANISMS)
from ._base import MECHANISMS, Mechanism, mechanism_from_dict, register

# helpers for mechanism authors (kept importable from here)
from ._base import _Spec as _Spec, _full as _full, _omega_T as _omega_T, _power as _power, _scaled as _scaled

# one module per mechanism; importing registers it, in this order
from .boundary import Boundary
from .point_defect import PointDefect
from .umklapp import Umklapp
from .normal import Normal
from .electron_phonon import ElectronPhonon
from .dislocation import Dislocation
from .precipitate import Precipitate

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
