"""Vectorised quadrature over (temperature x reduced wavevector).

Every kinetic integral of the engine has the form

    I(T) = int_0^1 F(u, T) du,    u = q / q_max,

with a Planck weight that confines the integrand to x = hbar omega / (kB T)
below a few tens. The integral is taken in s = ln u, over 16 units of s below
ln(u_hi), where u_hi is the reduced wavevector at which x reaches X_CUT (or 1,
the zone edge, when that comes first). The s-range is split into panels, each
carrying a Gauss-Legendre rule (see PANELS). Power laws in u become
exponentials in s and crossovers between mechanisms become smooth steps, so a
fixed, modest number of nodes (91) reaches ~1e-8 relative accuracy across
temperatures from 0.1 K to 5000 K (checked against scipy.integrate.quad in
tests/test_lattice.py). Below the lowest node the integrand's power-law
tail is added in closed form.

All temperatures are handled at once: nodes form an array of shape
(n_temperatures, n_nodes).
"""
from __future__ import annotations

import numpy as np

#: Largest reduced phonon energy x = hbar omega / kB T kept. The Planck-weighted
#: integrand x^4 e^x / (e^x - 1)^2 at x = 46 is 2e-12 of its peak, and its
#: integral beyond 46 is 1e-13 of the total 4 pi^4 / 15 (closed form).
X_CUT = 46.0
#: Panels in s = ln u below ln(u_hi), as (width, end distance, Gauss-Legendre
#: nodes). The top unit of s (x from X_CUT down to X_CUT / e) carries the
#: Planck factor's fast fall; below, the integrand is a sum of power laws joined
#: by smooth steps. The sharpest step our mechanisms make is a logistic of slope
#: 4 in s (an omega^4 rate meeting a constant one), with poles pi/4 from the
#: real axis; a 10-node Gauss-Legendre rule on a panel 2 wide (half-width 1)
#: then converges like rho^-20 with rho = 0.785 + sqrt(1 + 0.785^2) = 2.06,
#: i.e. ~5e-7 of the step's own share at worst, ~1e-8 in practice. u spans e^-16
#: below u_hi: a crossover below that carries < e^-16 ~ 1e-7 of the integral,
#: and the power-law tail below the lowest node is added in closed form.
#: 91 nodes; chosen against adaptive quadrature (scipy quad, epsrel 1e-10) on
#: 30 random Debye models and the benchmark model from 0.1 K to 5000 K: median
#: error 3e-9, worst 1.2e-7 (the 151-node set it replaced: 2e-9 and 1.2e-7).
PANELS = ((1.0, 1.0, 7), (1.0, 4.0, 8), (2.0, 16.0, 10))
#: A sine branch's group velocity vanishes at the zone edge (u = 1, s = 0), so a
#: rate proportional to it (boundary scattering) meets a Normal rate in a step
#: that can be a few hundredths of s wide right at the edge; these panels
#: grade down to 0.001 there (checked against adaptive quadrature in tests).
EDGE_PANELS = ((0.001, 0.001, 5), (0.009, 0.01, 5), (0.03, 0.04, 5), (0.06, 0.1, 5), (0.1, 0.2, 5)) + PANELS


def _rule(panels=PANELS):
    offsets, weights = [], []
    top = 0.0
    for width, end, n in panels:
        t, w = np.polynomial.legendre.leggauss(n)
        while top < end - 1e-9:
            hi, lo = -top, -min(top + width, end)
            offsets.append(0.5 * (hi + lo) + 0.5 * (hi - lo) * t)
            weights.append(0.5 * (hi - lo) * w)
            top = min(top + width, end)
    order = np.argsort(np.concatenate(offsets))
    return np.concatenate(offsets)[order], np.concatenate(weights)[order]


_RULES = {}


def _set_rules(panels=None, edge_panels=None):
    """(Re)build the node tables; used at import and by accuracy studies of the panel choice."""
    global PANELS, EDGE_PANELS, PLANCK_AT_CUT
    if panels is not None:
        PANELS = tuple(panels)
    if edge_panels is not None:
        EDGE_PANELS = tuple(edge_panels)
    for name, pan in (("debye", PANELS), ("sine", EDGE_PANELS)):
        o, w = _rule(pan)
        _RULES[name] = (o, w, np.exp(o))
    if "planck_weight" in globals():
        PLANCK_AT_CUT = planck_weight(X_CUT * _RULES["debye"][2])


def n_nodes(rule: str = "debye") -> int:
    """Number of quadrature nodes of a rule (per temperature and branch)."""
    return _RULES[rule][0].size


def log_ratio(rule: str = "debye") -> float:
    """ln(u_1 / u_0) between the two lowest nodes of a rule (the same for every temperature)."""
    o = _RULES[rule][0]
    return float(o[1] - o[0])


_set_rules()


def log_nodes(u_hi: np.ndarray, rule: str = "debye"):
    """Nodes and weights for int_0^{u_hi} F(u) du written as int F(u) u ds.

    Parameters
    ----------
    u_hi : ndarray, shape (n,)
        Upper limit of the reduced wavevector for each temperature, in (0, 1].
    rule : {"debye", "sine"}
        Panel set: "sine" adds panels graded toward the zone edge.

    Returns
    -------
    u : ndarray, shape (n, n_nodes)
        Reduced wavevectors.
    w : ndarray, shape (n, n_nodes)
        Weights such that sum(w * F(u)) approximates the integral (the Jacobian
        du = u ds is included).
    """
    _, weights, exp_offsets = _RULES[rule]
    u = np.asarray(u_hi, dtype=float)[:, None] * exp_offsets[None, :]
    return u, weights[None, :] * u


def lower_tail(u: np.ndarray, integrand: np.ndarray) -> np.ndarray:
    """Closed-form integral below the lowest node, from the local power law.

    Between the two lowest nodes the integrand F(u) is fitted by c u^p; the
    tail int_0^{u_0} c u^p du = u_0 F(u_0) / (p + 1) is returned for p > -1
    (an integrand that diverges as u -> 0 has no finite tail and gets 0: such a
    model has no finite conductivity anyway). Only the first two columns are
    read, so this costs little.
    """
    f0 = integrand[..., 0]
    f1 = integrand[..., 1]
    u0 = u[..., 0]
    return tail_from_columns(u0, f0, f1, float(np.log(u.flat[1] / u.flat[0])))


def tail_from_columns(u0, f0, f1, log_ratio: float):
    """:func:`lower_tail` from the integrand at the two lowest nodes.

    ``u0`` is the lowest node, ``f0`` and ``f1`` the integrand F(u) at the two
    lowest nodes (any broadcastable shapes), ``log_ratio`` = ln(u_1 / u_0).
    """
    f0 = np.asarray(f0, dtype=float)
    f1 = np.asarray(f1, dtype=float)
    ok = (f0 > 0) & (f1 > 0)
    p = np.log(np.divide(f1, f0, out=np.ones(np.broadcast_shapes(f0.shape, f1.shape)), where=ok)) / log_ratio
    ok &= p > -0.9
    return np.divide(u0 * f0, p + 1.0, out=np.zeros_like(p), where=ok)


#: Below this x the Planck weight comes from its Taylor series (no exponential).
SERIES_X = 0.2


def planck_weight(x):
    """x^2 e^x / (e^x - 1)^2, the mode heat capacity in units of kB.

    For x < 0.2 the Taylor series 1 - sum_k B_2k (2k - 1) x^2k / (2k)!
    (B_2k Bernoulli numbers; closed form from d/dx of 1/(e^x - 1)) to x^10,
    truncation error < 1e-15 relative. Above, x^2 e^-x / (1 - e^-x)^2, which
    never overflows (e^-x underflows quietly to 0) and, at x >= 0.2, loses at
    most ~1e-15 in the difference. The exponential is taken only where it is
    needed: it is the engine's hot spot.
    """
    x = np.asarray(x, dtype=float)
    x2 = x * x
    out = 1.0 - x2 * (1.0 / 12.0 - x2 * (1.0 / 240.0 - x2 * (1.0 / 6048.0 - x2 * (1.0 / 172800.0
                                                                                  - x2 / 5322240.0))))
    big = x >= SERIES_X
    if big.any():
        xb = x[big]
        e = np.exp(-xb)
        d = 1.0 - e
        out[big] = xb * xb * e / (d * d)
    return out


#: Planck weight at the nodes of a temperature whose range is capped at X_CUT
#: (every T below theta / X_CUT shares these x values on a Debye branch).
PLANCK_AT_CUT = planck_weight(X_CUT * _RULES["debye"][2])
