"""Fit area: choose free parameters and bounds, run the fit in the background, read the results.

The fit itself is :func:`kinetic.fitting.fit`; this panel collects its
arguments from the controls, runs it in a background thread (so the notebook
stays responsive), shows progress through the fitter's ``progress`` callback,
stops it through ``should_stop`` (the Cancel button), and lays out the
:class:`~kinetic.fitting.FitResult`: values with +/- uncertainties and 95%
intervals, correlation warnings and parameters at a bound. "Use fitted
values" moves the sliders to the fitted values.
"""
from __future__ import annotations

import math
import threading

import numpy as np
import ipywidgets as ipw

from kinetic.errors import FitError, ParameterError

from .controls import slider_range
from .style import css, fmt, mechanism_colour

__all__ = ["FitPanel", "result_rows", "default_free"]


def default_free(model) -> list:
    """Free parameters ticked at first: the engine's choice (:func:`kinetic.fitting.default_free`)."""
    from kinetic.fitting import default_free as engine_default_free

    try:
        return engine_default_free(model)
    except ParameterError:
        return []


def result_rows(result, level: float = 0.95) -> list:
    """Rows of the results table: dicts with name, value, stderr, lower, upper, unit, flag.

    ``lower``/``upper`` are the fit's ``level`` interval (``result.interval``).
    """
    rows = []
    at_bound = set(result.flags.at_bound)
    unidentified = set(result.flags.unidentified)
    for n in result.names:
        lo, hi = result.interval(n, level)
        flag = "at a bound" if n in at_bound else ("not determined" if n in unidentified else "")
        rows.append({"name": n, "value": float(result.values[n]), "stderr": float(result.stderr[n]),
                     "lower": float(lo), "upper": float(hi), "unit": result.units.get(n, ""), "flag": flag})
    return rows


def _limit() -> float:
    from kinetic.fitting import CORRELATION_LIMIT

    return CORRELATION_LIMIT


def _esc(text) -> str:
    return str(text).replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


class _FreeRow:
    """Checkbox and bounds for one parameter."""

    def __init__(self, key: str, parameter, free: bool, kind: str):
        lo, hi = slider_range(parameter)
        colour = mechanism_colour(kind)
        self.key = key
        self.check = ipw.Checkbox(value=free, indent=False, description=parameter.label,
                                  layout=ipw.Layout(width="19em"))
        self.check.add_class(css(f"free-{key.replace('.', '-').replace('_', '-')}"))
        self.lower = ipw.FloatText(value=lo, layout=ipw.Layout(width="7.5em"))
        self.upper = ipw.FloatText(value=hi, layout=ipw.Layout(width="7.5em"))
        swatch = ipw.HTML(f"<span style='color:{colour}'>\u25a0</span>", layout=ipw.Layout(width="1.2em"))
        self.widget = ipw.HBox([swatch, self.check, ipw.HTML("from", layout=ipw.Layout(width="2.6em")),
                                self.lower, ipw.HTML("to", layout=ipw.Layout(width="1.4em")), self.upper])


class FitPanel(ipw.VBox):
    """Fit the model in use to the measured data.

    Attributes
    ----------
    rows : dict
        Parameter name -> row with ``check`` (free or not), ``lower``, ``upper``.
    starts : ipw.BoundedIntText
        Number of starts (the model's values plus a seeded spread).
    fit_button, cancel_button, use_button : ipw.Button
    progress : ipw.IntProgress
    status : ipw.HTML
    table : ipw.HTML
        The results (CSS ``kinetic-fit-table``).
    result : FitResult or None
    """

    def __init__(self, workbench):
        self.wb = workbench
        g = workbench.messages.guard
        self.rows: dict = {}
        self.result = None
        self._thread = None
        self._stop = threading.Event()
        self.rows_box = ipw.VBox()
        self.starts = ipw.BoundedIntText(value=4, min=1, max=64, description="starts",
                                         style={"description_width": "4em"}, layout=ipw.Layout(width="9em"))
        self.starts.add_class(css("fit-starts"))
        self.fit_button = ipw.Button(description="Fit", button_style="primary", icon="play",
                                     layout=ipw.Layout(width="7em"))
        self.fit_button.add_class(css("fit"))
        self.cancel_button = ipw.Button(description="Cancel", icon="stop", disabled=True,
                                        layout=ipw.Layout(width="7em"))
        self.cancel_button.add_class(css("fit-cancel"))
        self.use_button = ipw.Button(description="Use fitted values", disabled=True,
                                     layout=ipw.Layout(width="11em"))
        self.use_button.add_class(css("fit-use"))
        self.progress = ipw.IntProgress(value=0, min=0, max=1, layout=ipw.Layout(width="14em"))
        self.progress.add_class(css("fit-progress"))
        self.status = ipw.HTML("Tick the parameters to fit, then press Fit.")
        self.status.add_class(css("fit-status"))
        self.table = ipw.HTML()
        self.table.add_class(css("fit-table"))
        self.fit_button.on_click(g(lambda _b: self.run()))
        self.cancel_button.on_click(g(lambda _b: self.cancel()))
        self.use_button.on_click(g(lambda _b: self.use_fitted_values()))
        head = ipw.HTML("<b>Free parameters</b> (bounds in the parameter's unit)")
        super().__init__([head, self.rows_box,
                          ipw.HBox([self.starts, self.fit_button, self.cancel_button, self.progress]),
                          self.status, self.table, self.use_button])
        self.add_class(css("fit-panel"))
        self.rebuild()

    # --- free-parameter rows ------------------------------------------------------
    def rebuild(self):
        """Rebuild the rows for the mechanisms switched on (keeps earlier choices)."""
        model = self.wb.model
        old = {k: (r.check.value, r.lower.value, r.upper.value) for k, r in self.rows.items()}
        first = not self.rows
        chosen = set(default_free(model)) if first else set()
        rows = {}
        for m in model.scattering:
            for p, par in m.parameters.items():
                if par.fixed:
                    continue
                key = f"{m.name}.{p}"
                row = _FreeRow(key, par, key in chosen, m.kind)
                if key in old:
                    row.check.value, row.lower.value, row.upper.value = old[key]
                rows[key] = row
        for r in self.rows.values():
            r.widget.close()
        self.rows = rows
        self.rows_box.children = [r.widget for r in rows.values()]

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

    def _fit_data(self):
        """The data as the fit should see them (electronic split as chosen in the workbench)."""
        ds = self.wb.data
        if ds is None:
            raise FitError("no measured data to fit; upload a table or use the demo data")
        if ds.kind == "total" and ds.resistivity is not None and not self.wb.electronic_on.value:
            from kinetic.data import Dataset

            # the electronic split is switched off: fit the total as it is
            return Dataset.from_arrays(ds.temperature, ds.kappa, kappa_err=ds.kappa_err, kind="total",
                                       label=ds.label)
        return ds

    def run(self, blocking: bool = False):
        """Start the fit (in a background thread unless ``blocking``). Returns the thread or the result."""
        from kinetic.fitting import fit

        if self.running:
            raise FitError("a fit is already running; wait for it or press Cancel")
        free = self.free
        if not free:
            raise FitError("no parameter is ticked as free; tick at least one to fit")
        model = self.wb.model
        data = self._fit_data()
        bounds = self.bounds
        n_starts = int(self.starts.value)
        method = self.wb.lorenz_choice.value
        self._stop.clear()
        self.progress.max = n_starts
        self.progress.value = 0
        self.progress.bar_style = "info"
        self.status.value = f"Fitting {len(free)} parameter(s) with {n_starts} start(s)\u2026"
        self.fit_button.disabled = True
        self.cancel_button.disabled = False

        def work():
            if not blocking:
                self.wb.in_background()
            try:
                res = fit(model, data, free, bounds=bounds, lorenz_method=method, n_starts=n_starts,
                          progress=self._progress, should_stop=self._stop.is_set)
            except Exception as exc:  # noqa: BLE001 - shown to the user in plain words
                self._failed(exc)
                return None
            finally:
                self.fit_button.disabled = False
                self.cancel_button.disabled = True
            self._finished(res)
            return res

        if blocking:
            return work()
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
        self.status.value = f"Start {int(i)} of {int(n)} done; best \u03c7\u00b2 so far {fmt(2.0 * best_cost)}."

    def _failed(self, exc):
        self.progress.bar_style = "danger"
        if isinstance(exc, FitError) and "cancel" in str(exc).lower():
            self.status.value = "Fit cancelled before the first start finished; nothing to show."
            self.progress.bar_style = "warning"
            return
        self.status.value = f"<span style='color:#b00020'>The fit failed: {_esc(' '.join(str(exc).split()))}</span>"
        self.wb.messages.error(exc)

    def _finished(self, res):
        self.result = res
        self.progress.bar_style = "warning" if res.flags.cancelled else "success"
        word = "stopped early (cancelled)" if res.flags.cancelled else ("done" if res.success else "ended")
        self.status.value = (f"Fit {word}: {res.n_points} points, {res.n_free} free, {len(res.starts)} start(s), "
                             f"{res.nfev} evaluations, {res.elapsed:.2f} s.")
        self.table.value = self.render(res)
        self.use_button.disabled = False
        self.wb.fit_finished(res)

    # --- results ------------------------------------------------------------------
    def render(self, res) -> str:
        """HTML table of a result: values, uncertainties, intervals, flags, warnings."""
        kinds = {m.name: m.kind for m in self.wb.full_model.scattering}
        rows = []
        for r in result_rows(res):
            mech = r["name"].split(".", 1)[0]
            colour = mechanism_colour(kinds.get(mech, mech))
            rel = r["stderr"] / abs(r["value"]) if r["value"] and math.isfinite(r["stderr"]) else math.inf
            pm = f"\u00b1 {fmt(r['stderr'], 2)}" + (f" ({100 * rel:.1f}%)" if math.isfinite(rel) else "")
            flag = f"<b style='color:#b00020'>{r['flag']}</b>" if r["flag"] else ""
            rows.append(
                f"<tr><td><span style='color:{colour}'>\u25a0</span> {_esc(r['name'])}</td>"
                f"<td style='text-align:right'>{fmt(r['value'])}</td><td>{pm}</td>"
                f"<td>{fmt(r['lower'], 3)} \u2013 {fmt(r['upper'], 3)}</td><td>{_esc(r['unit'])}</td>"
                f"<td>{flag}</td></tr>")
        warn = []
        for a, b, rr in res.flags.correlated:
            warn.append(f"{_esc(a)} and {_esc(b)} are strongly correlated (r = {rr:+.2f}): the data fix a "
                        "combination of the two rather than each one.")
        for n in res.flags.at_bound:
            warn.append(f"{_esc(n)} sits at a bound: the bound, not the data, set it; widen the bound or "
                        "fix the parameter.")
        for n in res.flags.unidentified:
            warn.append(f"{_esc(n)} is not determined by these data.")
        if res.flags.not_converged:
            warn.append("The optimiser stopped at its evaluation limit; try more starts or fewer free parameters.")
        if res.flags.cancelled:
            warn.append("The fit was cancelled; the best finished start is shown.")
        stats = (f"\u03c7\u00b2 = {fmt(res.chi2)}, reduced \u03c7\u00b2 = {fmt(res.reduced_chi2, 3)}, "
                 f"rms deviation {100 * float(np.sqrt(np.mean(np.square(res.relative_residuals)))):.2f}%, "
                 f"AIC = {fmt(res.aic)}, BIC = {fmt(res.bic)}")
        if res.scatter_estimated:
            stats += f"; scatter estimated from the residuals ({100 * res.scatter:.2f}%)"
        else:
            stats += "; weights from the stated errors"
        html = ("<style>.kinetic-fit-table td, .kinetic-fit-table th {padding: 1px 7px}</style>"
                "<table style='border-collapse:collapse;font-size:92%'><tr style='border-bottom:1px solid #999'>"
                "<th style='text-align:left'>parameter</th><th>value</th><th>uncertainty (1\u03c3)</th>"
                "<th>95% interval</th><th>unit</th><th></th></tr>" + "".join(rows) + "</table>"
                f"<div style='font-size:90%;margin-top:4px'>{stats}</div>")
        if res.n_free > 1:
            CORRELATION_LIMIT = _limit()
            names = list(res.names)
            cells = "".join(f"<th>{_esc(n.split('.', 1)[-1])}</th>" for n in names)
            body = ""
            for i, n in enumerate(names):
                tds = ""
                for j in range(len(names)):
                    c = float(res.correlation[i, j])
                    strong = i != j and abs(c) > CORRELATION_LIMIT
                    style = "color:#b00020;font-weight:bold" if strong else ""
                    tds += f"<td style='text-align:right;{style}'>{c:+.2f}</td>"
                body += f"<tr><td>{_esc(n)}</td>{tds}</tr>"
            html += ("<details style='font-size:90%'><summary>correlation matrix</summary>"
                     f"<table><tr><td></td>{cells}</tr>{body}</table></details>")
        if warn:
            html += "<ul style='color:#b00020;font-size:90%;margin:4px 0'>" + "".join(
                f"<li>{w}</li>" for w in warn) + "</ul>"
        notes = [n for n in res.flags.notes]
        if notes:
            html += "<div style='color:#555;font-size:85%'>" + "<br>".join(_esc(n) for n in notes) + "</div>"
        return html

    def use_fitted_values(self) -> None:
        """Move the sliders to the fitted values of the last fit."""
        if self.result is None:
            raise FitError("no fit yet; press Fit first")
        values = {k: v for k, v in self.result.values.items() if k in self.wb.full_model.params}
        self.wb.set_values(values)
        self.wb.messages.info("Sliders set to the fitted values.")

    def show_result(self, res) -> None:
        """Show a result obtained elsewhere (e.g. a loaded record)."""
        self.result = res
        self.table.value = self.render(res)
        self.use_button.disabled = False
        self.status.value = "Showing a saved fit."

    def close_all(self):
        self._stop.set()
        for r in self.rows.values():
            r.widget.close()
        self.close()
