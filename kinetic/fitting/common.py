"""Small helpers shared by the fitting modules and by records, report and what-if (all public)."""
from __future__ import annotations

import math

import numpy as np

from ..errors import ParameterError

__all__ = ["check_level", "json_float", "json_matrix", "sample_index"]


def json_float(v):
    """A float for strict JSON: the value if finite, else None.

    >>> json_float(2.5), json_float(float("inf")), json_float(float("nan"))
    (2.5, None, None)
    """
    try:
        v = float(v)
    except (TypeError, ValueError, OverflowError):
        return None
    return v if math.isfinite(v) else None


def json_matrix(a):
    """A matrix for strict JSON (non-finite entries as None)."""
    return [[json_float(v) for v in row] for row in np.asarray(a, dtype=float)]


def check_level(level) -> float:
    """A confidence level in (0, 1), e.g. 0.95; ParameterError naming ``level`` otherwise.

    >>> check_level(0.68)
    0.68
    """
    if isinstance(level, bool):
        raise ParameterError(f"level must be a number in (0, 1), got {level!r}")
    try:
        v = float(level)
    except (TypeError, ValueError):
        raise ParameterError(f"level must be a number in (0, 1), got {level!r}") from None
    if not 0.0 < v < 1.0:
        raise ParameterError(f"level must be in (0, 1), e.g. 0.95, got {v!r}")
    return v


def sample_index(result, sample) -> int:
    """Index of a sample of ``result`` given by label or index; ParameterError naming ``sample`` otherwise."""
    labels = list(result.labels)
    if isinstance(sample, str):
        if sample not in labels:
            raise ParameterError(f"no sample labelled {sample!r}; samples: {', '.join(labels)}")
        return labels.index(sample)
    if isinstance(sample, bool):
        raise ParameterError(f"sample must be a label or an index, got {sample!r}")
    try:
        i = int(sample)
    except (TypeError, ValueError):
        raise ParameterError(f"sample must be a label or an index, got {sample!r}") from None
    if not 0 <= i < len(labels):
        raise ParameterError(f"sample index {i} out of range; there are {len(labels)} sample(s)")
    return i
