"""What-if studies: kappa against a parameter, grain size, alloy fraction, and zT against doping.

* :func:`sweep` -- kappa(T) for a list of values of any model parameter; with
  a fit result, a confidence band from the fit's covariance.
* :func:`grain_size_sweep` -- the same for the boundary length.
* :func:`alloy_sweep` -- kappa against the alloy fraction x of A(1-x)B(x) in
  the virtual crystal (:func:`kinetic.disorder.virtual_crystal`): host
  properties interpolated, Abeles' Gamma(x) in the point-defect rate.
* :func:`grain_alloy_map` -- kappa on a grid of grain sizes x alloy fractions
  at one temperature.
* :func:`zt_vs_fermi_level` -- zT against the reduced Fermi level in the
  single-parabolic-band model (see its docstring for the assumptions).

Alloys start from the hosts' default (calibrated) models; the virtual crystal
and Abeles' normal processes are in :mod:`kinetic.alloy`. Results carry
``notes`` where they leave what was checked (:func:`kinetic.alloy.scope_notes`).
zT against doping lives in :mod:`kinetic.zt_sweep` (re-exported here).

The grain x alloy map and its speed are described in :mod:`kinetic.maps`.
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from scipy.constants import atomic_mass as _u

from ._validate import as_float_array, positive
from ._validate import temperatures as _check_T
from .alloy import (
    ABELES_BETA,
    ABELES_EPSILON,
    abeles_hosts,
    host_model,
    scope_notes,
    vc_model,
)
from .errors import ParameterError
from .lattice import LatticeModel
from .scattering import Boundary, PointDefect, Umklapp
from .zt_sweep import DopingSweep, zt_vs_fermi_level

__all__ = [
    "Sweep",
    "AlloySweep",
    "GrainAlloyMap",  # noqa: F822 - from kinetic.maps, via __getattr__
    "DopingSweep",
    "RowBoundary",  # noqa: F822
    "sweep",
    "grain_size_sweep",
    "alloy_model",
    "alloy_sweep",
    "grain_alloy_map",  # noqa: F822
    "iter_grain_alloy_map",  # noqa: F822
    "zt_vs_fermi_level",
]


# ---------------------------------------------------------------------------------
# generic parameter sweep
# ---------------------------------------------------------------------------------

@dataclass(frozen=True)
class Sweep:
    """kappa against one parameter.

    Attributes
    ----------
    param : str
        ``"<mechanism>.<param>"``.
    values : ndarray (n,)
        Parameter values [its unit].
    temperature : ndarray (m,)
        [K]
    kappa : ndarray (n, m)
        Lattice conductivity [W/m/K].
    lower, upper : ndarray (n, m) or None
        Confidence band from the fit result's covariance (None without a result).
    level : float or None
    notes : list of str
        Where the prediction leaves what was checked: a preset's default
        model outside its calibrated temperature range, boundary lengths
        below those checked (see :func:`kinetic.alloy.scope_notes`).
    """

    param: str
    values: np.ndarray
    temperature: np.ndarray
    kappa: np.ndarray
    lower: np.ndarray | None = None
    upper: np.ndarray | None = None
    level: float | None = None
    notes: list = field(default_factory=list)


def _sweep_notes(model: LatticeModel, param: str, vals, T) -> list:
    """Scope notes for a sweep: calibration notes only when ``model`` is a preset's default model."""
    from .presets import PRESETS

    mats = ()
    if model.material in PRESETS:
        try:
            if model == host_model(_host(model.material)):
                mats = (model.material,)
        except ParameterError:
            mats = (model.material,)  # an uncalibrated preset: say so
    lengths = vals if param.endswith(".length") else None
    return scope_notes(materials=mats, temperature=T, lengths=lengths)


def _values(name, values):
    v = np.atleast_1d(as_float_array(name, values)).astype(float)
    if v.ndim != 1 or v.size == 0 or not np.all(np.isfinite(v)):
        raise ParameterError(f"{name} must be a non-empty 1-D list of finite numbers, got {values!r}")
    return v


def sweep(model: LatticeModel | None, param: str, values, temperature, result=None, *, level: float = 0.95,
          sample=0) -> Sweep:
    """Lattice conductivity for each value of one parameter, at given temperatures.

    Parameters
    ----------
    model : LatticeModel or None
        The model to vary; None uses the fitted model of ``result``.
    param : str
        ``"<mechanism>.<param>"`` (see ``model.params``).
    values : array_like
        Values of the parameter [its unit].
    temperature : float or array_like
        [K]
    result : FitResult or Record, optional
        A fit of this model: the band propagates the covariance of its free
        parameters (other than ``param``, which the sweep sets) at each value,
        linearised as in :func:`kinetic.fitting.predict_band`.
    level : float
        Confidence level of the band.
    sample : int or str
        Sample of a joint fit.

    Returns
    -------
    Sweep

    Raises
    ------
    ParameterError
        Unknown parameter, invalid values or temperatures.
    """
    from .fitting import _band_parts, _level, _sample_index

    if model is None:
        if result is None:
            raise ParameterError("give a model, or a fit result whose model to sweep")
        model = result.models[_sample_index(result, sample)]
    if not isinstance(model, LatticeModel):
        raise ParameterError(f"model must be a LatticeModel, got {type(model).__name__}")
    if param not in model.params:
        raise ParameterError(f"unknown parameter {param!r}; valid names: {', '.join(model.params)}")
    vals = _values("values", values)
    T = np.atleast_1d(_check_T(temperature)).astype(float).ravel()
    models = [model.with_params({param: float(v)}) for v in vals]
    kappa = np.array([m.kappa(T) for m in models])
    notes = _sweep_notes(model, param, vals, T)
    if result is None:
        return Sweep(param, vals, T, kappa, notes=notes)
    level = _level(level)
    i = _sample_index(result, sample)
    keep = [j for j, f in enumerate(result.free) if f.param != param and i in f.samples]
    free = [result.free[j] for j in keep]
    # re-index: the band helper looks at samples of each free parameter; use sample 0 of a 1-list
    from dataclasses import replace

    free = [replace(f, samples=(0,)) for f in free]
    cov = np.asarray(result.covariance_fitted)[np.ix_(keep, keep)]
    q = result.quantile(level)
    lo, hi = np.empty_like(kappa), np.empty_like(kappa)
    for n, m in enumerate(models):
        if free:
            _, lk, sd, _k = _band_parts([m], free, cov, result.values, 0, T)
        else:
            lk, sd = np.log(kappa[n]), np.zeros(T.size)
        with np.errstate(over="ignore"):
            lo[n] = np.exp(lk - q * sd)
            hi[n] = np.exp(lk + q * sd)
    return Sweep(param, vals, T, kappa, lo, hi, level, notes)


def grain_size_sweep(model: LatticeModel | None, lengths, temperature, result=None, *, mechanism: str = "boundary",
                     level: float = 0.95, sample=0) -> Sweep:
    """kappa against the boundary length (grain size) [m]; see :func:`sweep`.

    Parameters
    ----------
    model : LatticeModel or None
    lengths : array_like
        Boundary lengths [m], > 0.
    temperature : float or array_like
        [K]
    result : FitResult, optional
        Adds a band (the boundary length itself is set, not propagated).
    mechanism : str
        Name of the boundary mechanism (default "boundary").
    """
    positive("lengths", lengths, unit="m")
    return sweep(model, f"{mechanism}.length", lengths, temperature, result, level=level, sample=sample)


# ---------------------------------------------------------------------------------
# alloys
# ---------------------------------------------------------------------------------

def alloy_model(template: LatticeModel | None, material, gamma: float, *, extra_gamma: float = 0.0,
                boundary_length: float | None = None, gruneisen: float | None = None, b: float = 3.0,
                split_branches: bool | None = None) -> LatticeModel:
    """A lattice model for an alloy host with point-defect parameter Gamma.

    With a ``template``, its mechanisms are kept and adapted: the first
    point-defect mechanism becomes Klemens' form with Gamma = ``gamma`` +
    ``extra_gamma`` and the alloy's volume per atom; an Umklapp mechanism in
    the Grüneisen form takes the alloy's mean atomic mass (its gamma is kept;
    the branch velocity and Debye temperature follow the host); the branches
    come from ``material`` (split like the template's). Without a template the
    model is boundary (``boundary_length``, default 1 mm) + point defect +
    Umklapp with the CALIBRATED Grüneisen parameter ``gruneisen``, which must
    then be given (the thermodynamic gamma of a preset does not give the
    conductivity; :func:`alloy_sweep` without a template starts from the
    hosts' calibrated default models instead).

    Parameters
    ----------
    template : LatticeModel or None
    material : Material
        The (virtual-crystal) host.
    gamma : float
        Point-defect Gamma of the alloy [dimensionless].
    extra_gamma : float
        Added to gamma (dopants, vacancies) [dimensionless].
    boundary_length : float, optional
        Overrides the template's boundary length [m].
    gruneisen : float, optional
        Overrides the Grüneisen parameter; required without a template.
    b : float
        Umklapp exponent divisor when no template.
    split_branches : bool, optional
        Default: as the template (two branches named L and T), else False.

    Raises
    ------
    ParameterError
        No template and no ``gruneisen``.
    """
    g = float(gamma) + float(extra_gamma)
    if template is None:
        if gruneisen is None:
            raise ParameterError(
                "alloy_model without a template needs gruneisen= (the calibrated Umklapp gamma of the "
                "model, not the thermodynamic one); or pass template=, or use alloy_sweep, which starts "
                "from the hosts' default models")
        split = bool(split_branches)
        sc = [Boundary(1e-3 if boundary_length is None else boundary_length),
              PointDefect.from_gamma(g, material.volume_per_atom),
              Umklapp.from_material(material, gruneisen=gruneisen, b=b)]
        return LatticeModel.from_material(material, scattering=sc, split_branches=split)
    split = (len(template.branches) > 1) if split_branches is None else bool(split_branches)
    disp = template.branches[0].dispersion
    branches = material.branches(split=split, dispersion=disp)
    new = []
    pd_done = False
    for m in template.scattering:
        if isinstance(m, PointDefect) and not pd_done:
            m = PointDefect.from_gamma(g, material.volume_per_atom, name=m.name, applies_to=m.applies_to)
            pd_done = True
        elif isinstance(m, Umklapp) and m.gruneisen is not None:
            kw = {"atomic_mass": material.atomic_mass * _u}
            if gruneisen is not None:
                kw["gruneisen"] = gruneisen
            m = m.with_values(**kw)
        elif isinstance(m, Boundary) and boundary_length is not None:
            m = m.with_values(length=boundary_length)
        new.append(m)
    if not pd_done:
        new.append(PointDefect.from_gamma(g, material.volume_per_atom))
    return LatticeModel(branches, new, normal_correction=template.normal_correction, material=material.name)


@dataclass(frozen=True)
class AlloySweep:
    """kappa against the alloy fraction.

    Attributes
    ----------
    fractions : ndarray (n,)
        x of A(1-x)B(x).
    temperature : ndarray (m,)
        [K]
    kappa : ndarray (n, m)
        [W/m/K]
    gamma : ndarray (n,)
        Point-defect Gamma used (alloy + isotopes + extra).
    models : list of LatticeModel
    notes : list of str
        Where the prediction leaves what was checked (see :func:`kinetic.alloy.scope_notes`).
    """

    fractions: np.ndarray
    temperature: np.ndarray
    kappa: np.ndarray
    gamma: np.ndarray
    models: list
    notes: list = field(default_factory=list)


def _host(m):
    from . import materials

    return materials.get(m) if isinstance(m, str) else m


def _series_setup(a, b, template, strain_epsilon, normal_ratio, gruneisen, split_branches, t_ref):
    """Epsilon and, without a template, the host models: plain (for x = 0, 1) and with Abeles' N.

    Abeles' normal processes are fixed on each host's reference sample (its default model) at
    ``t_ref``; the end members x = 0 and 1 themselves are the plain host models.
    """
    eps = ABELES_EPSILON.get((a.name, b.name), 0.0) if strain_epsilon is None else strain_epsilon
    if template is not None:
        return {"eps": eps}
    ha, hb = host_model(a), host_model(b)
    if split_branches and len(ha.branches) == 1:
        raise ParameterError(
            f"the default models of {a.name} and {b.name} use one averaged branch; pass template= "
            "(a model with split branches) for a split-branch series")
    if gruneisen is not None:
        ha, hb = (m.with_params({k: gruneisen for k in m.params if k.endswith(".gruneisen")}) for m in (ha, hb))
    na, nb = abeles_hosts(ha, hb, beta=normal_ratio, t_ref=t_ref)
    return {"eps": eps, "hosts": (ha, hb), "abeles": (na, nb)}


def _end_member(host: LatticeModel, gamma: float, extra_gamma: float, boundary_length):
    """A pure host of a series: its default model as it is (boundary and extra Gamma if asked).

    Returns (model, Gamma): the host's own point-defect Gamma where it has one, else ``gamma``.
    """
    vals = {}
    if boundary_length is not None:
        vals.update({f"{m.name}.length": boundary_length for m in host.scattering if isinstance(m, Boundary)})
    pd = [m for m in host.scattering if isinstance(m, PointDefect) and m.gamma is not None]
    if pd:
        gamma = pd[0].gamma
        if extra_gamma:
            vals[f"{pd[0].name}.gamma"] = pd[0].gamma + extra_gamma
    elif extra_gamma:
        raise ParameterError(f"the {host.material} default model has no point-defect Gamma to add extra_gamma to")
    return (host.with_params(vals) if vals else host), gamma


def _series_model(a, b, x, template, setup, isotopes, extra_gamma, boundary_length, gruneisen, split_branches):
    from .disorder import virtual_crystal

    x = float(x)
    mat, g = virtual_crystal(a, b, x, strain_epsilon=setup["eps"], isotopes=isotopes)
    if template is None and x in (0.0, 1.0):
        return _end_member(setup["hosts"][int(x)], g, extra_gamma, boundary_length)
    if template is None:
        ma, mb = setup["abeles"]
        return vc_model(ma, mb, mat, g + extra_gamma, x, boundary_length=boundary_length), g
    return alloy_model(template, mat, g, extra_gamma=extra_gamma, boundary_length=boundary_length,
                       gruneisen=gruneisen, split_branches=split_branches), g


def alloy_sweep(host_a, host_b, fractions, temperature, *, template: LatticeModel | None = None,
                strain_epsilon: float | None = None, extra_gamma: float = 0.0, isotopes: bool = True,
                boundary_length: float | None = None, gruneisen: float | None = None,
                split_branches: bool | None = None, normal_ratio: float = ABELES_BETA) -> AlloySweep:
    """Lattice conductivity of A(1-x)B(x) against x in the virtual crystal.

    Without a template the series starts from the default (calibrated
    reference-sample) models of the two hosts, so x = 0 and x = 1 give each
    host's calibrated conductivity; in between, the virtual crystal of
    :mod:`kinetic.alloy` interpolates branches and scattering parameters and
    uses Abeles' Gamma(x) (:func:`kinetic.disorder.virtual_crystal`) with
    Abeles' normal processes (ratio ``normal_ratio``, Callaway's correction).
    With a template, its mechanisms are kept (:func:`alloy_model`).

    Parameters
    ----------
    host_a, host_b : Material or preset name
        End members (e.g. "Si", "Ge").
    fractions : array_like
        x values in [0, 1].
    temperature : float or array_like
        [K]
    template : LatticeModel, optional
        Mechanisms to keep (e.g. a fitted model of one end member).
    strain_epsilon : float, optional
        Abeles' strain parameter epsilon; default Abeles' 39 for Si-Ge
        (from memory), else 0 (mass term only).
    extra_gamma, boundary_length, gruneisen, split_branches
        See :func:`alloy_model`; without a template ``gruneisen`` overrides
        both hosts' calibrated Umklapp gamma, and ``split_branches=True`` is
        refused when the default models have one averaged branch.
    normal_ratio : float
        Abeles' beta = tau_U / tau_N for hosts whose default model has no
        normal processes (0: none). Default 2.5 (Abeles 1963 for Si-Ge, from memory).

    Returns
    -------
    AlloySweep
        With ``notes`` where the result leaves the checked range. Without a
        template x = 0 and 1 are the hosts' default models (with
        ``boundary_length`` if given); in between, Abeles' normal processes
        are fixed on the hosts' reference samples at each temperature, so
        ``models`` are those of the first temperature.

    References
    ----------
    Abeles, Phys. Rev. 131, 1906 (1963); Klemens, Proc. Phys. Soc. A 68, 1113 (1955);
    Callaway, Phys. Rev. 113, 1046 (1959).
    """
    a, b = _host(host_a), _host(host_b)
    xs = _values("fractions", fractions)
    if np.any((xs < 0) | (xs > 1)):
        raise ParameterError(f"fractions must lie in [0, 1], got {xs[(xs < 0) | (xs > 1)][0]!r}")
    T = np.atleast_1d(_check_T(temperature)).astype(float).ravel()
    # Abeles' normal processes are fixed on the hosts' reference samples at each temperature of the
    # sweep: one set of models per temperature.
    kappa = np.empty((xs.size, T.size))
    models, gammas = [], []
    for j, t in enumerate(T if template is None else T[:1]):
        setup = _series_setup(a, b, template, strain_epsilon, normal_ratio, gruneisen, split_branches, float(t))
        ms, gs = [], []
        for x in xs:
            m, g = _series_model(a, b, x, template, setup, isotopes, extra_gamma, boundary_length,
                                 gruneisen, split_branches)
            ms.append(m)
            gs.append(g + extra_gamma)
        if template is None:
            kappa[:, j] = [float(m.kappa(np.array([t]))[0]) for m in ms]
        else:
            kappa[:] = np.array([m.kappa(T) for m in ms])
        if j == 0:
            models, gammas = ms, gs
    notes = scope_notes(materials=(a, b) if template is None else (), temperature=T,
                        lengths=None if boundary_length is None else [boundary_length],
                        series=(a.name, b.name), fractions=xs)
    if template is not None:
        notes.insert(0, "started from the given template model, not the hosts' calibrated default models")
    return AlloySweep(xs, T, kappa, np.array(gammas), models, notes)


_MAP_NAMES = ("GrainAlloyMap", "RowBoundary", "grain_alloy_map", "iter_grain_alloy_map", "LENGTHS_PER_CALL")


def __getattr__(name):
    """The grain x alloy map lives in :mod:`kinetic.maps` (which builds on this module's alloy series)."""
    if name in _MAP_NAMES:
        from . import maps

        return getattr(maps, name)
    raise AttributeError(f"module 'kinetic.whatif' has no attribute {name!r}")
