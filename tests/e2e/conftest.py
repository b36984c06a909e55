"""Fixtures for the real-browser tests: a JupyterLab server on a temporary copy of the
workbooks, and Debian's Chromium driven by Playwright's Python API.

The server runs in its own process group on 127.0.0.1 with a random token and a free
port, with quiet settings in a temporary home (no news, no update checks, no autosave),
and dies with the test process (PR_SET_PDEATHSIG). Kernel sessions are shut down after
each test; the process group is terminated at the end.
"""
from __future__ import annotations

import ctypes
import json
import os
import secrets
import shutil
import signal
import socket
import subprocess
import sys
import time
import urllib.request
from pathlib import Path

import pytest

CHROMIUM = "/usr/bin/chromium"
REPO = Path(__file__).resolve().parents[2]
ARTIFACTS = REPO / "artifacts"
BROWSER_ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                "--disable-background-networking", "--disable-component-update", "--disable-sync",
                "--disable-dev-shm-usage"]
QUIET = {
    "@jupyterlab/apputils-extension/notification.jupyterlab-settings":
        {"fetchNews": "false", "checkForUpdates": False, "doNotDisturbMode": True},
    "@jupyterlab/notebook-extension/tracker.jupyterlab-settings":
        {"autoStartDefaultKernel": True, "windowingMode": "none"},
    "@jupyterlab/docmanager-extension/plugin.jupyterlab-settings": {"autosave": False},
}


def pytest_collection_modifyitems(config, items):
    reason = None
    if not os.path.exists(CHROMIUM):
        reason = f"{CHROMIUM} is not installed (apt-get install chromium)"
    else:
        try:
            import playwright.sync_api  # noqa: F401
        except ImportError:
            reason = "playwright is not installed"
    for item in items:
        if "e2e" in str(item.fspath):
            item.add_marker(pytest.mark.e2e)
            if reason:
                item.add_marker(pytest.mark.skip(reason=reason))


@pytest.hookimpl(hookwrapper=True, tryfirst=True)
def pytest_runtest_makereport(item, call):
    outcome = yield
    rep = outcome.get_result()
    setattr(item, f"rep_{rep.when}", rep)


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def _die_with_parent():  # Linux: the server gets SIGTERM if pytest dies
    ctypes.CDLL("libc.so.6").prctl(1, signal.SIGTERM)


class Lab:
    def __init__(self, root: Path, port: int, token: str, proc, log_path: Path):
        self.root, self.port, self.token, self.proc, self.log_path = root, port, token, proc, log_path
        self.base = f"http://127.0.0.1:{port}"

    def api(self, path: str, method: str = "GET"):
        req = urllib.request.Request(self.base + path, method=method,
                                     headers={"Authorization": f"token {self.token}"})
        with urllib.request.urlopen(req, timeout=10) as r:
            body = r.read()
        return json.loads(body) if body else None

    def url(self, notebook: str) -> str:
        return f"{self.base}/lab/tree/{notebook}?reset&token={self.token}"

    def log_tail(self, n: int = 4000) -> str:
        try:
            return self.log_path.read_text(errors="replace")[-n:]
        except OSError:
            return ""

    def shutdown_sessions(self):
        try:
            for s in self.api("/api/sessions") or []:
                self.api(f"/api/sessions/{s['id']}", method="DELETE")
        except OSError:
            pass


@pytest.fixture(scope="session")
def lab(tmp_path_factory):
    home = tmp_path_factory.mktemp("lab-home")
    root = tmp_path_factory.mktemp("lab-root")
    for nb in (REPO / "workbooks").glob("*.ipynb"):
        shutil.copy(nb, root / nb.name)
    settings = home / "settings"
    for rel, content in QUIET.items():
        p = settings / rel
        p.parent.mkdir(parents=True, exist_ok=True)
        p.write_text(json.dumps(content))
    port, token = _free_port(), secrets.token_hex(16)
    cmd = [sys.executable, "-m", "jupyterlab", "--no-browser", "--ip=127.0.0.1", f"--port={port}",
           "--ServerApp.port_retries=0", f"--IdentityProvider.token={token}", f"--ServerApp.root_dir={root}",
           f"--LabApp.user_settings_dir={settings}", f"--LabApp.workspaces_dir={home}/workspaces",
           "--LabApp.news_url=None", "--LabApp.check_for_updates_class=jupyterlab.NeverCheckForUpdate",
           "--LabApp.extension_manager=readonly", "--LanguageServerManager.autodetect=False",
           "--LabApp.expose_app_in_browser=True"]
    if os.geteuid() == 0:
        cmd.append("--allow-root")
    env = dict(os.environ, JUPYTER_CONFIG_DIR=str(home / "config"), JUPYTER_RUNTIME_DIR=str(home / "runtime"),
               PYTHONPATH=str(REPO) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    log_path = home / "server.log"
    log = open(log_path, "wb")
    proc = subprocess.Popen(cmd, stdout=log, stderr=subprocess.STDOUT, env=env, cwd=root,
                            start_new_session=True, preexec_fn=_die_with_parent)
    server = Lab(root, port, token, proc, log_path)
    deadline = time.monotonic() + 60
    while True:
        if proc.poll() is not None:
            pytest.fail(f"JupyterLab exited with {proc.returncode}:\n{server.log_tail()}")
        try:
            server.api("/api/status")
            break
        except OSError:
            if time.monotonic() > deadline:
                pytest.fail(f"JupyterLab did not answer within 60 s:\n{server.log_tail()}")
            time.sleep(0.2)
    yield server
    server.shutdown_sessions()
    try:
        os.killpg(proc.pid, signal.SIGTERM)
        proc.wait(15)
    except ProcessLookupError:
        pass
    except subprocess.TimeoutExpired:
        os.killpg(proc.pid, signal.SIGKILL)
        proc.wait(5)
    log.close()


@pytest.fixture(scope="session")
def browser():
    from playwright.sync_api import sync_playwright

    with sync_playwright() as p:
        b = p.chromium.launch(executable_path=CHROMIUM, headless=True, args=BROWSER_ARGS, timeout=30_000)
        yield b
        b.close()


@pytest.fixture
def page(request, browser, lab):
    context = browser.new_context(viewport={"width": 1440, "height": 1000})
    pg = context.new_page()
    yield pg
    rep = getattr(request.node, "rep_call", None)
    if rep is not None and rep.failed:
        ARTIFACTS.mkdir(exist_ok=True)
        try:
            pg.screenshot(path=str(ARTIFACTS / f"{request.node.name}.png"), full_page=True)
        except Exception:  # noqa: BLE001 - best effort on the way out
            pass
        (ARTIFACTS / f"{request.node.name}-server.log").write_text(lab.log_tail(20000))
    context.close()
    lab.shutdown_sessions()
