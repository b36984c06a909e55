"""Complete Fermi-Dirac integrals F_j(eta), vectorised over eta.

The building block of the single-parabolic-band transport formulas
(:mod:`kinetic.electronic.band`).
"""
from __future__ import annotations

from functools import lru_cache

import numpy as np
from scipy.special import expit as _expit
from scipy.special import gamma as _gamma
from scipy.special import roots_jacobi as _roots_jacobi
from scipy.special import roots_legendre as _roots_legendre
from scipy.special import zeta as _zeta

from .._validate import as_float_array
from ..errors import ParameterError
from ._common import _finite, _out

__all__ = ["fermi_integral"]

_J_MIN = -1.0        # exclusive: the integral diverges at x = 0 for j <= -1
_J_MAX = 12.0

# Fermi-integral regions (see fermi_integral's docstring)
_ETA_SERIES = -1.0   # eta <= this: alternating exponential series
_ETA_ASYM = 40.0     # eta >= this: Sommerfeld asymptotic series
_K_SERIES = 40       # terms: remainder < e^-40 relative at eta = -1
_K_ASYM = 12         # terms: remainder < 1e-20 relative at eta = 40 for j <= 12
_N_JACOBI = 16       # Gauss-Jacobi nodes on [0, 2] with weight x^j
_N_LEGENDRE = 12     # Gauss-Legendre nodes per panel of width 2 on [2, 100]
_PANEL = 2.0
_X_END = 100.0       # integrand < e^-59 x^j relative beyond here for eta < 40
_CHUNK = 2048        # eta values per block in the quadrature (memory bound)


def _check_order(j) -> float:
    arr = as_float_array("j", j)
    if arr.ndim != 0:
        raise ParameterError(f"j must be a single number, got an array of shape {arr.shape}")
    v = float(arr)
    if not (np.isfinite(v) and _J_MIN < v <= _J_MAX):
        raise ParameterError(f"j must be in ({_J_MIN:g}, {_J_MAX:g}], got {v!r}")
    return v


@lru_cache(maxsize=64)
def _quad_rule(js: tuple[float, ...]) -> tuple[np.ndarray, np.ndarray]:
    """Nodes x (n,) and weights W (n, len(js)) with F_j ~ sum_k W_kj f(x_k - eta).

    [0, 2]: Gauss-Jacobi with weight x^j (treats the x^j end point exactly);
    [2, 100]: composite Gauss-Legendre, panels of width 2.  The Fermi factor
    has poles at x = eta +- i pi, at least pi from every panel, so each panel
    converges geometrically (ratio < 1/5 per node pair).
    """
    tl, wl = _roots_legendre(_N_LEGENDRE)
    edges = np.arange(_PANEL, _X_END + 0.5 * _PANEL, _PANEL)
    a, b = edges[:-1, None], edges[1:, None]
    xl = (0.5 * (b - a) * tl + 0.5 * (a + b)).ravel()
    wl = np.broadcast_to(0.5 * (b - a) * wl, (a.size, tl.size)).ravel()
    xs, ws = [], []
    for j in js:
        t, w = _roots_jacobi(_N_JACOBI, 0.0, j)      # weight (1 + t)^j on [-1, 1]
        h = 0.5 * _PANEL
        xs.append(h * (1.0 + t))
        ws.append(np.concatenate([w * h ** (j + 1.0), wl * xl ** j]))
    # The Jacobi nodes depend on j; stack one block per order and give each
    # order zero weight on the other orders' Jacobi nodes.
    nj = len(js)
    x = np.concatenate(xs + [xl])
    W = np.zeros((x.size, nj))
    for i in range(nj):
        W[i * _N_JACOBI:(i + 1) * _N_JACOBI, i] = ws[i][:_N_JACOBI]
        W[nj * _N_JACOBI:, i] = ws[i][_N_JACOBI:]
    return x, W


@lru_cache(maxsize=64)
def _sommerfeld_coeffs(j: float) -> np.ndarray:
    """a_k, k = 0.._K_ASYM, with F_j(eta) ~ eta^(j+1)/(j+1) sum_k a_k eta^(-2k).

    a_0 = 1, a_k = 2 (1 - 2^(1-2k)) zeta(2k) (j+1)(j)...(j+2-2k)  (Sommerfeld
    expansion; the falling factorial ends the series for integer j).
    """
    a = np.empty(_K_ASYM + 1)
    a[0] = 1.0
    for k in range(1, _K_ASYM + 1):
        falling = float(np.prod(j + 1.0 - np.arange(2 * k)))
        a[k] = 2.0 * (1.0 - 2.0 ** (1 - 2 * k)) * float(_zeta(2 * k)) * falling
    return a


def _series_scaled(js, eta):
    """F_j(eta) e^(-eta) for eta <= -1: Gamma(j+1) sum (-1)^(k+1) e^((k-1) eta)/k^(j+1)."""
    k = np.arange(1, _K_SERIES + 1, dtype=float)
    coef = np.array([_gamma(j + 1.0) * (-1.0) ** (k + 1) / k ** (j + 1.0) for j in js])  # (nj, K)
    with np.errstate(under="ignore", over="ignore"):   # eta*k may reach -inf: exp gives 0
        powers = np.exp(np.multiply.outer(eta, k - 1.0))                                 # (n, K)
        return coef @ powers.T


def _quad_values(js, eta):
    """F_j(eta) for -1 < eta < 40 by the fixed quadrature, shape (nj, n)."""
    x, W = _quad_rule(tuple(js))
    out = np.empty((len(js), eta.size))
    for start in range(0, eta.size, _CHUNK):        # blocks of eta, bounded memory
        e = eta[start:start + _CHUNK]
        out[:, start:start + _CHUNK] = (_expit(e[:, None] - x[None, :]) @ W).T
    return out


def _asym_series(j, u):
    """sum_k a_k u^k (u = eta^-2) for order j."""
    a = _sommerfeld_coeffs(float(j))
    return np.polynomial.polynomial.polyval(u, a)


def _fermi_scaled(js, eta: np.ndarray) -> np.ndarray:
    """F_j(eta) exp(-min(eta, 0)) for each j in js, shape (len(js), eta.size).

    The scale keeps ratios finite where F_j itself underflows (eta << 0).
    """
    eta = np.ravel(eta)
    out = np.empty((len(js), eta.size))
    lo = eta <= _ETA_SERIES
    hi = eta >= _ETA_ASYM
    mid = ~(lo | hi)
    if lo.any():
        out[:, lo] = _series_scaled(js, eta[lo])
    if mid.any():
        em = eta[mid]
        out[:, mid] = _quad_values(js, em) * np.exp(-np.minimum(em, 0.0))[None, :]
    if hi.any():
        eh = eta[hi]
        with np.errstate(under="ignore", over="ignore"):   # huge eta: u -> 0, F -> inf
            u = eh ** -2.0
            for i, j in enumerate(js):
                out[i, hi] = eh ** (j + 1.0) / (j + 1.0) * _asym_series(j, u)
    return out


def fermi_integral(j, eta):
    """Complete Fermi-Dirac integral F_j(eta) = int_0^inf x^j / (1 + exp(x - eta)) dx.

    Not normalised (no 1/Gamma(j+1) factor); F_j(eta) = -Gamma(j+1) Li_(j+1)(-e^eta).

    Parameters
    ----------
    j : float
        Order, -1 < j <= 12 (need not be an integer).
    eta : float or array
        Reduced chemical potential (E_F - E_band)/(kB T) [dimensionless], any
        finite value.

    Returns
    -------
    float or ndarray
        F_j(eta), same shape as ``eta``.  Underflows to 0 for eta < ~ -745
        and overflows to inf for absurdly large eta (> ~1e300^(1/(j+1)))
        without a warning.

    Raises
    ------
    ParameterError
        j outside (-1, 12], or eta not finite.

    Notes
    -----
    Three regions, all vectorised over eta, accurate to ~1e-14 relative:

    * eta <= -1: the alternating series Gamma(j+1) sum_k (-1)^(k+1) e^(k eta) / k^(j+1)
      (40 terms; remainder below e^-40 relative).
    * -1 < eta < 40: fixed quadrature, Gauss-Jacobi with weight x^j on [0, 2]
      and Gauss-Legendre panels of width 2 up to x = 100 (600 nodes).
    * eta >= 40: Sommerfeld asymptotic series in eta^-2 (12 terms); the
      neglected exponentially small part is of order e^-eta < 5e-18.

    References
    ----------
    Sommerfeld expansion: N. W. Ashcroft and N. D. Mermin, Solid State
    Physics (1976), Appendix C.  Polylogarithm form: Dingle, Appl. Sci. Res.
    B 6, 225 (1957) (from memory).

    Examples
    --------
    F_0(0) = ln 2 (closed form: F_0(eta) = ln(1 + e^eta)):

    >>> round(fermi_integral(0, 0.0), 12)
    0.69314718056
    """
    jv = _check_order(j)
    e = _finite("eta", eta)
    flat = e.ravel()
    scaled = _fermi_scaled((jv,), flat)[0]
    with np.errstate(under="ignore"):
        vals = scaled * np.exp(np.minimum(flat, 0.0))
    return _out(vals.reshape(e.shape), eta)

