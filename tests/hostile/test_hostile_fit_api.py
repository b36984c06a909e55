"""Hostile arguments to the fitting API and fits of awkward data (issue 9).

Each case states its expected outcome: a complete, strict-JSON result with the
stated warnings, or one clear error line naming the argument. Data marked
"invented" are made up for the test (no measurement behind them).
"""
import json
import math

import numpy as np
import pytest

from kinetic import demo
from kinetic.data import Dataset
from kinetic.errors import DataError, FitError, KineticError, ParameterError
from kinetic.fitting import (
    bootstrap,
    default_free,
    default_model,
    fit,
    fit_joint,
    lattice_target,
    predict_band,
    profile_interval,
)


@pytest.fixture(scope="module")
def model():
    return demo.demo_model()


@pytest.fixture(scope="module")
def data():
    return demo.demo_dataset()  # invented demo data


@pytest.fixture(scope="module")
def result(model, data):
    return fit(model, data, list(demo.DEFAULT_FREE), n_starts=1)


FREE = list(demo.DEFAULT_FREE)


def _one_line(exc_info, *words):
    msg = str(exc_info.value)
    assert "\n" not in msg, msg
    for w in words:
        assert w in msg, msg
    return msg


# ------------------------------------------------------------------ arguments at the door
# (id, keyword arguments replacing the good ones, error class, words the message must contain)
BAD_FIT_ARGS = [
    ("free None", {"free": None}, ParameterError, ["free", "list of parameter names"]),
    ("free a string", {"free": "umklapp.gruneisen"}, ParameterError, ["free", "string"]),
    ("free holds a number", {"free": [1]}, ParameterError, ["free", "1"]),
    ("free empty", {"free": []}, ParameterError, ["free", "empty"]),
    ("free unknown name", {"free": ["nope.x"]}, ParameterError, ["nope.x", "valid names"]),
    ("free listed twice", {"free": ["umklapp.gruneisen", "umklapp.gruneisen"]}, ParameterError, ["twice"]),
    ("seed -1", {"seed": -1}, ParameterError, ["seed", "-1"]),
    ("seed 'abc'", {"seed": "abc"}, ParameterError, ["seed", "'abc'"]),
    ("seed 1.5", {"seed": 1.5}, ParameterError, ["seed", "1.5"]),
    ("seed True", {"seed": True}, ParameterError, ["seed", "True"]),
    ("n_starts 0", {"n_starts": 0}, ParameterError, ["n_starts", "0"]),
    ("n_starts '3'", {"n_starts": "3"}, ParameterError, ["n_starts", "'3'"]),
    ("max_nfev 0", {"max_nfev": 0}, ParameterError, ["max_nfev"]),
    ("bounds lower > upper", {"bounds": {"umklapp.gruneisen": (5.0, 1.0)}}, ParameterError,
     ["umklapp.gruneisen", "lower must be below upper"]),
    ("bounds not a pair", {"bounds": {"umklapp.gruneisen": 3.0}}, ParameterError, ["umklapp.gruneisen", "pair"]),
    ("bounds infinite", {"bounds": {"umklapp.gruneisen": (0.5, math.inf)}}, ParameterError, ["finite"]),
    ("bounds for a fixed parameter", {"bounds": {"umklapp.b": (1.0, 5.0)}}, ParameterError,
     ["umklapp.b", "not a free parameter"]),
    ("bounds a list", {"bounds": [(1.0, 2.0)]}, ParameterError, ["bounds", "dict"]),
    ("log bound not positive", {"bounds": {"boundary.length": (0.0, 1e-3)}}, ParameterError, ["> 0"]),
    ("weights unknown", {"weights": "foo"}, ParameterError, ["weights", "'foo'"]),
    ("lorenz_method unknown", {"lorenz_method": "wiedemann"}, ParameterError, ["lorenz_method", "'wiedemann'"]),
    ("electronic unknown", {"electronic": "off"}, ParameterError, ["electronic", "'off'"]),
    ("progress not callable", {"progress": 3}, ParameterError, ["progress", "callable"]),
    ("should_stop not callable", {"should_stop": "yes"}, ParameterError, ["should_stop", "callable"]),
    ("model not a model", {"model": "Si"}, ParameterError, ["model", "LatticeModel"]),
    ("data dict with an unknown key", {"data": {"temperature": [100.0, 200.0, 300.0, 400.0],
                                                "kappa": [3.0, 2.0, 1.5, 1.2], "kapa_err": [0.1] * 4}},
     ParameterError, ["data", "'kapa_err'"]),
    ("data dict without kappa", {"data": {"temperature": [100.0, 200.0]}}, DataError, ["kappa"]),
    ("data a number", {"data": 42}, ParameterError, ["data", "int"]),
    ("data with a negative kappa", {"data": ([100.0, 200.0, 300.0, 400.0], [3.0, -2.0, 1.5, 1.2])}, DataError,
     ["kappa"]),
    ("fewer points than free parameters", {"data": ([100.0, 200.0], [3.0, 2.0])}, FitError,
     ["2 data points", "free parameter"]),
]


@pytest.mark.parametrize("override, exc, words", [c[1:] for c in BAD_FIT_ARGS], ids=[c[0] for c in BAD_FIT_ARGS])
def test_bad_fit_arguments_give_one_line_naming_the_argument(model, data, override, exc, words):
    kw = {"model": model, "data": data, "free": FREE, "n_starts": 1}
    kw.update(override)
    with pytest.raises(exc) as e:
        fit(kw.pop("model"), kw.pop("data"), kw.pop("free"), **kw)
    _one_line(e, *words)


def test_progress_callback_that_raises_is_reported_as_such(model, data):
    def progress(i, n, cost):
        return 1 / 0

    with pytest.raises(FitError) as e:
        fit(model, data, FREE, n_starts=2, progress=progress)
    _one_line(e, "progress callback raised ZeroDivisionError")


def test_should_stop_callback_that_raises_is_reported_as_such(model, data):
    calls = []

    def should_stop():
        calls.append(1)
        if len(calls) > 3:  # fails in the middle of a start, inside the optimiser
            return [][1]  # noqa: PLE0643 -- the callback fails on purpose
        return False

    with pytest.raises(FitError) as e:
        fit(model, data, FREE, n_starts=2, should_stop=should_stop)
    _one_line(e, "should_stop callback raised IndexError")


@pytest.mark.parametrize("kw, words", [
    ({"shared": None}, ["shared", "list of parameter names"]),
    ({"shared": [], "per_sample": []}, ["no free parameters"]),
    ({"datasets": None}, ["datasets"]),
    ({"labels": ["a", "a"]}, ["'a'", "twice"]),
    ({"labels": "ab"}, ["labels"]),
    ({"models": [1, 2]}, ["models", "LatticeModel"]),
], ids=["shared None", "nothing free", "datasets None", "duplicate labels", "labels a string", "models not models"])
def test_bad_joint_fit_arguments(model, kw, words):
    series = demo.demo_series()[:2]
    args = {"models": model, "datasets": series, "shared": ["umklapp.gruneisen"], "per_sample": ["boundary.length"],
            "n_starts": 1}
    args.update(kw)
    with pytest.raises(ParameterError) as e:
        fit_joint(args.pop("models"), args.pop("datasets"), args.pop("shared"), args.pop("per_sample"), **args)
    _one_line(e, *words)


@pytest.mark.parametrize("call, words", [
    (lambda r: r.interval(r.names[0], 1.5), ["level", "1.5"]),
    (lambda r: r.interval("nope"), ["nope", "free"]),
    (lambda r: predict_band(r, [100.0], sample="nope"), ["nope"]),
    (lambda r: predict_band(r, [100.0], level=True), ["level"]),
    (lambda r: bootstrap(r, n=1), ["n", "2"]),
    (lambda r: bootstrap(r, n=3, seed=-5), ["seed"]),
    (lambda r: profile_interval(r, r.names[0], max_steps=0), ["max_steps"]),
], ids=["level 1.5", "unknown interval name", "unknown sample", "level True", "bootstrap n=1",
        "bootstrap seed -5", "profile max_steps 0"])
def test_bad_arguments_after_the_fit(result, call, words):
    with pytest.raises(ParameterError) as e:
        call(result)
    _one_line(e, *words)


# ------------------------------------------------------------------ the electronic choice
def test_electronic_none_fits_the_data_as_given_without_copying(model):
    T = np.array([300.0, 400.0, 500.0, 600.0, 700.0])  # invented total-k data with a resistivity
    ds = Dataset.from_arrays(T, 2.0 * (300.0 / T), resistivity=np.full(5, 1e-4), label="invented")
    auto = lattice_target(ds)
    none = lattice_target(ds, electronic="none")
    assert auto.kappa_electronic is not None and np.all(auto.kappa < ds.kappa)
    assert none.kappa_electronic is None and np.array_equal(none.kappa, ds.kappa)
    assert any("electronic='none'" in n for n in none.notes)
    r = fit(model, ds, ["umklapp.gruneisen"], n_starts=1, electronic="none")
    assert np.array_equal(r.target, ds.kappa) and r.options["electronic"] == "none"


# ------------------------------------------------------------------ awkward data: complete results
def _complete(r):
    """A complete result: strict JSON, a summary, rows for every parameter with an interval or a reason."""
    d = r.to_dict()
    json.dumps(d, allow_nan=False)
    text = r.summary()
    rows = r.report_rows()
    for n in r.names:
        row = next(x for x in rows if x.code_key == n)
        iv = r.interval_info(n)
        if iv.determined:
            assert row.interval is not None and all(math.isfinite(v) and v > 0 or not r.free_parameter(n).log
                                                    for v in row.interval)
        else:
            assert row.interval is None and d["intervals_95"][n] is None and "not determined" in text
    r._repr_html_()
    return d


def test_pbte_total_k_file_300_to_775_k():
    # invented PbTe total k (300-775 K, falling as T^-0.8, no resistivity): the commonest data of the target
    # user; the boundary length runs to its bound (phonon-phonon scattering dominates there)
    T = np.linspace(300.0, 775.0, 20)
    ds = Dataset.from_arrays(T, 2.2 * (300.0 / T) ** 0.8, label="invented PbTe")
    m = default_model("PbTe")
    r = fit(m, ds, default_free(m), n_starts=3)
    d = _complete(r)
    assert "boundary.length" in r.flags.at_bound
    iv = r.interval_info("boundary.length")
    assert not iv.determined and iv.bound == r.free_parameter("boundary.length").upper and "upper bound" in iv.note
    assert d["intervals"]["boundary.length"]["determined"] is False


@pytest.mark.parametrize("kappa, why", [
    (lambda T: 1e-3 * T ** 2, "k rising as T^2"),
    (lambda T: np.full(T.size, 1e-300), "k = 1e-300"),
    (lambda T: np.full(T.size, 1e300), "k = 1e300"),
], ids=["T^2", "1e-300", "1e300"])
def test_data_no_lattice_model_describes_gives_a_flagged_complete_result(kappa, why):
    T = np.geomspace(10.0, 300.0, 12)
    ds = Dataset.from_arrays(T, kappa(T), kind="lattice", label=f"invented: {why}")
    m = default_model("Si")
    r = fit(m, ds, default_free(m), n_starts=2)
    _complete(r)
    assert r.flags.poor_fit and "does not describe" in r.flags.poor_fit
    assert r.flags.poor_fit in r.summary()


def test_fit_at_millikelvin_is_complete_and_strict_json():
    T = np.array([1e-3, 2e-3, 3e-3, 5e-3, 1e-2])  # invented: a Casimir-like T^3 rise at millikelvin
    ds = Dataset.from_arrays(T, 1e-6 * T ** 3 + 1e-9, kind="lattice", label="invented mK")
    m = default_model("Si")
    _complete(fit(m, ds, default_free(m), n_starts=2))


def test_stated_errors_too_small_are_flagged_with_the_test_named(model, data):
    # the demo data with 0.1 % stated errors (invented): the model cannot follow them
    ds = Dataset.from_arrays(data.temperature, data.kappa, kappa_err=1e-3 * data.kappa, kind=data.kind,
                             resistivity=data.resistivity, seebeck=data.seebeck, label="tight errors")
    r = fit(model, ds, FREE, n_starts=1)
    assert r.reduced_chi2 > 3 and r.p_value is not None and r.p_value < 1e-3
    msg = r.flags.poor_fit
    assert "does not describe the data within the stated errors" in msg and "chi-squared goodness-of-fit" in msg
    row = next(x for x in r.report_rows() if x.code_key == "reduced_chi2")
    assert row.note == msg


def test_scatter_shown_with_its_meaning(model, data):
    lattice = Dataset.from_arrays(data.temperature, data.kappa, kind="lattice", label="no errors")
    r = fit(model, lattice, FREE, n_starts=1)
    row = next(x for x in r.report_rows() if x.code_key == "scatter_percent")
    assert r.scatter_estimated and "estimated from the scatter of the residuals" in row.note
    assert "no errors were given" in row.note
    assert row.value == pytest.approx(100 * r.scatter)
    # with stated errors that already cover the scatter: s0 = 0 and the row says why, beside the rms
    loose = Dataset.from_arrays(data.temperature, data.kappa, kappa_err=0.5 * data.kappa, kind=data.kind,
                                resistivity=data.resistivity, seebeck=data.seebeck, label="loose errors")
    r2 = fit(model, loose, FREE, n_starts=1, weights="relative")
    row2 = next(x for x in r2.report_rows() if x.code_key == "scatter_percent")
    assert r2.scatter == 0.0 and "already cover the scatter" in row2.note and "rms residual" in row2.note


def test_no_error_is_anything_but_a_kinetic_error(model, data):
    # a sweep of odd-but-plausible option values: every outcome is a result or a KineticError
    odd = [{"n_starts": 1, "seed": 2**63 - 1}, {"n_starts": 1, "seed": None}, {"n_starts": 1, "max_nfev": 1},
           {"n_starts": 1, "bounds": {"umklapp.gruneisen": (1.499, 1.501)}}]
    for kw in odd:
        try:
            r = fit(model, data, FREE, **kw)
        except KineticError:
            continue
        _complete(r)
