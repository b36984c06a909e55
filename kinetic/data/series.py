"""A series of samples: :func:`load_series` reads several tables, one sample each."""
from __future__ import annotations

import os
from collections.abc import Iterable
from pathlib import Path

from ..errors import DataError, ParameterError
from .dataset import Dataset
from .readers import load_data

__all__ = ["load_series"]


_SERIES_SUFFIXES = (".csv", ".tsv", ".txt", ".dat")


def load_series(sources, labels: Iterable[str] | None = None, **options) -> list[Dataset]:
    """Read several files as a series, one sample each (e.g. grain sizes, compositions).

    Parameters
    ----------
    sources : iterable of paths, or one folder
        The files, in series order.  A folder means every .csv, .tsv, .txt and .dat
        file in it, sorted by name.
    labels : iterable of str, optional
        One label per file; default each file's ``# label:`` comment, else its name.
    **options
        Passed to :func:`load_data` (kind, delimiter, decimal, encoding, units,
        columns, ignore_columns, and the diffusivity and porosity options).

    Returns
    -------
    list of Dataset

    Raises
    ------
    DataError
        A file is malformed (message as :func:`load_data`), a folder holds no
        tables, or two samples end up with the same label.
    ParameterError
        labels has the wrong length, or an option is invalid.
    """
    if "label" in options:
        raise ParameterError("load_series takes labels=[...] (one per file), not label=")
    if isinstance(sources, (str, os.PathLike)):
        folder = Path(sources)
        if not folder.is_dir():
            raise ParameterError(f"sources must be a list of paths or a folder, got the single "
                                 f"file {os.fspath(sources)!r} (use load_data, or pass [path])")
        paths = sorted(p for p in folder.iterdir()
                       if p.is_file() and p.suffix.lower() in _SERIES_SUFFIXES)
        if not paths:
            raise DataError(f"{os.fspath(sources)}: no .csv, .tsv, .txt or .dat files in this "
                            "folder; expected data tables")
    else:
        try:
            paths = list(sources)
        except TypeError:
            raise ParameterError(f"sources must be a list of paths, got {sources!r}") from None
    if not paths:
        raise ParameterError("sources must name at least one file, got an empty list")
    if labels is not None:
        if isinstance(labels, str):
            raise ParameterError("labels must be a list of strings (one per file), got a string")
        labels = list(labels)
        if len(labels) != len(paths):
            raise ParameterError(f"labels must have one entry per file: {len(paths)} files, "
                                 f"{len(labels)} labels")
    out: list[Dataset] = []
    used: dict[str, str] = {}
    for i, p in enumerate(paths):
        ds = load_data(p, label=None if labels is None else labels[i], **options)
        if ds.label in used:
            raise DataError(f'{os.fspath(p)}: label "{ds.label}" is already used by '
                            f"{used[ds.label]}; expected one label per sample (pass labels=[...] "
                            'or write a "# label: ..." line in each file)')
        used[ds.label] = os.fspath(p)
        out.append(ds)
    return out
