"""Hostile inputs at the engine's doors (issue 9): each case a clear one-line error or a checked value.

Every case names what it feeds and what must come back: an exception class with a
message pattern (one line, naming the argument or mechanism), or a predicate on the
value. No case may produce a traceback from inside numpy, a RuntimeWarning (pytest
turns those into errors), a hang or a silently wrong number.
"""
import warnings
from dataclasses import dataclass
from typing import ClassVar

import numpy as np
import pint
import pytest

from kinetic import Boundary, Branch, LatticeModel, Normal, PointDefect, Umklapp
from kinetic.errors import ModelError, ParameterError
from kinetic.scattering import Mechanism, _Spec

Q = pint.UnitRegistry().Quantity
BR = [Branch(8400.0, 570.0, 1, name="L"), Branch(5800.0, 400.0, 2, name="T")]
M = LatticeModel(BR, [Boundary(1e-3), PointDefect(A=1.3e-45), Umklapp(B=2e-19), Normal(B=1e-24)])
K300 = float(M.kappa(300.0))


def _mech(rate_fn, kind_name="hostile"):
    @dataclass(frozen=True)
    class Hostile(Mechanism):
        C: float = 1.0
        name: str = kind_name
        applies_to: tuple | None = None
        kind: ClassVar[str] = kind_name
        label: ClassVar[str] = "hostile test mechanism"
        _spec: ClassVar[dict] = {"C": _Spec("", "strength", (0.1, 10.0))}

        def rate(self, omega, T, branch):
            return rate_fn(np.asarray(omega, dtype=float), np.asarray(T, dtype=float))

    return Hostile()


def _with(rate_fn):
    return M.with_mechanism(_mech(rate_fn))


# (id, thunk, expected): expected is (exception class, regex) or a predicate on the result
CASES = [
    # --- temperatures
    ("T nan", lambda: M.kappa(float("nan")), (ParameterError, r"temperature must be finite and positive")),
    ("T inf", lambda: M.kappa(float("inf")), (ParameterError, r"temperature must be finite and positive")),
    ("T negative", lambda: M.kappa(-1.0), (ParameterError, r"temperature .* got -1\.0")),
    ("T zero in an array", lambda: M.kappa([300.0, 0.0]), (ParameterError, r"at index 1")),
    ("T None", lambda: M.kappa(None), (ParameterError, r"temperature must be a number")),
    ("T text", lambda: M.kappa("300 K"), (ParameterError, r"temperature must be a number")),
    ("T ragged list", lambda: M.kappa([[1.0, 2.0], [3.0]]), (ParameterError, r"temperature must be a number")),
    ("T empty", lambda: M.kappa([]), lambda k: k.shape == (0,)),
    ("T metres", lambda: M.kappa(Q(3.0, "m")), (ParameterError, r"temperature must be in K \(a temperature\)")),
    ("T seconds", lambda: M.kappa(Q(3.0, "s")), (ParameterError, r"temperature must be in K .*second")),
    ("T below absolute zero", lambda: M.kappa(Q(-300.0, "degC")), (ParameterError, r"temperature must be finite")),
    ("T degC", lambda: M.kappa(Q(26.85, "degC")), lambda k: abs(float(k) / K300 - 1) < 1e-12),
    ("T degF", lambda: M.kappa(Q(80.33, "degF")), lambda k: abs(float(k) / K300 - 1) < 1e-12),
    ("T mK array", lambda: M.kappa(Q(np.array([3e5, 3e5]), "mK")), lambda k: np.allclose(k, K300, rtol=1e-12)),
    ("T float32", lambda: M.kappa(np.float32(300.0)), lambda k: abs(float(k) / K300 - 1) < 1e-12),
    ("T int array", lambda: M.kappa(np.array([300, 300])), lambda k: np.allclose(k, K300, rtol=1e-14)),
    ("T 1e-300 K", lambda: M.kappa(1e-300), lambda k: np.isfinite(k) and 0.0 <= float(k) < 1e-100),
    ("T 1e-3 K", lambda: M.kappa(1e-3), lambda k: 0.0 < float(k) < 1e-3),
    ("T 1e5 K", lambda: M.kappa(1e5), lambda k: 0.0 < float(k) < 1.0),
    ("T 1e300 K", lambda: M.kappa(1e300), (ModelError, r"mechanism 'umklapp' \(Umklapp\) returned an infinite")),
    ("heat capacity metres", lambda: M.heat_capacity(Q(1.0, "m")), (ParameterError, r"temperature must be in K")),
    ("spectral two T", lambda: M.spectral([300.0, 400.0]), (ParameterError, r"single number")),
    ("spectral n_omega 0", lambda: M.spectral(300.0, n_omega=0), (ParameterError, r"n_omega")),
    ("rates negative omega", lambda: M.rates(-1.0, 300.0), (ParameterError, r"omega must be finite and non-negative")),
    ("rates omega in metres", lambda: M.rates(Q(1.0, "m"), 300.0), (ParameterError, r"omega must be in rad/s")),
    # --- parameters and models
    ("length text", lambda: Boundary("abc"), (ParameterError, r"boundary\.length must be a number \[m\]")),
    ("length kelvin", lambda: Boundary(Q(5.0, "K")), (ParameterError, r"boundary\.length must be in m")),
    ("length um", lambda: Boundary(Q(5.0, "um")).length, lambda v: abs(v / 5e-6 - 1) < 1e-15),
    ("length negative via with_params", lambda: M.with_params({"boundary.length": -1.0}),
     (ParameterError, r"boundary\.length must be finite and > 0")),
    ("length nan via with_params", lambda: M.with_params({"boundary.length": float("nan")}),
     (ParameterError, r"boundary\.length must be finite")),
    ("unknown parameter", lambda: M.with_params({"boundary.size": 1.0}), (ParameterError, r"unknown parameter")),
    ("jacobian unknown name", lambda: M.kappa_jacobian([300.0], ["nope"]), (ParameterError, r"unknown parameter")),
    ("jacobian one name as text", lambda: M.kappa_jacobian([300.0], "umklapp.B")[1].shape,
     lambda s: s == (1, 1)),
    ("no branches", lambda: LatticeModel([], [Boundary(1e-3)]), (ParameterError, r"at least one Branch")),
    ("only normal", lambda: LatticeModel(BR, [Normal(1e-24)]), (ParameterError, r"no resistive scattering")),
    ("not a mechanism", lambda: LatticeModel(BR, ["boundary"]), (ParameterError, r"mechanism objects")),
    ("dict unknown kind", lambda: LatticeModel.from_dict({**M.to_dict(), "scattering": [{"kind": "magic"}]}),
     (ParameterError, r"unknown mechanism kind 'magic'")),
    ("dict bad value", lambda: LatticeModel.from_dict(
        {**M.to_dict(), "scattering": [{"kind": "boundary", "values": {"length": "x"}}]}),
     (ParameterError, r"boundary\.length must be a number")),
    ("no boundary at 1 K", lambda: M.without("boundary").kappa(1.0),
     (ModelError, r"mean free paths beyond 1 m.*add a boundary term")),
    # --- mechanisms that misbehave
    ("rate NaN", lambda: _with(lambda w, T: w * np.nan).kappa(300.0),
     (ModelError, r"mechanism 'hostile' \(Hostile\) returned a NaN scattering rate")),
    ("rate negative", lambda: _with(lambda w, T: -w).kappa(300.0),
     (ModelError, r"mechanism 'hostile' \(Hostile\) returned a negative scattering rate")),
    ("rate overflow", lambda: _with(lambda w, T: np.exp(w)).kappa(300.0),
     (ModelError, r"mechanism 'hostile' \(Hostile\) returned an infinite scattering rate")),
    ("rate 0/0", lambda: _with(lambda w, T: (w - w) / (w - w)).kappa(300.0),
     (ModelError, r"returned a NaN scattering rate")),
    ("rate wrong shape", lambda: _with(lambda w, T: np.ones(7)).kappa([300.0, 400.0]),
     (ModelError, r"mechanism 'hostile' \(Hostile\) returned rates of shape \(7,\)")),
    ("rate raises", lambda: _with(lambda w, T: 1 / 0).kappa(300.0),
     (ModelError, r"mechanism 'hostile' \(Hostile\) failed on branch 'L': ZeroDivisionError")),
    ("rate text", lambda: _with(lambda w, T: "fast").kappa(300.0),
     (ModelError, r"mechanism 'hostile' \(Hostile\) failed .*ValueError")),
]


@pytest.mark.parametrize("name, thunk, expected", CASES, ids=[c[0] for c in CASES])
def test_hostile_engine_input(name, thunk, expected):
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # no RuntimeWarning or any other warning on the way
        if isinstance(expected, tuple):
            exc, pattern = expected
            with pytest.raises(exc, match=pattern) as info:
                thunk()
            assert "\n" not in str(info.value), "errors are one line"
        else:
            assert expected(thunk()), name


def test_corpus_size():
    assert len(CASES) >= 40
