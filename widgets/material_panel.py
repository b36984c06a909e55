"""Material area: choose a preset (its default model), the branches, and see how far to trust it.

Every preset is offered. Choosing one asks the engine for its default model
(:func:`kinetic.defaults.default_model` through :mod:`widgets._engine`). When
the preset lacks a number the default model needs (a Grüneisen parameter, say),
the engine's message is shown here with a box to type the number in; the
model is then built from the preset with that number. Under the chooser: whether
the preset is calibrated, on what range and how well, and the engine's scope notes.
"""
from __future__ import annotations

from collections.abc import Callable

import ipywidgets as ipw

from . import _engine
from .style import css, esc, fmt, unit_text

__all__ = ["AS_GIVEN", "MaterialPanel", "calibration_html"]

AS_GIVEN = "(model as given)"


def calibration_html(material) -> str:
    """One line: calibrated or not, source, range, rms deviation, number of points."""
    cal = _engine.calibration(material)
    if cal is None:
        return ("<span style='color:#b00020'>Not calibrated</span>: no published k(T) was fitted for this "
                "preset; treat absolute values as rough.")
    bits = []
    if getattr(cal, "t_min", None) is not None and getattr(cal, "t_max", None) is not None:
        bits.append(f"{fmt(cal.t_min)}\u2013{fmt(cal.t_max)} K")
    if getattr(cal, "n_points", None):
        bits.append(f"{int(cal.n_points)} points")
    if getattr(cal, "rms", None) is not None:
        bits.append(f"rms deviation {100 * float(cal.rms):.1f}%")
    sample = getattr(cal, "sample", "") or ""
    where = f" on {esc(sample)}" if sample else ""
    return (f"<span style='color:#1b7a1b'>Calibrated</span>{where}"
            + (f" ({', '.join(bits)})" if bits else "") + f"; source: {esc(cal.source)}.")


class MaterialPanel(ipw.VBox):
    """Material chooser with calibration, scope notes and the inputs a preset may need.

    Parameters
    ----------
    on_model : callable
        ``on_model(model, material)`` with the default model of the chosen preset.
    messages : MessageBoard

    Attributes
    ----------
    choice : ipw.Dropdown
    branches : ipw.ToggleButtons
    calibration, notes, info : ipw.HTML
    need : ipw.VBox
        The box asking for a missing number (hidden when nothing is missing).
    number : ipw.Text
    """

    def __init__(self, on_model: Callable, messages, material=None, split: bool = False):
        self._on_model = on_model
        self.messages = messages
        self.material = material
        self._muted = False
        self._given: dict = {}  # numbers the user typed for a preset: name -> {field: value}
        names = _engine.material_names()
        options = names if material is not None else [AS_GIVEN] + names
        self.choice = ipw.Dropdown(options=options, value=material.name if material is not None else AS_GIVEN,
                                   description="material", style={"description_width": "5em"},
                                   layout=ipw.Layout(width="17em"), tooltip="material preset")
        self.choice.add_class(css("material"))
        self.choice.observe(messages.guard(self._chosen), names="value")
        self.branches = ipw.ToggleButtons(options=[("one averaged branch", False),
                                                   ("longitudinal + transverse", True)],
                                          value=bool(split), style={"button_width": "auto"},
                                          tooltips=["split_branches=False", "split_branches=True"])
        self.branches.add_class(css("branches"))
        self.branches.observe(messages.guard(self._chosen), names="value")
        self.calibration = ipw.HTML()
        self.calibration.add_class(css("calibration"))
        self.notes = ipw.HTML()
        self.notes.add_class(css("scope-notes"))
        self.info = ipw.HTML()
        self.need_text = ipw.HTML()
        self.number = ipw.Text(placeholder="value", continuous_update=False, layout=ipw.Layout(width="8em"))
        self.number.add_class(css("missing-number"))
        self.need_unit = ipw.HTML()
        self.use_number = ipw.Button(description="Use this number", layout=ipw.Layout(width="auto"))
        self.use_number.add_class(css("use-number"))
        self.use_number.on_click(messages.guard(lambda _b: self._number_given()))
        self.need = ipw.VBox([self.need_text, ipw.HBox([self.number, self.need_unit, self.use_number])],
                             layout=ipw.Layout(display="none", border="1px solid #d08000", padding="4px"))
        self.need.add_class(css("need"))
        self._missing = None
        super().__init__([self.choice, self.branches, self.need, self.calibration, self.notes, self.info])
        self.add_class(css("material-panel"))
        self.show(material)

    # --- choosing --------------------------------------------------------------------
    @property
    def split(self) -> bool:
        return bool(self.branches.value)

    def choose(self, name: str, split: bool | None = None) -> None:
        """Choose a preset (and the branches) as the user would."""
        if split is not None:
            self._set_quietly(branches=bool(split))
        if self.choice.value == name:
            self._chosen({"new": name})
        else:
            self.choice.value = name

    def _set_quietly(self, **kw):
        self._muted = True
        try:
            for attr, v in kw.items():
                w = getattr(self, attr)
                if attr == "choice" and v not in w.options:
                    w.options = [AS_GIVEN] + _engine.material_names()
                w.value = v
        finally:
            self._muted = False

    def _chosen(self, change):
        if self._muted:
            return
        name = self.choice.value
        if name == AS_GIVEN:
            if self.material is None and change.get("owner") is self.branches:
                self._set_quietly(branches=not self.split)
                raise _engine.ParameterError("choose a material preset to change the branches; this model "
                                             "came with its own branches")
            return
        self._build(name)

    def _build(self, name: str):
        mat = _engine.get_material(name)
        for fld, v in self._given.get(name, {}).items():
            mat = _engine.with_number(mat, fld, v)
        try:
            model = _engine.default_model(mat, split_branches=self.split)
        except _engine.KineticError as exc:
            need = _engine.missing_number(exc)
            if need is None:
                self._restore()
                raise
            self._ask(name, need, exc)
            return
        self.need.layout.display = "none"
        self._missing = None
        self.material = mat
        self._on_model(model, mat)
        self.show(mat)

    def _restore(self):
        self._set_quietly(choice=self.material.name if self.material is not None else AS_GIVEN)

    def _ask(self, name, need, exc):
        fld, words, unit = need
        self._missing = (name, fld)
        self.need_text.value = (f"<b>{esc(name)} needs a number the preset does not have.</b> "
                                f"{esc(' '.join(str(exc).split()))}<br>Type the {esc(words)} below "
                                "(for example from a published measurement) and press the button.")
        self.need_unit.value = esc(unit_text(unit))
        self.number.value = ""
        self.need.layout.display = "flex"
        self.messages.warn(f"{name}: the {words} is missing; type it in the material area.")

    def _number_given(self):
        if self._missing is None:
            return
        name, fld = self._missing
        text = self.number.value.strip()
        try:
            v = float(text)
        except ValueError:
            raise _engine.ParameterError(f"{fld}: expected a number, got {text!r}") from None
        self._given.setdefault(name, {})[fld] = v
        self._build(name)

    # --- showing ---------------------------------------------------------------------
    def show(self, mat, model=None) -> None:
        """Describe the material: calibration, scope notes, constants."""
        self.material = mat
        if mat is None:
            self.calibration.value = "<i>A model with its own branches (no preset).</i>"
            self.notes.value = ""
            self.info.value = ""
            return
        self.calibration.value = "<span style='font-size:90%'>" + calibration_html(mat) + "</span>"
        self.show_notes(mat)
        parts = [f"Debye temperature {fmt(mat.debye_temperature)} K",
                 f"mean atomic mass {fmt(mat.atomic_mass)} u"]
        if mat.has_split_velocities:
            parts.append(f"sound velocities: longitudinal {fmt(mat.velocity_longitudinal)} m/s, "
                         f"transverse {fmt(mat.velocity_transverse)} m/s")
        if mat.gruneisen is not None:
            parts.append(f"Grüneisen parameter {fmt(mat.gruneisen)}")
        self.info.value = "<span style='font-size:85%;color:#444'>" + "; ".join(parts) + ".</span>"

    def show_notes(self, mat, **where) -> None:
        """The engine's scope notes for the material (at the chosen temperature, grain size...)."""
        if mat is None:
            self.notes.value = ""
            return
        notes = _engine.scope_notes(mat, **where)
        self.notes.value = ("<ul style='margin:2px 0 2px 1.2em;padding:0;font-size:88%;color:#8a4b00'>"
                            + "".join(f"<li>{esc(n)}</li>" for n in notes) + "</ul>") if notes else ""

    def set_model_material(self, mat, split: bool) -> None:
        """Show a material chosen elsewhere (e.g. a loaded record) without rebuilding the model."""
        self.material = mat
        self._set_quietly(choice=mat.name if mat is not None else AS_GIVEN, branches=bool(split))
        self.show(mat)
