"""The freezing-range materials panel in a real browser (Debian's chromium via Playwright, headless).

Opens the page on a ?sheet= link of the berry freezing tunnel sample, opens the panel, pastes an enthalpy table
and waits (on page state, never a fixed sleep) for the success message and the new row in the panel's list.
"""
from __future__ import annotations

import pytest

from heatbalance.links import sheet_link
from page_helpers import FIRST_DRAW_MS, idle, open_page, sample

pytestmark = pytest.mark.browser

PANEL = "Materials that freeze over a range (foods, wet solids)"


def test_a_pasted_table_is_added_in_the_browser(browser, app_url, output_dir):
    link = sheet_link(sample("berry_freezing_tunnel.json"), app_url + "/")
    context, page = open_page(browser, link, "text=Berry freezing tunnel", FIRST_DRAW_MS)  # a loaded machine is slow
    try:
        page.locator("summary", has_text=PANEL).click()
        name = page.locator(".st-key-freezing_name input")
        name.wait_for(state="visible", timeout=FIRST_DRAW_MS)
        page.wait_for_function("""() => {  // the list is drawn after its panel's first field
            const list = document.querySelector('.st-key-freezing_list');
            return list !== null && list.textContent.includes('strawberries'); }""", timeout=FIRST_DRAW_MS)
        name.fill("dough")
        page.locator(".st-key-freezing_source input").fill("test table of our own")
        page.locator(".st-key-freezing_point input").fill("-1 degC")
        page.locator(".st-key-freezing_rows textarea").fill("-30, 0\n-5, 60\n-1, 220\n20, 280")
        page.locator(".st-key-freezing_add button").click()
        page.wait_for_selector("text=dough added: a line can now use it as its material.", timeout=FIRST_DRAW_MS)
        idle(page)
        page.wait_for_function("""() => {
            const list = document.querySelector('.st-key-freezing_list');
            return list !== null && list.textContent.includes('dough'); }""", timeout=FIRST_DRAW_MS)
        page.locator(".st-key-freezing_list").screenshot(path=str(output_dir / "freezing_panel.png"))
    finally:
        context.close()
