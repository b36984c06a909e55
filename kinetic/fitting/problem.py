"""The fit problem: free parameters, their transforms and bounds, weighted ln-residuals.

Also the argument checks the fit functions apply at the door (each error
names the argument) and the wrappers that turn an exception raised by a
user's ``progress`` or ``should_stop`` callback into one :class:`FitError`.
"""
from __future__ import annotations

import math
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from ..data import Dataset
from ..errors import FitError, ParameterError
from ..lattice import LatticeModel
from .target import LatticeTarget

__all__ = [
    "BAD_RESIDUAL",
    "JAC_STEP",
    "Block",
    "Cancelled",
    "FreeParameter",
    "Problem",
    "call_progress",
    "callback_error",
    "check_bounds",
    "check_callable",
    "check_int",
    "check_names",
    "check_seed",
    "resolve_free",
    "stop_requested",
]

#: Residual given to a model evaluation that is not finite (keeps the optimiser away).
BAD_RESIDUAL = 1e3
#: Step of the central-difference Jacobian, in fitted units (decades for log
#: parameters): 1e-4 decades is a 0.023% change, far above the engine's ~1e-9
#: quadrature noise and small enough for second-order errors ~1e-8.
JAC_STEP = 1e-4


@dataclass(frozen=True)
class FreeParameter:
    """One fitted quantity.

    Attributes
    ----------
    name : str
        Name in the result: ``"<mechanism>.<param>"``, or
        ``"<mechanism>.<param>[<sample label>]"`` for a per-sample parameter.
    param : str
        The model parameter it sets, ``"<mechanism>.<param>"``.
    samples : tuple of int
        Indices of the samples (models) it applies to.
    log : bool
        Fitted as log10(value).
    lower, upper : float
        Bounds in natural units.
    unit : str
    """

    name: str
    param: str
    samples: tuple
    log: bool
    lower: float
    upper: float
    unit: str = ""

    def to_x(self, v):
        """Natural value -> fitted coordinate (log10 for a log parameter)."""
        return np.log10(v) if self.log else np.asarray(v, dtype=float)

    def from_x(self, x):
        """Fitted coordinate -> natural value.

        For a log parameter the exponent is clipped to +-300 first, so a
        coordinate far outside the bounds (an interval end of an
        undetermined parameter) gives a huge but finite number, never an
        OverflowError.
        """
        if self.log:
            return 10.0 ** np.clip(x, -300.0, 300.0) if np.ndim(x) else 10.0 ** min(max(float(x), -300.0), 300.0)
        return x

    @property
    def x_bounds(self):
        return (float(self.to_x(self.lower)), float(self.to_x(self.upper)))

    def to_dict(self) -> dict:
        return {"name": self.name, "param": self.param, "samples": list(self.samples), "log": self.log,
                "lower": self.lower, "upper": self.upper, "unit": self.unit}

    @classmethod
    def from_dict(cls, d) -> FreeParameter:
        """Rebuild from :meth:`to_dict` (records check the types first, see :mod:`kinetic.records`)."""
        return cls(name=str(d["name"]), param=str(d["param"]), samples=tuple(int(i) for i in d["samples"]),
                   log=bool(d["log"]), lower=float(d["lower"]), upper=float(d["upper"]),
                   unit=str(d.get("unit", "")))


def check_bounds(name: str, lo, hi, log: bool):
    try:
        lo, hi = float(lo), float(hi)
    except (TypeError, ValueError):
        raise ParameterError(f"bounds for {name} must be two numbers (lower, upper), got {(lo, hi)!r}") from None
    if not (math.isfinite(lo) and math.isfinite(hi)):
        raise ParameterError(f"bounds for {name} must be finite, got ({lo!r}, {hi!r})")
    if not lo < hi:
        raise ParameterError(f"bounds for {name}: lower must be below upper, got ({lo!r}, {hi!r})")
    if log and lo <= 0:
        raise ParameterError(f"bounds for {name}: lower must be > 0 for a log-scale parameter, got {lo!r}")
    return lo, hi


def _valid_edge(model: LatticeModel, param: str, value: float, inner: float, name: str, which: str):
    """A bound the model accepts: ``value`` itself, or nudged inside an open end."""
    for frac in (0.0, 1e-9, 1e-6):
        v = value + frac * (inner - value)
        try:
            model.with_params({param: v})
            return v
        except ParameterError:
            continue
    raise ParameterError(f"{which} bound {value!r} of {name} is outside the values the model accepts")


def resolve_free(models: Sequence[LatticeModel], labels: Sequence[str], shared: Sequence[str],
                  per_sample: Sequence[str], bounds: Mapping | None) -> list:
    """The :class:`FreeParameter` list of a fit, with checked bounds (natural units)."""
    frees = []
    used_bounds = set()
    seen = set()
    if bounds is not None and not isinstance(bounds, Mapping):
        raise ParameterError(f"bounds must be a dict {{name: (lower, upper)}}, got {type(bounds).__name__}")
    bounds = dict(bounds or {})
    for kind, names in (("shared", shared), ("per_sample", per_sample)):
        for p in names:
            if not isinstance(p, str):
                raise ParameterError(f"free parameter names must be strings, got {p!r}")
            if p in seen:
                raise ParameterError(f"parameter {p!r} is listed twice among the free parameters")
            seen.add(p)
            for i, m in enumerate(models):
                info = m.parameter_info()
                if p not in info:
                    where = f" of sample {labels[i]!r}" if len(models) > 1 else ""
                    raise ParameterError(f"unknown parameter {p!r}{where}; valid names: {', '.join(info)}")
            info = models[0].parameter_info()[p]
            targets = [(p, tuple(range(len(models))))] if kind == "shared" else \
                [(f"{p}[{labels[i]}]", (i,)) for i in range(len(models))]
            for name, samples in targets:
                lo, hi = info.bounds
                for key in (p, name):
                    if key in bounds:
                        b = bounds[key]
                        try:
                            lo, hi = b
                        except (TypeError, ValueError):
                            raise ParameterError(f"bounds for {key} must be a (lower, upper) pair, got {b!r}") from None
                        used_bounds.add(key)
                lo, hi = check_bounds(name, lo, hi, info.log)
                m0 = models[samples[0]]
                lo = _valid_edge(m0, p, lo, hi, name, "lower")
                hi = _valid_edge(m0, p, hi, lo, name, "upper")
                frees.append(FreeParameter(name, p, samples, bool(info.log), lo, hi, info.unit))
    unused = sorted(set(bounds) - used_bounds)
    if unused:
        raise ParameterError(f"bounds given for {unused[0]!r}, which is not a free parameter; "
                             f"free: {', '.join(f.name for f in frees)}")
    if not frees:
        raise ParameterError("no free parameters: name at least one, e.g. free=['umklapp.B']")
    return frees


# ----------------------------------------------------------------------------------
# argument checks at the door (each names the argument)
# ----------------------------------------------------------------------------------

def check_names(argname: str, names, *, allow_empty: bool = False) -> list:
    """A list of parameter names (strings); refuses None, a bare string and non-strings.

    >>> check_names("free", ("umklapp.B",))
    ['umklapp.B']
    >>> check_names("free", None)
    Traceback (most recent call last):
    ...
    kinetic.errors.ParameterError: free must be a list of parameter names such as ['umklapp.B'], got None
    """
    if names is None or isinstance(names, (str, bytes, Mapping)) or not isinstance(names, Iterable):
        what = f"the string {names!r}" if isinstance(names, str) else repr(names)
        raise ParameterError(f"{argname} must be a list of parameter names such as ['umklapp.B'], got {what}")
    out = list(names)
    for p in out:
        if not isinstance(p, str):
            raise ParameterError(f"{argname}: parameter names must be strings, got {p!r}")
    if not out and not allow_empty:
        raise ParameterError(f"{argname} is empty: name at least one parameter, e.g. ['umklapp.B']")
    return out


def check_int(name: str, v, lo: int) -> int:
    """A whole number >= lo (booleans and floats refused)."""
    if isinstance(v, bool) or not isinstance(v, (int, np.integer)) or v < lo:
        raise ParameterError(f"{name} must be a whole number >= {lo}, got {v!r}")
    return int(v)


def check_seed(seed):
    """A seed for numpy's generator: None or a whole number >= 0."""
    if seed is None:
        return None
    if isinstance(seed, bool) or not isinstance(seed, (int, np.integer)) or seed < 0:
        raise ParameterError(f"seed must be a whole number >= 0 (or None for a fresh random seed), got {seed!r}")
    return int(seed)


def check_callable(name: str, f):
    """None or a callable."""
    if f is not None and not callable(f):
        raise ParameterError(f"{name} must be a callable or None, got {f!r}")
    return f


def callback_error(name: str, exc: BaseException) -> FitError:
    """The FitError reporting that a user callback raised."""
    return FitError(f"{name} callback raised {type(exc).__name__}: {exc}")


def call_progress(progress, *args):
    """Call ``progress(*args)``; an exception in it becomes one FitError naming the callback."""
    if progress is None:
        return
    try:
        progress(*args)
    except Exception as exc:
        raise callback_error("progress", exc) from exc


def stop_requested(should_stop) -> bool:
    """``bool(should_stop())``; an exception in it becomes one FitError naming the callback."""
    if should_stop is None:
        return False
    try:
        return bool(should_stop())
    except Exception as exc:
        raise callback_error("should_stop", exc) from exc


class Cancelled(Exception):
    """Raised inside the residual function when should_stop() says so."""


# ----------------------------------------------------------------------------------
# the problem
# ----------------------------------------------------------------------------------

@dataclass
class Block:
    """One sample of a fit: its model, data, lattice target and known relative errors."""

    model: LatticeModel
    label: str
    data: Dataset
    target: LatticeTarget
    ln_y: np.ndarray
    e_rel: np.ndarray  # known relative error (0 where unknown)


class Problem:
    """Vector of fitted values <-> models; weighted ln-residuals and their Jacobian.

    When every model has ``kappa_jacobian(temperature, names)`` (kappa and
    d kappa / d parameter in natural units, computed with the integrals),
    :meth:`jacobian` uses it, converted to the fitted space (d ln kappa /
    d log10 v = v ln10 (d kappa / d v) / kappa); otherwise central
    differences. The last evaluation is cached, so the optimiser's
    residual and Jacobian calls at one point cost one model evaluation.
    """

    def __init__(self, blocks, frees, s0: float, should_stop=None):
        self.blocks = blocks
        self.frees = frees
        self.s0 = float(s0)
        self.should_stop = should_stop
        self.lo = np.array([f.x_bounds[0] for f in frees])
        self.hi = np.array([f.x_bounds[1] for f in frees])
        self.nfev = 0
        self.n = int(sum(b.ln_y.size for b in blocks))
        self.analytic = all(callable(getattr(b.model, "kappa_jacobian", None)) for b in blocks) and \
            self._probe_jacobian()
        self._cache = None
        self._set_sigma()

    def _set_sigma(self):
        self.sigma = [np.sqrt(b.e_rel**2 + self.s0**2) for b in self.blocks]
        self._sigma_all = np.concatenate(self.sigma)
        self._cache = None

    def _probe_jacobian(self) -> bool:
        """True when every model's kappa_jacobian answers for its free parameters (checked at one point).

        A model whose kappa_jacobian refuses a parameter (NotImplementedError,
        ParameterError, ...) is fitted with finite differences instead.
        """
        for i, b in enumerate(self.blocks):
            names = [f.param for f in self.frees if i in f.samples]
            try:
                _, J = b.model.kappa_jacobian(b.target.temperature[:1], names)
                if np.shape(J) != (1, len(names)):
                    return False
            except (NotImplementedError, ParameterError, KeyError, TypeError, ValueError):
                return False
        return True

    def invalidate(self):
        """Forget the cached evaluation (after changing ``ln_y`` of a block, e.g. in the bootstrap)."""
        self._cache = None

    def set_s0(self, s0):
        self.s0 = float(s0)
        self._set_sigma()

    def x_of_models(self, models=None):
        models = models or [b.model for b in self.blocks]
        x = np.empty(len(self.frees))
        for j, f in enumerate(self.frees):
            v = models[f.samples[0]].params[f.param]
            x[j] = float(f.to_x(v))
        return x

    def values(self, x) -> dict:
        return {f.name: float(f.from_x(xj)) for f, xj in zip(self.frees, x)}

    def models_at(self, x, samples=None) -> list:
        out = []
        for i, b in enumerate(self.blocks):
            if samples is not None and i not in samples:
                out.append(None)
                continue
            upd = {f.param: float(f.from_x(xj)) for f, xj in zip(self.frees, x) if i in f.samples}
            out.append(b.model.with_params(upd) if upd else b.model)
        return out

    def _check_stop(self):
        if stop_requested(self.should_stop):
            raise Cancelled()

    def ln_model(self, x, samples=None) -> list:
        """ln kappa_model at the data temperatures of each block (None where skipped)."""
        self._check_stop()
        self.nfev += 1
        out = []
        try:
            models = self.models_at(x, samples)
        except ParameterError:
            return [None if (samples is not None and i not in samples)
                    else np.full(b.ln_y.size, np.nan) for i, b in enumerate(self.blocks)]
        for b, m in zip(self.blocks, models):
            if m is None:
                out.append(None)
                continue
            with np.errstate(all="ignore"):
                k = np.asarray(m.kappa(b.target.temperature), dtype=float)
                out.append(np.log(np.where(k > 0, k, np.nan)))
        return out

    def _ln_model_and_gradient(self, x):
        """ln kappa (all blocks) and d ln kappa / d x (n x p) from the models' kappa_jacobian."""
        self._check_stop()
        self.nfev += 1
        p = len(self.frees)
        lnk = np.full(self.n, np.nan)
        G = np.zeros((self.n, p))
        try:
            models = self.models_at(x)
        except ParameterError:
            return lnk, G
        pos = 0
        for i, (b, m) in enumerate(zip(self.blocks, models)):
            size = b.ln_y.size
            cols = [j for j, f in enumerate(self.frees) if i in f.samples]
            names = [self.frees[j].param for j in cols]
            with np.errstate(all="ignore"):
                k, Jn = m.kappa_jacobian(b.target.temperature, names)
                k = np.asarray(k, dtype=float).reshape(-1)
                Jn = np.asarray(Jn, dtype=float).reshape(size, len(names))
                ok = np.isfinite(k) & (k > 0)
                lnk[pos:pos + size] = np.log(np.where(ok, k, np.nan))
                for c, j in enumerate(cols):
                    f = self.frees[j]
                    dv = float(f.from_x(x[j])) * math.log(10.0) if f.log else 1.0
                    G[pos:pos + size, j] = np.where(ok, Jn[:, c] * dv / np.where(ok, k, 1.0), 0.0)
            pos += size
        G[~np.isfinite(G)] = 0.0
        return lnk, G

    def raw_residuals(self, x) -> np.ndarray:
        """ln kappa_model - ln kappa, all blocks concatenated (nan where the model failed)."""
        return np.concatenate([lm - b.ln_y for lm, b in zip(self.ln_model(x), self.blocks)])

    def _weighted(self, raw):
        r = raw / self._sigma_all
        bad = ~np.isfinite(r)
        if np.any(bad):
            r = np.where(bad, BAD_RESIDUAL, r)
        return r

    def _evaluate(self, x):
        """(weighted residuals, their Jacobian) with the analytic derivatives, cached per x."""
        x = np.asarray(x, dtype=float)
        key = x.tobytes()
        if self._cache is not None and self._cache[0] == key:
            return self._cache[1], self._cache[2]
        lnk, G = self._ln_model_and_gradient(x)
        raw = lnk - np.concatenate([b.ln_y for b in self.blocks])
        r = self._weighted(raw)
        J = G / self._sigma_all[:, None]
        J[~np.isfinite(raw)] = 0.0
        self._cache = (key, r, J)
        return r, J

    def residuals(self, x) -> np.ndarray:
        """Weighted residuals (ln kappa_model - ln kappa) / s_i; a failed model point gets a large value."""
        if self.analytic:
            return self._evaluate(x)[0].copy()
        return self._weighted(self.raw_residuals(x))

    def jacobian_for_solver(self, x):
        """The Jacobian ``least_squares`` gets when the models supply analytic derivatives."""
        return self._evaluate(x)[1].copy()

    def solver_jac_options(self) -> dict:
        """Keyword arguments of ``least_squares`` for the Jacobian: analytic, or forward differences."""
        if self.analytic:
            return {"jac": self.jacobian_for_solver}
        return {"diff_step": 1e-6}

    def jacobian(self, x, fun=None, h=JAC_STEP):
        """Jacobian of ``fun`` (default: weighted residuals) in fitted units.

        Analytic when the models supply ``kappa_jacobian`` and ``fun`` is the
        default; else central differences, one-sided next to a bound.
        """
        if fun is None and self.analytic:
            return self._evaluate(x)[1].copy()
        fun = fun or self.residuals
        x = np.asarray(x, dtype=float)
        f0 = fun(x)
        J = np.empty((f0.size, x.size))
        for j in range(x.size):
            up = x[j] + h <= self.hi[j]
            dn = x[j] - h >= self.lo[j]
            xp, xm = x.copy(), x.copy()
            if up and dn:
                xp[j] += h
                xm[j] -= h
                J[:, j] = (fun(xp) - fun(xm)) / (2 * h)
            elif up:
                xp[j] += h
                J[:, j] = (fun(xp) - f0) / h
            else:
                xm[j] -= h
                J[:, j] = (f0 - fun(xm)) / h
        return J
