"""A link shared from the US view opens in the US view, in a real browser (Debian's chromium, Playwright).

The checker's case (defect 2): the condenser sample shown in US units, saved; its ``?ws=`` link opened in a fresh
browser context showed the same inputs and answer, but in SI. Starts its own app server with a throwaway store.
"""
from __future__ import annotations

import dataclasses
import re
from pathlib import Path

import pytest

from conftest import running_app_with_store
from page_helpers import ANSWER, FIRST_DRAW_MS, idle, open_page
from heatbalance import load_worksheet
from heatbalance.analyses import solve_and_analyse
from heatbalance.links import revision_id, sheet_link
from heatbalance.present.text import answer_text
from heatbalance.store import WorksheetStore
from webapp.common import UNIT_SYSTEMS

pytestmark = pytest.mark.browser

ROOT = Path(__file__).resolve().parent.parent
SAMPLE = ROOT / "sample_data" / "solvent_condenser_cooling_water.json"
SI, US = list(UNIT_SYSTEMS)
TIMEOUT_MS = 30_000


@pytest.fixture(scope="module")
def server(tmp_path_factory):
    with running_app_with_store(tmp_path_factory, "units") as (url, db):
        yield url, db


def in_view(page, text: str) -> None:
    """Wait until the answer panel shows the answer in the view's units, ``= <text>`` under the answer (the
    answer itself is in the unit typed for it), and only that one."""
    page.locator("section[data-testid='stSidebar']").get_by_text(f"= {text}", exact=True).wait_for()


def test_a_link_saved_in_the_us_view_opens_in_the_us_view_in_a_fresh_browser(server, browser):
    url, db = server
    ws = load_worksheet(SAMPLE.read_bytes())
    answer = solve_and_analyse(ws).answer
    typed = answer_text(answer, "US")  # the answer, in the unit typed for it (t/h) whatever the view
    view = dataclasses.replace(answer, typed_unit=None)
    in_si, in_us = answer_text(view, "SI"), answer_text(view, "US")  # the same flow in kg/h and in lb/h
    assert len({typed, in_si, in_us}) == 3

    def answer_is(page, text: str) -> None:
        page.locator(ANSWER, has_text=typed).wait_for()
        in_view(page, text)
    context, page = open_page(browser, f"{url}/?{sheet_link(ws).split('?', 1)[1]}", ANSWER, TIMEOUT_MS)
    try:
        answer_is(page, in_si)
        page.locator(".st-key-unit_system").get_by_text(US).click()
        answer_is(page, in_us)
        idle(page)
        page.get_by_role("button", name="Save and share").click()
        rev_id = revision_id(ws)
        page.wait_for_url(re.compile(rf"\?ws={rev_id}&units=US$"))
        page.get_by_text(f"{url}/?ws={rev_id}&units=US").first.wait_for()  # the link the page shows
        shared = page.url
    finally:
        context.close()
    with WorksheetStore(db) as store:
        assert store.open(rev_id).worksheet == ws
    context, page = open_page(browser, shared, ANSWER, FIRST_DRAW_MS)  # a fresh context: no session, no state
    try:
        answer_is(page, in_us)
        assert page.locator(".st-key-unit_system").get_by_role("radio", name=US).is_checked()
        page.get_by_text(f"Opened saved revision {rev_id}.").first.wait_for()
    finally:
        context.close()
    context, page = open_page(browser, f"{url}/?ws={rev_id}", ANSWER, FIRST_DRAW_MS)  # an old link: SI
    try:
        answer_is(page, in_si)
        assert page.locator(".st-key-unit_system").get_by_role("radio", name=SI).is_checked()
    finally:
        context.close()
