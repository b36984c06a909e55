"""Profile-likelihood intervals: fix one parameter, refit the others, find where chi^2 rises by q^2."""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import optimize

from ..errors import FitError
from .common import check_level
from .problem import check_int
from .result import FitResult

__all__ = ["ProfileInterval", "need_problem", "profile_interval"]


def need_problem(result):
    """The live fit problem of a result; FitError for a fit loaded from a record (refit first)."""
    prob = getattr(result, "problem", None)
    if prob is None:
        raise FitError("this result has no fit problem attached (loaded from a record?); refit the data first")
    return prob


@dataclass(frozen=True)
class ProfileInterval:
    """Profile-likelihood confidence interval of one parameter.

    Attributes
    ----------
    name : str
    value : float
        Best-fit value [natural units].
    lower, upper : float
        Interval ends [natural units]; a bound of the fit where the profile
        never rose high enough (then ``lower_open``/``upper_open`` is True).
    level : float
    threshold : float
        Rise of chi^2 that defines the interval (q^2, q the quantile used for
        the Wald intervals, so the two agree for a linear model).
    lower_open, upper_open : bool
    profile : (ndarray, ndarray)
        Values tried [natural units] and the chi^2 rise at each.
    nfev : int
    """

    name: str
    value: float
    lower: float
    upper: float
    level: float
    threshold: float
    lower_open: bool
    upper_open: bool
    profile: tuple
    nfev: int


def profile_interval(result: FitResult, name: str, level: float = 0.95, *, max_steps: int = 12) -> ProfileInterval:
    """Profile-likelihood interval: fix ``name``, refit the others, find where chi^2 rises by q^2.

    The weights (including an estimated scatter) are held at their best-fit
    values; q is the same normal / Student-t quantile as in
    :meth:`FitResult.interval`, so for a model linear in its fitted
    parameters the two intervals coincide. Where the model is not linear the
    profile interval is the more trustworthy one.

    Parameters
    ----------
    result : FitResult
    name : str
        A free parameter.
    level : float
        Confidence level, e.g. 0.95.
    max_steps : int
        Steps of one (linearised) standard error outward before giving up
        and reporting the bound side as open.

    Raises
    ------
    ParameterError
        Unknown name or level outside (0, 1).
    FitError
        Result without its fit problem (e.g. rebuilt from a record).
    """
    max_steps = check_int("max_steps", max_steps, 1)
    prob = need_problem(result)
    f = result.free_parameter(name)
    j = result.names.index(f.name)
    q = result.quantile(level)
    thr = q * q
    x_best = np.array(result.x_fitted, dtype=float)
    chi2_best = result.chi2
    others = [i for i in range(x_best.size) if i != j]
    n0 = prob.nfev
    warm = {}

    def rise(xj, side):
        if not others:
            x = x_best.copy()
            x[j] = xj
            r = prob.residuals(x)
            return float(r @ r) - chi2_best
        start = warm.get(side, x_best[others])

        def fun(y):
            x = x_best.copy()
            x[j] = xj
            x[others] = y
            return prob.residuals(x)

        res = optimize.least_squares(fun, np.clip(start, prob.lo[others], prob.hi[others]),
                                     bounds=(prob.lo[others], prob.hi[others]), method="trf",
                                     diff_step=1e-6, ftol=1e-10, xtol=1e-10, gtol=1e-10,
                                     max_nfev=60 * len(others))
        warm[side] = res.x
        return 2.0 * float(res.cost) - chi2_best

    s = result.stderr_fitted[f.name]
    if not np.isfinite(s) or s <= 0:
        s = 0.1 * (prob.hi[j] - prob.lo[j])
    tried_x, tried_d = [x_best[j]], [0.0]
    ends, open_ = {}, {}
    for side, sign, bound in (("lower", -1.0, prob.lo[j]), ("upper", 1.0, prob.hi[j])):
        warm.pop(side, None)
        prev_x = x_best[j]
        step = s
        found = False
        for _ in range(max_steps):
            xj = prev_x + sign * step
            at_edge = (sign < 0 and xj <= bound) or (sign > 0 and xj >= bound)
            if at_edge:
                xj = bound
            d = rise(xj, side)
            tried_x.append(xj)
            tried_d.append(d)
            if d >= thr:
                g = lambda t: rise(t, side) - thr
                a, b = (xj, prev_x) if sign < 0 else (prev_x, xj)
                root = optimize.brentq(g, a, b, xtol=1e-4 * s, rtol=1e-10)
                ends[side], open_[side] = root, False
                found = True
                break
            if at_edge:
                break
            prev_x = xj
            step *= 1.5
        if not found:
            ends[side], open_[side] = (bound if (sign < 0 and tried_x[-1] <= bound) or
                                       (sign > 0 and tried_x[-1] >= bound) else tried_x[-1]), True
    order = np.argsort(tried_x)
    px = np.array([float(f.from_x(v)) for v in np.array(tried_x)[order]])
    return ProfileInterval(name=f.name, value=result.values[f.name], lower=float(f.from_x(ends["lower"])),
                           upper=float(f.from_x(ends["upper"])), level=check_level(level), threshold=thr,
                           lower_open=open_["lower"], upper_open=open_["upper"],
                           profile=(px, np.array(tried_d)[order]), nfev=prob.nfev - n0)

