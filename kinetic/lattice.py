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

from dataclasses import dataclass
from typing import Iterable, Mapping

import numpy as np
from scipy.constants import hbar, k as kB

from . import quadrature as quad
from ._callaway import MAX_LONG_PATH_SHARE as MAX_LONG_PATH_SHARE
from ._callaway import MAX_MEAN_FREE_PATH as MAX_MEAN_FREE_PATH
from ._callaway import _CallawaySums
from ._validate import nonnegative, positive
from .dispersion import Branch
from .errors import ParameterError
from .grid import BLOCK_T as BLOCK_T
from .grid import TemperatureGrid, _temperature, clear_cache, prepared_grid
from .quantities import to_si
from .scattering import Mechanism, mechanism_from_dict
from .spectrum import Spectrum

__all__ = ["LatticeModel", "Spectrum", "TemperatureGrid", "prepared_grid", "clear_cache"]


@dataclass(frozen=True)
class LatticeModel(_CallawaySums):
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
        mechs = {m.name: m for m in self.scattering}
        for key, v in dict(values).items():
            mname, _, pname = str(key).partition(".")
            m = mechs.get(mname)
            # the keys of self.params, checked without building it (a fit step or slider move calls this)
            if not (isinstance(key, str) and m is not None and pname in m._spec and getattr(m, pname) is not None):
                raise ParameterError(
                    f"unknown parameter {key!r}; valid names: {', '.join(self.params)}"
                )
            grouped.setdefault(mname, {})[pname] = v
        new = tuple(m.with_values(**grouped[m.name]) if m.name in grouped else m for m in self.scattering)
        # only parameter values changed (names, branches, kinds and applies_to are the same), so every
        # check of __post_init__ holds as it did for self: build the copy without repeating them
        out = object.__new__(LatticeModel)
        for f, val in (("branches", self.branches), ("scattering", new),
                       ("normal_correction", self.normal_correction), ("material", self.material)):
            object.__setattr__(out, f, val)
        plan = self.__dict__.get("_plan_cache")  # the engine's blocks depend on structure only
        if plan is not None:
            object.__setattr__(out, "_plan_cache", plan)
        return out

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
        I1, I2, I3, ctx = self._branch_sums(grid, branch)
        self._check_mean_free_path(grid, (branch,), I1, ctx)
        nodes, r_c = ctx.nodes, ctx.r_c
        r_nn = ctx.r_n if ctx.corr else np.zeros(nodes.shape)
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
