"""What-if area: conductivity against grain size and alloy fraction, their 2-D map, and zT against doping.

All numbers come from the engine's what-if functions (through
:mod:`widgets._engine`). The studies use the model in use and the chosen
temperature; with a current fit, the grain-size and zT curves carry its 95%
band. "Update what-ifs" computes them in a background thread, step by step
with a progress bar, and Cancel stops between steps. Results remember what
they were computed from (the state's versions) and are marked stale when the
model, the fit or the study settings changed.
"""
from __future__ import annotations

import dataclasses
import threading

import ipywidgets as ipw
import numpy as np

from . import _engine
from .style import PART_COLOURS, css, esc, fmt, mechanism_colour
from .whatif_plots import CurvesPlot, MapPlot

__all__ = ["WhatIfPanel"]

_W = "W m\u207b\u00b9 K\u207b\u00b9"
NO_PARTNER = "(none)"


class _Cancelled(Exception):
    pass


class WhatIfPanel(ipw.VBox):
    """Design studies with the model in use.

    Attributes
    ----------
    partner : ipw.Dropdown
        Second end member B of the alloy A(1-x)B(x) (A is the workbench's material).
    strain : ipw.BoundedFloatText
        Abeles' strain parameter epsilon for the alloy's disorder.
    keep_gamma : ipw.Checkbox
    mobility : ipw.BoundedFloatText
        Weighted mobility [cm^2/(V s)] for zT when the data have no (rho, S) pair.
    update_button, cancel_button : ipw.Button
    progress : ipw.IntProgress
    plots : dict
        "grain", "alloy", "map", "zt" -> plot.
    last : dict
        The latest results ("grain", "alloy", "map", "zt").
    """

    TITLES = {"grain": "grain size", "alloy": "alloying", "map": "grain size and alloying map",
              "zt": "doping and zT"}

    def __init__(self, workbench):
        self.wb = workbench
        self.state = workbench.state
        g = workbench.messages.guard
        self.last: dict = {}
        self._thread = None
        self._stop = threading.Event()
        self._shown_stale = None
        self.partner = ipw.Dropdown(options=[NO_PARTNER], value=NO_PARTNER, description="alloy with B =",
                                    style={"description_width": "initial"}, layout=ipw.Layout(width="17em"),
                                    tooltip="host_b: second end member of the alloy")
        self.partner.add_class(css("alloy-partner"))
        self.strain = ipw.BoundedFloatText(value=0.0, min=0.0, max=500.0, layout=ipw.Layout(width="6em"),
                                           tooltip="strain_epsilon (Abeles 1963)")
        self.strain.add_class(css("alloy-strain"))
        strain_label = ipw.HTML("<span title='strain_epsilon'>lattice-strain weight \u03b5 (Abeles)</span>")
        self.keep_gamma = ipw.Checkbox(value=True, indent=False, layout=ipw.Layout(width="auto"),
                                       description="keep the sample's own point defects")
        self.mobility = ipw.BoundedFloatText(value=100.0, min=1e-3, max=1e5, layout=ipw.Layout(width="7em"),
                                             tooltip="weighted_mobility")
        mobility_label = ipw.HTML("<span title='weighted_mobility'>weighted mobility for zT "
                                  "[cm\u00b2 V\u207b\u00b9 s\u207b\u00b9]</span>")
        self.update_button = ipw.Button(description="Update what-ifs", button_style="primary", icon="refresh",
                                        layout=ipw.Layout(width="auto"))
        self.update_button.add_class(css("whatif-update"))
        self.update_button.on_click(g(lambda _b: self.start()))
        self.cancel_button = ipw.Button(description="Cancel", icon="stop", disabled=True,
                                        layout=ipw.Layout(width="auto"))
        self.cancel_button.add_class(css("whatif-cancel"))
        self.cancel_button.on_click(g(lambda _b: self.cancel()))
        self.progress = ipw.IntProgress(value=0, min=0, max=1, layout=ipw.Layout(width="10em"))
        self.progress.add_class(css("whatif-progress"))
        self.status = ipw.HTML("Press <b>Update what-ifs</b> to compute the studies with the model in use.")
        self.status.add_class(css("whatif-status"))
        self.show_buttons = ipw.ToggleButtons(options=[(t, k) for k, t in self.TITLES.items()], value=None,
                                              style={"button_width": "auto"}, tooltips=[
                                                  "show this study in the figure" for _ in self.TITLES])
        self.show_buttons.add_class(css("whatif-show"))
        self.show_buttons.observe(g(lambda ch: ch["new"] and self.wb.show_figure(ch["new"])), names="value")
        self.plots = {
            "grain": CurvesPlot("whatif-grain", "grain size (boundary length) L [m]",
                                f"lattice \u03ba [{_W}]", "Grain size", xlog=True, ylog=True),
            "alloy": CurvesPlot("whatif-alloy", "alloy fraction x", f"lattice \u03ba [{_W}]", "Alloying",
                                ylog=True),
            "map": MapPlot("whatif-map", "grain size L [m]", "alloy fraction x",
                           f"log\u2081\u2080 lattice \u03ba [{_W}]", "Grain size and alloying", xlog=True),
            "zt": CurvesPlot("whatif-zt", "reduced Fermi level \u03b7 (doping)", "zT", "Doping and zT"),
        }
        super().__init__([
            ipw.HBox([self.partner, self.keep_gamma], layout=ipw.Layout(flex_flow="row wrap")),
            ipw.HBox([strain_label, self.strain]), ipw.HBox([mobility_label, self.mobility]),
            ipw.HBox([self.update_button, self.cancel_button, self.progress], layout=ipw.Layout(flex_flow="row wrap")),
            self.status, ipw.HTML("show in the figure:"), self.show_buttons])
        self.add_class(css("whatif-panel"))
        self.material_changed()

    # --- choices -----------------------------------------------------------------------
    def material_changed(self):
        """Offer every other preset as partner B (Si and Ge pair up by default)."""
        mat = self.wb.material
        host = mat.name if mat is not None else None
        partners = [NO_PARTNER] + [n for n in _engine.material_names() if n != host]
        usual = {"Si": "Ge", "Ge": "Si"}.get(host)
        keep = self.partner.value if self.partner.value in partners and self.partner.value != NO_PARTNER else None
        self.partner.options = partners
        self.partner.value = keep or (usual if usual in partners else NO_PARTNER)

    def _settings(self) -> tuple:
        return (float(self.wb.temperature.value), self.partner.value, float(self.strain.value),
                bool(self.keep_gamma.value), float(self.mobility.value), self.wb.material_panel.split)

    @property
    def stale(self) -> bool:
        return self.state.whatif_stale(self._settings())

    def inputs_changed(self):
        """Mark the studies stale when what they were computed from changed."""
        if self.state.whatif is None:
            return
        stale = self.stale
        if stale == self._shown_stale:
            return
        self._shown_stale = stale
        if stale:
            self.status.value = ("<span class='kinetic-stale-note' style='color:#8a4b00'><b>Stale</b>: the model, "
                                 "the fit or the settings changed since these studies were computed; press "
                                 "<b>Update what-ifs</b>.</span>")
            for p in self.plots.values():
                t = p.title.get_text()
                if not t.startswith("[stale] "):
                    p.title.set_text("[stale] " + t)
                    p.redraw()

    # --- computing ------------------------------------------------------------------------
    @property
    def running(self) -> bool:
        return self._thread is not None and self._thread.is_alive()

    def start(self):
        """Compute in a background thread with progress; Cancel stops between steps."""
        if self.running:
            raise _engine.ParameterError("the what-if studies are already being computed; wait or press Cancel")
        self._stop.clear()
        self.update_button.disabled = True
        self.cancel_button.disabled = False

        def work():
            try:
                self.update()
            except _Cancelled:
                self.status.value = "Cancelled; the studies shown are those of the last complete update."
                self.progress.bar_style = "warning"
            except BaseException as exc:  # noqa: BLE001 - every background failure is shown
                self.progress.bar_style = "danger"
                self.status.value = (f"<span style='color:#b00020'><b>The what-if update failed</b>: "
                                     f"{esc(' '.join(str(exc).split()))}</span>")
                self.wb.messages.error(exc if isinstance(exc, Exception) else RuntimeError(str(exc)))
            finally:
                self.update_button.disabled = False
                self.cancel_button.disabled = True

        self._thread = threading.Thread(target=work, name="kinetic-whatif", daemon=True)
        self._thread.start()
        return self._thread

    def join(self, timeout: float | None = None):
        if self._thread is not None:
            self._thread.join(timeout)

    def cancel(self):
        if self.running:
            self._stop.set()
            self.status.value = "Cancelling\u2026"

    def _step(self, text: str):
        if self._stop.is_set():
            raise _Cancelled()
        self.progress.value = min(self.progress.value + 1, self.progress.max)
        self.status.value = f"Computing: {text}\u2026"

    def update(self):
        """Compute and draw all four studies at the workbench's temperature (blocking)."""
        wb = self.wb
        settings = self._settings()
        inputs = self.state.whatif_inputs(settings)
        model = wb.model
        T0 = float(wb.temperature.value)
        result = self.state.current_fit if self._result_matches(model) else None
        mat = wb.material
        partner = self.partner.value
        strain = float(self.strain.value)
        extra = self._own_gamma(model) if self.keep_gamma.value else 0.0
        bname = next((m.name for m in model.scattering if m.kind == "boundary"), None)
        fractions_map = np.linspace(0.0, 1.0, 21)
        chunks = [fractions_map[i:i + 3] for i in range(0, len(fractions_map), 3)]
        self.progress.max = 3 + len(chunks)
        self.progress.value = 0
        self.progress.bar_style = "info"
        new, notes, draw = {}, [], []

        self._step("grain size")
        if bname is not None:
            lengths = np.geomspace(1e-8, 1e-2, 49)
            res_g = result if (result is not None and f"{bname}.length" in model.params) else None
            sw = _engine.whatif.grain_size_sweep(model, lengths, T0, res_g, mechanism=bname)
            new["grain"] = sw
            bands = {}
            if sw.lower is not None:
                bands["last fit: 95% band"] = (lengths, sw.lower[:, 0], sw.upper[:, 0], PART_COLOURS["band"])
            L0 = float(model.params[f"{bname}.length"])
            draw.append(lambda: self.plots["grain"].update(
                {"model": (lengths, sw.kappa[:, 0], PART_COLOURS["lattice"])}, bands,
                title=f"Grain size at {fmt(T0)} K", vlines={"grain size now": (L0, mechanism_colour("boundary"))}))
        else:
            notes.append("no boundary mechanism is switched on, so there is no grain-size study")

        self._step("alloying")
        if mat is None:
            notes.append("the alloy studies need a material preset")
        elif partner in (None, NO_PARTNER):
            notes.append("choose an alloy partner B above for the alloy studies")
        else:
            xs = np.linspace(0.0, 1.0, 41)
            al = _engine.whatif.alloy_sweep(mat, partner, xs, T0, template=model, strain_epsilon=strain,
                                            extra_gamma=extra)
            new["alloy"] = al
            name = f"{mat.name}(1\u2212x){partner}(x)"
            draw.append(lambda: self._draw_alloy(name, partner, xs, al, T0))
            if bname is not None:
                lengths_m = np.geomspace(1e-8, 1e-3, 31)
                parts = []
                for i, chunk in enumerate(chunks):
                    self._step(f"map, fractions {chunk[0]:.2f}\u2013{chunk[-1]:.2f}")
                    parts.append(_engine.whatif.grain_alloy_map(
                        model, lengths_m, chunk, T0, host_a=mat, host_b=partner, strain_epsilon=strain,
                        extra_gamma=extra, mechanism=bname))
                mp = dataclasses.replace(parts[0], fractions=np.concatenate([p.fractions for p in parts]),
                                         kappa=np.concatenate([p.kappa for p in parts], axis=0),
                                         gamma=np.concatenate([p.gamma for p in parts]))
                new["map"] = mp
                _add_notes(notes, *parts)
                draw.append(lambda: self._draw_map(name, partner, mp, T0))

        self._step("doping and zT")
        zt = self._zt(model, T0, result, notes, draw)
        if zt is not None:
            new["zt"] = zt
        if self._stop.is_set():
            raise _Cancelled()
        _add_notes(notes, *new.values())  # the results' own scope notes (alloy sweeps, maps...)
        for d in draw:
            d()
        self.last = new
        self.state.set_whatif(new, inputs)
        self._shown_stale = False
        self.progress.value = self.progress.max
        self.progress.bar_style = "success"
        done = f"Computed with the model in use at {fmt(T0)} K" + (
            " and the 95% band of the current fit." if result is not None else " (no current fit, so no bands).")
        self.status.value = done + ("<br><span style='color:#666'>" + esc("; ".join(notes)) + ".</span>"
                                    if notes else "")
        return self.last

    def _draw_alloy(self, name, partner, xs, al, T0):
        p = self.plots["alloy"]
        p.ax.set_xlabel(f"alloy fraction x of {partner} in {name}")
        p.update({name: (xs, al.kappa[:, 0], mechanism_colour("point_defect"))}, title=f"Alloying at {fmt(T0)} K")

    def _draw_map(self, name, partner, mp, T0):
        p = self.plots["map"]
        p.ax.set_ylabel(f"fraction x of {partner}")
        p.update(mp.lengths, mp.fractions, np.log10(mp.kappa), title=f"{name} at {fmt(T0)} K")

    def _result_matches(self, model) -> bool:
        res = self.state.current_fit
        if res is None:
            return False
        try:
            return all(f.param in model.params for f in res.free)
        except AttributeError:
            return False

    @staticmethod
    def _own_gamma(model) -> float:
        for m in model.scattering:
            if m.kind == "point_defect" and m.values.get("gamma") is not None:
                return float(m.values["gamma"])
        return 0.0

    def _measured_pair(self, T0):
        ds = self.wb.data
        if ds is None or ds.resistivity is None or ds.seebeck is None:
            return None
        T = ds.temperature
        if not (T.min() <= T0 <= T.max()):
            return None
        return float(np.interp(T0, T, ds.sigma)), float(np.interp(T0, T, ds.seebeck))

    def _zt(self, model, T0, result, notes, draw):
        kl = float(self.wb.parts(np.array([T0])).lattice[0])
        pair = self._measured_pair(T0)
        if pair is not None:
            kw = {"sigma": pair[0], "seebeck": pair[1]}
        else:
            kw = {"weighted_mobility": float(self.mobility.value) * 1e-4}  # cm^2/(V s) -> m^2/(V s)
            notes.append(f"zT from the band model with weighted mobility {fmt(self.mobility.value)} "
                         f"cm\u00b2 V\u207b\u00b9 s\u207b\u00b9 (the data have no resistivity and Seebeck "
                         f"at {fmt(T0)} K)")
        try:
            zt = _engine.whatif.zt_vs_fermi_level(T0, kl, **kw)
        except _engine.ParameterError as exc:
            notes.append(f"no zT study: {' '.join(str(exc).split())}")
            return None
        bands = {}
        if result is not None:
            try:
                b = _engine.predict_band(result, [T0])
                lo = _engine.whatif.zt_vs_fermi_level(T0, float(b.upper[0]), eta=zt.eta, **kw)  # more kappa: less zT
                hi = _engine.whatif.zt_vs_fermi_level(T0, float(b.lower[0]), eta=zt.eta, **kw)
                bands["last fit: 95% band"] = (zt.eta, lo.zt, hi.zt, PART_COLOURS["band"])
            except Exception as exc:  # noqa: BLE001 - the curve stays useful without its band
                notes.append(f"no zT band ({' '.join(str(exc).split())})")
        vlines = {"best doping": (zt.best_eta, "#2ca02c")}
        if zt.measured_eta is not None:
            vlines["this sample"] = (zt.measured_eta, "#d62728")
        draw.append(lambda: self.plots["zt"].update(
            {"zT": (zt.eta, zt.zt, "#000000")}, bands,
            title=f"zT at {fmt(T0)} K: best {zt.best_zt:.2f} at \u03b7 = {zt.best_eta:.2f}", vlines=vlines))
        return zt

    def close_all(self):
        self._stop.set()
        for p in self.plots.values():
            p.close()
        self.close()


def _add_notes(notes: list, *results) -> None:
    """Append the ``notes`` of what-if results (scope notes from the engine), each once."""
    for r in results:
        for n in getattr(r, "notes", None) or ():
            n = " ".join(str(n).split()).rstrip(".")
            if n and n not in notes:
                notes.append(n)
