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

import threading
from collections import OrderedDict

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
#: memory stays bounded (a block of 4096 x 96 nodes is 3 MiB per array).
BLOCK_T = 4096
#: Prepared grids kept (least recently used dropped first).
CACHE_GRIDS = 16
#: Rates kept per branch of a grid (one per mechanism instance met).
CACHE_RATES = 64

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


_ONES: dict = {}


def _ones(n: int) -> np.ndarray:
    """A read-only vector of n ones (row sums as matrix-vector products), kept per size."""
    v = _ONES.get(n)
    if v is None:
        v = np.ones(n)
        v.setflags(write=False)
        _ONES[n] = v
    return v


def _planck_on_nodes(x, tmp=None):
    """x^2 e^x / (e^x - 1)^2 = ((x/2) / sinh(x/2))^2 in place in ``x`` (0 < x <= X_CUT on the nodes).

    The sinh form has no cancellation at small x and no overflow for the
    node range, and needs one transcendental pass; :func:`quadrature.planck_weight`
    is the general version (checked against mpmath in tests).
    """
    x *= 0.5
    s = np.sinh(x, out=tmp)
    x /= s
    x *= x
    return x


_ROWS: dict = {}


def _power_rows(rule: str, powers: tuple) -> np.ndarray:
    """e_j^n of a rule's node offsets e_j = u_j / u_hi, one row per power in ``powers`` (kept, read-only)."""
    key = (rule, powers)
    rows = _ROWS.get(key)
    if rows is None:
        e = quad._RULES[rule][2]
        rows = np.empty((len(powers), e.size))
        for k, n in enumerate(powers):
            rows[k] = 1.0 if n == 0.0 else e**n
        rows.setflags(write=False)
        if len(_ROWS) >= 64:
            _ROWS.pop(next(iter(_ROWS)), None)
        _ROWS[key] = rows
    return rows


class RateTerms:
    """A scattering rate on a Debye branch's nodes, kept as columns: rate[i, j] = sum_k cols[i, k] e_j^powers[k].

    On a Debye branch omega at node j of temperature i is (omega_max u_hi_i)
    e_j, so a rate sum_n c_n(T) omega^n (:meth:`Mechanism.rate_terms`) is held
    by one column per power -- c_n(T_i) (omega_max u_hi_i)^n, checked finite
    and >= 0 -- and the node rows e_j^n; all mechanisms of a branch then sum
    in one matrix product (:meth:`_BranchNodes.assemble`).
    """

    __slots__ = ("powers", "cols")

    def __init__(self, powers: tuple, cols: np.ndarray):
        self.powers = powers
        self.cols = cols

    def full(self, rule: str = "debye") -> np.ndarray:
        """The rate at every node [s^-1], shape (n_T, n_nodes)."""
        return np.dot(self.cols, _power_rows(rule, self.powers))


def _side_by_side(owners) -> tuple:
    """The columns of several ``(mechanism, RateTerms)`` pairs side by side, and their powers."""
    if len(owners) == 1:
        t = owners[0][1]
        return t.cols, t.powers
    return (np.concatenate([t.cols for _m, t in owners], axis=1),
            sum((t.powers for _m, t in owners), ()))


class _BranchNodes:
    """Quadrature nodes, Planck-weighted integrand and kept rates of one branch on one temperature grid.

    Holds ``wbase`` = weight x integrand / tau (so an integral is a sum of
    ``wbase / rate``), the two lowest columns of the integrand for the
    closed-form tail, and omega at the nodes (what mechanisms see; built on
    first use on a Debye branch, whose rates usually come as
    :class:`RateTerms` from ``scale`` = omega_max u_hi, the per-temperature
    factor of omega). Scratch arrays for the sums are kept per thread, so
    repeated calls allocate nothing big.
    """

    __slots__ = ("branch", "T", "u_hi", "_omega", "wbase", "base01", "u0", "log_ratio", "rates", "shape", "_vg",
                 "ones", "separable", "scale")

    def __init__(self, branch: Branch, T: np.ndarray):
        # x = hbar omega / kB T at the zone edge (theta / T on a Debye branch; read from omega_max so
        # that any convention for a sine branch's zone-edge frequency is followed)
        x_max = (hbar * branch.omega_max / kB) / T
        r = np.minimum(1.0, quad.X_CUT / x_max)
        sine = branch.dispersion == "sine"
        u_hi = (2.0 / np.pi) * np.arcsin(r) if sine else r
        _, weights, exp_off = quad._RULES[branch.dispersion]
        pref = branch.polarizations * branch.q_max**3 * kB / (6.0 * np.pi**2)
        # wbase = weight * pref * v_g^2 * Planck * u^2, with weight = rule weight * u (du = u ds)
        if sine:
            u = u_hi[:, None] * exp_off[None, :]
            wbase = u * u
            wbase *= u
            omega = branch.omega_of_u(u)
            vg = branch.group_velocity_of_u(u)
            wbase *= vg
            wbase *= vg
            wbase *= (pref * weights)[None, :]
            x = omega * (hbar / kB)
            x /= T[:, None]
            _planck_on_nodes(x)
            wbase *= x
            omega.setflags(write=False)  # shared with the mechanisms (and their kept powers of omega)
        else:
            # Debye: u = u_hi(T) e_j and x = u x_max factor into a column and a row, so
            # wbase = u_hi^3 (pref v^2 w_j e_j^3) ((x/2) / sinh(x/2))^2: two rank-one products (np.dot
            # hands them to BLAS: twice as fast as np.multiply.outer or a broadcast product on these
            # shapes, and four times np.matmul, which does not), one sinh and three in-place passes
            h = np.dot((0.5 * u_hi * x_max)[:, None], exp_off[None, :], out=_scratch((T.size, exp_off.size))[0])
            wbase = np.sinh(h)
            np.divide(h, wbase, out=wbase)
            np.multiply(wbase, wbase, out=wbase)
            wbase *= np.dot((pref * branch.velocity**2 * u_hi**3)[:, None], (weights * exp_off**3)[None, :], out=h)
            omega = None
        self.branch = branch
        self.T = T
        self.u_hi = u_hi
        self.separable = not sine
        self.scale = branch.omega_max * u_hi
        self._omega = omega
        self.wbase = wbase
        w01 = weights[:2] * exp_off[:2] * u_hi[:, None]
        self.base01 = wbase[:, :2] / w01
        self.u0 = u_hi * exp_off[0]
        self.log_ratio = quad.log_ratio(branch.dispersion)
        self.shape = wbase.shape
        self.ones = _ones(wbase.shape[1])
        self.rates: dict = {}
        self._vg = None

    @property
    def omega(self) -> np.ndarray:
        """Angular frequency at the nodes [rad/s], shape (n_T, n_nodes), read-only."""
        if self._omega is None:
            om = np.dot(self.scale[:, None], quad._RULES[self.branch.dispersion][2][None, :])
            om.setflags(write=False)  # shared with the mechanisms (and their kept powers of omega)
            self._omega = om
        return self._omega

    def assemble(self, out: np.ndarray, full: list, owners: list) -> np.ndarray:
        """Sum of rates on the nodes: :class:`RateTerms` in one matrix product, plus full arrays.

        ``owners`` holds ``(mechanism, RateTerms)`` pairs (their columns are
        checked here, see :func:`check_columns`), ``full`` checked arrays.
        ``out`` receives the sum unless a single full-shape array is the
        whole of it (then that is returned, read only from here on).
        """
        if not owners:
            return _sum_into(out, full)
        cols, powers = _side_by_side(owners)
        check_columns(self, cols, owners)
        np.dot(cols, _power_rows(self.branch.dispersion, powers), out=out)
        for r in full:
            np.add(out, r, out=out)
        return out

    def tail(self, f01):
        """Closed-form integral below the lowest node from the integrand at the two lowest nodes."""
        return quad.tail_from_columns(self.u0, f01[:, 0], f01[:, 1], self.log_ratio)

    def tails(self, f01):
        """:meth:`tail` of several integrands at once, ``f01`` of shape (k, n_T, 2) -> (k, n_T).

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
        """Group velocity at the nodes [m/s] (a float on a Debye branch)."""
        if self._vg is None:
            b = self.branch
            if b.dispersion == "sine":
                self._vg = b.group_velocity_of_u(self.u_hi[:, None] * quad._RULES["sine"][2][None, :])
            else:
                self._vg = b.velocity
        return self._vg

    def full(self):
        """u, weights, Planck weight at the nodes (rebuilt: for heat capacity and spectra)."""
        b = self.branch
        _, weights, exp_off = quad._RULES[b.dispersion]
        u = self.u_hi[:, None] * exp_off[None, :]
        x = (hbar / kB) * self.omega / self.T[:, None]
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
        try:
            return self._nodes[branch]
        except KeyError:
            pass
        n = _BranchNodes(branch, self.temperature)
        with _LOCK:
            if len(self._nodes) >= 16:
                self._nodes.pop(next(iter(self._nodes)), None)
            return self._nodes.setdefault(branch, n)


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


def _checked_terms(mech, nodes):
    """A mechanism's rate on a Debye branch's nodes as :class:`RateTerms`, or None when it has no such form.

    The columns c_n(T) (omega_max u_hi)^n are checked (finite and >= 0) where
    the rates of a branch are summed, all mechanisms at once
    (:func:`check_columns`); call inside ``np.errstate(all="ignore")``.
    """
    branch = nodes.branch
    try:
        terms = mech.rate_terms(branch, nodes.T)
        if terms is None:
            return None
        terms = tuple(terms)
        cols = np.empty((nodes.T.size, len(terms)))
        powers = []
        for k, (n, c) in enumerate(terms):
            n = float(n)
            if n < 0.0:  # e_j^n would grow without bound toward low frequency: checked on every node instead
                return None
            cols[:, k] = c
            if n != 0.0:
                cols[:, k] *= nodes.scale**n
            powers.append(n)
    except (KineticError, MemoryError, KeyboardInterrupt):
        raise
    except Exception as exc:
        raise ModelError(
            f"mechanism {mech.name!r} ({type(mech).__name__}) failed on branch {branch.name!r}: "
            f"{type(exc).__name__}: {exc}"
        ) from exc
    return RateTerms(tuple(powers), cols)


def check_columns(nodes, cols: np.ndarray, owners) -> None:
    """Refuse RateTerms columns that are not finite and >= 0, naming the mechanism.

    ``cols`` are the columns of every RateTerms of a branch side by side,
    ``owners`` the ``(mechanism, RateTerms)`` pairs they came from. The node
    rows e_j^n are positive and at most 1 (e_j^n for n >= 0), so finite,
    non-negative columns with a finite sum give finite, non-negative rates.
    Two reductions over n_T x k numbers: the check costs O(n_T), not O(n_T x
    nodes). A bad column is described by :func:`_checked_rate` on the full
    nodes (the mechanism, the branch, omega and T of the first bad value).
    """
    if not cols.size or (cols.min() >= 0.0 and np.isfinite(cols.sum())):
        return
    branch = nodes.branch
    for mech, t in owners:
        if not (t.cols.min() >= 0.0 and np.isfinite(t.cols.sum())):
            _checked_rate(mech, branch, nodes.omega, nodes.T[:, None])
            raise ModelError(
                f"mechanism {mech.name!r} ({type(mech).__name__}) returned scattering rates too large to "
                f"represent on branch {branch.name!r}; a rate 1/tau must be finite and >= 0 [s^-1]"
            )
    raise ModelError(f"the scattering rates on branch {branch.name!r} are too large to sum "
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
