"""Hostile inputs at the electronic door (kinetic.conductivity and kinetic.electronic).

Each case is either a one-line ParameterError (or DataError) whose message names the
argument at fault, or a correct value checked against a closed form.
"""
from __future__ import annotations

import math

import numpy as np
import pint
import pytest
import scipy.constants as sc

from kinetic import Boundary, Branch, LatticeModel
from kinetic.conductivity import BipolarTerm, ConductivityModel, ElectronicTerm, lattice_target
from kinetic.data import Dataset
from kinetic.electronic import electronic_kappa, lorenz_spb
from kinetic.errors import DataError, ParameterError

Q = pint.UnitRegistry().Quantity
L0 = math.pi ** 2 / 3.0 * (sc.k / sc.e) ** 2       # Sommerfeld value from CODATA constants (closed form)
T2 = [100.0, 600.0]


def lattice():
    return LatticeModel([Branch(5000.0, 400.0)], [Boundary(1e-6)])


def term(**kw):
    args = dict(temperature=T2, lorenz="sommerfeld")
    args.update(kw)
    rho = args.pop("resistivity", [1e-5, 3e-5])
    return ElectronicTerm(rho, **args)


def data_with_rho():
    return Dataset.from_arrays([100.0, 200.0], [5.0, 4.0], resistivity=[1e-5, 2e-5], label="s")


#: (case id, action, error class, words the one-line message must contain)
REFUSED = [
    ("negative resistivity", lambda: term(resistivity=[1e-5, -3e-5]), ParameterError, "resistivity"),
    ("zero resistivity", lambda: term(resistivity=[0.0, 3e-5]), ParameterError, "resistivity"),
    ("NaN resistivity", lambda: term(resistivity=[np.nan, 3e-5]), ParameterError, "resistivity"),
    ("NaN Seebeck", lambda: term(seebeck=[1e-4, np.nan]), ParameterError, "seebeck"),
    ("infinite Seebeck from a callable", lambda: ElectronicTerm(lambda T: 1e-5, seebeck=lambda T: np.inf,
                                                                lorenz="band").kappa(300.0),
     ParameterError, "seebeck(T)"),
    ("unknown Lorenz method", lambda: term(lorenz="lorentz"), ParameterError, "lorenz"),
    ("Lorenz method not a string or number", lambda: term(lorenz=[2.44e-8]), ParameterError, "lorenz"),
    ("Lorenz number in units of 1e-8", lambda: term(lorenz=2.44), ParameterError, "lorenz"),
    ("Lorenz number far too small", lambda: term(lorenz=1e-10), ParameterError, "lorenz"),
    ("negative Lorenz number", lambda: term(lorenz=-2.44e-8), ParameterError, "lorenz"),
    ("Lorenz number True", lambda: term(lorenz=True), ParameterError, "lorenz"),
    ("band Lorenz without Seebeck", lambda: term(lorenz="band"), ParameterError, "seebeck"),
    ("Kim Lorenz without Seebeck", lambda: term(lorenz="kim"), ParameterError, "seebeck"),
    ("Seebeck beyond the band model", lambda: term(seebeck=[0.05, 0.05], lorenz="band").kappa(300.0),
     ParameterError, "seebeck"),
    ("mismatched resistivity length", lambda: term(resistivity=[1e-5, 2e-5, 3e-5]), ParameterError,
     "resistivity and temperature"),
    ("mismatched Seebeck length", lambda: term(seebeck=[1e-4]), ParameterError, "seebeck and temperature"),
    ("2-D resistivity", lambda: term(resistivity=[[1e-5, 2e-5]]), ParameterError, "resistivity"),
    ("repeated temperature", lambda: term(temperature=[100.0, 100.0]), ParameterError, "temperature repeats"),
    ("array resistivity without temperatures", lambda: ElectronicTerm([1e-5, 2e-5]), ParameterError,
     "temperature"),
    ("temperature above the resistivity data", lambda: term().kappa(700.0), ParameterError,
     "outside the measured resistivity range 100-600 K"),
    ("temperature below the resistivity data", lambda: ConductivityModel(lattice(), term()).parts([50.0, 300.0]),
     ParameterError, "outside the measured resistivity range"),
    ("zero temperature", lambda: term().kappa(0.0), ParameterError, "temperature"),
    ("temperature as text", lambda: term().kappa("300"), ParameterError, "temperature"),
    ("temperature in metres", lambda: term().kappa(Q(300.0, "m")), ParameterError, "temperature"),
    ("resistivity in watts", lambda: term(resistivity=Q([1.0, 2.0], "W")), ParameterError, "resistivity"),
    ("Seebeck in kelvin", lambda: term(seebeck=Q([1.0, 2.0], "K")), ParameterError, "seebeck"),
    ("Lorenz number in V/K", lambda: term(lorenz=Q(2.4e-8, "V/K")), ParameterError, "lorenz"),
    ("callable resistivity goes negative", lambda: ElectronicTerm(lambda T: 1e-5 - T * 1e-7).kappa(300.0),
     ParameterError, "resistivity(T)"),
    ("array Seebeck with callable resistivity", lambda: ElectronicTerm(lambda T: 1e-5, seebeck=[1e-4]),
     ParameterError, "seebeck"),
    ("unknown scattering", lambda: term(scattering="phonon"), ParameterError, "scattering"),
    ("negative band gap", lambda: BipolarTerm.activated(0.05, -0.1), ParameterError, "bipolar.band_gap"),
    ("negative bipolar prefactor", lambda: BipolarTerm.activated(-1.0, 0.5), ParameterError, "bipolar.prefactor"),
    ("band gap in kelvin", lambda: BipolarTerm.activated(0.05, Q(0.5, "K")), ParameterError, "bipolar.band_gap"),
    ("n-band Seebeck positive", lambda: BipolarTerm.two_band(1e4, 1e4, 1e-4, 2e-4), ParameterError,
     "bipolar.seebeck_n"),
    ("unknown bipolar form", lambda: BipolarTerm("three_band", {}), ParameterError, "bipolar form"),
    ("unknown bipolar parameter", lambda: BipolarTerm.activated().with_params({"bipolar.gap": 1.0}),
     ParameterError, "bipolar.gap"),
    ("bipolar parameter as array", lambda: BipolarTerm.activated([0.1, 0.2], 0.5), ParameterError,
     "bipolar.prefactor"),
    ("lattice not a model", lambda: ConductivityModel("Si"), ParameterError, "lattice"),
    ("electronic not a term", lambda: ConductivityModel(lattice(), electronic=1e-5), ParameterError, "electronic"),
    ("electronic flag 'yes'", lambda: ConductivityModel.from_dataset(lattice(), data_with_rho(), electronic="yes"),
     ParameterError, "electronic"),
    ("outside choice unknown", lambda: ConductivityModel(lattice(), term()).parts(300.0, outside="clip"),
     ParameterError, "outside"),
    ("dataset as a dict", lambda: lattice_target({"temperature": [1.0], "kappa": [1.0]}), ParameterError,
     "dataset"),
    ("lattice target with unknown Lorenz", lambda: lattice_target(data_with_rho(), lorenz="spp"),
     ParameterError, "lorenz"),
    ("resistivity 1000x too small (units)", lambda: lattice_target(
        Dataset.from_arrays([100.0, 200.0], [5.0, 4.0], resistivity=[1e-9, 2e-9])), DataError, "resistivity units"),
    ("electronic_kappa unknown method", lambda: electronic_kappa(300.0, resistivity=1e-5, method="spd"),
     ParameterError, "method"),
]


@pytest.mark.parametrize("case, action, error, words", REFUSED, ids=[c[0] for c in REFUSED])
def test_refused_with_one_line_naming_the_argument(case, action, error, words):
    with pytest.raises(error) as info:
        action()
    msg = str(info.value)
    assert "\n" not in msg, f"{case}: message spans lines"
    assert words in msg, f"{case}: {msg!r} does not mention {words!r}"


# ---------------------------------------------------------------------------------------------
# awkward but valid: a correct value
def test_celsius_temperatures_are_converted():
    # 26.85 degC = 300 K (pint offset unit); L0 T / rho with rho interpolated linearly
    got = float(term().kappa(Q(26.85, "degC")))
    rho = np.interp(300.0, T2, [1e-5, 3e-5])
    assert got == pytest.approx(L0 * 300.0 / rho, rel=1e-12)


def test_millikelvin_and_microohm_cm_are_converted():
    t = ElectronicTerm(Q([1.0, 3.0], "microohm * cm"), temperature=Q([1e5, 6e5], "mK"), lorenz="sommerfeld")
    assert t.temperature_range == pytest.approx((100.0, 600.0), rel=1e-12)
    assert float(t.kappa(100.0)) == pytest.approx(L0 * 100.0 / 1e-8, rel=1e-12)


def test_unsorted_grid_is_sorted_with_its_values():
    t = ElectronicTerm([3e-5, 1e-5], temperature=[600.0, 100.0], seebeck=[-2e-4, -1e-4], lorenz="band")
    assert float(t.kappa(100.0)) == pytest.approx(float(lorenz_spb(1e-4)) * 100.0 / 1e-5, rel=1e-12)


def test_negative_seebeck_is_n_type_not_an_error():
    p = term(seebeck=[-1e-4, -2e-4], lorenz="band").kappa(100.0)
    n = term(seebeck=[1e-4, 2e-4], lorenz="band").kappa(100.0)
    assert float(p) == pytest.approx(float(n), rel=1e-14)


def test_extreme_temperatures_no_warnings():
    # activated bipolar term at 0.01 K underflows to 0 without a RuntimeWarning (pytest makes them errors)
    b = BipolarTerm.activated(0.05, 3.0)
    assert float(b.kappa(0.01)[()]) == 0.0
    assert np.isfinite(b.kappa(1e5)).all()


def test_model_at_a_single_scalar_temperature():
    p = ConductivityModel(lattice(), term(), BipolarTerm.activated()).parts(300.0)
    assert p.total.shape == () and float(p.total) == pytest.approx(float(p.lattice + p.electronic + p.bipolar))
