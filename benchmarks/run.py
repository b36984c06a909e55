"""Speed benchmarks of kinetic, printed side by side in one run.

    python benchmarks/run.py            # engine, fitting and workbench figures
    python benchmarks/run.py --engine   # the engine part only

Engine: kappa at 200 temperatures for longitudinal + transverse branches with
boundary, point-defect, Umklapp and normal scattering, against the same
integrals done by a per-temperature scipy.integrate.quad loop
(kinetic.checks.kappa_adaptive, epsrel 1e-9), with their ratio and largest relative
difference. Targets (issue 2): >= 100x faster at <= 1e-6 difference, < 2 ms.
"""
from __future__ import annotations

import argparse
import importlib.util
import os
import sys
import time
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

from kinetic import Boundary, Branch, LatticeModel, Normal, PointDefect, Umklapp  # noqa: E402
from kinetic.checks import kappa_adaptive  # noqa: E402


def _best_of(fn, repeat=7, number=20):
    best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        for _ in range(number):
            fn()
        best = min(best, (time.perf_counter() - t0) / number)
    return best


def engine_model():
    """Silicon-like split-branch model (numbers of the Si preset's order; for timing only)."""
    L = Branch(8400.0, 570.0, 1, name="L")
    T = Branch(5800.0, 400.0, 2, name="T")
    return LatticeModel([L, T], [Boundary(5e-3), PointDefect(A=1.3e-45), Umklapp(B=2e-19), Normal(B=1e-24)])


def engine_rows():
    model = engine_model()
    T = np.linspace(2.0, 1000.0, 200)
    fast = _best_of(lambda: model.kappa(T))
    k_fast = model.kappa(T)
    t0 = time.perf_counter()
    k_slow = kappa_adaptive(model, T, epsrel=1e-9)
    slow = time.perf_counter() - t0
    diff = float(np.max(np.abs(k_fast / k_slow - 1.0)))
    return [
        ("engine: kappa, 200 T, L+T, 4 mechanisms (vectorised)", fast * 1e3, "ms  (target < 2 ms)"),
        ("engine: same by per-temperature scipy quad loop", slow * 1e3, "ms"),
        ("engine: speed-up (loop / vectorised)", slow / fast, "x   (target >= 100x)"),
        ("engine: max relative difference", diff, "    (target <= 1e-6)"),
    ]


def _load(name):
    path = HERE / f"{name}.py"
    if not path.exists():
        return None
    spec = importlib.util.spec_from_file_location(name, path)
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--engine", action="store_true", help="engine benchmark only")
    args = ap.parse_args(argv)
    rows = engine_rows()
    if not args.engine:
        for name in ("bench_fit", "bench_widgets"):
            mod = _load(name)
            if mod is not None:
                rows += mod.run()
    width = max(len(r[0]) for r in rows)
    print(f"kinetic benchmarks ({os.cpu_count()} CPUs, numpy {np.__version__})")
    for label, value, unit in rows:
        print(f"  {label:<{width}}  {value:>12.4g} {unit}")


if __name__ == "__main__":
    main()
