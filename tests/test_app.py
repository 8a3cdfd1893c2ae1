"""The page, driven through Streamlit's AppTest: the real app.py, no browser.

AppTest cannot type into a table, so table edits are queued in the session (``hb_pending_edits``)
and go through the same function as an edit in the browser. Every expected answer is the
engine's own (heatbalance.solve) for the worksheet the page holds; the samples are our own scenarios;
water from scratch is checked against IAPWS-IF97 through the `iapws` package.
"""
from pathlib import Path

import pytest
from iapws import IAPWS97
from streamlit.testing.v1 import AppTest

from heatbalance import load_worksheet, solve
from heatbalance.worksheet import Unknown

ROOT = Path(__file__).resolve().parent.parent
APP = str(ROOT / "app.py")
WORKSHEET, ROWS, PENDING = "hb_worksheet", "hb_rows", "hb_pending_edits"  # app.py's session keys
SAMPLES = {p.name: p for p in sorted((ROOT / "sample_data").glob("*.json"))}
US = "US customary (°F, lb, Btu)"


def sample(name):
    return load_worksheet(SAMPLES[name].read_bytes())


def page(name=None) -> AppTest:
    at = AppTest.from_file(APP, default_timeout=60)
    if name is not None:
        at.session_state[WORKSHEET] = sample(name)
    return at.run()


def answer_text(at) -> str:
    metrics = at.main.metric
    assert len(metrics) == 1, [e.value for e in at.error]
    return metrics[0].value


def errors(at) -> str:
    return "\n".join(e.value for e in at.error)


def contributions(at):
    """The results table (the one data frame that is not an editable table)."""
    return next(d for d in at.dataframe if not (d.key or "").startswith("editor_")).value


def edit(at, table, edits) -> AppTest:
    at.session_state[PENDING] = [(table, edits)]
    return at.run()


def no_traceback(at):
    assert not at.exception, [e.value for e in at.exception]


def test_the_page_opens_on_a_solved_sample():
    at = page()
    no_traceback(at)
    expected = solve(sample("steam_heater_glycol.json")).answer
    assert answer_text(at) == expected.text == "745.6 kg/h"  # engine's answer for our sample
    assert at.main.metric[0].label == "Answer: Steam flow"
    assert at.selectbox(key="unknown_picker").value == "Steam: flow"
    assert errors(at) == ""


@pytest.mark.parametrize("name", list(SAMPLES))
def test_the_picker_loads_every_sample_solved(name):
    at = page()
    title = sample(name).title
    at.selectbox(key="sample_picker").select(title).run()
    no_traceback(at)
    assert at.title[0].value == title
    assert answer_text(at) == solve(sample(name)).answer.text


def test_the_contribution_table_closes_the_balance():
    at = page("batch_reactor_exotherm.json")
    table = contributions(at)
    heat = [float(cell.replace(",", "")) for cell in table["heat into process [kJ]"]]  # shown as 1,234.57
    assert list(table["item"]) == ["R-2 / Batch", "R-2 / Reagent", "Jacket cooling", "Main reaction", "R-2 equipment"]
    # reaction heat: 92 kJ/mol × 4.2 kmol = 386,400 kJ released (the sample's own numbers)
    assert heat[3] == pytest.approx(386_400, abs=0.005)
    # jacket: 110 kW for 40 min = 264,000 kJ removed
    assert heat[2] == pytest.approx(-264_000, abs=0.005)
    assert sum(heat) == pytest.approx(0.0, abs=0.03)  # five cells rounded to 0.01 kJ
    assert list(table["latent absorbed [kJ]"])[2:] == ["", "", ""]  # blank where it does not apply


def test_editing_an_amount_changes_the_answer_to_the_engines():
    at = page()
    edit(at, "streams", {"edited_rows": {0: {"flow": "15 t/h"}}})
    no_traceback(at)
    held = at.session_state[WORKSHEET]
    assert held.streams[0].flow.value == 15 and held.streams[0].flow.unit == "t/h"
    expected = solve(held).answer
    assert answer_text(at) == expected.text
    # steam scales with the glycol duty: 15/12 of the glycol part plus the same 2 kW of losses
    before = solve(sample("steam_heater_glycol.json")).answer.value
    assert 1.24 * before < expected.value < 1.25 * before
    assert at.session_state[ROWS]["streams"][0]["flow"] == "15 t/h"


def test_switching_the_unknown_from_a_temperature_to_a_flow_solves_the_other_way():
    at = page()
    at.selectbox(key="unknown_picker").select("Glycol: outlet temperature").run()
    no_traceback(at)
    held = at.session_state[WORKSHEET]
    assert held.unknowns == [Unknown(kind="temperature", line="Glycol", end="outlet")]
    assert answer_text(at) == solve(held).answer.text == "40 °C"  # the sample's outlet, solved back
    edit(at, "streams", {"edited_rows": {1: {"flow": "900 kg/h"}}})  # more steam: a hotter outlet
    hotter = solve(at.session_state[WORKSHEET]).answer
    assert answer_text(at) == hotter.text and hotter.value > 45
    at.selectbox(key="unknown_picker").select("Steam: flow").run()
    held = at.session_state[WORKSHEET]
    assert held.unknowns == [Unknown(kind="amount", line="Steam")]
    assert held.streams[0].outlet.temperature.value == pytest.approx(hotter.value, rel=1e-5)
    assert solve(held).answer.value == pytest.approx(900, rel=1e-4)  # back to the flow that was typed
    assert answer_text(at) == solve(held).answer.text


def test_the_display_unit_system_converts_the_answer_and_the_tables():
    at = page()
    at.radio(key="unit_system").set_value(US).run()
    no_traceback(at)
    expected = solve(sample("steam_heater_glycol.json"), "US").answer
    assert answer_text(at) == expected.text and expected.unit == "lb/h"
    # 745.6 kg/h / 0.45359237 kg/lb (exact, NIST SP 811) = 1,644 lb/h
    assert expected.value == pytest.approx(solve(sample("steam_heater_glycol.json")).answer.value / 0.45359237)
    assert "heat into process [Btu/h]" in contributions(at).columns


def test_a_wrong_unit_is_marked_and_the_inputs_are_kept():
    at = page()
    edit(at, "streams", {"edited_rows": {0: {"flow": "12 kW"}}})
    no_traceback(at)
    assert "Streams, row 1, flow: unit 'kW' is not a mass flow (it measures power)" in errors(at)
    assert not at.main.metric  # no answer that would not match the page
    rows = at.session_state[ROWS]["streams"]
    assert rows[0]["flow"] == "12 kW" and rows[1]["flow"] == "? kg/h" and rows[0]["outlet"] == "40 °C"
    # the model is untouched, and fixing the cell solves again
    assert at.session_state[WORKSHEET].streams[0].flow.unit == "t/h"
    edit(at, "streams", {"edited_rows": {0: {"flow": "12 t/h"}}})
    assert answer_text(at) == "745.6 kg/h" and errors(at) == ""


def test_a_bad_cell_is_kept_when_the_title_or_basis_changes():
    at = page()
    edit(at, "streams", {"edited_rows": {0: {"flow": "12 kW"}}})
    at.text_input(key="title_input").input("Glycol heater, revised").run()
    no_traceback(at)
    assert at.session_state[WORKSHEET].title == "Glycol heater, revised"
    assert at.session_state[ROWS]["streams"][0]["flow"] == "12 kW"  # not reverted to the last good value
    assert "unit 'kW' is not a mass flow" in errors(at)
    assert at.selectbox(key="unknown_picker").disabled  # fix the marked cell before moving the unknown


def test_a_negative_mass_shows_the_engines_message_and_keeps_the_inputs():
    at = page("hot_condensate_quench.json")
    edit(at, "charges", {"edited_rows": {0: {"mass": "-3 t"}}})
    no_traceback(at)
    message = "a mass or flow cannot be negative (-3 t)"  # heatbalance.balance, the engine's refusal
    assert f"vessel Quench pit, charge Hot condensate mass: {message}" in errors(at)
    assert f"Vessel charges, row 1, mass: {message}" in errors(at)
    rows = at.session_state[ROWS]["charges"]
    assert [r["mass"] for r in rows] == ["-3 t", "? t"]
    assert [r["initial"] for r in rows] == ["95 °C", "12 °C"]


def test_two_unknowns_show_their_message_and_keep_the_inputs():
    ws = sample("steam_heater_glycol.json")
    two = ws.model_copy(update={"unknowns": [Unknown(kind="amount", line="Steam"),
                                             Unknown(kind="temperature", line="Glycol", end="outlet")]})
    at = AppTest.from_file(APP, default_timeout=60)
    at.session_state[WORKSHEET] = two
    at.run()
    no_traceback(at)
    assert "2 unknowns (kind=amount, line=Steam; kind=temperature, line=Glycol, end=outlet): a balance " \
           "solves for exactly one; give a value to all but one" in errors(at)
    assert at.selectbox(key="unknown_picker").value is None
    rows = at.session_state[ROWS]["streams"]
    assert [r["flow"] for r in rows] == ["12 t/h", "? kg/h"] and rows[0]["outlet"] == "? °C"
    at.selectbox(key="unknown_picker").select("Steam: flow").run()  # picking one frees the other
    assert answer_text(at) == "745.6 kg/h"


def test_a_bad_batch_duration_is_marked_and_kept():
    at = page("batch_reactor_exotherm.json")
    at.text_input(key="basis_duration").input("40 kW").run()
    no_traceback(at)
    assert "Batch duration: unit 'kW' is not a duration (it measures power)" in errors(at)
    assert at.text_input(key="basis_duration").value == "40 kW"
    at.text_input(key="basis_duration").input("60 min").run()
    held = at.session_state[WORKSHEET]
    assert held.basis.duration.value == 60 and answer_text(at) == solve(held).answer.text


def test_a_sample_with_its_own_material_shows_the_materials_table():
    at = page()
    assert at.toggle(key="show_own_tables").value is False  # the glycol heater uses library materials only
    at.selectbox(key="sample_picker").select(sample("batch_reactor_exotherm.json").title).run()
    assert at.toggle(key="show_own_tables").value is True
    assert any((d.key or "").startswith("editor_materials_") for d in at.dataframe)  # the table is drawn
    rows = at.session_state[ROWS]["materials"]
    assert [(r["material"], r["cp"]) for r in rows] == [("reagent solution", "3.2 kJ/(kg*K)")]  # the sample's own


def test_batch_results_carry_the_safety_caution():
    at = page("batch_reactor_exotherm.json")
    cautions = "\n".join(w.value for w in at.warning)
    assert "not a substitute for reaction calorimetry, a process hazard analysis or licensed engineering" in cautions
    assert "follow local codes" in cautions


def test_a_new_worksheet_starts_empty_without_an_error():
    at = page()
    at.button(key="new_worksheet").click().run()
    no_traceback(at)
    assert at.session_state[WORKSHEET].streams == [] and errors(at) == ""
    assert "Nothing to solve yet" in "\n".join(i.value for i in at.info)


def test_a_worksheet_built_from_scratch_solves_for_the_picked_unknown():
    at = page()
    at.button(key="new_worksheet").click().run()
    at.session_state[PENDING] = [
        ("streams", {"added_rows": [{"name": "Water", "material": "water", "flow": "", "pressure": "0 barg",
                                     "inlet": "20 °C", "outlet": "80 °C"}]}),
        ("duties", {"added_rows": [{"name": "Heater", "heat": "50 kW"}]})]
    at.run()
    no_traceback(at)
    assert "no unknown: mark one quantity" in errors(at)
    at.selectbox(key="unknown_picker").select("Water: flow").run()
    assert errors(at) == ""
    # IAPWS-IF97 (iapws package): h(80 °C) − h(20 °C) at 1.01325 bar = 250.98 kJ/kg; 50 kW / Δh in kg/h
    dh = IAPWS97(T=353.15, P=0.101325).h - IAPWS97(T=293.15, P=0.101325).h
    answer = solve(at.session_state[WORKSHEET]).answer
    assert answer.unit == "kg/h" and answer.value == pytest.approx(50 / dh * 3600, rel=1e-6)  # ≈ 717.2 kg/h
    assert answer_text(at) == answer.text


def test_an_engine_failure_is_a_plain_message_not_a_traceback(monkeypatch):
    import heatbalance.balance as balance

    def broken(*args, **kwargs):
        raise ZeroDivisionError("float division by zero")

    monkeypatch.setattr(balance, "build_problem", broken)
    at = page()
    no_traceback(at)
    assert "the engine failed unexpectedly (ZeroDivisionError)" in errors(at)
    assert "Traceback" not in errors(at)
