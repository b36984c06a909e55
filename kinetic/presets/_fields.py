"""Field helpers and shared source strings for the preset tables."""
from typing import Any, Dict

Field = Dict[str, Any]
Preset = Dict[str, Field]

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


