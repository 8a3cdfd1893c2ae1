"""A number typed out of its range, in a real browser (Debian's chromium driven by Playwright, headless): refused
in words beside the field, at its address, and never used.

With front-end bounds (``min_value``/``max_value``), Streamlit 1.67's browser kept the old value behind a red
field whose message showed only on hover: the screening stayed drawn for the old accumulation beside a field
reading 150, and a click on "Save this mixing" saved the old strength. These tests type with the keyboard (Enter,
Tab) and wait for the panel's own refusal, so they fail on such bounded fields. Every wait is on the page's state
or on the server's own messages on the websocket (a run finished), never a fixed sleep.
"""
from __future__ import annotations

import json

import pytest
from page_helpers import ANSWER, FIRST_DRAW_MS, ROOT, idle, sample
from streamlit.proto.ForwardMsg_pb2 import ForwardMsg

from heatbalance.links import sheet_link
from heatbalance.worksheet import parse_worksheet

pytestmark = pytest.mark.browser

TIMEOUT_MS = 60_000  # two cores shared with other runs: a script run can take tens of seconds
FINISHED = (ForwardMsg.FINISHED_SUCCESSFULLY, ForwardMsg.FINISHED_FRAGMENT_RUN_SUCCESSFULLY)


def _finished(payload) -> bool:
    """A server message that ends a script run (of the page or of a panel), not one stopped for a rerun."""
    if isinstance(payload, str):
        return False
    message = ForwardMsg.FromString(payload)
    return message.WhichOneof("type") == "script_finished" and message.script_finished in FINISHED


@pytest.fixture
def opened(browser, app_url):
    """Open a worksheet by its ?sheet= link, wait for ``ready``: yields (page, websocket)."""
    contexts = []

    def open_sheet(worksheet, ready: str):
        context = browser.new_context(viewport={"width": 1440, "height": 2600})
        contexts.append(context)
        page = context.new_page()
        page.set_default_timeout(TIMEOUT_MS)
        with page.expect_websocket() as socket:
            page.goto(sheet_link(worksheet, app_url + "/"))
        page.wait_for_selector(ready, timeout=FIRST_DRAW_MS)
        idle(page)
        return page, socket.value

    yield open_sheet
    for context in contexts:
        context.close()


def _type(page, widget: str, text: str, commit: str) -> None:
    """Type ``text`` into the number field keyed ``widget`` with the keyboard, then Enter or Tab."""
    field = page.locator(f".st-key-{widget} input")
    field.scroll_into_view_if_needed()
    field.focus()
    page.keyboard.press("Control+a")
    page.keyboard.type(text)
    page.wait_for_function("([sel, t]) => document.querySelector(sel).value === t",
                           arg=[f".st-key-{widget} input", text])
    page.keyboard.press(commit)


def _shows(page, container: str, text: str) -> None:
    """Wait until the element ``container`` shows ``text`` (the refusal is drawn by the panel's run)."""
    page.wait_for_function("([sel, t]) => { const e = document.querySelector(sel); "
                           "return e !== null && e.innerText.includes(t); }", arg=[container, text])


def _number(page, widget: str) -> float:
    return float(page.locator(f".st-key-{widget} input").input_value())


def test_an_accumulation_of_150_percent_typed_with_enter_is_refused_not_used(opened, output_dir):
    page, _ = opened(sample("glycol_hydration_screening.json"), ".st-key-screening_panel")
    vessel = ".st-key-screening_vessel_0"
    answer = page.inner_text(ANSWER)
    assert "(30% accumulated)" in page.inner_text(vessel)  # the sample's own accumulation, 0.3
    _type(page, "screening_0_accumulation", "150", "Enter")
    # product rule: refused in words beside the field, at its address (no source)
    _shows(page, vessel, "vessels[R-7].screening.accumulation: 150 % is not an accumulation: give 0 to 100 %")
    idle(page)
    assert _number(page, "screening_0_accumulation") == 150  # kept as typed, not put back to 100 (product rule)
    assert "accumulated)" not in page.inner_text(vessel)  # no screening drawn for a value not used (product rule)
    assert page.inner_text(ANSWER) == answer  # the balance did not take it (product rule, no source)
    page.locator(vessel).screenshot(path=str(output_dir / "number-bounds-accumulation.png"))
    _type(page, "screening_0_accumulation", "50", "Enter")  # in range: used as before (behaviour kept)
    _shows(page, vessel, "(50% accumulated)")  # 50 % typed, shown as the screening's accumulation
    idle(page)
    assert "is not an accumulation" not in page.inner_text(vessel)


def test_a_strength_of_150_percent_typed_with_tab_is_refused_and_save_does_not_save(opened, output_dir):
    doc = json.loads((ROOT / "sample_data" / "acid_dilution_jacketed_vessel.json").read_text(encoding="utf-8"))
    doc.pop("mixings")  # the form opens, filled from the lines: 1000 kg of 98 % acid to 25 %
    page, socket = opened(parse_worksheet(doc), ".st-key-mixing_panel")
    panel = ".st-key-mixing_panel"
    answer = page.inner_text(ANSWER)
    _type(page, "mixing_from", "150", "Tab")
    # product rule: refused beside the field as soon as it is typed, at its address (no source)
    refusal = "150 % is not a solute mass fraction: give 0 to 100 % [mixings[Dilution].from_fraction]"
    _shows(page, panel, refusal)
    idle(page)
    assert _number(page, "mixing_from") == 150  # kept as typed, not put back to 100 (product rule)
    page.locator(panel).screenshot(path=str(output_dir / "number-bounds-mixing.png"))
    with socket.expect_event("framereceived", predicate=_finished, timeout=TIMEOUT_MS):
        page.locator(".st-key-mixing_save button").click()
    idle(page)
    # nothing saved (product rule, no source): no stated mixing to remove, the loud warning stays, same answer
    assert page.locator(".st-key-mixing_remove").count() == 0
    assert "HEAT OF MIXING NOT IN THE BALANCE" in page.inner_text("body")
    assert page.inner_text(ANSWER) == answer
    assert refusal in page.inner_text(panel)
