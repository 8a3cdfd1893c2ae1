"""Filing in a real browser: Debian's chromium driven by Playwright (headless).

Starts its own app server on 127.0.0.1 with a throwaway store (HEATBALANCE_DB in a temporary folder). Opens
the condenser sample from the sidebar (it has tolerances and cases), checks the answer's ± U against the
engine's propagation, saves it, signs the saved revision on the page, downloads the calculation sheet and
reads its text (pypdf): the revision id, the answer ± U and the signer are on it. Every wait is on page state
(an element, a text, a URL, a download), never a fixed sleep. Screenshots go to test-output/ (gitignored).
"""
from __future__ import annotations

import io
import re
from pathlib import Path

import pypdf
import pytest
from page_helpers import ANSWER, choose, idle, open_page

from conftest import running_app_with_store
from heatbalance import load_worksheet, solve
from heatbalance.analyses.uncertainty import propagate
from heatbalance.links import revision_id
from heatbalance.present.uncertainty import uncertainty_text
from heatbalance.store import WorksheetStore

pytestmark = pytest.mark.browser

SAMPLE = Path(__file__).resolve().parent.parent / "sample_data" / "solvent_condenser_cooling_water.json"
PLUS_MINUS = ".st-key-answer_uncertainty"
TIMEOUT_MS = 30_000
SIGNER = "Rosa Okafor"


@pytest.fixture(scope="module")
def server(tmp_path_factory):
    with running_app_with_store(tmp_path_factory, "filing") as (url, db):
        yield url, db


@pytest.fixture
def page(browser, server):
    url, _ = server
    context, opened = open_page(browser, url, ANSWER, TIMEOUT_MS)
    yield opened
    context.close()


def _wait_for_input(page, widget: str, value: str, tag: str = "input", timeout: float | None = None) -> None:
    page.wait_for_function("([w, t, v]) => { const e = document.querySelector(`.st-key-${w} ${t}`); "
                           "return e !== null && e.value === v; }", arg=[widget, tag, value], timeout=timeout)


def test_open_save_sign_and_download_the_calculation_sheet(server, page, output_dir):
    url, db = server
    ws = load_worksheet(SAMPLE.read_bytes())
    expected = uncertainty_text(propagate(ws), "SI", solve(ws).answer)

    # the picker goes back to its placeholder once the sample is loaded: the wait is on the page's title
    title_shown = lambda p: p.locator("h1", has_text=ws.title).wait_for(timeout=15_000)  # noqa: E731
    choose(page, "sample_picker", ws.title, title_shown)
    page.locator(PLUS_MINUS, has_text=expected).wait_for()
    assert page.inner_text(PLUS_MINUS).strip() == expected  # "28.31 ± 2.37 t/h (k = 2, about 95 %)"
    page.locator(".st-key-filing_panel").get_by_text("Not saved: save the worksheet").wait_for()
    assert page.locator(".st-key-filing_sign button").is_disabled()

    idle(page)
    page.get_by_role("button", name="Save and share").click()
    rev_id = revision_id(ws)
    page.wait_for_url(re.compile(rf"\?ws={rev_id}$"))
    sign = page.locator(".st-key-filing_sign button")
    page.wait_for_function("() => { const b = document.querySelector('.st-key-filing_sign button'); "
                           "return b !== null && !b.disabled; }")
    page.locator(".st-key-filing_signoffs").get_by_text("Unchecked").wait_for()

    choose(page, "filing_role", "prepared",  # a check needs a "prepared" sign-off first
           lambda p: _wait_for_input(p, "filing_role", "prepared", timeout=5_000))  # the box's combobox shows it
    name = page.locator(".st-key-filing_name input")
    name.fill(SIGNER)
    name.press("Enter")
    idle(page)
    comment = page.locator(".st-key-filing_comment textarea")
    comment.fill("Checked against the cooling-water flow meter log")
    comment.press("Control+Enter")
    idle(page)
    _wait_for_input(page, "filing_name", SIGNER)
    _wait_for_input(page, "filing_comment", "Checked against the cooling-water flow meter log", "textarea")
    sign.click()
    page.get_by_text(f"Signed revision {rev_id}: prepared by {SIGNER}.").wait_for()
    idle(page)
    with WorksheetStore(db) as store:
        signoffs = store.signoffs(rev_id)
    assert [(s.role, s.name, s.comment) for s in signoffs] == \
        [("prepared", SIGNER, "Checked against the cooling-water flow meter log")]
    # the list shows it: a cell of the grid (drawn on a canvas; its accessible cells are in the page, hidden)
    page.locator(".st-key-filing_signoffs [role='gridcell']", has_text=SIGNER).wait_for(state="attached")

    download_button = page.locator(".st-key-filing_pdf button")
    with page.expect_download() as caught:
        download_button.click()
    download = caught.value
    assert download.suggested_filename.endswith(f"_rev_{rev_id[:8]}.pdf")
    data = Path(download.path()).read_bytes()
    (output_dir / "filing-sheet.pdf").write_bytes(data)
    page.screenshot(path=str(output_dir / "filing-panel.png"), full_page=True)
    assert data.startswith(b"%PDF")
    text = "\n".join(p.extract_text() for p in pypdf.PdfReader(io.BytesIO(data)).pages)
    assert rev_id in text
    assert expected in text  # the answer ± U, as on the page
    assert SIGNER in text and "Unchecked" not in text
    assert f"{url}/?ws={rev_id}" in "".join(text.split())  # the link (wrapped on the sheet), this server's
