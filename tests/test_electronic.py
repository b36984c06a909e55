"""Tests of kinetic.electronic: Fermi integrals, band-model Lorenz numbers,
kappa_e, lattice subtraction, bipolar terms, power factor and zT.

Every physics check names its source beside it; every tolerance says why.
"""
from __future__ import annotations

import csv
import math
import warnings
from pathlib import Path

import mpmath as mp
import numpy as np
import pytest
import scipy.constants as sc
from hypothesis import given, settings
from hypothesis import strategies as st

from kinetic import electronic as el
from kinetic.errors import DataError, ParameterError

KB_E = sc.k / sc.e                      # kB/e [V/K], scipy.constants (CODATA)
REFERENCE = Path(__file__).resolve().parents[1] / "reference" / "metals_wiedemann_franz.csv"


def mp_fermi(j, eta, dps=30):
    """F_j(eta) by mpmath tanh-sinh quadrature at `dps` digits, split at the Fermi step."""
    with mp.workdps(dps):
        j, eta = mp.mpf(j), mp.mpf(eta)
        f = lambda x: x ** j / (1 + mp.exp(x - eta))  # noqa: E731
        pts = [0, eta, eta + 40, mp.inf] if eta > 0 else [0, 5, 40, mp.inf]
        return mp.quad(f, pts)


def mp_spb(eta, lam):
    """(|S|/(kB/e), L/(kB/e)^2) of the single-band formulas, evaluated in mpmath."""
    with mp.workdps(30):
        f0, f1, f2 = (mp_fermi(lam + d, eta) for d in (0, 1, 2))
        s = (2 + lam) * f1 / ((1 + lam) * f0) - eta
        lor = ((1 + lam) * (3 + lam) * f0 * f2 - (2 + lam) ** 2 * f1 ** 2) / ((1 + lam) ** 2 * f0 ** 2)
        return float(s), float(lor)


# ---------------------------------------------------------------------------
# constants
# ---------------------------------------------------------------------------

def test_L0_closed_form_and_scipy_constants():
    # Source: Sommerfeld closed form L0 = (pi^2/3)(kB/e)^2 with kB, e from scipy.constants.
    assert el.L0 == pytest.approx(math.pi ** 2 / 3 * (sc.k / sc.e) ** 2, rel=1e-15)  # same formula: rounding only
    # Source: shared reference notes, 2.443004509e-8 (computed from CODATA); 10 digits quoted.
    assert el.L0 == pytest.approx(2.443004509e-8, rel=5e-10)
    # Source: scipy.constants; kB/e = 86.17333262 uV/K (both exact in the 2019 SI).
    assert el.KB_OVER_E == pytest.approx(86.17333262e-6, rel=1e-9)  # 10 digits quoted


# ---------------------------------------------------------------------------
# Fermi-Dirac integrals
# ---------------------------------------------------------------------------

@settings(max_examples=40, deadline=None, derandomize=True)
@given(
    j=st.sampled_from([-0.5, 0.0, 0.5, 1.0, 1.5, 2.0, 3.0, 4.0]),
    eta=st.floats(min_value=-30.0, max_value=100.0, allow_nan=False),
)
def test_fermi_integral_matches_mpmath(j, eta):
    # Source: mpmath high-precision (30-digit) quadrature of the defining integral.
    ref = float(mp_fermi(j, eta))
    # 1e-11: ten times stricter than the 1e-10 target; the method's own error is ~1e-14.
    assert el.fermi_integral(j, eta) == pytest.approx(ref, rel=1e-11)


def test_fermi_integral_region_edges_match_mpmath():
    # The three regions meet at eta = -1 and eta = 40; check both sides of each edge.
    # Source: mpmath quadrature as above.
    for j in (-0.5, 0.5, 2.5, 6.0, 12.0):
        for eta in (-1.0000001, -1.0, -0.9999999, 39.9999999, 40.0):
            ref = float(mp_fermi(j, eta))
            assert el.fermi_integral(j, eta) == pytest.approx(ref, rel=1e-11)  # as above


def test_fermi_integral_order_zero_closed_form_wide_range():
    # Source: closed form F_0(eta) = ln(1 + e^eta).
    eta = np.concatenate([np.linspace(-700.0, 200.0, 20001), np.geomspace(200.0, 1e6, 50)])
    got = el.fermi_integral(0, eta)
    assert got.shape == eta.shape
    # 1e-13: a few ulps accumulated over the quadrature sum; no cancellation for j = 0.
    np.testing.assert_allclose(got, np.logaddexp(0.0, eta), rtol=1e-13)


def test_fermi_integral_order_one_reflection_identity():
    # Source: closed form F_1(eta) + F_1(-eta) = eta^2/2 + pi^2/6 (dilogarithm inversion).
    eta = np.linspace(0.0, 120.0, 241)
    lhs = el.fermi_integral(1, eta) + el.fermi_integral(1, -eta)
    np.testing.assert_allclose(lhs, eta ** 2 / 2 + math.pi ** 2 / 6, rtol=1e-13)  # a few ulps


def test_fermi_integral_nondegenerate_limit():
    # Source: closed-form limit F_j(eta) -> Gamma(j+1) e^eta (1 - e^eta/2^(j+1)) as eta -> -inf.
    for j in (-0.5, 0.5, 3.0):
        eta = np.array([-700.0, -200.0, -40.0])
        ref = math.gamma(j + 1) * np.exp(eta) * (1 - np.exp(eta) / 2 ** (j + 1))
        np.testing.assert_allclose(el.fermi_integral(j, eta), ref, rtol=1e-14)  # next term e^(2 eta) < 1e-34


def test_fermi_integral_extreme_eta_no_warnings_and_no_nan():
    # Source: closed-form limits: 0 as eta -> -inf; eta^(j+1)/(j+1) as eta -> +inf.
    eta = np.array([-1.7e308, -1e300, -800.0, -745.0, 0.0, 1e3, 1e6, 1e300, 1.7e308])
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        with np.errstate(all="raise"):
            for j in (-0.5, 0.0, 2.0, 4.0, 12.0):
                v = el.fermi_integral(j, eta)
                assert not np.any(np.isnan(v))
                assert np.all(v[:3] == 0.0)
                # 1e-9: the first Sommerfeld correction, (pi^2/6) j (j+1)/eta^2, is <= 2.6e-10
                # at eta = 1e6 for j <= 12 (Source: leading term of the Sommerfeld expansion).
                np.testing.assert_allclose(v[6], 1e6 ** (j + 1) / (j + 1), rtol=1e-9)
            S = el.seebeck_spb(eta)
            L = el.lorenz_spb_eta(eta, scattering="ionized_impurity")
    assert not np.any(np.isnan(S)) and not np.any(np.isnan(L))


def test_fermi_integral_vectorised_shape():
    eta = np.linspace(-5, 50, 12).reshape(3, 4)
    assert el.fermi_integral(0.5, eta).shape == (3, 4)
    assert isinstance(el.fermi_integral(0.5, 1.0), float)


@pytest.mark.parametrize("j", [-1.0, -2.0, 12.5, float("nan")])
def test_fermi_integral_bad_order(j):
    with pytest.raises(ParameterError, match=r"j must be in \(-1, 12\]"):
        el.fermi_integral(j, 0.0)


def test_fermi_integral_bad_eta():
    with pytest.raises(ParameterError, match="eta must be finite"):
        el.fermi_integral(0.5, [0.0, float("inf")])


# ---------------------------------------------------------------------------
# single parabolic band
# ---------------------------------------------------------------------------

@pytest.mark.parametrize("scattering,lam", [("acoustic", 0.0), ("ionized_impurity", 2.0)])
def test_spb_nondegenerate_limits(scattering, lam):
    # Source: band-model closed form with F_j -> Gamma(j+1) e^eta:
    #   L -> (lambda + 2)(kB/e)^2 and S -> (kB/e)(lambda + 2 - eta).
    # In the tau ~ E^r convention this is (r + 5/2)(kB/e)^2 with r = lambda - 1/2:
    # 2 (kB/e)^2 = 1.485e-8 for acoustic phonons (Kim et al. 2015 abstract: "~1.5e-8").
    eta = np.array([-200.0, -60.0, -30.0])
    L = el.lorenz_spb_eta(eta, scattering=scattering)
    S = el.seebeck_spb(eta, scattering=scattering)
    # 1e-11: the first correction is of order e^eta <= e^-30 = 1e-13.
    np.testing.assert_allclose(L, (lam + 2) * KB_E ** 2, rtol=1e-11)
    np.testing.assert_allclose(S, KB_E * (lam + 2 - eta), rtol=1e-11)


def test_spb_degenerate_limit_acoustic_closed_form():
    # Source: for lambda = 0 the Sommerfeld series of F_0, F_1, F_2 terminates
    # (F_0 = eta, F_1 = eta^2/2 + pi^2/6, F_2 = eta^3/3 + pi^2 eta/3, up to O(e^-eta)), giving
    # L = L0 (1 - pi^2/(3 eta^2)) and S = (pi^2/3)(kB/e)/eta exactly.
    eta = np.array([30.0, 45.0, 100.0, 1e3, 1e4, 1e5])
    L = el.lorenz_spb_eta(eta)
    S = el.seebeck_spb(eta)
    # 1e-10 / 1e-9: eta = 30 carries O(e^-30) terms; the quadrature side (eta < 40) loses
    # ~3 digits to the S and L differences.
    np.testing.assert_allclose(L, el.L0 * (1 - math.pi ** 2 / (3 * eta ** 2)), rtol=1e-10)
    np.testing.assert_allclose(S, math.pi ** 2 / 3 * KB_E / eta, rtol=1e-9)


@pytest.mark.parametrize("lam", [0.5, 1.0, 2.0, 3.5])
def test_spb_degenerate_limit_general_lambda(lam):
    # Source: Sommerfeld limit L -> L0 (any lambda) and the Mott formula
    # S -> (pi^2/3)(kB/e)(lambda + 1)/eta, both with corrections O(eta^-2).
    eta = 1e5
    # 1e-8: the O(eta^-2) = 1e-10 correction times a coefficient of order 10.
    assert el.lorenz_spb_eta(eta, lam) == pytest.approx(el.L0, rel=1e-8)
    assert el.seebeck_spb(eta, lam) * eta == pytest.approx(math.pi ** 2 / 3 * KB_E * (lam + 1), rel=1e-8)
    # and the deviation from L0 shrinks as eta^-2 (Sommerfeld expansion): ratio 100 for 10x eta
    d1 = el.lorenz_spb_eta(1e3, lam) - el.L0
    d2 = el.lorenz_spb_eta(1e4, lam) - el.L0
    assert d1 / d2 == pytest.approx(100.0, rel=1e-3)  # next order changes the ratio by ~1e-5


@pytest.mark.parametrize("lam", [0.0, 2.0])
def test_spb_formulas_against_mpmath(lam):
    # Source: the single-band formulas of the shared reference notes, evaluated with mpmath
    # Fermi integrals (an independent implementation of the same equations).
    for eta in (-30.0, -1.0, 0.0, 2.0, 15.0, 39.5, 40.5, 90.0):
        s_ref, l_ref = mp_spb(eta, lam)
        # 1e-10: S and L are differences that lose up to ~3 digits for eta ~ 40.
        assert el.seebeck_spb(eta, lam) == pytest.approx(KB_E * s_ref, rel=1e-10)
        assert el.lorenz_spb_eta(eta, lam) == pytest.approx(KB_E ** 2 * l_ref, rel=1e-10)


# Source: shared reference notes, "Computed for lambda = 0" (eta, |S| [uV/K], L [1e-8 W Ohm/K^2]).
REFERENCE_NOTES_TABLE = [
    (-2.0, 350.24, 1.5087),
    (0.0, 204.50, 1.6130),
    (2.0, 112.39, 1.8562),
    (6.0, 46.95, 2.2418),
    (20.0, 14.17, 2.4229),
]


@pytest.mark.parametrize("eta,s_uv,l_e8", REFERENCE_NOTES_TABLE)
def test_spb_reference_notes_table(eta, s_uv, l_e8):
    # Tolerances: half a unit in the last quoted digit (the table is rounded).
    assert el.seebeck_spb(eta) * 1e6 == pytest.approx(s_uv, abs=0.005 + 1e-9)
    assert el.lorenz_spb_eta(eta) * 1e8 == pytest.approx(l_e8, abs=0.00005 + 1e-9)
    # and the other way round: |S| -> L through the inversion
    assert el.lorenz_spb(s_uv * 1e-6) * 1e8 == pytest.approx(l_e8, abs=0.0001)  # S rounded to 0.01 uV/K


@settings(max_examples=40, deadline=None, derandomize=True)
@given(
    eta=st.floats(min_value=-30.0, max_value=100.0, allow_nan=False),
    scattering=st.sampled_from(["acoustic", "polar_optical", "ionized_impurity", 0.5, -0.5]),
)
def test_reduced_fermi_level_round_trip(eta, scattering):
    # Source: definition of the inverse.
    back = el.reduced_fermi_level(el.seebeck_spb(eta, scattering), scattering)
    # 1e-10: the solver stops at ~1e-13 relative in ln S; S(eta) is smooth and monotone.
    assert back == pytest.approx(eta, abs=1e-10 * max(1.0, abs(eta)))


def test_reduced_fermi_level_vectorised_whole_range_and_sign():
    # Source: definition of the inverse; |S| convention (n- and p-type alike).
    eta = np.concatenate([np.linspace(-200.0, 60.0, 2001), np.geomspace(60.0, 1e5, 200)])
    S = el.seebeck_spb(eta)
    for sign in (1.0, -1.0):
        back = el.reduced_fermi_level(sign * S)
        assert back.shape == eta.shape
        # 1e-10 relative: as above, over the whole invertible range.
        np.testing.assert_allclose(back, eta, rtol=1e-10, atol=1e-10)
    assert el.lorenz_spb(-S[100]) == el.lorenz_spb(S[100])


def test_lorenz_spb_chains_inverse_and_forward():
    S = np.array([-350e-6, -120e-6, 5e-6, 80e-6, 300e-6])
    for scattering in ("acoustic", "ionized_impurity", 1.0):
        ref = el.lorenz_spb_eta(el.reduced_fermi_level(S, scattering), scattering)
        np.testing.assert_allclose(el.lorenz_spb(S, scattering), ref, rtol=1e-14)  # same path, rounding


@pytest.mark.parametrize("bad", [0.0, 1.0, -0.5, 1e-12])
def test_reduced_fermi_level_out_of_range(bad):
    smin, smax = el.seebeck_range_spb()
    assert 2.8e-9 < smin < 2.9e-9 and 1.7e-2 < smax < 1.8e-2  # eta = 1e5 and eta = -200
    with pytest.raises(ParameterError, match=r"\|seebeck\| = .* V/K is outside .* \[2\.83e-09, 0\.0174\] V/K"):
        el.reduced_fermi_level(bad)
    with pytest.raises(ParameterError, match="outside the range"):
        el.lorenz_spb([100e-6, bad])


def test_scattering_choices():
    assert el.scattering_exponent("acoustic") == 0.0
    assert el.scattering_exponent("ionized_impurity") == el.scattering_exponent("ionised-impurity") == 2.0
    assert el.scattering_exponent(0.5) == 0.5
    with pytest.raises(ParameterError, match="scattering must be one of"):
        el.seebeck_spb(0.0, scattering="phonon")
    with pytest.raises(ParameterError, match=r"lambda must be in \(-1, 6\]"):
        el.seebeck_spb(0.0, scattering=-1.0)
    with pytest.raises(ParameterError, match="scattering must be a name or a number"):
        el.seebeck_spb(0.0, scattering=True)


# ---------------------------------------------------------------------------
# Kim et al. 2015
# ---------------------------------------------------------------------------

def test_kim_formula_closed_form_values():
    # Source: Kim et al., APL Mater. 3, 041506 (2015): L = 1.5 + exp(-|S|/116), 1e-8 units, uV/K.
    assert el.lorenz_kim(0.0) == pytest.approx(2.5e-8, rel=1e-15)
    assert el.lorenz_kim(-116e-6) == pytest.approx((1.5 + math.exp(-1.0)) * 1e-8, rel=1e-14)  # rounding
    assert el.lorenz_kim(1.0) == pytest.approx(1.5e-8, rel=1e-15)


def test_kim_formula_within_stated_accuracy_of_exact_spb():
    # Source: Kim et al. 2015 abstract (checked): "accurate within 5% for single parabolic
    # band/acoustic phonon scattering". The abstract states no |S| range; the paper's range
    # |S| > 10 uV/K is from memory, so we check the wider range |S| ~ 0.3 uV/K .. 2.8 mV/K
    # (eta from 1e3 down to -30), which contains it.
    eta = np.concatenate([np.linspace(-30.0, 60.0, 9001), np.geomspace(60.0, 1e3, 200)])
    S = el.seebeck_spb(eta)
    rel = np.abs(el.lorenz_kim(S) / el.lorenz_spb_eta(eta) - 1)
    assert rel.max() < el.KIM_STATED_ACCURACY == 0.05
    # Source: shared reference notes (computed): the largest error is 3.65%, near 218 uV/K.
    assert rel.max() == pytest.approx(0.0365, abs=0.00006)  # quoted to 3 digits
    assert S[rel.argmax()] * 1e6 == pytest.approx(218, abs=3)  # grid spacing 0.01 in eta ~ 1 uV/K


# ---------------------------------------------------------------------------
# Wiedemann-Franz for metals
# ---------------------------------------------------------------------------

def _metals():
    """{metal: {"T": K, "kappa": W/m/K, "rho": Ohm m}} from the reference table (long format)."""
    with open(REFERENCE, newline="") as fh:
        rows = list(csv.DictReader(fh))
    assert all(r["source"].strip() and r["how"].strip() for r in rows)
    out: dict[str, dict[str, float]] = {}
    for r in rows:
        d = out.setdefault(r["metal"], {"T": float(r["temperature_K"])})
        assert d["T"] == float(r["temperature_K"])
        key = {"kappa": "kappa", "resistivity": "rho"}[r["quantity"]]
        assert r["unit"] == {"kappa": "W/m/K", "rho": "Ohm m"}[key]
        d[key] = float(r["value"])
    assert sorted(out) == ["Ag", "Al", "Au", "Cu"]
    return out


@pytest.mark.parametrize("metal", ["Cu", "Al", "Ag", "Au"])
def test_wiedemann_franz_metals_near_300K(metal):
    # Source: reference/metals_wiedemann_franz.csv -- kappa from the Beaton & Hewitt table
    # (CRC Handbook; checked), resistivity from the CRC Handbook "Electrical Resistivity of
    # Pure Metals" table, 300 K column (from memory).
    d = _metals()[metal]
    kappa = el.wiedemann_franz_kappa(d["T"], d["rho"])
    # 15%: measured room-temperature Lorenz numbers of simple metals lie up to ~12% below L0
    # (inelastic electron-phonon scattering near the Debye temperature; the shared reference
    # notes quote a 10-15% spread), so L0 predicts kappa only to that accuracy.
    assert kappa == pytest.approx(d["kappa"], rel=0.15)
    # Same source: the measured L = kappa rho / T lies between 2.1e-8 (Al) and L0.
    L_meas = d["kappa"] * d["rho"] / d["T"]
    assert 2.1e-8 < L_meas < el.L0


def test_wiedemann_franz_vectorised_and_bad_input():
    T = np.array([100.0, 200.0, 300.0])
    np.testing.assert_allclose(el.wiedemann_franz_kappa(T, 1e-8), el.L0 * T / 1e-8, rtol=1e-15)
    assert el.wiedemann_franz_kappa(300.0, 1e-8, lorenz=2e-8) == pytest.approx(600.0, rel=1e-15)
    with pytest.raises(ParameterError, match=r"resistivity must be finite and positive \[Ohm m\], got -1e-08"):
        el.wiedemann_franz_kappa(300.0, -1e-8)
    with pytest.raises(ParameterError, match=r"temperature must be finite and positive \[K\], got 0.0"):
        el.wiedemann_franz_kappa(0.0, 1e-8)


# ---------------------------------------------------------------------------
# electronic_kappa
# ---------------------------------------------------------------------------

def test_electronic_kappa_sommerfeld_hand_values():
    # Hand calculation: kappa_e = L0 sigma T; without Seebeck the Lorenz uncertainty is the
    # gap to the nondegenerate acoustic limit, L0 - 2(kB/e)^2 (band-model closed forms).
    T = np.array([300.0, 600.0])
    r = el.electronic_kappa(T, sigma=1e5)
    np.testing.assert_allclose(r.value, el.L0 * 1e5 * T, rtol=1e-15)
    gap = el.L0 - 2 * KB_E ** 2
    np.testing.assert_allclose(r.lorenz_uncertainty, gap, rtol=1e-12)  # grid max vs closed form
    np.testing.assert_allclose(r.uncertainty, gap * 1e5 * T, rtol=1e-12)
    assert r.method == "sommerfeld" and r.reduced_fermi_level is None
    same = el.electronic_kappa(T, resistivity=1e-5)
    np.testing.assert_allclose(same.value, r.value, rtol=1e-15)
    with pytest.raises(ValueError):
        r.value[0] = 1.0  # frozen result: arrays are read-only


def test_electronic_kappa_sommerfeld_with_seebeck_uncertainty():
    # With |S| given, the uncertainty is |L0 - L_spb(|S|)|, floored at 5% of L0.
    T, sigma = 300.0, 2e4
    S = np.array([204.50122926037167e-6, 2e-6, 0.0])  # eta = 0; deep degenerate; exactly 0
    r = el.electronic_kappa(T, sigma=sigma, seebeck=S)
    expect = np.maximum(np.abs(el.L0 - np.array([el.lorenz_spb_eta(0.0), el.L0, el.L0])), 0.05 * el.L0)
    np.testing.assert_allclose(r.lorenz_uncertainty, expect, rtol=1e-8)  # S rounded in input
    np.testing.assert_allclose(r.value, el.L0 * sigma * T, rtol=1e-15)


def test_electronic_kappa_spb_and_kim():
    T, sigma = np.array([300.0, 500.0, 700.0]), np.array([3e4, 4e4, 5e4])
    S = np.array([-180e-6, -220e-6, -260e-6])
    spb = el.electronic_kappa(T, sigma=sigma, seebeck=S, method="spb")
    L = el.lorenz_spb(S)
    np.testing.assert_allclose(spb.lorenz, L, rtol=1e-15)
    np.testing.assert_allclose(spb.value, L * sigma * T, rtol=1e-15)
    np.testing.assert_allclose(spb.reduced_fermi_level, el.reduced_fermi_level(S), rtol=1e-15)
    spread = np.maximum(np.abs(L - el.lorenz_kim(S)), 0.05 * L)
    np.testing.assert_allclose(spb.lorenz_uncertainty, spread, rtol=1e-15)
    # acoustic SPB vs Kim differ by < 3.65% (test above), so the 5% floor applies here
    np.testing.assert_allclose(spb.lorenz_uncertainty, 0.05 * L, rtol=1e-15)
    kim = el.electronic_kappa(T, sigma=sigma, seebeck=S, method="kim")
    np.testing.assert_allclose(kim.lorenz, (1.5 + np.exp(-np.abs(S) * 1e6 / 116)) * 1e-8, rtol=1e-14)
    np.testing.assert_allclose(kim.uncertainty, 0.05 * kim.value, rtol=1e-14)
    # ionized impurities: the spread to the acoustic-based Kim value exceeds 5% at 220 uV/K
    ii = el.electronic_kappa(500.0, sigma=4e4, seebeck=220e-6, method="spb", scattering="ionized_impurity")
    assert float(ii.lorenz_uncertainty) == pytest.approx(
        abs(el.lorenz_spb(220e-6, "ionized_impurity") - el.lorenz_kim(220e-6)), rel=1e-14)
    assert float(ii.lorenz_uncertainty) > 0.05 * float(ii.lorenz)


def test_electronic_kappa_given_lorenz_and_conductivity_error():
    r = el.electronic_kappa(400.0, sigma=1e5, lorenz=2.0e-8, lorenz_err=0.1e-8, conductivity_rel_err=0.05)
    assert r.method == "given"
    assert float(r.value) == pytest.approx(0.8, rel=1e-14)
    # Hand: sqrt((0.1e-8 * 1e5 * 400)^2 + (0.05 * 0.8)^2) = sqrt(0.04^2 + 0.04^2)
    assert float(r.uncertainty) == pytest.approx(math.hypot(0.04, 0.04), rel=1e-14)


@pytest.mark.parametrize(
    "kwargs,match",
    [
        (dict(), r"exactly one of sigma \[S/m\] or resistivity \[Ohm m\], got neither"),
        (dict(sigma=1e4, resistivity=1e-4), "got both"),
        (dict(sigma=-1e4), r"sigma must be finite and non-negative \[S/m\], got -10000.0"),
        (dict(resistivity=0.0), r"resistivity must be finite and positive \[Ohm m\], got 0.0"),
        (dict(sigma=1e4, method="drude"), r"method must be one of \['sommerfeld', 'spb', 'kim'\]"),
        (dict(sigma=1e4, method="spb"), r"method='spb' needs seebeck \[V/K\]"),
        (dict(sigma=1e4, method="kim", lorenz=2e-8), "give either lorenz"),
        (dict(sigma=1e4, lorenz=-2e-8), "lorenz must be finite and positive"),
        (dict(sigma=1e4, method="spb", seebeck=0.0), r"\|seebeck\| = 0 V/K is outside"),
        (dict(sigma=[1e4, 2e4], seebeck=[1e-4, 2e-4, 3e-4]), "array shapes do not broadcast"),
    ],
)
def test_electronic_kappa_bad_input(kwargs, match):
    with pytest.raises(ParameterError, match=match):
        el.electronic_kappa(300.0, **kwargs)


def test_electronic_kappa_bad_temperature():
    with pytest.raises(ParameterError,
                       match=r"temperature must be finite and positive \[K\], got -5.0 at index 1 of an array"):
        el.electronic_kappa([300.0, -5.0], sigma=1e4)


# ---------------------------------------------------------------------------
# lattice_from_total
# ---------------------------------------------------------------------------

def test_lattice_from_total_error_propagation_hand_calculation():
    # Hand calculation: kappa_e = 2.0e-8 * 1e5 * 300 = 0.6 W/m/K, its error 0.2e-8*1e5*300 = 0.06;
    # kappa_L = 2.0 - 0.6 = 1.4, error sqrt(0.1^2 + 0.06^2) = 0.116619...
    r = el.lattice_from_total(300.0, 2.0, sigma=1e5, lorenz=2.0e-8, lorenz_err=0.2e-8, kappa_total_err=0.1)
    assert float(r.kappa_electronic) == pytest.approx(0.6, rel=1e-14)
    assert float(r.kappa_lattice) == pytest.approx(1.4, rel=1e-14)
    assert float(r.kappa_lattice_err) == pytest.approx(math.sqrt(0.1 ** 2 + 0.06 ** 2), rel=1e-14)
    assert r.ok and r.method == "given"


def test_lattice_from_total_kim_vectorised():
    # Hand: L = (1.5 + exp(-200/116)) 1e-8, its uncertainty 5% (Kim et al. 2015 stated accuracy).
    T = np.array([300.0, 400.0, 500.0])
    kt = np.array([1.5, 1.4, 1.3])
    L = (1.5 + math.exp(-200 / 116)) * 1e-8
    r = el.lattice_from_total(T, kt, resistivity=2e-5, seebeck=200e-6, method="kim",
                              kappa_total_err=0.05 * kt, conductivity_rel_err=0.03)
    ke = L * T / 2e-5
    np.testing.assert_allclose(r.kappa_electronic, ke, rtol=1e-14)
    np.testing.assert_allclose(r.kappa_lattice, kt - ke, rtol=1e-14)
    ke_err = np.hypot(0.05 * ke, 0.03 * ke)
    np.testing.assert_allclose(r.kappa_electronic_err, ke_err, rtol=1e-14)
    np.testing.assert_allclose(r.kappa_lattice_err, np.hypot(0.05 * kt, ke_err), rtol=1e-14)
    assert r.kappa_lattice.shape == (3,)


def test_lattice_from_total_nonpositive_reported_not_clipped():
    T = np.array([300.0, 500.0, 700.0])
    kt = np.array([2.0, 1.2, 1.0])        # kappa_e = L0 * 1e5 * T = 0.73, 1.22, 1.71 W/m/K
    with pytest.raises(DataError, match=r"<= 0 at 2 of 3 point\(s\) \(first at T = 500 K"):
        el.lattice_from_total(T, kt, sigma=1e5)
    r = el.lattice_from_total(T, kt, sigma=1e5, on_nonpositive="keep")
    assert not r.ok
    np.testing.assert_array_equal(r.nonpositive, [False, True, True])
    np.testing.assert_allclose(r.kappa_lattice, kt - el.L0 * 1e5 * T, rtol=1e-14)  # unclipped
    assert r.kappa_lattice[2] < 0


@pytest.mark.parametrize(
    "kwargs,match",
    [
        (dict(kappa_total=-1.0, sigma=1e4), r"kappa_total must be finite and positive \[W/m/K\], got -1.0"),
        (dict(kappa_total=1.0, sigma=1e4, kappa_total_err=-0.1), "kappa_total_err must be finite and non-negative"),
        (dict(kappa_total=1.0, sigma=1e4, on_nonpositive="clip"), "on_nonpositive must be 'raise' or 'keep'"),
        (dict(kappa_total=1.0), "exactly one of sigma"),
    ],
)
def test_lattice_from_total_bad_input(kwargs, match):
    with pytest.raises(ParameterError, match=match):
        el.lattice_from_total(300.0, **kwargs)


# ---------------------------------------------------------------------------
# bipolar
# ---------------------------------------------------------------------------

def test_bipolar_two_band_hand_value():
    # Hand: sigma_n sigma_p/(sigma_n + sigma_p) = 1e4*3e4/4e4 = 7500 S/m;
    # (S_p - S_n)^2 = (150e-6 + 250e-6)^2 = 1.6e-7 V^2/K^2; times T = 400 K -> 0.48 W/m/K.
    assert el.bipolar_kappa_two_band(400.0, 1e4, 3e4, -250e-6, 150e-6) == pytest.approx(0.48, rel=1e-14)
    assert el.bipolar_kappa_two_band(400.0, 0.0, 0.0, -250e-6, 150e-6) == 0.0
    assert el.bipolar_kappa_two_band(400.0, 1e4, 0.0, -250e-6, 150e-6) == 0.0  # one band: no bipolar term


def test_bipolar_two_band_nondegenerate_price_limit():
    # Source: closed form of the nondegenerate two-band model (Price 1955, from memory):
    # S_p - S_n = (kB/e)(E_g/kB T + 2 lambda + 4) when eta_n + eta_p = -E_g/kB T; here
    # the partial Seebeck coefficients come from seebeck_spb, so this also checks signs.
    T = np.array([300.0, 450.0, 600.0])
    eg = 1.5 * sc.e                                  # J; wide gap keeps both bands nondegenerate
    x = eg / (sc.k * T)
    eta_n = -0.4 * x                                 # -23 .. -11.6: Fermi level below midgap
    eta_p = -x - eta_n
    for lam in (0.0, 2.0):
        Sn = -el.seebeck_spb(eta_n, lam)
        Sp = el.seebeck_spb(eta_p, lam)
        kbp = el.bipolar_kappa_two_band(T, 2e4, 1e4, Sn, Sp)
        ref = 2e4 * 1e4 / 3e4 * (KB_E * (x + 2 * lam + 4)) ** 2 * T
        # 1e-6: the neglected terms add ~(2 + lambda) e^eta / 4 to each |S|/(kB/e); at 600 K
        # (eta_n = -11.6) that is ~3e-7 of the squared Seebeck difference.
        np.testing.assert_allclose(kbp, ref, rtol=1e-6)


def test_bipolar_two_band_sign_errors():
    with pytest.raises(ParameterError, match=r"seebeck_n must be <= 0 V/K .* got 0.00025"):
        el.bipolar_kappa_two_band(400.0, 1e4, 3e4, 250e-6, 150e-6)
    with pytest.raises(ParameterError, match=r"seebeck_p must be >= 0 V/K .* got -0.00015"):
        el.bipolar_kappa_two_band(400.0, 1e4, 3e4, -250e-6, -150e-6)
    with pytest.raises(ParameterError, match="sigma_p must be finite and non-negative"):
        el.bipolar_kappa_two_band(400.0, 1e4, -3e4, -250e-6, 150e-6)


def test_bipolar_activated_form():
    # Hand: C T^p exp(-E_g/(2 kB T)) with E_g in eV converted by scipy.constants.e.
    T = np.array([300.0, 500.0])
    got = el.bipolar_kappa_activated(T, 2e-3, 0.13, exponent=1.5)
    ref = 2e-3 * T ** 1.5 * np.exp(-0.13 * sc.e / (2 * sc.k * T))
    np.testing.assert_allclose(got, ref, rtol=1e-14)
    # Arrhenius slope of ln(kappa T^-p) against 1/T is -E_g/(2 kB) (closed form of the law)
    slope = np.diff(np.log(got / T ** 1.5)) / np.diff(1 / T)
    assert slope[0] == pytest.approx(-0.13 * sc.e / (2 * sc.k), rel=1e-12)
    # deep freeze-out underflows to 0 quietly
    assert el.bipolar_kappa_activated(0.01, 1.0, 3.0) == 0.0
    with pytest.raises(ParameterError, match=r"band_gap_ev must be finite and positive \[eV\], got -0.1"):
        el.bipolar_kappa_activated(300.0, 1.0, -0.1)
    with pytest.raises(ParameterError, match="prefactor must be finite and non-negative"):
        el.bipolar_kappa_activated(300.0, -1.0, 0.1)


# ---------------------------------------------------------------------------
# power factor and zT
# ---------------------------------------------------------------------------

def test_power_factor_and_zt_hand_values():
    # Hand: S^2 sigma = (200e-6)^2 * 1e5 = 4e-3 W/m/K^2.
    assert el.power_factor(-200e-6, sigma=1e5) == pytest.approx(4e-3, rel=1e-14)
    assert el.power_factor(200e-6, resistivity=1e-5) == pytest.approx(4e-3, rel=1e-14)
    # zT = 4e-3 * 300 / (1.0 + 0.5 + 0.1) = 0.75
    assert el.zt(300.0, 200e-6, sigma=1e5, kappa_lattice=1.0, kappa_electronic=0.5,
                 kappa_bipolar=0.1) == pytest.approx(0.75, rel=1e-14)
    # kappa_e computed from L0 when not given
    T = np.array([300.0, 600.0])
    z = el.zt(T, 200e-6, sigma=1e5, kappa_lattice=1.0)
    np.testing.assert_allclose(z, 4e-3 * T / (1.0 + el.L0 * 1e5 * T), rtol=1e-14)
    zk = el.zt(T, 200e-6, sigma=1e5, kappa_lattice=1.0, method="kim")
    np.testing.assert_allclose(zk, 4e-3 * T / (1.0 + el.lorenz_kim(200e-6) * 1e5 * T), rtol=1e-14)


def test_zt_bad_input():
    with pytest.raises(ParameterError, match="kappa_lattice must be finite and non-negative"):
        el.zt(300.0, 2e-4, sigma=1e5, kappa_lattice=-1.0)
    with pytest.raises(ParameterError, match=r"must be > 0 W/m/K"):
        el.zt(300.0, 2e-4, sigma=0.0, kappa_lattice=0.0)
    with pytest.raises(ParameterError, match="exactly one of sigma"):
        el.power_factor(2e-4)


# ---------------------------------------------------------------------------------------------
# the package split: every public name importable from kinetic.electronic, from one home each
def test_public_names_from_their_submodules():
    import importlib

    homes = {"fermi": {"fermi_integral"},
             "band": {"SCATTERING_EXPONENTS", "scattering_exponent", "seebeck_spb", "lorenz_spb_eta",
                      "seebeck_range_spb", "reduced_fermi_level", "lorenz_spb"},
             "lorenz": {"L0", "KIM_STATED_ACCURACY", "lorenz_kim"},
             "thermoelectric": {"ElectronicKappa", "electronic_kappa", "LatticeFromTotal", "lattice_from_total",
                                "wiedemann_franz_kappa", "power_factor", "zt"},
             "bipolar": {"bipolar_kappa_activated", "bipolar_kappa_two_band"}}
    seen = {"KB_OVER_E"}
    for mod, names in homes.items():
        m = importlib.import_module(f"kinetic.electronic.{mod}")
        assert names <= set(m.__all__), mod
        for n in names:
            assert getattr(el, n) is getattr(m, n), n
        seen |= names
    assert seen == set(el.__all__)
    # the constants are the closed forms from CODATA (scipy.constants)
    assert el.KB_OVER_E == KB_E and el.L0 == pytest.approx(math.pi ** 2 / 3 * KB_E ** 2, rel=1e-15)
