"""Slow, independent cross-checks of the engine's quadrature.

:func:`kappa_adaptive` integrates the same Callaway expressions as
:class:`kinetic.LatticeModel` one temperature at a time with
``scipy.integrate.quad`` (adaptive Gauss-Kronrod), in the frequency variable
rather than the engine's reduced wavevector. It is hundreds of times slower
and exists for tests and the benchmark, and for users who want to confirm a
result.
"""
from __future__ import annotations

import numpy as np
from scipy import integrate
from scipy.constants import hbar, k as kB

from ._validate import temperatures as _check_T

__all__ = ["kappa_adaptive"]


def _branch_kappa(model, branch, T: float, epsrel: float) -> float:
    omega_hi = min(branch.omega_max, 200.0 * kB * T / hbar)
    p = branch.polarizations / (6.0 * np.pi**2)

    def pieces(lnw):
        w = np.exp(lnw)
        u = branch.u_of_omega(w)
        vg = branch.group_velocity_of_u(u)
        q = u * branch.q_max
        x = hbar * w / (kB * T)
        # x^2 e^x / (e^x - 1)^2 written to avoid overflow
        c = x * x * np.exp(-x) / (-np.expm1(-x)) ** 2
        r_res, r_n = model._split_rates(w, T, branch)
        # d kappa / d omega = p C v_g tau q^2 ; times omega for d(ln omega)
        base = p * kB * c * vg * q * q * w
        return base, float(r_res), float(r_n)

    def f1(lnw):
        base, rr, rn = pieces(lnw)
        return base / (rr + rn)

    def f2(lnw):
        base, rr, rn = pieces(lnw)
        return base * rn / (rr + rn)

    def f3(lnw):
        base, rr, rn = pieces(lnw)
        return base * rn * rr / (rr + rn)

    a, b = np.log(omega_hi) - 70.0, np.log(omega_hi)
    pts = list(np.linspace(a, b, 30)[1:-1])
    kw = dict(epsabs=0.0, epsrel=epsrel, limit=1000, points=pts)
    I1 = integrate.quad(f1, a, b, **kw)[0]
    if not model.has_normal_correction(branch):
        return I1
    I2 = integrate.quad(f2, a, b, **kw)[0]
    I3 = integrate.quad(f3, a, b, **kw)[0]
    return I1 + (I2 * I2 / I3 if I3 > 0 else 0.0)


def kappa_adaptive(model, temperature, *, epsrel: float = 1e-10):
    """Lattice conductivity by adaptive quadrature, one temperature at a time.

    Parameters
    ----------
    model : LatticeModel
    temperature : array_like
        [K]
    epsrel : float
        Relative tolerance passed to ``scipy.integrate.quad``.

    Returns
    -------
    ndarray
        [W m^-1 K^-1], shaped like ``temperature``.
    """
    T = np.atleast_1d(_check_T(temperature)).astype(float)
    out = np.array([sum(_branch_kappa(model, b, float(t), epsrel) for b in model.branches) for t in T.ravel()])
    return out.reshape(np.shape(_check_T(temperature)))
