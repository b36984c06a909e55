import pytest

pytestmark = pytest.mark.e2e

def test_debug(page, lab):
    from playwright.sync_api import expect
    logs = []
    page.on("console", lambda m: logs.append(f"{m.type}: {m.text}"[:400]))
    page.goto(lab.url("01_fit_one_curve.ipynb"))
    expect(page.locator("#jp-main-statusbar")).to_contain_text("(ipykernel) | Idle", timeout=60_000)
    page.wait_for_timeout(1000)
    page.evaluate("() => jupyterapp.commands.execute('notebook:run-all-cells')")
    page.wait_for_timeout(12000)
    print(page.evaluate("() => { const e = document.querySelector('.kinetic-figures'); return e ? e.outerHTML.slice(0, 3000) : 'none'; }"))
    print("\n".join(l for l in logs if 'error' in l.lower() or 'warn' in l.lower())[-3000:])
