"""The fitter's starting models: the calibrated default model of each material.

One source of truth: :mod:`kinetic.defaults` builds the model of each preset's
reference sample; the fitter re-exports it under its historical names.
"""
from ..defaults import default_free, default_model

__all__ = ["DEFAULT_MECHANISMS", "default_free", "default_model"]

#: Mechanisms a default model may name (see :data:`kinetic.defaults.MECHANISM_ORDER`).
from ..defaults import MECHANISM_ORDER as DEFAULT_MECHANISMS  # noqa: E402
