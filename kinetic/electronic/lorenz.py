"""Lorenz numbers: the Sommerfeld value L0, the Kim et al. (2015) closed form,
and the choice of L (with its uncertainty) used by :func:`electronic_kappa`.

The band-model value from a measured Seebeck coefficient lives in
:mod:`kinetic.electronic.band` (:func:`lorenz_spb`).
"""
from __future__ import annotations

import numpy as np

from ..errors import ParameterError
from ._common import KB_OVER_E, KIM_STATED_ACCURACY, L0, _finite, _nonnegative, _out, _positive
from .band import _invert_seebeck, _lorenz_reduced, _lorenz_spb_clipped, _seebeck_in_range, _spb_table

__all__ = ["L0", "KIM_STATED_ACCURACY", "lorenz_kim"]

def lorenz_kim(seebeck):
    """Kim et al. (2015) estimate L = 1.5 + exp(-|S|/116) [1e-8 W Ohm/K^2, S in uV/K].

    Parameters
    ----------
    seebeck : float or array
        S [V/K], either sign.

    Returns
    -------
    float or ndarray
        L [W Ohm/K^2]; 2.5e-8 at S = 0, tending to 1.5e-8 for large |S|.

    Raises
    ------
    ParameterError
        seebeck not finite.

    References
    ----------
    H.-S. Kim, Z. M. Gibbs, Y. Tang, H. Wang and G. J. Snyder, "Characterization
    of Lorenz number with Seebeck coefficient measurement", APL Mater. 3,
    041506 (2015): accurate within 5% of the single-parabolic-band,
    acoustic-phonon value and within 20% for PbSe, PbS, PbTe and SiGe
    (abstract).

    Examples
    --------
    >>> lorenz_kim(0.0)
    2.5e-08
    """
    s_uv = np.abs(_finite("seebeck", seebeck, "V/K")) * 1e6
    return _out((1.5 + np.exp(-s_uv / 116.0)) * 1e-8, seebeck)



_METHODS = ("sommerfeld", "spb", "kim")

def _lorenz_choice(method, lorenz, seebeck, lam, lorenz_err):
    """(L, sigma_L, eta or None, method label); arrays broadcastable to the data."""
    if not isinstance(method, str) or method.lower() not in _METHODS:
        raise ParameterError(f"method must be one of {list(_METHODS)}, got {method!r}")
    method = method.lower()
    eta = None
    if lorenz is not None:
        if method != "sommerfeld":
            raise ParameterError(
                f"give either lorenz [W Ohm/K^2] or method={method!r}, not both"
            )
        L = np.asarray(_positive("lorenz", lorenz, unit="W Ohm/K^2"), dtype=float)
        sL = np.zeros_like(L)
        label = "given"
    elif method == "sommerfeld":
        L = np.asarray(L0)
        if seebeck is None:
            sL = np.asarray(_spb_table(lam)[2])
        else:
            s = np.abs(_finite("seebeck", seebeck, "V/K"))
            sL = np.maximum(np.abs(L0 - _lorenz_spb_clipped(s, lam)), KIM_STATED_ACCURACY * L0)
        label = "sommerfeld"
    else:
        if seebeck is None:
            raise ParameterError(f"method={method!r} needs seebeck [V/K], got None")
        if method == "spb":
            s = _seebeck_in_range(seebeck, lam)
            eta = _invert_seebeck((s / KB_OVER_E).ravel(), lam).reshape(s.shape)
            L = (KB_OVER_E ** 2 * _lorenz_reduced(eta.ravel(), lam)).reshape(s.shape)
            other = np.asarray(lorenz_kim(s))
        else:
            s = np.abs(_finite("seebeck", seebeck, "V/K"))
            L = np.asarray(lorenz_kim(s))
            other = _lorenz_spb_clipped(s, lam)
        sL = np.maximum(np.abs(L - other), KIM_STATED_ACCURACY * L)
        label = method
    if lorenz_err is not None:
        sL = np.asarray(_nonnegative("lorenz_err", lorenz_err, unit="W Ohm/K^2"), dtype=float)
    return L, sL, eta, label


