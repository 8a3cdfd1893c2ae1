"""What is typed into the page's grids is read as typed, through Streamlit's AppTest (the real app.py, no browser).

- A fraction cell (mass fraction, conversion) takes a number from 0 to 1 or a percentage (``98 %``); a bare number
  above 1 (``98``) is refused at its cell with what was typed and the two ways to write it, never clamped.
- The vessel dropdowns offer the vessels as typed in the Vessels grid (a new batch sheet can get its first charge);
  the material dropdown offers a material as typed in the materials grid, whose material is a name to type.
- The refusal for a sheet with no unknown reads once.

AppTest cannot type into a grid: a test calls the page state's ``apply_table_edit`` (what the grid's callback
calls) and reruns; what the browser's grid does with a keystroke is in ``test_grid_input_browser.py``. Every
expected answer is the engine's own (heatbalance.solve) for the worksheet meant, with hand checks where stated;
the samples are scenarios of our own invention.
"""
from __future__ import annotations

import json
import re

import pytest
from iapws import IAPWS97

from heatbalance import solve
from heatbalance.errors import InputError
from heatbalance.present.text import answer_text as written
from page_helpers import answer_value, edit, errors, held, no_traceback, page, sample, shown_answer, typed
from webapp import grids
from webapp.answer import NEW_DUTY_LABEL
from webapp.state import PageState

ACID = "acid_dilution_jacketed_vessel.json"  # D-101: 1 t of 98 % sulfuric acid into 2.92 t of water
GLYCOL = "steam_heater_glycol.json"  # 12 t/h of 30 % glycol heated by steam: 745.6 kg/h
REACTOR = "batch_reactor_exotherm.json"  # one reaction in R-2, conversion 1


def engine(ws) -> str:
    return written(solve(ws).answer, "SI")


def column_settings(at, table: str) -> dict:
    """The column settings the page gave a grid's editor (what the browser's grid is built from)."""
    (editor,) = [e for e in at.get("dataframe") if f"editor_{table}_" in e.proto.id]
    return json.loads(editor.proto.columns)


def dropdown(at, table: str, column: str) -> list[str]:
    return column_settings(at, table)[column]["type_config"]["options"]


# -- fractions: never clamped ------------------------------------------------------------------------------------
def test_98_typed_as_the_acids_mass_fraction_is_refused_at_its_cell_not_solved_on_pure_acid():
    at = page(sample(ACID))
    assert answer_value(at) == engine(sample(ACID)) == "-360,182 kJ"
    edit(at, "charges", {"edited_rows": {1: {"mass fraction": "98"}}})
    no_traceback(at)
    message = "'98' is not a mass fraction (0 to 1): for 98 % type 0.98 or 98 %"
    assert f"Vessel charges, row 2, mass fraction: {message}" in errors(at)
    assert shown_answer(at) is None  # no answer from a value the user did not type
    assert typed(at, "charges")[1]["mass fraction"] == "98"  # kept as typed
    assert held(at).vessels[0].charges[1].mass_fraction == 0.98  # the last sheet that read, unchanged


@pytest.mark.parametrize("cell", ["98 %", "98%", "0.98"])
def test_the_acids_strength_as_a_percentage_or_a_fraction_gives_the_samples_answer(cell):
    at = page(sample(ACID))
    edit(at, "charges", {"edited_rows": {1: {"mass fraction": cell}}})
    no_traceback(at)
    assert errors(at) == "" and typed(at, "charges")[1]["mass fraction"] == cell
    assert held(at).vessels[0].charges[1].mass_fraction == 0.98
    assert answer_value(at) == engine(sample(ACID)) == "-360,182 kJ"


def test_30_typed_as_the_glycols_mass_fraction_is_refused_without_quoting_a_value_not_typed():
    at = page(sample(GLYCOL))
    edit(at, "streams", {"edited_rows": {0: {"mass fraction": "30"}}})
    message = errors(at)
    assert "Streams, row 1, mass fraction: '30' is not a mass fraction (0 to 1): for 30 % type 0.3 or 30 %" \
        in message
    assert "mass fraction 1" not in message and shown_answer(at) is None
    edit(at, "streams", {"edited_rows": {0: {"mass fraction": "30 %"}}})
    assert errors(at) == "" and held(at).streams[0].mass_fraction == 0.3
    assert answer_value(at) == engine(sample(GLYCOL)) == "745.6 kg/h"


def test_a_conversion_takes_a_percentage_and_refuses_a_bare_90():
    at = page(sample(REACTOR))
    edit(at, "reactions", {"edited_rows": {0: {"conversion": "90"}}})
    assert "Reaction heat, row 1, conversion: '90' is not a conversion (0 to 1): for 90 % type 0.9 or 90 %" \
        in errors(at)
    assert shown_answer(at) is None
    edit(at, "reactions", {"edited_rows": {0: {"conversion": "90 %"}}})
    ninety = sample(REACTOR)
    ninety.reactions[0].conversion = 0.9
    assert errors(at) == "" and held(at) == ninety
    assert answer_value(at) == engine(ninety) != engine(sample(REACTOR))


@pytest.mark.parametrize("cell, message", [
    ("98", "'98' is not a mass fraction (0 to 1): for 98 % type 0.98 or 98 %"),
    ("1.5", "'1.5' is not a mass fraction (0 to 1): for 1.5 % type 0.015 or 1.5 %"),
    ("120 %", "'120 %' is not a mass fraction: a percentage lies between 0 % and 100 %"),
    ("-0.2", "'-0.2' is not a mass fraction: type a number from 0 to 1 (0.98) or a percentage (98 %)"),
    ("-5 %", "'-5 %' is not a mass fraction: a percentage lies between 0 % and 100 %"),
    ("250", "'250' is not a mass fraction: type a number from 0 to 1 (0.98) or a percentage (98 %)"),
    ("strong", "'strong' is not a mass fraction: type a number from 0 to 1 (0.98) or a percentage (98 %)"),
    ("nan", "'nan' is not a mass fraction: type a number from 0 to 1 (0.98) or a percentage (98 %)"),
    ("0,98", "'0,98' has a comma in the number: use a decimal point, e.g. '0.98'"),
])
def test_a_bad_fraction_cell_says_what_was_typed_and_what_is_expected(cell, message):
    with pytest.raises(InputError) as refused:
        grids.parse_fraction(cell, "mass fraction")
    assert refused.value.message == message


@pytest.mark.parametrize("cell, value", [("0", 0.0), ("1", 1.0), ("0.25", 0.25), ("25 %", 0.25), ("100 %", 1.0),
                                         ("0 %", 0.0), ("2.5%", 0.025), (".5", 0.5)])
def test_a_fraction_cell_reads_a_fraction_or_a_percentage(cell, value):
    assert grids.parse_fraction(cell, "mass fraction") == pytest.approx(value, abs=1e-15)


def test_the_grids_give_the_browser_no_number_limits_to_clamp_to():
    """The browser's number column clamps a value above its max to the max: no grid column may have limits."""
    at = page(sample(REACTOR))  # a batch sheet with a reaction and a material of its own: every grid is drawn
    for table in grids.TABLES:
        for column, settings in column_settings(at, table).items():
            limits = {"min_value", "max_value"} & set(settings.get("type_config", {}))
            assert not limits, (table, column, limits)
    assert column_settings(at, "charges")["mass fraction"]["type_config"]["type"] == "text"
    assert column_settings(at, "reactions")["conversion"]["type_config"]["type"] == "text"


# -- dropdowns offer what is typed ---------------------------------------------------------------------------------
def new_batch_sheet_with_vessel():
    """Sidebar "New, empty worksheet", basis batch, and a vessel V-1 at 0 barg ending at 35 °C (no charge yet)."""
    at = page(sample(GLYCOL))
    at.button(key="new_worksheet").click().run()
    at.selectbox(key="basis_kind").select("batch").run()
    return edit(at, "vessels", {"added_rows": [{"name": "V-1", "pressure": "0 barg", "final": "35 °C"}]})


def test_a_new_batch_sheets_vessel_is_offered_for_its_first_charge_and_the_sheet_solves():
    at = new_batch_sheet_with_vessel()
    no_traceback(at)
    assert "vessel V-1 has no charges" in errors(at)  # the sheet does not read yet
    assert dropdown(at, "charges", "vessel") == ["V-1"]
    assert dropdown(at, "equipment", "vessel") == dropdown(at, "reactions", "vessel") == ["V-1"]
    edit(at, "charges", {"added_rows": [{"vessel": "V-1", "name": "Water", "material": "water", "mass": "1000 kg",
                                         "initial": "20 °C"}]})
    assert errors(at).startswith("**Not solved** — no unknown")
    at.selectbox(key="unknown_picker").select(NEW_DUTY_LABEL).run()
    ws = held(at)
    assert [c.name for c in ws.vessels[0].charges] == ["Water"] and errors(at) == ""
    assert answer_value(at) == engine(ws)
    # hand check, IAPWS-IF97 (iapws package): 1000 kg x (h(35 °C) - h(20 °C)) at 1.01325 bar, in kJ
    dh = IAPWS97(T=308.15, P=0.101325).h - IAPWS97(T=293.15, P=0.101325).h
    assert solve(ws).answer.value_si == pytest.approx(1000 * dh * 1000, rel=1e-6)  # ≈ 62,700 kJ


def test_the_vessel_dropdown_follows_the_vessels_as_typed():
    at = new_batch_sheet_with_vessel()
    edit(at, "vessels", {"added_rows": [{"name": "V-2 "}, {"name": "V-1"}]})  # a repeat is offered once
    assert dropdown(at, "charges", "vessel") == ["V-1", "V-2"]
    edit(at, "vessels", {"edited_rows": {0: {"name": "Tank <b>1</b>"}}, "deleted_rows": [1]})
    assert dropdown(at, "charges", "vessel") == ["Tank <b>1</b>", "V-1"]  # plain text, as typed


def test_a_material_typed_in_the_materials_grid_is_offered_before_the_sheet_reads():
    at = new_batch_sheet_with_vessel()  # does not read: V-1 has no charge
    at.toggle(key="show_own_tables").set_value(True).run()
    assert column_settings(at, "materials")["material"]["type_config"]["type"] == "text"  # a name to type
    edit(at, "materials", {"added_rows": [{"material": "brine mix", "phase": "liquid", "cp": "3.4 kJ/(kg*K)",
                                          "source": "site lab"}]})
    assert held(at).materials == [] and "vessel V-1 has no charges" in errors(at)
    assert dropdown(at, "charges", "material")[0] == "brine mix"
    assert "water" in dropdown(at, "charges", "material")


def test_a_grid_whose_dropdown_changes_is_given_the_rows_as_typed():
    """A new dropdown option gives the grid's editor a new identity in the browser: it shows only the rows it is
    given, so they must hold the edits made in it since (here a charge added), not its older base."""
    state = PageState.opened(sample("hot_condensate_quench.json"))
    options = (("Quench pit",),)
    state.editor_rows("charges", [], None, "SI", options)
    added = {"added_rows": [{"vessel": "Quench pit", "name": "Ice", "material": "water", "mass": "100 kg",
                             "initial": "20 °C"}]}
    state.apply_table_edit("charges", added)
    rows, _ = state.editor_rows("charges", [], added, "SI", options)  # the same editor: its base + its edits
    assert "Ice" not in [r["name"] for r in rows]
    rows, _ = state.editor_rows("charges", [], added, "SI", (("Quench pit", "Pit 2"),))
    assert [r["name"] for r in rows] == [r["name"] for r in state.rows["charges"]] and rows[-1]["name"] == "Ice"


# -- a refusal that reads once ---------------------------------------------------------------------------------------
def test_no_unknown_is_said_once_in_plain_words():
    at = page(grids.empty_worksheet())
    edit(at, "streams", {"added_rows": [{"name": "Water", "material": "water", "pressure": "0 barg",
                                         "inlet": "20 °C", "outlet": "80 °C"}]})
    edit(at, "duties", {"added_rows": [{"name": "Heater", "heat": "50 kW"}]})
    no_traceback(at)
    shown = [re.sub(r"\\(.)", r"\1", e.value) for e in at.error]
    assert shown == ["**Not solved** — no unknown: mark one quantity (a flow or mass, a temperature, or a duty) "
                     "to solve for"]
