"""Bytes in: regular files only, size and line-length limits, encodings, binary files."""
from __future__ import annotations

import os
import stat
from pathlib import Path

import numpy as np

from ..errors import DataError, ParameterError


def _decode(raw: bytes, name: str, encoding: str | None, notes: list[str]) -> str:
    if raw[:3] == b"\xef\xbb\xbf":
        body = raw[3:]
    elif raw[:2] in (b"\xff\xfe", b"\xfe\xff"):
        try:
            return raw.decode("utf-16")
        except UnicodeDecodeError as exc:
            raise DataError(f"{name}, line 1: not valid UTF-16 text although it starts with a "
                            f"UTF-16 byte-order mark ({exc.reason}); expected a text table") from None
    else:
        body = raw
    nul = body.find(b"\x00")
    if nul >= 0:
        line = body.count(b"\n", 0, nul) + 1
        if body[:4] == b"PK\x03\x04":
            what = "a zipped file such as an Excel .xlsx workbook"
        elif body[:4] == b"\xd0\xcf\x11\xe0":
            what = "an Excel .xls workbook"
        else:
            what = "a binary file"
        raise DataError(f"{name}, line {line}: this looks like {what} (it contains NUL bytes); "
                        "expected a text table: export it as CSV")
    if encoding is not None:
        try:
            return body.decode(encoding)
        except UnicodeDecodeError as exc:
            line = body.count(b"\n", 0, exc.start) + 1
            raise DataError(f"{name}, line {line}: byte {body[exc.start]:#04x} is not valid "
                            f"{encoding}; expected text in {encoding} (or leave encoding=None)") from None
        except LookupError:
            raise ParameterError(f"encoding: unknown text encoding {encoding!r}") from None
    try:
        return body.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = body.count(b"\n", 0, exc.start) + 1
        try:
            text, used = body.decode("cp1252"), "Windows-1252"
        except UnicodeDecodeError:
            text, used = body.decode("latin-1"), "Latin-1"
        notes.append(f"file is not UTF-8 (byte {body[exc.start]:#04x} on line {line}); "
                     f"read as {used} text")
        return text


#: Largest data file read [bytes].  A measured table is a few kB; a million
#: rows of four columns is about 18 MB.  The limit keeps every read bounded
#: (the vectorised pass reads a clean 7 MB table in about a second on a shared
#: two-core machine; a pathological input is refused by a limit before parsing).
MAX_FILE_BYTES = 32_000_000
#: Longest line read [bytes]; a header of a few hundred columns fits easily.
MAX_LINE_BYTES = 10_000


def _read_regular_file(path: Path, name: str) -> bytes:
    """The bytes of a regular file, refusing anything else at once (before opening)."""
    try:
        st = os.stat(path)
    except FileNotFoundError:
        raise DataError(f"{name}: no such file; expected the path of a data table") from None
    except PermissionError:
        raise DataError(f"{name}: permission denied; expected a readable data file") from None
    except OSError as exc:
        raise DataError(f"{name}: cannot be read ({exc.strerror or exc}); expected a readable "
                        "data file") from None
    if stat.S_ISDIR(st.st_mode):
        raise DataError(f"{name}: is a folder; expected the path of a data file "
                        "(load_series reads every table in a folder)")
    if not stat.S_ISREG(st.st_mode):
        what = ("a named pipe (FIFO)" if stat.S_ISFIFO(st.st_mode) else
                "a device" if stat.S_ISCHR(st.st_mode) or stat.S_ISBLK(st.st_mode) else
                "a socket" if stat.S_ISSOCK(st.st_mode) else "not a regular file")
        raise DataError(f"{name}: is {what}; expected a regular data file")
    if st.st_size > MAX_FILE_BYTES:
        raise DataError(f"{name}: {st.st_size} bytes is more than the {MAX_FILE_BYTES} bytes a "
                        "data table may have; expected a table of measured points (split it)")
    try:
        with open(path, "rb") as fh:
            raw = fh.read(MAX_FILE_BYTES + 1)
    except PermissionError:
        raise DataError(f"{name}: permission denied; expected a readable data file") from None
    except OSError as exc:
        raise DataError(f"{name}: cannot be read ({exc.strerror or exc}); expected a readable "
                        "data file") from None
    if len(raw) > MAX_FILE_BYTES:   # the file grew while being read
        raise DataError(f"{name}: more than the {MAX_FILE_BYTES} bytes a data table may have; "
                        "expected a table of measured points (split it)")
    return raw


def _check_size(raw: bytes, name: str) -> None:
    """Refuse contents over the size or line-length limits (bounded work: numpy on bytes)."""
    if len(raw) > MAX_FILE_BYTES:
        raise DataError(f"{name}: {len(raw)} bytes is more than the {MAX_FILE_BYTES} bytes a "
                        "data table may have; expected a table of measured points (split it)")
    if len(raw) <= MAX_LINE_BYTES:
        return
    ends = np.flatnonzero(np.frombuffer(raw, dtype=np.uint8) == 10)
    bounds = np.concatenate(([-1], ends, [len(raw)]))
    lengths = np.diff(bounds) - 1
    long = np.flatnonzero(lengths > MAX_LINE_BYTES)
    if long.size:
        i = int(long[0])
        raise DataError(f"{name}, line {i + 1}: {int(lengths[i])} bytes is longer than the "
                        f"{MAX_LINE_BYTES} bytes a line may have; expected one row of a table "
                        "per line")
