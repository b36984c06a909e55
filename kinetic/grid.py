"""Prepared temperature grids: the engine's quadrature nodes, Planck weights and kept rates.

A :class:`TemperatureGrid` holds, for each branch it has met, the nodes of the
quadrature (:mod:`kinetic.quadrature`) at every temperature of one array,
omega at the nodes, the Planck-weighted integrand and the rate of every
mechanism instance computed on it. :func:`prepared_grid` keeps the grids of
the arrays met last (least recently used dropped), so the second call on the
same temperatures -- a slider move, a fit step -- reuses all of it and
recomputes only the rate that changed. New rates are checked here, once:
NaN, infinite or negative rates are refused naming the mechanism.
"""
from __future__ import annotations

import math
import threading
from collections import OrderedDict
from fractions import Fraction

import numpy as np
from scipy.constants import hbar, k as kB

from . import quadrature as quad
from ._validate import temperatures as _check_T
from .dispersion import Branch
from .errors import KineticError, ModelError, ParameterError
from .quantities import to_si

__all__ = ["TemperatureGrid", "prepared_grid", "clear_cache", "BLOCK_T"]

#: Temperature arrays up to this size get a prepared grid that is kept for
#: later calls (nodes, Planck weights and each mechanism's rates); larger
#: arrays are done in blocks of this many temperatures with nothing kept, so
#: memory stays bounded (4096 temperatures x 91 nodes is 2.8 MiB per array and branch).
BLOCK_T = 4096
#: Prepared grids kept (least recently used dropped first).
CACHE_GRIDS = 16
#: Rates kept per block of a grid (one per mechanism instance met) ...
CACHE_RATES = 64
#: ... and at most this many bytes of them (rates evaluated node by node are full arrays; the
#: power-law coefficients of Debye blocks are a few numbers per temperature)
CACHE_RATE_BYTES = 8 * 2**20
#: Branches' worth of nodes kept per grid (blocks count by their branches)
CACHE_BRANCHES = 16

_GRIDS: "OrderedDict[bytes, TemperatureGrid]" = OrderedDict()
#: guards the grid cache and the per-grid dictionaries (the workbench fits in a thread)
_LOCK = threading.RLock()


def clear_cache() -> None:
    """Forget every prepared temperature grid (and the rates kept on it)."""
    with _LOCK:
        _GRIDS.clear()


def _temperature(value, name: str = "temperature") -> np.ndarray:
    """Temperatures [K] from numbers or a pint quantity, checked finite and > 0."""
    if value is None or isinstance(value, (str, bytes)):
        raise ParameterError(f"{name} must be a number or array of numbers [K], got {value!r}")
    return _check_T(to_si(value, "K", name), name)


_SCRATCH = threading.local()


def _scratch(shape) -> np.ndarray:
    """Per-thread work arrays (5, *shape), shared by every grid of that shape in the thread.

    Reusing them means a new temperature grid touches no fresh memory for its
    intermediate sums (fresh pages cost more than the arithmetic on arrays of
    this size).
    """
    d = getattr(_SCRATCH, "d", None)
    if d is None:
        d = _SCRATCH.d = {}
    buf = d.get(shape)
    if buf is None:
        if len(d) >= 4:
            d.pop(next(iter(d)))
        buf = d[shape] = np.empty((5,) + tuple(shape))
    return buf


def kept(table: dict, key, build, limit: int = 64):
    """``table[key]``, built by ``build()`` on first use and frozen (read-only arrays); oldest dropped past ``limit``.

    The engine's small constant tables (node rows, series tables, branch
    constants) are kept this way, keyed by what they depend on.
    """
    hit = table.get(key)
    if hit is None:
        hit = build()
        for a in (hit if isinstance(hit, tuple) else (hit,)):
            a.setflags(write=False)
        if len(table) >= limit:
            table.pop(next(iter(table)), None)
        table[key] = hit
    return hit


_ONES: dict = {}


def _ones(n: int) -> np.ndarray:
    """A read-only vector of n ones (row sums as matrix-vector products), kept per size."""
    return kept(_ONES, n, lambda: np.ones(n))


def _planck_on_nodes(x):
    """x^2 e^x / (e^x - 1)^2 = ((x/2) / sinh(x/2))^2 in place in ``x`` (0 < x <= X_CUT on the nodes).

    The sinh form has no cancellation at small x and no overflow for the
    node range, and needs one transcendental pass; :func:`quadrature.planck_weight`
    is the general version (checked against mpmath in tests).
    """
    x *= 0.5
    s = np.sinh(x)
    x /= s
    x *= x
    return x


def _planck_series_coefficients(K: int) -> np.ndarray:
    """a_k of x^2 e^x / (e^x - 1)^2 = sum_k a_k x^(2k), a_k = (1 - 2k) B_2k / (2k)!, k < K.

    B_2k are Bernoulli numbers, computed exactly as fractions (Akiyama-Tanigawa
    recurrence) before the one rounding to float; the series follows from the
    Laurent series of x / (e^x - 1) differentiated (closed form; it converges
    for |x| < 2 pi).
    """
    n = 2 * K
    A, B = [Fraction(0)] * (n + 1), []
    for m in range(n + 1):
        A[m] = Fraction(1, m + 1)
        for j in range(m, 0, -1):
            A[j - 1] = j * (A[j - 1] - A[j])
        B.append(A[0])
    return np.array([float((1 - 2 * k) * B[2 * k] / math.factorial(2 * k)) for k in range(K)])


#: Below this x the Planck weight of a Debye block comes from its Taylor series, as one matrix product
#: (x = X_i e_j makes each term a per-row times a per-node factor). 6 terms: the next term is
#: 2.4e-17 of the sum at x = 0.2 (the series' ratio is about (x / 2 pi)^2); checked against mpmath at
#: 40 digits in tests/test_engine_numerics.py.
PLANCK_SERIES_X = 0.2
_PLANCK_A = _planck_series_coefficients(6)
_SERIES_ROWS: dict = {}


def _planck_debye(X: np.ndarray, rule: str) -> np.ndarray:
    """x^2 e^x / (e^x - 1)^2 at x = X_i e_j on a Debye block's nodes, shape (n_rows, n_nodes).

    The node columns where every row has x <= :data:`PLANCK_SERIES_X` (the
    lowest frequencies: over half of the 16 units of ln u below the top node)
    take the Taylor series as one product (X_i^2k)(a_k e_j^2k); the rest take
    ((x/2) / sinh(x/2))^2, which has no cancellation and no overflow there.
    The transcendental pass, the engine's largest single cost, then covers
    fewer than half of the nodes.
    """
    exp_off = quad._RULES[rule][2]
    n_rows, n = X.size, exp_off.size
    j0 = int(np.searchsorted(exp_off, PLANCK_SERIES_X / X.max(), side="right")) if n_rows else 0
    p = np.empty((n_rows, n))
    if j0:
        k2 = 2.0 * np.arange(_PLANCK_A.size)
        table = kept(_SERIES_ROWS, rule, lambda: _PLANCK_A[:, None] * exp_off ** k2[:, None])
        Xp = np.empty((_PLANCK_A.size, n_rows))  # X^(2k), k = 0.. (a product with its transpose goes to BLAS as is)
        Xp[0] = 1.0
        np.multiply(X, X, out=Xp[1])
        for k in range(2, _PLANCK_A.size):
            np.multiply(Xp[k - 1], Xp[1], out=Xp[k])
        p[:, :j0] = np.dot(Xp.T, table[:, :j0])
    if j0 < n:
        h = np.dot((0.5 * X)[:, None], exp_off[None, j0:])
        s = np.sinh(h)
        np.divide(h, s, out=h)
        np.multiply(h, h, out=p[:, j0:])
    return p


_ROWS: dict = {}


def _power_rows(rule: str, powers: tuple) -> np.ndarray:
    """e_j^n of a rule's node offsets e_j = u_j / u_hi, one row per power in ``powers`` (kept, read-only)."""
    e = quad._RULES[rule][2]
    return kept(_ROWS, (rule, powers), lambda: np.array([e**n if n else np.ones(e.size) for n in powers]))


class RateTerms:
    """A scattering rate on Debye nodes, kept by power: rate[i, j] = sum_k coefs[k, i] e_j^powers[k].

    On a Debye branch omega at node j of row i (a temperature) is
    (omega_max u_hi_i) e_j, so a rate sum_n c_n(T) omega^n
    (:meth:`Mechanism.rate_terms`) is held by one row of coefficients per
    power -- c_n(T_i) (omega_max u_hi_i)^n for every row i -- and the node
    rows e_j^n; all mechanisms of a block of branches then sum in one matrix
    product. The coefficients are checked finite and >= 0 where they are
    summed (:func:`check_coefficients`).
    """

    __slots__ = ("powers", "coefs")

    def __init__(self, powers: tuple, coefs: np.ndarray):
        self.powers = powers
        self.coefs = coefs

    def full(self, rule: str = "debye") -> np.ndarray:
        """The rate at every node [s^-1], shape (n_rows, n_nodes)."""
        return np.dot(self.coefs.T, _power_rows(rule, self.powers))


def _side_by_side(owners) -> tuple:
    """The coefficients of several ``(mechanism, RateTerms)`` pairs stacked (powers x rows), and their powers."""
    if len(owners) == 1:
        t = owners[0][1]
        return t.coefs, t.powers
    return (np.concatenate([t.coefs for _m, t in owners]),
            sum((t.powers for _m, t in owners), ()))


_CONSTANTS: dict = {}


def _block_constants(branches: tuple) -> tuple:
    """Per-branch constants of a block as (n_b, 1) columns, kept: (hbar omega_max / kB [K], pref [W m^-1 K^-1 s],
    pref v^2, omega_max [rad/s]) with pref = p q_max^3 kB / (6 pi^2)."""
    def build():
        theta = np.array([[hbar * b.omega_max / kB] for b in branches])
        pref = np.array([[b.polarizations * b.q_max**3 * kB / (6.0 * np.pi**2)] for b in branches])
        pv2 = pref * np.array([[b.velocity**2] for b in branches])
        wmax = np.array([[b.omega_max] for b in branches])
        return theta, pref, pv2, wmax

    return kept(_CONSTANTS, branches, build)


class _BranchNodes:
    """Quadrature nodes, Planck-weighted integrand and kept rates of a block of branches on one temperature grid.

    A block is one or more branches with the same dispersion, stacked row by
    row: row ``i * n_T + t`` is branch i at temperature t (``segment(i)``
    gives a branch's rows), so every array operation of the sums covers all
    of them at once. Holds ``wbase`` = weight x integrand / tau (an integral
    is a row sum of ``wbase / rate``), the two lowest columns of the
    integrand for the closed-form tail, and omega at the nodes (what
    mechanisms see; built on first use on Debye branches, whose rates usually
    come as :class:`RateTerms` from ``scale`` = omega_max u_hi, the per-row
    factor of omega). Scratch arrays for the sums are kept per thread, so
    repeated calls allocate nothing big.
    """

    __slots__ = ("branches", "T", "n_T", "_Trows", "u_hi", "_omega", "_wbase", "planck", "wcol", "_base01", "base0u",
                 "_u0", "log_ratio", "rates", "rate_bytes", "shape", "_vg", "ones", "separable", "scale", "_scale_pow",
                 "rule")

    def __init__(self, branches: tuple, T: np.ndarray):
        rule = branches[0].dispersion
        n_b, n_T = len(branches), T.size
        # x = hbar omega / kB T at the zone edge (theta / T on a Debye branch; read from omega_max so
        # that any convention for a sine branch's zone-edge frequency is followed), one row per (branch, T)
        theta, pref, pv2, wmax = _block_constants(branches)
        x_max = (theta / T).ravel()
        r = np.minimum(1.0, quad.X_CUT / x_max)
        sine = rule == "sine"
        u_hi = (2.0 / np.pi) * np.arcsin(r) if sine else r
        _, weights, exp_off = quad._RULES[rule]
        # wbase = weight * pref * v_g^2 * Planck * u^2, with weight = rule weight * u (du = u ds)
        self.branches = branches
        self.T = T
        self.n_T = n_T
        self._Trows = T if n_b == 1 else None
        if sine:
            u = u_hi[:, None] * exp_off[None, :]
            omega = self._by_branch("omega_of_u", u)
            vg = self._by_branch("group_velocity_of_u", u)
            wbase = u * u
            wbase *= u
            wbase *= vg
            wbase *= vg
            wbase *= np.repeat(pref, n_T)[:, None] * weights[None, :]
            x = omega * (hbar / kB)
            x /= self.Trows[:, None]
            _planck_on_nodes(x)
            wbase *= x
            omega.setflags(write=False)  # shared with the mechanisms (and their kept powers of omega)
            planck = wcol = vg = None  # vg is rebuilt if asked for (the mean-free-path check): not kept
            base01 = wbase[:, :2] / (weights[:2] * exp_off[:2] * u_hi[:, None])
        else:
            # Debye: u = u_hi e_j and x = u x_max factor into a column and a row, so
            # wbase = P(x) wcol_i wrow_j with P = ((x/2) / sinh(x/2))^2, wcol = pref v^2 u_hi^3 and
            # wrow = w_j e_j^3 (the rule's weights times e_j^3). Only P is built on the nodes
            # (_planck_debye); the sums take wrow into their node table and wcol after the row sums (see
            # _CallawaySums._separable_sums), and wbase itself is built only for the node-by-node route.
            planck = _planck_debye(u_hi * x_max, rule)
            wcol = (u_hi**3).reshape(n_b, n_T)
            wcol *= pv2
            wcol = wcol.ravel()
            omega = vg = wbase = None
            base01 = None  # built on first use (the tails are usually negligible and skipped)
        self.rule = rule
        self.u_hi = u_hi
        self.separable = not sine
        self.scale = (u_hi.reshape(n_b, n_T) * wmax).ravel()
        self._scale_pow: dict = {}
        self._omega = omega
        self._vg = vg
        self._wbase = wbase
        self.planck = planck
        self.wcol = wcol
        self._base01 = base01
        self._u0 = None
        # wbase / weight at the lowest node, times u0 = u_hi e_0: the tail's scale (see _tails_negligible);
        # on a Debye block wbase / (w_0 e_0 u_hi) = planck wcol e_0^2 / u_hi, so this is planck wcol e_0^3
        if sine:
            self.base0u = base01[:, 0] * (u_hi * exp_off[0])
        else:
            self.base0u = planck[:, 0] * wcol
            self.base0u *= exp_off[0] ** 3
        self.log_ratio = quad.log_ratio(rule)
        self.shape = (u_hi.size, exp_off.size)
        self.ones = _ones(exp_off.size)
        self.rates: dict = {}
        self.rate_bytes = 0

    @property
    def base01(self) -> np.ndarray:
        """wbase / (weight) at the two lowest nodes, the integrand before 1/rate, shape (n_rows, 2).

        On a Debye block wbase / (w_j e_j u_hi) = planck wcol e_j^2 / u_hi.
        """
        if self._base01 is None:
            e01 = quad._RULES[self.rule][2][:2]
            b = self.planck[:, :2] * (self.wcol / self.u_hi)[:, None]
            b *= e01**2
            self._base01 = b
        return self._base01

    @property
    def u0(self) -> np.ndarray:
        """The lowest node's reduced wavevector in every row."""
        if self._u0 is None:
            self._u0 = self.u_hi * quad._RULES[self.rule][2][0]
        return self._u0

    @property
    def Trows(self) -> np.ndarray:
        """Temperature of every row [K] (the grid's temperatures once per branch)."""
        if self._Trows is None:
            self._Trows = np.tile(self.T, len(self.branches))
        return self._Trows

    @property
    def Tcol(self) -> np.ndarray:
        """:attr:`Trows` as a column (n_rows, 1), for rates evaluated node by node."""
        return self.Trows[:, None]

    @property
    def wbase(self) -> np.ndarray:
        """weight x Planck-weighted integrand on the nodes, so an integral is a row sum of ``wbase / rate``."""
        if self._wbase is None:
            self._wbase = self.planck * self.weight_scale()
        return self._wbase

    def weight_scale(self) -> np.ndarray:
        """wcol_i wrow_j on a Debye block's nodes (wbase = planck x this), built afresh."""
        _, weights, exp_off = quad._RULES[self.rule]
        return np.dot(self.wcol[:, None], (weights * exp_off**3)[None, :])

    def scale_powers(self, powers: tuple) -> np.ndarray:
        """scale^n for each n of ``powers``, shape (len(powers), n_rows), kept per tuple (read-only)."""
        pw = self._scale_pow.get(powers)
        if pw is None:
            pw = np.empty((len(powers), self.scale.size))
            for k, n in enumerate(powers):
                pw[k] = 1.0 if n == 0.0 else self.scale**n
            pw.setflags(write=False)
            self._scale_pow[powers] = pw
        return pw

    @property
    def branch(self) -> Branch:
        """The branch of a one-branch block."""
        return self.branches[0]

    def segment(self, i: int) -> slice:
        """The rows of the block's i-th branch."""
        return slice(i * self.n_T, (i + 1) * self.n_T)

    @property
    def omega(self) -> np.ndarray:
        """Angular frequency at the nodes [rad/s], shape (n_rows, n_nodes), read-only."""
        if self._omega is None:
            om = np.dot(self.scale[:, None], quad._RULES[self.rule][2][None, :])
            om.setflags(write=False)  # shared with the mechanisms (and their kept powers of omega)
            self._omega = om
        return self._omega

    def assemble(self, out: np.ndarray, full: list, owners: list) -> np.ndarray:
        """Sum of rates on the nodes: :class:`RateTerms` in one matrix product, plus full arrays.

        ``owners`` holds ``(mechanism, RateTerms)`` pairs (their coefficients are
        checked here, see :func:`check_coefficients`), ``full`` checked arrays.
        ``out`` receives the sum unless a single full-shape array is the
        whole of it (then that is returned, read only from here on).
        """
        if not owners:
            return _sum_into(out, full)
        coefs, powers = _side_by_side(owners)
        check_coefficients(self, coefs, owners)
        np.dot(coefs.T, _power_rows(self.rule, powers), out=out)
        for r in full:
            np.add(out, r, out=out)
        return out

    def tail(self, f01):
        """Closed-form integral below the lowest node from the integrand at the two lowest nodes."""
        return quad.tail_from_columns(self.u0, f01[:, 0], f01[:, 1], self.log_ratio)

    def tails(self, f01):
        """:meth:`tail` of several integrands at once, ``f01`` of shape (k, n_rows, 2) -> (k, n_rows).

        Call inside ``np.errstate(divide="ignore", invalid="ignore")``: a zero
        or non-positive integrand gives a NaN power, which fails the test
        ``p > -0.9`` and gets no tail (as in :func:`quadrature.tail_from_columns`).
        """
        f0 = f01[..., 0]
        p1 = np.log(f01[..., 1] / f0)
        p1 *= 1.0 / self.log_ratio
        p1 += 1.0  # p + 1
        t = f0 * self.u0
        t /= p1
        return np.where((p1 > 0.1) & (f0 > 0), t, 0.0)

    def scratch(self):
        """Per-thread work arrays of the node shape: res, n, c, f1, g."""
        return _scratch(self.shape)

    @property
    def vg(self):
        """Group velocity at the nodes [m/s]: a column (n_rows, 1) on Debye branches, else (n_rows, n_nodes)."""
        if self._vg is not None:
            return self._vg
        if self.separable:
            self._vg = np.repeat(np.array([b.velocity for b in self.branches]), self.n_T)[:, None]
            return self._vg
        return self._by_branch("group_velocity_of_u", self.u_hi[:, None] * quad._RULES[self.rule][2][None, :])

    def _by_branch(self, method: str, u: np.ndarray) -> np.ndarray:
        """``branch.<method>(u)`` on each branch's rows of ``u`` (a sine block's omega or group velocity)."""
        out = np.empty(u.shape)
        for i, b in enumerate(self.branches):
            seg = self.segment(i)
            out[seg] = getattr(b, method)(u[seg])
        return out

    def full(self):
        """u, weights, Planck weight at the nodes (rebuilt: for heat capacity and spectra)."""
        _, weights, exp_off = quad._RULES[self.rule]
        u = self.u_hi[:, None] * exp_off[None, :]
        x = (hbar / kB) * self.omega / self.Tcol
        return u, weights[None, :] * u, _planck_on_nodes(x)


class TemperatureGrid:
    """A temperature array prepared for the engine: nodes and Planck weights per branch.

    :meth:`LatticeModel.kappa` and friends prepare (and keep, see
    :func:`prepared_grid`) one of these for each temperature array they meet,
    so a second call on the same temperatures -- a slider move, a fit step --
    reuses the nodes, the Planck weights and the rate of every mechanism that
    did not change.

    Parameters
    ----------
    temperature : array_like
        Temperatures [K], finite and > 0 (any shape; kept flattened).

    Examples
    --------
    >>> import numpy as np
    >>> from kinetic import Branch, Boundary, LatticeModel
    >>> g = prepared_grid(np.linspace(10.0, 300.0, 30))
    >>> g is prepared_grid(np.linspace(10.0, 300.0, 30))   # the same array meets the same grid
    True
    >>> m = LatticeModel([Branch(5000.0, 400.0)], [Boundary(1e-3)])
    >>> bool(np.all(m.kappa(g) == m.kappa(np.linspace(10.0, 300.0, 30))))
    True
    """

    def __init__(self, temperature):
        self._set(np.ascontiguousarray(_temperature(temperature), dtype=float))

    def _set(self, T: np.ndarray) -> None:
        self.shape = T.shape
        # an own copy: the grid is kept by the array's bytes, so a caller changing its array later must not
        # change the temperatures of the kept grid
        self.temperature = np.array(T, dtype=float).ravel()
        self.temperature.setflags(write=False)
        self.Tcol = self.temperature[:, None]
        self._nodes: dict = {}

    @property
    def size(self) -> int:
        return self.temperature.size

    def nodes(self, branch: Branch) -> _BranchNodes:
        """Nodes of one branch (built on first use and kept)."""
        return self.block((branch,))

    def block(self, branches: tuple) -> _BranchNodes:
        """Nodes of a block of branches with one dispersion, stacked row by row (built on first use and kept)."""
        try:
            return self._nodes[branches]
        except KeyError:
            pass
        n = _BranchNodes(branches, self.temperature)
        with _LOCK:
            while self._nodes and sum(len(k) for k in self._nodes) + len(branches) > CACHE_BRANCHES:
                self._nodes.pop(next(iter(self._nodes)), None)
            return self._nodes.setdefault(branches, n)


def _key(T: np.ndarray) -> bytes:
    return T.tobytes() + repr(T.shape).encode()


def _cached_grid(temperature):
    """The kept grid of a float array met before (no validation needed: same bytes), else None."""
    if type(temperature) is np.ndarray and temperature.dtype == np.float64 and temperature.size <= BLOCK_T:
        key = _key(temperature)
        with _LOCK:
            g = _GRIDS.get(key)
            if g is not None:
                _GRIDS.move_to_end(key)
        return g
    return None


def prepared_grid(temperature) -> TemperatureGrid:
    """The kept :class:`TemperatureGrid` of a temperature array, prepared on first use.

    Arrays of more than :data:`BLOCK_T` temperatures are not kept.
    """
    if isinstance(temperature, TemperatureGrid):
        return temperature
    g = _cached_grid(temperature)
    if g is not None:
        return g
    return _prepared_checked(np.ascontiguousarray(_temperature(temperature), dtype=float))


def _new_grid(T: np.ndarray) -> TemperatureGrid:
    """A :class:`TemperatureGrid` of a float array already checked finite and > 0 (not checked again)."""
    g = TemperatureGrid.__new__(TemperatureGrid)
    g._set(np.ascontiguousarray(T, dtype=float))
    return g


def _prepared_checked(T: np.ndarray) -> TemperatureGrid:
    """:func:`prepared_grid` of a float array already checked finite and > 0 (the engine's own callers).

    Saves the two repeated validations of the same temperatures on a new grid.
    """
    if T.size > BLOCK_T:
        return _new_grid(T)
    key = _key(T)
    with _LOCK:
        g = _GRIDS.get(key)
        if g is None:
            g = _GRIDS[key] = _new_grid(T)
            if len(_GRIDS) > CACHE_GRIDS:
                _GRIDS.popitem(last=False)
        else:
            _GRIDS.move_to_end(key)
    return g


def _describe_bad(mech, branch, r, omega, Tcol) -> str:
    full = np.broadcast_shapes(np.shape(r), omega.shape, Tcol.shape)
    rb = np.broadcast_to(r, full)
    bad = ~np.isfinite(rb) | (rb < 0)
    i, j = np.argwhere(bad)[0]
    val = rb[i, j]
    what = "a NaN" if np.isnan(val) else ("an infinite" if np.isinf(val) else "a negative")
    w = np.broadcast_to(omega, full)[i, j]
    t = np.broadcast_to(Tcol, full)[i, j]
    return (f"mechanism {mech.name!r} ({type(mech).__name__}) returned {what} scattering rate ({val!r} s^-1) "
            f"at omega = {w:.4g} rad/s, T = {t:.4g} K on branch {branch.name!r}; "
            "a rate 1/tau must be finite and >= 0 [s^-1]")


def _checked_rate(mech, branch, omega, Tcol):
    """A mechanism's rate on the nodes, refused (naming it) when NaN, infinite, negative or mis-shaped."""
    try:
        # overflow, 0/0 and the like come back as inf or NaN and are refused below, naming the mechanism
        with np.errstate(all="ignore"):
            r = np.asarray(mech.rate(omega, Tcol, branch), dtype=float)
    except (KineticError, MemoryError, KeyboardInterrupt):
        raise
    except Exception as exc:
        raise ModelError(
            f"mechanism {mech.name!r} ({type(mech).__name__}) failed on branch {branch.name!r}: "
            f"{type(exc).__name__}: {exc}"
        ) from exc
    if r.ndim == 0:
        # a constant rate (a boundary on a Debye branch): checked as a Python float (no array reductions)
        if not (0.0 <= float(r) < np.inf):
            raise ModelError(_describe_bad(mech, branch, r, omega, Tcol))
        return r
    if r.shape != omega.shape:
        try:
            full = np.broadcast_shapes(r.shape, omega.shape, Tcol.shape)
        except ValueError:
            full = None
        if full != omega.shape:
            raise ModelError(
                f"mechanism {mech.name!r} ({type(mech).__name__}) returned rates of shape {r.shape} for "
                f"omega of shape {omega.shape} and T of shape {Tcol.shape}; they must broadcast together"
            )
    if r.size:
        lo, hi = r.min(), r.max()
        if not (lo >= 0.0 and hi < np.inf):
            raise ModelError(_describe_bad(mech, branch, r, omega, Tcol))
    return r


def block_rate(mech, nodes) -> np.ndarray:
    """A mechanism's checked rate on every node of a block, zero on the branches it does not apply to."""
    if len(nodes.branches) == 1:
        return _checked_rate(mech, nodes.branch, nodes.omega, nodes.Tcol)
    omega, Tcol = nodes.omega, nodes.Tcol
    segs = [(nodes.segment(i), b) for i, b in enumerate(nodes.branches) if mech.applies(b)]
    parts = [(seg, _checked_rate(mech, b, omega[seg], Tcol[seg])) for seg, b in segs]
    # constant rates on every branch (a boundary): one number per row, not per node
    out = np.zeros((nodes.shape[0], 1) if all(np.ndim(r) == 0 for _s, r in parts) else nodes.shape)
    for seg, r in parts:
        out[seg] = r
    return out


def _checked_terms(mech, nodes):
    """A mechanism's rate on a block of Debye branches as :class:`RateTerms`, or None when it has no such form.

    One row of coefficients per power met on any branch of the block (zero on
    the rows of branches without it, or that the mechanism does not apply
    to). They are checked finite and >= 0 where the rates are summed, all
    mechanisms at once (:func:`check_coefficients`); call inside
    ``np.errstate(all="ignore")``.
    """
    branch = None
    try:
        per, powers = [], []
        for i, branch in enumerate(nodes.branches):
            if not mech.applies(branch):
                continue
            terms = mech.rate_terms(branch, nodes.T)
            if terms is None:
                return None
            terms = [(float(n), c) for n, c in terms]
            for n, _c in terms:
                if not n >= 0.0:  # e_j^n would grow without bound toward low frequency: checked node by node
                    return None
                if n not in powers:
                    powers.append(n)
            per.append((i, terms))
        powers = tuple(powers)
        coefs = np.zeros((len(powers), len(nodes.branches), nodes.n_T))
        for i, terms in per:
            for n, c in terms:
                coefs[powers.index(n), i] += c
        coefs = coefs.reshape(len(powers), -1)
        if powers != (0.0,):
            coefs *= nodes.scale_powers(powers)
    except (KineticError, MemoryError, KeyboardInterrupt):
        raise
    except Exception as exc:
        where = f" on branch {branch.name!r}" if branch is not None else ""
        raise ModelError(
            f"mechanism {mech.name!r} ({type(mech).__name__}) failed{where}: {type(exc).__name__}: {exc}"
        ) from exc
    return RateTerms(powers, coefs)


def check_coefficients(nodes, coefs: np.ndarray, owners) -> None:
    """Refuse RateTerms coefficients that are not finite and >= 0, naming the mechanism.

    ``coefs`` are the coefficients of every RateTerms of a block stacked,
    ``owners`` the ``(mechanism, RateTerms)`` pairs they came from. The node
    rows e_j^n are positive and at most 1 (e_j^n for n >= 0), so finite,
    non-negative coefficients with a finite sum give finite, non-negative
    rates. Two reductions over k x n_rows numbers: the check costs O(n_T),
    not O(n_T x nodes). A bad one is described by :func:`_checked_rate` on the
    full nodes (the mechanism, the branch, omega and T of the first bad value).
    """
    if not coefs.size or (coefs.min() >= 0.0 and np.isfinite(coefs.sum())):
        return
    names = ", ".join(repr(b.name) for b in nodes.branches)
    for mech, t in owners:
        if not (t.coefs.min() >= 0.0 and np.isfinite(t.coefs.sum())):
            block_rate(mech, nodes)
            raise ModelError(
                f"mechanism {mech.name!r} ({type(mech).__name__}) returned scattering rates too large to "
                f"represent on branch {names}; a rate 1/tau must be finite and >= 0 [s^-1]"
            )
    raise ModelError(f"the scattering rates on branch {names} are too large to sum "
                     "(over 1e308 s^-1); a rate 1/tau must be finite [s^-1]")


def _sum_into(out: np.ndarray, rates: list) -> np.ndarray:
    """Sum of rate arrays (each broadcasting to ``out``'s shape), written into ``out``.

    A single rate of the full shape is returned as it is (read only from here on).
    """
    if not rates:
        out.fill(0.0)
    elif len(rates) == 1:
        if np.shape(rates[0]) == out.shape:
            return rates[0]
        np.copyto(out, rates[0])
    else:
        np.add(rates[0], rates[1], out=out)
        for r in rates[2:]:
            np.add(out, r, out=out)
    return out
