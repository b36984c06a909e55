"""The workbench's live plots: conductivity against temperature, scattering rates,
spectral conductivity and heat carried by mean free path.

Plots are told numbers; they compute none (the workbench asks the engine).
"""
from __future__ import annotations

import numpy as np

from .figures import PER_S as _PER_S
from .figures import W_UNIT as _W_UNIT
from .figures import Plot, decade_limits
from .figures import light_log_axis as _light_log_axis
from .figures import positive_or_nan as _positive_or_nan
from .figures import set_band as _set_band
from .style import (
    PART_COLOURS,
    branch_style,
    branch_title,
    mechanism_colour,
    mechanism_title,
)

__all__ = ["SAMPLE_COLOURS", "AccumulationPlot", "ConductivityPlot", "RatesPlot", "SpectrumPlot"]

#: colours of the samples of a series (one each, in series order; apart from the model parts' colours)
SAMPLE_COLOURS = ("#2ca02c", "#d62728", "#17becf", "#8c564b", "#e377c2", "#bcbd22", "#393b79", "#637939")


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
        "floor": "minimum (Cahill-Watson-Pohl)",
    }

    file_stem = "kappa_T"

    def __init__(self, width: float = 4.7, height: float = 3.1):
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
        self.samples: list = []  # measured points of the other samples of a series (made when needed)
        (ml,) = ax.plot([], [], ls="none", marker="s", ms=3.5, color=PART_COLOURS["measured_lattice"],
                        label="measured minus electronic")
        self.measured_lattice = self.dynamic(ml)
        self.marker = self.dynamic(ax.axvline(300.0, color="#999999", lw=0.8, ls=(0, (2, 3)), label="_marker"))
        for a in (*self.lines.values(), self.measured, self.measured_lattice):
            a.set_visible(False)

    def update(self, temperature, parts: dict, *, measured=None, measured_lattice=None,
               band=None, marker=None, measured_label: str | None = None, samples=(),
               measured_colour: str | None = None):
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
        samples : sequence of (label, T [K], kappa [W/m/K], colour)
            Measured points of the other samples of a series, one colour each.
        measured_colour : str, optional
            Colour of the measured points (the fitted sample's colour in a series).
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
        self.measured.set_color(measured_colour or PART_COLOURS["measured"])
        samples = list(samples or ())
        while len(self.samples) < len(samples):
            (line,) = self.ax.plot([], [], ls="none", marker="^", ms=3.5, mfc="none")
            self.samples.append(self.dynamic(line))
        for i, line in enumerate(self.samples):
            if i < len(samples):
                lab, t, k, colour = samples[i]
                line.set_data(np.asarray(t, float), _positive_or_nan(k))
                line.set_color(colour)
                line.set_label(str(lab))
                line.set_visible(True)
            else:
                line.set_visible(False)
                line.set_data([], [])
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
            self.measured.get_label(), self.measured.get_color(),
            tuple((str(s[0]), s[3]) for s in samples))
        self._legend(vis, loc="best")
        self.stale = False
        self.redraw()


class RatesPlot(Plot):
    """Relaxation rate of each mechanism against angular frequency at one temperature (log-log)."""

    file_stem = "scattering_rates"

    def __init__(self, width: float = 4.7, height: float = 3.1):
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

    file_stem = "spectral_kappa"

    def __init__(self, width: float = 4.7, height: float = 3.1):
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

    file_stem = "kappa_by_mean_free_path"

    def __init__(self, width: float = 4.7, height: float = 3.1):
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


