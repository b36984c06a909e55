"""Engine checks: closed-form limits, adaptive quadrature, monotonicity, bad input."""
import math
import warnings

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st, HealthCheck
from scipy import integrate
from scipy.constants import hbar, k as kB

from kinetic import (Boundary, Branch, Dislocation, ElectronPhonon, LatticeModel, Normal, ParameterError,
                     PointDefect, Precipitate, Umklapp, materials)
from kinetic.checks import kappa_adaptive

CASIMIR_PREFACTOR = 2 * math.pi**2 * kB**4 / (15 * hbar**3)  # closed form, Casimir, Physica 5, 495 (1938)


def casimir(T, L, v):
    """Boundary-limited Debye conductivity at T << theta (closed form)."""
    return CASIMIR_PREFACTOR * np.asarray(T) ** 3 * L / v**2


# ------------------------------------------------------------------ closed forms
@pytest.mark.parametrize("dispersion", ["debye", "sine"])
def test_boundary_only_low_temperature_matches_casimir(dispersion):
    # At T << theta only omega << omega_max matters, where a sine branch is linear too.
    # Reference-notes example: T = 1 K, L = 1 mm, v = 5000 m/s -> 1.6308 W/m/K (computed).
    m = LatticeModel([Branch(5000.0, 400.0, dispersion=dispersion)], [Boundary(1e-3)])
    # tolerance: quadrature error ~1e-8 plus the neglected Planck tail beyond x = theta/T >= 200 (< 1e-80)
    # for Debye. A sine branch deviates at second order in omega/omega_max: expanding
    # q(omega) = (2 q_max/pi) arcsin(omega/omega_max) gives a relative excess ~ c (T/theta)^2 with
    # c ~ 10 (the thermal average of x^2 times the arcsin coefficients), 1.6e-5 at 0.5 K.
    T = np.array([0.1, 0.5, 1.0, 2.0]) if dispersion == "debye" else np.array([0.1, 0.2, 0.5])
    tol = 1e-7 if dispersion == "debye" else 5e-5
    np.testing.assert_allclose(m.kappa(T), casimir(T, 1e-3, 5000.0), rtol=tol)
    if dispersion == "debye":
        assert m.kappa(1.0) == pytest.approx(1.6308, abs=5e-5)


def test_specular_boundary_lengthens_mean_free_path():
    # Ziman's effective length L (1 + p)/(1 - p): p = 0.5 triples L, so kappa triples (Casimir limit).
    m0 = LatticeModel([Branch(5000.0, 400.0)], [Boundary(1e-3)])
    m1 = m0.with_params({"boundary.specularity": 0.5})
    assert m1.kappa(1.0) / m0.kappa(1.0) == pytest.approx(3.0, rel=1e-10)


def debye_function_cv(T, theta, n):
    """Debye heat capacity per volume by adaptive quadrature [J/m^3/K] (Debye 1912, closed form integral)."""
    f = lambda x: x**4 * math.exp(-x) / (-math.expm1(-x)) ** 2
    xm = theta / T
    return 9 * n * kB * (T / theta) ** 3 * integrate.quad(f, 0, min(xm, 200), epsrel=1e-12, limit=200)[0]


def test_heat_capacity_limits():
    si = materials.get("Si")
    m = LatticeModel.from_material(si, [Boundary(1e-3)])
    # the averaged branch sits on the atoms' Debye sphere (3 modes per atom exactly), so its theta is
    # hbar v_D q_D / kB = 645.4 K rather than the table's 645 K (changed by the calibration work:
    # before, v_D and the table theta_D gave a mode density 0.2 % off the atom density)
    n = m.branches[0].mode_density / 3
    assert n == pytest.approx(si.number_density, rel=1e-12)
    theta = m.branches[0].debye_temperature
    # Dulong-Petit 3 n kB at T >> theta: the Debye correction is -(theta/T)^2/20, 5e-6 at T = 100 theta.
    assert m.heat_capacity(100 * theta) == pytest.approx(3 * n * kB, rel=1e-5)
    # Debye T^3 law (12 pi^4 / 5) n kB (T/theta)^3 at T << theta; exact to 1e-20 at theta/T = 1000.
    T = theta / 1000
    assert m.heat_capacity(T) == pytest.approx(12 * math.pi**4 / 5 * n * kB * (T / theta) ** 3, rel=1e-8)
    # whole curve against the Debye function by adaptive quadrature
    for T in [5.0, 50.0, 300.0, 2000.0]:
        assert m.heat_capacity(T) == pytest.approx(debye_function_cv(T, theta, n), rel=1e-8)


def test_mode_count_of_split_branches():
    # Debye counting: each split branch reaches the same q_D = (6 pi^2 n)^(1/3) and so holds
    # polarizations * n modes; total 3 n, the Dulong-Petit limit (closed form).
    si = materials.get("Si")
    m = LatticeModel.from_material(si, [Boundary(1e-3)], split_branches=True)
    # at T = 1e6 K the Debye correction (theta/T)^2/20 is < 1e-7
    assert m.heat_capacity(1e6) == pytest.approx(3 * si.number_density * kB, rel=1e-6)


# ------------------------------------------------------------------ adaptive quadrature
def _full_model(split=True, dispersion="debye"):
    L = Branch(8400.0, 570.0, 1, dispersion=dispersion, name="L")
    T = Branch(5800.0, 400.0, 2, dispersion=dispersion, name="T")
    return LatticeModel([L, T] if split else [Branch(6000.0, 640.0, dispersion=dispersion)],
                        [Boundary(5e-3), PointDefect(A=1.3e-45), Umklapp(B=2e-19), Normal(B=1e-24)])


@pytest.mark.parametrize("dispersion", ["debye", "sine"])
def test_full_model_matches_adaptive_quadrature(dispersion):
    m = _full_model(dispersion=dispersion)
    T = np.array([0.1, 1.0, 4.0, 20.0, 80.0, 300.0, 1200.0, 5000.0])
    # issue requirement: within 1e-6 of adaptive quadrature (scipy quad at epsrel 1e-10)
    np.testing.assert_allclose(m.kappa(T), kappa_adaptive(m, T), rtol=1e-6)


positive_log = lambda lo, hi: st.floats(lo, hi).map(lambda e: 10.0**e)


@st.composite
def random_models(draw):
    dispersion = draw(st.sampled_from(["debye", "sine"]))
    split = draw(st.booleans())
    vL = draw(st.floats(2000, 18000))
    th = draw(st.floats(80, 2300))
    if split:
        branches = [Branch(vL, th, 1, dispersion=dispersion, name="L"),
                    Branch(vL * draw(st.floats(0.4, 0.9)), th * draw(st.floats(0.4, 0.9)), 2,
                           dispersion=dispersion, name="T")]
    else:
        branches = [Branch(vL, th, 3, dispersion=dispersion)]
    mech = [Boundary(draw(positive_log(-8, -2)))]
    if draw(st.booleans()):
        mech.append(PointDefect(A=draw(positive_log(-47, -41))))
    if draw(st.booleans()):
        mech.append(Umklapp(B=draw(positive_log(-21, -17)), b=draw(st.floats(1.5, 6))))
    if draw(st.booleans()):
        mech.append(Normal(B=draw(positive_log(-26, -22))))
    if draw(st.booleans()):
        mech.append(ElectronPhonon(C=draw(positive_log(-7, -3))))
    if draw(st.booleans()):
        mech.append(Precipitate(radius=draw(positive_log(-9.5, -7)), number_density=draw(positive_log(20, 24))))
    return LatticeModel(branches, mech)


@settings(max_examples=12, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow])
@given(model=random_models(), T=st.lists(positive_log(-1, 3.69), min_size=1, max_size=3))
def test_random_models_match_adaptive_quadrature(model, T):
    # issue requirement: within 1e-6 relative of high-precision adaptive quadrature for any valid parameters
    np.testing.assert_allclose(model.kappa(np.array(T)), kappa_adaptive(model, np.array(T)), rtol=1e-6)


extra_mechanisms = st.one_of(
    positive_log(-8, -2).map(lambda L: Boundary(L, name="extra")),
    positive_log(-47, -40).map(lambda A: PointDefect(A=A, name="extra")),
    positive_log(-21, -16).map(lambda B: Umklapp(B=B, name="extra")),
    positive_log(-7, -2).map(lambda C: ElectronPhonon(C=C, name="extra")),
    positive_log(10, 16).map(lambda d: Dislocation(density=d, name="extra")),
    positive_log(20, 25).map(lambda n: Precipitate(number_density=n, name="extra")),
)


@settings(max_examples=40, deadline=None, derandomize=True)
@given(model=random_models(), extra=extra_mechanisms, T=positive_log(-1, 3.69))
def test_adding_scattering_never_raises_kappa_and_stays_finite(model, extra, T):
    # Matthiessen's rule: an extra resistive rate can only shorten tau_R; Callaway's N term
    # I2^2/I3 also cannot grow (Cauchy-Schwarz bound of the correction), so kappa is monotone.
    k0 = float(model.kappa(T))
    k1 = float(model.with_mechanism(extra).kappa(T))
    assert np.isfinite(k0) and k0 > 0 and np.isfinite(k1) and k1 > 0
    assert k1 <= k0 * (1 + 1e-9)  # 1e-9: quadrature round-off between two evaluations


def test_normal_processes_are_switchable():
    m = _full_model()
    m_off = LatticeModel(m.branches, m.scattering, normal_correction=False)
    # With the correction off, N rates act resistively, so kappa is lower (Callaway 1959: I2^2/I3 >= 0).
    T = np.array([20.0, 100.0, 300.0])
    assert np.all(m_off.kappa(T) < m.kappa(T))
    np.testing.assert_allclose(m_off.kappa(T), kappa_adaptive(m_off, T), rtol=1e-6)


# ------------------------------------------------------------------ numerics
def test_extreme_temperatures_no_warnings():
    m = _full_model()
    T = np.geomspace(0.1, 5000, 300)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        k = m.kappa(T)
        d = LatticeModel([Branch(18000.0, 2230.0 * 45)], [Boundary(1e-3), Umklapp(B=1e-19)])
        k2 = d.kappa([0.1, 1.0, 5000.0])  # theta/T up to 1e6
        s = m.spectral(0.1)
    assert np.all(np.isfinite(k)) and np.all(k > 0) and np.all(np.isfinite(k2))
    assert np.isfinite(s.kappa)


def test_vectorised_shape_and_values():
    m = _full_model()
    T = np.array([[10.0, 100.0], [300.0, 1000.0]])
    k = m.kappa(T)
    assert k.shape == (2, 2)
    assert k[1, 0] == pytest.approx(float(m.kappa(300.0)), rel=1e-14)
    parts = m.kappa_parts(300.0)
    assert set(parts) == {"L", "T"}
    assert sum(parts.values()) == pytest.approx(float(m.kappa(300.0)), rel=1e-14)


# ------------------------------------------------------------------ spectral
def test_spectral_accumulation_ends_at_kappa_and_cumulative_matches():
    m = _full_model()
    s = m.spectral(300.0)
    assert s.kappa_accumulated[-1] == pytest.approx(float(m.kappa(300.0)), rel=1e-12)
    assert np.all(np.diff(s.mfp) >= 0) and np.all(np.diff(s.kappa_accumulated) >= 0)
    # the plotting grid's trapezoid integral agrees with the quadrature to its own resolution
    # (400 points up to the Planck cut: ~1e-4 relative for these smooth integrands)
    total_grid = sum(c[-1] for c in s.cumulative.values())
    assert total_grid == pytest.approx(s.kappa, rel=2e-3)
    assert 0.0 < s.fraction_above(1e-6) < 1.0
    assert s.fraction_below(1e3) == pytest.approx(1.0)


def test_boundary_only_mfp_is_the_boundary_length():
    # Casimir: every phonon has mean free path L, so accumulation jumps from 0 to 1 at L.
    m = LatticeModel([Branch(5000.0, 400.0)], [Boundary(2e-6)])
    s = m.spectral(10.0)
    np.testing.assert_allclose(s.mfp, 2e-6, rtol=1e-12)
    assert s.median_mfp == pytest.approx(2e-6, rel=1e-9)


def test_rates_per_branch_and_mechanism():
    m = _full_model()
    w = np.linspace(1e11, 5e13, 7)
    r = m.rates(w, 300.0)
    assert set(r) == {"L", "T"}
    assert set(r["L"]) == {"boundary", "point_defect", "umklapp", "normal"}
    np.testing.assert_allclose(r["T"]["point_defect"], 1.3e-45 * w**4)


# ------------------------------------------------------------------ parameters
def test_params_roundtrip_and_with_params():
    m = _full_model()
    assert m.params["umklapp.B"] == 2e-19
    m2 = m.with_params({"umklapp.B": 4e-19, "boundary.length": 1e-6})
    assert m.params["umklapp.B"] == 2e-19  # unchanged
    assert m2.params["umklapp.B"] == 4e-19
    assert m2.kappa(300.0) < m.kappa(300.0)
    info = m.parameter_info()["boundary.length"]
    assert info.unit == "m" and info.log and info.label == "grain size (boundary length) [m]"
    again = LatticeModel.from_dict(m2.to_dict())
    assert again == m2
    assert float(again.kappa(123.0)) == float(m2.kappa(123.0))


def test_applies_to_restricts_a_mechanism_to_a_branch():
    m = _full_model().with_mechanism(Umklapp(B=5e-19, name="umklapp_T", applies_to=("T",)))
    r = m.rates([1e13], 300.0)
    assert "umklapp_T" in r["T"] and "umklapp_T" not in r["L"]
    assert m.kappa_parts(300.0)["L"] == pytest.approx(float(_full_model().kappa_parts(300.0)["L"]), rel=1e-14)


def test_from_gamma_uses_klemens_form_per_branch():
    # Klemens (1955): A = V0 Gamma / (4 pi v^3), with each branch's own velocity
    pd = PointDefect.from_gamma(2e-4, 2e-29)
    b = Branch(5000.0, 400.0)
    assert pd.coefficient(b) == pytest.approx(2e-29 * 2e-4 / (4 * math.pi * 5000.0**3), rel=1e-14)


def test_umklapp_from_material_prefactor():
    # Slack-style prefactor hbar gamma^2 / (M v^2 theta) (Morelli, Heremans & Slack 2002)
    si = materials.get("Si")
    u = Umklapp.from_material(si, gruneisen=1.0)
    b = si.branches()[0]
    M = si.atomic_mass * 1.66053906660e-27
    assert u.coefficient(b) == pytest.approx(hbar / (M * b.velocity**2 * b.debye_temperature), rel=1e-8)


# ------------------------------------------------------------------ bad input
@pytest.mark.parametrize("T", [0.0, -5.0, float("nan"), float("inf")])
def test_bad_temperature_names_parameter(T):
    with pytest.raises(ParameterError, match="temperature"):
        _full_model().kappa([300.0, T])


@pytest.mark.parametrize("make, match", [
    (lambda: Boundary(-1e-6), r"boundary\.length must be finite and > 0 \[m\], got -1e-06"),
    (lambda: Boundary(1e-6, specularity=1.0), r"boundary\.specularity"),
    (lambda: PointDefect(), "exactly one of A"),
    (lambda: Umklapp(B=float("nan")), r"umklapp\.B"),
    (lambda: Branch(-1.0, 300.0), "velocity"),
    (lambda: Branch(1000.0, 300.0, polarizations=4), "polarizations"),
    (lambda: Branch(1000.0, 300.0, dispersion="cubic"), "dispersion must be one of"),
    (lambda: LatticeModel([Branch(1e3, 300.0)], [Boundary(1e-3), Boundary(1e-4)]), "two mechanisms are named 'boundary'"),
    (lambda: LatticeModel([Branch(1e3, 300.0)], [Normal(1e-24)]), "no resistive scattering"),
    (lambda: _full_model().with_params({"umklapp.C": 1.0}), "unknown parameter 'umklapp.C'; valid names"),
    (lambda: materials.get("unobtainium"), "unknown material 'unobtainium'; presets are"),
])
def test_bad_input_messages(make, match):
    with pytest.raises(ParameterError, match=match):
        make()


def test_planck_weight_against_mpmath():
    # x^2 e^x / (e^x - 1)^2 at 40 digits (mpmath) across the series/exponential switch and to x = 700
    import mpmath as mp
    from kinetic.quadrature import SERIES_X, planck_weight
    xs = np.concatenate([np.geomspace(1e-9, 700, 300), [SERIES_X * (1 - 1e-12), SERIES_X]])
    with mp.workdps(40):
        ref = np.array([float(mp.mpf(x) ** 2 * mp.exp(x) / mp.expm1(x) ** 2) for x in xs])
    np.testing.assert_allclose(planck_weight(xs), ref, rtol=1e-14)  # double-precision round-off
    assert planck_weight(np.array([1e5]))[0] == 0.0  # underflows quietly, no overflow warning
