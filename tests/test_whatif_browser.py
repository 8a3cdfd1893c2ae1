"""The what-if panel in a real browser: Debian's chromium driven by Playwright (headless).

Opens the page on the glycol heater sample (the page's default), runs a sweep from the panel, checks
that the chart is drawn with its points and that the CSV download parses with the swept values and
the engine's numbers (heatbalance.analyses.sweep on the same sheet). Every wait is on page state
(an element, a text, a value), never a fixed sleep. Screenshots go to test-output/ (gitignored).
"""
from __future__ import annotations

import io
import time
from pathlib import Path

import pandas as pd
import pytest
from page_helpers import choose, idle, open_page

from heatbalance import load_worksheet
from heatbalance.analyses.sweep import Axis, axis_values, sweep
from heatbalance.units import from_si

pytestmark = pytest.mark.browser

SAMPLE = Path(__file__).resolve().parent.parent / "sample_data" / "steam_heater_glycol.json"
PANEL = ".st-key-whatif_panel"
CHART = ".st-key-whatif_chart .js-plotly-plot"
TIMEOUT_MS = 30_000


@pytest.fixture
def page(browser, app_url):
    context, opened = open_page(browser, app_url, PANEL, TIMEOUT_MS)
    yield opened
    context.close()


def _wait_for_value(page, widget: str, value: str, timeout: float | None = None) -> None:
    """Wait until the widget's field shows ``value``."""
    page.wait_for_function(f"() => {{ const e = document.querySelector('.st-key-{widget} input'); "
                           f"return e !== null && e.value === '{value}'; }}", timeout=timeout)


def _has_value(widget: str, value: str):
    """A wait for :func:`page_helpers.choose`: the widget's field shows ``value`` (within 10 s)."""
    return lambda page: _wait_for_value(page, widget, value, timeout=10_000)


def _set_number(page, widget: str, text: str) -> None:
    field = page.locator(f".st-key-{widget} input")
    field.fill(text)
    field.press("Enter")


def _traces(page) -> list[dict]:
    """The chart's traces as plotly drew them (``_fullData``: the arrays decoded from the figure's JSON)."""
    return page.evaluate(f"""() => [...document.querySelector("{CHART}")._fullData].map(
        t => ({{type: t.type, x: Array.from(t.x || []), y: Array.from(t.y || [])}}))""")


def test_a_sweep_draws_its_chart_and_its_csv_has_the_swept_values(page, output_dir):
    ws = load_worksheet(SAMPLE.read_bytes())
    page.locator(PANEL).scroll_into_view_if_needed()
    # the default: the first input that is not the unknown, from its typed value (12 t/h) ± half
    _wait_for_value(page, "whatif_unit_0", "t/h")
    _set_number(page, "whatif_from_0", "4")
    _set_number(page, "whatif_to_0", "16")
    _set_number(page, "whatif_count_0", "7")
    run = page.locator(".st-key-whatif_run button")
    run.filter(has_text="Run the sweep (7 points)").wait_for()
    idle(page)
    run.click()
    page.wait_for_selector(CHART)
    page.wait_for_function(f"""() => {{ const e = document.querySelector("{CHART}");
        return e && e._fullData && e._fullData.length > 0 && e._fullData[0].x.length === 7; }}""")
    idle(page)
    values = axis_values(4, 16, count=7)
    expected = sweep(ws, [Axis("streams[Glycol].flow", values, "t/h")])
    steam = [from_si(v, "kg/h", "mass_flow") for v in expected["answer"]]

    traces = _traces(page)
    assert traces[0]["type"] == "scatter"
    assert traces[0]["x"] == pytest.approx(list(values), rel=1e-12)
    assert traces[0]["y"] == pytest.approx(steam, rel=1e-9)
    assert page.locator(f"{CHART} .scatterlayer .point").count() == 7  # the markers are drawn
    page.screenshot(path=str(output_dir / "whatif-sweep.png"), full_page=True)

    with page.expect_download() as download:
        page.locator(".st-key-whatif_csv button").click()
    content = Path(download.value.path()).read_bytes()
    table = pd.read_csv(io.StringIO(content.decode("utf-8-sig")), keep_default_na=False)
    assert list(table.columns[:4]) == ["Glycol flow [t/h]", "Steam flow [kg/h]", "refused at", "reason"]
    assert list(table["Glycol flow [t/h]"]) == pytest.approx(list(values), rel=1e-12)
    assert list(table["Steam flow [kg/h]"]) == pytest.approx(steam, rel=1e-9)
    assert (table["refused at"] == "").all()


def test_a_fifty_by_fifty_grid_draws_its_heat_map(page, output_dir):
    """The issue's 50 × 50 grid on the sample: drawn on the page (the time is printed, not asserted)."""
    page.locator(PANEL).scroll_into_view_if_needed()
    choose(page, "whatif_axis_0", "Glycol outlet temperature", _has_value("whatif_unit_0", "°C"))
    _set_number(page, "whatif_from_0", "20")
    _set_number(page, "whatif_to_0", "100")
    _set_number(page, "whatif_count_0", "50")
    choose(page, "whatif_axis_1", "Glycol flow", _has_value("whatif_unit_1", "t/h"))
    _set_number(page, "whatif_count_1", "50")
    run = page.locator(".st-key-whatif_run button")
    run.filter(has_text="Run the sweep (2,500 points)").wait_for()
    idle(page)
    started = time.perf_counter()
    run.click()
    page.wait_for_function(f"""() => {{ const e = document.querySelector("{CHART}");
        return e && e._fullData && e._fullData.length === 1 && e._fullData[0].type === 'heatmap'
               && e._fullData[0].z.length === 50
               && document.querySelector("{CHART} .hm image, {CHART} .heatmaplayer image"); }}""")
    drawn = time.perf_counter() - started
    idle(page)
    print(f"50 x 50 grid: drawn {drawn:.2f} s after the click; "
          f"{page.locator('.st-key-whatif_sweep_box [data-testid=stCaptionContainer]').last.inner_text()}")
    z = page.evaluate(f"""() => Array.from(document.querySelector("{CHART}")._fullData[0].z, r => Array.from(r))""")
    assert len(z) == 50 and all(len(row) == 50 for row in z)
    page.screenshot(path=str(output_dir / "whatif-grid.png"), full_page=True)
