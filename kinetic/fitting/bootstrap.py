"""Bootstrap: refit synthetic data sets drawn around the fit to get the parameters' distribution."""
from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from scipy import optimize

from ..errors import FitError, ParameterError
from .common import check_level
from .problem import (
    call_progress,
    check_callable,
    check_int,
    check_seed,
    stop_requested,
)
from .result import FitResult
from .uncertainty import need_problem

__all__ = ["BootstrapResult", "bootstrap"]


@dataclass(frozen=True)
class BootstrapResult:
    """Bootstrap distribution of the fitted parameters.

    Attributes
    ----------
    samples : dict
        name -> ndarray of refitted values [natural units].
    n : int
        Refits that finished.
    method : str
        "residuals" or "parametric".
    seed : int
    """

    samples: dict
    n: int
    method: str
    seed: int

    def interval(self, name: str, level: float = 0.95) -> tuple:
        """Percentile interval [natural units]."""
        level = check_level(level)
        a = self.samples[name]
        return (float(np.quantile(a, 0.5 - 0.5 * level)), float(np.quantile(a, 0.5 + 0.5 * level)))

    def stderr(self, name: str, log: bool = False) -> float:
        """Standard deviation of the bootstrap values (of log10 values if ``log``)."""
        a = self.samples[name]
        return float(np.std(np.log10(a) if log else a, ddof=1))

    def correlation(self) -> np.ndarray:
        names = list(self.samples)
        return np.corrcoef(np.array([self.samples[n] for n in names]))


def bootstrap(result: FitResult, n: int = 200, *, method: str = "residuals", seed: int = 0,
              progress: Callable | None = None, should_stop: Callable | None = None) -> BootstrapResult:
    """Refit synthetic data sets to get the distribution of the parameters.

    Each synthetic set is ln kappa* = ln kappa_fit + s_i e_i, with e_i drawn
    from the fit's weighted residuals (centred and inflated by
    sqrt(n/(n-p)) for the degrees of freedom used; ``method="residuals"``)
    or from N(0, 1) (``method="parametric"``). Each refit is one
    ``least_squares`` run started at the best fit, with the weights held.

    Parameters
    ----------
    result : FitResult
    n : int
        Number of synthetic sets (>= 2).
    method : {"residuals", "parametric"}
    seed : int
    progress : callable, optional
        ``progress(i, n, None)`` after each refit.
    should_stop : callable, optional
        Stop early; the refits done so far are returned.

    Raises
    ------
    ParameterError
        Bad n or method.
    FitError
        Result without its fit problem, or cancelled before two refits.
    """
    n = check_int("n", n, 2)
    seed = check_seed(seed)
    if method not in ("residuals", "parametric"):
        raise ParameterError(f"method must be 'residuals' or 'parametric', got {method!r}")
    check_callable("progress", progress)
    check_callable("should_stop", should_stop)
    prob = need_problem(result)
    x_best = np.array(result.x_fitted, dtype=float)
    lm = prob.ln_model(x_best)
    sig = prob.sigma
    r = np.asarray(result.residuals, dtype=float)
    dof = max(result.dof, 1)
    pool = (r - r.mean()) * math.sqrt(r.size / dof)
    rng = np.random.default_rng(seed)
    saved = [b.ln_y for b in prob.blocks]
    out = []
    try:
        for k in range(n):
            if stop_requested(should_stop):
                break
            e = rng.choice(pool, size=r.size, replace=True) if method == "residuals" else rng.standard_normal(r.size)
            pos = 0
            for b, l, s in zip(prob.blocks, lm, sig):
                m = l.size
                b.ln_y = l + s * e[pos:pos + m]
                pos += m
            prob.invalidate()
            res = optimize.least_squares(prob.residuals, x_best, bounds=(prob.lo, prob.hi), method="trf",
                                         ftol=1e-10, xtol=1e-10, gtol=1e-10, max_nfev=60 * x_best.size,
                                         **prob.solver_jac_options())
            out.append(res.x)
            call_progress(progress, k + 1, n, None)
    finally:
        for b, y in zip(prob.blocks, saved):
            b.ln_y = y
        prob.invalidate()
    if len(out) < 2:
        raise FitError("bootstrap cancelled before two refits finished")
    X = np.array(out)
    samples = {f.name: np.array([float(f.from_x(v)) for v in X[:, j]]) for j, f in enumerate(prob.frees)}
    return BootstrapResult(samples=samples, n=len(out), method=method, seed=seed)

