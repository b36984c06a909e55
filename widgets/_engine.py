"""The workbench's one door into the engine.

Every other module of ``widgets`` imports kinetic only through this module,
and this module uses only public names of kinetic (``kinetic.X``,
``kinetic.materials``, ``kinetic.defaults``, ``kinetic.conductivity``,
``kinetic.whatif``, ``kinetic.records``, ``kinetic.data``, ``kinetic.demo``).
The widgets hold no physics: models, conductivity parts, defaults,
calibrations, scope notes, fits and what-ifs all come from here.
"""
from __future__ import annotations

import functools
import os
from typing import NamedTuple

import numpy as np

import kinetic
from kinetic import (
    DataError,
    Dataset,
    FitError,
    FitResult,
    KineticError,
    LatticeModel,
    Parameter,
    ParameterError,
    Record,
    RecordError,
    demo,
    load_record,
    materials,
    parse_data,
    predict_band,
    save_record,
    whatif,
)
from kinetic import conductivity as _conductivity
from kinetic import defaults as _defaults
from kinetic import fit as _fit
from kinetic import porosity as _porosity
from kinetic._io import atomic_write as _atomic_write
from kinetic.conductivity import LORENZ_LABELS
from kinetic.data.diffusivity import DEFAULT_RELATIVE_ERRORS
from kinetic.data.options import LOADER_OPTIONS
from kinetic.heat_capacity import HEAT_CAPACITY_MODELS
from kinetic.scattering import MECHANISMS

__all__ = [
    "DEFAULT_RELATIVE_ERRORS",
    "HEAT_CAPACITY_MODELS",
    "LOADER_OPTIONS",
    "MECHANISMS",
    "DataError",
    "Dataset",
    "FitError",
    "FitResult",
    "KineticError",
    "LORENZ_LABELS",
    "LatticeModel",
    "Parameter",
    "ParameterError",
    "Record",
    "RecordError",
    "atomic_write",
    "bipolar_parameters",
    "cahill_minimum",
    "calibration",
    "conductivity_parts",
    "correlation_limit",
    "default_free",
    "default_model",
    "demo",
    "fit",
    "flash_series_paths",
    "get_material",
    "load_record",
    "loader_label",
    "material_names",
    "material_of",
    "materials",
    "mechanism_colour",
    "mechanism_label",
    "missing_number",
    "new_mechanism",
    "parameter_words",
    "parse_data",
    "porosity_relations",
    "predict_band",
    "report_rows",
    "save_record",
    "scope_notes",
    "whatif",
    "with_number",
]

# ---------------------------------------------------------------------------------------
# materials and default models
def material_names() -> list:
    """Names of the material presets, in the engine's order."""
    return list(materials.names())


def get_material(name):
    """The preset :class:`kinetic.Material` (a Material passes through)."""
    return materials.get(name) if isinstance(name, str) else name


def material_of(model):
    """The preset a model was built from, or None for a model with its own branches."""
    name = getattr(model, "material", None)
    if name is None:
        return None
    try:
        return materials.get(name)
    except ParameterError:
        return None


def default_model(material, *, mechanisms=None, split_branches: bool = False) -> LatticeModel:
    """The engine's default (calibrated) model of a material preset or Material."""
    return _defaults.default_model(material, mechanisms=mechanisms, split_branches=split_branches)


def default_free(model) -> list:
    """The engine's default free parameters of a model ([] when it has none)."""
    try:
        return list(_defaults.default_free(model))
    except ParameterError:
        return []


def calibration(material):
    """How the preset's default model was calibrated (source, t_min, t_max, rms...), or None."""
    return _defaults.calibration(get_material(material))


def scope_notes(material, *, temperature=None, boundary_length=None, alloy_fraction=None) -> list:
    """Plain notes on where the default model of ``material`` was not checked."""
    return list(_defaults.scope_notes(get_material(material), temperature=temperature,
                                      boundary_length=boundary_length, alloy_fraction=alloy_fraction))


#: Material fields a default model may need, with the words and unit to ask for them
_NUMBERS = {
    "gruneisen": ("Grüneisen parameter", ""),
    "debye_temperature": ("Debye temperature", "K"),
    "velocity_longitudinal": ("longitudinal sound velocity", "m/s"),
    "velocity_transverse": ("transverse sound velocity", "m/s"),
}


def missing_number(exc) -> tuple | None:
    """``(field, words, unit)`` when ``exc`` says the preset lacks a number the user can give."""
    fld = getattr(exc, "field", None) or getattr(exc, "parameter", None)
    if fld in _NUMBERS:
        return (fld, *_NUMBERS[fld])
    text = str(exc).lower()
    for key, (words, unit) in _NUMBERS.items():
        if key in text or words.lower() in text or key.replace("_", " ") in text:
            return key, words, unit
    if "grueneisen" in text or "grüneisen" in text:
        return ("gruneisen", *_NUMBERS["gruneisen"])
    return None


def with_number(material, fld: str, value: float):
    """The Material with one number given by the user (the preset itself is not changed)."""
    return get_material(material).with_values(**{fld: float(value)})


def new_mechanism(kind: str, material=None):
    """A mechanism of ``kind`` with the engine's start values (:func:`kinetic.defaults.new_mechanism`)."""
    return _defaults.new_mechanism(kind, material)


# ---------------------------------------------------------------------------------------
# the conductivity chain
def bipolar_parameters() -> dict:
    """``"bipolar.<name>"`` -> :class:`kinetic.Parameter` of the bipolar term."""
    return dict(_conductivity.BipolarTerm.activated().parameters)


class Split(NamedTuple):
    """Measured data with the electronic part split off (at the points where it stays positive)."""
    temperature: np.ndarray     #: [K]
    kappa_electronic: np.ndarray  #: [W m^-1 K^-1]
    kappa: np.ndarray           #: measured lattice part [W m^-1 K^-1]
    kept: np.ndarray            #: mask of the measured points used


def electronic_split(data, lorenz_method: str):
    """The measured data with the electronic part split off (:class:`Split`), or None."""
    if data is None or data.kind != "total" or data.resistivity is None:
        return None
    t = _conductivity.lattice_target(data, lorenz=lorenz_method)
    return Split(t.temperature, np.asarray(t.kappa_electronic, float), np.asarray(t.kappa, float), t.kept)


def conductivity_parts(model, temperature, *, bipolar: dict | None = None, data=None, lorenz_method="auto"):
    """The engine's :class:`kinetic.conductivity.ConductivityParts` of the model at ``temperature`` [K].

    ``bipolar``: ``{"bipolar.prefactor": C, "bipolar.band_gap": Eg, ...}`` or None.
    ``data``: a measured total with a resistivity adds the electronic part
    (Wiedemann-Franz with ``lorenz_method``); beyond the measured range the
    electronic part and the total are NaN. The parts are added by the engine's
    one conductivity chain, never here.
    """
    T = np.asarray(temperature, dtype=float)
    bp = None
    if bipolar is not None:
        bp = _conductivity.BipolarTerm("activated", {k.split(".", 1)[1]: v for k, v in bipolar.items()})
    if data is not None and data.kind == "total" and data.resistivity is not None:
        chain = _conductivity.ConductivityModel.from_dataset(model, data, lorenz=lorenz_method, bipolar=bp)
    else:
        chain = _conductivity.ConductivityModel(model, bipolar=bp)
    return chain.parts(T, outside="nan")


def cahill_minimum(material, temperature):
    """Cahill-Watson-Pohl minimum conductivity of a preset [W m^-1 K^-1]."""
    return kinetic.cahill_minimum_for(get_material(material), np.asarray(temperature, dtype=float))


# ---------------------------------------------------------------------------------------
# fitting
def fit(model, data, free, *, bounds=None, lorenz_method="auto", n_starts=4, progress=None,
        should_stop=None, split_electronic: bool = True):
    """:func:`kinetic.fit`; ``split_electronic=False`` fits the measured total as it is."""
    kw = dict(bounds=bounds, lorenz_method=lorenz_method, n_starts=n_starts, progress=progress,
              should_stop=should_stop)
    return _fit(model, data, free, electronic="auto" if split_electronic else "none", **kw)


def _num(v) -> float:
    return float("nan") if v is None else float(v)


def correlation_limit() -> float:
    """|r| above which the fitter calls two parameters strongly correlated."""
    from kinetic.fitting import CORRELATION_LIMIT

    return float(CORRELATION_LIMIT)


def report_rows(result, level: float = 0.95) -> list:
    """Rows of a fit report: dicts with key, label, value, stderr, lower, upper, unit, flag."""
    # the engine's one source of report rows (kinetic.fitting.ReportRow)
    nan = float("nan")
    out = []
    for r in result.report_rows(level):
        if getattr(r, "kind", "parameter") != "parameter":
            continue  # the statistics are shown in their own line
        lo, hi = r.interval if r.interval is not None else (nan, nan)
        out.append({"key": r.code_key, "label": parameter_words(r.code_key), "value": _num(r.value),
                    "stderr": _num(r.error), "lower": _num(lo), "upper": _num(hi), "unit": r.unit or "",
                    "flag": r.note or ""})
    return out


# ---------------------------------------------------------------------------------------
# files
def loader_label(option: str) -> str:
    """The plain words of a loader option, the same at every door (``kinetic.data.options``)."""
    return LOADER_OPTIONS[option][1]


def porosity_relations() -> dict:
    """Effective-medium relations of the porosity step: name -> (largest porosity of its
    validity range, one line on where it holds), from ``kinetic.porosity.RELATIONS``."""
    return {name: (float(v[1]), str(v[2])) for name, v in _porosity.RELATIONS.items()}


def flash_series_paths() -> list:
    """Paths of the engine's invented flash-measurement demo series (``kinetic.demo``)."""
    return [os.fspath(p) for p in demo.flash_series_paths()]


def atomic_write(path, data) -> str:
    """Write bytes or text atomically; the file's permissions follow the user's umask."""
    out = _atomic_write(path, data)
    return os.fspath(out if out is not None else path)


# ---------------------------------------------------------------------------------------
# words and colours
def mechanism_label(kind: str) -> str:
    """Plain-words name of a mechanism kind."""
    cls = MECHANISMS.get(kind)
    return cls.label if cls is not None else str(kind).replace("_", " ")


def mechanism_colour(kind: str) -> str:
    """Colour of a mechanism kind (the same in every plot and table)."""
    cls = MECHANISMS.get(kind)
    if cls is not None:
        return cls.colour
    return _SPARE[sum(map(ord, str(kind))) % len(_SPARE)]


#: colours for a kind the registry does not know (a renamed copy, e.g. umklapp_L)
_SPARE = ("#bcbd22", "#7f7f7f", "#ff9896", "#aec7e8")


@functools.lru_cache(maxsize=None)
def _declared_words(kind: str, name: str):
    """The engine's plain words for parameter ``name`` of mechanism ``kind`` (or of the bipolar term)."""
    if kind == "bipolar":
        p = bipolar_parameters().get(f"bipolar.{name}")
    elif kind in MECHANISMS:  # the class's examples cover each of its forms (Umklapp: B or Grüneisen)
        p = next((e.parameters[name] for e in MECHANISMS[kind].examples() if name in e.parameters), None)
    else:
        p = None
    return p.description if p is not None and p.description else None


def parameter_words(key: str, parameter=None) -> str:
    """Plain-words label of a parameter (``"<mechanism>.<param>"``; sample suffixes kept).

    The words are the engine's own parameter descriptions (one source of truth).
    """
    base, _, suffix = key.partition("[")
    name = base.rsplit(".", 1)[-1]
    mech = base.split(".", 1)[0] if "." in base else ""
    kind = mech if (mech in MECHANISMS or mech == "bipolar") else mech.rsplit("_", 1)[0]  # umklapp_L -> umklapp
    words = parameter.description if parameter is not None and parameter.description else None
    if words is None:
        words = _declared_words(kind, name) or name.replace("_", " ")
    if mech and mech not in MECHANISMS and mech != "bipolar" and name not in ("length",):
        words = f"{words} ({mech.replace('_', ' ')})"  # a renamed mechanism, e.g. umklapp_L
    if suffix:
        words += f" [{suffix.rstrip(']')}]"
    return words
