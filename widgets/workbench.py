"""The Workbench: a live view of a lattice model against measured data.

Layout, made to fit a laptop screen (1366 x 768) with JupyterLab's side panel
open: a header with the readouts at the chosen temperature and the messages;
then the figure (chooser, canvas, chosen temperature) beside the work areas
(model, fit, what-if, save and export) in tabs whose sections fold, so the
k(T) plot and the fit results are on screen together.

State lives in one :class:`~widgets.state.WorkbenchState`; every number comes
from the engine through :mod:`widgets._engine`. This module only wires
controls, state and plots.
"""
from __future__ import annotations

import contextlib
import threading

import ipywidgets as ipw

from . import _engine
from ._browser import keyboard_helper
from .controls import MechanismCard, ParameterControl
from .data_panel import DataPanel
from .electronic_panel import LORENZ_METHODS, ElectronicPanel
from .feedback import MessageBoard
from .fit_panel import FitPanel
from .material_panel import MaterialPanel
from .plots import AccumulationPlot, ConductivityPlot, RatesPlot, SpectrumPlot
from .session_panel import SessionPanel
from .state import WorkbenchState
from .style import css, mechanism_title
from .views import WorkbenchViews
from .whatif_panel import WhatIfPanel

__all__ = ["Workbench", "default_model"]

#: preset of the starting model when data come without a model (any preset would be a guess)
DEFAULT_MATERIAL = "Si"
_PLOT_ORDER = ("conductivity", "rates", "spectrum", "mfp")
_PLOT_TITLES = ("\u03ba against temperature", "scattering rates", "spectral conductivity",
                "heat by mean free path")


def default_model(material="Si", *, grain_size: float | None = None, split_branches: bool = False):
    """The engine's default model of a preset, optionally with another grain size [m]."""
    model = _engine.default_model(material, split_branches=split_branches)
    if grain_size is not None:
        key = next((f"{m.name}.length" for m in model.scattering if m.kind == "boundary"), None)
        if key is None:
            raise _engine.ParameterError("this default model has no boundary scattering to set a grain size on")
        model = model.with_params({key: float(grain_size)})
    return model


def _demo():
    """(model, data) of the built-in demo, or (None, None)."""
    demo = _engine.demo
    data = demo.demo_dataset() if hasattr(demo, "demo_dataset") else None
    model = demo.demo_model() if hasattr(demo, "demo_model") else None
    return model, data


class Workbench(WorkbenchViews, ipw.VBox):
    """Interactive workbench: a lattice model, measured data, fits and what-ifs.

    Parameters
    ----------
    model : kinetic.LatticeModel, optional
        Starting model; default the demo's model (or the default model of silicon).
    data : kinetic.Dataset, optional
        Measured data; default the built-in demo data when neither is given.
    temperature : float
        Temperature of the readouts, rates, spectrum and mean-free-path plots [K].

    Attributes
    ----------
    state : WorkbenchState
        The one source of truth (data, model, free set, fit and what-if results).
    cards, controls, plots : dict
    messages : MessageBoard
    """

    def __init__(self, model=None, data=None, *, temperature: float = 300.0):
        self.messages = MessageBoard()
        self.state = WorkbenchState()
        self._lock = self.state.lock
        self._cache: dict = {}
        self._band = None
        self._background = threading.local()
        self._muted = False
        if model is None and data is None:
            model, data = _demo()
        if model is None:
            model = _engine.default_model(DEFAULT_MATERIAL)
        if not isinstance(model, _engine.LatticeModel):
            raise _engine.ParameterError(f"model must be a kinetic.LatticeModel, got {type(model).__name__}")
        self.state.set_model(model, {n: True for n in model.mechanism_names})
        self.state.set_data(data)
        self._build(float(temperature))
        self.refresh()

    # --- state shortcuts ------------------------------------------------------------------
    @property
    def data(self):
        return self.state.data

    @property
    def full_model(self):
        """The model with every mechanism, including those switched off."""
        return self.state.full_model

    @property
    def model(self):
        """The model in use: mechanisms switched on, with the current values."""
        return self.state.model

    @property
    def enabled(self) -> dict:
        return dict(self.state.enabled)

    @property
    def material(self):
        return self.material_panel.material

    @property
    def result(self):
        """The fit result shown in the table (current or stale), or None."""
        return self.state.fit.value if self.state.fit is not None else None

    @contextlib.contextmanager
    def muted(self):
        old, self._muted = self._muted, True
        try:
            yield
        finally:
            self._muted = old

    # --- building -----------------------------------------------------------------------
    def _build(self, temperature: float):
        g = self.messages.guard
        title = ipw.HTML("<style>.kinetic-workbench .widget-html-content {line-height: 1.4; white-space: normal}"
                         ".kinetic-workbench .kinetic-readout .widget-html-content {white-space: nowrap}</style>"
                         "<b style='font-size:115%'>Thermal conductivity workbench</b>",
                         layout=ipw.Layout(margin="0 1.2em 0 0"))
        self.readouts = {k: ipw.HTML() for k in ("temperature", "lattice", "electronic", "bipolar", "total",
                                                  "floor")}
        for k, w in self.readouts.items():
            w.add_class(css("readout"))
            w.add_class(css(f"readout-{k}"))
        readout_box = ipw.HBox(list(self.readouts.values()),
                               layout=ipw.Layout(flex_flow="row wrap", grid_gap="0 1em"))
        readout_box.add_class(css("readouts"))
        tpar = _engine.Parameter("temperature", float(temperature), unit="K", description="chosen temperature",
                                 bounds=(1.0, 1500.0), log=False)
        self.temperature = ParameterControl("temperature", tpar, on_change=g(lambda k, v: self._temperature()),
                                            on_error=self.messages.error, steps=1499)
        self.temperature.label.value = "<span title='temperature'>chosen temperature [K]</span>"
        self.temperature.add_class(css("temperature"))

        self.data_panel = DataPanel(self._set_data, self.messages, on_series=self._set_series)
        self.material_panel = MaterialPanel(self._material_model, self.messages,
                                            material=_engine.material_of(self.full_model),
                                            split=len(self.full_model.branches) > 1)
        self.cards: dict = {}
        self.controls: dict = {}
        self.mechanism_box = ipw.VBox()
        self.add_kind = ipw.Dropdown(options=[], layout=ipw.Layout(width="15em"), tooltip="mechanism to add")
        self.add_button = ipw.Button(description="Add mechanism", layout=ipw.Layout(width="auto"))
        self.add_button.add_class(css("add-mechanism"))
        self.add_button.on_click(g(self._add_clicked))
        self.electronic_panel = ElectronicPanel(self._electronic_changed, lambda: self.refresh(electronic=False),
                                                self.messages)
        self.electronic_on = self.electronic_panel.split
        self.lorenz_choice = self.electronic_panel.lorenz
        self.bipolar_on = self.electronic_panel.bipolar_on
        self.bipolar_controls = self.electronic_panel.bipolar_controls

        self.sections = ipw.Accordion(
            children=[self.data_panel, self.material_panel,
                      ipw.VBox([self.mechanism_box, ipw.HBox([self.add_kind, self.add_button])]),
                      self.electronic_panel], selected_index=2)
        for i, t in enumerate(("Measured data", "Material and branches", "Scattering mechanisms",
                               "Electronic part")):
            self.sections.set_title(i, t)
        self.sections.add_class(css("sections"))

        # figures: one shown at a time, chosen in a dropdown (no tab titles to truncate)
        self.plots = {"conductivity": ConductivityPlot(), "rates": RatesPlot(),
                      "spectrum": SpectrumPlot(), "mfp": AccumulationPlot()}
        self.fit_panel = FitPanel(self)
        self.whatif_panel = WhatIfPanel(self)
        self.session_panel = SessionPanel(self)
        options = [(t, k) for t, k in zip(_PLOT_TITLES, _PLOT_ORDER)]
        options += [(f"what-if: {t}", k) for k, t in self.whatif_panel.TITLES.items()]
        self.figure_choice = ipw.Dropdown(options=options, value="conductivity", description="figure",
                                          style={"description_width": "4em"}, layout=ipw.Layout(width="451px"))
        self.figure_choice.add_class(css("figure-choice"))
        self.figure_stack = ipw.Box([self.plots["conductivity"].widget])
        self.figure_stack.add_class(css("figures"))
        self.figure_choice.observe(g(lambda ch: self.show_figure(ch["new"])), names="value")

        self._build_cards()
        self.work_tabs = ipw.Tab(children=[self.sections, self.fit_panel, self.whatif_panel, self.session_panel])
        for i, t in enumerate(("Model", "Fit", "What if", "Save / export")):
            self.work_tabs.set_title(i, t)
        self.work_tabs.add_class(css("work"))
        self.work_tabs.layout = ipw.Layout(flex="1 1 24em", min_width="24em", max_width="36em",
                                           max_height="470px", overflow="auto")
        left = ipw.VBox([self.figure_choice, self.figure_stack, self.temperature],
                        layout=ipw.Layout(flex="0 0 auto", margin="0 10px 0 0"))
        main = ipw.HBox([left, self.work_tabs], layout=ipw.Layout(flex_flow="row wrap", align_items="flex-start"))
        header = ipw.HBox([title, readout_box], layout=ipw.Layout(flex_flow="row wrap", align_items="center"))
        super().__init__([header, self.messages.output, main, keyboard_helper()])
        self.add_class(css("workbench"))
        self.data_panel.show(self.data, self.state.series)
        self._sync_electronic()

    def _build_cards(self):
        """(Re)build the mechanism cards from the full model (structure changes only)."""
        for card in self.cards.values():
            card.close()
        self.cards, self.controls = {}, {}
        g = self.messages.guard
        for m in self.full_model.scattering:
            card = MechanismCard(m, on_change=g(self._param_changed), on_toggle=g(self._toggled),
                                 enabled=self.state.enabled.get(m.name, True), on_error=self.messages.error)
            self.cards[m.name] = card
            self.controls.update(card.controls)
        self.mechanism_box.children = list(self.cards.values())
        present = {m.kind for m in self.full_model.scattering}
        kinds = [(mechanism_title(k), k) for k in _engine.MECHANISMS if k not in present]
        self.add_kind.options = kinds
        self.add_button.disabled = not kinds
        self.fit_panel.rebuild()

    # --- changes of state -----------------------------------------------------------------
    def _use_model(self, full, enabled=None, *, rebuild=False):
        """Put a new full model into the state (the engine checks it) and refresh."""
        enabled = dict(self.state.enabled if enabled is None else enabled)
        off = [n for n, on in enabled.items() if not on]
        if off:
            full.without(*off)  # the engine refuses a model without resistive scattering
        self.state.set_model(full, enabled)
        if rebuild:
            self._build_cards()
        self.refresh(electronic=False)

    def set_model(self, model, *, enabled: dict | None = None) -> None:
        """Replace the model (e.g. from a saved record) and rebuild the controls."""
        if not isinstance(model, _engine.LatticeModel):
            raise _engine.ParameterError(f"model must be a kinetic.LatticeModel, got {type(model).__name__}")
        with self._lock:
            on = {n: True for n in model.mechanism_names}
            on.update({k: bool(v) for k, v in (enabled or {}).items() if k in on})
            self.material_panel.set_model_material(_engine.material_of(model), len(model.branches) > 1)
            self._cache.pop("floor", None)
            self._use_model(model, on, rebuild=True)

    def _material_model(self, model, material):
        with self._lock:
            self._cache.pop("floor", None)
            self._use_model(model, {n: True for n in model.mechanism_names}, rebuild=True)
            self.whatif_panel.material_changed()
            self.messages.info(f"{material.name}: the engine's default model "
                               f"({', '.join(mechanism_title(m.kind).lower() for m in model.scattering)}).")

    def set_values(self, values: dict) -> None:
        """Set several parameters at once (``{"<mechanism>.<param>": value}``), moving the sliders."""
        with self._lock:
            new = self.full_model.with_params(values)
            self._use_model(new)
            for card in self.cards.values():
                card.set_values({k: v for k, v in values.items() if k.split(".", 1)[0] == card.name})

    def _param_changed(self, key: str, value: float):
        with self._lock:
            try:
                self._use_model(self.full_model.with_params({key: value}))
            except Exception:
                name = key.split(".", 1)[0]
                if name in self.cards:
                    self.cards[name].set_values({key: self.full_model.params[key]})
                raise

    def _toggled(self, name: str, on: bool):
        with self._lock:
            enabled = dict(self.state.enabled, **{name: on})
            try:
                self._use_model(self.full_model, enabled)
            except _engine.ParameterError:
                self.cards[name].set_enabled(not on)
                raise _engine.ParameterError(
                    f"cannot switch off {mechanism_title(self.full_model.mechanism(name).kind, name).lower()}: "
                    "every branch needs at least one resistive mechanism (boundaries, point defects, "
                    "Umklapp, ...) or its conductivity is infinite") from None
            self.fit_panel.sync()

    def _add_clicked(self, _button=None):
        kind = self.add_kind.value
        if kind is None:
            return
        with self._lock:
            m = _engine.new_mechanism(kind, self.material)
            self._use_model(self.full_model.with_mechanism(m), dict(self.state.enabled, **{m.name: True}),
                            rebuild=True)
            self.messages.info(f"Added {mechanism_title(kind).lower()} with the engine's start values.")

    def _electronic_changed(self, change):
        if self._muted:
            return
        with self._lock:
            try:
                self.state.set_electronic(self.electronic_on.value, self.lorenz_choice.value)
                self.refresh()
            except Exception:
                with self.muted():  # back to the choice that worked
                    change["owner"].value = change["old"]
                self.state.set_electronic(self.electronic_on.value, self.lorenz_choice.value)
                self.refresh()
                raise

    def _set_data(self, ds) -> None:
        with self._lock:
            self.state.set_data(ds)
            self._data_changed()

    def _set_series(self, series, index: int = 0) -> None:
        """Use several samples (kept in the state); sample ``index`` is the one being fitted."""
        with self._lock:
            self.state.set_series(series, index)
            self._data_changed()

    def _data_changed(self):
        self._band = None  # the last fit's band belongs to the previous data
        self.data_panel.show(self.data, self.state.series)
        self._sync_electronic()
        self.refresh()

    def _sync_electronic(self):
        self.electronic_panel.sync(self.data, self.muted)
        self.state.set_electronic(self.electronic_on.value, self.lorenz_choice.value)

    def _temperature(self):
        self.refresh(electronic=False)

    def load_record(self, record) -> None:
        """Use a loaded fit record: its data, fitted model, fit results and Lorenz method."""
        with self._lock:
            method = (getattr(record, "options", None) or {}).get("lorenz_method")
            self._set_data(record.data)
            if method in {v for _, v in LORENZ_METHODS} and not self.lorenz_choice.disabled:
                with self.muted():
                    self.lorenz_choice.value = method
                self.state.set_electronic(self.electronic_on.value, method)
            self.set_model(record.model)
            self.fit_panel.show_result(record)

    # --- refreshing -----------------------------------------------------------------------
    def refresh(self, electronic: bool = True) -> None:
        """Recompute readouts and the visible figure; mark the rest stale."""
        with self._lock:
            if electronic:
                self._cache.pop("electronic", None)
            in_thread = bool(getattr(self._background, "active", False))
            for p in self.plots.values():
                p.stale = True
                p.fast = not in_thread
            try:
                self._update_visible_plot()  # first: its frame reaches the browser before the rest
                self._readouts()
            finally:
                for p in self.plots.values():
                    p.fast = True
            self.fit_panel.inputs_changed()
            self.whatif_panel.inputs_changed()
            self.session_panel.inputs_changed()

    def in_background(self) -> None:
        """Mark the calling thread as a background worker (its refreshes do not draw)."""
        self._background.active = True

    def fit_finished(self, result) -> None:
        """Draw the prediction band of a fit result."""
        with self._lock:
            self._band = None
            try:
                b = _engine.predict_band(result, self.temperatures)
                self._band = (b.temperature, b.lower, b.upper)
            except Exception as exc:  # noqa: BLE001 - a missing band must not hide the fit
                self.messages.warn(f"no prediction band for this fit ({' '.join(str(exc).split())})")
            self.refresh(electronic=False)

    def show_figure(self, name: str) -> None:
        """Show one figure (a workbench plot or a what-if study)."""
        if self.figure_choice.value != name:
            self.figure_choice.value = name
            return
        plot = self.plots.get(name) or self.whatif_panel.plots[name]
        self.figure_stack.children = [plot.widget]
        if name in self.plots:
            self.update_plot(name)

    def _update_visible_plot(self):
        if self.figure_choice.value in self.plots:
            self.update_plot(self.figure_choice.value)

    def update_all_plots(self) -> None:
        for name in _PLOT_ORDER:
            self.update_plot(name)

    def update_plot(self, name: str) -> None:
        """Bring one plot up to date if it is stale."""
        if self.plots[name].stale:
            getattr(self, f"_draw_{name}")()

    # --- housekeeping -------------------------------------------------------------------------
    def close(self):
        """Close the widgets and figures of the workbench."""
        for p in self.plots.values():
            p.close()
        for panel in (self.fit_panel, self.whatif_panel, self.session_panel):
            panel.close_all()
        super().close()
