"""The result of a fit: values, errors, intervals, statistics, warnings and report rows."""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np
from scipy import stats

from ..data import Dataset
from ..errors import ParameterError
from ..lattice import LatticeModel
from .common import check_level, json_float, json_matrix, sample_index
from .flags import FitFlags, ParameterInterval
from .rows import ReportRow, rows_html, rows_text

__all__ = ["FitResult", "scatter_meaning"]


@lru_cache(maxsize=256)
def _quantile(level: float, dof) -> float:
    """Two-sided quantile: normal (dof None) or Student t (cached: scipy's ppf costs ~0.1 ms a call)."""
    p = 0.5 + 0.5 * level
    if dof is None:
        return float(stats.norm.ppf(p))
    if dof < 1:
        return math.inf
    return float(stats.t.ppf(p, dof))


@lru_cache(maxsize=256)
def _chi2_sf(chi2: float, dof: int) -> float:
    return float(stats.chi2.sf(chi2, dof))


def scatter_meaning(result) -> str:
    """One plain sentence saying what the fit's scatter s0 is and how it was used."""
    rms = result.rms_relative_residual
    if not result.scatter_estimated:
        return ("weights from the stated errors (no scatter s0 estimated; the covariance is not rescaled "
                "by the reduced chi-squared)")
    if all(t.kappa_err is None for t in result.targets):
        return (f"s0 = {100 * result.scatter:.3g}% is the 1-sigma relative error of every point, estimated "
                f"from the scatter of the residuals (no errors were given; rms residual {100 * rms:.3g}%)")
    known = ("the stated errors" if any(t.measured_err is not None for t in result.targets)
             else "the errors of the subtracted electronic part")
    if result.scatter == 0.0:
        return (f"s0 = 0: {known} already cover the scatter of the residuals (rms residual "
                f"{100 * rms:.3g}%), so no extra scatter was added")
    return (f"s0 = {100 * result.scatter:.3g}% is the relative scatter added in quadrature to {known} "
            f"so that the reduced chi-squared is 1 (rms residual {100 * rms:.3g}%)")


@dataclass
class FitResult:
    """Outcome of :func:`fit` or :func:`fit_joint`.

    Attributes
    ----------
    values : dict
        Fitted value of each free parameter, natural units (see ``units``).
    stderr : dict
        Linearised 1-sigma error in natural units (value * ln10 * stderr of
        log10 value for log parameters); inf where not determined. A
        parameter at a bound or not determined by the data has no interval:
        :meth:`interval_info` says why (and which bound it hit).
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
    provenance : kinetic.records.Provenance or None
        Where a loaded fit came from (record file, its SHA-256, package
        versions at save time, data paths and checksums); None for a fit made
        in this session. A loaded fit is a FitResult like any other: it can
        be summarised, reported, banded and saved again; profile intervals
        and the bootstrap need the live problem and ask for a refit.
    problem : kinetic.fitting.problem.Problem or None
        The live fit problem (used by :func:`profile_interval` and
        :func:`bootstrap`); None for a fit loaded from a record.
    x_fitted : ndarray or None
        The optimum in the fitted space (log10 for log parameters), as the
        optimiser left it; None for a loaded fit (use :attr:`x`).

    Report rows
    -----------
    :meth:`report_rows` is the one source of the fit report: the text
    :meth:`summary`, the notebook table :meth:`_repr_html_`, ``to_dict()["rows"]``
    (the CLI's --json), :func:`kinetic.report.summary_table` and the
    workbench table all render these rows.
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
    provenance: object = None
    problem: object = field(default=None, repr=False)
    x_fitted: np.ndarray = field(default=None, repr=False)

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
    def rms_relative_residual(self) -> float:
        """Root-mean-square of ln(kappa_model / kappa) over all points (about the rms relative deviation)."""
        r = np.asarray(self.relative_residuals, dtype=float)
        r = r[np.isfinite(r)]
        return float(np.sqrt(np.mean(r * r))) if r.size else math.nan

    @property
    def p_value(self):
        """Chi-squared goodness-of-fit test: P(chi2 >= observed) on ``dof`` degrees of freedom.

        Only meaningful with stated errors (None when the scatter was
        estimated, which makes chi2 = dof by construction, or when dof < 1).
        """
        if self.scatter_estimated or self.dof < 1 or not math.isfinite(self.chi2):
            return None
        return _chi2_sf(float(self.chi2), int(self.dof))

    @property
    def quantile_dof(self):
        """Degrees of freedom of the Student t quantile for intervals (None: normal)."""
        return self.dof if self.scatter_estimated else None

    def quantile(self, level: float = 0.95) -> float:
        """Two-sided quantile for a ``level`` interval (normal, or Student t when the scatter is estimated)."""
        return _quantile(check_level(level), None if self.quantile_dof is None else int(self.quantile_dof))

    def free_parameter(self, name: str):
        """The :class:`~kinetic.fitting.FreeParameter` called ``name`` (ParameterError if none)."""
        for f in self.free:
            if f.name == name:
                return f
        raise ParameterError(f"no free parameter named {name!r}; free: {', '.join(self.names)}")

    _free = free_parameter  # the old private name, kept for callers not yet switched

    def interval_info(self, name: str, level: float = 0.95) -> ParameterInterval:
        """Linearised (Wald) interval of a parameter, symmetric in the fitted space, or why there is none.

        For log parameters the interval is value * 10^(+-q stderr_log10), so it
        is asymmetric in natural units and stays positive. Not determined
        (``determined=False``, ends nan): the parameter is at a bound (the
        note names it), not seen by the data, or its interval is wider than
        the whole allowed range. An end beyond a bound is cut at the bound,
        with a note.
        """
        f = self.free_parameter(name)
        level = check_level(level)
        q = self.quantile(level)
        value = float(self.values[f.name])
        x = float(f.to_x(value))
        s = float(self.stderr_fitted[f.name])
        xlo, xhi = f.x_bounds
        nan = math.nan
        if f.name in self.flags.at_bound:
            side, b = ("lower", f.lower) if abs(x - xlo) <= abs(xhi - x) else ("upper", f.upper)
            return ParameterInterval(f.name, value, nan, nan, level, False,
                                     f"at the {side} bound {b:.4g}{(' ' + f.unit) if f.unit else ''}",
                                     b, f.unit)
        if f.name in self.flags.unidentified or not math.isfinite(s) or not math.isfinite(q):
            return ParameterInterval(f.name, value, nan, nan, level, False, "the data do not determine it",
                                     None, f.unit)
        if q * s >= xhi - xlo:
            return ParameterInterval(f.name, value, nan, nan, level, False,
                                     f"the interval is wider than the allowed range "
                                     f"[{f.lower:.4g}, {f.upper:.4g}]", None, f.unit)
        lo_x, hi_x = x - q * s, x + q * s
        notes = []
        if lo_x < xlo:
            lo_x = xlo
            notes.append(f"lower end cut at the bound {f.lower:.4g}")
        if hi_x > xhi:
            hi_x = xhi
            notes.append(f"upper end cut at the bound {f.upper:.4g}")
        return ParameterInterval(f.name, value, float(f.from_x(lo_x)), float(f.from_x(hi_x)), level, True,
                                 "; ".join(notes), None, f.unit)

    def interval(self, name: str, level: float = 0.95) -> tuple:
        """(lower, upper) of :meth:`interval_info` [natural units]; (nan, nan) when not determined."""
        iv = self.interval_info(name, level)
        return (iv.lower, iv.upper)

    def correlation_of(self, a: str, b: str) -> float:
        i, j = self.names.index(self.free_parameter(a).name), self.names.index(self.free_parameter(b).name)
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
        return self.models[sample_index(self, sample)].kappa(temperature)

    # --- report -------------------------------------------------------------------
    def report_rows(self, level: float = 0.95) -> list:
        """The fit report as rows: one per free parameter, then the fit statistics.

        Each :class:`~kinetic.fitting.ReportRow` has ``label`` (plain words),
        ``code_key`` (the parameter name or the ``to_dict`` key), ``value``,
        ``error`` (1-sigma, or None), ``interval`` ((lower, upper) at
        ``level``, or None), ``unit``, ``note`` (plain words: "not
        determined" reason such as "at the upper bound 0.01 m", what s0
        means, a poor-fit warning) and ``kind`` ("parameter" or "statistic").

        Examples
        --------
        >>> from kinetic import demo
        >>> from kinetic.fitting import fit
        >>> r = fit(demo.demo_model(), demo.demo_dataset(), list(demo.DEFAULT_FREE), n_starts=1)
        >>> [row.code_key for row in r.report_rows()][:4]
        ['boundary.length', 'point_defect.gamma', 'umklapp.gruneisen', 'n_points']
        >>> row = r.report_rows()[0]
        >>> row.interval == r.interval("boundary.length") and row.unit
        'm'
        """
        level = check_level(level)
        rows = []
        for n in self.names:
            iv = self.interval_info(n, level)
            err = json_float(self.stderr[n])
            note = iv.note
            rows.append(ReportRow(n, n, float(self.values[n]), err if iv.determined else None,
                                  (iv.lower, iv.upper) if iv.determined else None, self.units.get(n, ""),
                                  note, "parameter"))
        stat = []
        stat.append(ReportRow("data points", "n_points", self.n_points, None, None, "", "", "statistic"))
        stat.append(ReportRow("free parameters", "n_free", self.n_free, None, None, "", "", "statistic"))
        stat.append(ReportRow("chi-squared", "chi2", json_float(self.chi2), None, None, "",
                              f"on {self.dof} degrees of freedom", "statistic"))
        if self.scatter_estimated:
            rnote = "1 by construction: the scatter s0 was estimated from the residuals"
        else:
            rnote = self.flags.poor_fit or "about 1 when the model describes the data within the stated errors"
        stat.append(ReportRow("reduced chi-squared", "reduced_chi2", json_float(self.reduced_chi2), None, None, "",
                              rnote, "statistic"))
        p = self.p_value
        if p is not None:
            stat.append(ReportRow("goodness-of-fit p-value", "p_value", p, None, None, "",
                                  "chi-squared test with the stated errors", "statistic"))
        stat.append(ReportRow("relative scatter s0", "scatter_percent", 100.0 * float(self.scatter), None, None, "%",
                              scatter_meaning(self), "statistic"))
        stat.append(ReportRow("rms relative residual", "rms_relative_residual_percent",
                              json_float(100.0 * self.rms_relative_residual), None, None, "%",
                              "root-mean-square of ln(fit / data)", "statistic"))
        stat.append(ReportRow("AIC", "aic", json_float(self.aic), None, None, "",
                              "Akaike criterion: compare fits of the same data only", "statistic"))
        stat.append(ReportRow("BIC", "bic", json_float(self.bic), None, None, "",
                              "Bayesian criterion: compare fits of the same data only", "statistic"))
        return rows + stat

    def warnings(self) -> list:
        """The warnings of the fit in plain words (flags; notes excluded)."""
        return self.flags.messages()

    def summary(self, level: float = 0.95) -> str:
        """Plain-text report rendered from :meth:`report_rows`, then correlations, warnings and notes."""
        level = check_level(level)
        title = "Lattice fit" + (f" of {len(self.labels)} samples" if len(self.labels) > 1 else
                                 (f" of {self.labels[0]!r}" if self.labels[0] else ""))
        lines = [title, (f"  {self.n_points} points, {self.n_free} free parameters, {len(self.starts)} start(s), "
                         f"{self.nfev} model evaluations, {self.elapsed:.2f} s")]
        if self.provenance is not None:
            lines.append(f"  {self.provenance.describe()}")
        lines += ["  " + ln for ln in rows_text(self.report_rows(level), level)]
        if self.n_free > 1:
            w = max(12, max(len(n) for n in self.names))
            lines.append("  correlation:")
            for i, n in enumerate(self.names):
                row = " ".join(f"{self.correlation[i, j]:+.2f}" for j in range(self.n_free))
                lines.append(f"    {n.ljust(w)} {row}")
        for m in self.warnings():
            lines.append(f"  WARNING: {m}")
        for m in self.flags.notes:
            lines.append(f"  note: {m}")
        return "\n".join(lines)

    def __str__(self) -> str:
        return self.summary()

    def _repr_html_(self) -> str:
        """Notebook display: the report rows as an HTML table, with the warnings and notes."""
        return rows_html(self.report_rows(), title="Lattice fit" + (f" of {', '.join(self.labels)}"
                                                                   if self.labels else ""),
                         warnings=self.warnings(), notes=list(self.flags.notes))

    def to_dict(self) -> dict:
        """Strict-JSON summary (values, errors, intervals, statistics, flags, report rows).

        Non-finite numbers are None. ``intervals_95`` maps each parameter to
        ``[lower, upper]``, or None when not determined (``intervals`` says
        why, with the bound it hit). Records add data and models.
        """
        infos = {n: self.interval_info(n, 0.95) for n in self.names}
        return {
            "values": {k: json_float(v) for k, v in self.values.items()},
            "stderr": {k: json_float(v) for k, v in self.stderr.items()},
            "stderr_fitted": {k: json_float(v) for k, v in self.stderr_fitted.items()},
            "intervals_95": {n: ([json_float(iv.lower), json_float(iv.upper)] if iv.determined else None)
                             for n, iv in infos.items()},
            "intervals": {n: iv.to_dict() for n, iv in infos.items()},
            "names": list(self.names),
            "units": dict(self.units),
            "correlation": json_matrix(self.correlation),
            "chi2": json_float(self.chi2), "reduced_chi2": json_float(self.reduced_chi2),
            "p_value": json_float(self.p_value) if self.p_value is not None else None,
            "aic": json_float(self.aic), "aicc": json_float(self.aicc), "bic": json_float(self.bic),
            "n_points": int(self.n_points), "n_free": int(self.n_free), "dof": int(self.dof), "nfev": int(self.nfev),
            "success": bool(self.success), "message": str(self.message),
            "scatter": json_float(self.scatter), "scatter_estimated": bool(self.scatter_estimated),
            "rms_relative_residual": json_float(self.rms_relative_residual),
            "flags": self.flags.to_dict(), "warnings": self.warnings(),
            "starts": [json_float(c) for c in self.starts],
            "labels": list(self.labels),
            "rows": [r.to_dict() for r in self.report_rows(0.95)],
        }
