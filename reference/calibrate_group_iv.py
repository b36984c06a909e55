"""Reproduce the stored calibrations of the group-IV presets (Si, Ge, diamond) with kinetic's own fitter.

Run from the repository root:  PYTHONPATH=$PWD python reference/calibrate_group_iv.py [Si] [Ge] [C]

Every model is the preset's stored form (split L + 2T sine branches with the zone-edge frequencies,
boundary + Klemens point defects with the natural-isotope Gamma + Umklapp in the Grueneisen form +
normal processes entering through Callaway's correction). What is fitted, and to what:

* Si: Glassbrenner & Slack, Phys. Rev. 134, A1058 (1964), 50-1000 K (reference/si_ge_kappa.csv, +-5 %
  per point). kinetic.fit of boundary.length, umklapp.gruneisen and umklapp.b (relative residuals) for
  each normal-process form and strength of a small grid. k(T) alone does not fix the normal-process
  strength (the best k(T) fit has none: rms 4.3 %), but the isotope effect needs it: the calibration
  keeps the form and strength with the lowest rms among those whose 28Si/natural ratio at 300 K lies
  inside Inyushkin et al. 2004's +10 +- 2 % and whose peak ratio lies within 1.5x of their ~7.5x
  (reference/isotope_effects.csv).
* Ge: Ho, Powell & Liley 1972 values (from memory), 100-600 K; kinetic.fit of umklapp.gruneisen and
  umklapp.b with a 3 mm boundary and Callaway's B_N = 1e-25 s K^-3 (omega^2 T^3) fixed (unchanged
  from the first calibration pass; this script only reproduces it).
* C: only checked points exist (Inyushkin et al., PRB 97, 144305, 2018, abstract): 28,500 W/m/K at the
  maximum "near 63 K" and 2,400 W/m/K at room temperature (298 K). Four conditions fix four numbers:
  the two values, the maximum's position (dk/dT = 0 at 63 K) and the 12C isotope effect at 300 K
  (0.1 % against 1.1 % 13C: +45 %, the Callaway model of the same paper; Wei et al. PRL 70, 3764, 1993
  measured +50 %). Holland's normal form B_N omega T^4 (Holland, Phys. Rev. 132, 2461, 1963). The
  four-condition solve uses scipy.optimize.least_squares on kinetic.LatticeModel (kinetic.fit fits
  k(T) rows only and needs more rows than free parameters); kinetic.fit then re-fits umklapp.gruneisen
  to the two table rows (the rest held) from a different start and must land on the same value.

It prints, per material, the stored-model dict and the checks (rms, largest deviation, 300 K value,
isotope ratios, nanowires, share of heat above 1 um for Si).
"""
import csv
import sys
from pathlib import Path

import numpy as np
from scipy.optimize import least_squares

from kinetic import defaults
from kinetic.fitting import fit
from kinetic.scattering import Normal

HERE = Path(__file__).resolve().parent
#: enriched-sample isotope Gammas (reference/isotope_effects.csv, computed there)
GAMMA_28SI = 3.2e-7
GAMMA_12C = 6.98e-6
#: Si normal-process forms (omega power, temperature power) and strengths scanned [s K^-m]:
#: Callaway's omega^2 T^3 (Phys. Rev. 113, 1046, 1959) and omega^2 T^2 (an empirical middle between
#: Callaway's low-T T^3 and the high-T limit T^1, common practice)
SI_SCAN = {(2.0, 3.0): (1e-26, 2e-26, 3e-26, 4e-26, 6e-26),
           (2.0, 2.0): (8e-24, 1.2e-23, 1.6e-23, 2e-23, 2.4e-23)}
#: published 28Si checks (Inyushkin et al., phys. stat. sol. (c) 1, 2995, 2004)
SI_ISO_300 = (1.08, 1.12)   # +10 +- 2 %
SI_ISO_PEAK = (7.5 / 1.5, 7.5 * 1.5)
T_LOW = np.linspace(10.0, 60.0, 26)


def rows(table, material, source_word, t_min, t_max):
    T, k = [], []
    with open(HERE / table, newline="") as fh:
        for r in csv.DictReader(fh):
            if r["material"] == material and source_word in r["source"]:
                t = float(r["temperature_K"])
                if t_min <= t <= t_max:
                    T.append(t)
                    k.append(float(r["kappa_W_per_mK"]))
    return np.array(T), np.array(k)


def with_gamma(model, gamma):
    return model.with_mechanism(model.mechanism("point_defect").with_values(gamma=gamma))


def deviations(model, T, k):
    rel = model.kappa(T) / k - 1.0
    return float(np.sqrt(np.mean(rel**2))), float(np.max(np.abs(rel)))


def calibrate_si():
    T, k = rows("si_ge_kappa.csv", "Si", "Glassbrenner", 50.0, 1000.0)
    base = defaults.default_model("Si")
    free = ["boundary.length", "umklapp.gruneisen", "umklapp.b"]
    best = None
    print(f"Si: {T.size} rows of Glassbrenner & Slack 1964, {T.min():g}-{T.max():g} K")
    print("   form        B_N        L [m]    gamma    b      rms    max    k300   iso300  peak")
    for (n, m), strengths in SI_SCAN.items():
        for B in strengths:
            start = base.with_mechanism(Normal(B=B, omega_power=n, temperature_power=m))
            res = fit(start, {"temperature": T, "kappa": k, "kind": "lattice"}, free, n_starts=4,
                      weights="relative")
            model = res.models[0]
            rms, worst = deviations(model, T, k)
            enr = with_gamma(model, GAMMA_28SI)
            iso = float(enr.kappa(300.0) / model.kappa(300.0))
            peak = float(enr.kappa(T_LOW).max() / model.kappa(T_LOW).max())
            p = model.params
            ok = SI_ISO_300[0] <= iso <= SI_ISO_300[1] and SI_ISO_PEAK[0] < peak < SI_ISO_PEAK[1]
            print(f"   w^{n:g} T^{m:g}  {B:8.2e}  {p['boundary.length']:.4g}  {p['umklapp.gruneisen']:.4f}  "
                  f"{p['umklapp.b']:.4f}  {rms:.4f} {worst:.3f}  {float(model.kappa(300.0)):6.1f}  "
                  f"{iso:.3f}  {peak:.2f}{'  isotope checks pass' if ok else ''}")
            if ok and (best is None or rms < best[0]):
                best = (rms, worst, model, n, m, B)
    rms, worst, model, n, m, B = best
    p = model.params
    wires = {d: float(model.with_params({"boundary.length": d}).kappa(300.0)) for d in (115e-9, 56e-9, 37e-9)}
    share = float(model.spectral(300.0).fraction_above(1e-6))
    out = {"boundary": {"length": float(f"{p['boundary.length']:.4g}")},
           "umklapp": {"gruneisen": round(p["umklapp.gruneisen"], 4), "b": round(p["umklapp.b"], 4)},
           "normal": {"B": B, "omega_power": n, "temperature_power": m}}
    print(f"Si chosen: {out}\n   rms {rms:.4f}, largest {worst:.3f}, 300 K {float(model.kappa(300.0)):.1f} "
          f"(G&S 156); wires 115/56/37 nm: " + "/".join(f"{v:.1f}" for v in wires.values())
          + f" (Li et al. 2003: 40/26/18); share above 1 um {share:.2f}")
    return out


def calibrate_ge():
    T, k = rows("si_ge_kappa.csv", "Ge", "Powell", 100.0, 600.0)
    model = defaults.default_model("Ge")
    res = fit(model.with_params({"umklapp.gruneisen": 1.5, "umklapp.b": 3.0}),
              {"temperature": T, "kappa": k, "kind": "lattice"}, ["umklapp.gruneisen", "umklapp.b"],
              n_starts=4, weights="relative")
    got = res.models[0]
    rms, worst = deviations(got, T, k)
    print(f"Ge: gamma {got.params['umklapp.gruneisen']:.4f} (stored {model.params['umklapp.gruneisen']}), "
          f"b {got.params['umklapp.b']:.4f} (stored {model.params['umklapp.b']}); rms {rms:.4f}, largest "
          f"{worst:.3f}, 300 K {float(got.kappa(300.0)):.1f}")


def _peak_position(model, grid=np.linspace(30.0, 120.0, 181)):
    kk = model.kappa(grid)
    return float(grid[int(np.argmax(kk))]), float(kk.max())


def calibrate_diamond(iso_target=1.45):
    T, k = rows("diamond_kappa.csv", "C", "Inyushkin", 63.0, 298.0)
    k63, k298 = k[T == 63.0][0], k[T == 298.0][0]
    base = defaults.default_model("C").with_mechanism(Normal(B=3e-14, omega_power=1.0, temperature_power=4.0))
    names = ["boundary.length", "umklapp.gruneisen", "umklapp.b", "normal.B"]

    def conditions(x):
        model = base.with_params(dict(zip(names, np.exp(x))))
        slope = float((model.kappa(65.0) - model.kappa(61.0)) / model.kappa(63.0))
        iso = float(with_gamma(model, GAMMA_12C).kappa(300.0) / model.kappa(300.0))
        return np.array([float(model.kappa(63.0)) / k63 - 1.0, float(model.kappa(298.0)) / k298 - 1.0,
                         slope, iso / iso_target - 1.0])

    sol = least_squares(conditions, np.log([base.params[nm] for nm in names]), diff_step=1e-4)
    solved = base.with_params(dict(zip(names, np.exp(sol.x))))
    # kinetic.fit on the two table rows (it needs one point more than free parameters for the scatter):
    # umklapp.gruneisen from another start, the rest held at the solution; it must land on the same value
    res = fit(solved.with_params({"umklapp.gruneisen": 1.5}), {"temperature": T, "kappa": k, "kind": "lattice"},
              ["umklapp.gruneisen"], n_starts=4, weights="relative")
    model = res.models[0]
    p = model.params
    assert abs(p["umklapp.gruneisen"] / solved.params["umklapp.gruneisen"] - 1.0) < 1e-3, p["umklapp.gruneisen"]
    tpk, kpk = _peak_position(model)
    iso = float(with_gamma(model, GAMMA_12C).kappa(300.0) / model.kappa(300.0))
    enr = with_gamma(model, GAMMA_12C)
    out = {"boundary": {"length": float(f"{p['boundary.length']:.4g}")},
           "umklapp": {"gruneisen": round(p["umklapp.gruneisen"], 4), "b": round(p["umklapp.b"], 4)},
           "normal": {"B": float(f"{p['normal.B']:.4g}"), "omega_power": 1.0, "temperature_power": 4.0}}
    print(f"C chosen: {out}\n   conditions left {np.round(sol.fun, 5)}; maximum at {tpk:g} K ({kpk:.0f}); "
          f"298 K {float(model.kappa(298.0)):.0f}; 300 K {float(model.kappa(300.0)):.0f}; 12C/natural at 300 K "
          f"{iso:.3f}; enriched crystal (same size) at 104 K {float(enr.kappa(104.0)):.0f}, at 300 K "
          f"{float(enr.kappa(300.0)):.0f}")
    return out


if __name__ == "__main__":
    which = sys.argv[1:] or ["Si", "Ge", "C"]
    if "Si" in which:
        calibrate_si()
    if "Ge" in which:
        calibrate_ge()
    if "C" in which:
        calibrate_diamond()
