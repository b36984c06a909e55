"""Reading tables: :func:`load_data` (a path), :func:`parse_data` (contents), :func:`load_series`."""
from __future__ import annotations

import hashlib
import os
import re
from pathlib import Path
from typing import Iterable, Mapping

import numpy as np

from ..errors import DataError, ParameterError
from . import diffusivity as _flash
from . import numbers as _numbers
from .columns import _FILE_ROLES, _KINDS, _SHORT, COLUMN_ALIASES, _norm_name
from .dataset import Dataset, _check_values, _fmt, _sort_and_merge
from .header import (
    _META_RE,
    _detect_delimiter,
    _first_data_line_has,
    _Header,
    _parse_header,
)
from .numbers import (
    _BISECT_ROWS,
    _FastFail,
    _raise_first_bad_row,
    _refuse_thousands,
    _row_lines,
    _Slow,
)
from .options import suggest
from .text import _check_size, _decode, _read_regular_file
from .units import (
    _EXAMPLES,
    _WHAT,
    DEFAULT_UNITS,
    FLASH_SI_UNITS,
    SI_UNITS,
    _resolve_unit,
    _to_si,
    _unit_message,
    _UnitProblem,
)

__all__ = ["load_data", "parse_data"]

_ALL_SI = {**SI_UNITS, **FLASH_SI_UNITS}

def _check_option(name, value, allowed):
    if value not in allowed:
        shown = ", ".join(repr(a) for a in allowed)
        raise ParameterError(f"{name} must be one of {shown}, got {value!r}")


def _resolve_columns(columns: Mapping[str, str] | None) -> dict[str, tuple[str, str | None]]:
    out: dict[str, tuple[str, str | None]] = {}
    if columns is None:
        return out
    if not isinstance(columns, Mapping):
        raise ParameterError(f"columns must be a dict of header name -> column name, got {columns!r}")
    for k, v in columns.items():
        target = COLUMN_ALIASES.get(_norm_name(str(v)))
        if target is None:
            raise ParameterError(f'columns[{k!r}]: unknown column name {v!r}; expected e.g. '
                                 '"T", "kappa", "kappa_lattice", "kappa_err", "rho", "sigma", "S"')
        out[_norm_name(str(k))] = target
    return out


def _read_table(raw: bytes, name: str, *, label, kind, delimiter, decimal, encoding, units,
                columns, ignore_columns, source: str | None, flash: dict) -> Dataset:
    _check_option("kind", kind, (None, "total", "lattice"))
    _check_option("decimal", decimal, (None, ".", ","))
    if delimiter in ("whitespace", " "):
        delimiter = " "
    _check_option("delimiter", delimiter, (None, ",", ";", "\t", " "))
    if label is not None and not isinstance(label, str):
        raise ParameterError(f"label must be a string, got {label!r}")
    if decimal == "," and delimiter == ",":
        raise ParameterError('decimal="," needs a column delimiter other than ","')
    col_map = _resolve_columns(columns)
    if isinstance(ignore_columns, str):
        ignore_columns = [ignore_columns]
    ignore = {_norm_name(str(c)) for c in ignore_columns}
    if units is not None and not isinstance(units, Mapping):
        raise ParameterError(f"units must be a dict of column name -> unit, got {units!r}")
    unit_overrides: dict[str, str] = {}
    if units:
        for k, v in units.items():
            hit = col_map.get(_norm_name(str(k))) or COLUMN_ALIASES.get(_norm_name(str(k)))
            if hit is None:
                raise ParameterError(f"units[{k!r}]: unknown column name; expected e.g. "
                                     '"T", "kappa", "rho", "sigma", "S"')
            if not isinstance(v, str):
                raise ParameterError(f"units[{k!r}] must be a unit string, got {v!r}")
            unit_overrides[hit[0]] = v

    _check_size(raw, name)
    notes: list[str] = []
    sha = hashlib.sha256(raw).hexdigest()
    if not raw.strip(b" \t\r\n\x00\xef\xbb\xbf"):
        raise DataError(f"{name}, line 1: the file is empty; expected a header row and data rows")
    text = _decode(raw, name, encoding, notes)
    if text.startswith("\ufeff"):
        text = text[1:]
    if "\r" in text:
        text = text.replace("\r\n", "\n").replace("\r", "\n")

    # ---- comments before the header, then the header
    comments: list[tuple[int, str]] = []   # (line, text)
    pos, lineno, header = 0, 0, None
    n = len(text)
    while pos <= n - 1:
        end = text.find("\n", pos)
        if end < 0:
            end = n
        line = text[pos:end]
        lineno += 1
        s = line.strip()
        pos = end + 1
        if not s:
            continue
        if s.startswith("#"):
            comments.append((lineno, s))
            continue
        header = line
        break
    if header is None:
        if not comments:
            raise DataError(f"{name}, line 1: the file is empty; expected a header row and data rows")
        raise DataError(f"{name}, line {lineno}: only comment lines, no header row; expected a "
                        "line naming the columns, e.g. \"T [K], kappa [W/(m K)]\"")
    header_line = lineno
    if "#" in header:
        cut = header.index("#")
        comments.append((header_line, header[cut:].strip()))
        header = header[:cut]
    delim = (None if delimiter == " " else delimiter) if delimiter is not None \
        else _detect_delimiter(header)
    if delimiter is None and delim == "\t" and not _first_data_line_has(text, pos, "\t"):
        delim = None   # a space-aligned table whose header happens to contain a tab
    hdr = _Header(name, header_line)
    _parse_header(header, hdr, delim, col_map, ignore)
    body = text[pos:] if pos <= n else ""
    first_line = header_line + 1

    # ---- comments among the data (line structure kept)
    if "#" in body:
        lines = body.split("\n")
        for i, t in enumerate(lines):
            j = t.find("#")
            if j >= 0:
                c = t[j:].strip()
                if t[:j].strip():
                    comments.append((first_line + i, f"{c} (line {first_line + i})"))
                else:
                    comments.append((first_line + i, c))
                lines[i] = t[:j]
        body = "\n".join(lines)
    if '"' in body:
        body = body.replace('"', "")
    if hdr.trailing_empty and delim is not None:
        body = re.sub(rf"(?m)(?:[ \t]*{re.escape(delim)})+[ \t]*$", "", body)

    # ---- metadata comments
    meta_label = meta_kind = None
    for cline, c in comments:
        m = _META_RE.fullmatch(c)
        if m:
            key, val = m.group(1).lower(), m.group(2)
            if key in ("label", "sample") and meta_label is None and val:
                meta_label = val
            elif key == "kind":
                if val.lower() not in _KINDS:
                    raise DataError(f'{name}, line {cline}: the "# kind:" comment says {val!r}; '
                                    'expected "total" or "lattice"')
                meta_kind = val.lower()

    # ---- numbers
    ncols = len(hdr.names)
    core = body.rstrip()
    gaps = bool(core) and (re.match(r"[ \t]*\n", core) is not None
                           or re.search(r"\n[ \t]*\n", core) is not None)
    if not core.strip():
        raise DataError(f"{name}, line {header_line}: header but no data rows; expected at least "
                        "one row of numbers after the header")
    data = re.sub(r"(?m)^[ \t]*\n", "", core) if gaps else core
    nrows = data.count("\n") + 1
    table = None
    comma_note = False
    row_lines: np.ndarray | None = None
    fast_data, ok = data, True
    if delim != ",":
        has_comma, has_point = "," in data, "." in data
        if has_comma and decimal is None:
            _refuse_thousands(data, hdr, delim, lambda j: int(
                (first_line + j) if not gaps else _row_lines(body, first_line)[j]))
        if decimal == ".":
            ok = not has_comma
        elif has_comma or decimal == ",":
            ok = not has_point      # mixed marks: the slow pass names the line
            if ok and has_comma:
                fast_data = data.replace(",", ".")
                comma_note = True
    if ok:
        try:
            table = _numbers._fast_numbers(fast_data, delim, ncols, nrows)
        except _FastFail:
            table = None
            if nrows > _BISECT_ROWS:
                _raise_first_bad_row(data, fast_data, hdr, delim, decimal, ncols,
                                     lambda: (first_line + np.arange(nrows)) if not gaps
                                     else _row_lines(body, first_line))
    if table is None:
        slow = _Slow(hdr, delim, decimal)
        table, row_lines = slow.parse(body, first_line)
        comma_note = slow.first_comma is not None
    if comma_note:
        notes.append("decimal commas read as decimal points")

    def lines_of() -> np.ndarray:
        nonlocal row_lines
        if row_lines is None:
            row_lines = (first_line + np.arange(nrows)) if not gaps else _row_lines(body, first_line)
        return row_lines

    # ---- units and SI conversion

    col_of = {r: i for i, r in enumerate(hdr.roles) if r is not None}
    raw_cols: dict[str, np.ndarray] = {r: table[:, i] for r, i in col_of.items()}
    si: dict[str, np.ndarray] = {}
    shown_unit: dict[str, str] = {}
    unit_record: dict[str, str] = {}
    defaulted: set[str] = set()
    relative_err: float | None = None
    relative_d_err: float | None = None
    for role in _FILE_ROLES:
        if role not in col_of:
            continue
        i = col_of[role]
        unit = hdr.units[i]
        where_h = hdr.where(i)
        if unit is not None and role in unit_overrides and unit_overrides[role].strip() != unit:
            raise DataError(f'{where_h}: the header gives unit "{unit}" but units= gives '
                            f'"{unit_overrides[role]}"; expected one of them')
        if unit is None and role in unit_overrides:
            unit = unit_overrides[role]
            where_h = f'units["{_SHORT[role]}"]'
            notes.append(f'column "{hdr.names[i]}" read in {unit} (from units=)')
        if unit is None:
            if role == "kappa_err" and hdr.units[col_of["kappa"]] is not None:
                unit = hdr.units[col_of["kappa"]] if "kappa" not in unit_overrides else \
                    unit_overrides["kappa"]
                notes.append(f'column "{hdr.names[i]}" has no unit; read in the kappa '
                             f"column's unit {unit}")
            elif role == "kappa_err" and "kappa" in unit_overrides:
                unit = unit_overrides["kappa"]
                notes.append(f'column "{hdr.names[i]}" has no unit; read in the kappa '
                             f"column's unit {unit}")
            elif role == "diffusivity_err" and unit_record.get("diffusivity"):
                unit = unit_record["diffusivity"]
                notes.append(f'column "{hdr.names[i]}" has no unit; read in the diffusivity '
                             f"column's unit {unit}")
            elif role in FLASH_SI_UNITS:
                raise DataError(
                    f"{where_h}: no unit; expected a unit such as {_EXAMPLES[role]} ({_WHAT[role]} "
                    "without its unit is ambiguous by a factor of 1000 or more), e.g. "
                    f'"{hdr.names[i]} [{_EXAMPLES[role].split(",")[0]}]" or '
                    f'{suggest("units", _EXAMPLES[role].split(",")[0], hdr.names[i])}')
            else:
                unit = DEFAULT_UNITS[role]
                defaulted.add(role)
                notes.append(f'column "{hdr.names[i]}" has no unit; read as {unit}'
                             + (" (SI)" if role != "temperature" else ""))
        try:
            spelling, factor, mode, reinterpreted = _resolve_unit(unit, role)
        except _UnitProblem as exc:
            msg = _unit_message(unit, role, exc)
            if where_h.startswith("units["):
                raise ParameterError(f"{where_h}: {msg}") from None
            raise DataError(f"{where_h}: {msg}") from None
        if reinterpreted:
            notes.append(f'unit "{unit}" of column "{hdr.names[i]}" read as {spelling}')
        unit_record[role] = unit.strip()
        shown_unit[role] = unit.strip()
        if mode == "relative" and role == "diffusivity_err":
            relative_d_err = factor
            notes.append(f'column "{hdr.names[i]}" is a relative uncertainty ({unit})')
            continue
        if mode == "relative":
            relative_err = factor
            notes.append(f'column "{hdr.names[i]}" is a relative uncertainty ({unit}); '
                         "converted to W/(m K)")
            continue
        si[role] = _to_si(raw_cols[role], spelling, factor, mode, role)

    if relative_err is not None:
        si["kappa_err"] = raw_cols["kappa_err"] * relative_err * si["kappa"]
    if relative_d_err is not None:
        si["diffusivity_err"] = raw_cols["diffusivity_err"] * relative_d_err * si["diffusivity"]

    def where(role: str, idx: int) -> str:
        return f'{name}, line {int(lines_of()[idx])}, column "{hdr.names[col_of[role]]}"'

    def show(role: str, idx: int) -> str:
        v = float(raw_cols[role][idx])
        u = shown_unit.get(role, "")
        s = f"{_fmt(v)} {u}".strip()
        si_unit = _ALL_SI[role]
        if role in si and u and u != si_unit and si[role][idx] != v:
            s += f" (= {_fmt(si[role][idx])} {si_unit})"
        if role in defaulted:
            s += " (no unit in the header, so read as " + DEFAULT_UNITS[role] + (
                '; write e.g. "T [degC]" if it is Celsius)' if role == "temperature" else ")")
        return s

    _check_values(si, where, show)
    if "seebeck" in defaulted:
        big = np.flatnonzero(np.abs(si["seebeck"]) > 1.0)
        if big.size:
            i = int(big[0])
            raise DataError(f'{where("seebeck", i)}: expected a Seebeck coefficient in V/K (no '
                            f"unit in the header), got {_fmt(si['seebeck'][i])}, far beyond any "
                            'known solid; write the unit in the header, e.g. "S [uV/K]"')
    if "sigma" in si:
        si["resistivity"] = 1.0 / si.pop("sigma")
    header_values = _flash.flash_header_values(comments, name)
    choice = None
    if "diffusivity" in si:
        d_err = si.pop("diffusivity_err", None)
        if d_err is not None:
            bad = np.flatnonzero(~(np.isfinite(d_err) & (d_err > 0)))
            if bad.size:
                j = int(bad[0])
                raise DataError(f'{where("diffusivity_err", j)}: expected a positive uncertainty, '
                                f"got {show('diffusivity_err', j)}")
        out = _flash.kappa_from_diffusivity(
            name=name, temperature=si["temperature"], diffusivity=si["diffusivity"],
            diffusivity_err=d_err, density_column=si.get("density"),
            cp_column=si.get("heat_capacity"), header=header_values, col_where=where,
            density=flash["density"], heat_capacity=flash["heat_capacity"],
            material=flash["material"], diffusivity_rel_err=flash["diffusivity_rel_err"],
            density_rel_err=flash["density_rel_err"],
            heat_capacity_rel_err=flash["heat_capacity_rel_err"])
        si.update(kappa=out["kappa"], kappa_err=out["kappa_err"], density=out["density"],
                  heat_capacity=out["heat_capacity"])
        choice = out["choice"]
        notes.extend(out["notes"])
        unit_record["kappa"] = "W/(m K) (from D rho c_p)"
    else:
        used = [k for k in ("density", "heat_capacity", "material", "diffusivity_rel_err",
                            "density_rel_err", "heat_capacity_rel_err") if flash[k] is not None]
        if used:
            raise ParameterError(f"{used[0]}= is used only for a file with a diffusivity column "
                                 f"(k = D rho c_p); {name} has a kappa column")

    def where_row(idx: int) -> str:
        return f'{name}, line {int(lines_of()[idx])}, column "{hdr.names[col_of["temperature"]]}"'

    si = _sort_and_merge(si, where_row, notes, file_mode=True)

    # ---- kind and label
    from_name = hdr.kind_from_name
    if from_name is not None and kind is not None and kind != from_name:
        raise DataError(f'{hdr.where(col_of["kappa"])}: the column name says {from_name} but '
                        f'kind="{kind}" was given; expected them to agree')
    final_kind = from_name or kind or meta_kind or "total"
    if kind is None and from_name is None and meta_kind is None:
        what = "k from column" if "diffusivity" in si else "column"
        notes.append(f'{what} "{hdr.kappa_col_name}" taken as total thermal conductivity '
                     f'({suggest("kind", "lattice")} if the electronic part is already removed)')
    por = _flash.porosity_step(name=name, kappa=si["kappa"], kappa_err=si.get("kappa_err"),
                               relative_density=flash["relative_density"],
                               relation=flash["porosity_correction"], header=header_values)
    notes.extend(por["notes"])
    if por["relation"] is not None and si.get("resistivity") is not None:
        # insulating pores obstruct charge as they obstruct heat: the same relation holds
        si["resistivity"] = si["resistivity"] * (si["kappa"] / por["kappa"])
        notes.append(f"resistivity corrected to full density by the same {por['relation']} "
                     "factor (insulating pores obstruct electrical conduction alike)")
    final_label = label if label is not None else (meta_label or Path(name).stem)
    all_notes = tuple(c for _, c in comments) + tuple(notes)
    return Dataset(temperature=si["temperature"], kappa=por["kappa"],
                   kappa_err=por["kappa_err"], kind=final_kind,
                   resistivity=si.get("resistivity"), seebeck=si.get("seebeck"),
                   label=final_label, source=source, sha256=sha, notes=all_notes,
                   units=unit_record, diffusivity=si.get("diffusivity"),
                   density=si.get("density"), heat_capacity=si.get("heat_capacity"),
                   heat_capacity_choice=choice, relative_density=por["relative_density"],
                   porosity_correction=por["relation"])


def load_data(source, *, label: str | None = None, kind: str | None = None,
              delimiter: str | None = None, decimal: str | None = None,
              encoding: str | None = None, units: Mapping[str, str] | None = None,
              columns: Mapping[str, str] | None = None,
              ignore_columns: Iterable[str] = (), density=None, heat_capacity=None,
              material: str | None = None, relative_density=None,
              porosity_correction: str | None = None, diffusivity_rel_err: float | None = None,
              density_rel_err: float | None = None,
              heat_capacity_rel_err: float | None = None) -> Dataset:
    """Read a measured thermal-conductivity table into a :class:`Dataset` (SI units).

    Parameters
    ----------
    source : str or os.PathLike
        Path of a CSV, TSV or whitespace-separated text file with a header row
        (see the module docstring for column names, units and defaults).
    label : str, optional
        Sample name; default the file's ``# label:`` comment, else the file name
        without extension.
    kind : {"total", "lattice"}, optional
        What a plain ``kappa`` column holds; default the ``# kind:`` comment, else
        "total".  Must agree with a column named ``kappa_total``/``kappa_lattice``.
    delimiter : {",", ";", "\\t", " "}, optional
        Column separator (``" "`` or "whitespace": runs of spaces/tabs); default
        detected from the header row.
    decimal : {".", ","}, optional
        Decimal mark; default: a decimal comma is accepted when the delimiter is
        not a comma and the file has no decimal points.
    encoding : str, optional
        Text encoding; default UTF-8, falling back to Windows-1252 with a note.
    units : dict, optional
        Units for columns whose header gives none, e.g. ``{"rho": "uOhm cm"}``.
    columns : dict, optional
        Extra column names, e.g. ``{"k_meas": "kappa", "Tsample": "T"}``.
    ignore_columns : iterable of str
        Header names of columns to skip (e.g. ``["time", "field"]``).
    density : str, float or pint Quantity, optional
        Density rho for k = D rho c_p of a diffusivity file: text with a unit
        ("5.2 g/cm^3"), a quantity, or a number in kg/m^3.
    heat_capacity : str, float or pint Quantity, optional
        c_p for a diffusivity file: a value ("0.5 J/(g K)", a quantity, a number
        in J/(kg K)) or a model, "dulong-petit" or "debye" (needs ``material``).
    material : str, optional
        Preset name (or formula for Dulong-Petit) for a model heat capacity and
        for the note comparing the heat-capacity choices.
    relative_density : float or str, optional
        Sample density / full density in (0, 1] ("92 %" works).
    porosity_correction : str, optional
        Effective-medium relation correcting k to full density, one of
        :data:`kinetic.porosity.RELATIONS`; None keeps k of the sample.
    diffusivity_rel_err, density_rel_err, heat_capacity_rel_err : float, optional
        Relative standard errors of D, rho, c_p (defaults:
        :data:`kinetic.data.diffusivity.DEFAULT_RELATIVE_ERRORS`).

    The module :mod:`kinetic.data.diffusivity` describes diffusivity files;
    :mod:`kinetic.data.options` lists the command-line and workbench names of
    every option.

    Returns
    -------
    Dataset
        Sorted by temperature, in K, W/(m K), Ohm m and V/K.

    Raises
    ------
    DataError
        The file is missing, unreadable or malformed; one line naming the file,
        line and column and what was expected.
    ParameterError
        An option is invalid.
    """
    if isinstance(source, (bytes, bytearray)) or not isinstance(source, (str, os.PathLike)):
        raise ParameterError(f"source must be a path (str or pathlib.Path), got "
                             f"{type(source).__name__} (use parse_data for file contents)")
    path = Path(source)
    name = os.fspath(source)
    raw = _read_regular_file(path, name)
    return _read_table(raw, name, label=label, kind=kind, delimiter=delimiter, decimal=decimal,
                       encoding=encoding, units=units, columns=columns,
                       ignore_columns=ignore_columns, source=str(path),
                       flash=dict(density=density, heat_capacity=heat_capacity, material=material,
                                  relative_density=relative_density,
                                  porosity_correction=porosity_correction,
                                  diffusivity_rel_err=diffusivity_rel_err,
                                  density_rel_err=density_rel_err,
                                  heat_capacity_rel_err=heat_capacity_rel_err))


def parse_data(content: bytes | str, *, name: str = "data", label: str | None = None,
               kind: str | None = None, delimiter: str | None = None,
               decimal: str | None = None, encoding: str | None = None,
               units: Mapping[str, str] | None = None, columns: Mapping[str, str] | None = None,
               ignore_columns: Iterable[str] = (), density=None, heat_capacity=None,
               material: str | None = None, relative_density=None,
               porosity_correction: str | None = None, diffusivity_rel_err: float | None = None,
               density_rel_err: float | None = None,
               heat_capacity_rel_err: float | None = None) -> Dataset:
    """Read a table from its contents (e.g. an uploaded file) instead of a path.

    Parameters are those of :func:`load_data`; ``name`` (e.g. the uploaded file's
    name) appears in error messages and is the default label.  ``source`` of the
    result is None; ``sha256`` is that of the bytes (str content is encoded as
    UTF-8 first).

    Raises
    ------
    DataError, ParameterError
        As :func:`load_data`.
    """
    if isinstance(content, str):
        raw = content.encode("utf-8")
    elif isinstance(content, (bytes, bytearray, memoryview)):
        raw = bytes(content)
    else:
        raise ParameterError(f"content must be bytes or str, got {type(content).__name__}")
    if not isinstance(name, str):
        raise ParameterError(f"name must be a string, got {name!r}")
    return _read_table(raw, name, label=label, kind=kind, delimiter=delimiter, decimal=decimal,
                       encoding=encoding, units=units, columns=columns,
                       ignore_columns=ignore_columns, source=None,
                       flash=dict(density=density, heat_capacity=heat_capacity, material=material,
                                  relative_density=relative_density,
                                  porosity_correction=porosity_correction,
                                  diffusivity_rel_err=diffusivity_rel_err,
                                  density_rel_err=density_rel_err,
                                  heat_capacity_rel_err=heat_capacity_rel_err))
