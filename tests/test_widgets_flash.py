"""In-process tests of the workbench's flash (diffusivity) data and sample series (no kernel, no browser).

The workbench adds no physics: every k it shows for a diffusivity file must be
exactly what :func:`kinetic.load_data` gives for the same file with the same
options (the panel only turns its choices into the loader's keyword options),
so the comparisons below are to floating-point identity (rtol 1e-12: the same
calls on the same numbers). The series checks are wiring: the state holds the
series, the plot draws each sample, the chooser makes a sample the data in use
and stales the fit as new data do.
"""
from __future__ import annotations

import datetime

import matplotlib

matplotlib.use("module://ipympl.backend_nbagg")

import numpy as np
import pytest

from kinetic import demo, load_data, parse_data, porosity
from widgets import _engine
from widgets.series_panel import FlashOptions
from widgets.style import esc

pytestmark = pytest.mark.filterwarnings(
    "ignore:Passing unrecognized arguments to super\\(Toolbar\\):DeprecationWarning")

PATHS = [str(p) for p in demo.flash_series_paths()]

#: an invented flash file (INVENTED numbers) with neither density nor heat capacity
NO_DENSITY = b"# label: pellet X (invented)\nT [K], D [mm^2/s]\n300, 4.0\n400, 3.5\n"
#: an invented flash file (INVENTED numbers) with density and c_p but no relative density
PLAIN = (b"# label: pellet Y (invented)\n# density: 2.0 g/cm^3\n# material: Mg2Si\n"
         b"T [K], D [mm^2/s], cp [J/(g K)]\n300, 4.0, 0.80\n400, 3.5, 0.85\n500, 3.1, 0.88\n")


def _upload(w, *files):
    w.data_panel.upload.value = tuple(
        {"name": name, "type": "text/csv", "size": len(content), "content": memoryview(content),
         "last_modified": datetime.datetime(2024, 1, 1, tzinfo=datetime.timezone.utc)}
        for name, content in files)


def _same(a, b):
    np.testing.assert_allclose(np.asarray(a, float), np.asarray(b, float), rtol=1e-12)  # same calls


# --- the series ------------------------------------------------------------------------------
def test_demo_flash_series_is_loaded_drawn_and_chosen(wb):
    dp = wb.data_panel
    dp.use_flash_demo.click()
    series = wb.state.series
    assert len(series) == 3 and wb.data is series[0]
    for ds, path in zip(series, PATHS):
        direct = load_data(path)
        assert ds.label == direct.label
        _same(ds.kappa, direct.kappa)
    # every sample on the k(T) plot, one colour each, labelled by sample
    wb.update_plot("conductivity")
    cp = wb.plots["conductivity"]
    drawn = [cp.measured] + [line for line in cp.samples if line.get_visible()]
    assert len(drawn) == 3
    assert len({line.get_color() for line in drawn}) == 3
    assert cp.measured.get_label().startswith(series[0].label)
    for line, ds in zip(drawn[1:], series[1:]):
        assert line.get_label() == ds.label
        _same(line.get_ydata(), ds.kappa)
    for ds in series:
        assert ds.label in cp.legend.value
    # the chooser: shown for a series; picking a sample makes it the data in use
    assert dp.sample.layout.display != "none" and len(dp.sample.options) == 3
    dp.sample.value = 2
    assert wb.data is series[2] and wb.state.series == series
    assert cp.measured.get_label().startswith(series[2].label)
    _same(cp.measured.get_ydata(), series[2].kappa)
    assert "Sample 3 of a series of 3" in dp.summary.value
    assert "c_p from column" in dp.summary.value and "not corrected to full density" in dp.summary.value


def test_choosing_another_sample_stales_the_fit(wb):
    wb.data_panel.use_flash_demo.click()
    fp, sp = wb.fit_panel, wb.session_panel
    fp.starts.value = 1
    fp.run(blocking=True)
    assert not wb.state.fit_stale and not fp.use_button.disabled
    wb.data_panel.sample.value = 1
    assert wb.state.fit_stale and "Stale" in fp.table.value  # as loading new data does
    assert fp.use_button.disabled and sp.save_button.disabled
    with pytest.raises(_engine.FitError, match="stale"):
        fp.use_fitted_values()
    wb.data_panel.sample.value = 0  # back to the fitted sample: still stale until refit, like new data
    assert wb.state.fit_stale


def test_several_uploaded_files_form_a_series_and_other_data_end_it(wb):
    with open(PATHS[0], "rb") as fh:
        _upload(wb, ("a.csv", fh.read()), ("b.csv", PLAIN))
    assert [d.label for d in wb.state.series] == [load_data(PATHS[0]).label, "pellet Y (invented)"]
    wb.data_panel.use_demo.click()  # the built-in k data: a series of one, the chooser hidden
    assert wb.state.series == (wb.data,) and wb.data_panel.sample.layout.display == "none"
    wb.data_panel.flash.porosity.value = "dem"  # no file of this panel in use: nothing re-read
    assert wb.state.series == (wb.data,) and "next file" in wb.messages.messages[-1][1]


# --- the flash choices: the loader's numbers, exactly ------------------------------------------
@pytest.mark.parametrize("choice, words", [("file", "column"), ("dulong-petit", "dulong-petit"),
                                           ("debye", "debye"), ("value", "option")])
def test_heat_capacity_choice_gives_the_loaders_k(wb, choice, words):
    dp = wb.data_panel
    dp.use_flash_demo.click()
    dp.sample.value = 1
    fo = dp.flash
    fo.material.value = "Mg2Si"
    fo.cp_value.value = "0.9"
    fo.cp_unit.value = "J/(g K)"
    fo.heat_capacity.value = choice
    expected = {"file": {}, "dulong-petit": {"heat_capacity": "dulong-petit", "material": "Mg2Si"},
                "debye": {"heat_capacity": "debye", "material": "Mg2Si"},
                "value": {"heat_capacity": "0.9 J/(g K)"}}[choice]
    if choice == "value":
        expected["ignore_columns"] = ["cp", "c_p"]  # a typed c_p replaces the file's column
    assert dp.options() == expected
    direct = load_data(PATHS[1], **expected)
    assert wb.data is wb.state.series[1] and wb.data.label == direct.label  # the chosen sample stays chosen
    _same(wb.data.kappa, direct.kappa)
    _same(wb.data.kappa_err, direct.kappa_err)
    assert wb.data.heat_capacity_choice == direct.heat_capacity_choice
    assert words in fo.report.value  # where c_p came from
    if choice != "file":
        assert not np.allclose(wb.data.kappa, load_data(PATHS[1]).kappa, rtol=1e-3)  # the choice moves k
        assert "would change k by" in fo.report.value  # the engine's note on the other choices
    wb.update_plot("conductivity")
    _same(wb.plots["conductivity"].measured.get_ydata(), direct.kappa)


def test_porosity_correction_and_relative_density_give_the_loaders_k(wb):
    dp = wb.data_panel
    dp.use_flash_demo.click()
    before = wb.data.kappa
    dp.flash.porosity.value = "maxwell-eucken"
    direct = load_data(PATHS[0], porosity_correction="maxwell-eucken")
    _same(wb.data.kappa, direct.kappa)
    assert wb.data.porosity_correction == "maxwell-eucken" and np.all(wb.data.kappa > before)
    assert "0.15" in dp.flash.porosity.tooltip  # the relation's validity range (porosity up to 0.15)
    assert "corrected to full density (maxwell-eucken)" in dp.flash.report.value
    for name, (phi, _where) in _engine.porosity_relations().items():
        assert porosity.RELATIONS[name][1] == phi
    # a file without a relative density is refused while a correction is chosen (the loader's rule)
    assert dp.load_bytes(PLAIN, "plain.csv") is None and "no relative density" in dp.error.value
    assert wb.data.porosity_correction == "maxwell-eucken"
    # a typed relative density on a file without one
    dp.flash.porosity.value = "none"
    assert dp.load_bytes(PLAIN, "plain.csv") is not None
    dp.flash.relative_density.value = "0.9"
    dp.flash.porosity.value = "dem"
    _same(wb.data.kappa, parse_data(PLAIN, name="plain.csv", relative_density="0.9",
                                    porosity_correction="dem").kappa)
    assert wb.data.relative_density == 0.9


def test_refused_flash_file_keeps_the_previous_data_with_one_line(wb):
    dp = wb.data_panel
    dp.use_flash_demo.click()
    before, series = wb.data, wb.state.series
    _upload(wb, ("pellet_x.csv", NO_DENSITY))
    assert wb.data is before and wb.state.series == series
    err = dp.error.value
    assert "pellet_x.csv" in err and "no density" in err and "previous data are still in use" in err
    with pytest.raises(_engine.DataError) as exc:
        parse_data(NO_DENSITY, name="pellet_x.csv")
    assert "\n" not in str(exc.value) and " ".join(str(exc.value).split()) in " ".join(err.split()).replace(
        "&quot;", '"')  # the loader's own one-line message
    # a series with one refused file changes nothing either
    _upload(wb, ("ok.csv", PLAIN), ("pellet_x.csv", NO_DENSITY))
    assert wb.data is before and wb.state.series == series
    # a typed density that disagrees with the file's: refused, previous data kept
    dp.flash.density.value = "3"
    assert wb.data is before and "disagrees" in dp.error.value and "density" in dp.error.value


def test_flash_options_labels_are_the_loaders_words():
    fo = FlashOptions(lambda: None, _MessagesStub())
    words = _engine.LOADER_OPTIONS
    assert fo.heat_capacity.description == words["heat_capacity"][1]
    assert fo.density.description == words["density"][1] and fo.density_unit.value == "g/cm^3"
    assert fo.relative_density.description == words["relative_density"][1]
    assert fo.porosity.description == words["porosity_correction"][1]
    assert fo.options() == {}
    # only the controls a choice needs are shown: the material for a model c_p, the value row for a typed one
    shown = lambda w: w.layout.display != "none"
    assert shown(fo.heat_capacity) and shown(fo.porosity) and shown(fo.relative_density)
    assert not shown(fo.material) and not shown(fo._cp_row)
    fo.heat_capacity.value = "debye"
    assert shown(fo.material) and shown(fo.heat_capacity) and not shown(fo._cp_row)
    fo.heat_capacity.value = "value"
    assert shown(fo._cp_row) and not shown(fo.material) and shown(fo.density)


class _MessagesStub:
    @staticmethod
    def guard(f):
        return f


def test_relative_errors_give_the_loaders_uncertainty(wb):
    dp = wb.data_panel
    dp.use_flash_demo.click()
    dp.flash.errors["diffusivity_rel_err"].value = "0.05"
    dp.flash.errors["heat_capacity_rel_err"].value = "0.02"
    direct = load_data(PATHS[0], diffusivity_rel_err=0.05, heat_capacity_rel_err=0.02)
    _same(wb.data.kappa_err, direct.kappa_err)
    assert not np.allclose(wb.data.kappa_err, load_data(PATHS[0]).kappa_err, rtol=1e-3)
    before = wb.data
    dp.flash.errors["density_rel_err"].value = "two"  # not a number: one line, data kept
    assert wb.data is before and "Relative error of density" in dp.error.value and "'two'" in dp.error.value
    dp.flash.errors["density_rel_err"].value = "1.5"  # outside (0, 1): the loader's own message
    assert wb.data is before and "density_rel_err" in dp.error.value


# --- what-if notes ---------------------------------------------------------------------------
def test_whatif_status_shows_the_results_notes(wb):
    wp = wb.whatif_panel
    wp.partner.value = "Ge"  # as in tests/test_widgets.py: an alloy partner of the demo host
    wp.update_button.click()
    wp.join(120)
    notes = [n for r in wp.last.values() for n in (getattr(r, "notes", None) or [])]
    assert notes, "the alloy sweep of a template model carries a scope note"
    status = " ".join(wp.status.value.split())
    for n in notes:
        assert esc(" ".join(n.split()).rstrip(".")) in status
