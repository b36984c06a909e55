"""Warnings about a fit (:class:`FitFlags`) and the interval of one parameter (:class:`ParameterInterval`)."""
from __future__ import annotations

from dataclasses import dataclass, field

from .common import json_float

__all__ = ["CORRELATION_LIMIT", "GOODNESS_LIMIT", "FitFlags", "ParameterInterval"]

#: |r| above which a pair of parameters is flagged as strongly correlated.
CORRELATION_LIMIT = 0.95
#: Reduced chi-squared above which a fit with stated errors is flagged as not
#: describing the data (common practice: chi2/dof ~ 1 +- sqrt(2/dof); 3 is far
#: outside that band for any dof >= 2). The flag quotes the chi-squared test's p-value.
GOODNESS_LIMIT = 3.0


@dataclass
class FitFlags:
    """Warnings about a fit.

    Attributes
    ----------
    at_bound : list of str
        Parameters within 0.1% of the fitted range of a bound: the bound, not
        the data, set their value; their interval is "not determined".
    correlated : list of (str, str, float)
        Pairs whose correlation |r| exceeds :data:`CORRELATION_LIMIT`: the data
        fix a combination, not each one.
    not_converged : bool
        The optimiser stopped on its evaluation limit for the best start.
    cancelled : bool
        ``should_stop()`` ended the fit early (best finished start returned).
    unidentified : list of str
        Parameters in a direction the Jacobian does not see (rank-deficient);
        their stderr is inf.
    poor_fit : str
        Empty, or the plain-words warning that the model does not describe
        the data within their stated errors (reduced chi-squared above
        :data:`GOODNESS_LIMIT`, with the chi-squared test's p-value).
    notes : list of str
        Plain remarks (electronic subtraction, dropped points, weighting).
    """

    at_bound: list = field(default_factory=list)
    correlated: list = field(default_factory=list)
    not_converged: bool = False
    cancelled: bool = False
    unidentified: list = field(default_factory=list)
    notes: list = field(default_factory=list)
    poor_fit: str = ""

    def __bool__(self) -> bool:
        return bool(self.at_bound or self.correlated or self.not_converged or self.cancelled or self.unidentified
                    or self.poor_fit)

    def messages(self) -> list:
        """One line per warning (notes excluded)."""
        out = [f"{n} is at a bound: the bound, not the data, set its value (interval not determined)"
               for n in self.at_bound]
        out += [f"{a} and {b} are strongly correlated (r = {r:+.3f})" for a, b, r in self.correlated]
        out += [f"{n} is not determined by the data" for n in self.unidentified]
        if self.poor_fit:
            out.append(self.poor_fit)
        if self.not_converged:
            out.append("the optimiser did not converge (evaluation limit reached)")
        if self.cancelled:
            out.append("the fit was cancelled; the best finished start is shown")
        return out

    def to_dict(self) -> dict:
        return {"at_bound": list(self.at_bound),
                "correlated": [[a, b, json_float(r)] for a, b, r in self.correlated],
                "not_converged": bool(self.not_converged), "cancelled": bool(self.cancelled),
                "unidentified": list(self.unidentified), "poor_fit": str(self.poor_fit),
                "notes": list(self.notes)}

    @classmethod
    def from_dict(cls, d) -> FitFlags:
        """Rebuild from :meth:`to_dict` (records check the types first)."""
        return cls(at_bound=[str(s) for s in d.get("at_bound", [])],
                   correlated=[(str(a), str(b), float(r)) for a, b, r in d.get("correlated", [])],
                   not_converged=bool(d.get("not_converged", False)), cancelled=bool(d.get("cancelled", False)),
                   unidentified=[str(s) for s in d.get("unidentified", [])],
                   notes=[str(s) for s in d.get("notes", [])], poor_fit=str(d.get("poor_fit", "")))


@dataclass(frozen=True)
class ParameterInterval:
    """The linearised (Wald) interval of one parameter, or why it has none.

    Attributes
    ----------
    name : str
    value : float
        Fitted value [unit].
    lower, upper : float
        Interval ends [unit]; nan when not determined.
    level : float
    determined : bool
        False when the parameter sits at a bound, is not seen by the data
        (rank-deficient Jacobian, infinite error), or its interval is wider
        than the whole allowed range.
    note : str
        Plain words: why it is not determined (naming the bound it hit), or
        which end was cut at a bound; empty otherwise.
    bound : float or None
        The bound the value sits at (not determined) [unit].
    unit : str
    """

    name: str
    value: float
    lower: float
    upper: float
    level: float
    determined: bool
    note: str = ""
    bound: float | None = None
    unit: str = ""

    @property
    def text(self) -> str:
        """``[lower, upper]`` or ``not determined (...)``."""
        if not self.determined:
            return f"not determined ({self.note})" if self.note else "not determined"
        return f"[{self.lower:.4g}, {self.upper:.4g}]"

    def to_dict(self) -> dict:
        return {"lower": json_float(self.lower), "upper": json_float(self.upper), "level": self.level,
                "determined": bool(self.determined), "note": self.note,
                "bound": json_float(self.bound) if self.bound is not None else None}
