"""Electronic area: split the electronic part off measured totals, and an optional bipolar part.

The split (measured total minus L sigma T, with the chosen Lorenz number) and
the bipolar term are the engine's (:mod:`widgets._engine`); this panel only
holds the choices.
"""
from __future__ import annotations

from collections.abc import Callable

import ipywidgets as ipw

from . import _engine
from .controls import ParameterControl
from .style import css

__all__ = ["LORENZ_METHODS", "ElectronicPanel"]

#: Lorenz-number choices: the engine's plain words, its key in the tooltip of the dropdown
LORENZ_METHODS = tuple((_engine.LORENZ_LABELS[k], k) for k in ("auto", "sommerfeld", "spb", "kim"))


class ElectronicPanel(ipw.VBox):
    """Electronic split and bipolar part.

    Attributes
    ----------
    split : ipw.Checkbox
    lorenz : ipw.Dropdown
    info : ipw.HTML
    bipolar_on : ipw.Checkbox
    bipolar_controls : dict of ParameterControl
    """

    def __init__(self, on_change: Callable, on_bipolar: Callable, messages):
        g = messages.guard
        self.split = ipw.Checkbox(value=False, indent=False, layout=ipw.Layout(width="auto"),
                                  description="split off the electronic part (L\u03c3T)")
        self.split.add_class(css("electronic"))
        self.lorenz = ipw.Dropdown(options=LORENZ_METHODS, value="auto", description="Lorenz number",
                                   style={"description_width": "7.5em"}, layout=ipw.Layout(width="27em"),
                                   tooltip="lorenz_method: auto, sommerfeld, spb, kim")
        self.lorenz.add_class(css("lorenz"))
        self.split.observe(g(on_change), names="value")
        self.lorenz.observe(g(on_change), names="value")
        self.info = ipw.HTML()
        self.bipolar_on = ipw.Checkbox(value=False, indent=False, layout=ipw.Layout(width="auto"),
                                       description="add a bipolar part C\u00b7T\u00b7exp(\u2212Eg / 2kT)")
        self.bipolar_on.add_class(css("bipolar"))
        self.bipolar_on.observe(g(lambda ch: on_bipolar()), names="value")
        self.bipolar_controls = {
            key: ParameterControl(key, par, on_change=g(lambda k, v: on_bipolar()), on_error=messages.error)
            for key, par in _engine.bipolar_parameters().items()}
        note = ipw.HTML("<span style='font-size:85%;color:#666'>Minority carriers near the gap; "
                        "shown and added to the total, not fitted.</span>")
        super().__init__([self.split, self.lorenz, self.info, self.bipolar_on,
                          *self.bipolar_controls.values(), note])
        self.add_class(css("electronic-panel"))

    def bipolar(self) -> dict | None:
        """``{"bipolar.<name>": value}`` when the bipolar part is on, else None."""
        if not self.bipolar_on.value:
            return None
        return {k: c.value for k, c in self.bipolar_controls.items()}

    def sync(self, ds, muted) -> None:
        """Enable the split where the data allow it and say why (``muted``: a context that silences)."""
        can_split = ds is not None and ds.kind == "total" and ds.resistivity is not None
        with muted():
            self.split.disabled = not can_split
            self.split.value = bool(can_split)
            self.lorenz.disabled = not can_split
            if (ds is None or ds.seebeck is None) and self.lorenz.value in ("spb", "kim"):
                self.lorenz.value = "auto"
        if ds is None:
            self.info.value = "<i>No data loaded.</i>"
        elif ds.kind == "lattice":
            self.info.value = "The data are already lattice conductivity; nothing to split off."
        elif ds.resistivity is None:
            self.info.value = ("The data have no resistivity column, so the electronic part cannot be split "
                               "off; the model is compared with the total.")
        else:
            extra = "" if ds.seebeck is not None else " (no Seebeck column: only the Sommerfeld value)"
            self.info.value = f"Resistivity measured: the electronic part can be split off{extra}."
