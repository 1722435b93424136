"""End to end: the page served by ``streamlit run app.py`` in a real headless Chromium.

Needs Debian's ``chromium`` (``/usr/bin/chromium``) and the ``playwright`` package (the
``e2e`` extra); the browser is never downloaded. Without them the test is skipped, unless
``ROOMFIT_REQUIRE_BROWSER=1`` (set by ``.ci/run``) makes their absence a failure. Every wait
is bounded and the server is always stopped.
"""

from __future__ import annotations

import os
import shutil
import socket
import subprocess
import sys
import time
import urllib.request
from collections.abc import Iterator
from pathlib import Path

import pytest

from roomfit.plan.read import read_plan

ROOT = Path(__file__).resolve().parent.parent
CHROMIUM = Path("/usr/bin/chromium")
CHROMIUM_ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                 "--disable-background-networking", "--disable-component-update", "--disable-sync"]
SAMPLE = "ground-floor-wheelchair.toml"
SERVER_START_S = 60
SOLVE_WAIT_S = 180

pytestmark = pytest.mark.e2e


def _need(ok: bool, why: str) -> None:
    if ok:
        return
    if os.environ.get("ROOMFIT_REQUIRE_BROWSER") == "1":
        pytest.fail(f"{why} (ROOMFIT_REQUIRE_BROWSER=1)")
    pytest.skip(why)


def _free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


def _wait_healthy(url: str, proc: subprocess.Popen[bytes], log: Path) -> None:
    deadline = time.monotonic() + SERVER_START_S
    while time.monotonic() < deadline:
        if proc.poll() is not None:
            pytest.fail(f"streamlit exited with {proc.returncode}:\n{log.read_text()}")
        try:
            with urllib.request.urlopen(url + "/_stcore/health", timeout=2) as r:
                if r.status == 200:
                    return
        except OSError:
            pass
        time.sleep(0.3)
    pytest.fail(f"streamlit did not answer within {SERVER_START_S} s:\n{log.read_text()}")


def _settle(tab: object, timeout_s: float = 60) -> None:
    """Wait (bounded) until the page has finished its current run."""
    tab.wait_for_load_state("networkidle", timeout=timeout_s * 1000)  # type: ignore[attr-defined]
    running = tab.locator('[data-testid="stStatusWidget"]')  # type: ignore[attr-defined]
    running.wait_for(state="hidden", timeout=timeout_s * 1000)


@pytest.fixture
def server(tmp_path: Path) -> Iterator[str]:
    """``streamlit run app.py`` on a free port of 127.0.0.1; yields its address."""
    port = _free_port()
    log = tmp_path / "streamlit.log"
    cmd = [sys.executable, "-m", "streamlit", "run", str(ROOT / "app.py"),
           "--server.headless", "true", "--server.port", str(port),
           "--server.address", "127.0.0.1", "--server.fileWatcherType", "none",
           "--browser.gatherUsageStats", "false"]
    with log.open("wb") as out:
        proc = subprocess.Popen(cmd, cwd=ROOT, stdout=out, stderr=subprocess.STDOUT)
        try:
            url = f"http://127.0.0.1:{port}"
            _wait_healthy(url, proc, log)
            yield url
        finally:
            proc.terminate()
            try:
                proc.wait(timeout=10)
            except subprocess.TimeoutExpired:
                proc.kill()
                proc.wait(timeout=10)


def test_solve_a_sample_in_a_real_browser(server: str, tmp_path: Path) -> None:
    _need(CHROMIUM.exists() or shutil.which("chromium") is not None,
          "Debian's chromium is not installed (/usr/bin/chromium)")
    try:
        from playwright.sync_api import expect, sync_playwright
    except ImportError:
        _need(False, "the playwright package is not installed (pip install -e '.[e2e]')")

    with sync_playwright() as pw:
        browser = pw.chromium.launch(executable_path=str(CHROMIUM if CHROMIUM.exists()
                                                         else shutil.which("chromium")),
                                     args=CHROMIUM_ARGS, timeout=60_000)
        try:
            tab = browser.new_page(viewport={"width": 1600, "height": 2000})
            tab.set_default_timeout(60_000)
            expect.set_options(timeout=60_000)  # the first run imports the solver: seconds
            tab.goto(server, wait_until="domcontentloaded")
            expect(tab.get_by_text("roomfit · furnish with the client")).to_be_visible()
            expect(tab.get_by_text("Studio, 14 Larchmere Row, flat 3").first).to_be_visible()
            expect(tab.get_by_role("button", name="Open this sample")).to_be_visible()
            _settle(tab)
            tab.screenshot(path=str(tmp_path / "opened.png"), full_page=True)

            # open the wheelchair user's flat, a sample the solver furnishes in seconds
            sidebar = tab.get_by_test_id("stSidebar")
            sidebar.get_by_test_id("stSelectbox").click()
            tab.get_by_role("option", name=SAMPLE).click()
            sidebar.get_by_role("button", name="Open this sample").click()
            expect(tab.get_by_text(read_plan(ROOT / "plans" / SAMPLE).name).first).to_be_visible()
            _settle(tab)

            tab.get_by_role("tab", name="Arrangements").click()
            tab.get_by_role("button", name="Find arrangements").click()
            first = tab.get_by_role("heading", name="Arrangement 1", exact=True)
            try:
                expect(first).to_be_visible(timeout=SOLVE_WAIT_S * 1000)
            except AssertionError:
                tab.screenshot(path=str(tmp_path / "no-candidates.png"), full_page=True)
                raise
            _settle(tab)
            expect(tab.get_by_role("heading", name="Arrangement 2", exact=True)).to_be_visible()
            panel = tab.get_by_role("tabpanel", name="Arrangements")
            assert panel.locator(".rf-drawing svg").count() >= 2
            expect(panel.get_by_text("Caution: these results are advisory").first).to_be_visible()
            expect(panel.get_by_role("button", name="Keep this arrangement").first).to_be_visible()
            assert tab.get_by_test_id("stException").count() == 0
            shot = tmp_path / "candidates.png"
            tab.screenshot(path=str(shot), full_page=True)
            assert shot.stat().st_size > 10_000
        finally:
            browser.close()
