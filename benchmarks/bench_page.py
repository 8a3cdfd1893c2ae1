"""The page in a real browser (issue 16): start-up, a shared link, edit -> answer, server memory.

    python benchmarks/bench_page.py [--edits 20] [--no-post-script-gc]

Each figure is paired with a baseline measured in the same run on a minimal Streamlit page of one
number input and one text (``MINIMAL``), served the same way:
  start      server start -> the first solved answer on screen      (target <= 3 s)
  link       a ``?ws=`` link opened in a fresh browser -> its answer (target <= 2 s)
  edit       a table cell typed -> the new answer on screen, median  (target <= 150 ms, <= 2x the minimal
             page's widget round trip); beside it the same edit on a minimal page of one data editor of a
             few rows and a text echo of a cell (``MINIMAL_EDITOR``): the grid's own round trip, its
             150 ms front-end debounce included
  panel      the what-if panel's number of points typed -> shown on its run button, median (a run of the
             panel alone), beside the minimal page's number input
  memory     the server's resident memory after ten edits           (target <= 150 MiB)
``--no-post-script-gc`` serves every page with streamlit's ``runner.postScriptGC`` off (by default streamlit runs
a full garbage collection after each script run, holding the interpreter about 65-100 ms with the page's
libraries loaded, before the run's last messages leave). Not part of pytest; chromium from Debian
(/usr/bin/chromium), the app on a free loopback port.
"""
from __future__ import annotations

import argparse
import os
import socket
import statistics
import subprocess
import sys
import tempfile
import time
import urllib.request
from contextlib import contextmanager
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

sys.path.insert(0, str(ROOT / "tests"))

from page_helpers import ANSWER, idle, open_cell_editor, painted  # noqa: E402  (the browser tests' own waits)
from playwright.sync_api import sync_playwright  # noqa: E402

RUNNING = "[data-testid='stStatusWidget']"
MINIMAL = '''import streamlit as st
value = st.number_input("value", value=1.0, key="value")
st.markdown(f"<span id='echo'>{2 * value:.1f}</span>", unsafe_allow_html=True)
'''
MINIMAL_EDITOR = '''import pandas as pd
import streamlit as st
rows = pd.DataFrame({"name": ["Glycol", "Steam", "Condensate", "Air"], "flow": ["12 t/h", "1 t/h", "1 t/h", "2 t/h"]})
edited = st.data_editor(rows, key="editor_minimal_0", hide_index=True)
st.markdown(f"<span id='echo'>{edited['flow'][0]}</span>", unsafe_allow_html=True)
'''
CHROMIUM = dict(executable_path="/usr/bin/chromium", headless=True, args=["--no-sandbox", "--disable-gpu"])


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


SERVER_ENV: dict[str, str] = {}  # streamlit options for every page served (--no-post-script-gc)


@contextmanager
def served(script: Path, database: Path):
    """A Streamlit server on ``script`` with its own store; yields (url, process, the time it was started)."""
    port = _free_port()
    started = time.perf_counter()
    process = subprocess.Popen([sys.executable, "-m", "streamlit", "run", str(script), "--server.headless", "true",
                                "--server.address", "127.0.0.1", "--server.port", str(port),
                                "--browser.gatherUsageStats", "false"], cwd=ROOT,
                               env={**os.environ, **SERVER_ENV, "HEATBALANCE_DB": str(database)},
                               stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    url = f"http://127.0.0.1:{port}"
    try:
        for _ in range(600):
            try:
                urllib.request.urlopen(url + "/_stcore/health", timeout=1)
                break
            except OSError:
                time.sleep(0.02)
        yield url, process, started
    finally:
        process.terminate()
        process.wait(timeout=30)


def resident_mib(pid: int) -> float:
    for line in Path(f"/proc/{pid}/status").read_text().splitlines():
        if line.startswith("VmRSS:"):
            return int(line.split()[1]) / 1024
    return float("nan")


def _fresh(browser, url: str, ready: str):
    context = browser.new_context(viewport={"width": 1400, "height": 1000})
    page = context.new_page()
    page.set_default_timeout(120_000)
    start = time.perf_counter()
    page.goto(url)
    page.wait_for_selector(ready)
    return context, page, time.perf_counter() - start


def _idle(page) -> None:
    page.wait_for_selector(RUNNING, state="hidden")


def grid_round_trips(page, table: str, column: int, edits: int, shown) -> list[float]:
    """Type ``edits`` flows into row 0, ``column`` of the grid keyed ``editor_<table>_…``; the time from Enter
    until the page shows the edit: ``shown(page, text)``, called before Enter, returns that wait."""
    times = []
    for i in range(edits):
        idle(page)
        open_cell_editor(page, table, 0, column)
        text = f"{6 + (i % 7) * 0.5} t/h"
        page.keyboard.press("Control+a")
        page.keyboard.type(text)
        page.wait_for_function("t => document.querySelector('textarea.gdg-input').value === t", arg=text)
        painted(page)  # the editor's own state has the text (else Enter may commit the old text)
        wait = shown(page, text)
        start = time.perf_counter()
        page.keyboard.press("Enter")
        wait()
        times.append(time.perf_counter() - start)
    return times


def edit_round_trips(page, edits: int) -> list[float]:
    """The first stream's flow (streams grid, column 3) typed; until a new answer is on screen."""
    def new_answer(page, text):
        before = page.inner_text(ANSWER).strip()
        return lambda: page.wait_for_function("([sel, old]) => { const e = document.querySelector(sel); "
                                              "return e && e.innerText.trim() !== old; }", arg=[ANSWER, before])
    return grid_round_trips(page, "streams", 3, edits, new_answer)


def editor_round_trips(page, edits: int) -> list[float]:
    """The minimal data editor's first flow typed; until its echo shows the text."""
    def echoed(page, text):
        return lambda: page.wait_for_function(
            "t => { const e = document.querySelector('#echo'); return e && e.innerText === t; }", arg=text)
    return grid_round_trips(page, "minimal", 1, edits, echoed)


def panel_round_trips(page, edits: int) -> list[float]:
    """The what-if panel's number of points typed; until its run button shows the number (a run of the panel)."""
    times = []
    box = page.locator(".st-key-whatif_count_0 input")
    box.scroll_into_view_if_needed()
    for i in range(edits):
        _idle(page)
        points = 12 + i % 2
        box.fill(str(points))
        start = time.perf_counter()
        box.press("Enter")
        page.locator(".st-key-whatif_run button").filter(has_text=f"({points} points)").wait_for()
        times.append(time.perf_counter() - start)
    return times


def minimal_round_trips(page, edits: int) -> list[float]:
    times = []
    box = page.get_by_label("value")
    for i in range(edits):
        _idle(page)
        box.fill(str(2 + i))
        start = time.perf_counter()
        box.press("Enter")
        page.wait_for_function("t => document.querySelector('#echo') && "
                               "document.querySelector('#echo').innerText === t", arg=f"{2 * (2 + i):.1f}")
        times.append(time.perf_counter() - start)
    return times


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--edits", type=int, default=20)
    parser.add_argument("--no-post-script-gc", action="store_true",
                        help="serve with runner.postScriptGC off (no full garbage collection after each run)")
    args = parser.parse_args()
    if args.no_post_script_gc:
        SERVER_ENV["STREAMLIT_RUNNER_POST_SCRIPT_GC"] = "false"
    from heatbalance.links import revision_link
    from heatbalance.store import open_store
    from heatbalance.worksheet import load_worksheet

    sample = load_worksheet((ROOT / "sample_data" / "steam_heater_glycol.json").read_bytes())
    with tempfile.TemporaryDirectory() as tmp, sync_playwright() as pw:
        database = Path(tmp) / "store.sqlite3"
        saved = open_store("sqlite:///" + str(database)).save(sample, saved_by="benchmark")
        minimal, minimal_editor = Path(tmp) / "minimal.py", Path(tmp) / "minimal_editor.py"
        minimal.write_text(MINIMAL)
        minimal_editor.write_text(MINIMAL_EDITOR)
        browser = pw.chromium.launch(**CHROMIUM)
        with served(minimal, database) as (url, _, started):
            context, page, _ = _fresh(browser, url, "#echo")
            minimal_start = time.perf_counter() - started
            minimal_trips = minimal_round_trips(page, args.edits)
            context.close()
        with served(minimal_editor, database) as (url, _, _):
            context, page, _ = _fresh(browser, url, "#echo")
            editor_trips = editor_round_trips(page, args.edits)
            context.close()
        with served(ROOT / "app.py", database) as (url, process, started):
            context, page, _ = _fresh(browser, url, ANSWER)
            first_answer = time.perf_counter() - started
            _idle(page)
            trips = edit_round_trips(page, args.edits)
            _idle(page)
            memory = resident_mib(process.pid)
            panel_trips = panel_round_trips(page, args.edits)
            context.close()
            link_context, _, link = _fresh(browser, revision_link(saved.id, url + "/"), ANSWER)
            link_context.close()
        browser.close()
    edit_ms, minimal_ms = statistics.median(trips) * 1e3, statistics.median(minimal_trips) * 1e3
    editor_ms, panel_ms = statistics.median(editor_trips) * 1e3, statistics.median(panel_trips) * 1e3
    print(f"start   server start -> first answer {first_answer:6.2f} s  (minimal page {minimal_start:.2f} s, "
          f"{first_answer / minimal_start:.1f}x)   target <= 3 s")
    print(f"link    ?ws= link, fresh browser     {link:6.2f} s                                  target <= 2 s")
    print(f"edit    cell -> new answer, median   {edit_ms:6.0f} ms (minimal page {minimal_ms:.0f} ms, "
          f"{edit_ms / minimal_ms:.1f}x)   target <= 150 ms and <= 2x")
    print(f"        the same edit, minimal data editor -> echo {editor_ms:4.0f} ms (the worksheet's edit "
          f"{edit_ms / editor_ms:.1f}x)")
    print(f"panel   what-if points -> shown, median {panel_ms:5.0f} ms (minimal page {minimal_ms:.0f} ms, "
          f"{panel_ms / minimal_ms:.1f}x)")
    print(f"memory  server after {args.edits} edits      {memory:6.0f} MiB"
          "                                 target <= 150 MiB")
    gc_note = ", runner.postScriptGC off" if args.no_post_script_gc else ""
    print(f"(cores {os.cpu_count()}, load {os.getloadavg()[0]:.1f}{gc_note})")


if __name__ == "__main__":
    main()
