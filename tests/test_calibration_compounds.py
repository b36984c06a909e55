"""Compound presets: calibrated default models reproduce their published k(T) tables.

Each preset's ``model`` was fitted with kinetic.fit (reference/calibrate_compounds.py) to the rows of
reference/compound_kappa.csv, whose ``source`` column names the publication (several rows are from
memory, marked so there and in the preset). These tests rebuild each default model from the preset
alone and compare it with the table: the stored rms must be reproduced, it must lie within the
table's stated uncertainty (the published scatter), and the 300 K value within 10 % of the reference.
"""
import csv
from pathlib import Path

import numpy as np
import pytest
from scipy.constants import hbar, k as kB

from kinetic import ParameterError, estimates, materials
from kinetic.alloy import host_model
from kinetic.presets import PRESETS

REFERENCE = Path(__file__).resolve().parents[1] / "reference"
CALIBRATED = ["GaAs", "PbTe", "Bi2Te3", "Mg2Si", "AlN", "SiC", "InSb", "Mg2Sn", "CoSb3"]


def _table(name):
    with open(REFERENCE / "compound_kappa.csv", newline="") as fh:
        rows = [r for r in csv.DictReader(fh) if r["material"] == name]
    T = np.array([float(r["temperature_K"]) for r in rows])
    k = np.array([float(r["kappa_W_per_mK"]) for r in rows])
    return T, k, float(rows[0]["uncertainty_percent"]) / 100, rows[0]["source"]


@pytest.mark.parametrize("name", CALIBRATED)
def test_default_model_reproduces_its_published_table(name):
    T, k, unc, source = _table(name)
    cal = PRESETS[name]["calibration"]["value"]
    assert PRESETS[name]["calibration"]["source"] == source  # the preset names the table's publication
    assert (cal["t_min"], cal["t_max"], cal["n_points"]) == (T.min(), T.max(), T.size)
    model = host_model(materials.get(name))
    dev = model.kappa(T) / k - 1
    rms = float(np.sqrt(np.mean(dev**2)))
    # the stored rms is what the stored model gives (rounding of the stored parameters: 4 digits)
    assert rms == pytest.approx(cal["rms"], abs=2e-3)
    # and it lies within the table's uncertainty, i.e. the published scatter between sources
    # (10-15 %, stated per row in compound_kappa.csv)
    assert rms < unc and np.max(np.abs(dev)) < unc


@pytest.mark.parametrize("name", CALIBRATED)
def test_default_model_within_ten_percent_at_300K(name):
    # issue 8: the default model's 300 K value lies within 10 % of the reference (preset kappa_300K,
    # which names its source; from memory where marked there)
    ref = PRESETS[name]["kappa_300K"]["value"]
    k300 = float(host_model(materials.get(name)).kappa(300.0))
    assert k300 == pytest.approx(ref, rel=0.10)


def _christoffel_average(C, rho, n=20000, seed=1):
    """Direction-averaged L and T velocities of a cubic crystal (Christoffel equation, own code)."""
    c11, c12, c44 = C["C11"], C["C12"], C["C44"]
    d = np.random.default_rng(seed).normal(size=(n, 3))
    d /= np.linalg.norm(d, axis=1)[:, None]
    G = np.empty((n, 3, 3))
    for i in range(3):
        for j in range(3):
            G[:, i, j] = (c12 + c44) * d[:, i] * d[:, j]
        G[:, i, i] = c11 * d[:, i] ** 2 + c44 * (1 - d[:, i] ** 2)
    v = np.sqrt(np.linalg.eigvalsh(G / rho))
    return v[:, 2].mean(), v[:, :2].mean()


@pytest.mark.parametrize("name", ["GaAs", "PbTe", "Mg2Si", "InSb", "Mg2Sn"])
def test_velocities_come_from_the_elastic_constants(name):
    # issue 8: sound velocities from elastic constants (not from X-ray Debye temperatures); the cubic
    # presets' stored averages are recomputed here from their C_ij and X-ray density; tolerance 1 %:
    # Monte Carlo error of the direction average with 20,000 directions (~0.3 %) plus rounding
    p = PRESETS[name]
    vL, vT = _christoffel_average(p["elastic_constants"]["value"], p["density"]["value"])
    assert vL == pytest.approx(p["velocity_longitudinal"]["value"], rel=0.01)
    assert vT == pytest.approx(p["velocity_transverse"]["value"], rel=0.01)


@pytest.mark.parametrize("name", CALIBRATED)
def test_debye_branch_holds_three_modes_per_atom(name):
    # Debye's counting: theta = hbar v_D (6 pi^2 n)^(1/3) / kB puts exactly 3 modes per atom in the
    # averaged branch (closed form), so the heat capacity tends to Dulong-Petit; the presets store
    # the elastic theta_0 of their velocities (rounded to 0.1 K: tolerance 0.3 %)
    m = materials.get(name)
    tol = 3e-3
    assert hbar * m.velocity_debye * m.q_debye / kB == pytest.approx(m.debye_temperature, rel=tol)
    model = host_model(m)
    n_kB = kB / m.volume_per_atom
    # Dulong-Petit 3 n kB at T = 20 theta (closed form; Debye's C(T) is 1 - (theta/T)^2/20 of it there);
    # tolerance: the mode count above (0.3 % in theta gives 0.9 % in modes)
    assert float(model.heat_capacity(20 * m.debye_temperature)) == pytest.approx(3 * n_kB, rel=3 * tol)


def test_calibrated_gamma_is_not_the_thermodynamic_one():
    # the fitted Umklapp gamma of GaAs is model-specific; the thermodynamic 0.74 (Ioffe data) would
    # put the 300 K value far above the 45.5 W/m/K of the reference law (Sealy 1993 / Tiwari 1992)
    model = host_model(materials.get("GaAs"))
    g = model.params["umklapp.gruneisen"]
    assert g > 1.5
    k_th = float(model.with_params({"umklapp.gruneisen": 0.74}).kappa(300.0))
    assert k_th > 3 * 45.5


def test_slack_estimate_uses_the_slack_gamma():
    si = materials.get("Si")
    # never the thermodynamic gamma_th = 0.46: the preset's Slack gamma 1.06 (Morelli & Slack 2006,
    # from memory) with theta_a = theta_D n^(-1/3) gives ~129 W/m/K (computed, reference notes),
    # against the CRC 148; Slack's estimate is good to ~20 % for such solids (Morelli & Slack 2006,
    # from memory), hence the tolerance
    k = float(estimates.slack_kappa_for(si, 300.0))
    assert k == pytest.approx(float(estimates.slack_kappa_for(si, 300.0, gruneisen=1.06)), rel=1e-12)
    assert k == pytest.approx(148.0, rel=0.20)
    with pytest.raises(ParameterError, match="gruneisen_slack"):
        estimates.slack_kappa_for(materials.get("Mg2Si"), 300.0)
