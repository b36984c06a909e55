"""Workbench speed: from a slider value change to the redrawn figure (in-process).

    python benchmarks/bench_widgets.py

The model is the full one: silicon preset, longitudinal + transverse
branches, boundary + point-defect + Umklapp + normal scattering. A "move" is
one slider step of the boundary length (what one arrow-key press does in the
browser). Each move is timed from setting the slider's value until the
k(T) figure is rendered: the observer path (model, readouts, artists) plus
the render it triggers, i.e. the fast redraw over the cached background, or
``fig.canvas.draw()`` when the axes changed and the front end would ask for a
full redraw. The canvas is put in the state it has when a browser is
connected (it sends image diffs only; without a front end ipympl also encodes
a full PNG for the notebook file on every render).

Target (issue): under 50 ms from the value change to the redrawn figure.
"""
from __future__ import annotations

import statistics
import sys
import time
import warnings
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import matplotlib  # noqa: E402

matplotlib.use("module://ipympl.backend_nbagg")

import numpy as np  # noqa: E402

N_MOVES = 60


def _workbench():
    from widgets import Workbench, default_model

    model = default_model("Si", grain_size=1e-6, split_branches=True)
    assert set(model.mechanism_names) == {"boundary", "point_defect", "umklapp", "normal"}
    assert model.branch_names == ("L", "T")
    return Workbench(model=model, data=None)


def _moves(wb, force_full: bool):
    """Times [s] of N_MOVES one-step moves of the boundary-length slider, and how many drew in full."""
    plot = wb.plots["conductivity"]
    canvas = plot.canvas
    canvas.draw()
    canvas.syncing_data_url = False  # as with a browser attached: diffs only
    slider = wb.controls["boundary.length"].slider
    start = np.log10(slider.value)
    times, full = [], 0
    for k in range(N_MOVES):
        # back and forth by one step, as repeated arrow-key presses right and left
        value = 10.0 ** (start + slider.step * (1 + k % 2))
        t0 = time.perf_counter()
        slider.value = value
        if force_full or plot.needs_full_draw:
            canvas.draw()
            full += 1
        times.append(time.perf_counter() - t0)
    assert plot.full_draws + plot.blits >= N_MOVES  # every move was rendered
    return times, full


def run():
    """Rows (label, value, unit) for benchmarks/run.py."""
    warnings.filterwarnings("ignore", message=r"Passing unrecognized arguments to super\(Toolbar\)")
    wb = _workbench()
    try:
        t_build0 = time.perf_counter()
        wb2 = _workbench()
        t_build = time.perf_counter() - t_build0
        wb2.close()
        fast, n_full = _moves(wb, force_full=False)
        slow, _ = _moves(wb, force_full=True)
    finally:
        wb.close()
    ms = 1e3
    return [
        ("widgets: slider -> redrawn k(T), median (fast path)", statistics.median(fast) * ms,
         f"ms  (target < 50 ms; {n_full} of {len(fast)} moves drew in full)"),
        ("widgets: slider -> redrawn k(T), 90th percentile", float(np.percentile(fast, 90)) * ms, "ms"),
        ("widgets: slider -> k(T) with a full canvas.draw(), median", statistics.median(slow) * ms, "ms"),
        ("widgets: build a Workbench (split branches, 4 mechanisms)", t_build * ms, "ms"),
    ]


def main():
    rows = run()
    width = max(len(r[0]) for r in rows)
    for label, value, unit in rows:
        print(f"  {label:<{width}}  {value:>10.4g} {unit}")


if __name__ == "__main__":
    main()
