"""Spectral and mean-free-path resolved conductivity at one temperature (:class:`Spectrum`)."""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["Spectrum"]


@dataclass(frozen=True)
class Spectrum:
    """Spectral and mean-free-path resolved conductivity at one temperature.

    Attributes
    ----------
    temperature : float
        [K]
    omega : dict of str -> ndarray
        Angular-frequency grid of each branch [rad s^-1].
    kappa_omega : dict of str -> ndarray
        Conductivity per unit angular frequency, d kappa / d omega, of each
        branch [W m^-1 K^-1 / (rad s^-1)].
    cumulative : dict of str -> ndarray
        Running integral of ``kappa_omega`` over ``omega`` [W m^-1 K^-1].
    mfp : ndarray
        Mean free paths v_g tau_eff of all quadrature nodes, ascending [m].
    kappa_accumulated : ndarray
        Conductivity carried by phonons with mean free path <= ``mfp``
        [W m^-1 K^-1]; its last value is the total conductivity.
    kappa : float
        Total lattice conductivity [W m^-1 K^-1].
    """

    temperature: float
    omega: dict
    kappa_omega: dict
    cumulative: dict
    mfp: np.ndarray
    kappa_accumulated: np.ndarray
    kappa: float

    def fraction_below(self, length):
        """Fraction of kappa carried by phonons with mean free path <= length [m]."""
        length = np.asarray(length, dtype=float)
        acc = np.interp(np.log(np.maximum(length, 1e-300)), np.log(self.mfp), self.kappa_accumulated,
                        left=0.0, right=self.kappa)
        return np.clip(acc / self.kappa, 0.0, 1.0)

    def fraction_above(self, length):
        """Fraction of kappa carried by phonons with mean free path > length [m]."""
        return 1.0 - self.fraction_below(length)

    @property
    def median_mfp(self) -> float:
        """Mean free path below which half the heat is carried [m]."""
        return float(np.exp(np.interp(0.5 * self.kappa, self.kappa_accumulated, np.log(self.mfp))))
