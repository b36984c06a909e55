"""Speed benchmarks of kinetic, printed side by side in one run.

    python benchmarks/run.py            # every benchmark present
    python benchmarks/run.py --engine   # the engine part only

Runs, when present, ``bench_engine.py``, ``bench_fit.py``, ``bench_whatif.py``,
``bench_cli.py`` and ``bench_widgets.py`` from this folder. Each exposes
``run() -> list[(label, value, target)]`` (value and target as text; a number
is formatted here). A missing file is skipped and said so; a benchmark that
fails prints its error in place of its rows, and the others still run.

Speed ratios are against the script a user would write by hand (a per-temperature
``scipy.integrate.quad`` loop at scipy's default tolerances, see
bench_engine.py); the tight adaptive check :func:`kinetic.checks.kappa_adaptive`
appears only as the accuracy reference. The last line says how long the whole
run took: about 20-30 s on 2 shared CPUs (measured 22 s with the engine, fit and
widget benchmarks; the engine part alone 7-11 s, most of it the accuracy reference).
"""
from __future__ import annotations

import argparse
import importlib.util
import os
import platform
import sys
import time
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

#: benchmark modules in print order
BENCHES = ("bench_engine", "bench_fit", "bench_whatif", "bench_cli", "bench_widgets")


def _load(name):
    path = HERE / f"{name}.py"
    if not path.exists():
        return None
    spec = importlib.util.spec_from_file_location(name, path)
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


def _text(v) -> str:
    if isinstance(v, str):
        return v
    try:
        return f"{float(v):.4g}"
    except (TypeError, ValueError):
        return str(v)


def collect(names=BENCHES):
    """[(bench name, rows or error text, seconds)] for the named benchmark modules."""
    out = []
    for name in names:
        t0 = time.perf_counter()
        try:
            mod = _load(name)
            if mod is None:
                out.append((name, "not present (skipped)", 0.0))
                continue
            rows = [tuple(_text(x) for x in row) + ("",) * (3 - len(row)) for row in mod.run()]
        except Exception as exc:  # one failing benchmark must not hide the others
            rows = f"failed: {type(exc).__name__}: {exc}"
        out.append((name, rows, time.perf_counter() - t0))
    return out


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--engine", action="store_true", help="engine benchmark only")
    args = ap.parse_args(argv)
    t_all = time.perf_counter()
    results = collect(("bench_engine",) if args.engine else BENCHES)
    rows = [r for _, rs, _ in results if not isinstance(rs, str) for r in rs]
    # column widths from the typical rows (a long value, e.g. a list of browser timings, just runs on)
    width = min(max([len(r[0]) for r in rows] + [40]), 72)
    vwidth = min(max([len(str(r[1])) for r in rows] + [8]), 12)
    print(f"kinetic benchmarks ({os.cpu_count()} CPUs, Python {platform.python_version()}, numpy {np.__version__}; "
          "each benchmark says how it times)")
    for name, rs, secs in results:
        print(f"[{name}]" + (f"  ({secs:.1f} s)" if secs else ""))
        if isinstance(rs, str):
            print(f"  {rs}")
            continue
        for label, value, target in rs:
            print(f"  {label:<{width}}  {value:>{vwidth}}  {target}")
    print(f"whole run: {time.perf_counter() - t_all:.1f} s")


if __name__ == "__main__":
    main()
