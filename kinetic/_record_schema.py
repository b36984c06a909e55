"""The checks a fit record passes on load (private; used by :mod:`kinetic.records`).

:func:`read_record` walks the parsed JSON and returns the FitResult fields,
or raises one :class:`~kinetic.errors.RecordError` line naming the file and
the field's JSON path (``fit.free[0].log``) and what was expected.
"""
from __future__ import annotations

import math

import numpy as np

from .data import Dataset
from .errors import RecordError
from .fitting import FitFlags, FreeParameter, LatticeTarget
from .lattice import LatticeModel

__all__ = ["read_record"]

SCHEMA = "kinetic.fit-record"
VERSION = 1
#: Relative tolerance of checks between two stored floats that a record we
#: wrote holds to the bit (written with repr); 1e-9 leaves room for a record
#: edited by hand without letting a changed value through.
REL = 1e-9
#: Tolerance of the covariance checks (symmetry, positive semi-definiteness)
#: relative to the largest diagonal entry: a few hundred rounding errors of a
#: covariance built from an SVD (common practice for numerical PSD tests).
COV_TOL = 1e-8
_NONFINITE = {"inf": math.inf, "-inf": -math.inf, "nan": math.nan}


class _Reader:
    """Typed access to the parsed JSON with errors naming the file and the JSON path."""

    def __init__(self, name: str):
        self.name = name

    def fail(self, where: str, msg: str):
        raise RecordError(f"{self.name}: field {where} {msg}" if where else f"{self.name}: {msg}")

    def obj(self, v, where) -> dict:
        if not isinstance(v, dict):
            self.fail(where, f"must be an object, got {_kind(v)}")
        return v

    def key(self, d, key, where, optional=False, default=None):
        w = f"{where}.{key}" if where else key
        if key not in d:
            if optional:
                return default, w
            self.fail("", f"missing field {w}")
        return d[key], w

    def string(self, v, where, *, allow_none=False):
        if v is None and allow_none:
            return None
        if not isinstance(v, str):
            self.fail(where, f"must be a string{' or null' if allow_none else ''}, got {_kind(v)}")
        return v

    def boolean(self, v, where) -> bool:
        if not isinstance(v, bool):
            self.fail(where, f"must be true or false (a JSON boolean), got {_kind(v)}")
        return v

    def integer(self, v, where, lo=None) -> int:
        if isinstance(v, bool) or not isinstance(v, int):
            self.fail(where, f"must be a whole number, got {_kind(v)}")
        if lo is not None and v < lo:
            self.fail(where, f"must be >= {lo}, got {v}")
        return v

    def number(self, v, where, *, inf=False, nan=False, lo=None, strict_lo=False) -> float:
        if isinstance(v, bool):
            self.fail(where, "must be a number, got a boolean")
        if isinstance(v, str) and v in _NONFINITE:
            x = _NONFINITE[v]
            if (math.isnan(x) and not nan) or (math.isinf(x) and not inf):
                self.fail(where, f"must be a finite number, got {v!r}")
        elif isinstance(v, (int, float)):
            x = float(v)
        else:
            self.fail(where, f"must be a number, got {_kind(v)}")
        if lo is not None and not math.isnan(x) and (x < lo or (strict_lo and x == lo)):
            self.fail(where, f"must be {'>' if strict_lo else '>='} {lo:g}, got {x!r}")
        return x

    def numbers(self, v, where, *, size=None, allow_none=False, **kw):
        if v is None and allow_none:
            return None
        if not isinstance(v, list):
            self.fail(where, f"must be a list of numbers{' or null' if allow_none else ''}, got {_kind(v)}")
        if size is not None and len(v) != size:
            self.fail(where, f"must hold {size} numbers (one per point), got {len(v)}")
        return np.array([self.number(x, f"{where}[{i}]", **kw) for i, x in enumerate(v)], dtype=float)

    def strings(self, v, where) -> list:
        if not isinstance(v, list):
            self.fail(where, f"must be a list of strings, got {_kind(v)}")
        return [self.string(x, f"{where}[{i}]") for i, x in enumerate(v)]

    def matrix(self, v, where, n, **kw):
        if not isinstance(v, list) or len(v) != n:
            self.fail(where, f"must be a {n} x {n} list of lists")
        rows = []
        for i, r in enumerate(v):
            if not isinstance(r, list) or len(r) != n:
                self.fail(where, f"must be a {n} x {n} list of lists (row {i} is not)")
            rows.append(self.numbers(r, f"{where}[{i}]", **kw))
        return np.array(rows, dtype=float).reshape(n, n)


def _kind(v) -> str:
    if v is None:
        return "null"
    if isinstance(v, bool):
        return f"the boolean {str(v).lower()}"
    if isinstance(v, str):
        return f"the string {v[:40]!r}"
    if isinstance(v, (int, float)):
        return f"the number {v!r}"
    return {"list": "a list", "dict": "an object"}.get(type(v).__name__, type(v).__name__)


def _close(a: float, b: float) -> bool:
    return a == b or math.isclose(a, b, rel_tol=REL, abs_tol=0.0)


def _model_types(R: _Reader, d: dict, w: str) -> None:
    """JSON types of a stored model: numbers are numbers (never strings), flags are booleans."""
    br, wb = R.key(d, "branches", w)
    if not isinstance(br, list) or not br:
        R.fail(wb, "must be a non-empty list of branches")
    for i, b in enumerate(br):
        wi = f"{wb}[{i}]"
        R.obj(b, wi)
        for k, x in b.items():
            if k in ("name", "dispersion"):
                R.string(x, f"{wi}.{k}")
            elif k == "polarizations":
                R.integer(x, f"{wi}.{k}", lo=1)
            else:
                R.number(x, f"{wi}.{k}", lo=0.0, strict_lo=True)
    sc, wsc = R.key(d, "scattering", w)
    if not isinstance(sc, list):
        R.fail(wsc, f"must be a list of mechanisms, got {_kind(sc)}")
    for i, m in enumerate(sc):
        wi = f"{wsc}[{i}]"
        R.obj(m, wi)
        R.string(*R.key(m, "kind", wi))
        R.string(*R.key(m, "name", wi, optional=True, default=""))
        vals, wv = R.key(m, "values", wi, optional=True, default={})
        for k, x in R.obj(vals, wv).items():
            if x is not None:
                R.number(x, f"{wv}.{k}")
        opts, wo = R.key(m, "options", wi, optional=True, default={})
        for k, x in R.obj(opts, wo).items():
            if isinstance(x, str) and x.strip() and x.strip().lstrip("+-").replace(".", "", 1).replace(
                    "e", "", 1).replace("-", "", 1).isdigit():
                R.fail(f"{wo}.{k}", f"must be a JSON number, not the string {x!r}")
        at, wa = R.key(m, "applies_to", wi, optional=True)
        if at is not None:
            R.strings(at, wa)
    if "normal_correction" in d:
        R.boolean(d["normal_correction"], f"{w}.normal_correction")
    if d.get("material") is not None:
        R.string(d["material"], f"{w}.material")


def _sample(R: _Reader, s, i: int):
    w = f"samples[{i}]"
    R.obj(s, w)
    label = R.string(*R.key(s, "label", w))
    v, wd = R.key(s, "data", w)
    R.obj(v, wd)
    try:
        ds = Dataset.from_dict(v)
    except Exception as exc:  # noqa: BLE001 -- any failure of a tampered dataset is one RecordError line
        R.fail(wd, f"is not a valid dataset ({str(exc).splitlines()[0] if str(exc) else type(exc).__name__})")
    v, wm = R.key(s, "model", w)
    _model_types(R, R.obj(v, wm), wm)
    try:
        model = LatticeModel.from_dict(v)
    except Exception as exc:  # noqa: BLE001 -- any failure of a tampered model is one RecordError line
        R.fail(wm, f"cannot be rebuilt ({str(exc).splitlines()[0] if str(exc) else type(exc).__name__})")
    path = R.string(*R.key(s, "data_path", w, optional=True), allow_none=True)
    sha = R.string(*R.key(s, "data_sha256", w, optional=True), allow_none=True)
    if sha is not None and (len(sha) != 64 or any(c not in "0123456789abcdef" for c in sha)):
        R.fail(f"{w}.data_sha256", "must be 64 lower-case hex digits (a SHA-256) or null")
    t, wt = R.key(s, "lattice_target", w)
    R.obj(t, wt)
    T = R.numbers(*R.key(t, "temperature", wt), lo=0.0, strict_lo=True)
    m = T.size
    if m < 1:
        R.fail(f"{wt}.temperature", "is empty; a sample needs at least one point")
    k = R.numbers(*R.key(t, "kappa", wt), size=m, lo=0.0, strict_lo=True)
    err = R.numbers(*R.key(t, "kappa_err", wt), size=m, allow_none=True, lo=0.0)
    merr = R.numbers(*R.key(t, "measured_err", wt), size=m, allow_none=True, lo=0.0)
    ke = R.numbers(*R.key(t, "kappa_electronic", wt), size=m, allow_none=True)
    kee = R.numbers(*R.key(t, "kappa_electronic_err", wt), size=m, allow_none=True, lo=0.0)
    lor = R.numbers(*R.key(t, "lorenz", wt), size=m, allow_none=True, lo=0.0, strict_lo=True)
    kept_raw, wk = R.key(t, "kept", wt)
    if not isinstance(kept_raw, list):
        R.fail(wk, f"must be a list of booleans, got {_kind(kept_raw)}")
    kept = [R.boolean(b, f"{wk}[{j}]") for j, b in enumerate(kept_raw)]
    if len(kept) != len(ds):
        R.fail(wk, f"must hold one boolean per data row ({len(ds)}), got {len(kept)}")
    if sum(kept) != m:
        R.fail(wk, f"marks {sum(kept)} rows as kept but the target has {m} points")
    keptm = np.array(kept, dtype=bool)
    if not np.allclose(T, np.asarray(ds.temperature, dtype=float)[keptm], rtol=REL, atol=0.0):
        R.fail(f"{wt}.temperature", "disagrees with the temperatures of the sample's data")
    measured = np.asarray(ds.kappa, dtype=float)[keptm]
    expect = measured if ke is None else measured - ke
    if not np.allclose(k, expect, rtol=1e-9, atol=1e-12 * float(np.max(np.abs(measured)))):
        R.fail(f"{wt}.kappa", "disagrees with the sample's data (kappa" + ("" if ke is None else
                                                                         " - kappa_electronic") + ")")
    notes = R.strings(*R.key(t, "notes", wt))
    sig = R.numbers(*R.key(t, "sigma_relative", wt), size=m, lo=0.0, strict_lo=True)
    target = LatticeTarget(temperature=T, kappa=k, kappa_err=err, measured_err=merr, kappa_electronic=ke,
                           kappa_electronic_err=kee, lorenz=lor, kept=np.array(kept, dtype=bool), notes=tuple(notes))
    return label, ds, model, path, sha, target, sig


def _free(R: _Reader, fd, j: int, models) -> FreeParameter:
    w = f"fit.free[{j}]"
    R.obj(fd, w)
    name = R.string(*R.key(fd, "name", w))
    param = R.string(*R.key(fd, "param", w))
    sv, ws = R.key(fd, "samples", w)
    if not isinstance(sv, list) or not sv:
        R.fail(ws, "must be a non-empty list of sample indices")
    samples = tuple(R.integer(x, f"{ws}[{i}]", lo=0) for i, x in enumerate(sv))
    for i in samples:
        if i >= len(models):
            R.fail(ws, f"names sample {i}, but the record has {len(models)} sample(s)")
        if param not in models[i].params:
            R.fail(f"{w}.param", f"{param!r} is not a parameter of the model of sample {i}")
    log = R.boolean(*R.key(fd, "log", w))
    lo = R.number(*R.key(fd, "lower", w))
    hi = R.number(*R.key(fd, "upper", w))
    if lo > hi:
        R.fail(f"{w}.lower", f"must not exceed upper ({lo!r} > {hi!r})")
    if log and lo <= 0:
        R.fail(f"{w}.lower", f"must be > 0 for a log-scale parameter, got {lo!r}")
    unit = R.string(*R.key(fd, "unit", w, optional=True, default=""))
    return FreeParameter(name, param, samples, log, lo, hi, unit)


def _covariance(R: _Reader, cov, se_x, corr, names):
    p = len(names)
    det = [j for j in range(p) if math.isfinite(cov[j, j])]
    for j in range(p):
        if not (math.isfinite(cov[j, j]) or cov[j, j] == math.inf):
            R.fail(f"fit.covariance_fitted[{j}][{j}]", f"must be >= 0 or \"inf\", got {cov[j, j]!r}")
        if cov[j, j] < 0:
            R.fail(f"fit.covariance_fitted[{j}][{j}]", f"is a variance and must be >= 0, got {cov[j, j]!r}")
        s = se_x[names[j]]
        if math.isfinite(cov[j, j]) != math.isfinite(s) or (
                math.isfinite(s) and not math.isclose(s * s, cov[j, j], rel_tol=1e-6, abs_tol=1e-300)):
            R.fail(f"fit.stderr_fitted.{names[j]}", "disagrees with the diagonal of fit.covariance_fitted")
    C = cov[np.ix_(det, det)]
    if not np.all(np.isfinite(C)):
        R.fail("fit.covariance_fitted", "has a non-finite entry between determined parameters")
    scale = max(float(np.max(np.abs(np.diag(C)))) if C.size else 0.0, 1e-300)
    if C.size and float(np.max(np.abs(C - C.T))) > COV_TOL * scale:
        R.fail("fit.covariance_fitted", "must be symmetric")
    if C.size and float(np.min(np.linalg.eigvalsh(0.5 * (C + C.T)))) < -COV_TOL * scale:
        R.fail("fit.covariance_fitted", "must be positive semi-definite (it has a negative eigenvalue)")
    for i in range(p):
        for j in range(p):
            r = corr[i, j]
            if i == j and r != 1.0:
                R.fail(f"fit.correlation[{i}][{j}]", f"must be 1 on the diagonal, got {r!r}")
            if math.isnan(r):
                if i in det and j in det:
                    R.fail(f"fit.correlation[{i}][{j}]", "is nan between two determined parameters")
                continue
            if abs(r) > 1.0 + 1e-12:
                R.fail(f"fit.correlation[{i}][{j}]", f"must be within [-1, 1], got {r!r}")
            if not _close(r, corr[j, i]) and abs(r - corr[j, i]) > 1e-12:
                R.fail("fit.correlation", "must be symmetric")


def _flags(R: _Reader, fl, names) -> FitFlags:
    """The stored warnings, each name checked against the free parameters."""
    w = "fit.flags"
    R.obj(fl, w)
    at_bound = R.strings(*R.key(fl, "at_bound", w))
    unid = R.strings(*R.key(fl, "unidentified", w))
    for lst, key in ((at_bound, "at_bound"), (unid, "unidentified")):
        for i, n in enumerate(lst):
            if n not in names:
                R.fail(f"{w}.{key}[{i}]", f"names {n!r}, which is not a free parameter")
    cv, wc = R.key(fl, "correlated", w)
    if not isinstance(cv, list):
        R.fail(wc, f"must be a list of [name, name, r] triples, got {_kind(cv)}")
    corr = []
    for i, trip in enumerate(cv):
        if not isinstance(trip, list) or len(trip) != 3:
            R.fail(f"{wc}[{i}]", "must be a [name, name, r] triple")
        a, b = R.string(trip[0], f"{wc}[{i}][0]"), R.string(trip[1], f"{wc}[{i}][1]")
        r = R.number(trip[2], f"{wc}[{i}][2]")
        if abs(r) > 1.0 + 1e-12:
            R.fail(f"{wc}[{i}][2]", f"is a correlation and must be within [-1, 1], got {r!r}")
        corr.append((a, b, r))
    return FitFlags(at_bound=at_bound, correlated=corr,
                    not_converged=R.boolean(*R.key(fl, "not_converged", w)),
                    cancelled=R.boolean(*R.key(fl, "cancelled", w)), unidentified=unid,
                    notes=R.strings(*R.key(fl, "notes", w)),
                    poor_fit=R.string(*R.key(fl, "poor_fit", w, optional=True, default="")))


def read_record(d, name: str) -> dict:
    """FitResult fields (plus created, versions, data_paths, data_sha256, version) from a parsed record."""
    R = _Reader(name)
    if not isinstance(d, dict):
        R.fail("", f"not a kinetic fit record (the file holds a JSON {_kind(d)}, expected an object)")
    if d.get("schema") != SCHEMA:
        R.fail("", f"not a kinetic fit record (schema {d.get('schema')!r}, expected {SCHEMA!r})")
    ver = d.get("version")
    if not isinstance(ver, int) or isinstance(ver, bool) or ver < 1:
        R.fail("", f"record version must be a whole number >= 1, got {ver!r}")
    if ver > VERSION:
        R.fail("", f"record version {ver} is newer than this kinetic reads (up to {VERSION}); update kinetic")
    created = R.string(*R.key(d, "created", ""))
    versions = R.obj(*R.key(d, "versions", ""))
    for k, v in versions.items():
        R.string(v, f"versions.{k}")
    options = R.obj(*R.key(d, "options", ""))
    samples, ws = R.key(d, "samples", "")
    if not isinstance(samples, list):
        R.fail(ws, f"must be a list of samples, got {_kind(samples)}")
    if not samples:
        R.fail(ws, "is empty; expected one entry per sample")
    rows = [_sample(R, s, i) for i, s in enumerate(samples)]
    labels = [r[0] for r in rows]
    if len(set(labels)) != len(labels):
        R.fail("samples", "two samples share a label")
    models = [r[2] for r in rows]
    sizes = [r[5].kappa.size for r in rows]
    fit = R.obj(*R.key(d, "fit", ""))
    names = R.strings(*R.key(fit, "names", "fit"))
    if len(set(names)) != len(names):
        R.fail("fit.names", "lists a parameter twice")
    fv, wf = R.key(fit, "free", "fit")
    if not isinstance(fv, list):
        R.fail(wf, f"must be a list, got {_kind(fv)}")
    free = [_free(R, fd, j, models) for j, fd in enumerate(fv)]
    if [f.name for f in free] != names:
        R.fail("fit.names", "disagrees with the names in fit.free")
    p = len(names)

    def named(key, **kw):
        m, w = R.key(fit, key, "fit")
        R.obj(m, w)
        if set(m) != set(names):
            R.fail(w, f"must have one entry per free parameter ({', '.join(names)})")
        return {n: R.number(m[n], f"{w}.{n}", **kw) for n in names}

    values = named("values")
    for f in free:
        v = values[f.name]
        if f.log and v <= 0:
            R.fail(f"fit.values.{f.name}", f"must be > 0 for a log-scale parameter, got {v!r}")
        if not (f.lower - REL * abs(f.lower) <= v <= f.upper + REL * abs(f.upper)):
            R.fail(f"fit.values.{f.name}", f"{v!r} is outside its bounds [{f.lower!r}, {f.upper!r}]")
        for i in f.samples:
            mv = float(models[i].params[f.param])
            if not _close(mv, v):
                R.fail(f"fit.values.{f.name}", f"{v!r} disagrees with the stored model of sample {i} "
                                               f"({f.param} = {mv!r})")
    stderr = named("stderr", inf=True, lo=0.0)
    stderr_fitted = named("stderr_fitted", inf=True, lo=0.0)
    cov = R.matrix(fit.get("covariance_fitted"), "fit.covariance_fitted", p, inf=True, nan=True)
    corr = R.matrix(fit.get("correlation"), "fit.correlation", p, nan=True)
    _covariance(R, cov, stderr_fitted, corr, names)
    n_points = R.integer(*R.key(fit, "n_points", "fit"), lo=1)
    if n_points != sum(sizes):
        R.fail("fit.n_points", f"is {n_points} but the samples hold {sum(sizes)} points")
    n_free = R.integer(*R.key(fit, "n_free", "fit"), lo=1)
    if n_free != p:
        R.fail("fit.n_free", f"is {n_free} but fit.names lists {p} parameters")
    dof = R.integer(*R.key(fit, "dof", "fit"))
    if dof != n_points - n_free:
        R.fail("fit.dof", f"must be n_points - n_free = {n_points - n_free}, got {dof}")
    chi2 = R.number(*R.key(fit, "chi2", "fit"), lo=0.0)
    residuals = R.numbers(*R.key(fit, "residuals", "fit"), size=n_points)
    if not math.isclose(float(residuals @ residuals), chi2, rel_tol=1e-6, abs_tol=1e-12):
        R.fail("fit.chi2", "disagrees with the sum of squared fit.residuals")
    red = R.number(*R.key(fit, "reduced_chi2", "fit"), nan=True, lo=0.0)
    if dof > 0 and not math.isclose(red, chi2 / dof, rel_tol=1e-6, abs_tol=1e-300):
        R.fail("fit.reduced_chi2", f"must be chi2 / dof = {chi2 / dof!r}, got {red!r}")
    starts = R.numbers(*R.key(fit, "starts", "fit"), lo=0.0, inf=True)
    flags = _flags(R, R.key(fit, "flags", "fit")[0], names)
    sig = [r[6] for r in rows]
    cov_nat = cov * np.outer(*(2 * [np.array([values[f.name] * math.log(10.0) if f.log else 1.0 for f in free])]))
    with np.errstate(invalid="ignore"):
        rel = residuals * np.concatenate(sig)
    return dict(
        values=values, stderr=stderr, stderr_fitted=stderr_fitted, names=list(names),
        units={f.name: f.unit for f in free}, free=free, correlation=corr, covariance=cov_nat,
        covariance_fitted=cov, chi2=chi2, reduced_chi2=red,
        log_likelihood=R.number(*R.key(fit, "log_likelihood", "fit"), inf=True),
        aic=R.number(*R.key(fit, "aic", "fit"), inf=True), aicc=R.number(*R.key(fit, "aicc", "fit"), inf=True),
        bic=R.number(*R.key(fit, "bic", "fit"), inf=True),
        n_points=n_points, n_free=n_free, dof=dof, residuals=residuals, relative_residuals=rel,
        nfev=R.integer(*R.key(fit, "nfev", "fit"), lo=0),
        success=R.boolean(*R.key(fit, "success", "fit")), message=R.string(*R.key(fit, "message", "fit")),
        flags=flags, models=models, datasets=[r[1] for r in rows], labels=labels, targets=[r[5] for r in rows],
        sigma_relative=sig, scatter=R.number(*R.key(fit, "scatter", "fit"), lo=0.0),
        scatter_estimated=R.boolean(*R.key(fit, "scatter_estimated", "fit")), starts=list(starts),
        start_points=[], options=options,
        elapsed=R.number(*R.key(fit, "elapsed", "fit", optional=True, default=0.0), lo=0.0),
        created=created, versions=versions, data_paths=[r[3] for r in rows], data_sha256=[r[4] for r in rows],
        version=ver,
    )
