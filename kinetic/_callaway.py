"""The Callaway sums of :class:`kinetic.LatticeModel` on a prepared grid, and their derivatives.

Kept apart from the model's bookkeeping (:mod:`kinetic.lattice`): this is the
engine's hot path. Per block of branches (one dispersion, rows = branch x
temperature), either every rate comes as :class:`~kinetic.grid.RateTerms` and
1/tau_c and the sums I1, I2, I3 are two matrix products (the power-law route),
or the kept rates are summed on every node and I1 = sum(w base / tau_c^-1), I2
and I3 follow with one product each; the closed-form tails below the lowest
node are added where they matter.
:meth:`_CallawaySums.kappa_jacobian` differentiates the same sums exactly for
power-law parameters.
"""
from __future__ import annotations

from typing import Sequence

import numpy as np

from . import quadrature as quad
from .dispersion import Branch
from .errors import ModelError, ParameterError
from .grid import (BLOCK_T, CACHE_RATE_BYTES, CACHE_RATES, _LOCK, RateTerms, TemperatureGrid, _BranchNodes,
                   _cached_grid, _checked_terms, _new_grid, _power_rows, _prepared_checked, _side_by_side,
                   _temperature, block_rate, check_coefficients, kept)

#: Mean free path [m] beyond any specimen (the boundary length's upper bound is
#: 0.1 m); see MAX_LONG_PATH_SHARE.
MAX_MEAN_FREE_PATH = 1.0
#: Largest share of a branch's conductivity allowed to come from phonons with
#: mean free paths beyond MAX_MEAN_FREE_PATH when no mechanism bounds them: above
#: it the result depends on a specimen size the model does not know.
MAX_LONG_PATH_SHARE = 0.01


_TABLES: dict = {}


def _separable_tables(rule: str, powers_r: tuple, powers_n: tuple):
    """Tables of the power-law route for one layout of columns (kept, read-only).

    Returns ``(rows, V, G, Z)``: the node rows [E_r; E_n] (rate = coefs^T rows);
    the sum matrix V = wrow_j [1, E_n,l, E_n,l E_r,k] (nodes x sums), wrow_j =
    w_j e_j^3 the node factor of a Debye block's weights (see
    :class:`~kinetic.grid._BranchNodes`); G (3 x sums), which adds the
    weighted sums into I1, I2 and I3; and Z (powers x 2), which picks the
    resistive and Normal rates at the lowest node from the coefficients.
    """
    def build():
        kr, kn = len(powers_r), len(powers_n)
        rows = _power_rows(rule, powers_r + powers_n)
        Er, En = rows[:kr], rows[kr:]
        V = np.concatenate([np.ones((1, rows.shape[1])), En] + [En[j] * Er for j in range(kn)]).T.copy()
        _, weights, exp_off = quad._RULES[rule]
        V *= (weights * exp_off**3)[:, None]
        G = np.zeros((3, V.shape[1]))
        G[0, 0] = 1.0
        G[1, 1:1 + kn] = 1.0
        G[2, 1 + kn:] = 1.0
        Z = np.zeros((kr + kn, 2))
        Z[:kr, 0] = Er[:, 0]
        Z[kr:, 1] = En[:, 0]
        return rows, V, G, Z

    return kept(_TABLES, (rule, powers_r, powers_n), build)


class _BranchContext:
    """Node arrays of one branch's sums, for the Jacobian, the spectra and the mean-free-path check.

    ``f1`` (weight x integrand / tau_c^-1 on the nodes) and ``r_c`` are
    per-thread work arrays: read them before the next branch's sums.
    ``F1`` is the I1 integrand at the two lowest nodes (None where the tails
    were skipped). ``r_res`` and ``r_n`` (the resistive and Normal rates on
    the nodes) are built on first use when the sums were taken from
    :class:`RateTerms` columns.
    """

    __slots__ = ("nodes", "_f1", "_fp", "F1", "r_c", "corr", "_r_res", "_r_n", "_terms")

    def __init__(self, nodes, F1, r_c, corr, *, f1=None, r_res=None, r_n=None, fp=None, terms=None):
        """Either ``f1``, ``r_res`` and ``r_n`` (node-by-node route) or ``fp`` = planck / tau_c^-1 and
        ``terms`` = (A, E_r, B, E_n) (power-law route), from which those are built on first use."""
        self.nodes, self.F1, self.r_c, self.corr = nodes, F1, r_c, corr
        self._f1, self._r_res, self._r_n, self._fp, self._terms = f1, r_res, r_n, fp, terms

    @property
    def f1(self):
        if self._f1 is None:  # the power-law route kept planck / tau_c^-1 only
            self._f1 = self._fp * self.nodes.weight_scale()
        return self._f1

    @property
    def r_res(self):
        if self._r_res is None and self._terms is not None:
            A, Er, _B, _En = self._terms
            self._r_res = np.dot(A.T, Er)
        return self._r_res

    @property
    def r_n(self):
        if self._r_n is None and self._terms is not None and self.corr:
            _A, _Er, B, En = self._terms
            self._r_n = np.dot(B.T, En)
        return self._r_n


def _grids(temperature):
    """``(shape, grids)`` for an engine call: the kept grid of a temperature array (prepared on first use),
    or, past :data:`BLOCK_T` temperatures, fresh grids of that many made one at a time (nothing kept, so
    memory stays bounded). ``temperature`` may be a number, an array, a pint quantity or a grid [K]."""
    if isinstance(temperature, TemperatureGrid):
        return temperature.shape, (temperature,)
    grid = _cached_grid(temperature)
    if grid is not None:
        return grid.shape, (grid,)
    T = _temperature(temperature)
    Tf = np.ascontiguousarray(np.atleast_1d(T), dtype=float).ravel()
    if Tf.size <= BLOCK_T:
        return np.shape(T), (_prepared_checked(Tf),)
    return np.shape(T), (_new_grid(Tf[i:i + BLOCK_T]) for i in range(0, Tf.size, BLOCK_T))


def _joined(pieces: list, shape: tuple) -> np.ndarray:
    """Per-grid results end to end, shaped like the temperatures."""
    return (pieces[0] if len(pieces) == 1 else np.concatenate(pieces)).reshape(shape)


class _CallawaySums:
    """Mixin of :class:`kinetic.LatticeModel`: kappa on a prepared grid, and its Jacobian."""

    @staticmethod
    def _new_rates(nodes: _BranchNodes, mech):
        """A mechanism's checked rate on a block's nodes: :class:`RateTerms` where it can be, else an array."""
        r = _checked_terms(mech, nodes) if nodes.separable else None
        return block_rate(mech, nodes) if r is None else r

    def _node_rates(self, nodes: _BranchNodes, mech):
        """A mechanism's rate on a block's nodes (:class:`RateTerms` or an array), kept on the grid."""
        try:
            r = nodes.rates.get(mech)
        except TypeError:  # a mechanism with unhashable fields: not kept
            return self._new_rates(nodes, mech)
        if r is not None:
            return r
        r = self._new_rates(nodes, mech)
        size = r.coefs.nbytes if type(r) is RateTerms else np.asarray(r).nbytes
        with _LOCK:
            nodes.rate_bytes += size
            while nodes.rates and (len(nodes.rates) >= CACHE_RATES or nodes.rate_bytes > CACHE_RATE_BYTES):
                old = nodes.rates.pop(next(iter(nodes.rates)))
                nodes.rate_bytes -= old.coefs.nbytes if type(old) is RateTerms else np.asarray(old).nbytes
            nodes.rates[mech] = r
        return r

    def _full_node_rates(self, nodes: _BranchNodes, mech):
        """A mechanism's rate on a block's nodes as an array (or a scalar for a constant rate)."""
        r = self._node_rates(nodes, mech)
        return r.full(nodes.rule) if type(r) is RateTerms else r

    def _plan(self) -> tuple:
        """The engine's blocks: ``((branches, entries, bounded), ...)``, kept on the model.

        Branches are grouped by dispersion (model order within a group);
        ``entries`` are ``(index into scattering, resistive)`` for every
        mechanism that applies to some branch of the block, ``bounded`` says
        per branch whether a mechanism bounds the mean free path. Parameter
        values do not enter, so :meth:`with_params` hands the plan on.
        """
        plan = self.__dict__.get("_plan_cache")
        if plan is None:
            groups: dict = {}
            for b in self.branches:
                groups.setdefault(b.dispersion, []).append(b)
            plan = tuple((tuple(g), self._entries(tuple(g)), self._bounded(tuple(g))) for g in groups.values())
            object.__setattr__(self, "_plan_cache", plan)
        return plan

    def _entries(self, branches: tuple) -> tuple:
        return tuple((i, m.resistive or not self.normal_correction) for i, m in enumerate(self.scattering)
                     if any(m.applies(b) for b in branches))

    def _bounded(self, branches: tuple) -> tuple:
        return tuple(any(getattr(m, "limits_mean_free_path", False) and m.applies(b) for m in self.scattering)
                     for b in branches)

    def _branch_sums(self, grid: TemperatureGrid, branch: Branch):
        """Callaway integrals ``(I1, I2, I3, ctx)`` of one branch on a prepared grid (a block of one)."""
        I, ctx = self._block_sums(grid, (branch,))
        return I[0], I[1], I[2], ctx

    def _block_sums(self, grid: TemperatureGrid, branches: tuple, entries: tuple | None = None):
        """Callaway integrals of a block of branches (one dispersion) on a prepared grid.

        Returns ``(I, ctx)``: ``I`` of shape (3, n_rows) holds I1, I2, I3 for
        every row (branch i at temperature t is row i n_T + t); ``ctx``
        (:class:`_BranchContext`) holds the node arrays reused by the
        Jacobian, the spectral output and the mean-free-path check. A
        mechanism enters where it applies to any branch of the block (its
        rate is zero on the rows of the others), so a branch without a
        Normal term gets I2 = I3 = 0 and kappa = I1.
        """
        nodes = grid.block(branches)
        scattering = self.scattering
        # rates as full arrays, and as (mechanism, RateTerms) pairs; resistive and Normal
        res, nrm, res_t, nrm_t = [], [], [], []
        with np.errstate(all="ignore"):
            for i, resistive in (self._entries(branches) if entries is None else entries):
                m = scattering[i]
                r = self._node_rates(nodes, m)
                terms = type(r) is RateTerms
                if resistive:
                    (res_t if terms else res).append((m, r) if terms else r)
                else:
                    (nrm_t if terms else nrm).append((m, r) if terms else r)
            # Callaway's correction wherever a Normal term applies (has_normal_correction, per block)
            corr = bool(nrm or nrm_t)
            if not res and not nrm:
                return self._separable_sums(nodes, res_t, nrm_t, corr)
            buf = nodes.scratch()
            r_res = nodes.assemble(buf[0], res, res_t)
            r_n = nodes.assemble(buf[1], nrm, nrm_t) if corr else None
            r_c, f1 = buf[2], buf[3]
            if corr:
                np.add(r_res, r_n, out=r_c)
            else:
                r_c = r_res
            np.divide(nodes.wbase, r_c, out=f1)
            I = np.empty((3, nodes.shape[0]))
            np.matmul(f1, nodes.ones, out=I[0])  # row sums (matrix-vector product: faster than .sum here)
            if corr:
                # I2 = sum f1 r_n, I3 = sum f1 r_n r_res: contiguous products and matrix-vector row sums
                g = np.multiply(f1, r_n, out=buf[4])
                np.matmul(g, nodes.ones, out=I[1])
                g *= r_res
                np.matmul(g, nodes.ones, out=I[2])
                if self._tails_negligible(nodes, I, r_c[:, 0], r_n[:, 0], r_res[:, 0]):
                    F1 = None  # built from the two lowest columns when the Jacobian needs it
                else:
                    F1 = self._add_tails(nodes, I, r_c[:, :2], r_n[:, :2], r_res[:, :2])
            else:
                F1 = self._add_tails(nodes, I, r_c[:, :2], None, None)
        return I, _BranchContext(nodes, F1, r_c, corr, f1=f1, r_res=r_res, r_n=r_n)

    @staticmethod
    def _separable_sums(nodes: _BranchNodes, res_t: list, nrm_t: list, corr: bool):
        """:meth:`_block_sums` when every rate of a block of Debye branches comes as :class:`RateTerms`.

        With A (kr x n_rows) and B (kn x n_rows) the resistive and Normal
        coefficients and E_r, E_n their node rows (r_res = A^T E_r,
        r_n = B^T E_n), and wbase = planck x wcol_i x wrow_j (see
        :class:`~kinetic.grid._BranchNodes`): one matrix product gives
        tau_c^-1 = [A; B]^T [E_r; E_n]; one more gives every sum at once,
        M = (planck / tau_c^-1) V with V = wrow_j [1, E_n,l, E_n,l E_r,k]
        (node x sum); then, with M's sums scaled by wcol [1, B_l, B_l A_k] row
        by row, I1 = M_0, I2 = sum_l M_l and I3 = sum_lk M_lk -- the sums of the
        elementwise route (I2 = <r_n>, I3 = <r_n r_res>) without forming r_res,
        r_n or their products on the nodes (built only if a consumer asks).
        Call inside ``np.errstate(all="ignore")``.
        """
        owners = res_t + nrm_t
        coefs, powers = _side_by_side(owners)
        check_coefficients(nodes, coefs, owners)
        kr = sum(len(t.powers) for _m, t in res_t)
        kn = coefs.shape[0] - kr
        rows, V, G, Z = _separable_tables(nodes.rule, powers[:kr], powers[kr:])
        buf = nodes.scratch()
        r_c = np.dot(coefs.T, rows, out=buf[2])
        fp = np.divide(nodes.planck, r_c, out=buf[3])
        # the sums one per row of MT (contiguous rows: the scalings below are plain vector products)
        MT = np.dot(V.T, fp.T)
        A, B = coefs[:kr], coefs[kr:]
        MT *= nodes.wcol
        if kn:
            MT[1:1 + kn] *= B
            for j in range(kn):
                blk = MT[1 + kn + j * kr:1 + kn + (j + 1) * kr]
                blk *= A
                blk *= B[j]
        I = np.dot(G, MT)
        if corr:
            rz = np.dot(Z.T, coefs)  # r_res and r_n at the lowest node
            if _CallawaySums._tails_negligible(nodes, I, r_c[:, 0], rz[1], rz[0]):
                F1 = None
            else:
                F1 = _CallawaySums._add_tails(nodes, I, r_c[:, :2], np.dot(B.T, rows[kr:, :2]),
                                              np.dot(A.T, rows[:kr, :2]))
        else:
            F1 = _CallawaySums._add_tails(nodes, I, r_c[:, :2], None, None)
        return I, _BranchContext(nodes, F1, r_c, corr, fp=fp, terms=(A, rows[:kr], B, rows[kr:]))

    @staticmethod
    def _tails_negligible(nodes: _BranchNodes, I: np.ndarray, r_c0, r_n0, r_res0) -> bool:
        """True when the closed-form tails below the lowest node cannot move any sum in ``I`` (3, n_rows).

        The tail is f0 u0 / (p + 1) with p + 1 > 0.1 (else none), so below
        10 f0 u0. Where f0 u0 <= 1e-14 of every sum the tails move no sum by
        more than 1e-13 relative -- four orders below the rule's own error
        (median 3e-9, see kinetic.quadrature.PANELS) -- and are skipped
        (saves a dozen small array operations). ``r_*0`` are the rates at the
        lowest node.
        """
        f0 = np.empty(I.shape)
        np.divide(nodes.base0u, r_c0, out=f0[0])
        np.multiply(f0[0], r_n0, out=f0[1])
        np.multiply(f0[1], r_res0, out=f0[2])
        return bool((f0 <= 1e-14 * I).all())

    @staticmethod
    def _add_tails(nodes: _BranchNodes, I: np.ndarray, r_c01, r_n01, r_res01):
        """Add the closed-form tails below the lowest node to the sums ``I`` (3, n_rows), in place.

        ``r_*01`` are the rates at the two lowest nodes (``r_n01`` None
        without Callaway's correction: then only I1 has a tail). Returns the
        I1 integrand at the two lowest nodes (reused by the Jacobian).
        """
        if r_n01 is None:
            F1 = nodes.base01 / r_c01
            I[0] += nodes.tails(F1[None])[0]
            I[1:] = 0.0
            return F1
        F = np.empty(I.shape + (2,))
        np.divide(nodes.base01, r_c01, out=F[0])
        np.multiply(F[0], r_n01, out=F[1])
        np.multiply(F[1], r_res01, out=F[2])
        I += nodes.tails(F)
        return F[0]

    @staticmethod
    def _combine(I1, I2, I3):
        """Callaway's kappa = I1 + I2^2 / I3 (I3 = 0 without Normal processes)."""
        return I1 + np.divide(I2 * I2, I3, out=np.zeros_like(I1), where=I3 > 0)

    def _check_mean_free_path(self, grid, branches: tuple, I1, ctx, bounded: tuple | None = None):
        """Refuse a branch whose heat is carried by phonons with unbounded mean free paths.

        ``I1`` and ``ctx`` are a block's (:meth:`_block_sums`). Branches with
        a mechanism that bounds the mean free path (``limits_mean_free_path``,
        e.g. a boundary) need only a finite integral. For the others the
        share of I1 carried by phonons with mean free paths v_g tau_c beyond
        :data:`MAX_MEAN_FREE_PATH` (tail below the lowest node included) must
        stay under :data:`MAX_LONG_PATH_SHARE`.
        """
        nodes = ctx.nodes
        if bounded is None:
            bounded = self._bounded(branches)
        if all(bounded) and np.isfinite(I1.sum()):
            return
        for i, b in enumerate(branches):
            seg = nodes.segment(i)
            I1b = I1[seg]
            if bounded[i]:
                if not np.all(np.isfinite(I1b)):
                    t = int(np.flatnonzero(~np.isfinite(I1b))[0])
                    raise ModelError(
                        f"branch {b.name!r} at T = {grid.temperature[t]:.4g} K: the conductivity integral is not "
                        "finite (a total scattering rate of zero at some frequency)"
                    )
                continue
            f1, r_c = ctx.f1[seg], ctx.r_c[seg]
            with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
                long = (np.broadcast_to(nodes.vg[seg], f1.shape) / r_c) > MAX_MEAN_FREE_PATH
                share = (np.einsum("ij,ij->i", f1, long) + np.where(long[:, 0], I1b - f1.sum(axis=1), 0.0)) / I1b
            bad = ~(share <= MAX_LONG_PATH_SHARE)
            if np.any(bad):
                t = int(np.flatnonzero(bad)[0])
                raise ModelError(
                    f"branch {b.name!r} at T = {grid.temperature[t]:.4g} K: {100 * min(share[t], 1.0):.3g}% of the "
                    f"heat would be carried by phonons with mean free paths beyond {MAX_MEAN_FREE_PATH:g} m, longer "
                    "than any specimen, because no mechanism limits long-wavelength phonons; add a boundary term, "
                    "e.g. Boundary(length=1e-3) for a 1 mm sample"
                )

    def _parts_on_grid(self, grid: TemperatureGrid, total: bool = False):
        """kappa of every branch [W m^-1 K^-1] on a prepared grid, block by block (their sum if ``total``)."""
        out = {}
        n_T = grid.size
        k_sum = None
        for block, entries, bounded in self._plan():
            I, ctx = self._block_sums(grid, block, entries)
            self._check_mean_free_path(grid, block, I[0], ctx, bounded)
            k = self._combine(I[0], I[1], I[2])
            if total:
                k = k.reshape(len(block), n_T).sum(axis=0) if len(block) > 1 else k
                k_sum = k if k_sum is None else k_sum + k
                continue
            for i, b in enumerate(block):
                out[b.name] = k[i * n_T:(i + 1) * n_T]
        if total:
            return k_sum
        return {b.name: out[b.name] for b in self.branches}

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
        shape, grids = _grids(temperature)
        pieces = [self._parts_on_grid(g) for g in grids]
        return {b.name: _joined([p[b.name] for p in pieces], shape) for b in self.branches}

    def kappa(self, temperature):
        """Lattice thermal conductivity [W m^-1 K^-1] at each temperature [K].

        ``temperature`` may be a number, an array or a pint quantity; see
        :meth:`kappa_parts` for the errors.

        Examples
        --------
        >>> from kinetic import Branch, Boundary, LatticeModel
        >>> m = LatticeModel([Branch(5000.0, 400.0)], [Boundary(1e-3)])
        >>> round(float(m.kappa(1.0)), 4)   # Casimir limit: 1.6308 W/m/K
        1.6308
        """
        shape, grids = _grids(temperature)
        return _joined([self._parts_on_grid(g, total=True) for g in grids], shape)

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
        >>> from kinetic import Branch, Boundary, LatticeModel
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
        shape, grids = _grids(temperature)
        pieces = [self._jacobian_on_grid(g, names, info) for g in grids]
        J = pieces[0][1] if len(pieces) == 1 else np.concatenate([p[1] for p in pieces])
        return _joined([p[0] for p in pieces], shape), J.reshape(shape + (len(names),))

    def _jacobian_on_grid(self, grid: TemperatureGrid, names: list, info: dict):
        """(kappa, J) on one prepared grid (see :meth:`kappa_jacobian`)."""
        n_T = grid.size
        J = np.zeros((n_T, len(names)))
        analytic = [j for j, n in enumerate(names) if info[n] is not None]
        kappa = np.zeros(n_T)
        for block, entries, bounded in self._plan():
            I, ctx = self._block_sums(grid, block, entries)
            self._check_mean_free_path(grid, block, I[0], ctx, bounded)
            kappa += self._combine(I[0], I[1], I[2]).reshape(len(block), -1).sum(axis=0)
            if analytic:
                Jb = np.zeros((I.shape[1], len(names)))
                self._block_jacobian(grid, block, I[0], I[1], I[2], ctx, names, analytic, info, Jb)
                J += Jb.reshape(len(block), n_T, len(names)).sum(axis=0)
        for j, n in enumerate(names):
            if info[n] is None:
                J[:, j] = self._difference(grid, n, self.parameter_info()[n])
        return kappa, J

    def _block_jacobian(self, grid, branches, I1, I2, I3, ctx, names, analytic, info, J):
        """Add a block's exact derivatives d kappa / d c for the power-law parameters to J (one row per block row)."""
        nodes, f1, F1, r_c, corr = ctx.nodes, ctx.f1, ctx.F1, ctx.r_c, ctx.corr
        mechs = {m.name: m for m in self.scattering}
        todo = []  # (column j, mechanism, d rate / d value = c * rate)
        for j in analytic:
            mname, pname = names[j].split(".", 1)
            mech = mechs[mname]
            if any(mech.applies(b) for b in branches):
                todo.append((j, mech, info[names[j]] / float(getattr(mech, pname))))
        if not todo:
            return
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            if F1 is None:  # tails skipped by _block_sums (negligible there)
                F1 = nodes.base01 / r_c[:, :2]
            h = f1 / r_c  # weight * base / r_c^2
            H = F1 / r_c[:, :2]
            stacks = {}

            def stack(kind):
                # (h, h s, h s^2) and their two lowest columns, s = r_n (resistive) or r_res (Normal)
                if kind not in stacks:
                    if not corr:
                        stacks[kind] = (h[None], H[None])
                    else:
                        sv = ctx.r_n if kind == "res" else ctx.r_res
                        hs = h * sv
                        s01 = sv[:, :2]
                        Hs = H * s01
                        stacks[kind] = (np.stack([h, hs, hs * sv]), np.stack([H, Hs, Hs * s01]))
                return stacks[kind]

            sums, cols = [], []
            for _j, mech, _c in todo:
                kind = "res" if (mech.resistive or not self.normal_correction) else "n"
                Hk, H01 = stack(kind)
                rho = np.broadcast_to(self._full_node_rates(nodes, mech), nodes.shape)
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
