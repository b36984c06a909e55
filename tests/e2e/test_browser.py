"""Real browser: open workbook 1 in JupyterLab, run it, move a slider with the keyboard.

Checks that the workbench renders in Lab (ipywidgets + ipympl front ends), that
one arrow-key step on a slider's handle goes to the kernel and comes back as a
changed readout of kappa at the chosen temperature and as new canvas pixels,
prints the input-to-readout and input-to-pixels times, and writes the README
screenshot to docs/workbench.png.
"""
from __future__ import annotations

import re
import statistics
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parents[2]
SCREENSHOT = REPO / "docs" / "workbench.png"
NOTEBOOK = "01_fit_one_curve.ipynb"

pytestmark = pytest.mark.e2e

_WATCH = """
() => {
  const readout = document.querySelector('.kinetic-readout-lattice');
  const handle = document.querySelector('.kinetic-slider-umklapp-gruneisen .noUi-handle');
  window.__kin = {changedAt: null, keyAt: null};
  handle.addEventListener('keydown', () => { window.__kin.keyAt = performance.now(); }, true);
  new MutationObserver(() => {
    if (window.__kin.changedAt === null) window.__kin.changedAt = performance.now();
  }).observe(readout, {subtree: true, childList: true, characterData: true});
}
"""
_ARM = "() => { window.__kin.changedAt = null; window.__kin.keyAt = null; }"
_CANVAS = "document.querySelector('.kinetic-plot-conductivity canvas')"


def _number(text: str) -> float:
    m = re.search(r"=\s*([-+0-9.eE]+)", text)
    assert m, f"no number in readout {text!r}"
    return float(m.group(1))


def test_slider_moves_readout_and_figure(page, lab):
    from playwright.sync_api import expect

    page.goto(lab.url(NOTEBOOK))
    expect(page.locator("#jp-main-statusbar")).to_contain_text("(ipykernel) | Idle", timeout=60_000)
    page.evaluate("() => jupyterapp.commands.execute('application:toggle-left-area')")
    page.get_by_role("menuitem", name="Run", exact=True).click()
    page.get_by_role("menuitem", name="Run All Cells", exact=True).click()

    readout = page.locator(".kinetic-readout-lattice")
    handle = page.locator(".kinetic-slider-umklapp-gruneisen .noUi-handle")
    handle.wait_for(timeout=60_000)
    # the last code cell sets the sliders to the fitted values and prints the readout: wait for it
    expect(page.locator(".jp-OutputArea-output", has_text="readout:")).to_be_visible(timeout=60_000)
    expect(page.locator("#jp-main-statusbar")).to_contain_text("(ipykernel) | Idle", timeout=30_000)
    page.wait_for_function(f"() => {{ const c = {_CANVAS}; return c && c.width > 100; }}", timeout=30_000)
    page.wait_for_timeout(500)  # let the first frames land
    start_text = readout.inner_text()
    start = _number(start_text)
    page.evaluate(_WATCH)

    readout_ms, pixels_ms = [], []
    previous = start
    for _ in range(5):
        before_png = page.evaluate(f"() => {_CANVAS}.toDataURL()")
        page.evaluate(_ARM)
        handle.focus()
        page.keyboard.press("ArrowRight")  # one step of the log slider: a larger Grüneisen parameter
        page.wait_for_function("() => window.__kin.changedAt !== null", timeout=30_000)
        t_key, t_text = page.evaluate("() => [window.__kin.keyAt, window.__kin.changedAt]")
        page.wait_for_function(
            f"old => {{ if ({_CANVAS}.toDataURL() !== old) {{ window.__kin.pixelsAt = performance.now();"
            " return true; } return false; }", arg=before_png, timeout=30_000, polling=5)
        t_pixels = page.evaluate("() => window.__kin.pixelsAt")
        readout_ms.append(t_text - t_key)
        pixels_ms.append(t_pixels - t_key)
        now = _number(readout.inner_text())
        # stronger Umklapp scattering lowers kappa (Matthiessen's rule; Callaway 1959, Eq. 8)
        assert now < previous, (previous, now)
        previous = now
    assert previous != start
    print(f"\nbrowser: arrow key -> readout of kappa at the chosen temperature: median "
          f"{statistics.median(readout_ms):.0f} ms (all {', '.join(f'{t:.0f}' for t in readout_ms)} ms)")
    print(f"browser: arrow key -> new k(T) canvas pixels: median {statistics.median(pixels_ms):.0f} ms "
          f"(all {', '.join(f'{t:.0f}' for t in pixels_ms)} ms)")
    print(f"browser: readout went from {start_text!r} to {readout.inner_text()!r}")

    # the Fit button runs the fit in a background thread of the kernel and fills the results table
    page.locator(".kinetic-fit-starts input").fill("6")
    page.locator(".kinetic-fit-starts input").press("Enter")
    page.locator(".kinetic-fit").click()
    expect(page.locator(".kinetic-fit-status")).to_contain_text("Fit done", timeout=60_000)
    expect(page.locator(".kinetic-fit-status")).to_contain_text("6 start(s)")
    expect(page.locator(".kinetic-fit-table")).to_contain_text("umklapp.gruneisen")
    page.locator(".kinetic-fit-use").click()
    # back at the fit the notebook made (same data, same best point: the same four digits)
    expect(readout).to_have_text(start_text, timeout=30_000)

    # the README screenshot: the workbench as the user sees it, on a screen tall enough to hold it
    workbench = page.locator(".kinetic-workbench")
    height = int(workbench.bounding_box()["height"]) + 260
    page.set_viewport_size({"width": 1440, "height": max(1000, min(height, 2400))})
    workbench.scroll_into_view_if_needed()
    page.wait_for_timeout(600)
    SCREENSHOT.parent.mkdir(exist_ok=True)
    workbench.screenshot(path=str(SCREENSHOT))
    assert SCREENSHOT.stat().st_size > 20_000
