"""Size effects of the calibrated Si model against nanowire and thin-film measurements at 300 K.

Numbers and sources are in reference/si_size_effects.csv. A diffuse wire of diameter D has the
Casimir boundary length D (Casimir, Physica 5, 495, 1938). A film is treated with the
Fuchs-Sondheimer suppression of each mean free path (Sondheimer, Adv. Phys. 1, 1, 1952, diffuse
surfaces), applied to the bulk model's mean-free-path spectrum (common practice).
"""
import numpy as np
import pytest
from scipy.special import expn

from kinetic import defaults

#: Li, Wu, Kim, Shi, Yang & Majumdar, Appl. Phys. Lett. 83, 2934 (2003), 300 K, from memory (Fig. 2)
LI_2003 = {115e-9: 40.0, 56e-9: 26.0, 37e-9: 18.0}
#: 30 %: the issue's target; it covers the reading-off of the figure (~10 %) plus the measurement's
#: own error (~10-15 %, suspended-device conductance and diameter).
TOL = 0.30


@pytest.fixture(scope="module")
def si():
    return defaults.default_model("Si")


@pytest.mark.parametrize("diameter", sorted(LI_2003))
def test_si_nanowires_match_li_2003(si, diameter):
    k = float(si.with_params({"boundary.length": diameter}).kappa(300.0))
    assert k == pytest.approx(LI_2003[diameter], rel=TOL)


@pytest.mark.parametrize("diameter", sorted(LI_2003))
def test_si_nanowires_within_the_reading_uncertainty(si, diameter):
    # tighter: within the 15 % that reference/si_size_effects.csv gives for these read-off values
    # (model 36.6 / 24.0 / 18.3 against 40 / 26 / 18 for 115 / 56 / 37 nm)
    k = float(si.with_params({"boundary.length": diameter}).kappa(300.0))
    assert k == pytest.approx(LI_2003[diameter], rel=0.15)


def test_smallest_wire_is_a_known_limitation(si):
    # Li et al.'s 22 nm wire (~8 W/m/K, from memory) lies below any boundary-scattering model; they
    # point to phonon-spectrum modification. The model gives ~12.7: kept visible, not hidden.
    k = float(si.with_params({"boundary.length": 22e-9}).kappa(300.0))
    assert 1.3 * 8.0 < k < 2.0 * 8.0
    assert "below the smallest size checked" in defaults.scope_notes("Si", boundary_length=22e-9)[0]


def _film_kappa(model, thickness):
    s = model.spectral(300.0)
    contrib = np.diff(np.concatenate([[0.0], s.kappa_accumulated]))
    d = thickness / s.mfp
    suppression = 1.0 - 3.0 / (8.0 * d) + 3.0 / (2.0 * d) * (expn(3, d) - expn(5, d))
    return float(np.sum(contrib * suppression))


@pytest.mark.parametrize("thickness,measured", [
    (17.5e-9, 19.0),  # Ferrando-Villalba et al., Nanotechnology 25, 185402 (2014), abstract (checked)
    (20e-9, 22.0),    # Liu & Asheghi, Appl. Phys. Lett. 84, 3819 (2004), from memory
])
def test_si_thin_films_in_plane(si, thickness, measured):
    assert _film_kappa(si, thickness) == pytest.approx(measured, rel=TOL)


def test_film_suppression_limits(si):
    # thick film -> bulk (Fuchs-Sondheimer tends to 1 for d >> mfp)
    assert _film_kappa(si, 1e-2) == pytest.approx(float(si.kappa(300.0)), rel=1e-3)


def test_share_of_heat_in_long_mean_free_paths(si):
    # Published: 40 +- 5 % above 1 um (Minnich et al., PRL 107, 095901, 2011, from memory) and about
    # half (Esfarjani, Chen & Stokes, PRB 84, 085204, 2011, from memory). The model gives 39 %; the
    # band 0.30-0.55 spans both estimates with their stated spread.
    share = float(si.spectral(300.0).fraction_above(1e-6))
    assert 0.30 < share < 0.55


def test_averaged_debye_branch_would_miss_the_size_effect():
    # why the preset uses split zone-edge branches: the averaged Debye branch fits the bulk table as
    # well (rms 5 %) but overestimates the 56 nm wire ~2x and puts only ~13 % above 1 um.
    avg = defaults.default_model("Si", split_branches=False)
    assert float(avg.with_params({"boundary.length": 56e-9}).kappa(300.0)) > 1.5 * LI_2003[56e-9]
    assert float(avg.spectral(300.0).fraction_above(1e-6)) < 0.2
