"""What the workbench shows: the readouts at the chosen temperature and its four live plots.

A mixin of :class:`~widgets.workbench.Workbench`: it asks the engine (through
:mod:`widgets._engine`) for the numbers of the model in use and hands them to
the plots and readouts. No physics of its own.
"""
from __future__ import annotations

import numpy as np

from . import _engine
from .plots import SAMPLE_COLOURS
from .style import fmt

__all__ = ["WorkbenchViews"]

_W = "W m\u207b\u00b9 K\u207b\u00b9"


class WorkbenchViews:
    """Numbers for the views of a workbench (needs ``model``, ``data``, ``material``, ``temperature``...)."""

    # --- numbers for the views --------------------------------------------------------------
    @property
    def temperatures(self) -> np.ndarray:
        """Grid of the model curves [K]: the data's range widened, or 2-1000 K."""
        ds = self.data
        lo, hi = (2.0, 1000.0) if ds is None else (float(ds.temperature.min()) / 1.5,
                                                   float(ds.temperature.max()) * 1.5)
        return np.geomspace(max(lo, 0.5), hi, 140)

    def electronic(self):
        """``(T, kappa_electronic, kappa_lattice_measured, kept)`` of the data's split, or None."""
        if "electronic" not in self._cache:
            on = self.electronic_on.value
            self._cache["electronic"] = _engine.electronic_split(self.data, self.lorenz_choice.value) if on else None
        return self._cache["electronic"]

    def floor(self, temperature):
        """Cahill-Watson-Pohl minimum of the material [W/m/K], or None without a preset."""
        if self.material is None:
            return None
        T = np.asarray(temperature, dtype=float)
        cached = self._cache.setdefault("floor", {})
        key = (self.material.name, T.shape, T.tobytes())
        if key not in cached:
            if len(cached) > 8:
                cached.clear()
            cached[key] = _engine.cahill_minimum(self.material, T)
        return cached[key]

    def parts(self, temperature, *, electronic: bool = False):
        """The engine's conductivity parts of the model in use (with the bipolar part if on).

        ``electronic=True`` adds the data's electronic part (when the split is on):
        the chain's total is then lattice + electronic + bipolar.
        """
        data = self.data if electronic and self.electronic() is not None else None
        return _engine.conductivity_parts(self.model, temperature, bipolar=self.electronic_panel.bipolar(),
                                          data=data, lorenz_method=self.lorenz_choice.value)

    def _readouts(self):
        T0 = float(self.temperature.value)
        T1 = np.array([T0])
        p = self.parts(T1)
        k0 = float(p.lattice[0])
        pe = self.parts(T1, electronic=True) if self.electronic() is not None else None
        ke0 = float(pe.electronic[0]) if pe is not None and np.isfinite(pe.electronic[0]) else None
        kb0 = float(p.bipolar[0]) if p.has_bipolar else None
        r = self.readouts
        r["temperature"].value = f"At <b>{fmt(T0)} K</b>:"
        r["lattice"].value = f"lattice \u03ba = <b>{fmt(k0)}</b> {_W}"
        r["electronic"].value = "" if ke0 is None else f"electronic \u03ba = {fmt(ke0)} {_W}"
        r["bipolar"].value = "" if kb0 is None else f"bipolar \u03ba = {fmt(kb0)} {_W}"
        total = float(pe.total[0]) if ke0 is not None else (float(p.total[0]) if kb0 is not None else None)
        r["total"].value = "" if total is None else f"total \u03ba = <b>{fmt(total)}</b> {_W}"
        fl = self.floor(T0)
        r["floor"].value = "" if fl is None else (
            f"<span title='Cahill-Watson-Pohl minimum'>minimum \u03ba = {fmt(float(fl))} {_W}</span>")
        self._k0 = k0
        if self.material is not None:
            length = next((float(m.values["length"]) for m in self.model.scattering if m.kind == "boundary"), None)
            self.material_panel.show_notes(self.material, temperature=T0, boundary_length=length)

    @property
    def kappa_at_temperature(self) -> float:
        """Model lattice conductivity at the chosen temperature [W/m/K] (as shown)."""
        return self._k0

    def _draw_conductivity(self):
        T = self.temperatures
        p = self.parts(T)
        parts = {"lattice": (T, p.lattice)}
        floor = self.floor(T)
        if floor is not None:
            parts["floor"] = (T, floor)
        ds = self.data
        measured = measured_lattice = label = None
        el = self.electronic()
        if ds is not None:
            measured = (ds.temperature, ds.kappa)
            label = "measured (lattice)" if ds.kind == "lattice" else "measured (total)"
            if el is not None:
                Td, ke, kl, _ = el
                parts["electronic"] = (Td, ke)
                parts["total"] = (Td, self.parts(Td, electronic=True).total)
                measured_lattice = (Td, kl)
        if p.has_bipolar:
            parts["bipolar"] = (T, p.bipolar)
            parts.setdefault("total", (T, p.total))
        samples, colour = [], None
        series = self.state.series
        if len(series) > 1:  # every sample of the series, one colour each; the fitted one is "measured"
            for i, d in enumerate(series):
                c = SAMPLE_COLOURS[i % len(SAMPLE_COLOURS)]
                if d is ds:
                    colour, label = c, f"{d.label or f'sample {i + 1}'} (being fitted)"
                else:
                    samples.append((d.label or f"sample {i + 1}", d.temperature, d.kappa, c))
        band = self._band if self.state.fit is not None and not self.state.fit_stale else None
        self.plots["conductivity"].update(T, parts, measured=measured, measured_lattice=measured_lattice,
                                          band=band, marker=float(self.temperature.value), measured_label=label,
                                          samples=samples, measured_colour=colour)

    def _draw_rates(self):
        model = self.model
        T0 = float(self.temperature.value)
        omega = {b.name: np.geomspace(b.omega_max * 1e-3, b.omega_max, 160) for b in model.branches}
        rates = {b.name: model.rates(omega[b.name], T0)[b.name] for b in model.branches}
        self.plots["rates"].update(omega, rates, {m.name: m.kind for m in model.scattering}, T0)

    def _draw_spectrum(self):
        T0 = float(self.temperature.value)
        s = self.model.spectral(T0)
        self.plots["spectrum"].update(s.omega, s.kappa_omega, T0)

    def _draw_mfp(self):
        model = self.model
        T0 = float(self.temperature.value)
        s = model.spectral(T0)
        length = next((float(m.values["length"]) for m in model.scattering if m.kind == "boundary"), None)
        self.plots["mfp"].update(s.mfp, s.kappa_accumulated, T0, length, median=s.median_mfp)

