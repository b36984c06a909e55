"""Report figures (Agg, files by extension, atomic) and the text table."""
import os
import subprocess
import sys

import numpy as np
import pytest

from kinetic import ParameterError, demo
from kinetic.estimates import cahill_minimum_for
from kinetic.fitting import fit, fit_joint
from kinetic.records import load_record, save_record
from kinetic.report import report_figure, summary_table


@pytest.fixture(scope="module")
def result():
    # invented demo data (kinetic.demo), total kappa with rho and S: the figure shows every component
    return fit(demo.demo_model(), demo.demo_dataset(), list(demo.DEFAULT_FREE), n_starts=1, lorenz_method="spb")


def _lines(fig):
    return {ln.get_label(): ln for ax in fig.axes for ln in ax.get_lines()}


def test_figure_has_data_fit_components_floor_and_residuals(result):
    fig = report_figure(result)
    ax, axr = fig.axes
    labels = _lines(fig)
    assert any("lattice fit" in k for k in labels)
    assert any("electronic" in k for k in labels)
    floor = next(v for k, v in labels.items() if "Cahill-Watson-Pohl" in k)
    x, y = floor.get_data()
    # the floor drawn is kinetic.estimates.cahill_minimum_for(Mg2Si preset) (Cahill, Watson & Pohl 1992, Eq. 3)
    np.testing.assert_allclose(y, cahill_minimum_for(demo.demo_material(), x), rtol=1e-12)
    fitted = next(v for k, v in labels.items() if "lattice fit" in k)
    xf, yf = fitted.get_data()
    np.testing.assert_allclose(yf, result.model.kappa(xf), rtol=1e-12)
    assert len(ax.collections) >= 3  # error bars of total and lattice points, the band
    assert axr.get_ylabel().startswith("ln(fit/data)")
    assert ax.get_xscale() == "log" and ax.get_yscale() == "log"


@pytest.mark.parametrize("ext, magic", [("png", b"\x89PNG"), ("svg", b"<?xml"), ("pdf", b"%PDF")])
def test_figure_written_by_extension(tmp_path, result, ext, magic):
    p = tmp_path / f"fit.{ext}"
    report_figure(result, p)
    assert p.read_bytes()[:len(magic)] == magic
    assert [x.name for x in tmp_path.iterdir()] == [p.name]  # the temp file was renamed, none left


def test_unknown_extension(tmp_path, result):
    with pytest.raises(ParameterError, match=".png"):
        report_figure(result, tmp_path / "fit.bmp")


def test_figure_from_a_record_and_a_joint_fit(tmp_path, result):
    p = tmp_path / "r.json"
    save_record(p, result)
    report_figure(load_record(p), tmp_path / "r.png")
    r = fit_joint(demo.demo_model(), demo.demo_series()[:2], ["point_defect.gamma", "umklapp.gruneisen"],
                  ["boundary.length"], n_starts=1)
    fig = report_figure(r, material=False)
    labels = _lines(fig)
    assert sum("lattice fit" in k for k in labels) == 2
    assert not any("Cahill" in k for k in labels)


def test_summary_table(result):
    t = summary_table(result)
    for n in result.names:
        assert n in t
    assert "sample A" in t and "rms resid" in t and "AIC" in t
    assert "\t" not in t


def test_matplotlib_only_imported_by_report():
    # kinetic's other modules must import without matplotlib (DEVELOPERS.md layout rule)
    code = ("import sys; import kinetic, kinetic.fitting, kinetic.whatif, kinetic.records, kinetic.cli, "
            "kinetic.demo; print('matplotlib' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True,
                         env={**os.environ, "MPLBACKEND": "Agg"})
    assert out.stdout.strip() == "False"


def test_save_outputs_writes_nothing_when_a_part_fails(tmp_path):
    from kinetic.report import save_outputs

    r = fit(demo.demo_model(), demo.demo_dataset(), list(demo.DEFAULT_FREE), n_starts=1)
    rec, fig = tmp_path / "fit.json", tmp_path / "fit.png"
    # a bad figure extension is found before the record is written
    with pytest.raises(ParameterError, match="extension"):
        save_outputs(r, record=rec, figure=tmp_path / "fit.bmp")
    assert not rec.exists()
    written = save_outputs(r, record=rec, figure=fig)
    assert written == [rec, fig] and rec.stat().st_size > 0 and fig.read_bytes()[:4] == b"\x89PNG"
    assert load_record(rec).values == r.values


def test_summary_table_says_not_determined_for_a_parameter_at_a_bound():
    import copy

    r = fit(demo.demo_model(), demo.demo_dataset(), list(demo.DEFAULT_FREE), n_starts=1)
    r2 = copy.copy(r)
    r2.flags = copy.deepcopy(r.flags)
    r2.flags.at_bound = [r.names[0]]
    text = summary_table(r2)
    line = next(x for x in text.splitlines() if x.startswith(r.names[0]))
    assert "not determined" in line and "bound" in line
