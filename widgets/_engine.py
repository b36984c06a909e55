"""The workbench's one door into the engine.

Every other module of ``widgets`` imports kinetic only through this module,
and this module uses only public names of kinetic (``kinetic.X``,
``kinetic.materials``, ``kinetic.defaults``, ``kinetic.conductivity``,
``kinetic.whatif``, ``kinetic.records``, ``kinetic.data``, ``kinetic.demo``).
The widgets hold no physics: models, conductivity parts, defaults,
calibrations, scope notes, fits and what-ifs all come from here.

Some engine names land at the merge of the restructuring (issues 8 and 11):
``kinetic.defaults``, ``kinetic.conductivity``, ``kinetic._io.atomic_write``,
``FitResult.report_rows``, ``fit(..., electronic="none")``, plain-words
``label`` and ``colour`` on mechanism classes and parameters. Where one of them
is missing this module falls back on the older public API; each such place is
marked ``FALLBACK (delete at merge)`` and is the only thing to switch over.
"""
from __future__ import annotations

import inspect
import os
import tempfile
from dataclasses import dataclass, field
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
from kinetic import fit as _fit
from kinetic.scattering import MECHANISMS

from ._fallback_words import _MECH_COLOURS, _MECH_WORDS, _PARAM_WORDS, _SPARE


def _ours(module):
    """The module if it belongs to the kinetic package imported here, else None.

    (An editable install of another checkout can otherwise lend a submodule
    this tree lacks, mixing two versions of the engine.)
    """
    home = os.path.dirname(os.path.abspath(kinetic.__file__))
    return module if os.path.abspath(module.__file__).startswith(home + os.sep) else None


try:  # the restructured engine (issue 8): one default model per material
    from kinetic import defaults as _defaults
    _defaults = _ours(_defaults)
except ImportError:  # FALLBACK (delete at merge)
    _defaults = None
try:  # the restructured engine (issue 11): one conductivity chain
    from kinetic import conductivity as _conductivity
    _conductivity = _ours(_conductivity)
except ImportError:  # FALLBACK (delete at merge)
    _conductivity = None
try:  # one atomic-write helper (issue 11)
    from kinetic import _io
    _atomic_write = _ours(_io).atomic_write if _ours(_io) is not None else None
except ImportError:  # FALLBACK (delete at merge)
    _atomic_write = None

__all__ = [
    "FALLBACKS",
    "MECHANISMS",
    "DataError",
    "Dataset",
    "FitError",
    "FitResult",
    "KineticError",
    "LatticeModel",
    "Parameter",
    "ParameterError",
    "Parts",
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
    "get_material",
    "load_record",
    "material_names",
    "material_of",
    "materials",
    "mechanism_colour",
    "mechanism_label",
    "missing_number",
    "new_mechanism",
    "parameter_words",
    "parse_data",
    "predict_band",
    "report_rows",
    "save_record",
    "scope_notes",
    "whatif",
    "with_number",
]

#: the fallbacks in use in this tree (empty once the engine has every name)
FALLBACKS = tuple(n for n, missing in (
    ("kinetic.defaults", _defaults is None),
    ("kinetic.conductivity", _conductivity is None),
    ("kinetic._io.atomic_write", _atomic_write is None),
) if missing)


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
    if _defaults is not None:
        return _defaults.default_model(material, mechanisms=mechanisms, split_branches=split_branches)
    # FALLBACK (delete at merge): the older starting model of kinetic.fitting
    return kinetic.default_model(material, None if mechanisms is None else list(mechanisms),
                                 split_branches=split_branches)


def default_free(model) -> list:
    """The engine's default free parameters of a model ([] when it has none)."""
    try:
        if _defaults is not None:
            return list(_defaults.default_free(model))
        from kinetic.fitting import default_free as old  # FALLBACK (delete at merge)

        return list(old(model))
    except ParameterError:
        return []


@dataclass(frozen=True)
class _Calibration:  # FALLBACK (delete at merge): the shape of kinetic.defaults.Calibration
    source: str
    t_min: float | None = None
    t_max: float | None = None
    rms: float | None = None
    n_points: int | None = None
    sample: str = ""


def calibration(material):
    """How the preset's default model was calibrated (source, t_min, t_max, rms...), or None."""
    mat = get_material(material)
    if _defaults is not None:
        return _defaults.calibration(mat)
    # FALLBACK (delete at merge): the older presets only say whether Umklapp was fitted
    if getattr(mat, "umklapp_fit", None):
        src = (getattr(mat, "sources", None) or {}).get("umklapp_fit", "")
        return _Calibration(source=str(src or "Umklapp fitted to a published k(T) table"))
    return None


def scope_notes(material, *, temperature=None, boundary_length=None, alloy_fraction=None) -> list:
    """Plain notes on where the default model of ``material`` was not checked."""
    mat = get_material(material)
    if _defaults is not None:
        return list(_defaults.scope_notes(mat, temperature=temperature, boundary_length=boundary_length,
                                          alloy_fraction=alloy_fraction))
    # FALLBACK (delete at merge): only the note the older presets allow
    if calibration(mat) is None:
        return [f"{mat.name}: the preset has no calibration against measured k(T); "
                "treat absolute values as rough."]
    return []


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
    """A mechanism of ``kind`` with the engine's start values (the material's default where it has one)."""
    if kind not in MECHANISMS:
        raise ParameterError(f"unknown mechanism kind {kind!r}; known: {', '.join(MECHANISMS)}")
    if material is not None:
        try:
            model = default_model(material, mechanisms=[kind] if kind != "normal" else ["boundary", kind])
            return model.mechanism(kind)
        except ParameterError:
            pass
    cls = MECHANISMS[kind]
    try:
        return cls()
    except TypeError:
        # a class whose strength has no default: the engine's own example values
        return cls.example() if hasattr(cls, "example") else _first_example(cls)


def _first_example(cls):  # FALLBACK (delete at merge): older classes without defaults
    from kinetic import PointDefect, Umklapp

    if cls is PointDefect:
        return PointDefect(A=1e-44)
    if cls is Umklapp:
        return Umklapp(B=1e-19)
    raise ParameterError(f"no start values for a new {cls.__name__}; add it in code")


# ---------------------------------------------------------------------------------------
# the conductivity chain
@dataclass
class Parts:
    """Parts of the conductivity [W m^-1 K^-1] at temperatures [K] (None where absent).

    Mirrors ``kinetic.conductivity.ConductivityParts``. ``electronic`` and the
    total that includes it exist only at ``electronic_temperature`` (the
    measured points with a resistivity).
    """
    temperature: np.ndarray
    lattice: np.ndarray
    bipolar: np.ndarray | None = None
    electronic: np.ndarray | None = None
    electronic_temperature: np.ndarray | None = None
    measured_lattice: np.ndarray | None = None
    notes: list = field(default_factory=list)


def _bipolar_fallback():  # FALLBACK (delete at merge): kinetic.conductivity.BipolarTerm.parameters
    return {
        "bipolar.prefactor": Parameter("prefactor", 0.05, unit="W m^-1 K^-2",
                                       description="bipolar prefactor C", bounds=(1e-5, 10.0), log=True),
        "bipolar.band_gap": Parameter("band_gap", 0.7, unit="eV", description="band gap E_g",
                                      bounds=(0.05, 3.0), log=False),
    }


def bipolar_parameters() -> dict:
    """``"bipolar.<name>"`` -> :class:`kinetic.Parameter` of the bipolar term."""
    if _conductivity is not None:
        return dict(_conductivity.BipolarTerm.activated().parameters)
    return _bipolar_fallback()


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
    from kinetic.fitting import (
        lattice_target,  # FALLBACK (delete at merge): ElectronicTerm of the chain
    )

    t = lattice_target(data, lorenz_method)
    return Split(t.temperature, np.asarray(t.kappa_electronic, float), np.asarray(t.kappa, float), t.kept)


def conductivity_parts(model, temperature, *, bipolar: dict | None = None) -> Parts:
    """Lattice (+ bipolar) parts of the model at ``temperature`` [K].

    ``bipolar``: ``{"bipolar.prefactor": C, "bipolar.band_gap": Eg}`` or None.
    """
    T = np.asarray(temperature, dtype=float)
    if _conductivity is not None:
        bp = None
        if bipolar is not None:
            bp = _conductivity.BipolarTerm("activated", {k.split(".", 1)[1]: v for k, v in bipolar.items()})
        p = _conductivity.ConductivityModel(model, bipolar=bp).parts(T)
        return Parts(T, np.asarray(p.lattice, float), None if bp is None else np.asarray(p.bipolar, float),
                     notes=list(getattr(p, "notes", []) or []))
    # FALLBACK (delete at merge): the older separate functions
    kl = np.asarray(model.kappa(T), float)
    kb = None
    if bipolar is not None:
        kb = np.asarray(kinetic.bipolar_kappa_activated(T, bipolar["bipolar.prefactor"],
                                                        bipolar["bipolar.band_gap"]), float)
    return Parts(T, kl, kb)


def cahill_minimum(material, temperature):
    """Cahill-Watson-Pohl minimum conductivity of a preset [W m^-1 K^-1]."""
    return kinetic.cahill_minimum_for(get_material(material), np.asarray(temperature, dtype=float))


# ---------------------------------------------------------------------------------------
# fitting
def _fit_takes_electronic() -> bool:
    try:
        return "electronic" in inspect.signature(_fit).parameters
    except (TypeError, ValueError):
        return False


def fit(model, data, free, *, bounds=None, lorenz_method="auto", n_starts=4, progress=None,
        should_stop=None, split_electronic: bool = True):
    """:func:`kinetic.fit`; ``split_electronic=False`` fits the measured total as it is."""
    kw = dict(bounds=bounds, lorenz_method=lorenz_method, n_starts=n_starts, progress=progress,
              should_stop=should_stop)
    if not split_electronic and data.kind == "total" and data.resistivity is not None:
        if _fit_takes_electronic():
            return _fit(model, data, free, electronic="none", **kw)
        # FALLBACK (delete at merge): a copy of the data without the resistivity column
        data = Dataset.from_arrays(data.temperature, data.kappa, kappa_err=data.kappa_err, kind="total",
                                   label=data.label)
    return _fit(model, data, free, **kw)


def _num(v) -> float:
    return float("nan") if v is None else float(v)


def correlation_limit() -> float:
    """|r| above which the fitter calls two parameters strongly correlated."""
    from kinetic.fitting import CORRELATION_LIMIT

    return float(CORRELATION_LIMIT)


def report_rows(result, level: float = 0.95) -> list:
    """Rows of a fit report: dicts with key, label, value, stderr, lower, upper, unit, flag."""
    if hasattr(result, "report_rows"):  # the engine's one source of report rows (kinetic.fitting.ReportRow)
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
    # FALLBACK (delete at merge): one row per free parameter from the FitResult's fields
    rows = []
    at_bound = set(result.flags.at_bound)
    unidentified = set(result.flags.unidentified)
    for n in result.names:
        try:
            lo, hi = result.interval(n, level)
        except OverflowError:  # an interval of a log parameter beyond floating point: not determined
            lo = hi = float("nan")
            unidentified.add(n)
        if n in at_bound:
            flag, lo, hi = "at a bound: interval not determined", float("nan"), float("nan")
        elif n in unidentified:
            flag = "not determined by the data"
        else:
            flag = ""
        rows.append({"key": n, "label": parameter_words(n), "value": float(result.values[n]),
                     "stderr": float(result.stderr[n]), "lower": float(lo), "upper": float(hi),
                     "unit": result.units.get(n, ""), "flag": flag})
    return rows


# ---------------------------------------------------------------------------------------
# files
def atomic_write(path, data) -> str:
    """Write bytes or text atomically; the file's permissions follow the user's umask."""
    if _atomic_write is not None:
        out = _atomic_write(path, data)
        return os.fspath(out if out is not None else path)
    # FALLBACK (delete at merge): temp file in the same folder, fsync, rename, umask-respecting mode
    path = os.fspath(path)
    folder = os.path.dirname(os.path.abspath(path))
    raw = data.encode("utf-8") if isinstance(data, str) else bytes(data)
    fd, tmp = tempfile.mkstemp(prefix=".tmp-", dir=folder)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(raw)
            fh.flush()
            os.fsync(fh.fileno())
        mask = os.umask(0)
        os.umask(mask)
        os.chmod(tmp, 0o666 & ~mask)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise
    return path


# ---------------------------------------------------------------------------------------
# words and colours
def mechanism_label(kind: str) -> str:
    """Plain-words name of a mechanism kind."""
    cls = MECHANISMS.get(kind)
    label = getattr(cls, "label", None)
    if isinstance(label, str) and label:
        return label
    return _MECH_WORDS.get(kind, str(kind).replace("_", " "))


def mechanism_colour(kind: str) -> str:
    """Colour of a mechanism kind (the same in every plot and table)."""
    cls = MECHANISMS.get(kind)
    colour = getattr(cls, "colour", None)
    if isinstance(colour, str) and colour:
        return colour
    if kind in _MECH_COLOURS:
        return _MECH_COLOURS[kind]
    return _SPARE[sum(map(ord, str(kind))) % len(_SPARE)]


def parameter_words(key: str, parameter=None) -> str:
    """Plain-words label of a parameter (``"<mechanism>.<param>"``; sample suffixes kept)."""
    base, _, suffix = key.partition("[")
    name = base.rsplit(".", 1)[-1]
    words = None
    if parameter is not None:
        lab = getattr(parameter, "plain_label", None)  # the engine's plain words, if it has them
        words = lab if isinstance(lab, str) and lab else None
    mech = base.split(".", 1)[0] if "." in base else ""
    kind = mech if mech in MECHANISMS else mech.rsplit("_", 1)[0]  # umklapp_L -> umklapp
    if words is None:
        words = _PARAM_WORDS.get(f"{kind}.{name}") or _PARAM_WORDS.get(name)
    if words is None and parameter is not None and parameter.description:
        words = parameter.description
    if words is None:
        words = name.replace("_", " ")
    if mech and mech not in MECHANISMS and mech != "bipolar" and name not in ("length",):
        words = f"{words} ({mech.replace('_', ' ')})"  # a renamed mechanism, e.g. umklapp_L
    if suffix:
        words += f" [{suffix.rstrip(']')}]"
    return words
