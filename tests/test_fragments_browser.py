"""Issue 16 (page), in a real browser: a panel's own change reruns that panel alone; a change of the worksheet made
in a panel reruns the whole page (Debian's chromium driven by Playwright, headless).

What ran is read from the server's own messages on the page's websocket (Streamlit's protocol, decoded with
streamlit's own protobuf classes): a run starts with ``new_session`` (the fragments it runs, none for the whole
page), each element drawn is a ``delta`` (with the fragment it was drawn in), and a run ends with
``script_finished`` (its status says a fragment's run or the page's). Every wait is on those messages or on the
page's own state, never a fixed sleep.
"""
from __future__ import annotations

from pathlib import Path

import pytest
from page_helpers import ANSWER, idle
from streamlit.proto.ForwardMsg_pb2 import ForwardMsg

from heatbalance import load_worksheet, solve
from heatbalance.address import with_value
from heatbalance.present.text import answer_text

pytestmark = pytest.mark.browser

SAMPLE = Path(__file__).resolve().parent.parent / "sample_data" / "steam_heater_glycol.json"
WHATIF = ".st-key-whatif_panel"
TIMEOUT_MS = 60_000  # two cores shared with other runs: a script run can take tens of seconds
DONE = {ForwardMsg.FINISHED_SUCCESSFULLY: "page", ForwardMsg.FINISHED_FRAGMENT_RUN_SUCCESSFULLY: "fragment"}


class Runs:
    """The script runs the server reports on the websocket, from the moment :meth:`after` is entered."""

    def __init__(self, socket):
        self.socket = socket
        self.started: list[list[str]] = []  # per run: the fragments it runs ([]: the whole page)
        self.drawn_in: set[str] = set()  # the fragment of every element drawn ("": outside any)
        self.finished: list[str] = []  # per run: "page", "fragment", or "stopped for a rerun"

    def _read(self, payload) -> bool:
        """Record one message from the server; True when it ends a run that was not stopped for a rerun."""
        if isinstance(payload, str):
            return False
        message = ForwardMsg.FromString(payload)
        kind = message.WhichOneof("type")
        if kind == "new_session":
            self.started.append(list(message.metadata.run.fragment_ids))
        elif kind == "delta":
            self.drawn_in.add(message.delta.fragment_id)
        elif kind == "script_finished":
            self.finished.append(DONE.get(message.script_finished, "stopped for a rerun"))
            return message.script_finished in DONE
        return False

    def after(self, action) -> None:
        """Do ``action`` and wait until the run it asks for has ended (a run stopped for a rerun is followed)."""
        with self.socket.expect_event("framereceived", predicate=self._read, timeout=TIMEOUT_MS):
            action()


@pytest.fixture
def page_and_runs(browser, app_url):
    context = browser.new_context(viewport={"width": 1440, "height": 2600})
    opened = context.new_page()
    opened.set_default_timeout(TIMEOUT_MS)
    with opened.expect_websocket() as socket:
        opened.goto(app_url)
    opened.wait_for_selector(WHATIF, timeout=TIMEOUT_MS * 2)
    idle(opened)
    yield opened, Runs(socket.value)
    context.close()


def _type(page, widget: str, text: str) -> None:
    field = page.locator(f".st-key-{widget} input")
    field.fill(text)
    field.press("Enter")


def test_the_what_if_points_rerun_the_what_if_panel_alone(page_and_runs, output_dir):
    page, runs = page_and_runs
    answer = page.inner_text(ANSWER)
    page.locator(WHATIF).scroll_into_view_if_needed()
    runs.after(lambda: _type(page, "whatif_count_0", "5"))
    page.locator(".st-key-whatif_run button").filter(has_text="Run the sweep (5 points)").wait_for()
    idle(page)
    assert runs.finished == ["fragment"]
    assert len(runs.started) == 1 and len(runs.started[0]) == 1  # one run, of one fragment
    assert runs.drawn_in == set(runs.started[0])  # every element it drew is in that fragment
    assert page.inner_text(ANSWER) == answer
    page.screenshot(path=str(output_dir / "fragments-whatif.png"), full_page=True)


def test_an_altitude_typed_in_the_site_panel_reruns_the_whole_page(page_and_runs):
    page, runs = page_and_runs
    ws = load_worksheet(SAMPLE.read_bytes())
    sea = answer_text(solve(ws).answer)
    high = answer_text(solve(with_value(ws, "atmosphere.altitude", "2000 m")).answer)
    assert page.inner_text(ANSWER).strip() == sea != high
    runs.after(lambda: _type(page, "site_atmosphere", "2000 m"))
    assert runs.started[0] and runs.finished[0] == "stopped for a rerun"  # the site panel's run, stopped…
    assert runs.started[-1] == [] and runs.finished[-1] == "page"  # …for a run of the whole page
    assert "" in runs.drawn_in  # which drew outside the panels
    page.wait_for_function("([sel, t]) => document.querySelector(sel).innerText.trim() === t", arg=[ANSWER, high])
    idle(page)
