"""kappa(T) of a fit with a confidence band from the parameter covariance."""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .common import check_level, sample_index
from .problem import JAC_STEP

__all__ = ["Band", "band_parts", "log_gradient", "predict_band"]


@dataclass(frozen=True)
class Band:
    """kappa(T) with a confidence band.

    Attributes
    ----------
    temperature : ndarray
        [K]
    kappa : ndarray
        Best-fit lattice conductivity [W/m/K].
    lower, upper : ndarray
        Band edges [W/m/K]: kappa * exp(-+q sd_ln).
    sd_ln : ndarray
        Standard deviation of ln kappa (about the relative error).
    level : float
    """

    temperature: np.ndarray
    kappa: np.ndarray
    lower: np.ndarray
    upper: np.ndarray
    sd_ln: np.ndarray
    level: float


def log_gradient(model, free, values, sample, T):
    """ln kappa(T) of ``model`` and G[i, j] = d ln kappa(T_i) / d x_j for the free parameters of ``sample``.

    x_j is the fitted coordinate (log10 of the value for log parameters).
    Uses ``model.kappa_jacobian`` when the model has it, else central
    differences of step :data:`~kinetic.fitting.problem.JAC_STEP` (one-sided
    at a bound).
    """
    rel = [j for j, f in enumerate(free) if sample in f.samples]
    G = np.zeros((T.size, len(free)))
    if rel and callable(getattr(model, "kappa_jacobian", None)):
        k0, Jn = model.kappa_jacobian(T, [free[j].param for j in rel])
        k0 = np.asarray(k0, dtype=float).reshape(-1)
        Jn = np.asarray(Jn, dtype=float).reshape(T.size, len(rel))
        with np.errstate(all="ignore"):
            lk0 = np.log(k0)
            for c, j in enumerate(rel):
                f = free[j]
                dv = float(values[f.name]) * math.log(10.0) if f.log else 1.0
                G[:, j] = Jn[:, c] * dv / k0
        return k0, lk0, G
    k0 = np.asarray(model.kappa(T), dtype=float)
    with np.errstate(all="ignore"):
        lk0 = np.log(k0)
    for j in rel:
        f = free[j]
        x = float(f.to_x(values[f.name]))
        lo, hi = f.x_bounds
        h = JAC_STEP
        xp, xm = min(x + h, hi), max(x - h, lo)
        with np.errstate(all="ignore"):
            lp = np.log(model.with_params({f.param: float(f.from_x(xp))}).kappa(T)) if xp != x else lk0
            lm = np.log(model.with_params({f.param: float(f.from_x(xm))}).kappa(T)) if xm != x else lk0
        G[:, j] = (lp - lm) / (xp - xm)
    return k0, lk0, G


def band_parts(models, free, cov_fitted, values, sample, temperature):
    """ln kappa and its linearised standard deviation for one sample.

    Parameters
    ----------
    models : list of LatticeModel
        One per sample (``result.models``).
    free : list of FreeParameter
    cov_fitted : (p, p) array
        Covariance in the fitted space.
    values : dict
        Fitted values [natural units].
    sample : int
        Index into ``models`` (and the samples of each free parameter).
    temperature : array_like
        [K]

    Returns
    -------
    (T, ln kappa, sd of ln kappa, kappa)
        sd is inf where an undetermined parameter enters (no band).
    """
    T = np.atleast_1d(np.asarray(temperature, dtype=float))
    k0, lk0, G = log_gradient(models[sample], free, values, sample, T)
    G[~np.isfinite(G)] = 0.0
    C = np.nan_to_num(np.asarray(cov_fitted, dtype=float), nan=0.0, posinf=np.inf)
    with np.errstate(invalid="ignore", over="ignore"):
        var = np.einsum("ij,jk,ik->i", G, C, G)
    var = np.where(np.isnan(var), np.inf, var)  # an undetermined parameter: no band
    return T, lk0, np.sqrt(np.maximum(var, 0.0)), k0


def predict_band(result, temperature, level: float = 0.95, *, sample=0) -> Band:
    """Fitted kappa(T) with a confidence band from the parameter covariance.

    Linearised propagation in the fitted space: var ln kappa(T) =
    g^T C g, g_j = d ln kappa(T) / d x_j (analytic when the model has
    ``kappa_jacobian``, else central differences; x the fitted
    parameters, log10 for log parameters; C their covariance). The band is
    kappa * exp(+-q sd), q the quantile of :meth:`FitResult.quantile`, so it
    is positive and asymmetric. It is the band of the mean curve (parameter
    uncertainty only), not of new measurements.

    Parameters
    ----------
    result : FitResult
        A fit made now or loaded from a record.
    temperature : array_like
        [K]
    level : float
    sample : int or str
        Which sample of a joint fit.

    Returns
    -------
    Band
    """
    level = check_level(level)
    i = sample_index(result, sample)
    T, _, sd, k = band_parts(result.models, result.free, result.covariance_fitted, result.values, i, temperature)
    q = result.quantile(level)
    with np.errstate(over="ignore", invalid="ignore"):
        return Band(temperature=T, kappa=k, lower=k * np.exp(-q * sd), upper=k * np.exp(q * sd), sd_ln=sd,
                    level=level)

