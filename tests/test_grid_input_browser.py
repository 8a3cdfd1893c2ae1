"""What is typed into the page's grids, in a real browser (Debian's chromium, headless, through Playwright).

- ``98`` typed as the 98 % acid's mass fraction is refused at its cell and kept as typed; the grid used to clamp
  it to 1 and the sheet solved on pure acid. ``98 %`` gives the sample's answer.
- A new batch sheet: the vessel typed in the Vessels grid is offered in the charges' vessel dropdown, so the
  first charge can be added and the sheet solves.

Cells are read back from the grid's own accessible table; every wait is on the page's state (a cell's text, a
message, the answer, the running indicator), never a fixed sleep. Expected answers are the engine's
(heatbalance.solve) for the same worksheet, with a hand check where stated.
"""
from __future__ import annotations

import pytest
from iapws import IAPWS97

from heatbalance import solve
from heatbalance.links import sheet_link
from heatbalance.present.text import answer_text
from heatbalance.worksheet import parse_worksheet
from page_helpers import (ANSWER, FIRST_DRAW_MS, TEXT_EDITOR, cell_text, choose, grid, idle,
                          open_page, painted, sample, type_and_commit, wait_for_cell)
from webapp.answer import NEW_DUTY_LABEL
from webapp.grids import COLUMNS

pytestmark = pytest.mark.browser

TIMEOUT_MS = 30_000
ACID = "acid_dilution_jacketed_vessel.json"
CHARGE_COLUMNS = ["vessel", "name", "material", "mass fraction", "mass", "initial"]
CHECK = len(CHARGE_COLUMNS)  # the 'check' column, shown last while a cell of the grid is marked
GRID_PICKER = "[id^='gdg-overlay'] input[role='combobox']"  # a dropdown cell's editor (not the page's select boxes)
ANY_EDITOR = f"{TEXT_EDITOR}, {GRID_PICKER}"


@pytest.fixture
def opened(browser, app_url):
    """Open the page at ``url`` (default: the app on its default sample) in a fresh context, closed afterwards."""
    contexts = []

    def open_at(url: str = ""):
        context, page = open_page(browser, url or app_url, ANSWER, FIRST_DRAW_MS)
        page.set_default_timeout(TIMEOUT_MS)
        contexts.append(context)
        return page
    yield open_at
    for context in contexts:
        context.close()


def wait_for_answer(page, text: str) -> None:
    page.wait_for_function("([sel, t]) => { const e = document.querySelector(sel); "
                           "return e && e.innerText.trim() === t; }", arg=[ANSWER, text])
    idle(page)


def test_98_in_the_acids_mass_fraction_is_refused_not_clamped_and_98_percent_is_read(opened, app_url):
    page = opened(sheet_link(sample(ACID), app_url + "/"))
    wait_for_answer(page, answer_text(solve(sample(ACID)).answer))  # -360,182 kJ
    fraction = CHARGE_COLUMNS.index("mass fraction")
    assert cell_text(page, "charges", 1, fraction) == "0.98"
    _type_at(page, "charges", 1, fraction, "98", shown=False)
    page.get_by_text("'98' is not a mass fraction (0 to 1): for 98 % type 0.98 or 98 %").first.wait_for()
    wait_for_cell(page, "charges", 1, CHECK, "⚠ mass fraction")
    idle(page)
    assert cell_text(page, "charges", 1, fraction) == "98"  # as typed, not 1; the mark moved no column
    assert page.locator(ANSWER).count() == 0  # no answer on pure acid
    _type_at(page, "charges", 1, fraction, "98 %", shown=False)
    wait_for_answer(page, answer_text(solve(sample(ACID)).answer))
    wait_for_cell(page, "charges", 1, fraction, "98 %")  # the mark is gone (the 'check' column with it)


def _open_at(page, table: str, row: int, column: int, editor: str, attempts: int = 6) -> None:
    """Open the editor of exactly (row, column): a click on the grid's first cell (closing the editor that a click
    on a selected cell opens), a keyboard walk, and Enter only once the grid's own selection is on that cell. A run
    that redraws the grid meanwhile cuts the walk short: then again."""
    from playwright.sync_api import TimeoutError as PlaywrightTimeout

    box_of = grid(page, table)
    target = f"[class*='st-key-editor_{table}_'] td[data-testid='glide-cell-{column + 1}-{row}'][aria-selected='true']"
    for attempt in range(attempts):
        idle(page)
        box_of.locator("canvas").first.wait_for(state="visible")
        box_of.scroll_into_view_if_needed()
        box = box_of.bounding_box()
        page.mouse.click(box["x"] + 60, box["y"] + 52)  # first row, first column (past the row markers)
        painted(page)
        if page.locator(ANY_EDITOR).count():
            page.keyboard.press("Escape")
            page.wait_for_selector(ANY_EDITOR, state="detached")
        for key in ["ArrowRight"] * column + ["ArrowDown"] * row:
            page.keyboard.press(key)
        try:
            page.wait_for_selector(target, state="attached", timeout=5_000)
            page.keyboard.press("Enter")
            page.wait_for_selector(editor, timeout=5_000)
            return
        except PlaywrightTimeout:
            if attempt == attempts - 1:
                raise
            page.keyboard.press("Escape")


def _type_at(page, table: str, row: int, column: int, text: str, shown: bool = True, attempts: int = 4) -> None:
    """Type ``text`` into exactly (row, column); ``shown``: wait until the cell shows it (not when the edit moves
    the columns: a mark appearing or going adds or removes the 'check' column)."""
    from playwright.sync_api import TimeoutError as PlaywrightTimeout

    for attempt in range(attempts):
        _open_at(page, table, row, column, TEXT_EDITOR)
        try:
            type_and_commit(page, text, timeout_ms=5_000)
            break
        except PlaywrightTimeout:  # the page's run redrew the grid under the editor: again
            if attempt == attempts - 1:
                raise
            page.keyboard.press("Escape")
    if shown:
        wait_for_cell(page, table, row, column, text)
        idle(page)


def _type_into_the_blank_row(page, table: str, text: str) -> None:
    """One click on an empty grid's blank row adds a row and opens its first cell's editor."""
    box_of = grid(page, table)
    box_of.locator("canvas").first.wait_for(state="visible")
    box_of.scroll_into_view_if_needed()
    box = box_of.bounding_box()
    page.mouse.click(box["x"] + 60, box["y"] + 52)
    page.wait_for_selector(TEXT_EDITOR)
    type_and_commit(page, text)


def _pick_in_cell(page, table: str, row: int, column: int, option: str, search: str = "") -> None:
    """Open a dropdown cell, type ``search`` to filter it, pick ``option``; waits until the cell shows it."""
    _open_at(page, table, row, column, GRID_PICKER)
    page.wait_for_function("s => document.activeElement && document.activeElement.matches(s)", arg=GRID_PICKER)
    page.keyboard.type(search)
    page.get_by_role("option", name=option, exact=True).click()
    wait_for_cell(page, table, row, column, option)
    idle(page)


def test_a_new_batch_sheet_gets_its_first_charge_from_the_vessel_dropdown(opened):
    page = opened()
    page.locator(".st-key-new_worksheet button").click()
    page.get_by_text("Nothing to solve yet").wait_for()
    choose(page, "basis_kind", "batch", lambda p: grid(p, "vessels").wait_for())
    idle(page)
    _type_into_the_blank_row(page, "vessels", "V-1")
    wait_for_cell(page, "vessels", 0, len(COLUMNS["vessels"]), "⚠ row")  # "vessel V-1 has no charges": not read yet
    idle(page)
    _type_at(page, "vessels", 0, 1, "0 barg")  # columns: name, pressure, gauge/abs., final
    _type_at(page, "vessels", 0, 3, "35 °C")
    charges = grid(page, "charges")
    charges.scroll_into_view_if_needed()
    box = charges.bounding_box()
    page.mouse.click(box["x"] + 60, box["y"] + 52)  # the blank row's vessel cell: adds a row, opens its dropdown
    page.wait_for_selector(GRID_PICKER)
    assert page.get_by_role("option").all_inner_texts() == ["", "V-1"]  # blank (none yet) and the vessel typed
    page.get_by_role("option", name="V-1", exact=True).click()
    wait_for_cell(page, "charges", 0, 0, "V-1")
    _type_at(page, "charges", 0, CHARGE_COLUMNS.index("name"), "Water")
    _pick_in_cell(page, "charges", 0, CHARGE_COLUMNS.index("material"), "water", search="water")
    _type_at(page, "charges", 0, CHARGE_COLUMNS.index("mass"), "1000 kg")
    _type_at(page, "charges", 0, CHARGE_COLUMNS.index("initial"), "20 °C")
    page.get_by_text("no unknown: mark one quantity").first.wait_for()
    choose(page, "unknown_picker", NEW_DUTY_LABEL, lambda p: p.wait_for_selector(ANSWER))
    ws = parse_worksheet({
        "title": "New worksheet", "basis": {"kind": "batch"},
        "vessels": [{"name": "V-1", "pressure": "0 barg", "final": {"temperature": "35 degC"},
                     "charges": [{"name": "Water", "material": "water", "mass": "1000 kg",
                                  "initial": {"temperature": "20 degC"}}]}],
        "duties": [{"name": "Heater or cooler"}], "unknowns": [{"kind": "duty", "term": "Heater or cooler"}]})
    wait_for_answer(page, answer_text(solve(ws).answer))
    # hand check, IAPWS-IF97 (iapws package): 1000 kg x (h(35 °C) - h(20 °C)) at 1.01325 bar ≈ 62,700 kJ
    dh = IAPWS97(T=308.15, P=0.101325).h - IAPWS97(T=293.15, P=0.101325).h
    assert solve(ws).answer.value_si == pytest.approx(1000 * dh * 1000, rel=1e-6)
