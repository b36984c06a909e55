"""LatticeModel: Debye/Callaway phonon thermal conductivity.

For each branch b (polarisations p_b, zone-edge wavevector q_b),

    kappa_b = p_b / (6 pi^2) int_0^{q_b} C(x) v_g^2 tau q^2 dq,
    C(x) = kB x^2 e^x / (e^x - 1)^2,   x = hbar omega / (kB T),

the kinetic-theory sum over an isotropic branch. With a Debye branch
(omega = v q) and three polarisations this is Callaway's
kappa = (kB / 2 pi^2 v)(kB T / hbar)^3 int tau x^4 e^x/(e^x-1)^2 dx
(Callaway, Phys. Rev. 113, 1046, 1959, Eq. 8 without the N term).

Resistive rates add by Matthiessen's rule, 1/tau_R = sum_i 1/tau_i. When a
:class:`~kinetic.scattering.Normal` mechanism is present, Callaway's correction
is applied branch by branch:

    kappa_b = I1 + I2^2 / I3,
    I1 = <tau_c>, I2 = <tau_c / tau_N>, I3 = <tau_c / (tau_N tau_R)>,
    1/tau_c = 1/tau_N + 1/tau_R,

where <.> is the kinetic integral above (Callaway 1959, Eqs. 22-24; branch by
branch as in Morelli, Heremans & Slack, Phys. Rev. B 66, 195304, 2002). The
same result is kappa_b = <tau_eff> with tau_eff = tau_c (1 + beta / tau_N),
beta = I2 / I3, which the spectral and mean-free-path outputs use.

Speed. Each temperature array met is prepared once (:class:`TemperatureGrid`,
kept by :func:`prepared_grid`, least recently used dropped): the quadrature
nodes of every branch, omega at the nodes and the Planck-weighted integrand.
The rate of every mechanism instance is kept on the grid too, so a slider move
or a fit step (one parameter changed) recomputes one rate and the sums, with no
Python loop over temperatures or frequencies. Mechanisms are frozen
dataclasses, so an instance's rate depends only on its fields.

Safety. A rate that is NaN, infinite or negative is refused once, when it is
first computed, with a :class:`~kinetic.errors.ModelError` naming the
mechanism, the branch, omega and T. A branch that no mechanism bounds at long
wavelength (no boundary term) is refused where more than 1 % of its heat would
be carried by phonons with mean free paths beyond 1 m. Temperatures may be
pint quantities (see :mod:`kinetic.quantities`).

Derivatives. :meth:`LatticeModel.kappa_jacobian` differentiates the integrals
exactly for every parameter whose rate goes as a power of it
(``Parameter.rate_power``), Callaway's term included.
"""
from __future__ import annotations

import threading
from collections import OrderedDict
from dataclasses import dataclass
from typing import Iterable, Mapping, Sequence

import numpy as np
from scipy.constants import hbar, k as kB

from . import quadrature as quad
from ._validate import temperatures as _check_T, nonnegative, positive
from .dispersion import Branch
from .errors import KineticError, ModelError, ParameterError
from .quantities import to_si
from .scattering import Mechanism, mechanism_from_dict

__all__ = ["LatticeModel", "Spectrum", "TemperatureGrid", "prepared_grid", "clear_cache"]

#: Temperature arrays up to this size get a prepared grid that is kept for
#: later calls (nodes, Planck weights and each mechanism's rates); larger
#: arrays are done in blocks of this many temperatures with nothing kept, so
#: memory stays bounded (a block of 4096 x 96 nodes is 3 MiB per array).
BLOCK_T = 4096
#: Prepared grids kept (least recently used dropped first).
CACHE_GRIDS = 16
#: Rates kept per branch of a grid (one per mechanism instance met).
CACHE_RATES = 64
#: Mean free path [m] beyond any specimen (the boundary length's upper bound is
#: 0.1 m); see MAX_LONG_PATH_SHARE.
MAX_MEAN_FREE_PATH = 1.0
#: Largest share of a branch's conductivity allowed to come from phonons with
#: mean free paths beyond MAX_MEAN_FREE_PATH when no mechanism bounds them: above
#: it the result depends on a specimen size the model does not know.
MAX_LONG_PATH_SHARE = 0.01

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


class _BranchNodes:
    """Quadrature nodes, Planck-weighted integrand and kept rates of one branch on one temperature grid.

    Holds omega at the nodes (what mechanisms see), ``wbase`` = weight x
    integrand / tau (so an integral is a sum of ``wbase / rate``) and the two
    lowest columns of the integrand for the closed-form tail. Scratch arrays
    for the sums are kept per thread, so repeated calls allocate nothing big.
    """

    __slots__ = ("branch", "T", "u_hi", "omega", "wbase", "base01", "u0", "log_ratio", "rates", "shape", "_vg",
                 "ones")

    def __init__(self, branch: Branch, T: np.ndarray):
        x_max = branch.debye_temperature / T
        r = np.minimum(1.0, quad.X_CUT / x_max)
        sine = branch.dispersion == "sine"
        u_hi = (2.0 / np.pi) * np.arcsin(r) if sine else r
        _, weights, exp_off = quad._RULES[branch.dispersion]
        u = u_hi[:, None] * exp_off[None, :]
        pref = branch.polarizations * branch.q_max**3 * kB / (6.0 * np.pi**2)
        # wbase = weight * pref * v_g^2 * Planck * u^2, with weight = rule weight * u (du = u ds)
        wbase = u * u
        wbase *= u
        if sine:
            omega = branch.omega_of_u(u)
            vg = branch.group_velocity_of_u(u)
            wbase *= vg
            wbase *= vg
            wbase *= (pref * weights)[None, :]
            x = omega * (hbar / kB)
            x /= T[:, None]
            _planck_on_nodes(x)
        else:
            wbase *= (pref * branch.velocity**2 * weights)[None, :]
            buf = _scratch(u.shape)
            x = np.multiply(u, x_max[:, None], out=buf[0])
            omega = u
            omega *= branch.omega_max
            _planck_on_nodes(x, buf[1])
        wbase *= x
        self.branch = branch
        self.T = T
        self.u_hi = u_hi
        self.omega = omega
        self.wbase = wbase
        w01 = weights[None, :2] * (u_hi[:, None] * exp_off[None, :2])
        self.base01 = wbase[:, :2] / w01
        self.u0 = u_hi * exp_off[0]
        self.log_ratio = quad.log_ratio(branch.dispersion)
        self.shape = wbase.shape
        self.ones = np.ones(wbase.shape[1])
        self.rates: dict = {}
        self._vg = None

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
    >>> from kinetic import Branch, Boundary
    >>> g = prepared_grid(np.linspace(10.0, 300.0, 30))
    >>> g is prepared_grid(np.linspace(10.0, 300.0, 30))   # the same array meets the same grid
    True
    >>> m = LatticeModel([Branch(5000.0, 400.0)], [Boundary(1e-3)])
    >>> bool(np.all(m.kappa(g) == m.kappa(np.linspace(10.0, 300.0, 30))))
    True
    """

    def __init__(self, temperature):
        T = np.ascontiguousarray(_temperature(temperature), dtype=float)
        self.shape = T.shape
        self.temperature = T.ravel()
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
    T = np.ascontiguousarray(_temperature(temperature), dtype=float)
    if T.size > BLOCK_T:
        return TemperatureGrid(T)
    key = _key(T)
    with _LOCK:
        g = _GRIDS.get(key)
        if g is None:
            g = _GRIDS[key] = TemperatureGrid(T)
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


@dataclass(frozen=True)
class Spectrum:
    """Spectral and mean-free-path resolved conductivity at one temperature.

    Attributes
    ----------
    temperature : float
        [K]
    omega : dict of str -> ndarray
        Angular-frequency grid of each branch [rad s^-1].
    kappa_omega : dict of str -> ndarray
        Conductivity per unit angular frequency, d kappa / d omega, of each
        branch [W m^-1 K^-1 / (rad s^-1)].
    cumulative : dict of str -> ndarray
        Running integral of ``kappa_omega`` over ``omega`` [W m^-1 K^-1].
    mfp : ndarray
        Mean free paths v_g tau_eff of all quadrature nodes, ascending [m].
    kappa_accumulated : ndarray
        Conductivity carried by phonons with mean free path <= ``mfp``
        [W m^-1 K^-1]; its last value is the total conductivity.
    kappa : float
        Total lattice conductivity [W m^-1 K^-1].
    """

    temperature: float
    omega: dict
    kappa_omega: dict
    cumulative: dict
    mfp: np.ndarray
    kappa_accumulated: np.ndarray
    kappa: float

    def fraction_below(self, length):
        """Fraction of kappa carried by phonons with mean free path <= length [m]."""
        length = np.asarray(length, dtype=float)
        acc = np.interp(np.log(np.maximum(length, 1e-300)), np.log(self.mfp), self.kappa_accumulated,
                        left=0.0, right=self.kappa)
        return np.clip(acc / self.kappa, 0.0, 1.0)

    def fraction_above(self, length):
        """Fraction of kappa carried by phonons with mean free path > length [m]."""
        return 1.0 - self.fraction_below(length)

    @property
    def median_mfp(self) -> float:
        """Mean free path below which half the heat is carried [m]."""
        return float(np.exp(np.interp(0.5 * self.kappa, self.kappa_accumulated, np.log(self.mfp))))


@dataclass(frozen=True)
class LatticeModel:
    """Lattice thermal conductivity from branches and scattering mechanisms.

    Parameters
    ----------
    branches : sequence of Branch
        Acoustic branches; one averaged three-fold branch reproduces Callaway's
        formulation, a longitudinal plus a doubly degenerate transverse branch
        the split-branch (Holland-type) one. Branch names must be unique.
    scattering : sequence of Mechanism
        Scattering mechanisms; names must be unique.
    normal_correction : bool
        Apply Callaway's correction for Normal processes (default). When False
        Normal rates are simply added to the resistive ones (Matthiessen).
    material : str, optional
        Name of the material the model was built from (kept in records).

    Raises
    ------
    ParameterError
        For duplicate names, a branch with no resistive scattering, or
        anything that is not a Branch / Mechanism.
    """

    branches: tuple
    scattering: tuple
    normal_correction: bool = True
    material: str | None = None

    def __post_init__(self):
        branches = tuple(self.branches)
        scattering = tuple(self.scattering)
        if not branches:
            raise ParameterError("branches must hold at least one Branch")
        for b in branches:
            if not isinstance(b, Branch):
                raise ParameterError(f"branches must be Branch objects, got {b!r}")
        for m in scattering:
            if not isinstance(m, Mechanism):
                raise ParameterError(f"scattering must be mechanism objects, got {m!r}")
        bnames = [b.name for b in branches]
        if len(set(bnames)) != len(bnames):
            raise ParameterError(f"branch names must be unique, got {bnames}")
        mnames = [m.name for m in scattering]
        dup = sorted({n for n in mnames if mnames.count(n) > 1})
        if dup:
            raise ParameterError(
                f"two mechanisms are named {dup[0]!r}; pass name='...' to tell them apart"
            )
        for m in scattering:
            if m.applies_to is not None:
                missing = [n for n in m.applies_to if n not in bnames]
                if missing:
                    raise ParameterError(
                        f"{m.name}.applies_to names branch {missing[0]!r}; branches are: {', '.join(bnames)}"
                    )
        for b in branches:
            if not any(m.applies(b) and (m.resistive or not self.normal_correction) for m in scattering):
                raise ParameterError(
                    f"branch {b.name!r} has no resistive scattering, so its conductivity is infinite; "
                    "add e.g. Boundary(length) or Umklapp(...)"
                )
        object.__setattr__(self, "branches", branches)
        object.__setattr__(self, "scattering", scattering)

    # --- construction -------------------------------------------------------------
    @classmethod
    def from_material(cls, material, scattering: Iterable[Mechanism] = (), *, split_branches: bool = False,
                      dispersion: str = "debye", normal_correction: bool = True) -> "LatticeModel":
        """Model with the branches of a :class:`kinetic.materials.Material`.

        ``split_branches=False`` gives one averaged three-fold branch (Debye
        average velocity, the material's Debye temperature); True gives a
        longitudinal ``"L"`` and a doubly degenerate transverse ``"T"`` branch.
        """
        if isinstance(material, str):
            from . import materials as _materials

            material = _materials.get(material)
        return cls(material.branches(split=split_branches, dispersion=dispersion), tuple(scattering),
                   normal_correction=normal_correction, material=material.name)

    # --- parameters ---------------------------------------------------------------
    @property
    def mechanism_names(self) -> tuple:
        return tuple(m.name for m in self.scattering)

    @property
    def branch_names(self) -> tuple:
        return tuple(b.name for b in self.branches)

    def mechanism(self, name: str) -> Mechanism:
        for m in self.scattering:
            if m.name == name:
                return m
        raise ParameterError(
            f"no mechanism named {name!r}; the model has: {', '.join(self.mechanism_names) or '(none)'}"
        )

    @property
    def params(self) -> dict:
        """``{"<mechanism>.<param>": value}`` for every parameter."""
        return {f"{m.name}.{p}": v for m in self.scattering for p, v in m.values.items()}

    def parameter_info(self) -> dict:
        """``{"<mechanism>.<param>": Parameter}`` with units, bounds and scale."""
        return {f"{m.name}.{p}": par for m in self.scattering for p, par in m.parameters.items()}

    def with_params(self, values: Mapping[str, float]) -> "LatticeModel":
        """A new model with some ``"<mechanism>.<param>"`` values replaced."""
        grouped: dict = {}
        known = self.params
        for key, v in dict(values).items():
            if key not in known:
                raise ParameterError(
                    f"unknown parameter {key!r}; valid names: {', '.join(known)}"
                )
            mname, pname = key.split(".", 1)
            grouped.setdefault(mname, {})[pname] = v
        new = tuple(m.with_values(**grouped[m.name]) if m.name in grouped else m for m in self.scattering)
        return self._replace(scattering=new)

    def with_mechanism(self, mechanism: Mechanism) -> "LatticeModel":
        """Add a mechanism, or replace the one with the same name."""
        if mechanism.name in self.mechanism_names:
            new = tuple(mechanism if m.name == mechanism.name else m for m in self.scattering)
        else:
            new = self.scattering + (mechanism,)
        return self._replace(scattering=new)

    def without(self, *names: str) -> "LatticeModel":
        """A new model without the named mechanisms."""
        for n in names:
            self.mechanism(n)
        return self._replace(scattering=tuple(m for m in self.scattering if m.name not in names))

    def with_branches(self, branches) -> "LatticeModel":
        return self._replace(branches=tuple(branches))

    def _replace(self, **kw) -> "LatticeModel":
        d = dict(branches=self.branches, scattering=self.scattering,
                 normal_correction=self.normal_correction, material=self.material)
        d.update(kw)
        return LatticeModel(**d)

    # --- rates --------------------------------------------------------------------
    def has_normal_correction(self, branch: Branch) -> bool:
        """True when Callaway's Normal-process term applies on this branch."""
        return self.normal_correction and any(
            (not m.resistive) and m.applies(branch) for m in self.scattering)

    def _split_rates(self, omega, T, branch):
        """Resistive and Normal rates [s^-1] on a common broadcast shape."""
        r_res = 0.0
        r_n = 0.0
        for m in self.scattering:
            if not m.applies(branch):
                continue
            r = m.rate(omega, T, branch)
            if m.resistive or not self.normal_correction:
                r_res = r_res + r
            else:
                r_n = r_n + r
        return np.asarray(r_res), np.asarray(r_n)

    def rates(self, omega, temperature) -> dict:
        """Relaxation rate of each mechanism on each branch.

        Parameters
        ----------
        omega : array_like or pint Quantity
            Angular frequency [rad s^-1].
        temperature : float or array_like or pint Quantity
            [K], broadcast against omega.

        Returns
        -------
        dict
            ``{branch name: {mechanism name: rate [s^-1]}}`` (mechanisms that
            do not apply to a branch are left out of its entry).
        """
        T = _temperature(temperature)
        omega = np.asarray(nonnegative("omega", to_si(omega, "rad/s", "omega"), unit="rad/s"), dtype=float)
        shape = np.broadcast_shapes(omega.shape, np.shape(T))
        return {
            b.name: {m.name: np.broadcast_to(m.rate(omega, T, b), shape).copy()
                     for m in self.scattering if m.applies(b)}
            for b in self.branches
        }

    # --- integrals ----------------------------------------------------------------
    def _node_rates(self, nodes: _BranchNodes, Tcol, mech):
        """A mechanism's rate on a branch's nodes, kept on the grid for the next call."""
        try:
            return nodes.rates[mech]
        except KeyError:
            pass
        except TypeError:  # a mechanism with unhashable fields: not kept
            return _checked_rate(mech, nodes.branch, nodes.omega, Tcol)
        r = _checked_rate(mech, nodes.branch, nodes.omega, Tcol)
        with _LOCK:
            if len(nodes.rates) >= CACHE_RATES:
                nodes.rates.pop(next(iter(nodes.rates)), None)
            nodes.rates[mech] = r
        return r

    def _branch_sums(self, grid: TemperatureGrid, branch: Branch):
        """Callaway integrals of one branch on a prepared grid.

        Returns ``(I1, I2, I3, ctx)``, ``ctx`` holding the node arrays reused by
        the Jacobian, the spectral output and the mean-free-path check.
        """
        nodes = grid.nodes(branch)
        Tcol = grid.Tcol
        corr = self.has_normal_correction(branch)
        res, nrm = [], []
        for m in self.scattering:
            if m.applies(branch):
                r = self._node_rates(nodes, Tcol, m)
                (res if (m.resistive or not self.normal_correction) else nrm).append(r)
        buf = nodes.scratch()
        r_res = _sum_into(buf[0], res)
        r_n = _sum_into(buf[1], nrm) if corr else None
        r_c, f1 = buf[2], buf[3]
        if corr:
            np.add(r_res, r_n, out=r_c)
        else:
            r_c = r_res
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            np.divide(nodes.wbase, r_c, out=f1)
            I1 = f1 @ nodes.ones  # row sums (matrix-vector product: faster than .sum on these shapes)
            if corr:
                I2 = np.einsum("ij,ij->i", f1, r_n)
                g = np.multiply(f1, r_res, out=buf[4])
                I3 = np.einsum("ij,ij->i", g, r_n)
                F = np.empty((3,) + I1.shape + (2,))
                np.divide(nodes.base01, r_c[:, :2], out=F[0])
                np.multiply(F[0], r_n[:, :2], out=F[1])
                np.multiply(F[1], r_res[:, :2], out=F[2])
                tails = nodes.tails(F)
                I1 += tails[0]
                I2 += tails[1]
                I3 += tails[2]
                F1 = F[0]
            else:
                F1 = nodes.base01 / r_c[:, :2]
                I1 += nodes.tails(F1[None])[0]
                I2 = I3 = np.zeros_like(I1)
        return I1, I2, I3, (nodes, f1, F1, r_c, r_res, r_n, corr)

    @staticmethod
    def _combine(I1, I2, I3):
        """Callaway's kappa = I1 + I2^2 / I3 (I3 = 0 without Normal processes)."""
        return I1 + np.divide(I2 * I2, I3, out=np.zeros_like(I1), where=I3 > 0)

    def _check_mean_free_path(self, grid, branch, I1, ctx):
        """Refuse a branch whose heat is carried by phonons with unbounded mean free paths.

        Only for branches without a mechanism that bounds the mean free path
        (``limits_mean_free_path``, e.g. a boundary): the share of I1 carried by
        phonons with mean free paths v_g tau_c beyond :data:`MAX_MEAN_FREE_PATH`
        (tail below the lowest node included) must stay under
        :data:`MAX_LONG_PATH_SHARE`.
        """
        if any(getattr(m, "limits_mean_free_path", False) and m.applies(branch) for m in self.scattering):
            if not np.all(np.isfinite(I1)):
                i = int(np.flatnonzero(~np.isfinite(I1))[0])
                raise ModelError(
                    f"branch {branch.name!r} at T = {grid.temperature[i]:.4g} K: the conductivity integral is not "
                    "finite (a total scattering rate of zero at some frequency)"
                )
            return
        nodes, f1, F1, r_c, *_ = ctx
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            long = (np.broadcast_to(nodes.vg, f1.shape) / r_c) > MAX_MEAN_FREE_PATH
            share = (np.einsum("ij,ij->i", f1, long) + np.where(long[:, 0], I1 - f1.sum(axis=1), 0.0)) / I1
        bad = ~(share <= MAX_LONG_PATH_SHARE)
        if np.any(bad):
            i = int(np.flatnonzero(bad)[0])
            raise ModelError(
                f"branch {branch.name!r} at T = {grid.temperature[i]:.4g} K: {100 * min(share[i], 1.0):.3g}% of the "
                f"heat would be carried by phonons with mean free paths beyond {MAX_MEAN_FREE_PATH:g} m, longer than "
                "any specimen, because no mechanism limits long-wavelength phonons; add a boundary term, e.g. "
                "Boundary(length=1e-3) for a 1 mm sample"
            )

    def _parts_on_grid(self, grid: TemperatureGrid) -> dict:
        out = {}
        for b in self.branches:
            I1, I2, I3, ctx = self._branch_sums(grid, b)
            self._check_mean_free_path(grid, b, I1, ctx)
            out[b.name] = self._combine(I1, I2, I3)
        return out

    def kappa_parts(self, temperature) -> dict:
        """Lattice conductivity of each branch [W m^-1 K^-1], shaped like temperature.

        ``temperature`` [K] may be a number, an array, a pint quantity (any
        temperature unit) or a :class:`TemperatureGrid`.

        Raises
        ------
        ParameterError
            For temperatures that are not finite and > 0, or not temperatures.
        ModelError
            When a mechanism returns a NaN, infinite or negative rate (the
            message names it) or nothing limits the mean free path of
            long-wavelength phonons (no boundary term).
        """
        grid = temperature if isinstance(temperature, TemperatureGrid) else _cached_grid(temperature)
        if grid is not None:
            return {k: v.reshape(grid.shape) for k, v in self._parts_on_grid(grid).items()}
        T = _temperature(temperature)
        shape = np.shape(T)
        Tf = np.ascontiguousarray(np.atleast_1d(T), dtype=float).ravel()
        if Tf.size <= BLOCK_T:
            parts = self._parts_on_grid(prepared_grid(Tf))
        else:
            blocks = [self._parts_on_grid(TemperatureGrid(Tf[i:i + BLOCK_T])) for i in range(0, Tf.size, BLOCK_T)]
            parts = {b.name: np.concatenate([blk[b.name] for blk in blocks]) for b in self.branches}
        return {k: v.reshape(shape) for k, v in parts.items()}

    def kappa(self, temperature):
        """Lattice thermal conductivity [W m^-1 K^-1] at each temperature [K].

        ``temperature`` may be a number, an array or a pint quantity; see
        :meth:`kappa_parts` for the errors.

        Examples
        --------
        >>> from kinetic import Branch, Boundary
        >>> m = LatticeModel([Branch(5000.0, 400.0)], [Boundary(1e-3)])
        >>> round(float(m.kappa(1.0)), 4)   # Casimir limit: 1.6308 W/m/K
        1.6308
        """
        parts = self.kappa_parts(temperature)
        total = None
        for v in parts.values():
            total = v.copy() if total is None else total + v
        return total

    def kappa_jacobian(self, temperature, names: Sequence[str]):
        """Conductivity and its derivatives with respect to model parameters.

        Parameters
        ----------
        temperature : array_like or pint Quantity
            [K]
        names : sequence of str
            ``"<mechanism>.<param>"`` keys of :attr:`params`.

        Returns
        -------
        kappa : ndarray
            [W m^-1 K^-1], shaped like ``temperature``.
        J : ndarray
            ``J[..., j] = d kappa / d params[names[j]]`` in the parameter's own
            (natural, not log) unit, shape ``temperature.shape + (len(names),)``.

        Notes
        -----
        A parameter whose mechanism's rate goes as a power of it
        (``Parameter.rate_power``, e.g. a coefficient entering linearly, or a
        boundary length as 1/L) gets the exact derivative of the integrals:
        with d(1/tau_m)/dc = k (1/tau_m) / c, dI1 = -<rho / tau_c^-2>,
        dI2 and dI3 likewise, and
        d kappa = dI1 + (2 I2 dI2 I3 - I2^2 dI3) / I3^2 (Callaway's term
        differentiated). Other parameters (exponents, specularity, Umklapp b)
        get a central difference (one-sided at a bound) on the same nodes.

        Examples
        --------
        >>> from kinetic import Branch, Boundary
        >>> m = LatticeModel([Branch(5000.0, 400.0)], [Boundary(1e-3)])
        >>> k, J = m.kappa_jacobian([1.0], ["boundary.length"])
        >>> round(float(J[0, 0] * 1e-3 / k[0]), 9)   # Casimir: kappa proportional to L
        1.0
        """
        names = [names] if isinstance(names, str) else list(names)
        # rate power of every parameter, from the class declarations (cheaper than parameter_info)
        info = {f"{m.name}.{p}": m._spec[p].power for m in self.scattering for p in m._spec
                if getattr(m, p) is not None}
        for n in names:
            if n not in info:
                raise ParameterError(f"unknown parameter {n!r}; valid names: {', '.join(info)}")
        grid = _cached_grid(temperature)
        if grid is not None:
            T, shape, Tf = grid.temperature, grid.shape, grid.temperature
        else:
            T = _temperature(temperature)
            shape = np.shape(T)
            Tf = np.ascontiguousarray(np.atleast_1d(T), dtype=float).ravel()
        if Tf.size > BLOCK_T:
            pieces = [self.kappa_jacobian(Tf[i:i + BLOCK_T], names) for i in range(0, Tf.size, BLOCK_T)]
            k = np.concatenate([p[0] for p in pieces])
            J = np.concatenate([p[1] for p in pieces])
            return k.reshape(shape), J.reshape(shape + (len(names),))
        grid = grid or prepared_grid(Tf)
        J = np.zeros((Tf.size, len(names)))
        analytic = [j for j, n in enumerate(names) if info[n] is not None]
        kappa = np.zeros(Tf.size)
        for b in self.branches:
            I1, I2, I3, ctx = self._branch_sums(grid, b)
            self._check_mean_free_path(grid, b, I1, ctx)
            kappa += self._combine(I1, I2, I3)
            if analytic:
                self._branch_jacobian(grid, b, I1, I2, I3, ctx, names, analytic, info, J)
        for j, n in enumerate(names):
            if info[n] is None:
                J[:, j] = self._difference(grid, n, self.parameter_info()[n])
        return kappa.reshape(shape), J.reshape(shape + (len(names),))

    def _branch_jacobian(self, grid, branch, I1, I2, I3, ctx, names, analytic, info, J):
        """Add one branch's exact derivatives d kappa_b / d c for the power-law parameters to J."""
        nodes, f1, F1, r_c, r_res, r_n, corr = ctx
        mechs = {m.name: m for m in self.scattering}
        todo = []  # (column j, mechanism, d rate / d value = c * rate)
        for j in analytic:
            mname, pname = names[j].split(".", 1)
            mech = mechs[mname]
            if mech.applies(branch):
                todo.append((j, mech, info[names[j]] / float(getattr(mech, pname))))
        if not todo:
            return
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            h = f1 / r_c  # weight * base / r_c^2
            H = F1 / r_c[:, :2]
            stacks = {}

            def stack(kind):
                # (h, h s, h s^2) and their two lowest columns, s = r_n (resistive) or r_res (Normal)
                if kind not in stacks:
                    if not corr:
                        stacks[kind] = (h[None], H[None])
                    else:
                        sv = r_n if kind == "res" else r_res
                        hs = h * sv
                        s01 = sv[:, :2]
                        Hs = H * s01
                        stacks[kind] = (np.stack([h, hs, hs * sv]), np.stack([H, Hs, Hs * s01]))
                return stacks[kind]

            sums, cols = [], []
            for j, mech, c in todo:
                kind = "res" if (mech.resistive or not self.normal_correction) else "n"
                Hk, H01 = stack(kind)
                rho = np.broadcast_to(self._node_rates(nodes, grid.Tcol, mech), nodes.shape)
                sums.append(np.einsum("kij,ij->ki", Hk, rho))
                cols.append(H01 * rho[None, :, :2])
            tails = nodes.tails(np.concatenate(cols))
        at = 0
        I3s = np.where(I3 > 0, I3, 1.0)
        for (j, mech, c), sm in zip(todo, sums):
            k = sm.shape[0]
            abc = sm + tails[at:at + k]
            at += k
            if not corr:
                J[:, j] -= c * abc[0]
                continue
            dI1 = -abc[0]
            if mech.resistive or not self.normal_correction:
                dI2, dI3 = -abc[1], abc[2]
            else:
                dI2, dI3 = abc[1], abc[2]
            dk = dI1 + np.where(I3 > 0, (2.0 * I2 * dI2 * I3 - I2 * I2 * dI3) / (I3s * I3s), 0.0)
            J[:, j] += c * dk

    def _difference(self, grid, name, par):
        """d kappa / d param by a central difference on the same nodes (one-sided at a bound)."""
        v = float(par.value)
        lo, hi = par.bounds
        span = (hi - lo) if np.isfinite(hi - lo) else 1.0
        h = 1e-5 * max(abs(v), 1e-3 * span)

        def k_at(x):
            try:
                m = self.with_params({name: x})
            except ParameterError:
                return None
            return sum(m._parts_on_grid(grid).values())

        kp, km = k_at(v + h), k_at(v - h)
        if kp is not None and km is not None:
            return (kp - km) / (2.0 * h)
        k0 = sum(self._parts_on_grid(grid).values())
        if kp is not None:
            return (kp - k0) / h
        if km is not None:
            return (k0 - km) / h
        raise ParameterError(f"{name}: cannot step the value {v!r} by {h:g} inside its valid range")

    def heat_capacity(self, temperature):
        """Debye heat capacity per volume of the branches [J m^-3 K^-1] at temperatures [K]."""
        T = _temperature(temperature)
        shape = np.shape(T)
        Tf = np.ascontiguousarray(np.atleast_1d(T), dtype=float).ravel()
        total = np.zeros_like(Tf)
        for i in range(0, Tf.size, BLOCK_T):
            grid = prepared_grid(Tf[i:i + BLOCK_T])
            for b in self.branches:
                nodes = grid.nodes(b)
                pref = b.polarizations * b.q_max**3 * kB / (2.0 * np.pi**2)
                u, w, pw = nodes.full()
                f = pref * pw * u * u
                total[i:i + BLOCK_T] += np.einsum("ij,ij->i", w, f) + nodes.tail(f[:, :2])
        return total.reshape(shape)

    def _branch_integrals(self, branch: Branch, T: np.ndarray):
        """Callaway integrals (I1, I2, I3) and node arrays of one branch (spectral output)."""
        grid = prepared_grid(T)
        I1, I2, I3, (nodes, f1, F1, r_c, r_res, r_n, corr) = self._branch_sums(grid, branch)
        self._check_mean_free_path(grid, branch, I1, (nodes, f1, F1, r_c, r_res, r_n, corr))
        r_nn = r_n if corr else np.zeros(nodes.shape)
        u, w, _ = nodes.full()
        base = nodes.wbase / w
        return I1, I2, I3, (u, w, nodes.omega, nodes.branch.group_velocity_of_u(u), base, 1.0 / r_c, r_nn.copy())

    def spectral(self, temperature: float, n_omega: int = 400) -> Spectrum:
        """Spectral and mean-free-path accumulation at one temperature [K].

        The frequency grid of each branch runs from 0 to the smaller of the
        zone edge and the Planck cut (x = X_CUT) with ``n_omega`` points; the
        mean-free-path accumulation uses the engine's quadrature nodes, so its
        last value equals :meth:`kappa` exactly.
        """
        T = _temperature(temperature)
        if np.size(T) != 1:
            raise ParameterError(f"temperature must be a single number [K], got {np.size(T)} values")
        T = float(np.ravel(T)[0])
        Tf = np.array([T])
        n_omega = int(positive("n_omega", n_omega))
        omegas, k_om, cums, mfps, contribs = {}, {}, {}, [], []
        total = 0.0
        for b in self.branches:
            I1, I2, I3, (u, w, omega, vg, base, tau_c, r_n) = self._branch_integrals(b, Tf)
            beta = float(I2[0] / I3[0]) if I3[0] > 0 else 0.0
            tau_eff = np.broadcast_to(tau_c * (1.0 + beta * r_n), u.shape)
            vg = np.broadcast_to(vg, u.shape)
            contrib = (w * base * tau_eff)[0]
            # quadrature nodes carry the accumulation (tail folded into the lowest node)
            tail = float(quad.lower_tail(u, base * tau_eff)[0])
            contrib[0] += tail
            mfps.append((vg * tau_eff)[0])
            contribs.append(contrib)
            total += float(np.sum(contrib))
            # a plotting grid in omega
            w_hi = min(b.omega_max, quad.X_CUT * kB * T / hbar)
            om = np.linspace(0.0, w_hi, n_omega)[1:]
            ug = b.u_of_omega(om)
            vgg = b.group_velocity_of_u(ug)
            x = (hbar / kB) * om / T
            r_res, r_ng = self._split_rates(om, T, b)
            tau_cg = 1.0 / (r_res + r_ng)
            tau_eg = np.broadcast_to(tau_cg * (1.0 + beta * r_ng), om.shape)
            q = ug * b.q_max
            # d kappa / d omega = p/(6 pi^2) C v_g tau q^2   (dq / domega = 1 / v_g)
            dk = b.polarizations / (6.0 * np.pi**2) * kB * quad.planck_weight(x) * vgg * tau_eg * q * q
            om = np.concatenate([[0.0], om])
            dk = np.concatenate([[0.0], dk])
            omegas[b.name] = om
            k_om[b.name] = dk
            cums[b.name] = np.concatenate([[0.0], np.cumsum(0.5 * (dk[1:] + dk[:-1]) * np.diff(om))])
        mfp = np.concatenate(mfps)
        contrib = np.concatenate(contribs)
        order = np.argsort(mfp)
        return Spectrum(T, omegas, k_om, cums, mfp[order], np.cumsum(contrib[order]), total)

    # --- records ------------------------------------------------------------------
    def to_dict(self) -> dict:
        """JSON-safe specification; :meth:`from_dict` rebuilds the same model."""
        return {
            "branches": [b.to_dict() for b in self.branches],
            "scattering": [m.to_dict() for m in self.scattering],
            "normal_correction": self.normal_correction,
            "material": self.material,
        }

    @classmethod
    def from_dict(cls, d: Mapping) -> "LatticeModel":
        try:
            branches = [Branch.from_dict(b) for b in d["branches"]]
            scattering = [mechanism_from_dict(m) for m in d["scattering"]]
        except (KeyError, TypeError) as exc:
            raise ParameterError(f"model specification is missing {exc}") from None
        return cls(branches, scattering, normal_correction=bool(d.get("normal_correction", True)),
                   material=d.get("material"))
