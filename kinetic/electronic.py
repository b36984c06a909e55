"""Electronic heat conduction and thermoelectric quantities.

Everything here is SI: temperature [K], Seebeck coefficient S [V/K], Lorenz
number L [W Ohm/K^2], electrical conductivity sigma [S/m], resistivity rho
[Ohm m], thermal conductivity kappa [W/m/K].

Contents
--------
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

Sign convention: the band-model functions use |S|, so n-type (S < 0) and
p-type (S > 0) data are both accepted; the two-band bipolar formula is the
one place where signs matter (S_n <= 0 <= S_p).
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from scipy import constants as _const
from scipy.special import expit as _expit
from scipy.special import gamma as _gamma
from scipy.special import roots_jacobi as _roots_jacobi
from scipy.special import roots_legendre as _roots_legendre
from scipy.special import zeta as _zeta

from ._validate import as_float_array
from .errors import DataError, ParameterError

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

# ---------------------------------------------------------------------------
# constants
# ---------------------------------------------------------------------------

#: kB/e [V/K] (scipy.constants, CODATA): the natural unit of the Seebeck coefficient.
KB_OVER_E: float = _const.k / _const.e

#: Sommerfeld Lorenz number (pi^2/3)(kB/e)^2 [W Ohm/K^2], the degenerate limit.
L0: float = math.pi ** 2 / 3.0 * KB_OVER_E ** 2

#: Relative accuracy Kim et al. (APL Mater. 3, 041506, 2015) state for their
#: formula against the single-band acoustic-phonon model (abstract).
KIM_STATED_ACCURACY: float = 0.05

#: Named scattering mechanisms -> exponent lambda in tau ~ E^(lambda - 1/2).
SCATTERING_EXPONENTS: dict[str, float] = {
    "acoustic": 0.0,          # acoustic phonons, deformation potential
    "polar_optical": 1.0,     # polar optical phonons above the Debye temperature
    "ionized_impurity": 2.0,  # Brooks-Herring / Conwell-Weisskopf, leading power
    "ionised_impurity": 2.0,  # British spelling of the same
}

_LAMBDA_MIN = -1.0   # exclusive: (1 + lambda) divides in the SPB formulas
_LAMBDA_MAX = 6.0
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

# reduced-Fermi-level range the Seebeck inversion covers
_ETA_INV_MIN = -200.0
_ETA_INV_MAX = 1.0e5


# ---------------------------------------------------------------------------
# small helpers
# ---------------------------------------------------------------------------

def _sign_check(name: str, value, unit: str, allow_zero: bool) -> np.ndarray:
    """Finite and > 0 (or >= 0); the message names the first bad value and its index."""
    arr = as_float_array(name, value)
    bad = ~np.isfinite(arr) | ((arr < 0) if allow_zero else (arr <= 0))
    if np.any(bad):
        first = float(arr[bad].flat[0])
        where = ""
        if arr.ndim:
            idx = tuple(int(i) for i in np.argwhere(bad)[0])
            where = f" at index {idx[0] if len(idx) == 1 else idx} of an array of shape {arr.shape}"
        kind = "non-negative" if allow_zero else "positive"
        u = f" [{unit}]" if unit else ""
        raise ParameterError(f"{name} must be finite and {kind}{u}, got {first!r}{where}")
    return arr


def _positive(name: str, value, *, unit: str = "") -> np.ndarray:
    """Finite and > 0, as an array."""
    return _sign_check(name, value, unit, allow_zero=False)


def _nonnegative(name: str, value, *, unit: str = "") -> np.ndarray:
    """Finite and >= 0, as an array."""
    return _sign_check(name, value, unit, allow_zero=True)


def _finite(name: str, value, unit: str = "") -> np.ndarray:
    arr = as_float_array(name, value)
    if not np.all(np.isfinite(arr)):
        bad = float(arr[~np.isfinite(arr)].flat[0])
        u = f" [{unit}]" if unit else ""
        raise ParameterError(f"{name} must be finite{u}, got {bad!r}")
    return arr


def _out(arr: np.ndarray, like) -> np.ndarray | float:
    """Return a float for scalar input, else an array."""
    arr = np.asarray(arr, dtype=float)
    if np.ndim(like) == 0 and arr.ndim == 0:
        return float(arr)
    return arr


def _broadcast(**arrays) -> list[np.ndarray]:
    try:
        return [np.asarray(a, dtype=float) for a in np.broadcast_arrays(*arrays.values())]
    except ValueError:
        shapes = ", ".join(f"{k} {np.shape(v)}" for k, v in arrays.items())
        raise ParameterError(f"array shapes do not broadcast together: {shapes}") from None


def _readonly(arr) -> np.ndarray:
    arr = np.array(arr, dtype=float, copy=True)
    arr.setflags(write=False)
    return arr


def _conductivity(sigma, resistivity) -> np.ndarray:
    """sigma [S/m] from exactly one of sigma / resistivity."""
    if (sigma is None) == (resistivity is None):
        raise ParameterError(
            "give exactly one of sigma [S/m] or resistivity [Ohm m], got "
            + ("neither" if sigma is None else "both")
        )
    if sigma is not None:
        return np.asarray(_nonnegative("sigma", sigma, unit="S/m"), dtype=float)
    rho = np.asarray(_positive("resistivity", resistivity, unit="Ohm m"), dtype=float)
    return 1.0 / rho


def _temperature(value) -> np.ndarray:
    return np.asarray(_positive("temperature", value, unit="K"), dtype=float)


# ---------------------------------------------------------------------------
# Fermi-Dirac integrals
# ---------------------------------------------------------------------------

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
    """
    jv = _check_order(j)
    e = _finite("eta", eta)
    flat = e.ravel()
    scaled = _fermi_scaled((jv,), flat)[0]
    with np.errstate(under="ignore"):
        vals = scaled * np.exp(np.minimum(flat, 0.0))
    return _out(vals.reshape(e.shape), eta)


# ---------------------------------------------------------------------------
# single parabolic band
# ---------------------------------------------------------------------------

def scattering_exponent(scattering) -> float:
    """The exponent lambda (tau ~ E^(lambda - 1/2)) for a named mechanism or a number.

    Parameters
    ----------
    scattering : str or float
        One of ``SCATTERING_EXPONENTS`` ("acoustic" = 0, "polar_optical" = 1,
        "ionized_impurity" = 2) or a number in (-1, 6].

    Raises
    ------
    ParameterError
        Unknown name or exponent out of range.
    """
    if isinstance(scattering, str):
        key = scattering.strip().lower().replace("-", "_").replace(" ", "_")
        if key not in SCATTERING_EXPONENTS:
            raise ParameterError(
                f"scattering must be one of {sorted(SCATTERING_EXPONENTS)} or a number in "
                f"({_LAMBDA_MIN:g}, {_LAMBDA_MAX:g}], got {scattering!r}"
            )
        return SCATTERING_EXPONENTS[key]
    if isinstance(scattering, bool):
        raise ParameterError(f"scattering must be a name or a number, got {scattering!r}")
    try:
        lam = float(scattering)
    except (TypeError, ValueError):
        raise ParameterError(f"scattering must be a name or a number, got {scattering!r}") from None
    if not (np.isfinite(lam) and _LAMBDA_MIN < lam <= _LAMBDA_MAX):
        raise ParameterError(
            f"scattering exponent lambda must be in ({_LAMBDA_MIN:g}, {_LAMBDA_MAX:g}], got {lam!r}"
        )
    return lam


def _seebeck_reduced(eta: np.ndarray, lam: float) -> np.ndarray:
    """|S| / (kB/e) of the SPB model (flat eta)."""
    eta = np.ravel(eta)
    out = np.empty(eta.size)
    hi = eta >= _ETA_ASYM
    lo = ~hi
    if lo.any():
        e = eta[lo]
        f0, f1 = _fermi_scaled((lam, lam + 1.0), e)
        out[lo] = (2.0 + lam) * f1 / ((1.0 + lam) * f0) - e
    if hi.any():
        # eta (A_(l+1) - A_l) / A_l, the difference taken coefficient by coefficient
        e = eta[hi]
        da = _sommerfeld_coeffs(lam + 1.0) - _sommerfeld_coeffs(lam)
        with np.errstate(under="ignore"):
            u = e ** -2.0
            out[hi] = e * np.polynomial.polynomial.polyval(u, da) / _asym_series(lam, u)
    return out


def _lorenz_reduced(eta: np.ndarray, lam: float) -> np.ndarray:
    """L / (kB/e)^2 of the SPB model (flat eta)."""
    eta = np.ravel(eta)
    out = np.empty(eta.size)
    hi = eta >= _ETA_ASYM
    lo = ~hi
    if lo.any():
        f0, f1, f2 = _fermi_scaled((lam, lam + 1.0, lam + 2.0), eta[lo])
        out[lo] = ((1.0 + lam) * (3.0 + lam) * f0 * f2 - (2.0 + lam) ** 2 * f1 ** 2) / (
            (1.0 + lam) ** 2 * f0 ** 2
        )
    if hi.any():
        # eta^2 (A_l A_(l+2) - A_(l+1)^2) / A_l^2 with the product series formed
        # coefficient by coefficient, so the leading terms cancel exactly.
        e = eta[hi]
        with np.errstate(under="ignore"):
            u = e ** -2.0
        a0, a1, a2 = (_sommerfeld_coeffs(lam + d) for d in (0.0, 1.0, 2.0))
        b = (np.convolve(a0, a2) - np.convolve(a1, a1))[: _K_ASYM + 1]
        out[hi] = np.polynomial.polynomial.polyval(u, b[1:]) / _asym_series(lam, u) ** 2
    return out


def seebeck_spb(eta, scattering="acoustic"):
    """|S| [V/K] of a single parabolic band at reduced Fermi level eta.

    S = (kB/e) [(2 + lambda) F_(1+lambda)(eta) / ((1 + lambda) F_lambda(eta)) - eta]

    Parameters
    ----------
    eta : float or array
        Reduced chemical potential (E_F - E_band)/(kB T), measured into the
        band [dimensionless]; any finite value.
    scattering : str or float
        "acoustic" (lambda = 0, default), "polar_optical" (1),
        "ionized_impurity" (2), or lambda in (-1, 6]; tau ~ E^(lambda - 1/2).

    Returns
    -------
    float or ndarray
        |S| [V/K], positive, same shape as ``eta``.

    Raises
    ------
    ParameterError
        eta not finite, or an invalid scattering choice.

    References
    ----------
    Single-band Boltzmann transport with energy-power-law relaxation time:
    H.-S. Kim, Z. M. Gibbs, Y. Tang, H. Wang and G. J. Snyder, APL Mater. 3,
    041506 (2015), SPB equations; A. F. May and G. J. Snyder, in Materials,
    Preparation, and Characterization in Thermoelectrics (CRC, 2012) (both
    from memory).  Limits: (kB/e)(2 + lambda - eta) nondegenerate;
    (pi^2/3)(kB/e)(1 + lambda)/eta degenerate (Mott formula).
    """
    lam = scattering_exponent(scattering)
    e = _finite("eta", eta)
    s = _seebeck_reduced(e.ravel(), lam).reshape(e.shape)
    return _out(KB_OVER_E * s, eta)


def lorenz_spb_eta(eta, scattering="acoustic"):
    """Lorenz number L [W Ohm/K^2] of a single parabolic band at reduced Fermi level eta.

    L = (kB/e)^2 [(1+l)(3+l) F_l F_(2+l) - (2+l)^2 F_(1+l)^2] / [(1+l)^2 F_l^2],  l = lambda.

    Parameters
    ----------
    eta : float or array
        Reduced chemical potential [dimensionless]; any finite value.
    scattering : str or float
        As in :func:`seebeck_spb`.

    Returns
    -------
    float or ndarray
        L [W Ohm/K^2]: tends to L0 for eta -> +inf and to (2 + lambda)(kB/e)^2
        for eta -> -inf (1.485e-8 for acoustic phonons).

    Raises
    ------
    ParameterError
        eta not finite, or an invalid scattering choice.

    References
    ----------
    As for :func:`seebeck_spb`.
    """
    lam = scattering_exponent(scattering)
    e = _finite("eta", eta)
    val = _lorenz_reduced(e.ravel(), lam).reshape(e.shape)
    return _out(KB_OVER_E ** 2 * val, eta)


@lru_cache(maxsize=32)
def _spb_table(lam: float):
    """Grid of eta and ln(|S|/(kB/e)) (decreasing) used to bracket the inversion."""
    grid = np.concatenate([
        np.linspace(_ETA_INV_MIN, 60.0, 1041),                # step 0.25
        np.geomspace(60.0, _ETA_INV_MAX, 301)[1:],
    ])
    s_red = _seebeck_reduced(grid, lam)
    ln_s = np.log(s_red)
    lor = _lorenz_reduced(grid, lam) * KB_OVER_E ** 2
    # largest |L - L0| over all eta: grid plus the two analytic limits
    worst = max(float(np.max(np.abs(lor - L0))), abs((2.0 + lam) * KB_OVER_E ** 2 - L0))
    grid.setflags(write=False)
    ln_s.setflags(write=False)
    s_range = (float(KB_OVER_E * s_red[-1]), float(KB_OVER_E * s_red[0]))
    return grid, ln_s, worst, s_range


def seebeck_range_spb(scattering="acoustic") -> tuple[float, float]:
    """(smallest, largest) |S| [V/K] that :func:`reduced_fermi_level` can invert.

    They correspond to eta = 1e5 (deeply degenerate) and eta = -200 (deeply
    nondegenerate); about 2.8e-9 V/K and 1.74e-2 V/K for acoustic phonons.
    """
    lam = scattering_exponent(scattering)
    return _spb_table(lam)[3]


def _invert_seebeck(s_red: np.ndarray, lam: float) -> np.ndarray:
    """eta with _seebeck_reduced(eta) = s_red (flat, already in range).

    Bracket from the table, then the Illinois variant of regula falsi on
    ln S(eta), vectorised over the points that have not yet converged.
    """
    grid, ln_s = _spb_table(lam)[:2]
    t = np.log(s_red)
    idx = np.searchsorted(-ln_s, -t, side="right") - 1
    idx = np.clip(idx, 0, grid.size - 2)
    lo, hi = grid[idx].copy(), grid[idx + 1].copy()
    flo, fhi = ln_s[idx] - t, ln_s[idx + 1] - t            # flo >= 0 >= fhi
    root = np.where(flo == 0.0, lo, np.where(fhi == 0.0, hi, np.nan))
    side = np.zeros(t.size, dtype=int)
    active = np.isnan(root)
    for _ in range(200):                                  # iterations, not points
        ia = np.nonzero(active)[0]
        if ia.size == 0:
            break
        a, b, fa, fb = lo[ia], hi[ia], flo[ia], fhi[ia]
        c = b - fb * (b - a) / (fb - fa)
        c = np.clip(c, a, b)
        fc = np.log(_seebeck_reduced(c, lam)) - t[ia]
        done = (np.abs(fc) <= 4e-16 * np.maximum(1.0, np.abs(t[ia]))) | (
            (b - a) <= 2e-14 * np.maximum(1.0, np.abs(c))
        )
        pos = fc > 0
        neg = ~pos
        # Illinois: halve the stale end's function value when one end repeats
        halve_hi = pos & (side[ia] == 1)
        halve_lo = neg & (side[ia] == -1)
        lo[ia] = np.where(pos, c, a)
        flo[ia] = np.where(pos, fc, np.where(halve_lo, 0.5 * fa, fa))
        hi[ia] = np.where(neg, c, b)
        fhi[ia] = np.where(neg, fc, np.where(halve_hi, 0.5 * fb, fb))
        side[ia] = np.where(pos, 1, -1)
        root[ia[done]] = c[done]
        active[ia[done]] = False
    if np.any(active):                                    # pragma: no cover - safety net
        root[active] = 0.5 * (lo[active] + hi[active])
    return root


def _seebeck_in_range(seebeck, lam: float, name: str = "seebeck") -> np.ndarray:
    s = np.abs(_finite(name, seebeck, "V/K"))
    smin, smax = seebeck_range_spb(lam)
    bad = (s < smin) | (s > smax)
    if np.any(bad):
        v = float(s[bad].flat[0]) if s.ndim else float(s)
        raise ParameterError(
            f"|{name}| = {v:g} V/K is outside the range the single-parabolic-band model "
            f"(lambda = {lam:g}) can represent, [{smin:.3g}, {smax:.3g}] V/K "
            "(|S| -> 0 is the fully degenerate limit: use method='sommerfeld' there)"
        )
    return s


def reduced_fermi_level(seebeck, scattering="acoustic"):
    """Reduced Fermi level eta at which the SPB model gives |S| = |seebeck|.

    The inverse of :func:`seebeck_spb` (S(eta) falls monotonically from
    +inf to 0 as eta runs from -inf to +inf).

    Parameters
    ----------
    seebeck : float or array
        Seebeck coefficient [V/K]; its sign is ignored (n- or p-type).
    scattering : str or float
        As in :func:`seebeck_spb`.

    Returns
    -------
    float or ndarray
        eta [dimensionless], within [-200, 1e5], same shape as ``seebeck``;
        |eta_true - eta| < ~1e-12 max(1, |eta|).

    Raises
    ------
    ParameterError
        |seebeck| outside :func:`seebeck_range_spb` (about 2.8e-9 to 1.7e-2
        V/K for acoustic phonons) or not finite.
    """
    lam = scattering_exponent(scattering)
    s = _seebeck_in_range(seebeck, lam)
    eta = _invert_seebeck((s / KB_OVER_E).ravel(), lam).reshape(s.shape)
    return _out(eta, seebeck)


def lorenz_spb(seebeck, scattering="acoustic"):
    """SPB Lorenz number [W Ohm/K^2] from a measured Seebeck coefficient [V/K].

    Chains :func:`reduced_fermi_level` and :func:`lorenz_spb_eta`.

    Parameters
    ----------
    seebeck : float or array
        S [V/K], either sign.
    scattering : str or float
        As in :func:`seebeck_spb`.

    Returns
    -------
    float or ndarray
        L [W Ohm/K^2].

    Raises
    ------
    ParameterError
        |seebeck| outside the invertible range (see :func:`seebeck_range_spb`).

    References
    ----------
    Kim et al., APL Mater. 3, 041506 (2015) (the SPB route to L from S).
    """
    lam = scattering_exponent(scattering)
    s = _seebeck_in_range(seebeck, lam)
    eta = _invert_seebeck((s / KB_OVER_E).ravel(), lam)
    val = KB_OVER_E ** 2 * _lorenz_reduced(eta, lam)
    return _out(val.reshape(s.shape), seebeck)


def _lorenz_spb_clipped(s_abs: np.ndarray, lam: float) -> np.ndarray:
    """SPB Lorenz number with |S| clipped into the invertible range.

    Below the range the model is at its degenerate limit L0 to < 1e-9, above
    it at the nondegenerate limit to < 1e-4; used only to size uncertainties.
    """
    smin, smax = seebeck_range_spb(lam)
    s = np.clip(s_abs, smin, smax)
    eta = _invert_seebeck((s / KB_OVER_E).ravel(), lam)
    return (KB_OVER_E ** 2 * _lorenz_reduced(eta, lam)).reshape(np.shape(s_abs))


def lorenz_kim(seebeck):
    """Kim et al. (2015) estimate L = 1.5 + exp(-|S|/116) [1e-8 W Ohm/K^2, S in uV/K].

    Parameters
    ----------
    seebeck : float or array
        S [V/K], either sign.

    Returns
    -------
    float or ndarray
        L [W Ohm/K^2]; 2.5e-8 at S = 0, tending to 1.5e-8 for large |S|.

    Raises
    ------
    ParameterError
        seebeck not finite.

    References
    ----------
    H.-S. Kim, Z. M. Gibbs, Y. Tang, H. Wang and G. J. Snyder, "Characterization
    of Lorenz number with Seebeck coefficient measurement", APL Mater. 3,
    041506 (2015): accurate within 5% of the single-parabolic-band,
    acoustic-phonon value and within 20% for PbSe, PbS, PbTe and SiGe
    (abstract).
    """
    s_uv = np.abs(_finite("seebeck", seebeck, "V/K")) * 1e6
    return _out((1.5 + np.exp(-s_uv / 116.0)) * 1e-8, seebeck)


# ---------------------------------------------------------------------------
# electronic thermal conductivity
# ---------------------------------------------------------------------------

_METHODS = ("sommerfeld", "spb", "kim")


@dataclass(frozen=True, eq=False)
class ElectronicKappa:
    """Electronic thermal conductivity kappa_e = L sigma T and its uncertainty.

    Attributes
    ----------
    value : ndarray
        kappa_e [W/m/K].
    uncertainty : ndarray
        1-sigma uncertainty of kappa_e [W/m/K]: the Lorenz-number part
        (``lorenz_uncertainty * sigma * T``) and, when given, the conductivity
        part, added in quadrature.
    lorenz : ndarray
        L used [W Ohm/K^2].
    lorenz_uncertainty : ndarray
        Its uncertainty [W Ohm/K^2] (see :func:`electronic_kappa`).
    method : str
        "sommerfeld", "spb", "kim" or "given" (an explicit ``lorenz``).
    scattering_exponent : float
        lambda used for the SPB values (also for the spreads).
    reduced_fermi_level : ndarray or None
        eta from the Seebeck inversion when method is "spb", else None.
    """

    value: np.ndarray
    uncertainty: np.ndarray
    lorenz: np.ndarray
    lorenz_uncertainty: np.ndarray
    method: str
    scattering_exponent: float
    reduced_fermi_level: np.ndarray | None = None


def _lorenz_choice(method, lorenz, seebeck, lam, lorenz_err):
    """(L, sigma_L, eta or None, method label); arrays broadcastable to the data."""
    if not isinstance(method, str) or method.lower() not in _METHODS:
        raise ParameterError(f"method must be one of {list(_METHODS)}, got {method!r}")
    method = method.lower()
    eta = None
    if lorenz is not None:
        if method != "sommerfeld":
            raise ParameterError(
                f"give either lorenz [W Ohm/K^2] or method={method!r}, not both"
            )
        L = np.asarray(_positive("lorenz", lorenz, unit="W Ohm/K^2"), dtype=float)
        sL = np.zeros_like(L)
        label = "given"
    elif method == "sommerfeld":
        L = np.asarray(L0)
        if seebeck is None:
            sL = np.asarray(_spb_table(lam)[2])
        else:
            s = np.abs(_finite("seebeck", seebeck, "V/K"))
            sL = np.maximum(np.abs(L0 - _lorenz_spb_clipped(s, lam)), KIM_STATED_ACCURACY * L0)
        label = "sommerfeld"
    else:
        if seebeck is None:
            raise ParameterError(f"method={method!r} needs seebeck [V/K], got None")
        if method == "spb":
            s = _seebeck_in_range(seebeck, lam)
            eta = _invert_seebeck((s / KB_OVER_E).ravel(), lam).reshape(s.shape)
            L = (KB_OVER_E ** 2 * _lorenz_reduced(eta.ravel(), lam)).reshape(s.shape)
            other = np.asarray(lorenz_kim(s))
        else:
            s = np.abs(_finite("seebeck", seebeck, "V/K"))
            L = np.asarray(lorenz_kim(s))
            other = _lorenz_spb_clipped(s, lam)
        sL = np.maximum(np.abs(L - other), KIM_STATED_ACCURACY * L)
        label = method
    if lorenz_err is not None:
        sL = np.asarray(_nonnegative("lorenz_err", lorenz_err, unit="W Ohm/K^2"), dtype=float)
    return L, sL, eta, label


def electronic_kappa(
    temperature,
    *,
    sigma=None,
    resistivity=None,
    lorenz=None,
    method="sommerfeld",
    seebeck=None,
    scattering="acoustic",
    lorenz_err=None,
    conductivity_rel_err=None,
) -> ElectronicKappa:
    """Electronic thermal conductivity kappa_e = L sigma T (Wiedemann-Franz form).

    Parameters
    ----------
    temperature : float or array
        T [K], > 0.
    sigma, resistivity : float or array
        Electrical conductivity [S/m] (>= 0) or resistivity [Ohm m] (> 0);
        exactly one.
    lorenz : float or array, optional
        An explicit Lorenz number [W Ohm/K^2]; then ``method`` must stay at
        its default and the result's method is "given".
    method : {"sommerfeld", "spb", "kim"}
        How L is chosen: L0; the single-parabolic-band value at the measured
        |S|; or the Kim et al. (2015) formula.
    seebeck : float or array, optional
        S [V/K] (either sign); required for "spb" and "kim", and narrows the
        "sommerfeld" uncertainty.
    scattering : str or float
        Scattering exponent for the SPB values (see :func:`seebeck_spb`).
    lorenz_err : float or array, optional
        Overrides the automatic Lorenz uncertainty [W Ohm/K^2].
    conductivity_rel_err : float or array, optional
        Relative 1-sigma uncertainty of the measured sigma (or rho), added in
        quadrature.

    Returns
    -------
    ElectronicKappa
        Arrays broadcast over temperature, conductivity and seebeck.

    Raises
    ------
    ParameterError
        Both or neither of sigma/resistivity; negative sigma; non-positive
        resistivity or temperature; unknown method; spb/kim without seebeck;
        |S| outside the SPB range (method "spb").

    Notes
    -----
    Uncertainty of L (a model-choice uncertainty, 1 sigma):

    * "spb" and "kim": the spread between the two Seebeck-based estimates,
      |L_spb(|S|; lambda) - L_kim(|S|)|, never less than 5% of L -- the
      accuracy Kim et al. state for their formula against the band model.
      With the default acoustic scattering the spread stays below 3.7%, so
      the 5% floor applies; for other lambda the spread measures how much
      the scattering assumption matters at that |S|.
    * "sommerfeld" with seebeck: |L0 - L_spb(|S|; lambda)|, the gap between
      the degenerate limit and the band model at the measured |S|, floored
      at 5% of L0 (measured metals at 300 K lie 2-12% below L0, see
      reference/metals_wiedemann_franz.csv).
    * "sommerfeld" without seebeck: the largest |L_spb(eta) - L0| over all
      eta, i.e. L0 - 2(kB/e)^2 = 0.958e-8 (39%) for acoustic phonons -- the
      gap to the nondegenerate limit, since nothing tells degenerate from
      nondegenerate.  Pass seebeck (or lorenz_err) to narrow it.
    * "given": 0 unless ``lorenz_err`` is passed.

    References
    ----------
    Wiedemann and Franz, Ann. Phys. 165, 497 (1853); Sommerfeld, Z. Phys. 47,
    1 (1928); Kim et al., APL Mater. 3, 041506 (2015).
    """
    T = _temperature(temperature)
    sig = _conductivity(sigma, resistivity)
    lam = scattering_exponent(scattering)
    L, sL, eta, label = _lorenz_choice(method, lorenz, seebeck, lam, lorenz_err)
    rel = 0.0 if conductivity_rel_err is None else _nonnegative(
        "conductivity_rel_err", conductivity_rel_err)
    T, sig, L, sL, rel = _broadcast(temperature=T, sigma=sig, lorenz=L, lorenz_err=sL,
                                    conductivity_rel_err=rel)
    value = L * sig * T
    unc = np.hypot(sL * sig * T, value * rel)
    return ElectronicKappa(
        value=_readonly(value),
        uncertainty=_readonly(unc),
        lorenz=_readonly(L),
        lorenz_uncertainty=_readonly(sL),
        method=label,
        scattering_exponent=lam,
        reduced_fermi_level=None if eta is None else _readonly(np.broadcast_to(eta, value.shape)),
    )


@dataclass(frozen=True, eq=False)
class LatticeFromTotal:
    """Lattice thermal conductivity obtained as kappa_total - kappa_e.

    Attributes
    ----------
    kappa_lattice, kappa_lattice_err : ndarray
        [W/m/K]; the error combines the total-kappa error and the kappa_e
        uncertainty in quadrature.  Not clipped: may be <= 0 only when the
        call used ``on_nonpositive="keep"``.
    kappa_electronic, kappa_electronic_err : ndarray
        [W/m/K] as from :func:`electronic_kappa`.
    lorenz, lorenz_err : ndarray
        [W Ohm/K^2].
    method : str
        How L was chosen.
    nonpositive : ndarray of bool
        Where kappa_lattice <= 0.
    """

    kappa_lattice: np.ndarray
    kappa_lattice_err: np.ndarray
    kappa_electronic: np.ndarray
    kappa_electronic_err: np.ndarray
    lorenz: np.ndarray
    lorenz_err: np.ndarray
    method: str
    nonpositive: np.ndarray

    @property
    def ok(self) -> bool:
        """True when the lattice part is positive everywhere."""
        return not bool(np.any(self.nonpositive))


def lattice_from_total(
    temperature,
    kappa_total,
    *,
    sigma=None,
    resistivity=None,
    seebeck=None,
    method="sommerfeld",
    kappa_total_err=None,
    lorenz=None,
    scattering="acoustic",
    lorenz_err=None,
    conductivity_rel_err=None,
    on_nonpositive="raise",
) -> LatticeFromTotal:
    """Subtract the electronic part: kappa_L = kappa_total - L sigma T, with errors.

    Parameters
    ----------
    temperature : float or array
        T [K], > 0.
    kappa_total : float or array
        Measured total thermal conductivity [W/m/K], > 0.
    sigma, resistivity, seebeck, method, lorenz, scattering, lorenz_err, conductivity_rel_err
        As in :func:`electronic_kappa`.
    kappa_total_err : float or array, optional
        1-sigma error of kappa_total [W/m/K] (>= 0); default 0.
    on_nonpositive : {"raise", "keep"}
        What to do where kappa_L <= 0: raise a DataError naming the points
        (default), or keep the unclipped values and flag them in
        ``nonpositive``.

    Returns
    -------
    LatticeFromTotal
        kappa_lattice_err = sqrt(kappa_total_err^2 + kappa_e_err^2).

    Raises
    ------
    ParameterError
        Bad arguments (see :func:`electronic_kappa`); kappa_total <= 0.
    DataError
        kappa_L <= 0 somewhere and ``on_nonpositive="raise"``.
    """
    if on_nonpositive not in ("raise", "keep"):
        raise ParameterError(f"on_nonpositive must be 'raise' or 'keep', got {on_nonpositive!r}")
    ke = electronic_kappa(
        temperature, sigma=sigma, resistivity=resistivity, lorenz=lorenz, method=method,
        seebeck=seebeck, scattering=scattering, lorenz_err=lorenz_err,
        conductivity_rel_err=conductivity_rel_err,
    )
    kt = np.asarray(_positive("kappa_total", kappa_total, unit="W/m/K"), dtype=float)
    kt_err = 0.0 if kappa_total_err is None else _nonnegative(
        "kappa_total_err", kappa_total_err, unit="W/m/K")
    T = _temperature(temperature)
    T, kt, kt_err, ke_v, ke_u, L, sL = _broadcast(
        temperature=T, kappa_total=kt, kappa_total_err=kt_err, kappa_electronic=ke.value,
        kappa_electronic_err=ke.uncertainty, lorenz=ke.lorenz, lorenz_err=ke.lorenz_uncertainty)
    kl = kt - ke_v
    err = np.hypot(kt_err, ke_u)
    bad = kl <= 0.0
    if np.any(bad) and on_nonpositive == "raise":
        i = np.flatnonzero(bad)[0]
        raise DataError(
            f"kappa_lattice = kappa_total - L*sigma*T is <= 0 at {int(bad.sum())} of {bad.size} "
            f"point(s) (first at T = {T.flat[i]:g} K: kappa_total = {kt.flat[i]:g}, "
            f"kappa_electronic = {ke_v.flat[i]:g} W/m/K, L = {L.flat[i]:.4g} W Ohm/K^2, "
            f"method {ke.method!r}); check the units of sigma/resistivity, try method='spb' "
            "with seebeck=, or pass on_nonpositive='keep' to inspect"
        )
    return LatticeFromTotal(
        kappa_lattice=_readonly(kl),
        kappa_lattice_err=_readonly(err),
        kappa_electronic=_readonly(ke_v),
        kappa_electronic_err=_readonly(ke_u),
        lorenz=_readonly(L),
        lorenz_err=_readonly(sL),
        method=ke.method,
        nonpositive=np.array(bad, copy=True),
    )


def wiedemann_franz_kappa(temperature, resistivity, lorenz=L0):
    """Wiedemann-Franz estimate of a metal's thermal conductivity, kappa = L T / rho.

    Parameters
    ----------
    temperature : float or array
        T [K], > 0.
    resistivity : float or array
        rho [Ohm m], > 0.
    lorenz : float or array
        L [W Ohm/K^2], default the Sommerfeld value L0.

    Returns
    -------
    float or ndarray
        kappa [W/m/K].

    Raises
    ------
    ParameterError
        Non-positive temperature, resistivity or lorenz.

    References
    ----------
    Wiedemann and Franz, Ann. Phys. 165, 497 (1853); L0 from Sommerfeld,
    Z. Phys. 47, 1 (1928).  Measured room-temperature metals deviate by
    ~2-12% (reference/metals_wiedemann_franz.csv).
    """
    T = _temperature(temperature)
    rho = np.asarray(_positive("resistivity", resistivity, unit="Ohm m"), dtype=float)
    L = np.asarray(_positive("lorenz", lorenz, unit="W Ohm/K^2"), dtype=float)
    T, rho, L = _broadcast(temperature=T, resistivity=rho, lorenz=L)
    scalar = all(np.ndim(v) == 0 for v in (temperature, resistivity, lorenz))
    val = L * T / rho
    return float(val) if scalar else val


# ---------------------------------------------------------------------------
# bipolar heat conduction
# ---------------------------------------------------------------------------

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


def _scalar(name, value):
    arr = as_float_array(name, value)
    if arr.ndim != 0:
        raise ParameterError(f"{name} must be a single number, got an array of shape {arr.shape}")
    return float(arr)


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


# ---------------------------------------------------------------------------
# thermoelectric performance
# ---------------------------------------------------------------------------

def power_factor(seebeck, *, sigma=None, resistivity=None):
    """Power factor S^2 sigma [W/m/K^2].

    Parameters
    ----------
    seebeck : float or array
        S [V/K], either sign.
    sigma, resistivity : float or array
        [S/m] (>= 0) or [Ohm m] (> 0); exactly one.

    Returns
    -------
    float or ndarray
        S^2 sigma [W/m/K^2].

    Raises
    ------
    ParameterError
        Both or neither of sigma/resistivity, or invalid values.
    """
    S = _finite("seebeck", seebeck, "V/K")
    sig = _conductivity(sigma, resistivity)
    S, sig = _broadcast(seebeck=S, sigma=sig)
    val = S ** 2 * sig
    given = sigma if sigma is not None else resistivity
    return float(val) if np.ndim(seebeck) == 0 and np.ndim(given) == 0 else val


def zt(
    temperature,
    seebeck,
    *,
    sigma=None,
    resistivity=None,
    kappa_lattice,
    kappa_electronic=None,
    kappa_bipolar=0.0,
    method="sommerfeld",
    lorenz=None,
    scattering="acoustic",
):
    """Dimensionless figure of merit zT = S^2 sigma T / (kappa_L + kappa_e + kappa_bp).

    Parameters
    ----------
    temperature : float or array
        T [K], > 0.
    seebeck : float or array
        S [V/K], either sign.
    sigma, resistivity : float or array
        [S/m] or [Ohm m]; exactly one.
    kappa_lattice : float or array
        Lattice thermal conductivity [W/m/K], >= 0.
    kappa_electronic : float or array, optional
        [W/m/K], >= 0; if None it is L sigma T from :func:`electronic_kappa`
        with ``method``/``lorenz``/``scattering`` (the Seebeck passed here is
        used for "spb" and "kim").
    kappa_bipolar : float or array
        [W/m/K], >= 0; default 0.
    method, lorenz, scattering
        As in :func:`electronic_kappa`.

    Returns
    -------
    float or ndarray
        zT [dimensionless].

    Raises
    ------
    ParameterError
        Invalid inputs, or a total thermal conductivity of 0.
    """
    T = _temperature(temperature)
    S = _finite("seebeck", seebeck, "V/K")
    sig = _conductivity(sigma, resistivity)
    kl = np.asarray(_nonnegative("kappa_lattice", kappa_lattice, unit="W/m/K"), dtype=float)
    kb = np.asarray(_nonnegative("kappa_bipolar", kappa_bipolar, unit="W/m/K"), dtype=float)
    if kappa_electronic is None:
        ke = electronic_kappa(T, sigma=sig, lorenz=lorenz, method=method, seebeck=S,
                              scattering=scattering).value
    else:
        ke = np.asarray(_nonnegative("kappa_electronic", kappa_electronic, unit="W/m/K"), dtype=float)
    T, S, sig, kl, ke, kb = _broadcast(temperature=T, seebeck=S, sigma=sig, kappa_lattice=kl,
                                       kappa_electronic=ke, kappa_bipolar=kb)
    total = kl + ke + kb
    if np.any(total <= 0):
        raise ParameterError(
            "kappa_lattice + kappa_electronic + kappa_bipolar must be > 0 W/m/K, got 0"
        )
    val = S ** 2 * sig * T / total
    given = sigma if sigma is not None else resistivity
    inputs = (temperature, seebeck, given, kappa_lattice, kappa_electronic, kappa_bipolar)
    return float(val) if all(np.ndim(v) == 0 for v in inputs if v is not None) else val
