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

import os
import tempfile
from pathlib import Path

import numpy as np

from .errors import ParameterError

__all__ = ["report_figure", "summary_table", "FIGURE_FORMATS"]

#: File extensions report_figure can write.
FIGURE_FORMATS = ("png", "svg", "pdf")


def _material(result, material):
    """The Material for the Cahill floor: given, by name, or from the model (None if unknown)."""
    from . import materials

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
    result : FitResult or Record
        A fit (single or joint) or a loaded record.
    path : str or os.PathLike, optional
        Save to this file; the format follows the extension (.png, .svg,
        .pdf). Written atomically (temp file in the same folder, then renamed).
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
    OSError
        The file cannot be written.
    """
    from matplotlib.figure import Figure

    from .fitting import _sample_index, predict_band

    if path is not None:
        ext = Path(path).suffix.lower().lstrip(".")
        if ext not in FIGURE_FORMATS:
            raise ParameterError(f"figure file {os.fspath(path)!r}: unknown extension {ext!r}; "
                                 f"expected one of {', '.join('.' + e for e in FIGURE_FORMATS)}")
    mat = None if material is False else _material(result, material)
    idx = list(range(len(result.labels))) if samples is None else [_sample_index(result, s) for s in samples]
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
        from .estimates import cahill_minimum_for

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


def _save(fig, path, dpi):
    path = Path(path)
    ext = path.suffix.lower().lstrip(".")
    folder = path.parent if str(path.parent) else Path(".")
    fd, tmp = tempfile.mkstemp(dir=folder, prefix=f".{path.name}.", suffix=f".{ext}")
    os.close(fd)
    try:
        fig.savefig(tmp, format=ext, dpi=dpi)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def summary_table(result, level: float = 0.95) -> str:
    """Plain-text table: parameters with errors and intervals, per-sample fit quality, warnings.

    Parameters
    ----------
    result : FitResult or Record
    level : float
        Confidence level of the intervals.
    """
    from .fitting import _level

    level = _level(level)
    pct = f"{100 * level:g}%"
    names = list(result.names)
    w = max(len("parameter"), max(len(n) for n in names))
    rows = [f"{'parameter'.ljust(w)}  {'value':>11}  {'stderr':>10}  {('low ' + pct):>11}  {('high ' + pct):>11}  unit"]
    rows.append("-" * len(rows[0]))
    for n in names:
        lo, hi = result.interval(n, level)
        rows.append(f"{n.ljust(w)}  {result.values[n]:11.4g}  {result.stderr[n]:10.3g}  {lo:11.4g}  {hi:11.4g}  "
                    f"{result.units.get(n, '')}".rstrip())
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
    rows.append(f"chi2 {result.chi2:.4g} on {result.dof} degrees of freedom (reduced {result.reduced_chi2:.3g}); "
                f"AIC {result.aic:.4g}; BIC {result.bic:.4g}")
    if result.scatter_estimated:
        rows.append(f"weights: relative scatter estimated from the residuals, s0 = {100 * result.scatter:.2f}%")
    else:
        rows.append("weights: stated kappa errors (and electronic-part errors)")
    for m in result.flags.messages():
        rows.append(f"WARNING: {m}")
    return "\n".join(rows)
