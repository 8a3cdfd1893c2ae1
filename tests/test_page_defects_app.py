"""Page defects, through Streamlit's AppTest (the real app.py) and the page's pure state: undo across a load
(the sheet it replaced comes back with its rows as typed, where it came from and the saved revision it was based
on), a rename made while a cell is bad keeps the fields the grids do not show, the heats-of-mixing form follows a
vessel rename and survives a run without its panel.

The worksheets are the bundled samples (scenarios of our own invention).
"""
from __future__ import annotations

import json

import pytest
from streamlit.testing.v1 import AppTest

from heatbalance.links import revision_id
from heatbalance.store import WorksheetStore
from heatbalance.worksheet import Quantity, ScreeningInputs, parse_worksheet
from page_helpers import ROOT, edit, held, no_traceback, opened, page, sample, unescaped
from webapp.mixing_panel import KEYS as MIXING
from webapp.state import KEY, PageState

GLYCOL = "steam_heater_glycol.json"  # the sample the page opens on
REACTOR = "batch_reactor_exotherm.json"
HYDRATION = "glycol_hydration_screening.json"  # an equation's reaction in vessel R-7
ACID = "acid_dilution_jacketed_vessel.json"  # 98 % acid into water in vessel D-101, the mixing stated


def shown(text: str) -> str:
    return unescaped(text).replace("**", "")


def origin(at) -> str:
    """The line under the title saying where the sheet came from."""
    lines = [shown(c.value) for c in at.caption if shown(c.value).startswith(
        ("Saved revision", "From a link", "Bundled sample", "Opened from the file", "A new worksheet"))]
    assert len(lines) == 1, lines
    return lines[0]


def saved_state(at) -> str:
    return next(shown(c.value) for c in at.sidebar.caption if "aved" in c.value)


def errors(at) -> str:
    return "\n".join(shown(e.value) for e in at.error)


def address_bar(at) -> dict:
    return {kind: at.query_params[kind] for kind in ("ws", "sheet") if kind in at.query_params}


def grid(at, table: str):
    """What the page gives the grid's editor (AppTest sees the data, not the browser's edits)."""
    return next(d for d in at.dataframe if (d.key or "").startswith(f"editor_{table}_")).value


def undo(at) -> AppTest:
    assert not at.button(key="undo").disabled
    return at.button(key="undo").click().run()


def redo(at) -> AppTest:
    assert not at.button(key="redo").disabled
    return at.button(key="redo").click().run()


# -- 1. undo across a load --------------------------------------------------------------------------------------
def test_undo_brings_back_the_sheet_a_sample_replaced_as_typed_with_its_origin_and_redo_the_sample():
    at = opened()
    at.text_input(key="title_input").input("Glycol heater, my version").run()
    edit(at, "streams", {"edited_rows": {0: {"flow": "12 kW"}}})  # a bad cell, kept as typed
    mine = held(at)
    at.selectbox(key="sample_picker").select(sample(REACTOR).title).run()
    assert held(at) == sample(REACTOR)
    assert origin(at) == f"Bundled sample ({REACTOR}): not a saved revision."
    undo(at)
    no_traceback(at)
    assert held(at) == mine and at.text_input(key="title_input").value == "Glycol heater, my version"
    assert at.session_state[KEY].rows["streams"][0]["flow"] == "12 kW"
    assert list(grid(at, "streams")["flow"]) == ["12 kW", "? kg/h"]  # a fresh editor on the rows as typed
    assert "unit 'kW' is not a mass flow" in errors(at)
    assert origin(at) == (f"Bundled sample ({GLYCOL}): not a saved revision. "
                          "Edited since: what is on the page now is not saved.")
    redo(at)
    assert held(at) == sample(REACTOR) and errors(at) == ""
    assert origin(at) == f"Bundled sample ({REACTOR}): not a saved revision."
    assert at.button(key="redo").disabled
    undo(at), undo(at), undo(at)  # the load, the bad cell, the title: the sample as it opened
    assert held(at) == sample(GLYCOL) and origin(at) == f"Bundled sample ({GLYCOL}): not a saved revision."


def test_undo_across_a_new_sheet_puts_back_the_saved_revision_it_was_based_on(db):
    at = opened()
    at.button(key="share_save").click().run()
    first = revision_id(held(at))
    edit(at, "streams", {"edited_rows": {0: {"flow": "6 t/h"}}})
    edited = held(at)
    at.button(key="new_worksheet").click().run()
    assert origin(at) == "A new worksheet: not saved yet." and address_bar(at) == {}
    undo(at)
    no_traceback(at)
    assert held(at) == edited and address_bar(at) == {"ws": first}
    assert saved_state(at).startswith(f"Unsaved changes since revision {first}")
    assert origin(at).startswith(f"Saved revision `{first}`") and origin(at).endswith("Edited since: what is on "
                                                                                      "the page now is not saved.")
    at.button(key="share_save").click().run()  # saved as an edit of the first, which stays as it was
    second = revision_id(edited)
    with WorksheetStore(db) as store:
        assert [r.id for r in store.history(second)] == [second, first]
        assert store.open(first).worksheet == sample(GLYCOL)
    redo(at)
    assert held(at).streams == [] and saved_state(at) == "Not saved yet." and address_bar(at) == {}
    assert origin(at) == "A new worksheet: not saved yet."
    undo(at)  # back again: now saved as the second
    assert saved_state(at) == f"Saved as revision {second}." and address_bar(at) == {"ws": second}


def test_undo_across_a_pasted_link_puts_back_the_revision_and_address_and_redo_reopens_the_link(db):
    with WorksheetStore(db) as store:
        mine, theirs = store.save(sample(GLYCOL)).id, store.save(sample(REACTOR)).id
    at = opened(ws=mine)
    edit(at, "streams", {"edited_rows": {0: {"flow": "6 t/h"}}})
    edited = held(at)
    at.text_input(key="share_link_input").set_value(f"https://sheets.example.invalid/?ws={theirs}").run()
    assert held(at) == sample(REACTOR) and address_bar(at) == {"ws": theirs}
    undo(at)
    assert held(at) == edited and address_bar(at) == {"ws": mine}
    assert saved_state(at).startswith(f"Unsaved changes since revision {mine}")
    assert origin(at).startswith(f"Saved revision `{mine}`")
    redo(at)
    assert held(at) == sample(REACTOR) and address_bar(at) == {"ws": theirs}
    assert saved_state(at) == f"Saved as revision {theirs}." and origin(at).startswith(f"Saved revision `{theirs}`")


def test_undo_across_an_upload_brings_back_the_sheet_and_its_origin():
    at = opened()
    at.text_input(key="title_input").input("Glycol heater, my version").run()
    mine = held(at)
    data = (ROOT / "sample_data" / REACTOR).read_bytes()
    at.file_uploader(key="share_upload").upload("reactor.json", data, "application/json").run()
    assert held(at) == sample(REACTOR) and origin(at) == "Opened from the file reactor.json: not a saved revision."
    undo(at)
    assert held(at) == mine and origin(at).startswith(f"Bundled sample ({GLYCOL})")


def test_undo_of_an_edit_after_a_save_keeps_the_save():
    """An ordinary edit's undo leaves where the sheet came from alone (a save since is not forgotten)."""
    state = PageState.opened(sample(GLYCOL))
    state.apply_table_edit("streams", {"edited_rows": {0: {"flow": "6 t/h"}}})
    assert state.undo({"session": {"after": "a save"}}) is None and state.worksheet == sample(GLYCOL)
    assert state.redo({"session": {}}) is None and state.future == []


# -- 2. a rename keeps what the grids do not show ----------------------------------------------------------------
def _with_reaction_temperature() -> PageState:
    ws = sample(HYDRATION)
    reaction = ws.reactions[0].model_copy(update={"temperature": Quantity(value=120, unit="degC")})
    return PageState.opened(ws.model_copy(update={"reactions": [reaction]}))


@pytest.mark.parametrize("bad_first", [False, True], ids=["rename-alone", "rename-with-a-bad-cell"])
def test_renaming_a_reaction_keeps_its_temperature(bad_first):
    state = _with_reaction_temperature()
    if bad_first:  # the amount does not read: the rename waits for the worksheet to read again
        state.apply_table_edit("reactions", {"edited_rows": {0: {"name": "Hydration step", "amount": "12 kW"}}})
        assert [p.column for p in state.problems] == ["amount"]
    state.apply_table_edit("reactions", {"edited_rows": {0: {"name": "Hydration step", "amount": "0.9 t"}}})
    assert state.problems == []
    (reaction,) = state.worksheet.reactions
    assert reaction.name == "Hydration step" and reaction.temperature == Quantity(value=120, unit="degC")


def test_renaming_a_vessel_while_a_cell_is_bad_keeps_its_screening_and_charges():
    ws = sample(HYDRATION)
    screening = ws.vessels[0].screening
    assert isinstance(screening, ScreeningInputs)
    state = PageState.opened(ws)
    state.apply_table_edit("streams", {"added_rows": [{"name": "Feed", "material": "water", "flow": "5 kW"}]})
    state.apply_table_edit("vessels", {"edited_rows": {0: {"name": "R-8"}}})
    state.apply_table_edit("streams", {"added_rows": []})  # the bad row taken out again
    assert state.problems == []
    (vessel,) = state.worksheet.vessels
    assert vessel.name == "R-8" and vessel.screening == screening
    assert [c.name for c in vessel.charges] == [c.name for c in ws.vessels[0].charges]
    assert state.worksheet.reactions[0].vessel == "R-8"


# -- 3. the heats-of-mixing form -------------------------------------------------------------------------------
def _two_vessels(with_mixing: bool = True):
    doc = json.loads((ROOT / "sample_data" / ACID).read_text(encoding="utf-8"))
    second = {**doc["vessels"][0], "name": "D-201"}
    second.pop("equipment")
    doc["vessels"].append(second)
    if not with_mixing:
        doc.pop("mixings")
    return parse_worksheet(doc)


def test_the_mixing_forms_vessel_follows_a_rename_and_what_is_typed_stays():
    at = page(_two_vessels())
    at.selectbox(key=MIXING["vessel"]).select("D-201").run()
    at.text_input(key=MIXING["name"]).input("Second dilution").run()
    edit(at, "vessels", {"edited_rows": {1: {"name": "D-202"}}})
    no_traceback(at)
    assert [v.name for v in held(at).vessels] == ["D-101", "D-202"]
    assert at.selectbox(key=MIXING["vessel"]).value == "D-202"
    assert at.text_input(key=MIXING["name"]).value == "Second dilution"
    at.button(key=MIXING["save"]).click().run()
    stated = {m.name: m.vessel for m in held(at).mixings}
    assert stated == {"Dilution 98 % to 25 %": "D-101", "Second dilution": "D-202"}


def test_the_mixing_form_is_drawn_again_after_a_run_without_its_panel():
    at = page(_two_vessels(with_mixing=False))  # the warning of an unstated heat of mixing shows the panel
    assert MIXING["vessel"] in at.session_state
    edit(at, "charges", {"edited_rows": {0: {"mass": "12 kW"}}})  # not solved: no warning, no panel
    assert "Heats of mixing" not in [s.value for s in at.subheader]
    edit(at, "charges", {"edited_rows": {0: {"mass": "2920 kg"}}})
    assert "Heats of mixing" in [s.value for s in at.subheader] and errors(at) == ""
    assert at.selectbox(key=MIXING["vessel"]).value == "D-101"
