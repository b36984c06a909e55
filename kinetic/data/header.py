"""The header row: delimiter detection, column names and units, roles of the columns."""
from __future__ import annotations

import csv
import re
from typing import Any, Callable, Mapping

from ..errors import DataError
from .columns import _SHORT, COLUMN_ALIASES, _norm_name
from .options import suggest

_NUM_RE = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?")
_NONFINITE_RE = re.compile(r"[+-]?(?:nan|inf|infinity)(?:\(.*\))?", re.IGNORECASE)
_META_RE = re.compile(r"#\s*(label|sample|kind)\s*[:=]\s*(.*?)\s*$", re.IGNORECASE)
_DELIMS = {",": "commas", ";": "semicolons", "\t": "tabs", None: "spaces"}


class _Header:
    """What the header row says: column names, units, roles."""

    def __init__(self, name: str, lineno: int):
        self.file = name
        self.lineno = lineno
        self.names: list[str] = []       # column names as written (no unit)
        self.units: list[str | None] = []
        self.roles: list[str | None] = []  # None: ignored column
        self.kind_from_name: str | None = None
        self.kappa_col_name = ""
        self.trailing_empty = 0

    def where(self, col: int | None = None) -> str:
        s = f"{self.file}, line {self.lineno}"
        if col is not None:
            s += f', column "{self.names[col]}"'
        return s


def _split_header(line: str, delim: str | None) -> list[str]:
    if '"' in line and delim is not None:
        fields = next(csv.reader([line], delimiter=delim, skipinitialspace=True))
        return [f.strip() for f in fields]
    fields, cur, depth = [], "", 0
    for ch in line:
        if ch in "[(":
            depth += 1
        elif ch in "])":
            depth = max(0, depth - 1)
        sep = ch.isspace() if delim is None else ch == delim
        if sep and depth == 0:
            if delim is not None or cur:
                fields.append(cur.strip())
            cur = ""
        else:
            cur += ch
    if delim is not None or cur:
        fields.append(cur.strip())
    fields = [f.strip('"').strip() for f in fields]
    if delim is None:
        merged: list[str] = []
        for f in fields:
            if merged and f[:1] in "[(" :
                merged[-1] = merged[-1] + " " + f
            else:
                merged.append(f)
        fields = merged
    return fields


def _detect_delimiter(header: str) -> str | None:
    if "\t" in header:
        return "\t"
    if ";" in header:
        return ";"
    depth = 0
    for ch in header:
        if ch in "[(":
            depth += 1
        elif ch in "])":
            depth = max(0, depth - 1)
        elif ch == "," and depth == 0:
            return ","
    return None


def _name_and_unit(fieldtext: str, lookup: Callable[[str], Any]) -> tuple[str, str | None]:
    """Split a header field into (name, unit); unit None when none is written.

    Forms: ``kappa [W/(m K)]``, ``kappa (W m-1 K-1)``, ``kappa / (W/m/K)``,
    ``kappa/(W/(m K))``, ``T/K``.  A name followed by "/" and nothing else
    (``kappa/``) raises ValueError: the unit it announces is missing.
    """
    f = fieldtext.strip()
    if f.count("[") != f.count("]"):
        raise ValueError('unbalanced "[" and "]" around the unit')
    m = re.fullmatch(r"(.*?)\s*\[(.*)\]", f)
    if m:
        return _strip_slash(m.group(1)), m.group(2).strip()
    if f.count("(") != f.count(")"):
        raise ValueError('unbalanced "(" and ")" around the unit')
    m = re.fullmatch(r"(.*?)\s*\((.*)\)", f)
    if m and _strip_slash(m.group(1)):
        name, inner = _strip_slash(m.group(1)), m.group(2).strip()
        if lookup(name + "_" + inner) is not None:   # "kappa (lattice)" is a name
            return f, None
        return name, inner
    if "/" in f:
        name, unit = f.split("/", 1)
        if lookup(name.strip()) is not None:
            if not unit.strip():
                raise ValueError('"/" but no unit after it')
            return name.strip(), unit.strip()
    return f, None


def _strip_slash(name: str) -> str:
    """``"kappa /"`` -> ``"kappa"`` (the quantity-over-unit form of a header)."""
    n = name.strip()
    return n[:-1].rstrip() if n.endswith("/") else n


def _first_data_line_has(text: str, pos: int, ch: str) -> bool:
    """Whether the first data line after position ``pos`` contains ``ch`` (True if none)."""
    n = len(text)
    while pos < n:
        end = text.find("\n", pos)
        if end < 0:
            end = n
        s = text[pos:end].strip()
        if s and not s.startswith("#"):
            return ch in text[pos:end]
        pos = end + 1
    return True


def _known_field(fieldtext: str, lookup) -> bool:
    try:
        return lookup(_name_and_unit(fieldtext, lookup)[0]) is not None
    except ValueError:
        return False


def _parse_header(line: str, hdr: _Header, delim: str | None, columns: Mapping[str, str],
                  ignore: set[str]) -> None:
    fields = _split_header(line, delim)
    if delim is not None:
        while len(fields) > 1 and fields[-1] == "":
            fields.pop()
            hdr.trailing_empty += 1
    if all(_NUM_RE.fullmatch(f.strip().replace(",", ".")) for f in fields if f.strip()) and any(
            f.strip() for f in fields):
        raise DataError(
            f"{hdr.file}, line {hdr.lineno}: expected a header row naming the columns "
            f"(e.g. \"T [K], kappa [W/(m K)]\"), got numbers {line.strip()[:40]!r}")

    def lookup(name: str):
        key = _norm_name(name)
        if key in columns:
            return columns[key]
        return COLUMN_ALIASES.get(key)

    seen: dict[str, int] = {}
    for i, f in enumerate(fields):
        hdr.names.append(f)
        hdr.units.append(None)
        hdr.roles.append(None)
        if not f:
            raise DataError(f"{hdr.file}, line {hdr.lineno}, column {i + 1}: the column has no "
                            "name; expected a name such as T or kappa")
        try:
            name, unit = _name_and_unit(f, lookup)
        except ValueError as exc:
            hdr.names[i] = f
            if str(exc).startswith('"/"'):
                raise DataError(f'{hdr.where(i)}: {exc}; expected a unit, e.g. "kappa / (W/m/K)", '
                                "or the name alone to use the default unit of the format guide "
                                "(W/(m K) for kappa, K for T)") from None
            raise DataError(f'{hdr.where(i)}: {exc}; expected e.g. "kappa [W/(m K)]"') from None
        hdr.names[i] = name or f
        if unit is not None and unit.strip() == "":
            unit = None
        hdr.units[i] = unit
        if not name:
            raise DataError(f'{hdr.file}, line {hdr.lineno}, column {i + 1}: the column "{f}" has '
                            "a unit but no name; expected a name such as T or kappa")
        if _norm_name(name) in ignore:
            continue
        hit = lookup(name)
        if hit is None:
            hint = ("" if any(_known_field(g, lookup) for g in fields) else
                    "; lines before the header must start with '#'")
            raise DataError(
                f'{hdr.where(i)}: unknown column; expected one of T, kappa, kappa_lattice, '
                f'kappa_err, rho, sigma, S, diffusivity, density, cp (or an alias), or skip it '
                f'with {suggest("ignore_columns", name)}{hint}')
        role, kind = hit
        if role == "kappa":
            hdr.kind_from_name = kind
            hdr.kappa_col_name = name
        if role == "diffusivity":
            hdr.kappa_col_name = name
        if role in seen or (role in ("resistivity", "sigma")
                            and ({"resistivity", "sigma"} & set(seen))):
            other = seen.get(role)
            if other is None:
                other = seen["sigma" if role == "resistivity" else "resistivity"]
            what = {"resistivity": "electrical", "sigma": "electrical"}.get(role, _SHORT[role])
            raise DataError(
                f'{hdr.where(i)}: a second {what} column (column "{hdr.names[other]}" already '
                f'is one); expected each quantity once (skip one with '
                f'{suggest("ignore_columns", hdr.names[i])})')
        seen[role] = i
        hdr.roles[i] = role
    if "diffusivity" in seen:
        for other in ("kappa", "kappa_err"):
            if other in seen:
                i = seen[other]
                raise DataError(
                    f'{hdr.where(i)}: a {_SHORT[other]} column beside the diffusivity column '
                    f'"{hdr.names[seen["diffusivity"]]}"; expected k from D rho c_p or measured k, '
                    f'not both (skip one with {suggest("ignore_columns", hdr.names[i])})')
    else:
        for flash in ("diffusivity_err", "density", "heat_capacity"):
            if flash in seen:
                i = seen[flash]
                raise DataError(
                    f'{hdr.where(i)}: a {_SHORT[flash]} column is used only with a diffusivity '
                    f'column (k = D rho c_p); expected a "diffusivity" column, or skip this one '
                    f'with {suggest("ignore_columns", hdr.names[i])}')
        if "temperature" in seen and "kappa" not in seen:
            raise DataError(f'{hdr.file}, line {hdr.lineno}, column "kappa": missing; expected '
                            "a column named kappa, kappa_total or kappa_lattice (or a "
                            '"diffusivity" column with density and heat capacity)')
    for need in ("temperature",):
        if need not in seen:
            label = "temperature" if need == "temperature" else "kappa"
            expected = "T, temp or temperature" if need == "temperature" else \
                "kappa, kappa_total or kappa_lattice"
            raise DataError(f'{hdr.file}, line {hdr.lineno}, column "{label}": missing; expected '
                            f'a column named {expected}')
