"""In-process tests of the workbench (no kernel, no browser).

ipywidgets 8 and ipympl work without a front end: setting a widget's value
fires its observers synchronously and ``button.click()`` runs its handlers, so
these tests drive the workbench exactly as a user's clicks would and check
what the model, the plots and the readouts then show.

The workbench does no physics; the tests compare what it shows with direct
calls to kinetic's public API on the same model (wiring checks), plus two
consequences of Matthiessen's rule that hold for any model (removing a
scattering mechanism, or adding one, cannot lower / raise kappa; Callaway,
Phys. Rev. 113, 1046, 1959, Eq. 8: kappa is an integral of the combined
relaxation time, which only grows when a positive rate is removed).
"""
from __future__ import annotations

import datetime
import json

import matplotlib

matplotlib.use("module://ipympl.backend_nbagg")

import ipywidgets as ipw
import numpy as np
import pytest

from kinetic import demo, materials, whatif
from kinetic.fitting import fit
from kinetic.lattice import LatticeModel
from kinetic.records import load_record
from kinetic.scattering import Boundary, Umklapp
from widgets import MECHANISM_COLOURS, Workbench, default_model
from widgets.figures import _slug, decade_label, decade_limits, nice_ceil, step_limits
from widgets.style import fmt, unit_text

pytestmark = pytest.mark.filterwarnings(
    "ignore:Passing unrecognized arguments to super\\(Toolbar\\):DeprecationWarning")


def _lattice_line(w):
    w.update_plot("conductivity")
    return w.plots["conductivity"].lines["lattice"]


# --- opening ---------------------------------------------------------------------------
def test_opens_on_demo_data_as_a_widget(wb):
    assert isinstance(wb, ipw.VBox)
    assert wb.data is not None and wb.data.label == demo.demo_dataset().label
    assert wb.model.material == demo.DEMO_MATERIAL
    assert wb.model.params == demo.demo_model().params
    # the readout is the model's own number at the chosen temperature
    assert wb.kappa_at_temperature == pytest.approx(float(wb.model.kappa(300.0)), rel=1e-12)  # same call
    assert fmt(wb.kappa_at_temperature) in wb.readouts["lattice"].value
    # the demo carries a resistivity: the electronic split is on and drawn
    assert wb.electronic_on.value and not wb.electronic_on.disabled
    line = wb.plots["conductivity"].lines["electronic"]
    assert line.get_visible() and len(line.get_xdata()) == int(np.sum(wb.electronic().kept))
    assert wb.plots["conductivity"].measured.get_visible()


def test_sliders_come_from_parameter_metadata(wb):
    info = wb.model.parameter_info()
    free = {k for k, p in info.items() if not p.fixed}
    assert set(wb.controls) == free  # fixed (material) constants are not sliders
    for key, ctl in wb.controls.items():
        p = info[key]
        assert ctl.words in ctl.label.value and f"title='{key}'" in ctl.label.value  # words, code key as tooltip
        if p.unit:
            assert unit_text(p.unit) in ctl.label.value  # unit in every label, one notation
        assert isinstance(ctl.slider, ipw.FloatLogSlider) == p.log
    fixed = {k for k, p in info.items() if p.fixed}
    shown = {k for card in wb.cards.values() for k in card.constants}
    assert shown == fixed  # in the folded "constants" section instead


# --- sliders drive model, plot and readout -----------------------------------------------
def test_slider_changes_model_line_and_readout(wb):
    line = _lattice_line(wb)
    before_y = np.array(line.get_ydata())
    before_readout = wb.readouts["lattice"].value
    wb.plots["conductivity"].canvas.draw()
    before_png = wb.plots["conductivity"].canvas._data_url
    ctl = wb.controls["umklapp.gruneisen"]
    ctl.slider.value = 2.5
    assert wb.model.params["umklapp.gruneisen"] == pytest.approx(2.5, rel=1e-12)  # slider value as set
    assert float(ctl.box.value) == pytest.approx(2.5, rel=1e-5)  # the box shows six digits
    after_y = np.array(_lattice_line(wb).get_ydata())
    assert not np.allclose(after_y, before_y)
    T = wb.temperatures
    np.testing.assert_allclose(after_y, wb.model.kappa(T), rtol=1e-12)  # the plot shows the model itself
    assert wb.readouts["lattice"].value != before_readout
    wb.plots["conductivity"].canvas.draw()
    assert wb.plots["conductivity"].canvas._data_url != before_png  # the pixels changed too


def test_slider_move_updates_artists_in_place(wb):
    plot = wb.plots["conductivity"]
    lines_before = {k: id(v) for k, v in plot.lines.items()}
    n_artists = len(plot.ax.get_children())
    fig = plot.fig
    plot.canvas.draw()
    full_draws = plot.full_draws
    for v in (1.6, 1.7, 1.8):
        wb.controls["umklapp.gruneisen"].slider.value = v
    assert plot.fig is fig
    assert {k: id(v) for k, v in plot.lines.items()} == lines_before
    assert len(plot.ax.get_children()) == n_artists
    # small moves keep the (decade-snapped) axes, so only the curves were redrawn
    assert plot.blits >= 1 and plot.full_draws == full_draws


def test_numeric_box_gives_exact_value_beyond_slider(wb):
    ctl = wb.controls["boundary.length"]
    ctl.box.value = "2.345678e-6"
    assert wb.model.params["boundary.length"] == 2.345678e-6  # exactly what was typed
    ctl.box.value = "0.5"  # beyond the slider's range: the model takes it, the slider stops at its end
    assert wb.model.params["boundary.length"] == 0.5
    assert ctl.slider.value == pytest.approx(ctl.range[1], rel=1e-9)  # slider clamps (log steps round)


def test_invalid_entry_is_refused_in_plain_words(wb):
    ctl = wb.controls["boundary.length"]
    before = wb.model.params["boundary.length"]
    ctl.box.value = "-1"
    assert wb.model.params["boundary.length"] == before
    assert ctl.value == before and float(ctl.box.value) == pytest.approx(before, rel=1e-5)  # shown again
    msg = wb.messages.last_error
    assert "boundary.length" in msg and "-1" in msg and "Traceback" not in msg
    texts = "".join(o.get("text", "") for o in wb.messages.output.outputs)
    assert "Problem:" in texts and "boundary.length" in texts
    ctl.box.value = "two microns"
    assert wb.model.params["boundary.length"] == before
    assert "expected a number" in wb.messages.last_error and "'two microns'" in wb.messages.last_error


def test_non_number_in_a_constant_box_is_refused_in_plain_words(wb):
    # a material constant's text box: the same refusal as a slider's box, shown on the message line
    card = next(c for c in wb.cards.values() if c.constants)
    key, box = next(iter(card.constants.items()))
    before = box.value
    box.value = "lots"
    assert box.value == before  # the value in use is shown again
    assert key in wb.messages.last_error and "expected a number" in wb.messages.last_error
    assert "'lots'" in wb.messages.last_error


# --- mechanisms -------------------------------------------------------------------------
def test_switching_a_mechanism_off_raises_kappa(wb):
    k_all = wb.kappa_at_temperature
    wb.cards["point_defect"].toggle.value = False
    assert "point_defect" not in wb.model.mechanism_names
    assert wb.controls["point_defect.gamma"].slider.disabled
    k_without = wb.kappa_at_temperature
    assert k_without > k_all  # Matthiessen: removing a positive rate lengthens tau (Callaway 1959, Eq. 8)
    wb.cards["point_defect"].toggle.value = True
    assert wb.kappa_at_temperature == pytest.approx(k_all, rel=1e-12)  # the same model again


def test_last_resistive_mechanism_cannot_be_switched_off(wb):
    for name in ("boundary", "point_defect"):
        wb.cards[name].toggle.value = False
    wb.cards["umklapp"].toggle.value = False
    assert wb.cards["umklapp"].toggle.value  # put back
    assert "umklapp" in wb.model.mechanism_names
    assert "infinite" in wb.messages.last_error


def test_adding_a_mechanism_builds_its_card_and_lowers_kappa(wb):
    k0 = wb.kappa_at_temperature
    wb.add_kind.value = "dislocation"
    wb.add_button.click()
    assert "dislocation" in wb.model.mechanism_names
    assert "dislocation" in wb.cards and "dislocation.density" in wb.controls
    assert wb.kappa_at_temperature < k0  # an extra positive rate shortens tau (Callaway 1959, Eq. 8)
    assert "dislocation.density" in wb.fit_panel.rows  # and it can be fitted


def test_material_and_branch_choices_rebuild_the_model(wb):
    wb.material_panel.choose("Si")
    assert wb.model.material == "Si"
    assert wb.model.params == default_model("Si").params  # the engine's default model of the preset
    wb.material_panel.branches.value = True
    assert wb.model.branch_names == ("L", "T")
    expected = default_model("Si", split_branches=True)
    assert wb.kappa_at_temperature == pytest.approx(float(expected.kappa(300.0)), rel=1e-12)  # same model
    wb.show_figure("rates")
    rates = wb.plots["rates"]
    styles = {b: {l.get_linestyle() for (bb, _), l in rates.lines.items() if bb == b and l.get_visible()}
              for b in ("L", "T")}
    assert styles == {"L": {"-"}, "T": {"--"}}


def test_model_as_given_without_preset():
    b = materials.get("Ge").branches()
    model = LatticeModel(b, [Boundary(1e-3), Umklapp(B=2e-19)])
    w = Workbench(model=model)
    try:
        assert w.data is None and w.material is None
        assert w.material_panel.choice.value == "(model as given)"
        assert w.readouts["floor"].value == ""  # no preset: no Cahill-Watson-Pohl floor
        w.material_panel.branches.value = True
        assert w.model.branch_names == ("avg",) and "material preset" in w.messages.last_error
        assert w.kappa_at_temperature == pytest.approx(float(model.kappa(300.0)), rel=1e-12)  # same model
    finally:
        w.close()


# --- plots ------------------------------------------------------------------------------
def test_rates_plot_shows_each_mechanism_in_its_colour(wb):
    wb.temperature.value = 150.0
    wb.show_figure("rates")
    plot = wb.plots["rates"]
    model = wb.model
    b = model.branches[0]
    for name in model.mechanism_names:
        line = plot.lines[(b.name, name)]
        kind = model.mechanism(name).kind
        assert line.get_color() == MECHANISM_COLOURS[kind]
        expected = model.rates(line.get_xdata(), 150.0)[b.name][name]
        y = np.asarray(line.get_ydata(), float)
        ok = np.isfinite(y)
        np.testing.assert_allclose(y[ok], np.broadcast_to(expected, y.shape)[ok], rtol=1e-12)  # same call
    assert "150 K" in plot.title.get_text()


def test_spectrum_and_mean_free_path_plots(wb):
    wb.update_all_plots()
    s = wb.model.spectral(300.0)
    line = wb.plots["spectrum"].lines["avg"]
    np.testing.assert_allclose(line.get_ydata(), s.kappa_omega["avg"], rtol=1e-12)  # same call
    mfp = wb.plots["mfp"]
    np.testing.assert_allclose(mfp.line.get_ydata(), s.kappa_accumulated[s.mfp > 0], rtol=1e-12)  # same call
    assert mfp.grain.get_xdata()[0] == wb.model.params["boundary.length"]
    wb.show_figure("mfp")
    wb.controls["boundary.length"].box.value = "3e-7"
    assert mfp.grain.get_xdata()[0] == 3e-7
    lo, hi = mfp.ax.get_xlim()
    assert lo < 3e-7 < hi  # the grain-size marker stays in view


def test_hidden_plots_are_updated_when_shown(wb):
    wb.show_figure("conductivity")
    wb.controls["umklapp.gruneisen"].slider.value = 2.2
    assert wb.plots["spectrum"].stale
    wb.show_figure("spectrum")
    assert not wb.plots["spectrum"].stale
    np.testing.assert_allclose(wb.plots["spectrum"].lines["avg"].get_ydata(),
                               wb.model.spectral(300.0).kappa_omega["avg"], rtol=1e-12)  # same call


def test_temperature_control_moves_readout_and_marker(wb):
    wb.temperature.value = 100.0
    assert wb.kappa_at_temperature == pytest.approx(float(wb.model.kappa(100.0)), rel=1e-12)  # same call
    assert "100 K" in wb.readouts["temperature"].value
    assert wb.plots["conductivity"].marker.get_xdata()[0] == 100.0


def test_axis_helpers():
    # pytest.approx's default (1e-6 relative) absorbs the rounding of 10**x products
    assert nice_ceil(7.2) == 10.0 and nice_ceil(1.2) == 1.5 and nice_ceil(0.031) == pytest.approx(0.05)
    assert decade_limits(0.3, 47.0) == pytest.approx((0.1, 100.0))
    assert decade_limits(1e-3, 1e9, max_decades=6) == pytest.approx((1e3, 1e9))
    assert step_limits(6.7, 1200.0) == pytest.approx((5.0, 2000.0))
    assert decade_label(100.0) == "100" and decade_label(1e12, plain=False) == "10\u00b9\u00b2"
    assert decade_label(3e5) == ""  # not a decade


# --- data -------------------------------------------------------------------------------
GOOD = (b"# label: pellet B (invented)\n"
        b"T [K], kappa [W/(m K)], rho [uOhm cm], S [uV/K]\n"
        b"100, 12.0, 200, 80\n200, 9.0, 300, 120\n300, 7.0, 400, 160\n")


def _upload(w, name, content):
    w.data_panel.upload.value = ({"name": name, "type": "text/csv", "size": len(content),
                                  "content": memoryview(content),
                                  "last_modified": datetime.datetime(2024, 1, 1, tzinfo=datetime.timezone.utc)},)


def test_bad_upload_shows_the_line_and_keeps_previous_state(wb):
    before_data = wb.data
    before_params = wb.model.params
    bad = b"T [K], kappa [W/(m K)]\n10, 2.5\n20, two\n30, 3.1\n"
    _upload(wb, "bad.csv", bad)
    assert wb.data is before_data and wb.model.params == before_params
    err = wb.data_panel.error.value
    assert "bad.csv" in err and "line 3" in err and "20, two" in err  # the loader's line, shown verbatim
    assert "previous data are still in use" in err
    assert "bad.csv" in wb.messages.last_error
    assert wb.data_panel.upload.value == ()  # cleared, so the fixed file can be chosen again


def test_good_upload_enables_the_electronic_split(wb):
    _upload(wb, "pellet_b.csv", GOOD)
    assert wb.data.label == "pellet B (invented)" and len(wb.data.temperature) == 3
    assert wb.data_panel.error.value == ""
    assert wb.electronic_on.value and not wb.electronic_on.disabled
    el = wb.electronic()
    np.testing.assert_allclose(wb.plots["conductivity"].lines["electronic"].get_ydata(), el.kappa_electronic,
                               rtol=1e-12)  # same call
    assert "electronic" in wb.readouts["electronic"].value
    wb.electronic_on.value = False
    assert not wb.plots["conductivity"].lines["electronic"].get_visible()


def test_upload_without_resistivity_disables_the_split(wb):
    _upload(wb, "plain.csv", b"T [K], kappa [W/(m K)]\n100, 12\n200, 9\n300, 7\n")
    assert wb.electronic_on.disabled and not wb.electronic_on.value
    assert "no resistivity" in wb.electronic_panel.info.value


def test_lorenz_method_changes_the_electronic_part(wb):
    assert wb.lorenz_choice.value == "auto"  # as the fitter: band model when S is measured
    ke_auto = np.array(wb.electronic().kappa_electronic)
    wb.lorenz_choice.value = "sommerfeld"
    ke_sommerfeld = np.array(wb.electronic().kappa_electronic)
    # single-band L lies between 2 (kB/e)^2 and L0 for acoustic scattering, so L0 gives the larger
    # electronic part (Kim et al., APL Mater. 3, 041506, 2015; from memory)
    assert np.all(ke_sommerfeld > ke_auto)
    np.testing.assert_allclose(wb.plots["conductivity"].lines["electronic"].get_ydata(), ke_sommerfeld,
                               rtol=1e-12)  # same call


def test_lorenz_method_needing_seebeck_is_refused_without_it(wb):
    _upload(wb, "pellet_c.csv", b"T [K], kappa [W/(m K)], rho [uOhm cm]\n100, 12, 200\n200, 9, 300\n")
    wb.lorenz_choice.value = "kim"
    assert wb.lorenz_choice.value == "auto" and "Seebeck" in wb.messages.last_error
    assert wb.electronic() is not None


def test_demo_button_restores_demo_data(wb):
    _upload(wb, "pellet_b.csv", GOOD)
    wb.data_panel.demo_choice.value = wb.data_panel.demo_choice.options[0]
    wb.data_panel.use_demo.click()
    assert wb.data == demo.demo_dataset()


# --- fitting ----------------------------------------------------------------------------
def test_fit_blocking_and_use_fitted_values_moves_sliders(wb):
    fp = wb.fit_panel
    assert fp.free == list(demo.DEFAULT_FREE)
    res = fp.run(blocking=True)
    direct = fit(demo.demo_model(), demo.demo_dataset(), list(demo.DEFAULT_FREE),
                 bounds=fp.bounds, n_starts=int(fp.starts.value))
    for k in demo.DEFAULT_FREE:
        assert res.values[k] == pytest.approx(direct.values[k], rel=1e-9)  # same deterministic fit
        assert k in fp.table.value
    assert "\u00b1" in fp.table.value and "95% interval" in fp.table.value
    assert wb.plots["conductivity"].band.get_visible()
    assert not fp.use_button.disabled
    fp.use_button.click()
    for k, v in res.values.items():
        assert wb.controls[k].value == v
        assert wb.model.params[k] == v
    # the sliders moved: log sliders show the fitted value as far as their steps allow
    assert wb.controls["boundary.length"].slider.value == pytest.approx(res.values["boundary.length"], rel=1e-12)  # powers of ten round at 1e-16
    np.testing.assert_allclose(_lattice_line(wb).get_ydata(), res.model.kappa(wb.temperatures), rtol=1e-12)  # same model


def test_fit_runs_in_a_thread_with_progress(wb):
    fp = wb.fit_panel
    fp.starts.value = 3
    thread = fp.run()
    fp.join(60)
    assert not thread.is_alive()
    assert fp.result is not None and fp.progress.value == fp.progress.max == 3
    assert fp.progress.bar_style == "success" and not fp.fit_button.disabled and fp.cancel_button.disabled
    assert wb.result is fp.result


def test_cancel_stops_the_fit_after_the_current_start(wb):
    fp = wb.fit_panel
    fp.starts.value = 6
    original = fp._progress

    def progress_then_cancel(i, n, cost):
        original(i, n, cost)
        if i == 1:
            fp.cancel_button.click()

    fp._progress = progress_then_cancel
    fp.run()
    fp.join(60)
    assert fp.result is not None and fp.result.flags.cancelled
    assert len(fp.result.starts) == 1
    assert "cancelled" in fp.table.value


def test_fit_refuses_without_free_parameters(wb):
    fp = wb.fit_panel
    fp.set_free([])
    fp.fit_button.click()
    assert fp.result is None and "no parameter is ticked" in wb.messages.last_error


def test_fit_flags_correlations_and_bounds(wb):
    fp = wb.fit_panel
    row = fp.rows["boundary.length"]
    row.lower.value, row.upper.value = 1e-5, 1e-3  # the truth (1.5 um, invented) is below: hits the bound
    res = fp.run(blocking=True)
    assert "boundary.length" in res.flags.at_bound
    assert "at a bound" in fp.table.value


# --- what-if ----------------------------------------------------------------------------
def test_whatif_studies_use_the_model_and_the_fit_band(wb):
    wb.fit_panel.run(blocking=True)
    wb.fit_panel.use_fitted_values()
    wp = wb.whatif_panel
    wp.update_button.click()  # no alloy partner chosen yet for this host: no alloy studies
    wp.join(60)
    assert set(wp.last) == {"grain", "zt"} and "choose an alloy partner" in wp.status.value
    assert wp.progress.value == wp.progress.max and wp.progress.bar_style == "success"
    wp.partner.value = "Ge"
    wp.update_button.click()
    wp.join(60)
    assert set(wp.last) == {"grain", "alloy", "map", "zt"}, wb.messages.messages
    lengths = wp.plots["grain"].lines["model"].get_xdata()
    direct = whatif.grain_size_sweep(wb.model, lengths, 300.0, wb.result)
    np.testing.assert_allclose(wp.plots["grain"].lines["model"].get_ydata(), direct.kappa[:, 0], rtol=1e-12)  # same call
    assert wp.plots["grain"].bands["last fit: 95% band"].get_visible()
    assert wp.last["map"].kappa.shape == (21, 31)
    assert "best" in wp.plots["zt"].title.get_text()
    wb.controls["umklapp.gruneisen"].slider.value = 1.2
    assert "Stale" in wp.status.value and wp.stale


# --- session and exports ------------------------------------------------------------------
def test_save_and_load_a_record_and_export(tmp_path, wb):
    sp = wb.session_panel
    sp.save_button.click()  # nothing to save yet
    assert "run a fit first" in wb.messages.last_error
    res = wb.fit_panel.run(blocking=True)
    rec_path = tmp_path / "session.json"
    sp.record_path.value = str(rec_path)
    assert not sp.save_button.disabled
    sp.save_button.click()
    rec = load_record(rec_path)
    assert rec.values == pytest.approx(res.values, rel=1e-15)  # floats round-trip exactly through repr
    assert json.loads(rec_path.read_text())["schema"] == "kinetic.fit-record"
    other = Workbench(model=default_model("Si"))
    try:
        other.session_panel.record_path.value = str(rec_path)
        other.session_panel.load_button.click()
        assert other.messages.last_error == ""
        assert other.data == res.data and other.model.params == res.model.params
        assert other.fit_panel.result is not None and other.plots["conductivity"].band.get_visible()
    finally:
        other.close()
    sp.folder.value = str(tmp_path)
    sp.figure_choice.value = "conductivity"
    for fmt_, magic in (("png", b"\x89PNG\r\n\x1a\n"), ("svg", b"<?xml"), ("pdf", b"%PDF")):
        sp.format_choice.value = fmt_
        sp.export_figure_button.click()
        out = tmp_path / f"kappa_T-{_slug(wb.data.label)}.{fmt_}"
        assert out.read_bytes()[:len(magic)] == magic, wb.messages.messages
    sp.export_curves_button.click()
    curves = (tmp_path / f"kappa_T-{_slug(wb.data.label)}.csv").read_text().splitlines()
    assert "model: lattice: temperature T [K]" in curves[0] and len(curves) > 100
    csv_path = tmp_path / "fit.csv"
    sp.table_choice.value = "fit"
    sp.export_table(path=csv_path)
    lines = csv_path.read_text().splitlines()
    assert lines[0].startswith("parameter,key,value,stderr")
    row = dict(zip(lines[0].split(","), lines[1].split(",")))
    assert float(row["value"]) == res.values[row["key"]]  # repr round trip
    sp.table_choice.value = "data"
    sp.export_table(path=tmp_path / "data.csv")
    assert len((tmp_path / "data.csv").read_text().splitlines()) == len(wb.data.temperature) + 1
    leftovers = [p.name for p in tmp_path.iterdir() if p.name.startswith(".")]
    assert leftovers == []  # atomic writes leave no temporary files


def test_export_refuses_wrong_suffix_and_missing_study(tmp_path, wb):
    sp = wb.session_panel
    with pytest.raises(Exception, match=r"\.png"):
        sp.export_figure(path=tmp_path / "k.jpg")
    sp.folder.value = str(tmp_path)
    sp.table_choice.value = "grain"
    sp.export_table_button.click()
    assert "Update what-ifs" in wb.messages.last_error
    sp.figure_choice.value = "map"
    sp.export_figure_button.click()
    assert "Update what-ifs" in wb.messages.last_error
    assert list(tmp_path.iterdir()) == []


def test_loading_a_damaged_record_keeps_the_session(tmp_path, wb):
    bad = tmp_path / "broken.json"
    bad.write_text('{"schema": "kinetic.fit-record", "version": 1, "samples": [')
    before = wb.model.params
    wb.session_panel.record_path.value = str(bad)
    wb.session_panel.load_button.click()
    assert wb.model.params == before
    assert "broken.json" in wb.messages.last_error and "Traceback" not in wb.messages.last_error


def test_browser_slider_echo_keeps_the_exact_value(wb):
    """A browser slider rounds a value set from Python to its step grid and sends it back."""
    ctl = wb.controls["umklapp.gruneisen"]
    ctl.set_value(2.0582)  # e.g. "use fitted values"
    wb.set_values({"umklapp.gruneisen": 2.0582})
    step = ctl.slider.step  # in decades for a log slider
    snapped = 10 ** (round(np.log10(2.0582) / step) * step)
    ctl.slider.value = snapped  # the echo from the front end
    assert wb.model.params["umklapp.gruneisen"] == 2.0582 and ctl.value == 2.0582
    ctl.slider.value = 10 ** (np.log10(snapped) + step)  # one real step: taken
    assert wb.model.params["umklapp.gruneisen"] == pytest.approx(10 ** (np.log10(snapped) + step), rel=1e-12)  # powers of ten round at 1e-16


def test_late_echo_of_an_older_value_is_ignored(wb):
    """The browser may send back the rounded start value after a fit has set new values."""
    ctl = wb.controls["umklapp.gruneisen"]
    start = ctl.value
    step = ctl.slider.step
    wb.fit_panel.run(blocking=True)
    wb.fit_panel.use_fitted_values()
    fitted = wb.result.values["umklapp.gruneisen"]
    ctl.slider.value = 10 ** (round(np.log10(start) / step) * step)  # late echo of the start value
    assert wb.model.params["umklapp.gruneisen"] == fitted
    assert ctl.slider.value == pytest.approx(fitted, rel=1e-12)  # and the slider shows the fit again


def test_bipolar_part_is_drawn_and_added_to_the_total(wb):
    from kinetic.electronic import bipolar_kappa_activated

    plot = wb.plots["conductivity"]
    assert not plot.lines["bipolar"].get_visible()
    total_before = np.array(plot.lines["total"].get_ydata())
    wb.bipolar_on.value = True
    wb.bipolar_controls["bipolar.band_gap"].box.value = "0.5"
    T = wb.temperatures
    expected = bipolar_kappa_activated(T, 0.05, 0.5)
    np.testing.assert_allclose(plot.lines["bipolar"].get_ydata(), expected, rtol=1e-12)  # same call
    Td = wb.electronic().temperature
    # added and nothing else: equal up to the rounding of sums of ~10 W/m/K (1e-12 of the total)
    np.testing.assert_allclose(plot.lines["total"].get_ydata() - total_before,
                               bipolar_kappa_activated(Td, 0.05, 0.5), rtol=1e-9,
                               atol=1e-12 * total_before.max())
    assert "bipolar" in wb.readouts["bipolar"].value


def test_every_parameter_has_plain_words_not_its_code_key():
    # Issue 10: labels in plain words of the trade, the code key only in a tooltip. Every parameter of
    # every registered mechanism form and of the bipolar term must get words from the engine's own
    # declarations, never the bare code name.
    from kinetic.scattering import MECHANISMS

    from widgets import _engine

    keys = [f"{kind}.{name}" for kind, cls in MECHANISMS.items() for ex in cls.examples() for name in ex.parameters]
    keys += list(_engine.bipolar_parameters())
    for key in keys:
        words = _engine.parameter_words(key)
        assert words != key.split(".", 1)[1] and words != key, key
