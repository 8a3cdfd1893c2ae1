"""The site-atmosphere panel in a real browser: Debian's chromium driven by Playwright (headless).

Opens the page on its default sample (glycol heated by 4 barg steam), types an altitude into the site panel and
waits for the page's own state: the assumption under the input names the site pressure of the ISO 2533 standard
atmosphere, and the answer becomes the engine's answer for the sheet with that altitude (the steam's absolute
pressure falls with the site's, so its latent heat and the steam flow change). No fixed sleeps.
"""
from __future__ import annotations

from pathlib import Path

import pytest
from page_helpers import ANSWER, idle, open_page

from heatbalance import load_worksheet, solve
from heatbalance.address import with_value
from heatbalance.present.text import answer_text

pytestmark = pytest.mark.browser

SAMPLE = Path(__file__).resolve().parent.parent / "sample_data" / "steam_heater_glycol.json"
PANEL = ".st-key-site_panel"
TIMEOUT_MS = 60_000  # two cores shared with other runs: a script run can take tens of seconds


@pytest.fixture
def page(browser, app_url):
    context, opened = open_page(browser, app_url, PANEL, TIMEOUT_MS)
    yield opened
    context.close()


def _wait_for_text(page, selector: str, text: str) -> None:
    page.wait_for_function("([sel, t]) => [...document.querySelectorAll(sel)].some(e => e.innerText.includes(t))",
                           arg=[selector, text])


def test_an_altitude_typed_in_the_site_panel_moves_the_answer(page, output_dir):
    ws = load_worksheet(SAMPLE.read_bytes())
    sea = answer_text(solve(ws).answer)
    high = answer_text(solve(with_value(ws, "atmosphere.altitude", "2000 m")).answer)
    assert sea != high  # the engine's two answers differ (4 barg steam is 0.22 bar less absolute at 2000 m)
    _wait_for_text(page, ANSWER, sea)
    _wait_for_text(page, PANEL, "Gauge pressures are relative to 1.01325 bar(a)")
    field = page.locator(f"{PANEL} input")
    field.fill("2000 m")
    field.press("Enter")
    _wait_for_text(page, PANEL, "0.794952 bar(a): the ISO 2533 standard atmosphere at the site's altitude, 2000 m")
    _wait_for_text(page, ANSWER, high)
    idle(page)
    assert page.inner_text(ANSWER).strip() == high
    page.screenshot(path=str(output_dir / "site_panel.png"), full_page=True)
