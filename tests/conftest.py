"""Shared fixtures: each page test's own store (``db``); the real-browser tests' app server and Debian's chromium.

The server is started once per test session, only when a browser test asks for it, on a free
port of 127.0.0.1, and stopped at the end. With HEATBALANCE_APP_URL set (as `.ci/run` does),
that server is used instead. A missing chromium is a skip with its reason, except with
HEATBALANCE_REQUIRE_BROWSER=1 (set by `.ci/run`), where it is a failure.
"""
from __future__ import annotations

import os
import socket
import subprocess
import sys
import time
import urllib.request
from contextlib import contextmanager
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
OUTPUT = ROOT / "test-output"
SERVER_START_TIMEOUT_S = 90
CHROMIUM = Path("/usr/bin/chromium")
LAUNCH_ARGS = ["--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update",
               "--no-first-run"]


@pytest.fixture
def db(monkeypatch, tmp_path):
    """A store of its own for each page test (the page opens the one HEATBALANCE_DB names); its URL."""
    from heatbalance.store import ENV_DATABASE_URL, ENV_DB

    monkeypatch.delenv(ENV_DATABASE_URL, raising=False)
    monkeypatch.setenv(ENV_DB, str(tmp_path / "page.sqlite3"))
    return f"sqlite:///{tmp_path / 'page.sqlite3'}"


def _free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return probe.getsockname()[1]


def _answers(url: str) -> bool:
    try:
        with urllib.request.urlopen(f"{url}/_stcore/health", timeout=2) as response:
            return response.status == 200
    except OSError:
        return False


def _stop(process: subprocess.Popen) -> None:
    process.terminate()
    try:
        process.wait(timeout=10)
    except subprocess.TimeoutExpired:
        process.kill()
        process.wait(timeout=10)


@pytest.fixture(scope="session")
def output_dir() -> Path:
    OUTPUT.mkdir(exist_ok=True)
    return OUTPUT


@contextmanager
def running_app_with_store(tmp_path_factory, label: str):
    """``running_app`` on a store of its own (HEATBALANCE_DB in a fresh folder, no database URL): yields the page's
    URL and the store's SQLAlchemy URL."""
    from heatbalance.store import ENV_DATABASE_URL, ENV_DB

    db = tmp_path_factory.mktemp(f"{label}-store") / "worksheets.sqlite3"
    env = {k: v for k, v in os.environ.items() if k != ENV_DATABASE_URL}
    env[ENV_DB] = str(db)
    with running_app(tmp_path_factory.mktemp(f"{label}-log") / "server.log", env) as url:
        yield url, f"sqlite:///{db}"


@contextmanager
def running_app(log_path: Path, env: dict | None = None):
    """Start ``streamlit run app.py`` on a free loopback port, yield its URL, stop it at the end."""
    port = _free_port()
    url = f"http://127.0.0.1:{port}"
    with open(log_path, "wb") as log:
        process = subprocess.Popen(
            [sys.executable, "-m", "streamlit", "run", "app.py", "--server.headless", "true",
             "--server.address", "127.0.0.1", "--server.port", str(port), "--browser.gatherUsageStats", "false",
             "--server.fileWatcherType", "none"],  # an edit elsewhere must not prompt a rerun mid-test
            cwd=ROOT, stdout=log, stderr=subprocess.STDOUT, env=env)
        try:
            deadline = time.monotonic() + SERVER_START_TIMEOUT_S
            while not _answers(url):
                if process.poll() is not None:
                    pytest.fail(f"the app server exited with status {process.returncode}; see {log_path}")
                if time.monotonic() > deadline:
                    pytest.fail(f"the app server did not answer within {SERVER_START_TIMEOUT_S} s; see {log_path}")
                time.sleep(0.25)
            yield url
        finally:
            _stop(process)


@pytest.fixture(scope="session")
def app_url(output_dir):
    """The URL of a running app: HEATBALANCE_APP_URL, or a server started here for the session."""
    given = os.environ.get("HEATBALANCE_APP_URL")
    if given:
        yield given.rstrip("/")
        return
    with running_app(output_dir / "app-server.log") as url:
        yield url


def playwright_or_skip(chromium: Path = CHROMIUM):
    """Playwright's sync API when Debian's chromium is there; otherwise a skip (a failure in CI)."""
    if not chromium.exists():
        reason = f"Debian chromium not found at {chromium} (apt-get install -y chromium)"
        if os.environ.get("HEATBALANCE_REQUIRE_BROWSER") == "1":
            pytest.fail(reason + "; HEATBALANCE_REQUIRE_BROWSER=1 makes this a failure")
        pytest.skip(reason)
    return pytest.importorskip("playwright.sync_api")


@pytest.fixture(scope="module")
def browser():
    """Headless Debian chromium driven by Playwright."""
    playwright_api = playwright_or_skip()
    with playwright_api.sync_playwright() as playwright:
        launched = playwright.chromium.launch(executable_path=str(CHROMIUM), headless=True, args=LAUNCH_ARGS)
        yield launched
        launched.close()
