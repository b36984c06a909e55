"""Fit lattice models to a measured kappa(T): values, honest uncertainties, comparisons.

The main entry points are

* :func:`fit` -- one model, one dataset, some free parameters;
* :func:`fit_joint` -- several samples at once, with parameters shared
  between samples or one per sample (e.g. one Umklapp strength, one grain
  size per sample);
* :func:`compare` -- several candidate models on the same data, ranked by
  AIC or BIC with Akaike weights;
* :func:`profile_interval`, :func:`bootstrap` -- confidence intervals that do
  not rely on the linearised (Wald) errors;
* :func:`predict_band` -- kappa(T) with a confidence band from the covariance.

Modules: :mod:`~kinetic.fitting.target` (the lattice conductivity fitted),
:mod:`~kinetic.fitting.problem` (free parameters, residuals, argument
checks), :mod:`~kinetic.fitting.solve` (:func:`fit`, :func:`fit_joint`),
:mod:`~kinetic.fitting.result` (:class:`FitResult`), :mod:`~kinetic.fitting.rows`
(report rows), :mod:`~kinetic.fitting.flags`, :mod:`~kinetic.fitting.uncertainty`
(profile intervals), :mod:`~kinetic.fitting.bootstrap`, :mod:`~kinetic.fitting.band`,
:mod:`~kinetic.fitting.compare`, :mod:`~kinetic.fitting.defaults`.

What is fitted
--------------
When the data hold the *total* conductivity and a resistivity, the electronic
part L sigma T is subtracted first (:func:`kinetic.electronic.lattice_from_total`
with the chosen Lorenz method) and the lattice model is fitted to what
remains; the Lorenz-number uncertainty is carried into the weights. Total
data without a resistivity are fitted as if they were lattice data, and the
result says so in ``flags.notes``. Points where the subtraction leaves
kappa_lattice <= 0 are dropped, with a note. ``electronic="none"`` fits the
data's kappa as given, whatever they hold.

Residuals: weighted least squares in ln(kappa)
-----------------------------------------------
Residuals are r_i = [ln kappa_model(T_i) - ln kappa_i] / s_i, where s_i is the
*relative* 1-sigma error of point i. Reasons: kappa(T) of a crystal spans
decades (2600 to 30 W/m/K for Si between 50 and 1000 K), measurement errors
are usually a fixed percentage (+-5% in Glassbrenner & Slack 1964), so
absolute residuals would let the few largest values decide the fit; and
ln kappa is defined for every positive model value, so the optimiser can
never step into a negative conductivity. To first order ln-residuals equal
relative residuals (kappa_model - kappa)/kappa.

The relative error of a point is s_i^2 = e_i^2 + s0^2:

* e_i: the known part, (kappa_err_i^2 + kappa_e_err_i^2)^(1/2) / kappa_lattice_i,
  i.e. the measurement error and the error of the subtracted electronic
  part (0 where neither is known);
* s0: an extra relative scatter. With ``weights="auto"`` it is 0 when the
  data carry kappa_err (the errors are believed; the covariance is not
  rescaled by the reduced chi^2), and estimated from the scatter of the
  residuals otherwise (s0 is chosen so that chi^2 equals the degrees of
  freedom, refitting until it settles). With no known errors at all this is
  exactly the usual "relative errors equal and estimated from the scatter",
  i.e. the covariance scaled by the reduced chi^2.

``weights="relative"`` estimates s0 even when kappa_err is present (the
stated errors then act as a floor and s0 is the scatter beyond them);
``weights="errors"`` requires kappa_err (DataError otherwise).

Parameter space
---------------
Parameters flagged ``log`` in their metadata (lengths, prefactors, Gamma,
Grüneisen) are fitted as log10(value), the others (Umklapp b, specularity)
linearly. Bounds default to the metadata bounds and are given in natural
units. The covariance, the Wald intervals and the prediction bands are
computed in this fitted space (so a log parameter gets an asymmetric
interval in natural units that never crosses zero); ``stderr`` in natural
units is the linearised value * ln(10) * stderr(log10 value).

Multi-start
-----------
Start 0 is the model's own values (clipped into the bounds); starts 1..n-1
are a seeded Latin hypercube in the fitted box, which spreads the starts over
every decade of each parameter. Each start runs
``scipy.optimize.least_squares`` (trust-region reflective, bounds; the
Jacobian from the model's ``kappa_jacobian`` when it has one, else forward
differences). The best start is kept; ``result.starts`` holds the final
cost of every start.

Intervals that are not determined
---------------------------------
A parameter at a bound of its fitted range, not seen by the data
(rank-deficient Jacobian) or whose interval would be wider than the whole
allowed range has no interval: :meth:`FitResult.interval_info` says "not
determined" with the reason (and the bound it hit), and the summary, the
report rows, ``to_dict`` and records say the same. No interval is ever
computed as 10**x of an unbounded exponent.

Goodness of fit
---------------
With stated errors (the scatter not estimated) a reduced chi-squared above
:data:`GOODNESS_LIMIT` is flagged in plain words, with the p-value of the
chi-squared goodness-of-fit test (``flags.poor_fit``).

Cancelling
----------
``should_stop()`` is called before each start and at every model evaluation.
An exception raised by ``should_stop`` or ``progress`` ends the fit with
one :class:`~kinetic.errors.FitError` naming the callback ("progress
callback raised ZeroDivisionError: ..."). When ``should_stop()`` returns
True the fit stops: if at least one start has finished, the best finished start is returned with ``flags.cancelled = True`` and
``success = False``; if none has, :class:`FitError` ("fit cancelled") is
raised, as there is nothing to return.

References
----------
Least squares and the linearised covariance: Press et al., Numerical Recipes,
3rd ed. (2007), sec. 15.4-15.6; profile likelihood and bootstrap: sec. 15.6.
AIC: Akaike, IEEE Trans. Autom. Control 19, 716 (1974); BIC: Schwarz, Ann.
Stat. 6, 461 (1978); Akaike weights: Burnham & Anderson, Model Selection and
Multimodel Inference, 2nd ed. (2002), sec. 2.9."""
from __future__ import annotations

from .band import Band, band_parts, predict_band
from .bootstrap import BootstrapResult, bootstrap
from .common import check_level, json_float, json_matrix, sample_index
from .compare import Comparison, compare
from .defaults import DEFAULT_MECHANISMS, default_free, default_model
from .flags import CORRELATION_LIMIT, GOODNESS_LIMIT, FitFlags, ParameterInterval
from .problem import FreeParameter
from .result import FitResult
from .rows import ReportRow
from .solve import WEIGHTS, fit, fit_joint, latin_hypercube
from .target import (
    ELECTRONIC_CHOICES,
    LORENZ_METHODS,
    LatticeTarget,
    as_dataset,
    lattice_target,
)
from .uncertainty import ProfileInterval, profile_interval

__all__ = [
    "CORRELATION_LIMIT",
    "DEFAULT_MECHANISMS",
    "ELECTRONIC_CHOICES",
    "GOODNESS_LIMIT",
    "LORENZ_METHODS",
    "WEIGHTS",
    "Band",
    "BootstrapResult",
    "Comparison",
    "FitFlags",
    "FitResult",
    "FreeParameter",
    "LatticeTarget",
    "ParameterInterval",
    "ProfileInterval",
    "ReportRow",
    "as_dataset",
    "band_parts",
    "bootstrap",
    "check_level",
    "compare",
    "default_free",
    "default_model",
    "fit",
    "fit_joint",
    "json_float",
    "json_matrix",
    "lattice_target",
    "predict_band",
    "profile_interval",
    "sample_index",
]

# The old private names, kept so callers not yet switched keep working
# (whatif.py: _band_parts, _level, _sample_index; tests: _lhs). New code uses
# the public names on the right.
_band_parts = band_parts
_level = check_level
_sample_index = sample_index
_json_float = json_float
_json_matrix = json_matrix
_lhs = latin_hypercube
