"""The T–Q chart in a real browser: Debian's chromium driven by Playwright (headless).

Opens the page on a ?sheet= link of the methanol condenser sample and waits (on page state, never a fixed
sleep) for the exchanger panel's plotly chart: its title, both curves, the pinch label and a zone label drawn.
"""
from __future__ import annotations

from pathlib import Path

import pytest

from heatbalance.links import sheet_link
from heatbalance.worksheet import load_worksheet

pytestmark = pytest.mark.browser

SAMPLE = Path(__file__).resolve().parent.parent / "sample_data" / "methanol_condenser_cooling_water.json"
CHART = ".st-key-exchanger_panel .js-plotly-plot"
FIRST_DRAW_MS = 90_000


def test_tq_chart_is_drawn(browser, app_url, output_dir):
    link = sheet_link(load_worksheet(SAMPLE.read_bytes()), app_url + "/")
    context = browser.new_context(viewport={"width": 1440, "height": 2600})
    page = context.new_page()
    page.set_default_timeout(30_000)
    try:
        page.goto(link)
        chart = page.wait_for_selector(CHART, timeout=FIRST_DRAW_MS)
        chart.scroll_into_view_if_needed()
        page.wait_for_function("""() => {
            const c = document.querySelector('.st-key-exchanger_panel .js-plotly-plot');
            return c !== null && c.querySelectorAll('.scatterlayer .trace').length >= 3
                && c.textContent.includes('T–Q: exchanger E-301'); }""")
        text = chart.text_content()
        assert "pinch: ΔT = 23.0 K" in text
        assert "2: condensing / heating" in text and "1: subcooling / heating" in text
        assert "hot side: Methanol overhead" in text and "cold side: Cooling water" in text
        paths = page.eval_on_selector(CHART, "c => Array.from(c.querySelectorAll('.scatterlayer .trace path.js-line'))"
                                             ".map(p => p.getAttribute('d'))")
        assert len(paths) >= 3 and all("L" in d for d in paths)  # both curves and the pinch drawn as lines
        chart.screenshot(path=str(output_dir / "exchanger_tq.png"))
    finally:
        context.close()
