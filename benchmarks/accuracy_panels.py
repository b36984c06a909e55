"""Accuracy of the engine's quadrature panels against adaptive quadrature (a study, not a speed figure).

    python benchmarks/accuracy_panels.py      # about a minute on 2 cores

60 random Debye models (one averaged or split L + T branches; a boundary always; point defects,
Umklapp, Normal processes, free carriers and precipitates each drawn at random, with the ranges of
the property tests in tests/test_lattice.py), 12 temperatures from 0.1 K to 5000 K, against
:func:`kinetic.checks.kappa_adaptive` at epsrel 1e-10. Prints the median, 99th percentile and worst
relative error for the panel set in use and for sets with fewer nodes, which is how the 91-node
set was kept: each smaller set tried here goes past 1e-6 at its worst model (last run: in use
median 4.6e-10, worst 4.0e-7; 85 nodes worst 1.5e-6; 79 nodes worst 6.0e-6).
"""
from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from kinetic import (Boundary, Branch, ElectronPhonon, LatticeModel, Normal, PointDefect,  # noqa: E402
                     Precipitate, Umklapp, lattice)
from kinetic import quadrature as quad  # noqa: E402
from kinetic.checks import kappa_adaptive  # noqa: E402

CANDIDATES = {
    "in use": quad.PANELS,
    "9 nodes per low panel": ((1.0, 1.0, 7), (1.0, 4.0, 8), (2.0, 16.0, 9)),
    "8 nodes per low panel": ((1.0, 1.0, 7), (1.0, 4.0, 8), (2.0, 16.0, 8)),
    "7 mid, 9 low": ((1.0, 1.0, 7), (1.0, 4.0, 7), (2.0, 16.0, 9)),
}


def random_models(n=60, seed=12345):
    rng = np.random.default_rng(seed)

    def lg(lo, hi):
        return 10 ** rng.uniform(lo, hi)

    out = []
    for _ in range(n):
        vL, th = rng.uniform(2000, 18000), rng.uniform(80, 2300)
        if rng.random() < 0.5:
            br = [Branch(vL, th, 1, name="L"),
                  Branch(vL * rng.uniform(0.4, 0.9), th * rng.uniform(0.4, 0.9), 2, name="T")]
        else:
            br = [Branch(vL, th, 3)]
        mech = [Boundary(lg(-8, -2))]
        if rng.random() < 0.5:
            mech.append(PointDefect(A=lg(-47, -41)))
        if rng.random() < 0.5:
            mech.append(Umklapp(B=lg(-21, -17), b=rng.uniform(1.5, 6)))
        if rng.random() < 0.5:
            mech.append(Normal(B=lg(-26, -22)))
        if rng.random() < 0.5:
            mech.append(ElectronPhonon(C=lg(-7, -3)))
        if rng.random() < 0.3:
            mech.append(Precipitate(radius=lg(-9.5, -7), number_density=lg(20, 24)))
        out.append(LatticeModel(br, mech))
    return out


def main():
    from kinetic import _callaway, grid

    models = random_models()
    T = np.geomspace(0.1, 5000.0, 12)
    refs = [kappa_adaptive(m, T, epsrel=1e-10) for m in models]
    in_use = (quad.PANELS, quad.EDGE_PANELS)
    try:
        for name, panels in CANDIDATES.items():
            quad._set_rules(panels=panels, edge_panels=in_use[1][:5] + tuple(panels))
            lattice.clear_cache()
            for table in (grid._ROWS, grid._SERIES_ROWS, _callaway._TABLES):
                table.clear()
            err = np.concatenate([np.abs(m.kappa(T) / r - 1.0) for m, r in zip(models, refs)])
            print(f"{name:24s} {quad.n_nodes('debye'):3d} nodes  median {np.median(err):.1e}  "
                  f"p99 {np.quantile(err, 0.99):.1e}  worst {err.max():.1e}")
    finally:
        quad._set_rules(*in_use)
        lattice.clear_cache()
        for table in (grid._ROWS, grid._SERIES_ROWS, _callaway._TABLES):
            table.clear()


if __name__ == "__main__":
    main()
