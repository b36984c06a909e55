"""Look of the workbench: one colour per mechanism kind, plain-word titles, number formats.

Everything visual that appears in more than one panel lives here, so the
boundary-scattering curve has the same colour in the rates plot, the fit table
and the what-if plots. No physics: only names, colours and text formatting.
"""
from __future__ import annotations

import math

__all__ = [
    "MECHANISM_COLOURS",
    "PART_COLOURS",
    "BRANCH_STYLES",
    "MECHANISM_TITLES",
    "mechanism_colour",
    "mechanism_title",
    "branch_style",
    "fmt",
    "fmt_value",
    "css",
]

#: mechanism kind (``Mechanism.kind``) -> colour, used in every plot and table.
MECHANISM_COLOURS = {
    "boundary": "#1f77b4",        # blue
    "point_defect": "#2ca02c",    # green
    "umklapp": "#d62728",         # red
    "normal": "#9467bd",          # purple
    "electron_phonon": "#8c564b",  # brown
    "dislocation": "#e377c2",     # pink
    "precipitate": "#17becf",     # teal
}
_SPARE = ("#bcbd22", "#7f7f7f", "#ff9896", "#aec7e8")

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

#: mechanism kind -> plain-word title for panels and legends.
MECHANISM_TITLES = {
    "boundary": "Boundaries (grain size)",
    "point_defect": "Point defects (mass disorder)",
    "umklapp": "Umklapp (anharmonic)",
    "normal": "Normal processes",
    "electron_phonon": "Free carriers",
    "dislocation": "Dislocations",
    "precipitate": "Nanoprecipitates",
}

_BRANCH_TITLES = {"avg": "averaged", "L": "longitudinal", "T": "transverse"}


def mechanism_colour(kind: str) -> str:
    """Colour of a mechanism kind; unknown kinds get a stable spare colour."""
    if kind in MECHANISM_COLOURS:
        return MECHANISM_COLOURS[kind]
    return _SPARE[sum(map(ord, str(kind))) % len(_SPARE)]


def mechanism_title(kind: str, name: str | None = None) -> str:
    """Plain title; a renamed mechanism (e.g. ``umklapp_L``) shows its name too."""
    base = MECHANISM_TITLES.get(kind, str(kind).replace("_", " "))
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
