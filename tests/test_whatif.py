"""What-if studies: sweeps agree with direct model evaluations, maps with loops, zT with its definition."""
import math

import numpy as np
import pytest
from scipy.constants import e, h, hbar, k as kB, m_e

from kinetic import Boundary, Branch, LatticeModel, Normal, ParameterError, PointDefect, Umklapp, materials
from kinetic.data import Dataset
from kinetic.disorder import virtual_crystal
from kinetic.electronic import KB_OVER_E
from kinetic.fitting import fit
from kinetic.whatif import (RowBoundary, alloy_model, alloy_sweep, grain_alloy_map, grain_size_sweep, sweep,
                            zt_vs_fermi_level)

SI, GE = materials.get("Si"), materials.get("Ge")
CASIMIR_PREFACTOR = 2 * math.pi**2 * kB**4 / (15 * hbar**3)  # Casimir, Physica 5, 495 (1938), closed form


def si_model(split=True, normal=True):
    sc = [Boundary(1e-6, specularity=0.3), PointDefect.from_gamma(2e-4, SI.volume_per_atom),
          Umklapp.from_material(SI, gruneisen=1.0)]
    if normal:
        sc.append(Normal(1e-24))
    return LatticeModel.from_material(SI, scattering=sc, split_branches=split)


def test_sweep_equals_direct_evaluation():
    m = si_model()
    vals = [0.5, 1.0, 2.0]
    T = [50.0, 300.0]
    sw = sweep(m, "umklapp.gruneisen", vals, T)
    assert sw.kappa.shape == (3, 2) and sw.lower is None
    for i, v in enumerate(vals):
        np.testing.assert_array_equal(sw.kappa[i], m.with_params({"umklapp.gruneisen": v}).kappa(np.array(T)))


def test_grain_size_sweep_is_casimir_at_low_temperature():
    # boundary-only Debye model at T << theta: kappa = CASIMIR_PREFACTOR T^3 L / v^2 (closed form)
    m = LatticeModel([Branch(5000.0, 400.0)], [Boundary(1e-3)])
    L = np.array([1e-6, 1e-4, 1e-2])
    sw = grain_size_sweep(m, L, 1.0)
    # tolerance: the engine's quadrature (~1e-8 relative) and the Planck tail beyond x = 400 (negligible)
    np.testing.assert_allclose(sw.kappa[:, 0], CASIMIR_PREFACTOR * L / 5000.0**2, rtol=1e-7)


def test_sweep_band_from_a_fit_excludes_the_swept_parameter():
    host = materials.get("Mg2Si")
    m = LatticeModel.from_material(host, scattering=[Boundary(2e-6), PointDefect.from_gamma(0.02, host.volume_per_atom),
                                                     Umklapp.from_material(host, gruneisen=1.8)])
    T = np.geomspace(10, 600, 25)
    k = m.kappa(T) * np.exp(0.02 * np.random.default_rng(0).standard_normal(T.size))  # invented data
    r = fit(m, Dataset.from_arrays(T, k, kappa_err=0.02 * k, kind="lattice"),
            ["boundary.length", "point_defect.gamma", "umklapp.gruneisen"], n_starts=1)
    sw = grain_size_sweep(None, [1e-7, r.values["boundary.length"], 1e-4], [20.0, 300.0], r)
    assert np.all(sw.lower < sw.kappa) and np.all(sw.kappa < sw.upper)
    # at the fitted length the band is the one of gamma and gruneisen alone (their marginal covariance):
    # the same as predict_band with the boundary-length row and column of the covariance set to zero
    import copy

    from kinetic.fitting import predict_band

    r0 = copy.copy(r)
    c = r.covariance_fitted.copy()
    j = r.names.index("boundary.length")
    c[j, :] = 0.0
    c[:, j] = 0.0
    r0.covariance_fitted = c
    ref = predict_band(r0, [20.0, 300.0])
    np.testing.assert_allclose(sw.kappa[1], ref.kappa, rtol=1e-12)
    np.testing.assert_allclose(sw.lower[1], ref.lower, rtol=1e-9)  # same finite differences, same steps
    np.testing.assert_allclose(sw.upper[1], ref.upper, rtol=1e-9)


def test_sweep_rejects_unknown_parameter():
    with pytest.raises(ParameterError, match="unknown parameter"):
        sweep(si_model(), "boundary.width", [1.0], 300.0)
    with pytest.raises(ParameterError):
        grain_size_sweep(si_model(), [-1e-6], 300.0)


# ------------------------------------------------------------------ alloys
def test_alloy_sweep_end_members_and_gamma():
    xs = np.array([0.0, 0.3, 1.0])
    # without a template the series starts from the hosts' default (calibrated) models; a given
    # gruneisen overrides both hosts' calibrated Umklapp gamma
    sw = alloy_sweep("Si", "Ge", xs, [300.0], boundary_length=1e-3)
    # Gamma at x: Si and Ge share one site, so the mass term is Gamma of the mixed site with the
    # natural isotopes of both (periodictable), plus Abeles' strain term with his epsilon = 39 for
    # Si-Ge (from memory); this replaces the earlier mean-mass formula + interpolated isotope Gamma
    _, ref = virtual_crystal(SI, GE, 0.3, strain_epsilon=39.0)
    assert sw.gamma[1] == pytest.approx(ref, rel=1e-12)
    # the end members are the hosts' default models, with their own (isotope) Gamma
    from kinetic.alloy import host_model

    assert sw.gamma[0] == host_model(SI).params["point_defect.gamma"]
    assert sw.gamma[2] == host_model(GE).params["point_defect.gamma"]
    # x = 0 is the Si default model with the boundary set to 1 mm (Abeles' normal processes are
    # not added to the pure hosts)
    direct_si = host_model(SI).with_params({"boundary.length": 1e-3})
    assert sw.kappa[0, 0] == pytest.approx(float(direct_si.kappa(300.0)), rel=1e-12)
    # alloy scattering lowers kappa well below both end members (Abeles 1963)
    assert sw.kappa[1, 0] < 0.2 * min(sw.kappa[0, 0], sw.kappa[2, 0])


def test_alloy_model_keeps_template_mechanisms():
    t = si_model()
    mat, g = virtual_crystal(SI, GE, 0.2)
    m = alloy_model(t, mat, g, extra_gamma=1e-3)
    assert m.mechanism_names == t.mechanism_names and m.branch_names == ("L", "T")
    assert m.params["point_defect.gamma"] == pytest.approx(g + 1e-3)
    assert m.params["point_defect.volume_per_atom"] == mat.volume_per_atom
    assert m.params["boundary.specularity"] == 0.3 and m.params["normal.B"] == 1e-24
    assert m.params["umklapp.gruneisen"] == 1.0  # the template's gamma is kept


def test_grain_alloy_map_equals_separate_models():
    t = si_model()
    L = np.geomspace(1e-8, 1e-3, 7)
    xs = np.linspace(0.0, 1.0, 5)
    mp = grain_alloy_map(t, L, xs, 300.0, host_a="Si", host_b="Ge", strain_epsilon=10.0)
    assert mp.kappa.shape == (5, 7)
    for i in (0, 2, 4):
        mat, g = virtual_crystal(SI, GE, xs[i], strain_epsilon=10.0)
        for j in (0, 3, 6):
            ref = float(alloy_model(t, mat, g, boundary_length=L[j]).kappa(300.0))
            # same arithmetic, rows instead of separate calls: equal to rounding
            assert mp.kappa[i, j] == pytest.approx(ref, rel=1e-12)
    assert np.all(np.diff(mp.kappa, axis=1) > 0)  # longer grains, higher kappa


def test_grain_alloy_map_without_template_and_bad_input():
    mp = grain_alloy_map(None, [1e-6, 1e-5], [0.0, 0.5], 300.0, host_a=SI, host_b=GE)
    # at x = 0 and the default model's boundary replaced: the Si default model (tests/test_alloys.py
    # compares the whole map with direct evaluations)
    from kinetic.alloy import host_model

    ref = float(host_model(SI).with_params({"boundary.length": 1e-5}).kappa(300.0))
    assert mp.kappa[0, 1] == pytest.approx(ref, rel=1e-12)
    with pytest.raises(ParameterError, match="single number"):
        grain_alloy_map(None, [1e-6], [0.5], [300.0, 400.0], host_a=SI, host_b=GE)
    with pytest.raises(ParameterError, match="not a Boundary"):
        grain_alloy_map(si_model(), [1e-6], [0.5], 300.0, host_a=SI, host_b=GE, mechanism="umklapp")
    with pytest.raises(ParameterError, match=r"\[0, 1\]"):
        alloy_sweep(SI, GE, [1.5], 300.0)


def test_row_boundary_matches_boundary_row_by_row():
    b = Branch(6000.0, 600.0, dispersion="sine")
    L = np.array([1e-7, 1e-5])
    rows = LatticeModel([b], [RowBoundary(lengths=tuple(L)), Umklapp(B=1e-19)]).kappa(np.full(2, 100.0))
    for i in range(2):
        assert rows[i] == pytest.approx(float(LatticeModel([b], [Boundary(L[i]), Umklapp(B=1e-19)]).kappa(100.0)),
                                        rel=1e-13)


# ------------------------------------------------------------------ zT against doping
def test_zt_from_a_measured_pair_passes_through_the_measurement():
    sig, S = 5e4, -200e-6  # invented measured pair [S/m], [V/K]
    d = zt_vs_fermi_level(600.0, 2.0, sigma=sig, seebeck=S, effective_mass=1.5, eta=np.linspace(-3, 6, 91))
    i = int(np.argmin(np.abs(d.eta - d.measured_eta)))
    grid = np.append(d.eta, d.measured_eta)
    d2 = zt_vs_fermi_level(600.0, 2.0, sigma=sig, seebeck=S, eta=grid)
    assert d2.sigma[-1] == pytest.approx(sig, rel=1e-10)  # sigma(eta_meas) = sigma_meas by construction
    assert d2.seebeck[-1] == pytest.approx(abs(S), rel=1e-9)  # SPB inversion of |S| (kinetic.electronic)
    # zT definition S^2 sigma T / (kappa_L + L sigma T)
    zt = d.seebeck**2 * d.sigma * 600.0 / (2.0 + d.lorenz * d.sigma * 600.0)
    np.testing.assert_allclose(d.zt, zt, rtol=1e-12)
    assert d.best_zt == pytest.approx(d.zt.max()) and d.eta[0] < d.best_eta < d.eta[-1]
    assert np.all(np.diff(d.carrier_density) > 0) and i >= 0


def test_zt_weighted_mobility_form():
    mu_w, T = 0.02, 500.0  # invented weighted mobility [m^2/(V s)]
    d = zt_vs_fermi_level(T, 1.5, weighted_mobility=mu_w, eta=[0.0, 2.0])
    # sigma_E0 = 8 pi e (2 m_e kB T)^(3/2) mu_w / (3 h^3) and sigma = sigma_E0 ln(1 + e^eta)
    # (Snyder et al. 2020, from memory; constants from scipy.constants)
    s_e0 = 8 * math.pi * e * (2 * m_e * kB * T) ** 1.5 * mu_w / (3 * h**3)
    np.testing.assert_allclose(d.sigma, s_e0 * np.log1p(np.exp([0.0, 2.0])), rtol=1e-12)
    # the same curve from the pair it implies at eta = 2 (acoustic scattering: sigma ~ F_0(eta))
    d2 = zt_vs_fermi_level(T, 1.5, sigma=float(d.sigma[1]), seebeck=float(d.seebeck[1]), eta=[0.0, 2.0])
    np.testing.assert_allclose(d2.sigma, d.sigma, rtol=1e-8)  # inversion accuracy ~1e-12 in eta


def test_zt_nondegenerate_seebeck_limit():
    # SPB, acoustic scattering, eta -> -inf: |S| -> (kB/e)(2 - eta) (closed form, seebeck_spb docstring)
    d = zt_vs_fermi_level(300.0, 1.0, weighted_mobility=0.01, eta=[-30.0])
    assert d.seebeck[0] == pytest.approx(KB_OVER_E * 32.0, rel=1e-10)  # corrections ~e^-30


def test_zt_bad_input():
    with pytest.raises(ParameterError, match="either"):
        zt_vs_fermi_level(300.0, 1.0)
    with pytest.raises(ParameterError, match="either"):
        zt_vs_fermi_level(300.0, 1.0, weighted_mobility=0.01, sigma=1e4, seebeck=1e-4)
    with pytest.raises(ParameterError, match="both"):
        zt_vs_fermi_level(300.0, 1.0, sigma=1e4)
    with pytest.raises(ParameterError, match="acoustic"):
        zt_vs_fermi_level(300.0, 1.0, weighted_mobility=0.01, scattering="ionized_impurity")
    with pytest.raises(ParameterError, match="kappa_lattice"):
        zt_vs_fermi_level(300.0, -1.0, weighted_mobility=0.01)
