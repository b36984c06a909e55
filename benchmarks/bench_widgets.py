"""Workbench speed: in the kernel (measured here) and in the real browser (read from the e2e test).

    python benchmarks/bench_widgets.py

In the kernel: the full silicon model (longitudinal + transverse branches;
boundary, point-defect and Umklapp scattering, the engine's default model
with 1 um grains). A "move" is one slider step of the grain size (what one
arrow-key press does in the browser), timed from setting the slider's value
until the k(T) frame is encoded for the browser (the canvas in the state it has
with a browser attached: it sends frames, not a notebook image); a "switch" is
a mechanism toggled off or on, timed the same way.

In the browser: ``tests/e2e/test_browser.py`` (JupyterLab + Chromium) writes
``artifacts/browser_timings.json``: from the key or click event in the page to
new canvas pixels. Targets (issue 10): slider median <= 120 ms, mechanism
switch <= 200 ms; the canvas after 50 moves and a record load equals a fresh
render. Those rows appear when the file exists (run the e2e test first).
"""
from __future__ import annotations

import json
import re
import statistics
import sys
import time
import warnings
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

import matplotlib

matplotlib.use("module://ipympl.backend_nbagg")

import numpy as np

N_MOVES = 40


class Shown(str):
    """A measured value in words; a numeric format spec keeps only its width (``benchmarks/run.py``
    prints ``{value:>12.4g}``)."""

    def __format__(self, spec):
        try:
            return super().__format__(spec)
        except ValueError:
            m = re.match(r"([<>^]?)(\d*)", spec)
            return super().__format__((m.group(1) or ">") + m.group(2))
BROWSER_TIMINGS = ROOT / "artifacts" / "browser_timings.json"


def _workbench():
    from widgets import Workbench, default_model

    model = default_model("Si", grain_size=1e-6, split_branches=True)
    wb = Workbench(model=model, data=None)
    canvas = wb.plots["conductivity"].canvas  # as with a browser attached: frames are sent, no notebook image
    canvas.draw()
    canvas.syncing_data_url = False
    return wb


def _frame(canvas):
    """Encode the pending frame, as ipympl does for a connected browser."""
    canvas.get_diff_image()


def _moves(wb):
    plot = wb.plots["conductivity"]
    key = next(k for k in wb.controls if k.endswith(".length"))
    slider = wb.controls[key].slider
    start = np.log10(slider.value)
    times = []
    for k in range(N_MOVES):
        value = 10.0 ** (start + slider.step * (1 + k % 2))  # right and left, as arrow keys
        t0 = time.perf_counter()
        slider.value = value
        _frame(plot.canvas)
        times.append(time.perf_counter() - t0)
    return times


def _switches(wb):
    plot = wb.plots["conductivity"]
    toggle = wb.cards["point_defect"].toggle
    times = []
    for _ in range(10):
        t0 = time.perf_counter()
        toggle.value = not toggle.value
        _frame(plot.canvas)
        times.append(time.perf_counter() - t0)
    return times


def _browser_rows():
    if not BROWSER_TIMINGS.exists():
        return [("widgets (browser): run tests/e2e/test_browser.py for browser timings", "-", "")]
    data = json.loads(BROWSER_TIMINGS.read_text())
    rows = []
    spec = {"slider_key_to_pixels": ("arrow key on a slider -> new k(T) pixels, median", "ms", "<= 120 ms"),
            "mechanism_toggle_to_pixels": ("mechanism on/off -> redrawn k(T), median", "ms", "<= 200 ms"),
            "fresh_render_differing_pixels_percent": ("canvas after 50 moves + record load vs fresh render",
                                                      "% pixels differ", "0 %")}
    for key, (label, unit, target) in spec.items():
        if key in data:
            d = data[key]
            extra = f" (all {', '.join(f'{v:.0f}' for v in d['all_ms'])})" if unit == "ms" else ""
            rows.append((f"widgets (browser): {label}", f"{d['median_ms']:.3g} {unit}{extra}", f"target {target}"))
    return rows


def run():
    """Rows ``(label, value_str, target_str)`` for benchmarks/run.py."""
    warnings.filterwarnings("ignore", message=r"Passing unrecognized arguments to super\(Toolbar\)")
    _workbench().close()  # imports and first-use costs out of the way
    t0 = time.perf_counter()
    wb = _workbench()
    t_build = time.perf_counter() - t0
    try:
        moves = _moves(wb)
        switches = _switches(wb)
    finally:
        wb.close()
    ms = 1e3
    rows = [
        ("widgets (kernel): slider step -> k(T) frame encoded, median", f"{statistics.median(moves) * ms:.3g} ms",
         "part of the browser's 120 ms"),
        ("widgets (kernel): same, 90th percentile", f"{float(np.percentile(moves, 90)) * ms:.3g} ms", ""),
        ("widgets (kernel): mechanism on/off -> k(T) frame encoded, median",
         f"{statistics.median(switches) * ms:.3g} ms", "part of the browser's 200 ms"),
        ("widgets (kernel): build a Workbench (Si, L+T, 3 mechanisms)", f"{t_build * ms:.0f} ms", ""),
    ]
    return [(label, Shown(value), target) for label, value, target in rows + _browser_rows()]


def main():
    rows = run()
    width = max(len(r[0]) for r in rows)
    for label, value, target in rows:
        print(f"  {label:<{width}}  {value:>14}  {target}")


if __name__ == "__main__":
    main()
