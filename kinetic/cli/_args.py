"""Reading command-line values: number lists, numbers with units, NAME=VALUE, input paths.

Only the standard library is imported at the top: ``kinetic --help`` must not
pay for numpy (0.2-0.3 s on the project's 2-core machine, measured with
``python -X importtime``) or pint. numpy and pint are imported inside the
functions that need them, for that measured reason.
"""
from __future__ import annotations

import glob
import os
import re
import stat

from ..errors import ParameterError

#: Most values one number list (``--temperatures``, ``--lengths``...) may ask for:
#: 1e5 temperatures of one model take a few seconds and ~100 MB of work arrays;
#: more is almost surely a typo (common practice for a guard, not a physical limit).
MAX_POINTS = 100_000

#: Longest unit text read from an option; a longer or exponent-heavy one is refused
#: before pint sees it (pint can take minutes on units such as ``m^99999999``).
MAX_UNIT_CHARS = 40

#: File name endings read as data tables when a folder is given.
TABLE_SUFFIXES = (".csv", ".tsv", ".txt", ".dat")

_NUMBER_UNIT = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(\S.*?)\s*$")
_UREG = None


def _unit_registry():
    """pint's registry, made on first use (about 0.3 s; only commands given units pay it)."""
    global _UREG
    if _UREG is None:
        import pint  # lazy: pint loads only when an option carries a unit

        _UREG = pint.UnitRegistry()
    return _UREG


def number(text, name: str, *, unit: str | None = None) -> float:
    """One number from an option. With ``unit`` (SI), a value such as ``2um`` is converted.

    Without ``unit``, text with a unit is refused (never read as a bare number).

    >>> number("2um", "--grain-size", unit="m")
    2e-06
    >>> number("26.85 degC", "--temperatures", unit="K")
    300.0
    >>> number("5", "--starts")
    5.0
    """
    s = str(text).strip()
    try:
        return float(s)
    except ValueError:
        pass
    m = _NUMBER_UNIT.match(s)
    if m is None:
        raise ParameterError(f"{name}: cannot read {s!r}; expected a number" + (f" (with a unit, e.g. 2{unit})"
                                                                               if unit else ""))
    if not unit:
        raise ParameterError(f"{name}: {s!r} carries a unit; this option takes a plain number")
    value, utext = float(m.group(1)), m.group(2)
    if len(utext) > MAX_UNIT_CHARS or re.search(r"\d{4,}", utext):
        raise ParameterError(f"{name}: unit {utext!r} is too long or complex (at most {MAX_UNIT_CHARS} characters, "
                             f"exponents below 1000)")
    ureg = _unit_registry()
    try:
        q = ureg.Quantity(value, utext)
        return float(q.to(unit).magnitude)
    except Exception as exc:  # noqa: BLE001 - pint: UndefinedUnitError, DimensionalityError, syntax errors
        kind = type(exc).__name__
        why = "not convertible to " + unit if kind == "DimensionalityError" else "not a unit pint can read"
        raise ParameterError(f"{name}: cannot read {s!r}: {utext!r} is {why}") from None


def parse_numbers(tokens, name: str, *, unit: str | None = None, limit: int = MAX_POINTS):
    """Numbers from command-line tokens: plain numbers, ``a:b:n`` or ``a:b:n:log``.

    With ``unit`` (the option's SI unit), each number may carry a unit
    (``100nm:10um:3:log``). At most ``limit`` values in all.

    Raises
    ------
    ParameterError
        A token that is none of these (naming the option and the token), or
        a list longer than ``limit``.

    >>> parse_numbers(["1", "2:4:3", "1:100:3:log"], "x").tolist()
    [1.0, 2.0, 3.0, 4.0, 1.0, 10.0, 100.0]
    """
    import numpy as np  # lazy: see the module docstring

    out = []
    count = 0
    for tok in tokens:
        parts = str(tok).split(":")
        if len(parts) == 1:
            out.append(np.array([number(parts[0], name, unit=unit)]))
            count += 1
        elif len(parts) in (3, 4):
            if len(parts) == 4 and parts[3].strip() != "log":
                raise ParameterError(f"{name}: cannot read {tok!r}; expected a number, a:b:n or a:b:n:log")
            try:
                n = int(parts[2])
            except ValueError:
                raise ParameterError(f"{name}: cannot read {tok!r}; n in a:b:n must be a whole number, "
                                     f"got {parts[2]!r}") from None
            if n < 1:
                raise ParameterError(f"{name}: cannot read {tok!r}; n in a:b:n must be >= 1, got {n}")
            if count + n > limit:
                raise ParameterError(f"{name}: {tok!r} asks for {n} values; at most {limit} in one list")
            a, b = number(parts[0], name, unit=unit), number(parts[1], name, unit=unit)
            if len(parts) == 4:
                if not (a > 0 and b > 0):
                    raise ParameterError(f"{name}: cannot read {tok!r}; a:b:n:log needs a > 0 and b > 0")
                out.append(np.geomspace(a, b, n))
            else:
                out.append(np.linspace(a, b, n))
            count += n
        else:
            raise ParameterError(f"{name}: cannot read {tok!r}; expected a number, a:b:n or a:b:n:log")
        if count > limit:
            raise ParameterError(f"{name}: more than {limit} values; at most {limit} in one list")
    return np.concatenate(out) if out else np.zeros(0)


def assignments(items, name: str, form: str = "NAME=VALUE") -> dict:
    """``NAME=VALUE`` options as a dict of strings (``form`` names the shape in errors)."""
    out = {}
    for it in items or []:
        k, eq, v = str(it).partition("=")
        if not eq or not k.strip():
            raise ParameterError(f"{name}: expected {form}, got {it!r}")
        out[k.strip()] = v.strip()
    return out


def regular_file(path: str, what: str = "data file") -> str:
    """``path`` if it names a regular file; otherwise one clear error, at once.

    A FIFO or a device would block or stream forever; a folder is not a table.
    """
    try:
        st = os.stat(path)
    except FileNotFoundError:
        raise ParameterError(f"{path}: no such file; expected a {what}") from None
    except OSError as exc:
        raise ParameterError(f"{path}: cannot open ({exc.strerror or exc})") from None
    if stat.S_ISDIR(st.st_mode):
        raise ParameterError(f"{path}: is a folder; expected a {what}")
    if not stat.S_ISREG(st.st_mode):
        kind = "a FIFO" if stat.S_ISFIFO(st.st_mode) else "a device or socket"
        raise ParameterError(f"{path}: not a regular file ({kind}); expected a {what}")
    return path


def is_pattern(text: str) -> bool:
    return any(c in text for c in "*?[")


def expand_inputs(items) -> list:
    """Files from FILE arguments: files as given, folders as their tables, globs expanded.

    Order: as given; a folder's or a glob's files sorted by name. A glob that
    matches nothing stays as given (its fit then reports that no file matches).
    """
    out = []
    for it in items:
        s = str(it)
        if is_pattern(s) and not os.path.exists(s):
            hits = sorted(glob.glob(s))
            out.extend(hits if hits else [s])
        elif os.path.isdir(s):
            out.extend(sorted(os.path.join(s, f) for f in os.listdir(s)
                              if f.lower().endswith(TABLE_SUFFIXES) and os.path.isfile(os.path.join(s, f))))
        else:
            out.append(s)
    return out


# Python keyword hints in engine messages -> the CLI option that gives the same thing.
OPTION_OF = {"ignore_columns": "--ignore-column", "decimal": "--decimal", "delimiter": "--delimiter",
              "encoding": "--encoding", "units": "--unit", "columns": "--column", "kind": "--kind",
              "density": "--density", "heat_capacity": "--heat-capacity", "relative_density": "--relative-density",
              "porosity_correction": "--porosity-correction"}
# a hint standing alone in the sentence; not an argument inside a Python call such as f(x, kind="...")
_HINT = re.compile(r"(?<![(,\w])(?<!, )(" + "|".join(OPTION_OF) + r")=(\[\s*)?(?:([\"'])(.*?)\3)?(\s*\])?")


def cli_words(message: str) -> str:
    """Rewrite Python keyword hints (``ignore_columns=["x"]``) as the CLI's options (``--ignore-column x``).

    >>> cli_words('pass ignore_columns=["time"] to skip it')
    'pass --ignore-column time to skip it'
    >>> cli_words('pass decimal=","')
    'pass --decimal ,'
    >>> cli_words("use load_data(path, kind='lattice')")
    "use load_data(path, kind='lattice')"
    """
    def repl(m):
        opt = OPTION_OF[m.group(1)]
        return f"{opt} {m.group(4)}" if m.group(4) is not None else opt

    return _HINT.sub(repl, message)
