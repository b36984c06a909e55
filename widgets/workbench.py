"""The Workbench: a live view of a lattice model against measured data.

Layout (top to bottom): a title with readouts at the chosen temperature and
the message area; the controls (data, material and branches, scattering
mechanisms, electronic part) beside the figures (conductivity against
temperature, scattering rates, spectral conductivity, accumulation over mean
free path); then the work areas (fit, what-if, session and export).

Every number shown comes from kinetic's public API; this module only wires
controls to the model and the model's answers to the plots.
"""
from __future__ import annotations

import threading
from dataclasses import fields, replace

import numpy as np
import ipywidgets as ipw

from kinetic import materials as _materials
from kinetic.errors import ParameterError
from kinetic.lattice import LatticeModel
from kinetic.parameters import Parameter
from kinetic.scattering import MECHANISMS, PointDefect, Umklapp

from .controls import MechanismCard, ParameterControl
from .data_panel import DataPanel
from .feedback import MessageBoard
from .plots import AccumulationPlot, ConductivityPlot, RatesPlot, SpectrumPlot
from .style import css, fmt, mechanism_title

__all__ = ["Workbench", "default_model", "remake_for_material"]

LORENZ_METHODS = (
    ("automatic: single band if S is measured", "auto"),
    ("Sommerfeld value L\u2080 (degenerate)", "sommerfeld"),
    ("single parabolic band, from Seebeck", "spb"),
    ("Kim et al. formula, from Seebeck", "kim"),
)
_PLOT_ORDER = ("conductivity", "rates", "spectrum", "mfp")
#: preset of the starting model when data come without a model (any preset would be a guess)
DEFAULT_MATERIAL = "Si"

#: controls of the activated bipolar term (kinetic.electronic.bipolar_kappa_activated, exponent p = 1)
BIPOLAR_PARAMETERS = {
    "bipolar.prefactor": Parameter("prefactor", 0.05, unit="W m^-1 K^-2", description="bipolar prefactor C",
                                   bounds=(1e-5, 10.0), log=True),
    "bipolar.band_gap": Parameter("band_gap", 0.7, unit="eV", description="band gap E_g",
                                  bounds=(0.05, 3.0), log=False),
}
_PLOT_TITLES = ("\u03ba(T)", "Scattering rates", "Spectrum", "Mean free path")


# ---------------------------------------------------------------------------------
# model set-up helpers (configuration through the engine's constructors, no physics)
def _material_gamma(material):
    try:
        from kinetic.disorder import material_gamma

        return material_gamma(material)
    except ParameterError:
        return 1e-3  # no composition: the same start value as kinetic.fitting.default_model


def default_model(material="Si", *, grain_size: float = 1e-5, split_branches: bool = False,
                  mechanisms=("boundary", "point_defect", "umklapp", "normal")) -> LatticeModel:
    """The engine's starting model (:func:`kinetic.fitting.default_model`) with a chosen grain size.

    Parameters
    ----------
    material : Material or str
    grain_size : float
        Boundary length [m].
    split_branches : bool
        One averaged branch or longitudinal + transverse.
    mechanisms : sequence of str
        As in :func:`kinetic.fitting.default_model`.
    """
    from kinetic.fitting import default_model as engine_default

    model = engine_default(material, list(mechanisms), split_branches=split_branches)
    if "boundary.length" in model.params:
        model = model.with_params({"boundary.length": float(grain_size)})
    return model


def remake_for_material(mechanism, material):
    """The same mechanism with the material constants of ``material``.

    Umklapp built from a Grüneisen parameter takes the new material's mass
    and Grüneisen parameter; point defects given by Gamma take its isotope
    Gamma and volume per atom; any other mechanism with a ``volume_per_atom``
    takes the new volume. Everything else is kept.
    """
    kw = dict(name=mechanism.name, applies_to=mechanism.applies_to)
    if isinstance(mechanism, Umklapp) and mechanism.gruneisen is not None:
        return Umklapp.from_material(material, b=mechanism.b, **kw)
    if isinstance(mechanism, PointDefect) and mechanism.gamma is not None:
        return PointDefect.from_gamma(_material_gamma(material), material.volume_per_atom, **kw)
    names = {f.name for f in fields(mechanism)}
    if "volume_per_atom" in names and getattr(mechanism, "volume_per_atom", None) is not None:
        return mechanism.with_values(volume_per_atom=material.volume_per_atom)
    return mechanism


def new_mechanism(kind: str, material=None, name: str | None = None):
    """A mechanism of ``kind`` with the engine's start values (and the material's constants)."""
    if kind not in MECHANISMS:
        raise ParameterError(f"unknown mechanism kind {kind!r}; known: {', '.join(MECHANISMS)}")
    kw = {} if name is None else {"name": name}
    if material is not None and kind in ("boundary", "point_defect", "umklapp", "normal"):
        from kinetic.fitting import default_model as engine_default

        kinds = [kind] if kind != "normal" else ["boundary", "normal"]
        m = engine_default(material, kinds).mechanism(kind)
        return m if name is None else replace(m, name=name)
    if kind == "point_defect":
        return PointDefect(A=1e-44, **kw)
    if kind == "umklapp":
        return Umklapp(B=1e-19, **kw)
    m = MECHANISMS[kind](**kw)
    return m if material is None else remake_for_material(m, material)


def _demo():
    """(model, data) of the built-in demo, or (None, None) without kinetic.demo."""
    try:
        from kinetic import demo
    except ImportError:
        return None, None
    data = demo.demo_dataset() if hasattr(demo, "demo_dataset") else None
    model = None
    for attr in ("demo_model", "demo_lattice_model"):
        if hasattr(demo, attr):
            model = getattr(demo, attr)()
            break
    return model, data


# ---------------------------------------------------------------------------------
class Workbench(ipw.VBox):
    """Interactive workbench: a lattice model, measured data, fits and what-ifs.

    Parameters
    ----------
    model : kinetic.LatticeModel, optional
        Starting model; default the demo's model (or a silicon model).
    data : kinetic.data.Dataset, optional
        Measured data; default the built-in demo data when neither model nor
        data is given.
    temperature : float
        Temperature for the readouts, rates, spectrum and mean-free-path
        plots [K].

    Attributes
    ----------
    model : LatticeModel
        The model in use: the mechanisms switched on, with the sliders' values.
    data : Dataset or None
    cards : dict
        Mechanism name -> :class:`~widgets.controls.MechanismCard`.
    controls : dict
        ``"<mechanism>.<param>"`` -> :class:`~widgets.controls.ParameterControl`.
    plots : dict
        ``"conductivity"``, ``"rates"``, ``"spectrum"``, ``"mfp"`` -> plot.
    messages : MessageBoard
        Where callback errors are shown in plain words.

    Examples
    --------
    >>> from widgets import Workbench            # doctest: +SKIP
    >>> wb = Workbench()                         # doctest: +SKIP
    >>> wb                                       # doctest: +SKIP
    """

    def __init__(self, model: LatticeModel | None = None, data=None, *, temperature: float = 300.0):
        self.messages = MessageBoard()
        self._lock = threading.RLock()
        self._cache: dict = {}
        self.result = None  # the last FitResult
        self._band = None  # (T, lower, upper) of the last fit's 95% band
        self._background = threading.local()  # .active is True in the fit's worker thread
        if model is None and data is None:
            model, data = _demo()
        if model is None:
            model = default_model(DEFAULT_MATERIAL)
        if not isinstance(model, LatticeModel):
            raise ParameterError(f"model must be a kinetic.LatticeModel, got {type(model).__name__}")
        self._full = model
        self._enabled = {n: True for n in model.mechanism_names}
        self._material = self._lookup_material(model.material)
        self.data = data
        self._split = any(b.name != "avg" for b in model.branches) and len(model.branches) > 1
        self._build(temperature)
        self.refresh()

    # --- set-up -------------------------------------------------------------------
    @staticmethod
    def _lookup_material(name):
        if name is None:
            return None
        try:
            return _materials.get(name)
        except ParameterError:
            return None

    def _build(self, temperature: float):
        g = self.messages.guard
        # header and readouts
        title = ipw.HTML("<b style='font-size:120%'>Thermal conductivity workbench</b>",
                         layout=ipw.Layout(margin="0 1.5em 0 0"))
        self.readouts = {k: ipw.HTML() for k in ("temperature", "lattice", "electronic", "bipolar", "total",
                                                  "floor")}
        for k, w in self.readouts.items():
            w.add_class(css("readout"))
            w.add_class(css(f"readout-{k}"))
        readout_box = ipw.HBox(list(self.readouts.values()),
                               layout=ipw.Layout(flex_flow="row wrap", grid_gap="0 1.2em"))
        readout_box.add_class(css("readouts"))
        # chosen temperature
        self.temperature = ipw.FloatSlider(value=float(temperature), min=1.0, max=1500.0, step=1.0,
                                           description="chosen temperature [K]", readout_format=".0f",
                                           continuous_update=True, style={"description_width": "13em"},
                                           layout=ipw.Layout(width="32em"))
        self.temperature.add_class(css("temperature"))
        self.temperature.observe(g(lambda ch: self.refresh(electronic=False)), names="value")

        # material and branches
        names = _materials.names()
        options = list(names)
        if self._material is None:
            options = ["(model as given)"] + options
        self.material_choice = ipw.Dropdown(options=options,
                                            value=self._material.name if self._material else options[0],
                                            description="material", style={"description_width": "5em"},
                                            layout=ipw.Layout(width="18em"))
        self.material_choice.add_class(css("material"))
        self.material_choice.observe(g(self._material_changed), names="value")
        self.branch_choice = ipw.ToggleButtons(
            options=[("one averaged branch", False), ("longitudinal + transverse", True)],
            value=self._split, style={"button_width": "11.5em"})
        self.branch_choice.add_class(css("branches"))
        self.branch_choice.observe(g(self._branches_changed), names="value")
        self.material_info = ipw.HTML()
        material_box = ipw.VBox([self.material_choice, self.branch_choice, self.material_info])

        # mechanisms
        self.cards: dict = {}
        self.controls: dict = {}
        self.mechanism_box = ipw.VBox()
        self.add_kind = ipw.Dropdown(options=[], description="add", style={"description_width": "3em"},
                                     layout=ipw.Layout(width="16em"))
        self.add_button = ipw.Button(description="Add mechanism", layout=ipw.Layout(width="9.5em"))
        self.add_button.add_class(css("add-mechanism"))
        self.add_button.on_click(g(self._add_clicked))
        self._build_cards()

        # electronic part
        self.electronic_on = ipw.Checkbox(value=False, description="split off the electronic part (L\u03c3T)",
                                          indent=False)
        self.electronic_on.add_class(css("electronic"))
        self.lorenz_choice = ipw.Dropdown(options=LORENZ_METHODS, value="auto",
                                          description="Lorenz number", style={"description_width": "7em"},
                                          layout=ipw.Layout(width="22em"))
        self.lorenz_choice.add_class(css("lorenz"))
        self.electronic_on.observe(g(self._electronic_changed), names="value")
        self.lorenz_choice.observe(g(self._electronic_changed), names="value")
        self.electronic_info = ipw.HTML()
        # bipolar part: kinetic.electronic.bipolar_kappa_activated, shown on the plot (not fitted)
        self.bipolar_on = ipw.Checkbox(value=False, indent=False,
                                       description="add a bipolar part C T exp(−Eg / 2kBT)")
        self.bipolar_on.add_class(css("bipolar"))
        self.bipolar_on.observe(g(lambda ch: self.refresh(electronic=False)), names="value")
        self.bipolar_controls = {
            key: ParameterControl(key, par, on_change=g(lambda k, v: self.refresh(electronic=False)),
                                  on_error=self.messages.error)
            for key, par in BIPOLAR_PARAMETERS.items()}
        bipolar_note = ipw.HTML("<span style='font-size:85%;color:#666'>Minority carriers near the gap; "
                                "shown and added to the total, not fitted.</span>")
        electronic_box = ipw.VBox([self.electronic_on, self.lorenz_choice, self.electronic_info,
                                   self.bipolar_on, *self.bipolar_controls.values(), bipolar_note])

        # data
        self.data_panel = DataPanel(self._set_data, self.messages)

        self.sections = ipw.Accordion(
            children=[self.data_panel, material_box,
                      ipw.VBox([self.mechanism_box, ipw.HBox([self.add_kind, self.add_button])]),
                      electronic_box],
            selected_index=2, layout=ipw.Layout(width="31em"))
        for i, t in enumerate(("Measured data", "Material and branches", "Scattering mechanisms",
                               "Electronic part")):
            self.sections.set_title(i, t)
        self.sections.add_class(css("sections"))

        # figures
        self.plots = {"conductivity": ConductivityPlot(), "rates": RatesPlot(),
                      "spectrum": SpectrumPlot(), "mfp": AccumulationPlot()}
        self.figure_tabs = ipw.Tab(children=[self.plots[k].widget for k in _PLOT_ORDER])
        for i, t in enumerate(_PLOT_TITLES):
            self.figure_tabs.set_title(i, t)
        self.figure_tabs.add_class(css("figures"))
        self.figure_tabs.observe(g(lambda ch: self._update_visible_plot()), names="selected_index")

        # work areas (filled by the panels that need fitting / what-if / records)
        self.work_tabs = ipw.Tab()
        self.work_tabs.add_class(css("work"))
        self._build_work_areas()

        # the controls scroll on their own, so the figures stay in view beside them
        controls = ipw.Box([self.sections], layout=ipw.Layout(max_height="560px", overflow="auto",
                                                              flex="0 0 auto", margin="0 8px 0 0"))
        main = ipw.HBox([controls, ipw.VBox([self.temperature, self.figure_tabs])],
                        layout=ipw.Layout(flex_flow="row wrap", align_items="flex-start"))
        header = ipw.HBox([title, readout_box], layout=ipw.Layout(flex_flow="row wrap", align_items="center"))
        super().__init__([header, self.messages.output, main, self.work_tabs])
        self.add_class(css("workbench"))
        self.data_panel.show(self.data)
        self._sync_electronic_controls()
        self._show_material_info()

    def _build_work_areas(self):
        pages, titles = [], []
        try:
            from .fit_panel import FitPanel
        except ImportError:
            FitPanel = None
        if FitPanel is not None:
            self.fit_panel = FitPanel(self)
            pages.append(self.fit_panel)
            titles.append("Fit to data")
        try:
            from .whatif_panel import WhatIfPanel
        except ImportError:
            WhatIfPanel = None
        if WhatIfPanel is not None:
            self.whatif_panel = WhatIfPanel(self)
            pages.append(self.whatif_panel)
            titles.append("What if")
        try:
            from .session_panel import SessionPanel
        except ImportError:
            SessionPanel = None
        if SessionPanel is not None:
            self.session_panel = SessionPanel(self)
            pages.append(self.session_panel)
            titles.append("Save and export")
        self.work_tabs.children = pages
        for i, t in enumerate(titles):
            self.work_tabs.set_title(i, t)

    def _build_cards(self):
        """(Re)build the mechanism cards from the full model (structure changes only)."""
        for card in self.cards.values():
            card.close()
        self.cards = {}
        self.controls = {}
        g = self.messages.guard
        for m in self._full.scattering:
            card = MechanismCard(m, on_change=g(self._param_changed), on_toggle=g(self._toggled),
                                 enabled=self._enabled.get(m.name, True), on_error=self.messages.error)
            self.cards[m.name] = card
            self.controls.update(card.controls)
        self.mechanism_box.children = list(self.cards.values())
        present = {m.kind for m in self._full.scattering}
        kinds = [(mechanism_title(k), k) for k in MECHANISMS if k not in present]
        self.add_kind.options = kinds
        self.add_button.disabled = not kinds
        if hasattr(self, "fit_panel"):
            self.fit_panel.rebuild()

    # --- state --------------------------------------------------------------------
    @property
    def full_model(self) -> LatticeModel:
        """The model with every mechanism, including those switched off."""
        return self._full

    @property
    def model(self) -> LatticeModel:
        """The model in use: mechanisms switched on, with the current values."""
        off = [n for n, on in self._enabled.items() if not on]
        return self._full.without(*off) if off else self._full

    @property
    def material(self):
        """The preset :class:`kinetic.materials.Material`, or None for a model as given."""
        return self._material

    @property
    def enabled(self) -> dict:
        return dict(self._enabled)

    def set_model(self, model: LatticeModel, *, enabled: dict | None = None) -> None:
        """Replace the model (e.g. from a fit or a saved record) and rebuild the controls."""
        if not isinstance(model, LatticeModel):
            raise ParameterError(f"model must be a kinetic.LatticeModel, got {type(model).__name__}")
        with self._lock:
            self._full = model
            self._enabled = {n: True for n in model.mechanism_names}
            if enabled:
                self._enabled.update({k: bool(v) for k, v in enabled.items() if k in self._enabled})
            mat = self._lookup_material(model.material)
            self._material = mat
            self._split = len(model.branches) > 1
            self._mute_choices(mat)
            self._build_cards()
            self._cache.pop("floor", None)
            self._show_material_info()
            self.refresh()

    def load_record(self, record) -> None:
        """Use a loaded fit record: its data, its fitted model, its fit results and Lorenz method."""
        with self._lock:
            method = (getattr(record, "options", None) or {}).get("lorenz_method")
            self._set_data(record.data)
            if method in {v for _, v in LORENZ_METHODS} and not self.lorenz_choice.disabled:
                self._muted = True
                try:
                    self.lorenz_choice.value = method
                finally:
                    self._muted = False
            self.set_model(record.model)
            if hasattr(self, "fit_panel"):
                self.fit_panel.show_result(record)
            self.fit_finished(record)

    def set_values(self, values: dict) -> None:
        """Set several parameters at once (``{"<mechanism>.<param>": value}``), moving the sliders."""
        with self._lock:
            new = self._full.with_params(values)
            self._check_active(new, self._enabled)
            self._full = new
            for card in self.cards.values():
                card.set_values({k: v for k, v in values.items() if k.split(".", 1)[0] == card.name})
            self.refresh(electronic=False)

    def _mute_choices(self, mat):
        opts = list(_materials.names())
        if mat is None:
            opts = ["(model as given)"] + opts
        self._muted = True
        try:
            self.material_choice.options = opts
            self.material_choice.value = mat.name if mat is not None else opts[0]
            self.branch_choice.value = self._split
        finally:
            self._muted = False

    _muted = False

    @staticmethod
    def _check_active(full: LatticeModel, enabled: dict) -> LatticeModel:
        off = [n for n, on in enabled.items() if not on]
        return full.without(*off) if off else full  # the engine refuses a model without resistive scattering

    # --- callbacks ----------------------------------------------------------------
    def _param_changed(self, key: str, value: float):
        with self._lock:
            try:
                new = self._full.with_params({key: value})
                self._check_active(new, self._enabled)
            except Exception:
                self._revert_control(key)
                raise
            self._full = new
            self.refresh(electronic=False)

    def _revert_control(self, key: str):
        name = key.split(".", 1)[0]
        if name in self.cards:
            self.cards[name].set_values({key: self._full.params[key]})

    def _toggled(self, name: str, on: bool):
        with self._lock:
            enabled = dict(self._enabled)
            enabled[name] = on
            try:
                self._check_active(self._full, enabled)
            except ParameterError:
                self.cards[name].set_enabled(not on)
                raise ParameterError(
                    f"cannot switch off {mechanism_title(self._full.mechanism(name).kind, name).lower()}: "
                    "every branch needs at least one resistive mechanism (boundaries, point defects, "
                    "Umklapp, ...) or its conductivity is infinite") from None
            self._enabled = enabled
            if hasattr(self, "fit_panel"):
                self.fit_panel.rebuild()
            self.refresh(electronic=False)

    def _material_changed(self, change):
        if self._muted:
            return
        name = change["new"]
        if name == "(model as given)":
            return
        with self._lock:
            mat = _materials.get(name)
            try:
                scattering = [remake_for_material(m, mat) for m in self._full.scattering]
                new = LatticeModel.from_material(mat, scattering=scattering, split_branches=self._split,
                                                 normal_correction=self._full.normal_correction)
                self._check_active(new, self._enabled)
            except Exception:
                self._mute_choices(self._material)
                raise
            self._material = mat
            self._full = new
            if "(model as given)" in self.material_choice.options:
                self._mute_choices(mat)
            self._build_cards()
            self._cache.pop("floor", None)
            self._show_material_info()
            self.refresh(electronic=False)

    def _branches_changed(self, change):
        if self._muted:
            return
        split = bool(change["new"])
        with self._lock:
            if self._material is None:
                self._mute_choices(None)
                raise ParameterError("choose a material preset to change the branches; this model came "
                                     "with its own branches")
            try:
                new = LatticeModel.from_material(self._material, scattering=self._full.scattering,
                                                 split_branches=split,
                                                 normal_correction=self._full.normal_correction)
                self._check_active(new, self._enabled)
            except Exception:
                self._mute_choices(self._material)
                raise
            self._split = split
            self._full = new
            self._cache.pop("floor", None)
            self._show_material_info()
            self.refresh(electronic=False)

    def _add_clicked(self, _button=None):
        kind = self.add_kind.value
        if kind is None:
            return
        with self._lock:
            m = new_mechanism(kind, self._material)
            self._full = self._full.with_mechanism(m)
            self._enabled[m.name] = True
            self._build_cards()
            self.refresh(electronic=False)
            self.messages.info(f"Added {mechanism_title(kind).lower()} with default values.")

    def _electronic_changed(self, change):
        if self._muted:
            return
        with self._lock:
            try:
                self._cache.pop("electronic", None)
                self.refresh()
            except Exception:
                self._muted = True
                try:
                    if change["owner"] is self.lorenz_choice:
                        self.lorenz_choice.value = change["old"]
                    else:
                        self.electronic_on.value = False
                finally:
                    self._muted = False
                self._cache.pop("electronic", None)
                self.refresh()
                raise

    def _set_data(self, ds) -> None:
        with self._lock:
            self.data = ds
            self._cache.pop("electronic", None)
            self._band = None  # the last fit's band belongs to the previous data
            self.data_panel.show(ds)
            self._sync_electronic_controls()
            if hasattr(self, "fit_panel"):
                self.fit_panel.rebuild()
            self.refresh()

    def _sync_electronic_controls(self):
        ds = self.data
        can_split = ds is not None and ds.kind == "total" and ds.resistivity is not None
        self._muted = True
        try:
            self.electronic_on.disabled = not can_split
            if not can_split:
                self.electronic_on.value = False
            elif not self.electronic_on.value:
                self.electronic_on.value = True
            self.lorenz_choice.disabled = not can_split
            if (ds is None or ds.seebeck is None) and self.lorenz_choice.value in ("spb", "kim"):
                self.lorenz_choice.value = "auto"
        finally:
            self._muted = False
        if ds is None:
            self.electronic_info.value = "<i>No data loaded.</i>"
        elif ds.kind == "lattice":
            self.electronic_info.value = "The data are already lattice conductivity; nothing to split off."
        elif ds.resistivity is None:
            self.electronic_info.value = ("The data have no resistivity column, so the electronic part "
                                          "cannot be split off; the model is compared with the total.")
        else:
            extra = "" if ds.seebeck is not None else " (no Seebeck column: only the Sommerfeld value)"
            self.electronic_info.value = f"Resistivity measured: the electronic part can be split off{extra}."

    def _show_material_info(self):
        mat = self._material
        if mat is None:
            self.material_info.value = "<i>Model with its own branches (no preset).</i>"
            return
        parts = [f"Debye temperature {fmt(mat.debye_temperature)} K",
                 f"mean atomic mass {fmt(mat.atomic_mass)} u"]
        if mat.has_split_velocities:
            parts.append(f"sound velocities L {fmt(mat.velocity_longitudinal)}, "
                         f"T {fmt(mat.velocity_transverse)} m/s")
        if mat.gruneisen is not None:
            parts.append(f"Grüneisen parameter {fmt(mat.gruneisen)}")
        self.material_info.value = "<span style='font-size:90%'>" + "; ".join(parts) + "</span>"

    # --- numbers for the views ----------------------------------------------------
    @property
    def temperatures(self) -> np.ndarray:
        """Grid of the model curves [K]: the data's range widened, or 2-1000 K."""
        ds = self.data
        if ds is None:
            lo, hi = 2.0, 1000.0
        else:
            lo, hi = float(ds.temperature.min()) / 1.5, float(ds.temperature.max()) * 1.5
        return np.geomspace(max(lo, 0.5), hi, 140)

    def electronic(self):
        """The electronic split of the measured data, or None.

        Returns the :class:`kinetic.fitting.LatticeTarget` the fit would use
        (measured total minus L sigma T with the chosen Lorenz method, at the
        points where that stays positive), or None when the split is off or
        the data have no resistivity.
        """
        if "electronic" in self._cache:
            return self._cache["electronic"]
        ds = self.data
        out = None
        if ds is not None and self.electronic_on.value and ds.resistivity is not None and ds.kind == "total":
            from kinetic.fitting import lattice_target

            out = lattice_target(ds, self.lorenz_choice.value)
        self._cache["electronic"] = out
        return out

    def bipolar(self, temperature):
        """Bipolar part [W/m/K] at temperatures [K] when switched on, else None."""
        if not self.bipolar_on.value:
            return None
        from kinetic.electronic import bipolar_kappa_activated

        c = self.bipolar_controls
        return bipolar_kappa_activated(np.asarray(temperature, dtype=float), c["bipolar.prefactor"].value,
                                       c["bipolar.band_gap"].value)

    def floor(self, temperature):
        """Cahill-Watson-Pohl minimum of the material [W/m/K], or None without a preset."""
        if self._material is None:
            return None
        from kinetic.estimates import cahill_minimum_for

        T = np.asarray(temperature, dtype=float)
        key = (self._material.name, T.shape, T.tobytes())
        cached = self._cache.setdefault("floor", {})
        if key not in cached:
            if len(cached) > 8:
                cached.clear()
            cached[key] = cahill_minimum_for(self._material, T)
        return cached[key]

    # --- refreshing ---------------------------------------------------------------
    def refresh(self, electronic: bool = True) -> None:
        """Recompute the readouts and the visible plot; mark the other plots stale.

        Called from the fit's background thread (see :meth:`in_background`),
        plots only ask the front end for a redraw instead of drawing there.
        """
        with self._lock:
            if electronic:
                self._cache.pop("electronic", None)
            in_thread = bool(getattr(self._background, "active", False))
            for p in self.plots.values():
                p.stale = True
                p.fast = not in_thread
            try:
                self._update_conductivity_numbers()
                self._update_visible_plot()
            finally:
                for p in self.plots.values():
                    p.fast = True
            if hasattr(self, "whatif_panel"):
                self.whatif_panel.model_changed()

    def in_background(self) -> None:
        """Mark the calling thread as a background worker (its refreshes do not draw)."""
        self._background.active = True

    def fit_finished(self, result) -> None:
        """Keep a fit result (FitResult or loaded Record) and draw its prediction band."""
        with self._lock:
            self.result = result
            self._band = None
            try:
                from kinetic.fitting import predict_band

                b = predict_band(result, self.temperatures)
                self._band = (b.temperature, b.lower, b.upper)
            except Exception as exc:  # noqa: BLE001 - a missing band must not hide the fit
                self.messages.warn(f"no prediction band for this fit ({' '.join(str(exc).split())})")
            self.refresh(electronic=False)

    def _update_visible_plot(self):
        idx = self.figure_tabs.selected_index or 0
        self.update_plot(_PLOT_ORDER[idx])

    def update_all_plots(self) -> None:
        """Bring every plot up to date (hidden tabs included)."""
        for name in _PLOT_ORDER:
            self.update_plot(name)

    def update_plot(self, name: str) -> None:
        """Bring one plot up to date if it is stale."""
        plot = self.plots[name]
        if not plot.stale:
            return
        getattr(self, f"_draw_{name}")()

    def _kinds(self, model):
        return {m.name: m.kind for m in model.scattering}

    def _update_conductivity_numbers(self):
        model = self.model
        T0 = float(self.temperature.value)
        k0 = float(model.kappa(T0))
        el = self.electronic()
        self.readouts["temperature"].value = f"At <b>{fmt(T0)} K</b>:"
        self.readouts["lattice"].value = f"lattice \u03ba = <b>{fmt(k0)}</b> W m\u207b\u00b9 K\u207b\u00b9"
        ke0 = None
        if el is not None:
            T = el.temperature
            if T.min() <= T0 <= T.max():
                ke0 = float(np.interp(T0, T, el.kappa_electronic))
        kb0 = self.bipolar(T0)
        self.readouts["electronic"].value = "" if ke0 is None else f"electronic = {fmt(ke0)}"
        self.readouts["bipolar"].value = "" if kb0 is None else f"bipolar = {fmt(float(kb0))}"
        if ke0 is None and kb0 is None:
            self.readouts["total"].value = ""
        else:
            total = k0 + (ke0 or 0.0) + (0.0 if kb0 is None else float(kb0))
            self.readouts["total"].value = f"total = <b>{fmt(total)}</b> W m\u207b\u00b9 K\u207b\u00b9"
        fl = self.floor(T0)
        self.readouts["floor"].value = "" if fl is None else f"floor = {fmt(float(fl))}"
        self._k0 = k0

    @property
    def kappa_at_temperature(self) -> float:
        """Model lattice conductivity at the chosen temperature [W/m/K] (as shown)."""
        return self._k0

    def _draw_conductivity(self):
        model = self.model
        T = self.temperatures
        k = model.kappa(T)
        parts = {"lattice": (T, k)}
        floor = self.floor(T)
        if floor is not None:
            parts["floor"] = (T, floor)
        ds = self.data
        measured = measured_lattice = None
        label = None
        el = self.electronic()
        if ds is not None:
            measured = (ds.temperature, ds.kappa)
            label = "measured (lattice)" if ds.kind == "lattice" else "measured (total)"
            if el is not None:
                Td = el.temperature
                ke = np.asarray(el.kappa_electronic, float)
                parts["electronic"] = (Td, ke)
                kb = self.bipolar(Td)
                parts["total"] = (Td, model.kappa(Td) + ke + (0.0 if kb is None else kb))
                measured_lattice = (Td, np.asarray(el.kappa, float))
        kb = self.bipolar(T)
        if kb is not None:
            parts["bipolar"] = (T, kb)
            if "total" not in parts:
                parts["total"] = (T, k + kb)
        band = self._band if self.result is not None else None
        self.plots["conductivity"].update(T, parts, measured=measured, measured_lattice=measured_lattice,
                                          band=band, marker=float(self.temperature.value),
                                          measured_label=label)

    def _omega_grid(self, model):
        return {b.name: np.geomspace(b.omega_max * 1e-3, b.omega_max, 160) for b in model.branches}

    def _draw_rates(self):
        model = self.model
        T0 = float(self.temperature.value)
        omega = self._omega_grid(model)
        rates = {}
        for b in model.branches:
            # each branch on its own frequency grid (rates of one branch at a time)
            rates[b.name] = model.rates(omega[b.name], T0)[b.name]
        self.plots["rates"].update(omega, rates, self._kinds(model), T0)

    def _draw_spectrum(self):
        T0 = float(self.temperature.value)
        s = self.model.spectral(T0)
        self.plots["spectrum"].update(s.omega, s.kappa_omega, T0)

    def _draw_mfp(self):
        model = self.model
        T0 = float(self.temperature.value)
        s = model.spectral(T0)
        length = None
        for m in model.scattering:
            if m.kind == "boundary":
                length = float(m.values["length"])
                break
        self.plots["mfp"].update(s.mfp, s.kappa_accumulated, T0, length, median=s.median_mfp)

    # --- housekeeping -------------------------------------------------------------
    def close(self):
        """Close the widgets and figures of the workbench."""
        for p in self.plots.values():
            p.close()
        for panel in ("fit_panel", "whatif_panel", "session_panel"):
            if hasattr(self, panel):
                getattr(self, panel).close_all()
        super().close()
