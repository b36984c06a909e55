"""Bipolar heat conduction: the activated form C T^p exp(-E_g / 2 kB T) and the
two-band expression sigma_n sigma_p / (sigma_n + sigma_p) (S_p - S_n)^2 T.

Here signs matter: the two-band formula takes signed partial Seebeck
coefficients (S_n <= 0 <= S_p).
"""
from __future__ import annotations

import numpy as np
from scipy import constants as _const

from ._common import _broadcast, _finite, _nonnegative, _out, _positive, _scalar, _temperature
from ..errors import ParameterError

__all__ = ["bipolar_kappa_activated", "bipolar_kappa_two_band"]

def bipolar_kappa_activated(temperature, prefactor, band_gap_ev, *, exponent=1.0):
    """Activated bipolar thermal conductivity kappa_bp = C T^p exp(-E_g / (2 kB T)).

    Parameters
    ----------
    temperature : float or array
        T [K], > 0.
    prefactor : float
        C [W/m/K^(1+p)] (T is taken in K), >= 0.
    band_gap_ev : float
        Band gap E_g [eV], > 0.
    exponent : float, keyword
        p [dimensionless], finite; default 1.

    Returns
    -------
    float or ndarray
        kappa_bp [W/m/K], same shape as ``temperature``.

    Raises
    ------
    ParameterError
        Non-positive temperature or band gap, negative prefactor, non-finite
        exponent.

    Notes
    -----
    exp(-E_g / 2 kB T) is the intrinsic-carrier activation (n_i ~ exp(-E_g/2kB T));
    C and p are empirical fit parameters that absorb the density-of-states
    and mobility powers of T and the slowly varying (E_g/kB T + const)^2
    factor of the two-band expression (:func:`bipolar_kappa_two_band`).  This
    activated form is common practice in fits of bipolar heat conduction in
    narrow-gap thermoelectrics (e.g. Bi2Te3); the underlying two-band theory
    is P. J. Price, Phil. Mag. 46, 1252 (1955) (from memory).
    """
    T = _temperature(temperature)
    C = float(_nonnegative("prefactor", _scalar("prefactor", prefactor)))
    eg = float(_positive("band_gap_ev", _scalar("band_gap_ev", band_gap_ev), unit="eV"))
    p = float(_finite("exponent", _scalar("exponent", exponent)))
    arg = eg * _const.e / (2.0 * _const.k * T)
    with np.errstate(under="ignore", over="ignore"):
        val = C * T ** p * np.exp(-arg)
    return _out(val, temperature)



def bipolar_kappa_two_band(temperature, sigma_n, sigma_p, seebeck_n, seebeck_p):
    """Two-band bipolar thermal conductivity sigma_n sigma_p / (sigma_n + sigma_p) (S_p - S_n)^2 T.

    Parameters
    ----------
    temperature : float or array
        T [K], > 0.
    sigma_n, sigma_p : float or array
        Partial electrical conductivities of the electron and hole bands
        [S/m], >= 0 (where both are 0 the result is 0).
    seebeck_n : float or array
        Partial Seebeck coefficient of the electron band [V/K], signed, <= 0.
    seebeck_p : float or array
        Partial Seebeck coefficient of the hole band [V/K], signed, >= 0.

    Returns
    -------
    float or ndarray
        kappa_bp [W/m/K].

    Raises
    ------
    ParameterError
        Negative conductivities, seebeck_n > 0 or seebeck_p < 0 (pass the
        signed partial values, not magnitudes), non-positive temperature.

    References
    ----------
    P. J. Price, Phil. Mag. 46, 1252 (1955); H. J. Goldsmid, Introduction to
    Thermoelectricity (Springer, 2010), the bipolar term (both from memory).
    In the nondegenerate limit of the SPB model, S_p - S_n =
    (kB/e)(E_g/kB T + 2 lambda + 4).
    """
    T = _temperature(temperature)
    sn = np.asarray(_nonnegative("sigma_n", sigma_n, unit="S/m"), dtype=float)
    sp = np.asarray(_nonnegative("sigma_p", sigma_p, unit="S/m"), dtype=float)
    Sn = _finite("seebeck_n", seebeck_n, "V/K")
    Sp = _finite("seebeck_p", seebeck_p, "V/K")
    if np.any(Sn > 0):
        v = float(Sn[Sn > 0].flat[0]) if Sn.ndim else float(Sn)
        raise ParameterError(f"seebeck_n must be <= 0 V/K (signed electron-band value), got {v!r}")
    if np.any(Sp < 0):
        v = float(Sp[Sp < 0].flat[0]) if Sp.ndim else float(Sp)
        raise ParameterError(f"seebeck_p must be >= 0 V/K (signed hole-band value), got {v!r}")
    T, sn, sp, Sn, Sp = _broadcast(temperature=T, sigma_n=sn, sigma_p=sp, seebeck_n=Sn, seebeck_p=Sp)
    total = sn + sp
    reduced = np.divide(sn * sp, total, out=np.zeros_like(total), where=total > 0)
    val = reduced * (Sp - Sn) ** 2 * T
    scalar = all(np.ndim(v) == 0 for v in (temperature, sigma_n, sigma_p, seebeck_n, seebeck_p))
    return float(val) if scalar else val

