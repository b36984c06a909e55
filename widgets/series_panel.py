"""Flash data and sample series in the data panel.

:class:`FlashOptions` is the collapsible "Flash data (diffusivity)" section:
the choices a diffusivity file needs for k = D rho c_p (heat capacity,
density, relative density, porosity correction). It only turns the choices
into the loader's keyword options (:func:`kinetic.data.parse_data`), labelled
with the loader's own words (``kinetic.data.options.LOADER_OPTIONS``); the
loader does every computation and says what it did in the Dataset's notes,
which the section shows.

:class:`SampleChooser` picks the sample being fitted out of a series.
"""
from __future__ import annotations

from collections.abc import Callable

import ipywidgets as ipw

from . import _engine
from .style import css

__all__ = ["FlashOptions", "SampleChooser", "flash_notes"]

#: heat-capacity choices: words -> code ("file": whatever the file gives)
_CP_CHOICES = (("from the file", "file"), ("Dulong-Petit (3R per mole of atoms)", "dulong-petit"),
               ("Debye (of the material)", "debye"), ("typed value", "value"))
_CP_UNITS = ("J/(g K)", "J/(kg K)")
_RHO_UNITS = ("g/cm^3", "kg/m^3")
#: the heat-capacity columns a chosen c_p replaces (names the loader reads as c_p)
_CP_COLUMNS = ["cp", "c_p"]


def _label(option: str, unit: str = "") -> str:
    words = _engine.loader_label(option)
    return f"{words} [{unit}]" if unit else words


def flash_notes(ds) -> list:
    """The loader's own notes of a Dataset (not the file's comment lines)."""
    if ds is None:
        return []
    return [n for n in getattr(ds, "notes", ()) if not str(n).lstrip().startswith("#")]


class FlashOptions(ipw.Accordion):
    """The "Flash data (diffusivity)" section; ``on_change()`` is called when a choice changes.

    Attributes
    ----------
    heat_capacity, material, cp_value, cp_unit, density, density_unit,
    relative_density, porosity : the controls.
    report : ipw.HTML
        Where c_p came from and how much the other choices would move k (the loader's notes).
    """

    def __init__(self, on_change: Callable, messages):
        self._on_change = on_change
        self.heat_capacity = ipw.Dropdown(options=_CP_CHOICES, value="file",
                                          description=_label("heat_capacity"), **_wide())
        self.heat_capacity.tooltip = "heat_capacity: c_p for k = D rho c_p"
        self.material = ipw.Dropdown(options=[("from the file", None)] + [(n, n) for n in _engine.material_names()],
                                     value=None, description=_label("material"), **_wide())
        self.material.tooltip = "material: the preset whose Dulong-Petit or Debye c_p is used"
        self.cp_value = ipw.Text(value="", placeholder="e.g. 0.8", description="c_p value",
                                 style={"description_width": "13.5em"}, layout=ipw.Layout(width="18.5em"))
        self.cp_unit = ipw.Dropdown(options=_CP_UNITS, value=_CP_UNITS[0], layout=ipw.Layout(width="8em"))
        self.cp_unit.tooltip = "unit of the typed heat capacity"
        self.density = ipw.Text(value="", placeholder="from the file", description=_label("density"),
                                style={"description_width": "13.5em"}, layout=ipw.Layout(width="18.5em"))
        self.density.tooltip = "density: mass density of the sample as measured (empty: from the file)"
        self.density_unit = ipw.Dropdown(options=_RHO_UNITS, value=_RHO_UNITS[0], layout=ipw.Layout(width="8em"))
        self.density_unit.tooltip = "unit of the typed density"
        self.relative_density = ipw.Text(value="", placeholder="from the file, e.g. 0.92",
                                         description=_label("relative_density"), **_wide())
        self.relative_density.tooltip = ("relative_density: pellet density / full density, in (0, 1] "
                                          "(empty: from the file)")
        self._relations = _engine.porosity_relations()
        # "none" is a real option value: a Dropdown whose value is None shows an empty box
        self.porosity = ipw.Dropdown(options=[("none (k of the sample as measured)", "none")]
                                     + [(n, n) for n in self._relations], value="none",
                                     description=_label("porosity_correction"), **_wide())
        self.porosity_hint = ipw.HTML()
        d = _engine.DEFAULT_RELATIVE_ERRORS
        self.errors = {}
        for option, default, what in (("diffusivity_rel_err", d["diffusivity"], "D"),
                                      ("density_rel_err", d["density"], "density"),
                                      ("heat_capacity_rel_err", None, "c_p")):
            hint = (f"default {default:g}" if default is not None else
                    f"default {d['heat_capacity']:g} measured, {d['heat_capacity_model']:g} model")
            w = ipw.Text(value="", placeholder=hint, description=_label(option), continuous_update=False,
                         **_wide())
            w.tooltip = f"{option}: relative standard error of {what}, e.g. 0.03 for 3 % (empty: {hint})"
            self.errors[option] = w
        self.report = ipw.HTML()
        self.report.add_class(css("flash-report"))
        self.apply = ipw.Button(description="Re-read with these choices", layout=ipw.Layout(width="auto"))
        self.apply.tooltip = "read the current file(s) again with the choices above"
        self._cp_row = ipw.HBox([self.cp_value, self.cp_unit])
        self._muted = False
        for w in (self.heat_capacity, self.material, self.cp_unit, self.density_unit, self.porosity):
            w.observe(messages.guard(self._changed), names="value")
        for w in (self.cp_value, self.density, self.relative_density, *self.errors.values()):
            w.continuous_update = False
            w.observe(messages.guard(self._changed), names="value")
        self.apply.on_click(messages.guard(lambda _b: self._on_change()))
        body = ipw.VBox([self.heat_capacity, self.material, self._cp_row,
                         ipw.HBox([self.density, self.density_unit]), self.relative_density,
                         self.porosity, self.porosity_hint, *self.errors.values(), self.apply, self.report])
        super().__init__(children=[body], selected_index=None)
        self.set_title(0, "Flash data (diffusivity)")
        self.add_class(css("flash-options"))
        self._sync()

    def _sync(self):
        cp = self.heat_capacity.value
        self.material.layout.display = "" if cp in _engine.HEAT_CAPACITY_MODELS else "none"
        self._cp_row.layout.display = "" if cp == "value" else "none"
        rel = self.porosity.value
        if rel == "none":
            text = "k stays that of the sample as measured."
            tip = "porosity_correction: none"
        else:
            phi, where = self._relations[rel]
            text = f"{where}; valid for porosity up to {phi:.3g} (relative density from {1 - phi:.3g})"
            tip = f"porosity_correction: {rel}: {text}"
        tips = "; ".join(f"{n}: porosity up to {p:.3g} ({w})" for n, (p, w) in self._relations.items())
        self.porosity.tooltip = tip
        self.porosity_hint.value = (f"<span style='color:#666;font-size:90%' title='{_attr(tips)}'>"
                                    f"{_html(text)}</span>")

    def _changed(self, _change=None):
        self._sync()
        if not self._muted:
            self._on_change()

    def options(self) -> dict:
        """The loader's keyword options for the current choices (exactly what the loader is given)."""
        out: dict = {}
        cp = self.heat_capacity.value
        if cp in _engine.HEAT_CAPACITY_MODELS:
            out["heat_capacity"] = cp
            if self.material.value is not None:
                out["material"] = self.material.value
        elif cp == "value" and self.cp_value.value.strip():
            out["heat_capacity"] = f"{self.cp_value.value.strip()} {self.cp_unit.value}"
        if cp == "value" and "heat_capacity" in out:
            # a typed c_p replaces a c_p column (a chosen model does so in the loader itself, with a
            # note on how much k moves)
            out["ignore_columns"] = list(_CP_COLUMNS)
        if self.density.value.strip():
            out["density"] = f"{self.density.value.strip()} {self.density_unit.value}"
        if self.relative_density.value.strip():
            out["relative_density"] = self.relative_density.value.strip()
        if self.porosity.value != "none":
            out["porosity_correction"] = self.porosity.value
        for option, w in self.errors.items():
            text = w.value.strip()
            if text:
                try:
                    out[option] = float(text)  # the loader checks the range
                except ValueError:
                    raise _engine.ParameterError(
                        f'"{_label(option)}": expected a relative error such as 0.03 for 3 %, '
                        f"got {text[:40]!r}") from None
        return out

    def show(self, ds) -> None:
        """Say where c_p came from and how the choice moves k (the loader's notes), or nothing."""
        if ds is None or getattr(ds, "heat_capacity", None) is None:
            self.report.value = ("<span style='color:#666'>The data in use are not a diffusivity file "
                                 "(k was given directly).</span>" if ds is not None else "")
            return
        lines = [f"<b>c_p from</b>: {_html(ds.heat_capacity_choice or 'the file')}"]
        if ds.relative_density is not None:
            how = (f"corrected to full density ({_html(ds.porosity_correction)})" if ds.porosity_correction
                   else "not corrected to full density")
            lines.append(f"<b>relative density</b> {ds.relative_density:.4g}: {how}")
        lines += [_html(n) for n in flash_notes(ds)]
        self.report.value = ("<div style='font-size:90%;line-height:1.35'>" + "<br>".join(lines) + "</div>")


class SampleChooser(ipw.Dropdown):
    """Chooser of the sample being fitted; ``on_choose(index)`` when the user picks another."""

    def __init__(self, on_choose: Callable, messages):
        super().__init__(options=[], description="sample being fitted", style={"description_width": "10em"},
                         layout=ipw.Layout(width="21em", display="none"))
        self.tooltip = "the sample of the series that the fit, readouts and what-ifs use"
        self.add_class(css("sample-choice"))
        self._on_choose = on_choose
        self._muted = False
        self.observe(messages.guard(self._picked), names="value")

    def show(self, series, index) -> None:
        """List the samples (hidden for fewer than two) and mark the one in use."""
        self._muted = True
        try:
            self.options = [(getattr(d, "label", "") or f"sample {i + 1}", i) for i, d in enumerate(series)]
            self.value = index if series else None
        finally:
            self._muted = False
        self.layout.display = "" if len(series) > 1 else "none"

    def _picked(self, change):
        if not self._muted and change["new"] is not None:
            self._on_choose(int(change["new"]))


def _wide() -> dict:
    """Style and a layout of its own (a shared layout would hide every control that uses it)."""
    return {"style": {"description_width": "13.5em"}, "layout": ipw.Layout(width="23em")}


def _html(text) -> str:
    return str(text).replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


def _attr(text) -> str:
    return _html(text).replace("'", "&#39;")
