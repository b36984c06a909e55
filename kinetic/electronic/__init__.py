"""Electronic heat conduction and thermoelectric quantities.

Everything here is SI: temperature [K], Seebeck coefficient S [V/K], Lorenz
number L [W Ohm/K^2], electrical conductivity sigma [S/m], resistivity rho
[Ohm m], thermal conductivity kappa [W/m/K].

Contents (one module per concern)
----------------------------------
* ``L0`` -- the Sommerfeld (degenerate) Lorenz number (pi^2/3)(kB/e)^2.
* ``fermi_integral`` -- complete Fermi-Dirac integrals F_j(eta), vectorised.
* Single parabolic band (SPB) model: ``seebeck_spb``, ``lorenz_spb_eta``,
  ``reduced_fermi_level`` (the inverse of ``seebeck_spb``), ``lorenz_spb``,
  ``seebeck_range_spb``.
* ``lorenz_kim`` -- the Kim et al. (2015) closed-form estimate L(|S|).
* ``electronic_kappa`` -- kappa_e = L sigma T with a documented uncertainty
  attached to the choice of L (see :func:`electronic_kappa`).
* ``lattice_from_total`` -- kappa_lattice = kappa_total - kappa_e with error
  propagation, the step a lattice fit needs first.
* ``wiedemann_franz_kappa`` -- the quick metal estimate L T / rho.
* Bipolar heat conduction: ``bipolar_kappa_activated`` and
  ``bipolar_kappa_two_band``.
* ``power_factor`` and ``zt``.

Modules: :mod:`.fermi` (Fermi-Dirac integrals), :mod:`.band` (single
parabolic band and its inversion), :mod:`.lorenz` (L0, Kim, the choice of
L), :mod:`.thermoelectric` (kappa_e, lattice part of a total, Wiedemann-Franz,
power factor, zT), :mod:`.bipolar`.  Every name listed in ``__all__`` is
importable from ``kinetic.electronic`` as before.

Sign convention: the band-model functions use |S|, so n-type (S < 0) and
p-type (S > 0) data are both accepted; the two-band bipolar formula is the
one place where signs matter (S_n <= 0 <= S_p).
"""
from __future__ import annotations

from ._common import KB_OVER_E, KIM_STATED_ACCURACY, L0
from .band import (SCATTERING_EXPONENTS, lorenz_spb, lorenz_spb_eta, reduced_fermi_level, scattering_exponent,
                   seebeck_range_spb, seebeck_spb)
from .bipolar import bipolar_kappa_activated, bipolar_kappa_two_band
from .fermi import fermi_integral
from .lorenz import lorenz_kim
from .thermoelectric import (ElectronicKappa, LatticeFromTotal, electronic_kappa, lattice_from_total,
                             power_factor, wiedemann_franz_kappa, zt)

__all__ = [
    "KB_OVER_E",
    "L0",
    "KIM_STATED_ACCURACY",
    "SCATTERING_EXPONENTS",
    "fermi_integral",
    "scattering_exponent",
    "seebeck_spb",
    "lorenz_spb_eta",
    "seebeck_range_spb",
    "reduced_fermi_level",
    "lorenz_spb",
    "lorenz_kim",
    "ElectronicKappa",
    "electronic_kappa",
    "LatticeFromTotal",
    "lattice_from_total",
    "wiedemann_franz_kappa",
    "bipolar_kappa_activated",
    "bipolar_kappa_two_band",
    "power_factor",
    "zt",
]
