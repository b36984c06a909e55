"""What-if area: conductivity against grain size and alloy fraction, their 2-D map, and zT against doping.

All numbers come from :mod:`kinetic.whatif` (sweeps, the grain x alloy map,
the single-band zT sweep) and :mod:`kinetic.fitting` (bands). The sweeps use
the model in use and the chosen temperature of the workbench; with a fit, the
grain-size curve and the zT curve carry the fit's 95% band.
"""
from __future__ import annotations

import numpy as np
import ipywidgets as ipw

from kinetic import materials as _materials
from kinetic.errors import ParameterError

from .plots import CurvesPlot, MapPlot
from .style import PART_COLOURS, css, fmt, mechanism_colour

__all__ = ["WhatIfPanel"]

_W = "W m\u207b\u00b9 K\u207b\u00b9"
NO_PARTNER = "(choose a partner)"


class WhatIfPanel(ipw.VBox):
    """Design studies with the model in use.

    Attributes
    ----------
    partner : ipw.Dropdown
        Second end member B of the alloy A(1-x)B(x) (A is the workbench's material).
    strain : ipw.FloatText
        Abeles' strain parameter epsilon for the alloy Gamma.
    keep_gamma : ipw.Checkbox
        Keep the sample's own point-defect Gamma on top of the alloy's.
    mobility : ipw.FloatText
        Weighted mobility [cm^2/(V s)] for zT when the data have no (rho, S) pair.
    update_button : ipw.Button
    plots : dict
        "grain", "alloy", "map", "zt" -> plot.
    last : dict
        The latest whatif results ("grain", "alloy", "map", "zt").
    """

    def __init__(self, workbench):
        self.wb = workbench
        g = workbench.messages.guard
        self.last: dict = {}
        names = _materials.names()
        host = workbench.material.name if workbench.material is not None else None
        partners = [NO_PARTNER] + [n for n in names if n != host]
        usual = {"Si": "Ge", "Ge": "Si"}  # the classic pair; other hosts wait for the user's choice
        default = usual.get(host) if usual.get(host) in partners else NO_PARTNER
        self.partner = ipw.Dropdown(options=partners, value=default, description="alloy with",
                                    style={"description_width": "6em"}, layout=ipw.Layout(width="16em"))
        self.partner.add_class(css("alloy-partner"))
        self.strain = ipw.BoundedFloatText(value=0.0, min=0.0, max=500.0, description="strain \u03b5",
                                           style={"description_width": "5em"}, layout=ipw.Layout(width="11em"))
        self.keep_gamma = ipw.Checkbox(value=True, indent=False,
                                       description="keep the sample's own point defects")
        self.mobility = ipw.BoundedFloatText(value=100.0, min=1e-3, max=1e5,
                                             description="weighted mobility [cm\u00b2/(V s)]",
                                             style={"description_width": "16em"}, layout=ipw.Layout(width="24em"))
        self.update_button = ipw.Button(description="Update what-ifs", button_style="primary", icon="refresh",
                                        layout=ipw.Layout(width="12em"))
        self.update_button.add_class(css("whatif-update"))
        self.update_button.on_click(g(lambda _b: self.update()))
        self.status = ipw.HTML("Press <b>Update what-ifs</b> to compute the studies with the model in use.")
        self.status.add_class(css("whatif-status"))
        self.plots = {
            "grain": CurvesPlot("whatif-grain", "grain size (boundary length) L [m]", f"\u03ba lattice [{_W}]",
                                "Grain size", xlog=True, ylog=True),
            "alloy": CurvesPlot("whatif-alloy", "alloy fraction x of B", f"\u03ba lattice [{_W}]",
                                "Alloying", ylog=True),
            "map": MapPlot("whatif-map", "grain size L [m]", "alloy fraction x of B",
                           f"log\u2081\u2080 \u03ba lattice [{_W}]", "Grain size and alloying", xlog=True),
            "zt": CurvesPlot("whatif-zt", "reduced Fermi level \u03b7 (doping)", "zT", "Doping and zT"),
        }
        grid = ipw.GridBox([p.widget for p in self.plots.values()],
                           layout=ipw.Layout(grid_template_columns="repeat(2, max-content)", grid_gap="4px 8px"))
        controls = ipw.HBox([self.partner, self.strain, self.keep_gamma],
                            layout=ipw.Layout(flex_flow="row wrap"))
        super().__init__([controls, ipw.HBox([self.mobility, self.update_button]), self.status, grid])
        self.add_class(css("whatif-panel"))
        self._stale = True
        self._computed_for = None

    def _signature(self):
        """What the studies depend on: the model in use, the temperature, the fit."""
        wb = self.wb
        return (repr(wb.model.to_dict()), float(wb.temperature.value), id(wb.result))

    def model_changed(self):
        """The workbench's model changed: mark the studies out of date (computing waits for the button)."""
        if self.last and not self._stale and self._signature() != self._computed_for:
            self.status.value = ("The model changed since the studies were computed; press "
                                 "<b>Update what-ifs</b>.")
            self._stale = True

    # --- computing ------------------------------------------------------------------
    def update(self):
        """Compute and draw all four studies at the workbench's temperature."""
        from kinetic import whatif

        wb = self.wb
        model = wb.model
        T0 = float(wb.temperature.value)
        result = wb.result if self._result_matches(model) else None
        mat = wb.material
        notes = []

        # grain size
        if any(m.kind == "boundary" for m in model.scattering):
            bname = next(m.name for m in model.scattering if m.kind == "boundary")
            lengths = np.geomspace(1e-8, 1e-2, 49)
            res_g = result if (result is not None and f"{bname}.length" in model.params) else None
            sw = whatif.grain_size_sweep(model, lengths, T0, res_g, mechanism=bname)
            self.last["grain"] = sw
            bands = {}
            if sw.lower is not None:
                bands["last fit: 95% band"] = (lengths, sw.lower[:, 0], sw.upper[:, 0], PART_COLOURS["band"])
            L0 = float(model.params[f"{bname}.length"])
            self.plots["grain"].update({"model": (lengths, sw.kappa[:, 0], PART_COLOURS["lattice"])}, bands,
                                       title=f"Grain size at {fmt(T0)} K",
                                       vlines={"grain size now": (L0, mechanism_colour("boundary"))})
        else:
            notes.append("no boundary mechanism is switched on, so there is no grain-size study")

        # alloy
        if mat is None:
            notes.append("the alloy studies need a material preset")
        elif self.partner.value in (None, NO_PARTNER):
            notes.append("choose an alloy partner above for the alloy studies")
        else:
            xs = np.linspace(0.0, 1.0, 41)
            extra = self._own_gamma(model) if self.keep_gamma.value else 0.0
            al = whatif.alloy_sweep(mat, self.partner.value, xs, T0, template=model,
                                    strain_epsilon=float(self.strain.value), extra_gamma=extra)
            self.last["alloy"] = al
            self.plots["alloy"].update({f"{mat.name}(1-x){self.partner.value}(x)":
                                        (xs, al.kappa[:, 0], mechanism_colour("point_defect"))},
                                       title=f"Alloying at {fmt(T0)} K")
            if any(m.kind == "boundary" for m in model.scattering):
                lengths = np.geomspace(1e-8, 1e-3, 31)
                mp = whatif.grain_alloy_map(model, lengths, np.linspace(0.0, 1.0, 21), T0, host_a=mat,
                                            host_b=self.partner.value, strain_epsilon=float(self.strain.value),
                                            extra_gamma=extra, mechanism=bname)
                self.last["map"] = mp
                self.plots["map"].update(lengths, mp.fractions, np.log10(mp.kappa),
                                         title=f"{mat.name}(1-x){self.partner.value}(x) at {fmt(T0)} K")

        # doping and zT
        zt = self._zt(model, T0, result, notes)
        if zt is not None:
            self.last["zt"] = zt
        self._stale = False
        self._computed_for = self._signature()
        done = "Computed with the model in use at " + f"{fmt(T0)} K" + (
            " and the 95% band of the last fit." if result is not None else " (no fit yet, so no bands).")
        self.status.value = done + ("<br><span style='color:#666'>" + "; ".join(notes) + ".</span>" if notes else "")
        return self.last

    def _result_matches(self, model) -> bool:
        """The last fit belongs to this model's mechanisms (bands make sense)."""
        res = self.wb.result
        if res is None:
            return False
        try:
            return all(f.param in model.params for f in res.free)
        except AttributeError:
            return False

    @staticmethod
    def _own_gamma(model) -> float:
        for m in model.scattering:
            if m.kind == "point_defect" and m.values.get("gamma") is not None:
                return float(m.values["gamma"])
        return 0.0

    def _measured_pair(self, T0):
        ds = self.wb.data
        if ds is None or ds.resistivity is None or ds.seebeck is None:
            return None
        T = ds.temperature
        if not (T.min() <= T0 <= T.max()):
            return None
        return float(np.interp(T0, T, ds.sigma)), float(np.interp(T0, T, ds.seebeck))

    def _zt(self, model, T0, result, notes):
        from kinetic import whatif

        kl = float(model.kappa(T0))
        pair = self._measured_pair(T0)
        if pair is not None:
            kw = {"sigma": pair[0], "seebeck": pair[1]}
            how = "band model through the measured \u03c3 and S"
        else:
            kw = {"weighted_mobility": float(self.mobility.value) * 1e-4}  # cm^2/(V s) -> m^2/(V s)
            how = f"band model with weighted mobility {fmt(self.mobility.value)} cm\u00b2/(V s)"
            notes.append(f"zT from a {how} (the data have no resistivity and Seebeck at {fmt(T0)} K)")
        try:
            zt = whatif.zt_vs_fermi_level(T0, kl, **kw)
        except ParameterError as exc:
            notes.append(f"no zT study: {' '.join(str(exc).split())}")
            return None
        curves = {"zT": (zt.eta, zt.zt, "#000000")}
        bands = {}
        if result is not None:
            from kinetic.fitting import predict_band

            try:
                b = predict_band(result, [T0])
                lo = whatif.zt_vs_fermi_level(T0, float(b.upper[0]), eta=zt.eta, **kw)  # more kappa: less zT
                hi = whatif.zt_vs_fermi_level(T0, float(b.lower[0]), eta=zt.eta, **kw)
                bands["last fit: 95% band"] = (zt.eta, lo.zt, hi.zt, PART_COLOURS["band"])
            except Exception as exc:  # noqa: BLE001 - the curve stays useful without its band
                notes.append(f"no zT band ({' '.join(str(exc).split())})")
        vlines = {"best doping": (zt.best_eta, "#2ca02c")}
        if zt.measured_eta is not None:
            vlines["this sample"] = (zt.measured_eta, "#d62728")
        self.plots["zt"].update(curves, bands, title=f"zT at {fmt(T0)} K: best {zt.best_zt:.2f} at \u03b7 = "
                                f"{zt.best_eta:.2f}", vlines=vlines)
        return zt

    def close_all(self):
        for p in self.plots.values():
            p.close()
        self.close()
