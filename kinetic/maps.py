"""The grain x alloy map: kappa on a grid of boundary lengths x alloy fractions at one temperature.

Speed of the map. One ``kappa`` call at one temperature costs ~0.6 ms (it is
dominated by per-call overhead, not by the quadrature), so 40,000 separate
models would take ~25 s. The map instead evaluates the grain sizes of one
composition together: the boundary rate is a row-wise mechanism
(:class:`RowBoundary`) on the engine's temperature rows: the map's one
temperature is repeated once per length and row i carries length i, so a
200 x 200 map costs 200 engine calls
(benchmarks/bench_whatif.py). :func:`iter_grain_alloy_map` streams a large
map in chunks of fractions.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import ClassVar

import numpy as np

from ._validate import positive
from ._validate import temperatures as _check_T
from .alloy import ABELES_BETA, scope_notes
from .errors import ParameterError
from .lattice import LatticeModel
from .scattering import Boundary, Mechanism
from .whatif import _host, _series_model, _series_setup, _values

__all__ = ["GrainAlloyMap", "LENGTHS_PER_CALL", "RowBoundary", "grain_alloy_map", "iter_grain_alloy_map"]


@dataclass(frozen=True)
class RowBoundary(Mechanism):
    """Boundary scattering with one length per row (for vectorised maps).

    ``rate`` returns v_g / L_i on temperature row i, broadcast against the
    frequency nodes: :func:`grain_alloy_map` evaluates the engine at one
    temperature repeated once per length, so row i is length i. Internal; it has no fit parameters and is not saved in records.
    """

    lengths: tuple = (1e-6,)
    name: str = "boundary"
    applies_to: tuple | None = None

    kind: ClassVar[str] = "boundary_rows"
    label: ClassVar[str] = "Boundary (one length per temperature row)"
    colour: ClassVar[str] = "#1f77b4"
    limits_mean_free_path: ClassVar[bool] = True
    _spec: ClassVar[dict] = {}

    def rate(self, omega, T, branch):
        omega = np.asarray(omega, dtype=float)
        T = np.asarray(T, dtype=float)
        L = np.asarray(self.lengths, dtype=float).reshape(-1, 1)
        if omega.ndim == 2 and omega.shape[0] > 1 and T.size > 1 and np.all(T == T.flat[0]):
            v = branch.group_velocity(omega[:1])  # one temperature repeated: the node rows are equal
        else:
            v = branch.group_velocity(omega)
        r = v / L
        return np.broadcast_to(r, np.broadcast_shapes(np.shape(r), omega.shape, T.shape))


@dataclass(frozen=True)
class GrainAlloyMap:
    """kappa on a grid of alloy fractions x boundary lengths at one temperature.

    Attributes
    ----------
    lengths : ndarray (nl,)
        Boundary lengths [m].
    fractions : ndarray (nx,)
        Alloy fractions x.
    temperature : float
        [K]
    kappa : ndarray (nx, nl)
        [W/m/K]; row = fraction, column = length.
    gamma : ndarray (nx,)
    notes : list of str
        Where the prediction leaves the checked range.
    """

    lengths: np.ndarray
    fractions: np.ndarray
    temperature: float
    kappa: np.ndarray
    gamma: np.ndarray
    notes: list = field(default_factory=list)


def _map_inputs(lengths, fractions, temperature):
    L = np.atleast_1d(positive("lengths", lengths, unit="m")).astype(float).ravel()
    xs = _values("fractions", fractions)
    if np.any((xs < 0) | (xs > 1)):
        raise ParameterError(f"fractions must lie in [0, 1], got {xs[(xs < 0) | (xs > 1)][0]!r}")
    T0 = np.atleast_1d(_check_T(temperature)).astype(float)
    if T0.size != 1:
        raise ParameterError(f"temperature must be a single number [K], got {T0.size} values")
    return L, xs, float(T0[0])


#: Boundary lengths evaluated together in one engine call of :func:`grain_alloy_map` (bounds
#: the (lengths x quadrature nodes) arrays to ~1.4 MB each).
LENGTHS_PER_CALL = 1024


def _kappa_over_lengths(model: LatticeModel, T0: float, n: int) -> np.ndarray:
    """kappa [W/m/K] at one temperature for each of the ``n`` lengths of the model's RowBoundary.

    The engine vectorises over its temperature rows; here every row is the same temperature
    ``T0`` and row i carries the RowBoundary rate v_g / L_i, so one engine call gives kappa at
    each length (the same arithmetic as ``model.kappa`` on a model with a single boundary
    length; tests/test_alloys.py compares).
    """
    return model.kappa(np.full(n, float(T0)))


def iter_grain_alloy_map(model: LatticeModel | None, lengths, fractions, temperature: float, *, host_a, host_b,
                         strain_epsilon: float | None = None, extra_gamma: float = 0.0, isotopes: bool = True,
                         mechanism: str = "boundary", normal_ratio: float = ABELES_BETA, rows: int = 16):
    """The grain x alloy map in chunks of fractions, for maps too large to hold at once.

    Same arguments as :func:`grain_alloy_map`; ``rows`` fractions per chunk.
    Yields ``(start, kappa_rows, gamma_rows)``: ``kappa_rows[i, j]`` is kappa
    [W/m/K] at fraction ``start + i`` and length j. Memory is one chunk of
    ``rows x len(lengths)`` numbers plus the integrals of up to :data:`LENGTHS_PER_CALL`
    lengths at a time.
    """
    a, b = _host(host_a), _host(host_b)
    L, xs, T0 = _map_inputs(lengths, fractions, temperature)
    rows = int(rows)
    if rows < 1:
        raise ParameterError(f"rows must be a whole number >= 1, got {rows!r}")
    factor, applies = 1.0, None
    if model is not None:
        bnd = model.mechanism(mechanism)
        if not isinstance(bnd, Boundary):
            raise ParameterError(f"mechanism {mechanism!r} of the template is not a Boundary")
        factor = bnd.effective_length / bnd.length
        applies = bnd.applies_to
    setup = _series_setup(a, b, model, strain_epsilon, normal_ratio, None, None, T0)
    blocks = [slice(i, min(i + LENGTHS_PER_CALL, L.size)) for i in range(0, L.size, LENGTHS_PER_CALL)]
    row_mechs = [RowBoundary(lengths=tuple((L[sl] * factor).tolist()), name=mechanism, applies_to=applies)
                 for sl in blocks]
    for start in range(0, xs.size, rows):
        chunk = xs[start:start + rows]
        out = np.empty((chunk.size, L.size))
        gam = np.empty(chunk.size)
        for i, x in enumerate(chunk):
            m, g = _series_model(a, b, x, model, setup, isotopes, extra_gamma, None, None, None)
            if model is None and mechanism not in m.mechanism_names:
                raise ParameterError(f"the default models have no boundary mechanism named {mechanism!r}")
            base = m.without(mechanism)
            for sl, rm in zip(blocks, row_mechs):
                out[i, sl] = _kappa_over_lengths(base.with_mechanism(rm), T0, sl.stop - sl.start)
            gam[i] = g + extra_gamma
        yield start, out, gam


def grain_alloy_map(model: LatticeModel | None, lengths, fractions, temperature: float, *, host_a, host_b,
                    strain_epsilon: float | None = None, extra_gamma: float = 0.0, isotopes: bool = True,
                    mechanism: str = "boundary", normal_ratio: float = ABELES_BETA) -> GrainAlloyMap:
    """kappa at one temperature on a grid of boundary lengths x alloy fractions (any size).

    Parameters
    ----------
    model : LatticeModel or None
        Template (see :func:`alloy_model`); must have a boundary mechanism
        named ``mechanism`` if given (its specularity is kept). None: the
        virtual crystal between the hosts' default (calibrated) models, as in
        :func:`alloy_sweep`.
    lengths : array_like
        Boundary lengths [m], > 0 (any number).
    fractions : array_like
        x in [0, 1] (any number).
    temperature : float
        [K]
    host_a, host_b : Material or preset name
    strain_epsilon, extra_gamma, isotopes, normal_ratio
        See :func:`alloy_sweep`.

    Returns
    -------
    GrainAlloyMap
        ``kappa[i, j]`` for fraction i and length j; equal (to rounding) to
        building each model separately. For maps that should not be held in
        memory at once use :func:`iter_grain_alloy_map`.
    """
    L, xs, T0 = _map_inputs(lengths, fractions, temperature)
    out = np.empty((xs.size, L.size))
    gam = np.empty(xs.size)
    for start, k, g in iter_grain_alloy_map(model, L, xs, T0, host_a=host_a, host_b=host_b,
                                            strain_epsilon=strain_epsilon, extra_gamma=extra_gamma,
                                            isotopes=isotopes, mechanism=mechanism, normal_ratio=normal_ratio,
                                            rows=64):
        out[start:start + k.shape[0]] = k
        gam[start:start + k.shape[0]] = g
    a, b = _host(host_a), _host(host_b)
    notes = scope_notes(materials=(a, b) if model is None else (), temperature=[T0], lengths=L,
                        series=(a.name, b.name), fractions=xs)
    if model is not None:
        notes.insert(0, "started from the given template model, not the hosts' calibrated default models")
    return GrainAlloyMap(L, xs, T0, out, gam, notes)
