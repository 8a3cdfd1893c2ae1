"""What the page tests share: a sample, the real page on a worksheet (AppTest), and the browser's waits."""
from __future__ import annotations

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
APP = str(ROOT / "app.py")
FIRST_DRAW_MS = 90_000  # the first run on a cold server loads the libraries


# the answer's value on the page (webapp.answer.ANSWER_KEY's container); its text as shown, e.g. "745.6 kg/h"
ANSWER = ".st-key-answer_value [data-testid='stMarkdownContainer']"


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


def opened(**query):
    """A fresh page opened on an address with this query (``ws=…``, ``units=US``), as a new browser context opens
    it: its own first run reads the link."""
    from streamlit.testing.v1 import AppTest

    at = AppTest.from_file(APP, default_timeout=60)
    for name, value in query.items():
        at.query_params[name] = value
    return at.run()


def unescaped(text: str) -> str:
    """Markdown source as read on screen (user text is shown escaped, as plain text; the invisible word joiners
    that break autolinks are not seen)."""
    from webapp.common import WORD_JOINER

    return re.sub(r"\\(.)", r"\1", text).replace(WORD_JOINER, "")


def errors(at) -> str:
    """Every error box of the page, as read on screen, one a line."""
    return unescaped("\n".join(e.value for e in at.error))


def edit(at, table: str, edits: dict):
    """A grid's edits, as its editor reports them, then a run of the page."""
    from webapp.state import KEY

    at.session_state[KEY].apply_table_edit(table, edits)
    return at.run()


def typed(at, table: str) -> list[dict]:
    """A grid's rows as typed."""
    from webapp.state import KEY

    return at.session_state[KEY].rows[table]


def no_traceback(at) -> None:
    assert not at.exception, [e.value for e in at.exception]


def held(at):
    """The worksheet the page holds."""
    from webapp.state import KEY

    return at.session_state[KEY].worksheet


def shown_answer(at) -> tuple[str, str] | None:
    """The answer panel's (label, value) as read on screen (AppTest), or None when there is no answer."""
    import re

    from webapp.answer import ANSWER_KEY

    def unescaped(text: str) -> str:
        return re.sub(r"\\(.)", r"\1", text)

    def find(node, label=None):
        for child in getattr(node, "children", {}).values():
            if child.type == "caption" and child.value.startswith("Answer"):
                label = child.value
            if str(getattr(getattr(child, "proto", None), "id", "")).endswith("-" + ANSWER_KEY):
                return unescaped(label), unescaped(child.children[0].value)
            found = find(child, label)
            if found is not None:
                return found
        return None

    return find(at.sidebar)


def answer_value(at) -> str:
    """The answer's value as shown (the page's refusals in the failure message when there is none)."""
    shown = shown_answer(at)
    assert shown is not None, [e.value for e in at.error]
    return shown[1]


def idle(browser_page) -> None:
    """The script run has finished: Streamlit's running indicator is gone and no element is left stale
    (a short run may end before the indicator shows; its elements are stale until it does)."""
    browser_page.wait_for_selector("[data-testid='stStatusWidget']", state="hidden")
    browser_page.wait_for_function(
        "() => !document.querySelector(\"[data-testid='stElementContainer'][data-stale='true']\")")


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


# -- the editable grids in a real browser ------------------------------------------------------------------------
TEXT_EDITOR = "textarea.gdg-input"
PICKER_EDITOR = "input[role='combobox']"


def grid(browser_page, table: str):
    """The editable grid of ``table`` (its editor's key is ``editor_<table>_<load>``)."""
    return browser_page.locator(f"[class*='st-key-editor_{table}_'] [data-testid='stDataFrameResizable']")


def cell_text(browser_page, table: str, row: int, column: int) -> str:
    """What a grid cell shows, read from the grid's accessible table (columns from 0 = the first shown)."""
    return grid(browser_page, table).locator(f"[data-testid='glide-cell-{column + 1}-{row}']").text_content()


def selected_cell(browser_page, table: str) -> tuple[int, int] | None:
    """(row, column) of the grid's selected cell, from its accessible table; None when none is selected."""
    found = grid(browser_page, table).locator("td[aria-selected='true']")
    if found.count() != 1:
        return None
    column, row = (int(n) for n in found.get_attribute("data-testid").split("-")[-2:])
    return row, column - 1


def wait_for_cell(browser_page, table: str, row: int, column: int, text: str) -> None:
    """Wait until a grid cell shows ``text``."""
    browser_page.wait_for_function(
        "([sel, t]) => { const e = document.querySelector(sel); return e && e.textContent === t; }",
        arg=[f"[class*='st-key-editor_{table}_'] [data-testid='glide-cell-{column + 1}-{row}']", text])


def open_cell_editor(browser_page, table: str, row: int, column: int, editor: str = TEXT_EDITOR,
                     attempts: int = 6) -> None:
    """Click the grid's first cell, walk to (row, column) by keyboard, open its editor.

    The grid's script loads lazily and a click before it is ready is lost, so a slow machine gets
    a few tries, each waiting for the grid's canvas and then for the cell editor to appear.
    """
    from playwright.sync_api import TimeoutError as PlaywrightTimeout

    box_of = grid(browser_page, table)
    for attempt in range(attempts):
        box_of.locator("canvas").first.wait_for(state="visible")
        box_of.scroll_into_view_if_needed()
        box = box_of.bounding_box()
        browser_page.mouse.click(box["x"] + 60, box["y"] + 52)  # first row, first column (past the row markers)
        for _ in range(column):
            browser_page.keyboard.press("ArrowRight")
        for _ in range(row):
            browser_page.keyboard.press("ArrowDown")
        browser_page.keyboard.press("Enter")
        try:
            browser_page.wait_for_selector(editor, timeout=5000)
            return
        except PlaywrightTimeout:
            if attempt == attempts - 1:
                raise
            browser_page.keyboard.press("Escape")


def painted(browser_page) -> None:
    """Two animation frames have passed: the page has drawn what its last events changed (a grid's cell
    editor holds typed text in its own state, which is read on commit; a commit before the next frame can
    take the old text)."""
    browser_page.evaluate("() => new Promise(done => requestAnimationFrame(() => requestAnimationFrame(done)))")


def type_and_commit(browser_page, text: str, commit: str = "Enter", timeout_ms: float | None = None) -> None:
    """Replace the text of the open cell editor with ``text`` and commit it (Enter: the selection moves down;
    Tab: to the next cell of the row)."""
    browser_page.keyboard.press("Control+a")
    browser_page.keyboard.type(text)
    browser_page.wait_for_function("t => { const e = document.querySelector('textarea.gdg-input'); "
                                   "return e && e.value === t; }", arg=text, timeout=timeout_ms)
    painted(browser_page)
    browser_page.keyboard.press(commit)
    browser_page.wait_for_selector(TEXT_EDITOR, state="detached")  # the cell took the text


def type_into_cell(browser_page, table: str, row: int, column: int, text: str, commit: str = "Enter",
                   attempts: int = 4) -> None:
    """Select a grid cell by keyboard from the grid's first cell, open it, replace its text, commit it.

    An editor that closes before the text is in it (the page's run redrew the grid under it) is opened
    again, at most ``attempts`` times; each try waits on the editor's own text."""
    from playwright.sync_api import TimeoutError as PlaywrightTimeout

    for attempt in range(attempts):
        idle(browser_page)
        open_cell_editor(browser_page, table, row, column)
        try:
            type_and_commit(browser_page, text, commit, timeout_ms=5_000)
            return
        except PlaywrightTimeout:
            if attempt == attempts - 1:
                raise
            browser_page.keyboard.press("Escape")
