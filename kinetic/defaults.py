"""One default model per material: the calibrated model of the preset's reference sample.

:func:`default_model` builds the :class:`~kinetic.lattice.LatticeModel` of the
bulk crystal (or pellet) on which the preset's reference k(T) was measured, from
the preset's stored ``"model"`` description (schema in
:mod:`kinetic.presets._fields`). :func:`calibration` says where that model was
checked (source, table, temperature range, rms deviation) and
:func:`scope_notes` gives plain notes when a prediction leaves that range.

Nothing here falls back silently to an uncalibrated coefficient: a preset
without a calibrated model, or a user material without a Grüneisen parameter,
gets a :class:`~kinetic.errors.ParameterError` naming the missing number and how
to give it. The thermodynamic Grüneisen parameter (``gruneisen_th`` in the
presets) is never used here.

Examples
--------
>>> m = default_model("Si")
>>> [b.name for b in m.branches], m.mechanism_names
(['L', 'T'], ('boundary', 'point_defect', 'umklapp', 'normal'))
>>> cal = calibration("Si")
>>> cal.t_min, cal.t_max, cal.n_points
(50.0, 1000.0, 19)
>>> scope_notes("Si", temperature=300.0)
[]
"""
from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np
from scipy.constants import atomic_mass as _U

from . import materials
from .errors import ParameterError
from .lattice import LatticeModel
from .presets import PRESETS, calibration_record
from .scattering import Boundary, Normal, PointDefect, Umklapp

__all__ = [
    "MECHANISM_ORDER",
    "Calibration",
    "calibrated_names",
    "calibration",
    "default_free",
    "default_model",
    "new_mechanism",
    "scope_notes",
]

#: Order of the mechanisms in a default model.
MECHANISM_ORDER = ("boundary", "point_defect", "umklapp", "normal")

#: Smallest boundary length checked against size-effect measurements [m]: the
#: 37 nm Si nanowire of Li et al., Appl. Phys. Lett. 83, 2934 (2003)
#: (tests/test_size_effects.py); only Si has such a check.
SIZE_CHECKED_MIN = {"Si": 37e-9}


@dataclass(frozen=True)
class Calibration:
    """Where a preset's default model was checked.

    Attributes
    ----------
    material : str
        Preset key.
    source : str
        Published source of the reference table (authors, year, journal).
    table : str
        Path of the table inside the project (``reference/...csv``).
    t_min, t_max : float
        Temperature range of the fit [K].
    rms : float
        Rms relative deviation of the model from the table (a fraction).
    n_points : int
        Table rows used.
    sample : str
        The reference sample (the bulk crystal the table was measured on).
    how : str
        How the calibration was made.
    model : dict
        The stored model description (schema of :mod:`kinetic.presets._fields`).
    table_status : str
        How sure the reference table is: "checked", "checked (two points)",
        "partly from memory" or "from memory" (:data:`kinetic.presets.TABLE_STATUS`).
    """

    material: str
    source: str
    table: str
    t_min: float
    t_max: float
    rms: float
    n_points: int
    sample: str
    how: str = ""
    model: dict = field(default_factory=dict)
    table_status: str = "checked"


def _preset(material):
    """(preset key or None, Material) for a name or a Material."""
    if isinstance(material, materials.Material):
        key = material.name if material.name in PRESETS else None
        return key, material
    key = materials.preset_key(material)  # ParameterError listing the valid names
    return key, materials.get(key)


def calibrated_names() -> list:
    """Preset keys that carry a calibrated model."""
    return [k for k, p in PRESETS.items() if _model_value(k, p) is not None]


def _model_value(key, preset, branches: str | None = None):
    for fname in ("model", "model_avg"):
        f = preset.get(fname)
        if f and f.get("value") and (branches is None or f["value"]["branches"] == branches):
            return f["value"]
    return None


def calibration(material) -> Calibration | None:
    """The calibration record of a preset (None for an uncalibrated one or a user material).

    Raises
    ------
    ParameterError
        For an unknown preset name (the message lists the valid ones).
    """
    key, _ = _preset(material)
    if key is None:
        return None
    p = PRESETS[key]
    rec = calibration_record(p, key)  # the one reading of the preset fields (also kinetic materials)
    if rec is None:
        return None
    return Calibration(material=key, how=p["calibration"].get("how", ""), model=dict(_model_value(key, p)), **rec)


def _mechanism(kind: str, params: Mapping, mat) -> object:
    params = dict(params)
    applies_to = params.pop("applies_to", None)
    kw = {"applies_to": tuple(applies_to)} if applies_to else {}
    if kind == "boundary":
        return Boundary(**params, **kw)
    if kind == "point_defect":
        if "gamma" in params:
            return PointDefect.from_gamma(params["gamma"], mat.volume_per_atom, **kw)
        return PointDefect(A=params["A"], **kw)
    if kind == "umklapp":
        if "B" in params:
            return Umklapp(B=params["B"], b=params.get("b", 3.0), **kw)
        return Umklapp(gruneisen=params["gruneisen"], atomic_mass=mat.atomic_mass * _U, b=params.get("b", 3.0), **kw)
    return Normal(**params, **kw)


def _check_mechanisms(mechanisms) -> list | None:
    if mechanisms is None:
        return None
    if isinstance(mechanisms, str):
        raise ParameterError(f"mechanisms must be a list of names, got the string {mechanisms!r}")
    mechs = list(mechanisms)
    for m in mechs:
        if m not in MECHANISM_ORDER:
            raise ParameterError(f"unknown mechanism {m!r}; choose from {', '.join(MECHANISM_ORDER)}")
    if len(set(mechs)) != len(mechs):
        raise ParameterError(f"a mechanism is listed twice in {mechs}")
    return mechs


def default_model(material, mechanisms: Sequence[str] | None = None, *,
                  split_branches: bool | None = None) -> LatticeModel:
    """The calibrated model of a preset's reference sample.

    Parameters
    ----------
    material : str or Material
        A preset name (or alias, e.g. ``"diamond"``) or a Material. A Material
        whose name is a calibrated preset uses that preset's model with the
        Material's own numbers; any other Material must carry its own
        ``gruneisen`` (it gets Slack & Galginaitis' b = 3, its natural-isotope
        Gamma from ``composition`` and a 1 mm bulk boundary, all to be fitted).
    mechanisms : sequence of str, optional
        Keep only these of the calibrated mechanisms (``"boundary"``,
        ``"point_defect"``, ``"umklapp"``, ``"normal"``). Leaving one out
        leaves the calibration: the result is then a starting model, no longer
        the reference sample's.
    split_branches : bool, optional
        None (default): the preset's calibrated branch form. True / False ask
        for split L + T / one averaged branch; a form the preset has no
        calibration for is refused.

    Raises
    ------
    ParameterError
        Unknown name or mechanism; a preset without a calibrated model; a
        user material without a Grüneisen parameter; a branch form that was
        not calibrated; a requested mechanism the calibrated model lacks.
    """
    mechs = _check_mechanisms(mechanisms)
    key, mat = _preset(material)
    preset = PRESETS.get(key) if key else None
    if preset is not None and _model_value(key, preset) is not None:
        want = None if split_branches is None else ("split" if split_branches else "avg")
        spec = _model_value(key, preset, want)
        if spec is None:
            have = _model_value(key, preset)["branches"]
            raise ParameterError(
                f"{key} is calibrated with {'split L + T' if have == 'split' else 'one averaged'} branches only; "
                f"pass split_branches={have == 'split'} (or leave it out) for its calibrated model")
        split = spec["branches"] == "split"
        branches = mat.branches(split=split, dispersion=spec["dispersion"], zone_edge=bool(spec.get("zone_edge")))
        stored = spec["mechanisms"]
        kinds = [k for k in MECHANISM_ORDER if k in stored] if mechs is None else mechs
        missing = [k for k in kinds if k not in stored]
        if missing:
            raise ParameterError(
                f"{key}'s calibrated model has no {missing[0]!r} term (it has {', '.join(stored)}); "
                f"add one yourself with model.with_mechanism(...)")
        sc = [_mechanism(k, stored[k], mat) for k in kinds]
        if not any(m.resistive for m in sc):
            raise ParameterError(f"mechanisms {kinds} hold no resistive scattering; add boundary or umklapp")
        return LatticeModel(branches, sc, material=mat.name)
    if key is not None and not isinstance(material, materials.Material):
        raise ParameterError(
            f"{key} has no calibrated model, so no calibrated Grüneisen parameter for its Umklapp term: pass a "
            f"Material with gruneisen=... (kinetic.materials.get({key!r}).with_values(gruneisen=...)) or pick a "
            f"calibrated preset: {', '.join(calibrated_names()) or '(none)'}")
    # a user material (or an uncalibrated preset handed over as a Material)
    if mat.gruneisen is None:
        raise ParameterError(
            f"material {mat.name!r} has no Grüneisen parameter for the Umklapp term: pass gruneisen=... "
            f"(Material(..., gruneisen=...) or material.with_values(gruneisen=...)) or pick a calibrated preset: "
            f"{', '.join(calibrated_names()) or '(none)'}")
    kinds = list(MECHANISM_ORDER[:3]) if mechs is None else mechs
    sc = []
    for k in kinds:
        if k == "boundary":
            sc.append(Boundary(1e-3))
        elif k == "point_defect":
            from .disorder import material_gamma

            if not mat.composition:
                raise ParameterError(
                    f"material {mat.name!r} has no composition for its isotope Gamma: pass composition="
                    "{'Si': 1} (element -> atoms per formula unit) or leave point_defect out")
            sc.append(PointDefect.from_gamma(material_gamma(mat), mat.volume_per_atom))
        elif k == "umklapp":
            sc.append(Umklapp(gruneisen=mat.gruneisen, atomic_mass=mat.atomic_mass * _U, b=3.0))
        else:
            raise ParameterError(
                f"material {mat.name!r} has no calibrated normal-process prefactor: add "
                "Normal(B=...) yourself with model.with_mechanism(...)")
    if not any(m.resistive for m in sc):
        raise ParameterError(f"mechanisms {kinds} hold no resistive scattering; add boundary or umklapp")
    return LatticeModel.from_material(mat, sc, split_branches=bool(split_branches))


def default_free(model: LatticeModel) -> list:
    """Free parameters a first fit should try: boundary length, Gamma and the Umklapp strength.

    The Umklapp strength is its Grüneisen parameter or its B, whichever the
    mechanism uses. Normal-process and exponent parameters stay fixed: they
    are weakly determined by k(T) alone (common practice).
    """
    params = model.params
    out = [n for n in ("boundary.length", "point_defect.gamma", "point_defect.A", "umklapp.gruneisen", "umklapp.B")
           if n in params]
    if not out:
        raise ParameterError("the model has none of the default free parameters; name them with free=[...]")
    return out


def new_mechanism(kind: str, material=None):
    """A mechanism of any registered kind, with start values, to add to a model (a what-if).

    The material's calibrated mechanism where its default model has one of that
    kind; otherwise the class's own defaults, or its documented example values
    (:meth:`kinetic.scattering.Mechanism.example`). The CLI's ``--add`` and the
    workbench's "add a mechanism" both call this, so a newly registered
    mechanism is reachable everywhere without further code.

    Raises
    ------
    ParameterError
        An unknown kind (the message lists the registered ones).
    """
    from .scattering import MECHANISMS

    if kind not in MECHANISMS:
        raise ParameterError(f"unknown mechanism {kind!r}; registered: {', '.join(MECHANISMS)}")
    if material is not None:
        try:
            model = default_model(material)
        except ParameterError:
            model = None
        if model is not None and kind in model.mechanism_names:
            return model.mechanism(kind)
    cls = MECHANISMS[kind]
    try:
        return cls()
    except TypeError:
        return cls.example()


def _fmt_k(t: float) -> str:
    return f"{t:g} K"


def scope_notes(material_or_name, *, temperature=None, boundary_length=None,
                alloy_fraction=None) -> list:
    """Plain notes for a prediction outside what the preset's calibration checked.

    Parameters
    ----------
    material_or_name : str or Material
        The material the prediction is for.
    temperature : float or array_like, optional
        Temperatures of the prediction [K].
    boundary_length : float, optional
        Grain size, film thickness or wire diameter of the prediction [m].
    alloy_fraction : float, optional
        Alloy fraction x of the prediction; no group-IV preset checks alloys,
        so any x strictly between 0 and 1 gets a note (the alloy calibrations
        add their own notes).

    Returns
    -------
    list of str
        Empty when the prediction lies inside the calibrated range.
    """
    key, mat = _preset(material_or_name)
    name = key or mat.name
    cal = calibration(mat if key is None else key)
    notes = []
    if cal is None:
        notes.append(f"{name} has no calibration against measured k(T): the prediction is uncalibrated")
    elif "memory" in cal.table_status:
        notes.append(f"{name}: the reference k(T) this preset was calibrated on is {cal.table_status} "
                     "(not read from the published table): treat the prediction as a rough estimate")
    if temperature is not None:
        T = np.atleast_1d(np.asarray(temperature, dtype=float))
        if cal is not None and T.size and (T.min() < cal.t_min or T.max() > cal.t_max):
            notes.append(
                f"{name}: temperatures {_fmt_k(float(T.min()))}-{_fmt_k(float(T.max()))} go outside the calibrated "
                f"range {_fmt_k(cal.t_min)}-{_fmt_k(cal.t_max)} ({cal.source})")
    if boundary_length is not None:
        L = float(boundary_length)
        lo = SIZE_CHECKED_MIN.get(key or "")
        if lo is None:
            if cal is not None and L < 1e-4:
                notes.append(f"{name}: boundary length {L:.3g} m was not checked against size-effect "
                             "measurements (only bulk k(T) was)")
        elif L < lo:
            notes.append(f"{name}: boundary length {L:.3g} m is below the smallest size checked "
                         f"({lo:.3g} m, Li et al., Appl. Phys. Lett. 83, 2934, 2003)")
    if alloy_fraction is not None:
        x = float(alloy_fraction)
        if 0.0 < x < 1.0:
            notes.append(f"{name}: alloy fraction x = {x:g} was not checked by this preset's calibration")
    return notes
