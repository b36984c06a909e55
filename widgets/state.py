"""One source of truth for the workbench: data, model, free set, fit and what-if results.

Each input carries a version number that grows only when its value really
changes (a browser echoing back the value it was given changes nothing).
A result remembers the versions of the inputs it was computed from; when
they differ from the current ones the result is *stale*: shown marked as
such, and it cannot be saved or applied as current until it is refreshed.

No physics here: only bookkeeping of what was computed from what.
"""
from __future__ import annotations

import threading
from dataclasses import dataclass, field

__all__ = ["Stamped", "WorkbenchState"]


@dataclass
class Stamped:
    """A result with the input key it was computed from."""
    value: object
    inputs: tuple
    version: int = 0


@dataclass
class WorkbenchState:
    """The workbench's state.

    Attributes
    ----------
    data : Dataset or None
        The sample being fitted: always one of ``series`` (or None).
    series : tuple of Dataset
        Every sample loaded together (one file gives a series of one).
    full_model : LatticeModel
        Every mechanism, including those switched off.
    enabled : dict
        Mechanism name -> switched on.
    free : dict
        ``"<mechanism>.<param>"`` -> (ticked, lower, upper): the fit choices,
        kept for mechanisms switched off so they return as they were.
    split_electronic, lorenz_method : the electronic choices of the fit.
    versions : dict
        "data", "model", "free", "electronic" -> int.
    fit : Stamped or None
        The fit result shown in the table, with its inputs.
    whatif : Stamped or None
        The what-if results (dict), with their inputs.
    """
    data: object = None
    series: tuple = ()
    full_model: object = None
    enabled: dict = field(default_factory=dict)
    free: dict = field(default_factory=dict)
    split_electronic: bool = False
    lorenz_method: str = "auto"
    versions: dict = field(default_factory=lambda: {"data": 0, "model": 0, "free": 0, "electronic": 0})
    fit: Stamped | None = None
    whatif: Stamped | None = None
    lock: threading.RLock = field(default_factory=threading.RLock, repr=False)

    # --- inputs -------------------------------------------------------------------
    def bump(self, what: str) -> int:
        with self.lock:
            self.versions[what] += 1
            return self.versions[what]

    def set_data(self, data) -> None:
        """Use ``data`` as the sample being fitted; data outside the series start a series of one."""
        with self.lock:
            if data is not self.data:
                self.data = data
                self.bump("data")
            if data is None:
                self.series = ()
            elif not any(d is data for d in self.series):
                self.series = (data,)

    def set_series(self, series, index: int = 0) -> None:
        """Use several samples at once; sample ``index`` becomes the one being fitted."""
        with self.lock:
            self.series = tuple(series)
            self.set_data(self.series[index] if self.series else None)

    @property
    def sample_index(self):
        """Position of the sample being fitted in ``series`` (None without data)."""
        with self.lock:
            return next((i for i, d in enumerate(self.series) if d is self.data), None)

    def set_model(self, full_model, enabled: dict | None = None) -> bool:
        """Use a new full model (and switches); True when anything really changed."""
        with self.lock:
            enabled = dict(self.enabled if enabled is None else enabled)
            old = self.full_model
            same = (old is not None and enabled == self.enabled and _same_model(old, full_model))
            self.full_model = full_model
            self.enabled = enabled
            if not same:
                self.bump("model")
            return not same

    def set_electronic(self, split: bool, method: str) -> None:
        with self.lock:
            if (bool(split), method) != (self.split_electronic, self.lorenz_method):
                self.split_electronic, self.lorenz_method = bool(split), method
                self.bump("electronic")

    def set_free(self, key: str, ticked: bool, lower: float, upper: float) -> None:
        with self.lock:
            new = (bool(ticked), float(lower), float(upper))
            if self.free.get(key) != new:
                self.free[key] = new
                self.bump("free")

    @property
    def model(self):
        """The model in use: the mechanisms switched on."""
        off = [n for n, on in self.enabled.items() if not on]
        return self.full_model.without(*off) if off else self.full_model

    @property
    def free_names(self) -> list:
        names = set(self.model.params)
        return [k for k, (t, _, _) in self.free.items() if t and k in names]

    # --- keys of results ------------------------------------------------------------
    def fit_inputs(self) -> tuple:
        """What a fit depends on: the data, the electronic choice, the free set with its bounds,
        the model's structure and its held (not free) values. The free parameters' own values
        are outputs of the fit, so moving them (e.g. "Use fitted values") keeps the fit current."""
        with self.lock:
            model = self.model
            free = tuple(sorted((k, v) for k, v in self.free.items() if v[0] and k in model.params))
            ticked = {k for k, _ in free}
            held = tuple(sorted((k, v) for k, v in model.params.items() if k not in ticked))
            return (self.versions["data"], self.versions["electronic"], model.mechanism_names,
                    model.branch_names, model.material, held, free)

    def whatif_inputs(self, settings: tuple) -> tuple:
        """What the what-if studies depend on: the model version, the fit and the study settings."""
        with self.lock:
            fit_version = self.fit.version if self.fit is not None else 0
            return (self.versions["model"], fit_version, tuple(settings))

    # --- results ----------------------------------------------------------------------
    def set_fit(self, result, inputs: tuple) -> Stamped:
        with self.lock:
            v = (self.fit.version + 1) if self.fit is not None else 1
            self.fit = Stamped(result, inputs, v)
            return self.fit

    def clear_fit(self) -> None:
        with self.lock:
            self.fit = None

    @property
    def fit_stale(self) -> bool:
        with self.lock:
            return self.fit is not None and self.fit.inputs != self.fit_inputs()

    @property
    def current_fit(self):
        """The fit result when it is current, else None."""
        with self.lock:
            return None if self.fit is None or self.fit_stale else self.fit.value

    def set_whatif(self, results: dict, inputs: tuple) -> Stamped:
        with self.lock:
            v = (self.whatif.version + 1) if self.whatif is not None else 1
            self.whatif = Stamped(results, inputs, v)
            return self.whatif

    def whatif_stale(self, settings: tuple) -> bool:
        with self.lock:
            return self.whatif is not None and self.whatif.inputs != self.whatif_inputs(settings)


def _same_model(a, b) -> bool:
    if a is b:
        return True
    try:
        return (a.mechanism_names == b.mechanism_names and a.branch_names == b.branch_names
                and a.material == b.material and a.params == b.params
                and a.normal_correction == b.normal_correction
                and [br.to_dict() for br in a.branches] == [br.to_dict() for br in b.branches])
    except AttributeError:
        return False
