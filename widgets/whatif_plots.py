"""Plots of the what-if studies: a few named curves against one variable, and a 2-D map."""
from __future__ import annotations

import numpy as np

from .figures import Plot
from .figures import light_log_axis as _light_log_axis
from .figures import positive_or_nan as _positive_or_nan
from .figures import set_band as _set_band

__all__ = ["CurvesPlot", "MapPlot"]


def _set_axes(plot: Plot, xlabel: str, ylabel: str, title: str, xlog: bool, ylog: bool) -> None:
    """Labels, title, file name and log scales (with light log ticks) of a what-if plot."""
    plot.file_stem = plot.name.replace("-", "_")
    ax = plot.ax
    for on, axis, set_scale in ((xlog, ax.xaxis, ax.set_xscale), (ylog, ax.yaxis, ax.set_yscale)):
        if on:
            set_scale("log")
            _light_log_axis(axis)
    ax.set_xlabel(xlabel)
    ax.set_ylabel(ylabel)
    plot.title = plot.set_title(title)


class CurvesPlot(Plot):
    """A few named curves against one variable, with optional bands (what-if sweeps)."""

    def __init__(self, name: str, xlabel: str, ylabel: str, title: str, *, xlog=False, ylog=False,
                 width: float = 4.7, height: float = 3.1):
        super().__init__(name, width, height)
        _set_axes(self, xlabel, ylabel, title, xlog, ylog)
        self.lines: dict = {}
        self.bands: dict = {}
        self.markers: dict = {}
        self._ylog = ylog
        self.fast = False  # redrawn on a button press, not on slider moves

    def update(self, curves: dict, bands: dict | None = None, title: str | None = None,
               vlines: dict | None = None):
        """Set the curves.

        Parameters
        ----------
        curves : dict
            label -> (x, y, colour) or (x, y, colour, style).
        bands : dict, optional
            label -> (x, lower, upper, colour).
        vlines : dict, optional
            label -> (x position, colour): vertical markers.
        """
        bands = bands or {}
        vlines = vlines or {}
        for label, spec in curves.items():
            x, y, colour = spec[:3]
            style = spec[3] if len(spec) > 3 else "-"
            if label not in self.lines:
                (self.lines[label],) = self.ax.plot([], [], lw=1.6, color=colour, ls=style, label=label)
            yy = _positive_or_nan(y) if self._ylog else np.asarray(y, float)
            self.lines[label].set_data(np.asarray(x, float), yy)
            self.lines[label].set_visible(True)
        for label, line in self.lines.items():
            if label not in curves:
                line.set_visible(False)
        for label, (x, lo, hi, colour) in bands.items():
            x, lo, hi = (np.asarray(a, float) for a in (x, lo, hi))
            if self._ylog:
                ok = (lo > 0) & (hi > 0)
                x, lo, hi = x[ok], lo[ok], hi[ok]
            if x.size < 2:
                continue
            if label not in self.bands:
                self.bands[label] = self.ax.fill_between(x, lo, hi, color=colour, alpha=0.2,
                                                         linewidth=0, label=label)
            _set_band(self.bands[label], x, lo, hi)
            self.bands[label].set_visible(True)
        for label, band in self.bands.items():
            if label not in bands:
                band.set_visible(False)
        for label, (xpos, colour) in vlines.items():
            if label not in self.markers:
                self.markers[label] = self.ax.axvline(xpos, color=colour, lw=1.0, ls="--", label=label)
            self.markers[label].set_xdata([xpos, xpos])
            self.markers[label].set_visible(True)
        for label, mk in self.markers.items():
            if label not in vlines:
                mk.set_visible(False)
        if title is not None:
            self.title.set_text(title)
        hidden = [m for m in self.markers.values() if m.get_visible()]
        for m in hidden:
            m.set_visible(False)
        self.fit_ranges(y_decades=6, y_from_zero=not self._ylog)
        for m in hidden:
            m.set_visible(True)
        self._legend(tuple(sorted(curves)) + tuple(sorted(bands)) + tuple(sorted(vlines)), loc="best")
        self.stale = False
        self.redraw()


class MapPlot(Plot):
    """A 2-D colour map (e.g. conductivity over grain size and alloy fraction)."""

    def __init__(self, name: str, xlabel: str, ylabel: str, clabel: str, title: str, *, xlog=False,
                 width: float = 4.7, height: float = 3.1):
        super().__init__(name, width, height)
        self.fig.subplots_adjust(right=0.84)
        _set_axes(self, xlabel, ylabel, title, xlog, False)
        self.mesh = None
        self.cbar = None
        self.clabel = clabel
        self._xy = None
        self.fast = False

    def update(self, x, y, z, title: str | None = None):
        """x (nx,), y (ny,), z (ny, nx); z is shown in colour."""
        x, y, z = (np.asarray(a, float) for a in (x, y, z))
        same_grid = self._xy is not None and np.array_equal(self._xy[0], x) and np.array_equal(self._xy[1], y)
        if self.mesh is None or not same_grid:
            if self.mesh is not None:
                self.mesh.remove()
            self.mesh = self.ax.pcolormesh(x, y, z, shading="nearest", cmap="viridis")
            self._xy = (x, y)
            if self.cbar is None:
                self.cbar = self.fig.colorbar(self.mesh, ax=self.ax, label=self.clabel)
            else:
                self.cbar.update_normal(self.mesh)
        else:
            self.mesh.set_array(z.ravel())
        finite = z[np.isfinite(z)]
        if finite.size:
            self.mesh.set_clim(float(finite.min()), float(finite.max()))
        if title is not None:
            self.title.set_text(title)
        self.stale = False
        self.redraw()

    def curves(self) -> list:
        """One curve per row of the map (z against x at each y), for the CSV export."""
        if self.mesh is None or self._xy is None:
            return []
        x, y = self._xy
        z = np.asarray(self.mesh.get_array(), float).reshape(len(y), len(x))
        yl = self.ax.get_ylabel()
        return [(f"{yl} = {yv:g}", self.ax.get_xlabel(), self.clabel, x, z[i]) for i, yv in enumerate(y)]
