"""Fit records: a fit saved as versioned JSON, read back exactly and checked against a schema.

A record holds everything needed to see and reuse a fit without refitting:

* the data of every sample (inline arrays via ``Dataset.to_dict``, plus the
  file path and its SHA-256 when it came from a file),
* the fitted model of every sample (``LatticeModel.to_dict``), which rebuilds
  the same model exactly (floats are written with ``repr``, which JSON reads
  back to the same bits),
* fitted values, standard errors, covariance (fitted space) and correlation,
  flags, statistics and the fit options,
* package versions (kinetic, numpy, scipy, python) and a UTC timestamp.

A loaded record is a :class:`~kinetic.fitting.FitResult` (class
:class:`Record`, a FitResult whose ``provenance`` is set): it is summarised,
reported, banded and saved again like a fresh fit. Profile intervals and the
bootstrap need the live fit problem and ask for a refit.

Layout (version 1)::

    {"schema": "kinetic.fit-record", "version": 1, "created": "...Z",
     "versions": {...}, "options": {...},
     "samples": [{"label", "data", "data_path", "data_sha256", "model", "lattice_target"}],
     "fit": {"names", "free", "values", "stderr", "stderr_fitted", "covariance_fitted",
             "correlation", "chi2", "reduced_chi2", "log_likelihood", "aic", "aicc", "bic",
             "n_points", "n_free", "dof", "scatter", "scatter_estimated", "success",
             "message", "nfev", "starts", "residuals", "flags"[, "elapsed"]}}

Non-finite numbers (an undetermined parameter's inf stderr) are written as the
strings "inf", "-inf" and "nan", so the file is strict JSON; those strings are
accepted only in the fields that may hold them.

Checks on load (each failure is one :class:`~kinetic.errors.RecordError`
line naming the file and the field's JSON path, e.g. ``fit.free[0].log``):
types (booleans must be JSON booleans, numbers JSON numbers, never strings),
lengths (every per-point array matches its sample's points), signs (chi2,
standard errors, scatter >= 0; n_points >= 1; temperatures, kappa and the
point weights > 0), lower <= upper for every free parameter, a symmetric
positive semi-definite covariance, correlations within [-1, 1] with a unit
diagonal, dof = n_points - n_free, and fitted values equal to the stored
models' parameter values (so the band cannot shift silently). A UTF-8
byte-order mark is accepted.

Writes go through :func:`kinetic._io.atomic_write` (temporary file in the
same folder, fsync, rename; the user's umask; stale temporary files of
interrupted saves removed). Reading never uses pickle or eval.
"""
from __future__ import annotations

import datetime as _dt
import hashlib
import json
import math
import os
import platform
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import scipy

from ._io import AtomicWriteError, atomic_write
from ._record_schema import SCHEMA, VERSION, read_record
from ._version import __version__
from .errors import ParameterError, RecordError
from .fitting import FitResult

__all__ = [
    "SCHEMA",
    "VERSION",
    "Provenance",
    "Record",
    "atomic_write_text",
    "file_sha256",
    "load_record",
    "record_dict",
    "record_from_dict",
    "record_json",
    "save_record",
]



def _package_version() -> str:
    return __version__


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
    """Write text atomically; the old name of :func:`kinetic._io.atomic_write` (use that)."""
    return atomic_write(path, text)


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
    return {"kinetic": _package_version(), "numpy": np.__version__, "scipy": scipy.__version__,
            "python": platform.python_version()}


# ---------------------------------------------------------------------------------
# provenance and the record type
# ---------------------------------------------------------------------------------

@dataclass(frozen=True)
class Provenance:
    """Where a loaded fit came from.

    Attributes
    ----------
    path : str
        The record file (or the name given to :func:`record_from_dict`).
    sha256 : str or None
        SHA-256 of the record file's bytes as read.
    created : str
        UTC time the record was saved (ISO 8601, ends in "Z").
    versions : dict
        Package versions at save time (kinetic, numpy, scipy, python).
    data_paths : list of str or None
        Data file of each sample, where known.
    data_sha256 : list of str or None
        SHA-256 of each data file at fit time, where known.
    schema : str
    version : int
    """

    path: str
    sha256: str | None
    created: str
    versions: dict
    data_paths: list
    data_sha256: list
    schema: str = SCHEMA
    version: int = VERSION

    def data_changed(self, labels) -> list:
        """Labels of samples whose data file exists but no longer matches the saved SHA-256."""
        out = []
        for lab, p, sha in zip(labels, self.data_paths, self.data_sha256):
            if p and sha and os.path.isfile(p):
                try:
                    if file_sha256(p) != sha:
                        out.append(lab)
                except OSError:
                    out.append(lab)
        return out

    def describe(self) -> str:
        """One line: the record file, when it was saved, with which kinetic."""
        return (f"loaded from the record {self.path} (saved {self.created}, "
                f"kinetic {self.versions.get('kinetic', '?')})")

    def to_dict(self) -> dict:
        return {"path": self.path, "sha256": self.sha256, "created": self.created, "versions": dict(self.versions),
                "data_paths": list(self.data_paths), "data_sha256": list(self.data_sha256),
                "schema": self.schema, "version": self.version}


class Record(FitResult):
    """A fit read back from a record: a :class:`~kinetic.fitting.FitResult` with ``provenance`` set.

    It has every field and method of a FitResult (nothing restated); the
    properties below are shortcuts to ``provenance``.
    """

    @property
    def path(self) -> str:
        return self.provenance.path

    @property
    def created(self) -> str:
        return self.provenance.created

    @property
    def versions(self) -> dict:
        return self.provenance.versions

    @property
    def data_paths(self) -> list:
        return self.provenance.data_paths

    @property
    def data_sha256(self) -> list:
        return self.provenance.data_sha256

    def data_changed(self) -> list:
        """Labels of samples whose data file changed since the fit (see :meth:`Provenance.data_changed`)."""
        return self.provenance.data_changed(self.labels)


# ---------------------------------------------------------------------------------
# writing
# ---------------------------------------------------------------------------------

def record_dict(result: FitResult, *, data_path=None) -> dict:
    """The JSON-safe record of a fit (what :func:`save_record` writes).

    Parameters
    ----------
    result : FitResult
        A fit made now, or one loaded from a record (saved again with its
        data paths and checksums).
    data_path : path or list of paths, optional
        File(s) the data came from, if not already known to the datasets
        (``Dataset.source``) or the result's provenance; their SHA-256 is
        computed now.
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
    prov = result.provenance
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
        if p is None and sha is None and prov is not None:
            p, sha = prov.data_paths[i], prov.data_sha256[i]
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
        "flags": {**result.flags.to_dict(),
                  "correlated": [[a, b, _enc(r)] for a, b, r in result.flags.correlated]},
        "elapsed": _enc(result.elapsed),
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


def record_json(result: FitResult, *, data_path=None) -> str:
    """The text :func:`save_record` writes (strict JSON, one trailing newline)."""
    return json.dumps(record_dict(result, data_path=data_path), indent=1, allow_nan=False) + "\n"


def save_record(path, result: FitResult, *, data_path=None) -> Path:
    """Save a fit as a JSON record, atomically.

    Save only a completed fit: :func:`kinetic.fitting.fit` either returns a
    complete result or raises, so "fit, then save" never writes a record of
    a fit that failed.

    Parameters
    ----------
    path : str or os.PathLike
        Target file (conventionally ``*.json``).
    result : FitResult
        A fit, or a loaded record (saved again).
    data_path : path or list of paths, optional
        See :func:`record_dict`.

    Returns
    -------
    Path

    Raises
    ------
    RecordError
        The record cannot be written (one line naming the file; the
        original file, if any, is unchanged).
    """
    text = record_json(result, data_path=data_path)
    try:
        return atomic_write(path, text)
    except AtomicWriteError as exc:
        raise RecordError(f"cannot save the record {exc}") from None


# ---------------------------------------------------------------------------------
# reading
# ---------------------------------------------------------------------------------

def load_record(path) -> Record:
    """Read and check a fit record written by :func:`save_record`.

    Parameters
    ----------
    path : str or os.PathLike

    Returns
    -------
    Record
        A FitResult with ``provenance``; the fitted models rebuilt exactly
        (their kappa is identical to the bit).

    Raises
    ------
    RecordError
        Missing or unreadable file, damaged or truncated JSON, not a record,
        a newer schema version, or a field that fails the checks (see the
        module docstring); one line naming the file and the field.
    """
    name = os.fspath(path)
    p = Path(path)
    try:
        if p.exists() and not p.is_file() and not p.is_dir():
            raise RecordError(f"{name}: not a regular file (a pipe or device); expected a fit record file")
        raw = p.read_bytes()
    except FileNotFoundError:
        raise RecordError(f"{name}: no such file; expected a fit record (.json)") from None
    except IsADirectoryError:
        raise RecordError(f"{name}: is a folder; expected a fit record file") from None
    except OSError as exc:
        raise RecordError(f"{name}: cannot be read ({exc.strerror or exc})") from None
    sha = hashlib.sha256(raw).hexdigest()
    try:
        text = raw.decode("utf-8-sig")  # a UTF-8 byte-order mark is accepted
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
    return record_from_dict(d, name, sha256=sha)


def record_from_dict(d, name: str = "record", *, sha256: str | None = None) -> Record:
    """Rebuild and check a :class:`Record` from a parsed record dict (see the module docstring).

    Raises
    ------
    RecordError
        One line naming ``name`` and the failing field's JSON path.
    """
    parts = read_record(d, name)
    prov = Provenance(path=name, sha256=sha256, created=parts.pop("created"), versions=parts.pop("versions"),
                      data_paths=parts.pop("data_paths"), data_sha256=parts.pop("data_sha256"),
                      version=parts.pop("version"))
    return Record(provenance=prov, problem=None, x_fitted=None, **parts)

