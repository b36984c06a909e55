"""What-if speed and memory: grain x alloy maps of any size.

    python benchmarks/bench_whatif.py      # or as part of: python benchmarks/run.py

Maps start from the hosts' default (calibrated) models, Si-Ge, at 300 K,
lengths 10 nm - 1 mm (log), fractions 0-1. Targets (issue 8 brief):
200 x 200 at one temperature < 1 s; 1000 x 1000 streamed in chunks
(kinetic.whatif.iter_grain_alloy_map) with peak traced memory < 200 MB
(tracemalloc, which counts numpy buffers). Times are wall clock, best of a
few repeats for the small map, one run for the large one.
"""
from __future__ import annotations

import os
import sys
import time
import tracemalloc
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from kinetic.whatif import grain_alloy_map, iter_grain_alloy_map  # noqa: E402

HOSTS = {"host_a": "Si", "host_b": "Ge"}


def _small(n=200):
    L = np.geomspace(1e-8, 1e-3, n)
    x = np.linspace(0.0, 1.0, n)
    best = float("inf")
    for _ in range(3):
        t0 = time.perf_counter()
        mp = grain_alloy_map(None, L, x, 300.0, **HOSTS)
        best = min(best, time.perf_counter() - t0)
    return best, mp


def _streamed(n=1000, rows=50):
    """Peak traced memory [bytes] and wall time [s] of a streamed n x n map (rows kept as float32 summary)."""
    L = np.geomspace(1e-8, 1e-3, n)
    x = np.linspace(0.0, 1.0, n)
    tracemalloc.start()
    t0 = time.perf_counter()
    minimum = np.full(n, np.inf)  # what a caller might keep: the lowest kappa per length
    cells = 0
    for _start, k, _g in iter_grain_alloy_map(None, L, x, 300.0, rows=rows, **HOSTS):
        minimum = np.minimum(minimum, k.min(axis=0))
        cells += k.size
    dt = time.perf_counter() - t0
    _cur, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    return dt, peak, cells


def run():
    """[(label, value_str, target_str), ...]."""
    t200, mp = _small()
    t1000, peak, cells = _streamed()
    return [
        ("what-if: 200 x 200 grain x alloy map, one T (default models)", f"{t200:.3f} s",
         f"target < 1 s ({mp.kappa.size} cells)"),
        ("what-if: 1000 x 1000 map streamed in chunks of 50 fractions", f"{t1000:.1f} s", f"{cells} cells"),
        ("what-if: 1000 x 1000 map, peak traced memory", f"{peak / 2**20:.1f} MB", "target < 200 MB"),
    ]


if __name__ == "__main__":
    rows = run()
    width = max(len(r[0]) for r in rows)
    print(f"kinetic what-if benchmarks ({os.cpu_count()} CPUs, numpy {np.__version__})")
    for label, value, target in rows:
        print(f"  {label:<{width}}  {value:>10}  {target}")
