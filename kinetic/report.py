"""Report figures and plain-text tables of a fit (the only engine module importing matplotlib).

:func:`report_figure` draws, for each sample, the measured total kappa (with
error bars), the lattice part that was fitted (with its errors), the fitted
lattice curve with its confidence band, the subtracted electronic part, the
model total (lattice fit + electronic part) and, when the material is
known, the Cahill-Watson-Pohl minimum conductivity; a lower panel shows the
relative residuals with the +-1 sigma weights. It builds a
``matplotlib.figure.Figure`` directly (no pyplot, no global state), so it
works on any backend, including Agg on a headless machine.

:func:`summary_table` is the same content as text.
"""
from __future__ import annotations

import io
import os
from pathlib import Path

import numpy as np

from . import materials
from ._io import atomic_write
from .errors import ParameterError, RecordError
from .estimates import cahill_minimum_for
from .fitting import check_level, predict_band, sample_index
from .fitting.rows import format_number
from .records import record_json

__all__ = ["FIGURE_FORMATS", "figure_bytes", "report_figure", "save_outputs", "summary_table"]

#: File extensions report_figure can write.
FIGURE_FORMATS = ("png", "svg", "pdf")


def _material(result, material):
    """The Material for the Cahill floor: given, by name, or from the model (None if unknown)."""
    if material is None:
        name = getattr(result.models[0], "material", None)
        if not name:
            return None
        try:
            return materials.get(name)
        except ParameterError:
            return None
    if isinstance(material, str):
        return materials.get(material)
    return material


def report_figure(result, path=None, *, material=None, level: float = 0.95, samples=None, dpi: int = 150):
    """Figure of a fit: data, fit with band, electronic part, minimum conductivity, residuals.

    Parameters
    ----------
    result : FitResult
        A fit (single or joint), made now or loaded from a record. Draw the
        report of a completed fit only: :func:`kinetic.fitting.fit` returns
        a complete result or raises, so "fit, then report" never leaves a
        figure of a failed fit.
    path : str or os.PathLike, optional
        Save to this file; the format follows the extension (.png, .svg,
        .pdf). Written atomically with :func:`kinetic._io.atomic_write`.
    material : Material or str, optional
        Host for the Cahill-Watson-Pohl floor (Cahill, Watson & Pohl, Phys.
        Rev. B 46, 6131, 1992, via :func:`kinetic.estimates.cahill_minimum_for`).
        Default: the model's material preset, if it has one; False draws no floor.
    level : float
        Confidence level of the band.
    samples : list of int or str, optional
        Samples of a joint fit to draw (default all).
    dpi : int
        Resolution of raster output.

    Returns
    -------
    matplotlib.figure.Figure

    Raises
    ------
    ParameterError
        Unknown extension or material.
    kinetic._io.AtomicWriteError
        The file cannot be written (one line; an earlier file is unchanged).
    """
    from matplotlib.figure import (
        Figure,  # lazily: matplotlib is heavy and only reports need it
    )

    if path is not None:
        _figure_format(path)
    mat = None if material is False else _material(result, material)
    idx = list(range(len(result.labels))) if samples is None else [sample_index(result, s) for s in samples]
    fig = Figure(figsize=(7.0, 6.5), layout="constrained")
    gs = fig.add_gridspec(2, 1, height_ratios=(3, 1))
    ax = fig.add_subplot(gs[0])
    axr = fig.add_subplot(gs[1], sharex=ax)
    colours = [f"C{i % 10}" for i in range(len(idx))]
    tmin, tmax = np.inf, 0.0
    offsets = np.cumsum([0] + [t.kappa.size for t in result.targets])
    rel = np.asarray(result.relative_residuals, dtype=float)
    for c, i in zip(colours, idx):
        ds = result.datasets[i]
        tgt = result.targets[i]
        lab = result.labels[i] if len(result.labels) > 1 else (result.labels[i] or "data")
        T = tgt.temperature
        tmin, tmax = min(tmin, float(ds.temperature.min())), max(tmax, float(ds.temperature.max()))
        Tf = np.geomspace(max(0.8 * float(ds.temperature.min()), 0.1), 1.1 * float(ds.temperature.max()), 200)
        band = predict_band(result, Tf, level, sample=i)
        subtracted = tgt.kappa_electronic is not None
        if subtracted:
            ax.errorbar(ds.temperature, ds.kappa, yerr=ds.kappa_err, fmt="o", ms=3.5, mfc="none", color=c,
                        alpha=0.6, label=f"{lab}: measured total")
            ax.errorbar(T, tgt.kappa, yerr=tgt.kappa_err, fmt="s", ms=3.5, color=c,
                        label=f"{lab}: lattice (total - L\u03c3T)")
            ax.plot(T, tgt.kappa_electronic, ":", color=c, label=f"{lab}: electronic L\u03c3T")
            ax.plot(T, result.models[i].kappa(T) + tgt.kappa_electronic, "--", color=c, lw=1,
                    label=f"{lab}: fit + electronic")
        else:
            ax.errorbar(T, tgt.kappa, yerr=tgt.kappa_err, fmt="o", ms=3.5, color=c, label=f"{lab}: data")
        ax.fill_between(Tf, band.lower, band.upper, color=c, alpha=0.2, lw=0)
        ax.plot(Tf, band.kappa, "-", color=c, label=f"{lab}: lattice fit ({int(round(100 * level))}% band)")
        r = rel[offsets[i]:offsets[i + 1]]
        s = result.sigma_relative[i]
        axr.errorbar(T, 100.0 * r, yerr=100.0 * s, fmt="o", ms=3, color=c)
    if mat is not None:
        Tc = np.geomspace(max(0.8 * tmin, 0.1), 1.1 * tmax, 200)
        ax.plot(Tc, cahill_minimum_for(mat, Tc), "-.", color="0.4", lw=1,
                label=f"Cahill-Watson-Pohl minimum ({mat.name})")
    ax.set_xscale("log")
    ax.set_yscale("log")
    ax.set_ylabel("thermal conductivity [W m$^{-1}$ K$^{-1}$]")
    ax.legend(fontsize=7, loc="best")
    ax.grid(True, which="both", alpha=0.3)
    axr.axhline(0.0, color="0.3", lw=0.8)
    axr.set_xlabel("temperature [K]")
    axr.set_ylabel("ln(fit/data) [%]")
    axr.grid(True, alpha=0.3)
    title = "lattice fit" + (f": {result.labels[0]}" if len(result.labels) == 1 and result.labels[0] else "")
    ax.set_title(title, fontsize=10)
    if path is not None:
        _save(fig, path, dpi)
    return fig


def _figure_format(path) -> str:
    ext = Path(path).suffix.lower().lstrip(".")
    if ext not in FIGURE_FORMATS:
        raise ParameterError(f"figure file {os.fspath(path)!r}: unknown extension {ext!r}; "
                             f"expected one of {', '.join('.' + e for e in FIGURE_FORMATS)}")
    return ext


def figure_bytes(fig, path, dpi: int = 150) -> bytes:
    """The bytes of ``fig`` in the format of ``path``'s extension (rendered in memory, nothing written)."""
    buf = io.BytesIO()
    fig.savefig(buf, format=_figure_format(path), dpi=dpi)
    return buf.getvalue()


def _save(fig, path, dpi):
    """Render the figure in memory, then write it with the one atomic-write helper."""
    atomic_write(path, figure_bytes(fig, path, dpi))


def save_outputs(result, *, record=None, figure=None, data_path=None, material=None, level: float = 0.95,
                 dpi: int = 150) -> list:
    """Write a fit's record and/or report figure only once both are fully rendered.

    Everything is prepared in memory first (the record's JSON, the figure's
    bytes); only when every part has succeeded are the files written, each
    with :func:`kinetic._io.atomic_write`. So a failure anywhere leaves no
    output of a fit that did not complete. This is the call for a command
    line's ``--save``/``--report``: fit first (``fit`` returns a complete
    result or raises), then ``save_outputs``.

    Parameters
    ----------
    result : FitResult
    record : path, optional
        Record file (.json), see :func:`kinetic.records.save_record`.
    figure : path, optional
        Figure file (.png, .svg, .pdf), see :func:`report_figure`.
    data_path, material, level, dpi
        As in :func:`kinetic.records.record_dict` and :func:`report_figure`.

    Returns
    -------
    list of Path
        The files written, record first.

    Raises
    ------
    ParameterError, RecordError
        Before anything is written (bad extension, unreadable data file...).
    RecordError, kinetic._io.AtomicWriteError
        A write failed (one line; that file is unchanged).
    """
    parts = []
    if record is not None:
        parts.append((record, record_json(result, data_path=data_path), True))
    if figure is not None:
        _figure_format(figure)
        fig = report_figure(result, None, material=material, level=level)
        parts.append((figure, figure_bytes(fig, figure, dpi), False))
    out = []
    for path, data, is_record in parts:
        try:
            out.append(atomic_write(path, data))
        except OSError as exc:
            if is_record:
                raise RecordError(f"cannot save the record {exc}") from None
            raise
    return out


def summary_table(result, level: float = 0.95) -> str:
    """Plain-text table rendered from ``result.report_rows(level)``, plus per-sample fit quality and warnings.

    Parameters
    ----------
    result : FitResult
        A fit, made now or loaded from a record.
    level : float
        Confidence level of the intervals.
    """
    level = check_level(level)
    pct = f"{100 * level:g}%"
    rows_all = result.report_rows(level)
    params = [r for r in rows_all if r.kind == "parameter"]
    w = max(len("parameter"), max(len(r.label) for r in params))
    head = f"{'parameter'.ljust(w)}  {'value':>11}  {'stderr':>10}  {('low ' + pct):>11}  {('high ' + pct):>11}  unit"
    rows = [head, "-" * len(head)]
    for r in params:
        if r.interval is None:
            lo_hi = f"{'not determined':>24}"
        else:
            lo_hi = f"{format_number(r.interval[0]):>11}  {format_number(r.interval[1]):>11}"
        line = f"{r.label.ljust(w)}  {r.value_text:>11}  {(r.error_text or '-'):>10}  {lo_hi}  {r.unit}".rstrip()
        if r.note:
            line += f"   ({r.note})"
        rows.append(line)
    rows.append("")
    lw = max(len("sample"), max(len(s) for s in result.labels))
    rows.append(f"{'sample'.ljust(lw)}  points  T range [K]     rms resid  max |resid|")
    offsets = np.cumsum([0] + [t.kappa.size for t in result.targets])
    rel = np.asarray(result.relative_residuals, dtype=float)
    for i, lab in enumerate(result.labels):
        r = rel[offsets[i]:offsets[i + 1]]
        T = result.targets[i].temperature
        rows.append(f"{lab.ljust(lw)}  {r.size:6d}  {T.min():6.4g}-{T.max():<7.4g}  {100 * np.sqrt(np.mean(r * r)):8.2f}%"
                    f"  {100 * np.max(np.abs(r)):10.2f}%")
    rows.append("")
    for r in rows_all:
        if r.kind != "parameter":
            unit = r.unit if r.unit == "%" else (f" {r.unit}" if r.unit else "")
            rows.append(f"{r.label}: {r.value_text}{unit}" + (f" ({r.note})" if r.note else ""))
    for m in result.warnings():
        rows.append(f"WARNING: {m}")
    return "\n".join(rows)
