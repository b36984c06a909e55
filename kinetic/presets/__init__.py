"""Published material numbers for kinetic's lattice-model presets (plain data).

``PRESETS`` maps a material key to a dict of fields.  Each field is a dict::

    {"value": float | str | dict | None,   # None = unknown (a gap, not a zero)
     "unit":  str,                         # SI; "1" for dimensionless
     "source": str,                        # published source, or the inputs used
     "how":   str,                         # "checked: <where>" | "computed from ..." |
                                           # "from memory" | "gap"
     "note":  str}                         # optional: which kind of quantity it is

Status words:

* ``checked: <where>`` - the number is printed in the named place (often an
  abstract, handbook page or data page; not necessarily the primary paper read
  in full).
* ``computed from ...`` - derived here with numpy/scipy (CODATA constants via
  scipy.constants, IUPAC standard atomic weights via periodictable 2.1.0) from
  the inputs named, each of which is itself sourced.
* ``from memory`` - recalled, not found in a source during this work.  Confirm
  against the original before a test or a default relies on it.
* ``gap`` - no trustworthy number found; ``value`` is None.

Conventions (see reference/README.md for the full caveats):

* ``lattice_volume_per_atom`` comes from the lattice constants, never from the
  quoted handbook density (they disagree by 1-6 % for PbTe, Bi2Te3, Mg2Si);
  ``density`` is the X-ray density M_bar * u / V_atom so the preset is
  self-consistent; the quoted handbook density is given in the note.
* ``atoms_per_cell`` is Slack's n: atoms in the primitive cell.
* ``velocity_longitudinal`` / ``velocity_transverse`` are direction averages
  of the Christoffel-equation velocities computed from the elastic constants
  (mean over 40,000 random directions; the two transverse modes are averaged
  together), not VRH values; the VRH values are in the notes.
  ``velocity_debye`` is the Debye average, 3/v_D^3 = <sum_i v_i^-3>.
* ``gruneisen`` is the THERMODYNAMIC gamma_th = 3 alpha B / (rho c_p) at
  about 300 K.  It is not the fitted gamma of Slack's formula or of the
  Morelli-Heremans-Slack Callaway model, which are larger (about 1 for the
  diamond-structure solids); those, where recalled, are in
  ``gruneisen_slack`` (from memory).  No default path uses either:
  ``kinetic.materials.get`` exposes gamma_th only as
  ``Material.gruneisen_thermodynamic``, and ``Material.gruneisen`` is the
  Umklapp gamma of the preset's calibrated ``model`` (None without one).
* ``model`` / ``model_avg`` / ``calibration``: the calibrated model of the
  preset's reference sample and where it was checked; the schema is in
  :mod:`kinetic.presets._fields` and :mod:`kinetic.defaults` builds the model.
* ``zone_edge_longitudinal`` / ``zone_edge_transverse``: zone-edge frequencies
  [Hz] of the acoustic branches from measured dispersion curves (mean of the
  X and L points), used by sine branches with ``zone_edge=True``.
* ``debye_temperature`` says its kind in the note (low-temperature
  calorimetric, elastic, X-ray ...).  ``debye_temperature_acoustic`` is
  Slack's theta_a (acoustic-branch Debye temperature), from memory only.

References are cited in full in each ``source`` string.  Nothing here is
invented; a number without a source is a gap (None).
"""

from ._fields import Field, Preset  # noqa: F401
from .compounds import COMPOUNDS
from .compounds_extra import EXTRA_COMPOUNDS
from .group_iv import GROUP_IV

PRESETS: dict[str, Preset] = {**GROUP_IV, **COMPOUNDS, **EXTRA_COMPOUNDS}

#: Other names accepted for a preset key (lower case) -> key in PRESETS.
ALIASES: dict[str, str] = {"diamond": "C", "c": "C", "si": "Si", "ge": "Ge",
                           "gaas": "GaAs", "pbte": "PbTe", "bi2te3": "Bi2Te3",
                           "mg2si": "Mg2Si", "aln": "AlN", "sic": "SiC", "6h-sic": "SiC",
                           "insb": "InSb", "mg2sn": "Mg2Sn", "cosb3": "CoSb3"}

#: How sure each preset's calibration table is, read from the ``how`` column of its rows in
#: reference/ inside the calibrated range: "checked" (every row printed in a named source, or
#: computed from a checked law), "partly from memory" (some rows checked, others recalled),
#: "from memory" (the table was recalled, not read: the calibration shows the model can
#: follow such a curve, not that the curve is right).
TABLE_STATUS: dict[str, str] = {
    "Si": "checked", "Ge": "partly from memory", "C": "checked (two points)", "GaAs": "checked",
    "PbTe": "from memory", "Bi2Te3": "partly from memory", "Mg2Si": "from memory",
    "AlN": "partly from memory", "SiC": "checked", "InSb": "from memory", "Mg2Sn": "from memory",
    "CoSb3": "from memory",
}


def calibration_record(preset: Preset, name: str | None = None) -> dict | None:
    """The calibration of one preset table as a plain dict, or None when it has no calibrated model.

    Keys: source, table, t_min [K], t_max [K], rms (relative, a fraction),
    n_points, sample, table_status. A preset is calibrated when it carries both
    a ``"calibration"`` record and a calibrated ``"model"`` (or ``"model_avg"``).
    Plain data (no numpy): ``kinetic materials`` reads it without loading the
    engine, and :func:`kinetic.defaults.calibration` builds on it.
    """
    cal = preset.get("calibration")
    has_model = any(isinstance(preset.get(f), dict) and preset[f].get("value") for f in ("model", "model_avg"))
    if not isinstance(cal, dict) or not cal.get("value") or not has_model:
        return None
    v = cal["value"]
    return {"source": cal.get("source", ""), "table": v.get("table"), "t_min": float(v["t_min"]),
            "t_max": float(v["t_max"]), "rms": float(v["rms"]), "n_points": int(v["n_points"]),
            "sample": v.get("sample", ""), "table_status": TABLE_STATUS.get(name, "from memory")}
