"""Fit lattice models to a measured kappa(T): values, honest uncertainties, comparisons.

The main entry points are

* :func:`fit` -- one model, one dataset, some free parameters;
* :func:`fit_joint` -- several samples at once, with parameters shared
  between samples or one per sample (e.g. one Umklapp strength, one grain
  size per sample);
* :func:`compare` -- several candidate models on the same data, ranked by
  AIC or BIC with Akaike weights;
* :func:`profile_interval`, :func:`bootstrap` -- confidence intervals that do
  not rely on the linearised (Wald) errors;
* :func:`predict_band` -- kappa(T) with a confidence band from the covariance.

What is fitted
--------------
When the data hold the *total* conductivity and a resistivity, the electronic
part L sigma T is subtracted first (:func:`kinetic.electronic.lattice_from_total`
with the chosen Lorenz method) and the lattice model is fitted to what
remains; the Lorenz-number uncertainty is carried into the weights. Total
data without a resistivity are fitted as if they were lattice data, and the
result says so in ``flags.notes``. Points where the subtraction leaves
kappa_lattice <= 0 are dropped, with a note.

Residuals: weighted least squares in ln(kappa)
-----------------------------------------------
Residuals are r_i = [ln kappa_model(T_i) - ln kappa_i] / s_i, where s_i is the
*relative* 1-sigma error of point i. Reasons: kappa(T) of a crystal spans
decades (2600 to 30 W/m/K for Si between 50 and 1000 K), measurement errors
are usually a fixed percentage (+-5% in Glassbrenner & Slack 1964), so
absolute residuals would let the few largest values decide the fit; and
ln kappa is defined for every positive model value, so the optimiser can
never step into a negative conductivity. To first order ln-residuals equal
relative residuals (kappa_model - kappa)/kappa.

The relative error of a point is s_i^2 = e_i^2 + s0^2:

* e_i: the known part, (kappa_err_i^2 + kappa_e_err_i^2)^(1/2) / kappa_lattice_i,
  i.e. the measurement error and the error of the subtracted electronic
  part (0 where neither is known);
* s0: an extra relative scatter. With ``weights="auto"`` it is 0 when the
  data carry kappa_err (the errors are believed; the covariance is not
  rescaled by the reduced chi^2), and estimated from the scatter of the
  residuals otherwise (s0 is chosen so that chi^2 equals the degrees of
  freedom, refitting until it settles). With no known errors at all this is
  exactly the usual "relative errors equal and estimated from the scatter",
  i.e. the covariance scaled by the reduced chi^2.

``weights="relative"`` estimates s0 even when kappa_err is present (the
stated errors then act as a floor and s0 is the scatter beyond them);
``weights="errors"`` requires kappa_err (DataError otherwise).

Parameter space
---------------
Parameters flagged ``log`` in their metadata (lengths, prefactors, Gamma,
Grüneisen) are fitted as log10(value), the others (Umklapp b, specularity)
linearly. Bounds default to the metadata bounds and are given in natural
units. The covariance, the Wald intervals and the prediction bands are
computed in this fitted space (so a log parameter gets an asymmetric
interval in natural units that never crosses zero); ``stderr`` in natural
units is the linearised value * ln(10) * stderr(log10 value).

Multi-start
-----------
Start 0 is the model's own values (clipped into the bounds); starts 1..n-1
are a seeded Latin hypercube in the fitted box, which spreads the starts over
every decade of each parameter. Each start runs
``scipy.optimize.least_squares`` (trust-region reflective, bounds, finite
difference Jacobian). The best start is kept; ``result.starts`` holds the
final cost of every start.

Cancelling
----------
``should_stop()`` is called before each start and at every model evaluation.
When it returns True the fit stops: if at least one start has finished, the
best finished start is returned with ``flags.cancelled = True`` and
``success = False``; if none has, :class:`FitError` ("fit cancelled") is
raised, as there is nothing to return.

References
----------
Least squares and the linearised covariance: Press et al., Numerical Recipes,
3rd ed. (2007), sec. 15.4-15.6; profile likelihood and bootstrap: sec. 15.6.
AIC: Akaike, IEEE Trans. Autom. Control 19, 716 (1974); BIC: Schwarz, Ann.
Stat. 6, 461 (1978); Akaike weights: Burnham & Anderson, Model Selection and
Multimodel Inference, 2nd ed. (2002), sec. 2.9.
"""
from __future__ import annotations

import math
import time
from dataclasses import dataclass, field
from typing import Callable, Mapping, Sequence

import numpy as np
from scipy import optimize, stats

from .data import Dataset
from .errors import DataError, FitError, ParameterError
from .lattice import LatticeModel

__all__ = [
    "FitResult",
    "FitFlags",
    "FreeParameter",
    "ProfileInterval",
    "BootstrapResult",
    "Band",
    "Comparison",
    "fit",
    "fit_joint",
    "compare",
    "profile_interval",
    "bootstrap",
    "predict_band",
    "as_dataset",
    "lattice_target",
    "LatticeTarget",
    "default_model",
    "default_free",
    "DEFAULT_MECHANISMS",
    "CORRELATION_LIMIT",
    "LORENZ_METHODS",
]

#: |r| above which a pair of parameters is flagged as strongly correlated.
CORRELATION_LIMIT = 0.95
#: Lorenz-number methods accepted for the electronic subtraction.
LORENZ_METHODS = ("auto", "sommerfeld", "spb", "kim")
#: Fraction of a parameter's fitted range within which it counts as "at a bound".
_AT_BOUND = 1e-3
#: Residual given to a model evaluation that is not finite (keeps the optimiser away).
_BAD_RESIDUAL = 1e3
#: Step of the central-difference Jacobian, in fitted units (decades for log
#: parameters): 1e-4 decades is a 0.023% change, far above the engine's ~1e-9
#: quadrature noise and small enough for second-order errors ~1e-8.
_JAC_STEP = 1e-4


class _Cancelled(Exception):
    """Raised inside the residual function when should_stop() says so."""


# ======================================================================================
# data preparation
# ======================================================================================

def as_dataset(data) -> Dataset:
    """A :class:`~kinetic.data.Dataset` from a Dataset, a dict or a (T, kappa[, err]) tuple.

    Parameters
    ----------
    data : Dataset, mapping or tuple
        A mapping is passed to ``Dataset.from_arrays(**data)`` (keys
        temperature [K], kappa [W/m/K], kappa_err, resistivity [Ohm m] or
        sigma [S/m], seebeck [V/K], kind, label); a tuple is
        ``(temperature, kappa)`` or ``(temperature, kappa, kappa_err)``.

    Raises
    ------
    DataError, ParameterError
        From ``Dataset.from_arrays``, or for anything else.
    """
    if isinstance(data, Dataset):
        return data
    if isinstance(data, Mapping):
        d = dict(data)
        try:
            T = d.pop("temperature")
            k = d.pop("kappa")
        except KeyError as exc:
            raise DataError(f"data mapping needs key {exc.args[0]!r}; got keys {sorted(data)}") from None
        return Dataset.from_arrays(T, k, **d)
    if isinstance(data, (tuple, list)) and len(data) in (2, 3):
        return Dataset.from_arrays(data[0], data[1], kappa_err=data[2] if len(data) == 3 else None)
    raise ParameterError(
        f"data must be a Dataset, a mapping of arrays or a (temperature, kappa[, kappa_err]) tuple, "
        f"got {type(data).__name__}"
    )


@dataclass(frozen=True)
class LatticeTarget:
    """The lattice conductivity a fit uses, after the electronic subtraction.

    Attributes
    ----------
    temperature : ndarray
        [K], the points kept.
    kappa : ndarray
        Lattice conductivity to fit [W/m/K].
    kappa_err : ndarray or None
        Its known 1-sigma error [W/m/K]: measurement and electronic part in
        quadrature; None when neither is known.
    measured_err : ndarray or None
        The measurement part alone [W/m/K] (the data's kappa_err).
    kappa_electronic, kappa_electronic_err : ndarray or None
        Subtracted L sigma T and its error [W/m/K], None if nothing was subtracted.
    lorenz : ndarray or None
        Lorenz numbers used [W Ohm/K^2].
    kept : ndarray of bool
        Which rows of the dataset are used.
    notes : tuple of str
    """

    temperature: np.ndarray
    kappa: np.ndarray
    kappa_err: np.ndarray | None
    measured_err: np.ndarray | None
    kappa_electronic: np.ndarray | None
    kappa_electronic_err: np.ndarray | None
    lorenz: np.ndarray | None
    kept: np.ndarray
    notes: tuple = ()


def lattice_target(data, lorenz_method: str = "auto") -> LatticeTarget:
    """The lattice conductivity to fit: kappa itself, or kappa_total - L sigma T.

    Parameters
    ----------
    data : Dataset (or anything :func:`as_dataset` accepts)
    lorenz_method : {"auto", "sommerfeld", "spb", "kim"}
        Lorenz number for the subtraction ("spb" and "kim" need a Seebeck column).
        "auto" (default) takes the single-parabolic-band value from the Seebeck
        coefficient when the data has one, else the Sommerfeld value: for a doped
        semiconductor the Sommerfeld L0 can be ~40 % too high (Kim et al. 2015).

    Returns
    -------
    LatticeTarget

    Raises
    ------
    ParameterError
        Unknown Lorenz method, or "spb"/"kim" without a Seebeck column.
    DataError
        No point is left with kappa_lattice > 0.
    """
    ds = as_dataset(data)
    if not isinstance(lorenz_method, str) or lorenz_method.lower() not in LORENZ_METHODS:
        raise ParameterError(f"lorenz_method must be one of {', '.join(LORENZ_METHODS)}, got {lorenz_method!r}")
    method = lorenz_method.lower()
    if method == "auto":
        method = "spb" if ds.seebeck is not None else "sommerfeld"
    name = ds.label or "data"
    T = np.asarray(ds.temperature, dtype=float)
    k = np.asarray(ds.kappa, dtype=float)
    err = None if ds.kappa_err is None else np.asarray(ds.kappa_err, dtype=float)
    notes = []
    if ds.kind == "lattice":
        return LatticeTarget(T, k, err, err, None, None, None, np.ones(T.size, bool), tuple(notes))
    if not ds.has_electrical:
        notes.append(f"{name}: total conductivity fitted as lattice (no resistivity given, "
                     "so the electronic part was not subtracted)")
        return LatticeTarget(T, k, err, err, None, None, None, np.ones(T.size, bool), tuple(notes))
    if method in ("spb", "kim") and ds.seebeck is None:
        raise ParameterError(f"lorenz_method={method!r} needs a Seebeck column in {name}; "
                             "use 'sommerfeld' or add S to the data")
    from .electronic import lattice_from_total

    lt = lattice_from_total(T, k, resistivity=ds.resistivity, seebeck=ds.seebeck, method=method,
                            kappa_total_err=err, on_nonpositive="keep")
    kept = ~np.asarray(lt.nonpositive, dtype=bool)
    if not np.any(kept):
        raise DataError(f"{name}: kappa_total - L*sigma*T <= 0 at every point (Lorenz method "
                        f"{method!r}); check the resistivity units")
    if not np.all(kept):
        dropped = T[~kept]
        notes.append(f"{name}: {dropped.size} point(s) dropped where kappa_lattice <= 0 "
                     f"(T = {', '.join(f'{t:g}' for t in dropped[:5])} K)")
    notes.append(f"{name}: electronic part L*sigma*T subtracted (Lorenz method {lt.method!r})")
    kl = np.asarray(lt.kappa_lattice)[kept]
    kle = np.asarray(lt.kappa_lattice_err)[kept]
    return LatticeTarget(T[kept], kl, kle, None if err is None else err[kept],
                         np.asarray(lt.kappa_electronic)[kept], np.asarray(lt.kappa_electronic_err)[kept],
                         np.asarray(lt.lorenz)[kept], kept, tuple(notes))


# ======================================================================================
# default models
# ======================================================================================

#: Mechanisms of :func:`default_model` when none are named.
DEFAULT_MECHANISMS = ("boundary", "point_defect", "umklapp")
_KNOWN_MECHANISMS = ("boundary", "point_defect", "umklapp", "normal")


def default_model(material, mechanisms: Sequence[str] | None = None, *, split_branches: bool = False) -> LatticeModel:
    """A starting model for a material: boundary + point defect + Umklapp (+ normal).

    Start values (to be fitted, not claims about the material): boundary
    length 10 um; Gamma of the material's natural isotopes (periodictable via
    :func:`kinetic.disorder.material_gamma`), or 1e-3 without a composition;
    Umklapp in the Grüneisen form with the preset's calibration on a
    published k(T) table where it has one (``Material.umklapp_fit``: Si, Ge),
    else the material's Grüneisen parameter, or 1.5 where the preset has none
    (a typical fitted value, common practice), with b = 3 (Slack &
    Galginaitis 1964); normal-process prefactor
    1e-24 s K^-3 (n = 2, m = 3).

    Parameters
    ----------
    material : Material or str
        A material or preset name.
    mechanisms : sequence of str, optional
        Any of "boundary", "point_defect", "umklapp", "normal"
        (default :data:`DEFAULT_MECHANISMS`).
    split_branches : bool
        One averaged branch (False) or longitudinal + transverse.

    Raises
    ------
    ParameterError
        Unknown material or mechanism, or no resistive mechanism.
    """
    from . import materials
    from .scattering import Boundary, Normal, PointDefect, Umklapp

    mat = materials.get(material) if isinstance(material, str) else material
    mechs = list(DEFAULT_MECHANISMS if mechanisms is None else mechanisms)
    for m in mechs:
        if m not in _KNOWN_MECHANISMS:
            raise ParameterError(f"unknown mechanism {m!r}; choose from {', '.join(_KNOWN_MECHANISMS)}")
    if len(set(mechs)) != len(mechs):
        raise ParameterError(f"a mechanism is listed twice in {mechs}")
    sc = []
    for m in mechs:
        if m == "boundary":
            sc.append(Boundary(1e-5))
        elif m == "point_defect":
            try:
                from .disorder import material_gamma

                g = material_gamma(mat)
            except ParameterError:
                g = 1e-3
            sc.append(PointDefect.from_gamma(g, mat.volume_per_atom))
        elif m == "umklapp":
            cal = (mat.umklapp_fit or {}).get("split" if split_branches else "avg")
            if cal:
                sc.append(Umklapp.from_material(mat, gruneisen=cal["gruneisen"], b=cal["b"]))
            else:
                sc.append(Umklapp.from_material(mat, gruneisen=mat.gruneisen if mat.gruneisen else 1.5))
        else:
            sc.append(Normal(1e-24))
    return LatticeModel.from_material(mat, scattering=sc, split_branches=split_branches)


def default_free(model: LatticeModel) -> list:
    """Free parameters a first fit should try: boundary length, Gamma and the Umklapp strength.

    The Umklapp strength is its Grüneisen parameter or its B, whichever the
    mechanism uses. Normal-process and exponent parameters stay fixed: they
    are weakly determined by kappa(T) alone (common practice).
    """
    params = model.params
    out = []
    for name in ("boundary.length", "point_defect.gamma", "point_defect.A", "umklapp.gruneisen", "umklapp.B"):
        if name in params:
            out.append(name)
    if not out:
        raise ParameterError("the model has none of the default free parameters; name them with free=[...]")
    return out


# ======================================================================================
# the problem: blocks of data, free parameters, transforms
# ======================================================================================

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
        return np.log10(v) if self.log else np.asarray(v, dtype=float)

    def from_x(self, x):
        return 10.0 ** x if self.log else x

    @property
    def x_bounds(self):
        return (float(self.to_x(self.lower)), float(self.to_x(self.upper)))

    def to_dict(self) -> dict:
        return {"name": self.name, "param": self.param, "samples": list(self.samples), "log": self.log,
                "lower": self.lower, "upper": self.upper, "unit": self.unit}

    @classmethod
    def from_dict(cls, d) -> "FreeParameter":
        return cls(name=str(d["name"]), param=str(d["param"]), samples=tuple(int(i) for i in d["samples"]),
                   log=bool(d["log"]), lower=float(d["lower"]), upper=float(d["upper"]),
                   unit=str(d.get("unit", "")))


def _check_bounds(name: str, lo, hi, log: bool):
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


def _resolve_free(models: Sequence[LatticeModel], labels: Sequence[str], shared: Sequence[str],
                  per_sample: Sequence[str], bounds: Mapping | None) -> list:
    frees = []
    bounds = dict(bounds or {})
    used_bounds = set()
    seen = set()
    for kind, names in (("shared", shared), ("per_sample", per_sample)):
        if isinstance(names, str):
            raise ParameterError(f"{kind} must be a list of parameter names, got the string {names!r}")
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
                lo, hi = _check_bounds(name, lo, hi, info.log)
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


@dataclass
class _Block:
    model: LatticeModel
    label: str
    data: Dataset
    target: LatticeTarget
    ln_y: np.ndarray
    e_rel: np.ndarray  # known relative error (0 where unknown)


class _Problem:
    """Vector of fitted values <-> models; weighted ln-residuals."""

    def __init__(self, blocks, frees, s0: float, should_stop=None):
        self.blocks = blocks
        self.frees = frees
        self.s0 = float(s0)
        self.should_stop = should_stop
        self.lo = np.array([f.x_bounds[0] for f in frees])
        self.hi = np.array([f.x_bounds[1] for f in frees])
        self.nfev = 0
        self.n = int(sum(b.ln_y.size for b in blocks))
        self._set_sigma()

    def _set_sigma(self):
        self.sigma = [np.sqrt(b.e_rel**2 + self.s0**2) for b in self.blocks]

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

    def ln_model(self, x, samples=None) -> list:
        """ln kappa_model at the data temperatures of each block (None where skipped)."""
        if self.should_stop is not None and self.should_stop():
            raise _Cancelled()
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

    def raw_residuals(self, x) -> np.ndarray:
        """ln kappa_model - ln kappa, all blocks concatenated (nan where the model failed)."""
        return np.concatenate([lm - b.ln_y for lm, b in zip(self.ln_model(x), self.blocks)])

    def residuals(self, x) -> np.ndarray:
        r = self.raw_residuals(x) / np.concatenate(self.sigma)
        bad = ~np.isfinite(r)
        if np.any(bad):
            r = np.where(bad, _BAD_RESIDUAL, r)
        return r

    def jacobian(self, x, fun=None, h=_JAC_STEP):
        """Central-difference Jacobian of ``fun`` (default: weighted residuals) in fitted units.

        Steps stay inside the bounds: one-sided next to a bound.
        """
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


# ======================================================================================
# results
# ======================================================================================

@dataclass
class FitFlags:
    """Warnings about a fit.

    Attributes
    ----------
    at_bound : list of str
        Parameters within 0.1% of the fitted range of a bound: the bound, not
        the data, set their value and their errors are not meaningful.
    correlated : list of (str, str, float)
        Pairs whose correlation |r| exceeds :data:`CORRELATION_LIMIT`: the data
        fix a combination, not each one.
    not_converged : bool
        The optimiser stopped on its evaluation limit for the best start.
    cancelled : bool
        ``should_stop()`` ended the fit early (best finished start returned).
    unidentified : list of str
        Parameters in a direction the Jacobian does not see (rank-deficient);
        their stderr is inf.
    notes : list of str
        Plain remarks (electronic subtraction, dropped points, weighting).
    """

    at_bound: list = field(default_factory=list)
    correlated: list = field(default_factory=list)
    not_converged: bool = False
    cancelled: bool = False
    unidentified: list = field(default_factory=list)
    notes: list = field(default_factory=list)

    def __bool__(self) -> bool:
        return bool(self.at_bound or self.correlated or self.not_converged or self.cancelled or self.unidentified)

    def messages(self) -> list:
        """One line per warning (notes excluded)."""
        out = [f"{n} is at a bound" for n in self.at_bound]
        out += [f"{a} and {b} are strongly correlated (r = {r:+.3f})" for a, b, r in self.correlated]
        out += [f"{n} is not determined by the data" for n in self.unidentified]
        if self.not_converged:
            out.append("the optimiser did not converge (evaluation limit reached)")
        if self.cancelled:
            out.append("the fit was cancelled; the best finished start is shown")
        return out

    def to_dict(self) -> dict:
        return {"at_bound": list(self.at_bound), "correlated": [[a, b, float(r)] for a, b, r in self.correlated],
                "not_converged": bool(self.not_converged), "cancelled": bool(self.cancelled),
                "unidentified": list(self.unidentified), "notes": list(self.notes)}

    @classmethod
    def from_dict(cls, d) -> "FitFlags":
        return cls(at_bound=[str(s) for s in d.get("at_bound", [])],
                   correlated=[(str(a), str(b), float(r)) for a, b, r in d.get("correlated", [])],
                   not_converged=bool(d.get("not_converged", False)), cancelled=bool(d.get("cancelled", False)),
                   unidentified=[str(s) for s in d.get("unidentified", [])],
                   notes=[str(s) for s in d.get("notes", [])])


@dataclass
class FitResult:
    """Outcome of :func:`fit` or :func:`fit_joint`.

    Attributes
    ----------
    values : dict
        Fitted value of each free parameter, natural units (see ``units``).
    stderr : dict
        Linearised 1-sigma error in natural units (value * ln10 * stderr of
        log10 value for log parameters); inf where not determined.
    stderr_fitted : dict
        1-sigma error in the fitted space (decades for log parameters).
    names : list of str
        Free-parameter names, the order of the matrices.
    units : dict
    free : list of FreeParameter
    correlation : ndarray (p, p)
        Correlation matrix (the same in fitted and natural space to first order).
    covariance : ndarray (p, p)
        Covariance in natural units (linearised).
    covariance_fitted : ndarray (p, p)
        Covariance in the fitted space (log10 for log parameters).
    chi2 : float
        Sum of squared weighted residuals.
    reduced_chi2 : float
        chi2 / (n_points - n_free); 1 by construction when the scatter is estimated.
    log_likelihood : float
        Gaussian log-likelihood of ln kappa (with the fitted weights).
    aic, aicc, bic : float
        Akaike, small-sample Akaike and Bayesian information criteria
        (k = n_free, plus 1 when the scatter s0 is estimated). Compare only
        between fits of the same data with the same weighting.
    n_points, n_free, dof : int
    residuals : ndarray
        Weighted residuals (ln kappa_model - ln kappa) / s_i, all samples.
    relative_residuals : ndarray
        ln kappa_model - ln kappa (about (model - data) / data).
    nfev : int
        Model evaluations, all starts and the error analysis included.
    success : bool
        Converged, not cancelled.
    message : str
    flags : FitFlags
    model : LatticeModel
        Fitted copy of the (first) model; ``models`` holds one per sample.
    models : list of LatticeModel
    data : Dataset
        The (first) dataset; ``datasets`` holds all.
    datasets : list of Dataset
    labels : list of str
        Sample labels.
    targets : list of LatticeTarget
        The lattice conductivity actually fitted and its errors, per sample.
    temperature, target, target_err : ndarray
        Shortcut to ``targets[0]`` (temperature [K], kappa_lattice [W/m/K],
        known 1-sigma error or None).
    sigma_relative : list of ndarray
        Relative 1-sigma error s_i used for each point, per sample.
    scatter : float
        s0, the estimated extra relative scatter (0 if the errors were believed).
    scatter_estimated : bool
    starts : list of float
        Final cost (chi2 / 2) of every start, in the order run, with the
        weights used during the multi-start (when the scatter is estimated,
        a provisional s0 = 2%, so these compare starts with each other, not
        with ``chi2``).
    start_points : list of dict
        Starting values of every start.
    options : dict
        The fit options (lorenz method, weights, n_starts, seed, bounds).
    elapsed : float
        Wall time [s].
    """

    values: dict
    stderr: dict
    stderr_fitted: dict
    names: list
    units: dict
    free: list
    correlation: np.ndarray
    covariance: np.ndarray
    covariance_fitted: np.ndarray
    chi2: float
    reduced_chi2: float
    log_likelihood: float
    aic: float
    aicc: float
    bic: float
    n_points: int
    n_free: int
    dof: int
    residuals: np.ndarray
    relative_residuals: np.ndarray
    nfev: int
    success: bool
    message: str
    flags: FitFlags
    models: list
    datasets: list
    labels: list
    targets: list
    sigma_relative: list
    scatter: float
    scatter_estimated: bool
    starts: list
    start_points: list
    options: dict
    elapsed: float = 0.0
    _problem: object = field(default=None, repr=False)
    _x: np.ndarray = field(default=None, repr=False)

    # --- shortcuts ----------------------------------------------------------------
    @property
    def model(self) -> LatticeModel:
        return self.models[0]

    @property
    def data(self) -> Dataset:
        return self.datasets[0]

    @property
    def temperature(self) -> np.ndarray:
        return self.targets[0].temperature

    @property
    def target(self) -> np.ndarray:
        return self.targets[0].kappa

    @property
    def target_err(self):
        return self.targets[0].kappa_err

    @property
    def x(self) -> np.ndarray:
        """Fitted values in the fitted space (log10 for log parameters)."""
        return np.array([float(f.to_x(self.values[f.name])) for f in self.free])

    @property
    def quantile_dof(self):
        """Degrees of freedom of the Student t quantile for intervals (None: normal)."""
        return self.dof if self.scatter_estimated else None

    def quantile(self, level: float = 0.95) -> float:
        """Two-sided quantile for a ``level`` interval (normal, or Student t when the scatter is estimated)."""
        level = _level(level)
        p = 0.5 + 0.5 * level
        if self.quantile_dof is None:
            return float(stats.norm.ppf(p))
        if self.quantile_dof < 1:
            return math.inf
        return float(stats.t.ppf(p, self.quantile_dof))

    def interval(self, name: str, level: float = 0.95) -> tuple:
        """Linearised (Wald) interval of a parameter, symmetric in the fitted space.

        For log parameters the interval is value * 10^(+-q stderr_log10), so it
        is asymmetric in natural units and stays positive.
        """
        f = self._free(name)
        q = self.quantile(level)
        x = float(f.to_x(self.values[name]))
        s = self.stderr_fitted[name]
        return (float(f.from_x(x - q * s)), float(f.from_x(x + q * s)))

    def _free(self, name):
        for f in self.free:
            if f.name == name:
                return f
        raise ParameterError(f"no free parameter named {name!r}; free: {', '.join(self.names)}")

    def correlation_of(self, a: str, b: str) -> float:
        i, j = self.names.index(self._free(a).name), self.names.index(self._free(b).name)
        return float(self.correlation[i, j])

    def most_correlated(self, k: int = 2) -> list:
        """The k parameters most correlated with any other (largest max |r|)."""
        if self.n_free < 2:
            return list(self.names)
        c = np.abs(np.nan_to_num(self.correlation, nan=0.0)) - np.eye(self.n_free)
        order = np.argsort(-c.max(axis=1), kind="stable")
        return [self.names[i] for i in order[:k]]

    def kappa(self, temperature, sample=0):
        """Fitted lattice conductivity [W/m/K] of a sample at temperatures [K]."""
        return self.models[_sample_index(self, sample)].kappa(temperature)

    # --- text ---------------------------------------------------------------------
    def summary(self, level: float = 0.95) -> str:
        """Plain-text report: parameters, intervals, fit statistics, warnings."""
        lines = []
        title = "Lattice fit" + (f" of {len(self.labels)} samples" if len(self.labels) > 1 else
                                 (f" of {self.labels[0]!r}" if self.labels[0] else ""))
        lines.append(title)
        lines.append(f"  {self.n_points} points, {self.n_free} free parameters, "
                     f"{len(self.starts)} start(s), {self.nfev} model evaluations, {self.elapsed:.2f} s")
        pct = int(round(level * 100))
        w = max(12, max(len(n) for n in self.names))
        lines.append(f"  {'parameter'.ljust(w)}  {'value':>11}  {'stderr':>10}  {pct}% interval".rstrip())
        for n in self.names:
            lo, hi = self.interval(n, level)
            u = self.units.get(n, "")
            lines.append(f"  {n.ljust(w)}  {self.values[n]:11.4g}  {self.stderr[n]:10.3g}  "
                         f"[{lo:.4g}, {hi:.4g}] {u}".rstrip())
        if self.scatter_estimated:
            wtxt = f"relative scatter estimated from the residuals: s0 = {100 * self.scatter:.2f}%"
        else:
            wtxt = "weights from the stated errors (covariance not rescaled)"
        lines.append(f"  chi2 = {self.chi2:.4g}, reduced chi2 = {self.reduced_chi2:.3g}, "
                     f"AIC = {self.aic:.4g}, BIC = {self.bic:.4g}")
        lines.append(f"  {wtxt}")
        rms = float(np.sqrt(np.mean(self.relative_residuals**2)))
        lines.append(f"  rms relative residual = {100 * rms:.2f}%")
        if self.n_free > 1:
            lines.append("  correlation:")
            for i, n in enumerate(self.names):
                row = " ".join(f"{self.correlation[i, j]:+.2f}" for j in range(self.n_free))
                lines.append(f"    {n.ljust(w)} {row}")
        for m in self.flags.messages():
            lines.append(f"  WARNING: {m}")
        for m in self.flags.notes:
            lines.append(f"  note: {m}")
        return "\n".join(lines)

    def to_dict(self) -> dict:
        """JSON-safe summary (values, errors, statistics, flags); records add data and models."""
        return {
            "values": dict(self.values),
            "stderr": {k: _json_float(v) for k, v in self.stderr.items()},
            "stderr_fitted": {k: _json_float(v) for k, v in self.stderr_fitted.items()},
            "intervals_95": {n: list(self.interval(n, 0.95)) for n in self.names},
            "names": list(self.names),
            "units": dict(self.units),
            "correlation": _json_matrix(self.correlation),
            "chi2": self.chi2, "reduced_chi2": _json_float(self.reduced_chi2),
            "aic": _json_float(self.aic), "aicc": _json_float(self.aicc), "bic": _json_float(self.bic),
            "n_points": self.n_points, "n_free": self.n_free, "nfev": self.nfev,
            "success": self.success, "message": self.message,
            "scatter": self.scatter, "scatter_estimated": self.scatter_estimated,
            "flags": self.flags.to_dict(), "starts": [float(c) for c in self.starts],
            "labels": list(self.labels),
        }


def _json_float(v):
    v = float(v)
    return v if math.isfinite(v) else None


def _json_matrix(a):
    return [[_json_float(v) for v in row] for row in np.asarray(a)]


def _level(level) -> float:
    try:
        v = float(level)
    except (TypeError, ValueError):
        raise ParameterError(f"level must be a number in (0, 1), got {level!r}") from None
    if not 0.0 < v < 1.0:
        raise ParameterError(f"level must be in (0, 1), e.g. 0.95, got {v!r}")
    return v


def _sample_index(result, sample) -> int:
    labels = list(result.labels)
    if isinstance(sample, str):
        if sample not in labels:
            raise ParameterError(f"no sample labelled {sample!r}; samples: {', '.join(labels)}")
        return labels.index(sample)
    try:
        i = int(sample)
    except (TypeError, ValueError):
        raise ParameterError(f"sample must be a label or an index, got {sample!r}") from None
    if not 0 <= i < len(labels):
        raise ParameterError(f"sample index {i} out of range; there are {len(labels)} sample(s)")
    return i


# ======================================================================================
# the fit
# ======================================================================================

def _lhs(n: int, d: int, rng) -> np.ndarray:
    """Latin hypercube: n points in [0, 1)^d, one per stratum of every coordinate."""
    u = (rng.random((n, d)) + np.arange(n)[:, None]) / n
    for j in range(d):
        u[:, j] = u[rng.permutation(n), j]
    return u


def _check_callable(name, f):
    if f is not None and not callable(f):
        raise ParameterError(f"{name} must be a callable or None, got {f!r}")


def _check_int(name, v, lo):
    if isinstance(v, bool) or not isinstance(v, (int, np.integer)) or v < lo:
        raise ParameterError(f"{name} must be a whole number >= {lo}, got {v!r}")
    return int(v)


def _prepare(models, datasets, labels, lorenz_method, weights):
    if weights not in ("auto", "errors", "relative"):
        raise ParameterError(f"weights must be 'auto', 'errors' or 'relative', got {weights!r}")
    blocks = []
    notes = []
    for m, ds, lab in zip(models, datasets, labels):
        if not isinstance(m, LatticeModel):
            raise ParameterError(f"model must be a LatticeModel, got {type(m).__name__}")
        tgt = lattice_target(ds, lorenz_method)
        notes.extend(tgt.notes)
        if weights == "errors" and tgt.measured_err is None:
            raise DataError(f"{lab or 'data'}: weights='errors' needs a kappa_err column")
        e = np.zeros(tgt.kappa.size) if tgt.kappa_err is None else tgt.kappa_err / tgt.kappa
        blocks.append(_Block(m, lab, ds, tgt, np.log(tgt.kappa), e))
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


def _run_starts(prob: _Problem, x0, n_starts, seed, progress, should_stop, max_nfev):
    d = x0.size
    rng = np.random.default_rng(seed)
    pts = [np.clip(x0, prob.lo, prob.hi)]
    if n_starts > 1:
        u = _lhs(n_starts - 1, d, rng)
        pts += list(prob.lo + u * (prob.hi - prob.lo))
    costs, best, cancelled = [], None, False
    for i, xs in enumerate(pts):
        if should_stop is not None and should_stop():
            cancelled = True
            break
        try:
            res = optimize.least_squares(prob.residuals, xs, bounds=(prob.lo, prob.hi), method="trf",
                                         x_scale=1.0, diff_step=1e-6, max_nfev=max_nfev,
                                         ftol=1e-10, xtol=1e-10, gtol=1e-10)
        except _Cancelled:
            cancelled = True
            break
        costs.append(float(res.cost))
        if best is None or res.cost < best.cost:
            best = res
        if progress is not None:
            progress(i + 1, len(pts), float(best.cost))
    return best, costs, [prob.values(p) for p in pts[:len(costs)]], cancelled


def _analyse(prob: _Problem, x, estimate, fit_options, costs, start_points, best_status, cancelled,
             notes, elapsed_start, message):
    """Covariance, statistics and flags at the optimum x."""
    J = prob.jacobian(x)
    r = prob.residuals(x)
    n, p = r.size, x.size
    dof = n - p
    chi2 = float(np.sum(r * r))
    U, S, Vt = np.linalg.svd(J, full_matrices=False)
    tol = S.max() * max(J.shape) * np.finfo(float).eps * 1e3 if S.size and S.max() > 0 else 0.0
    good = S > tol
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
    cov_nat = cov * np.outer(dvdx, dvdx)
    se_nat = se_x * np.abs(dvdx)
    names = [f.name for f in prob.frees]
    # flags
    flags = FitFlags(notes=list(notes), cancelled=cancelled, not_converged=(best_status == 0),
                     unidentified=unidentified)
    span = prob.hi - prob.lo
    for j, f in enumerate(prob.frees):
        if x[j] - prob.lo[j] <= _AT_BOUND * span[j] or prob.hi[j] - x[j] <= _AT_BOUND * span[j]:
            flags.at_bound.append(f.name)
    for i in range(p):
        for j in range(i + 1, p):
            if np.isfinite(corr[i, j]) and abs(corr[i, j]) > CORRELATION_LIMIT:
                flags.correlated.append((names[i], names[j], float(corr[i, j])))
    if len(costs) > 1:
        best_cost = min(costs)
        agree = sum(1 for c in costs if c <= best_cost * (1 + 1e-6) + 1e-12)
        flags.notes.append(f"{agree} of {len(costs)} starts reached the best cost")
    # likelihood in ln kappa
    k_eff = p + (1 if estimate else 0)
    raw = prob.raw_residuals(x)
    lnL = _log_likelihood(raw, np.concatenate([b.e_rel for b in prob.blocks]), prob.s0, estimate)
    aic = -2 * lnL + 2 * k_eff
    aicc = aic + (2 * k_eff * (k_eff + 1) / (n - k_eff - 1) if n - k_eff - 1 > 0 else math.inf)
    bic = -2 * lnL + k_eff * math.log(n)
    models = prob.models_at(x)
    res = FitResult(
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
        options=dict(fit_options), elapsed=time.perf_counter() - elapsed_start, _problem=prob, _x=np.array(x),
    )
    return res


def _labels_for(datasets, labels):
    if labels is None:
        labels = [ds.label or f"sample {i + 1}" for i, ds in enumerate(datasets)]
    labels = [str(s) for s in labels]
    if len(labels) != len(datasets):
        raise ParameterError(f"labels must have one entry per dataset: {len(datasets)} datasets, {len(labels)} labels")
    if len(set(labels)) != len(labels):
        dup = next(s for s in labels if labels.count(s) > 1)
        raise ParameterError(f"sample label {dup!r} is used twice; pass labels=[...] with one label per sample")
    return labels


def _fit_core(models, datasets, labels, shared, per_sample, *, bounds, lorenz_method, n_starts, seed,
              progress, should_stop, weights, max_nfev):
    t0 = time.perf_counter()
    n_starts = _check_int("n_starts", n_starts, 1)
    _check_callable("progress", progress)
    _check_callable("should_stop", should_stop)
    if max_nfev is not None:
        max_nfev = _check_int("max_nfev", max_nfev, 1)
    blocks, estimate, notes = _prepare(models, datasets, labels, lorenz_method, weights)
    frees = _resolve_free(models, labels, shared, per_sample, bounds)
    n = sum(b.ln_y.size for b in blocks)
    if n < len(frees) + (1 if estimate else 0):
        raise FitError(f"{n} data points cannot determine {len(frees)} free parameter(s)"
                       + (" and the scatter" if estimate else "") + "; free fewer parameters")
    # initial scatter: typical 2% until estimated (the optimum does not depend on it when e = 0)
    prob = _Problem(blocks, frees, 0.02 if estimate else 0.0, should_stop)
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
                res = optimize.least_squares(prob.residuals, x, bounds=(prob.lo, prob.hi), method="trf",
                                             x_scale=1.0, diff_step=1e-6, max_nfev=max_nfev,
                                             ftol=1e-10, xtol=1e-10, gtol=1e-10)
                x, status, message = res.x, res.status, res.message
        except _Cancelled:
            cancelled = True
    prob.should_stop = None  # the error analysis is not cancellable (a few evaluations)
    options = {"lorenz_method": lorenz_method, "weights": weights, "n_starts": n_starts, "seed": seed,
               "bounds": {f.name: [f.lower, f.upper] for f in frees}, "max_nfev": max_nfev,
               "shared": list(shared), "per_sample": list(per_sample)}
    return _analyse(prob, np.asarray(x, dtype=float), estimate, options, costs, start_points, status, cancelled,
                    notes, t0, str(message))


def fit(model: LatticeModel, data, free: Sequence[str], *, bounds: Mapping | None = None,
        lorenz_method: str = "auto", n_starts: int = 8, seed: int = 0,
        progress: Callable | None = None, should_stop: Callable | None = None,
        weights: str = "auto", max_nfev: int | None = None) -> FitResult:
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
    n_starts : int
        Number of starts (>= 1): the model's values plus a seeded Latin
        hypercube in the fitted box.
    seed : int
        Seed of the start points.
    progress : callable, optional
        ``progress(i, n, best_cost)`` after each start (i = starts done).
    should_stop : callable, optional
        Returns True to cancel (see the module docstring).
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
        Fewer points than free parameters, or cancelled before any start finished.
    """
    ds = as_dataset(data)
    if isinstance(free, str):
        raise ParameterError(f"free must be a list of parameter names, got the string {free!r}")
    labels = [ds.label or "sample"]
    return _fit_core([model], [ds], labels, list(free), [], bounds=bounds, lorenz_method=lorenz_method,
                     n_starts=n_starts, seed=seed, progress=progress, should_stop=should_stop,
                     weights=weights, max_nfev=max_nfev)


def fit_joint(models, datasets, shared: Sequence[str], per_sample: Sequence[str] = (), *,
              labels: Sequence[str] | None = None, bounds: Mapping | None = None,
              lorenz_method: str = "auto", n_starts: int = 8, seed: int = 0,
              progress: Callable | None = None, should_stop: Callable | None = None,
              weights: str = "auto", max_nfev: int | None = None) -> FitResult:
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
    lorenz_method, n_starts, seed, progress, should_stop, weights, max_nfev
        As in :func:`fit`.

    Returns
    -------
    FitResult
        ``models``, ``datasets``, ``labels`` and ``targets`` hold one entry per sample.

    Raises
    ------
    ParameterError, DataError, FitError
        As in :func:`fit`; also mismatched list lengths or duplicate labels.
    """
    datasets = [as_dataset(d) for d in datasets]
    if not datasets:
        raise ParameterError("datasets must hold at least one dataset")
    if isinstance(models, LatticeModel):
        models = [models] * len(datasets)
    models = list(models)
    if len(models) != len(datasets):
        raise ParameterError(f"models must have one entry per dataset: {len(datasets)} datasets, {len(models)} models")
    labels = _labels_for(datasets, labels)
    return _fit_core(models, datasets, labels, list(shared), list(per_sample), bounds=bounds,
                     lorenz_method=lorenz_method, n_starts=n_starts, seed=seed, progress=progress,
                     should_stop=should_stop, weights=weights, max_nfev=max_nfev)


# ======================================================================================
# intervals
# ======================================================================================

def _need_problem(result):
    prob = getattr(result, "_problem", None)
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
    prob = _need_problem(result)
    f = result._free(name)
    j = result.names.index(f.name)
    q = result.quantile(level)
    thr = q * q
    x_best = np.array(result._x, dtype=float)
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
                g = lambda t: rise(t, side) - thr  # noqa: E731
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
                           upper=float(f.from_x(ends["upper"])), level=_level(level), threshold=thr,
                           lower_open=open_["lower"], upper_open=open_["upper"],
                           profile=(px, np.array(tried_d)[order]), nfev=prob.nfev - n0)


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
        level = _level(level)
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
    n = _check_int("n", n, 2)
    if method not in ("residuals", "parametric"):
        raise ParameterError(f"method must be 'residuals' or 'parametric', got {method!r}")
    _check_callable("progress", progress)
    _check_callable("should_stop", should_stop)
    prob = _need_problem(result)
    x_best = np.array(result._x, dtype=float)
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
            if should_stop is not None and should_stop():
                break
            e = rng.choice(pool, size=r.size, replace=True) if method == "residuals" else rng.standard_normal(r.size)
            pos = 0
            for b, l, s in zip(prob.blocks, lm, sig):
                m = l.size
                b.ln_y = l + s * e[pos:pos + m]
                pos += m
            res = optimize.least_squares(prob.residuals, x_best, bounds=(prob.lo, prob.hi), method="trf",
                                         diff_step=1e-6, ftol=1e-10, xtol=1e-10, gtol=1e-10,
                                         max_nfev=60 * x_best.size)
            out.append(res.x)
            if progress is not None:
                progress(k + 1, n, None)
    finally:
        for b, y in zip(prob.blocks, saved):
            b.ln_y = y
    if len(out) < 2:
        raise FitError("bootstrap cancelled before two refits finished")
    X = np.array(out)
    samples = {f.name: np.array([float(f.from_x(v)) for v in X[:, j]]) for j, f in enumerate(prob.frees)}
    return BootstrapResult(samples=samples, n=len(out), method=method, seed=seed)


# ======================================================================================
# prediction band
# ======================================================================================

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


def _band_parts(models, free, cov_fitted, values, sample, temperature, x_of=None):
    """ln kappa and its gradient in fitted space for one sample."""
    T = np.atleast_1d(np.asarray(temperature, dtype=float))
    model = models[sample]
    rel = [j for j, f in enumerate(free) if sample in f.samples]
    k0 = np.asarray(model.kappa(T), dtype=float)
    with np.errstate(all="ignore"):
        lk0 = np.log(k0)
    G = np.zeros((T.size, len(free)))
    for j in rel:
        f = free[j]
        x = float(f.to_x(values[f.name]))
        lo, hi = f.x_bounds
        h = _JAC_STEP
        xp, xm = min(x + h, hi), max(x - h, lo)
        with np.errstate(all="ignore"):
            lp = np.log(model.with_params({f.param: float(f.from_x(xp))}).kappa(T)) if xp != x else lk0
            lm = np.log(model.with_params({f.param: float(f.from_x(xm))}).kappa(T)) if xm != x else lk0
        G[:, j] = (lp - lm) / (xp - xm)
    C = np.nan_to_num(np.asarray(cov_fitted, dtype=float), nan=0.0, posinf=np.inf)
    with np.errstate(invalid="ignore"):
        var = np.einsum("ij,jk,ik->i", G, C, G)
    var = np.where(np.isnan(var), np.inf, var)  # an undetermined parameter: no band
    return T, lk0, np.sqrt(np.maximum(var, 0.0)), k0


def predict_band(result, temperature, level: float = 0.95, *, sample=0) -> Band:
    """Fitted kappa(T) with a confidence band from the parameter covariance.

    Linearised propagation in the fitted space: var ln kappa(T) =
    g^T C g, g_j = d ln kappa(T) / d x_j by central differences (x the fitted
    parameters, log10 for log parameters; C their covariance). The band is
    kappa * exp(+-q sd), q the quantile of :meth:`FitResult.quantile`, so it
    is positive and asymmetric. It is the band of the mean curve (parameter
    uncertainty only), not of new measurements.

    Parameters
    ----------
    result : FitResult (or a loaded Record, which has the same attributes)
    temperature : array_like
        [K]
    level : float
    sample : int or str
        Which sample of a joint fit.

    Returns
    -------
    Band
    """
    level = _level(level)
    i = _sample_index(result, sample)
    T, lk, sd, k = _band_parts(result.models, result.free, result.covariance_fitted, result.values, i, temperature)
    q = result.quantile(level)
    with np.errstate(over="ignore"):
        return Band(temperature=T, kappa=k, lower=k * np.exp(-q * sd), upper=k * np.exp(q * sd), sd_ln=sd,
                    level=level)


# ======================================================================================
# model comparison
# ======================================================================================

@dataclass
class Comparison:
    """Candidate models ranked by an information criterion.

    Attributes
    ----------
    criterion : str
        "aic", "aicc" or "bic".
    names : list of str
        Candidates, best first.
    results : dict
        name -> FitResult.
    scores : dict
        name -> criterion value.
    delta : dict
        name -> score - best score.
    weights : dict
        name -> Akaike (or BIC) weight exp(-delta/2) / sum.
    """

    criterion: str
    names: list
    results: dict
    scores: dict
    delta: dict
    weights: dict

    @property
    def best(self) -> str:
        return self.names[0]

    def summary(self) -> str:
        crit = self.criterion.upper()
        w = max(9, max(len(n) for n in self.names))
        lines = [f"{'candidate'.ljust(w)}  free  {'chi2':>9}  {crit:>9}  {'delta':>7}  weight"]
        for n in self.names:
            r = self.results[n]
            lines.append(f"{n.ljust(w)}  {r.n_free:4d}  {r.chi2:9.4g}  {self.scores[n]:9.4g}  "
                         f"{self.delta[n]:7.2f}  {self.weights[n]:.3f}")
        return "\n".join(lines)


def compare(candidates: Mapping, data, *, criterion: str = "aic", **fit_options) -> Comparison:
    """Fit several candidate models to the same data and rank them.

    Parameters
    ----------
    candidates : dict
        name -> (model, free) or (model, free, bounds).
    data : Dataset (or anything :func:`as_dataset` accepts)
    criterion : {"aic", "aicc", "bic"}
    **fit_options
        Passed to :func:`fit` (lorenz_method, n_starts, seed, weights ...);
        the same for every candidate, so the criteria are comparable.

    Returns
    -------
    Comparison

    Notes
    -----
    Weights are exp(-Delta_i / 2) normalised (Burnham & Anderson 2002,
    sec. 2.9). All candidates see the same lattice target and weighting; with
    an estimated scatter each likelihood uses its own s0, which the criteria
    count as one more parameter.
    """
    if criterion not in ("aic", "aicc", "bic"):
        raise ParameterError(f"criterion must be 'aic', 'aicc' or 'bic', got {criterion!r}")
    if not isinstance(candidates, Mapping) or not candidates:
        raise ParameterError("candidates must be a non-empty dict name -> (model, free)")
    if "bounds" in fit_options:
        raise ParameterError("give bounds per candidate as (model, free, bounds), not as bounds=")
    ds = as_dataset(data)
    results = {}
    for name, cand in candidates.items():
        try:
            model, free, *rest = cand
        except (TypeError, ValueError):
            raise ParameterError(f"candidate {name!r} must be (model, free) or (model, free, bounds)") from None
        if len(rest) > 1:
            raise ParameterError(f"candidate {name!r} must be (model, free) or (model, free, bounds)")
        results[name] = fit(model, ds, free, bounds=rest[0] if rest else None, **fit_options)
    scores = {n: float(getattr(r, criterion)) for n, r in results.items()}
    best = min(scores.values())
    delta = {n: s - best for n, s in scores.items()}
    raw = {n: math.exp(-0.5 * d) if math.isfinite(d) else 0.0 for n, d in delta.items()}
    tot = sum(raw.values())
    weights = {n: v / tot for n, v in raw.items()}
    names = sorted(results, key=lambda n: scores[n])
    return Comparison(criterion, names, results, scores, delta, weights)
