"""The humid-air panel in a real browser (Debian's chromium through Playwright, headless).

Opens the make-up air heater sample on a ?sheet= link, waits (on the page's own state, never a fixed sleep) for the
panel's table, then gives the inlet humidity as a dew point through the panel's form and waits for the table to
show the new relative humidity.
"""
from __future__ import annotations

import pytest

from heatbalance.links import sheet_link
from page_helpers import FIRST_DRAW_MS, answer_shows, choose, idle, open_page, sample

pytestmark = pytest.mark.browser

PANEL = ".st-key-humid_air_panel"


def test_panel_shows_the_water_and_takes_a_dew_point(browser, app_url, output_dir):
    link = sheet_link(sample("humid_air_heater_steam.json"), app_url + "/")
    context, page = open_page(browser, link, f"{PANEL} [data-testid='stDataFrame']", FIRST_DRAW_MS)
    try:
        panel = page.locator(PANEL)
        answer_shows(page, "372.9 kg/h")
        panel.get_by_text("Inlet humidity and flow of Outdoor air").click()
        value = page.locator(".st-key-air_0_value input")
        value.wait_for()
        value.fill("-20 degC")
        idle(page)
        choose(page, "air_0_form_kind", "dew point",  # a run that ends while the list is open closes it
               lambda p: p.wait_for_function("""() => { const box = document.querySelector('.st-key-air_0_form_kind');
                   return box !== null && [box.textContent, ...[...box.querySelectorAll('input')].map(i => i.value)]
                       .some(t => t.includes('dew point')); }""", timeout=5_000))
        idle(page)
        page.locator(".st-key-air_0_apply button").click()
        answer_shows(page, "kg/h", instead_of="372.9 kg/h")
        idle(page)
        assert "Not applied" not in panel.text_content()
        panel.screenshot(path=str(output_dir / "humid_air_panel.png"))
    finally:
        context.close()
