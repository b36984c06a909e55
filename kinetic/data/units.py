"""Units of the columns: SI targets, defaults, lab spellings and their conversion via pint.

pint is imported lazily (building its registry takes about a second); the
commonest spellings have exact factors here so a typical file needs no registry.
"""
from __future__ import annotations

import math
import re
import warnings
from functools import lru_cache

import numpy as np

__all__ = ["DEFAULT_UNITS", "FLASH_SI_UNITS", "SI_UNITS"]

# Column names and units
# --------------------------------------------------------------------------------------

#: SI unit stored in a :class:`Dataset` for each quantity (pint spelling).
SI_UNITS: dict[str, str] = {
    "temperature": "K",
    "kappa": "W/(m K)",
    "kappa_err": "W/(m K)",
    "resistivity": "Ohm m",
    "sigma": "S/m",
    "seebeck": "V/K",
}

#: Unit assumed for a column whose header gives none (see the module docstring;
#: ``kappa_err`` without a unit takes the kappa column's unit instead).
DEFAULT_UNITS: dict[str, str] = dict(SI_UNITS)

_PINT_SI = {
    "temperature": "kelvin",
    "kappa": "watt / meter / kelvin",
    "kappa_err": "watt / meter / kelvin",
    "resistivity": "ohm * meter",
    "sigma": "siemens / meter",
    "seebeck": "volt / kelvin",
    "diffusivity": "meter ** 2 / second",
    "diffusivity_err": "meter ** 2 / second",
    "density": "kilogram / meter ** 3",
    "heat_capacity": "joule / kilogram / kelvin",
}

#: SI units of the quantities of a flash measurement (no defaults: a number
#: without its unit is ambiguous by factors of 1e3 to 1e6 here, so the unit
#: must be written).
FLASH_SI_UNITS: dict[str, str] = {
    "diffusivity": "m^2/s",
    "diffusivity_err": "m^2/s",
    "density": "kg/m^3",
    "heat_capacity": "J/(kg K)",
}

_WHAT = {
    "temperature": "a temperature",
    "kappa": "a thermal conductivity",
    "kappa_err": "a thermal conductivity (or a relative uncertainty in %)",
    "resistivity": "an electrical resistivity",
    "sigma": "an electrical conductivity",
    "seebeck": "a Seebeck coefficient",
    "diffusivity": "a thermal diffusivity",
    "diffusivity_err": "a thermal diffusivity (or a relative uncertainty in %)",
    "density": "a mass density",
    "heat_capacity": "a specific heat capacity (per mass)",
}

_EXAMPLES = {
    "temperature": "K, degC or degF",
    "kappa": "W/(m K) or mW/(cm K)",
    "kappa_err": "W/(m K), mW/(cm K) or %",
    "resistivity": "Ohm m, uOhm cm or mOhm cm",
    "sigma": "S/m or S/cm",
    "seebeck": "V/K or uV/K",
    "diffusivity": "mm^2/s, cm^2/s or m^2/s",
    "diffusivity_err": "mm^2/s, cm^2/s or %",
    "density": "g/cm^3 or kg/m^3",
    "heat_capacity": "J/(g K) or J/(kg K)",
}


@lru_cache(maxsize=1)
def _ureg():
    import pint  # imported lazily: building the registry takes a while

    return pint.UnitRegistry()


@lru_cache(maxsize=256)
def _target_dims(role: str):
    return _ureg().parse_expression(_PINT_SI[role]).dimensionality


_SUPERSCRIPTS = str.maketrans({"⁻": "-", "⁰": "0", "¹": "1", "²": "2", "³": "3", "⁴": "4",
                               "·": " ", "⋅": " ", "×": "*", "Ω": "ohm", "−": "-",
                               "℃": "°C", "℉": "°F", "\u212a": "K"})
_TEMPERATURE_WORDS = {
    "c": "degC", "°c": "degC", "deg c": "degC", "degc": "degC", "° c": "degC",
    "celsius": "degC", "centigrade": "degC", "oc": "degC",
    "f": "degF", "°f": "degF", "deg f": "degF", "degf": "degF", "° f": "degF",
    "fahrenheit": "degF", "k": "K", "kelvin": "K", "°k": "K",
}


def _unit_candidates(unit: str, role: str) -> list[tuple[str, bool]]:
    """Spellings to try for a header unit, most literal first.

    Returns (pint string, is_reinterpretation).  A reinterpretation is used
    only when it gives the right dimension and the literal reading does not.
    """
    u = unit.strip().translate(_SUPERSCRIPTS)
    out = []
    if role == "temperature" and u.lower() in _TEMPERATURE_WORDS:
        # a bare "C" (coulomb) or "F" (farad) in a temperature column means degC/degF
        out.append((_TEMPERATURE_WORDS[u.lower()], u.lower() in ("c", "f")))
    base = re.sub(r"(?i)ohm", "ohm", u.translate(_SUPERSCRIPTS))     # "uOhm", "Ω" -> "uohm", "ohm"
    base = re.sub(r"ohm(?=[A-Za-zµμ])", "ohm ", base).strip()          # "µΩcm" -> "µohm cm"
    out.append((base, False))
    fixed = base
    # "W m-1 K-1" -> "W m^-1 K^-1" (only after a letter, so 1e-8 is untouched)
    fixed = re.sub(r"(?<=[A-Za-zµμ])(?<![0-9][eE])(-?\d+)(?![\d.])", r"^\1", fixed)
    # "ohm-cm" -> "ohm cm"
    fixed = re.sub(r"(?<=[A-Za-zµμ])-(?=[A-Za-zµμ])", " ", fixed)
    # "Kelvin", "Watt" -> lower case (two-letter symbols such as mS stay)
    fixed = re.sub(r"\b[A-Z][a-z]{2,}\b", lambda m: m.group(0).lower(), fixed)
    if fixed != base:
        out.append((fixed, True))
    if role != "temperature":
        # "W/(m °C)", "uV/°C": a temperature DIFFERENCE, 1 W/(m °C) = 1 W/(m K)
        delta = re.sub(r"°\s*C\b|\bdeg\s*C\b|\bdegC\b|\bcelsius\b", "delta_degC", fixed)
        delta = re.sub(r"°\s*F\b|\bdeg\s*F\b|\bdegF\b|\bfahrenheit\b", "delta_degF", delta)
        if delta != fixed:
            out.append((delta, True))
            fixed = delta
    if role in ("kappa", "kappa_err"):
        # "Wm-1K-1", "mWcm-1K-1": the compact form of W m^-1 K^-1
        m = re.fullmatch(r"(m?W)\s*(c?m)\^?-1\s*(?:K|delta_degC)\^?-1", fixed.replace(" ", ""))
        if m:
            out.append((f"{m.group(1)}/({m.group(2)}*K)", True))
        # "W/mK", "mW/cmK", "W/(mK)": per metre-kelvin, not per millikelvin
        mk = re.sub(r"/\(?\s*(c?m|mm)\s*K\s*\)?(?![A-Za-z])", r"/(\1*K)", fixed)
        if mk != fixed:
            out.append((mk, True))
    return out


class _UnitProblem(Exception):
    def __init__(self, kind: str, detail: str = ""):
        super().__init__(kind)
        self.kind = kind  # "unknown", "syntax", "dimension" or "offset"
        self.detail = detail


# The commonest spellings with their exact SI factors (SI prefixes), so that
# reading a typical file does not need to build a pint registry (about a
# second).  tests/test_data.py checks every entry against pint.
_COMMON_UNITS: dict[tuple[str, str], float] = {}
for _role, _table in {
    "temperature": {"K": 1.0, "kelvin": 1.0},
    "kappa": {"W/(m K)": 1.0, "W/(m*K)": 1.0, "W/m/K": 1.0, "W m^-1 K^-1": 1.0,
              "mW/(cm K)": 0.1, "mW/(cm*K)": 0.1, "W/(cm K)": 100.0},
    "resistivity": {"Ohm m": 1.0, "ohm m": 1.0, "ohm*m": 1.0, "uOhm cm": 1e-8, "uohm cm": 1e-8,
                    "µΩ cm": 1e-8, "mOhm cm": 1e-5, "mohm cm": 1e-5, "Ohm cm": 1e-2,
                    "ohm cm": 1e-2},
    "sigma": {"S/m": 1.0, "S/cm": 100.0},
    "seebeck": {"V/K": 1.0, "uV/K": 1e-6, "µV/K": 1e-6, "mV/K": 1e-3},
    "diffusivity": {"mm^2/s": 1e-6, "cm^2/s": 1e-4, "m^2/s": 1.0},
    "density": {"g/cm^3": 1e3, "kg/m^3": 1.0, "g cm^-3": 1e3},
    "heat_capacity": {"J/(g K)": 1e3, "J/(kg K)": 1.0, "J/g/K": 1e3, "J/kg/K": 1.0,
                      "J g^-1 K^-1": 1e3, "J kg^-1 K^-1": 1.0},
}.items():
    for _u, _f in _table.items():
        _COMMON_UNITS[(_role, _u)] = _f
        if _role in ("kappa", "diffusivity"):
            _COMMON_UNITS[(_role + "_err", _u)] = _f


#: Longest unit string read from a header [characters].  Real units are short
#: ("mW/(cm K)" has 9); a longer one is refused before pint sees it.
MAX_UNIT_CHARS = 40
#: Largest magnitude of an exponent in a unit ("m^-1" has 1, "cm^3" 3).  pint
#: evaluates ``10^99999999`` exactly as an integer, which takes minutes.
MAX_UNIT_EXPONENT = 4
#: Longest run of digits in a unit ("1e-8 Ohm m" has 1).
MAX_UNIT_DIGITS = 8

_EXPONENT_RE = re.compile(r"(?:\^|\*\*)\s*(\(?)\s*([+-]?)\s*([0-9.]*)")


def _check_unit_text(unit: str) -> None:
    """Refuse, before pint parses it, a unit that is malformed or too complex.

    Raises _UnitProblem("syntax", why).  Bounded work: linear in the length,
    which is itself capped at :data:`MAX_UNIT_CHARS`.
    """
    if len(unit) > MAX_UNIT_CHARS:
        raise _UnitProblem("syntax", f"longer than {MAX_UNIT_CHARS} characters")
    depth = 0
    for ch in unit:
        if ch in "([":
            depth += 1
        elif ch in ")]":
            depth -= 1
            if depth < 0:
                break
    if depth != 0:
        raise _UnitProblem("syntax", 'unbalanced "(" and ")"')
    if re.search(r"\d{%d,}" % (MAX_UNIT_DIGITS + 1), unit):
        raise _UnitProblem("syntax", f"a number of more than {MAX_UNIT_DIGITS} digits")
    for m in _EXPONENT_RE.finditer(unit):
        paren, _sign, digits = m.groups()
        try:
            value = float(digits)
        except ValueError:
            value = math.inf
        if paren or value > MAX_UNIT_EXPONENT:
            raise _UnitProblem("syntax", f"an exponent other than a plain number up to "
                                         f"{MAX_UNIT_EXPONENT}")
    if re.search(r"(?:\^|\*\*)\s*[+-]?[0-9.]+\s*(?:\^|\*\*)", unit):
        raise _UnitProblem("syntax", "a repeated exponent")


@lru_cache(maxsize=512)
def _resolve_unit(unit: str, role: str) -> tuple[str, float, str, bool]:
    """Parse a unit for a quantity.

    Returns (pint spelling, scale factor to SI, mode, reinterpreted) with mode
    "scale" (multiply by the factor), "offset" (convert with pint, e.g. degC)
    or "relative" (a dimensionless uncertainty: multiply by factor * kappa).
    Raises _UnitProblem.
    """
    common = _COMMON_UNITS.get((role, unit.strip()))
    if common is not None:
        return unit.strip(), common, "scale", False
    _check_unit_text(unit)
    ureg = _ureg()
    first_problem: _UnitProblem | None = None
    for spelling, reinterpreted in _unit_candidates(unit, role):
        try:
            if not spelling.strip():
                raise _UnitProblem("unknown")
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                q = ureg.parse_expression(spelling)
            if not hasattr(q, "dimensionality"):
                q = ureg.Quantity(q, "dimensionless")
        except _UnitProblem as exc:
            first_problem = first_problem or exc
            continue
        except Exception as exc:  # pint raises many kinds (undefined, syntax, offset calculus)
            kind = "offset" if type(exc).__name__ == "OffsetUnitCalculusError" else "unknown"
            first_problem = first_problem or _UnitProblem(kind)
            continue
        dims = q.dimensionality
        if role in ("kappa_err", "diffusivity_err") and dims == ureg.parse_expression("1").dimensionality:
            return spelling, float(q.to("dimensionless").magnitude), "relative", reinterpreted
        if dims != _target_dims(role):
            first_problem = first_problem or _UnitProblem("dimension", str(dims))
            continue
        target = _PINT_SI[role]
        zero = ureg.Quantity(0.0, q.units).to(target).magnitude
        if zero != 0.0:
            if q.magnitude != 1:
                first_problem = first_problem or _UnitProblem("offset")
                continue
            return spelling, 1.0, "offset", reinterpreted
        factor = float(ureg.Quantity(float(q.magnitude), q.units).to(target).magnitude)
        return spelling, factor, "scale", reinterpreted
    assert first_problem is not None
    raise first_problem


def _to_si(values: np.ndarray, spelling: str, factor: float, mode: str, role: str) -> np.ndarray:
    if mode == "offset":
        ureg = _ureg()
        return np.asarray(ureg.Quantity(values, spelling).to(_PINT_SI[role]).magnitude, dtype=float)
    if factor == 1.0:
        return values
    return values * factor


# --------------------------------------------------------------------------------------
# The Dataset


def _shown_unit(unit: str) -> str:
    """A unit as quoted in a message (long ones cut, so a message stays one short line)."""
    u = unit.strip()
    return u if len(u) <= MAX_UNIT_CHARS else u[:MAX_UNIT_CHARS] + "..."


def _unit_message(unit: str, role: str, exc: _UnitProblem) -> str:
    """The message for a unit that cannot be read for quantity ``role``."""
    shown = _shown_unit(unit)
    if exc.kind == "unknown":
        return f'unknown unit "{shown}"; expected a unit such as {_EXAMPLES[role]}'
    if exc.kind == "syntax":
        return (f'unit "{shown}" cannot be read ({exc.detail}); expected a unit such as '
                f"{_EXAMPLES[role]}")
    if exc.kind == "offset":
        return (f'unit "{shown}" scales an offset unit, which is ambiguous; expected a '
                f"plain unit such as {_EXAMPLES[role]}")
    return (f'unit "{shown}" is not {_WHAT[role]} (its dimension is {exc.detail}); '
            f"expected a unit such as {_EXAMPLES[role]}")
