"""Fit records: a fit saved as versioned JSON, and read back exactly.

A record holds everything needed to see and reuse a fit without refitting:

* the data of every sample (inline arrays via ``Dataset.to_dict``, plus the
  file path and its SHA-256 when it came from a file),
* the fitted model of every sample (``LatticeModel.to_dict``), which rebuilds
  the same model exactly (floats are written with ``repr``, which JSON reads
  back to the same bits),
* fitted values, standard errors, covariance (fitted space) and correlation,
  flags, statistics and the fit options,
* package versions (kinetic, numpy, scipy, python) and a UTC timestamp.

Layout (version 1)::

    {"schema": "kinetic.fit-record", "version": 1, "created": "...Z",
     "versions": {...}, "options": {...},
     "samples": [{"label", "data", "data_path", "data_sha256", "model", "lattice_target"}],
     "fit": {"names", "free", "values", "stderr", "stderr_fitted", "covariance_fitted",
             "correlation", "chi2", "reduced_chi2", "log_likelihood", "aic", "aicc", "bic",
             "n_points", "n_free", "dof", "scatter", "scatter_estimated", "success",
             "message", "nfev", "starts", "flags"}}

Non-finite numbers (an undetermined parameter's inf stderr) are written as the
strings "inf", "-inf" and "nan", so the file is strict JSON.

Writes are atomic: the text goes to a temporary file in the same folder,
which is flushed, synced and renamed over the target (``os.replace``), so a
crash mid-write leaves any earlier record intact. Reading never uses pickle
or eval; every field is type-checked and a problem raises
:class:`~kinetic.errors.RecordError` with one line naming the file.
"""
from __future__ import annotations

import datetime as _dt
import hashlib
import json
import math
import os
import platform
import tempfile
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from .data import Dataset
from .errors import ParameterError, RecordError
from .fitting import FitFlags, FitResult, FreeParameter, LatticeTarget, _sample_index
from .lattice import LatticeModel

__all__ = ["SCHEMA", "VERSION", "Record", "save_record", "load_record", "record_dict", "record_from_dict",
           "atomic_write_text", "file_sha256"]

SCHEMA = "kinetic.fit-record"
VERSION = 1


# ---------------------------------------------------------------------------------
# small helpers
# ---------------------------------------------------------------------------------

def file_sha256(path) -> str:
    """Hex SHA-256 of a file's bytes."""
    h = hashlib.sha256()
    with open(path, "rb") as f:
        for chunk in iter(lambda: f.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()


def atomic_write_text(path, text: str) -> Path:
    """Write text to ``path`` atomically (temp file in the same folder, fsync, os.replace).

    Raises
    ------
    OSError
        The folder cannot be written; the target is left as it was.
    """
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    fd, tmp = tempfile.mkstemp(dir=folder, prefix=f".{path.name}.", suffix=".tmp")
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as f:
            f.write(text)
            f.flush()
            os.fsync(f.fileno())
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise
    return path


def _enc(v):
    """A float for JSON: finite as is, else "inf"/"-inf"/"nan"."""
    v = float(v)
    if math.isfinite(v):
        return v
    return "nan" if math.isnan(v) else ("inf" if v > 0 else "-inf")


def _enc_matrix(a):
    return [[_enc(v) for v in row] for row in np.asarray(a, dtype=float)]


def _enc_array(a):
    return None if a is None else [_enc(v) for v in np.asarray(a, dtype=float).ravel()]


def _versions() -> dict:
    import scipy

    from . import __version__

    return {"kinetic": __version__, "numpy": np.__version__, "scipy": scipy.__version__,
            "python": platform.python_version()}


# ---------------------------------------------------------------------------------
# writing
# ---------------------------------------------------------------------------------

def record_dict(result: FitResult, *, data_path=None) -> dict:
    """The JSON-safe record of a fit (what :func:`save_record` writes).

    Parameters
    ----------
    result : FitResult
    data_path : path or list of paths, optional
        File(s) the data came from, if not already known to the datasets
        (``Dataset.source``); their SHA-256 is computed now.
    """
    if not isinstance(result, FitResult):
        raise ParameterError(f"result must be a FitResult, got {type(result).__name__}")
    n = len(result.datasets)
    if data_path is None:
        paths = [None] * n
    elif isinstance(data_path, (str, os.PathLike)):
        paths = [data_path] + [None] * (n - 1)
    else:
        paths = list(data_path)
        if len(paths) != n:
            raise ParameterError(f"data_path must give one path per sample ({n}), got {len(paths)}")
    samples = []
    for i in range(n):
        ds = result.datasets[i]
        p = paths[i] if paths[i] is not None else ds.source
        sha = None
        if paths[i] is not None:
            try:
                sha = file_sha256(paths[i])
            except OSError as exc:
                raise RecordError(f"{os.fspath(paths[i])}: cannot read the data file for its checksum "
                                  f"({exc.strerror or exc})") from None
        elif ds.sha256 is not None:
            sha = ds.sha256
        t = result.targets[i]
        samples.append({
            "label": result.labels[i],
            "data": ds.to_dict(),
            "data_path": None if p is None else os.fspath(p),
            "data_sha256": sha,
            "model": result.models[i].to_dict(),
            "lattice_target": {
                "temperature": _enc_array(t.temperature), "kappa": _enc_array(t.kappa),
                "kappa_err": _enc_array(t.kappa_err), "measured_err": _enc_array(t.measured_err),
                "kappa_electronic": _enc_array(t.kappa_electronic),
                "kappa_electronic_err": _enc_array(t.kappa_electronic_err),
                "lorenz": _enc_array(t.lorenz), "kept": [bool(b) for b in t.kept], "notes": list(t.notes),
                "sigma_relative": _enc_array(result.sigma_relative[i]),
            },
        })
    fit = {
        "names": list(result.names),
        "free": [f.to_dict() for f in result.free],
        "values": {k: _enc(v) for k, v in result.values.items()},
        "stderr": {k: _enc(v) for k, v in result.stderr.items()},
        "stderr_fitted": {k: _enc(v) for k, v in result.stderr_fitted.items()},
        "covariance_fitted": _enc_matrix(result.covariance_fitted),
        "correlation": _enc_matrix(result.correlation),
        "chi2": _enc(result.chi2), "reduced_chi2": _enc(result.reduced_chi2),
        "log_likelihood": _enc(result.log_likelihood),
        "aic": _enc(result.aic), "aicc": _enc(result.aicc), "bic": _enc(result.bic),
        "n_points": int(result.n_points), "n_free": int(result.n_free), "dof": int(result.dof),
        "scatter": _enc(result.scatter), "scatter_estimated": bool(result.scatter_estimated),
        "success": bool(result.success), "message": str(result.message), "nfev": int(result.nfev),
        "starts": [_enc(c) for c in result.starts],
        "residuals": _enc_array(result.residuals),
        "flags": result.flags.to_dict(),
    }
    options = json.loads(json.dumps(result.options, default=str))
    return {
        "schema": SCHEMA,
        "version": VERSION,
        "created": _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%dT%H:%M:%S.%fZ"),
        "versions": _versions(),
        "options": options,
        "samples": samples,
        "fit": fit,
    }


def save_record(path, result: FitResult, *, data_path=None) -> Path:
    """Save a fit as a JSON record, atomically.

    Parameters
    ----------
    path : str or os.PathLike
        Target file (conventionally ``*.json``).
    result : FitResult
    data_path : path or list of paths, optional
        See :func:`record_dict`.

    Returns
    -------
    Path

    Raises
    ------
    RecordError
        The record cannot be written (one line naming the file).
    """
    d = record_dict(result, data_path=data_path)
    text = json.dumps(d, indent=1, allow_nan=False) + "\n"
    try:
        return atomic_write_text(path, text)
    except OSError as exc:
        raise RecordError(f"{os.fspath(path)}: cannot write the record ({exc.strerror or exc})") from None


# ---------------------------------------------------------------------------------
# reading
# ---------------------------------------------------------------------------------

@dataclass
class Record:
    """A fit read back from a record file.

    Attributes mirror :class:`~kinetic.fitting.FitResult` where they can
    (``values``, ``stderr``, ``stderr_fitted``, ``names``, ``free``,
    ``covariance_fitted``, ``correlation``, ``chi2``, ``reduced_chi2``, ``aic``,
    ``bic``, ``n_points``, ``n_free``, ``dof``, ``scatter_estimated``, ``flags``,
    ``models``, ``datasets``, ``labels``, ``targets``), so
    :func:`kinetic.fitting.predict_band` and the report functions accept a
    Record as well. Profile intervals and the bootstrap need the live fit:
    refit with :func:`kinetic.fitting.fit` for those.

    Extra attributes: ``path``, ``schema``, ``version``, ``created``,
    ``versions`` (package versions at save time), ``options``,
    ``data_paths``, ``data_sha256``.
    """

    path: str
    schema: str
    version: int
    created: str
    versions: dict
    options: dict
    labels: list
    models: list
    datasets: list
    data_paths: list
    data_sha256: list
    targets: list
    sigma_relative: list
    names: list
    free: list
    values: dict
    stderr: dict
    stderr_fitted: dict
    covariance_fitted: np.ndarray
    correlation: np.ndarray
    chi2: float
    reduced_chi2: float
    log_likelihood: float
    aic: float
    aicc: float
    bic: float
    n_points: int
    n_free: int
    dof: int
    scatter: float
    scatter_estimated: bool
    success: bool
    message: str
    nfev: int
    starts: list
    residuals: np.ndarray
    flags: FitFlags = field(default_factory=FitFlags)

    @property
    def model(self) -> LatticeModel:
        return self.models[0]

    @property
    def data(self) -> Dataset:
        return self.datasets[0]

    @property
    def units(self) -> dict:
        return {f.name: f.unit for f in self.free}

    @property
    def covariance(self) -> np.ndarray:
        vals = np.array([self.values[f.name] for f in self.free])
        d = np.array([v * math.log(10.0) if f.log else 1.0 for f, v in zip(self.free, vals)])
        return self.covariance_fitted * np.outer(d, d)

    @property
    def quantile_dof(self):
        return self.dof if self.scatter_estimated else None

    @property
    def relative_residuals(self) -> np.ndarray:
        return self.residuals * np.concatenate(self.sigma_relative)

    def quantile(self, level: float = 0.95) -> float:
        return FitResult.quantile(self, level)

    def interval(self, name: str, level: float = 0.95) -> tuple:
        return FitResult.interval(self, name, level)

    def _free(self, name):
        return FitResult._free(self, name)

    def kappa(self, temperature, sample=0):
        """Lattice conductivity [W/m/K] of the saved fitted model."""
        return self.models[_sample_index(self, sample)].kappa(temperature)

    def data_changed(self) -> list:
        """Labels of samples whose data file exists but no longer matches the saved SHA-256."""
        out = []
        for lab, p, sha in zip(self.labels, self.data_paths, self.data_sha256):
            if p and sha and os.path.isfile(p):
                try:
                    if file_sha256(p) != sha:
                        out.append(lab)
                except OSError:
                    out.append(lab)
        return out

    def summary(self) -> str:
        lines = [f"Fit record {self.path} (saved {self.created}, kinetic {self.versions.get('kinetic', '?')})"]
        w = max(12, max(len(n) for n in self.names))
        for n in self.names:
            lo, hi = self.interval(n)
            lines.append(f"  {n.ljust(w)}  {self.values[n]:11.4g}  {self.stderr[n]:10.3g}  "
                         f"[{lo:.4g}, {hi:.4g}] {self.units.get(n, '')}".rstrip())
        lines.append(f"  chi2 = {self.chi2:.4g}, reduced chi2 = {self.reduced_chi2:.3g}, "
                     f"AIC = {self.aic:.4g}, BIC = {self.bic:.4g}")
        for m in self.flags.messages():
            lines.append(f"  WARNING: {m}")
        return "\n".join(lines)


class _Reader:
    """Typed access to the parsed JSON, with errors that name the file and the key."""

    def __init__(self, name: str):
        self.name = name

    def fail(self, msg):
        raise RecordError(f"{self.name}: {msg}")

    def get(self, d, key, kinds, where):
        if not isinstance(d, dict):
            self.fail(f"{where} must be an object, got {type(d).__name__}")
        if key not in d:
            self.fail(f"missing field {where}.{key}" if where else f"missing field {key!r}")
        v = d[key]
        if not isinstance(v, kinds) or (isinstance(v, bool) and bool not in _as_tuple(kinds)):
            self.fail(f"field {where + '.' if where else ''}{key} has the wrong type "
                      f"({type(v).__name__})")
        return v

    def num(self, v, where):
        if isinstance(v, bool):
            self.fail(f"field {where} must be a number, got a boolean")
        if isinstance(v, (int, float)):
            return float(v)
        if isinstance(v, str) and v in ("inf", "-inf", "nan"):
            return float(v)
        self.fail(f"field {where} must be a number, got {type(v).__name__}")

    def nums(self, v, where, allow_none=False):
        if v is None and allow_none:
            return None
        if not isinstance(v, list):
            self.fail(f"field {where} must be a list of numbers, got {type(v).__name__}")
        return np.array([self.num(x, f"{where}[{i}]") for i, x in enumerate(v)], dtype=float)

    def matrix(self, v, where, n):
        if not isinstance(v, list) or len(v) != n:
            self.fail(f"field {where} must be a {n} x {n} list of lists")
        rows = [self.nums(r, f"{where}[{i}]") for i, r in enumerate(v)]
        if any(r.size != n for r in rows):
            self.fail(f"field {where} must be a {n} x {n} list of lists")
        return np.array(rows).reshape(n, n)


def _as_tuple(k):
    return k if isinstance(k, tuple) else (k,)


def record_from_dict(d, name: str = "record") -> Record:
    """Rebuild a :class:`Record` from a parsed record dict (see the module docstring).

    Raises
    ------
    RecordError
        Not a record, a newer version, or a field of the wrong type (naming ``name``).
    """
    R = _Reader(name)
    if not isinstance(d, dict):
        R.fail(f"not a kinetic fit record (the file holds a JSON {type(d).__name__}, expected an object)")
    if d.get("schema") != SCHEMA:
        R.fail(f"not a kinetic fit record (schema {d.get('schema')!r}, expected {SCHEMA!r})")
    ver = d.get("version")
    if not isinstance(ver, int) or isinstance(ver, bool) or ver < 1:
        R.fail(f"record version must be a whole number >= 1, got {ver!r}")
    if ver > VERSION:
        R.fail(f"record version {ver} is newer than this kinetic reads (up to {VERSION}); update kinetic")
    created = R.get(d, "created", str, "")
    versions = R.get(d, "versions", dict, "")
    options = R.get(d, "options", dict, "")
    samples = R.get(d, "samples", list, "")
    fit = R.get(d, "fit", dict, "")
    if not samples:
        R.fail("field samples is empty; expected one entry per sample")
    labels, models, datasets, paths, shas, targets, sig = [], [], [], [], [], [], []
    for i, s in enumerate(samples):
        w = f"samples[{i}]"
        labels.append(R.get(s, "label", str, w))
        try:
            datasets.append(Dataset.from_dict(R.get(s, "data", dict, w)))
        except RecordError as exc:
            R.fail(f"{w}.data: {exc}")
        mspec = R.get(s, "model", dict, w)
        try:
            models.append(LatticeModel.from_dict(mspec))
        except (ParameterError, TypeError, ValueError, KeyError, AttributeError) as exc:
            R.fail(f"{w}.model cannot be rebuilt: {exc}")
        p = s.get("data_path")
        h = s.get("data_sha256")
        if p is not None and not isinstance(p, str):
            R.fail(f"field {w}.data_path must be a string or null")
        if h is not None and not isinstance(h, str):
            R.fail(f"field {w}.data_sha256 must be a string or null")
        paths.append(p)
        shas.append(h)
        t = R.get(s, "lattice_target", dict, w)
        wt = f"{w}.lattice_target"
        kept = R.get(t, "kept", list, wt)
        if not all(isinstance(b, bool) for b in kept):
            R.fail(f"field {wt}.kept must be a list of booleans")
        notes = R.get(t, "notes", list, wt)
        if not all(isinstance(x, str) for x in notes):
            R.fail(f"field {wt}.notes must be a list of strings")
        targets.append(LatticeTarget(
            temperature=R.nums(t.get("temperature"), f"{wt}.temperature"),
            kappa=R.nums(t.get("kappa"), f"{wt}.kappa"),
            kappa_err=R.nums(t.get("kappa_err"), f"{wt}.kappa_err", True),
            measured_err=R.nums(t.get("measured_err"), f"{wt}.measured_err", True),
            kappa_electronic=R.nums(t.get("kappa_electronic"), f"{wt}.kappa_electronic", True),
            kappa_electronic_err=R.nums(t.get("kappa_electronic_err"), f"{wt}.kappa_electronic_err", True),
            lorenz=R.nums(t.get("lorenz"), f"{wt}.lorenz", True),
            kept=np.array(kept, dtype=bool), notes=tuple(notes)))
        sig.append(R.nums(t.get("sigma_relative"), f"{wt}.sigma_relative"))
    names = R.get(fit, "names", list, "fit")
    if not all(isinstance(n, str) for n in names):
        R.fail("field fit.names must be a list of strings")
    free_raw = R.get(fit, "free", list, "fit")
    free = []
    for j, fd in enumerate(free_raw):
        try:
            f = FreeParameter.from_dict(fd)
        except (KeyError, TypeError, ValueError) as exc:
            R.fail(f"field fit.free[{j}] is malformed ({exc})")
        if any(k >= len(models) or k < 0 for k in f.samples):
            R.fail(f"field fit.free[{j}].samples names a sample that is not in the record")
        free.append(f)
    if [f.name for f in free] != names:
        R.fail("fields fit.names and fit.free disagree")
    p = len(names)

    def named(key):
        m = R.get(fit, key, dict, "fit")
        if set(m) != set(names):
            R.fail(f"field fit.{key} must have one entry per free parameter")
        return {n: R.num(m[n], f"fit.{key}.{n}") for n in names}

    flags_d = R.get(fit, "flags", dict, "fit")
    try:
        flags = FitFlags.from_dict(flags_d)
    except (TypeError, ValueError) as exc:
        R.fail(f"field fit.flags is malformed ({exc})")

    def integer(key):
        v = R.get(fit, key, int, "fit")
        return int(v)

    starts = R.nums(R.get(fit, "starts", list, "fit"), "fit.starts")
    rec = Record(
        path=name, schema=SCHEMA, version=ver, created=created, versions=versions, options=options,
        labels=labels, models=models, datasets=datasets, data_paths=paths, data_sha256=shas,
        targets=targets, sigma_relative=sig, names=list(names), free=free,
        values=named("values"), stderr=named("stderr"), stderr_fitted=named("stderr_fitted"),
        covariance_fitted=R.matrix(fit.get("covariance_fitted"), "fit.covariance_fitted", p),
        correlation=R.matrix(fit.get("correlation"), "fit.correlation", p),
        chi2=R.num(fit.get("chi2"), "fit.chi2"), reduced_chi2=R.num(fit.get("reduced_chi2"), "fit.reduced_chi2"),
        log_likelihood=R.num(fit.get("log_likelihood"), "fit.log_likelihood"),
        aic=R.num(fit.get("aic"), "fit.aic"), aicc=R.num(fit.get("aicc"), "fit.aicc"),
        bic=R.num(fit.get("bic"), "fit.bic"),
        n_points=integer("n_points"), n_free=integer("n_free"), dof=integer("dof"),
        scatter=R.num(fit.get("scatter"), "fit.scatter"),
        scatter_estimated=R.get(fit, "scatter_estimated", bool, "fit"),
        success=R.get(fit, "success", bool, "fit"), message=R.get(fit, "message", str, "fit"),
        nfev=integer("nfev"), starts=list(starts),
        residuals=R.nums(fit.get("residuals"), "fit.residuals"), flags=flags,
    )
    if len(rec.labels) != len(set(rec.labels)):
        R.fail("two samples share a label")
    if len(names) != rec.n_free:
        R.fail("field fit.n_free disagrees with fit.names")
    return rec


def load_record(path) -> Record:
    """Read a fit record written by :func:`save_record`.

    Parameters
    ----------
    path : str or os.PathLike

    Returns
    -------
    Record
        With the fitted models rebuilt exactly (their kappa is identical to the bit).

    Raises
    ------
    RecordError
        Missing or unreadable file, damaged or truncated JSON, not a record,
        a newer schema version, or wrong field types; one line naming the file.
    """
    name = os.fspath(path)
    try:
        raw = Path(path).read_bytes()
    except FileNotFoundError:
        raise RecordError(f"{name}: no such file; expected a fit record (.json)") from None
    except IsADirectoryError:
        raise RecordError(f"{name}: is a folder; expected a fit record file") from None
    except OSError as exc:
        raise RecordError(f"{name}: cannot be read ({exc.strerror or exc})") from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        raise RecordError(f"{name}: not a text file (invalid UTF-8); expected a JSON fit record") from None
    if not text.strip():
        raise RecordError(f"{name}: the file is empty; expected a JSON fit record")

    def no_constants(c):
        raise ValueError(f"non-standard JSON constant {c}")

    try:
        d = json.loads(text, parse_constant=no_constants)
    except json.JSONDecodeError as exc:
        raise RecordError(f"{name}: damaged or truncated record (invalid JSON at line {exc.lineno}, "
                          f"column {exc.colno}: {exc.msg})") from None
    except (ValueError, RecursionError) as exc:
        raise RecordError(f"{name}: damaged record ({exc})") from None
    return record_from_dict(d, name)
