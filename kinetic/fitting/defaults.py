"""Starting models and free parameters for a first fit of a material (moved unchanged from fitting.py).

The calibrated default model of each material will live in
:mod:`kinetic.defaults`; these are the fitter's starting points until then.
"""
from __future__ import annotations

from collections.abc import Sequence

from .. import materials
from ..disorder import material_gamma
from ..errors import ParameterError
from ..lattice import LatticeModel
from ..scattering import Boundary, Normal, PointDefect, Umklapp

__all__ = ["DEFAULT_MECHANISMS", "default_free", "default_model"]

#: Mechanisms of :func:`default_model` when none are named.
DEFAULT_MECHANISMS = ("boundary", "point_defect", "umklapp")
_KNOWN_MECHANISMS = ("boundary", "point_defect", "umklapp", "normal")


def default_model(material, mechanisms: Sequence[str] | None = None, *, split_branches: bool = False) -> LatticeModel:
    """A starting model for a material: boundary + point defect + Umklapp (+ normal).

    Start values (to be fitted, not claims about the material): boundary
    length 10 um; Gamma of the material's natural isotopes (periodictable via
    :func:`kinetic.disorder.material_gamma`), or 1e-3 without a composition;
    Umklapp in the Grüneisen form with the preset's calibration on a
    published k(T) table where it has one (``Material.umklapp_fit``: Si, Ge),
    else the material's Grüneisen parameter, or 1.5 where the preset has none
    (a typical fitted value, common practice), with b = 3 (Slack &
    Galginaitis 1964); normal-process prefactor
    1e-24 s K^-3 (n = 2, m = 3).

    Parameters
    ----------
    material : Material or str
        A material or preset name.
    mechanisms : sequence of str, optional
        Any of "boundary", "point_defect", "umklapp", "normal"
        (default :data:`DEFAULT_MECHANISMS`).
    split_branches : bool
        One averaged branch (False) or longitudinal + transverse.

    Raises
    ------
    ParameterError
        Unknown material or mechanism, or no resistive mechanism.
    """
    mat = materials.get(material) if isinstance(material, str) else material
    mechs = list(DEFAULT_MECHANISMS if mechanisms is None else mechanisms)
    for m in mechs:
        if m not in _KNOWN_MECHANISMS:
            raise ParameterError(f"unknown mechanism {m!r}; choose from {', '.join(_KNOWN_MECHANISMS)}")
    if len(set(mechs)) != len(mechs):
        raise ParameterError(f"a mechanism is listed twice in {mechs}")
    sc = []
    for m in mechs:
        if m == "boundary":
            sc.append(Boundary(1e-5))
        elif m == "point_defect":
            try:
                g = material_gamma(mat)
            except ParameterError:
                g = 1e-3
            sc.append(PointDefect.from_gamma(g, mat.volume_per_atom))
        elif m == "umklapp":
            cal = (mat.umklapp_fit or {}).get("split" if split_branches else "avg")
            if cal:
                sc.append(Umklapp.from_material(mat, gruneisen=cal["gruneisen"], b=cal["b"]))
            else:
                sc.append(Umklapp.from_material(mat, gruneisen=mat.gruneisen if mat.gruneisen else 1.5))
        else:
            sc.append(Normal(1e-24))
    return LatticeModel.from_material(mat, scattering=sc, split_branches=split_branches)


def default_free(model: LatticeModel) -> list:
    """Free parameters a first fit should try: boundary length, Gamma and the Umklapp strength.

    The Umklapp strength is its Grüneisen parameter or its B, whichever the
    mechanism uses. Normal-process and exponent parameters stay fixed: they
    are weakly determined by kappa(T) alone (common practice).
    """
    params = model.params
    out = []
    for name in ("boundary.length", "point_defect.gamma", "point_defect.A", "umklapp.gruneisen", "umklapp.B"):
        if name in params:
            out.append(name)
    if not out:
        raise ParameterError("the model has none of the default free parameters; name them with free=[...]")
    return out

