"""Bytes to text: encodings, byte-order marks and binary files."""
from __future__ import annotations

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
