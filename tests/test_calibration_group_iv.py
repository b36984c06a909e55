"""Calibrated default models of Si, Ge and diamond against their published reference tables.

Sources (full citations in the presets and reference/README.md):
* Si: Glassbrenner & Slack, Phys. Rev. 134, A1058 (1964), third-party copy of their table (+-5 %).
* Ge: Ho, Powell & Liley, J. Phys. Chem. Ref. Data 1, 279 (1972), recommended values (from memory).
* C: Inyushkin et al., Phys. Rev. B 97, 144305 (2018), abstract values (checked).
"""
import csv
from pathlib import Path

import numpy as np
import pytest

from kinetic import defaults, materials
from kinetic.errors import ParameterError
from kinetic.presets import PRESETS

ROOT = Path(__file__).resolve().parents[1]
GROUP_IV = ["Si", "Ge", "C"]
#: rows of each table used by the calibration (the source text picks them)
ROW_SOURCE = {"Si": "Glassbrenner", "Ge": "Powell", "C": "Inyushkin"}
#: reference value near 300 K: (temperature, kappa) from the same source
REF_300 = {"Si": (300.0, 156.0), "Ge": (300.0, 59.9), "C": (298.0, 2400.0)}


def _rows(name):
    cal = defaults.calibration(name)
    T, k = [], []
    with open(ROOT / cal.table, newline="") as fh:
        for r in csv.DictReader(fh):
            if r["material"] == name and ROW_SOURCE[name] in r["source"]:
                t = float(r["temperature_K"])
                if cal.t_min <= t <= cal.t_max:
                    T.append(t)
                    k.append(float(r["kappa_W_per_mK"]))
    return np.array(T), np.array(k)


@pytest.mark.parametrize("name", GROUP_IV)
def test_default_model_reproduces_its_table_within_the_stored_rms(name):
    cal = defaults.calibration(name)
    T, k = _rows(name)
    assert len(T) == cal.n_points
    rel = defaults.default_model(name).kappa(T) / k - 1.0
    rms = float(np.sqrt(np.mean(rel**2)))
    # the stored rms is the fit's own; 1e-3 absolute slack for rounding of the stored coefficients
    assert rms <= cal.rms + 1e-3
    # no point strays far beyond the table's scatter: G&S state +-5 % per point; the Si fit's rms is
    # 5.0 % with the largest residual 9.4 % (+9 % at 175 K, -8 % at 90-100 K: the shape of this
    # model's Umklapp freeze-out, see reference/README.md); 10 % bounds it (2 sigma of the stated +-5 %)
    assert np.max(np.abs(rel)) < 0.10


@pytest.mark.parametrize("name", GROUP_IV)
def test_room_temperature_within_ten_percent_of_the_reference(name):
    T, k = REF_300[name]
    assert float(defaults.default_model(name).kappa(T)) == pytest.approx(k, rel=0.10)


@pytest.mark.parametrize("name", GROUP_IV)
def test_averaged_branch_alternative_is_calibrated_too(name):
    # split_branches=False gives the preset's "model_avg", fitted to the same table (rms <= 5 %)
    T, k = _rows(name)
    m = defaults.default_model(name, split_branches=False)
    assert [b.name for b in m.branches] == ["avg"]
    rel = m.kappa(T) / k - 1.0
    assert float(np.sqrt(np.mean(rel**2))) < 0.051


@pytest.mark.parametrize("name", GROUP_IV)
def test_umklapp_uses_the_calibrated_gamma_never_the_thermodynamic_one(name):
    m = defaults.default_model(name)
    g = m.mechanism("umklapp").gruneisen
    stored = PRESETS[name]["model"]["value"]["mechanisms"]["umklapp"]["gruneisen"]
    assert g == stored
    gth = PRESETS[name]["gruneisen"]["value"]
    assert abs(g - gth) > 0.2  # calibrated 1.29-2.09 against gamma_th 0.46-0.73
    mat = materials.get(name)
    assert mat.gruneisen == stored and mat.gruneisen_thermodynamic == gth
    assert mat.calibration["table"] == defaults.calibration(name).table


def test_silicon_rms_within_the_tables_stated_scatter():
    # Glassbrenner & Slack (1964) state +-5 % per point; the stored fit (reference/calibrate_group_iv.py)
    # has rms 5.0 %, so the stored figure itself must stay at the stated scatter (0.1 % for rounding)
    assert defaults.calibration("Si").rms <= 0.051


def test_diamond_maximum_near_63_K():
    # Inyushkin et al., PRB 97, 144305 (2018), abstract (checked): "At conductivity maximum near 63 K".
    # The calibration imposes dk/dT = 0 at 63 K; on a 0.5 K grid the maximum must lie within 2 K
    # (the abstract's "near" and the grid step).
    T = np.linspace(30.0, 120.0, 181)
    k = defaults.default_model("C").kappa(T)
    assert abs(T[int(np.argmax(k))] - 63.0) <= 2.0


def test_calibration_record_fields():
    cal = defaults.calibration("diamond")
    assert cal.material == "C" and "Inyushkin" in cal.source and cal.table == "reference/diamond_kappa.csv"
    assert cal.model["branches"] == "split" and cal.model["dispersion"] == "sine"
    assert set(defaults.calibrated_names()) >= set(GROUP_IV)


def test_fitting_style_call_still_works():
    # kinetic.fitting.default_model's signature: (material, mechanisms, *, split_branches)
    m = defaults.default_model("Ge", ["boundary", "umklapp", "normal"], split_branches=True)
    assert m.mechanism_names == ("boundary", "umklapp", "normal")
    assert defaults.default_free(defaults.default_model("Si")) == [
        "boundary.length", "point_defect.gamma", "umklapp.gruneisen"]
    with pytest.raises(ParameterError, match="unknown mechanism"):
        defaults.default_model("Si", ["boundary", "magic"])


def test_clear_errors_for_missing_numbers():
    with pytest.raises(ParameterError, match="presets are: .*Si"):
        defaults.default_model("unobtainium")
    user = materials.Material("X", atomic_mass=30.0, volume_per_atom=2e-29, debye_temperature=500.0)
    with pytest.raises(ParameterError, match="no Grüneisen parameter for the Umklapp term: pass gruneisen="):
        defaults.default_model(user)
    m = defaults.default_model(user.with_values(gruneisen=1.5), ["boundary", "umklapp"])
    assert m.mechanism("umklapp").gruneisen == 1.5
    uncalibrated = [n for n in materials.names() if n not in defaults.calibrated_names()]
    for n in uncalibrated:
        with pytest.raises(ParameterError, match="no calibrated model"):
            defaults.default_model(n)


def test_scope_notes():
    assert defaults.scope_notes("Si", temperature=[100.0, 300.0], boundary_length=1e-6) == []
    notes = defaults.scope_notes("Si", temperature=[10.0, 300.0])
    assert len(notes) == 1 and "50 K-1000 K" in notes[0]
    assert "below the smallest size checked" in defaults.scope_notes("Si", boundary_length=20e-9)[0]
    ge = defaults.scope_notes("Ge", boundary_length=50e-9)
    assert "partly from memory" in ge[0]              # kinetic.presets.TABLE_STATUS["Ge"]
    assert "not checked against size-effect" in ge[1]
    assert "alloy fraction" in defaults.scope_notes("Si", alloy_fraction=0.2)[0]
    user = materials.Material("X", atomic_mass=30.0, volume_per_atom=2e-29, debye_temperature=500.0)
    assert "no calibration" in defaults.scope_notes(user)[0]
