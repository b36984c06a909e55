"""Live figures of the workbench (ipympl canvases), built once and updated in place.

Each plot owns one matplotlib figure whose canvas is an ipywidgets widget
(``plot.canvas``). Artists are created once; ``update(...)`` only calls
``set_data`` / ``set_visible``, rescales when the ranges changed and asks for a
redraw with ``draw_idle``. Plots are told numbers; they compute none.

Figures are made inside ``plt.ioff()`` with ipympl's canvas directly (not
through pyplot's figure registry), so a workbench never pops up stray figures
and many workbenches in one process do not pile up pyplot figures.
"""
from __future__ import annotations

import os
import tempfile

import numpy as np
import ipywidgets as ipw
import matplotlib.pyplot as plt
from matplotlib.colors import to_hex
from matplotlib import ticker
from matplotlib.figure import Figure

from .style import PART_COLOURS, branch_style, branch_title, css, mechanism_colour, mechanism_title

__all__ = [
    "new_figure", "save_figure", "Plot", "ConductivityPlot", "RatesPlot", "SpectrumPlot",
    "AccumulationPlot", "CurvesPlot", "MapPlot",
]

_W_UNIT = "W m\u207b\u00b9 K\u207b\u00b9"
_PER_S = "s\u207b\u00b9"
_SUP = str.maketrans("-0123456789", "\u207b\u2070\u00b9\u00b2\u00b3\u2074\u2075\u2076\u2077\u2078\u2079")


def new_figure(width: float = 5.0, height: float = 3.5, dpi: float = 96.0) -> Figure:
    """A figure with an ipympl canvas widget, not shown and not registered with pyplot.

    Parameters
    ----------
    width, height : float
        Size [inch].
    dpi : float
        Dots per inch of the canvas.
    """
    from ipympl.backend_nbagg import _Backend_ipympl

    with plt.ioff():
        fig = Figure(figsize=(width, height), dpi=dpi)
        _Backend_ipympl.new_figure_manager_given_figure(id(fig), fig)
    c = fig.canvas
    c.header_visible = False
    c.footer_visible = False
    c.resizable = False
    c.toolbar_position = "right"
    c.capture_scroll = False
    return fig


def save_figure(fig: Figure, path, dpi: float = 150.0) -> str:
    """Write ``fig`` as PNG atomically (temporary file in the same folder, then rename).

    Returns the path written.
    """
    path = os.fspath(path)
    folder = os.path.dirname(os.path.abspath(path))
    fd, tmp = tempfile.mkstemp(prefix=".tmp-", suffix=".png", dir=folder)
    try:
        with os.fdopen(fd, "wb") as fh:
            fig.savefig(fh, format="png", dpi=dpi)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise
    return path


def _positive_or_nan(y):
    """Values <= 0 become NaN, so log axes skip them without warnings."""
    y = np.array(y, dtype=float, copy=True)
    y[~(y > 0)] = np.nan
    return y


def decade_label(value, plain: bool = True) -> str:
    """Tick label of a decade: "0.01" ... "10000" when ``plain``, otherwise "10\u2075" (no mathtext)."""
    if not value > 0:
        return ""
    e = float(np.log10(value))
    n = int(round(e))
    if abs(e - n) > 1e-6:
        return ""
    if plain:
        return f"{value:g}"
    return "10" + str(n).translate(_SUP)


class DecadeFormatter(ticker.Formatter):
    """Decade labels in plain text: plain numbers on an axis within 0.01-10000, else 10\u207f."""

    def __call__(self, x, pos=None):
        lo, hi = sorted(self.axis.get_view_interval())
        return decade_label(x, plain=(lo >= 0.0099 and hi <= 10100.0))


class SubDecadeFormatter(ticker.Formatter):
    """Labels of the 2 and 5 minor ticks, only on an axis shorter than about a decade and a half."""

    def __call__(self, x, pos=None):
        lo, hi = sorted(self.axis.get_view_interval())
        if not (lo > 0 and np.log10(hi / lo) < 1.2):
            return ""
        return f"{x:g}"


def _light_log_axis(axis):
    """Log axis with decade labels in plain text and two unlabelled minor ticks per decade.

    Plain-text labels (no mathtext) and few minor ticks keep a redraw cheap;
    the axis label position is fixed for the same reason.
    """
    axis.set_major_locator(ticker.LogLocator(base=10.0, numticks=8))
    axis.set_major_formatter(DecadeFormatter())
    axis.set_minor_locator(ticker.LogLocator(base=10.0, subs=(2.0, 5.0), numticks=8))
    axis.set_minor_formatter(SubDecadeFormatter())


def _set_band(band, t, lo, hi):
    """Move a fill_between band to new edges (keeps its data limits right)."""
    if hasattr(band, "set_data"):  # matplotlib >= 3.10: FillBetweenPolyCollection
        band.set_data(t, lo, hi)
    else:
        verts = np.concatenate([np.column_stack([t, lo]), np.column_stack([t[::-1], hi[::-1]])])
        band.set_verts([verts])


def _legend_entry(artist) -> str:
    """One HTML legend item: a swatch in the artist's colour and style, then its label."""
    label = str(artist.get_label()).replace("&", "&amp;").replace("<", "&lt;")
    if hasattr(artist, "get_linestyle") and hasattr(artist, "get_marker"):
        colour = to_hex(artist.get_color())
        marker = artist.get_marker()
        if artist.get_linestyle() in ("None", "none", "", " ") and marker not in (None, "None", "none", ""):
            glyph = "\u25a0" if marker == "s" else ("\u25cb" if artist.get_markerfacecolor() == "none" else "\u25cf")
            swatch = f"<span style='color:{colour}'>{glyph}</span>"
        else:
            ls = artist.get_linestyle()
            css_ls = {"-": "solid", "--": "dashed", ":": "dotted", "-.": "dashed"}.get(ls, "solid")
            w = max(1, int(round(artist.get_linewidth())))
            swatch = (f"<span style='display:inline-block;width:1.8em;vertical-align:middle;"
                      f"border-top:{w + 1}px {css_ls} {colour}'></span>")
    else:
        fc = artist.get_facecolor()
        colour = to_hex(fc[0] if len(fc) else "#cccccc")
        swatch = (f"<span style='display:inline-block;width:1.8em;height:0.8em;vertical-align:middle;"
                  f"background:{colour};opacity:0.35'></span>")
    return f"<span style='white-space:nowrap;margin-right:1em;font-size:85%'>{swatch} {label}</span>"


def nice_ceil(value: float) -> float:
    """Smallest of 1, 1.5, 2, 3, 5, 7 (times a power of ten) >= value (> 0)."""
    if not (value > 0 and np.isfinite(value)):
        return 1.0
    e = np.floor(np.log10(value))
    for m in (1.0, 1.5, 2.0, 3.0, 5.0, 7.0, 10.0):
        if m * 10.0**e >= value * (1 - 1e-12):
            return float(m * 10.0**e)
    return float(10.0 ** (e + 1))


def step_limits(lo: float, hi: float) -> tuple:
    """Limits on the 1-2-5 sequence around [lo, hi] (both > 0), for log axes that should not waste space."""
    a = np.floor(np.log10(lo))
    b = np.floor(np.log10(hi))
    low = max(m * 10.0**a for m in (1.0, 2.0, 5.0) if m * 10.0**a <= lo * (1 + 1e-9))
    high = min(m * 10.0**b for m in (1.0, 2.0, 5.0, 10.0) if m * 10.0**b >= hi * (1 - 1e-9))
    return float(low), float(high)


def decade_limits(lo: float, hi: float, max_decades: float | None = None) -> tuple:
    """Whole decades around [lo, hi] (both > 0), at most ``max_decades`` below hi."""
    a = np.floor(np.log10(lo) + 1e-9)
    b = np.ceil(np.log10(hi) - 1e-9)
    if b <= a:
        b = a + 1
    if max_decades is not None and b - a > max_decades:
        a = b - max_decades
    return float(10.0**a), float(10.0**b)


class Plot:
    """One figure with its canvas widget; base of the workbench plots.

    Updating a plot never rebuilds it: curves change through ``set_data``.
    Axis ranges snap to whole decades (log axes) or round numbers (linear
    axes), so most slider moves leave them unchanged; then only the changing
    artists are redrawn over a cached background (matplotlib blitting, which
    ipympl sends as an image diff). When a range, the legend or a label
    changed, the whole figure is redrawn with ``draw_idle``.

    Attributes
    ----------
    fig : matplotlib.figure.Figure
    ax : matplotlib.axes.Axes
    canvas : ipympl Canvas (an ipywidgets widget)
    widget : ipw.VBox
        The canvas with its HTML legend under it (what the workbench lays out).
    legend : ipw.HTML
    stale : bool
        True when the plot has not yet been updated to the latest model (set by
        the workbench for plots on hidden tabs).
    full_draws, blits : int
        How many full redraws and fast redraws happened (for tests and benchmarks).
    """

    def __init__(self, name: str, width: float = 5.0, height: float = 3.5):
        self.name = name
        self.fig = new_figure(width, height)
        self.fig.subplots_adjust(left=0.15, right=0.97, bottom=0.15, top=0.91)
        self.ax = self.fig.add_subplot()
        self.canvas = self.fig.canvas
        self.canvas.add_class(css("plot"))
        self.canvas.add_class(css(f"plot-{name}"))
        self.legend = ipw.HTML(layout=ipw.Layout(max_width=f"{int(width * 96)}px"))
        self.legend.add_class(css("legend"))
        self.widget = ipw.VBox([self.canvas, self.legend])
        self.widget.add_class(css(f"figure-{name}"))
        self.stale = True
        self._legend_key = None
        self._legend_kw = {}
        # fixed positions: matplotlib otherwise measures every tick label on each draw
        self.ax.xaxis.set_label_coords(0.5, -0.11)
        self.ax.yaxis.set_label_coords(-0.12, 0.5)
        self._dynamic: list = []
        self._background = None
        self._background_state = None
        self._saving = False
        self.fast = True
        self.full_draws = 0
        self.blits = 0
        self.canvas.mpl_connect("draw_event", self._on_draw)

    def set_title(self, text: str):
        """Title at a fixed height (cheaper than matplotlib's automatic placement)."""
        return self.ax.set_title(text, fontsize=9, y=1.0, pad=4.0)

    # --- fast redraws ---------------------------------------------------------------
    def dynamic(self, artist):
        """Mark an artist as changing with the model (drawn over the cached background)."""
        artist.set_animated(True)
        self._dynamic.append(artist)
        return artist

    def _state(self):
        return (tuple(self.ax.get_xlim()), tuple(self.ax.get_ylim()), self._legend_key,
                self.fig.bbox.bounds)

    def _draw_dynamic(self):
        for a in self._dynamic:
            if a.get_visible():
                self.ax.draw_artist(a)

    def _on_draw(self, event):
        if self._saving:
            return
        self._background = self.canvas.copy_from_bbox(self.fig.bbox)
        self._background_state = self._state()
        self._draw_dynamic()
        self.full_draws += 1

    def redraw(self):
        """Show the current artists: a fast redraw if the axes are unchanged, else a full one."""
        if (self.fast and self._dynamic and self._background is not None
                and self._state() == self._background_state):
            self.canvas.restore_region(self._background)
            self._draw_dynamic()
            self.canvas.blit(self.fig.bbox)
            self.blits += 1
        else:
            self._background = None
            self.canvas.draw_idle()

    @property
    def needs_full_draw(self) -> bool:
        """True when the last :meth:`redraw` asked the front end for a full redraw."""
        return self._background is None

    # --- ranges -------------------------------------------------------------------
    def _data_limits(self):
        """(x0, x1, y0, y1) of the visible data; positive minima for log axes; None if empty."""
        self.ax.relim(visible_only=True)
        lim = self.ax.dataLim
        x0, x1, y0, y1 = lim.x0, lim.x1, lim.y0, lim.y1
        if not all(np.isfinite(v) for v in (x0, x1, y0, y1)):
            return None
        if self.ax.get_xscale() == "log":
            x0 = lim.minposx
        if self.ax.get_yscale() == "log":
            y0 = lim.minposy
        return x0, x1, y0, y1

    def fit_ranges(self, *, y_decades: float | None = None, y_from_zero: bool = False,
                   x_from_zero: bool = False, x_steps: bool = False):
        """Snap the axis ranges around the visible data (decades or round numbers)."""
        d = self._data_limits()
        if d is None:
            return
        x0, x1, y0, y1 = d
        if self.ax.get_xscale() == "log":
            self.ax.set_xlim(*(step_limits(x0, x1) if x_steps else decade_limits(x0, x1)))
        else:
            self.ax.set_xlim(0.0 if x_from_zero else x0, nice_ceil(x1) if x_from_zero else x1)
        if self.ax.get_yscale() == "log":
            self.ax.set_ylim(*decade_limits(y0, y1, y_decades))
        elif y_from_zero:
            self.ax.set_ylim(0.0, nice_ceil(y1 * 1.04))
        else:
            pad = 0.05 * (y1 - y0 or abs(y1) or 1.0)
            self.ax.set_ylim(y0 - pad, y1 + pad)

    def rescale(self):
        self.fit_ranges()

    # --- legend -------------------------------------------------------------------
    def _legend(self, key, **kw):
        """Refresh the legend when the set of visible curves changed.

        The legend is an HTML row under the canvas (``plot.legend``), not a
        matplotlib legend: it costs nothing on a redraw. :meth:`save` adds a
        matplotlib legend to the exported image.
        """
        if key == self._legend_key:
            return
        self._legend_key = key
        self._legend_kw = kw
        self.legend.value = "".join(_legend_entry(h) for h in self._handles())

    def _handles(self):
        handles = [h for h in self.ax.get_lines() if h.get_visible() and not h.get_label().startswith("_")]
        handles += [c for c in self.ax.collections if c.get_visible() and not c.get_label().startswith("_")]
        return handles

    # --- export -------------------------------------------------------------------
    def save(self, path, dpi: float = 150.0) -> str:
        """Write the figure, with a legend, as PNG (atomically). Returns the path."""
        handles = self._handles()
        self._saving = True
        for a in self._dynamic:
            a.set_animated(False)
        leg = self.ax.legend(handles=handles, fontsize=7, frameon=False, **self._legend_kw) if handles else None
        try:
            return save_figure(self.fig, path, dpi=dpi)
        finally:
            if leg is not None:
                leg.remove()
            for a in self._dynamic:
                a.set_animated(True)
            self._saving = False
            self._background = None
            self.canvas.draw_idle()

    def close(self):
        self.legend.close()
        self.widget.close()
        self.canvas.close()
        if self.canvas.toolbar is not None:
            self.canvas.toolbar.close()


# ---------------------------------------------------------------------------------
class ConductivityPlot(Plot):
    """Thermal conductivity against temperature (log-log).

    Curves: measured points (total, and lattice after the electronic split),
    model total / lattice / electronic / bipolar parts, the Cahill-Watson-Pohl
    floor, a prediction band from the last fit, and a marker at the chosen
    temperature.
    """

    PARTS = ("total", "lattice", "electronic", "bipolar", "floor")
    _LABELS = {
        "total": "model: total",
        "lattice": "model: lattice",
        "electronic": "electronic (L\u03c3T)",
        "bipolar": "bipolar",
        "floor": "Cahill-Watson-Pohl floor",
    }

    def __init__(self, width: float = 5.8, height: float = 3.9):
        super().__init__("conductivity", width, height)
        ax = self.ax
        ax.set_xscale("log")
        ax.set_yscale("log")
        _light_log_axis(ax.xaxis)
        _light_log_axis(ax.yaxis)
        ax.set_xlabel("temperature T [K]")
        ax.set_ylabel(f"thermal conductivity \u03ba [{_W_UNIT}]")
        self.set_title("Conductivity against temperature")
        self.band = self.dynamic(ax.fill_between([1.0, 2.0], [1.0, 1.0], [2.0, 2.0], color=PART_COLOURS["band"],
                                                 alpha=0.2, linewidth=0, label="last fit: 95% band"))
        self.band.set_visible(False)
        styles = {"total": dict(lw=2.0), "lattice": dict(lw=1.6), "electronic": dict(lw=1.2, ls="--"),
                  "bipolar": dict(lw=1.2, ls="-."), "floor": dict(lw=1.0, ls=":")}
        self.lines = {}
        for part in self.PARTS:
            (line,) = ax.plot([], [], color=PART_COLOURS[part], label=self._LABELS[part], **styles[part])
            self.lines[part] = self.dynamic(line)
        (m,) = ax.plot([], [], ls="none", marker="o", ms=4, mfc="none",
                       color=PART_COLOURS["measured"], label="measured")
        self.measured = self.dynamic(m)
        (ml,) = ax.plot([], [], ls="none", marker="s", ms=3.5, color=PART_COLOURS["measured_lattice"],
                        label="measured minus electronic")
        self.measured_lattice = self.dynamic(ml)
        self.marker = self.dynamic(ax.axvline(300.0, color="#999999", lw=0.8, ls=(0, (2, 3)), label="_marker"))
        for a in (*self.lines.values(), self.measured, self.measured_lattice):
            a.set_visible(False)

    def update(self, temperature, parts: dict, *, measured=None, measured_lattice=None,
               band=None, marker=None, measured_label: str | None = None):
        """Set the curves.

        Parameters
        ----------
        temperature : ndarray
            Grid of the model curves [K] (for the x range).
        parts : dict
            Part name -> ``(T [K], kappa [W/m/K])``; parts left out are hidden.
        measured, measured_lattice : (T [K], kappa [W/m/K]) or None
        band : (T [K], lower, upper [W/m/K]) or None
        marker : float or None
            Temperature to mark [K].
        measured_label : str, optional
            Legend text of the measured points.
        """
        for part, line in self.lines.items():
            xy = parts.get(part)
            if xy is None:
                line.set_visible(False)
                line.set_data([], [])
            else:
                line.set_data(np.asarray(xy[0], float), _positive_or_nan(xy[1]))
                line.set_visible(True)
        for line, xy in ((self.measured, measured), (self.measured_lattice, measured_lattice)):
            if xy is None:
                line.set_visible(False)
                line.set_data([], [])
            else:
                line.set_data(np.asarray(xy[0], float), _positive_or_nan(xy[1]))
                line.set_visible(True)
        if measured_label:
            self.measured.set_label(measured_label)
        if band is None:
            self.band.set_visible(False)
        else:
            t, lo, hi = (np.asarray(a, float) for a in band)
            ok = (lo > 0) & (hi > 0)
            t, lo, hi = t[ok], lo[ok], hi[ok]
            if t.size > 1:
                _set_band(self.band, t, lo, hi)
            self.band.set_visible(t.size > 1)
        if marker is not None:
            self.marker.set_xdata([marker, marker])
        # ranges from the curves and points only (the band and the marker follow)
        band_visible = self.band.get_visible()
        self.band.set_visible(False)
        marker_visible = self.marker.get_visible()
        self.marker.set_visible(False)
        self.fit_ranges(y_decades=7, x_steps=True)
        self.band.set_visible(band_visible)
        self.marker.set_visible(marker_visible)
        vis = tuple(sorted(n for n, l in self.lines.items() if l.get_visible())) + (
            self.measured.get_visible(), self.measured_lattice.get_visible(), self.band.get_visible(),
            self.measured.get_label())
        self._legend(vis, loc="best")
        self.stale = False
        self.redraw()


class RatesPlot(Plot):
    """Relaxation rate of each mechanism against angular frequency at one temperature (log-log)."""

    def __init__(self, width: float = 5.8, height: float = 3.9):
        super().__init__("rates", width, height)
        ax = self.ax
        ax.set_xscale("log")
        ax.set_yscale("log")
        _light_log_axis(ax.xaxis)
        _light_log_axis(ax.yaxis)
        ax.set_xlabel("angular frequency \u03c9 [rad " + _PER_S + "]")
        ax.set_ylabel("relaxation rate 1/\u03c4 [" + _PER_S + "]")
        self.title = self.dynamic(self.set_title("Scattering rates"))
        self.lines: dict = {}

    def _line(self, branch: str, name: str, kind: str):
        key = (branch, name)
        if key not in self.lines:  # created once per (branch, mechanism), then reused
            (line,) = self.ax.plot([], [], color=mechanism_colour(kind), ls=branch_style(branch), lw=1.4)
            self.lines[key] = self.dynamic(line)
        return self.lines[key]

    def update(self, omega: dict, rates: dict, kinds: dict, temperature: float):
        """Set the curves.

        Parameters
        ----------
        omega : dict
            Branch name -> angular-frequency grid [rad s^-1].
        rates : dict
            ``{branch: {mechanism: rate [s^-1]}}`` as from ``LatticeModel.rates``.
        kinds : dict
            Mechanism name -> kind (for the colour).
        temperature : float
            [K], for the title.
        """
        seen = set()
        several = len(rates) > 1
        for branch, per in rates.items():
            for name, r in per.items():
                line = self._line(branch, name, kinds.get(name, name))
                line.set_data(omega[branch], _positive_or_nan(np.broadcast_to(r, np.shape(omega[branch]))))
                label = mechanism_title(kinds.get(name, name), name)
                if several:
                    label = f"{label}, {branch_title(branch)}"
                line.set_label(label)
                line.set_visible(True)
                seen.add((branch, name))
        for key, line in self.lines.items():
            if key not in seen:
                line.set_visible(False)
                line.set_data([], [])
        self.title.set_text(f"Scattering rates at {temperature:.4g} K")
        self.fit_ranges(y_decades=10)
        self._legend(tuple(sorted(seen)), loc="upper left")
        self.stale = False
        self.redraw()


class SpectrumPlot(Plot):
    """Spectral conductivity d\u03ba/d\u03c9 of each branch at one temperature."""

    def __init__(self, width: float = 5.8, height: float = 3.9):
        super().__init__("spectrum", width, height)
        ax = self.ax
        ax.set_xlabel("angular frequency \u03c9 [rad " + _PER_S + "]")
        ax.set_ylabel("d\u03ba/d\u03c9 [" + _W_UNIT + " / (rad " + _PER_S + ")]")
        self.title = self.dynamic(self.set_title("Spectral conductivity"))
        self.lines: dict = {}
        self._colours = {"avg": PART_COLOURS["lattice"], "L": "#d62728", "T": "#1f77b4"}

    def update(self, omega: dict, kappa_omega: dict, temperature: float):
        """``omega``, ``kappa_omega``: branch -> arrays [rad s^-1], [W m^-1 K^-1 / (rad s^-1)]."""
        seen = set()
        for branch, y in kappa_omega.items():
            if branch not in self.lines:
                (line,) = self.ax.plot([], [], lw=1.6, ls=branch_style(branch),
                                       color=self._colours.get(branch, "#555555"))
                self.lines[branch] = self.dynamic(line)
            line = self.lines[branch]
            line.set_data(omega[branch], y)
            line.set_label(f"{branch_title(branch)} branch")
            line.set_visible(True)
            seen.add(branch)
        for b, line in self.lines.items():
            if b not in seen:
                line.set_visible(False)
                line.set_data([], [])
        self.title.set_text(f"Spectral conductivity at {temperature:.4g} K")
        self.fit_ranges(y_from_zero=True, x_from_zero=True)
        self._legend(tuple(sorted(seen)), loc="upper right")
        self.stale = False
        self.redraw()


class AccumulationPlot(Plot):
    """Cumulative conductivity against phonon mean free path, with the grain size marked."""

    def __init__(self, width: float = 5.8, height: float = 3.9):
        super().__init__("mfp", width, height)
        ax = self.ax
        ax.set_xscale("log")
        _light_log_axis(ax.xaxis)
        ax.set_xlabel("mean free path \u2113 [m]")
        ax.set_ylabel(f"\u03ba from paths \u2264 \u2113 [{_W_UNIT}]")
        self.title = self.dynamic(self.set_title("Heat carried by mean free path"))
        (line,) = ax.plot([], [], color=PART_COLOURS["lattice"], lw=1.8, label="accumulated \u03ba")
        self.line = self.dynamic(line)
        self.grain = self.dynamic(ax.axvline(1e-6, color=mechanism_colour("boundary"), lw=1.2, ls="--",
                                             label="boundary length"))
        self.grain.set_visible(False)

    def update(self, mfp, kappa_accumulated, temperature: float, boundary_length: float | None,
               median: float | None = None):
        """``mfp`` [m] ascending, ``kappa_accumulated`` [W/m/K]; ``boundary_length`` [m] or None."""
        mfp = np.asarray(mfp, float)
        ok = mfp > 0
        self.line.set_data(mfp[ok], np.asarray(kappa_accumulated, float)[ok])
        self.grain.set_visible(False)
        self.fit_ranges(y_from_zero=True)
        if boundary_length is not None:
            self.grain.set_xdata([boundary_length, boundary_length])
            self.grain.set_visible(True)
            lo, hi = self.ax.get_xlim()
            if not (lo < boundary_length / 2 and boundary_length * 2 < hi):
                self.ax.set_xlim(*decade_limits(min(lo, boundary_length / 3), max(hi, boundary_length * 3)))
        t = f"Heat by mean free path at {temperature:.4g} K"
        if median is not None:
            t += f": half below {median:.3g} m"
        self.title.set_text(t)
        self._legend((self.grain.get_visible(),), loc="upper left")
        self.stale = False
        self.redraw()


class CurvesPlot(Plot):
    """A few named curves against one variable, with optional bands (what-if sweeps)."""

    def __init__(self, name: str, xlabel: str, ylabel: str, title: str, *, xlog=False, ylog=False,
                 width: float = 4.6, height: float = 3.3):
        super().__init__(name, width, height)
        ax = self.ax
        if xlog:
            ax.set_xscale("log")
            _light_log_axis(ax.xaxis)
        if ylog:
            ax.set_yscale("log")
            _light_log_axis(ax.yaxis)
        ax.set_xlabel(xlabel)
        ax.set_ylabel(ylabel)
        self.title = self.set_title(title)
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
                 width: float = 4.8, height: float = 3.4):
        super().__init__(name, width, height)
        self.fig.subplots_adjust(right=0.84)
        ax = self.ax
        if xlog:
            ax.set_xscale("log")
            _light_log_axis(ax.xaxis)
        ax.set_xlabel(xlabel)
        ax.set_ylabel(ylabel)
        self.title = self.set_title(title)
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
