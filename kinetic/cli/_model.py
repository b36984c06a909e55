"""The model a command starts from, and the scope notes printed beside its numbers.

Every command that needs a model without data (``predict``, ``sweep``, the
start of ``fit``) starts from the preset's default model,
``kinetic.defaults.default_model`` (the calibrated model of the preset's
reference sample). The engine modules are imported inside the functions:
``kinetic --help`` and ``kinetic materials`` must not load them (measured
reason, see ``benchmarks/bench_cli.py``).
"""
from __future__ import annotations

import importlib

from ..errors import ParameterError
from ._args import assignments, number


def _defaults():
    """``kinetic.defaults``, imported on first use (it loads numpy and scipy)."""
    return importlib.import_module("kinetic.defaults")


def default_model(material, *, mechanisms=None, split_branches=None):
    """The preset's default model (``kinetic.defaults.default_model``)."""
    return _defaults().default_model(material, mechanisms=mechanisms, split_branches=split_branches)


def default_free(model) -> list:
    return list(_defaults().default_free(model))


def scope_notes(material, **where) -> list:
    """Plain notes on where a prediction leaves what the preset was checked against."""
    notes = _defaults().scope_notes(material, **{k: v for k, v in where.items() if v is not None})
    return [str(n) for n in notes]


def model_from(args, material=None, *, base=None):
    """The default model of ``--material`` with ``--mechanisms``, ``--split``, ``--set`` and ``--grain-size``.

    ``base``: start from this model instead (``--set`` and ``--grain-size`` still apply).
    """
    if base is not None:
        model = base
    else:
        mat = material or getattr(args, "material", None)
        if not mat:
            raise ParameterError("--material is required (see 'kinetic materials' for presets)")
        mechs = None
        if getattr(args, "mechanisms", None):
            mechs = [s.strip() for s in args.mechanisms.split(",") if s.strip()]
        split = True if getattr(args, "split", False) else None
        model = default_model(mat, mechanisms=mechs, split_branches=split)
    for kind in getattr(args, "add", None) or ():
        kind = kind.strip()
        if kind in model.mechanism_names:
            raise ParameterError(f"--add {kind}: the model already has this mechanism (change it with --set)")
        model = model.with_mechanism(_defaults().new_mechanism(kind, getattr(args, "material", None)))
    vals = {}
    for k, v in assignments(getattr(args, "set", None), "--set").items():
        vals[k] = number(v, f"--set {k}")
    if getattr(args, "grain_size", None) is not None:
        vals["boundary.length"] = grain_size(args.grain_size)
    if vals:
        unknown = [k for k in vals if k not in model.params]
        if unknown:
            raise ParameterError(f"--set {unknown[0]}: unknown parameter; valid: {', '.join(model.params)}")
        model = model.with_params(vals)
    return model


def grain_size(text) -> float:
    """``--grain-size``: a length in m, or with a unit (``2um``, ``150 nm``)."""
    v = number(text, "--grain-size", unit="m")
    if not 0.0 < v < float("inf"):
        raise ParameterError(f"--grain-size must be a finite length > 0, got {text!r}")
    return v
