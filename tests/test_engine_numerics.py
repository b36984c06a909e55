"""Engine numerics: analytic Jacobian, prepared-grid cache, units at the door, refusals, extremes."""
import threading
import warnings

import numpy as np
import pint
import pytest

from kinetic import (Boundary, Branch, Dislocation, ElectronPhonon, LatticeModel, Normal, ParameterError,
                     PointDefect, Precipitate, Umklapp, lattice)
from kinetic.checks import kappa_adaptive
from kinetic.errors import ModelError
from kinetic.quantities import to_si

Q = pint.UnitRegistry().Quantity


def _model(dispersion="debye", normal=True, **kw):
    L = Branch(8400.0, 570.0, 1, dispersion=dispersion, name="L")
    T = Branch(5800.0, 400.0, 2, dispersion=dispersion, name="T")
    mech = [Boundary(5e-3, specularity=0.2), PointDefect.from_gamma(2e-4, 2e-29), Umklapp(B=2e-19),
            Normal(B=1e-24)]
    return LatticeModel([L, T], mech, normal_correction=normal, **kw)


def _fd(model, T, name, rel=1e-6):
    """Central difference of kappa in the parameter's natural unit (step rel * value)."""
    v = model.params[name]
    h = rel * v if v else rel
    return (model.with_params({name: v + h}).kappa(T) - model.with_params({name: v - h}).kappa(T)) / (2 * h)


# ------------------------------------------------------------------ Jacobian
@pytest.mark.parametrize("dispersion", ["debye", "sine"])
@pytest.mark.parametrize("normal", [True, False])
def test_jacobian_matches_finite_differences(dispersion, normal):
    m = _model(dispersion, normal)
    T = np.array([0.5, 5.0, 40.0, 300.0, 1500.0])
    names = list(m.params)
    k, J = m.kappa_jacobian(T, names)
    np.testing.assert_array_equal(k, m.kappa(T))
    assert J.shape == (T.size, len(names))
    for j, n in enumerate(names):
        fd = _fd(m, T, n)
        # central difference with step 1e-6 relative: truncation ~1e-12, round-off ~1e-16/1e-6 = 1e-10
        # of kappa; 1e-6 of the column's largest entry leaves room for the quadrature's tail estimate,
        # which is differentiated separately from the integral (both ~1e-8 accurate).
        np.testing.assert_allclose(J[:, j], fd, rtol=1e-6, atol=1e-6 * np.max(np.abs(fd)), err_msg=n)


def test_jacobian_power_law_parameters_are_exact_and_others_fall_back():
    m = LatticeModel([Branch(6000.0, 640.0)],
                     [Boundary(1e-4), Umklapp(gruneisen=1.2, atomic_mass=4.66e-26), ElectronPhonon(C=1e-5),
                      Dislocation(density=1e13), Precipitate(number_density=1e22), Normal(B=1e-24)])
    info = m.parameter_info()
    assert info["boundary.length"].rate_power == -1.0 and info["umklapp.gruneisen"].rate_power == 2.0
    assert info["umklapp.B" if "umklapp.B" in info else "umklapp.atomic_mass"].rate_power == -1.0
    assert info["umklapp.b"].rate_power is None and info["precipitate.radius"].rate_power is None
    assert info["electron_phonon.C"].linear and not info["boundary.length"].linear
    T = np.array([10.0, 100.0, 700.0])
    names = ["boundary.length", "umklapp.gruneisen", "umklapp.atomic_mass", "umklapp.b",
             "electron_phonon.C", "dislocation.density", "precipitate.number_density", "precipitate.radius",
             "normal.B"]
    _, J = m.kappa_jacobian(T, names)
    for j, n in enumerate(names):
        fd = _fd(m, T, n)
        np.testing.assert_allclose(J[:, j], fd, rtol=1e-6, atol=1e-6 * np.max(np.abs(fd)), err_msg=n)


def test_jacobian_at_a_bound_steps_inward_and_names_unknown_parameters():
    m = _model().with_params({"boundary.specularity": 0.0})
    T = np.array([5.0, 50.0])
    _, J = m.kappa_jacobian(T, ["boundary.specularity"])
    # one-sided difference at p = 0 (its lower bound): kappa grows with specularity (longer L_eff)
    fwd = (m.with_params({"boundary.specularity": 1e-6}).kappa(T) - m.kappa(T)) / 1e-6
    np.testing.assert_allclose(J[:, 0], fwd, rtol=1e-4)  # forward difference: O(h) truncation
    assert np.all(J[:, 0] > 0)
    with pytest.raises(ParameterError, match="unknown parameter 'umklapp.C'"):
        m.kappa_jacobian(T, ["umklapp.C"])


def test_jacobian_shape_follows_temperature():
    m = _model()
    k, J = m.kappa_jacobian(np.array([[10.0, 100.0], [300.0, 1000.0]]), ["point_defect.gamma", "normal.B"])
    assert k.shape == (2, 2) and J.shape == (2, 2, 2)


# ------------------------------------------------------------------ prepared grids
def test_cached_results_equal_fresh_ones():
    m = _model()
    T = np.geomspace(1.0, 2000.0, 57)
    lattice.clear_cache()
    cold = m.kappa(T)
    warm = m.kappa(T)
    np.testing.assert_array_equal(cold, warm)
    # a slider move and back: identical numbers to a fresh evaluation
    moved = m.with_params({"umklapp.B": 3e-19})
    k_moved = moved.kappa(T)
    lattice.clear_cache()
    np.testing.assert_array_equal(moved.kappa(T), k_moved)
    np.testing.assert_array_equal(m.kappa(T), cold)
    # the grid object itself can be passed
    g = lattice.prepared_grid(T)
    np.testing.assert_array_equal(m.kappa(g), cold)


def test_large_arrays_are_done_in_blocks_with_the_same_numbers():
    m = _model()
    T = np.geomspace(1.0, 2000.0, lattice.BLOCK_T + 37)
    k = m.kappa(T)
    np.testing.assert_allclose(k[::500], m.kappa(T[::500]), rtol=1e-14)
    k2, J = m.kappa_jacobian(T, ["point_defect.gamma"])
    np.testing.assert_array_equal(k2, k)
    assert J.shape == (T.size, 1)


def test_threads_sharing_a_grid_get_their_own_scratch():
    m = _model()
    T = np.linspace(5.0, 900.0, 300)
    models = [m.with_params({"umklapp.B": b}) for b in np.geomspace(1e-19, 1e-18, 6)]
    expected = [mm.kappa(T) for mm in models]
    out = {}

    def work(i):
        for _ in range(20):
            out[i] = models[i].kappa(T)
            if not np.array_equal(out[i], expected[i]):
                out[i] = None
                return

    threads = [threading.Thread(target=work, args=(i,)) for i in range(len(models))]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    for i in range(len(models)):
        assert out[i] is not None, f"thread {i} saw another thread's numbers"


def test_faster_grid_keeps_accuracy_on_the_benchmark_case():
    # the 91-node rule: issue requirement <= 1e-6 against adaptive quadrature (scipy quad, epsrel 1e-10)
    m = _model()
    T = np.array([2.0, 11.0, 60.0, 250.0, 1000.0])
    np.testing.assert_allclose(m.kappa(T), kappa_adaptive(m, T), rtol=1e-6)


# ------------------------------------------------------------------ units at the door
def test_temperature_quantities_are_converted():
    m = _model()
    k300 = float(m.kappa(300.0))
    # 26.85 degC is 300 K (offset unit converted as an absolute temperature)
    assert float(m.kappa(Q(26.85, "degC"))) == pytest.approx(k300, rel=1e-12)
    assert float(m.kappa(Q(300000.0, "mK"))) == pytest.approx(k300, rel=1e-12)
    np.testing.assert_allclose(m.kappa(Q(np.array([300.0, 540.0]), "degR")), m.kappa([300.0 / 1.8, 300.0]),
                               rtol=1e-12)
    assert m.heat_capacity(Q(26.85, "degC")) == pytest.approx(m.heat_capacity(300.0), rel=1e-12)
    assert m.spectral(Q(300.0, "K")).kappa == pytest.approx(k300, rel=1e-12)
    assert m.kappa_parts(Q(300.0, "K"))["L"] == pytest.approx(m.kappa_parts(300.0)["L"], rel=1e-12)
    r = m.rates(Q(1e13, "rad/s"), Q(26.85, "degC"))
    assert r["L"]["umklapp"] == pytest.approx(m.rates(1e13, 300.0)["L"]["umklapp"], rel=1e-12)
    k, _ = m.kappa_jacobian(Q([300.0], "K"), ["normal.B"])
    assert k[0] == pytest.approx(k300, rel=1e-12)


def test_silicon_default_model_at_room_temperature_in_celsius():
    # issue 9: Q(26.85, 'degC') gave the value at 26.85 K (175.7) instead of 300 K (146.6 W/m/K)
    from kinetic.fitting import default_model
    si = default_model("Si")
    # (the value itself belongs to the preset's calibration and may move; the door must not)
    k = float(si.kappa(Q(26.85, "degC")))
    assert k == pytest.approx(float(si.kappa(300.0)), rel=1e-12)
    assert k != pytest.approx(float(si.kappa(26.85)), rel=1e-3)


@pytest.mark.parametrize("value, match", [
    (Q(3.0, "m"), r"temperature must be in K \(a temperature\), got 3.0 meter \(a length\)"),
    (Q(-300.0, "degC"), "temperature must be finite and positive"),
    (Q(0.0, "K"), "temperature must be finite and positive"),
])
def test_wrong_temperatures_are_refused_naming_the_argument(value, match):
    with pytest.raises(ParameterError, match=match):
        _model().kappa(value)


def test_mechanism_lengths_accept_quantities():
    assert Boundary(Q(5.0, "um")).length == pytest.approx(5e-6, rel=1e-15)
    assert Precipitate(radius=Q(2.0, "nm")).radius == pytest.approx(2e-9, rel=1e-15)
    assert Boundary(1e-3).with_values(length=Q(2.0, "mm")).length == pytest.approx(2e-3, rel=1e-15)
    with pytest.raises(ParameterError, match=r"boundary\.length must be in m \(a length\), got 5.0 kelvin"):
        Boundary(Q(5.0, "K"))
    with pytest.raises(ParameterError, match="omega must be in rad/s"):
        _model().rates(Q(1.0, "m"), 300.0)
    assert to_si(2.0, "K", "x") == 2.0  # plain numbers pass through unchanged


# ------------------------------------------------------------------ refusals
def test_model_without_boundary_is_refused_where_it_diverges():
    # No boundary: at 1 K the engine used to return 8.3e12 W/m/K silently (issue 9). With Umklapp
    # frozen out (exp(-theta/3T)), only omega^4 point-defect scattering remains, and the heat would be
    # carried by phonons with mean free paths of kilometres.
    m = LatticeModel(_model().branches, [PointDefect(A=1.3e-45), Umklapp(B=2e-19)])
    with pytest.raises(ModelError, match=r"branch 'L' at T = 1 K: .*mean free paths beyond 1 m.*add a boundary "
                                         r"term, e\.g\. Boundary\(length=1e-3\)"):
        m.kappa(1.0)
    # where Umklapp bounds the mean free paths (< 1 % of the heat beyond 1 m) the number stands
    assert 100.0 < float(m.kappa(300.0)) < 200.0
    assert np.isfinite(m.with_mechanism(Boundary(1e-3)).kappa(1.0))


def test_no_runtime_warnings_at_extreme_temperatures():
    m = _model()
    s = _model("sine")
    T = np.array([1e-3, 1e-2, 1e5])
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        for model in (m, s):
            k = model.kappa(T)
            _, J = model.kappa_jacobian(T, list(model.params))
            c = model.heat_capacity(T)
            sp = model.spectral(1e-3), model.spectral(1e5)
            assert np.all(np.isfinite(k)) and np.all(k > 0) and np.all(np.isfinite(J)) and np.all(c > 0)
            assert all(np.isfinite(x.kappa) for x in sp)


def test_planck_weight_on_debye_nodes_matches_mpmath():
    # The Debye block's Planck weight takes the Taylor series (exact Bernoulli coefficients) on the
    # low-frequency node columns and ((x/2)/sinh(x/2))^2 above; both against x^2 e^x / (e^x - 1)^2 at
    # 40 digits. 4e-15: a few roundings of a ~1 quantity (the series) or of sinh (numpy's own ulp-level
    # accuracy), far below the rule's 1e-8.
    import mpmath

    from kinetic import grid
    from kinetic import quadrature as quad

    a = grid._planck_series_coefficients(8)
    e = quad._RULES["debye"][2]
    X = np.array([46.0, 30.0, 5.0, 1.0, 0.3, 0.05, 1e-4])
    P = grid._planck_debye(X, "debye")
    x = X[:, None] * e[None, :]
    with mpmath.workdps(40):
        exact = [(1 - 2 * k) * mpmath.bernoulli(2 * k) / mpmath.factorial(2 * k) for k in range(8)]
        ref = np.array([[float(v * v * mpmath.exp(v) / mpmath.expm1(v) ** 2) for v in map(mpmath.mpf, row)]
                        for row in x])
    assert [float(c) for c in exact] == pytest.approx(list(a), rel=1e-15)
    np.testing.assert_allclose(P, ref, rtol=4e-15)
    # both forms are used: at X = 46 the series covers the columns with x <= 0.2, sinh the rest
    assert 0 < np.sum(x[0] <= grid.PLANCK_SERIES_X) < e.size


def test_every_engine_door_takes_temperatures_the_same_way():
    # kappa, kappa_parts and kappa_jacobian share one temperature door: a kept grid object, a plain
    # array and an array longer than BLOCK_T (done on fresh grids, block by block) give the same numbers
    m = _model()
    T = np.geomspace(1.0, 2000.0, 40)
    g = lattice.prepared_grid(T)
    names = ["umklapp.B", "boundary.length"]
    k_g, J_g = m.kappa_jacobian(g, names)
    k_a, J_a = m.kappa_jacobian(T, names)
    np.testing.assert_array_equal(k_g, k_a)
    np.testing.assert_array_equal(J_g, J_a)
    np.testing.assert_array_equal(m.kappa(g), k_a)
    long = np.tile(T, lattice.BLOCK_T // T.size + 1)
    k_long, J_long = m.kappa_jacobian(long, names)
    assert J_long.shape == (long.size, 2)
    # 1e-12: the same sums on grids of other lengths (matrix products may group additions differently)
    np.testing.assert_allclose(k_long[:T.size], k_a, rtol=1e-12)
    np.testing.assert_allclose(J_long[-T.size:], J_a, rtol=1e-12)
    np.testing.assert_allclose(sum(m.kappa_parts(long).values()), m.kappa(long), rtol=1e-12)
