"""Plain words and colours the engine will carry itself (FALLBACK: delete at merge).

Mechanism classes get a ``label`` and a ``colour``, parameters plain-words
labels; until then :mod:`widgets._engine` reads these tables. No physics.
"""
from __future__ import annotations

_MECH_WORDS = {  # Mechanism classes' `label`
    "boundary": "Boundaries (grain size)",
    "point_defect": "Point defects (mass disorder)",
    "umklapp": "Umklapp (anharmonic)",
    "normal": "Normal processes",
    "electron_phonon": "Free carriers",
    "dislocation": "Dislocations",
    "precipitate": "Nanoprecipitates",
}
_MECH_COLOURS = {  # Mechanism classes' `colour`
    "boundary": "#1f77b4", "point_defect": "#2ca02c", "umklapp": "#d62728", "normal": "#9467bd",
    "electron_phonon": "#8c564b", "dislocation": "#e377c2", "precipitate": "#17becf",
}
_SPARE = ("#bcbd22", "#7f7f7f", "#ff9896", "#aec7e8")


_PARAM_WORDS = {  # FALLBACK (delete at merge): plain-words Parameter.label of the engine
    "length": "grain size (boundary length)",
    "specularity": "share of specular reflections",
    "gamma": "mass-disorder strength \u0393",
    "A": "point-defect strength A",
    "volume_per_atom": "volume per atom",
    "gruneisen": "Gr\u00fcneisen parameter",
    "atomic_mass": "mean atomic mass",
    "b": "Umklapp temperature-exponent divisor",
    "B": "Umklapp strength B",
    "prefactor": "bipolar strength C",
    "band_gap": "band gap",
}


