"""From a flash measurement to k: k(T) = D(T) rho c_p(T), and the porosity step.

A flash instrument measures the thermal diffusivity D; the lab computes
k = D rho c_p from the density rho and the specific heat capacity c_p.  A data
file with a ``diffusivity`` (or ``D``) column is read this way by
:func:`kinetic.data.load_data`; the resulting :class:`~kinetic.data.Dataset`
holds k and its uncertainty as for any measured k (everything downstream
treats it as measured), and keeps D, rho and c_p beside it.

Where each number may come from (a value given in two places must agree)

* **density** rho: a ``density`` column, a ``# density: 5.2 g/cm^3`` line, or
  the option ``density=`` ("5.2 g/cm^3", a pint quantity, or a number in kg/m^3).
* **heat capacity** c_p: a ``cp`` (or ``c_p``) column, a ``# cp: 0.2 J/(g K)``
  line, or the option ``heat_capacity=``; or a model: ``"dulong-petit"`` or
  ``"debye"`` (the preset's Debye value), as option or header line
  (``# cp: debye``), which needs the material (``material=`` or
  ``# material: Mg2Si``).  The Dataset records the choice in
  ``heat_capacity_choice`` and a note says how much the other choices would
  move k (:func:`kinetic.heat_capacity.compare_heat_capacity` shows them).
* **relative density** of a pellet (``relative_density=`` or
  ``# relative_density: 0.92``, also for k files) and the effective-medium
  relation that corrects k to full density (``porosity_correction=``, see
  :mod:`kinetic.porosity`): an explicit, recorded step; without a relation k
  stays that of the pellet and a note says so.

Uncertainty: the relative errors of D, rho and c_p add in quadrature.  Defaults
(:data:`DEFAULT_RELATIVE_ERRORS`; override with a ``diffusivity_err`` column or
the options ``diffusivity_rel_err=``, ``density_rel_err=``,
``heat_capacity_rel_err=``): D 3 % (the usual stated uncertainty of laser-flash
diffusivity, ASTM E1461 and instrument makers quote about 3 %, from memory),
rho 1 % (geometric or Archimedes density of a pellet, common practice), c_p 5 %
when measured (differential scanning calorimetry, common practice) and 10 % for
the Dulong-Petit or Debye value (the spread between the two and measured c_p is
5-15 % above room temperature, see :mod:`kinetic.heat_capacity`).  The porosity
correction adds the spread between relations (:func:`kinetic.porosity.full_density_kappa`).

>>> from kinetic.data import parse_data
>>> ds = parse_data("# density: 2.0 g/cm^3\\n# cp: 0.5 J/(g K)\\n"
...                 "T [K], D [mm^2/s]\\n300, 4.0\\n", name="flash.csv")
>>> float(ds.kappa[0]), ds.heat_capacity_choice      # 4e-6 x 2000 x 500
(4.0, 'header')
>>> round(float(ds.kappa_err[0] / ds.kappa[0]), 4)   # sqrt(0.03^2 + 0.01^2 + 0.05^2)
0.0592
"""
from __future__ import annotations

import math
import re
from collections.abc import Callable, Mapping

import numpy as np

from .. import heat_capacity as _hc
from .. import porosity as _porosity
from ..errors import DataError, ParameterError
from .options import suggest
from .units import _PINT_SI, _resolve_unit, _to_si, _unit_message, _UnitProblem

__all__ = ["DEFAULT_RELATIVE_ERRORS", "PLAUSIBLE_RANGES", "kappa_by_heat_capacity",
           "kappa_from_diffusivity"]

#: Default relative standard errors (see the module docstring for their basis).
DEFAULT_RELATIVE_ERRORS: dict[str, float] = {
    "diffusivity": 0.03,
    "density": 0.01,
    "heat_capacity": 0.05,
    "heat_capacity_model": 0.10,
}

#: Values outside these SI ranges are refused as a wrong unit, not read.  From
#: memory / common practice: flash diffusivities of solids above ~100 K lie
#: between ~1e-8 (polymers, porous oxides) and ~1.2e-3 m^2/s (diamond at room
#: temperature); solid densities between ~500 (porous pellets of light
#: solids) and 22 600 kg/m^3 (osmium); c_p between ~100 (Bi, Pb) and ~3600
#: J/(kg K) (Li) above 100 K.  The ranges are wider by a factor of 10 or more
#: so that only a wrong unit (a factor 1e3 to 1e6) trips them.
PLAUSIBLE_RANGES: dict[str, tuple[float, float]] = {
    "diffusivity": (1e-9, 1e-2),
    "density": (50.0, 50_000.0),
    "heat_capacity": (10.0, 20_000.0),
}
_SI_SHOWN = {"diffusivity": "m^2/s", "density": "kg/m^3", "heat_capacity": "J/(kg K)"}
_LIKELY_UNIT = {"diffusivity": "mm^2/s", "density": "g/cm^3", "heat_capacity": "J/(g K)"}

# header lines of a flash file
_FLASH_META_RE = re.compile(
    r"#\s*(density|cp|c_p|heat[ _]capacity|material|relative[ _]density|"
    r"porosity[ _]correction)\s*[:=]\s*(.*?)\s*$", re.IGNORECASE)
_META_KEY = {"density": "density", "cp": "heat_capacity", "c_p": "heat_capacity",
             "heat_capacity": "heat_capacity", "material": "material",
             "relative_density": "relative_density", "porosity_correction": "porosity_correction"}
_AGREE = 0.005   # a value given twice must agree to 0.5 % (rounding of 3 digits)


def flash_header_values(comments: list[tuple[int, str]], name: str) -> dict[str, tuple[str, int]]:
    """``# density: ...`` style lines -> {key: (text, line)}; a key twice is an error."""
    out: dict[str, tuple[str, int]] = {}
    for line, text in comments:
        m = _FLASH_META_RE.fullmatch(text)
        if not m:
            continue
        key = _META_KEY[m.group(1).lower().replace(" ", "_")]
        if key in out:
            raise DataError(f"{name}, line {line}: a second \"# {m.group(1)}:\" line (line "
                            f"{out[key][1]} already gives one); expected it once")
        out[key] = (m.group(2), line)
    return out


def quantity(value, role: str, where: str) -> float:
    """A scalar in SI from a number (SI), a pint quantity, or text "5.2 g/cm^3"."""
    if hasattr(value, "magnitude") and hasattr(value, "units") and hasattr(value, "to"):
        try:
            v = float(value.to(_PINT_SI[role]).magnitude)
        except Exception as exc:  # noqa: BLE001  pint's DimensionalityError and friends
            raise ParameterError(f"{where}: expected {role.replace('_', ' ')} in e.g. "
                                 f"{_LIKELY_UNIT[role]}, got a quantity in {value.units} "
                                 f"({type(exc).__name__})") from None
    elif isinstance(value, (int, float)) and not isinstance(value, bool):
        v = float(value)
    elif isinstance(value, str):
        m = re.fullmatch(r"\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*", value)
        if not m:
            raise DataError(f'{where}: expected a number and a unit, e.g. "5.2 '
                            f'{_LIKELY_UNIT[role]}", got {value[:40]!r}')
        number, unit = float(m.group(1)), m.group(2)
        if not unit:
            v = number
        else:
            try:
                spelling, factor, mode, _ = _resolve_unit(unit, role)
            except _UnitProblem as exc:
                raise DataError(f"{where}: {_unit_message(unit, role, exc)}") from None
            v = float(_to_si(np.array([number]), spelling, factor, mode, role)[0])
    else:
        raise ParameterError(f"{where}: expected a number, a quantity or text such as "
                             f'"5.2 {_LIKELY_UNIT[role]}", got {type(value).__name__}')
    if not math.isfinite(v):
        raise DataError(f"{where}: expected a finite number, got {value!r}")
    _plausible(np.array([v]), role, lambda i: where)
    return v


def _plausible(values: np.ndarray, role: str, where: Callable[[int], str]) -> None:
    lo, hi = PLAUSIBLE_RANGES[role]
    bad = np.flatnonzero(~((values >= lo) & (values <= hi)))
    if bad.size:
        i = int(bad[0])
        raise DataError(
            f"{where(i)}: {values[i]:.6g} {_SI_SHOWN[role]} is no {role.replace('_', ' ')} of a "
            f"solid (expected {lo:g} to {hi:g} {_SI_SHOWN[role]}); is the unit right (e.g. "
            f"{_LIKELY_UNIT[role]})?")


def _rel_err(value, option: str) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not 0 < value < 1:
        raise ParameterError(f"{option} must be a relative error in (0, 1), e.g. 0.03 for 3 %, "
                             f"got {value!r}")
    return float(value)


def relative_density_value(value, where: str) -> float:
    """A relative density in (0, 1] from a number or text ("0.92", "92 %")."""
    v = value
    if isinstance(value, str):
        m = re.fullmatch(r"\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(%?)\s*", value)
        if not m:
            raise DataError(f"{where}: expected a relative density in (0, 1] such as 0.92 or "
                            f"92 %, got {value[:40]!r}")
        v = float(m.group(1)) / (100.0 if m.group(2) else 1.0)
    if isinstance(v, bool) or not isinstance(v, (int, float)) or not (0.0 < float(v) <= 1.0):
        raise DataError(f"{where}: expected a relative density in (0, 1] (pellet density / "
                        f"full density), got {value!r}")
    return float(v)


def _agree(a: np.ndarray, b: float) -> np.ndarray:
    return np.abs(a - b) <= _AGREE * np.maximum(np.abs(a), abs(b))


def _one_source(role: str, column, header, option, name: str,
                col_where: Callable[[int], str], what: str):
    """The values of a quantity given as column, header line and/or option.

    Returns (values or None, where it came from); refuses disagreeing sources.
    """
    given = []
    if column is not None:
        given.append(("column", column, None))
    if header is not None:
        text, line = header
        given.append(("header", quantity(text, role, f"{name}, line {line}"), line))
    if option is not None:
        given.append(("option", quantity(option, role, f"{name}, option {role}="), None))
    if not given:
        return None, None
    base_kind, base, base_line = given[0]
    for kind, v, line in given[1:]:
        arr = np.broadcast_to(np.asarray(base, dtype=float), np.shape(column) if column is not None
                              else np.shape(base))
        ok = _agree(np.atleast_1d(arr), float(v))
        if not np.all(ok):
            i = int(np.flatnonzero(~ok)[0])
            first = (col_where(i) if base_kind == "column" else
                     f"{name}, line {base_line}" if base_kind == "header" else f"{role}=")
            second = f"line {line}" if kind == "header" else f"the option {role}="
            raise DataError(
                f"{first}: {what} {float(np.atleast_1d(arr)[i]):.6g} {_SI_SHOWN[role]} disagrees "
                f"with {float(v):.6g} {_SI_SHOWN[role]} given by {second}; expected one value "
                "(give it once)")
    return np.asarray(base, dtype=float), base_kind


def kappa_from_diffusivity(*, name: str, temperature: np.ndarray, diffusivity: np.ndarray,
                           diffusivity_err: np.ndarray | None, density_column, cp_column,
                           header: Mapping[str, tuple[str, int]], col_where: Callable[[str, int], str],
                           density=None, heat_capacity=None, material=None,
                           diffusivity_rel_err=None, density_rel_err=None,
                           heat_capacity_rel_err=None) -> dict:
    """k = D rho c_p with its uncertainty; the reader's flash step (arrays in SI).

    Returns a dict with "kappa", "kappa_err", "density", "heat_capacity"
    (arrays [W/(m K)], [kg/m^3], [J/(kg K)]), "choice" (str) and "notes".
    Raises DataError naming the file and the value for missing or
    disagreeing numbers or implausible units.
    """
    T = temperature
    notes: list[str] = []
    _plausible(diffusivity, "diffusivity", lambda i: col_where("diffusivity", i))
    if density_column is not None:
        _plausible(density_column, "density", lambda i: col_where("density", i))
    if cp_column is not None:
        _plausible(cp_column, "heat_capacity", lambda i: col_where("heat_capacity", i))

    # ---- density
    rho, rho_from = _one_source("density", density_column, header.get("density"), density, name,
                                lambda i: col_where("density", i), "density")
    if rho is None:
        raise DataError(f'{name}: no density for k = D rho c_p; expected a "density" column, a '
                        f'"# density: 5.2 g/cm^3" line, or {suggest("density", "5.2 g/cm^3")}')
    rho = np.broadcast_to(rho, T.shape).astype(float)

    # ---- material (for a model heat capacity)
    mat = material
    if header.get("material") is not None:
        text, line = header["material"]
        if mat is not None and str(mat) != text:
            raise DataError(f'{name}, line {line}: "# material: {text}" disagrees with the option '
                            f"material={mat!r}; expected one material")
        mat = text

    # ---- heat capacity: a model name or values
    model = None
    cp_header = header.get("heat_capacity")
    cp_header_val = cp_header
    if cp_header is not None and cp_header[0].strip().lower() in _hc.HEAT_CAPACITY_MODELS:
        model, cp_header_val = cp_header[0].strip().lower(), None
    cp_option_val = heat_capacity
    if isinstance(heat_capacity, str) and heat_capacity.strip().lower() in _hc.HEAT_CAPACITY_MODELS:
        if model is not None and model != heat_capacity.strip().lower():
            raise DataError(f'{name}, line {cp_header[1]}: "# cp: {model}" disagrees with the '
                            f"option heat_capacity={heat_capacity!r}; expected one choice")
        model, cp_option_val = heat_capacity.strip().lower(), None
        explicit_model = True
    else:
        explicit_model = False
    cp, cp_from = _one_source("heat_capacity", cp_column, cp_header_val, cp_option_val, name,
                              lambda i: col_where("heat_capacity", i), "heat capacity")
    replaced = None
    if cp is not None and model is not None:
        if not explicit_model:
            raise DataError(f"{name}: heat capacity given as values ({cp_from}) and as the model "
                            f'"{model}"; expected one of them')
        # the user's explicit choice (option heat_capacity="dulong-petit"|"debye") wins over the
        # file's measured values, and says so below with how much k moves
        replaced, cp = (np.broadcast_to(cp, T.shape).astype(float), cp_from), None
    if model is not None:
        if mat is None:
            raise DataError(f'{name}: the {model} heat capacity needs the material; expected a '
                            f'"# material: Mg2Si" line or {suggest("material", "Mg2Si")}')
        try:
            cp = _hc.model_heat_capacity(model, mat, T)
        except ParameterError as exc:
            raise DataError(f"{name}: {exc}") from None
        choice = model
        notes.append(f"heat capacity: {model} value for {mat}")
        if replaced is not None:
            ratio = np.broadcast_to(cp, T.shape) / replaced[0]
            notes.append(f"heat capacity: the {model} value was chosen over the file's measured c_p "
                         f"({replaced[1]}); k differs from the measured-c_p k by "
                         f"{100 * (float(np.min(ratio)) - 1):+.1f} % to {100 * (float(np.max(ratio)) - 1):+.1f} %")
    elif cp is None:
        raise DataError(
            f'{name}: no heat capacity for k = D rho c_p; expected a "cp" column, a '
            f'"# cp: 0.5 J/(g K)" line, or {suggest("heat_capacity", "0.5 J/(g K)")} (or '
            f'"dulong-petit" or "debye" with the material)')
    else:
        choice = cp_from
        notes.append(f"heat capacity: measured values ({cp_from})")
    cp = np.broadcast_to(cp, T.shape).astype(float)

    # ---- k and its uncertainty
    kappa = diffusivity * rho * cp
    if diffusivity_err is not None:
        r_d = diffusivity_err / diffusivity
        if diffusivity_rel_err is not None:
            raise DataError(f'{name}: a "diffusivity_err" column and the option '
                            "diffusivity_rel_err= were both given; expected one of them")
    else:
        r_d = _rel_err(diffusivity_rel_err, "diffusivity_rel_err") if diffusivity_rel_err \
            is not None else DEFAULT_RELATIVE_ERRORS["diffusivity"]
    r_rho = _rel_err(density_rel_err, "density_rel_err") if density_rel_err is not None \
        else DEFAULT_RELATIVE_ERRORS["density"]
    r_cp = _rel_err(heat_capacity_rel_err, "heat_capacity_rel_err") \
        if heat_capacity_rel_err is not None else \
        DEFAULT_RELATIVE_ERRORS["heat_capacity_model" if model else "heat_capacity"]
    kappa_err = kappa * np.sqrt(np.square(r_d) + r_rho ** 2 + r_cp ** 2)
    shown_d = ("from the diffusivity_err column" if diffusivity_err is not None
               else f"{100 * float(r_d):.3g} %")
    notes.append(f"k = D rho c_p; relative errors: D {shown_d}, rho {100 * r_rho:.3g} %, "
                 f"c_p {100 * r_cp:.3g} %, added in quadrature")

    # ---- how much the heat-capacity choice moves k
    notes.append(_choice_note(choice, cp, mat, T))
    return {"kappa": kappa, "kappa_err": kappa_err, "density": rho, "heat_capacity": cp,
            "choice": choice, "notes": notes}


def kappa_by_heat_capacity(dataset, material: str | None = None) -> dict[str, np.ndarray]:
    """k of a flash Dataset under each heat-capacity choice [W m^-1 K^-1].

    Returns a dict: the Dataset's own choice (e.g. "column" or "debye") -> its
    kappa, and "dulong-petit" and "debye" (where the material is a preset) ->
    kappa x c_p(choice) / c_p(used), with any porosity correction kept.

    Raises
    ------
    ParameterError
        The Dataset holds no heat capacity (it was not read from a diffusivity).

    >>> from kinetic.data import parse_data
    >>> ds = parse_data("# density: 2 g/cm^3\\n# cp: 0.5 J/(g K)\\nT [K], D [mm^2/s]\\n300, 4\\n")
    >>> {k: round(float(v[0]), 3) for k, v in kappa_by_heat_capacity(ds, "Mg2Si").items()}
    {'header': 4.0, 'dulong-petit': 7.805, 'debye': 6.495}
    """
    if getattr(dataset, "heat_capacity", None) is None:
        raise ParameterError("dataset: no heat capacity recorded; expected a Dataset read from a "
                             "diffusivity file (k = D rho c_p)")
    out = {dataset.heat_capacity_choice or "used": np.array(dataset.kappa)}
    if material is None:
        return out
    for alt, cp in _hc.compare_heat_capacity(material, dataset.temperature).items():
        if alt not in out:
            out[alt] = dataset.kappa * cp / dataset.heat_capacity
    return out


def _choice_note(choice: str, cp: np.ndarray, material, T: np.ndarray) -> str:
    if material is None:
        return ("heat-capacity choice not compared (no material given; with one, the note "
                "compares the Dulong-Petit and Debye values)")
    try:
        alts = _hc.compare_heat_capacity(material, T)
    except ParameterError:
        return f"heat-capacity choice not compared (no preset or formula {material!r})"
    parts = []
    for alt, values in alts.items():
        if alt == choice:
            continue
        r = 100.0 * (values / cp - 1.0)
        lo, hi = float(np.min(r)), float(np.max(r))
        moved = f"{lo:+.1f} %" if round(lo, 1) == round(hi, 1) else f"{lo:+.1f} % to {hi:+.1f} %"
        parts.append(f"{alt} would change k by {moved}")
    lo_T, hi_T = float(T.min()), float(T.max())
    span = f"at {lo_T:.6g} K" if lo_T == hi_T else f"over {lo_T:.6g}-{hi_T:.6g} K"
    return f"heat-capacity choice ({choice}): " + "; ".join(parts) + f" {span}"


def porosity_step(*, name: str, kappa: np.ndarray, kappa_err: np.ndarray | None,
                  relative_density, relation, header: Mapping[str, tuple[str, int]]) -> dict:
    """The explicit porosity step: returns kappa, kappa_err, relative_density, relation, notes."""
    notes: list[str] = []
    rd = None
    if header.get("relative_density") is not None:
        text, line = header["relative_density"]
        rd = relative_density_value(text, f"{name}, line {line}")
    if relative_density is not None:
        v = relative_density_value(relative_density, f"{name}, option relative_density=")
        if rd is not None and abs(v - rd) > _AGREE * rd:
            raise DataError(f'{name}, line {header["relative_density"][1]}: relative density '
                            f"{rd:.6g} disagrees with the option relative_density={v:.6g}; "
                            "expected one value")
        rd = v
    rel = relation
    if header.get("porosity_correction") is not None:
        text, line = header["porosity_correction"]
        if rel is not None and rel != text.strip().lower():
            raise DataError(f'{name}, line {line}: "# porosity_correction: {text}" disagrees with '
                            f"the option porosity_correction={rel!r}; expected one relation")
        rel = text.strip().lower()
    if rel in ("none", ""):
        rel = None
    if rel is not None and rel not in _porosity.RELATIONS:
        raise ParameterError(f"porosity_correction must be one of "
                             f"{', '.join(_porosity.RELATIONS)} or None, got {rel!r}")
    if rel is not None and rd is None:
        raise DataError(f"{name}: porosity correction {rel!r} but no relative density; expected "
                        f'a "# relative_density: 0.92" line or {suggest("relative_density", "0.92")}')
    if rd is None:
        return {"kappa": kappa, "kappa_err": kappa_err, "relative_density": None,
                "relation": None, "notes": notes}
    if rel is None:
        if rd < 1.0:
            notes.append(f"k is that of the sample at relative density {rd:.4g}, not corrected "
                         f"to full density (to correct it: "
                         f'{suggest("porosity_correction", "maxwell-eucken")})')
        return {"kappa": kappa, "kappa_err": kappa_err, "relative_density": rd,
                "relation": None, "notes": notes}
    try:
        k_full, spread = _porosity.full_density_kappa(kappa, rd, relation=rel)
    except ParameterError as exc:
        raise DataError(f"{name}: {exc}") from None
    factor = float(k_full[0] / kappa[0])
    if kappa_err is None:
        err = None   # no stated errors to add it to: the spread is reported in the note
    else:
        err = np.sqrt(np.square(kappa_err * factor) + np.square(spread))
    rel_spread = float(np.max(spread / k_full))
    if _porosity.outside_validity(rel, rd):
        notes.append(f"porosity {1 - rd:.4g} is beyond the validity range of the {rel} relation "
                     f"(porosity up to {_porosity.RELATIONS[rel][1]:.3g}); the correction is "
                     "an extrapolation")
    _, _, validity = _porosity.RELATIONS[rel]
    notes.append(f"porosity correction ({rel}: {validity}): relative density {rd:.4g} "
                 f"(porosity {1 - rd:.4g}); k multiplied by {factor:.4g} to full density; "
                 f"spread of the other relations {100 * rel_spread:.2g} % "
                 + ("added to the uncertainty" if err is not None else
                    "(the file states no uncertainty to add it to)"))
    return {"kappa": k_full, "kappa_err": err, "relative_density": rd, "relation": rel,
            "notes": notes}
