"""The engine's kept temperature grids stay right when the caller reuses its array (kinetic/grid.py)."""
import numpy as np

from kinetic import Boundary, Branch, LatticeModel, Normal, PointDefect, Umklapp, grid


def _model():
    # invented Si-like numbers, for the cache behaviour only
    return LatticeModel([Branch(8400.0, 570.0, 1, name="L"), Branch(5800.0, 400.0, 2, name="T")],
                        [Boundary(5e-3), PointDefect(A=1.3e-45), Umklapp(B=2e-19), Normal(B=1e-24)])


def test_caller_changing_its_array_does_not_change_a_kept_grid():
    grid.clear_cache()
    m = _model()
    T = np.linspace(5.0, 500.0, 40)
    first = m.kappa(T)
    T *= 2.0                      # the caller reuses its array for other temperatures
    m.kappa(T)
    T /= 2.0                      # ... and back: the kept grid of the first call must hold the first temperatures
    grid.clear_cache()
    fresh = m.kappa(T.copy())
    np.testing.assert_array_equal(m.kappa(np.linspace(5.0, 500.0, 40)), fresh)
    np.testing.assert_array_equal(first, fresh)


def test_kept_grid_does_not_alias_the_callers_array():
    grid.clear_cache()
    T = np.linspace(5.0, 500.0, 40)
    g = grid.prepared_grid(T)
    assert not np.shares_memory(g.temperature, T)
    m = _model()
    k = m.kappa(T)
    T[:] = 1.0                    # overwrite the caller's array after the call
    np.testing.assert_array_equal(m.kappa(np.linspace(5.0, 500.0, 40)), k)
    assert g.temperature[0] == 5.0
