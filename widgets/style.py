"""Look of the workbench: one colour per mechanism kind, plain-word titles, number formats.

Everything visual that appears in more than one panel lives here, so the
boundary-scattering curve has the same colour in the rates plot, the fit table
and the what-if plots. No physics: only names, colours and text formatting.
"""
from __future__ import annotations

import math
import re

from . import _engine

__all__ = [
    "BRANCH_STYLES",
    "MECHANISM_COLOURS",
    "MECHANISM_TITLES",
    "PART_COLOURS",
    "branch_style",
    "css",
    "fmt",
    "fmt_value",
    "label_html",
    "mechanism_colour",
    "mechanism_title",
    "unit_text",
]

#: mechanism kind (``Mechanism.kind``) -> colour, used in every plot and table (the engine's colours).
MECHANISM_COLOURS = {k: _engine.mechanism_colour(k) for k in _engine.MECHANISMS}

#: parts of the thermal conductivity in the k(T) plot.
PART_COLOURS = {
    "total": "#000000",
    "lattice": "#ff7f0e",
    "electronic": "#1f77b4",
    "bipolar": "#9467bd",
    "floor": "#7f7f7f",
    "measured": "#000000",
    "measured_lattice": "#ff7f0e",
    "band": "#ff7f0e",
}

#: branch name -> line style (rates, spectra).
BRANCH_STYLES = {"avg": "-", "L": "-", "T": "--"}

#: mechanism kind -> plain-word title for panels and legends (the engine's labels).
MECHANISM_TITLES = {k: _engine.mechanism_label(k) for k in _engine.MECHANISMS}

_BRANCH_TITLES = {"avg": "averaged", "L": "longitudinal", "T": "transverse"}


def mechanism_colour(kind: str) -> str:
    """Colour of a mechanism kind; unknown kinds get a stable spare colour."""
    return _engine.mechanism_colour(kind)


def mechanism_title(kind: str, name: str | None = None) -> str:
    """Plain title; a renamed mechanism (e.g. ``umklapp_L``) shows its name too."""
    base = _engine.mechanism_label(kind)
    if name is not None and name != kind:
        return f"{base}: {name}"
    return base


def branch_style(name: str) -> str:
    return BRANCH_STYLES.get(name, ":")


def branch_title(name: str) -> str:
    return _BRANCH_TITLES.get(name, name)


def fmt(value, digits: int = 4) -> str:
    """A number in plain text: 148.2, 0.0123, 1.00e-06 (``digits`` significant)."""
    try:
        v = float(value)
    except (TypeError, ValueError):
        return str(value)
    if not math.isfinite(v):
        return "n/a"
    if v == 0.0:
        return "0"
    a = abs(v)
    if 1e-3 <= a < 1e5:
        s = f"{v:.{digits}g}"
    else:
        s = f"{v:.{max(digits - 1, 0)}e}"
    return s


def fmt_value(value, unit: str = "", digits: int = 4) -> str:
    """``fmt(value)`` followed by the unit, if any."""
    s = fmt(value, digits)
    return f"{s} {unit}" if unit else s


def css(name: str) -> str:
    """Stable CSS class for browser tests and styling: ``kinetic-<name>``."""
    return f"kinetic-{name}"


_SUP = str.maketrans("-0123456789", "\u207b\u2070\u00b9\u00b2\u00b3\u2074\u2075\u2076\u2077\u2078\u2079")


def unit_text(unit: str) -> str:
    """A unit in the one notation of the workbench, superscripts: ``"W m^-1 K^-1"`` -> ``"W m⁻¹ K⁻¹"``."""
    if not unit:
        return ""
    return re.sub(r"\^(-?\d+)", lambda m: m.group(1).translate(_SUP), str(unit))


def esc(text) -> str:
    """Text made safe for HTML."""
    return (str(text).replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")
            .replace("'", "&#39;").replace('"', "&quot;"))


def label_html(words: str, unit: str = "", key: str = "") -> str:
    """A label in plain words with its unit; the code key in a tooltip."""
    u = unit_text(unit)
    text = esc(words) + (f" [{esc(u)}]" if u else "")
    tip = f" title='{esc(key)}'" if key else ""
    return f"<span{tip}>{text}</span>"
