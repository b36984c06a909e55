"""zT against doping in the single-parabolic-band model (what-if; re-exported by kinetic.whatif)."""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.constants import e as _e, h as _h, hbar as _hbar, k as _kB, m_e as _me

from ._validate import as_float_array, positive
from .errors import ParameterError

__all__ = ["DopingSweep", "zt_vs_fermi_level"]


def _values(name, values):
    v = np.atleast_1d(as_float_array(name, values)).astype(float)
    if v.ndim != 1 or v.size == 0 or not np.all(np.isfinite(v)):
        raise ParameterError(f"{name} must be a non-empty 1-D list of finite numbers, got {values!r}")
    return v


# ---------------------------------------------------------------------------------
# zT against doping (single parabolic band)
# ---------------------------------------------------------------------------------

@dataclass(frozen=True)
class DopingSweep:
    """zT against the reduced Fermi level, single parabolic band.

    Attributes
    ----------
    temperature : float
        [K]
    eta : ndarray
        Reduced Fermi level (E_F - E_band)/(kB T).
    seebeck : ndarray
        |S| [V/K].
    sigma : ndarray
        [S/m]
    lorenz : ndarray
        [W Ohm/K^2]
    kappa_electronic : ndarray
        L sigma T [W/m/K].
    kappa_lattice : float
        [W/m/K], held fixed.
    power_factor : ndarray
        S^2 sigma [W/(m K^2)].
    zt : ndarray
    carrier_density : ndarray or None
        [m^-3], when an effective mass was given.
    best_eta, best_zt : float
        Grid point of the largest zT.
    measured_eta : float or None
        eta of the measured (sigma, S) pair, if one was given.
    """

    temperature: float
    eta: np.ndarray
    seebeck: np.ndarray
    sigma: np.ndarray
    lorenz: np.ndarray
    kappa_electronic: np.ndarray
    kappa_lattice: float
    power_factor: np.ndarray
    zt: np.ndarray
    carrier_density: np.ndarray | None
    best_eta: float
    best_zt: float
    measured_eta: float | None


def zt_vs_fermi_level(temperature: float, kappa_lattice: float, *, eta=None, weighted_mobility: float | None = None,
                      sigma: float | None = None, seebeck: float | None = None, scattering="acoustic",
                      effective_mass: float | None = None) -> DopingSweep:
    """zT against the reduced Fermi level eta in the single-parabolic-band (SPB) model.

    Assumptions (keep them in mind when reading the optimum):

    * one parabolic band, rigid with doping; relaxation time ~ E^(lambda - 1/2)
      with one scattering exponent (``scattering``, default acoustic phonons);
    * the prefactor of sigma (the weighted mobility) does not change with
      doping, and the lattice conductivity ``kappa_lattice`` does not either;
    * no bipolar conduction (minority carriers ignored).

    sigma(eta) then follows F_lambda(eta): from a measured pair it is
    sigma_meas F_lambda(eta) / F_lambda(eta_meas) with eta_meas from the
    measured |S|; from a weighted mobility mu_w (acoustic scattering only)
    sigma = sigma_E0 ln(1 + e^eta), sigma_E0 = 8 pi e (2 m_e kB T)^(3/2) mu_w / (3 h^3).
    S and L are the SPB values at eta (:mod:`kinetic.electronic`).

    Parameters
    ----------
    temperature : float
        [K]
    kappa_lattice : float
        [W/m/K], > 0.
    eta : array_like, optional
        Grid of reduced Fermi levels (default -4 to 8, 241 points).
    weighted_mobility : float, optional
        mu_w [m^2/(V s)] (acoustic scattering only).
    sigma, seebeck : float, optional
        A measured pair at this temperature: [S/m] and [V/K] (either sign).
    scattering : str or float
        As in :func:`kinetic.electronic.seebeck_spb`.
    effective_mass : float, optional
        Density-of-states mass [m_e]; adds the carrier density
        n = (2 m* kB T / hbar^2)^(3/2) F_1/2(eta) / (2 pi^2).

    Returns
    -------
    DopingSweep

    Raises
    ------
    ParameterError
        Neither or both of weighted_mobility and (sigma, seebeck); weighted
        mobility with non-acoustic scattering; invalid numbers.

    References
    ----------
    SPB transport: May & Snyder, in Materials, Preparation, and
    Characterization in Thermoelectrics (CRC, 2012); weighted mobility:
    Snyder et al., Adv. Mater. 32, 2001537 (2020), Eq. 1 (both from memory).
    """
    from .electronic import (fermi_integral, lorenz_spb_eta, reduced_fermi_level, scattering_exponent,
                             seebeck_spb)

    T = float(positive("temperature", temperature, unit="K"))
    kl = float(positive("kappa_lattice", kappa_lattice, unit="W/m/K"))
    lam = scattering_exponent(scattering)
    grid = np.linspace(-4.0, 8.0, 241) if eta is None else _values("eta", eta)
    have_pair = sigma is not None or seebeck is not None
    if (weighted_mobility is None) == (not have_pair):
        raise ParameterError("give either weighted_mobility [m^2/(V s)] or a measured (sigma, seebeck) pair")
    measured_eta = None
    if weighted_mobility is not None:
        if lam != 0.0:
            raise ParameterError("weighted_mobility uses the acoustic-scattering form; give a measured "
                                 "(sigma, seebeck) pair for other scattering")
        mu_w = float(positive("weighted_mobility", weighted_mobility, unit="m^2/(V s)"))
        s_e0 = 8.0 * np.pi * _e * (2.0 * _me * _kB * T) ** 1.5 * mu_w / (3.0 * _h**3)
        sig = s_e0 * np.logaddexp(0.0, grid)
    else:
        if sigma is None or seebeck is None:
            raise ParameterError("a measured pair needs both sigma [S/m] and seebeck [V/K]")
        s_m = float(positive("sigma", sigma, unit="S/m"))
        measured_eta = float(reduced_fermi_level(seebeck, lam))
        f_m = float(fermi_integral(lam, measured_eta))
        sig = s_m * np.asarray(fermi_integral(lam, grid)) / f_m
    S = np.asarray(seebeck_spb(grid, lam))
    L = np.asarray(lorenz_spb_eta(grid, lam))
    ke = L * sig * T
    pf = S * S * sig
    zt = pf * T / (kl + ke)
    n = None
    if effective_mass is not None:
        ms = float(positive("effective_mass", effective_mass, unit="m_e"))
        n = (2.0 * ms * _me * _kB * T / _hbar**2) ** 1.5 * np.asarray(fermi_integral(0.5, grid)) / (2.0 * np.pi**2)
    i = int(np.argmax(zt))
    return DopingSweep(T, grid, S, sig, L, ke, kl, pf, zt, n, float(grid[i]), float(zt[i]), measured_eta)
