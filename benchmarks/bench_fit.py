"""Fitting and what-if speed: single fit, 16-start fit, 50 x 50 grain-size x composition map.

    python benchmarks/bench_fit.py      # or as part of: python benchmarks/run.py

Model: Si preset with longitudinal + transverse branches and boundary,
point-defect, Umklapp and normal scattering (the full Callaway form); three
free parameters (boundary length, Gamma, Umklapp Grüneisen parameter); 40
synthetic points (invented: made with the model itself plus 2% seeded noise).
Targets: single fit < 0.5 s; 16 starts < 5 s; 50 x 50 map at one
temperature < 1 s. Times are the best of a few repeats (wall clock).
"""
from __future__ import annotations

import os
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from kinetic import Boundary, LatticeModel, Normal, PointDefect, Umklapp, materials  # noqa: E402
from kinetic.data import Dataset  # noqa: E402
from kinetic.fitting import fit  # noqa: E402
from kinetic.whatif import grain_alloy_map  # noqa: E402

FREE = ["boundary.length", "point_defect.gamma", "umklapp.gruneisen"]


def _model(**values):
    si = materials.get("Si")
    m = LatticeModel.from_material(si, scattering=[
        Boundary(2e-4), PointDefect.from_gamma(1e-3, si.volume_per_atom),
        Umklapp.from_material(si, gruneisen=1.2), Normal(1e-24)], split_branches=True)
    return m.with_params(values) if values else m


def _data():
    truth = _model()
    T = np.geomspace(10.0, 800.0, 40)
    k = truth.kappa(T) * np.exp(0.02 * np.random.default_rng(0).standard_normal(T.size))
    return Dataset.from_arrays(T, k, kappa_err=0.02 * k, kind="lattice", label="invented benchmark data")


def _best(fn, repeat=3):
    best, out = float("inf"), None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def run():
    """[(label, value, unit or note), ...] for benchmarks/run.py."""
    ds = _data()
    start = _model(**{"boundary.length": 1e-3, "point_defect.gamma": 3e-4, "umklapp.gruneisen": 1.8})
    T = ds.temperature
    t_kappa, _ = _best(lambda: [start.kappa(T) for _ in range(50)])
    t_kappa /= 50
    t1, r1 = _best(lambda: fit(start, ds, FREE, n_starts=1))
    t16, r16 = _best(lambda: fit(start, ds, FREE, n_starts=16), repeat=2)
    L = np.geomspace(1e-8, 1e-3, 50)
    x = np.linspace(0.0, 1.0, 50)
    tmap, mp = _best(lambda: grain_alloy_map(_model(), L, x, 300.0, host_a="Si", host_b="Ge"))
    t_one, _ = _best(lambda: [start.kappa(300.0) for _ in range(200)])
    t_one /= 200
    return [
        ("fit: one kappa(T) call, 40 T, L+T, 4 mechanisms", t_kappa * 1e3, "ms"),
        ("fit: single start, 3 free, 40 points", t1, f"s   (target < 0.5 s; {r1.nfev} model evaluations)"),
        ("fit: 16 starts, 3 free, 40 points", t16, f"s   (target < 5 s; {r16.nfev} evaluations)"),
        ("what-if: one kappa call at one T", t_one * 1e3, "ms  (why the map does not loop over models)"),
        ("what-if: 50 x 50 grain x alloy map, one T", tmap, f"s   (target < 1 s; {mp.kappa.size} cells)"),
    ]


if __name__ == "__main__":
    rows = run()
    width = max(len(r[0]) for r in rows)
    print(f"kinetic fitting benchmarks ({os.cpu_count()} CPUs, numpy {np.__version__})")
    for label, value, unit in rows:
        print(f"  {label:<{width}}  {value:>10.4g} {unit}")
