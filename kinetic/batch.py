"""Fit many samples one by one and gather one summary table (a sample series).

:func:`fit_many` loads each file, fits the same starting model to it (the
preset's default model unless ``model=`` is given) and returns a
:class:`BatchResult`: one row per sample with the fitted values, their
standard errors ("not determined" where the data do not fix a parameter),
the lattice conductivity k_L at chosen temperatures, and the fit's flags and
notes. A sample that cannot be read or fitted becomes a row with its
one-line error; the batch goes on.

Where it runs: one process (``jobs=1``), the local cores
(:class:`concurrent.futures.ProcessPoolExecutor`, ``jobs=N``, default all
cores), or a Dask cluster given its scheduler address (``scheduler=``; needs
the optional ``dask`` extra: ``pip install "kinetic-conductivity[dask]"``).
The same function fits one sample everywhere, so the rows do not depend on
where they were computed.

>>> from kinetic.batch import BatchResult
>>> r = BatchResult(rows=[{"file": "a.csv", "label": "a", "status": "error",
...                        "error": "a.csv: no such file", "values": {}, "stderr": {},
...                        "kappa_lattice": {}, "flags": [], "notes": []}],
...                 free=[], units={}, at=[300.0], material="Si")
>>> r.n_failed
1
"""
from __future__ import annotations

import csv
import io
import json
import math
import os
import sys
from concurrent.futures import ProcessPoolExecutor, as_completed
from dataclasses import dataclass, field

import numpy as np

from ._io import atomic_write
from ._progress import TextBar
from ._validate import callable_or_none, integer, temperatures
from .errors import KineticError, ParameterError

__all__ = ["TABLE_SUFFIXES", "BatchResult", "fit_many"]

#: File name endings read as data tables when a folder is given.
TABLE_SUFFIXES = (".csv", ".tsv", ".txt", ".dat")

SCHEMA = "kinetic.batch-summary"
SCHEMA_VERSION = 1
NOT_DETERMINED = "not determined"


@dataclass
class BatchResult:
    """The rows of a batch of fits, in the order the files were given.

    Attributes
    ----------
    rows : list of dict
        One per sample: ``file``, ``label``, ``status`` ("ok" or "error"),
        ``error`` (one line, or None), ``n_points``, ``chi2_reduced``,
        ``values`` {parameter: value}, ``stderr`` {parameter: standard error,
        or None where not determined}, ``kappa_lattice`` {"T [K]": k_L of the
        fitted model [W m^-1 K^-1]}, ``flags`` (list of str: warnings about
        the fit) and ``notes`` (list of str: plain remarks).
    free : list of str
        The fitted parameters (the columns of ``values``).
    units : dict
        Parameter -> unit.
    at : list of float
        Temperatures of the k_L columns [K].
    material : str
    """

    rows: list
    free: list
    units: dict
    at: list
    material: str
    options: dict = field(default_factory=dict)

    @property
    def n_failed(self) -> int:
        return sum(r["status"] != "ok" for r in self.rows)

    def to_dict(self) -> dict:
        return {"schema": SCHEMA, "schema_version": SCHEMA_VERSION, "material": self.material,
                "free": list(self.free), "units": dict(self.units), "at": [float(t) for t in self.at],
                "options": _plain(self.options), "rows": _plain(self.rows)}

    def columns(self) -> list:
        """Header of the flat table (CSV)."""
        cols = ["file", "label", "status", "error", "n_points", "chi2_reduced"]
        for n in self.free:
            u = self.units.get(n, "")
            cols += [f"{n} [{u}]" if u else n, f"{n} stderr"]
        cols += [f"k_L({_tkey(t)}) [W/(m K)]" for t in self.at]
        return cols + ["flags", "notes"]

    def flat_rows(self) -> list:
        """One list of strings per row, in :meth:`columns` order ("not determined" for missing errors)."""
        out = []
        for r in self.rows:
            line = [r["file"], r["label"], r["status"], r.get("error") or "", _num(r.get("n_points")),
                    _num(r.get("chi2_reduced"))]
            for n in self.free:
                v = r["values"].get(n)
                s = r["stderr"].get(n)
                line += [_num(v), "" if v is None else (_num(s) if s is not None else NOT_DETERMINED)]
            line += [_num(r["kappa_lattice"].get(_tkey(t))) for t in self.at]
            line += ["; ".join(r.get("flags") or []), "; ".join(r.get("notes") or [])]
            out.append(line)
        return out

    def to_csv(self, path) -> None:
        """Write the table as CSV (atomically: a temporary file, fsync, rename)."""
        buf = io.StringIO()
        w = csv.writer(buf, lineterminator="\n")
        w.writerow(self.columns())
        w.writerows(self.flat_rows())
        atomic_write(path, buf.getvalue())

    def to_json(self, path) -> None:
        """Write the table as JSON (atomically), schema ``kinetic.batch-summary`` version 1."""
        atomic_write(path, json.dumps(self.to_dict(), indent=1, allow_nan=False) + "\n")

    def table(self) -> str:
        """A short plain-text table for a terminal: label, status, values, k_L."""
        head = ["label", "status"] + list(self.free) + [f"k_L({_tkey(t)})" for t in self.at]
        lines = [head]
        for r in self.rows:
            if r["status"] != "ok":
                lines.append([r["label"], "error: " + (r.get("error") or "")])
                continue
            cells = [r["label"], "ok"]
            for n in self.free:
                v, s = r["values"].get(n), r["stderr"].get(n)
                cells.append(f"{v:.4g} ± {s:.2g}" if v is not None and s is not None else
                             (f"{v:.4g} (error {NOT_DETERMINED})" if v is not None else ""))
            cells += [_num(r["kappa_lattice"].get(_tkey(t)), ".4g") for t in self.at]
            lines.append(cells)
        widths = [max(len(str(row[i])) for row in lines if i < len(row) and len(row) > 2)
                  for i in range(len(head))]
        text = []
        for row in lines:
            if len(row) == 2 and row[1].startswith("error"):
                text.append(f"{row[0]:<{widths[0]}}  {row[1]}")
            else:
                text.append("  ".join(f"{c!s:<{w}}" for c, w in zip(row, widths)).rstrip())
        return "\n".join(text)


def _tkey(t) -> str:
    return f"{float(t):g} K"


def _num(v, fmt: str = ".10g") -> str:
    if v is None:
        return ""
    if isinstance(v, (int, np.integer)):
        return str(int(v))
    return format(float(v), fmt)


def _plain(obj):
    """JSON-ready copy: numpy scalars to Python, non-finite floats to None."""
    if isinstance(obj, dict):
        return {str(k): _plain(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_plain(v) for v in obj]
    if isinstance(obj, (bool, np.bool_)):
        return bool(obj)
    if isinstance(obj, (int, np.integer)):
        return int(obj)
    if isinstance(obj, (float, np.floating)):
        return float(obj) if math.isfinite(obj) else None
    return obj


# ------------------------------------------------------------------------------
# one sample
# ------------------------------------------------------------------------------

def _one_line(exc: BaseException) -> str:
    if isinstance(exc, OSError) and not isinstance(exc, KineticError) and exc.filename:
        return f"{exc.filename}: {exc.strerror or exc}"
    text = str(exc).strip().splitlines()
    msg = text[0] if text else ""
    if isinstance(exc, KineticError):
        return msg or type(exc).__name__
    return f"{type(exc).__name__}: {msg}" if msg else type(exc).__name__


def _error_row(path, label, message) -> dict:
    return {"file": str(path), "label": label, "status": "error", "error": message, "n_points": None,
            "chi2_reduced": None, "values": {}, "stderr": {}, "kappa_lattice": {}, "flags": [], "notes": []}


def _determined(res, name) -> bool:
    flags = getattr(res, "flags", None)
    if flags is not None and (name in getattr(flags, "at_bound", []) or name in getattr(flags, "unidentified", [])):
        return False
    s = res.stderr.get(name)
    return s is not None and math.isfinite(s)


def fit_one(path, model, free, at, fit_options, load_options, tmin=None, tmax=None) -> dict:
    """Load one file and fit ``model``'s ``free`` parameters to it; a row (never raises for a bad sample).

    The function every worker runs (local process, Dask worker or this process).
    """
    import stat

    from .data import load_data
    from .fitting import fit

    label = os.path.splitext(os.path.basename(str(path)))[0]
    try:
        try:
            st = os.stat(path)
        except FileNotFoundError:
            hint = "no file matches this pattern" if any(c in str(path) for c in "*?[") else "no such file"
            return _error_row(path, label, f"{path}: {hint}")
        if not stat.S_ISREG(st.st_mode):
            return _error_row(path, label, f"{path}: not a regular file")
        ds = load_data(path, **load_options)
        label = getattr(ds, "label", None) or label
        if tmin is not None or tmax is not None:
            ds = ds.subset(tmin, tmax)
        res = fit(model, ds, free, **fit_options)
        values = {n: float(res.values[n]) for n in free}
        stderr = {n: (float(res.stderr[n]) if _determined(res, n) else None) for n in free}
        k = np.asarray(res.model.kappa(np.asarray(at, dtype=float)), dtype=float)
        flags = getattr(res, "flags", None)
        messages = list(flags.messages()) if flags is not None and hasattr(flags, "messages") else []
        notes = [str(n) for n in (getattr(flags, "notes", None) or [])]
        notes += [str(n) for n in (getattr(res, "notes", None) or []) if str(n) not in notes]
        chi2r = getattr(res, "chi2_reduced", None)
        if chi2r is None:
            chi2r = getattr(res, "reduced_chi2", None)
        row = {"file": str(path), "label": label, "status": "ok", "error": None,
               "n_points": len(ds.temperature),
               "chi2_reduced": None if chi2r is None or not math.isfinite(chi2r) else float(chi2r),
               "values": values, "stderr": stderr,
               "kappa_lattice": {_tkey(t): (float(v) if math.isfinite(v) else None) for t, v in zip(at, k)},
               "flags": messages, "notes": notes}
        json.dumps(row, allow_nan=False)  # a row that cannot be written is an error row, not a crash later
        return row
    except (KineticError, OSError, ValueError, ArithmeticError, TypeError, IndexError, KeyError) as exc:
        return _error_row(path, label, _one_line(exc))


def _fit_task(task):
    return fit_one(*task)


# ------------------------------------------------------------------------------
# many samples
# ------------------------------------------------------------------------------

class _Bar(TextBar):
    """``fit: 3/10 [#########.....]`` on stderr."""

    def __init__(self, total, stream=None, width=30):
        super().__init__(stream, width)
        self.total = total

    def __call__(self, done, total, row):
        failed = "" if row is None or row["status"] == "ok" else f"  (failed: {row['label']})"
        self.show(done, total, "fit: ", failed)


def _progress_callback(progress, total):
    if progress is None:
        try:
            progress = sys.stderr.isatty()
        except (AttributeError, ValueError):
            progress = False
    if progress is True:
        return _Bar(total)
    if progress is False:
        return None
    return callable_or_none("progress", progress)


def _start_model(material, mechanisms=None, split_branches=None):
    from .defaults import default_model

    return default_model(material, mechanisms=mechanisms, split_branches=split_branches)


def _start_free(model):
    from .defaults import default_free

    return list(default_free(model))


def fit_many(paths, *, material, free=None, jobs=None, scheduler=None, at=(300.0,), progress=None,
             model=None, fit_options=None, tmin=None, tmax=None, **load_options) -> BatchResult:
    """Fit each file on its own and gather one table.

    Parameters
    ----------
    paths : iterable of str or os.PathLike
        Data files, in row order (expand folders and globs first, e.g. with
        ``sorted(glob.glob(...))``).
    material : str
        Preset name: the starting model is its default model.
    free : list of str, optional
        Fitted parameters (default: the default free set of the model).
    jobs : int, optional
        Local processes (default: all cores, at most one per file); 1 fits in
        this process (the choice inside a Jupyter kernel, whose threads do not
        mix well with forked processes).
    scheduler : str or distributed.Client, optional
        Address of a Dask scheduler (``"tcp://host:8786"``), or a connected
        client: the fits run on that cluster.
    at : sequence of float
        Temperatures of the k_L columns [K] (default 300 K).
    progress : bool, callable or None
        A bar on stderr (True), none (False), when stderr is a terminal
        (None), or ``progress(done, total, row)``.
    model : LatticeModel, optional
        Start from this model instead of the preset's default model.
    fit_options : dict, optional
        Passed to :func:`kinetic.fitting.fit` (n_starts, seed, lorenz_method,
        weights, bounds...).
    tmin, tmax : float, optional
        Use data in [tmin, tmax] only [K].
    **load_options
        Passed to :func:`kinetic.data.load_data` (kind, ignore_columns,
        density, heat_capacity, relative_density, porosity_correction...).

    Returns
    -------
    BatchResult
        Rows in the order of ``paths``; failed samples are rows with an error.

    Raises
    ------
    ParameterError
        Bad options (unknown material or parameter, bad temperatures, jobs
        < 1), or the ``dask`` extra missing when ``scheduler`` is given.
    """
    paths = [os.fspath(p) for p in paths]
    if not paths:
        raise ParameterError("paths: no data files given")
    if jobs is not None:
        jobs = integer("jobs", jobs, lo=1)
    at_K = np.atleast_1d(temperatures(at, "at"))
    if model is None:
        model = _start_model(material)
    free = list(free) if free is not None else _start_free(model)
    unknown = [n for n in free if n not in model.params]
    if unknown:
        raise ParameterError(f"free: unknown parameter {unknown[0]!r}; valid: {', '.join(model.params)}")
    fit_options = dict(fit_options or {})
    fit_options.setdefault("progress", None)
    if fit_options["progress"] is not None:
        raise ParameterError("fit_options: progress is per batch here (use progress=)")
    at_list = [float(t) for t in at_K]
    tasks = [(p, model, free, at_list, fit_options, dict(load_options), tmin, tmax) for p in paths]
    bar = _progress_callback(progress, len(tasks))
    rows = [None] * len(tasks)
    try:
        if scheduler is not None:
            _run_dask(scheduler, tasks, rows, bar)
        elif (jobs or os.cpu_count() or 1) == 1 or len(tasks) == 1:
            for i, t in enumerate(tasks):
                rows[i] = _fit_task(t)
                _report(bar, i, rows, len(tasks))
        else:
            n = min(jobs or os.cpu_count() or 1, len(tasks))
            pool = ProcessPoolExecutor(max_workers=n)
            try:
                futs = {pool.submit(_fit_task, t): i for i, t in enumerate(tasks)}
                for f in as_completed(futs):
                    i = futs[f]
                    rows[i] = _result_or_error_row(f, tasks[i])
                    _report(bar, i, rows, len(tasks))
            except BaseException:
                # Ctrl-C or a raising callback: drop the queued fits instead of waiting for them
                pool.shutdown(wait=False, cancel_futures=True)
                raise
            pool.shutdown()
    finally:
        if isinstance(bar, _Bar):
            bar.close()
    units = {n: _unit_of(model, n) for n in free}
    options = {"tmin": tmin, "tmax": tmax, "load": dict(load_options),
               "fit": {k: v for k, v in fit_options.items() if k != "progress"}}
    return BatchResult(rows=rows, free=free, units=units, at=at_list, material=str(material), options=options)


def _unit_of(model, name) -> str:
    try:
        info = model.parameter_info
        info = info() if callable(info) else info
        return str(info[name].unit or "")
    except (AttributeError, KeyError, TypeError):  # no metadata for it: leave the unit blank
        return ""


def _report(bar, i, rows, total):
    if bar is None:
        return
    done = sum(r is not None for r in rows)
    try:
        bar(done, total, rows[i])
    except Exception as exc:  # noqa: BLE001 - a user callback that raises must say so, not lose the batch
        raise ParameterError(f"progress callback raised {type(exc).__name__}: {exc}") from None


def _result_or_error_row(future, task) -> dict:
    try:
        return future.result()
    except Exception as exc:  # noqa: BLE001 - a worker that died (killed, out of memory) or a row that cannot travel back
        path = task[0]
        return _error_row(path, os.path.splitext(os.path.basename(str(path)))[0], _one_line(exc))


def _run_dask(scheduler, tasks, rows, bar):
    try:
        from distributed import Client
        from distributed import as_completed as dask_completed
    except ImportError:
        raise ParameterError("--dask-scheduler needs the optional Dask extra: "
                             "pip install \"kinetic-conductivity[dask]\"") from None
    try:
        client = Client(scheduler, timeout="10s") if isinstance(scheduler, str) else scheduler
    except (OSError, TimeoutError, ValueError) as exc:
        raise ParameterError(f"Dask scheduler {scheduler}: cannot connect ({_one_line(exc)})") from None
    own = isinstance(scheduler, str)
    try:
        futs = client.map(_fit_task, tasks, pure=False)
        index = {f.key: i for i, f in enumerate(futs)}
        for f in dask_completed(futs):
            i = index[f.key]
            rows[i] = _result_or_error_row(f, tasks[i])
            _report(bar, i, rows, len(tasks))
    finally:
        if own:
            client.close()
