"""Figure plumbing of the workbench: ipympl canvases, fast redraws, axes, export.

Each plot owns one matplotlib figure whose canvas is an ipywidgets widget
(``plot.canvas``). Artists are created once; ``update(...)`` only calls
``set_data`` / ``set_visible``, rescales when the ranges changed and redraws.
Plots are told numbers; they compute none.

Every frame sent to the browser is a full frame (never an image diff): ipympl's
diff frames are composited in the browser over the previous frame, and a lost or
reordered frame then leaves ghost curves for good. A full frame of a workbench
figure is a small PNG, so this costs little and makes corruption impossible.

Figures are made inside ``plt.ioff()`` with ipympl's canvas directly (not
through pyplot's figure registry), so a workbench never pops up stray figures
and many workbenches in one process do not pile up pyplot figures.
"""
from __future__ import annotations

import csv
import io
import os
import re

import ipywidgets as ipw
import matplotlib.pyplot as plt
import numpy as np
from matplotlib import ticker
from matplotlib.colors import to_hex
from matplotlib.figure import Figure

from . import _engine
from .style import css

__all__ = [
    "EXPORT_FORMATS",
    "PER_S",
    "W_UNIT",
    "Plot",
    "curves_csv",
    "decade_label",
    "decade_limits",
    "light_log_axis",
    "new_figure",
    "nice_ceil",
    "positive_or_nan",
    "save_figure",
    "set_band",
    "step_limits",
]

W_UNIT = "W m\u207b\u00b9 K\u207b\u00b9"
PER_S = "s\u207b\u00b9"
#: export formats and their resolution [dots per inch] (vector formats ignore it)
EXPORT_FORMATS = {"png": 300.0, "svg": 300.0, "pdf": 300.0}
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
    c.toolbar_visible = False  # its buttons cannot be reached with Tab; export is in "Save / export"
    c.capture_scroll = False
    return fig


def save_figure(fig: Figure, path, dpi: float | None = None) -> str:
    """Write ``fig`` atomically as PNG (300 dpi), SVG or PDF, chosen by the file's suffix.

    The file's permissions follow the user's umask. Returns the path written.
    """
    path = os.fspath(path)
    fmt = os.path.splitext(path)[1].lower().lstrip(".")
    if fmt not in EXPORT_FORMATS:
        raise _engine.ParameterError(f"figure file {path!r}: expected a name ending in "
                                     f"{', '.join('.' + f for f in EXPORT_FORMATS)}")
    buf = io.BytesIO()
    meta = {"png": {"Software": "kinetic workbench"}}.get(fmt, {})
    fig.savefig(buf, format=fmt, dpi=EXPORT_FORMATS[fmt] if dpi is None else dpi, metadata=meta or None)
    return _engine.atomic_write(path, buf.getvalue())


def curves_csv(curves) -> str:
    """CSV text of plotted curves: for each curve its x and y columns, side by side.

    ``curves``: list of ``(label, xlabel, ylabel, x, y)``. Curves of different
    lengths leave their cells empty below their end.
    """
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    header = []
    for label, xl, yl, _, _ in curves:
        header += [f"{label}: {xl}", f"{label}: {yl}"]
    w.writerow(header)
    n = max((len(c[3]) for c in curves), default=0)
    for i in range(n):
        row = []
        for _, _, _, x, y in curves:
            row += [repr(float(x[i])), repr(float(y[i]))] if i < len(x) else ["", ""]
        w.writerow(row)
    return buf.getvalue()


def positive_or_nan(y):
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


def light_log_axis(axis):
    """Log axis with decade labels in plain text and two unlabelled minor ticks per decade.

    Plain-text labels (no mathtext) and few minor ticks keep a redraw cheap;
    the axis label position is fixed for the same reason.
    """
    axis.set_major_locator(ticker.LogLocator(base=10.0, numticks=8))
    axis.set_major_formatter(DecadeFormatter())
    axis.set_minor_locator(ticker.LogLocator(base=10.0, subs=(2.0, 5.0), numticks=8))
    axis.set_minor_formatter(SubDecadeFormatter())


def set_band(band, t, lo, hi):
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
    return (f"<span style='display:inline-block;white-space:nowrap;margin-right:1em;font-size:85%'>"
            f"{swatch} {label}</span>")


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
        self.canvas._force_full = True  # a full frame follows this draw (see the module's docstring)
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
            self.canvas._force_full = True
            self.canvas.blit(self.fig.bbox)
            self.blits += 1
        elif self.fast and not getattr(self.canvas, "syncing_data_url", True):
            # a browser shows the canvas: render now and send the frame, without the round trip of a
            # redraw request to the browser and back (before the browser is there, it asks for frames)
            self._background = None
            self.canvas.draw()
        else:  # from a background thread, or a plot redrawn on demand: let the browser ask for the frame
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
        self.legend.value = ("<div style='white-space:normal;line-height:1.5'>"
                             + "".join(_legend_entry(h) for h in self._handles()) + "</div>")

    def _handles(self):
        handles = [h for h in self.ax.get_lines() if h.get_visible() and not h.get_label().startswith("_")]
        handles += [c for c in self.ax.collections if c.get_visible() and not c.get_label().startswith("_")]
        return handles

    # --- export -------------------------------------------------------------------
    def save(self, path, dpi: float | None = None) -> str:
        """Write the figure, with a legend, as PNG/SVG/PDF by suffix (atomically). Returns the path."""
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

    def curves(self) -> list:
        """Every visible labelled curve: ``[(label, xlabel, ylabel, x, y)]`` (for the CSV export)."""
        out = []
        xl, yl = self.ax.get_xlabel(), self.ax.get_ylabel()
        for line in self.ax.get_lines():
            label = str(line.get_label())
            if not line.get_visible() or label.startswith("_"):
                continue
            x = np.asarray(line.get_xdata(), float)
            y = np.asarray(line.get_ydata(), float)
            if x.size < 2 or x.size != y.size:
                continue  # markers such as "grain size now" are not curves
            out.append((label, xl, yl, x, y))
        return out

    def export_name(self, sample: str | None, suffix: str) -> str:
        """A file name that follows the figure and the sample: ``kappa_T-sample_A.png``."""
        parts = [self.file_stem] + ([_slug(sample)] if sample else [])
        return "-".join(p for p in parts if p) + "." + suffix.lstrip(".")

    file_stem = "figure"

    def close(self):
        self.legend.close()
        self.widget.close()
        self.canvas.close()
        if self.canvas.toolbar is not None:
            self.canvas.toolbar.close()




def _slug(text: str) -> str:
    """A file-name-safe form of a label (letters, digits, '-', '_', '.')."""
    s = re.sub(r"[^A-Za-z0-9._-]+", "_", str(text)).strip("_.")
    return s[:60]
