"""The electronic and bipolar terms of the conductivity chain."""
from __future__ import annotations

from collections.abc import Mapping
from dataclasses import KW_ONLY, dataclass, field, replace
from types import MappingProxyType

import numpy as np

from ..data import Dataset
from ..electronic import bipolar_kappa_activated, bipolar_kappa_two_band, electronic_kappa, scattering_exponent
from ..errors import ParameterError
from ..parameters import Parameter
from ._common import _END_SLACK, _check_finite, _check_positive, _frozen, _kelvin, _lorenz_spec, _si

__all__ = ["ElectronicTerm", "BipolarTerm", "BIPOLAR_FORMS"]


@dataclass(frozen=True, eq=False)
class ElectronicTerm:
    """Electronic thermal conductivity kappa_e = L T / rho of a measured sample.

    Parameters
    ----------
    resistivity : array or callable
        rho [Ohm m], > 0: values on the ``temperature`` grid (linearly
        interpolated between grid points), or a function of T [K] (vectorised).
        Pint quantities are converted.
    temperature : array, keyword
        The grid [K] of an array ``resistivity`` (and ``seebeck``); any order,
        no repeats. With a callable, optional: the range where it is valid.
    seebeck : array or callable, optional, keyword
        S [V/K], either sign, on the same grid or as a function of T.
    lorenz : str or float, keyword
        "auto" (default): the single-parabolic-band value from S when S is
        given, else Sommerfeld's L0; "sommerfeld"; "band" (alias "spb"); "kim"
        (Kim et al. 2015 formula); or a number in :data:`LORENZ_RANGE`
        [W Ohm K^-2].
    scattering : str or float, keyword
        Carrier scattering exponent for the band model
        (:func:`kinetic.electronic.scattering_exponent`), default "acoustic".

    Notes
    -----
    The uncertainty of kappa_e is the model-choice uncertainty of L documented
    in :func:`kinetic.electronic.electronic_kappa` (0 for a given number).
    Asking for a temperature outside an array grid raises ParameterError
    (no extrapolation).
    """

    resistivity: object
    _: KW_ONLY
    temperature: object = None
    seebeck: object = None
    lorenz: object = "auto"
    scattering: object = "acoustic"

    def __post_init__(self):
        set_ = object.__setattr__
        rho, S, T = self.resistivity, self.seebeck, self.temperature
        if not callable(rho):
            if T is None:
                raise ParameterError("temperature [K] is needed with an array of resistivity values")
            T = np.atleast_1d(_kelvin(T, "temperature"))
            rho = np.atleast_1d(_si(rho, "ohm*m", "resistivity"))
            if T.ndim != 1 or rho.shape != T.shape:
                raise ParameterError(f"resistivity and temperature must be 1-D of the same length, got "
                                     f"{rho.shape} and {T.shape}")
            _check_positive("resistivity", rho, "Ohm m")
            order = np.argsort(T, kind="stable")
            T, rho = T[order], rho[order]
            if np.any(np.diff(T) == 0):
                raise ParameterError(f"temperature repeats {float(T[:-1][np.diff(T) == 0][0]):g} K; "
                                     "give one resistivity per temperature")
            if S is not None and not callable(S):
                S = np.atleast_1d(_si(S, "V/K", "seebeck"))
                if S.shape != order.shape:
                    raise ParameterError(f"seebeck and temperature must have the same length, got "
                                         f"{S.shape} and {order.shape}")
                S = _frozen(_check_finite("seebeck", S, "V/K")[order])
            set_(self, "temperature", _frozen(T))
            set_(self, "resistivity", _frozen(rho))
        else:
            if T is not None:
                T = _frozen(np.atleast_1d(_kelvin(T, "temperature")))
                set_(self, "temperature", T)
            if S is not None and not callable(S):
                raise ParameterError("seebeck must be a callable when resistivity is one")
        set_(self, "seebeck", S)
        _, given = _lorenz_spec(self.lorenz, S is not None)  # validate now, not at the first plot
        set_(self, "lorenz", given if given is not None else self.lorenz.strip().lower())
        scattering_exponent(self.scattering)

    @classmethod
    def from_dataset(cls, dataset: Dataset, *, lorenz="auto", scattering="acoustic") -> "ElectronicTerm":
        """The term of a measured dataset's resistivity (and Seebeck) columns."""
        if not isinstance(dataset, Dataset):
            raise ParameterError(f"dataset must be a kinetic.data.Dataset, got {type(dataset).__name__}")
        if dataset.resistivity is None:
            raise ParameterError(f"{dataset.label or 'data'} has no resistivity column: no electronic part")
        return cls(dataset.resistivity, temperature=dataset.temperature, seebeck=dataset.seebeck,
                   lorenz=lorenz, scattering=scattering)

    @property
    def temperature_range(self) -> tuple[float, float] | None:
        """(lowest, highest) temperature [K] where the term is defined; None for a callable without one."""
        if self.temperature is None:
            return None
        return float(np.min(self.temperature)), float(np.max(self.temperature))

    @property
    def method(self) -> str:
        """The Lorenz choice as resolved: "sommerfeld", "spb", "kim" or "given"."""
        m, L = _lorenz_spec(self.lorenz, self.seebeck is not None)
        return "given" if L is not None else m

    def inside(self, T) -> np.ndarray:
        """Boolean mask of temperatures [K] where the term is defined."""
        T = _kelvin(T)
        rng = self.temperature_range
        if rng is None:
            return np.ones(T.shape, bool)
        return (T >= rng[0] * (1 - _END_SLACK)) & (T <= rng[1] * (1 + _END_SLACK))

    def _inputs(self, T: np.ndarray):
        rng = self.temperature_range
        if rng is not None:
            out = ~self.inside(T)
            if np.any(out):
                raise ParameterError(f"temperature {float(T[out].flat[0]):g} K is outside the measured "
                                     f"resistivity range {rng[0]:g}-{rng[1]:g} K; the electronic part is not "
                                     "extrapolated")
            T = np.clip(T, *rng)
        if callable(self.resistivity):
            rho = np.broadcast_to(_si(self.resistivity(T), "ohm*m", "resistivity(T)"), T.shape)
            _check_positive("resistivity(T)", rho, "Ohm m")
        else:
            rho = np.interp(T, self.temperature, self.resistivity)
        return rho, self._seebeck_at(T)

    def _seebeck_at(self, T: np.ndarray):
        S = self.seebeck
        if S is None:
            return None
        if callable(S):
            return _check_finite("seebeck(T)", np.broadcast_to(_si(S(T), "V/K", "seebeck(T)"), T.shape), "V/K")
        return np.interp(T, self.temperature, S)

    def evaluate(self, T):
        """:class:`kinetic.electronic.ElectronicKappa` (value, uncertainty, L used) at T [K]."""
        T = _kelvin(T)
        rho, S = self._inputs(T)
        method, L = _lorenz_spec(self.lorenz, S is not None)
        return electronic_kappa(T, resistivity=rho, seebeck=S, method=method, lorenz=L,
                                scattering=self.scattering)

    def kappa(self, T) -> np.ndarray:
        """kappa_e [W m^-1 K^-1] at T [K], shaped like T."""
        return np.asarray(self.evaluate(T).value)

    def uncertainty(self, T) -> np.ndarray:
        """1-sigma uncertainty of kappa_e [W m^-1 K^-1] from the Lorenz choice, shaped like T."""
        return np.asarray(self.evaluate(T).uncertainty)


# ---------------------------------------------------------------------------------------------
_FORMS = {
    "activated": {
        "prefactor": Parameter("prefactor", 0.05, unit="W m^-1 K^-2",
                               description="bipolar strength C (activated form)", bounds=(1e-5, 10.0), log=True),
        "band_gap": Parameter("band_gap", 0.7, unit="eV", description="band gap E_g",
                              bounds=(0.05, 3.0), log=False),
        "exponent": Parameter("exponent", 1.0, unit="", description="temperature power p of the bipolar term",
                              bounds=(-3.0, 5.0), log=False, fixed=True),
    },
    "two_band": {
        "sigma_n": Parameter("sigma_n", 1e4, unit="S m^-1", description="electron-band conductivity",
                             bounds=(1e-2, 1e7), log=True),
        "sigma_p": Parameter("sigma_p", 1e4, unit="S m^-1", description="hole-band conductivity",
                             bounds=(1e-2, 1e7), log=True),
        "seebeck_n": Parameter("seebeck_n", -2e-4, unit="V K^-1", description="electron-band Seebeck coefficient",
                               bounds=(-1e-3, 0.0), log=False),
        "seebeck_p": Parameter("seebeck_p", 2e-4, unit="V K^-1", description="hole-band Seebeck coefficient",
                               bounds=(0.0, 1e-3), log=False),
    },
}

#: the bipolar forms :class:`BipolarTerm` knows
BIPOLAR_FORMS = tuple(_FORMS)

#: units in which pint quantities are converted (the prefactor's depends on the exponent p)
_PINT_UNITS = {"band_gap": "eV", "exponent": "dimensionless", "sigma_n": "S/m", "sigma_p": "S/m",
               "seebeck_n": "V/K", "seebeck_p": "V/K", "prefactor": None}


@dataclass(frozen=True, eq=False)
class BipolarTerm:
    """Bipolar (minority-carrier) heat conduction with declared parameters.

    Build with :meth:`activated` (kappa_bp = C T^p exp(-E_g / 2 kB T),
    :func:`kinetic.electronic.bipolar_kappa_activated`) or :meth:`two_band`
    (sigma_n sigma_p / (sigma_n + sigma_p) (S_p - S_n)^2 T with constant
    partial values, :func:`kinetic.electronic.bipolar_kappa_two_band`).

    Attributes
    ----------
    form : {"activated", "two_band"}
    values : dict
        Parameter name -> value (SI, band gap in eV).
    """

    form: str
    values: Mapping = field(default_factory=dict)

    def __post_init__(self):
        if self.form not in _FORMS:
            raise ParameterError(f"bipolar form must be one of {', '.join(_FORMS)}, got {self.form!r}")
        spec = _FORMS[self.form]
        unknown = sorted(set(self.values) - set(spec))
        if unknown:
            raise ParameterError(f"unknown bipolar parameter {unknown[0]!r}; {self.form} has: {', '.join(spec)}")
        vals = {}
        for k in sorted(spec, key=lambda k: k != "exponent"):   # the prefactor's unit needs p first
            unit = _PINT_UNITS.get(k) or f"W/m/K**{1.0 + vals['exponent']:g}"
            v = _si(self.values.get(k, spec[k].value), unit, f"bipolar.{k}")
            if v.ndim != 0:
                raise ParameterError(f"bipolar.{k} must be one number, got an array of shape {v.shape}")
            vals[k] = float(v)
        vals = {k: vals[k] for k in spec}
        object.__setattr__(self, "values", MappingProxyType(vals))
        self.kappa(np.array([300.0]))   # the formulas' own checks, named bipolar.<param> below

    @classmethod
    def activated(cls, prefactor: float = 0.05, band_gap: float = 0.7, *, exponent: float = 1.0) -> "BipolarTerm":
        """C [W m^-1 K^-(1+p)] T^p exp(-E_g / 2 kB T), E_g in eV (defaults: the workbench's start values)."""
        return cls("activated", {"prefactor": prefactor, "band_gap": band_gap, "exponent": exponent})

    @classmethod
    def two_band(cls, sigma_n: float, sigma_p: float, seebeck_n: float, seebeck_p: float) -> "BipolarTerm":
        """Partial conductivities [S/m] and signed partial Seebeck coefficients [V/K] of the two bands."""
        return cls("two_band", {"sigma_n": sigma_n, "sigma_p": sigma_p, "seebeck_n": seebeck_n,
                                "seebeck_p": seebeck_p})

    @property
    def parameters(self) -> dict:
        """``{"bipolar.<name>": Parameter}`` holding the current values (units, bounds, plain words)."""
        out = {}
        for k, par in _FORMS[self.form].items():
            p = par.with_value(self.values[k])
            if k == "prefactor" and self.values["exponent"] != 1.0:
                p = replace(p, unit=f"W m^-1 K^-{1.0 + self.values['exponent']:g}")
            out[f"bipolar.{k}"] = p
        return out

    @property
    def formula(self) -> str:
        """The form in plain text, for labels."""
        if self.form == "activated":
            p = self.values["exponent"]
            power = "T" if p == 1.0 else f"T^{p:g}"
            return f"C {power} exp(\u2212E_g / 2k_BT)"
        return "\u03c3_n \u03c3_p / (\u03c3_n + \u03c3_p) (S_p \u2212 S_n)\u00b2 T"

    @property
    def params(self) -> dict:
        """``{"bipolar.<name>": value}``."""
        return {f"bipolar.{k}": v for k, v in self.values.items()}

    def with_params(self, values: Mapping) -> "BipolarTerm":
        """A new term with some ``"bipolar.<name>"`` (or bare ``"<name>"``) values replaced."""
        new = dict(self.values)
        for key, v in dict(values).items():
            short = key.split(".", 1)[1] if key.startswith("bipolar.") else key
            if short not in new:
                raise ParameterError(f"unknown parameter {key!r}; valid names: {', '.join(self.params)}")
            new[short] = v
        return BipolarTerm(self.form, new)

    def kappa(self, T) -> np.ndarray:
        """kappa_bp [W m^-1 K^-1] at T [K], shaped like T."""
        T = _kelvin(T)
        v = self.values
        try:
            if self.form == "activated":
                out = bipolar_kappa_activated(T, v["prefactor"], v["band_gap"], exponent=v["exponent"])
            else:
                out = bipolar_kappa_two_band(T, v["sigma_n"], v["sigma_p"], v["seebeck_n"], v["seebeck_p"])
        except ParameterError as exc:
            msg = str(exc).replace("band_gap_ev", "band_gap")
            for k in v:
                if msg.startswith(k):
                    msg = "bipolar." + msg
                    break
            raise ParameterError(msg) from None
        return np.broadcast_to(np.asarray(out, dtype=float), T.shape).copy()


