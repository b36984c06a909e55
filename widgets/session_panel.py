"""Save and export: the session as a fit record, figures as PNG, tables as CSV.

A session is saved as a fit record (:func:`kinetic.records.save_record`): the
data, the fitted model, the fitted values with their uncertainties and the fit
options. Loading a record (:func:`kinetic.records.load_record`) puts its data
and fitted model back into the workbench. Every file is written atomically
(a temporary file in the same folder, then renamed), so an interrupted save
never leaves half a file.
"""
from __future__ import annotations

import csv
import io
import os
from pathlib import Path

import numpy as np
import ipywidgets as ipw

from kinetic.errors import FitError, ParameterError

from .fit_panel import result_rows
from .style import css

__all__ = ["SessionPanel", "table_csv", "write_text_atomic"]


def write_text_atomic(path, text: str) -> Path:
    """Write text atomically (temporary file in the same folder, then ``os.replace``)."""
    from kinetic.records import atomic_write_text

    return atomic_write_text(path, text)


def table_csv(header, rows) -> str:
    """CSV text with a header row; floats written with ``repr`` (they read back exactly)."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(header)
    for r in rows:
        w.writerow([repr(float(v)) if isinstance(v, (float, np.floating)) else v for v in r])
    return buf.getvalue()


class SessionPanel(ipw.VBox):
    """Save or load the session (fit record); export a figure (PNG) or a table (CSV).

    Attributes
    ----------
    record_path : ipw.Text
    save_button, load_button : ipw.Button
    figure_choice : ipw.Dropdown
    figure_path : ipw.Text
    export_figure_button : ipw.Button
    table_choice : ipw.Dropdown
    table_path : ipw.Text
    export_table_button : ipw.Button
    status : ipw.HTML
        What was written or read (CSS ``kinetic-session-status``).
    """

    def __init__(self, workbench):
        self.wb = workbench
        g = workbench.messages.guard
        wide = ipw.Layout(width="26em")
        self.record_path = ipw.Text(value="fit_record.json", description="record file",
                                    style={"description_width": "7em"}, layout=wide)
        self.save_button = ipw.Button(description="Save the fit", icon="save", layout=ipw.Layout(width="10em"))
        self.load_button = ipw.Button(description="Load a record", icon="folder-open",
                                      layout=ipw.Layout(width="10em"))
        self.save_button.add_class(css("save-record"))
        self.load_button.add_class(css("load-record"))
        self.save_button.on_click(g(lambda _b: self.save_record()))
        self.load_button.on_click(g(lambda _b: self.load_record()))
        self.figure_choice = ipw.Dropdown(options=self._figure_options(), description="figure",
                                          style={"description_width": "7em"}, layout=ipw.Layout(width="20em"))
        self.figure_path = ipw.Text(value="kappa_T.png", description="PNG file",
                                    style={"description_width": "7em"}, layout=wide)
        self.export_figure_button = ipw.Button(description="Export figure", icon="image",
                                               layout=ipw.Layout(width="10em"))
        self.export_figure_button.add_class(css("export-figure"))
        self.export_figure_button.on_click(g(lambda _b: self.export_figure()))
        self.table_choice = ipw.Dropdown(options=[("model \u03ba(T) curve", "model"),
                                                  ("data and model at the measured temperatures", "data"),
                                                  ("fitted parameters", "fit"),
                                                  ("grain-size study", "grain"),
                                                  ("alloy study", "alloy"),
                                                  ("zT study", "zt")],
                                         description="table", style={"description_width": "7em"},
                                         layout=ipw.Layout(width="26em"))
        self.table_path = ipw.Text(value="kappa_T.csv", description="CSV file",
                                   style={"description_width": "7em"}, layout=wide)
        self.export_table_button = ipw.Button(description="Export table", icon="table",
                                              layout=ipw.Layout(width="10em"))
        self.export_table_button.add_class(css("export-table"))
        self.export_table_button.on_click(g(lambda _b: self.export_table()))
        self.status = ipw.HTML()
        self.status.add_class(css("session-status"))
        super().__init__([
            ipw.HTML("<b>Session</b>: the last fit with its data and model, as a JSON fit record."),
            ipw.HBox([self.record_path, self.save_button, self.load_button]),
            ipw.HTML("<b>Export</b>"),
            ipw.HBox([self.figure_choice]), ipw.HBox([self.figure_path, self.export_figure_button]),
            ipw.HBox([self.table_choice]), ipw.HBox([self.table_path, self.export_table_button]),
            self.status])
        self.add_class(css("session-panel"))

    def _figure_options(self):
        opts = [("\u03ba(T)", "conductivity"), ("scattering rates", "rates"), ("spectrum", "spectrum"),
                ("mean free path", "mfp")]
        opts += [("what-if: grain size", "grain"), ("what-if: alloying", "alloy"),
                 ("what-if: map", "map"), ("what-if: zT", "zt")]
        return opts

    def _say(self, text: str):
        self.status.value = text
        self.wb.messages.info(text)

    # --- records --------------------------------------------------------------------
    def save_record(self, path=None) -> Path:
        """Save the last fit (data, fitted model, values, uncertainties) as a JSON record."""
        from kinetic.fitting import FitResult
        from kinetic.records import save_record

        res = self.wb.result
        if res is None:
            raise FitError("nothing to save yet: a record holds a fit, so run a fit first")
        if not isinstance(res, FitResult):
            raise FitError(f"this fit was loaded from the record {getattr(res, 'path', '')}, where it is "
                           "already saved; refit to save a new record")
        path = Path(path if path is not None else self.record_path.value.strip() or "fit_record.json")
        src = self.wb.data.source if self.wb.data is not None else None
        out = save_record(path, res, data_path=src if src and os.path.isfile(src) else None)
        self._say(f"Saved the fit record to {out.resolve()}.")
        return out

    def load_record(self, path=None):
        """Load a record: its data, fitted model and fit results replace the session's."""
        from kinetic.records import load_record

        path = Path(path if path is not None else self.record_path.value.strip())
        rec = load_record(path)
        self.wb.load_record(rec)
        changed = rec.data_changed()
        extra = f" Note: the data file of {', '.join(changed)} changed since the fit." if changed else ""
        self._say(f"Loaded the fit record {path.resolve()}.{extra}")
        return rec

    # --- exports --------------------------------------------------------------------
    def _plot(self, which):
        if which in self.wb.plots:
            self.wb.update_plot(which)
            return self.wb.plots[which]
        panel = getattr(self.wb, "whatif_panel", None)
        if panel is not None and which in panel.plots:
            if which not in panel.last:
                raise ParameterError(f"the what-if '{which}' study has not been computed yet; press "
                                     "'Update what-ifs' first")
            return panel.plots[which]
        raise ParameterError(f"unknown figure {which!r}")

    def export_figure(self, which=None, path=None) -> Path:
        """Write a figure as PNG (atomically). Returns the path."""
        which = which or self.figure_choice.value
        path = Path(path if path is not None else self.figure_path.value.strip() or f"{which}.png")
        if path.suffix.lower() != ".png":
            raise ParameterError(f"figure file {str(path)!r}: expected a name ending in .png")
        out = Path(self._plot(which).save(path))
        self._say(f"Saved the figure to {out.resolve()}.")
        return out

    def table(self, which: str):
        """(header, rows) of a table: "model", "data", "fit", "grain", "alloy" or "zt"."""
        wb = self.wb
        if which == "model":
            T = wb.temperatures
            k = wb.model.kappa(T)
            floor = wb.floor(T)
            header = ["T [K]", "kappa_lattice_model [W/(m K)]"]
            cols = [T, k]
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
                ke = np.full(T.shape, np.nan)
                kl = np.full(T.shape, np.nan)
                ke[el.kept] = el.kappa_electronic
                kl[el.kept] = el.kappa
                header += ["kappa_electronic [W/(m K)]", "kappa_lattice_measured [W/(m K)]"]
                cols += [ke, kl]
            header.append("kappa_lattice_model [W/(m K)]")
            cols.append(wb.model.kappa(T))
            return header, list(zip(*[np.asarray(c, float) for c in cols]))
        if which == "fit":
            if wb.result is None:
                raise FitError("no fit yet; run a fit first")
            header = ["parameter", "value", "stderr", "lower_95", "upper_95", "unit", "flag"]
            return header, [[r["name"], r["value"], r["stderr"], r["lower"], r["upper"], r["unit"], r["flag"]]
                            for r in result_rows(wb.result)]
        panel = getattr(wb, "whatif_panel", None)
        last = panel.last if panel is not None else {}
        if which not in last:
            raise ParameterError(f"the what-if '{which}' study has not been computed yet; press "
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
        path = Path(path if path is not None else self.table_path.value.strip() or f"{which}.csv")
        if path.suffix.lower() != ".csv":
            raise ParameterError(f"table file {str(path)!r}: expected a name ending in .csv")
        header, rows = self.table(which)
        out = write_text_atomic(path, table_csv(header, rows))
        self._say(f"Saved the table to {out.resolve()}.")
        return out

    def close_all(self):
        self.close()
