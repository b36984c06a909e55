"""The fit itself: multi-start weighted least squares, scatter estimate, covariance, flags.

See :mod:`kinetic.fitting` for what is fitted and how (residuals in ln kappa,
weights, parameter space, multi-start, cancelling).
"""
from __future__ import annotations

import json
import math
import time
from collections.abc import Callable, Mapping, Sequence

import numpy as np
from scipy import optimize, stats

from ..errors import DataError, FitError, ParameterError
from ..lattice import LatticeModel
from .flags import CORRELATION_LIMIT, GOODNESS_LIMIT, FitFlags
from .problem import (
    Block,
    Cancelled,
    Problem,
    call_progress,
    check_callable,
    check_int,
    check_names,
    check_seed,
    resolve_free,
    stop_requested,
)
from .result import FitResult
from .target import as_dataset, check_electronic, check_lorenz_method, lattice_target

__all__ = ["WEIGHTS", "fit", "fit_joint", "latin_hypercube"]

#: Fraction of a parameter's fitted range within which it counts as "at a bound".
AT_BOUND = 1e-3
#: Estimated relative scatter above which a fit is flagged as not describing the
#: data: thermal-conductivity measurements scatter by 5-10 % (Glassbrenner &
#: Slack 1964 state +-5 %; common practice), so 30 % means the model misses.
SCATTER_LIMIT = 0.30
#: Choices of ``weights=``.
WEIGHTS = ("auto", "errors", "relative")
#: Tolerances of scipy.optimize.least_squares for every start and refit.
_LSQ_TOL = {"ftol": 1e-10, "xtol": 1e-10, "gtol": 1e-10}


def latin_hypercube(n: int, d: int, rng) -> np.ndarray:
    """Latin hypercube: n points in [0, 1)^d, one per stratum of every coordinate."""
    u = (rng.random((n, d)) + np.arange(n)[:, None]) / n
    for j in range(d):
        u[:, j] = u[rng.permutation(n), j]
    return u


def _prepare(models, datasets, labels, lorenz_method, weights, electronic):
    if not isinstance(weights, str) or weights not in WEIGHTS:
        raise ParameterError(f"weights must be 'auto', 'errors' or 'relative', got {weights!r}")
    blocks = []
    notes = []
    for m, ds, lab in zip(models, datasets, labels):
        if not isinstance(m, LatticeModel):
            raise ParameterError(f"model must be a LatticeModel, got {type(m).__name__}")
        tgt = lattice_target(ds, lorenz_method, electronic=electronic)
        notes.extend(tgt.notes)
        if weights == "errors" and tgt.measured_err is None:
            raise DataError(f"{lab or 'data'}: weights='errors' needs a kappa_err column")
        e = np.zeros(tgt.kappa.size) if tgt.kappa_err is None else tgt.kappa_err / tgt.kappa
        blocks.append(Block(m, lab, ds, tgt, np.log(tgt.kappa), e))
    has_err = all(b.target.measured_err is not None for b in blocks)
    estimate = weights == "relative" or (weights == "auto" and not has_err)
    if weights == "auto" and not has_err and any(b.target.measured_err is not None for b in blocks):
        notes.append("some samples have no kappa_err: relative scatter estimated for all")
    return blocks, estimate, notes


def _solve_scatter(raw, e, dof) -> float:
    """s0 >= 0 with sum raw^2 / (e^2 + s0^2) = dof (0 if the known errors already suffice)."""
    raw2 = raw * raw
    if dof <= 0:
        return float(np.sqrt(np.mean(raw2))) if np.any(e == 0) else 0.0

    def g(s0):
        return float(np.sum(raw2 / (e * e + s0 * s0))) - dof

    if np.all(e > 0) and g(0.0) <= 0:
        return 0.0
    hi = max(float(np.sqrt(np.sum(raw2) / dof)), 1e-12)
    lo = 1e-15 if np.any(e == 0) else 0.0
    if g(hi) > 0:  # cannot happen: sum raw^2/(e^2+hi^2) <= sum raw^2/hi^2 = dof
        return hi
    if g(lo) <= 0:
        return lo
    return float(optimize.brentq(g, lo, hi, xtol=1e-14, rtol=1e-10))


def _log_likelihood(raw, e, s0, estimate) -> float:
    """Gaussian log-likelihood of ln kappa; with ``estimate`` maximised over the scatter s0.

    (The s0 of the weights makes chi^2 equal the degrees of freedom; the
    likelihood uses the maximum-likelihood s0 instead, as AIC and BIC assume.)
    """
    raw2 = raw * raw

    def m2l(s):
        v = e * e + s * s
        return float(np.sum(raw2 / v + np.log(2 * np.pi * v)))

    if not estimate:
        return -0.5 * m2l(s0)
    if np.all(e == 0):
        return -0.5 * m2l(math.sqrt(max(float(np.mean(raw2)), 1e-300)))
    hi = math.log(max(float(np.sqrt(np.mean(raw2))), 1e-12) * 10.0)
    opt = optimize.minimize_scalar(lambda t: m2l(math.exp(t)), bounds=(math.log(1e-12), hi), method="bounded",
                                   options={"xatol": 1e-8})
    return -0.5 * min(float(opt.fun), m2l(0.0) if np.all(e > 0) else math.inf)


def _least_squares(prob: Problem, x0, max_nfev):
    """One trust-region-reflective run from x0 inside the box (analytic Jacobian when the models give one)."""
    return optimize.least_squares(prob.residuals, x0, bounds=(prob.lo, prob.hi), method="trf", x_scale=1.0,
                                  max_nfev=max_nfev, **prob.solver_jac_options(), **_LSQ_TOL)


def _run_starts(prob: Problem, x0, n_starts, seed, progress, should_stop, max_nfev):
    d = x0.size
    rng = np.random.default_rng(seed)
    pts = [np.clip(x0, prob.lo, prob.hi)]
    if n_starts > 1:
        u = latin_hypercube(n_starts - 1, d, rng)
        pts += list(prob.lo + u * (prob.hi - prob.lo))
    costs, best, cancelled = [], None, False
    for i, xs in enumerate(pts):
        if stop_requested(should_stop):
            cancelled = True
            break
        try:
            res = _least_squares(prob, xs, max_nfev)
        except Cancelled:
            cancelled = True
            break
        costs.append(float(res.cost))
        if best is None or res.cost < best.cost:
            best = res
        call_progress(progress, i + 1, len(pts), float(best.cost))
    return best, costs, [prob.values(p) for p in pts[:len(costs)]], cancelled


def _goodness(chi2, dof, estimate, scatter, rms, flags):
    """Flag in plain words a fit the model does not describe.

    With stated errors: a reduced chi-squared above GOODNESS_LIMIT (with the
    chi-squared test's p-value). With the scatter estimated (chi2 = dof by
    construction): an estimated scatter above SCATTER_LIMIT.
    """
    if estimate:
        if scatter > SCATTER_LIMIT:
            flags.poor_fit = (f"the model misses the data by {100 * rms:.3g}% rms (estimated scatter s0 = "
                              f"{100 * scatter:.3g}%, far above a typical measurement error of 5-10%): it does not "
                              "describe these data; check the units, the material and the mechanisms")
        return
    if dof < 1 or not math.isfinite(chi2):
        return
    red = chi2 / dof
    if red > GOODNESS_LIMIT:
        p = float(stats.chi2.sf(chi2, dof))
        flags.poor_fit = (f"the model does not describe the data within the stated errors: reduced chi-squared "
                          f"{red:.3g} on {dof} degrees of freedom (chi-squared goodness-of-fit test p = {p:.2g}); "
                          "the parameter errors assume it does")
    elif dof >= 3 and red < 1.0 / GOODNESS_LIMIT:
        p = float(stats.chi2.cdf(chi2, dof))
        flags.notes.append(f"reduced chi-squared {red:.3g} is well below 1: the stated errors look larger than the "
                           f"scatter of the data (chi-squared test, lower tail p = {p:.2g}), so the parameter "
                           "errors are probably overstated")


def _analyse(prob: Problem, x, estimate, fit_options, costs, start_points, best_status, cancelled,
             notes, elapsed_start, message):
    """Covariance, statistics and flags at the optimum x."""
    J = np.array(prob.jacobian(x), dtype=float)
    J[~np.isfinite(J)] = 0.0
    r = prob.residuals(x)
    n, p = r.size, x.size
    dof = n - p
    chi2 = float(np.sum(r * r))
    _, S, Vt = np.linalg.svd(J, full_matrices=False)
    tol = S.max() * max(J.shape) * np.finfo(float).eps * 1e3 if S.size and S.max() > 0 else 0.0
    good = S > tol
    with np.errstate(over="ignore"):
        cov = (Vt[good].T / S[good] ** 2) @ Vt[good]
    unidentified = []
    if not np.all(good):
        null = Vt[~good]
        involved = np.any(np.abs(null) > 0.1, axis=0)
        for j in np.flatnonzero(involved):
            cov[j, :] = np.nan
            cov[:, j] = np.nan
            cov[j, j] = np.inf
            unidentified.append(prob.frees[j].name)
    se_x = np.sqrt(np.diag(cov))
    with np.errstate(all="ignore"):
        corr = cov / np.outer(se_x, se_x)
    corr[~np.isfinite(corr)] = np.nan
    np.fill_diagonal(corr, 1.0)
    # natural units
    vals = np.array([float(f.from_x(xj)) for f, xj in zip(prob.frees, x)])
    dvdx = np.array([v * math.log(10.0) if f.log else 1.0 for f, v in zip(prob.frees, vals)])
    with np.errstate(all="ignore"):
        cov_nat = cov * np.outer(dvdx, dvdx)
        se_nat = se_x * np.abs(dvdx)
    names = [f.name for f in prob.frees]
    # flags
    flags = FitFlags(notes=list(notes), cancelled=cancelled, not_converged=(best_status == 0),
                     unidentified=unidentified)
    span = prob.hi - prob.lo
    for j, f in enumerate(prob.frees):
        if x[j] - prob.lo[j] <= AT_BOUND * span[j] or prob.hi[j] - x[j] <= AT_BOUND * span[j]:
            flags.at_bound.append(f.name)
    for i in range(p):
        for j in range(i + 1, p):
            if np.isfinite(corr[i, j]) and abs(corr[i, j]) > CORRELATION_LIMIT:
                flags.correlated.append((names[i], names[j], float(corr[i, j])))
    raw_all = prob.raw_residuals(x)
    finite = raw_all[np.isfinite(raw_all)]
    _goodness(chi2, dof, estimate, prob.s0, float(np.sqrt(np.mean(finite ** 2))) if finite.size else math.inf,
              flags)
    if len(costs) > 1:
        best_cost = min(costs)
        agree = sum(1 for c in costs if c <= best_cost * (1 + 1e-6) + 1e-12)
        flags.notes.append(f"{agree} of {len(costs)} starts reached the best cost")
    # likelihood in ln kappa
    k_eff = p + (1 if estimate else 0)
    raw = raw_all
    lnL = _log_likelihood(raw, np.concatenate([b.e_rel for b in prob.blocks]), prob.s0, estimate)
    aic = -2 * lnL + 2 * k_eff
    aicc = aic + (2 * k_eff * (k_eff + 1) / (n - k_eff - 1) if n - k_eff - 1 > 0 else math.inf)
    bic = -2 * lnL + k_eff * math.log(n)
    models = prob.models_at(x)
    return FitResult(
        values=dict(zip(names, vals.tolist())),
        stderr=dict(zip(names, se_nat.tolist())),
        stderr_fitted=dict(zip(names, se_x.tolist())),
        names=names,
        units={f.name: f.unit for f in prob.frees},
        free=list(prob.frees),
        correlation=corr, covariance=cov_nat, covariance_fitted=cov,
        chi2=chi2, reduced_chi2=chi2 / dof if dof > 0 else math.nan,
        log_likelihood=lnL, aic=aic, aicc=aicc, bic=bic,
        n_points=n, n_free=p, dof=dof, residuals=r, relative_residuals=raw,
        nfev=prob.nfev, success=(best_status > 0 and not cancelled), message=message,
        flags=flags, models=models, datasets=[b.data for b in prob.blocks], labels=[b.label for b in prob.blocks],
        targets=[b.target for b in prob.blocks], sigma_relative=[s.copy() for s in prob.sigma],
        scatter=prob.s0, scatter_estimated=estimate, starts=list(costs), start_points=list(start_points),
        options=dict(fit_options), elapsed=time.perf_counter() - elapsed_start, problem=prob,
        x_fitted=np.array(x),
    )


def _check_complete(res: FitResult) -> FitResult:
    """Render everything a caller will ask for once, so a problem shows here and not after 'success'."""
    res.summary()
    res.report_rows()
    json.dumps(res.to_dict(), allow_nan=False)
    return res


def _labels_for(datasets, labels):
    """Sample labels: given or from the datasets; one per dataset and unique."""
    if labels is None:
        labels = [ds.label or f"sample {i + 1}" for i, ds in enumerate(datasets)]
    if isinstance(labels, str) or not hasattr(labels, "__iter__"):
        raise ParameterError(f"labels must be a list of strings, one per dataset, got {labels!r}")
    labels = [str(s) for s in labels]
    if len(labels) != len(datasets):
        raise ParameterError(f"labels must have one entry per dataset: {len(datasets)} datasets, {len(labels)} labels")
    if len(set(labels)) != len(labels):
        dup = next(s for s in labels if labels.count(s) > 1)
        raise ParameterError(f"sample label {dup!r} is used twice; pass labels=[...] with one label per sample")
    return labels


def _fit_core(models, datasets, labels, shared, per_sample, *, bounds, lorenz_method, n_starts, seed,
              progress, should_stop, weights, max_nfev, electronic):
    t0 = time.perf_counter()
    n_starts = check_int("n_starts", n_starts, 1)
    seed = check_seed(seed)
    check_callable("progress", progress)
    check_callable("should_stop", should_stop)
    if max_nfev is not None:
        max_nfev = check_int("max_nfev", max_nfev, 1)
    lorenz_method = check_lorenz_method(lorenz_method)
    electronic = check_electronic(electronic)
    blocks, estimate, notes = _prepare(models, datasets, labels, lorenz_method, weights, electronic)
    frees = resolve_free(models, labels, shared, per_sample, bounds)
    n = sum(b.ln_y.size for b in blocks)
    if n < len(frees) + (1 if estimate else 0):
        raise FitError(f"{n} data points cannot determine {len(frees)} free parameter(s)"
                       + (" and the scatter" if estimate else "") + "; free fewer parameters")
    # initial scatter: typical 2% until estimated (the optimum does not depend on it when e = 0)
    prob = Problem(blocks, frees, 0.02 if estimate else 0.0, should_stop)
    if max_nfev is None:
        max_nfev = 60 * len(frees)
    x0 = prob.x_of_models()
    best, costs, start_points, cancelled = _run_starts(prob, x0, n_starts, seed, progress, should_stop, max_nfev)
    if best is None:
        raise FitError("fit cancelled")
    x, status, message = best.x, best.status, best.message
    if estimate and not cancelled:
        # iterate: s0 from the residuals, refit from the best point, until s0 settles
        e_all = np.concatenate([b.e_rel for b in blocks])
        dof = n - len(frees)
        try:
            for _ in range(6):
                s_new = _solve_scatter(prob.raw_residuals(x), e_all, dof)
                changed = abs(s_new - prob.s0) > 1e-3 * max(s_new, 1e-12)
                prob.set_s0(s_new)
                if not changed or np.all(e_all == 0):
                    break  # with no known errors the optimum does not depend on s0
                res = _least_squares(prob, x, max_nfev)
                x, status, message = res.x, res.status, res.message
        except Cancelled:
            cancelled = True
    prob.should_stop = None  # the error analysis is not cancellable (a few evaluations)
    options = {"lorenz_method": lorenz_method, "electronic": electronic, "weights": weights, "n_starts": n_starts,
               "seed": seed, "bounds": {f.name: [f.lower, f.upper] for f in frees}, "max_nfev": max_nfev,
               "shared": list(shared), "per_sample": list(per_sample)}
    try:
        return _check_complete(_analyse(prob, np.asarray(x, dtype=float), estimate, options, costs, start_points,
                                        status, cancelled, notes, t0, str(message)))
    except (ArithmeticError, ValueError, np.linalg.LinAlgError) as exc:
        raise FitError(f"the optimiser finished but the fit's error analysis failed ({type(exc).__name__}: "
                       f"{exc}); try fewer free parameters or narrower bounds") from exc


def fit(model: LatticeModel, data, free: Sequence[str], *, bounds: Mapping | None = None,
        lorenz_method: str = "auto", n_starts: int = 8, seed: int = 0,
        progress: Callable | None = None, should_stop: Callable | None = None,
        weights: str = "auto", max_nfev: int | None = None, electronic: str = "auto") -> FitResult:
    """Fit free parameters of a lattice model to measured kappa(T).

    Parameters
    ----------
    model : LatticeModel
        The model; its current values are the fixed parameters and start 0.
    data : Dataset or mapping or tuple
        Measured data (see :func:`as_dataset`). Total conductivity with a
        resistivity column has its electronic part subtracted first.
    free : sequence of str
        Parameters to fit, ``"<mechanism>.<param>"`` (see ``model.params``).
    bounds : dict, optional
        ``{name: (lower, upper)}`` in natural units, overriding the metadata
        bounds. Lower must be below upper (never swapped) and > 0 for log
        parameters.
    lorenz_method : {"auto", "sommerfeld", "spb", "kim"}
        Lorenz number for the electronic subtraction.
    electronic : {"auto", "none"}
        "auto" (default): total-conductivity data with a resistivity have
        L sigma T subtracted before the lattice model is fitted. "none": the
        data's kappa is fitted as given, with no subtraction (no need to copy
        the dataset to switch it off); the result's notes say so.
    n_starts : int
        Number of starts (>= 1): the model's values plus a seeded Latin
        hypercube in the fitted box.
    seed : int or None
        Seed of the start points (a whole number >= 0; None for fresh randomness).
    progress : callable, optional
        ``progress(i, n, best_cost)`` after each start (i = starts done). An
        exception raised in it ends the fit with one FitError
        ("progress callback raised ZeroDivisionError: ...").
    should_stop : callable, optional
        Returns True to cancel (see the module docstring); an exception
        raised in it is reported like one in ``progress``.
    weights : {"auto", "errors", "relative"}
        See the module docstring.
    max_nfev : int, optional
        Evaluation limit per start (default 60 per free parameter, Jacobian
        evaluations not counted).

    Returns
    -------
    FitResult

    Raises
    ------
    ParameterError
        Unknown parameter, bad bounds or options.
    DataError
        Unusable data.
    FitError
        Fewer points than free parameters, cancelled before any start
        finished, a callback raised, or the error analysis failed. A fit
        that returns is complete: its summary, report rows and strict-JSON
        ``to_dict()`` have been rendered once before it is returned.
    """
    if not isinstance(model, LatticeModel):
        raise ParameterError(f"model must be a LatticeModel, got {type(model).__name__}")
    free = check_names("free", free)
    ds = as_dataset(data)
    labels = [ds.label or "sample"]
    return _fit_core([model], [ds], labels, free, [], bounds=bounds, lorenz_method=lorenz_method,
                     n_starts=n_starts, seed=seed, progress=progress, should_stop=should_stop,
                     weights=weights, max_nfev=max_nfev, electronic=electronic)


def fit_joint(models, datasets, shared: Sequence[str], per_sample: Sequence[str] = (), *,
              labels: Sequence[str] | None = None, bounds: Mapping | None = None,
              lorenz_method: str = "auto", n_starts: int = 8, seed: int = 0,
              progress: Callable | None = None, should_stop: Callable | None = None,
              weights: str = "auto", max_nfev: int | None = None, electronic: str = "auto") -> FitResult:
    """Fit several samples at once: shared parameters take one value, per-sample ones one each.

    Parameters
    ----------
    models : LatticeModel or list of LatticeModel
        One model per sample, or one model used for every sample.
    datasets : list
        One dataset per sample (see :func:`as_dataset`).
    shared : sequence of str
        Parameters with one value across all samples (e.g. ``"umklapp.gruneisen"``).
    per_sample : sequence of str
        Parameters with one value per sample; the result names them
        ``"<param>[<label>]"``, e.g. ``"boundary.length[grain 0.5 um]"``.
    labels : sequence of str, optional
        Sample labels (default the datasets' labels); must be unique.
    bounds : dict, optional
        Keyed by parameter name (applies to all its copies) or by the full
        per-sample name.
    lorenz_method, electronic, n_starts, seed, progress, should_stop, weights, max_nfev
        As in :func:`fit` (``electronic`` applies to every sample).

    Returns
    -------
    FitResult
        ``models``, ``datasets``, ``labels`` and ``targets`` hold one entry per sample.

    Raises
    ------
    ParameterError, DataError, FitError
        As in :func:`fit`; also mismatched list lengths or duplicate labels.
    """
    shared = check_names("shared", shared, allow_empty=True)
    per_sample = check_names("per_sample", per_sample, allow_empty=True)
    if not shared and not per_sample:
        raise ParameterError("no free parameters: name at least one in shared=[...] or per_sample=[...]")
    if datasets is None or isinstance(datasets, (str, bytes)) or not hasattr(datasets, "__iter__"):
        raise ParameterError(f"datasets must be a list of datasets, got {type(datasets).__name__}")
    datasets = [as_dataset(d) for d in datasets]
    if not datasets:
        raise ParameterError("datasets must hold at least one dataset")
    if isinstance(models, LatticeModel):
        models = [models] * len(datasets)
    if models is None or not hasattr(models, "__iter__"):
        raise ParameterError(f"models must be a LatticeModel or a list of them, got {type(models).__name__}")
    models = list(models)
    if len(models) != len(datasets):
        raise ParameterError(f"models must have one entry per dataset: {len(datasets)} datasets, {len(models)} models")
    labels = _labels_for(datasets, labels)
    for m in models:
        if not isinstance(m, LatticeModel):
            raise ParameterError(f"models must be LatticeModel objects, got {type(m).__name__}")
    return _fit_core(models, datasets, labels, shared, per_sample, bounds=bounds,
                     lorenz_method=lorenz_method, n_starts=n_starts, seed=seed, progress=progress,
                     should_stop=should_stop, weights=weights, max_nfev=max_nfev, electronic=electronic)

