"""Conformance of every registered scattering mechanism (driven by kinetic.scattering.MECHANISMS).

A new mechanism class that is registered is checked here automatically: declared
parameters with units, bounds, plain-words descriptions; a plain-words label and a
colour on the class; finite, non-negative rates over the corners of its parameter
box and seeded random points inside it; broadcasting over (T, omega);
with_params / to_dict / from_dict round trips; and "adding a resistive or Normal
mechanism never raises kappa". A deliberately broken mechanism, registered for one
test, is refused by LatticeModel with its name.
"""
import itertools
import math
import re
from dataclasses import dataclass, fields
from typing import ClassVar

import numpy as np
import pytest

from kinetic import Boundary, Branch, LatticeModel, Normal, PointDefect, Umklapp
from kinetic.errors import ModelError, ParameterError
from kinetic.scattering import MECHANISMS, Mechanism, _Spec, mechanism_from_dict, register

KINDS = sorted(MECHANISMS)
BRANCHES = [Branch(8400.0, 570.0, 1, name="L"), Branch(5800.0, 400.0, 2, name="T"),
            Branch(5000.0, 400.0, 3, dispersion="sine", name="S")]
# temperatures 1 mK .. 1e5 K and frequencies up to the zone edge of the stiffest branch (x up to ~1e7)
TEMPS = np.geomspace(1e-3, 1e5, 9)[:, None]
OMEGA = np.geomspace(1e6, BRANCHES[0].omega_max, 40)[None, :]


def _examples():
    return [(kind, i, ex) for kind in KINDS for i, ex in enumerate(MECHANISMS[kind].examples())]


EXAMPLES = _examples()
IDS = [f"{k}-{i}" for k, i, _ in EXAMPLES]


def _valid_range(spec):
    lo, hi = spec.bounds
    if spec.upper_open:
        hi = hi * (1 - 1e-9)
    return lo, hi


def _points(mech, n_random=12, seed=0):
    """Corners of the parameter box of this parameterisation, then seeded random points inside it."""
    names = list(mech.values)
    ranges = [_valid_range(mech._spec[p]) for p in names]
    for corner in itertools.product(*ranges):
        yield dict(zip(names, corner))
    rng = np.random.default_rng(seed)
    for _ in range(n_random):
        pt = {}
        for p, (lo, hi) in zip(names, ranges):
            if mech._spec[p].log and lo > 0:
                pt[p] = float(10 ** rng.uniform(math.log10(lo), math.log10(hi)))
            else:
                pt[p] = float(rng.uniform(lo, hi))
        yield pt


# ------------------------------------------------------------------ declarations
@pytest.mark.parametrize("kind", KINDS)
def test_class_declares_kind_label_colour_and_parameters(kind):
    cls = MECHANISMS[kind]
    assert cls.kind == kind and kind.isidentifier()
    assert isinstance(cls.label, str) and cls.label.strip() and cls.label != kind
    assert re.fullmatch(r"#[0-9a-fA-F]{6}", cls.colour)
    assert cls._spec, "a mechanism declares at least one parameter"
    for pname, spec in cls._spec.items():
        assert isinstance(spec.unit, str)
        assert spec.description.strip()
        lo, hi = spec.bounds
        assert math.isfinite(lo) and math.isfinite(hi) and lo < hi
        assert not spec.log or lo > 0, "a log-scaled parameter needs a positive lower bound"


def test_colours_are_distinct():
    colours = [MECHANISMS[k].colour.lower() for k in KINDS]
    assert len(set(colours)) == len(colours)


@pytest.mark.parametrize("kind, i, mech", EXAMPLES, ids=IDS)
def test_parameters_carry_metadata(kind, i, mech):
    for pname, par in mech.parameters.items():
        assert par.name == pname and par.value == mech.values[pname]
        assert par.label.startswith(par.description)
        assert (f"[{par.unit}]" in par.label) == bool(par.unit)
        lo, hi = par.bounds
        assert lo <= par.value <= hi, f"{kind}.{pname}: the example value must lie inside the bounds"
        assert par.rate_power is None or isinstance(par.rate_power, float)


# ------------------------------------------------------------------ rates
@pytest.mark.parametrize("kind, i, mech", EXAMPLES, ids=IDS)
def test_rates_finite_and_non_negative_over_the_parameter_box(kind, i, mech):
    n = 0
    for pt in _points(mech):
        m = mech.with_values(**pt)
        for b in BRANCHES:
            if b.dispersion == "sine":
                w = np.geomspace(1e6, b.omega_max, 40)[None, :]
            else:
                w = np.minimum(OMEGA, b.omega_max)
            with np.errstate(over="raise", invalid="raise", divide="raise", under="ignore"):  # quiet underflow only
                r = np.broadcast_to(m.rate(w, TEMPS, b), (TEMPS.size, w.size))
            assert np.all(np.isfinite(r)) and np.all(r >= 0), (kind, pt, b.name)
        n += 1
    assert n >= 2 ** len(mech.values)


@pytest.mark.parametrize("kind, i, mech", EXAMPLES, ids=IDS)
def test_rate_broadcasts_over_temperature_and_frequency(kind, i, mech):
    b = BRANCHES[0]
    w = np.array([1e11, 1e12, 1e13])
    T = np.array([[10.0], [300.0]])
    grid = np.broadcast_to(mech.rate(w[None, :], T, b), (2, 3))
    for a in range(2):
        for c in range(3):
            # element by element with scalars: the same number (to round-off of the vectorised powers)
            assert float(np.asarray(mech.rate(w[c], T[a, 0], b))) == pytest.approx(grid[a, c], rel=1e-14)
    # a 1-D frequency array against a scalar temperature keeps the frequency shape (or broadcasts to it)
    assert np.broadcast_to(mech.rate(w, 300.0, b), w.shape).shape == (3,)


# ------------------------------------------------------------------ round trips
@pytest.mark.parametrize("kind, i, mech", EXAMPLES, ids=IDS)
def test_dict_and_with_params_round_trips(kind, i, mech):
    assert mechanism_from_dict(mech.to_dict()) == mech
    renamed = mechanism_from_dict({**mech.to_dict(), "name": "extra"})
    assert renamed.name == "extra" and renamed.values == mech.values
    model = LatticeModel(BRANCHES[:2], [Boundary(1e-3, name="wall"), mech])
    again = LatticeModel.from_dict(model.to_dict())
    assert again == model
    # with_params: move every parameter to a random point of its box and back
    pt = next(itertools.islice(_points(mech, seed=1), 2 ** len(mech.values), None))
    moved = model.with_params({f"{mech.name}.{p}": v for p, v in pt.items()})
    assert moved.mechanism(mech.name).values == pytest.approx(pt)
    back = moved.with_params({f"{mech.name}.{p}": v for p, v in mech.values.items()})
    assert back == model
    assert float(back.kappa(77.0)) == float(model.kappa(77.0))


# ------------------------------------------------------------------ physics
BASE = LatticeModel(BRANCHES[:2], [Boundary(1e-4), PointDefect(A=1.3e-45), Umklapp(B=2e-19)])


@pytest.mark.parametrize("kind, i, mech", EXAMPLES, ids=IDS)
def test_adding_a_mechanism_never_raises_kappa(kind, i, mech):
    # Matthiessen: a resistive rate only shortens tau. A Normal (non-resistive) term added to a
    # model without one: Callaway's kappa <= <1/tau_R> by Cauchy-Schwarz (<tau_c N>^2 <= <tau_c N R>
    # <tau_c N / R>), so it cannot rise either.
    T = np.array([1.0, 20.0, 300.0, 1500.0])
    k0 = BASE.kappa(T)
    for pt in itertools.islice(_points(mech, n_random=6, seed=2), 2 ** len(mech.values), None):
        extra = mechanism_from_dict({**mech.with_values(**pt).to_dict(), "name": "extra"})
        k1 = BASE.with_mechanism(extra).kappa(T)
        assert np.all(np.isfinite(k1)) and np.all(k1 > 0)
        assert np.all(k1 <= k0 * (1 + 1e-9)), (kind, pt)  # 1e-9: round-off between two evaluations


# ------------------------------------------------------------------ the two routes of the engine
def _node_by_node(mech):
    """The same mechanism with its power-law form hidden, so the engine evaluates its rate on every node."""
    cls = type(mech)
    if cls.rate_terms is Mechanism.rate_terms:
        return mech
    opaque = dataclass(frozen=True)(type("Opaque" + cls.__name__, (cls,), {
        "rate_terms": lambda self, branch, T: None,
        "rate": lambda self, omega, T, branch: cls.rate(mech, omega, T, branch),
    }))
    return opaque(**{f.name: getattr(mech, f.name) for f in fields(mech)})


ROUTE_T = np.array([0.5, 3.0, 20.0, 77.0, 300.0, 1500.0])


@pytest.mark.parametrize("kind, i, mech", EXAMPLES, ids=IDS)
def test_power_law_route_matches_node_by_node_evaluation(kind, i, mech):
    # A mechanism that gives rate_terms is summed on Debye branches from per-temperature columns
    # in matrix products; the same model with every rate evaluated on every node (the route of
    # sine branches and of rates that are no power-law sum) must agree to round-off. 1e-11: sums
    # of ~100 positive terms in a different order, and the Jacobian's parameter scaling.
    extra = mechanism_from_dict({**mech.to_dict(), "name": "extra"})
    branches = BRANCHES[:2] + [Branch(7000.0, 500.0, 1, name="L2")]
    for normal in ([], [Normal(B=1e-24)], [Normal(B=1e-24, applies_to=("L",))]):
        fast = LatticeModel(branches, [Boundary(1e-4), PointDefect(A=1.3e-45), Umklapp(B=2e-19), extra, *normal])
        slow = LatticeModel(branches, [_node_by_node(m) for m in fast.scattering])
        for a, b in zip(fast.kappa_parts(ROUTE_T).values(), slow.kappa_parts(ROUTE_T).values()):
            np.testing.assert_allclose(a, b, rtol=1e-11)
        names = [n for n, p in fast.parameter_info().items() if p.rate_power is not None]
        kf, Jf = fast.kappa_jacobian(ROUTE_T, names)
        ks, Js = slow.kappa_jacobian(ROUTE_T, names)
        np.testing.assert_allclose(kf, ks, rtol=1e-11)
        np.testing.assert_allclose(Jf, Js, rtol=1e-9, atol=1e-11 * np.abs(Js).max())


def test_applies_to_on_one_branch_of_a_block():
    # mechanisms that act on one branch only leave the others' rates alone on both routes
    pd_l = PointDefect(A=1e-43, applies_to=("L",))
    m = LatticeModel(BRANCHES[:2], [Boundary(1e-4), Umklapp(B=2e-19), pd_l])
    alone_t = LatticeModel([BRANCHES[1]], [Boundary(1e-4), Umklapp(B=2e-19)])
    alone_l = LatticeModel([BRANCHES[0]], [Boundary(1e-4), Umklapp(B=2e-19), pd_l])
    parts = m.kappa_parts(ROUTE_T)
    np.testing.assert_allclose(parts["T"], alone_t.kappa(ROUTE_T), rtol=1e-12)
    np.testing.assert_allclose(parts["L"], alone_l.kappa(ROUTE_T), rtol=1e-12)


# ------------------------------------------------------------------ broken mechanisms
def _broken(kind_name, value, form="rate"):
    """A mechanism class whose rate is ``value`` above 1e12 rad/s (``form="rate"``) or whose power-law
    coefficient is ``value`` above 100 K (``form="terms"``)."""

    @dataclass(frozen=True)
    class Broken(Mechanism):
        C: float = 1.0
        name: str = kind_name
        applies_to: tuple | None = None

        kind: ClassVar[str] = kind_name
        label: ClassVar[str] = "Deliberately broken (test)"
        colour: ClassVar[str] = "#000000"
        _spec: ClassVar[dict] = {"C": _Spec("", "strength C", (0.1, 10.0))}

    if form == "rate":
        def rate(self, omega, T, branch):
            omega = np.asarray(omega, dtype=float)
            return np.where(omega > 1e12, value, self.C * omega * 1e-3)

        Broken.rate = rate
    else:
        def rate_terms(self, branch, T):
            T = np.asarray(T, dtype=float)
            return ((1.0, np.where(T > 100.0, value, self.C * 1e-3)),)

        Broken.rate_terms = rate_terms
    return Broken


@pytest.mark.parametrize("value, word", [(np.nan, "NaN"), (-1.0, "negative"), (np.inf, "infinite")])
def test_broken_mechanism_is_refused_with_its_name(value, word):
    cls = register(_broken("broken_rate", value))
    try:
        m = BASE.with_mechanism(cls())
        with pytest.raises(ModelError, match=rf"mechanism 'broken_rate' \(Broken\) returned an? {word} scattering rate"):
            m.kappa([10.0, 300.0])
        with pytest.raises(ModelError, match="broken_rate"):
            m.kappa_jacobian([300.0], ["umklapp.B"])
        # a ModelError is a ValueError too, for callers that catch those
        assert issubclass(ModelError, ValueError)
    finally:
        del MECHANISMS["broken_rate"]
    assert "broken_rate" not in MECHANISMS


@pytest.mark.parametrize("value, word", [(np.nan, "NaN"), (-1.0, "negative"), (np.inf, "infinite")])
def test_broken_power_law_coefficients_are_refused_with_their_name(value, word):
    # the power-law route checks coefficients, not nodes; a bad one is still described at a node, by name
    m = BASE.with_mechanism(_broken("broken_terms", value, form="terms")())
    with pytest.raises(ModelError, match=rf"mechanism 'broken_terms' \(Broken\) returned an? {word} scattering "
                                         r"rate .* at omega = .*, T = 300 K on branch 'L'"):
        m.kappa([10.0, 300.0])
    assert np.all(np.isfinite(m.kappa([10.0, 50.0])))


def test_registration_refuses_incomplete_classes():
    bad = _broken("no_label_kind", 1.0)
    bad.label = ""
    with pytest.raises(ParameterError, match="plain-words label"):
        register(bad)
    bad.label = "x"
    bad.colour = "blue"
    with pytest.raises(ParameterError, match="hex colour"):
        register(bad)
    neither = _broken("no_rate_kind", 1.0)
    neither.rate = Mechanism.rate
    with pytest.raises(ParameterError, match=r"needs rate\(omega, T, branch\) or rate_terms"):
        register(neither)
    with pytest.raises(ParameterError, match="already registered"):
        clone = _broken("boundary", 1.0)
        register(clone)
    assert "no_label_kind" not in MECHANISMS and MECHANISMS["boundary"] is Boundary


def test_registry_order_is_the_order_users_see():
    # the workbench's "add mechanism" list and the CLI follow MECHANISMS' order: the common ones first
    assert list(MECHANISMS)[:7] == ["boundary", "point_defect", "umklapp", "normal", "electron_phonon",
                                    "dislocation", "precipitate"]


# ------------------------------------------------------------------ every door reaches every mechanism
@pytest.mark.parametrize("kind", list(MECHANISMS))
def test_every_registered_mechanism_reaches_the_cli_and_the_workbench(kind, capsys):
    # Issue 11: adding a mechanism is one class and its registration. The CLI's --add and the
    # workbench's "add a mechanism" both go through kinetic.defaults.new_mechanism, so a registered
    # kind must be addressable from both without further code.
    from kinetic.cli import main
    from kinetic.defaults import default_model, new_mechanism

    mech = new_mechanism(kind, "Si")
    assert mech.kind == kind
    model = default_model("Si")
    if kind not in model.mechanism_names:
        rc = main(["predict", "--material", "Si", "--add", kind, "--temperatures", "300", "--json"])
        out = capsys.readouterr().out
        assert rc == 0 and '"kappa"' in out
    pytest.importorskip("ipywidgets")
    from widgets import _engine

    assert _engine.new_mechanism(kind, "Si").kind == kind
    assert _engine.mechanism_label(kind) == MECHANISMS[kind].label
    assert _engine.mechanism_colour(kind) == MECHANISMS[kind].colour
