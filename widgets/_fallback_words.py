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


_PARAM_WORDS = {  # plain-words Parameter labels of the engine; "<kind>.<param>" first, then "<param>"
    "boundary.length": "grain size (boundary length)",
    "boundary.specularity": "share of specular reflections",
    "point_defect.gamma": "mass-disorder strength \u0393",
    "point_defect.A": "point-defect strength A",
    "umklapp.gruneisen": "Gr\u00fcneisen parameter",
    "umklapp.atomic_mass": "mean atomic mass",
    "umklapp.b": "Umklapp onset factor b, in exp(\u2212\u03b8/bT)",
    "umklapp.B": "Umklapp strength B",
    "normal.B": "normal-process strength B",
    "normal.omega_power": "normal processes: power of frequency",
    "normal.temperature_power": "normal processes: power of temperature",
    "electron_phonon.C": "electron-phonon scattering strength C",
    "dislocation.burgers": "Burgers vector length",
    "dislocation.velocity_ratio": "ratio of sound velocities v\u2097 / v\u209c",
    "dislocation.orientation": "orientation factor \u03b7 (dislocations to heat flow)",
    "precipitate.density_contrast": "density contrast \u0394D/D",
    "volume_per_atom": "volume per atom",
    "gruneisen": "Gr\u00fcneisen parameter",
    "prefactor": "bipolar strength C",
    "band_gap": "band gap",
    "exponent": "bipolar temperature power p",
}
