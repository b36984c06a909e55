"""Field helpers, shared source strings and the calibrated-model schema for presets.

CALIBRATED-MODEL SCHEMA (shared by group_iv.py and compounds.py)
================================================================
Besides its material fields, a calibrated preset carries two fields, each in the
usual ``{"value", "unit", "source", "how"}`` form (build them with
:func:`model_field` and :func:`calibration_field`, checked by :func:`check_model`):

``"model"``: the model of the preset's REFERENCE SAMPLE (the bulk crystal or
pellet its reference k(T) was measured on)::

    {"value": {"branches":   "avg" | "split",     # one averaged branch, or L + 2T
               "dispersion": "debye" | "sine",
               "mechanisms": {                    # parameter names of kinetic.scattering
                   "boundary":     {"length": m},                     # Boundary
                   "point_defect": {"gamma": Gamma},                  # PointDefect.from_gamma
                                                 # (volume_per_atom from the preset)
                   "umklapp":      {"gruneisen": g, "b": b},          # Umklapp.from_material
                                                 # (atomic_mass from the preset; g is the
                                                 # CALIBRATED gamma, never gamma_th)
                   "normal":       {"B": s^(n-1) K^-m,                # Normal (Callaway)
                                    "omega_power": 2, "temperature_power": 3},
               }},
     "unit": "SI",
     "source": "<what it was fitted to>",
     "how": "computed: kinetic.fit of <free parameters> to <table>, <fixed ones>"}

  Only the mechanisms listed are in the model; any of them may be left out.
  Optional extra keys of ``value``: ``"zone_edge": True`` (sine branches take
  the preset's zone-edge frequencies, fields ``zone_edge_longitudinal`` /
  ``zone_edge_transverse`` [Hz], instead of the sound velocities) and
  ``"applies_to"`` per mechanism (``{"umklapp": {..., "applies_to": ["L"]}}``).

``"calibration"``: where the model was checked::

    {"value": {"table": "reference/xxx.csv",      # rows of this material in it
               "t_min": K, "t_max": K,            # range of the fit
               "rms": 0.05,                       # rms RELATIVE deviation (fraction)
               "n_points": 20,
               "sample": "natural-isotope single crystal, ..."},
     "unit": "K; rms as a fraction",
     "source": "authors, year, journal",
     "how": "computed: kinetic.fit of ... to the table"}

A preset without these two fields is uncalibrated: ``kinetic.defaults``
refuses to make up its coefficients and says which number is missing.
"""
from typing import Any

Field = dict[str, Any]
Preset = dict[str, Field]

#: Mechanism kinds a preset model may list, with the parameters each takes.
MODEL_MECHANISMS = {
    "boundary": ("length", "specularity"),
    "point_defect": ("gamma", "A"),
    "umklapp": ("gruneisen", "b", "B"),
    "normal": ("B", "omega_power", "temperature_power"),
}


def model_field(branches: str, dispersion: str, mechanisms: dict[str, dict[str, Any]], source: str,
                how: str, **extra: Any) -> Field:
    """A preset's ``"model"`` field (see the module docstring); checked on creation."""
    value = {"branches": branches, "dispersion": dispersion, "mechanisms": mechanisms, **extra}
    check_model(value)
    return {"value": value, "unit": "SI", "source": source, "how": how}


def calibration_field(table: str, t_min: float, t_max: float, rms: float, n_points: int, sample: str,
                      source: str, how: str) -> Field:
    """A preset's ``"calibration"`` field (see the module docstring)."""
    return {"value": {"table": table, "t_min": float(t_min), "t_max": float(t_max), "rms": float(rms),
                      "n_points": int(n_points), "sample": sample},
            "unit": "K; rms as a fraction", "source": source, "how": how}


def check_model(value: dict[str, Any]) -> None:
    """Raise ValueError when a model description does not follow the schema."""
    if value.get("branches") not in ("avg", "split"):
        raise ValueError(f"model branches must be 'avg' or 'split', got {value.get('branches')!r}")
    if value.get("dispersion") not in ("debye", "sine"):
        raise ValueError(f"model dispersion must be 'debye' or 'sine', got {value.get('dispersion')!r}")
    mechs = value.get("mechanisms")
    if not isinstance(mechs, dict) or not mechs:
        raise ValueError("model mechanisms must be a non-empty dict")
    for kind, params in mechs.items():
        if kind not in MODEL_MECHANISMS:
            raise ValueError(f"unknown mechanism {kind!r} in a preset model; known: {', '.join(MODEL_MECHANISMS)}")
        for p in params:
            if p not in MODEL_MECHANISMS[kind] and p != "applies_to":
                raise ValueError(f"{kind} has no parameter {p!r}; it takes {', '.join(MODEL_MECHANISMS[kind])}")

# -- shared source strings ---------------------------------------------------
_IUPAC = ("IUPAC standard atomic weights as tabulated in periodictable 2.1.0 "
          "(mean mass per atom of the formula unit)")
_KITTEL = ("C. Kittel, Introduction to Solid State Physics, table of Debye "
           "temperatures (as reproduced on Wikipedia 'Debye model')")
_MS2006 = ("D. T. Morelli & G. A. Slack, 'High lattice thermal conductivity "
           "solids', in High Thermal Conductivity Materials (Springer, 2006), "
           "Table 1.1")
_GS1964 = ("C. J. Glassbrenner & G. A. Slack, Phys. Rev. 134, A1058 (1964)")


def _f(value: Any, unit: str, source: str, how: str, note: str = "") -> Field:
    entry: Field = {"value": value, "unit": unit, "source": source, "how": how}
    if note:
        entry["note"] = note
    return entry


def _gap(unit: str, note: str) -> Field:
    return {"value": None, "unit": unit, "source": "none found", "how": "gap",
            "note": note}


