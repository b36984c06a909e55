"""Controls built from parameter metadata: a slider plus an exact-entry box per parameter.

A mechanism declares its parameters (:class:`kinetic.Parameter`: value, unit,
bounds, log scale, fixed); :class:`ParameterControl` turns one into a labelled
slider (``ipw.FloatLogSlider`` when the parameter spans decades) with a
numeric box beside it, and :class:`MechanismCard` groups a mechanism's
controls under an on/off switch. A new mechanism in the engine therefore gets
its controls without any change here.
"""
from __future__ import annotations

import math
from collections.abc import Callable
from contextlib import contextmanager

import ipywidgets as ipw

from ._engine import Parameter, ParameterError, parameter_words
from .style import (
    css,
    esc,
    fmt,
    label_html,
    mechanism_colour,
    mechanism_title,
    unit_text,
)

__all__ = ["MechanismCard", "ParameterControl", "slider_range"]

#: steps across a slider's range; one arrow-key press moves one step.
SLIDER_STEPS = 200


@contextmanager
def _muted(owner):
    """Set widget values without the owner's observers answering (they check ``owner._mute``)."""
    owner._mute = True
    try:
        yield
    finally:
        owner._mute = False


def _typed_number(owner, box, text: str, shown: str, message: str, on_error: Callable | None):
    """``float(text)``, or None after showing ``shown`` in ``box`` again and reporting ``message``.

    The report goes to ``on_error`` (the workbench's message line); without one it is raised.
    """
    try:
        return float(text)
    except ValueError:
        pass
    with _muted(owner):
        box.value = shown
    err = ParameterError(message)
    if on_error is None:
        raise err
    on_error(err)
    return None


def slider_range(p: Parameter) -> tuple:
    """``(lo, hi)`` for a slider: the parameter's bounds, made finite around its value."""
    lo, hi = (float(b) for b in p.bounds)
    v = float(p.value)
    if p.log:
        if not (lo > 0 and math.isfinite(lo)):
            lo = v / 1e3 if v > 0 else 1e-12
        if not math.isfinite(hi):
            hi = v * 1e3 if v > 0 else 1.0
    else:
        if not math.isfinite(lo):
            lo = min(0.0, v) - abs(v) - 1.0
        if not math.isfinite(hi):
            hi = max(10.0 * abs(v), 1.0)
    if hi <= lo:
        hi = lo * 10.0 if p.log else lo + 1.0
    return lo, hi


class ParameterControl(ipw.VBox):
    """A labelled slider and a numeric box for one model parameter.

    Parameters
    ----------
    key : str
        ``"<mechanism>.<param>"``, as in ``LatticeModel.params``.
    parameter : kinetic.Parameter
        Its metadata; the label is ``Parameter.label`` (description and unit).
    on_change : callable, optional
        ``on_change(key, value)`` after the user moved the slider or typed a
        value [SI unit of the parameter].

    Notes
    -----
    The slider covers ``Parameter.bounds``; the box takes any value the model
    accepts (a value beyond the slider's range leaves the slider at its end).
    The box is the readout: it shows the value in use, and a typed value is
    used exactly as typed (600 stays 600.0). The slider has no readout of its
    own, because its position is rounded to its steps.
    """

    def __init__(self, key: str, parameter: Parameter, on_change: Callable | None = None,
                 on_error: Callable | None = None, *, steps: int = SLIDER_STEPS):
        self.key = key
        self.parameter = parameter
        self.on_change = on_change
        self.on_error = on_error
        self._mute = False
        lo, hi = slider_range(parameter)
        self.range = (lo, hi)
        v = float(parameter.value)
        self._value = v
        # small or large numbers read better in exponent form on the slider's readout
        form = ".2e" if 0 < lo < 1e-3 or hi > 1e5 else ".3g"
        common = dict(continuous_update=True, readout=False, readout_format=form,
                      layout=ipw.Layout(width="13em"), style={"description_width": "0px"})
        if parameter.log:
            a, b = math.log10(lo), math.log10(hi)
            self.slider = ipw.FloatLogSlider(value=min(max(v, lo), hi), base=10.0, min=a, max=b,
                                             step=(b - a) / steps, **common)
        else:
            self.slider = ipw.FloatSlider(value=min(max(v, lo), hi), min=lo, max=hi,
                                          step=(hi - lo) / steps, **common)
        # exact entry: the text is read as a number when Enter is pressed or the box loses focus
        self.box = ipw.Text(value=self._show(v), continuous_update=False, layout=ipw.Layout(width="7em"),
                            tooltip=f"{key}: type a value and press Enter")
        self.unit = ipw.HTML(esc(unit_text(parameter.unit)), layout=ipw.Layout(width="5em"))
        self._recent: list = []  # exact values set from Python since the last real slider move
        self._remember(v)
        self.words = parameter_words(key, parameter)
        self.label = ipw.HTML(value=label_html(self.words, parameter.unit, key),
                              layout=ipw.Layout(margin="0"))
        self.label.add_class(css("label"))
        slug = key.replace(".", "-").replace("_", "-")
        self.slider.add_class(css("slider"))
        self.slider.add_class(css(f"slider-{slug}"))
        self.box.add_class(css(f"box-{slug}"))
        self.add_class(css("parameter"))
        self.slider.observe(self._from_slider, names="value")
        self.box.observe(self._from_box, names="value")
        self.slider.tooltip = key
        super().__init__([self.label, ipw.HBox([self.slider, self.box, self.unit])],
                         layout=ipw.Layout(margin="0"))

    @staticmethod
    def _show(v: float) -> str:
        """The box's text: six significant digits (the model keeps the exact value)."""
        return f"{v:.6g}"

    # --- value --------------------------------------------------------------------
    @property
    def value(self) -> float:
        """Current value [SI unit of the parameter]: the exact number in use."""
        return self._value

    @value.setter
    def value(self, v: float) -> None:
        """Set the value as a user would (the workbench follows)."""
        self.set_value(v, notify=True)

    def set_value(self, value: float, notify: bool = False) -> None:
        """Show ``value`` in slider and box; call ``on_change`` only if ``notify``."""
        v = float(value)
        self._value = v
        self._remember(v)
        with _muted(self):
            self.box.value = self._show(v)
            self.slider.value = min(max(v, self.range[0]), self.range[1])
        if notify and self.on_change is not None:
            self.on_change(self.key, v)

    def _remember(self, v: float) -> None:
        self._recent.append(float(v))
        del self._recent[:-8]

    def set_disabled(self, disabled: bool) -> None:
        self.slider.disabled = disabled
        self.box.disabled = disabled

    # --- observers ----------------------------------------------------------------
    def _position(self, v: float) -> float:
        """Where a value sits along the slider (log10 of it for a log slider)."""
        lo, hi = self.range
        v = min(max(v, lo), hi)
        return math.log10(v) if self.parameter.log else v

    def _snaps_to(self, v: float, exact: float) -> bool:
        return abs(self._position(v) - self._position(exact)) < 0.5 * float(self.slider.step) * (1 - 1e-9)

    def is_echo(self, v: float) -> bool:
        """True when slider value ``v`` is a value set from Python, rounded to a slider step.

        The browser's slider rounds every value set from Python (the start
        value, a fitted value) to its step grid and sends the rounded value
        back, possibly after later values were set. A real move differs by at
        least one step from all of them; an echo must not replace the exact value.
        """
        return any(self._snaps_to(v, r) for r in (self._value, *self._recent))

    def _from_slider(self, change):
        if self._mute:
            return
        v = float(change["new"])
        if self.is_echo(v):
            if not self._snaps_to(v, self._value):
                # a late echo of an older value: show the value in use again
                with _muted(self):
                    self.slider.value = min(max(self._value, self.range[0]), self.range[1])
            return
        self._recent = []  # a real move: older values can no longer echo back unnoticed
        self._value = v
        with _muted(self):
            self.box.value = self._show(v)
        if self.on_change is not None:
            self.on_change(self.key, v)

    def _from_box(self, change):
        if self._mute:
            return
        text = str(change["new"]).strip()
        v = _typed_number(self, self.box, text, self._show(self._value),
                          f"{self.key} ({self.parameter.label}): expected a number such as 1.5e-6, got {text!r}",
                          self.on_error or (lambda err: None))
        if v is None:
            return
        old = self._value
        self._value = v  # the model validates it (finite, positive, ...) via on_change
        self._remember(v)
        with _muted(self):
            if math.isfinite(v):
                self.slider.value = min(max(v, self.range[0]), self.range[1])
        if self.on_change is not None:
            try:
                self.on_change(self.key, v)
            except Exception:
                self._value = old
                raise


class MechanismCard(ipw.VBox):
    """One scattering mechanism: an on/off switch, its sliders, and its fixed constants.

    Parameters
    ----------
    mechanism : kinetic.Mechanism
    on_change : callable
        ``on_change(key, value)`` for a parameter change.
    on_toggle : callable
        ``on_toggle(name, enabled)`` when the switch is flipped.
    enabled : bool
        Initial state of the switch.

    Attributes
    ----------
    toggle : ipw.Checkbox
    controls : dict of str -> ParameterControl
        Sliders of the free (not fixed) parameters, keyed ``"<name>.<param>"``.
    constants : dict of str -> ipw.Text
        Boxes of the fixed (material) parameters, in a folded "constants" section;
        a typed value is used exactly as typed (a Text box: the browser never
        reformats it, so it never echoes a rounded value back).
    """

    def __init__(self, mechanism, on_change: Callable, on_toggle: Callable, enabled: bool = True,
                 on_error: Callable | None = None):
        self.name = mechanism.name
        self.kind = mechanism.kind
        self._on_change = on_change
        self._on_toggle = on_toggle
        self._on_error = on_error
        colour = mechanism_colour(mechanism.kind)
        swatch = ipw.HTML(
            f"<span style='display:inline-block;width:0.9em;height:0.9em;background:{colour};"
            "border-radius:2px;margin-top:0.45em'></span>", layout=ipw.Layout(width="1.2em"))
        self.toggle = ipw.Checkbox(value=bool(enabled), description=mechanism_title(self.kind, self.name),
                                   indent=False, layout=ipw.Layout(width="auto"),
                                   tooltip=f"{self.name} ({self.kind})")
        self.toggle.add_class(css("toggle"))
        self.toggle.add_class(css(f"toggle-{self.name.replace('_', '-')}"))
        self.toggle.observe(self._toggled, names="value")
        self.controls: dict = {}
        self.constants: dict = {}
        self._constant_values: dict = {}
        rows = []
        fixed_rows = []
        for pname, par in mechanism.parameters.items():
            key = f"{self.name}.{pname}"
            if par.fixed:
                box = ipw.Text(value=f"{float(par.value):.6g}", continuous_update=False,
                               layout=ipw.Layout(width="7em"), tooltip=key)
                box.observe(self._constant_changed(key), names="value")
                self.constants[key] = box
                self._constant_values[key] = float(par.value)
                fixed_rows.append(ipw.HBox([ipw.HTML(label_html(parameter_words(key, par), par.unit, key),
                                                     layout=ipw.Layout(width="15em")), box]))
            else:
                ctl = ParameterControl(key, par, on_change=on_change, on_error=on_error)
                self.controls[key] = ctl
                rows.append(ctl)
        children = [ipw.HBox([swatch, self.toggle])] + rows
        if fixed_rows:
            fold = ipw.Accordion(children=[ipw.VBox(fixed_rows)], selected_index=None)
            fold.set_title(0, "material constants (held fixed)")
            children.append(fold)
        super().__init__(children, layout=ipw.Layout(border_left=f"3px solid {colour}",
                                                     padding="2px 0 4px 6px", margin="0 0 6px 0"))
        self.add_class(css("mechanism"))
        self.add_class(css(f"mechanism-{self.name.replace('_', '-')}"))
        self._show_enabled(bool(enabled))

    @property
    def enabled(self) -> bool:
        return bool(self.toggle.value)

    def set_enabled(self, enabled: bool, notify: bool = False) -> None:
        self._mute = not notify
        try:
            self.toggle.value = bool(enabled)
        finally:
            self._mute = False
        self._show_enabled(bool(enabled))

    def set_values(self, values: dict) -> None:
        """Show new values (``{"<name>.<param>": value}``) without calling back."""
        for key, v in values.items():
            if key in self.controls:
                self.controls[key].set_value(v)
            elif key in self.constants:
                box = self.constants[key]
                self._constant_values[key] = float(v)
                with _muted(self):
                    box.value = f"{float(v):.6g}"

    _mute = False

    def _show_enabled(self, on: bool) -> None:
        for ctl in self.controls.values():
            ctl.set_disabled(not on)
        for box in self.constants.values():
            box.disabled = not on

    def _toggled(self, change):
        try:
            if not self._mute:
                self._on_toggle(self.name, bool(change["new"]))  # the figure first: it is what the user watches
        finally:
            self._show_enabled(bool(self.toggle.value))

    def _constant_changed(self, key):
        def handler(change):
            if self._mute:
                return
            text = str(change["new"]).strip()
            v = _typed_number(self, self.constants[key], text, f"{self._constant_values[key]:.6g}",
                              f"{key}: expected a number such as 2.0e-29, got {text!r}", self._on_error)
            if v is None:
                return
            self._constant_values[key] = v
            self._on_change(key, v)
        return handler


def format_parameter(key: str, p: Parameter, value: float | None = None) -> str:
    """``"grain size (boundary length) = 1e-06 m"`` for tables."""
    v = p.value if value is None else value
    return f"{parameter_words(key, p)} = {fmt(v)}" + (f" {unit_text(p.unit)}" if p.unit else "")
