"""Calibrate the compound presets on reference/compound_kappa.csv with kinetic.fit.

Run from the repository root:  PYTHONPATH=$PWD python reference/calibrate_compounds.py [NAME ...]

For each material the reference-sample model is one averaged Debye branch
(Callaway's formulation; velocity and Debye temperature from the preset) with

* boundary scattering at the reference sample's size (``BOUNDARY`` below; the
  tables start at >= 150 K where it hardly matters),
* Klemens point-defect scattering with Gamma of the natural isotopes and the
  compound's site-mass disorder (:func:`kinetic.disorder.material_gamma`), fixed,
* Umklapp in the Grueneisen form, gamma and b fitted (b held at 3, Slack &
  Galginaitis 1964, where the table's range cannot fix it),
* normal processes, 1/tau_N = beta_N x (Umklapp rate at the same omega and T), with
  Callaway's correction; beta_N = 0 here because every table lies at T >~ theta/3
  where the N/U split cannot be told apart from one resistive rate in k(T) alone
  (common practice), and the fitted gamma absorbs it.

It prints the ``model`` / ``calibration`` dicts stored in the presets.
"""
import csv
import sys
from collections import defaultdict
from pathlib import Path

import numpy as np

from kinetic import materials
from kinetic.disorder import material_gamma
from kinetic.fitting import fit
from kinetic.lattice import LatticeModel
from kinetic.scattering import Boundary, PointDefect, Umklapp

HERE = Path(__file__).resolve().parent
#: reference-sample boundary length [m] (a mm-size single crystal; common practice)
BOUNDARY = 2e-3
#: materials whose table cannot fix b (range too narrow or pure 1/T): b held at 3
FIX_B: set = set()


def table():
    out = defaultdict(list)
    with open(HERE / "compound_kappa.csv", newline="") as f:
        for row in csv.DictReader(f):
            out[row["material"]].append(row)
    return out


def build(mat, gruneisen=1.5, b=3.0, boundary=BOUNDARY):
    sc = [Boundary(boundary), PointDefect.from_gamma(material_gamma(mat), mat.volume_per_atom),
          Umklapp.from_material(mat, gruneisen=gruneisen, b=b)]
    return LatticeModel.from_material(mat, scattering=sc, split_branches=False)


def calibrate(name, rows):
    mat = materials.get(name)
    T = np.array([float(r["temperature_K"]) for r in rows])
    k = np.array([float(r["kappa_W_per_mK"]) for r in rows])
    free = ["umklapp.gruneisen"] + ([] if name in FIX_B else ["umklapp.b"])
    res = fit(build(mat), {"temperature": T, "kappa": k, "kind": "lattice"}, free, n_starts=4)
    m = res.models[0]
    model_k = m.kappa(T)
    rms = float(np.sqrt(np.mean((model_k / k - 1) ** 2)) * 100)
    u = m.mechanism("umklapp")
    k300 = float(m.kappa(np.array([300.0]))[0])
    ref300 = k[T == 300][0] if np.any(T == 300) else None
    entry = {"branches": "avg", "dispersion": "debye",
             "mechanisms": {"boundary": {"length": BOUNDARY},
                            "point_defect": {"gamma": round(material_gamma(mat), 8)},
                            "umklapp": {"gruneisen": round(float(u.gruneisen), 4),
                                        "b": round(float(u.b), 3)}},
             "free": free, "source": rows[0]["source"], "table_how": rows[0]["how"],
             "table": "reference/compound_kappa.csv", "t_min": float(T.min()), "t_max": float(T.max()),
             "rms": round(rms / 100, 4), "n_points": int(T.size), "sample": rows[0]["note"],
             "max_deviation": round(float(np.max(np.abs(model_k / k - 1))), 4),
             "reference_300K": None if ref300 is None else float(ref300), "model_300K": round(k300, 4),
             "uncertainty_percent": float(rows[0]["uncertainty_percent"])}
    return entry


if __name__ == "__main__":
    tab = table()
    names = sys.argv[1:] or list(tab)
    for n in names:
        e = calibrate(n, tab[n])
        print(f"{n}: gamma={e['mechanisms']['umklapp']} rms={e['rms']:.4f} "
              f"k300={e['model_300K']} ref={e['reference_300K']}")
