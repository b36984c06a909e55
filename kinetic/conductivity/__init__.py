"""One conductivity chain: lattice + electronic + bipolar = total.

kappa_total(T) = kappa_lattice(T) + kappa_e(T) + kappa_bipolar(T)   [W m^-1 K^-1]

* :class:`ElectronicTerm` -- kappa_e = L sigma T (Wiedemann-Franz form) from a
  measured resistivity (arrays on a temperature grid, interpolated linearly,
  or a callable) with a Lorenz-number choice; reuses
  :func:`kinetic.electronic.electronic_kappa` for the value and its uncertainty.
* :class:`BipolarTerm` -- minority-carrier heat conduction, the activated or
  the two-band form of :mod:`kinetic.electronic.bipolar`, with declared
  parameters (:class:`kinetic.parameters.Parameter`) addressed as
  ``"bipolar.<name>"``.
* :class:`ConductivityModel` -- the three held together (immutable);
  ``parts(T)`` returns a :class:`ConductivityParts`.
* :func:`lattice_target` -- the other direction: the lattice conductivity a
  fit uses, measured total minus the electronic (and bipolar) parts.

The sum holds exactly (total = lattice + electronic + bipolar, elementwise);
absent parts are arrays of zeros, never None, and ``has_electronic`` /
``has_bipolar`` say whether they were modelled.

Examples
--------
>>> from kinetic import Branch, Boundary, LatticeModel
>>> lat = LatticeModel([Branch(5000.0, 400.0)], [Boundary(1e-6)])
>>> el = ElectronicTerm([1e-5, 2e-5], temperature=[100.0, 500.0], lorenz="sommerfeld")
>>> model = ConductivityModel(lat, el, BipolarTerm.activated(0.05, 0.7))
>>> p = model.parts([200.0, 400.0])
>>> import numpy as np
>>> bool(np.allclose(p.total, p.lattice + p.electronic + p.bipolar))
True
>>> round(float(p.electronic[0]), 4)        # L0 T / rho, rho interpolated to 1.25e-5
0.3909
"""
from __future__ import annotations

from ._common import LORENZ_CHOICES, LORENZ_LABELS, LORENZ_RANGE
from .model import ConductivityModel, ConductivityParts
from .target import ElectronicOptions, LatticeTarget, electronic_options, lattice_target
from .terms import BIPOLAR_FORMS, BipolarTerm, ElectronicTerm

__all__ = ["LORENZ_CHOICES", "LORENZ_LABELS", "LORENZ_RANGE", "BIPOLAR_FORMS", "ElectronicTerm", "BipolarTerm",
           "ConductivityParts", "ConductivityModel", "LatticeTarget", "lattice_target", "ElectronicOptions",
           "electronic_options"]
