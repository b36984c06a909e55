"""Single parabolic band (SPB): Seebeck coefficient and Lorenz number against
the reduced Fermi level, and the inversion from a measured Seebeck coefficient.

Sign convention: the band-model functions use |S|, so n-type (S < 0) and
p-type (S > 0) data are both accepted.
"""
from __future__ import annotations

from functools import lru_cache

import numpy as np

from ..errors import ParameterError
from ._common import KB_OVER_E, L0, _finite, _out
from .fermi import _ETA_ASYM, _K_ASYM, _asym_series, _fermi_scaled, _sommerfeld_coeffs

__all__ = [
    "SCATTERING_EXPONENTS",
    "scattering_exponent",
    "seebeck_spb",
    "lorenz_spb_eta",
    "seebeck_range_spb",
    "reduced_fermi_level",
    "lorenz_spb",
]

#: Named scattering mechanisms -> exponent lambda in tau ~ E^(lambda - 1/2).
SCATTERING_EXPONENTS: dict[str, float] = {
    "acoustic": 0.0,          # acoustic phonons, deformation potential
    "polar_optical": 1.0,     # polar optical phonons above the Debye temperature
    "ionized_impurity": 2.0,  # Brooks-Herring / Conwell-Weisskopf, leading power
    "ionised_impurity": 2.0,  # British spelling of the same
}

_LAMBDA_MIN = -1.0   # exclusive: (1 + lambda) divides in the SPB formulas
_LAMBDA_MAX = 6.0


# reduced-Fermi-level range the Seebeck inversion covers
_ETA_INV_MIN = -200.0
_ETA_INV_MAX = 1.0e5


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


def _two_regimes(eta, below, above) -> np.ndarray:
    """``below(eta)`` where eta < _ETA_ASYM (Fermi integrals), ``above(eta)`` elsewhere (the Sommerfeld series)."""
    eta = np.ravel(eta)
    out = np.empty(eta.size)
    hi = eta >= _ETA_ASYM
    lo = ~hi
    if lo.any():
        out[lo] = below(eta[lo])
    if hi.any():
        with np.errstate(under="ignore"):
            out[hi] = above(eta[hi])
    return out


def _seebeck_reduced(eta: np.ndarray, lam: float) -> np.ndarray:
    """|S| / (kB/e) of the SPB model (flat eta)."""

    def below(e):
        f0, f1 = _fermi_scaled((lam, lam + 1.0), e)
        return (2.0 + lam) * f1 / ((1.0 + lam) * f0) - e

    def above(e):
        # eta (A_(l+1) - A_l) / A_l, the difference taken coefficient by coefficient
        da = _sommerfeld_coeffs(lam + 1.0) - _sommerfeld_coeffs(lam)
        u = e ** -2.0
        return e * np.polynomial.polynomial.polyval(u, da) / _asym_series(lam, u)

    return _two_regimes(eta, below, above)


def _lorenz_reduced(eta: np.ndarray, lam: float) -> np.ndarray:
    """L / (kB/e)^2 of the SPB model (flat eta)."""

    def below(e):
        f0, f1, f2 = _fermi_scaled((lam, lam + 1.0, lam + 2.0), e)
        return ((1.0 + lam) * (3.0 + lam) * f0 * f2 - (2.0 + lam) ** 2 * f1 ** 2) / ((1.0 + lam) ** 2 * f0 ** 2)

    def above(e):
        # eta^2 (A_l A_(l+2) - A_(l+1)^2) / A_l^2 with the product series formed
        # coefficient by coefficient, so the leading terms cancel exactly.
        u = e ** -2.0
        a0, a1, a2 = (_sommerfeld_coeffs(lam + d) for d in (0.0, 1.0, 2.0))
        b = (np.convolve(a0, a2) - np.convolve(a1, a1))[: _K_ASYM + 1]
        return np.polynomial.polynomial.polyval(u, b[1:]) / _asym_series(lam, u) ** 2

    return _two_regimes(eta, below, above)


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

    Examples
    --------
    At the band edge (eta = 0) with acoustic scattering, |S| = 204.50 uV/K
    (/work/shared/reference-notes.md table, computed):

    >>> round(seebeck_spb(0.0) * 1e6, 2)
    204.5
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

    Examples
    --------
    |S| = 204.50 uV/K sits at eta = 0, where L = 1.6130e-8 W Ohm/K^2:

    >>> round(lorenz_spb(204.50e-6) * 1e8, 3)
    1.613
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

