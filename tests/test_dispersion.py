"""Phonon branches: mode counting, Dulong-Petit and Debye limits for every preset.

Closed-form limits (no fitted numbers): Dulong & Petit's 3 n kB per volume at
T >> theta, and Debye's low-temperature law C = (12 pi^4 / 5) n kB (T / theta)^3
(Debye, Ann. Phys. 39, 789, 1912); kB and hbar from scipy.constants (CODATA).
"""
import numpy as np
import pytest
from scipy.constants import hbar
from scipy.constants import k as kB
from scipy.integrate import quad

from kinetic import materials
from kinetic.dispersion import Branch
from kinetic.errors import ParameterError
from kinetic.lattice import LatticeModel
from kinetic.scattering import Boundary


def _forms(mat):
    forms = [{"split": False, "dispersion": "debye"}, {"split": False, "dispersion": "sine"}]
    if mat.has_split_velocities:
        forms += [{"split": True, "dispersion": "debye"}, {"split": True, "dispersion": "sine"}]
    if mat.has_zone_edges:
        forms.append({"split": True, "dispersion": "sine", "zone_edge": True})
    return forms


def _cases():
    # every preset, so presets added by others are covered too
    return [(name, i) for name in materials.names() for i in range(len(_forms(materials.get(name))))]


@pytest.mark.parametrize("name,i", _cases())
def test_every_preset_holds_three_modes_per_atom_and_reaches_dulong_petit(name, i):
    mat = materials.get(name)
    form = _forms(mat)[i]
    branches = mat.branches(**form)
    # Debye's counting: the branches hold 3 modes per atom (exact up to rounding of q_D)
    modes = sum(b.mode_density for b in branches)
    assert modes == pytest.approx(3.0 * mat.number_density, rel=1e-9)
    model = LatticeModel(branches, [Boundary(1e-3)])
    theta = max(b.debye_temperature for b in branches)
    T = 200.0 * theta
    # Dulong-Petit: 3 n kB; the Debye correction at x = theta/T = 0.005 is 1 - x^2/20 ~ 1e-6, and
    # the engine's quadrature is good to ~1e-6, so 1e-4 is a safe bound.
    C = float(model.heat_capacity(T))
    assert C == pytest.approx(3.0 * mat.number_density * kB, rel=1e-4)


@pytest.mark.parametrize("dispersion", ["debye", "sine"])
def test_debye_t_cubed_limit(dispersion):
    # Si averaged branch: C -> (12 pi^4/5) n kB (T/theta)^3 for T << theta; a sine branch has the
    # same slope at q -> 0 and the same Debye sphere, so the same limit. At T = theta/1000 the
    # dispersion's curvature changes C by ~1e-4 (x_typical ~ 4 -> u ~ 0.006); tolerance 1e-3.
    mat = materials.get("Si")
    (branch,) = mat.branches(dispersion=dispersion)
    model = LatticeModel([branch], [Boundary(1e-3)])
    theta = branch.debye_temperature  # hbar v_D q_D / kB
    T = theta / 1000.0
    expected = 12.0 * np.pi**4 / 5.0 * mat.number_density * kB * (T / theta) ** 3
    assert float(model.heat_capacity(T)) == pytest.approx(expected, rel=1e-3)


def test_branch_example_and_sine_shape():
    b = Branch(5000.0, 400.0)
    assert b.omega_max == pytest.approx(kB * 400.0 / hbar, rel=1e-14)  # 5.2368e13 rad/s
    s = Branch(5000.0, 400.0, dispersion="sine")
    # same Debye sphere: q_max = kB theta / (hbar v0)
    assert s.q_max == pytest.approx(kB * 400.0 / (hbar * 5000.0), rel=1e-14)
    # slope at q -> 0 is v0, and zero group velocity at the zone edge
    u = 1e-6
    assert s.omega_of_u(u) / (u * s.q_max) == pytest.approx(5000.0, rel=1e-9)
    assert s.group_velocity_of_u(1.0) == pytest.approx(0.0, abs=1e-9)
    assert s.omega_max == pytest.approx(2.0 / np.pi * b.omega_max, rel=1e-14)


def test_zone_edge_branch_keeps_frequency_and_sphere():
    # Nilsson & Nelin (1972) Si TA zone edge ~4 THz (preset value, from memory)
    si = materials.get("Si")
    L, T = si.branches(split=True, dispersion="sine", zone_edge=True)
    assert T.zone_edge_frequency == pytest.approx(si.zone_edge_transverse, rel=1e-12)
    assert L.zone_edge_frequency == pytest.approx(si.zone_edge_longitudinal, rel=1e-12)
    assert T.q_max == pytest.approx(si.q_debye, rel=1e-12) and L.q_max == pytest.approx(si.q_debye, rel=1e-12)
    with pytest.raises(ParameterError, match="zone_edge"):
        si.branches(split=False, zone_edge=True)


def test_sine_heat_capacity_matches_adaptive_quadrature():
    # C = p kB / (2 pi^2) int_0^q_max x^2 e^x/(e^x-1)^2 q^2 dq, x = hbar omega(q)/(kB T), checked with
    # scipy.integrate.quad (independent of the engine's quadrature); rtol 1e-6.
    b = Branch.from_zone_edge(4.0e12, 1.436e10, 2, name="T")
    model = LatticeModel([b], [Boundary(1e-3)])
    for T in (10.0, 77.0, 300.0):
        def f(q, T=T):
            x = hbar * b.omega_of_u(q / b.q_max) / (kB * T)
            return x * x * np.exp(-x) / (1.0 - np.exp(-x)) ** 2 * q * q if x > 0 else q * q
        val, _ = quad(f, 0.0, b.q_max, epsabs=0, epsrel=1e-10, limit=200)
        expected = b.polarizations * kB / (2.0 * np.pi**2) * val
        assert float(model.heat_capacity(T)) == pytest.approx(expected, rel=1e-6)
