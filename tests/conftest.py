"""Shared fixtures: the app server for the real-browser tests.

The server is started once per test session, only when a browser test asks for it, on a free
port of 127.0.0.1, and stopped at the end. With HEATBALANCE_APP_URL set (as `.ci/run` does),
that server is used instead.
"""
from __future__ import annotations

import os
import socket
import subprocess
import sys
import time
import urllib.request
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
OUTPUT = ROOT / "test-output"
SERVER_START_TIMEOUT_S = 90


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


@pytest.fixture(scope="session")
def app_url(output_dir):
    """The URL of a running app: HEATBALANCE_APP_URL, or a server started here for the session."""
    given = os.environ.get("HEATBALANCE_APP_URL")
    if given:
        yield given.rstrip("/")
        return
    port = _free_port()
    url = f"http://127.0.0.1:{port}"
    log_path = output_dir / "app-server.log"
    with open(log_path, "wb") as log:
        process = subprocess.Popen(
            [sys.executable, "-m", "streamlit", "run", "app.py", "--server.headless", "true",
             "--server.address", "127.0.0.1", "--server.port", str(port), "--browser.gatherUsageStats", "false"],
            cwd=ROOT, stdout=log, stderr=subprocess.STDOUT)
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
