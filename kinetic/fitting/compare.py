"""Several candidate models fitted to the same data, ranked by AIC, AICc or BIC with Akaike weights."""
from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

from ..errors import ParameterError
from .solve import fit
from .target import as_dataset

__all__ = ["Comparison", "compare"]


@dataclass
class Comparison:
    """Candidate models ranked by an information criterion.

    Attributes
    ----------
    criterion : str
        "aic", "aicc" or "bic".
    names : list of str
        Candidates, best first.
    results : dict
        name -> FitResult.
    scores : dict
        name -> criterion value.
    delta : dict
        name -> score - best score.
    weights : dict
        name -> Akaike (or BIC) weight exp(-delta/2) / sum.
    """

    criterion: str
    names: list
    results: dict
    scores: dict
    delta: dict
    weights: dict

    @property
    def best(self) -> str:
        return self.names[0]

    def summary(self) -> str:
        crit = self.criterion.upper()
        w = max(9, max(len(n) for n in self.names))
        lines = [f"{'candidate'.ljust(w)}  free  {'chi2':>9}  {crit:>9}  {'delta':>7}  weight"]
        for n in self.names:
            r = self.results[n]
            lines.append(f"{n.ljust(w)}  {r.n_free:4d}  {r.chi2:9.4g}  {self.scores[n]:9.4g}  "
                         f"{self.delta[n]:7.2f}  {self.weights[n]:.3f}")
        return "\n".join(lines)


def compare(candidates: Mapping, data, *, criterion: str = "aic", **fit_options) -> Comparison:
    """Fit several candidate models to the same data and rank them.

    Parameters
    ----------
    candidates : dict
        name -> (model, free) or (model, free, bounds).
    data : Dataset (or anything :func:`as_dataset` accepts)
    criterion : {"aic", "aicc", "bic"}
    **fit_options
        Passed to :func:`fit` (lorenz_method, n_starts, seed, weights ...);
        the same for every candidate, so the criteria are comparable.

    Returns
    -------
    Comparison

    Notes
    -----
    Weights are exp(-Delta_i / 2) normalised (Burnham & Anderson 2002,
    sec. 2.9). All candidates see the same lattice target and weighting; with
    an estimated scatter each likelihood uses its own s0, which the criteria
    count as one more parameter.
    """
    if criterion not in ("aic", "aicc", "bic"):
        raise ParameterError(f"criterion must be 'aic', 'aicc' or 'bic', got {criterion!r}")
    if not isinstance(candidates, Mapping) or not candidates:
        raise ParameterError("candidates must be a non-empty dict name -> (model, free)")
    if "bounds" in fit_options:
        raise ParameterError("give bounds per candidate as (model, free, bounds), not as bounds=")
    ds = as_dataset(data)
    results = {}
    for name, cand in candidates.items():
        try:
            model, free, *rest = cand
        except (TypeError, ValueError):
            raise ParameterError(f"candidate {name!r} must be (model, free) or (model, free, bounds)") from None
        if len(rest) > 1:
            raise ParameterError(f"candidate {name!r} must be (model, free) or (model, free, bounds)")
        results[name] = fit(model, ds, free, bounds=rest[0] if rest else None, **fit_options)
    scores = {n: float(getattr(r, criterion)) for n, r in results.items()}
    best = min(scores.values())
    delta = {n: s - best for n, s in scores.items()}
    raw = {n: math.exp(-0.5 * d) if math.isfinite(d) else 0.0 for n, d in delta.items()}
    tot = sum(raw.values())
    weights = {n: v / tot for n, v in raw.items()}
    names = sorted(results, key=lambda n: scores[n])
    return Comparison(criterion, names, results, scores, delta, weights)