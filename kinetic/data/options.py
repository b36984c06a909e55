"""The loader's options, named the same way at every door (Python, command line, workbench).

Every error message that suggests an option names it through :func:`suggest`,
so the suggestion is one the user can act on wherever the data came in.  The
command-line flag and the workbench label listed here are the names the CLI
and the workbench data panel use for the same :func:`kinetic.data.load_data`
keyword.

>>> suggest("ignore_columns", "time")
'--ignore-column time (CLI) / ignore_columns=["time"] (Python) / "Ignore columns" (workbench)'
"""
from __future__ import annotations

__all__ = ["LOADER_OPTIONS", "suggest"]

#: Python keyword of :func:`kinetic.data.load_data` -> (command-line flag,
#: workbench label, how a value is written in Python: a format string).
LOADER_OPTIONS: dict[str, tuple[str, str, str]] = {
    "label": ("--label", "Label", '{k}="{v}"'),
    "kind": ("--kind", "Kind", '{k}="{v}"'),
    "delimiter": ("--delimiter", "Delimiter", '{k}="{v}"'),
    "decimal": ("--decimal", "Decimal mark", '{k}="{v}"'),
    "encoding": ("--encoding", "Encoding", '{k}="{v}"'),
    "units": ("--unit", "Units", '{k}={{"{c}": "{v}"}}'),
    "columns": ("--column", "Column names", '{k}={{"{c}": "{v}"}}'),
    "ignore_columns": ("--ignore-column", "Ignore columns", '{k}=["{v}"]'),
    "density": ("--density", "Density", '{k}="{v}"'),
    "heat_capacity": ("--heat-capacity", "Heat capacity", '{k}="{v}"'),
    "material": ("--material", "Material", '{k}="{v}"'),
    "relative_density": ("--relative-density", "Relative density", "{k}={v}"),
    "porosity_correction": ("--porosity-correction", "Porosity correction", '{k}="{v}"'),
    "diffusivity_rel_err": ("--diffusivity-rel-err", "Relative error of D", "{k}={v}"),
    "density_rel_err": ("--density-rel-err", "Relative error of density", "{k}={v}"),
    "heat_capacity_rel_err": ("--heat-capacity-rel-err", "Relative error of c_p", "{k}={v}"),
}


def suggest(option: str, value: str, column: str | None = None) -> str:
    """How to give ``option`` the value ``value`` at each door, in one phrase.

    ``column`` is the column name for the mapping options (``units``, ``columns``).
    """
    flag, label, py = LOADER_OPTIONS[option]
    cli = f"{flag} {column}={value}" if column is not None else f"{flag} {value}"
    python = py.format(k=option, v=value, c=column or "")
    return f'{cli} (CLI) / {python} (Python) / "{label}" (workbench)'
