"""Fit area: choose free parameters and bounds, run the fit in the background, read the results.

The fit is the engine's (:func:`kinetic.fit` through :mod:`widgets._engine`);
this panel collects its arguments, runs it in a background thread with
progress and a Cancel button, and shows the result's report rows. Every
exception of the background thread is caught and shown: a failed fit says so
in red and leaves the previous result in place, marked as before.

The table always shows the result held in the workbench's state; when the
inputs of that fit changed (data, held values, free set, electronic choice) it
is marked stale, and "Use fitted values" and Save refuse it until it is refit.
"""
from __future__ import annotations

import logging
import math
import threading

import ipywidgets as ipw
import numpy as np

from . import _engine
from ._engine import FitError, ParameterError
from .controls import slider_range
from .style import css, esc, fmt, label_html, mechanism_colour, unit_text

__all__ = ["FitPanel", "default_free", "result_rows"]

log = logging.getLogger("widgets")


def default_free(model) -> list:
    """Free parameters ticked at first: the engine's choice."""
    return _engine.default_free(model)


def result_rows(result, level: float = 0.95) -> list:
    """Rows of the results table (the engine's report rows): dicts with key, label, value, stderr,
    lower, upper, unit, flag."""
    return _engine.report_rows(result, level)


_esc = esc


class _FreeRow:
    """Checkbox and bounds for one parameter; every change goes to the state."""

    def __init__(self, key: str, parameter, choice, kind: str, on_change):
        lo, hi = slider_range(parameter)
        ticked = False
        if choice is not None:
            ticked, lo, hi = choice
        colour = mechanism_colour(kind)
        self.key = key
        words = _engine.parameter_words(key, parameter)
        self.check = ipw.Checkbox(value=bool(ticked), indent=False, description=words,
                                  layout=ipw.Layout(width="auto", min_width="15em"), tooltip=key)
        self.check.add_class(css(f"free-{key.replace('.', '-').replace('_', '-')}"))
        self.lower = ipw.FloatText(value=lo, layout=ipw.Layout(width="7em"), tooltip=f"{key}: lower bound")
        self.upper = ipw.FloatText(value=hi, layout=ipw.Layout(width="7em"), tooltip=f"{key}: upper bound")
        swatch = ipw.HTML(f"<span style='color:{colour}'>\u25a0</span>", layout=ipw.Layout(width="1.2em"))
        unit = ipw.HTML(esc(unit_text(parameter.unit)), layout=ipw.Layout(width="auto"))
        self.widget = ipw.VBox([ipw.HBox([swatch, self.check]),
                                ipw.HBox([ipw.HTML("from", layout=ipw.Layout(width="auto", margin="0 4px 0 1.6em")),
                                          self.lower, ipw.HTML("to", layout=ipw.Layout(width="auto")),
                                          self.upper, unit])])
        for w in (self.check, self.lower, self.upper):
            w.observe(lambda _ch: on_change(self), names="value")


class FitPanel(ipw.VBox):
    """Fit the model in use to the measured data.

    Attributes
    ----------
    rows : dict
        Parameter key -> row with ``check`` (free or not), ``lower``, ``upper``.
    starts : ipw.BoundedIntText
        Number of random starts (the model's values plus a seeded spread).
    fit_button, cancel_button, use_button : ipw.Button
    progress : ipw.IntProgress
    status : ipw.HTML
    table : ipw.HTML
        The results (CSS ``kinetic-fit-table``), marked stale when its inputs changed.
    """

    def __init__(self, workbench):
        self.wb = workbench
        self.state = workbench.state
        g = workbench.messages.guard
        self._all_rows: dict = {}
        self._thread = None
        self._stop = threading.Event()
        self._shown = None  # (fit version, stale) last rendered
        self.rows_box = ipw.VBox()
        self.starts = ipw.BoundedIntText(value=4, min=1, max=64, description="random starts",
                                         style={"description_width": "initial"}, layout=ipw.Layout(width="12em"),
                                         tooltip="n_starts: the model's values plus seeded random starts")
        self.starts.add_class(css("fit-starts"))
        self.fit_button = ipw.Button(description="Fit", button_style="primary", icon="play",
                                     layout=ipw.Layout(width="auto"))
        self.fit_button.add_class(css("fit"))
        self.cancel_button = ipw.Button(description="Cancel", icon="stop", disabled=True,
                                        layout=ipw.Layout(width="auto"))
        self.cancel_button.add_class(css("fit-cancel"))
        self.use_button = ipw.Button(description="Use fitted values", disabled=True,
                                     layout=ipw.Layout(width="auto"))
        self.use_button.add_class(css("fit-use"))
        self.progress = ipw.IntProgress(value=0, min=0, max=1, layout=ipw.Layout(width="10em"))
        self.progress.add_class(css("fit-progress"))
        self.status = ipw.HTML("Tick the parameters to fit, then press Fit.")
        self.status.add_class(css("fit-status"))
        self.table = ipw.HTML()
        self.table.add_class(css("fit-table"))
        self.fit_button.on_click(g(lambda _b: self.run()))
        self.cancel_button.on_click(g(lambda _b: self.cancel()))
        self.use_button.on_click(g(lambda _b: self.use_fitted_values()))
        head = ipw.HTML("<b>Free parameters</b> (bounds in the parameter's unit)")
        super().__init__([ipw.HBox([self.fit_button, self.cancel_button, self.starts, self.progress],
                                   layout=ipw.Layout(flex_flow="row wrap")),
                          self.status, self.table, self.use_button, head, self.rows_box])
        self.add_class(css("fit-panel"))
        self.rebuild()

    # --- free-parameter rows ------------------------------------------------------
    def rebuild(self):
        """Rows for every free parameter of the full model (after a change of structure); the
        choices come from the state, so a mechanism switched off and on keeps them."""
        full = self.wb.full_model
        if not self.state.free:
            info = self.wb.model.parameter_info()
            for k in default_free(self.wb.model):
                lo, hi = slider_range(info[k])
                self.state.free[k] = (True, lo, hi)
        rows = {}
        for m in full.scattering:
            for p, par in m.parameters.items():
                if not par.fixed:
                    key = f"{m.name}.{p}"
                    rows[key] = _FreeRow(key, par, self.state.free.get(key), m.kind, self._row_changed)
        for r in self._all_rows.values():
            r.widget.close()
        self._all_rows = rows
        self.rows_box.children = [r.widget for r in rows.values()]
        self.sync()

    def sync(self):
        """Show the rows of the mechanisms switched on (a switch changes no widget but these)."""
        on = set(self.wb.model.mechanism_names)
        for key, r in self._all_rows.items():
            want = None if key.split(".", 1)[0] in on else "none"
            if r.widget.layout.display != want:
                r.widget.layout.display = want

    @property
    def rows(self) -> dict:
        """Parameter key -> row, for the mechanisms switched on."""
        on = set(self.wb.model.mechanism_names)
        return {k: r for k, r in self._all_rows.items() if k.split(".", 1)[0] in on}

    def _row_changed(self, row):
        self.state.set_free(row.key, row.check.value, row.lower.value, row.upper.value)
        self.inputs_changed()

    @property
    def free(self) -> list:
        return [k for k, r in self.rows.items() if r.check.value]

    @property
    def bounds(self) -> dict:
        return {k: (float(r.lower.value), float(r.upper.value)) for k, r in self.rows.items() if r.check.value}

    def set_free(self, names) -> None:
        """Tick exactly these parameters."""
        names = set(names)
        unknown = names - set(self.rows)
        if unknown:
            raise ParameterError(f"cannot fit {sorted(unknown)[0]!r}: not a free parameter of the mechanisms "
                                 f"switched on ({', '.join(self.rows)})")
        for k, r in self.rows.items():
            r.check.value = k in names

    # --- running ------------------------------------------------------------------
    @property
    def running(self) -> bool:
        return self._thread is not None and self._thread.is_alive()

    @property
    def result(self):
        """The fit result in the table (current or stale), or None."""
        return self.wb.result

    def run(self, blocking: bool = False):
        """Start the fit (in a background thread unless ``blocking``). Returns the thread or the result."""
        if self.running:
            raise FitError("a fit is already running; wait for it or press Cancel")
        free = self.free
        if not free:
            raise FitError("no parameter is ticked as free; tick at least one to fit")
        data = self.wb.data
        if data is None:
            raise FitError("no measured data to fit; upload a table or use the demo data")
        model = self.wb.model
        bounds = self.bounds
        n_starts = int(self.starts.value)
        split = bool(self.wb.electronic_on.value)
        method = self.wb.lorenz_choice.value
        inputs = self.state.fit_inputs()
        self._stop.clear()
        self.progress.max = n_starts
        self.progress.value = 0
        self.progress.bar_style = "info"
        self.status.value = f"Fitting {len(free)} parameter(s) with {n_starts} random start(s)\u2026"
        self.fit_button.disabled = True
        self.cancel_button.disabled = False
        outcome = {}

        def work():
            if not blocking:
                self.wb.in_background()
            try:
                res = _engine.fit(model, data, free, bounds=bounds, lorenz_method=method, n_starts=n_starts,
                                  progress=self._progress, should_stop=self._stop.is_set,
                                  split_electronic=split)
                self._finished(res, inputs)
                outcome["result"] = res
            except BaseException as exc:  # noqa: BLE001 - every background failure is shown, never lost
                outcome["error"] = exc
                try:
                    self._failed(exc)
                except Exception:
                    log.exception("could not show a failed fit")
            finally:
                self.fit_button.disabled = False
                self.cancel_button.disabled = True

        if blocking:
            work()
            if "error" in outcome and not _cancelled_early(outcome["error"]):
                raise outcome["error"]
            return outcome.get("result")
        self._thread = threading.Thread(target=work, name="kinetic-fit", daemon=True)
        self._thread.start()
        return self._thread

    def join(self, timeout: float | None = None) -> None:
        """Wait for a background fit to end."""
        if self._thread is not None:
            self._thread.join(timeout)

    def cancel(self) -> None:
        """Ask the running fit to stop (the best finished start is kept)."""
        if self.running:
            self._stop.set()
            self.status.value = "Cancelling\u2026"

    def _progress(self, i, n, best_cost):
        self.progress.max = int(n)
        self.progress.value = int(i)
        self.status.value = (f"Random start {int(i)} of {int(n)} done; best \u03c7\u00b2 so far "
                             f"{fmt(2.0 * best_cost)}.")

    def _failed(self, exc):
        if _cancelled_early(exc):
            self.progress.bar_style = "warning"
            self.status.value = "Fit cancelled before the first start finished; nothing new to show."
            return
        self.progress.bar_style = "danger"
        self.status.value = ("<span style='color:#b00020'><b>The fit failed</b>: "
                             f"{esc(' '.join(str(exc).split()) or type(exc).__name__)}. "
                             "The table still shows the previous result, if any.</span>")
        self.wb.messages.error(exc if isinstance(exc, Exception) else RuntimeError(str(exc)))

    def _finished(self, res, inputs):
        self.state.set_fit(res, inputs)
        cancelled = bool(res.flags.cancelled)
        ok = bool(res.success) and not cancelled
        self.progress.bar_style = "warning" if cancelled or not ok else "success"
        word = "stopped early (cancelled)" if cancelled else ("done" if ok else "ended without converging")
        self.status.value = (f"Fit {word}: {res.n_points} points, {res.n_free} free, {len(res.starts)} random "
                             f"start(s), {res.nfev} evaluations, {res.elapsed:.2f} s.")
        self.wb.fit_finished(res)
        self.inputs_changed(force=True)

    # --- results ------------------------------------------------------------------
    def inputs_changed(self, force: bool = False) -> None:
        """Show the state's fit: mark it stale (and lock its buttons) when its inputs changed."""
        fit = self.state.fit
        if fit is None:
            key = None
        else:
            key = (fit.version, self.state.fit_stale)
        if key == self._shown and not force:
            return
        self._shown = key
        if fit is None:
            self.table.value = ""
            self.use_button.disabled = True
            self.table.remove_class(css("stale"))
            return
        stale = key[1]
        banner = ("<div class='kinetic-stale-note' style='color:#8a4b00;background:#fff4e0;padding:2px 6px'>"
                  "<b>Stale</b>: the data, held values, free set or electronic choice changed since this fit; "
                  "press Fit to refresh it. It cannot be applied or saved as it is.</div>") if stale else ""
        self.table.value = banner + self.render(fit.value, stale=stale)
        (self.table.add_class if stale else self.table.remove_class)(css("stale"))
        self.use_button.disabled = stale or not hasattr(fit.value, "values")

    def render(self, res, stale: bool = False) -> str:
        """HTML table of a result: the engine's report rows, with uncertainties, intervals, flags."""
        kinds = {m.name: m.kind for m in self.wb.full_model.scattering}
        rows = []
        for r in result_rows(res):
            key = r["key"]
            colour = mechanism_colour(kinds.get(key.split(".", 1)[0], key.split(".", 1)[0]))
            v, e = r["value"], r["stderr"]
            rel = e / abs(v) if v and math.isfinite(e) else math.inf
            pm = f"\u00b1 {fmt(e, 2)}" + (f" ({100 * rel:.1f}%)" if math.isfinite(rel) else "")
            lo, hi = r["lower"], r["upper"]
            interval = (f"{fmt(lo, 3)} \u2013 {fmt(hi, 3)}" if math.isfinite(lo) and math.isfinite(hi)
                        else "not determined")
            flag = f"<b style='color:#b00020'>{esc(r['flag'])}</b>" if r["flag"] else ""
            rows.append(f"<tr><td><span style='color:{colour}'>\u25a0</span> "
                        f"{label_html(r['label'], '', key)}</td>"
                        f"<td style='text-align:right;white-space:nowrap'>{fmt(v)}</td>"
                        f"<td style='white-space:nowrap'>{pm}</td><td>{interval}</td>"
                        f"<td>{esc(unit_text(r['unit']))}</td><td>{flag}</td></tr>")
        words = {r["key"]: r["label"] for r in result_rows(res)}
        warn = []
        for a, b, rr in res.flags.correlated:
            warn.append(f"{esc(words.get(a, a))} and {esc(words.get(b, b))} are strongly correlated "
                        f"(r = {rr:+.2f}): the data fix a combination of the two rather than each one.")
        for n in res.flags.at_bound:
            warn.append(f"{esc(words.get(n, n))} sits at a bound: the bound, not the data, set it (no interval); "
                        "widen the bound or fix the parameter.")
        for n in res.flags.unidentified:
            warn.append(f"{esc(words.get(n, n))} is not determined by these data.")
        if res.flags.not_converged:
            warn.append("The optimiser stopped at its evaluation limit; try more random starts or fewer "
                        "free parameters.")
        if res.flags.cancelled:
            warn.append("The fit was cancelled; the best finished start is shown.")
        stats = (f"\u03c7\u00b2 = {fmt(res.chi2)}, reduced \u03c7\u00b2 = {fmt(res.reduced_chi2, 3)}, "
                 f"rms deviation {100 * float(np.sqrt(np.mean(np.square(res.relative_residuals)))):.2f}%, "
                 f"AIC = {fmt(res.aic)}, BIC = {fmt(res.bic)}")
        stats += (f"; scatter estimated from the residuals ({100 * res.scatter:.2f}%)" if res.scatter_estimated
                  else "; weights from the stated errors")
        style = "opacity:0.55;" if stale else ""
        html = ("<style>.kinetic-fit-table td, .kinetic-fit-table th {padding: 1px 6px; line-height: 1.35}"
                ".kinetic-fit-table .widget-html-content {line-height: 1.35; white-space: normal}</style>"
                f"<table style='border-collapse:collapse;font-size:90%;{style}'>"
                "<tr style='border-bottom:1px solid #999'><th style='text-align:left'>parameter</th><th>value</th>"
                "<th>uncertainty (1\u03c3)</th><th>95% interval</th><th>unit</th><th></th></tr>"
                + "".join(rows) + "</table>" f"<div style='font-size:88%;margin-top:4px;{style}'>{stats}</div>")
        if res.n_free > 1:
            limit = _engine.correlation_limit()
            names = list(res.names)
            cells = "".join(f"<th title='{esc(n)}'>{esc(words.get(n, n))}</th>" for n in names)
            body = ""
            for i, n in enumerate(names):
                tds = ""
                for j in range(len(names)):
                    c = float(res.correlation[i, j])
                    strong = i != j and abs(c) > limit
                    tds += (f"<td style='text-align:right;{'color:#b00020;font-weight:bold' if strong else ''}'>"
                            f"{c:+.2f}</td>")
                body += f"<tr><td title='{esc(n)}'>{esc(words.get(n, n))}</td>{tds}</tr>"
            html += ("<details style='font-size:88%'><summary>correlation matrix</summary>"
                     f"<table><tr><td></td>{cells}</tr>{body}</table></details>")
        if warn:
            html += ("<ul style='color:#b00020;font-size:88%;margin:4px 0'>"
                     + "".join(f"<li>{w}</li>" for w in warn) + "</ul>")
        notes = [str(n) for n in list(res.flags.notes) + list(getattr(res, "notes", []) or [])]
        if notes:
            html += "<div style='color:#555;font-size:85%'>" + "<br>".join(esc(n) for n in notes) + "</div>"
        return html

    def use_fitted_values(self) -> None:
        """Move the sliders to the fitted values of the current fit."""
        res = self.state.current_fit
        if res is None:
            raise FitError("no current fit to apply: " + ("the fit is stale, press Fit to refresh it"
                                                          if self.state.fit is not None else "press Fit first"))
        values = {k: v for k, v in res.values.items() if k in self.wb.full_model.params}
        self.wb.set_values(values)
        self.wb.messages.info("Sliders set to the fitted values.")

    def show_result(self, res) -> None:
        """Show a result obtained elsewhere (a loaded record) as current."""
        self.state.set_fit(res, self.state.fit_inputs())
        self.status.value = "Showing a saved fit."
        self.progress.bar_style = ""
        self.wb.fit_finished(res)
        self.inputs_changed(force=True)

    def close_all(self):
        self._stop.set()
        for r in self._all_rows.values():
            r.widget.close()
        self.close()


def _cancelled_early(exc) -> bool:
    return isinstance(exc, FitError) and "cancel" in str(exc).lower()
