"""Save and share in a real browser: Debian's chromium driven by Playwright (headless).

Starts its own app server on 127.0.0.1 with a throwaway store (HEATBALANCE_DB in a temporary folder), so
no test writes to a user's store. A saved sample opened through ``?ws=<id>`` shows the engine's answer for
that worksheet; "Save and share" puts the revision's link in the address bar and on the page; a ``?sheet=``
link opens the same answer without the database; a bad link shows its message.
"""
from __future__ import annotations

import re
from pathlib import Path

import pytest

from conftest import running_app_with_store
from page_helpers import ANSWER
from heatbalance import load_worksheet, solve
from heatbalance.present.text import answer_text
from heatbalance.links import revision_id, sheet_link
from heatbalance.store import WorksheetStore

pytestmark = pytest.mark.browser

ROOT = Path(__file__).resolve().parent.parent
SAMPLE = ROOT / "sample_data" / "condensate_flash.json"
TIMEOUT_MS = 30_000


@pytest.fixture(scope="module")
def server(tmp_path_factory):
    with running_app_with_store(tmp_path_factory, "share") as (url, db):
        yield url, db


@pytest.fixture
def page(browser):
    context = browser.new_context(viewport={"width": 1440, "height": 2400})
    opened = context.new_page()
    opened.set_default_timeout(TIMEOUT_MS)
    yield opened
    context.close()


def test_a_saved_sample_opens_from_its_link_with_the_engines_answer(server, page):
    url, db = server
    worksheet = load_worksheet(SAMPLE.read_bytes())
    with WorksheetStore(db) as store:
        rev_id = store.save(worksheet).id
    page.goto(f"{url}/?ws={rev_id}")
    page.wait_for_selector(ANSWER)
    assert page.inner_text(ANSWER).strip() == answer_text(solve(worksheet).answer)
    assert worksheet.title in page.inner_text("h1")
    page.get_by_text(f"Opened saved revision {rev_id}.").wait_for()
    provenance = page.inner_text(".st-key-provenance")  # where it came from, under the title
    assert provenance.startswith(f"Saved revision {rev_id}, saved ") and provenance.endswith(" UTC.")


def test_save_and_share_puts_the_link_in_the_address_bar_and_it_reopens(server, page):
    url, db = server
    worksheet = load_worksheet(SAMPLE.read_bytes())
    page.goto(f"{url}/?sheet={sheet_link(worksheet).split('=', 1)[1]}")
    page.wait_for_selector(ANSWER)
    assert page.inner_text(ANSWER).strip() == answer_text(solve(worksheet).answer)
    assert "not a saved revision; content as carried by the link" in page.inner_text(".st-key-provenance")
    page.get_by_role("button", name="Save and share").click()
    rev_id = revision_id(worksheet)
    page.wait_for_url(re.compile(rf"\?ws={rev_id}$"))
    page.get_by_text(f"{url}/?ws={rev_id}").first.wait_for()  # the link on the page, with this server's address
    with WorksheetStore(db) as store:
        assert store.open(rev_id).worksheet == worksheet
    page.goto(page.url)
    page.wait_for_selector(ANSWER)
    assert page.inner_text(ANSWER).strip() == answer_text(solve(worksheet).answer)


def test_a_bad_link_shows_its_message_in_the_browser(server, page):
    url, _ = server
    page.goto(f"{url}/?ws=0123456789abcdef01234567")
    page.wait_for_selector(ANSWER)
    page.get_by_text("no saved worksheet has the id 0123456789abcdef01234567").first.wait_for()
