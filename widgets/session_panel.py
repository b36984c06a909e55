"""Save and export: the session as a fit record, figures as PNG (300 dpi) / SVG / PDF, curves as CSV.

A session is saved as a fit record (:func:`kinetic.save_record`): exactly the
fit the results table shows, and only while it is current (a stale fit must be
refit first). Loading a record (:func:`kinetic.load_record`) puts its data,
fitted model and results back. File names follow the figure and the sample
(``kappa_T-sample_A.png``); every file is written atomically by the engine's
helper, with the permissions the user's umask gives.
"""
from __future__ import annotations

import csv
import io
import os
from pathlib import Path

import ipywidgets as ipw
import numpy as np

from . import _engine
from ._engine import FitError, ParameterError
from .figures import EXPORT_FORMATS, _slug, curves_csv
from .fit_panel import result_rows
from .style import css, esc

__all__ = ["SessionPanel", "table_csv", "write_text_atomic"]


def write_text_atomic(path, text: str) -> Path:
    """Write text atomically (the engine's helper); returns the path."""
    return Path(_engine.atomic_write(path, text))


def table_csv(header, rows) -> str:
    """CSV text with a header row; floats written with ``repr`` (they read back exactly)."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(header)
    for r in rows:
        w.writerow([repr(float(v)) if isinstance(v, (float, np.floating)) else v for v in r])
    return buf.getvalue()


class SessionPanel(ipw.VBox):
    """Save or load the session (fit record); export a figure and its curves, or a table.

    Attributes
    ----------
    folder : ipw.Text
        Folder the files go to.
    record_path : ipw.Text
    save_button, load_button : ipw.Button
    figure_choice, format_choice : ipw.Dropdown
    export_figure_button, export_curves_button : ipw.Button
    table_choice : ipw.Dropdown
    export_table_button : ipw.Button
    status : ipw.HTML
    """

    def __init__(self, workbench):
        self.wb = workbench
        g = workbench.messages.guard
        lab = {"style": {"description_width": "6em"}}
        self.folder = ipw.Text(value=".", description="folder", layout=ipw.Layout(width="24em"), **lab)
        self.record_path = ipw.Text(value="", description="record file", layout=ipw.Layout(width="24em"), **lab)
        self.save_button = ipw.Button(description="Save the fit", icon="save", layout=ipw.Layout(width="auto"))
        self.load_button = ipw.Button(description="Load a record", icon="folder-open", layout=ipw.Layout(width="auto"))
        self.save_button.add_class(css("save-record"))
        self.load_button.add_class(css("load-record"))
        self.save_button.on_click(g(lambda _b: self.save_record()))
        self.load_button.on_click(g(lambda _b: self.load_record()))
        self.figure_choice = ipw.Dropdown(options=[], description="figure", layout=ipw.Layout(width="24em"), **lab)
        self.figure_choice.add_class(css("export-which"))
        self.format_choice = ipw.Dropdown(options=[("PNG, 300 dpi", "png"), ("SVG", "svg"), ("PDF", "pdf")],
                                          description="format", layout=ipw.Layout(width="14em"), **lab)
        self.format_choice.add_class(css("export-format"))
        self.export_figure_button = ipw.Button(description="Export figure", icon="image", layout=ipw.Layout(width="auto"))
        self.export_figure_button.add_class(css("export-figure"))
        self.export_figure_button.on_click(g(lambda _b: self.export_figure()))
        self.export_curves_button = ipw.Button(description="Export its curves (CSV)", icon="table",
                                               layout=ipw.Layout(width="auto"))
        self.export_curves_button.add_class(css("export-curves"))
        self.export_curves_button.on_click(g(lambda _b: self.export_curves()))
        self.table_choice = ipw.Dropdown(options=[("model \u03ba(T) curve", "model"),
                                                  ("data and model at the measured temperatures", "data"),
                                                  ("fitted parameters", "fit"), ("grain-size study", "grain"),
                                                  ("alloy study", "alloy"), ("zT study", "zt")],
                                         description="table", layout=ipw.Layout(width="24em"), **lab)
        self.export_table_button = ipw.Button(description="Export table (CSV)", icon="table",
                                              layout=ipw.Layout(width="auto"))
        self.export_table_button.add_class(css("export-table"))
        self.export_table_button.on_click(g(lambda _b: self.export_table()))
        self.status = ipw.HTML()
        self.status.add_class(css("session-status"))
        super().__init__([
            ipw.HTML("<b>Session</b>: the fit in the table, with its data and model, as a JSON fit record."),
            self.folder, self.record_path, ipw.HBox([self.save_button, self.load_button]),
            ipw.HTML("<b>Export</b>: file names follow the figure and the sample."),
            self.figure_choice, self.format_choice,
            ipw.HBox([self.export_figure_button, self.export_curves_button], layout=ipw.Layout(flex_flow="row wrap")),
            self.table_choice, self.export_table_button, self.status])
        self.add_class(css("session-panel"))

    # --- state --------------------------------------------------------------------------
    def _sample(self) -> str:
        ds = self.wb.data
        return (getattr(ds, "label", "") or "") if ds is not None else ""

    def inputs_changed(self):
        """Follow the workbench: figures on offer, the record's name, Save only for a current fit."""
        opts = list(self.wb.figure_choice.options)
        if list(self.figure_choice.options) != opts:
            self.figure_choice.options = opts
        if self.figure_choice.value is None or self.figure_choice.value not in dict(opts).values():
            self.figure_choice.value = self.wb.figure_choice.value
        self.save_button.disabled = not isinstance(self.wb.state.current_fit, _engine.FitResult)
        name = "fit-" + (_slug(self._sample()) or "sample") + ".json"
        if self.record_path.value in ("",) or self.record_path.value.startswith("fit-"):
            self.record_path.value = name

    def _path(self, name) -> Path:
        return Path(self.folder.value.strip() or ".") / name

    def _say(self, text: str):
        self.status.value = esc(text)
        self.wb.messages.info(text)

    # --- records --------------------------------------------------------------------------
    def save_record(self, path=None) -> Path:
        """Save the fit the table shows (only when current) as a JSON record."""
        state = self.wb.state
        if state.fit is None:
            raise FitError("nothing to save yet: a record holds a fit, so run a fit first")
        res = state.current_fit
        if res is None:
            raise FitError("the fit in the table is stale (its data or model changed); press Fit to refresh "
                           "it before saving")
        if not isinstance(res, _engine.FitResult):
            raise FitError(f"this fit was loaded from the record {getattr(res, 'path', '')}, where it is already "
                           "saved; refit to save a new record")
        path = Path(path) if path is not None else self._path(self.record_path.value.strip() or "fit.json")
        src = res.data.source if res.data is not None else None
        out = _engine.save_record(path, res, data_path=src if src and os.path.isfile(src) else None)
        self._say(f"Saved the fit record to {Path(out).resolve()}.")
        return Path(out)

    def load_record(self, path=None):
        """Load a record: its data, fitted model and fit results replace the session's."""
        path = Path(path) if path is not None else self._path(self.record_path.value.strip())
        rec = _engine.load_record(path)
        self.wb.load_record(rec)
        changed = rec.data_changed()
        extra = f" Note: the data file of {', '.join(changed)} changed since the fit." if changed else ""
        self._say(f"Loaded the fit record {path.resolve()}.{extra}")
        return rec

    # --- exports ----------------------------------------------------------------------------
    def _plot(self, which):
        if which in self.wb.plots:
            self.wb.update_plot(which)
            return self.wb.plots[which]
        panel = self.wb.whatif_panel
        if which in panel.plots:
            if which not in panel.last:
                raise ParameterError(f"the what-if study '{panel.TITLES[which]}' has not been computed yet; "
                                     "press 'Update what-ifs' first")
            return panel.plots[which]
        raise ParameterError(f"unknown figure {which!r}")

    def figure_name(self, which=None, fmt=None) -> str:
        """File name of a figure export: the figure's name and the sample's."""
        which = which or self.figure_choice.value
        return self._plot(which).export_name(self._sample(), fmt or self.format_choice.value)

    def export_figure(self, which=None, path=None, fmt=None) -> Path:
        """Write a figure as PNG (300 dpi), SVG or PDF (atomically). Returns the path."""
        which = which or self.figure_choice.value
        fmt = fmt or (Path(path).suffix.lstrip(".").lower() if path is not None else self.format_choice.value)
        if fmt not in EXPORT_FORMATS:
            raise ParameterError(f"figure file {str(path)!r}: expected a name ending in "
                                 f"{', '.join('.' + f for f in EXPORT_FORMATS)}")
        path = Path(path) if path is not None else self._path(self.figure_name(which, fmt))
        out = Path(self._plot(which).save(path))
        self._say(f"Saved the figure to {out.resolve()}.")
        return out

    def export_curves(self, which=None, path=None) -> Path:
        """Write every curve plotted in a figure as CSV. Returns the path."""
        which = which or self.figure_choice.value
        plot = self._plot(which)
        curves = plot.curves()
        if not curves:
            raise ParameterError("this figure has no curves to export yet")
        path = Path(path) if path is not None else self._path(plot.export_name(self._sample(), "csv"))
        out = write_text_atomic(path, curves_csv(curves))
        self._say(f"Saved {len(curves)} curve(s) to {out.resolve()}.")
        return out

    def table(self, which: str):
        """(header, rows) of a table: "model", "data", "fit", "grain", "alloy" or "zt"."""
        wb = self.wb
        if which == "model":
            T = wb.temperatures
            header = ["T [K]", "kappa_lattice_model [W/(m K)]"]
            cols = [T, wb.parts(T).lattice]
            floor = wb.floor(T)
            if floor is not None:
                header.append("kappa_min_cahill [W/(m K)]")
                cols.append(floor)
            return header, list(zip(*[np.asarray(c, float) for c in cols]))
        if which == "data":
            ds = wb.data
            if ds is None:
                raise ParameterError("no measured data to export")
            T = ds.temperature
            header = ["T [K]", "kappa_measured [W/(m K)]"]
            cols = [T, ds.kappa]
            if ds.kappa_err is not None:
                header.append("kappa_err [W/(m K)]")
                cols.append(ds.kappa_err)
            el = wb.electronic()
            if el is not None:
                # points where the subtraction left kappa_lattice <= 0 are not used: nan there
                ke, kl = np.full(T.shape, np.nan), np.full(T.shape, np.nan)
                ke[el[3]], kl[el[3]] = el[1], el[2]
                header += ["kappa_electronic [W/(m K)]", "kappa_lattice_measured [W/(m K)]"]
                cols += [ke, kl]
            header.append("kappa_lattice_model [W/(m K)]")
            cols.append(wb.parts(T).lattice)
            return header, list(zip(*[np.asarray(c, float) for c in cols]))
        if which == "fit":
            res = wb.state.current_fit
            if res is None:
                raise FitError("no current fit; run a fit first" if wb.state.fit is None
                               else "the fit is stale; press Fit to refresh it first")
            header = ["parameter", "key", "value", "stderr", "lower_95", "upper_95", "unit", "flag"]
            return header, [[r["label"], r["key"], r["value"], r["stderr"], r["lower"], r["upper"], r["unit"],
                             r["flag"]] for r in result_rows(res)]
        last = wb.whatif_panel.last
        if which not in last:
            raise ParameterError(f"the what-if study '{which}' has not been computed yet; press "
                                 "'Update what-ifs' first")
        r = last[which]
        if which == "grain":
            header = ["boundary_length [m]", f"kappa_lattice_at_{r.temperature[0]:g}K [W/(m K)]"]
            cols = [r.values, r.kappa[:, 0]]
            if r.lower is not None:
                header += ["lower_95 [W/(m K)]", "upper_95 [W/(m K)]"]
                cols += [r.lower[:, 0], r.upper[:, 0]]
            return header, list(zip(*[np.asarray(c, float) for c in cols]))
        if which == "alloy":
            header = ["fraction_x", "gamma", f"kappa_lattice_at_{r.temperature[0]:g}K [W/(m K)]"]
            return header, list(zip(r.fractions, r.gamma, r.kappa[:, 0]))
        if which == "zt":
            header = ["eta", "seebeck [V/K]", "sigma [S/m]", "kappa_electronic [W/(m K)]", "zT"]
            return header, list(zip(r.eta, r.seebeck, r.sigma, r.kappa_electronic, r.zt))
        raise ParameterError(f"unknown table {which!r}")

    def export_table(self, which=None, path=None) -> Path:
        """Write a table as CSV (atomically). Returns the path."""
        which = which or self.table_choice.value
        if path is None:
            path = self._path("-".join(p for p in (f"table_{which}", _slug(self._sample())) if p) + ".csv")
        path = Path(path)
        if path.suffix.lower() != ".csv":
            raise ParameterError(f"table file {str(path)!r}: expected a name ending in .csv")
        header, rows = self.table(which)
        out = write_text_atomic(path, table_csv(header, rows))
        self._say(f"Saved the table to {out.resolve()}.")
        return out

    def close_all(self):
        self.close()

