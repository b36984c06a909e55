"""Fit speed against a hand-written script, measured side by side in one run.

    python benchmarks/bench_fit.py      # or as part of: python benchmarks/run.py

Data: the Glassbrenner & Slack (1964) k(T) table of natural silicon, 19
points 50-1000 K with their stated +-5 % (reference/si_ge_kappa.csv, as in
tests/test_handbook_fit.py). Model: the Si preset with longitudinal +
transverse Debye branches, boundary + Klemens point-defect (natural-isotope
Gamma) + Slack-type Umklapp scattering; three free parameters (boundary
length, Umklapp Grüneisen parameter and exponent divisor b).

Baseline ("hand-written"): what a user would write without kinetic --
``scipy.optimize.curve_fit`` on ln kappa over a function that loops over the
temperatures and branches and calls ``scipy.integrate.quad`` (default
tolerances) on the Callaway integrand, with the same model, data, weights,
start point and parameterisation (log10 of the length). Both fits are
started from the same point and must reach the same optimum (checked).

Targets (issue 12): single fit >= 15x faster than the hand-written script;
the default multi-start fit (8 starts) under 0.25 s. Times are the best of a
few repeats (wall clock).
"""
from __future__ import annotations

import csv
import math
import os
import sys
import time
import warnings
from pathlib import Path

import numpy as np
from scipy import integrate, optimize
from scipy.constants import hbar
from scipy.constants import k as kB

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from kinetic import Boundary, LatticeModel, PointDefect, Umklapp, materials
from kinetic.data import Dataset
from kinetic.disorder import isotope_gamma
from kinetic.fitting import fit

FREE = ["boundary.length", "umklapp.gruneisen", "umklapp.b"]
START = {"boundary.length": 5e-3, "umklapp.gruneisen": 1.0, "umklapp.b": 3.0}


def si_table():
    """The 19-point Glassbrenner & Slack table (T <= 1000 K) with its stated 5 % errors."""
    rows = [r for r in csv.DictReader((ROOT / "reference" / "si_ge_kappa.csv").open())
            if r["material"] == "Si" and r["source"].startswith("Glassbrenner & Slack")]
    T = np.array([float(r["temperature_K"]) for r in rows])
    k = np.array([float(r["kappa_W_per_mK"]) for r in rows])
    err = np.array([float(r["uncertainty_percent"]) for r in rows]) / 100.0
    keep = T <= 1000.0  # bipolar part above ~1000 K (G&S abstract)
    return T[keep], k[keep], err[keep]


def si_model():
    si = materials.get("Si")
    sc = [Boundary(START["boundary.length"]), PointDefect.from_gamma(isotope_gamma("Si"), si.volume_per_atom),
          Umklapp.from_material(si, gruneisen=START["umklapp.gruneisen"], b=START["umklapp.b"])]
    return LatticeModel.from_material(si, scattering=sc, split_branches=True)


# ------------------------------------------------------------------ the hand-written script
def hand_written_kappa(model):
    """kappa(T; log10 L, gamma, b) as a user would write it: a quad per temperature and branch."""
    si = materials.get("Si")
    V0, M, G = si.volume_per_atom, model.mechanism("umklapp").atomic_mass, model.mechanism("point_defect").gamma
    branches = [(b.velocity, b.debye_temperature, b.polarizations) for b in model.branches]

    def kappa(T, logL, gam, b):
        L = 10.0 ** logL
        out = np.empty(len(T))
        for i, t in enumerate(T):
            total = 0.0
            for v, th, pol in branches:
                A = V0 * G / (4.0 * math.pi * v ** 3)
                B = hbar * gam * gam / (M * v * v * th)
                w_per_x = kB * t / hbar
                u_T = B * t * math.exp(-th / (b * t))

                # rates in units of the rate at x = 1, so the integral is of order one and
                # quad's default absolute tolerance (1.5e-8) means what it says
                r1 = v / L + A * w_per_x ** 4 + u_T * w_per_x ** 2

                def f(x, w_per_x=w_per_x, v=v, A=A, u_T=u_T, r1=r1):
                    w = w_per_x * x
                    rate = (v / L + A * w ** 4 + u_T * w * w) / r1
                    ex = math.exp(-x)  # x^4 e^x / (e^x - 1)^2 written without overflow
                    return x ** 4 * ex / (1.0 - ex) ** 2 / rate if x > 0 else 0.0

                integral, _ = integrate.quad(f, 0.0, th / t)
                total += pol * kB / (6.0 * math.pi ** 2 * v) * w_per_x ** 3 * integral / r1
            out[i] = total
        return out

    return kappa


def hand_written_fit(T, k, err, model):
    kap = hand_written_kappa(model)
    p0 = [math.log10(START["boundary.length"]), START["umklapp.gruneisen"], START["umklapp.b"]]
    info = model.parameter_info()  # the same bounds as kinetic's fit; log10 for the length only
    lo = [math.log10(info[FREE[0]].bounds[0]), info[FREE[1]].bounds[0], info[FREE[2]].bounds[0]]
    hi = [math.log10(info[FREE[0]].bounds[1]), info[FREE[1]].bounds[1], info[FREE[2]].bounds[1]]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # quad's accuracy warnings are part of what such a script sees
        # diff_step: the finite-difference step must stand well above quad's ~1e-8 noise, or the
        # Jacobian is noise and the fit stops at a wrong point (as with the default step)
        p, _ = optimize.curve_fit(lambda T, *q: np.log(kap(T, *q)), T, np.log(k), p0=p0, sigma=err,
                                  absolute_sigma=True, bounds=(lo, hi), diff_step=1e-5)
    return {"boundary.length": 10.0 ** p[0], "umklapp.gruneisen": p[1], "umklapp.b": p[2]}


def _best(fn, repeat=3):
    best, out = float("inf"), None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def run():
    """[(label, value_str, target_str), ...] for benchmarks/run.py."""
    T, k, err = si_table()
    ds = Dataset.from_arrays(T, k, kappa_err=err * k, kind="lattice", label="Si, Glassbrenner & Slack 1964")
    model = si_model()
    # same model check: the hand-written kappa against the engine at the start point (quad's default
    # tolerance is 1.5e-8 relative; 1e-6 leaves room for the engine's own quadrature error)
    ref = model.kappa(T)
    hw = hand_written_kappa(model)(T, math.log10(START["boundary.length"]), START["umklapp.gruneisen"],
                                   START["umklapp.b"])
    same = float(np.max(np.abs(hw / ref - 1.0)))
    t_hand, v_hand = _best(lambda: hand_written_fit(T, k, err, model), repeat=2)
    t_one, r_one = _best(lambda: fit(model, ds, FREE, n_starts=1), repeat=5)
    t_multi, r_multi = _best(lambda: fit(model, ds, FREE), repeat=3)
    agree = max(abs(math.log(r_one.values[n] / v_hand[n])) for n in FREE)
    jac = "analytic (model.kappa_jacobian)" if r_one.problem.analytic else "finite differences"
    return [
        ("fit: same model check, hand-written quad vs engine kappa", f"{same:.1e}", "max relative difference"),
        ("fit: hand-written curve_fit + quad loop, 19 pts, 3 free", f"{t_hand * 1e3:.0f} ms",
         "baseline (scipy default tolerances)"),
        ("fit: kinetic single start, same data and model", f"{t_one * 1e3:.1f} ms",
         f"{r_one.nfev} evaluations; Jacobian {jac}"),
        ("fit: speed-up against the hand-written script", f"{t_hand / t_one:.1f}x", ">= 15x"),
        ("fit: both reach the same optimum", f"{agree:.1e}", "max |ln(kinetic / hand-written)| of the values"),
        ("fit: default multi-start (8 starts), Si table", f"{t_multi * 1e3:.0f} ms",
         f"< 250 ms; {r_multi.nfev} evaluations"),
    ]


if __name__ == "__main__":
    rows = run()
    width = max(len(r[0]) for r in rows)
    print(f"kinetic fitting benchmarks ({os.cpu_count()} CPUs, numpy {np.__version__})")
    for label, value, target in rows:
        print(f"  {label:<{width}}  {value:>12}   {target}")
