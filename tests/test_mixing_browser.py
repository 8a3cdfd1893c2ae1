"""The heats-of-mixing panel in a real browser: Debian's chromium driven by Playwright (headless).

Opens the page on a ?sheet= link of the acid dilution sample, waits (on page state, never a fixed sleep) for the
panel with its stated mixing, removes it, and waits for the loud warning that the heat of mixing is no longer in
the balance.
"""
from __future__ import annotations

import pytest

from heatbalance.links import sheet_link
from page_helpers import FIRST_DRAW_MS, idle, open_page, sample

pytestmark = pytest.mark.browser

PANEL = ".st-key-mixing_panel"


def test_remove_a_stated_mixing_and_see_the_warning(browser, app_url, output_dir):
    link = sheet_link(sample("acid_dilution_jacketed_vessel.json"), app_url + "/")
    context, page = open_page(browser, link, PANEL, FIRST_DRAW_MS)
    try:
        page.locator(PANEL).scroll_into_view_if_needed()
        remove = page.wait_for_selector(".st-key-mixing_remove button")  # drawn only with a stated mixing
        assert "Heats of mixing" in page.inner_text(PANEL)
        assert "NOT IN THE BALANCE" not in page.inner_text("body")
        remove.click()
        page.wait_for_function("() => document.body.innerText.includes('HEAT OF MIXING NOT IN THE BALANCE')")
        idle(page)
        assert page.locator(".st-key-mixing_remove").count() == 0
        page.screenshot(path=str(output_dir / "mixing_removed.png"))
    finally:
        context.close()
