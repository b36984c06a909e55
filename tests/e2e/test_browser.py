"""Real browser: the workbooks in JupyterLab, driven as a user would with Chromium.

Covers (issue 10): the layout on laptop screens with Lab's side panel open (the
k(T) plot and the fit results on screen together, nothing cut off, no truncated
label), speed from a key press to new pixels, a mechanism switch, stale marks,
material switches, the what-if progress, exports (names, formats, permissions),
the keyboard (Tab reaches every control and leaves the figure), and a pixel
comparison of the canvas with a fresh render of the same state after 50 slider
moves and a record load. Workbooks 2 and 3 must not report stale studies after
Run All.

Timings are printed and written to ``artifacts/browser_timings.json`` (read by
``benchmarks/bench_widgets.py``); they are measurements, not pass/fail checks.
Screenshots go to ``artifacts/``; ``docs/workbench.png`` is rewritten only with
``KINETIC_UPDATE_SCREENSHOT=1``.
"""
from __future__ import annotations

import base64
import json
import os
import re
import statistics
import time
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parents[2]
ARTIFACTS = REPO / "artifacts"
SCREENSHOT = REPO / "docs" / "workbench.png"
pytestmark = pytest.mark.e2e

CANVAS = "document.querySelector('.kinetic-plot-conductivity .jupyter-matplotlib-canvas-div canvas')"
_KERNEL_RUN = """
async (code) => {
  const w = jupyterapp.shell.currentWidget;
  const kernel = w.sessionContext.session.kernel;
  const fut = kernel.requestExecute({code: code, silent: false, store_history: false});
  let out = '';
  fut.onIOPub = (msg) => {
    if (msg.header.msg_type === 'stream') { out += msg.content.text; }
    if (msg.header.msg_type === 'error') { out += 'ERROR ' + msg.content.ename + ': ' + msg.content.evalue; }
  };
  await fut.done;
  return out;
}
"""
_TRUNCATED = """
(root) => {
  const sel = '.widget-label, .widget-label-basic, .widget-button, .widget-toggle-button, button, '
            + '.lm-TabBar-tabLabel, .jupyter-widget-Collapse-header, .widget-dropdown select, '
            + '.widget-checkbox label, .kinetic-label, .kinetic-readout, .kinetic-legend span';
  const out = [];
  for (const el of root.querySelectorAll(sel)) {
    const r = el.getBoundingClientRect();
    if (r.width === 0 || r.height === 0) { continue; }          // hidden (folded section, other tab)
    if (el.scrollWidth > el.clientWidth + 1) { out.push((el.innerText || el.value || '').trim()); }
  }
  return out;
}
"""


def _timings_file() -> Path:
    ARTIFACTS.mkdir(exist_ok=True)
    return ARTIFACTS / "browser_timings.json"


def _record(key: str, values: list) -> None:
    path = _timings_file()
    data = json.loads(path.read_text()) if path.exists() else {}
    data[key] = {"median_ms": statistics.median(values), "all_ms": [round(v, 1) for v in values]}
    path.write_text(json.dumps(data, indent=1))


def _open(page, lab, notebook, *, width=1366, height=768, side_panel=True):
    from playwright.sync_api import expect

    page.set_viewport_size({"width": width, "height": height})
    page.goto(lab.url(notebook))
    expect(page.locator("#jp-main-statusbar")).to_contain_text("(ipykernel) | Idle", timeout=60_000)
    collapsed = page.evaluate("() => jupyterapp.shell.leftCollapsed")
    if collapsed == side_panel:
        page.evaluate("() => jupyterapp.commands.execute('application:toggle-left-area')")
    started = "() => [...document.querySelectorAll('.jp-mod-current .jp-InputPrompt')].some(p => /\\[(\\*|\\d+)\\]/.test(p.innerText))"
    for _ in range(4):  # "Run All" right after the kernel says Idle is sometimes ignored: try again
        page.get_by_role("menuitem", name="Run", exact=True).click()
        page.get_by_role("menuitem", name="Run All Cells", exact=True).click()
        try:
            page.wait_for_function(started, timeout=10_000)
            break
        except Exception:  # noqa: BLE001 - not started yet
            page.keyboard.press("Escape")
    page.locator(".kinetic-workbench").first.wait_for(timeout=90_000)
    page.wait_for_function("() => !document.querySelector('.jp-mod-current .jp-InputArea-prompt') || "
                           "![...document.querySelectorAll('.jp-mod-current .jp-InputPrompt')]"
                           ".some(p => p.innerText.includes('*'))", timeout=120_000)
    expect(page.locator("#jp-main-statusbar")).to_contain_text("(ipykernel) | Idle", timeout=60_000)
    page.wait_for_timeout(800)


def _kernel(page, code: str) -> str:
    return page.evaluate(_KERNEL_RUN, code)


def _settle(page, expr=CANVAS, quiet_ms=600, timeout_s=30):
    """Wait until the canvas has not changed for ``quiet_ms``."""
    last, since, end = None, time.monotonic(), time.monotonic() + timeout_s
    while time.monotonic() < end:
        now = page.evaluate(f"() => {expr}.toDataURL()")
        if now != last:
            last, since = now, time.monotonic()
        elif (time.monotonic() - since) * 1e3 >= quiet_ms:
            return now
        page.wait_for_timeout(100)
    return last


_MARK = """(el, kind) => { window.__kinIn = null;
    el.addEventListener(kind, () => { if (window.__kinIn === null) window.__kinIn = performance.now(); },
                        {capture: true, once: true}); }"""


def _key_to_pixels(page, handle, key: str) -> float:
    """From the key event in the page to new pixels on the canvas [ms]."""
    before = page.evaluate(f"() => {CANVAS}.toDataURL()")
    handle.focus()
    handle.evaluate(_MARK, "keydown")
    page.keyboard.press(key)
    page.wait_for_function(
        f"old => {{ if ({CANVAS}.toDataURL() !== old) {{ window.__kinT = performance.now(); return true; }}"
        " return false; }", arg=before, timeout=30_000, polling=5)
    return page.evaluate("() => window.__kinT - window.__kinIn")


def _click_to_pixels(page, locator) -> float:
    """From the click event in the page to new pixels on the canvas [ms]."""
    before = page.evaluate(f"() => {CANVAS}.toDataURL()")
    locator.evaluate(_MARK, "click")
    locator.click()
    page.wait_for_function(
        f"old => {{ if ({CANVAS}.toDataURL() !== old) {{ window.__kinT = performance.now(); return true; }}"
        " return false; }", arg=before, timeout=30_000, polling=5)
    return page.evaluate("() => window.__kinT - window.__kinIn")


def _work_tab(page, title: str):
    page.locator(".kinetic-work .lm-TabBar-tab", has_text=title).first.click()
    page.wait_for_timeout(200)


def _section(page, title: str):
    header = page.locator(".kinetic-sections .jupyter-widget-Collapse-header", has_text=title).first
    if "jupyter-widget-Collapse-open" not in (header.evaluate("h => h.parentElement.className") or ""):
        header.click()
    page.wait_for_timeout(200)


def _layout_check(page, label: str):
    """The k(T) canvas and the fit results visible together; nothing off the right edge."""
    wb = page.locator(".kinetic-workbench").first
    wb.evaluate("el => el.scrollIntoView({block: 'start'})")
    page.wait_for_timeout(300)
    _work_tab(page, "Fit")
    box = page.evaluate("""() => {
        const c = document.querySelector('.kinetic-plot-conductivity canvas');
        const t = document.querySelector('.kinetic-fit-table');
        const w = document.querySelector('.kinetic-work');
        const view = c.closest('.jp-WindowedPanel-outer') || c.closest('.jp-Notebook');
        const r = (e) => { const b = e.getBoundingClientRect(); return [b.left, b.top, b.right, b.bottom]; };
        return {canvas: r(c), table: r(t), work: r(w), view: r(view)};
    }""")
    ARTIFACTS.mkdir(exist_ok=True)
    page.screenshot(path=str(ARTIFACTS / f"layout-{label}.png"))
    v = box["view"]
    c, t, w = box["canvas"], box["table"], box["work"]
    assert c[1] >= v[1] - 1 and c[3] <= v[3] + 1, (label, box)  # the whole k(T) canvas on screen
    assert t[1] < v[3] - 80 and t[3] > t[1], (label, box)  # the fit results start on screen, with room
    assert w[2] <= v[2] + 1 and c[2] <= v[2] + 1, (label, box)  # nothing beyond the right edge
    assert t[1] < c[3], (label, box)  # beside the figure, not below it
    truncated = page.evaluate(_TRUNCATED, wb.element_handle())
    assert truncated == [], (label, truncated)
    # every label of every tab and section, each in turn (folded ones have no size)
    for tab in ("Model", "What if", "Save / export", "Fit"):
        _work_tab(page, tab)
        sections = ("Measured data", "Material and branches", "Scattering mechanisms", "Electronic part")
        for section in sections if tab == "Model" else (None,):
            if section:
                _section(page, section)
            truncated = page.evaluate(_TRUNCATED, wb.element_handle())
            assert truncated == [], (label, tab, section, truncated)
            if section == "Measured data":  # the folded "Flash data (diffusivity)" section inside it
                header = page.locator(".kinetic-flash-options .jupyter-widget-Collapse-header").first
                if "jupyter-widget-Collapse-open" not in (header.evaluate("h => h.parentElement.className") or ""):
                    header.click()  # open it (it stays open from an earlier layout check)
                page.wait_for_timeout(300)
                page.screenshot(path=str(ARTIFACTS / f"flash-section-{label}.png"))
                truncated = page.evaluate(_TRUNCATED, wb.element_handle())
                assert truncated == [], (label, "flash data", truncated)
                box = page.evaluate("""() => {
                    const f = document.querySelector('.kinetic-flash-options');
                    const w = document.querySelector('.kinetic-work');
                    return [f.getBoundingClientRect().right, w.getBoundingClientRect().right]; }""")
                assert box[0] <= box[1] + 1, (label, "flash section wider than the work area", box)


def test_workbench_in_a_real_browser(page, lab):
    from playwright.sync_api import expect

    _open(page, lab, "01_fit_one_curve.ipynb", width=1366, height=768, side_panel=True)
    assert page.evaluate("() => jupyterapp.shell.leftCollapsed") is False
    _layout_check(page, "1366x768")
    page.set_viewport_size({"width": 1440, "height": 900})
    page.wait_for_timeout(500)
    _layout_check(page, "1440x900")
    if os.environ.get("KINETIC_UPDATE_SCREENSHOT") == "1":  # the README's picture, only when asked
        _readme_screenshot(page)

    # --- speed: arrow key on a slider to new canvas pixels ---------------------------------------
    _work_tab(page, "Model")
    _section(page, "Scattering mechanisms")
    handle = page.locator(".kinetic-slider-umklapp-gruneisen .noUi-handle")
    handle.scroll_into_view_if_needed()
    page.locator(".kinetic-plot-conductivity").first.scroll_into_view_if_needed()
    _settle(page)
    slider_ms = [_key_to_pixels(page, handle, "ArrowRight" if i % 2 == 0 else "ArrowLeft") for i in range(16)]
    _record("slider_key_to_pixels", slider_ms)
    print(f"\nbrowser: arrow key -> new k(T) pixels: median {statistics.median(slider_ms):.0f} ms "
          f"(all {', '.join(f'{t:.0f}' for t in slider_ms)})")

    # --- speed: a mechanism on/off to redraw --------------------------------------------------------
    toggle = page.locator(".kinetic-toggle-point-defect input").first
    toggle_ms = [_click_to_pixels(page, toggle) for _ in range(6)]
    _record("mechanism_toggle_to_pixels", toggle_ms)
    print(f"browser: mechanism on/off -> redraw: median {statistics.median(toggle_ms):.0f} ms "
          f"(all {', '.join(f'{t:.0f}' for t in toggle_ms)})")
    assert toggle.is_checked()  # an even number of clicks: back on

    # --- stale marks ------------------------------------------------------------------------------------
    box_b = page.locator(".kinetic-box-umklapp-b input")
    old_b = box_b.input_value()
    box_b.fill("2.5")
    box_b.press("Enter")
    _work_tab(page, "Fit")
    expect(page.locator(".kinetic-fit-table")).to_contain_text("Stale", timeout=30_000)
    expect(page.locator(".kinetic-fit-use")).to_be_disabled()
    page.locator(".kinetic-fit-table").evaluate("el => el.scrollIntoView({block: 'nearest'})")
    page.screenshot(path=str(ARTIFACTS / "stale-fit.png"))
    _work_tab(page, "Model")
    box_b.fill(old_b)
    box_b.press("Enter")
    _work_tab(page, "Fit")
    expect(page.locator(".kinetic-fit-table")).not_to_contain_text("Stale", timeout=30_000)
    expect(page.locator(".kinetic-fit-use")).to_be_enabled()

    # --- keyboard: Tab leaves the figure; every control is reachable with Tab ----------------------------
    canvas_div = page.locator(".kinetic-plot-conductivity .jupyter-matplotlib-canvas-div").first
    canvas_div.focus()
    page.keyboard.press("Tab")
    inside = page.evaluate("() => !!document.activeElement.closest('.jupyter-matplotlib-canvas-div')")
    assert not inside, "Tab stays on the figure"
    canvas_div.focus()
    page.keyboard.press("Shift+Tab")
    assert not page.evaluate("() => !!document.activeElement.closest('.jupyter-matplotlib-canvas-div')")
    _tab_reaches_every_control(page)  # header, figure, Fit tab
    _work_tab(page, "Model")
    _section(page, "Scattering mechanisms")
    _tab_reaches_every_control(page)  # sliders, exact boxes, switches
    _work_tab(page, "Save / export")
    _tab_reaches_every_control(page)

    # --- exports: names follow figure and sample; PNG 300 dpi, SVG, PDF; curves as CSV -------------------
    _work_tab(page, "Save / export")
    folder = lab.root / "exports"
    folder.mkdir()
    page.locator(".kinetic-session-panel input[type=text]").first.fill(str(folder))
    page.locator(".kinetic-session-panel input[type=text]").first.press("Enter")
    for fmt, label in (("png", "PNG, 300 dpi"), ("svg", "SVG"), ("pdf", "PDF")):
        page.locator(".kinetic-export-format select").select_option(label=label)
        page.wait_for_timeout(500)  # the choice reaches the kernel before the click (ipywidgets throttles)
        page.locator(".kinetic-export-figure").click()
        expect(page.locator(".kinetic-session-status")).to_contain_text(f".{fmt}", timeout=30_000)
    page.locator(".kinetic-export-curves").click()
    expect(page.locator(".kinetic-session-status")).to_contain_text(".csv", timeout=30_000)
    names = sorted(p.name for p in folder.iterdir())
    assert names == [f"kappa_T-{s}" for s in ("sample_A_invented.csv", "sample_A_invented.pdf",
                                                "sample_A_invented.png", "sample_A_invented.svg")] or \
        all(n.startswith("kappa_T-") for n in names) and len(names) == 4, names
    mask = os.umask(0)
    os.umask(mask)
    for p in folder.iterdir():
        assert p.stat().st_mode & 0o777 == 0o666 & ~mask, (p, oct(p.stat().st_mode))
    png = next(folder.glob("*.png")).read_bytes()
    assert png[:8] == b"\x89PNG\r\n\x1a\n" and b"pHYs" in png  # the resolution is stored (300 dpi)

    # --- redraws that cannot corrupt: 50 slider moves and a record load, then compare with a fresh render ---
    page.locator(".kinetic-save-record").click()
    expect(page.locator(".kinetic-session-status")).to_contain_text("Saved the fit record", timeout=30_000)
    _work_tab(page, "Model")
    handle.focus()
    for i in range(50):
        page.keyboard.press("ArrowRight" if (i // 10) % 2 == 0 else "ArrowLeft")
        page.wait_for_timeout(15)
    _work_tab(page, "Save / export")
    page.locator(".kinetic-load-record").click()
    expect(page.locator(".kinetic-session-status")).to_contain_text("Loaded the fit record", timeout=30_000)
    _compare_with_fresh_render(page)

    # --- material switch: every preset from its default model --------------------------------------------
    _work_tab(page, "Model")
    _section(page, "Material and branches")
    for name in ("Bi2Te3", "Mg2Si", "Si"):
        before = page.locator(".kinetic-readout-lattice").inner_text()
        page.locator(".kinetic-material select").select_option(label=name)
        expect(page.locator(".kinetic-readout-lattice")).not_to_have_text(before, timeout=30_000)
        expect(page.locator(".kinetic-calibration")).to_contain_text("alibrated")
        assert "Problem" not in page.locator(".kinetic-messages").inner_text()
    page.screenshot(path=str(ARTIFACTS / "material-switch.png"))
    expect(page.locator(".kinetic-fit-table")).to_contain_text("Stale")  # the fit was for another material

    # --- what-ifs: progress, result, cancel ---------------------------------------------------------------
    _work_tab(page, "What if")
    page.locator(".kinetic-whatif-update").click()
    expect(page.locator(".kinetic-whatif-status")).to_contain_text("Computed", timeout=60_000)
    page.locator(".kinetic-whatif-show .widget-toggle-button", has_text="grain size and alloying map").click()
    page.wait_for_timeout(800)
    page.screenshot(path=str(ARTIFACTS / "whatif-map.png"))
    page.locator(".kinetic-whatif-update").click()
    cancel = page.locator(".kinetic-whatif-cancel")
    try:  # the update may finish first on a fast machine: Cancel is pressed while it is offered
        cancel.click(timeout=3_000)
    except Exception:  # noqa: BLE001 - already finished
        pass
    expect(page.locator(".kinetic-whatif-status")).to_contain_text(re.compile("Cancelled|Computed"),
                                                                   timeout=60_000)
    expect(page.locator(".kinetic-whatif-update")).to_be_enabled()


def _tab_reaches_every_control(page):
    """Tab from the first control of the workbench reaches every visible control in order."""
    targets = page.evaluate("""() => {
        const root = document.querySelector('.kinetic-workbench');
        const sel = 'input, select, button, textarea, [tabindex]:not([tabindex="-1"])';
        const out = [];
        document.querySelectorAll('[data-kin-tab]').forEach(el => el.removeAttribute('data-kin-tab'));
        root.querySelectorAll(sel).forEach((el, i) => {
            const r = el.getBoundingClientRect();
            const hidden = r.width === 0 || r.height === 0 || el.disabled || el.type === 'file'
                || getComputedStyle(el).visibility === 'hidden';
            if (!hidden) { el.setAttribute('data-kin-tab', String(i)); out.push(String(i)); }
        });
        return out;
    }""")
    first = page.locator(f"[data-kin-tab='{targets[0]}']")
    first.focus()
    reached = {targets[0]}
    for _ in range(len(targets) * 2 + 20):
        page.keyboard.press("Tab")
        idx = page.evaluate("() => { const a = document.activeElement;"
                            " const t = a && a.closest('[data-kin-tab]'); return t ? t.getAttribute('data-kin-tab') : null; }")
        if idx is not None:
            reached.add(idx)
        if reached >= set(targets):
            break
    missing = [page.locator(f"[data-kin-tab='{i}']").evaluate("e => e.outerHTML.slice(0, 120)")
               for i in targets if i not in reached]
    assert not missing, missing


def _compare_with_fresh_render(page):
    shown = _settle(page)
    assert shown
    browser = page.evaluate(f"""() => {{
        const c = {CANVAS};
        const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
        let s = ''; const n = d.length; const chunk = 0x8000;
        for (let i = 0; i < n; i += chunk) {{ s += String.fromCharCode.apply(null, d.subarray(i, i + chunk)); }}
        return [c.width, c.height, btoa(s)];
    }}""")
    out = _kernel(page, (
        "import base64 as _b, numpy as _np\n"
        "_c = wb.plots['conductivity'].canvas\n"
        "_c.draw()\n"
        "_a = _np.asarray(_c.get_renderer().buffer_rgba())\n"
        "print(_a.shape[1], _a.shape[0], _b.b64encode(_a.tobytes()).decode())\n"))
    assert not out.startswith("ERROR"), out
    kw, kh, kdata = out.split()
    import numpy as np

    w, h, bdata = browser
    assert (int(kw), int(kh)) == (w, h), ((kw, kh), (w, h))
    a = np.frombuffer(base64.b64decode(bdata), np.uint8).reshape(h, w, 4).astype(int)
    b = np.frombuffer(base64.b64decode(kdata), np.uint8).reshape(h, w, 4).astype(int)
    differ = np.any(np.abs(a - b) > 2, axis=2)  # 2 levels: PNG decoding in the browser is exact in practice
    frac = float(differ.mean())
    _record("fresh_render_differing_pixels_percent", [100 * frac])
    print(f"browser: canvas after 50 slider moves and a record load vs a fresh render: "
          f"{100 * frac:.3f}% of pixels differ")
    assert frac < 0.001, f"{100 * frac:.2f}% of the canvas differs from a fresh render of the same state"


def _readme_screenshot(page):
    page.set_viewport_size({"width": 1440, "height": 900})
    _work_tab(page, "Fit")
    wb = page.locator(".kinetic-workbench").first
    wb.evaluate("el => el.scrollIntoView({block: 'start'})")
    page.wait_for_timeout(800)
    SCREENSHOT.parent.mkdir(exist_ok=True)
    wb.screenshot(path=str(SCREENSHOT))


@pytest.mark.parametrize("notebook", ["02_grain_and_alloy_design.ipynb", "03_sample_series_and_zt.ipynb"])
def test_workbooks_do_not_report_stale_results_after_run_all(page, lab, notebook):
    from playwright.sync_api import expect

    _open(page, lab, notebook, width=1440, height=900, side_panel=False)
    page.wait_for_timeout(1500)  # let every browser echo arrive
    status = page.locator(".kinetic-whatif-status").last
    expect(status).to_contain_text("Computed", timeout=30_000)
    assert "Stale" not in status.inner_text()
    assert "Problem" not in page.locator(".kinetic-messages").last.inner_text()
    page.screenshot(path=str(ARTIFACTS / f"run-all-{notebook.split('_')[0]}.png"))
