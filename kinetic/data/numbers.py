"""The numbers of a table: one vectorised pass, and a line-by-line pass that names the first problem."""
from __future__ import annotations

import math
import re
import warnings
from typing import Callable

import numpy as np

from ..errors import DataError
from .header import _DELIMS, _NONFINITE_RE, _NUM_RE, _Header
from .options import suggest


class _FastFail(Exception):
    pass


def _fast_numbers(data: str, delim: str | None, ncols: int, nrows: int) -> np.ndarray:
    """Parse ``nrows`` lines of ``ncols`` numbers in one vectorised pass or raise _FastFail.

    ``data`` has no blank lines, no comments and no trailing newline.  The row
    structure is checked on the bytes with numpy (no Python loop over rows); the
    numbers are converted by numpy's C parser.  Any doubt raises _FastFail and
    the caller runs the exact line-by-line pass instead.
    """
    try:
        b = data.encode("ascii")
    except UnicodeEncodeError:
        raise _FastFail from None
    arr = np.frombuffer(b, dtype=np.uint8)
    if arr.size == 0:
        raise _FastFail
    if delim is None:
        # fields are runs of non-blank bytes; each line must hold exactly ncols of them
        if np.count_nonzero(arr < 32) != b.count(b"\t") + (nrows - 1):
            raise _FastFail                   # a control byte other than tab/newline
        sep = arr <= 32                       # space, tab, newline
        start = ~sep
        start[1:] &= sep[:-1]
        spos = np.flatnonzero(start)
        del start, sep
        if spos.size != nrows * ncols:
            raise _FastFail
        line_of = np.searchsorted(np.flatnonzero(arr == 10), spos)
        if not np.array_equal(np.bincount(line_of, minlength=nrows), np.full(nrows, ncols)):
            raise _FastFail
    else:
        # Without blanks, no delimiter may touch another, a newline or an end (no empty
        # field), and every line must hold ncols-1 delimiters.
        d = delim.encode()
        sq = b.translate(None, b" " if delim == "\t" else b" \t")
        if (d + d in sq or d + b"\n" in sq or b"\n" + d in sq or sq.startswith(d)
                or sq.endswith(d)):
            raise _FastFail                   # an empty field
        if sq.count(d) != nrows * (ncols - 1):
            raise _FastFail
        if nrows > 1 and ncols > 1:
            nb = np.frombuffer(sq, dtype=np.uint8)
            per_line = np.searchsorted(np.flatnonzero(nb == ord(delim)), np.flatnonzero(nb == 10))
            del nb
            if not np.array_equal(per_line, (ncols - 1) * np.arange(1, nrows)):
                raise _FastFail               # wrong number of fields on some line
        del sq
        b = b.translate(bytes.maketrans(d, b" "))
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error")
            values = np.fromstring(b, dtype=float, sep=" ")
    except (ValueError, DeprecationWarning):
        raise _FastFail from None
    # every field is non-empty, so one value per field means no field held two numbers
    # (a field such as "1 2" gives two values and fails this test)
    if values.size != nrows * ncols or not np.all(np.isfinite(values)):
        raise _FastFail
    return values.reshape(nrows, ncols)


class _Slow:
    """Line-by-line parse naming the first problem (also the reference semantics)."""

    def __init__(self, hdr: _Header, delim: str | None, decimal: str | None):
        self.hdr = hdr
        self.delim = delim
        self.decimal = decimal
        self.first_comma: tuple[int, str] | None = None
        self.first_point: tuple[int, str] | None = None

    def where(self, line: int, col: int | None) -> str:
        s = f"{self.hdr.file}, line {line}"
        if col is not None:
            s += f', column "{self.hdr.names[col]}"'
        return s

    def number(self, tok: str, line: int, col: int) -> float:
        t = tok.strip()
        if t == "":
            raise DataError(f"{self.where(line, col)}: expected a number, got an empty field")
        if "," in t:
            if self.decimal == ".":
                raise DataError(f"{self.where(line, col)}: decimal comma in {t!r}; use a decimal "
                                f'point (or read commas as decimal marks: {suggest("decimal", ",")})')
            if self.decimal is None and self.first_point is not None:
                raise DataError(
                    f"{self.where(line, col)}: decimal comma in {t!r} but line "
                    f"{self.first_point[0]} uses a decimal point ({self.first_point[1]!r}); "
                    "use one decimal mark throughout")
            if self.first_comma is None and _NUM_RE.fullmatch(t.replace(",", ".")):
                self.first_comma = (line, t)
            t2 = t.replace(",", ".")
        else:
            t2 = t
        if "." in t:
            if self.decimal == ",":
                raise DataError(f'{self.where(line, col)}: decimal point in {t!r} but decimal=","'
                                " was given; use one decimal mark throughout")
            if self.decimal is None and self.first_comma is not None and "," not in t:
                raise DataError(
                    f"{self.where(line, col)}: decimal point in {t!r} but line "
                    f"{self.first_comma[0]} uses a decimal comma ({self.first_comma[1]!r}); "
                    "use one decimal mark throughout")
            if self.first_point is None and "," not in t:
                self.first_point = (line, t)
        if not _NUM_RE.fullmatch(t2):
            if _NONFINITE_RE.fullmatch(t2):
                raise DataError(f"{self.where(line, col)}: expected a finite number, got {t!r}")
            raise DataError(f"{self.where(line, col)}: expected a number, got {t!r}")
        v = float(t2)
        if not math.isfinite(v):
            raise DataError(f"{self.where(line, col)}: expected a finite number, got {t!r} "
                            "(too large for a float)")
        return v

    def parse(self, body: str, first_line: int) -> tuple[np.ndarray, np.ndarray]:
        ncols = len(self.hdr.names)
        rows: list[list[float]] = []
        lines_used: list[int] = []
        desc = _DELIMS[self.delim]
        for i, text in enumerate(body.split("\n")):
            if not text.strip():
                continue
            line = first_line + i
            fields = text.split() if self.delim is None else text.split(self.delim)
            if len(fields) < ncols:
                missing = self.hdr.names[len(fields)]
                raise DataError(
                    f'{self.where(line, None)}, column "{missing}": missing; expected {ncols} '
                    f"fields ({', '.join(self.hdr.names)}) separated by {desc}, got {len(fields)}")
            if len(fields) > ncols:
                hint = ""
                if self.delim == "," and re.search(r"\d,\d", text):
                    hint = ('; if the file uses decimal commas, separate the columns with ";" '
                            "or tabs, or use decimal points")
                raise DataError(
                    f"{self.where(line, None)}: expected {ncols} fields "
                    f"({', '.join(self.hdr.names)}) separated by {desc}, got {len(fields)} "
                    f"(extra field {fields[ncols].strip()!r}){hint}")
            rows.append([self.number(f, line, c) for c, f in enumerate(fields)])
            lines_used.append(line)
        if not rows:
            raise DataError(f"{self.hdr.file}, line {self.hdr.lineno}: header but no data rows; "
                            "expected at least one row of numbers after the header")
        return np.array(rows, dtype=float).reshape(len(rows), ncols), np.array(lines_used)


_BISECT_ROWS = 20_000


def _raise_first_bad_row(data: str, fast_data: str, hdr: _Header, delim: str | None,
                         decimal: str | None, ncols: int, lines_of: Callable[[], np.ndarray]) -> None:
    """Find the first row the vectorised pass refuses by bisection, and let the
    line-by-line pass word the error for that row alone.

    Rows are independent here (the decimal mark is already settled for the whole
    file), so a block of rows fails the vectorised pass exactly when one of its
    rows does.  This costs about two vectorised passes instead of a Python loop
    over every row.  Returns without raising if the row turns out fine for the
    line-by-line pass (the caller then runs that pass over the whole file).
    """
    fast_rows = fast_data.split("\n")

    def fails(lo: int, hi: int) -> bool:
        try:
            _fast_numbers("\n".join(fast_rows[lo:hi]), delim, ncols, hi - lo)
        except _FastFail:
            return True
        return False

    lo, hi = 0, len(fast_rows)
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if fails(lo, mid):
            hi = mid
        else:
            lo = mid
    text = data.split("\n")[lo]
    line = int(lines_of()[lo])
    _Slow(hdr, delim, decimal).parse(text, line)


def _row_lines(body: str, first_line: int) -> np.ndarray:
    return np.array([first_line + i for i, t in enumerate(body.split("\n")) if t.strip()],
                    dtype=np.int64)


# "1,000" or "12,500,000": a thousands separator, or a decimal comma with three
# decimals; either reading is possible, so the loader refuses to guess.
_THOUSANDS_RE = re.compile(r"(?<![\d,.])[+-]?[1-9]\d{0,2}(?:,\d{3})+(?![\d,.])")


def _refuse_thousands(data: str, hdr: _Header, delim: str | None, line_of) -> None:
    """Raise DataError at the first number that may carry thousands separators."""
    m = _THOUSANDS_RE.search(data)
    if m is None:
        return
    row = data.count("\n", 0, m.start())
    start = data.rfind("\n", 0, m.start()) + 1
    prefix = data[start:m.start()]
    col = len(prefix.split()) if delim is None else prefix.count(delim)
    col = min(col, len(hdr.names) - 1)
    raise DataError(
        f'{hdr.file}, line {line_of(row)}, column "{hdr.names[col]}": {m.group(0)!r} may hold a '
        "thousands separator or a decimal comma; expected numbers without thousands "
        f'separators (or, if the commas are decimal marks, {suggest("decimal", ",")})')
