"""Exception classes of the engine.

Every class subclasses a built-in, so ``except ValueError`` keeps working for
callers that do not care which of ours it is.
"""


class KineticError(Exception):
    """Base class of every error raised on purpose by kinetic."""


class ParameterError(KineticError, ValueError):
    """A parameter is out of its valid range, of the wrong kind, or unknown."""


class DataError(KineticError, ValueError):
    """A data file or array cannot be read as a measurement table.

    The message names the file, line and column where it can.
    """


class RecordError(KineticError, ValueError):
    """A saved fit record is damaged, from a newer schema, or inconsistent."""


class FitError(KineticError, RuntimeError):
    """A fit could not be set up or was cancelled."""


class ModelError(KineticError, ValueError):
    """A model cannot give a meaningful conductivity.

    For example a scattering mechanism returned a NaN, infinite or negative
    rate (the message names the mechanism), or nothing limits the mean free
    path of long-wavelength phonons (no boundary term).
    """
