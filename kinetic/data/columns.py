"""Column names: the accepted aliases of each quantity and name normalisation."""
from __future__ import annotations

import re

__all__ = ["COLUMN_ALIASES"]


def _aliases() -> dict[str, tuple[str, str | None]]:
    table: dict[str, tuple[str, str | None]] = {}

    def add(role, kind, *names):
        for n in names:
            table[n] = (role, kind)

    add("temperature", None, "t", "temp", "temperature", "t_avg", "t_mean", "t_sample",
        "tavg", "tmean", "sample_temperature")
    add("kappa", None, "kappa", "k", "κ", "lambda", "λ", "thermal_conductivity", "kappa_meas",
        "kappa_measured")
    add("kappa", "total", "kappa_total", "kappa_tot", "k_total", "k_tot", "κ_total", "κ_tot",
        "total_thermal_conductivity", "kappa_t")
    add("kappa", "lattice", "kappa_lattice", "kappa_l", "kappa_lat", "kappa_ph", "kappa_phonon",
        "k_lattice", "k_l", "k_lat", "k_ph", "κ_l", "κ_lattice", "κ_lat", "κ_ph",
        "lattice_thermal_conductivity")
    add("kappa_err", None, "kappa_err", "kappa_error", "kappa_unc", "kappa_uncertainty",
        "kappa_sigma", "sigma_kappa", "kappa_std", "dk", "dkappa", "d_kappa", "delta_kappa",
        "delta_k", "k_err", "k_error", "err", "error", "uncertainty", "u_kappa", "dκ", "δκ",
        "κ_err", "kappa_total_err", "kappa_lattice_err", "kappa_l_err", "dkappa_l",
        "kappa_tot_err", "kappa_lat_err")
    add("resistivity", None, "rho", "resistivity", "electrical_resistivity", "rho_e", "ρ",
        "rho_xx")
    add("sigma", None, "sigma", "conductivity", "electrical_conductivity", "sigma_e", "σ",
        "sigma_xx")
    add("seebeck", None, "s", "seebeck", "seebeck_coefficient", "thermopower",
        "thermoelectric_power", "s_xx")
    # a flash (laser or xenon-lamp) measurement: k = D rho c_p (kinetic.data.diffusivity)
    add("diffusivity", None, "diffusivity", "d", "thermal_diffusivity", "diff", "a_th")
    add("diffusivity_err", None, "diffusivity_err", "diffusivity_error", "d_err", "dd",
        "diffusivity_unc", "u_d")
    add("density", None, "density", "mass_density", "rho_m", "ρ_m", "dens")
    add("heat_capacity", None, "cp", "c_p", "heat_capacity", "specific_heat",
        "specific_heat_capacity", "cp_mass")
    return table


#: Accepted column names (normalised: lower case, spaces/dots/hyphens as ``_``)
#: mapped to (quantity, kind).  kind is "total"/"lattice" for kappa columns
#: whose name says so, else None.
COLUMN_ALIASES: dict[str, tuple[str, str | None]] = _aliases()

_KINDS = ("total", "lattice")
_ROLE_ORDER = ("temperature", "kappa", "kappa_err", "resistivity", "sigma", "seebeck")
# columns of a flash measurement, kept in the Dataset beside the k computed from them
_FLASH_ROLES = ("diffusivity", "density", "heat_capacity")
# every quantity a file column can hold
_FILE_ROLES = _ROLE_ORDER + ("diffusivity", "diffusivity_err", "density", "heat_capacity")
# the usual column names, for messages
_SHORT = {"temperature": "T", "kappa": "kappa", "kappa_err": "kappa_err",
          "resistivity": "rho", "sigma": "sigma", "seebeck": "S", "diffusivity": "diffusivity",
          "diffusivity_err": "diffusivity_err", "density": "density", "heat_capacity": "cp"}


def _norm_name(name: str) -> str:
    return re.sub(r"[\s\-.()]+", "_", name.strip().lower()).strip("_")
