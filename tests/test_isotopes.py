"""Isotope effects of the calibrated group-IV models (numbers and sources in reference/isotope_effects.csv).

The enriched sample is the natural one's default model with only the point-defect Gamma changed
(same boundary, same anharmonic terms), as in the published comparisons of like-sized crystals.
"""
import numpy as np
import periodictable
import pytest

from kinetic import defaults

T_LOW = np.arange(5.0, 120.0, 0.5)


def _gamma(element, fractions):
    """Klemens' mass-variance Gamma = sum f_i (1 - M_i/M)^2 (masses from periodictable)."""
    el = getattr(periodictable, element)
    f = np.array(list(fractions.values()), dtype=float)
    f = f / f.sum()
    m = np.array([el[a].mass for a in fractions])
    mbar = float(np.sum(f * m))
    return float(np.sum(f * (1.0 - m / mbar) ** 2))


def test_enriched_gammas():
    # computed values used below; natural Si from periodictable is 1.997e-4 (reference notes)
    assert _gamma("Si", {28: 99.983, 29: 0.014, 30: 0.003}) == pytest.approx(3.2e-7, rel=0.05)
    assert _gamma("C", {12: 99.9, 13: 0.1}) == pytest.approx(6.98e-6, rel=0.01)


def _with_gamma(model, gamma):
    pd = model.mechanism("point_defect").with_values(gamma=gamma)
    return model.with_mechanism(pd)


def test_silicon_28_at_room_temperature():
    # Inyushkin et al. (2004): +10 +- 2 % at 300 K for 99.983 % 28Si (Gamma 3.2e-7, computed above
    # with the 29Si/30Si split of the remainder from memory).
    # The Si normal-process form and prefactor were chosen (reference/calibrate_group_iv.py) as the best
    # k(T) fit whose ratio lies inside this band, so this is a consistency check; tolerance = the
    # published +-2 %. The model gives +8.2 %, near the band's lower edge: a stronger normal term moves
    # it up but worsens the Glassbrenner-Slack fit (see reference/README.md).
    nat = defaults.default_model("Si")
    enr = _with_gamma(nat, 3.2e-7)
    assert float(enr.kappa(300.0) / nat.kappa(300.0)) == pytest.approx(1.10, abs=0.02)


def test_silicon_28_at_the_peak():
    # Inyushkin et al. (2004): the peak rises about 7.5x. The peak also depends on each sample's
    # boundary length, which the model takes equal (the natural crystal's); we ask for the published
    # direction and a size within a factor 1.5 (model: ~6.5x; also a selection criterion of the
    # calibration scan, so a consistency check).
    nat = defaults.default_model("Si")
    enr = _with_gamma(nat, 3.2e-7)
    ratio = enr.kappa(T_LOW).max() / nat.kappa(T_LOW).max()
    assert 7.5 / 1.5 < ratio < 7.5 * 1.5


def test_diamond_12c_at_room_temperature():
    # Published: +50 % on removing 13C from 1.1 % to 0.1 % (Wei et al., PRL 70, 3764, 1993; the
    # thesis abstract on osti.gov 7165547 is checked) and ~45 % (Inyushkin et al., PRB 97, 144305,
    # 2018, their Callaway model, abstract checked). Tolerance: +-10 % on the ratio around their mean
    # 1.47, the spread of the two published numbers plus the mirage technique's few per cent. The
    # diamond calibration imposes Inyushkin's 1.45 (reference/calibrate_group_iv.py), so against their
    # number this is a consistency check; against Wei et al.'s measured 1.50 it is an independent one.
    nat = defaults.default_model("C")
    enr = _with_gamma(nat, _gamma("C", {12: 99.9, 13: 0.1}))
    ratio = float(enr.kappa(300.0) / nat.kappa(300.0))
    assert ratio == pytest.approx(1.47, rel=0.10)


def test_germanium_70_against_70_76_at_the_peak():
    # Asen-Palmer et al. (DPG 1997 abstract, checked; PRB 56, 9431, 1997): the maxima of 70Ge
    # (Gamma ~1e-7) and 70Ge0.52 76Ge0.48 (Gamma 1.6e-3) differ 14x. Same boundary for both; 30 %
    # covers the unknown sample sizes (model: ~13x).
    nat = defaults.default_model("Ge")
    pure = _with_gamma(nat, 1e-7)
    mixed = _with_gamma(nat, 1.6e-3)
    ratio = pure.kappa(T_LOW).max() / mixed.kappa(T_LOW).max()
    assert ratio == pytest.approx(14.0, rel=0.30)
    # and in the published direction at room temperature: the enriched crystal conducts better
    assert float(pure.kappa(300.0)) > float(nat.kappa(300.0)) > float(mixed.kappa(300.0))
