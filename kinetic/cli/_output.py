"""Output helpers of the command line: JSON text, finite-or-null lists, when to show a progress bar."""
from __future__ import annotations

import json
import math
import sys


def dump(obj) -> str:
    """JSON text (strict: a NaN or infinity that slipped through raises instead of writing invalid JSON)."""
    return json.dumps(obj, indent=1, allow_nan=False)


def jsonable(a) -> list:
    """A flat list of floats, with None where a value is not finite."""
    import numpy as np  # lazy: this module is imported for every command, --help included

    return [float(v) if math.isfinite(v) else None for v in np.asarray(a, dtype=float).ravel().tolist()]


def progress_wanted(forced: bool) -> bool:
    """A progress bar on stderr: when forced, or when stderr is a terminal."""
    if forced:
        return True
    try:
        return sys.stderr.isatty()
    except (AttributeError, ValueError):
        return False
