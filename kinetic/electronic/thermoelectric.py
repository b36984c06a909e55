"""Wiedemann-Franz heat conduction and thermoelectric figures: kappa_e = L sigma T,
the lattice part of a measured total, the metal estimate L T / rho, the power
factor and zT.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import DataError, ParameterError
from ._common import (L0, _broadcast, _conductivity, _finite, _nonnegative, _positive, _readonly,
                      _temperature)
from .band import scattering_exponent
from .lorenz import _lorenz_choice

__all__ = [
    "ElectronicKappa",
    "electronic_kappa",
    "LatticeFromTotal",
    "lattice_from_total",
    "wiedemann_franz_kappa",
    "power_factor",
    "zt",
]

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

    Examples
    --------
    >>> ke = electronic_kappa(300.0, resistivity=1e-5)   # L0 sigma T
    >>> round(float(ke.value), 4), ke.method
    (0.7329, 'sommerfeld')
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

    Examples
    --------
    Copper-like resistivity 1.7e-8 Ohm m at 300 K:

    >>> round(wiedemann_franz_kappa(300.0, 1.7e-8), 1)
    431.1
    """
    T = _temperature(temperature)
    rho = np.asarray(_positive("resistivity", resistivity, unit="Ohm m"), dtype=float)
    L = np.asarray(_positive("lorenz", lorenz, unit="W Ohm/K^2"), dtype=float)
    T, rho, L = _broadcast(temperature=T, resistivity=rho, lorenz=L)
    scalar = all(np.ndim(v) == 0 for v in (temperature, resistivity, lorenz))
    val = L * T / rho
    return float(val) if scalar else val



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
