"""The surface-losses panel in a real browser (Debian's chromium through Playwright, headless).

Opens the insulated hot-water line sample on a ?sheet= link, waits (on the page's own state, never a fixed sleep)
for the panel's outer-surface temperature, then thickens the insulation through the panel's form and waits for the
answer and the surface temperature to follow.
"""
from __future__ import annotations

import pytest

from heatbalance.links import sheet_link
from page_helpers import FIRST_DRAW_MS, answer_shows, idle, open_page, sample

pytestmark = pytest.mark.browser

PANEL = ".st-key-losses_panel"


def test_panel_shows_the_loss_and_follows_a_thicker_insulation(browser, app_url, output_dir):
    link = sheet_link(sample("insulated_hot_water_line.json"), app_url + "/")
    context, page = open_page(browser, link, PANEL, FIRST_DRAW_MS)
    try:
        panel = page.locator(PANEL)
        page.wait_for_function("""() => {
            const p = document.querySelector('.st-key-losses_panel');
            return p !== null && p.textContent.includes('Outer surface: 9.5 °C'); }""",
                               timeout=FIRST_DRAW_MS)
        assert "Yard line" in panel.text_content()
        answer_shows(page, "136.75 °C")
        panel.get_by_text("Add or change a computed loss").click()
        thickness = page.locator(".st-key-losses_thickness_0 input")
        thickness.wait_for()
        thickness.fill("100 mm")
        thickness.press("Tab")  # the field's value reaches the page before the button is pressed
        idle(page)
        page.locator(".st-key-losses_apply_0 button").click()
        answer_shows(page, "°C", instead_of="136.75 °C")
        idle(page)
        page.wait_for_function("""() => {
            const p = document.querySelector('.st-key-losses_panel');
            return p !== null && p.textContent.includes('Outer surface: ')
                && !p.textContent.includes('Outer surface: 9.5 °C'); }""", timeout=FIRST_DRAW_MS)
        panel.screenshot(path=str(output_dir / "losses_panel.png"))
    finally:
        context.close()
