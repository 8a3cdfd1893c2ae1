"""What the page tests share: a sample, the real page on a worksheet (AppTest), and the browser's waits."""
from __future__ import annotations

from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
APP = str(ROOT / "app.py")
FIRST_DRAW_MS = 90_000  # the first run on a cold server loads the libraries


def sample(name: str):
    """A bundled sample worksheet, by file name."""
    from heatbalance.worksheet import load_worksheet

    return load_worksheet((ROOT / "sample_data" / name).read_bytes())


def page(ws):
    """The real page (app.py) opened on ``ws`` through its one state key, after its first run."""
    from streamlit.testing.v1 import AppTest

    from webapp.state import KEY, PageState

    at = AppTest.from_file(APP, default_timeout=60)
    at.session_state[KEY] = PageState.opened(ws)
    return at.run()


def held(at):
    """The worksheet the page holds."""
    from webapp.state import KEY

    return at.session_state[KEY].worksheet


def idle(browser_page) -> None:
    """The script run has finished: Streamlit's running indicator is gone."""
    browser_page.wait_for_selector("[data-testid='stStatusWidget']", state="hidden")


def open_page(browser, url: str, ready: str, timeout_ms: int):
    """A fresh browser context on the page at ``url``, waited until ``ready`` shows and the run is over."""
    context = browser.new_context(viewport={"width": 1440, "height": 2600}, accept_downloads=True)
    opened = context.new_page()
    opened.set_default_timeout(timeout_ms)
    opened.goto(url)
    opened.wait_for_selector(ready, timeout=FIRST_DRAW_MS)
    idle(opened)
    return context, opened


def answer_shows(browser_page, text: str, instead_of: str | None = None) -> None:
    """Wait until the answer block shows ``text`` (and no longer ``instead_of``): it redraws as a run goes on."""
    browser_page.wait_for_function(
        """([text, old]) => { const a = document.querySelector('.st-key-answer');
            return a !== null && a.textContent.includes(text) && (old === null || !a.textContent.includes(old)); }""",
        arg=[text, instead_of], timeout=FIRST_DRAW_MS)


def choose(browser_page, widget: str, option: str, shown, attempts: int = 5) -> None:
    """Pick ``option`` in the select box keyed ``widget``; ``shown(page)`` waits until the page shows the choice.

    A script run that ends while the list is open redraws the box and closes the list: then it is opened
    again (each wait is on the list or on ``shown``), at most ``attempts`` times.
    """
    from playwright.sync_api import TimeoutError as PlaywrightTimeout

    box = browser_page.locator(f".st-key-{widget}")
    for attempt in range(attempts):
        idle(browser_page)
        box.click()
        try:
            browser_page.get_by_role("option", name=option, exact=True).click(timeout=5_000)
            shown(browser_page)
            return
        except PlaywrightTimeout:
            if attempt == attempts - 1:
                raise
            browser_page.keyboard.press("Escape")
