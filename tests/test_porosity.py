"""Effective-medium porosity relations: closed-form limits, bounds and a worked value."""
from __future__ import annotations

import numpy as np
import pytest
from scipy import optimize

from kinetic import porosity as po
from kinetic.errors import ParameterError

PHI = np.linspace(0.0, 0.6, 13)


@pytest.mark.parametrize("relation", sorted(po.RELATIONS))
def test_no_pores_gives_the_solid(relation):
    # closed-form limit phi -> 0: k = k0
    assert float(po.ratio(relation, 0.0)) == 1.0


@pytest.mark.parametrize("relation,slope", [("maxwell-eucken", -1.5), ("landauer", -1.5),
                                            ("dem", -1.5), ("loeb", -1.0)])
def test_dilute_slope(relation, slope):
    # closed-form dilute limit: Maxwell's result for a few insulating spheres is
    # k = k0 (1 - 3 phi / 2) to first order (Maxwell 1873, Art. 314); every sphere-based
    # relation shares it; Loeb's shape factor 1 gives -1
    h = 1e-6
    assert (float(po.ratio(relation, h)) - 1.0) / h == pytest.approx(slope, rel=1e-5)


def test_maxwell_eucken_bounds_enclose_the_effective_medium():
    # Hashin & Shtrikman (1962): for k_p < k_s the two Maxwell-Eucken forms are the upper
    # and lower bounds; Carson et al. (2005) place Landauer's EMT between them
    ks = 10.0
    for kp in (0.0, 0.026, 1.0, 5.0):
        up = po.maxwell_eucken_upper(ks, kp, PHI)
        lo = po.maxwell_eucken_lower(ks, kp, PHI)
        emt = po.bruggeman_landauer(ks, kp, PHI)
        assert np.all(lo <= emt + 1e-12) and np.all(emt <= up + 1e-12)
    # insulating pores: the lower bound (pores continuous) conducts nothing
    np.testing.assert_array_equal(po.maxwell_eucken_lower(ks, 0.0, PHI[1:]), 0.0)


def test_phases_swapped_and_equal_phases():
    # swapping the phases of the upper form gives the lower form (closed form)
    ks, kp, phi = 10.0, 2.0, 0.3
    assert po.maxwell_eucken_lower(ks, kp, phi) == pytest.approx(
        po.maxwell_eucken_upper(kp, ks, 1 - phi), rel=1e-12)
    # two identical phases: every relation returns that conductivity
    for f in (po.maxwell_eucken_upper, po.maxwell_eucken_lower, po.bruggeman_landauer):
        np.testing.assert_allclose(f(3.0, 3.0, PHI), 3.0, rtol=1e-12)


def test_landauer_solves_its_equation_and_percolates_at_two_thirds():
    ks = 10.0
    for kp in (0.0, 0.5, 3.0):
        for phi in (0.1, 0.4, 0.6):
            k = float(po.bruggeman_landauer(ks, kp, phi))
            # the defining equation of Landauer (1952), solved independently by brentq
            g = lambda x: (1 - phi) * (ks - x) / (ks + 2 * x) + phi * (kp - x) / (kp + 2 * x)
            ref = optimize.brentq(g, max(kp, 1e-12), ks) if phi < 2 / 3 or kp > 0 else 0.0
            assert k == pytest.approx(ref, rel=1e-9)
    # insulating pores: conduction vanishes at the percolation threshold phi = 2/3
    assert float(po.bruggeman_landauer(ks, 0.0, 2 / 3)) == pytest.approx(0.0, abs=1e-12)
    assert float(po.bruggeman_landauer(ks, 0.0, 0.66)) > 0
    assert float(po.bruggeman_landauer(ks, 0.0, 0.8)) == 0.0


def test_worked_values():
    # computed (not taken from a paper) from the published formulas at phi = 0.1:
    # Maxwell-Eucken 2 x 0.9 / 2.1; Landauer 1 - 0.15; DEM 0.9^1.5; Loeb 0.9
    assert float(po.ratio("maxwell-eucken", 0.1)) == pytest.approx(0.857142857, rel=1e-9)
    assert float(po.ratio("landauer", 0.1)) == pytest.approx(0.85, rel=1e-12)
    assert float(po.ratio("dem", 0.1)) == pytest.approx(0.853814968, rel=1e-9)
    assert float(po.ratio("loeb", 0.1)) == pytest.approx(0.9, rel=1e-12)


def test_full_density_correction_round_trip_and_spread():
    k0 = np.array([5.0, 4.0, 3.0])
    for relation in po.RELATIONS:
        pellet = k0 * po.ratio(relation, 0.08)
        k_full, spread = po.full_density_kappa(pellet, 0.92, relation=relation)
        np.testing.assert_allclose(k_full, k0, rtol=1e-12)
        # the spread is the largest distance to another relation's correction
        others = [pellet / po.ratio(r, 0.08) for r in po.RELATIONS if r != relation]
        np.testing.assert_allclose(spread, np.max(np.abs(np.array(others) - k_full), axis=0))
    k_full, spread = po.full_density_kappa(k0, 1.0)
    np.testing.assert_array_equal(k_full, k0)
    np.testing.assert_array_equal(spread, 0.0)


@pytest.mark.parametrize("d", [0.0, -0.1, 1.2, float("nan")])
def test_relative_density_outside_range_refused(d):
    with pytest.raises(ParameterError, match=r"relative_density must be in \(0, 1\]"):
        po.full_density_kappa(1.0, d)


def test_relation_where_no_conduction_is_refused():
    with pytest.raises(ParameterError, match="landauer"):
        po.full_density_kappa(1.0, 0.3, relation="landauer")
    with pytest.raises(ParameterError, match="one of"):
        po.full_density_kappa(1.0, 0.9, relation="parallel")
    assert po.outside_validity("maxwell-eucken", 0.8) and not po.outside_validity("dem", 0.8)
