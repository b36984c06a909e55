"""Diffusivity files: k = D rho c_p, its uncertainty, the heat-capacity choice and porosity."""
from __future__ import annotations

import math

import numpy as np
import pint
import pytest

from kinetic import demo, fit
from kinetic import heat_capacity as hc
from kinetic import porosity as po
from kinetic.data import Dataset, load_data, load_series, parse_data
from kinetic.data.diffusivity import DEFAULT_RELATIVE_ERRORS
from kinetic.errors import DataError, ParameterError

U = pint.UnitRegistry()
BASE = "T [K], D [mm^2/s]\n300, 4.0\n400, 3.0\n"
HDR = "# density: 2.0 g/cm^3\n# cp: 0.5 J/(g K)\n"


def test_k_is_D_rho_cp_in_si():
    ds = parse_data(HDR + BASE, name="f.csv")
    # 4e-6 m^2/s x 2000 kg/m^3 x 500 J/(kg K) = 4 W/(m K)
    np.testing.assert_allclose(ds.kappa, [4.0, 3.0], rtol=1e-12)
    np.testing.assert_allclose(ds.diffusivity, [4e-6, 3e-6], rtol=1e-12)
    np.testing.assert_allclose(ds.density, 2000.0)
    np.testing.assert_allclose(ds.heat_capacity, 500.0)
    assert ds.heat_capacity_choice == "header" and ds.kind == "total"


@pytest.mark.parametrize("unit,factor", [("mm^2/s", 1.0), ("cm^2/s", 0.01), ("m^2/s", 1e-6),
                                         ("mm²/s", 1.0), ("mm2/s", 1.0)])
def test_diffusivity_units(unit, factor):
    text = HDR + f"T [K], diffusivity [{unit}]\n300, {4.0 * factor!r}\n"
    assert float(parse_data(text).kappa[0]) == pytest.approx(4.0, rel=1e-12)


def test_columns_for_density_and_cp_and_aliases():
    text = "T [K], D [cm^2/s], density [kg/m^3], c_p [J/(kg K)]\n300, 0.04, 2000, 500\n"
    ds = parse_data(text)
    assert float(ds.kappa[0]) == pytest.approx(4.0) and ds.heat_capacity_choice == "column"


def test_options_as_text_numbers_and_quantities():
    a = parse_data(BASE, density="2 g/cm^3", heat_capacity="0.5 J/(g K)")
    b = parse_data(BASE, density=2000.0, heat_capacity=500)
    c = parse_data(BASE, density=U.Quantity(2.0, "g/cm^3"), heat_capacity=U.Quantity(0.5, "J/g/K"))
    np.testing.assert_allclose(a.kappa, b.kappa)
    np.testing.assert_allclose(a.kappa, c.kappa)
    assert a.heat_capacity_choice == "option"


def test_default_uncertainty_adds_relative_errors_in_quadrature():
    ds = parse_data(HDR + BASE)
    r = math.sqrt(0.03**2 + 0.01**2 + 0.05**2)   # D, rho, measured c_p defaults
    np.testing.assert_allclose(ds.kappa_err / ds.kappa, r, rtol=1e-12)
    ds = parse_data(HDR + BASE, diffusivity_rel_err=0.02, density_rel_err=0.005,
                    heat_capacity_rel_err=0.03)
    np.testing.assert_allclose(ds.kappa_err / ds.kappa, math.sqrt(0.02**2 + 0.005**2 + 0.03**2))
    assert DEFAULT_RELATIVE_ERRORS["heat_capacity_model"] == 0.10


def test_diffusivity_error_column_absolute_and_percent():
    a = parse_data(HDR + "T [K], D [mm^2/s], D_err [mm^2/s]\n300, 4.0, 0.08\n")
    b = parse_data(HDR + "T [K], D [mm^2/s], D_err [%]\n300, 4.0, 2\n")
    want = math.sqrt(0.02**2 + 0.01**2 + 0.05**2)
    assert float(a.kappa_err[0] / a.kappa[0]) == pytest.approx(want)
    assert float(b.kappa_err[0] / b.kappa[0]) == pytest.approx(want)


def test_model_heat_capacities_and_the_recorded_comparison():
    T = np.array([300.0, 400.0])
    dp = parse_data("# density: 2.0 g/cm^3\n# cp: dulong-petit\n# material: Mg2Si\n" + BASE)
    db = parse_data("# density: 2.0 g/cm^3\n" + BASE, heat_capacity="debye", material="Mg2Si")
    np.testing.assert_allclose(dp.heat_capacity, hc.dulong_petit("Mg2Si"))
    np.testing.assert_allclose(db.heat_capacity, hc.debye("Mg2Si", T))
    np.testing.assert_allclose(dp.kappa, np.array([4e-6, 3e-6]) * 2000 * hc.dulong_petit("Mg2Si"))
    assert (dp.heat_capacity_choice, db.heat_capacity_choice) == ("dulong-petit", "debye")
    # a model c_p carries the model default error
    np.testing.assert_allclose(db.kappa_err / db.kappa, math.sqrt(0.03**2 + 0.01**2 + 0.10**2))
    # the note states how much Dulong-Petit would move k against the Debye choice
    ratio = 100 * (hc.dulong_petit("Mg2Si") / hc.debye("Mg2Si", T) - 1)
    note = next(n for n in db.notes if n.startswith("heat-capacity choice (debye)"))
    assert f"{ratio.min():+.1f} % to {ratio.max():+.1f} %" in note


def test_porosity_step_is_explicit_and_recorded():
    text = HDR + "# relative_density: 0.9\n" + BASE
    plain = parse_data(text)
    assert plain.relative_density == 0.9 and plain.porosity_correction is None
    assert any("not corrected to full density" in n for n in plain.notes)
    fixed = parse_data(text, porosity_correction="maxwell-eucken")
    k_full, spread = po.full_density_kappa(plain.kappa, 0.9, relation="maxwell-eucken")
    np.testing.assert_allclose(fixed.kappa, k_full)
    np.testing.assert_allclose(fixed.kappa_err,
                               np.hypot(plain.kappa_err * fixed.kappa / plain.kappa, spread))
    assert fixed.porosity_correction == "maxwell-eucken"
    assert any(n.startswith("porosity correction (maxwell-eucken") for n in fixed.notes)


def test_porosity_of_a_k_file_corrects_resistivity_too():
    text = "T [K], kappa [W/(m K)], rho [uOhm cm]\n300, 4.0, 1000\n"
    ds = parse_data(text, relative_density="90 %", porosity_correction="dem")
    f = float(po.ratio("dem", 0.1))
    assert float(ds.kappa[0]) == pytest.approx(4.0 / f)
    assert float(ds.resistivity[0]) == pytest.approx(1000e-8 * f)
    assert ds.kappa_err is None   # nothing stated to add the spread to (the note says so)


def test_round_trip_and_subset_keep_the_flash_columns():
    ds = parse_data(HDR + "# relative_density: 0.95\n" + BASE, porosity_correction="landauer")
    again = Dataset.from_dict(ds.to_dict())
    assert again == ds
    sub = ds.subset(350.0, None)
    assert len(sub) == 1 and float(sub.diffusivity[0]) == pytest.approx(3e-6)
    assert sub.heat_capacity_choice == "header" and sub.porosity_correction == "landauer"


def test_from_diffusivity_with_quantities():
    ds = Dataset.from_diffusivity(U.Quantity([26.85, 126.85], "degC"),
                                  U.Quantity([0.04, 0.03], "cm^2/s"),
                                  density=U.Quantity(2000, "kg/m^3"),
                                  heat_capacity=np.array([500.0, 500.0]))
    np.testing.assert_allclose(ds.temperature, [300.0, 400.0])
    np.testing.assert_allclose(ds.kappa, [4.0, 3.0])
    assert ds.heat_capacity_choice == "column"
    with pytest.raises(DataError, match="diffusivity"):
        Dataset.from_diffusivity([300.0], U.Quantity([4.0], "K"), density=2000,
                                 heat_capacity=500)


# ---- bad input: one line naming the file and the value --------------------------------------

@pytest.mark.parametrize("text,opts,pattern", [
    (BASE, {"heat_capacity": 500}, r"^f\.csv: no density .*--density"),
    (BASE, {"density": 2000}, r"^f\.csv: no heat capacity .*--heat-capacity"),
    (BASE, {"density": 2000, "heat_capacity": "debye"}, r"^f\.csv: the debye heat capacity needs "
                                                        r"the material"),
    ("T [K], D [m^2/s]\n300, 4.0\n", {"density": 2000, "heat_capacity": 500},
     r'^f\.csv, line 2, column "D": 4 m\^2/s is no diffusivity of a solid.*mm\^2/s'),
    ("T [K], D [W/(m K)]\n300, 4.0\n", {"density": 2000, "heat_capacity": 500},
     r'^f\.csv, line 1, column "D": unit "W/\(m K\)" is not a thermal diffusivity'),
    ("T [K], D\n300, 4.0\n", {"density": 2000, "heat_capacity": 500},
     r'^f\.csv, line 1, column "D": no unit; expected a unit such as mm\^2/s'),
    (BASE, {"density": 2000, "heat_capacity": 500, "relative_density": 1.2},
     r"^f\.csv, option relative_density=: .*\(0, 1\].*1\.2"),
    (HDR + "# relative_density: 0\n" + BASE, {}, r"^f\.csv, line 3: expected a relative density "
                                                 r"in \(0, 1\].*'0'"),
    ("# density: 2.0 g/cm^3\nT [K], D [mm^2/s], density [g/cm^3]\n300, 4.0, 2.2\n",
     {"heat_capacity": 500}, r'^f\.csv, line 3, column "density": density 2200 kg/m\^3 disagrees '
                             r"with 2000 kg/m\^3 given by line 1"),
    (HDR + BASE, {"density": "2.5 g/cm^3"}, r"^f\.csv, line 1: density 2000 kg/m\^3 disagrees "
                                            r"with 2500 kg/m\^3 given by the option density="),
    (HDR.replace("# cp: 0.5 J/(g K)", "# cp: debye") + "T [K], D [mm^2/s], cp [J/(g K)]\n300, 4.0, 0.5\n",
     {"density": "2 g/cm^3", "material": "Si"}, r"heat capacity given as values \(column\) and as the model"),
    (BASE, {"density": 2, "heat_capacity": 500}, r"^f\.csv, option density=: 2 kg/m\^3 is no "
                                                 r"density of a solid.*g/cm\^3"),
    (BASE, {"density": 2000, "heat_capacity": "0.5 J/(g K"}, r"option heat_capacity=: unit "
                                                             r'"J/\(g K" cannot be read'),
    ("T [K], D [mm^2/s], kappa [W/(m K)]\n300, 4, 1\n", {}, r'column "kappa": a kappa column '
                                                            r"beside the diffusivity column"),
    ("T [K], kappa [W/(m K)], cp [J/(g K)]\n300, 4, 1\n", {}, r'column "cp": a cp column is used '
                                                             r"only with a diffusivity column"),
    (HDR + "# density: 3 g/cm^3\n" + BASE, {}, r'^f\.csv, line 3: a second "# density:" line'),
    (HDR + "# relative_density: 0.9\n" + BASE, {"porosity_correction": "parallel"},
     r"porosity_correction must be one of"),
    (HDR + BASE, {"porosity_correction": "dem"}, r"^f\.csv: porosity correction 'dem' but no "
                                                 r"relative density"),
])
def test_bad_input_one_line(text, opts, pattern):
    with pytest.raises((DataError, ParameterError), match=pattern) as info:
        parse_data(text, name="f.csv", **opts)
    assert "\n" not in str(info.value)


def test_an_explicit_model_choice_replaces_the_files_cp_and_says_by_how_much():
    # The user's option heat_capacity="debye" wins over the file's measured c_p (a header line here):
    # k is the Debye-c_p value, and a note gives the change against the measured c_p.
    ds = parse_data(HDR + BASE, name="f.csv", density="2 g/cm^3", heat_capacity="debye", material="Si")
    plain = parse_data(HDR + BASE, name="f.csv", density="2 g/cm^3")
    assert ds.heat_capacity_choice == "debye"
    ratio = ds.kappa / plain.kappa
    np.testing.assert_allclose(ratio, ds.heat_capacity / plain.heat_capacity, rtol=1e-12)  # k = D rho c_p
    note = [n for n in ds.notes if "chosen over the file's measured c_p" in n]
    assert len(note) == 1 and f"{100 * (ratio.min() - 1):+.1f} %" in note[0]


def test_flash_options_on_a_kappa_file_are_refused():
    with pytest.raises(ParameterError, match=r"density= is used only for a file with a "
                                             r"diffusivity column"):
        parse_data("T [K], kappa [W/(m K)]\n300, 4\n", name="k.csv", density=2000)


# ---- the invented demo series ----------------------------------------------------------------

def test_demo_flash_series_loads_and_porosity_brings_the_fits_together():
    raw = demo.demo_flash_series()
    fixed = demo.demo_flash_series(porosity_correction="maxwell-eucken")
    assert [d.label for d in fixed] == list(demo.TRUE_FLASH)
    assert all(d.heat_capacity_choice == "column" and d.resistivity is not None for d in fixed)
    assert [d.relative_density for d in fixed] == list(demo.TRUE_FLASH.values())
    model = demo.true_model(1.5e-6, 1e-3, 1.5)   # grain size known, gamma and gruneisen fitted
    free = ["point_defect.gamma", "umklapp.gruneisen"]
    g_raw = [fit(model, d, free, n_starts=2).values["point_defect.gamma"] for d in raw]
    res = [fit(model, d, free, n_starts=2) for d in fixed]
    true = demo.TRUE_SAMPLE_A["point_defect.gamma"]
    for r in res:
        # within three standard errors of the invented truth (the data carry 2 % D noise)
        assert abs(r.values["point_defect.gamma"] - true) < 3 * r.stderr["point_defect.gamma"]
    # uncorrected, the denser-pore pellets look more disordered (the pores read as gamma)
    assert g_raw[2] > g_raw[0] and np.ptp([r.values["point_defect.gamma"] for r in res]) < np.ptp(g_raw)


def test_load_series_passes_flash_options(tmp_path):
    p = tmp_path / "a.csv"
    p.write_text(BASE)
    (ds,) = load_series([p], density=2000, heat_capacity=500)
    assert float(ds.kappa[0]) == pytest.approx(4.0)
    assert load_data(p, density=2000, heat_capacity=500) == ds


def test_kappa_by_heat_capacity_scales_k_by_the_cp_ratio():
    from kinetic.data.diffusivity import kappa_by_heat_capacity

    ds = parse_data(HDR + "# relative_density: 0.9\n" + BASE, porosity_correction="dem")
    ks = kappa_by_heat_capacity(ds, "Mg2Si")
    np.testing.assert_allclose(ks["header"], ds.kappa)
    np.testing.assert_allclose(ks["dulong-petit"], ds.kappa * hc.dulong_petit("Mg2Si") / 500.0)
    np.testing.assert_allclose(ks["debye"], ds.kappa * hc.debye("Mg2Si", ds.temperature) / 500.0)
    assert set(kappa_by_heat_capacity(ds)) == {"header"}
    with pytest.raises(ParameterError, match="no heat capacity recorded"):
        kappa_by_heat_capacity(parse_data("T [K], kappa [W/(m K)]\n300, 1\n"))
