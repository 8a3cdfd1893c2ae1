"""Issue 17 through Streamlit's AppTest (the real app.py, no browser): editing that never loses what was
typed, undo and redo, "Solve for" always usable (a new duty among its choices), a deleted unknown line,
title and notes, the saved state beside the answer, one caution, a decimal comma.

Every expected answer is the engine's own for the worksheet the page holds (heatbalance.solve, written
by heatbalance.present.text), plus hand checks where stated. The samples are scenarios of our own invention.
"""
from __future__ import annotations

import json
import re

import pytest

from heatbalance import solve
from heatbalance.links import revision_id
from heatbalance.present.text import answer_text as written
from heatbalance.reactor import CAUTION
from page_helpers import answer_value, edit, errors, held, no_traceback, page, sample, shown_answer, typed
from webapp.answer import NEW_DUTY_LABEL
from webapp.grids import TYPED_INTO_UNKNOWN

GLYCOL = "steam_heater_glycol.json"  # 12 t/h glycol 5 -> 40 °C on 4 barg steam: 745.6 kg/h of steam


answer = answer_value


def engine(ws, system="SI") -> str:
    return written(solve(ws).answer, system)


# -- undo and redo -------------------------------------------------------------------------------------------
def test_undo_restores_the_previous_answer_and_redo_the_edit():
    at = page(sample(GLYCOL))
    before = answer(at)
    assert before == engine(sample(GLYCOL)) == "745.6 kg/h"
    assert at.button(key="undo").disabled and at.button(key="redo").disabled  # nothing to undo yet
    edit(at, "streams", {"edited_rows": {0: {"flow": "6 t/h"}}})
    halved = answer(at)
    assert halved == engine(held(at))
    # half the glycol takes half the steam for its heating; the 2 kW shell loss stays: (745.6 - s)/2 + s,
    # s = 2 kW / 2107.6 kJ/kg (the latent heat the page warns about) = 3.42 kg/h  (hand calculation)
    assert float(halved.split()[0]) == pytest.approx((745.6 - 3.42) / 2 + 3.42, abs=0.2)
    at.button(key="undo").click().run()
    no_traceback(at)
    assert answer(at) == before and typed(at, "streams")[0]["flow"] == "12 t/h"
    assert held(at) == sample(GLYCOL)
    at.button(key="redo").click().run()
    assert answer(at) == halved and typed(at, "streams")[0]["flow"] == "6 t/h"
    assert at.button(key="redo").disabled and not at.button(key="undo").disabled


def test_undo_and_redo_buttons_carry_keyboard_shortcuts():
    at = page(sample(GLYCOL))
    assert at.button(key="undo").proto.shortcut == "ctrl+z"
    assert at.button(key="redo").proto.shortcut == "ctrl+y"


def test_undo_puts_back_a_bad_cell_as_it_was_typed_and_a_title():
    at = page(sample(GLYCOL))
    edit(at, "streams", {"edited_rows": {0: {"flow": "12 kW"}}})
    at.text_input(key="title_input").input("Revised heater").run()
    at.button(key="undo").click().run()  # the title goes back; the bad cell is still as typed
    assert at.text_input(key="title_input").value == held(at).title == sample(GLYCOL).title
    assert typed(at, "streams")[0]["flow"] == "12 kW" and "unit 'kW' is not a mass flow" in errors(at)
    at.button(key="undo").click().run()
    assert answer(at) == "745.6 kg/h" and errors(at) == ""


# -- a value typed into the unknown's cell ---------------------------------------------------------------------
def test_a_value_typed_into_the_unknowns_cell_is_kept_and_the_page_asks_what_to_solve_for():
    at = page(sample(GLYCOL))
    edit(at, "streams", {"edited_rows": {1: {"flow": "800 kg/h"}}})
    no_traceback(at)
    assert typed(at, "streams")[1]["flow"] == "800 kg/h"  # not dropped
    assert f"'800 kg/h' {TYPED_INTO_UNKNOWN}" in errors(at) and "pick another quantity under 'Solve for'" in errors(at)
    assert shown_answer(at) is None  # no answer that ignores what was typed
    assert not at.selectbox(key="unknown_picker").disabled
    at.selectbox(key="unknown_picker").select("Glycol: outlet temperature").run()
    ws = held(at)
    assert ws.streams[1].flow.value == 800 and ws.streams[1].flow.unit == "kg/h"  # the typed value is used
    assert typed(at, "streams")[0]["outlet"] == "? °C" and errors(at) == ""
    # more steam than the 745.6 kg/h that heats the glycol to 40 °C: the glycol leaves warmer
    assert answer(at) == engine(ws) and float(answer(at).split()[0]) > 40


def test_typing_a_question_mark_back_solves_for_it_again():
    at = page(sample(GLYCOL))
    edit(at, "streams", {"edited_rows": {1: {"flow": "800 kg/h"}}})
    edit(at, "streams", {"edited_rows": {1: {"flow": "? kg/h"}}})
    assert answer(at) == "745.6 kg/h" and errors(at) == ""


# -- Solve for --------------------------------------------------------------------------------------------------
def test_solve_for_offers_a_new_duty_which_adds_its_line():
    at = page(sample(GLYCOL))
    picker = at.selectbox(key="unknown_picker")
    assert NEW_DUTY_LABEL in picker.options and picker.value == "Steam: flow"
    picker.select(NEW_DUTY_LABEL).run()
    no_traceback(at)
    ws = held(at)
    assert [d.name for d in ws.duties] == ["Heater or cooler"] and ws.duties[0].value is None
    assert typed(at, "duties") == [{"name": "Heater or cooler", "heat": "?"}]
    assert ws.streams[1].flow.value == pytest.approx(745.627)  # the steam keeps its last answer
    assert at.selectbox(key="unknown_picker").value == "duty Heater or cooler"
    edit(at, "streams", {"deleted_rows": [1]})  # now the duty replaces the steam
    ws = held(at)
    assert answer(at) == engine(ws)
    # the glycol's heat (434.5 kW, the engine's contribution table for this sample) and the 2 kW loss
    assert solve(ws).answer.value_si == pytest.approx(434.5e3 + 2e3, rel=1e-3)


def test_solve_for_has_no_clear_button():
    at = page(sample(GLYCOL))
    assert at.selectbox(key="unknown_picker").proto.default == 0  # a default: the widget is not clearable


def test_a_deleted_unknown_line_says_so_in_plain_words_with_a_one_click_fix():
    at = page(sample(GLYCOL))
    edit(at, "streams", {"deleted_rows": [1]})
    no_traceback(at)
    message = errors(at)
    assert "Steam flow, belonged to Steam, which is no longer on the sheet" in message
    assert "kind=" not in message and "streams[" not in message
    at.button(key="undo_deletion").click().run()
    assert answer(at) == "745.6 kg/h" and [s.name for s in held(at).streams] == ["Glycol", "Steam"]


# -- title and notes -------------------------------------------------------------------------------------------
def test_title_and_notes_are_edited_as_plain_text_and_undone():
    at = page(sample(GLYCOL))
    description = sample(GLYCOL).notes
    assert at.text_area(key="notes_input").value == description  # the sample's description is its notes
    notes = "Checked against the **site** data sheet <b>rev 3</b>; [link](http://e.invalid)"
    at.text_area(key="notes_input").input(notes).run()
    assert held(at).notes == notes  # stored as typed
    shown = [c.value for c in at.caption]
    assert not any(notes in c for c in shown)  # never given to Markdown unescaped
    assert any(re.sub(r"\\(.)", r"\1", c).replace("\u2060", "") == notes for c in shown)
    at.button(key="undo").click().run()
    assert held(at).notes == description and at.text_area(key="notes_input").value == description


# -- saved state beside the answer ------------------------------------------------------------------------------


def saved_state(at) -> str:
    return next(c.value for c in at.sidebar.caption if "aved" in c.value)


def test_the_answer_panel_says_whether_the_page_is_saved(db):
    at = page(sample(GLYCOL))
    assert saved_state(at) == "Not saved yet."
    at.button(key="share_save").click().run()
    rev = revision_id(held(at))
    assert saved_state(at) == f"Saved as revision {rev}."
    edit(at, "streams", {"edited_rows": {0: {"flow": "6 t/h"}}})
    assert saved_state(at).startswith(f"Unsaved changes since revision {rev}")
    at.button(key="undo").click().run()  # back to the saved content: saved again
    assert saved_state(at) == f"Saved as revision {rev}."


# -- one caution; the equipment's words follow its sign ------------------------------------------------------------
def test_the_reactor_page_shows_the_one_caution_once_and_not_in_its_charts():
    at = page(sample("batch_reactor_exotherm.json"))
    texts = [w.value for w in at.warning] + [c.value for c in at.caption] + [m.value for m in at.markdown]
    assert sum(CAUTION in t for t in texts) == 1
    figures = [json.dumps(json.loads(c.proto.spec)) for c in at.get("plotly_chart")]
    assert figures and not any("screening estimate" in f.lower() for f in figures)


def test_the_equipment_row_says_heat_given_when_the_vessel_cools():
    ws = sample("batch_reactor_exotherm.json")  # 3.2 t of 316 steel starting at 55 °C (given; the first charge's)
    result = solve(ws)
    (equipment,) = [t for t in result.terms if t.kind == "equipment"]
    final_C = result.answer.value_si - 273.15
    assert final_C < 55 and equipment.heat > 0  # it cools, giving heat to the contents (+ into the process)
    assert "given to the contents" in equipment.detail.text and "taken up" not in equipment.detail.text
    # hand check: 3200 kg x 0.50 kJ/(kg K) (austenitic stainless, CRC Handbook, from memory) x (55 - T) K
    assert equipment.heat == pytest.approx(3200 * 500 * (55 - final_C), rel=0.1)
    warmer = ws.model_copy(deep=True)
    warmer.vessels[0].equipment.initial_temperature.value = 50  # now the vessel warms: heat taken up
    (equipment,) = [t for t in solve(warmer).terms if t.kind == "equipment"]
    assert equipment.heat < 0 and "taken up by the vessel" in equipment.detail.text


# -- a decimal comma --------------------------------------------------------------------------------------------------
@pytest.mark.parametrize("cell, message", [
    ("12,5 t/h", "'12,5 t/h' has a comma in the number: use a decimal point, e.g. '12.5 t/h'"),
    # a US engineer's 50,000 lb/h: the thousands reading first, never only '50.000' (50 lb/h)
    ("50,000 lb/h", "'50,000 lb/h' has a comma in the number, which reads two ways: write '50000 lb/h' if the "
                    "comma separates thousands, or '50.000 lb/h' if it is a decimal comma"),
])
def test_a_decimal_comma_is_explained_with_what_was_typed(cell, message):
    at = page(sample(GLYCOL))
    edit(at, "streams", {"edited_rows": {0: {"flow": cell}}})
    assert f"Streams, row 1, flow: {message}" in errors(at)
    assert typed(at, "streams")[0]["flow"] == cell
